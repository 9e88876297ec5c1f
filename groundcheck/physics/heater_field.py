"""AC heater wiring as a field source: the heater current runs out along one wire of the pair and
back along the other, so a loop near the wiring links the flux between them.

The pair is two polylines in a plane ``height`` above the deck, each offset half the ``spacing`` to
either side of the stated centre line (mitred at the bends), carrying the heater's current in
opposite senses.  The circuit is closed at both ends: through the filament at the wiring's last
point and through the winding at its first, each taken as a straight piece across the pair (the
valve's heater pins and the winding's leads are about the pair's spacing apart), so that the
current flows round one closed circuit, winding → pair → filament → back. A straight wire from P1
to P2 has the vector potential A = (μ₀I/4π)·ŝ·ln((R1 + R2 + L)/(R1 + R2 − L)) (R1, R2 the distances
to its ends, L its length, ŝ its direction); the flux through a loop on the deck is ∮A·dl round the
loop, evaluated by Gauss–Legendre quadrature on pieces that shorten near the wiring.  A twisted
pair is no field source here: its field falls off exponentially beyond a few lay lengths (common
practice).

References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.4 (vector potential of a
current); F. W. Grover, *Inductance Calculations*, 1946 (the straight filament's potential, as in
the mutual inductance of filaments).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = [
    "source_heater",
    "pair_wires",
    "pair_circuit",
    "pair_path_flux",
    "pair_sources",
    "pair_geometry",
    "pair_closest",
    "MU0_4PI",
    "DEFAULT_SPACING",
    "DEFAULT_HEIGHT",
]

MU0_4PI = 1e-7  # μ₀/4π, H/m
#: the centre distance of two heater wires laid side by side when the plan does not say, m (two
#: 0.75 mm² PVC wires touching: about 3 mm; from memory)
DEFAULT_SPACING = 3e-3
#: the height of heater wiring above the deck when the plan does not say, m (dressed along the
#: deck; from memory)
DEFAULT_HEIGHT = 5e-3

_POINTS = 16
_PIECE = 0.25


def pair_wires(route, spacing: float, height: float) -> tuple[np.ndarray, np.ndarray]:
    """The two wires of the pair as polylines (K × 3): the centre line offset by ±spacing/2 in the
    plane, mitred.

    Parameters:
        route: the centre line's points on the deck, m.
        spacing: the distance between the wires, m.
        height: the wiring's height above the deck, m.
    Returns:
        (out wire, return wire), each K × 3.
    References:
        plane geometry (mitred offset of a polyline).
    """
    pts = np.asarray(route, dtype=float)
    d = np.diff(pts, axis=0)
    d /= np.linalg.norm(d, axis=1)[:, None]
    normals = np.stack([-d[:, 1], d[:, 0]], axis=1)
    offs = np.empty_like(pts)
    offs[0], offs[-1] = normals[0], normals[-1]
    for k in range(1, len(pts) - 1):
        m = normals[k - 1] + normals[k]
        m /= np.linalg.norm(m)
        offs[k] = m / max(float(m @ normals[k]), 0.2)  # mitre, limited at very sharp bends
    z = np.full((len(pts), 1), height)
    return (np.hstack([pts + offs * spacing / 2, z]), np.hstack([pts - offs * spacing / 2, z]))


def pair_circuit(route, spacing: float, height: float) -> np.ndarray:
    """The heater's closed circuit as one polyline (K × 3, first point repeated at the end): out
    along one wire from the winding (the route's first point) to the filament (its last), across
    the filament, back along the other wire and across the winding.

    Parameters:
        route: the centre line's points on the deck, m (first: the winding's end; last: the
        filament's). spacing: the distance between the wires, m.
        height: the wiring's height above the deck, m.
    Returns:
        the closed polyline, K × 3.
    References:
        Kirchhoff's current law: the heater current closes through the filament and the winding.
    """
    out, back = pair_wires(route, spacing, height)
    return np.vstack([out, back[::-1], out[:1]])


def _potential(points: np.ndarray, wire: np.ndarray) -> np.ndarray:
    """Σ over the wire's segments of ŝ·ln((R1 + R2 + L)/(R1 + R2 − L)) at each point (N × 3):
    A/(μ₀I/4π)."""
    a, b = wire[:-1], wire[1:]
    seg = b - a
    L = np.linalg.norm(seg, axis=1)
    s = seg / L[:, None]
    R1 = np.linalg.norm(points[:, None, :] - a[None, :, :], axis=2)
    R2 = np.linalg.norm(points[:, None, :] - b[None, :, :], axis=2)
    log = np.log((R1 + R2 + L[None, :]) / np.maximum(R1 + R2 - L[None, :], 1e-300))
    return log @ s


def _distance(points: np.ndarray, wire: np.ndarray) -> float:
    a, b = wire[:-1], wire[1:]
    d = b - a
    t = np.clip(
        np.einsum("nmk,mk->nm", points[:, None, :] - a[None], d) / np.einsum("mk,mk->m", d, d),
        0,
        1,
    )
    near = a[None] + t[..., None] * d[None]
    return float(np.min(np.linalg.norm(points[:, None, :] - near, axis=2)))


def pair_path_flux(route, spacing: float, height: float, current: float, pts) -> float:
    """∫A·dl (Wb rms) of the heater's closed circuit (:func:`pair_circuit`) along a polyline on the
    deck (closed for a loop's flux).

    Parameters:
        route: the pair's centre line, m.
        spacing: the distance between its wires, m.
        height: its height above the deck, m.
        current: the heater current, A rms.
        pts: the polyline's points on the deck, m.
    Returns:
        the flux, Wb rms (positive for the sense of the polyline).
    References:
        the module's references.
    """
    circuit = pair_circuit(route, spacing, height)
    t, w = np.polynomial.legendre.leggauss(_POINTS)
    total = 0.0
    for p, q in zip(pts, pts[1:]):
        p3, q3 = np.array([p[0], p[1], 0.0]), np.array([q[0], q[1], 0.0])
        length = float(np.linalg.norm(q3 - p3))
        if length == 0.0:
            continue
        near = max(
            _distance(np.array([p3, q3, (p3 + q3) / 2]), circuit), height, spacing / 2, 1e-4
        )
        pieces = max(1, min(4000, int(math.ceil(length / (_PIECE * near)))))
        edges = p3 + (q3 - p3) * (np.arange(pieces + 1) / pieces)[:, None]
        x = (0.5 * (edges[:-1] + edges[1:]))[:, None, :] + (0.5 * (edges[1:] - edges[:-1]))[
            :, None, :
        ] * t[None, :, None]
        x = x.reshape(-1, 3)
        A = _potential(x, circuit)
        dl = (q3 - p3) / pieces
        total += float(np.sum((A @ dl).reshape(pieces, _POINTS) * w[None, :])) * 0.5
    return MU0_4PI * current * total


def pair_geometry(heater) -> tuple[float, float]:
    """(spacing, height) of a heater's pair, m: as stated, else the defaults.

    Parameters:
        heater: a Heater record.
    Returns:
        the spacing between the wires and their height above the deck, m.
    References:
        :data:`DEFAULT_SPACING`, :data:`DEFAULT_HEIGHT` (from memory).
    """
    return (
        DEFAULT_SPACING if heater.spacing is None else heater.spacing,
        DEFAULT_HEIGHT if heater.wiring_height is None else heater.wiring_height,
    )


#: the suffix of an AC heater pair's field source: ``NAME.wiring``
WIRING = ".wiring"


def source_heater(heaters, source: str):
    """The heater whose open pair is the field source named ``source`` (None for another source).

    Parameters:
        heaters: the plan's Heater records.
        source: a field source's name, as the hum budget gives it.
    Returns:
        the Heater, or None.
    References:
        none (naming: :func:`pair_sources`).
    """
    if not source.endswith(WIRING):
        return None
    return next((h for h in heaters if h.name == source[: -len(WIRING)]), None)


def pair_sources(heaters) -> list:
    """The AC heater pairs with a stated route that are not twisted, as field sources of the hum
    budget, each with its heater: (FieldSource named ``NAME.wiring``, kind ``heater-wiring``, at
    its height; Heater).

    Parameters:
        heaters: the plan's Heater records.
    Returns:
        (source, heater) for each pair that is a field source.
    References:
        the module's references.
    """
    from ..model.records import FieldSource

    return [
        (
            FieldSource(
                f"{h.name}{WIRING}",
                "heater-wiring",
                h.route[0],
                0.0,
                1.0,
                (),
                pair_geometry(h)[1],
                "pair",
                route=h.route,
            ),
            h,
        )
        for h in heaters
        if h.ac and len(h.route) >= 2 and not h.twisted
    ]


def pair_closest(heater, polygon, samples: int = 32) -> float:
    """The closest approach of a loop's outline to the heater's circuit (either wire, or a closing
    end), m (each edge of the outline sampled at ``samples`` pieces, the wires taken exactly).

    Parameters:
        heater: a Heater record with a route.
        polygon: the loop's corners on the deck, m.
        samples: pieces per edge of the outline.
    Returns:
        the distance, m.
    References:
        plane and solid geometry.
    """
    spacing, height = pair_geometry(heater)
    corners = np.array([[p[0], p[1], 0.0] for p in [*polygon, polygon[0]]])
    t = np.linspace(0, 1, samples + 1)[:, None]
    points = np.concatenate([p + t * (q - p) for p, q in zip(corners[:-1], corners[1:])])
    return _distance(points, pair_circuit(heater.route, spacing, height))

"""Magnetic pickup: the flux a stray-field source puts through a loop, and the EMF it induces.

A field source (power transformer, choke, mains wiring) is a magnetic dipole at its position, raised
``height`` above the chassis plane, with its axis along x, y or z (normal to the deck) or, by default,
the worst orientation: the one that puts the most flux through the plan's loops taken together (the
principal direction of their flux vectors; one orientation per source, as a real transformer has one).
Its strength is stated as the flux density B_ref at a distance r_ref on its equator, so that its vector
potential is A = K·m̂ × R/|R|³ with K = B_ref·r_ref³ (the moment's μ₀m/4π).  The flux through a loop in
the chassis plane is Φ = ∮A·dl, evaluated in closed form on each straight segment, so that large loops
near the source are exact for the dipole (no uniform-field assumption).  The EMF is E = 2πf·Φ.

The dipole law holds beyond a few times the source's size.  When the plan states the source's ``size``
and a loop passes within that distance of its centre, the source is instead a circular current loop of
that diameter with the same moment, whose vector potential is exact at any distance (complete elliptic
integrals), integrated along the loop by Gauss–Legendre quadrature.

References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.4 (the circular loop's vector potential,
eq. 5.37) and §5.6 (the dipole's); W. R. Smythe, *Static and Dynamic Electricity*, 3rd ed., §7.10 (the
closed form in elliptic integrals); Faraday's law, E = −dΦ/dt.
"""

from __future__ import annotations

import math

import numpy as np

from ..model.records import FieldSource
from .plate_paths import passage_flow, passage_vector
from .special_functions import ellipe, ellipk

__all__ = ["segment_integral", "segment_vector", "path_vector", "path_flux", "loop_flux", "flux_density", "emf",
           "orientation", "min_distance", "ring_path_flux", "ring_passage_flux", "loop_fluxes", "AXES"]

#: the axes a source can be given, as unit vectors (x and y in the chassis plane, z normal to it)
AXES = {"x": (1.0, 0.0, 0.0), "y": (0.0, 1.0, 0.0), "z": (0.0, 0.0, 1.0)}

#: Gauss–Legendre points per piece of a loop's edge in the ring model, and the longest piece as a share of the
#: distance to the source (pieces shorten near it)
RING_POINTS = 16
RING_PIECE = 0.25


def flux_density(src: FieldSource, p) -> float:
    """|B| (T rms) of the source at point p in the chassis plane, on its equator: B_ref·(r_ref/r)³.

    Parameters:
        src: a field source.
        p: point in the chassis plane, m.
    Returns:
        |B|, T rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (dipole field, 1/r³).
    """
    r = math.hypot(p[0] - src.pos[0], p[1] - src.pos[1], src.height)
    return math.inf if r == 0 else src.b_ref * (src.r_ref / r) ** 3


def segment_vector(p, q, h: float = 0.0) -> np.ndarray:
    """(Fx, Fy, Fz): ∫A·dl along the straight segment p → q in the plane z = 0 of a unit dipole (K = 1) at height
    ``h`` above the origin with its moment along x, y and z (1/m).

    Parameters:
        p, q: the segment's ends relative to the point below the dipole, m.
        h: the dipole's height above the plane, m.
    Returns:
        the three line integrals, 1/m.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6: A = m × R/R³.  With R = (X, Y, −h) and
        r(t) = p + t·d, A·dl = [m_z·c − h·(m_y·d_x − m_x·d_y)]·dt/(a t² + b t + E)^{3/2} (c = p × d, a = |d|²,
        b = 2 p·d, E = |p|² + h²), and ∫₀¹ dt/(a t² + b t + E)^{3/2} = [2(2a t + b)/(D·√(a t² + b t + E))]₀¹ with
        D = 4aE − b² = 4(c² + a h²).
    """
    px, py = p
    dx, dy = q[0] - px, q[1] - py
    c = px * dy - py * dx
    a = dx * dx + dy * dy
    if a == 0.0:
        return np.zeros(3)
    b = 2.0 * (px * dx + py * dy)
    e = px * px + py * py + h * h
    d = 4.0 * (c * c + a * h * h)
    if d < 1e-28 * max(a, e) ** 2:
        return np.zeros(3)
    r1 = math.sqrt(a + b + e)
    r0 = math.sqrt(e)
    if r1 == 0.0 or r0 == 0.0:
        return np.zeros(3)
    integral = 2.0 * ((2 * a + b) / r1 - b / r0) / d
    return np.array([h * dy * integral, -h * dx * integral, c * integral])


def segment_integral(p, q) -> float:
    """∫ (x dy − y dx)/r³ along the straight segment p → q, with the dipole at the origin in the plane (1/m).

    Parameters:
        p, q: the segment's ends relative to the dipole, m.
    Returns:
        the line integral, 1/m (the z component of :func:`segment_vector` at height 0).
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6; the integral worked in closed form here.
    """
    return float(segment_vector(p, q, 0.0)[2])


def path_vector(src: FieldSource, pts) -> np.ndarray:
    """K·(Fx, Fy, Fz) along an open polyline (Wb): the flux the path carries for a moment along x, y and z.

    Parameters:
        src: a field source (its position, height and strength; not its axis).
        pts: the polyline's points, m.
    Returns:
        three fluxes, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    ox, oy = src.pos
    total = np.zeros(3)
    for p, q in zip(pts, pts[1:]):
        total += segment_vector((p[0] - ox, p[1] - oy), (q[0] - ox, q[1] - oy), src.height)
    return src.b_ref * src.r_ref ** 3 * total


def orientation(src: FieldSource, vectors) -> np.ndarray:
    """The source's moment direction: its stated axis, or for ``worst`` the unit vector that maximises the sum of
    the squared fluxes through the loops whose flux vectors are given (the principal eigenvector of ΣF·Fᵀ).

    Parameters:
        src: a field source.
        vectors: the flux vectors (:func:`path_vector` round each loop) of the plan's loops.
    Returns:
        a unit vector (x, y, z).
    References:
        the Rayleigh quotient: max over unit m of mᵀ·S·m is S's largest eigenvalue (common linear algebra).
    """
    if src.axis in AXES:
        return np.array(AXES[src.axis])
    vs = [np.asarray(v, dtype=float) for v in vectors]
    S = sum((np.outer(v, v) for v in vs), np.zeros((3, 3)))
    if not np.any(S):
        return np.array(AXES["z"])
    w, V = np.linalg.eigh(S)
    m = V[:, int(np.argmax(w))]
    k = int(np.argmax(np.abs(m)))
    return m if m[k] > 0 else -m          # a sign of our choosing: the largest component positive


def path_flux(src: FieldSource, pts, m=None) -> float:
    """∫A·dl along an open polyline (Wb) for the moment direction ``m`` (default: the source's axis, z if worst).

    Parameters:
        src: a field source.
        pts: the polyline's points, m.
        m: the moment's unit vector.
    Returns:
        the flux share the path carries, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    m = np.array(AXES.get(src.axis, AXES["z"])) if m is None else np.asarray(m)
    return float(path_vector(src, pts) @ m)


def loop_flux(src: FieldSource, polygon, m=None) -> float:
    """Flux (Wb, rms) of the source through a closed polygon, counter-clockwise positive.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
        m: the moment's unit vector (default: the source's axis, z if worst).
    Returns:
        the flux through the loop, Wb rms (counter-clockwise positive).
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (Φ = ∮A·dl).
    """
    pts = list(polygon)
    if len(pts) < 3:
        return 0.0
    return path_flux(src, pts + [pts[0]], m)


def _ring_potential(points: np.ndarray, radius: float, mu0_i: float, axis: np.ndarray) -> np.ndarray:
    """Vector potential (n × 3) of a circular current loop (radius, μ₀I, unit axis) centred at the origin."""
    z = points @ axis
    radial = points - np.outer(z, axis)
    rho = np.linalg.norm(radial, axis=1)
    out = np.zeros_like(points)
    ok = rho > 1e-12 * radius
    rho_, z_ = rho[ok], z[ok]
    k2 = 4 * radius * rho_ / ((radius + rho_) ** 2 + z_ ** 2)
    k2 = np.minimum(k2, 1 - 1e-15)
    a_phi = mu0_i / (np.pi * np.sqrt(k2)) * np.sqrt(radius / rho_) * ((1 - k2 / 2) * ellipk(k2) - ellipe(k2))
    phi_hat = np.cross(axis, radial[ok] / rho_[:, None])
    out[ok] = a_phi[:, None] * phi_hat
    return out


def ring_path_flux(src: FieldSource, pts, m) -> float:
    """∫A·dl (Wb) along an open polyline of the source taken as a circular current loop of diameter ``src.size``
    with the moment of the dipole (μ₀I = 4K/a², a the radius) and axis ``m``.

    Parameters:
        src: a field source with a size.
        pts: the polyline's points in the chassis plane, m.
        m: the ring's unit axis.
    Returns:
        the flux share the path carries, Wb rms.
    References:
        J. D. Jackson, *Classical Electrodynamics*, 3rd ed., eq. 5.37; W. R. Smythe, *Static and Dynamic
        Electricity*, §7.10 (A_φ = μ₀I/(πk)·√(a/ρ)·[(1 − k²/2)K(k) − E(k)]); Gauss–Legendre quadrature.
    """
    radius = src.size / 2
    mu0_i = 4 * src.b_ref * src.r_ref ** 3 / radius ** 2
    centre = np.array([src.pos[0], src.pos[1], src.height])
    axis = np.asarray(m, dtype=float) / np.linalg.norm(m)
    t, w = np.polynomial.legendre.leggauss(RING_POINTS)
    total = 0.0
    for p, q in zip(pts, pts[1:]):
        p3, q3 = np.array([p[0], p[1], 0.0]) - centre, np.array([q[0], q[1], 0.0]) - centre
        length = float(np.linalg.norm(q3 - p3))
        if length == 0.0:
            continue
        near = max(_segment_distance(p3, q3), radius * 0.05)
        pieces = max(1, int(math.ceil(length / (RING_PIECE * near))))
        for i in range(pieces):
            a3 = p3 + (q3 - p3) * (i / pieces)
            b3 = p3 + (q3 - p3) * ((i + 1) / pieces)
            x = 0.5 * (a3 + b3)[None, :] + 0.5 * (b3 - a3)[None, :] * t[:, None]
            A = _ring_potential(x, radius, mu0_i, axis)
            total += float(w @ (A @ (b3 - a3))) * 0.5
    return total


def ring_passage_flux(src: FieldSource, metal, spots: list, enter: int, leave: int, m) -> float:
    """The ring model's flux (Wb) along a loop's passage through a plate, the current spread over the plate (see
    :func:`groundcheck.physics.plate_paths.passage_vector`, the dipole's).

    Parameters:
        src: a field source with a size.
        metal: the metal part.
        spots: the plate's fastening positions, m.
        enter, leave: the passage's spots.
        m: the ring's unit axis.
    Returns:
        the flux, Wb rms.
    References:
        :func:`ring_path_flux`; :mod:`groundcheck.physics.plate_paths`.
    """
    mids, vecs, flow = passage_flow(metal, spots, enter, leave)
    radius = src.size / 2
    centre = np.array([src.pos[0], src.pos[1], src.height])
    pts = np.column_stack([mids, np.zeros(len(mids))]) - centre
    A = _ring_potential(pts, radius, 4 * src.b_ref * src.r_ref ** 3 / radius ** 2, np.asarray(m, float))
    return float(flow @ (A[:, 0] * vecs[:, 0] + A[:, 1] * vecs[:, 1]))


def _segment_distance(p3: np.ndarray, q3: np.ndarray) -> float:
    d = q3 - p3
    L2 = float(d @ d)
    t = 0.0 if L2 == 0 else min(1.0, max(0.0, float(-p3 @ d) / L2))
    return float(np.linalg.norm(p3 + t * d))


def emf(flux: float, frequency: float) -> float:
    """EMF magnitude (V rms) of an rms flux at a frequency: 2πfΦ (Faraday).

    Parameters:
        flux: Wb rms.
        frequency: Hz.
    Returns:
        the EMF, V rms.
    References:
        Faraday's law of induction.
    """
    return 2 * math.pi * frequency * abs(flux)


def min_distance(src: FieldSource, polygon) -> float:
    """Closest approach of a polygon's edges to the source's centre (its height included), m.

    Parameters:
        src: a field source.
        polygon: the loop's corners, m.
    Returns:
        the closest approach of the polygon's edges to the source, m.
    References:
        elementary geometry.
    """
    centre = np.array([src.pos[0], src.pos[1], src.height])
    pts = [np.array([p[0], p[1], 0.0]) - centre for p in polygon]
    return min((_segment_distance(p, q) for p, q in zip(pts, pts[1:] + pts[:1])), default=math.inf)


def loop_fluxes(fields, loops, passages: dict | None = None) -> tuple[dict, dict, set]:
    """Each (loop, source)'s flux, each source's moment direction, and the pairs taken with the ring model.

    Parameters:
        fields: the plan's field sources.
        loops: the loops (each with its ``polygon``, or None when its conductors have no positions).
        passages: loop index -> its passages through plates, (metal, spots, enter, leave): their flux is taken
            along the plate's spread current instead of the straight chord between the two spots.
    Returns:
        (loop index, source name) -> flux, Wb rms; source name -> unit moment vector (its axis, or the worst for
        the plan's loops together); the set of (loop index, source name) computed with the ring model (a loop
        within the source's size).
    References:
        :func:`path_vector`, :func:`orientation`, :func:`ring_path_flux`.
    """
    flux, orient, ring = {}, {}, set()
    closed = {li: [*info.polygon, info.polygon[0]] for li, info in enumerate(loops) if info.polygon is not None}
    for src in fields:
        vectors = {li: path_vector(src, pts) for li, pts in closed.items()}
        for li, items in (passages or {}).items():
            if li in vectors:
                for metal, spots, enter, leave in items:
                    vectors[li] = (vectors[li] + passage_vector(src, metal, spots, enter, leave)
                                   - path_vector(src, [spots[enter], spots[leave]]))
        m = orient[src.name] = orientation(src, vectors.values())
        for li, v in vectors.items():
            flux[(li, src.name)] = float(v @ m)
            if src.size is not None and min_distance(src, loops[li].polygon) < src.size:
                phi = ring_path_flux(src, closed[li], m)
                for metal, spots, enter, leave in (passages or {}).get(li, ()):
                    phi += (ring_passage_flux(src, metal, spots, enter, leave, m)
                            - ring_path_flux(src, [spots[enter], spots[leave]], m))
                flux[(li, src.name)] = phi
                ring.add((li, src.name))
    return flux, orient, ring

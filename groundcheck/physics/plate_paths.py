"""The path a loop's current takes through a metal part: spread over the plate, not along the
straight chord between the fastenings it enters and leaves by.

At mains and audio frequencies the current in a chassis plate distributes resistively (the skin
depth, about 12 mm in aluminium at 50 Hz, is far above a plate's thickness).  The plate is the
finite-volume grid of :mod:`groundcheck.physics.plate`; a unit current entering at one fastening
and leaving at another gives each grid edge its share, and the flux a field source puts through the
loop along that passage is Σ I_e·∫A·dl over the edges (A at each edge's midpoint; the edges are
about a millimetre long), in place of the chord's ∫A·dl.  The current distribution depends only on
the plate's outline and fastenings, not on its material or thickness.

References: S. V. Patankar, *Numerical Heat Transfer and Fluid Flow*, 1980 (the finite-volume
grid); J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.6 (A = μ₀m × R/4πR³) and §5.17 (flux
linkage of a distributed current, Φ = ∫A·J dV / I).
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from ..core.stored import stored

from .impedance import FASTENER_RADIUS
from .plate import PLATE_CODE, canonical_order, grid_step, quantised
from .plate_grid import grid_nodes, grid_response

__all__ = ["plate_flow", "passage_flow", "passage_vector", "loop_passages", "MAX_PLATE_CONTACTS"]

#: fastenings of one plate taken with their spreading paths at most; beyond, passages keep the
#: straight chord
MAX_PLATE_CONTACTS = 64


@lru_cache(maxsize=32)
def plate_flow(width: float, depth: float, contacts: tuple, radius: float = FASTENER_RADIUS):
    """Edge midpoints (E × 2, relative to the plate's corner), edge vectors (E × 2) and edge
    currents (E × k) of a unit current entering at each contact and leaving at contact 0 (column 0
    is zero).

    Parameters:
        width, depth: the plate's size, m.
        contacts: the fastening positions relative to its lower-left corner, m.
        radius: a fastener's contact radius, m.
    Returns:
        (midpoints, vectors, currents) as described.
    References:
        the finite-volume grid of :func:`groundcheck.physics.plate.grid_laplacian`; Kirchhoff's
        laws.
    """
    width, depth, contacts = quantised(width, depth, contacts)
    order = canonical_order(width, depth, contacts)
    placed = tuple(contacts[i] for i in order)
    mids, vecs, flow = stored(
        "plate-flow",
        (width, depth, placed, radius),
        (__name__, *PLATE_CODE),
        lambda: _plate_flow(width, depth, placed, radius),
    )
    # the flow for a unit current in at contact j and out at contact 0, by superposition of the
    # canonical columns (in at i, out at the canonical first)
    pos = np.argsort(order)
    return mids, vecs, flow[:, pos] - flow[:, pos[0]][:, None]


def _plate_flow(width: float, depth: float, contacts: tuple, radius: float):
    nx, ny = grid_nodes(width, depth, grid_step(width, depth, radius))
    # the grid and its factorisation the plate's reduction made (or makes now)
    mesh, response = grid_response(width, depth, contacts, radius, nx, ny)
    phi = _potentials(mesh, response) if mesh.k > 1 else np.zeros((mesh.n, mesh.k))
    currents = mesh.g[:, None] * (phi[mesh.a] - phi[mesh.b])  # from a to b
    mids = (mesh.start + mesh.end) / 2
    vecs = mesh.end - mesh.start
    return mids, vecs, currents


def _potentials(mesh, response) -> np.ndarray:
    """The node potentials (n × k) for 1 A in at each contact and out at contact 0 (grounded;
    column 0 zero), from the grid's response L_ii⁻¹·L_if: the contacts' potentials from the reduced
    matrix S = L_ff − L_fi·L_ii⁻¹·L_if, the free nodes' −L_ii⁻¹·L_if times them."""
    k = mesh.k
    L = mesh.laplacian()
    S = L[:k, :k].toarray()
    if response is not None:
        S = S - L[:k, k:] @ response
    S = 0.5 * (S + S.T)
    phi = np.zeros((mesh.n, k))
    phi[1:k, 1:] = np.linalg.solve(S[1:, 1:], np.eye(k - 1))
    if response is not None:
        phi[k:] = -(response @ phi[:k])
    return phi


def _potential_dot(src, mids: np.ndarray, vecs: np.ndarray) -> np.ndarray:
    """(E × 3): A·d for a unit-K dipole with its moment along x, y and z, at each edge's
    midpoint."""
    X = mids[:, 0] - src.pos[0]
    Y = mids[:, 1] - src.pos[1]
    h = src.height
    r3 = (X * X + Y * Y + h * h) ** 1.5
    r3 = np.where(r3 == 0, np.inf, r3)
    dx, dy = vecs[:, 0], vecs[:, 1]
    return np.stack([h * dy / r3, -h * dx / r3, (X * dy - Y * dx) / r3], axis=1)


def passage_flow(
    metal, spots: list, enter: int, leave: int
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """A loop's passage through a plate as grid edges in the plan's frame: their midpoints (E × 2,
    m), vectors (E × 2, m) and the share of a unit current entering at spot ``enter`` and leaving
    at ``leave`` (E).

    Parameters:
        metal: the metal part (its origin and size).
        spots: the plate's fastening positions taken as contacts, m.
        enter, leave: the passage's spots.
    Returns:
        (midpoints, vectors, currents).
    References:
        :func:`plate_flow`; superposition of the unit injections.
    """
    x0 = min(metal.origin[0], metal.origin[0] + metal.size[0])
    y0 = min(metal.origin[1], metal.origin[1] + metal.size[1])
    rel = tuple((float(p[0] - x0), float(p[1] - y0)) for p in spots)
    mids, vecs, currents = plate_flow(abs(metal.size[0]), abs(metal.size[1]), rel)
    return mids + np.array([x0, y0]), vecs, currents[:, enter] - currents[:, leave]


def passage_vector(src, metal, spots: list, enter: int, leave: int) -> np.ndarray:
    """K·(Fx, Fy, Fz) (Wb): the flux a source puts along a loop's passage through a plate, from
    spot ``enter`` to spot ``leave`` (indices in ``spots``, absolute positions), the current spread
    over the plate.

    Parameters:
        src: a field source.
        metal: the metal part (its origin and size).
        spots: the plate's fastening positions taken as contacts, m.
        enter, leave: the passage's spots.
    Returns:
        three fluxes, Wb rms (moment along x, y and z).
    References:
        the module's references.
    """
    mids, vecs, flow = passage_flow(metal, spots, enter, leave)
    return src.b_ref * src.r_ref**3 * (flow @ _potential_dot(src, mids, vecs))


def loop_passages(plan, circuit, loops) -> dict:
    """Each loop's passages through metal parts modelled as plate grids: (metal, spots, enter,
    leave), where the loop's outline takes the straight chord between the two spots (a bolt at
    each, no route).

    Parameters:
        plan: the plan.
        circuit: its circuit (plate grids and their contact spots).
        loops: the independent loops.
    Returns:
        loop index -> [(metal part, contact spots, entering spot, leaving spot)].
    References:
        none (geometry bookkeeping).
    """
    metals = plan.index.metals
    pos = {p.name: p.pos for p in plan.points if p.pos is not None}
    routed = {c.name for c in plan.conductors if c.route}
    out: dict = {}
    for li, info in enumerate(loops):
        lp, n = info.loop, len(info.loop.nodes)
        for i, node in enumerate(lp.nodes):
            spot_nodes = circuit.nodes_of_metal(node) if node in metals else ()
            if (
                circuit.plate_notes.get(node, {}).get("model") != "plate grid"
                or info.polygon is None
                or len(spot_nodes) > MAX_PLATE_CONTACTS
                or n < 3
                or {lp.edges[i - 1], lp.edges[i]} & routed
            ):
                continue
            spots = [circuit.positions[circuit.nodes[k]] for k in spot_nodes]
            ends = [
                _spot_at(spots, pos.get(lp.nodes[i - 1])),
                _spot_at(spots, pos.get(lp.nodes[(i + 1) % n])),
            ]
            if None not in ends and ends[0] != ends[1]:
                out.setdefault(li, []).append((metals[node], spots, ends[0], ends[1]))
    return out


def _spot_at(spots: list, p) -> int | None:
    """The index of the fastening spot at position p (a bolt's point sits on its spot), or None."""
    if p is None:
        return None
    return next((k for k, s in enumerate(spots) if math.dist(s, p) < 1e-6), None)

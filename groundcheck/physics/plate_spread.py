"""A loop's passage through a plate with the inductive spread (``--plate-current inductive``): the
plate's current at each field line's frequency, crowding under the wire that closes the loop.

By default a passage's current spreads over the plate as at DC
(:mod:`groundcheck.physics.plate_paths`).  With the inductive spread, each passage through a plate
of a non-magnetic metal is solved by :func:`groundcheck.physics.plate_inductive.solve_sheet` at the
frequency of each line of the field source, the rest of the loop's outline being the wire that
brings the current back, :data:`WIRE_HEIGHT` above the plate.  The current then has a phase across
the plate: its part in phase with the loop's current and its part in quadrature each give a flux
(the source's direction enters both alike), and the loop's EMF is their phasor sum.

A steel plate keeps the resistive spread: the sheet solve has no permeability in it.

References: A. E. Ruehli, *IBM J. Res. Dev.* 16 (1972) 470 (partial inductance, the PEEC
network); J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.17 (flux linkage of a
distributed current).
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from .impedance import FASTENER_RADIUS
from .orient import LoopFluxes, source_fluxes
from .pickup import path_vector, ring_quadrature
from .plate import permeability
from .plate_grid import contact_groups, grid_nodes
from .plate_inductive import solve_sheet
from .plate_paths import _potential_dot
from .ring_memo import loop_digest

__all__ = [
    "WIRE_HEIGHT",
    "SHEET_NODES",
    "inductive_passage",
    "spreads_inductively",
    "line_fluxes",
    "rest_of_loop",
    "route_of",
]

#: height of the wire that closes a loop above the plate it passes through: hook-up wire dressed
#: on a deck, its centre a few millimetres up (from memory; the heater pairs' default too)
WIRE_HEIGHT = 5e-3

#: grid nodes of a plate's sheet solve at the most (a 400 × 250 mm plate gets a 4.1 mm step; on the
#: benchmark's plate a 4 mm grid gives the 2 mm grid's loop flux to 0.1 %, benchmarks/README.md)
SHEET_NODES = 6000


def spreads_inductively(metal) -> bool:
    """Whether a plate's passages take the inductive spread (a non-magnetic metal).

    Parameters:
        metal: the metal part.
    Returns:
        True unless its relative permeability is above 1.
    References:
        the module's description.
    """
    return permeability(metal) <= 1.0


def inductive_passage(metal, rho: float, spots, enter: int, leave: int, frequency: float, route):
    """A passage's grid edges in the plan's frame with the current of a unit loop current at a
    frequency: their midpoints (E × 2, m), vectors (E × 2, m) and complex currents (E, A).

    Parameters:
        metal: the metal part (origin, size, thickness).
        rho: its resistivity, Ω·m.
        spots: the plate's fastening positions taken as contacts, m.
        enter, leave: the passage's spots (the current enters at one, leaves at the other).
        frequency: Hz.
        route: the rest of the loop's outline, from the leaving spot round to the entering one, m.
    Returns:
        (midpoints, vectors, currents).
    References:
        :func:`groundcheck.physics.plate_inductive.solve_sheet`.
    """
    x0 = min(metal.origin[0], metal.origin[0] + metal.size[0])
    y0 = min(metal.origin[1], metal.origin[1] + metal.size[1])
    rel = lambda pts: tuple((float(p[0] - x0), float(p[1] - y0)) for p in pts)
    mids, vecs, flow = _sheet(
        abs(metal.size[0]),
        abs(metal.size[1]),
        float(metal.thickness),
        float(rho),
        rel(spots),
        enter,
        leave,
        float(frequency),
        rel(route),
    )
    return mids + np.array([x0, y0]), vecs, flow


@lru_cache(maxsize=64)
def _sheet(width, depth, thickness, rho, contacts, enter, leave, frequency, route):
    step = max(FASTENER_RADIUS / 2, math.sqrt(width * depth / SHEET_NODES))
    nx, ny = grid_nodes(width, depth, step)
    xs, ys = np.linspace(0, width, nx), np.linspace(0, depth, ny)
    X, Y = (v.ravel() for v in np.meshgrid(xs, ys))
    hx, hy = xs[1] - xs[0], ys[1] - ys[0]
    group = contact_groups(X, Y, contacts, FASTENER_RADIUS, min(hx, hy))
    inject = np.zeros(len(contacts))
    inject[enter], inject[leave] = 1.0, -1.0
    sol = solve_sheet(
        width, depth, thickness, rho, group, inject, frequency, nx, ny, [(route, WIRE_HEIGHT, 1.0)]
    )
    mx = np.stack(np.meshgrid(xs[:-1] + hx / 2, ys), axis=-1).reshape(-1, 2)
    my = np.stack(np.meshgrid(xs, ys[:-1] + hy / 2), axis=-1).reshape(-1, 2)
    vecs = np.vstack([np.tile([hx, 0.0], (len(mx), 1)), np.tile([0.0, hy], (len(my), 1))])
    return np.vstack([mx, my]), vecs, np.concatenate([sol.ix.ravel(), sol.iy.ravel()])


def rest_of_loop(closed, a, b) -> list | None:
    """The loop's outline from point b round to point a (the loop passes from a straight to b
    through the plate), or None when the outline does not hold a followed by b.

    Parameters:
        closed: the loop's outline, its first point repeated at the end, m.
        a, b: the passage's entering and leaving spots, m.
    Returns:
        the route's points, m, or None.
    References:
        none (geometry bookkeeping).
    """
    pts = list(closed[:-1])
    n = len(pts)
    for i in range(n):
        if math.dist(pts[i], a) < 1e-9 and math.dist(pts[(i + 1) % n], b) < 1e-9:
            return [pts[(i + 1 + k) % n] for k in range(n)]
    return None


def line_fluxes(src, closed: dict, passages: dict, lines, rho_of) -> LoopFluxes:
    """A field source's flux through the loops with the inductive spread at each of its lines: two
    columns per loop and line (the flux of the current in phase with the loop's current and of the
    one in quadrature), combined per line by the model's ``combine``; the frequency-independent
    model of :func:`groundcheck.physics.orient.source_fluxes` when no passage spreads inductively.

    Parameters:
        src: a field source.
        closed: loop index -> its closed outline, m.
        passages: loop index -> its passages (metal, spots, enter, leave).
        lines: the frequencies of the source's lines, Hz.
        rho_of: metal part -> its resistivity, Ω·m.
    Returns:
        the source's LoopFluxes.
    References:
        the module's description.
    """
    loops = sorted(closed)
    sheet = {li: [p for p in passages.get(li, ()) if _routed(p, closed[li])] for li in loops}
    if not lines or not any(sheet.values()):
        return source_fluxes(src, closed, passages)
    rest = {li: [p for p in passages.get(li, ()) if p not in sheet[li]] for li in loops}
    base = source_fluxes(src, closed, rest)
    columns, combine = [], {}
    for f in lines:
        C = np.zeros((2 * len(loops) * len(lines), len(loops)), dtype=complex)
        for i, li in enumerate(loops):
            flows = [
                (
                    inductive_passage(
                        m, rho_of(m), spots, a, b, f, route_of(closed[li], spots, a, b)
                    ),
                    (spots[a], spots[b]),
                )
                for m, spots, a, b in sheet[li]
            ]
            C[len(columns), i], C[len(columns) + 1, i] = 1.0, 1j
            columns += [(i, flows, "in phase"), (i, flows, "quadrature")]
        combine[f] = C
    model = _dipole(src, base, columns) if base.F is not None else _ring(src, base, columns)
    model.combine = combine
    return model


def _routed(passage, closed) -> bool:
    metal, spots, a, b = passage
    return spreads_inductively(metal) and rest_of_loop(closed, spots[a], spots[b]) is not None


def route_of(closed, spots, a, b) -> tuple:
    """The rest of the loop as the sheet solve takes it.

    Parameters:
        closed: the loop's closed outline, m.
        spots: the plate's fastening positions, m.
        a, b: the passage's entering and leaving spots (indices).
    Returns:
        the route's points as a tuple of (x, y) tuples, m (hashable, for the sheet's cache).
    References:
        none (geometry bookkeeping).
    """
    return tuple(tuple(map(float, p)) for p in rest_of_loop(closed, spots[a], spots[b]))


def _dipole(src, base: LoopFluxes, columns) -> LoopFluxes:
    rows = []
    for i, flows, part in columns:
        row = base.F[i].copy() if part == "in phase" else np.zeros(3)
        for (mids, vecs, flow), chord in flows:
            v = src.b_ref * src.r_ref**3 * (flow @ _potential_dot(src, mids, vecs))
            row += v.real - path_vector(src, list(chord)) if part == "in phase" else v.imag
        rows.append(row)
    return LoopFluxes(src, [base.loops[i] for i, _, _ in columns], base.model, F=np.array(rows))


def _ring(src, base: LoopFluxes, columns) -> LoopFluxes:
    centre = np.array([src.pos[0], src.pos[1], src.height])
    xs, ws, gs, digests = [], [], [], []
    for col, (i, flows, part) in enumerate(columns):
        keep = base.group == i
        parts = [(base.X[keep], base.W[keep])] if part == "in phase" else []
        for (mids, vecs, flow), chord in flows:
            X = np.column_stack([mids, np.zeros(len(mids))]) - centre
            share = flow.real if part == "in phase" else flow.imag
            parts.append((X, np.column_stack([vecs * share[:, None], np.zeros(len(mids))])))
            if part == "in phase":
                parts.append(ring_quadrature(src, list(chord), weight=-1.0))
        X = np.concatenate([x for x, _ in parts] or [np.zeros((0, 3))])
        W = np.concatenate([w for _, w in parts] or [np.zeros((0, 3))])
        xs.append(X)
        ws.append(W)
        gs.append(np.full(len(X), col, dtype=int))
        digests.append(loop_digest(X, W))
    model = LoopFluxes(
        src,
        [base.loops[i] for i, _, _ in columns],
        base.model,
        X=np.concatenate(xs),
        W=np.concatenate(ws),
        group=np.concatenate(gs),
    )
    model._parts = digests
    return model

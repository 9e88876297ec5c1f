"""Which way a stray-field source points: each loop's flux as a function of the moment's direction,
and the direction that puts the most hum at a channel's output.

A field source's flux through the plan's loops is a function Φ(m̂) of its moment's unit direction
m̂, taken with the same model that gives the figures: the point dipole (Φ = F·m̂, F from the
closed-form segment integrals of :mod:`groundcheck.physics.pickup`) or, with a stated size, the
ring at every distance (Φ from the elliptic integrals, not linear in m̂).  For a channel, the
output of the source at each frequency f of its spectrum is V_f(m̂) = Σ_k |Σ_loops
D_kl(f)·Φ_l(m̂)|, the stages' drops per unit flux D (from the network's solve) added in magnitude
as every stage may invert.  The worst orientation maximises the threshold-weighted total Σ_f
V_f²·10^(−T_f/10), T_f the threshold of hearing at the listener's seat at f (ISO 226, or the room's
noise): the sum of the squared ratios of each harmonic to its own threshold, whose largest term is
the harmonic that decides audibility.  Without a listening verdict T_f = 0: the rms total at the
output.  A ring is kept above the deck: an orientation that would take it through the deck (its
radius times the sine of its tilt above its height) is not considered.

The maximum is found on a grid of directions over a hemisphere (Φ(−m̂) = −Φ(m̂) gives the same
hum), the three axes among them, refined by a pattern search that halves its step down to 1e-8 rad;
the result is never below any axis.  A ring with thousands of quadrature points (a loop through a
plate, whose spread current is thousands of cells) is searched on merged points
(:meth:`LoopFluxes.coarse`) and the direction found is then weighed with every point against the
three axes: on the bundled examples it lies within 0.01 rad of the exact search's, its measure 4e-5
below.

References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.4–5.6 (the ring's and the
dipole's potentials); ISO 226:2003 (threshold of hearing); R. Hooke and T. A. Jeeves, "Direct
search solution of numerical and statistical problems", J. ACM 8 (1961) (the pattern search).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .pickup import AXES, cross3, hemisphere, path_vector, ring_quadrature
from .plate_paths import passage_flow, passage_vector
from .ring_memo import (
    derived_digest,
    loop_digest,
    memo_arrays,
    memo_ring_fluxes,
    parts_digest,
    points_digest,
)

__all__ = [
    "LoopFluxes",
    "source_fluxes",
    "fixed_fluxes",
    "worst_axis",
    "channel_objective",
    "stated_axis",
    "AXES",
    "GRID",
    "STEP_MIN",
    "COARSE_POINTS",
]

#: directions of the starting grid over the hemisphere (about 18° apart)
GRID = 64
#: a ring's quadrature points beyond which the search works on merged points
#: (:meth:`LoopFluxes.coarse`)
COARSE_POINTS = 4000
#: the pattern search stops when its step falls below this, rad (the measure is then within about
#: 1e-15 of its maximum, which is quadratic in the angle: mirrored channels get equal figures to
#: 1e-9)
STEP_MIN = 1e-8


@dataclass
class LoopFluxes:
    """One source's flux through a set of loops as a function of its moment's direction.

    ``loops``: the loop indices, in column order; ``F`` (dipole): loops × 3 flux vectors, Wb;
    ``X``, ``W``, ``group`` (ring): quadrature points, elements and each point's column; ``fixed``:
    the fluxes of a source with no orientation (an AC heater pair)."""

    src: object
    loops: list
    model: str
    F: np.ndarray | None = None
    X: np.ndarray | None = None
    W: np.ndarray | None = None
    group: np.ndarray | None = None
    fixed: np.ndarray | None = None
    _grid: tuple | None = None
    _coarse: "LoopFluxes | None" = None
    _digest: bytes | None = None
    _parts: list | None = None  # each loop's points' digest (ring_memo.loop_digest)
    _seen: dict | None = None
    _in_order: bool | None = None
    #: line frequency -> columns × loops: the loops' complex fluxes at the line from the columns'
    #: (inductive plate spread, :mod:`groundcheck.physics.plate_spread`); None: every line alike
    combine: dict | None = None

    def grid(self) -> tuple[np.ndarray, np.ndarray]:
        """The starting directions (admitted) and the fluxes there, computed once for every
        search."""
        if self._grid is None:
            cand = self.admit(hemisphere(GRID))
            self._grid = (cand, self.fluxes(cand))
        return self._grid

    @property
    def oriented(self) -> bool:
        return self.fixed is None

    def fluxes(self, M) -> np.ndarray:
        """n × loops fluxes (Wb rms) for the unit directions M (n × 3)."""
        M = np.atleast_2d(np.asarray(M, dtype=float))
        if self.fixed is not None:
            return np.broadcast_to(self.fixed, (len(M), len(self.fixed)))
        if self.F is not None:
            return M @ self.F.T
        if self._seen is None:
            self._seen = {}
        keys = [tuple(row) for row in M.tolist()]
        new = [k for k in dict.fromkeys(keys) if k not in self._seen]
        # the same directions are asked for again (the axes, the one found): each computed once
        if new:
            values = memo_ring_fluxes(
                self.digest(), self.src, self.X, self.W, np.array(new), self.group, len(self.loops)
            )
            self._seen.update(zip(new, values))
        return np.array([self._seen[k] for k in keys])

    def only(self, column) -> "LoopFluxes":
        """The same source through one of the loops (a column index), or through several."""
        cols = np.atleast_1d(column)
        loops = [self.loops[c] for c in cols]
        if self.fixed is not None:
            return LoopFluxes(self.src, loops, self.model, fixed=self.fixed[cols])
        if self.F is not None:
            return LoopFluxes(self.src, loops, self.model, F=self.F[cols])
        g = self.group
        if self._in_order is None:  # points kept loop by loop, in column order (as built)
            self._in_order = bool(np.all(g[1:] >= g[:-1]))
        if len(cols) == 1 and self._in_order:  # the loop's own run of points, as a view
            keep = slice(*np.searchsorted(g, [cols[0], cols[0] + 1]))
        else:
            keep = np.isin(g, cols)
        new = np.zeros(len(self.loops), dtype=int)
        new[cols] = np.arange(len(cols))
        one = LoopFluxes(
            self.src,
            loops,
            self.model,
            X=self.X[keep],
            W=self.W[keep],
            group=new[self.group[keep]],
        )
        if self._grid is not None and len(cols) == 1:
            one._grid = (self._grid[0], self._grid[1][:, cols])
        if self._parts is not None and len(cols) == 1:
            one._parts = [self._parts[int(cols[0])]]
        return one

    def digest(self) -> bytes:
        """A digest of the ring's points and everything their fluxes depend on (computed once):
        from each loop's digest where the model was built loop by loop (a loop taken alone by
        :meth:`only` keeps its own, so its fluxes are found again while its outline is unchanged,
        whatever happens to the other loops), else from the points themselves."""
        if self._digest is None:
            self._digest = (
                points_digest(self.src, self.X, self.W, self.group, len(self.loops))
                if self._parts is None
                else parts_digest(self.src, self._parts)
            )
        return self._digest

    def coarse(self) -> "LoopFluxes":
        """The same source with a ring's dense quadrature points (a plate passage's cells) merged:
        those of each cell of a grid (side a/8 within 2a of the centre, a/2 beyond) become one at
        their mean with their elements' sum. Only the worst direction's search reads it."""
        if self.X is None or len(self.X) <= COARSE_POINTS:
            return self
        if self._coarse is None:
            key = derived_digest(self.digest(), "coarse", 0)
            X, W, group = memo_arrays(key, self._merged)
            self._coarse = LoopFluxes(self.src, self.loops, self.model, X=X, W=W, group=group)
            self._coarse._digest = key
        return self._coarse

    def _merged(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The merged points, elements and groups of :meth:`coarse`."""
        a = self.src.size / 2
        r = np.linalg.norm(self.X, axis=1)
        side = np.where(r < 2 * a, a / 8, a / 2)
        ij = np.floor(self.X[:, :2] / side[:, None]).astype(np.int64) + (1 << 20)
        key = ((ij[:, 0] << 21 | ij[:, 1]) << 1 | (side > a / 4)) * len(self.loops) + self.group
        _, inverse = np.unique(key, return_inverse=True)
        inverse = inverse.ravel()
        n = int(inverse.max()) + 1
        count = np.bincount(inverse, minlength=n)[:, None]
        X = np.column_stack([np.bincount(inverse, self.X[:, k], n) for k in range(3)]) / count
        W = np.column_stack([np.bincount(inverse, self.W[:, k], n) for k in range(3)])
        group = np.zeros(n, dtype=int)
        group[inverse] = self.group
        return X, W, group

    def admit(self, M: np.ndarray) -> np.ndarray:
        """The directions M (n × 3) with z ≥ 0, those that would take a ring through the deck
        brought to the steepest tilt that keeps it above (its lowest point on the deck)."""
        M = np.where(M[:, 2:3] < 0, -M, M)
        if self.F is not None or self.src.size is None:
            return M
        limit = min(1.0, self.src.height / (self.src.size / 2))  # the largest sine of the tilt
        sin = np.hypot(M[:, 0], M[:, 1])
        over = sin > limit
        if np.any(over):
            scale = limit / sin[over]
            M = M.copy()
            M[over, 0] *= scale
            M[over, 1] *= scale
            M[over, 2] = math.sqrt(max(0.0, 1 - limit * limit))
        return M


def source_fluxes(src, closed: dict, passages: dict | None = None) -> LoopFluxes:
    """A field source's :class:`LoopFluxes` through the loops ``closed`` (loop index -> closed
    outline, m), a passage through a plate taken along the plate's spread current instead of its
    straight chord.

    Parameters:
        src: a field source.
        closed: loop index -> its outline's points, the first repeated at the end, m.
        passages: loop index -> its passages (metal, spots, enter, leave).
    Returns:
        the source's flux function over those loops: the dipole's, or the ring's when the source
        has a size.
    References:
        :mod:`groundcheck.physics.pickup`; :mod:`groundcheck.physics.plate_paths`.
    """
    loops = sorted(closed)
    passages = passages or {}
    if src.size is None:
        F = np.zeros((len(loops), 3))
        for col, li in enumerate(loops):
            F[col] = path_vector(src, closed[li])
            for item in passages.get(li, ()):
                F[col] += _passage_dipole(src, *item)
        return LoopFluxes(src, loops, "dipole", F=F)
    xs, ws, gs, digests = [], [], [], []
    for col, li in enumerate(loops):
        parts = [ring_quadrature(src, closed[li])]
        for item in passages.get(li, ()):
            parts += _passage_ring(src, *item)
        X = np.concatenate([x for x, _ in parts])
        W = np.concatenate([w for _, w in parts])
        xs.append(X)
        ws.append(W)
        gs.append(np.full(len(X), col, dtype=int))
        digests.append(loop_digest(X, W))
    cat = lambda a, n: np.concatenate(a) if a else np.zeros(n)
    model = LoopFluxes(
        src, loops, "ring", X=cat(xs, (0, 3)), W=cat(ws, (0, 3)), group=cat(gs, 0).astype(int)
    )
    model._parts = digests
    return model


def _passage_dipole(src, metal, spots, enter, leave) -> np.ndarray:
    """The dipole's flux vector along a plate passage's spread current, less that of its straight
    chord."""
    return passage_vector(src, metal, spots, enter, leave) - path_vector(
        src, [spots[enter], spots[leave]]
    )


def _passage_ring(src, metal, spots, enter, leave) -> list:
    """The ring's quadrature of a plate passage's spread current (its cells' centres and current
    elements), and its straight chord's taken back out."""
    mids, vecs, flow = passage_flow(metal, spots, enter, leave)
    centre = np.array([src.pos[0], src.pos[1], src.height])
    X = np.column_stack([mids, np.zeros(len(mids))]) - centre
    W = np.column_stack([vecs * flow[:, None], np.zeros(len(mids))])
    return [(X, W), ring_quadrature(src, [spots[enter], spots[leave]], weight=-1.0)]


def fixed_fluxes(src, loops: list, values) -> LoopFluxes:
    """A source with no orientation (an AC heater pair) through ``loops``, with its fluxes
    ``values`` (Wb rms).

    Parameters:
        src: the source.
        loops: the loop indices.
        values: each loop's flux, Wb rms.
    Returns:
        its :class:`LoopFluxes`.
    References:
        none (bookkeeping).
    """
    return LoopFluxes(src, list(loops), "two-wire line", fixed=np.asarray(values, dtype=float))


def channel_objective(parts) -> callable:
    """The measure a worst orientation maximises, as a function of the loops' fluxes (n × loops ->
    n values).

    Parameters:
        parts: (G, weight) per frequency: G the channel's stages' drops per unit flux of each loop
        (stages × loops,
            V/Wb at the output, the harmonic's level included), weight the frequency's weight
            (10^(−T/10)).
    Returns:
        Φ -> Σ_f weight·(Σ_k |G Φ|_k)².
    References:
        the module's description.
    """

    def measure(phi: np.ndarray) -> np.ndarray:
        total = np.zeros(len(phi))
        for G, weight in parts:
            total += weight * np.abs(phi @ G.T).sum(axis=1) ** 2
        return total

    return measure


#: relative difference within which an axis counts as reaching the search's maximum
TIE = 1e-9


def worst_axis(model: LoopFluxes, measure) -> tuple[np.ndarray, float]:
    """The unit direction that maximises ``measure`` of the source's fluxes, and that maximum.

    Parameters:
        model: the source's flux function.
        measure: fluxes (n × loops) -> n values (:func:`channel_objective`).
    Returns:
        (unit direction, its largest component positive; the measure there).
    References:
        the module's description (grid, then the pattern search of Hooke and Jeeves).
    """
    search = model.coarse()
    cand, phi = search.grid()
    values = measure(phi)
    best = int(np.argmax(values))
    m, top = cand[best], float(values[best])
    step = 0.5 * math.sqrt(2 * math.pi / GRID)
    for _ in range(400):
        if step < STEP_MIN:
            break
        u = cross3(m, (1.0, 0.0, 0.0) if abs(m[0]) < 0.9 else (0.0, 1.0, 0.0))
        u /= np.linalg.norm(u)
        v = cross3(m, u)
        trial = m[None, :] + step * np.array([u, -u, v, -v])
        trial = search.admit(trial / np.linalg.norm(trial, axis=1)[:, None])
        tv = measure(search.fluxes(trial))
        k = int(np.argmax(tv))
        if tv[k] > top:
            m, top = trial[k], float(tv[k])
        else:
            step /= 2
    if (
        search is not model
    ):  # the merged points found it: the exact measure decides against the axes
        final = model.admit(np.vstack([m, np.eye(3)]))
        values = measure(model.fluxes(final))
        best = int(np.argmax(values))
        m, top = final[best], float(values[best])
    # a flat measure (a loop with no pickup, or one the source couples to alike in every direction)
    # has no one maximum: an axis that reaches it to rounding is taken, whatever the search met
    # first
    axes = model.admit(np.eye(3))
    if len(axes):
        at_axes = measure(model.fluxes(axes))
        tied = np.flatnonzero(at_axes >= top - TIE * abs(top) - 1e-300)
        if tied.size:
            m = axes[tied[0]]
    k = int(np.argmax(np.abs(m)))
    return (m if m[k] > 0 else -m), top


def stated_axis(src) -> np.ndarray | None:
    """A source's stated axis as a unit vector, or None for ``worst``.

    Parameters:
        src: a field source.
    Returns:
        the unit vector of its stated axis, or None.
    References:
        :data:`groundcheck.physics.pickup.AXES`.
    """
    return np.array(AXES[src.axis]) if src.axis in AXES else None

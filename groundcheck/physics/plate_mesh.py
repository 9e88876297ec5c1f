"""The plate's grid with its fastenings' contact discs cut into it.

A plate is a node-centred finite-volume grid of sheet conductance
(:func:`groundcheck.physics.plate.grid_laplacian`: boundary nodes own half a cell). Each fastening
is an equipotential disc. A grid node inside a disc belongs to it
(:func:`groundcheck.physics.plate_grid.contact_groups`); a grid edge that crosses a disc's circle
is cut there: the part of the edge outside the disc keeps the sheet between the node and the
circle, so its conductance is the edge's divided by the share of its length that lies outside (the
boundary treatment of Shortley and Weller). A node approaching the circle is therefore joined ever
more strongly to the disc and the network changes continuously as a fastening moves — a node no
longer jumps into or out of a staircase outline — and mirrored fastenings cut mirrored edges.
Against an exact solve (the rectangle's Neumann Green's function, contacts as equipotential discs)
the plate resistance on the default grid (half the contact radius) is within 0.6 %, converging as
the square of the step.

References: G. H. Shortley and R. Weller, "The numerical solution of Laplace's equation", *J. Appl.
Phys.* 9 (1938) 334 (irregular boundaries cutting grid lines); S. V. Patankar, *Numerical Heat
Transfer and Fluid Flow*, 1980 (finite volumes).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: as in :data:`groundcheck.physics.plate_grid.ON_CIRCLE`: a node this share of a step outside a
#: circle is on it
ON_CIRCLE = 1e-6

__all__ = ["PlateMesh", "plate_mesh", "grid_edges", "MIN_SHARE"]

#: the smallest share of an edge's length kept outside a disc (a node on the circle is joined to it
#: by an edge of a millionth of a step: as good as merged, and the matrix stays well conditioned)
MIN_SHARE = 1e-6
#: a share of an edge this small (or less) inside a disc is a touch, not a crossing
TOUCH = 1e-5


@dataclass(frozen=True)
class PlateMesh:
    """The plate's network: node ``i`` < k is contact ``i`` (its disc), the others free grid nodes.

    ``a``, ``b`` and ``g`` are the edges (their nodes and conductances, S); ``start`` and ``end``
    (E × 2, m) each edge's two ends in the plate's frame (a cut edge ends on the circle), for the
    path the current takes."""

    k: int
    n: int
    a: np.ndarray
    b: np.ndarray
    g: np.ndarray
    start: np.ndarray
    end: np.ndarray
    hx: float
    hy: float

    def laplacian(self):
        """The network's conductance Laplacian (n × n, sparse CSC), S."""
        import scipy.sparse as sp

        off = sp.coo_matrix((-self.g, (self.a, self.b)), shape=(self.n, self.n)).tocsr()
        off = off + off.T
        return (off + sp.diags(-np.asarray(off.sum(axis=1)).ravel())).tocsc()


def _inside_span(px, py, dx, dy, radius):
    """For segments P + s·(dx, dy), s in [0, 1], relative to a disc's centre: the span (s0, s1) of
    s inside the disc, NaN where the segment misses it (a chord or an overlap under :data:`TOUCH`
    of the segment is a miss)."""
    length2 = dx * dx + dy * dy
    across = (px * dy - py * dx) ** 2 / length2  # the squared distance from the centre to the line
    half = np.sqrt(np.maximum(radius * radius - across, 0.0) / length2)
    mid = -(px * dx + py * dy) / length2
    s0, s1 = np.clip(mid - half, 0, 1), np.clip(mid + half, 0, 1)
    miss = s1 - s0 <= TOUCH
    s0[miss] = np.nan
    s1[miss] = np.nan
    return s0, s1


def grid_edges(width: float, depth: float, sheet_g: float, nx: int, ny: int):
    """The node-centred grid: node coordinates X, Y (row-major, ny × nx), and its edges (x edges
    first) as their nodes A → B and conductances G (boundary nodes own half a cell).

    Parameters:
        width, depth: the plate's size, m.
        sheet_g: S per square.
        nx, ny: grid nodes.
    Returns:
        (X, Y, A, B, G).
    References:
        S. V. Patankar, *Numerical Heat Transfer and Fluid Flow*, 1980 (finite volumes).
    """
    hx, hy = width / (nx - 1), depth / (ny - 1)
    X, Y = (v.ravel() for v in np.meshgrid(np.linspace(0, width, nx), np.linspace(0, depth, ny)))
    idx = np.arange(nx * ny).reshape(ny, nx)
    wy = np.full(ny, hy)
    wy[0] = wy[-1] = hy / 2
    wx = np.full(nx, hx)
    wx[0] = wx[-1] = hx / 2
    A = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    B = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    G = np.concatenate(
        [
            (sheet_g * wy[:, None] / hx * np.ones((ny, nx - 1))).ravel(),
            (sheet_g * wx[None, :] / hy * np.ones((ny - 1, nx))).ravel(),
        ]
    )
    return X, Y, A, B, G


#: fractions of an edge within which two discs are entered or left at the same place
SPAN_TIE = 1e-9


def _disc_spans(X, Y, A, B, contacts, radius, hx, hy):
    """Per edge, the first disc it enters from A's side and where, and the last it leaves towards B
    and where."""
    first_s = np.full(A.size, np.inf)
    first_k = np.full(A.size, -1)
    last_s = np.full(A.size, -np.inf)
    last_k = np.full(A.size, -1)
    dx, dy = X[B] - X[A], Y[B] - Y[A]
    mx, my = (X[A] + X[B]) / 2, (Y[A] + Y[B]) / 2
    first_d = np.full(A.size, np.inf)
    last_d = np.full(A.size, np.inf)
    tol, dtol = SPAN_TIE, ON_CIRCLE * min(hx, hy)
    for j, (cx, cy) in enumerate(contacts):
        near = np.flatnonzero(
            (np.abs(X[A] - cx) <= radius + 1.01 * hx) & (np.abs(Y[A] - cy) <= radius + 1.01 * hy)
        )
        s0, s1 = _inside_span(X[A[near]] - cx, Y[A[near]] - cy, dx[near], dy[near], radius)
        hit = ~np.isnan(s0)
        e, s0, s1 = near[hit], s0[hit], s1[hit]
        # discs entered (or left) at the same place to rounding: the one whose centre is nearer the
        # edge's middle, a choice of geometry, not of the order the plan names its fastenings in
        dc = np.hypot(mx[e] - cx, my[e] - cy)
        # (centres as near to rounding — a few ulps of the positions — are as near: the first in
        # the contacts' canonical order keeps the edge, alike for mirror images)
        nearer = (s0 < first_s[e] - tol) | (
            (np.abs(s0 - first_s[e]) <= tol) & (dc < first_d[e] - dtol)
        )
        first_s[e[nearer]], first_k[e[nearer]], first_d[e[nearer]] = s0[nearer], j, dc[nearer]
        later = (s1 > last_s[e] + tol) | (
            (np.abs(s1 - last_s[e]) <= tol) & (dc < last_d[e] - dtol)
        )
        last_s[e[later]], last_k[e[later]], last_d[e[later]] = s1[later], j, dc[later]
    return first_k, first_s, last_k, last_s


def plate_mesh(
    width: float,
    depth: float,
    sheet_g: float,
    contacts,
    radius: float,
    nx: int,
    ny: int,
    group: np.ndarray,
) -> PlateMesh:
    """The plate's network with its contact discs cut in.

    Parameters:
        width, depth: the plate's size, m.
        sheet_g: its sheet conductance, S per square.
        contacts: the discs' centres relative to the plate's lower-left corner, m.
        radius: the discs' radius, m.
        nx, ny: grid nodes along x and y.
        group: per grid node, the contact it belongs to or -1 (``contact_groups``).
    Returns:
        the PlateMesh.
    References:
        Shortley and Weller (1938), the module's references.
    """
    hx, hy = width / (nx - 1), depth / (ny - 1)
    X, Y, A, B, G = grid_edges(width, depth, sheet_g, nx, ny)
    k = len(contacts)
    free = np.flatnonzero(group < 0)
    new = np.empty(nx * ny, dtype=np.int64)
    new[group >= 0] = group[group >= 0]
    new[free] = k + np.arange(free.size)
    tie = np.zeros(X.size, dtype=bool)
    for cx, cy in contacts:
        tie |= (group < 0) & (np.hypot(X - cx, Y - cy) <= radius + ON_CIRCLE * min(hx, hy))
    spans = _disc_spans(X, Y, A, B, contacts, radius, hx, hy)
    na, nb = new[A], new[B]
    cut = (spans[0] >= 0) & ~((group[A] >= 0) & (group[A] == group[B]))
    pa, pb = np.stack([X[A], Y[A]], 1), np.stack([X[B], Y[B]], 1)
    links = _Links()
    plain = ~cut & (na != nb)
    links.add(na[plain], nb[plain], G[plain], pa[plain], pb[plain])
    c = np.flatnonzero(cut)
    ends = (na[c], nb[c], pa[c], pb[c], group[A[c]], group[B[c]], tie[A[c]], tie[B[c]])
    _cut_edges(links, c, [x[c] for x in spans], ends, G[c], (X, Y, A), contacts, radius)
    return PlateMesh(k, k + free.size, *links.arrays(), hx, hy)


class _Links:
    """The network's links as they are added: their nodes, conductances and ends."""

    def __init__(self):
        self.parts = [[] for _ in range(5)]

    def add(self, a, b, g, start, end) -> None:
        for store, v in zip(self.parts, (a, b, g, start, end)):
            store.append(v)

    def arrays(self) -> list[np.ndarray]:
        return [np.concatenate(v) for v in self.parts]


def _cut_edges(links, c, spans, ends, G, grid, contacts, radius) -> None:
    """The links of the grid edges ``c`` that a disc cuts: what lies outside the discs on A's and
    on B's side, the rest of an edge that only grazes a disc, and the part between two discs.

    ``spans``: per edge the first disc entered and where, the last left and where; ``ends``: the
    edges' new node numbers, end points, contact groups and ties at A and at B."""
    fk, fs, lk, ls = spans
    na, nb, pa, pb, group_a, group_b, tie_a, tie_b = ends
    d = pb - pa
    ka, kb = group_a < 0, group_b < 0
    # an edge that only grazes a disc (both ends outside it) is cut in the measure of its chord,
    # the rest of it kept whole: the network stays continuous as the disc comes to touch the edge
    wt = np.where(ka & kb & (fk == lk), ls - fs, 1.0)
    gr = wt < 1.0
    links.add(na[gr], nb[gr], G[gr] * (1 - wt[gr]), pa[gr], pb[gr])
    # A's side: A to the first disc's circle (nothing when A is inside a disc)
    g_a = G[ka] * wt[ka] / _share(fs[ka], tie_a[ka])
    links.add(na[ka], fk[ka], g_a, pa[ka], pa[ka] + fs[ka, None] * d[ka])
    # B's side: the last disc's circle to B
    g_b = G[kb] * wt[kb] / _share(1 - ls[kb], tie_b[kb])
    links.add(lk[kb], nb[kb], g_b, pa[kb] + ls[kb, None] * d[kb], pb[kb])
    # between two discs the edge passes through (or from a node inside one to another disc)
    src, dst = np.where(ka, fk, group_a), np.where(kb, lk, group_b)
    mid = src != dst
    X, Y, A = grid
    gap = _gap(c, mid, contacts, radius, X, Y, A, d, src, dst)
    links.add(src[mid], dst[mid], G[mid] / _share(gap, gap <= TOUCH), pa[mid], pb[mid])


def _share(share: np.ndarray, whole: np.ndarray) -> np.ndarray:
    """The share of an edge a link keeps, at least :data:`MIN_SHARE`; ``whole`` links keep the
    whole edge: from a free node on or inside a disc (one as near another disc's centre) and
    between two discs that touch or overlap, as the grid joins two groups of nodes — the network
    stays well conditioned, whatever the rounding."""
    return np.where(whole, 1.0, np.maximum(share, MIN_SHARE))


def _gap(c, mid, contacts, radius, X, Y, A, d, src, dst):
    """The share of each edge (of those ``mid``) between leaving disc ``src`` and entering disc
    ``dst``."""
    out = np.empty(int(mid.sum()))
    for i, (e, s, t) in enumerate(zip(c[mid], src[mid], dst[mid])):
        p0 = np.array([X[A[e]], Y[A[e]]])
        dd = d[np.flatnonzero(c == e)[0]]
        _, leave = _inside_span(
            np.array([p0[0] - contacts[s][0]]),
            np.array([p0[1] - contacts[s][1]]),
            dd[:1],
            dd[1:],
            radius,
        )
        enter, _ = _inside_span(
            np.array([p0[0] - contacts[t][0]]),
            np.array([p0[1] - contacts[t][1]]),
            dd[:1],
            dd[1:],
            radius,
        )
        out[i] = np.nan_to_num(enter[0], nan=1.0) - np.nan_to_num(leave[0], nan=0.0)
    return out

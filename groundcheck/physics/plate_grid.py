"""A plate's grid with its fastenings: which grid nodes each fastening's disc takes, and the
grid's factorisation that the plate's reduction (:func:`groundcheck.physics.plate.reduce_plate`)
and the current spread over it (:func:`groundcheck.physics.plate_paths.plate_flow`) share.

References: G. Kron, *Tensor Analysis of Networks*, 1939 (the Schur complement's blocks); S. V.
Patankar, *Numerical Heat Transfer and Fluid Flow*, 1980 (the finite-volume grid).
"""

from __future__ import annotations

from collections import OrderedDict

import numpy as np

from ..core.runtime import blas_loaded
from .plate_mesh import plate_mesh

__all__ = [
    "ON_CIRCLE",
    "contact_groups",
    "grid_nodes",
    "grid_response",
    "KEPT_GRIDS",
    "KEPT_BYTES",
]


#: a grid node this share of the grid step (or less) outside a contact's circle is on it: the
#: nodes on the circle are taken whatever the rounding of their coordinates, so that mirrored
#: contacts take mirrored nodes
ON_CIRCLE = 1e-6


def contact_groups(X: np.ndarray, Y: np.ndarray, contacts, radius: float, h: float) -> np.ndarray:
    """Which contact each grid node belongs to (-1: none): a node within a contact's radius belongs
    to the nearest such contact (one as near as another belongs to neither, whatever their order);
    a contact whose disc keeps no node takes the free nodes nearest its centre (all of them when
    several are as near).

    Parameters:
        X, Y: the grid nodes' coordinates, m.
        contacts: the fastenings' centres, m.
        radius: a fastener's contact radius, m.
        h: the grid step, m (nodes within ON_CIRCLE of a step of the circle are on it).
    Returns:
        per node, the index of its contact or -1.
    References:
        none (bookkeeping: symmetric geometry meshes symmetrically, whatever the contacts' order).
    """
    tol = ON_CIRCLE * h
    group = np.full(X.size, -1)
    best = np.full(X.size, np.inf)
    tie = np.zeros(X.size, dtype=bool)
    for k, (cx, cy) in enumerate(contacts):
        d = np.hypot(X - cx, Y - cy)
        inside = d <= radius + tol
        closer = inside & (d < best - tol)
        tie |= inside & ~closer & (d <= best + tol)
        tie[closer] = False
        group[closer] = k
        best[closer] = d[closer]
    group[tie] = -1
    for k in sorted(set(range(len(contacts))) - set(group.tolist())):
        cx, cy = contacts[k]
        d = np.hypot(X - cx, Y - cy)
        free = group < 0
        near = d[free].min() if free.any() else d.min()
        inside = np.flatnonzero((d <= near + tol) & free)
        group[inside if inside.size else [int(np.argmin(d))]] = k
    return group


#: the unit-sheet grids of the latest plates with their free nodes' response to the contacts
#: (L_ii⁻¹·L_if), by (width, depth, contacts, radius, nx, ny): the plate's reduction and the
#: current spread over it (:func:`groundcheck.physics.plate_paths.plate_flow`) read one
#: factorisation
_GRIDS: OrderedDict = OrderedDict()
#: grids kept at most, and their arrays' bytes at most (a large plate with many fastenings has a
#: response of tens of MB)
KEPT_GRIDS = 6
KEPT_BYTES = 64 * 2**20


def grid_nodes(width: float, depth: float, step: float) -> tuple[int, int]:
    """The nodes of a plate's grid along x and y for a step (three at the least).

    Parameters:
        width, depth: the plate's size, m.
        step: the grid step asked for, m.
    Returns:
        (nx, ny).
    References:
        none (bookkeeping).
    """
    return max(3, int(round(width / step)) + 1), max(3, int(round(depth / step)) + 1)


def grid_response(width, depth, contacts: tuple, radius, nx, ny):
    """A plate's grid for a sheet of 1 S and its free nodes' response to the contacts'
    potentials, L_ii⁻¹·L_if (free nodes × contacts; None when every node is a contact's).

    Parameters:
        width, depth: the plate's size, m (quantised).
        contacts: the fastenings in the mesh's order, m (quantised).
        radius: a fastener's contact radius, m.
        nx, ny: the grid's nodes along x and y.
    Returns:
        (the :class:`~groundcheck.physics.plate_mesh.PlateMesh`, the response).
    References:
        G. Kron, *Tensor Analysis of Networks*, 1939 (the Schur complement's blocks).
    """
    key = (width, depth, contacts, radius, nx, ny)
    got = _GRIDS.get(key)
    if got is None:
        got = _grid_response(*key)
        _GRIDS[key] = got
        while len(_GRIDS) > 1 and (
            len(_GRIDS) > KEPT_GRIDS or sum(map(_size, _GRIDS.values())) > KEPT_BYTES
        ):
            _GRIDS.popitem(last=False)
    return got


def _size(grid) -> int:
    mesh, response = grid
    arrays = (mesh.a, mesh.b, mesh.g, mesh.start, mesh.end, response)
    return sum(x.nbytes for x in arrays if x is not None)


def _grid_response(width, depth, contacts, radius, nx, ny):
    X, Y = (v.ravel() for v in np.meshgrid(np.linspace(0, width, nx), np.linspace(0, depth, ny)))
    group = contact_groups(X, Y, contacts, radius, min(width / (nx - 1), depth / (ny - 1)))
    mesh = plate_mesh(width, depth, 1.0, contacts, radius, nx, ny, group)
    k = mesh.k
    if mesh.n == k:
        return mesh, None
    import scipy.sparse.linalg as spla  # only for a plate: plans without one never need it

    blas_loaded()  # its BLAS under the analysis's one-thread limit

    Lm = mesh.laplacian()
    solve = spla.splu(
        Lm[k:, k:].tocsc(), permc_spec="MMD_AT_PLUS_A"
    )  # half the fill of the default on a grid
    return mesh, solve.solve(Lm[:k, k:].T.toarray())

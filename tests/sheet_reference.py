"""An independent reference for the tests: the resistive spread of a unit current between two
studs of a rectangular sheet, on a finite-volume grid of its own (unit sheet conductance, the
boundary edges owning half a cell, each stud one node, scipy's sparse solver) — written here, not
taken from the package."""

from __future__ import annotations

import numpy as np


def sheet_spread(width: float, depth: float, s1, s2, h: float = 0.001):
    """The grid's edges and the current of 1 A entering at stud ``s1`` and leaving at ``s2``.

    Returns (X, Y, a, b, current): the nodes' coordinates, each edge's end nodes, and its current
    from a to b (A)."""
    import scipy.sparse as sp
    import scipy.sparse.linalg as spla

    nx, ny = int(round(width / h)) + 1, int(round(depth / h)) + 1
    idx = np.arange(nx * ny).reshape(ny, nx)
    a = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    b = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    xs, ys = np.meshgrid(np.linspace(0, width, nx), np.linspace(0, depth, ny))
    X, Y = xs.ravel(), ys.ravel()
    wy = np.where((Y[a] == Y[b]) & ((Y[a] == 0) | (Y[a] == depth)), 0.5, 1.0)
    wx = np.where((X[a] == X[b]) & ((X[a] == 0) | (X[a] == width)), 0.5, 1.0)
    g = wy * wx
    n = nx * ny
    G = sp.coo_matrix(
        (
            np.concatenate([g, g, -g, -g]),
            (np.concatenate([a, b, a, b]), np.concatenate([a, b, b, a])),
        ),
        shape=(n, n),
    ).tocsc()
    k1 = int(np.argmin((X - s1[0]) ** 2 + (Y - s1[1]) ** 2))
    k2 = int(np.argmin((X - s2[0]) ** 2 + (Y - s2[1]) ** 2))
    keep = np.array([k for k in range(n) if k != k1])
    rhs = np.zeros(n)
    rhs[k2] = -1.0  # 1 A enters at stud 1 (the reference) and leaves at stud 2
    phi = np.zeros(n)
    phi[keep] = spla.spsolve(G[keep][:, keep], rhs[keep])
    return X, Y, a, b, g * (phi[a] - phi[b])

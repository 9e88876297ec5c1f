"""A plate as an inductive sheet at hum frequencies: the current's spread with the plate's partial
inductances.

At DC a return current spreads over a plate resistively (:mod:`groundcheck.physics.plate_paths`).
At a frequency the sheet's own inductance opposes the spread: the characteristic length 2ρ/(μ0·ω·t)
is about 67 mm at 50 Hz in 2 mm aluminium, and a return current crowds under the wire that brings
it back.  This module solves the plate's grid as a PEEC network (partial element equivalent
circuit): every grid edge a branch with its resistance and its partial self-inductance, every pair
of parallel edges coupled by their partial mutual inductance, the wires over the plate coupled to
the edges the same way, and Kirchhoff's current law at the nodes:

    (R + jωL)·I − A·φ = −jω·M_w·I_w,      Aᵀ·I = J.

Partial inductances are those of straight filaments (the double Neumann integral of two parallel
filaments in closed form); an edge's own (and a collinear neighbour's) with the filament at the
geometric mean distance of the edge's rectangular section, 0.2235·(w + t).  Edges at right angles
do not couple.  On the uniform grid the mutual inductance between two edges depends only on their
offset, so L·I is a convolution, evaluated with FFTs; the system is solved by GMRES preconditioned
with the resistive network (its nodal Laplacian factorised once).

References: A. E. Ruehli, "Inductance calculations in a complex integrated circuit environment",
*IBM J. Res. Dev.* 16 (1972) 470 (partial inductance); F. W. Grover, *Inductance Calculations*,
1946 (parallel filaments; the geometric mean distance of a rectangle); Y. Saad and M. H. Schultz,
*SIAM J. Sci. Stat. Comput.* 7 (1986) 856 (GMRES).
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np
import scipy.fft as sfft
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .impedance import MU0
from .plate_mesh import grid_edges

__all__ = ["SheetSolution", "filament_mutual", "solve_sheet"]


def _g(u, d):
    """The second antiderivative of 1/√(u² + d²): u·asinh(u/d) − √(u² + d²)."""
    return u * np.arcsinh(u / d) - np.sqrt(u * u + d * d)


def filament_mutual(a1, b1, a2, b2, d):
    """Partial mutual inductance (H) of two parallel filaments spanning [a1, b1] and [a2, b2] along
    their common direction, d apart: (μ0/4π)·∫∫ dx dx'/√((x − x')² + d²).

    Parameters:
        a1, b1, a2, b2: the filaments' ends along their direction, m (arrays broadcast).
        d: their distance, m (> 0).
    Returns:
        the mutual inductance, H.
    References:
        F. W. Grover, *Inductance Calculations*, 1946 (parallel filaments); A. E. Ruehli (1972).
    """
    return (
        MU0 / (4 * math.pi) * (_g(b1 - a2, d) - _g(b1 - b2, d) - _g(a1 - a2, d) + _g(a1 - b2, d))
    )


@dataclass(frozen=True)
class SheetSolution:
    """Edge currents (A, complex: x edges ny × (nx − 1), y edges (ny − 1) × nx), node potentials
    (V, ny × nx), the grid and the GMRES iterations used."""

    ix: np.ndarray
    iy: np.ndarray
    phi: np.ndarray
    xs: np.ndarray
    ys: np.ndarray
    iterations: int


class _Kernel:
    """L·I for the edges of one direction by FFT convolution with the mutual-inductance kernel."""

    def __init__(
        self, n_along: int, n_across: int, h_along: float, h_across: float, width: float, t: float
    ):
        gmd = 0.2235 * (width + t)
        da = np.arange(-(n_along - 1), n_along) * h_along
        dc = np.abs(np.arange(-(n_across - 1), n_across)) * h_across
        dist = np.where(dc == 0, gmd, dc)[:, None]
        k = filament_mutual(0.0, h_along, da[None, :], da[None, :] + h_along, dist)
        self.shape = (n_across, n_along)
        self.full = (2 * n_across - 1 + n_across - 1, 2 * n_along - 1 + n_along - 1)
        self.fk = sfft.rfft2(k, self.full)

    def __call__(self, cur: np.ndarray) -> np.ndarray:
        na, nl = self.shape
        re = sfft.irfft2(self.fk * sfft.rfft2(cur.real, self.full), self.full)[
            na - 1 : 2 * na - 1, nl - 1 : 2 * nl - 1
        ]
        im = sfft.irfft2(self.fk * sfft.rfft2(cur.imag, self.full), self.full)[
            na - 1 : 2 * na - 1, nl - 1 : 2 * nl - 1
        ]
        return re + 1j * im


def _wire_emf(xs, ys, wires, piece):
    """jω-free coupling M_w·I_w (Wb) of the wires to each x edge (ny × (nx − 1)) and y edge ((ny −
    1) × nx)."""
    ex = np.zeros((ys.size, xs.size - 1))
    ey = np.zeros((ys.size - 1, xs.size))
    for route, height, current in wires:
        pts = np.asarray(route, dtype=float)
        for p, q in itertools.pairwise(pts):
            n = max(1, math.ceil(math.dist(p, q) / piece))
            s = (np.arange(n) + 0.5) / n
            mid = p + s[:, None] * (q - p)
            v = (q - p) / n
            ex += current * filament_mutual(
                xs[None, :-1, None],
                xs[None, 1:, None],
                (mid[:, 0] - v[0] / 2),
                (mid[:, 0] + v[0] / 2),
                np.hypot(ys[:, None, None] - mid[:, 1], height),
            ).sum(axis=2)
            ey += current * filament_mutual(
                ys[:-1, None, None],
                ys[1:, None, None],
                (mid[:, 1] - v[1] / 2),
                (mid[:, 1] + v[1] / 2),
                np.hypot(xs[None, :, None] - mid[:, 0], height),
            ).sum(axis=2)
    return ex, ey


def _network(width, depth, thickness, rho, group, nx, ny):
    """The grid's edge resistances (x edges first), its incidence (edges × nodes, contact 0 left
    out) and the node → network-node map (contacts first)."""
    _, _, a, b, g = grid_edges(width, depth, thickness / rho, nx, ny)
    r = 1.0 / g
    k = int(group.max()) + 1
    free = np.flatnonzero(group < 0)
    new = np.empty(nx * ny, dtype=np.int64)
    new[group >= 0] = group[group >= 0]
    new[free] = k + np.arange(free.size)
    rows = np.arange(r.size)
    A = sp.coo_matrix(
        (np.r_[np.ones(r.size), -np.ones(r.size)], (np.r_[rows, rows], np.r_[new[a], new[b]])),
        shape=(r.size, k + free.size),
    ).tocsr()[:, 1:]
    return r, A, new, k


def solve_sheet(
    width: float,
    depth: float,
    thickness: float,
    rho: float,
    group: np.ndarray,
    inject,
    frequency: float,
    nx: int,
    ny: int,
    wires=(),
    tol: float = 1e-8,
) -> SheetSolution:
    """The plate's currents at a frequency: the grid's edges with their resistance and partial
    inductances.

    Parameters:
        width, depth, thickness: the plate, m. rho: its resistivity, Ω·m. group: per grid node
        (row-major, ny × nx), the contact it belongs to or -1 (``plate.contact_groups``). inject:
        the current entering the plate at each contact, A (summing to zero). frequency: Hz (0: the
        resistive spread). nx, ny: grid nodes. wires: (route of (x, y) in the plate's frame, height
        above the plate, current along the route), m and A. tol: GMRES's relative tolerance.
    Returns:
        the SheetSolution.
    References:
        the module's references (PEEC: Ruehli 1972; filaments: Grover 1946; GMRES).
    """
    xs, ys = np.linspace(0, width, nx), np.linspace(0, depth, ny)
    r, A, new, k = _network(width, depth, thickness, rho, group, nx, ny)
    J = np.zeros(A.shape[1], dtype=complex)
    J[: k - 1] = np.asarray(inject, dtype=complex)[1:]
    lu = spla.splu((A.T @ sp.diags(1 / r) @ A).tocsc())

    def lap_solve(v):
        return lu.solve(np.ascontiguousarray(v.real)) + 1j * lu.solve(np.ascontiguousarray(v.imag))

    w = 2 * math.pi * frequency
    if w == 0:
        phi = lap_solve(J)
        return _solution((A @ phi) / r, phi, new, nx, ny, xs, ys, 0)
    hx, hy = xs[1] - xs[0], ys[1] - ys[0]
    kx, ky = _Kernel(nx - 1, ny, hx, hy, hy, thickness), _Kernel(ny - 1, nx, hy, hx, hx, thickness)
    ne = ny * (nx - 1)

    def zmul(cur):
        lx = kx(cur[:ne].reshape(ny, nx - 1)).ravel()
        ly = ky(cur[ne:].reshape(ny - 1, nx).T).T.ravel()
        return r * cur + 1j * w * np.concatenate([lx, ly])

    ex, ey = _wire_emf(xs, ys, wires, min(hx, hy))
    rhs = np.concatenate([-1j * w * np.concatenate([ex.ravel(), ey.ravel()]), J])
    x, count = _gmres(zmul, A, r, lap_solve, rhs, tol)
    return _solution(x[: r.size], x[r.size :], new, nx, ny, xs, ys, count)


def _gmres(zmul, A, r, lap_solve, rhs, tol):
    """GMRES on [[Z, −A], [Aᵀ, 0]], preconditioned by the same system with Z's resistance alone
    (exact: a nodal solve of the resistive network)."""
    n_edges = r.size

    def matvec(v):
        cur, phi = v[:n_edges], v[n_edges:]
        return np.concatenate([zmul(cur) - A @ phi, A.T @ cur])

    def precond(v):
        r1, r2 = v[:n_edges], v[n_edges:]
        phi = lap_solve(r2 - A.T @ (r1 / r))
        return np.concatenate([(r1 + A @ phi) / r, phi])

    size = rhs.size
    op = spla.LinearOperator((size, size), matvec=matvec, dtype=complex)
    pre = spla.LinearOperator((size, size), matvec=precond, dtype=complex)
    count = [0]
    x, info = spla.gmres(
        op,
        rhs,
        M=pre,
        rtol=tol,
        restart=80,
        maxiter=50,
        callback=lambda _: count.__setitem__(0, count[0] + 1),
        callback_type="pr_norm",
    )
    if info != 0:
        raise RuntimeError(f"the inductive plate solve did not converge ({info})")
    return x, count[0]


def _solution(cur, phi, new, nx, ny, xs, ys, iterations) -> SheetSolution:
    ne = ny * (nx - 1)
    node_phi = np.concatenate([[0.0], phi])[new].reshape(ny, nx)
    return SheetSolution(
        cur[:ne].reshape(ny, nx - 1), cur[ne:].reshape(ny - 1, nx), node_phi, xs, ys, iterations
    )

"""Spreading resistance of a metal plate between its fastening points.

The plate is a finite-volume grid of sheet resistance ρ/t; each fastener is an equipotential disc
of radius :data:`~groundcheck.impedance.FASTENER_RADIUS`: the grid nodes inside it are joined into
one node (a node on the disc's circle belongs to it, whatever the rounding of its coordinates), and
every grid edge the circle cuts keeps only its part outside the disc
(:mod:`groundcheck.physics.plate_mesh`), so mirrored fastenings mesh exactly mirrored and the
network changes continuously as a fastening moves.  Kron reduction (Schur complement of the
interior nodes) leaves the exact equivalent network between the fasteners for that grid.

Accuracy: the grid step is half the fastener radius (coarsened only for plates over about 0.4 m²);
a grid twice as coarse is solved too and the two are extrapolated (Richardson: the error falls as
the square of the step).  In the tests the result is within 0.5 % of an exact solve (the
rectangle's Neumann Green's function with equipotential discs) and of the infinite sheet's
(ρ/πt)·arccosh(d/2a); a coarsened grid is not extrapolated and is within a few per cent.  Each
plate reports the change the extrapolation made, as an indication of the error.

At a frequency the plate's branches take the skin effect of the sheet (:func:`sheet_ratio`), with
the permeability of its material (:data:`PERMEABILITY`) or the one its plan states.

References: G. Kron, *Tensor Analysis of Networks*, 1939 (network reduction);
finite-volume discretisation of Laplace's equation, e.g. Patankar, *Numerical
Heat Transfer and Fluid Flow*, 1980, ch. 4.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import scipy.sparse as sp

from ..core.stored import stored

from .impedance import FASTENER_RADIUS, MU0
from .plate_grid import contact_groups, grid_nodes, grid_response
from .plate_mesh import plate_mesh

__all__ = [
    "PlateResult",
    "reduce_plate",
    "grid_laplacian",
    "grid_step",
    "contact_groups",
    "PERMEABILITY",
    "permeability",
    "sheet_ratio",
    "canonical_order",
    "quantised",
]

#: grid nodes per plate at most (keeps one plate's solve well under a second)
MAX_GRID_NODES = 100_000
#: nodes along the longest side of a plate, at the most
MAX_GRID_SIDE = 2_000


#: relative permeability of a plate's material when the plan states none: mild steel sheet at the
#: weak fields of a return current, a few hundred (from memory; its skin depth is then 0.35 mm at 1
#: kHz); every other material 1 (austenitic stainless steel included, from memory)
PERMEABILITY = {"steel": 300.0}


def permeability(metal) -> float:
    """The relative permeability of a metal part: the one its plan states, else
    :data:`PERMEABILITY`'s default.

    Parameters:
        metal: the metal part.
    Returns:
        μr.
    References:
        from memory (mild steel sheet, a few hundred at weak fields).
    """
    stated = getattr(metal, "permeability", None)
    return float(stated) if stated is not None else PERMEABILITY.get(metal.material, 1.0)


def sheet_ratio(rho, thickness, mu_r, frequency: float):
    """Z□(f) / (ρ/t): the skin effect of a plate carrying current in its plane, the field equal and
    opposite on its two faces (its own current's): Z□ = (kρ/2)·coth(kt/2), k = (1 + j)/δ, δ =
    √(ρ/(π f μ0 μr)).  At low frequency 1 + j·t²/(6δ²) (the sheet's internal inductance), at high
    frequency t(1 + j)/(2δ) (two skins in parallel).

    Parameters:
        rho: resistivity, Ω·m (a number or an array).
        thickness: the plate's thickness, m.
        mu_r: its relative permeability.
        frequency: Hz (> 0).
    Returns:
        the complex ratio.
    References:
        the one-dimensional diffusion equation in a slab, d²J/dz² = jωμσJ (S. Ramo, J. R. Whinnery
        and T. Van Duzer, *Fields and Waves in Communication Electronics*, 3rd ed., 1994, §4.4 and
        §4.5, from memory).
    """
    delta = np.sqrt(np.asarray(rho) / (np.pi * frequency * MU0 * np.asarray(mu_r)))
    x = (1 + 1j) * np.asarray(thickness) / (2 * delta)
    return np.where(np.abs(x) < 1e-4, 1 + x * x / 3, x / np.tanh(np.where(np.abs(x) < 1e-4, 1, x)))


@dataclass(frozen=True)
class PlateResult:
    """Kron-reduced conductance matrix (S) between the fasteners, in the order given."""

    names: tuple[str, ...]
    conductance: np.ndarray  # k × k Laplacian: −G[i, j] is the conductance between i and j
    step: float  # grid step used, m
    error: float  # relative change against a grid twice as coarse (an indication)

    def resistance(self, i: int, j: int) -> float:
        """Two-point resistance between fasteners i and j, Ω (the others left floating)."""
        keep = [m for m in range(len(self.names)) if m != j]
        e = np.zeros(len(keep))
        e[keep.index(i)] = 1.0
        v = np.linalg.solve(self.conductance[np.ix_(keep, keep)], e)
        return float(v[keep.index(i)])


def grid_laplacian(
    width: float, depth: float, sheet_conductance: float, nx: int, ny: int
) -> sp.csr_matrix:
    """Finite-volume conductance Laplacian of an nx × ny node grid on a w × d plate (S).

    Boundary nodes own half a cell, so a strip with full-width contacts has
    exactly the resistance ρL/(wt) on any grid.

    Parameters:
        width, depth: plate size, m.
        sheet_conductance: S per square.
        nx, ny: grid nodes.
    Returns:
        the sparse conductance Laplacian, S.
    References:
        S. V. Patankar, *Numerical Heat Transfer and Fluid Flow*, 1980 (finite-volume
        discretisation).
    """
    hx, hy = width / (nx - 1), depth / (ny - 1)
    idx = np.arange(nx * ny).reshape(ny, nx)
    wy = np.full(ny, hy)
    wy[0] = wy[-1] = hy / 2
    wx = np.full(nx, hx)
    wx[0] = wx[-1] = hx / 2
    rows, cols, vals = [], [], []
    gx = sheet_conductance * wy[:, None] / hx * np.ones((ny, nx - 1))
    rows.append(idx[:, :-1].ravel()), cols.append(idx[:, 1:].ravel()), vals.append(gx.ravel())
    gy = sheet_conductance * wx[None, :] / hy * np.ones((ny - 1, nx))
    rows.append(idx[:-1, :].ravel()), cols.append(idx[1:, :].ravel()), vals.append(gy.ravel())
    r = np.concatenate(rows)
    c = np.concatenate(cols)
    g = np.concatenate(vals)
    n = nx * ny
    off = sp.coo_matrix((-g, (r, c)), shape=(n, n))
    off = off + off.T
    diag = -np.asarray(off.sum(axis=1)).ravel()
    return (off + sp.diags(diag)).tocsr()


def grid_step(width: float, depth: float, radius: float) -> float:
    """The grid step of a plate: half the fastener radius, coarsened so that the grid holds at most
    :data:`MAX_GRID_NODES` nodes and no side more than :data:`MAX_GRID_SIDE`.

    Parameters:
        width, depth: the plate's size, m.
        radius: a fastener's contact radius, m.
    Returns:
        the step, m.
    References:
        none (the solver's budget; the error is estimated against a grid twice as coarse).
    """
    return max(
        radius / 2, math.sqrt(width * depth / MAX_GRID_NODES), max(width, depth) / MAX_GRID_SIDE
    )


def _reduce(width, depth, sheet_g, contacts, radius, step):
    nx, ny = grid_nodes(width, depth, step)
    mesh, response = grid_response(width, depth, tuple(contacts), radius, nx, ny)
    k = mesh.k
    Lm = mesh.laplacian()
    red = Lm[:k, :k].toarray()
    if response is not None:
        red = red - Lm[:k, k:] @ response
    red = sheet_g * red  # the unit sheet's reduction scaled: the network is linear in it
    return 0.5 * (red + red.T), (max(mesh.hx, mesh.hy) if response is not None else step)


def reduce_plate(
    width: float,
    depth: float,
    thickness: float,
    rho: float,
    contacts: list[tuple[float, float]],
    names: list[str],
    radius: float = FASTENER_RADIUS,
    step: float | None = None,
    estimate_error: bool = True,
) -> PlateResult:
    """Equivalent conductance network of a plate between its fastening points.

    ``contacts`` are positions relative to the plate's lower-left corner, m.
    ``step`` defaults to half the fastener radius, coarsened so the grid holds
    at most :data:`MAX_GRID_NODES` nodes.

    Parameters:
        width, depth, thickness: m.
        rho: Ω·m.
        contacts: fastening positions, m.
        names: their node names.
        radius: fastener contact radius, m.
        step: grid step, m.
        estimate_error: also solve a grid twice as coarse.
    Returns:
        a PlateResult: the conductance matrix between the contacts, the step used and the estimated
        error.
    References:
        G. Kron, *Tensor Analysis of Networks*, 1939 (network reduction: the Schur complement).
    """
    width, depth, contacts = quantised(abs(width), abs(depth), contacts)
    order = canonical_order(width, depth, contacts)
    red, used, err = _reduced(
        width,
        depth,
        thickness,
        rho,
        tuple(contacts[i] for i in order),
        radius,
        step,
        estimate_error,
    )
    back = np.argsort(order)
    red = red[np.ix_(back, back)]
    red.setflags(write=False)
    return PlateResult(tuple(names), red, used, err)


def canonical_order(width: float, depth: float, contacts) -> list[int]:
    """The order the mesh takes a plate's contacts in: by distance from the plate's centre lines,
    then position — never by name or by where the plan writes them (the mesh's tie-breaking
    between overlapping discs depends on it), and alike for mirror images about the centre.

    Parameters:
        width, depth: the plate's size, m.
        contacts: the fastenings' positions, m.
    Returns:
        the contacts' indices in the mesh's order.
    References:
        none (bookkeeping).
    """

    def key(i):
        x, y = contacts[i]
        return (round(abs(x - width / 2), 12), round(abs(y - depth / 2), 12), x, y)

    return sorted(range(len(contacts)), key=key)


#: a plate's size and its fastenings' positions are taken to this step, m (1 nm): a position
#: written in another unit differs from its mm value by float rounding alone, and a grid node that
#: lies on a contact circle must fall the same way for both
GEOMETRY_QUANTUM = 1e-9


def quantised(width: float, depth: float, contacts) -> tuple[float, float, tuple]:
    """A plate's size and contact positions on the :data:`GEOMETRY_QUANTUM` grid.

    Parameters:
        width, depth: the plate's size, m.
        contacts: the fastenings' positions, m.
    Returns:
        (width, depth, contacts) rounded to the quantum.
    References:
        none (bookkeeping).
    """

    def q(v: float) -> float:
        return round(v / GEOMETRY_QUANTUM) * GEOMETRY_QUANTUM

    return q(width), q(depth), tuple((q(x), q(y)) for x, y in contacts)


#: the modules whose code a plate's stored results come from (:mod:`groundcheck.core.stored`)
PLATE_CODE = (__name__, grid_response.__module__, plate_mesh.__module__)


@lru_cache(maxsize=64)
def _reduced(
    width: float,
    depth: float,
    thickness: float,
    rho: float,
    contacts: tuple,
    radius: float,
    step: float | None,
    estimate_error: bool,
) -> tuple[np.ndarray, float, float]:
    """The reduction itself, kept for the same plate and fastenings: the repair advisor re-analyses
    a plan once per candidate, and most candidates leave every plate as it was (the matrix is
    returned read-only)."""
    red, used, err = stored(
        "plate-reduction",
        (width, depth, thickness, rho, contacts, radius, step, estimate_error),
        PLATE_CODE,
        lambda: _reduction(width, depth, thickness / rho, contacts, radius, step, estimate_error),
    )
    red.setflags(write=False)
    return red, used, err


def _reduction(width, depth, sheet_g, contacts, radius, step, estimate_error):
    if step is None:
        step = grid_step(width, depth, radius)
    red, used = _reduce(width, depth, sheet_g, contacts, radius, step)
    err = 0.0
    if estimate_error and len(contacts) >= 2:
        coarse, used_c = _reduce(width, depth, sheet_g, contacts, radius, 2 * step)
        if used_c <= 1.05 * radius:
            red, err = _extrapolated(red, coarse, used_c / used)
        else:
            err = _extrapolated(red, coarse, used_c / used)[1] * ((used_c / used) ** 2 - 1)
    return red, float(used), float(err)


def _extrapolated(fine: np.ndarray, coarse: np.ndarray, ratio: float) -> tuple[np.ndarray, float]:
    """Richardson's extrapolation of the pairwise conductances from two grids (the error falls as
    the square of the step, the contact discs being cut in), and the relative change it makes (an
    indication of the fine grid's error).  A pair whose extrapolated conductance would not be
    positive keeps the fine grid's."""
    k = fine.shape[0]
    off = ~np.eye(k, dtype=bool)
    ext = fine + (fine - coarse) / (ratio * ratio - 1)
    ext[off & (ext > 0)] = fine[off & (ext > 0)]
    ext[~off] = 0.0
    ext[~off] = -ext.sum(axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        mask = off & (np.abs(ext) > 1e-12 * np.abs(ext[off]).max())
        change = np.abs(fine[mask] - ext[mask]) / np.abs(ext[mask])
        err = float(np.max(change)) if mask.any() else 0.0
    return 0.5 * (ext + ext.T), err

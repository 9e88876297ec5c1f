"""A circuit's admittance matrix factorised at one frequency, and the solutions it gives.

:meth:`groundcheck.physics.nodal.Circuit.at` makes the :class:`Factored`; its
:meth:`Factored.solve` gives node voltages and branch currents for any number of source columns
(nodal analysis: Y·V = J).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

__all__ = ["Factored", "Solution", "SOLVE_BLOCK", "DENSE_NODES", "DenseFactors"]

#: right-hand sides solved together by the sparse LU factors (see :meth:`Factored._blocks`)
SOLVE_BLOCK = 8
#: networks of at most this many unknown node voltages are solved dense (numpy's LAPACK LU),
#: without scipy's sparse LU: measured faster up to 40–85 nodes (less with several BLAS threads
#: on a loaded machine) by ``benchmarks/bench_startup.py --solver``
DENSE_NODES = 60


class DenseFactors:
    """A small admittance matrix held dense, with the ``solve`` of SuperLU's factors: LAPACK's LU
    with partial pivoting (``numpy.linalg.solve``) made on each call, which for a few dozen nodes
    costs less than building and factorising the sparse matrix once (and spares importing scipy's
    sparse solvers)."""

    def __init__(self, vals: np.ndarray, rows: np.ndarray, cols: np.ndarray, m: int):
        self.Y = np.zeros((m, m), dtype=vals.dtype)
        np.add.at(self.Y, (rows, cols), vals)  # duplicate entries add up, as in a sparse matrix

    def solve(self, b: np.ndarray) -> np.ndarray:
        return np.linalg.solve(self.Y, b)


@dataclass
class Factored:
    """A circuit's admittance matrix at one frequency with its sparse LU factors."""

    circuit: object  # the Circuit it came from (groundcheck.physics.nodal)
    frequency: float
    z: np.ndarray
    y: np.ndarray
    keep: np.ndarray
    lu: object
    real: bool = False  # the factors are real (DC or a purely resistive network)

    def solve(
        self, injections: np.ndarray, emf: np.ndarray | None = None, currents: bool = True
    ) -> "Solution":
        """Node voltages and branch currents for each column of sources.

        ``injections``: (nodes × k) complex currents entering each node, A.
        ``emf``: optional (branches × k) EMF in series with each branch, V; it
        drives current from n1 to n2 through the branch.  Voltages are
        relative to each connected part's reference node.  ``currents`` False
        leaves the branch voltages and currents out (empty arrays): for many
        columns they are the largest part of the work and of the memory.  The
        currents themselves are computed when first read (:attr:`Solution.I`).
        """
        n1, n2, *_ = self.circuit._arrays
        n = len(self.circuit.nodes)
        y = self.y
        J = np.asarray(injections, dtype=complex).reshape(n, -1)
        k = J.shape[1]
        if emf is not None:
            emf = np.asarray(emf, dtype=complex).reshape(len(y), k)
            inj = emf * y[:, None]  # Norton equivalent of an EMF in series with the branch
            J = J.copy()
            np.add.at(J, n2, inj)
            np.add.at(J, n1, -inj)
        V = np.zeros((n, k), dtype=complex)
        for lo, x in self._blocks(J):
            V[self.keep, lo : lo + x.shape[1]] = x
        if not currents:
            return Solution(
                self.circuit, self.frequency, V, np.zeros((len(y), 0), dtype=complex), y
            )
        dv = self.circuit.incidence @ V
        if emf is not None:
            dv += emf
        return Solution(self.circuit, self.frequency, V, dv, y)

    def voltages(self, injections: np.ndarray, rows: np.ndarray) -> np.ndarray:
        """Only the node voltages of ``rows`` (rows × k) for each column of injections (nodes × k):
        the same values as :meth:`solve`, without a nodes × k result."""
        J = np.asarray(injections, dtype=complex)
        out = np.zeros((len(rows), J.shape[1]), dtype=complex)
        kept = np.flatnonzero(self.keep)
        where = np.searchsorted(kept, rows)
        inside = self.keep[rows]
        for lo, x in self._blocks(J):
            out[inside, lo : lo + x.shape[1]] = x[where[inside]]
        return out

    def _blocks(self, J: np.ndarray):
        """The reduced system's solution for the injections J (nodes × k), SOLVE_BLOCK columns at a
        time: (first column, kept nodes × block).  The sparse triangular solves slow down per
        column as more columns go in at once (on a 16,000-node installation with a hub: 0.74 ms a
        column in blocks of 8, 0.84 ms in blocks of 32, 1.0 ms all at once), and a block's arrays
        stay in the processor's cache."""
        if self.lu is None:
            return
        for lo in range(0, J.shape[1], SOLVE_BLOCK):
            part = J[self.keep, lo : lo + SOLVE_BLOCK]
            if self.real:  # real factors: solve the real and imaginary parts apart
                x = self.lu.solve(np.ascontiguousarray(part.real)).astype(complex)
                if part.imag.any():
                    x += 1j * self.lu.solve(np.ascontiguousarray(part.imag))
            else:
                x = self.lu.solve(np.ascontiguousarray(part))
            yield lo, x.reshape(part.shape)


@dataclass
class Solution:
    """Node voltages (nodes × k), branch voltages Z·I and branch currents from n1 to n2 (branches ×
    k) at one frequency."""

    circuit: object  # the Circuit it came from (groundcheck.physics.nodal)
    frequency: float
    V: np.ndarray
    dv: np.ndarray  # each branch's voltage V_n1 − V_n2 plus its EMF, that is Z·I
    y: np.ndarray | None = None  # each branch's admittance

    @cached_property
    def I(self) -> np.ndarray:  # noqa: E743 - the current, as in the formulas
        return (
            self.dv * self.y[:, None] if self.dv.size else np.zeros(self.dv.shape, dtype=complex)
        )

    def between(self, a: str, b: str) -> np.ndarray:
        """Voltage of point a relative to point b for every source column (NaN when not
        connected)."""
        c = self.circuit
        ia, ib = c.point_node[a], c.point_node[b]
        _, labels = c.components
        if labels[ia] != labels[ib]:
            return np.full(self.V.shape[1], np.nan + 0j)
        return self.V[ia] - self.V[ib]

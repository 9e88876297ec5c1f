"""A circuit's admittance matrix factorised at one frequency, and the solutions it gives.

:meth:`groundcheck.physics.circuit.Circuit.at` makes the :class:`Factored`; its :meth:`Factored.solve` gives node
voltages and branch currents for any number of source columns (nodal analysis: Y·V = J).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Factored", "Solution", "SOLVE_BLOCK"]

#: right-hand sides solved together by the sparse LU factors (see :meth:`Factored._solved`)
SOLVE_BLOCK = 32


@dataclass
class Factored:
    """A circuit's admittance matrix at one frequency with its sparse LU factors."""

    circuit: object                  # the Circuit it came from (groundcheck.physics.circuit)
    frequency: float
    z: np.ndarray
    y: np.ndarray
    keep: np.ndarray
    lu: object
    real: bool = False                   # the factors are real (DC or a purely resistive network)

    def solve(self, injections: np.ndarray, emf: np.ndarray | None = None, currents: bool = True) -> "Solution":
        """Node voltages and branch currents for each column of sources.

        ``injections``: (nodes × k) complex currents entering each node, A.
        ``emf``: optional (branches × k) EMF in series with each branch, V; it
        drives current from n1 to n2 through the branch.  Voltages are
        relative to each connected part's reference node.  ``currents`` False
        leaves the branch currents out (an empty array): for many columns they
        are the largest part of the work and of the memory.
        """
        n1, n2, *_ = self.circuit._arrays
        n = len(self.circuit.nodes)
        y = self.y
        J = np.array(injections, dtype=complex).reshape(n, -1)        # a copy: an EMF adds to it below
        k = J.shape[1]
        if emf is not None:
            emf = np.asarray(emf, dtype=complex).reshape(len(y), k)
            inj = emf * y[:, None]          # Norton equivalent of an EMF in series with the branch
            np.add.at(J, n2, inj)
            np.add.at(J, n1, -inj)
        V = np.zeros((n, k), dtype=complex)
        if self.lu is not None:
            V[self.keep] = self._solved(J[self.keep])
        if not currents:
            return Solution(self.circuit, self.frequency, V, np.zeros((len(y), 0), dtype=complex))
        dv = V[n1] - V[n2]
        if emf is not None:
            dv = dv + emf
        return Solution(self.circuit, self.frequency, V, dv * y[:, None])

    def voltages(self, injections: np.ndarray, rows: np.ndarray) -> np.ndarray:
        """Only the node voltages of ``rows`` (rows × k) for each column of injections (nodes × k): the same
        values as :meth:`solve`, without a nodes × k result."""
        J = np.asarray(injections, dtype=complex)
        out = np.zeros((len(rows), J.shape[1]), dtype=complex)
        if self.lu is None:
            return out
        kept = np.flatnonzero(self.keep)
        where = np.searchsorted(kept, rows)
        inside = self.keep[rows]
        for lo in range(0, J.shape[1], SOLVE_BLOCK):
            x = self._solved(J[self.keep, lo:lo + SOLVE_BLOCK])
            out[inside, lo:lo + SOLVE_BLOCK] = x[where[inside]]
        return out

    def _solved(self, rhs: np.ndarray) -> np.ndarray:
        """The reduced system's solution for the right-hand sides ``rhs`` (kept nodes × k), SOLVE_BLOCK columns at a
        time: the sparse triangular solves slow down per column as more columns go in at once (measured 0.4 s
        in blocks of 32 against 1.0 s all at once for 1,000 columns on a 16,000-node installation)."""
        out = np.empty(rhs.shape, dtype=complex)
        for lo in range(0, rhs.shape[1], SOLVE_BLOCK):
            part = rhs[:, lo:lo + SOLVE_BLOCK]
            if self.real:                        # real factors: solve the real and imaginary parts apart
                x = self.lu.solve(np.ascontiguousarray(part.real)).astype(complex)
                if part.imag.any():
                    x += 1j * self.lu.solve(np.ascontiguousarray(part.imag))
            else:
                x = self.lu.solve(np.ascontiguousarray(part))
            out[:, lo:lo + SOLVE_BLOCK] = x.reshape(part.shape)
        return out


@dataclass
class Solution:
    """Node voltages (nodes × k) and branch currents from n1 to n2 (branches × k) at one frequency."""

    circuit: object                  # the Circuit it came from (groundcheck.physics.circuit)
    frequency: float
    V: np.ndarray
    I: np.ndarray

    def between(self, a: str, b: str) -> np.ndarray:
        """Voltage of point a relative to point b for every source column (NaN when not connected)."""
        c = self.circuit
        ia, ib = c.point_node[a], c.point_node[b]
        _, labels = c.components
        if labels[ia] != labels[ib]:
            return np.full(self.V.shape[1], np.nan + 0j)
        return self.V[ia] - self.V[ib]

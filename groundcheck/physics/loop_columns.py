"""The loops' pickup per unit flux at one frequency, solved a block of loops at a time.

A unit flux through a loop drives an EMF of −jω (Faraday's law) in series with the loop's chord
branch.  Its Norton equivalent (the EMF times the branch's admittance, into the branch's n2 and out
of its n1) is one column of injections; the column's node voltages give the drop Z·I along each
stage's least-resistance path and the loop's own current.  Only those branches are read, so a block
of loops needs nodes × block numbers, not branches × loops: on a 100,000-conductor plan with 500
listed loops the whole-matrix form held about 3 GiB at once (benchmarks/README.md, Single chassis).
The figures are those of the whole-matrix form to the last bit: the same injections, the same
solves (whole blocks of the factors' own column blocks) and the same branch arithmetic.
"""

from __future__ import annotations

import math

import numpy as np

from .factored import SOLVE_BLOCK

__all__ = ["LOOP_BLOCK", "loop_pickup"]

#: loops solved together (a multiple of the factors' block, so the solves are the same ones)
LOOP_BLOCK = 8 * SOLVE_BLOCK


def loop_pickup(fac, f: float, branch, sign, paths, gains) -> tuple[np.ndarray, np.ndarray]:
    """The drop a unit flux through each loop leaves across each stage (times its gain), and the
    loop's current.

    Parameters:
        fac: the circuit factorised at f (:class:`groundcheck.physics.factored.Factored`).
        f: the frequency, Hz.
        branch, sign: each loop's chord branch and the EMF's sign along it (+1 when the branch runs
            the loop's way), from :func:`groundcheck.physics.fieldhum.pickup_columns`.
        paths: per stage, its least-resistance path (branch, orientation) pairs; None for a stage
            the network does not join.
        gains: each stage's gain at f (complex ratio).
    Returns:
        (stages × loops drops at the output per weber, V/Wb; each loop's current per weber, A/Wb).
    References:
        Faraday's law (EMF = −jωΦ); Norton's theorem; Ohm's law along the path (Z·I).
    """
    circuit = fac.circuit
    n1, n2, *_ = circuit._arrays
    n, loops = len(circuit.nodes), len(branch)
    drops = np.zeros((len(paths), loops), dtype=complex)
    current = np.zeros(loops, dtype=complex)
    emf = -1j * 2 * math.pi * f * np.asarray(sign, dtype=float)
    for lo in range(0, loops, LOOP_BLOCK):
        hi = min(lo + LOOP_BLOCK, loops)
        cols, bi = np.arange(hi - lo), branch[lo:hi]
        inj = emf[lo:hi] * fac.y[bi]
        J = np.zeros((n, hi - lo), dtype=complex)
        np.add.at(J, (n2[bi], cols), inj)
        np.add.at(J, (n1[bi], cols), -inj)
        V, e = fac.solve(J, currents=False).V, emf[lo:hi]
        current[lo:hi] = [_amps(fac, V, bi, e, b)[c] for c, b in enumerate(bi)]
        for k, path in enumerate(paths):
            if path is None:
                continue
            total = np.zeros(hi - lo, dtype=complex)
            for idx, sgn in path:
                total += sgn * fac.z[idx] * _amps(fac, V, bi, e, idx)
            drops[k, lo:hi] = total * gains[k]
    return drops, current


def _amps(fac, V: np.ndarray, chords: np.ndarray, emf: np.ndarray, idx: int) -> np.ndarray:
    """Branch idx's current in each column of a block: (V[n1] − V[n2] + its EMF where it is the
    column's chord) times its admittance."""
    n1, n2, *_ = fac.circuit._arrays
    dv = V[n1[idx]] - V[n2[idx]]
    return (dv + np.where(chords == idx, emf, 0)) * fac.y[idx]

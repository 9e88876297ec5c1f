"""Plates: the time of the resistive reduction and of the inductive (PEEC) solve, and how far the
inductive spread moves a loop's EMF from the resistive spread and from the straight chord.

    python benchmarks/bench_plates.py                 # 400 x 250 mm plate, 2 mm grid
    python benchmarks/bench_plates.py --step 4 --frequencies 50 150 1000

The loop: a current enters a 2 mm aluminium plate at one fastening and leaves at another; the wire
that closes the loop runs 10 mm above the plate along an L-shaped route; a transformer-like dipole
(moment along z) 35 mm above the plate beside the route.  The EMF is ∮A·dl over the wire and over
the plate's edge currents (the chord: along the straight line between the fastenings).
"""

from __future__ import annotations

import argparse
import math
import time

import numpy as np

from groundcheck.physics.plate import contact_groups, reduce_plate
from groundcheck.physics.plate_inductive import solve_sheet

MU0 = 4e-7 * math.pi


def potential_dot(src, height, mids, vecs):
    """A·dl of a unit z dipole at src (x, y) and height above the plate, at the midpoints of
    segments vecs."""
    dx, dy = mids[:, 0] - src[0], mids[:, 1] - src[1]
    r3 = (dx * dx + dy * dy + height * height) ** 1.5
    return MU0 / (4 * math.pi) * (dx * vecs[:, 1] - dy * vecs[:, 0]) / r3


def plate_flux(sol, src, height):
    xs, ys = sol.xs, sol.ys
    X, Y = np.meshgrid(xs[:-1] + np.diff(xs) / 2, ys)
    hx = xs[1] - xs[0]
    fx = potential_dot(
        src, height, np.stack([X.ravel(), Y.ravel()], 1), np.tile([hx, 0.0], (X.size, 1))
    )
    X2, Y2 = np.meshgrid(xs, ys[:-1] + np.diff(ys) / 2)
    hy = ys[1] - ys[0]
    fy = potential_dot(
        src, height, np.stack([X2.ravel(), Y2.ravel()], 1), np.tile([0.0, hy], (X2.size, 1))
    )
    return complex(fx @ sol.ix.ravel() + fy @ sol.iy.ravel())


def line_flux(points, src, height, pieces=400):
    total = 0.0
    for p, q in zip(points[:-1], points[1:]):
        p, q = np.asarray(p, float), np.asarray(q, float)
        s = (np.arange(pieces) + 0.5) / pieces
        mids = p + s[:, None] * (q - p)
        total += potential_dot(src, height, mids, np.tile((q - p) / pieces, (pieces, 1))).sum()
    return total


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--step", type=float, default=2.0, help="grid step, mm")
    ap.add_argument("--frequencies", type=float, nargs="+", default=[50.0, 100.0, 150.0, 1000.0])
    args = ap.parse_args()
    w, d, t, rho, h = 0.4, 0.25, 2e-3, 2.65e-8, args.step * 1e-3
    a, b = (0.05, 0.05), (0.35, 0.20)
    route = [b, (0.35, 0.05), a]  # the wire back from b to a, 10 mm above the plate
    src, src_h = (0.25, 0.10), 0.035
    t0 = time.perf_counter()
    r = reduce_plate(w, d, t, rho, [a, b], ["a", "b"]).resistance(0, 1)
    print(f"resistive reduction: {time.perf_counter() - t0:.2f} s, R = {r * 1e6:.2f} µΩ")
    nx, ny = round(w / h) + 1, round(d / h) + 1
    X, Y = (v.ravel() for v in np.meshgrid(np.linspace(0, w, nx), np.linspace(0, d, ny)))
    group = contact_groups(X, Y, [a, b], 4e-3, h)
    wire = [(route, 0.010, 1.0)]
    wire_flux = line_flux(route, src, src_h - 0.010)
    chord = wire_flux + line_flux([a, b], src, src_h)
    for f in [0.0, *args.frequencies]:
        t0 = time.perf_counter()
        sol = solve_sheet(w, d, t, rho, group, [1.0, -1.0], f, nx, ny, wires=wire)
        took = time.perf_counter() - t0
        emf = abs(wire_flux + plate_flux(sol, src, src_h))
        drop = abs(sol.phi.ravel()[group == 0][0] - sol.phi.ravel()[group == 1][0])
        print(
            f"{f:7.0f} Hz: {took:6.2f} s, {sol.iterations:3d} iterations; loop flux {emf:.3e} Wb "
            f"per A·m³ (chord {abs(chord):.3e}, {emf / abs(chord) - 1:+.1%}); drop a-b "
            f"{drop * 1e6:.2f} µV per A"
        )


if __name__ == "__main__":
    main()

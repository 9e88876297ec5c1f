"""The inductive plate solve (PEEC) against its two limits and a hand-derivable case.

- the partial mutual inductance of two parallel filaments against the double Neumann integral,
  ∫∫ μ0/(4π r) dl dl', integrated numerically here (scipy);
- (a) at a vanishing frequency the current spreads resistively: a strip with contacts across its
  ends carries the current uniformly (by hand), and two disc contacts give the currents of a nodal
  solve written here;
- (b) and (c) at high frequency the return current crowds under the wire that brings it back,
  more so as the frequency rises, towards the surface current of a line current over a perfectly
  conducting plane, K(y) = (I/π)·z/(z² + y²) (the method of images; the ground plane's current
  density in H. W. Johnson and M. Graham, *High-Speed Digital Design*, 1993, from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.integrate as si
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from groundcheck.physics.plate_inductive import filament_mutual, solve_sheet

RHO = 2.65e-8


def _strip(w, d, h):
    nx, ny = round(w / h) + 1, round(d / h) + 1
    X, Y = (v.ravel() for v in np.meshgrid(np.linspace(0, w, nx), np.linspace(0, d, ny)))
    return nx, ny, X, Y


@pytest.mark.parametrize(
    "a1, b1, a2, b2, d",
    [(0, 2e-3, 0, 2e-3, 1e-3), (0, 2e-3, 6e-3, 8e-3, 3e-3), (0, 0.1, 0.02, 0.05, 5e-3)],
)
def test_filament_mutual_is_the_neumann_integral(a1, b1, a2, b2, d):
    want = (
        1e-7
        * si.dblquad(lambda x2, x1: 1 / math.hypot(x1 - x2, d), a1, b1, a2, b2, epsabs=1e-14)[0]
    )
    assert filament_mutual(a1, b1, a2, b2, d) == pytest.approx(want, rel=1e-6)


def test_low_frequency_limit_is_the_resistive_spread():
    # a strip with contacts across its ends: uniform current, the edge rows owning half a cell (by
    # hand)
    w, d, h = 0.1, 0.04, 2e-3
    nx, ny, X, Y = _strip(w, d, h)
    group = np.where(X < 1e-9, 0, np.where(X > w - 1e-9, 1, -1))
    s = solve_sheet(
        w,
        d,
        2e-3,
        RHO,
        group,
        [-1.0, 1.0],
        0.01,
        nx,
        ny,
        wires=[([(0, d / 2), (w, d / 2)], 5e-3, 1.0)],
    )
    share = np.r_[0.5, np.ones(ny - 2), 0.5] / (ny - 1)
    assert np.allclose(-s.ix[:, 10], share, atol=1e-6)
    # two disc contacts: the currents of a nodal solve of the same grid, written here
    group = np.full(X.size, -1)
    group[np.hypot(X - 0.02, Y - 0.02) <= 4e-3] = 0
    group[np.hypot(X - 0.08, Y - 0.02) <= 4e-3] = 1
    s = solve_sheet(w, d, 2e-3, RHO, group, [-1.0, 1.0], 0.01, nx, ny)
    idx = np.arange(X.size).reshape(ny, nx)
    a = np.r_[idx[:, :-1].ravel(), idx[:-1, :].ravel()]
    b = np.r_[idx[:, 1:].ravel(), idx[1:, :].ravel()]
    wy = np.r_[h / 2, np.full(ny - 2, h), h / 2]
    wx = np.r_[h / 2, np.full(nx - 2, h), h / 2]
    g = 2e-3 / RHO * np.r_[np.repeat(wy, nx - 1) / h, np.tile(wx, ny - 1) / h]
    node = np.where(group >= 0, group, 2 + np.cumsum(group < 0) - 1)
    n = node.max() + 1
    lap = sp.coo_matrix(
        (
            np.r_[g, g, -g, -g],
            (np.r_[node[a], node[b], node[a], node[b]], np.r_[node[a], node[b], node[b], node[a]]),
        ),
        shape=(n, n),
    ).tocsc()
    rhs = np.zeros(n)
    rhs[1] = 1.0
    phi = np.r_[0.0, spla.spsolve(lap[1:, 1:], rhs[1:])]
    want = g * (phi[node[a]] - phi[node[b]])
    got = np.r_[s.ix.ravel(), s.iy.ravel()]
    assert np.allclose(got.real, want, atol=1e-6) and np.abs(got.imag).max() < 1e-5


def test_high_frequency_current_crowds_under_the_wire_like_its_image():
    # a plate 200 mm wide under a wire 5 mm above its centre line, the current entering and leaving
    # across its ends
    w, d, h, z = 0.06, 0.2, 2e-3, 5e-3
    nx, ny, X, _ = _strip(w, d, h)
    group = np.where(X < 1e-9, 0, np.where(X > w - 1e-9, 1, -1))
    wire = [([(0, d / 2), (w, d / 2)], z, 1.0)]
    y = np.linspace(0, d, ny) - d / 2
    cell = np.r_[h / 2, np.full(ny - 2, h), h / 2]
    spread = []
    for f in (0.01, 150.0, 2e4):
        k = -solve_sheet(w, d, 1e-3, RHO, group, [-1.0, 1.0], f, nx, ny, wires=wire).ix[
            :, (nx - 1) // 2
        ]
        assert abs(k.sum() - 1) < 1e-6
        spread.append(float(np.sum(np.abs(k) * np.abs(y))))
    # (b) the mean distance of the current from the chord under the wire falls as the frequency
    # rises
    assert spread[0] > spread[1] > spread[2]
    # (c) at 20 kHz (2ρ/(μ0 ω t) = 0.34 mm, far below z) within 10 % of the image current, K(y) =
    # z/(π(z² + y²))
    image = z / (math.pi * (z * z + y * y))
    near = np.abs(y) <= 4 * z
    assert np.max(np.abs(k.real / cell - image)[near]) < 0.1 * image.max()

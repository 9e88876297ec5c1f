"""AC heater wiring as a field source, against an independent Biot–Savart calculation: each wire of the pair cut
into short pieces, the field summed over them (Biot–Savart law), and its normal component integrated over a
rectangle on the deck by Gauss–Legendre quadrature.  Reference: J. D. Jackson, *Classical Electrodynamics*,
3rd ed., §5.2."""

import math

import numpy as np
import pytest

from groundcheck import load_text
from groundcheck.analysis import analyze
from groundcheck.physics.heater_field import pair_path_flux, pair_wires

MU0 = 4e-7 * math.pi


def _biot_savart_flux(route, spacing, height, current, rect, pieces=600, grid=64):
    out, back = pair_wires(route, spacing, height)
    t, w = np.polynomial.legendre.leggauss(grid)
    x0, y0, x1, y1 = rect
    X, Y = np.meshgrid(x0 + (x1 - x0) * (t + 1) / 2, y0 + (y1 - y0) * (t + 1) / 2)
    P = np.stack([X.ravel(), Y.ravel(), np.zeros(X.size)], axis=1)
    Bz = np.zeros(len(P))
    for wire, sign in ((out, 1.0), (back, -1.0)):
        for a, b in zip(wire[:-1], wire[1:]):
            s = np.linspace(0, 1, pieces + 1)
            pts = a + np.outer(s, b - a)
            mid, dl = 0.5 * (pts[1:] + pts[:-1]), (b - a) / pieces
            R = P[:, None, :] - mid[None]
            Bz += sign * MU0 * current / (4 * math.pi) * np.sum(np.cross(dl[None, None, :], R)[..., 2]
                                                              / np.linalg.norm(R, axis=2) ** 3, axis=1)
    return float(w @ Bz.reshape(X.shape) @ w) * (x1 - x0) * (y1 - y0) / 4


@pytest.mark.parametrize("spacing,height", [(0.003, 0.005), (0.01, 0.003), (0.02, 0.02)])
def test_heater_pair_flux_matches_biot_savart(spacing, height):
    route = [(0.0, 0.08), (0.1, 0.08), (0.25, 0.12)]             # a bend: the mitred offset is tested too
    rect = (0.02, 0.0, 0.2, 0.06)
    loop = [(0.02, 0.0), (0.2, 0.0), (0.2, 0.06), (0.02, 0.06), (0.02, 0.0)]
    expected = _biot_savart_flux(route, spacing, height, 3.0, rect)
    assert pair_path_flux(route, spacing, height, 3.0, loop) == pytest.approx(expected, rel=2e-3)


PLAN = """plan "AC heater pair beside a loop (trial)"
listening output 1 V, speaker 90 dB, distance 2 m
metal deck: aluminium 2 mm, 300 x 200 mm
point st1: stud, at 30,30 on deck
point st2: stud, at 170,30 on deck
bolt n1: st1 to deck
bolt n2: st2 to deck
wire w: st1 to st2, 300 mm, 0.5 mm2, signal, via 30,80 170,80
stage v: st1 to st2, gain 40 dB, channel main
heater htr: 6.3 V, 3 A, ac, reference st1, wiring 10,100 250,100{extra}
"""


def test_an_ac_heater_pair_is_a_source_in_the_hum_budget():
    r = analyze(load_text(PLAN.format(extra=", spacing 5 mm, height 5 mm"), "h.gplan"))
    (row,) = r.hum.loops
    entry = row["sources"]["htr.wiring"]
    assert entry["model"] == "two-wire line" and entry["per_frequency"][0]["frequency_hz"] == 50
    # closest approach, worked by hand: the loop's top edge (y = 80 mm) to the nearer wire (y = 100 − 2.5 mm,
    # 5 mm up): √(17.5² + 5²) = 18.20 mm
    assert entry["closest_mm"] == pytest.approx(18.2, abs=0.05) and entry["size_mm"] is None
    assert any(c["source"] == "htr.wiring" for c in r.hum.channels["main"].contributors)
    twisted = analyze(load_text(PLAN.format(extra=", twisted"), "h.gplan"))
    assert not twisted.hum.loops or "htr.wiring" not in twisted.hum.loops[0]["sources"]

"""AC heater wiring as a field source, against independent integrations written here: the heater's
closed circuit (out along one wire from the winding to the filament, across the filament, back
along the other wire and across the winding; the geometry built here from the stated centre line,
spacing and height, not with groundcheck's own wire code), its field by the Biot–Savart law summed
over short pieces, and its normal component integrated over the loop on the deck by Gauss–Legendre
quadrature; and, as a second check, the mutual inductance of the two circuits by Neumann's formula.
References: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.2 (Biot–Savart); F. W. Grover,
*Inductance Calculations*, 1946, ch. 1 (Neumann's formula)."""

import math

import numpy as np
import pytest

from groundcheck import load_text
from groundcheck.analysis import analyze
from groundcheck.physics.heater_field import pair_path_flux

MU0 = 4e-7 * math.pi


def _offset(route, spacing):
    """The two wires of a pair either side of its centre line: each corner moved along the bisector
    of its two edges' normals by (spacing/2)/cos(half the bend), so that both edges keep their
    distance (plane geometry)."""
    pts = np.asarray(route, float)
    d = np.diff(pts, axis=0)
    d /= np.linalg.norm(d, axis=1)[:, None]
    n = np.column_stack([-d[:, 1], d[:, 0]])
    corner = [n[0]]
    for k in range(1, len(pts) - 1):
        b = n[k - 1] + n[k]
        b /= np.linalg.norm(b)
        corner.append(b / (b @ n[k]))
    corner.append(n[-1])
    off = np.array(corner) * spacing / 2
    return pts + off, pts - off


def _circuit(route, spacing, height, closed=True):
    """Closed: one polyline winding → filament → back → winding; open: the two wires alone, (wire,
    sign) each."""
    out, back = _offset(route, spacing)
    up = lambda p: np.column_stack([p, np.full(len(p), height)])  # noqa: E731
    if closed:
        return [(np.vstack([up(out), up(back)[::-1], up(out)[:1]]), 1.0)]
    return [(up(out), 1.0), (up(back), -1.0)]


def _biot_savart_flux(wires, current, rect, pieces=200, grid=48):
    t, w = np.polynomial.legendre.leggauss(grid)
    x0, y0, x1, y1 = rect
    X, Y = np.meshgrid(x0 + (x1 - x0) * (t + 1) / 2, y0 + (y1 - y0) * (t + 1) / 2)
    P = np.stack([X.ravel(), Y.ravel(), np.zeros(X.size)], axis=1)
    Bz = np.zeros(len(P))
    for wire, sign in wires:
        for a, b in zip(wire[:-1], wire[1:]):
            n = max(4, int(pieces * np.linalg.norm(b - a) / 0.1))
            s = np.linspace(0, 1, n + 1)
            pts = a + np.outer(s, b - a)
            mid, dl = 0.5 * (pts[1:] + pts[:-1]), (b - a) / n
            R = P[:, None, :] - mid[None]
            Bz += (
                sign
                * MU0
                * current
                / (4 * math.pi)
                * np.sum(
                    np.cross(dl[None, None, :], R)[..., 2] / np.linalg.norm(R, axis=2) ** 3, axis=1
                )
            )
    return float(w @ Bz.reshape(X.shape) @ w) * (x1 - x0) * (y1 - y0) / 4


def _neumann_flux(wires, current, loop, step=1e-3):
    """M·I with M = (μ0/4π)·ΣΣ dl·dl′/|r − r′| over short pieces of both circuits (midpoint
    rule)."""

    def pieces(poly):
        mids, dls = [], []
        for p, q in zip(poly[:-1], poly[1:]):
            n = max(1, int(np.linalg.norm(q - p) / step))
            t = (np.arange(n) + 0.5) / n
            mids.append(p + np.outer(t, q - p))
            dls.append(np.tile((q - p) / n, (n, 1)))
        return np.concatenate(mids), np.concatenate(dls)

    lm, ldl = pieces(np.column_stack([np.asarray(loop, float), np.zeros(len(loop))]))
    total = 0.0
    for wire, sign in wires:
        wm, wdl = pieces(wire)
        total += sign * float(
            np.sum((ldl @ wdl.T) / np.linalg.norm(lm[:, None] - wm[None], axis=2))
        )
    return 1e-7 * current * total


@pytest.mark.parametrize("spacing,height", [(0.003, 0.005), (0.01, 0.003), (0.02, 0.02)])
def test_heater_circuit_flux_matches_biot_savart(spacing, height):
    route = [(0.0, 0.08), (0.1, 0.08), (0.25, 0.12)]  # a bend: the mitred offset is tested too
    rect = (0.02, 0.0, 0.2, 0.06)
    loop = [(0.02, 0.0), (0.2, 0.0), (0.2, 0.06), (0.02, 0.06), (0.02, 0.0)]
    expected = _biot_savart_flux(_circuit(route, spacing, height), 3.0, rect)
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
heater htr: 6.3 V, 3 A, ac, reference st1, wiring {route}{extra}
"""
#: the loop: the wire from st1 up and across to st2, closed through the deck along the straight
#: chord
LOOP = [(0.03, 0.03), (0.03, 0.08), (0.17, 0.08), (0.17, 0.03), (0.03, 0.03)]


def test_an_ac_heater_pair_is_a_source_in_the_hum_budget():
    r = analyze(
        load_text(
            PLAN.format(route="10,100 250,100", extra=", spacing 5 mm, height 5 mm"), "h.gplan"
        )
    )
    (row,) = r.hum.loops
    entry = row.sources["htr.wiring"]
    assert entry.model == "two-wire line" and entry.lines[0].frequency == 50
    # closest approach, worked by hand: the loop's top edge (y = 80 mm) to the nearer wire (y = 100
    # − 2.5 mm, 5 mm up): √(17.5² + 5²) = 18.20 mm
    assert entry.closest * 1e3 == pytest.approx(18.2, abs=0.05) and entry.size is None
    assert any(c.source == "htr.wiring" for c in r.hum.channels["main"].contributors)
    twisted = analyze(load_text(PLAN.format(route="10,100 250,100", extra=", twisted"), "h.gplan"))
    assert not twisted.hum.loops or "htr.wiring" not in twisted.hum.loops[0].sources


@pytest.mark.parametrize("route", ["10,100 250,100", "60,95 120,95", "150,90 40,110 40,160"])
def test_the_loops_emf_is_that_of_the_closed_heater_circuit(route):
    """The EMF in the loop beside the pair (2πf·Φ, f = 50 Hz, 3 A) against both independent
    integrations of the closed circuit, the filament at the wiring's last point and the winding at
    its first; a short run whose ends lie beside the loop differs visibly from two open-ended
    wires."""
    r = analyze(
        load_text(PLAN.format(route=route, extra=", spacing 5 mm, height 5 mm"), "h.gplan")
    )
    got = r.hum.loops[0].sources["htr.wiring"].lines[0].emf
    pts = [tuple(float(v) / 1000 for v in p.split(",")) for p in route.split()]
    closed = _circuit(pts, 0.005, 0.005)
    by_area = 2 * math.pi * 50 * abs(_biot_savart_flux(closed, 3.0, (0.03, 0.03, 0.17, 0.08)))
    by_neumann = 2 * math.pi * 50 * abs(_neumann_flux(closed, 3.0, LOOP))
    assert by_neumann == pytest.approx(by_area, rel=2e-3)  # the two references agree
    assert got == pytest.approx(by_area, rel=2e-3)
    if route == "60,95 120,95":
        opened = (
            2
            * math.pi
            * 50
            * abs(_neumann_flux(_circuit(pts, 0.005, 0.005, closed=False), 3.0, LOOP))
        )
        assert abs(opened - by_area) > 0.1 * by_area

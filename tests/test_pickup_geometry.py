"""Field sources with height, orientation and size against an independent Biot–Savart calculation:
the source is a circular current loop cut into short straight pieces, its field summed over them
(Biot–Savart law), and the flux through a rectangular loop on the deck integrated over its area by
Gauss–Legendre quadrature.  Nothing of groundcheck's pickup code is used for the expected values.

Reference: J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.2 (Biot–Savart law), §5.4
(circular loop)."""

import math

import numpy as np
import pytest

from groundcheck import load_text
from groundcheck.model.records import FieldSource
from groundcheck.physics.pickup import loop_flux, ring_path_flux

MU0 = 4e-7 * math.pi
B_REF, R_REF = 40e-6, 0.05  # 40 µT at 5 cm on the equator
K = B_REF * R_REF**3  # μ0·m/4π


def _ring_flux(centre, axis, radius, rect, pieces=720, grid=48):
    """Flux (Wb) through the rectangle (x0, y0, x1, y1) in z = 0 of a current ring with moment
    K·4π/μ0."""
    axis = np.asarray(axis, float) / np.linalg.norm(axis)
    u = np.cross(axis, [1.0, 0, 0] if abs(axis[0]) < 0.9 else [0, 1.0, 0])
    u /= np.linalg.norm(u)
    v = np.cross(axis, u)
    current = 4 * math.pi * K / MU0 / (math.pi * radius**2)  # m = I·πa²
    phi = np.linspace(0, 2 * math.pi, pieces + 1)
    ring = np.asarray(centre) + radius * (np.outer(np.cos(phi), u) + np.outer(np.sin(phi), v))
    mid, dl = 0.5 * (ring[1:] + ring[:-1]), ring[1:] - ring[:-1]
    t, w = np.polynomial.legendre.leggauss(grid)
    x0, y0, x1, y1 = rect
    xs, ys = x0 + (x1 - x0) * (t + 1) / 2, y0 + (y1 - y0) * (t + 1) / 2
    X, Y = np.meshgrid(xs, ys)
    P = np.stack([X.ravel(), Y.ravel(), np.zeros(X.size)], axis=1)
    R = P[:, None, :] - mid[None, :, :]
    B = (
        MU0
        * current
        / (4 * math.pi)
        * (np.cross(dl[None, :, :], R) / np.linalg.norm(R, axis=2)[:, :, None] ** 3)
    )
    Bz = B.sum(axis=1)[:, 2].reshape(X.shape)
    return float(w @ Bz @ w) * (x1 - x0) * (y1 - y0) / 4


def _src(pos, height=0.0, axis="z", size=None):
    return FieldSource("t", "transformer", pos, B_REF, R_REF, height=height, axis=axis, size=size)


RECT = (0.0, 0.0, 0.12, 0.06)
POLY = [(0.0, 0.0), (0.12, 0.0), (0.12, 0.06), (0.0, 0.06)]


@pytest.mark.parametrize(
    "pos,height,axis",
    [
        ((0.30, 0.03), 0.00, "z"),
        ((0.30, 0.03), 0.04, "z"),
        ((0.06, 0.25), 0.03, "x"),
        ((0.06, 0.25), 0.03, "y"),
        ((0.06, 0.03), 0.35, "x"),
        ((0.25, 0.20), 0.10, (0.3, -0.5, 0.8)),
    ],
)
def test_dipole_far_from_the_loop_matches_biot_savart(pos, height, axis):
    # at over five times the ring's size the dipole is within 2 % of the finite ring (Jackson §5.6)
    vec = (
        axis if isinstance(axis, tuple) else {"x": (1, 0, 0), "y": (0, 1, 0), "z": (0, 0, 1)}[axis]
    )
    m = np.asarray(vec, float) / np.linalg.norm(vec)
    expected = _ring_flux((*pos, height), m, 0.005, RECT)
    got = loop_flux(_src(pos, height), POLY, m)
    assert got == pytest.approx(expected, rel=0.02)


@pytest.mark.parametrize(
    "pos,height,axis",
    [
        ((0.06, 0.03), 0.035, (0, 0, 1)),
        ((0.06, 0.03), 0.035, (1, 0, 0)),
        ((0.14, 0.03), 0.02, (0, 1, 0)),
        ((0.06, 0.09), 0.03, (0.6, 0.0, 0.8)),
    ],
)
def test_ring_model_near_the_loop_matches_biot_savart(pos, height, axis):
    # a 60 mm source within its own size of the loop: the ring model against the independent sum,
    # within 1 %
    src = _src(pos, height, size=0.06)
    m = np.asarray(axis, float) / np.linalg.norm(axis)
    expected = _ring_flux((*pos, height), m, 0.03, RECT, grid=96)
    got = ring_path_flux(src, [*POLY, POLY[0]], m)
    assert got == pytest.approx(expected, rel=0.01)
    dipole = loop_flux(src, POLY, m)
    assert abs(dipole - expected) > 0.05 * abs(expected)  # where the dipole law is visibly off


def _neumann_flux(centre, axis, radius, path, ring_pieces=360, step=1e-3):
    """Flux (Wb) through the closed polyline ``path`` (z = 0) of a current ring with moment
    K·4π/μ0: the mutual inductance by Neumann's formula, M = (μ0/4π)·∮∮ dl·dl′/|r − r′| (F. W.
    Grover, *Inductance Calculations*, 1946, ch. 1), both curves cut into short pieces (midpoint
    rule; the ring's is spectrally accurate), times the ring's current I = 4K/(μ0·a²) (m = I·πa²,
    Jackson §5.6)."""
    axis = np.asarray(axis, float) / np.linalg.norm(axis)
    u = np.cross(axis, [1.0, 0, 0] if abs(axis[0]) < 0.9 else [0, 1.0, 0])
    u /= np.linalg.norm(u)
    v = np.cross(axis, u)
    phi = (np.arange(ring_pieces) + 0.5) * 2 * math.pi / ring_pieces
    ring = np.asarray(centre) + radius * (np.outer(np.cos(phi), u) + np.outer(np.sin(phi), v))
    dring = (
        radius * 2 * math.pi / ring_pieces * (np.outer(-np.sin(phi), u) + np.outer(np.cos(phi), v))
    )
    mids, dls = [], []
    for p, q in zip(path, path[1:]):
        p, q = np.array([*p, 0.0]), np.array([*q, 0.0])
        n = max(1, int(np.linalg.norm(q - p) / step))
        t = (np.arange(n) + 0.5) / n
        mids.append(p + np.outer(t, q - p))
        dls.append(np.tile((q - p) / n, (n, 1)))
    mids, dls = np.concatenate(mids), np.concatenate(dls)
    dist = np.linalg.norm(mids[:, None, :] - ring[None, :, :], axis=2)
    mutual = 1e-7 * float(np.sum((dls @ dring.T) / dist))
    return mutual * 4 * K / (MU0 * radius**2)


WORST = """plan "worst orientation (trial)"
listening output 1 V
point a: pad, at 0,0
point b: pad, at 100,0
point e: pad, at -250,0
wire w1: a to b, 100 mm, resistance 10 mohm
wire w2: b to a, 250 mm, resistance 30 mohm, via 100,50 0,50
wire w3: a to e, 600 mm, resistance 10 mohm, via 0,-60 -250,-60
wire w4: e to a, 300 mm, resistance 10 mohm, via -250,200 60,200 60,60 0,60
stage s: a to b, gain 20 dB, channel main
field t: transformer, at 62,32, 40 uT at 5 cm, height 35 mm, size 60 mm{axis}
"""
#: loop 1 (w1, w2): the 100 × 50 mm rectangle, inside the ring's size; loop 2 (w3, w4, around it,
#: joined at a only) feeds no stage
RECT1 = [(0.0, 0.0), (0.1, 0.0), (0.1, 0.05), (0.0, 0.05), (0.0, 0.0)]


def _channel_volts(m):
    # the loop's EMF 2πf·Φ drives I = E/(R1 + R2) round loop 1; the stage reads I·R1 along w1, its
    # least-resistance path, times its gain of 20 dB (Faraday's and Ohm's laws by hand, as in
    # test_hum.py's loop solved by hand)
    return (
        10
        * 0.010
        / 0.040
        * 2
        * math.pi
        * 50
        * abs(_neumann_flux((0.062, 0.032, 0.035), m, 0.03, RECT1))
    )


def _independent_worst():
    """The largest hum over directions: a 10° grid over the hemisphere, then Nelder–Mead (scipy)
    from the best."""
    from scipy.optimize import minimize

    def direction(x):
        th, ph = x
        return (math.sin(th) * math.cos(ph), math.sin(th) * math.sin(ph), math.cos(th))

    starts = [
        (math.radians(t), math.radians(p)) for t in range(0, 91, 15) for p in range(0, 360, 30)
    ]
    best = max(starts, key=lambda x: _channel_volts(direction(x)))
    res = minimize(
        lambda x: -_channel_volts(direction(x)),
        best,
        method="Nelder-Mead",
        options={"xatol": 1e-4, "fatol": 1e-12},
    )
    return -res.fun


def test_the_default_orientation_is_the_worst_at_the_output():
    """A loop inside a 60 mm ring and a larger loop that feeds no stage: the default direction
    gives the channel at least the hum of every stated axis, and the largest over all directions;
    each figure against the independent Neumann integration above (never groundcheck's own flux
    code)."""
    from groundcheck.analysis import analyze

    stated = {}
    for word, vec in (("x", (1, 0, 0)), ("y", (0, 1, 0)), ("z", (0, 0, 1))):
        r = analyze(load_text(WORST.format(axis=f", axis {word}"), "w.gplan"))
        stated[word] = r.hum.channels["main"].total_v
        assert stated[word] == pytest.approx(_channel_volts(vec), rel=2e-3)
    r = analyze(load_text(WORST.format(axis=""), "w.gplan"))
    h = r.hum.channels["main"]
    assert len(r.hum.loops) == 2
    assert all(h.total_v >= v for v in stated.values())
    assert h.total_v == pytest.approx(_independent_worst(), rel=2e-3)
    (row,) = h.field_axes
    assert (
        row.chosen == "worst at the output" and row.axis_stated == "worst" and row.model == "ring"
    )
    assert row.level == pytest.approx(h.total_v, rel=1e-9)
    for word, v in stated.items():
        assert row.axes[word] == pytest.approx(v, rel=1e-9)
    assert row.measure == "rms total"  # no speaker or headphones: no threshold to weigh by
    xr = (
        analyze(load_text(WORST.format(axis=", axis x"), "w.gplan"))
        .hum.channels["main"]
        .field_axes[0]
    )
    assert xr.chosen == "stated" and xr.axis == (1.0, 0.0, 0.0)
    assert xr.worst_level == pytest.approx(h.total_v, rel=1e-6)


def test_no_jump_where_a_loop_crosses_the_size():
    """The flux is continuous as a loop's closest approach crosses the source's size (one field
    model at every distance): the source moved by 0.02 mm across it changes the EMF by a few parts
    in a million, against an independent Neumann integration on both sides."""
    from groundcheck.analysis import analyze

    emfs = []
    for y in (
        108.97,
        108.99,
    ):  # 11 mm up, the loop's top edge at y = 50 mm: closest 59.99 and 60.01 mm
        text = WORST.replace("at 62,32, 40 uT", f"at 50,{y:g}, 40 uT").replace(
            "height 35 mm", "height 11 mm"
        )
        r = analyze(load_text(text.replace("{axis}", ", axis z"), "w.gplan"))
        row = next(x for x in r.hum.loops if "b" in x.members)
        emfs.append(row.sources["t"].lines[0].emf)
        expected = (
            2 * math.pi * 50 * abs(_neumann_flux((0.05, y * 1e-3, 0.011), (0, 0, 1), 0.03, RECT1))
        )
        assert emfs[-1] == pytest.approx(expected, rel=2e-3)
    assert emfs[0] == pytest.approx(emfs[1], rel=1e-3)


def test_a_ring_through_the_deck_is_an_error():
    from groundcheck.core.errors import PlanErrors

    with pytest.raises(PlanErrors) as e:
        load_text(WORST.format(axis=", axis x").replace("height 35 mm", "height 20 mm"), "w.gplan")
    err = e.value.errors[0]
    assert (
        "through the deck" in err.message
        and err.location.line == 11
        and "at least 30 mm" in err.hint
    )
    load_text(
        WORST.format(axis=", axis z").replace("height 35 mm", "height 20 mm"), "w.gplan"
    )  # level: fine


def test_height_axis_and_size_are_read_and_checked():
    base = (
        'plan "f"\nmetal deck: steel 1 mm, 100 x 100 mm\n'
        "field t: transformer, at 50,50, 40 uT at 5 cm, {}\n"
    )
    p = load_text(base.format("height 35 mm, axis x, size 60 mm"), "f.gplan")
    (f,) = p.fields
    assert (f.height, f.axis, f.size) == (pytest.approx(0.035), "x", pytest.approx(0.06))
    from groundcheck.core.errors import PlanErrors

    with pytest.raises(PlanErrors) as e:
        load_text(base.format("axis w"), "f.gplan")
    assert "axis" in str(e.value.errors[0])


def test_loops_near_a_source_are_noted_with_the_model_used():
    from groundcheck.analysis import analyze
    from helpers import EXAMPLES

    head = next(e for e in EXAMPLES if e.name.startswith("guitar-head"))
    # the transformer moved onto the chassis loop's wire bond_stud -> star, and a choke added
    # beside star -> in_sleeve
    text = head.read_text().replace(
        "field ptx: transformer, at 90,60,", "field ptx: transformer, at 150,126,"
    )
    text += "field choke: choke, at 300,80, 20 uT at 5 cm, height 30 mm, size 50 mm\n"
    r = analyze(load_text(text, str(head)))
    notes = [f for f in r.findings if f.code == "GC305"]
    assert {f.elements[1] for f in notes} == {"ptx", "choke"} and all(
        "ring model" in f.message for f in notes
    )
    entry = next(row for row in r.hum.loops if row.loop == 1).sources["choke"]
    assert entry.model == "ring" and entry.height == pytest.approx(0.030) and entry.closest < 0.050
    bare = analyze(load_text(text.replace(", size 50 mm", ""), str(head)))
    (note,) = [f for f in bare.findings if f.code == "GC305" and f.elements[1] == "choke"]
    assert "state the size of choke" in note.fix


def _raster_enclosed_area(poly, lo, hi, n=2201):
    """∫|winding number| dA on a fine grid: the winding number of each grid point by counting
    signed edge crossings of a ray to the right (the crossing-number rule)."""
    g = np.linspace(lo, hi, n)
    X, Y = np.meshgrid(g, g)
    w = np.zeros_like(X)
    for k in range(len(poly)):
        (x0, y0), (x1, y1) = poly[k], poly[(k + 1) % len(poly)]
        up, down = (y0 <= Y) & (y1 > Y), (y0 > Y) & (y1 <= Y)
        side = (x1 - x0) * (Y - y0) - (X - x0) * (y1 - y0)
        w += np.where(up & (side > 0), 1, 0) - np.where(down & (side < 0), 1, 0)
    return float(np.abs(w).sum() * (g[1] - g[0]) ** 2)


@pytest.mark.parametrize(
    "poly",
    [
        [
            (0, 0),
            (4, 0),
            (4, 3),
            (1, 3),
            (1, 1),
            (3, 1),
            (3, 2),
            (0, 2),
        ],  # a lobe crossing back over itself
        [(0, 0), (2, 2), (2, 0), (0, 2)],  # a figure of eight: net area 0
        [(0, 0), (6, 0), (6, 4), (0, 4)],  # simple: the shoelace formula
        [(1.2, 7.5), (9.1, 2.2), (3.3, 0.4), (8.8, 8.9), (0.3, 3.1), (5.5, 9.6), (7.7, 0.9)],
    ],
)
def test_loop_area_counts_every_lobe_once(poly):
    from groundcheck.network.graph import polygon_area

    assert polygon_area(poly) == pytest.approx(_raster_enclosed_area(poly, -0.5, 10.5), rel=2e-3)


def test_loop_through_a_plate_follows_the_spread_current():
    """A wire leaves one stud of a 200 × 120 mm deck, runs round below it and comes back to a
    second stud: the loop closes through the deck.  A 40 µT-at-5-cm source sits over the deck
    between the studs.  Expected: an independent finite-volume solve written here (a 1 mm grid,
    each stud one node, scipy's sparse solver), the edge currents of 1 A from stud to stud, Σ
    I·A·dl over the edges plus ∫A·dl along the wire by a fine midpoint sum; the straight chord
    between the studs (the old outline) is visibly off."""
    from groundcheck.analysis import analyze
    from sheet_reference import sheet_spread

    W, D = 0.2, 0.12
    s1, s2, src = (0.03, 0.03), (0.17, 0.03), (0.10, 0.07)
    X, Y, a, b, I = sheet_spread(W, D, s1, s2)  # from a to b
    K = 40e-6 * 0.05**3

    def a_dot(px, py, dx, dy):  # A·dl of a z-axis dipole at src, in the deck's plane
        rx, ry = px - src[0], py - src[1]
        return K * (rx * dy - ry * dx) / (rx * rx + ry * ry) ** 1.5

    plate = float(
        np.sum(I * a_dot((X[a] + X[b]) / 2, (Y[a] + Y[b]) / 2, X[b] - X[a], Y[b] - Y[a]))
    )
    wire_pts = [s1, (0.03, -0.04), (0.17, -0.04), s2]  # stud 1 → below the deck → stud 2
    wire = 0.0
    for p, q in zip(wire_pts, wire_pts[1:]):
        t = (np.arange(20000) + 0.5) / 20000
        wire += float(
            np.sum(
                a_dot(
                    p[0] + t * (q[0] - p[0]),
                    p[1] + t * (q[1] - p[1]),
                    (q[0] - p[0]) / 20000,
                    (q[1] - p[1]) / 20000,
                )
            )
        )
    expected = abs(wire - plate)  # round the loop: out along the wire, back through the deck
    text = """plan "loop through a deck"
listening output 1 V
metal deck: aluminium 2 mm, 200 x 120 mm
point st1: stud, at 30,30 on deck
point st2: stud, at 170,30 on deck
bolt n1: st1 to deck
bolt n2: st2 to deck
wire w: st1 to st2, 300 mm, 0.5 mm2, signal, via 30,-40 170,-40
stage v: st1 to st2, gain 0 dB, channel main
field t: transformer, at 100,70, 40 uT at 5 cm, axis z
"""
    r = analyze(load_text(text, "deck.gplan"))
    (row,) = r.hum.loops
    got = row.sources["t"].lines[0].emf / (2 * math.pi * 50)
    assert got == pytest.approx(expected, rel=0.05)
    t = (np.arange(20000) + 0.5) / 20000  # back along the straight chord from stud 2 to stud 1
    back = float(
        np.sum(
            a_dot(
                s2[0] + t * (s1[0] - s2[0]),
                s2[1] + t * (s1[1] - s2[1]),
                (s1[0] - s2[0]) / 20000,
                (s1[1] - s2[1]) / 20000,
            )
        )
    )
    chord = abs(wire + back)
    assert abs(chord - expected) > 0.2 * expected  # the straight chord is visibly off


def test_closest_approach_counts_the_source_height():
    # a source 40 mm up, 40 mm beyond the loop's top edge (y = 60 mm) in the plane: √(40² + 40²) =
    # 56.57 mm, worked by hand; GC305 and the pickup table print this figure
    from groundcheck.physics.pickup import min_distance

    assert min_distance(_src((0.06, 0.10), height=0.04), POLY) == pytest.approx(0.056569, abs=1e-6)


def test_with_harmonics_the_worst_direction_maximises_the_threshold_weighted_total():
    """With a listening verdict and a third harmonic, the default direction maximises Σ over the
    harmonics of 10^(margin/10), each harmonic's power against its own threshold (ISO 226): read
    from the channel's spectrum of the default and of each stated axis (the claim checked on the
    figures the user sees, not recomputed)."""
    from groundcheck.analysis import analyze

    text = WORST.replace(
        "listening output 1 V", "listening output 1 V, speaker 90 dB, distance 2 m"
    )
    text = text.replace("size 60 mm{axis}", "size 60 mm, harmonic 3 -6 dB{axis}")

    def weighted(axis):
        h = analyze(load_text(text.format(axis=axis), "w.gplan")).hum.channels["main"]
        return sum(10 ** (row.margin / 10) for row in h.spectrum if row.margin is not None), h

    worst, h = weighted("")
    assert h.field_axes[0].measure == "threshold-weighted total"
    assert [row.frequency for row in h.spectrum] == [50.0, 150.0]
    for axis in (", axis x", ", axis y", ", axis z"):
        assert worst >= weighted(axis)[0] * (1 - 3e-3)  # the margins are rounded to 0.01 dB

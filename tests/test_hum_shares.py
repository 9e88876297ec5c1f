"""The hum budget's choice of each source's largest conductor shares (physics/hum_shares.py): it
must pick what a search of every column in canonical order picks, equal shares past the eighteenth
included."""

import numpy as np
import pytest

from groundcheck.physics.hum_shares import TOP_SHARES, _largest


def _full(mags, rank):
    """The choice written out plainly: every column's magnitude rounded to 1e-9 of the row's
    largest, sorted by it (largest first), equal ones by rank; the first TOP_SHARES."""
    out = []
    for row in mags:
        q = np.round(row / row.max(), 9)
        out.append(sorted(range(len(row)), key=lambda j: (-q[j], rank[j]))[:TOP_SHARES])
    return np.array(out)


@pytest.mark.parametrize("nb", [200, 1500])
def test_the_largest_are_those_of_a_search_of_every_column(nb):
    rng = np.random.default_rng(7)
    mags = rng.lognormal(0.0, 3.0, size=(40, nb))
    mags[:5, :] = rng.uniform(0.0, 1.0, size=(5, nb))  # flat rows
    mags[5:10, :] = rng.lognormal(0.0, 8.0, size=(5, nb))  # steep rows
    mags[10:12, :] = 0.0
    mags[10:12, :3] = [4.0, 2.0, 1.0]  # three entries, the rest zero
    mags[3, 100:140] = 5.0  # forty equal largest: ranks decide
    mags[20, 50:75] = mags[20].max() * 2  # twenty-five equal largest
    rank = rng.permutation(nb)
    # the ones named: a share under a thousandth of the row's largest never is, whichever it is
    for row, ours, full in zip(mags, _largest(mags, rank), _full(mags, rank)):
        named = row > 1e-3 * row.max()
        assert [j for j in ours if named[j]] == [j for j in full if named[j]]


def _chain(la: str, lb: str):
    """The chain of 13 wires, w_k of k mΩ, between p0 and p13, read end to end by a stage of
    0 dB, with two leakage currents of the spectra given: la from p0 to p13, lb from p0 to p3."""
    from groundcheck.analysis import analyze
    from groundcheck.language.loader import load_text

    lines = ['plan "a chain read end to end"', "listening output 1 V"]
    lines += [f"point p{k}: pad, at {10 * k},0" for k in range(14)]
    lines += [f"wire w{k}: p{k - 1} to p{k}, 10 mm, resistance {k} mohm" for k in range(1, 14)]
    # a spur at each joint, carrying nothing, so that the wires are not one run in series
    lines += [f"point q{k}: pad, at {10 * k},10" for k in range(1, 13)]
    lines += [f"wire d{k}: p{k} to q{k}, 10 mm, 0.5 mm2" for k in range(1, 13)]
    lines += [
        f"current la: p0 to p13, {la}, leakage",
        f"current lb: p0 to p3, {lb}, leakage",
        "stage s: p0 to p13, gain 0 dB, channel out",
    ]
    return analyze(load_text("\n".join(lines) + "\n", "chain.gplan"))


def test_a_groups_conductor_share_is_its_whole_share_not_each_sources_ten_largest():
    # a chain of 13 wires, w_k of k mΩ, between p0 and p13; the stage reads p0 to p13 (gain 0 dB),
    # so its 1 A test current runs through every wire and a wire's share of the output is its
    # drop (reciprocity). Two leakage currents (one mains line, in phase): 1 mA p0 → p13 through
    # every wire, and 1 mA p0 → p3 through w1–w3. Worked by hand (Ohm's law): w3 carries 2 mA and
    # drops 2 mA × 3 mΩ = 6 µV; w13 1 mA × 13 mΩ = 13 µV; w1 2 µV, the group's twelfth; the
    # output (1 + … + 13) µV + (1 + 2 + 3) µV = 97 µV. The first current's ten largest shares are
    # w4–w13: a sum of each source's ten would give w3 only the second current's 3 µV
    r = _chain("1 mA 50 Hz", "1 mA 50 Hz")
    ch = r.hum.channels["out"]
    named = {c.element: c.volts for c in ch.contributors if c.kind == "conductor"}
    assert ch.total_v == pytest.approx(97e-6, rel=1e-3)
    assert named["w13"] == pytest.approx(13e-6, rel=1e-3)
    assert named["w3"] == pytest.approx(6e-6, rel=1e-3)
    assert "w1" not in named  # among other conductors


def test_leakage_currents_past_their_first_frequency_solved_as_one_sum():
    # the chain above with a second line on each leakage current: la 0.5 mA and lb 2 mA at
    # 150 Hz. At 150 Hz (past both currents' first frequency) the two are solved as one column
    # of their sum; what is read of them there must be what each alone gives, added. Worked by
    # hand (Ohm's law, the wires' resistance): the 150 Hz line is 0.5 mA × 91 mΩ + 2 mA × 6 mΩ
    # = 57.5 µV; w3 carries 2.5 mA there and drops 7.5 µV; w2 2.5 mA × 2 mΩ = 5 µV. Each current
    # keeps its own network rows, at 50 Hz
    r = _chain("1 mA 50 Hz, 0.5 mA 150 Hz", "1 mA 50 Hz, 2 mA 150 Hz")
    ch = r.hum.channels["out"]
    line = {s.frequency: s.volts for s in ch.spectrum}
    assert line[50.0] == pytest.approx(97e-6, rel=1e-3)
    assert line[150.0] == pytest.approx(57.5e-6, rel=1e-3)
    at150 = {k[1]: abs(v[150.0]) for k, v in ch.lines.items() if 150.0 in v}
    assert at150["w3"] == pytest.approx(7.5e-6, rel=1e-3)
    assert at150["w2"] == pytest.approx(5e-6, rel=1e-3)
    rows = {(n["source"], n["frequency_hz"]) for n in r.hum.network}
    assert rows == {("la", 50.0), ("lb", 50.0)}

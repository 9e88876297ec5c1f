"""Which conductor to suspect: recordings synthesised from each example's own predicted spectrum,
one contributor
scaled ×10, must name that contributor's mechanism first (and the contributor itself where its
shape is its
own); an unscaled recording matches the plan; a line nothing in the plan makes is said to be
unexplained; the
fit's scale is the weighted least-squares solution worked by hand."""

import math

import numpy as np
import pytest

from benchwav import db, tones, write
from groundcheck import analyze, load
from groundcheck.measure.bench import bench_record
from groundcheck.measure.fit import mechanisms
from groundcheck.measure.lines import measure
from helpers import ROOT

RATE = 12000
EXAMPLES = [
    "guitar-head.gplan",
    "headphone-amp-100v.gplan",
    "dual-mono-phono-stage.gplan",
    "studio/project-studio.gplan",
]
_RESULTS: dict = {}


def _result(name):
    if name not in _RESULTS:
        _RESULTS[name] = analyze(load(str(ROOT / "examples" / name)))
    return _RESULTS[name]


def _spectrum(hum, scale: dict, phases: bool) -> dict:
    """Each frequency's level: the contributors' predicted levels scaled, added in phase (the
    fit's model) or as
    the plan's phasors (the network's own sum)."""
    out: dict = {}
    for (_kind, name, _group), per_f in hum.lines.items():
        k = scale.get(name, 1.0)
        for f, p in per_f.items():
            out[f] = out.get(f, 0) + k * (p if phases else abs(p))
    return {f: abs(v) for f, v in out.items() if abs(v) > 0}


def _record(tmp_path, result, channel, spectrum, extra=None, calibrated=True):
    """Synthesise the spectrum (volts) at −20 dBFS for its largest line, measure it, and compare
    with the plan."""
    volts_per_unit = max(spectrum.values()) * 10 * math.sqrt(2)
    lines = {f: v / volts_per_unit for f, v in {**spectrum, **(extra or {})}.items()}
    write(tmp_path / "rec.wav", tones(lines, RATE, 2.0, noise=1e-7), RATE)
    m = measure(
        str(tmp_path / "rec.wav"),
        fallback=result.plan.frequency,
        max_frequency=5000.0,
        volts_per_unit=volts_per_unit if calibrated else None,
        calibration="synthetic",
    )
    return bench_record(result, m, channel)


def _cases():
    out = []
    for name in EXAMPLES:
        r = _result(name)
        for ch, hum in sorted(r.hum.channels.items()):
            mechs = mechanisms(hum.lines, [k * r.plan.frequency for k in range(1, 101)])
            for m in mechs:
                for label, _ in m.members[:2]:
                    if "other conductors" not in label:
                        out.append(
                            (
                                name,
                                ch,
                                label.split()[-1] if label.startswith("conductor") else label,
                                len(m.members),
                            )
                        )
    return out


CASES = _cases()


def test_every_example_gives_cases():
    assert {c[0] for c in CASES} == set(EXAMPLES) and len(CASES) >= 8


@pytest.mark.parametrize("phases", [False, True], ids=["in-phase", "plan-phasors"])
@pytest.mark.parametrize(
    "example,channel,target,shared", CASES, ids=[f"{c[0]}-{c[1]}-{c[2]}" for c in CASES]
)
def test_a_contributor_scaled_ten_times_is_named_first(
    tmp_path, example, channel, target, shared, phases
):
    result = _result(example)
    spectrum = _spectrum(result.hum.channels[channel], {target: 10.0}, phases)
    rec = _record(tmp_path, result, channel, spectrum)
    first = rec.channels[0].suspects[0]
    assert any(
        m == target or m.startswith(f"conductor {target}") or m.startswith(f"{target} (")
        for m in first.members
    ), (first.members, target)
    if shared == 1:
        # a shape of its own: it is named first by name, and the fit puts it 20 dB above the plan
        assert first.members[0].split(" (")[0].split()[-1] == target.split()[-1]
        assert abs(first.off_db - 20.0) < 0.2
        assert any(f.code == "GC405" for f in rec.findings)
        assert f"suspect {first.members[0]}" in " ".join(rec.channels[0].summary)


@pytest.mark.parametrize("example", EXAMPLES[:3])
def test_a_recording_of_the_plan_itself_matches_it(tmp_path, example):
    result = _result(example)
    for channel, hum in sorted(result.hum.channels.items()):
        rec = _record(tmp_path, result, channel, _spectrum(hum, {}, False))
        ch = rec.channels[0]
        assert ch.suspects and all(abs(s.off_db) < 0.1 for s in ch.suspects)
        assert not rec.findings and all("matches the plan" in s for s in ch.summary)
        for r in ch.rows:
            if r.above_noise and r.predicted:
                assert abs(db(r.measured) - db(r.predicted)) < 0.1


def test_a_line_nothing_in_the_plan_makes_is_unexplained(tmp_path):
    result = _result("guitar-head.gplan")
    hum = result.hum.channels["guitar"]
    spectrum = _spectrum(hum, {}, False)
    rec = _record(tmp_path, result, "guitar", spectrum, extra={150.0: max(spectrum.values()) / 3})
    ch = rec.channels[0]
    odd = [r for r in ch.rows if r.unexplained]
    assert [r.harmonic for r in odd] == [3] and odd[0].predicted is None
    assert any("nothing in the plan explains the line at 150 Hz" in s for s in ch.summary)
    [finding] = [f for f in rec.findings if f.code == "GC405"]
    assert "150 Hz (none planned)" in finding.message


def test_an_unplanned_line_far_below_the_contributor_level_is_no_finding(tmp_path):
    # a line nothing in the plan makes, at 1e-8 V (-160 dBV, far below the -100 dBV contributor
    # level: a quantisation product of a 24-bit file), is reported in the rows but makes no GC405
    result = _result("guitar-head.gplan")
    hum = result.hum.channels["guitar"]
    spectrum = _spectrum(hum, {}, False)
    rec = _record(tmp_path, result, "guitar", spectrum, extra={150.0: 1e-8})
    assert not [f for f in rec.findings if f.code == "GC405" and "150 Hz" in f.message]


def test_the_fit_is_the_weighted_least_squares_worked_by_hand(tmp_path):
    # the guitar head's two mechanisms have lines of their own (50 Hz; 100 Hz and up), so each
    # scale is the weighted least-squares solution of one column: a = Σ(p·w)(m·w) / Σ(p·w)² over
    # its lines, w = 1 / max(m, 1 % of the strongest measured line) — relative weights over 40 dB
    result = _result("guitar-head.gplan")
    hum = result.hum.channels["guitar"]
    rng = np.random.default_rng(7)
    wobble = {}
    spectrum = _spectrum(hum, {"k_gnd": 3.0}, False)
    for f in spectrum:
        wobble[f] = spectrum[f] * (1 + 0.2 * rng.uniform(-1, 1))
    rec = _record(tmp_path, result, "guitar", wobble)
    ch = rec.channels[0]
    planned = {
        f: abs(p) for f, p in hum.lines[("conductor", "k_gnd", "rectifier charging")].items()
    }
    rows = [
        r for r in ch.rows if r.above_noise and r.plan_frequency_hz in planned and r.harmonic > 1
    ]
    top = max(r.measured for r in ch.rows if r.above_noise)
    w = np.array([1 / max(r.measured, r.noise, 0.01 * top) for r in rows])
    p = np.array([planned[r.plan_frequency_hz] for r in rows])
    m = np.array([r.measured for r in rows])
    hand = ((p * w) * (m * w)).sum() / ((p * w) ** 2).sum()
    [k_gnd] = [s for s in ch.suspects if s.members == ("conductor k_gnd",)]
    assert k_gnd.scale == pytest.approx(hand, rel=0.02)


def test_an_uncalibrated_recording_is_compared_by_shape_only(tmp_path):
    result = _result("guitar-head.gplan")
    spectrum = _spectrum(result.hum.channels["guitar"], {"k_gnd": 10.0}, False)
    rec = _record(tmp_path, result, "guitar", spectrum, calibrated=False)
    assert rec.channels[0].audible is None and not rec.findings
    assert any("not calibrated" in n for n in rec.notes)
    assert rec.channels[0].suspects[0].members == ("conductor k_gnd",)


def test_the_measured_hum_is_judged_at_the_listener(tmp_path):
    # headphones of 102 dB SPL per mW, 32 Ω, the plan's gain to them 0 dB: V volts give
    # 102 + 10·log10(V²/32 Ω / 1 mW) dB SPL (worked by hand)
    result = _result("headphone-amp-100v.gplan")
    lst = result.plan.listening
    spectrum = _spectrum(result.hum.channels["left"], {}, False)
    rec = _record(tmp_path, result, "left", spectrum)
    ch = rec.channels[0]
    row = next(r for r in ch.rows if r.harmonic == 2)
    gain = 10 ** (lst.amp_gain / 20)
    hand = 102 + 10 * math.log10((row.measured * gain) ** 2 / 32 / 1e-3)
    assert lst.phones == pytest.approx(102) and row.spl_db == pytest.approx(hand, abs=0.01)
    assert ch.audible == any(r.spl_db > r.threshold_db for r in ch.rows if r.spl_db is not None)


def test_a_recording_of_the_main_lines_only_still_matches_their_mechanism(tmp_path):
    # an outside builder's recording held the plan's two main lines (100 and 200 Hz, the high
    # tension's ripple fed to the stage) and none of its small ones (300 Hz and up, 40–150 dB
    # down): every relative weight on the absent lines had scaled the mechanism to -110 dB and the
    # two lines were "not in the plan". The recorded lines are the plan's; the absent ones are said
    result = analyze(
        load(str(ROOT / "tests" / "field" / "adapter-headphone-lounge" / "headamp.gplan"))
    )
    full = _spectrum(result.hum.channels["left"], {}, False)
    main = {f: v for f, v in full.items() if f in (100.0, 200.0)}
    assert len(main) == 2
    ch = _record(tmp_path, result, "left", main).channels[0]
    assert not [r for r in ch.rows if r.unexplained]
    (supply,) = [s for s in ch.suspects if "left" in s.members[0]]
    assert 0.5 < supply.scale < 1.2  # within a few dB of the plan, not scaled away
    assert any("does not show" in line for line in ch.summary)

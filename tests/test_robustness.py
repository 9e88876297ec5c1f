"""Bad, hostile and numerically awkward input: nothing crashes, nothing is lost, same bytes every
run."""

import json
import math
import os
import subprocess
import sys
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from groundcheck import PlanErrors, load, load_text
from groundcheck.analysis import analyze
from groundcheck.physics.circuit import build_circuit
from groundcheck.language.loader import LIMITS
from groundcheck.renderers.jsondoc import render_json
from groundcheck.rules.context import AuditContext
from groundcheck.physics.safety import protective_figures as _figures

from helpers import EXAMPLES, ROOT, plan
from planfuzz import mutated_plans, valid_plans


def protective_figures(p):
    return _figures(p, AuditContext(p).route)


def _outcome(text):
    """Either a full analysis rendered to JSON, or PlanErrors with file:line:col messages (from
    loading, or from the analysis: a rectifier whose figures have no steady state, such as a load
    current its winding cannot supply)."""
    try:
        p = load_text(text, "fuzz.gplan")
        result = analyze(p)
    except PlanErrors as e:
        for err in e.errors:
            assert err.one_line().startswith("fuzz.gplan:")
            assert ": error: " in err.one_line()
        e.render()
        return None
    out = render_json(result)
    assert "NaN" not in out and "Infinity" not in out
    json.loads(out)
    return out


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(valid_plans())
def test_fuzz_valid_plans(text):
    _outcome(text)


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_plans())
def test_fuzz_mutated_plans(text):
    _outcome(text)


# --- limits: each with a clear error -------------------------------------------------------------


def test_line_length_limit():
    with pytest.raises(PlanErrors) as e:
        load_text('plan "x"\n# ' + "x" * (LIMITS["line_chars"] + 10) + "\n", "l.gplan")
    assert "over the limit" in str(e.value) and "l.gplan:2:" in str(e.value)


def test_file_size_limit(tmp_path, monkeypatch):
    monkeypatch.setitem(LIMITS, "file_bytes", 100)
    f = tmp_path / "big.gplan"
    f.write_text('plan "x"\n' + "# padding\n" * 20)
    with pytest.raises(PlanErrors) as e:
        load(f)
    assert "over the limit of 100" in str(e.value)


def test_expansion_explosion_is_stopped():
    # a block placing a block placing a block ...: 2^8 copies at depth 8; the element limit stops
    # it early
    blocks = ["block b0 {\n  point p: pad\n}"]
    for i in range(1, 8):
        blocks.append(f"block b{i} {{\n  place b{i - 1} as x\n  place b{i - 1} as y\n}}")
    text = 'plan "x"\n' + "\n".join(blocks) + "\nplace b7 as top\n"
    p = load_text(text, "e.gplan")
    assert len(p.points) == 128
    old = LIMITS["elements"]
    LIMITS["elements"] = 100
    try:
        with pytest.raises(PlanErrors) as e:
            load_text(text, "e.gplan")
        assert "expands to more than 100 elements" in str(e.value)
    finally:
        LIMITS["elements"] = old


def test_block_depth_limit():
    blocks = ["block b0 {\n  point p: pad\n}"]
    for i in range(1, 11):
        blocks.append(f"block b{i} {{\n  place b{i - 1} as x\n}}")
    with pytest.raises(PlanErrors) as e:
        load_text('plan "x"\n' + "\n".join(blocks) + "\nplace b10 as top\n", "d.gplan")
    assert f"more than {LIMITS['block_depth']} deep" in str(e.value)


def test_include_depth_limit(tmp_path):
    for i in range(LIMITS["include_depth"] + 3):
        (tmp_path / f"f{i}.gplan").write_text(f'include "f{i + 1}.gplan"\n')
    (tmp_path / f"f{LIMITS['include_depth'] + 3}.gplan").write_text("point p: pad\n")
    with pytest.raises(PlanErrors) as e:
        load(tmp_path / "f0.gplan")
    assert "includes nested deeper than" in str(e.value)


# --- numerical edge cases ------------------------------------------------------------------------

EDGE = {
    "zero impedances": """
        metal deck: aluminium 2 mm, 100 x 100 mm, touchable
        point pe: stud, at 10,10 on deck
        point s: star, at 50,50 on deck
        point k: pad, at 60,50 on deck
        wire pe_lead: mains.pe to pe, 50 mm, 1 mm2, protective
        bolt b: pe to deck, contact 0 ohm
        wire w0: s to k, 10 mm, 1 mm2, resistance 0 ohm
        wire w1: s to pe, 10 mm, 1 mm2, resistance 0 ohm
        current i: s to k, 1 A 100 Hz
        stage g: s to k, gain 40 dB
        """,
    "huge impedance ratio": """
        point a: pad
        point b: pad
        wire w0: a to b, 1 mm, 1 mm2, resistance 1e-12 ohm
        wire w1: a to b, 1 mm, 1 mm2, resistance 1e12 ohm
        current i: a to b, 1 A 100 Hz
        stage g: a to b, gain 0 dB
        """,
    "islands": """
        point a: pad
        point b: pad
        point c: pad
        point d: pad
        wire w0: a to b, 10 mm, 1 mm2
        wire w1: c to d, 10 mm, 1 mm2
        current i: a to b, 1 A 100 Hz
        stage g: a to c, gain 20 dB
        stage h: c to d, gain 20 dB
        """,
    "no protective earth": """
        metal deck: steel 1 mm, 100 x 100 mm, touchable
        point a: pad, at 10,10 on deck
        bolt b: a to deck
        """,
    "no currents": """
        point a: pad, at 0,0
        point b: pad, at 10,0
        wire w: a to b, 10 mm, 1 mm2
        stage g: a to b, gain 20 dB
        """,
    "coincident points": """
        point a: pad, at 10,10
        point b: pad, at 10,10
        wire w0: a to b, 1 mm, 1 mm2
        wire w1: a to b, 1 mm, 1 mm2
        field t: transformer, at 10,10, 40 uT at 5 cm
        stage g: a to b, gain 20 dB
        """,
    "collinear loop": """
        point a: pad, at 0,0
        point b: pad, at 10,0
        point c: pad, at 20,0
        wire w0: a to b, 10 mm, 1 mm2
        wire w1: b to c, 10 mm, 1 mm2
        wire w2: c to a, 20 mm, 1 mm2
        field t: transformer, at 10,50, 40 uT at 5 cm
        stage g: a to b, gain 20 dB
        """,
    "field source on a wire": """
        point a: pad, at 0,0
        point b: pad, at 100,0
        point c: pad, at 100,100
        wire w0: a to b, 100 mm, 1 mm2
        wire w1: b to c, 100 mm, 1 mm2
        wire w2: c to a, 150 mm, 1 mm2
        field t: transformer, at 50,0, 40 uT at 5 cm
        stage g: a to b, gain 20 dB
        """,
}


@pytest.mark.parametrize("name", list(EDGE))
def test_numerical_edge_cases_give_finite_figures(name):
    r = analyze(plan(EDGE[name]))
    out = render_json(r)
    assert "NaN" not in out and "Infinity" not in out
    doc = json.loads(out)
    if doc["hum"]:
        for ch in doc["hum"]["channels"].values():
            assert ch["total_v"] is not None and math.isfinite(ch["total_v"])


def test_islands_are_reported_not_crashed():
    r = analyze(plan(EDGE["islands"]))
    assert any(f.code == "GC401" for f in r.findings)


def test_no_protective_earth_is_a_danger():
    r = analyze(plan(EDGE["no protective earth"]))
    assert any(f.code == "GC201" and f.severity == "danger" for f in r.findings)


# --- outputs are safe ----------------------------------------------------------------------------


def test_atomic_write_leaves_nothing_else(cli, tmp_path):
    out = tmp_path / "r.json"
    code, _, _ = cli(
        "check", str(EXAMPLES[0]), "--format", "json", "-o", str(out), "--fail-on", "danger"
    )
    assert code == 0 and json.loads(out.read_text())
    assert sorted(p.name for p in tmp_path.iterdir()) == ["r.json"]
    code, _, err = cli(
        "check", str(EXAMPLES[0]), "--format", "json", "-o", str(tmp_path / "nodir" / "r.json")
    )
    assert code == 2 and "does not exist" in err and not (tmp_path / "nodir").exists()


def test_refuses_every_output_over_the_plan(cli, tmp_path):
    p = tmp_path / "p.gplan"
    p.write_text(EXAMPLES[1].read_text())
    before = p.read_bytes()
    for argv in (
        ["check", str(p), "--format", "sarif", "-o", str(p)],
        ["draw", str(p), "-o", str(tmp_path / "p.gplan.svg")],
        ["report", str(p), "-o", str(p)],
        ["export", str(p), "--format", "spice", "-o", str(p)],
    ):
        cli(*argv)
    assert p.read_bytes() == before


# --- determinism ---------------------------------------------------------------------------------

SCRIPT = """
import sys
from groundcheck import load
from groundcheck.analysis import analyze
from groundcheck.renderers.jsondoc import render_json
from groundcheck.renderers.sarif import render_sarif
from groundcheck.renderers.dot import physical_dot, topology_dot
for path in sys.argv[1:]:
    r = analyze(load(path))
    sys.stdout.write(render_json(r) + render_sarif([r]) + physical_dot(r) + topology_dot(r))
"""


def test_same_bytes_across_runs_and_hash_seeds():
    # every example in one process per seed (a process's start costs more than an example)
    outs = set()
    for seed in ("0", "12345"):
        env = {**os.environ, "PYTHONHASHSEED": seed}
        outs.add(
            subprocess.run(
                [sys.executable, "-c", SCRIPT, *map(str, EXAMPLES)],
                capture_output=True,
                env=env,
                check=True,
                cwd=ROOT,
            ).stdout
        )
    assert len(outs) == 1


# --- properties ----------------------------------------------------------------------------------


@settings(max_examples=25, deadline=None)
@given(st.floats(0.01, 100.0), st.sampled_from([0.0, 100.0, 1000.0]))
def test_scaling_impedances_scales_induced_voltages(k, f):
    p = load(EXAMPLES[0])
    c = build_circuit(p)
    J = np.zeros((len(c.nodes), 1), complex)
    J[c.point_node["res_neg"]] = 1
    J[c.point_node["br_neg"]] = -1
    v1 = c.solve(f, J).between("left.in_sleeve", "left.v1_k")
    for b in c.branches:
        b.r *= k
        b.l *= k
        if b.cap is not None:
            b.cap /= k
    c.__dict__.pop("_arrays", None)
    v2 = c.solve(f, J).between("left.in_sleeve", "left.v1_k")
    assert v2 == pytest.approx(k * v1, rel=1e-9)


SYMMETRIC = """
plan "symmetric dual mono"
listening output 2 V, amp-gain 26 dB, speaker 90 dB, distance 2 m
metal deck: aluminium 2 mm, 300 x 200 mm
point sig: stud, at 20,100 on deck
bolt sb: sig to deck
field ptx: transformer, at 60,150, 50 uT at 5 cm
block ch {
  point sleeve: sleeve, at 280,30 on deck
  point k: pad, at 200,40 on deck
  point star: star, at 150,60 on deck
  point rn: cap, at 100,70 on deck
  point ct: centre-tap, at 60,70 on deck
  wire ig: sleeve to star, 140 mm, 0.5 mm2, signal
  wire kg: k to rn, 110 mm, 0.5 mm2, signal
  wire sg: rn to star, 50 mm, 0.75 mm2, return
  wire cg: ct to star, 90 mm, 0.5 mm2, return
  wire bond: star to sig, 140 mm, 0.75 mm2, signal
  wire extra: sleeve to sig, 270 mm, 0.5 mm2, signal
  rectifier hv: rn to ct, full-wave, secondary 250 V, winding 100 ohm, reservoir 47 uF, load 20 mA
  stage v1: sleeve to k, gain 30 dB
}
place ch as left at 0,0
place ch as right at 0,200, mirror
"""


def test_mirroring_swaps_channel_figures():
    # the same board with the channels' placements exchanged: left is now the mirrored copy
    a = load_text(SYMMETRIC, "s.gplan")
    b = load_text(
        SYMMETRIC.replace(
            "place ch as left at 0,0\nplace ch as right at 0,200, mirror",
            "place ch as left at 0,200, mirror\nplace ch as right at 0,0",
        ),
        "s.gplan",
    )
    ra, rb = analyze(a), analyze(b)
    la, ra_ = ra.hum.channels["left"], ra.hum.channels["right"]
    lb, rb_ = rb.hum.channels["left"], rb.hum.channels["right"]
    # the field source off the symmetry line makes the channels differ at the mains frequency
    assert la.spectrum[0].volts != pytest.approx(ra_.spectrum[0].volts, rel=1e-2)
    for x, y in ((lb, ra_), (rb_, la)):
        assert x.total_v == pytest.approx(y.total_v, rel=1e-9)
        for u, v in zip(x.spectrum, y.spectrum):
            assert u.volts == pytest.approx(v.volts, rel=1e-9, abs=1e-15)


def _rename(p, fn):
    def r(x):
        return None if x is None else fn(x)

    metals = {m.name for m in p.metals}
    return replace(
        p,
        points=tuple(replace(x, name=r(x.name), on=x.on) for x in p.points),
        conductors=tuple(
            replace(
                c, a=r(c.a) if c.a not in metals else c.a, b=r(c.b) if c.b not in metals else c.b
            )
            for c in p.conductors
        ),
        rectifiers=tuple(
            replace(x, a=r(x.a), b=r(x.b), filter_point=r(x.filter_point)) for x in p.rectifiers
        ),
        currents=tuple(replace(x, a=r(x.a), b=r(x.b)) for x in p.currents),
        stages=tuple(replace(x, a=r(x.a), b=r(x.b)) for x in p.stages),
        heaters=tuple(replace(x, a=r(x.a), b=r(x.b), reference=r(x.reference)) for x in p.heaters),
    )


@pytest.mark.parametrize("path", EXAMPLES, ids=[e.name for e in EXAMPLES])
def test_renaming_points_changes_no_figure(path):
    p = load(path)
    keep = {"mains.pe"}
    q = _rename(p, lambda n: n if n in keep else "zz_" + n[::-1])
    r1, r2 = analyze(p), analyze(q)
    for ch in r1.hum.channels:
        assert r2.hum.channels[ch].total_v == pytest.approx(r1.hum.channels[ch].total_v, rel=1e-9)
    s1, s2 = protective_figures(p), protective_figures(q)
    for a, b in zip(s1.parts, s2.parts):
        assert b.path_resistance == pytest.approx(a.path_resistance, rel=1e-12)
    assert r1.loop_total == r2.loop_total
    assert sorted(lp.closed_by for lp in r1.loops) == sorted(lp.closed_by for lp in r2.loops)
    assert sorted(f.code for f in r1.findings) == sorted(f.code for f in r2.findings)


@settings(max_examples=30, deadline=None)
@given(
    st.floats(0.01, 5.0),
    st.sampled_from(["0.5 mm2", "1 mm2", "2.5 mm2", "18 AWG"]),
    st.sampled_from(["pe_stud", "mains.pe"]),
)
def test_parallel_conductor_never_raises_protective_resistance(length, area, start):
    base = """
metal deck: aluminium 2 mm, 300 x 200 mm, touchable
metal cover: steel 1 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,180 on deck
point far: stud, at 280,20 on deck
wire pe_lead: mains.pe to pe_stud, 80 mm, 1.0 mm2, protective
bolt pb: pe_stud to deck
bolt fb: far to deck
bolt cs: cover to deck, contact 3 mohm, protective
"""
    hdr = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2\n'
    before = {
        p.part: p.path_resistance for p in protective_figures(plan(hdr + base, header=False)).parts
    }
    extra = f"wire px: {start} to far, {length} m, {area}, protective\n"
    after = {
        p.part: p.path_resistance
        for p in protective_figures(plan(hdr + base + extra, header=False)).parts
    }
    for part, r in before.items():
        assert after[part] <= r * (1 + 1e-12)


# --- crashes found by fuzzing, kept as regression tests ------------------------------------------


def test_regression_point_on_a_broken_metal_part():
    # a misspelt attribute broke the metal statement; a point placed on it crashed the loader
    # (KeyError)
    text = (
        'plan "fuzz"\nmetal deck:luminium 2 mm, 300 x 200 mm, touchable\npoint a: stud, at '
        "0,0 "
        "on deck\n"
    )
    with pytest.raises(PlanErrors) as e:
        load_text(text, "fuzz.gplan")
    assert len(e.value.errors) == 1 and "unknown attribute 'luminium'" in str(e.value)


# --- the extreme-value grid and token mutants, sampled (the full runs:
# benchmarks/fuzz_campaign.py) ------------


def _survives(text: str, name: str, root=None) -> None:
    """A plan ends in a result with finite figures or in located errors; nothing else."""
    try:
        out = render_json(analyze(load_text(text, name, root=root)))
    except PlanErrors as e:
        assert all(": error: " in err.one_line() and err.location.line >= 1 for err in e.errors)
        return
    assert "NaN" not in out and "Infinity" not in out


FUZZED = [*EXAMPLES, ROOT / "tests" / "plans" / "every-statement.gplan"]

#: cases of each family sampled per plan, with fixed seeds: the full grid and 5,000 mutants a plan
#: run in benchmarks/fuzz_campaign.py (none failed there; benchmarks/README.md)
SAMPLED = 60


@pytest.mark.parametrize("path", FUZZED, ids=[e.name for e in FUZZED])
def test_extreme_values_in_place_of_numbers_sampled(path):
    import random
    from planfuzz import extreme_variants

    cases = list(extreme_variants(path.read_text()))
    for _desc, text in random.Random(11).sample(cases, SAMPLED):
        _survives(text, path.name)


@pytest.mark.parametrize("path", FUZZED, ids=[e.name for e in FUZZED])
def test_token_mutants_sampled(path):
    from planfuzz import token_mutants

    for text in token_mutants(path.read_text(), SAMPLED, seed=3):
        _survives(text, path.name)


#: an installation with device plans of its own (found beside it), sampled more lightly: each case
#: places them
ROOM = ROOT / "examples" / "studio" / "recording-room.gplan"


def test_an_installations_extreme_values_and_token_mutants_sampled():
    import random
    from planfuzz import extreme_variants, token_mutants

    text = ROOM.read_text()
    cases = [t for _d, t in random.Random(13).sample(list(extreme_variants(text)), 40)]
    for t in cases + list(token_mutants(text, 40, seed=17)):
        _survives(t, str(ROOM), ROOM.parent)

"""An outside technician's repair bench in a rural workshop on TT (tests/field/workshop-variac-tt,
copied as written, his variants in variants/): a 1970s-style valve guitar head under repair behind
an earthed variable autotransformer on the bench strip (a worn cord's earth core, the earth under
a transformer bolt, a glass fuse, the reservoir's return on the preamp bus, the input jack bolted
and wired, a floating heater), a signal generator and a scope on screened leads, a dummy load;
a 210 Ω rod behind an old 300 mA RCD.

His verdict: the worn earth core and the transformer bolt first (a new cord, an earth stud of its
own); a 30 mA RCD for the bench; the return to the centre tap and the jack insulated; the scope on
the bench strip; never an earth lifted, never a test instrument behind the variac."""

from pathlib import Path

import pytest

from groundcheck import load
from groundcheck.advice.compare import compare
from groundcheck.advice.repair import advise
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).parent / "field" / "workshop-variac-tt"
BENCH, VARIANTS = FIELD / "workshop-bench.gplan", FIELD / "variants"
QUICK = Options(hum=False)


def _head(r, code):
    return [f for f in r.findings if f.code == code and f.elements[0].startswith("head.")]


def test_the_head_behind_the_variac_is_checked_on_the_buildings_supply():
    # an earth fault behind an autotransformer flows out on the building's line and back through
    # the protective conductors: the building's RCD sees it, the loop runs through the variac's
    # cord. His hand figures (verdict.md): 230 V / 212.3 Ω ≈ 1.08 A, 228 V on the chassis
    r = analyze(load(BENCH), QUICK)
    head = next(d for d in r.device_earths if d.device == "head")
    assert head.fault is not None
    assert head.fault.fault_current == pytest.approx(1.08, rel=0.01)
    assert head.fault.touch_voltage == pytest.approx(228, rel=0.01)
    (gc220,) = [f for f in r.findings if f.code == "GC220" and f.elements[0] == "supply"]
    assert all("variac.cord" in f.message for f in _head(r, "GC202"))
    # the 300 mA RCD at the origin: his GC220 (63 V) and GC225, at the supply
    assert gc220.figures["electrode_times_rcd_v"] == pytest.approx(63.0)
    # the fix: a 30 mA RCD first (also the additional protection), the electrode target rounded
    # down to two figures (50 V / 0.3 A = 166.7 → 160 Ω), as suggest says it
    assert gc220.fix.startswith("protect the circuit with a 30 mA RCD")
    assert "at most 160 Ω" in gc220.fix


def test_with_a_30_ma_rcd_no_stale_rcd_of_the_heads_own_plan_is_counted():
    # his variant: the supply's RCD 30 mA; the head's own plan still says 300 mA. Behind the
    # variac as plugged straight in: no GC220 for the head (210 Ω × 30 mA = 6.3 V)
    for name in ("ws-rcd30.gplan", "ws-rcd30-novariac.gplan"):
        r = analyze(load(VARIANTS / name), QUICK)
        assert not [f for f in r.findings if f.code == "GC220"], name
        # the long bonding test at the building's 16 A breaker, wherever the head is plugged in
        assert any("32 A for 120 s" in f.message for f in _head(r, "GC223")), name


def test_the_advice_keeps_test_instruments_off_the_variac_and_insulates_the_jack():
    plan, text = load(BENCH), BENCH.read_text()
    _, evs, chosen, final = advise(plan, text, Options(), FIELD.resolve(), BENCH.resolve())
    titles = [e.candidate.title for e in evs if not e.rejected]
    assert not [t for t in titles if t.startswith("plug") and " at variac" in t]
    assert any(t.startswith("plug scope in at bench_strip") for t in titles)
    taken = [e.candidate.title for e in chosen]
    # his first fix, the head's earth (its core thicker: the short and the long bonding test are
    # two dangers, with the thin-wire one three), then the installation's 30 mA RCD
    assert taken[0].startswith("use 1.5 mm²") and "head.pe_core" in taken[0]
    assert taken[1].startswith("have the installation's outlets protected by a 30 mA RCD")
    assert any(t.startswith("insulate head.in_nut") for t in taken)
    assert not [f for f in final.findings if f.severity == "danger"]
    assert not [
        e
        for e in chosen
        if e.candidate.touches_protective
        and e.candidate.action in ("lift-network", "device-lift", "throw")
    ]


def test_his_earth_stud_keeps_the_bench_loops_as_they_were():
    # the earth moved from the transformer bolt to a stud of its own renames a fastening on the
    # loops through the protective earth: the same loops, kept, none introduced
    d = compare(
        analyze(load(BENCH), QUICK), analyze(load(VARIANTS / "workshop-fix1.gplan"), QUICK)
    )
    assert d["findings"]["introduced"] == []
    assert {f["code"] for f in d["findings"]["fixed"]} == {"GC202", "GC204", "GC223"}
    assert d["loops"]["removed"] == [] and d["loops"]["added"] == []

"""Properties of the repair advisor over generated plans: no suggestion it offers ever removes,
thins or lifts a conductor that is protective by topology (on the route from the inlet's earth
terminal to the metal) or by role, whatever role the plan gives it; only an answer to a
protective-earth finding (a stud of its own) may move one of its ends, and the conductor stays on
the protective route."""

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import pytest

from groundcheck import load_text
from groundcheck.rules.catalogue import RULES
from groundcheck.rules.rule_families import PROTECTIVE_EARTH
from groundcheck.advice.edits import apply_edits
from groundcheck.advice.fixes import NONE_ACCEPTED, SHOWN_BY_SUGGEST, advised_fixes, identity
from groundcheck.advice.repair import HUM_FLOOR_DBV, greedy, suggest
from groundcheck.analysis import Options, analyze
from groundcheck.core.units import dbv

OPTIONS = Options(max_frequency=1000.0)


#: the supply the generated chassis is plugged into: TN-S by default, a TT supply on its electrode
#: with or without an RCD, a long fault loop (so that the protective-earth dangers an installation-
#: side
#: change answers occur: GC208, GC220, GC221)
SUPPLIES = st.sampled_from(
    [
        "",
        "",
        ", system TT, electrode 200 ohm",
        ", system TT, electrode 200 ohm, rcd 300 mA",
        ", system TT, electrode 40 ohm, rcd 30 mA",
        ", loop-impedance 30 ohm",
    ]
)


@st.composite
def chassis_plans(draw):
    role = st.sampled_from(["", ", protective", ", signal", ", return", ", bond"])
    area = st.sampled_from(["0.5 mm2", "0.75 mm2", "1 mm2", "18 AWG"])
    lines = [
        'plan "generated chassis"',
        f"mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2{draw(SUPPLIES)}, inlet at "
        "10,100",
        "metal deck: steel 1 mm, 300 x 200 mm, touchable",
        f"point pe_stud: stud, at {draw(st.integers(15, 60))},{draw(st.integers(110, 190))} on "
        "deck",
        f"wire pe_lead: mains.pe to pe_stud, {draw(st.integers(30, 120))} mm, "
        f"{draw(area)}{draw(role)}{draw(st.sampled_from(['', '  # green-yellow, crimped']))}",
        "bolt pe_nut: pe_stud to deck",
        f"point star: star, at {draw(st.integers(100, 200))},{draw(st.integers(50, 150))} on deck",
        "point sleeve: sleeve, at 290,40 on deck",
        "point k: pad, at 220,60 on deck",
        f"wire in_gnd: sleeve to star, 150 mm, 0.5 mm2{draw(role)}",
        "wire k_gnd: k to star, 60 mm, 0.5 mm2, signal",
        "stage v1: sleeve to k, gain 30 dB, channel main",
    ]
    if draw(st.booleans()):
        lines.append("bolt sleeve_nut: sleeve to deck")  # an uninsulated input socket
    bond_to = draw(st.sampled_from(["pe_stud", "bond_stud"]))
    if bond_to == "bond_stud":
        lines += ["point bond_stud: stud, at 80,150 on deck", "bolt bond_nut: bond_stud to deck"]
    lines.append(f"wire star_bond: star to {bond_to}, 120 mm, 0.75 mm2{draw(role)}")
    if draw(st.booleans()):  # a second protective path
        lines += [
            "metal panel: aluminium 2 mm, 300 x 80 mm, touchable",
            "point panel_stud: stud, at 150,20 on panel",
            "bolt panel_nut: panel_stud to panel",
            f"wire panel_bond: pe_stud to panel_stud, 200 mm, {draw(area)}{draw(role)}",
        ]
        if draw(st.booleans()):
            lines.append(
                f"wire panel_bond2: mains.pe to panel_stud, 250 mm, {draw(area)}{draw(role)}"
            )
    if draw(st.booleans()):
        lines += [
            "point res_neg: cap, at 60,60 on deck",
            "point ct: centre-tap, at 40,40 on deck",
            f"wire ct_lead: ct to {draw(st.sampled_from(['star', 'res_neg']))}, 80 mm, 0.5 mm2, "
            "return",
            "wire sup_gnd: res_neg to star, 100 mm, 0.75 mm2, return",
            "rectifier hv: res_neg to ct, full-wave, secondary 250 V, winding 100 ohm, reservoir "
            "47 uF, load 20 mA",
            "field ptx: transformer, at 50,50, 40 uT at 5 cm",
        ]
    return "\n".join(lines) + "\n"


def _shape(c):
    return (frozenset((c.a, c.b)), c.kind, c.area or 0.0, c.resistance)


@settings(
    max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow], derandomize=True
)
@given(chassis_plans())
def test_no_suggestion_changes_a_protective_conductor(text):
    plan = load_text(text, "generated.gplan")
    before, evs = suggest(plan, text, Options(max_frequency=1000.0))
    protective = {
        c.name: c for c in plan.conductors if c.name in before.protective or c.role == "protective"
    }
    assert "pe_lead" in protective  # protective by topology, whatever its written role
    for ev in evs:
        if ev.rejected:
            continue
        after = {c.name: c for c in ev.result.plan.conductors}
        for name, c in protective.items():
            assert name in after, (ev.candidate.title, name)
            new = after[name]
            assert new.kind == c.kind and (new.area or 0.0) >= (c.area or 0.0), ev.candidate.title
            if frozenset((new.a, new.b)) != frozenset((c.a, c.b)):
                pe_fix = RULES[ev.candidate.reason].family == PROTECTIVE_EARTH
                assert pe_fix and name in ev.result.protective, ev.candidate.title


# --- issue 29, item 7: the advisor's four promises over generated plans --------------------------


def _wired_neighbours(plan, point: str) -> set[str]:
    """The points wired to ``point`` by a conductor that joins two points (not a fastening to
    metal, not the mains earth): worked from the plan's records, independently of the advisor's own
    guard."""
    metals = {m.name for m in plan.metals}
    out = set()
    for c in plan.conductors:
        if point in (c.a, c.b) and not ({c.a, c.b} & metals) and "mains.pe" not in (c.a, c.b):
            out.add(c.b if c.a == point else c.a)
    return out


def _guarded(plan) -> set[str]:
    return {p.name for p in plan.points if p.kind in ("sleeve", "jack")} | {
        e for s in plan.stages for e in (s.a, s.b)
    }


def _fresh(text: str):
    return analyze(load_text(text, "generated.gplan"), OPTIONS)


def _hum(r) -> dict:
    return {
        ch: max(HUM_FLOOR_DBV, dbv(h.total_v))
        for ch, h in (r.hum.channels.items() if r.hum else ())
    }


def _protective_kept(ev, protective: dict, comments: dict) -> None:
    """Promise 1: a protective conductor is never removed, thinned, lifted or re-kinded; only
    GC202's own-stud fix moves one end, and the wire stays on the protective route, its comment
    kept, written protective."""
    after = {c.name: c for c in ev.result.plan.conductors}
    edited = "\n".join(e.new or "" for e in ev.candidate.edits)
    for name, c in protective.items():
        assert name in after, (ev.candidate.title, name)
        new = after[name]
        assert new.kind == c.kind and (new.area or 0.0) >= (c.area or 0.0), ev.candidate.title
        if frozenset((new.a, new.b)) != frozenset((c.a, c.b)):
            assert ev.candidate.action == "own-stud" and name in ev.result.protective, (
                ev.candidate.title
            )
            assert new.role == "protective", ev.candidate.title
            if comments.get(name):
                assert comments[name] in edited, ev.candidate.title


def _returns_kept(plan, ev) -> None:
    """Promise 2: a socket or stage end wired to another point before a change is wired to one
    after it."""
    for p in _guarded(plan):
        if _wired_neighbours(plan, p):
            assert _wired_neighbours(ev.result.plan, p), (ev.candidate.title, p)


def _predicted_is_fresh(text: str, before, ev) -> None:
    """Promise 3: the predicted hum and findings equal a fresh check of the applied plan, to
    1e-9."""
    fresh = _fresh(apply_edits(text, ev.candidate.edits))
    hum = _hum(fresh)
    for ch, v in ev.hum_after_dbv.items():
        assert abs(hum.get(ch, HUM_FLOOR_DBV) - v) <= 1e-9, (ev.candidate.title, ch)
    for ch, d in ev.hum_change_db.items():
        assert abs((hum.get(ch, HUM_FLOOR_DBV) - ev.hum_before_dbv[ch]) - d) <= 1e-9, (
            ev.candidate.title
        )
    k0 = {identity(f) for f in before.open_findings()}
    k1 = {identity(f) for f in fresh.open_findings()}
    assert ev.cleared_keys == k0 - k1, ev.candidate.title
    assert len(ev.introduced) == len(k1 - k0), ev.candidate.title
    if fresh.safety is not None:
        assert {p.part: p.path_resistance for p in fresh.safety.parts} == {
            p.part: p.path_resistance for p in ev.result.safety.parts
        }


def _fix_lines_agree(before, evs) -> None:
    """Promise 4: every fix line names an accepted candidate that clears its finding, or says that
    none was accepted, or (no candidate was made for it) is the rule's own text, which no rejected
    candidate is."""
    accepted = {ev.candidate.title: ev for ev in evs if not ev.rejected}
    refused = {ev.candidate.title for ev in evs if ev.rejected}
    for f, line in zip(before.findings, advised_fixes(before, evs)):
        if line.endswith(SHOWN_BY_SUGGEST):
            ev = accepted.get(line[: -len(SHOWN_BY_SUGGEST)])
            assert ev is not None and identity(f) in ev.cleared_keys, (f.code, line)
        elif not line.startswith(NONE_ACCEPTED):
            assert line == f.fix and line not in refused, (f.code, line)


def advisor_promises(text: str) -> None:
    """The four promises of issue 29 (item 7) on one plan; also run by benchmarks/fuzz_campaign.py
    --advice."""
    plan = load_text(text, "generated.gplan")
    before, evs = suggest(plan, text, OPTIONS)
    protective = {
        c.name: c for c in plan.conductors if c.name in before.protective or c.role == "protective"
    }
    comments = {"pe_lead": "# green-yellow, crimped" if "# green-yellow" in text else ""}
    for ev in evs:
        if ev.rejected:
            continue
        _protective_kept(ev, protective, comments)
        _returns_kept(plan, ev)
        _predicted_is_fresh(text, before, ev)
    _fix_lines_agree(before, evs)
    chosen, after, new_text = greedy(plan, text, OPTIONS, evs=evs, before=before)
    if chosen:
        assert _hum(_fresh(new_text)) == pytest.approx(_hum(after), abs=1e-9)
        assert {identity(f) for f in _fresh(new_text).open_findings()} == {
            identity(f) for f in after.open_findings()
        }


@settings(
    max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow], derandomize=True
)
@given(chassis_plans())
def test_the_advisors_promises_hold_on_generated_plans(text):
    advisor_promises(text)

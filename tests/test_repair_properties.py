"""A property of the repair advisor over generated plans: no suggestion it offers ever removes, thins or lifts
a conductor that is protective by topology (on the route from the inlet's earth terminal to the metal) or by
role, whatever role the plan gives it; only an answer to a protective-earth finding (a stud of its own) may move
one of its ends, and the conductor stays on the protective route."""

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from groundcheck import load_text
from groundcheck.analysis import Options
from groundcheck.advice.repair import suggest
from groundcheck.rules.catalogue import RULES
from groundcheck.rules.rule_families import PROTECTIVE_EARTH


@st.composite
def chassis_plans(draw):
    role = st.sampled_from(["", ", protective", ", signal", ", return", ", bond"])
    area = st.sampled_from(["0.5 mm2", "0.75 mm2", "1 mm2", "18 AWG"])
    lines = ['plan "generated chassis"',
             "mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2, inlet at 10,100",
             "metal deck: steel 1 mm, 300 x 200 mm, touchable",
             f"point pe_stud: stud, at {draw(st.integers(15, 60))},{draw(st.integers(110, 190))} on deck",
             f"wire pe_lead: mains.pe to pe_stud, {draw(st.integers(30, 120))} mm, {draw(area)}{draw(role)}",
             "bolt pe_nut: pe_stud to deck",
             f"point star: star, at {draw(st.integers(100, 200))},{draw(st.integers(50, 150))} on deck",
             "point sleeve: sleeve, at 290,40 on deck",
             "point k: pad, at 220,60 on deck",
             f"wire in_gnd: sleeve to star, 150 mm, 0.5 mm2{draw(role)}",
             "wire k_gnd: k to star, 60 mm, 0.5 mm2, signal",
             "stage v1: sleeve to k, gain 30 dB, channel main"]
    if draw(st.booleans()):
        lines.append("bolt sleeve_nut: sleeve to deck")                      # an uninsulated input socket
    bond_to = draw(st.sampled_from(["pe_stud", "bond_stud"]))
    if bond_to == "bond_stud":
        lines += ["point bond_stud: stud, at 80,150 on deck", "bolt bond_nut: bond_stud to deck"]
    lines.append(f"wire star_bond: star to {bond_to}, 120 mm, 0.75 mm2{draw(role)}")
    if draw(st.booleans()):                                                    # a second protective path
        lines += ["metal panel: aluminium 2 mm, 300 x 80 mm, touchable",
                  "point panel_stud: stud, at 150,20 on panel", "bolt panel_nut: panel_stud to panel",
                  f"wire panel_bond: pe_stud to panel_stud, 200 mm, {draw(area)}{draw(role)}"]
        if draw(st.booleans()):
            lines.append(f"wire panel_bond2: mains.pe to panel_stud, 250 mm, {draw(area)}{draw(role)}")
    if draw(st.booleans()):
        lines += ["point res_neg: cap, at 60,60 on deck", "point ct: centre-tap, at 40,40 on deck",
                  f"wire ct_lead: ct to {draw(st.sampled_from(['star', 'res_neg']))}, 80 mm, 0.5 mm2, return",
                  "wire sup_gnd: res_neg to star, 100 mm, 0.75 mm2, return",
                  "rectifier hv: res_neg to ct, full-wave, secondary 250 V, winding 100 ohm, reservoir 47 uF, "
                  "load 20 mA",
                  "field ptx: transformer, at 50,50, 40 uT at 5 cm"]
    return "\n".join(lines) + "\n"


def _shape(c):
    return (frozenset((c.a, c.b)), c.kind, c.area or 0.0, c.resistance)


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow], derandomize=True)
@given(chassis_plans())
def test_no_suggestion_changes_a_protective_conductor(text):
    plan = load_text(text, "generated.gplan")
    before, evs = suggest(plan, text, Options(max_frequency=1000.0))
    protective = {c.name: c for c in plan.conductors if c.name in before.protective or c.role == "protective"}
    assert "pe_lead" in protective                            # protective by topology, whatever its written role
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

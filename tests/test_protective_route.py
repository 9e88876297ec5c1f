"""Which conductors the protective route holds: every one that a fault current to some metal part
has to pass, never a ring that hangs off one part (IEC 60364-5-54's protective conductors are the
ones a part's earth depends on)."""

from groundcheck.analysis import Options, analyze
from groundcheck.rules.context import AuditContext

from helpers import plan

SOCKETS = """
metal deck: aluminium 2 mm, 400 x 280 mm, touchable
point pe_stud: stud, at 20,250 on deck
wire pe_lead: mains.pe to pe_stud, 40 mm, 1 mm2, protective
bolt pe_nut: pe_stud to deck
point star: star, at 200,150
point in1: sleeve, at 40,270 on deck
point in2: sleeve, at 60,270 on deck
bolt in1_nut: in1 to deck
bolt in2_nut: in2 to deck
wire link: in1 to in2, 20 mm, 0.5 mm2
wire in_gnd: in1 to star, 120 mm, 0.5 mm2
point sig_stud: stud, at 220,150 on deck
bolt sig_nut: sig_stud to deck
wire star_bond: star to sig_stud, 20 mm, 0.5 mm2
point g1: pad, at 200,120
wire g1_gnd: g1 to star, 30 mm, 0.5 mm2
stage v1: g1 to star, gain 30 dB
"""


def test_a_wire_between_two_sockets_on_one_panel_is_no_protective_conductor():
    # an outside builder's phono jumper between two nutted sleeves had been called a protective
    # conductor (0.5 mm² thinner than the line, needing 7 mm² to survive a fault): every way from
    # the inlet to the deck runs through the deck itself, never through the jumper
    p = plan(SOCKETS)
    route = AuditContext(p).route.conductors
    assert "pe_lead" in route and "link" not in route and "in2_nut" not in route
    r = analyze(p, Options(hum=False))
    assert not [
        f for f in r.findings if f.code in ("GC204", "GC207", "GC209") and "link" in f.elements
    ]


def test_a_wire_that_joins_two_parts_stays_on_the_route():
    # the same jumper with its second socket on a lid of its own: the lid's earth depends on it
    p = plan(
        SOCKETS.replace(
            "point in2: sleeve, at 60,270 on deck", "point in2: sleeve, at 60,270 on lid"
        ).replace("bolt in2_nut: in2 to deck", "bolt in2_nut: in2 to lid")
        + "metal lid: aluminium 1 mm, 400 x 280 mm, touchable\n"
    )
    assert {"link", "in2_nut"} <= AuditContext(p).route.conductors


def test_a_ground_plane_written_signal_only_holds_no_protective_conductor():
    # an outside builder's board: a copper plane screwed to the case at its standoffs; written as
    # plain metal its standoffs were protective conductors (a heater return "written as return but
    # carrying the protective earth"); written signal-only they are the signal ground's bonds
    text = SOCKETS + (
        "metal plane: copper 0.035 mm, 120 x 80 mm, at 150,100, signal-only\n"
        "bolt mh1: plane to deck, via 160,110\nbolt mh2: plane to deck, via 260,170\n"
    )
    route = AuditContext(plan(text)).route.conductors
    assert not {"mh1", "mh2"} & route and "pe_lead" in route

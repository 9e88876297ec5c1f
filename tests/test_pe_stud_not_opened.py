"""A supply return wrongly landed on the protective-earth stud stops the protective route at the
stud (a signal point), but the stud's own fastening to the metal still earths it: a loop through it
is never told to insulate that fastening (found by the statement-order property on a generated
plan)."""

from groundcheck import analyze, load_text

PLAN = """plan "return on the earth stud"
mains 230 V 50 Hz, fuse 1 A slow, line-conductor 0.75 mm2, cord 2 m 0.75 mm2, inlet at 60,8
metal base: aluminium 2 mm, 120 x 60 mm, touchable
point pe: stud, at 60,4 on base
wire pe_lead: mains.pe to pe, 25 mm, 1 mm2, protective
bolt pe_nut: pe to base
point supply: cap, at 60,14 on base
wire supply_lead: supply to pe, 20 mm, 0.75 mm2, return
current ripple: supply to pe, 20.0 mA 100 Hz
point n0: star, at 64,4 on base
point n1: pad, at 64,6 on base
bolt x_nut: n0 to base
wire w0: n1 to n0, 3 mm, 0.5 mm2, signal
stage v1: n0 to n1, gain 0 dB
wire link: n0 to supply, 12 mm, 0.75 mm2, signal
"""


def test_the_earth_studs_fastening_is_never_the_loop_to_open():
    r = analyze(load_text(PLAN, "stud.gplan"))
    loops = [f for f in r.findings if f.code == "GC101"]
    assert loops
    for f in loops:
        assert "pe_nut" not in {a[1] for a in f.actions} and "insulate pe_nut" not in f.fix
    assert any(f.code == "GC202" for f in r.findings)  # the shared stud itself is reported

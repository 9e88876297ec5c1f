"""The signal's own return: a stage's input reference (stated or inferred), a return through
chassis metal (GC114) and a channel's own output current in its input ground (GC306, feedback
through the ground).

Figures are worked by hand (Ohm's law on wires of stated resistance) or by ngspice on the
exported netlist."""

import math
from pathlib import Path

import pytest

import spicetools
from groundcheck import load
from groundcheck.analysis import analyze
from groundcheck.physics.circuit import build_circuit
from groundcheck.renderers.spice import to_spice

from helpers import EXAMPLES, needs_ngspice, plan

FIELD = Path(__file__).resolve().parent / "field"
DUAL_MONO = FIELD / "dual-mono-class-ab" / "plan.gplan"

# a return current of 10 mA at 100 Hz crosses the input's own ground wire (sleeve -> pad, 20 mohm
# stated); the stage's first point is the pad, so only its reference, the sleeve, puts the drop in
# its input
INPUT = """
listening output 1 V
point sleeve: sleeve
point pad: pad
point k: pad
point star: star
point src: pad
wire in_gnd: sleeve to pad, 10 mm, resistance 20 mohm
wire pad_gnd: pad to star, 10 mm, resistance 5 mohm
wire k_gnd: k to star, 10 mm, resistance 5 mohm
wire src_w: src to sleeve, 10 mm, resistance 5 mohm
current ret: src to pad, 10 mA 100 Hz, return
"""
HAND = 0.010 * 0.020 * 100  # 10 mA x 20 mohm x 40 dB (100), by hand: 20 mV at the output


def _hum_v(text):
    r = analyze(plan(text))
    return r.hum.channels["main"].total_v, r


def test_a_stated_reference_puts_the_sleeve_to_pad_drop_in_the_input():
    v, r = _hum_v(INPUT + "stage v1: pad to k, gain 40 dB, reference sleeve\n")
    assert v == pytest.approx(HAND, rel=1e-6)
    (st,) = r.plan.stages
    assert (st.a, st.b, st.named, st.reference) == ("sleeve", "k", "pad", "sleeve")
    # the pair as written reads no current: pad and k are both wired to the star by quiet wires
    v0, _ = _hum_v(INPUT + "stage v1: pad to k, gain 40 dB, reference pad\n")
    assert v0 < 1e-12


def test_the_reference_is_inferred_when_one_socket_is_wired_to_the_stage_in_its_block():
    body = INPUT.replace("listening output 1 V\n", "")
    text = (
        "listening output 1 V\nblock ch {\n" + body + "stage v1: pad to k, gain 40 dB\n}\n"
        "place ch as left at 0,0\n"
    )
    r = analyze(plan(text))
    (st,) = r.plan.stages
    assert (st.a, st.named) == ("left.sleeve", "left.pad")
    assert r.hum.channels["left"].total_v == pytest.approx(HAND, rel=1e-6)


def test_no_inference_when_it_is_ambiguous():
    # a second socket wired to the pad: which is the input's? The pair stays as written
    v, r = _hum_v(
        INPUT + "point other: jack\nwire o: other to pad, 10 mm, resistance 5 mohm\n"
        "stage v1: pad to k, gain 40 dB\n"
    )
    assert r.plan.stages[0].a == "pad" and v < 1e-12
    # the socket is another stage's point: not a free reference either
    _, r = _hum_v(INPUT + "stage v1: pad to k, gain 40 dB\nstage v0: sleeve to star, gain 0 dB\n")
    assert [s.a for s in r.plan.stages] == ["pad", "sleeve"]


def test_every_example_keeps_its_stage_pairs():
    for path in EXAMPLES:
        p = load(path)
        assert all(s.named is None for s in p.stages), path.name


@pytest.mark.parametrize(
    "stage,message",
    [
        ("stage v1: pad to k, gain 40 dB, reference nowhere", "undefined point 'nowhere'"),
        ("stage v1: pad to k, gain 40 dB, reference k", "its reference is its own second point"),
        ("stage v1: pad to k, gain 40 dB, reference", "expected the input's reference point"),
    ],
)
def test_bad_references_are_located_errors(cli, tmp_path, stage, message):
    f = tmp_path / "bad.gplan"
    head = 'plan "t"\nmains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2\n'
    f.write_text(head + INPUT + stage + "\n")
    code, _, err = cli("check", str(f))
    assert code == 2 and message in err and "bad.gplan:" in err and "Traceback" not in err


# --- GC114: a return through chassis metal ---------------------------------------------------

CHASSIS = """
metal deck: aluminium 2 mm, 300 x 200 mm, touchable
point pe_stud: stud, at 20,180 on deck
wire pe_lead: mains.pe to pe_stud, 50 mm, 1.0 mm2, protective
bolt pe_bolt: pe_stud to deck
point gnd: stud, at 60,180 on deck
bolt gnd_bolt: gnd to deck
point star: star, at 150,100 on deck
point sleeve: sleeve, at 290,50 on deck
point k: pad, at 200,60 on deck
bolt jack_nut: sleeve to deck
wire k_gnd: k to star, 60 mm, 0.5 mm2, signal
wire bond: star to gnd, 120 mm, 0.75 mm2, signal
stage v1: sleeve to k, gain 30 dB
"""


def test_a_socket_grounded_only_by_its_fastening_is_gc114():
    (f,) = [f for f in analyze(plan(CHASSIS)).findings if f.code == "GC114"]
    assert f.severity == "warning" and "jack_nut" in f.elements and "deck" in f.message
    assert f.actions == (("join", "sleeve", "k"), ("insulate", "jack_nut"))
    assert "insulate sleeve" in f.fix and "wire sleeve to k" in f.fix
    # near miss: the socket also wired to the star (GC105's second bond, no return through metal)
    wired = CHASSIS + "wire in_gnd: sleeve to star, 150 mm, 0.5 mm2, signal\n"
    assert not [f for f in analyze(plan(wired)).findings if f.code == "GC114"]


def test_gc114_names_the_input_ground_a_stage_wrote_when_its_reference_is_inferred():
    text = CHASSIS.replace(
        "stage v1: sleeve to k",
        "point pot: pot, at 250,50\nshield lead: sleeve to pot, 40 mm, 0.1 mm2, terminated "
        "sleeve\nwire pot_gnd: pot to star, 100 mm, 0.5 mm2, signal\nstage v1: pot to k",
    )
    (f,) = [f for f in analyze(plan(text)).findings if f.code == "GC114"]
    assert "wire sleeve to pot" in f.fix and ("join", "sleeve", "pot") in f.actions


# --- GC306: a channel's own output current in its input ground -------------------------------

AMP = """
listening output 20 V
point sleeve: sleeve
point in_pad: pad
point star: star
point spk: terminal
point fb: pad
wire sock_gnd: sleeve to in_pad, 10 mm, resistance 10 mohm
wire in_gnd: in_pad to star, 10 mm, resistance 5 mohm
wire fb_lead: fb to star, 10 mm, resistance 1 mohm
wire spk_ret: spk to in_pad, 10 mm, resistance 2 mohm
current spk_i: spk to star, 2 A 1 kHz, signal, channel amp
stage inp: sleeve to fb, gain 26 dB, channel amp
stage outp: fb to spk, gain 0 dB, channel amp
"""


def _feedback(text):
    r = analyze(plan(text))
    return r, [f for f in r.findings if f.code == "GC306"]


def _db(v, rated):
    return 20 * math.log10(v / rated)


def test_a_speaker_return_on_the_input_ground_is_a_fault_by_hand():
    r, (f,) = _feedback(AMP)
    # by hand: 2 A through in_gnd (5 mohm) puts 10 mV on in_pad, and so on the sleeve (sock_gnd
    # carries nothing); fb sits at the star. spk is 10 mV + 2 A x 2 mohm = 14 mV. inp reads
    # +10 mV x 10^(26/20), outp reads -14 mV x 1; against the 20 V rated output
    g = 10 ** (26 / 20)
    total, ahead = 0.010 * g - 0.014, 0.010 * g
    assert f.severity == "fault" and f.elements == ("spk_ret", "spk_i")
    assert f.figures["feedback_db"] == pytest.approx(_db(total, 20), abs=0.01)
    assert f.figures["input_db"] == pytest.approx(_db(ahead, 20), abs=0.01)
    assert f.actions == (("reroute", "spk_ret", "star"),)
    row = next(x for x in r.hum.feedback if x.frequency == 1000.0)
    assert row.volts == pytest.approx(total, rel=1e-6)
    assert row.input_volts == pytest.approx(ahead, rel=1e-6)


def test_a_small_ground_feedback_is_a_note_and_its_own_return_none():
    # in_gnd of 0.05 mohm: 2 A x 0.05 mohm x 19.95 / 20 V = 1.0e-4, -80 dB: a note
    _, (f,) = _feedback(AMP.replace("resistance 5 mohm", "resistance 0.05 mohm"))
    assert f.severity == "note"
    assert f.figures["input_db"] == pytest.approx(_db(2 * 0.05e-3 * 10 ** (26 / 20), 20), abs=0.01)
    # the speaker return on a wire of its own to the star: the input reads none of it
    _, found = _feedback(AMP.replace("wire spk_ret: spk to in_pad", "wire spk_ret: spk to star"))
    assert found == []


def test_the_headphone_example_feeds_its_load_back_by_hand():
    # 60 mA of each channel's load crosses in_gnd (120 mm of 24 AWG, 84.22 ohm/km: NBS Handbook
    # 100 / ASTM B258, as tests/test_audit.py's crosstalk check), read by that channel's 12 dB
    # input, against the 2 V rated output
    r = 84.22e-3 * 0.120
    mb = analyze(load(next(p for p in EXAMPLES if p.name == "headphone-amp-100v.gplan")))
    found = {f.elements[-1]: f for f in mb.findings if f.code == "GC306"}
    assert set(found) == {"l_load", "r_load"}
    for f in found.values():
        assert f.severity == "fault"
        assert f.figures["input_db"] == pytest.approx(
            _db(0.060 * r * 10 ** (12 / 20), 2.0), abs=0.1
        )


def test_the_dual_mono_field_plan_finds_the_speaker_return_on_the_input_pad():
    r = analyze(load(DUAL_MONO))
    found = [f for f in r.findings if f.code == "GC306"]
    assert [(f.severity, f.elements[0]) for f in found] == [("fault", "right_spk")]
    (f,) = found
    # the verdict: about -41.7 dB of the right output at its own input (0.8 % feedback), worked
    # by its reviewer in ngspice
    assert f.figures["feedback_db"] == pytest.approx(-41.7, abs=0.1)
    assert f.actions == (("reroute", "right_spk", "right.res_0v"),)


@needs_ngspice
@pytest.mark.ngspice
def test_the_dual_mono_feedback_against_ngspice():
    """The exported netlist at 1 kHz with the right speaker's 3.5 A return as its one source:
    ngspice's node voltages read across the right channel's stages (x their gains, against the
    28 V rated output) give the feedback groundcheck reports, to 0.01 dB."""
    p = load(DUAL_MONO)
    c = build_circuit(p)
    source = [("spk", "right.spk_neg", "right.res_0v", 3.5)]
    net = to_spice(c, p.title, source, frequency=1000.0, analysis="ac")
    got = spicetools.run(net, "ac lin 1 1000 1000\nprint all > OUT")
    main_ref = int(c.references[c.components[1][c.point_node["mains.pe"]]])

    def v(point):  # SPICE sources are peak amplitudes
        i = c.point_node[point]
        return 0j if i == main_ref else got[f"n{i}"] / math.sqrt(2)

    right = [st for st in p.stages if st.channel == "right"]
    total = sum((v(st.a) - v(st.b)) * 10 ** (st.gain / 20) for st in right)
    spice_db = _db(abs(total), 28.0)
    ours = next(
        x for x in analyze(p).hum.feedback if x.source == "right_spk_i" and x.frequency == 1000.0
    )
    assert ours.db == pytest.approx(spice_db, abs=0.01)
    assert spice_db == pytest.approx(-41.7, abs=0.1)  # the verdict's figure


def test_a_device_plan_keeps_its_stage_reference_when_placed(tmp_path):
    # the same input as above in a device plan of its own: placed, its stage still reads the
    # sleeve, and the channel's hum is the hand figure
    (tmp_path / "box.gplan").write_text(
        'plan "box"\n' + INPUT + "stage v1: pad to k, gain 40 dB, reference sleeve\n"
    )
    inst = tmp_path / "rack.gplan"
    inst.write_text('plan "rack"\npoint wall: outlet\ndevice b: "box.gplan", plugged wall\n')
    r = analyze(load(inst))
    (st,) = r.plan.stages
    assert (st.a, st.b, st.named) == ("b.sleeve", "b.k", "b.pad")
    assert r.hum.channels["b.main"].total_v == pytest.approx(HAND, rel=1e-6)

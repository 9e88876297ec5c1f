"""The field plan home-studio-step-down (tests/field/home-studio-step-down/, copied unchanged): a
230 V 50 Hz flat with a 120 V valve compressor behind a step-down transformer.  Its verdict.md is
checked as far as transformers go, on the plans as they are (they write the step-down inside the
compressor's plan, or as a terminal), and on the same room written with a 'transformer' statement.

One line of the verdict is not taken as it stands: "its hum lines are at multiples of 120 Hz".  A
transformer changes the voltage, never the frequency: behind a step-down on a 50 Hz supply the
compressor runs at 50 Hz, and its rectifier's lines are at multiples of 100 Hz (first principles;
tests/test_transformers.py checks 120 Hz multiples for a 60 Hz supply)."""

import shutil
from pathlib import Path

import pytest

from groundcheck import PlanErrors, load
from groundcheck.advice.repair import suggest
from groundcheck.analysis import Options, analyze

FIELD = Path(__file__).resolve().parent / "field" / "home-studio-step-down"
PLANS = ("home-studio.gplan", "home-studio-stepdown-as-strip.gplan")
#: the devices the plans run on 230 V (the compressor is the one 120 V device)
AT_230_V = ("iface", "monitors", "synth")


def _suggestions(path: Path) -> list[str]:
    _, evs = suggest(load(path), path.read_text(), Options(), path.parent, path)
    return [e.candidate.title for e in evs]


@pytest.mark.parametrize("name", PLANS)
def test_the_plans_as_they_are_run_the_compressor_at_the_supply_frequency(name):
    r = analyze(load(FIELD / name))
    assert r.plan.frequency == 50.0
    (hv,) = [x for x in r.rectifiers if x.name == "comp.hv"]
    assert hv.frequency == 50.0  # not 60 Hz: the step-down passes the supply's frequency
    # every hum line is a multiple of the 50 Hz supply's frequency, none of 60 Hz alone
    lines = {x.frequency for ch in r.hum.channels.values() for x in ch.spectrum}
    assert lines and all(f % 50 == 0 for f in lines)
    # must find: the unbalanced synth link between outlets of one ring
    assert any("synth_in" in f.elements for f in r.findings)
    assert not any(f.code == "GC217" for f in r.findings)  # 230 V devices on a 230 V supply


def test_the_compressor_plan_for_60_hz_is_refused_behind_a_50_hz_step_down(tmp_path):
    shutil.copytree(FIELD, tmp_path / "room")
    path = _with_transformer(tmp_path / "room", "us-valve-comp.gplan")
    with pytest.raises(PlanErrors) as e:
        load(path)
    assert "a transformer changes the voltage, not the frequency" in str(e.value)


@pytest.mark.xfail(
    strict=True,
    reason="the plan writes the step-down as a terminal (a strip): "
    "nothing in it says 120 V, so the advisor cannot know; written with a 'transformer' statement "
    "it is never offered (the next test)",
)
def test_never_offer_a_230_v_device_into_the_terminal_written_for_the_step_down():
    titles = _suggestions(FIELD / "home-studio-stepdown-as-strip.gplan")
    assert not [t for t in titles if "in at stepdown" in t]


def _with_transformer(folder: Path, comp_plan: str) -> Path:
    """The as-strip plan with its step-down written as a transformer (230 V to 120 V, earthed,
    500 VA, its 1.8 m cord) and the compressor on its own plan ``comp_plan`` behind it."""
    text = (folder / "home-studio-stepdown-as-strip.gplan").read_text()
    old = (
        "point stepdown: terminal\nwire stepdown_cord: stepdown to far_wall, 1.8 m, 0.75 mm2, "
        "protective\n"
    )
    assert old in text
    text = text.replace(
        old,
        "transformer stepdown: plugged far_wall, primary 230 V, secondary 120 V, rating 500 VA, "
        "earthed, cord 1.8 m 0.75 mm2\n",
    )
    text = text.replace('"us-valve-comp-stepdown.gplan"', f'"{comp_plan}"')
    path = folder / "home-studio-transformer.gplan"
    path.write_text(text)
    return path


def _room(tmp_path) -> Path:
    """The room with the transformer, and the compressor's plan for 120 V at 50 and 60 Hz (its
    own plan says 60 Hz; a unit rated for both states the supply's frequency)."""
    shutil.copytree(FIELD, tmp_path / "room")
    gear = tmp_path / "room" / "gear"
    text = (gear / "us-valve-comp.gplan").read_text()
    assert "mains 120 V 60 Hz" in text
    (gear / "us-valve-comp-5060.gplan").write_text(
        text.replace("mains 120 V 60 Hz", "mains 120 V 50 Hz")
    )
    return _with_transformer(tmp_path / "room", "us-valve-comp-5060.gplan")


def test_with_a_transformer_no_230_v_device_is_offered_its_120_v_outlet(tmp_path):
    path = _room(tmp_path)
    r = analyze(load(path))
    assert not any(f.code in ("GC217", "GC215") for f in r.findings)
    assert {d.device for d in r.device_earths} == {"comp", "iface", "monitors"}
    titles = _suggestions(path)
    assert titles  # the advisor ran and had things to say
    for dev in AT_230_V:
        assert not [t for t in titles if t.startswith(f"plug {dev} in at stepdown")]
    # nor the 120 V compressor into a 230 V outlet or strip
    assert not [t for t in titles if t.startswith("plug comp in at")]
    # never lifting a protective earth (verdict: never offer)
    assert not [t for t in titles if "lift" in t and "protective earth)" not in t]


def test_the_230_v_compressor_plan_behind_the_step_down_is_a_danger(tmp_path):
    shutil.copytree(FIELD, tmp_path / "room")
    path = _with_transformer(tmp_path / "room", "us-valve-comp-stepdown.gplan")
    (f,) = [f for f in analyze(load(path)).findings if f.code == "GC217"]
    assert f.severity == "danger" and f.figures == {"rated_v": 230.0, "supplied_v": 120.0}
    assert "plug comp into" in f.fix and "far_wall" in f.fix


@pytest.mark.parametrize("name", PLANS)
def test_never_offer_a_balanced_link_for_the_synth_whose_sockets_are_as_bought(name):
    """Verdict: never offer a balanced link for a device that has only an unbalanced output (the
    synth, placed 'simple': bought, and no balanced link of the plan reaches it)."""
    path = FIELD / name
    _, evs = suggest(load(path), path.read_text(), Options(), path.parent, path)
    balance = [
        e for e in evs if e.candidate.action == "balance" and e.candidate.element == "synth_in"
    ]
    assert balance, "the candidate is considered (and refused), not silently missing"
    assert all(e.rejected and "bought equipment" in e.rejected for e in balance)


def test_a_synth_stated_with_balanced_sockets_may_be_offered_a_balanced_link(tmp_path):
    """The same plan with the synth's sockets stated (a copy in tmp_path: the field plan is never
    edited): the bought-equipment refusal no longer applies."""
    shutil.copytree(FIELD, tmp_path / "room")
    path = tmp_path / "room" / "home-studio-stepdown-as-strip.gplan"
    text = path.read_text()
    old = "device synth: simple, class II, plugged desk_wall"
    assert old in text
    path.write_text(text.replace(old, old + ", sockets balanced"))
    _, evs = suggest(load(path), path.read_text(), Options(), path.parent, path)
    balance = [
        e for e in evs if e.candidate.action == "balance" and e.candidate.element == "synth_in"
    ]
    assert balance and not any(e.rejected and "bought equipment" in e.rejected for e in balance)


@pytest.mark.parametrize(
    "words, message",
    [
        (
            'device amp: "amp.gplan", sockets balanced',
            "'sockets' is an attribute of a simple device",
        ),
        ("device amp: simple, sockets differential", "balanced or unbalanced"),
    ],
)
def test_sockets_is_a_simple_devices_word(tmp_path, words, message):
    path = tmp_path / "room.gplan"
    path.write_text(
        'plan "room"\nsupply 230 V 50 Hz, system TN-S\npoint met: earthing-terminal\n'
        + words
        + "\n"
    )
    with pytest.raises(PlanErrors) as e:
        load(path)
    assert message in str(e.value) and ":4:" in str(e.value)

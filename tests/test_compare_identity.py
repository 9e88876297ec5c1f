"""compare keys findings by their stable identity (code, elements in their roles, channel) and
counts findings that share one, so nothing is merged and an introduced finding never hides behind a
fixed one."""

import json
from dataclasses import replace

from groundcheck import load
from groundcheck.analysis import Options, analyze
from groundcheck.advice.compare import compare

from helpers import EXAMPLES

HEADPHONE = next(e for e in EXAMPLES if e.name.startswith("headphone"))


def _result():
    return analyze(load(HEADPHONE), Options())


def test_compare_with_itself_keeps_every_finding():
    r = _result()
    d = compare(r, _result())
    assert len(d["findings"]["kept"]) == len(r.findings) >= 9
    assert d["findings"]["fixed"] == [] and d["findings"]["introduced"] == []
    # the two outputs' shares of one conductor (GC301, same code, same elements) are kept apart,
    # and so are the two directions of crosstalk (GC304, same pair of channels)
    kept = d["findings"]["kept"]
    assert (
        sum(f["code"] == "GC301" for f in kept) == sum(f.code == "GC301" for f in r.findings) == 2
    )
    assert sum(f["code"] == "GC304" for f in kept) == 2


def test_two_findings_of_one_code_on_the_same_elements_are_kept_apart():
    r = _result()
    shares = [f for f in r.findings if f.code == "GC301"]
    assert len(shares) == 2 and set(shares[0].elements) == set(shares[1].elements)
    left = next(f for f in shares if f.figures["channel"] == "left")
    after = replace(r, findings=[f for f in r.findings if f is not left])  # the left share cured
    d = compare(r, after)
    fixed = d["findings"]["fixed"]
    assert [f["code"] for f in fixed] == ["GC301"] and "left output" in fixed[0]["message"]
    assert any(
        f["code"] == "GC301" and "right output" in f["message"] for f in d["findings"]["kept"]
    )


def test_an_introduced_finding_does_not_hide_behind_a_fixed_one(cli, tmp_path):
    r = _result()
    one = next(f for f in r.findings if f.code == "GC206")
    twice = replace(r, findings=[*r.findings, replace(one, message=one.message + " (again)")])
    d = compare(r, twice)
    assert [f["code"] for f in d["findings"]["introduced"]] == ["GC206"]
    assert sum(f["code"] == "GC206" for f in d["findings"]["kept"]) == 1
    back = compare(twice, r)  # the other way round, one of the two is fixed, one kept
    assert [f["code"] for f in back["findings"]["fixed"]] == ["GC206"]


def test_fail_on_introduced_sees_a_second_finding_of_the_same_identity(cli, tmp_path):
    text = HEADPHONE.read_text()
    before, after = tmp_path / "before.gplan", tmp_path / "after.gplan"
    before.write_text(text)
    # a second front panel screwed on by anodised threads of its own: a second GC206 of its own
    # part
    extra = (
        "metal lid: aluminium 1.5 mm, 220 x 140 mm, at 0,200, touchable\nbolt lid_screws: lid to "
        "case, contact 4 ohm, protective\n"
    )
    after.write_text(text + extra)
    code, out, _ = cli(
        "compare", str(before), str(after), "--format", "json", "--fail-on", "introduced"
    )
    d = json.loads(out)
    assert code == 1 and any(
        f["code"] == "GC206" and "lid" in f["message"] for f in d["findings"]["introduced"]
    )
    code, out, _ = cli(
        "compare", str(before), str(before), "--format", "json", "--fail-on", "introduced"
    )
    assert code == 0 and json.loads(out)["findings"]["introduced"] == []


def test_a_channels_audible_hum_is_the_same_finding_whatever_its_contributors():
    # an outside reviewer's fix took a channel from 22.8 dB over the threshold to 3.5 dB: its
    # GC303 named other contributors after, and compare called it fixed and introduced at once
    # (failing --fail-on introduced on a plan 10 dB quieter); a channel's verdict is its channel
    from groundcheck.advice.fixes import identity
    from groundcheck.core.errors import Location
    from groundcheck.rules.catalogue import Finding

    loc = Location("p.gplan", 1, 1)
    before = Finding("GC303", "fault", "by 22.8 dB", loc, ("left", "bus", "res_lead"), {})
    after = Finding("GC303", "fault", "by 3.5 dB", loc, ("left", "pi_gnd"), {})
    other = Finding("GC303", "fault", "by 3.5 dB", loc, ("right", "pi_gnd"), {})
    assert identity(before) == identity(after) != identity(other)

"""The command, through main(argv): exit status, output, files, documentation."""

import io
import json
import re
import shutil
import subprocess

import pytest

from groundcheck.cli import COMMANDS, build_parser
from groundcheck.rules.catalogue import RULES

from helpers import EXAMPLES, ROOT

DUAL = str(next(e for e in EXAMPLES if e.name.startswith("dual-mono")))
HEADPHONE = str(next(e for e in EXAMPLES if e.name.startswith("headphone")))


def test_check_text_report(cli):
    code, out, err = cli("check", HEADPHONE)
    assert code == 1 and err == ""
    for text in (
        "GC206",
        "GC102",
        "GC304",
        "Protective earth",
        "Hum and buzz",
        "Never lift the protective earth",
    ):
        assert text in out


def test_fail_on_threshold(cli):
    guitar = str(next(e for e in EXAMPLES if e.name.startswith("guitar")))
    assert cli("check", guitar, "--fail-on", "danger")[0] == 0  # a fault, no danger
    assert cli("check", guitar, "--fail-on", "fault")[0] == 1
    assert cli("check", DUAL, "--fail-on", "fault")[0] == 0  # warnings and a note only
    assert cli("check", DUAL, "--fail-on", "warning")[0] == 1
    # the front panel's protective path
    assert cli("check", HEADPHONE, "--fail-on", "danger")[0] == 1


def test_a_danger_that_the_exit_status_lets_pass_is_said(cli, tmp_path, monkeypatch):
    # a settings file in a folder above, or the option: the status is 0, the warning says why
    assert cli("check", HEADPHONE, "--fail-on", "never", "--advice-budget", "0")[0] == 0
    err = cli("check", HEADPHONE, "--fail-on", "never", "--advice-budget", "0")[2]
    assert "danger finding" in err and "exit status is 0: --fail-on never" in err
    (tmp_path / "pyproject.toml").write_text('[tool.groundcheck]\nfail-on = "never"\n')
    (tmp_path / "inner").mkdir()
    monkeypatch.chdir(tmp_path / "inner")
    code, _, err = cli("check", HEADPHONE, "--advice-budget", "0")
    assert code == 0 and f'fail-on = "never" in {tmp_path / "pyproject.toml"}' in err
    # nothing said when the status fails on it, or when there is no danger
    assert "exit status is 0" not in cli("check", HEADPHONE, "--fail-on", "danger")[2]
    assert "exit status is 0" not in cli("check", DUAL, "--fail-on", "never")[2]


def test_leaving_out_rules_that_can_find_a_danger_is_said(cli):
    # an outside builder: --leave-out GC2 --fail-on danger exited 0 on two earth dangers with
    # nothing louder than the verdict's "not checked"
    code, _, err = cli("check", HEADPHONE, "--leave-out", "GC2", "--fail-on", "danger")
    assert code == 0
    assert "rules that can find a danger were not checked (every GC2xx rule" in err
    assert "left out by --leave-out GC2" in err
    assert "can find a danger" not in cli("check", HEADPHONE, "--leave-out", "GC304")[2]


def test_a_picked_change_is_judged_as_written(cli, tmp_path):
    # --pick writes one change alone: the verdict said and the exit status are the written plan's,
    # not the combined set's (a picked fuse change left the earth's dangers in the plan written)
    import shutil as sh

    sh.copy(HEADPHONE, tmp_path / "hp.gplan")
    out = tmp_path / "one.gplan"
    code, _, err = cli("suggest", str(tmp_path / "hp.gplan"), "--pick", "1", "--apply", str(out))
    assert out.exists() and f"{out} as written (this one change alone):" in err
    written = cli("check", str(out), "--advice-budget", "0", "--fail-on", "danger")[0]
    assert code == written


def test_clean_plan_exits_zero(cli, tmp_path):
    p = tmp_path / "clean.gplan"
    p.write_text(
        'plan "c"\nmains 230 V 50 Hz, fuse 1 A slow, breaking high, line-conductor 0.75 mm2\n'
        "metal deck: aluminium 2 mm, 100 x 100 mm, touchable\npoint pe: stud, at 10,10 on deck\n"
        "wire pe_lead: mains.pe to pe, 50 mm, 1 mm2, protective\nbolt b: pe to deck\n"
    )
    assert cli("check", str(p))[0] == 0


def test_json_document(cli):
    code, out, _ = cli("check", DUAL, "--format", "json")
    doc = json.loads(out)
    assert set(doc) >= {
        "plan",
        "findings",
        "loops",
        "summary",
        "protective_earth",
        "hum",
        "network",
    }
    f = doc["findings"][0]
    assert set(f) >= {"code", "severity", "message", "location", "elements", "figures", "fix"}
    assert set(f["location"]) == {"file", "line", "column"}
    assert doc["summary"]["fault"] == sum(1 for x in doc["findings"] if x["severity"] == "fault")
    # the loop base -> gnd_post -> left.in_sleeve -> left.star -> psu_star -> sig_stud -> base, by
    # the shoelace formula on the plan's positions (mm): (350,205) (345,35) (260,90) (150,160)
    # (175,195)
    pts = [(350, 205), (345, 35), (260, 90), (150, 160), (175, 195)]
    area = abs(sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1) in zip(pts, pts[1:] + pts[:1]))) / 2
    assert doc["loops"][0]["closed_by"] == "second-chassis-bond" and doc["loops"][0][
        "area_mm2"
    ] == pytest.approx(area)
    assert "NaN" not in out and "Infinity" not in out
    # the same plan gives the same bytes, when the advisor has the time to try every fix (its
    # budget is time: on a loaded machine fewer are tried and a fix line may say so)
    again = [cli("check", DUAL, "--format", "json", "--advice-budget", "600")[1] for _ in (0, 1)]
    assert again[0] == again[1]


def test_stdin(cli, monkeypatch):
    monkeypatch.setattr("sys.stdin", io.StringIO(open(HEADPHONE).read()))
    code, out, _ = cli("check", "-", "--format", "json")
    assert code == 1 and json.loads(out)["plan"]["file"] == "<stdin>"


def test_explain(cli):
    code, out, _ = cli("explain", "GC102")
    assert code == 0 and "shared-return" in out and "Fix:" in out
    code, out, _ = cli("explain")
    assert code == 0 and all(c in out for c in RULES)
    code, _, err = cli("explain", "GC999")
    assert code == 2 and "unknown rule 'GC999'" in err
    code, out, _ = cli("explain", "shared-return")
    assert code == 0 and out.startswith("GC102 shared-return")
    # a rule that finds dangers too says so beside its usual severity
    code, out, _ = cli("explain", "GC202")
    assert out.startswith("GC202 pe-shared-fastener (fault; its findings may also be danger)")


def test_the_caution_is_in_every_output(cli, tmp_path):
    from groundcheck.core.caution import CAUTION, MAINS_WORK
    from groundcheck.renderers.formats import CHECK_FORMATS

    outputs = {fmt: cli("check", HEADPHONE, "--format", fmt)[1] for fmt in CHECK_FORMATS}
    outputs["explain"] = cli("explain", "GC201")[1]
    outputs["explain list"] = cli("explain")[1]
    outputs["suggest"] = cli("suggest", HEADPHONE)[1]
    outputs["suggest json"] = cli("suggest", HEADPHONE, "--format", "json")[1]
    for fmt in ("text", "json", "html"):
        outputs[f"compare {fmt}"] = cli("compare", HEADPHONE, HEADPHONE, "--format", fmt)[1]
    report = tmp_path / "r.html"
    cli("report", HEADPHONE, "-o", str(report))
    outputs["report"] = report.read_text()
    plain = {k: " ".join(v.split()) for k, v in outputs.items()}
    assert [k for k, v in plain.items() if "Never lift the protective earth" not in v] == []
    assert json.loads(outputs["json"])["caution"] == CAUTION
    assert json.loads(outputs["sarif"])["runs"][0]["properties"]["caution"] == CAUTION
    assert " ".join(MAINS_WORK.split()) in plain["explain"]


def test_export_spice(cli, tmp_path):
    out_file = tmp_path / "g.cir"
    code, out, _ = cli("export", DUAL, "--format", "spice", "-o", str(out_file))
    assert code == 0
    text = out_file.read_text()
    assert (
        text.startswith("* groundcheck ground network")
        and text.rstrip().endswith(".end")
        and ".op" in text
    )
    assert "Never lift the protective earth" in " ".join(
        x.lstrip("* ") for x in text.splitlines()[:5]
    )
    code, out, _ = cli("export", DUAL, "--format", "spice", "--frequency", "1kHz")
    assert ".ac lin 1 1000 1000" in out
    # elements named after the plan's conductors; a name taken twice gets a suffix, never a clash
    names = [line.split()[0] for line in out.splitlines() if line and line[0] in "RLCI"]
    assert "R_left_in_gnd" in names and "L_left_in_gnd" in names and "R_plate_base_1_2" in names
    assert len({n.lower() for n in names}) == len(names)


def test_refuses_to_overwrite_input(cli, tmp_path):
    plan = tmp_path / "p.gplan"
    text = open(HEADPHONE).read()
    plan.write_text(text)
    code, _, err = cli("check", str(plan), "--format", "json", "-o", str(plan))
    assert code == 2 and "refusing to write over" in err and "a plan this run read" in err
    assert plan.read_text() == text


def test_usage_errors_are_one_line_exit_2(cli):
    code, _, err = cli("check", HEADPHONE, "--pe-limit", "5 mm")
    assert code == 2 and "is a length, not a resistance" in err and "Traceback" not in err
    with pytest.raises(SystemExit) as e:
        build_parser().parse_args(["frobnicate"])
    assert e.value.code == 2


def test_version(cli, capsys):
    with pytest.raises(SystemExit) as e:
        build_parser().parse_args(["--version"])
    assert e.value.code == 0
    assert re.match(r"groundcheck \d+\.\d+", capsys.readouterr().out)


def test_every_command_has_help_with_example_and_is_in_readme():
    readme = (ROOT / "README.md").read_text()
    parser = build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    assert set(sub.choices) == set(COMMANDS)
    for name, p in sub.choices.items():
        assert f"groundcheck {name}" in readme, name
        assert "Example" in (p.description or ""), name


def test_library_entry_points():
    import groundcheck

    r = groundcheck.analyze(groundcheck.load(HEADPHONE))
    assert json.loads(groundcheck.render(r, "json"))["summary"]["fault"] >= 1
    assert groundcheck.render(r, "sarif").lstrip().startswith("{")
    assert "GC206" in groundcheck.render(r, "text")
    assert groundcheck.render(r, "dot").startswith("graph physical")
    assert groundcheck.render(r, "html").startswith("<!DOCTYPE html>")
    with pytest.raises(ValueError):
        groundcheck.render(r, "pdf")


def test_jobs_on_one_plan_gives_the_same_document(cli):
    # the advisor's budget is time: given all it needs, every fix line is the same under load
    wide = ("--format", "json", "--advice-budget", "600")
    one = json.loads(cli("check", DUAL, *wide)[1])
    two = json.loads(cli("check", DUAL, *wide, "--jobs", "2")[1])
    assert one == two and one["hum"]


@pytest.mark.parametrize("value", ["0", "-2", "two"])
def test_jobs_must_be_a_whole_number_from_one(cli, value):
    code, out, err = cli("check", DUAL, "--jobs", value)
    assert code == 2 and "--jobs" in err and "Traceback" not in err


def test_relaxed_pe_limit_is_said_in_every_format(cli, tmp_path):
    # a 150 mΩ fastening: over the 0.1 Ω bonding limit (IEC 61010-1 6.5.2.4), passed only under
    # --pe-limit 0.5 (and still a warning)
    p = tmp_path / "loose.gplan"
    p.write_text(
        'plan "c"\nmains 230 V 50 Hz, fuse 1 A slow, breaking high, line-conductor 0.75 mm2\n'
        "metal deck: aluminium 2 mm, 100 x 100 mm, touchable\npoint pe: stud, at 10,10 on deck\n"
        "wire pe_lead: mains.pe to pe, 50 mm, 1 mm2, protective\nbolt b: pe to deck, contact 150 "
        "mohm\n"
    )
    assert cli("check", str(p))[0] == 1
    code, out, _ = cli("check", str(p), "--pe-limit", "0.5 ohm", "--fail-on", "fault")
    assert code == 0 and "Notice: protective-path limit relaxed" in out and "GC206" in out
    doc = json.loads(cli("check", str(p), "--pe-limit", "0.5 ohm", "--format", "json")[1])
    assert doc["summary"]["notices"] and doc["protective_earth"]["limit_relaxed"] is True
    assert [f["severity"] for f in doc["findings"] if f["code"] == "GC206"] == ["warning"]
    sarif = json.loads(cli("check", str(p), "--pe-limit", "0.5 ohm", "--format", "sarif")[1])
    assert any("relaxed" in n for n in sarif["runs"][0]["properties"]["notices"])
    html = tmp_path / "r.html"
    cli("report", str(p), "--pe-limit", "0.5 ohm", "-o", str(html))
    assert 'class="notice"' in html.read_text() and "relaxed" in html.read_text()


def test_compare_fails_a_review_when_the_after_plan_introduces_findings(cli, tmp_path):
    worse = tmp_path / "worse.gplan"
    worse.write_text(
        open(HEADPHONE).read()
        + "shield in_shield: in_l to in_gnd_pad, 30 mm, 0.2 mm2, terminated both\n"
    )
    assert cli("compare", HEADPHONE, str(worse))[0] == 0
    assert cli("compare", HEADPHONE, str(worse), "--fail-on", "introduced")[0] == 1
    assert cli("compare", HEADPHONE, HEADPHONE, "--fail-on", "introduced")[0] == 0


def test_compare_fails_a_review_when_a_kept_finding_gets_worse(cli, tmp_path):
    # the shared return made three times as long: GC102 is kept and louder (the drop in a wire is
    # I·R, R ∝ length); nothing is introduced, yet a review must not pass it
    text = open(HEADPHONE).read()
    old = "wire in_gnd: in_gnd_pad to star, 120 mm, 24 AWG, signal"
    assert old in text
    longer = tmp_path / "longer.gplan"
    longer.write_text(text.replace(old, old.replace("120 mm", "360 mm")))
    code, out, _ = cli("compare", HEADPHONE, str(longer), "--fail-on", "worse")
    assert code == 1, out
    # the line names its finding and writes the figure with its unit (I·R three times: +9.5 dB)
    (line,) = [ln for ln in out.splitlines() if "kept, and worse" in ln and "GC102" in ln][:1]
    assert "kept, and worse (level " in line and " dBV (+9.5 dB)): " in line and "in_gnd" in line
    assert "dbv" not in line
    doc = json.loads(cli("compare", HEADPHONE, str(longer), "--format", "json")[1])
    worse = [f for f in doc["findings"]["worse"] if f["code"] == "GC102"]
    assert worse and all(f["severity_before"] == "fault" for f in worse)
    assert cli("compare", HEADPHONE, HEADPHONE, "--fail-on", "worse")[0] == 0


def test_option_values_are_checked(cli):
    for args in (
        ("--max-frequency", "-100"),
        ("--pe-limit", "0"),
        ("--pe-limit", "0.6 ohm"),  # at most 0.5 Ω: a path above it is no bond
        ("--pe-limit", "1000"),
        ("--hum-level", "nan"),
        ("--max-frequency", "1e309"),
    ):
        code, _, err = cli("check", HEADPHONE, *args)
        assert code == 2 and "error: argument" in err


PE_DANGER = (
    'plan "c"\nmains 230 V 50 Hz, fuse 1 A slow, breaking high, line-conductor 0.75 mm2\n'
    "metal deck: aluminium 2 mm, 100 x 100 mm, touchable\npoint pe: stud, at 10,10 on deck\n"
    "wire pe_lead: mains.pe to pe, 50 mm, 1 mm2, protective\nbolt b: pe to deck\n"
    "metal lid: steel 1 mm, 100 x 100 mm, touchable   # accept GC205: a test of acceptance\n"
)


def test_inline_acceptance_in_every_format_and_never_for_a_danger_by_default(cli, tmp_path):
    p = tmp_path / "a.gplan"
    p.write_text(
        open(DUAL)
        .read()
        .replace(
            "wire arm_gnd: gnd_post to left.in_sleeve, 175 mm, 0.5 mm2, signal",
            "wire arm_gnd: gnd_post to left.in_sleeve, 175 mm, 0.5 mm2, signal  # accept GC101: "
            "the arm's lead, to be lifted at the turntable",
        )
    )
    doc = json.loads(cli("check", str(p), "--format", "json")[1])
    acc = [f for f in doc["findings"] if f["accepted"]]
    assert [f["code"] for f in acc] == ["GC101"] and doc["summary"]["accepted"] == 1
    sarif = json.loads(cli("check", str(p), "--format", "sarif")[1])
    assert any(r.get("suppressions") for r in sarif["runs"][0]["results"])
    assert "ACCEPTED IN THE PLAN (1)" in cli("check", str(p))[1]
    d = tmp_path / "d.gplan"
    d.write_text(PE_DANGER)
    code, out, _ = cli("check", str(d), "--format", "json")
    assert (
        code == 1 and json.loads(out)["summary"]["danger"] == 1
    )  # a danger is never accepted by default
    code, out, _ = cli("check", str(d), "--format", "json", "--allow-accept-danger")
    summary = json.loads(out)["summary"]
    assert code == 1 and summary["accepted"] == 1 and summary["worst"] == "danger"  # still counted
    code, out, _ = cli(
        "check", str(d), "--format", "json", "--allow-accept-danger", "--fail-on", "never"
    )
    assert code == 0 and json.loads(out)["summary"]["worst"] == "danger"


def test_draw_writes_to_standard_output(capfd):
    from groundcheck.cli import main
    from helpers import EXAMPLES

    assert main(["draw", str(EXAMPLES[0]), "-o", "-", "--as", "dot"]) == 0
    out, err = capfd.readouterr()
    assert out.startswith("graph physical") and "standard output" in err
    if __import__("shutil").which("dot"):
        assert main(["draw", str(EXAMPLES[0]), "-o", "-"]) == 0
        out, _ = capfd.readouterr()
        assert "<svg" in out


@pytest.mark.skipif(shutil.which("bash") is None, reason="needs bash")
def test_shell_completion_script_completes(cli, tmp_path):
    code, script, _ = cli("completion", "bash")
    assert code == 0
    path = tmp_path / "c.sh"
    path.write_text(script)
    probe = (
        'source "$1"; for case in "1|groundcheck ch" "2|groundcheck check --fa" "3|groundcheck '
        'check --format s" "3|groundcheck draw --view t"; do n="${case%%|*}"; read -ra COMP_WORDS '
        '<<< "${case#*|}"; COMP_CWORD=$n; [ ${#COMP_WORDS[@]} -le $n ] && COMP_WORDS+=(""); '
        '_groundcheck; echo "${COMPREPLY[*]}"; done'
    )
    out = subprocess.run(
        ["bash", "-c", probe, "probe", str(path)], capture_output=True, text=True
    ).stdout.split("\n")
    assert out[:4] == ["check", "--fail-on", "sarif", "topology"]


def test_readme_tutorial_quotes_its_example_line_for_line():
    readme = (ROOT / "README.md").read_text()
    part = readme[readme.index("## Tutorial") :]
    excerpt = part[part.index("```\n") + 4 :]
    excerpt = excerpt[: excerpt.index("```")]
    text = (ROOT / "examples" / "headphone-amp-100v.gplan").read_text()
    example = [x.split("#")[0].rstrip() for x in text.splitlines()]
    assert [x for x in excerpt.splitlines() if x and x != "..." and x not in example] == []


def test_each_command_states_only_exit_statuses_it_can_give(cli, tmp_path):
    # a help text that names --fail-on belongs to a command that has it; draw and export judge
    # nothing, so their help promises 0 or 2 only, and a plan full of findings still exits 0 from
    # both
    import argparse

    sub = next(a for a in build_parser()._actions if isinstance(a, argparse._SubParsersAction))
    for name, parser in sub.choices.items():
        has = any("--fail-on" in a.option_strings for a in parser._actions)
        assert ("--fail-on" in (parser.epilog or "")) <= has, name
    for name in ("draw", "export"):
        statuses = re.findall(r"(?:: |, )(\d) ", sub.choices[name].epilog)
        assert statuses == ["0", "2"], name
    assert cli("export", HEADPHONE, "-o", str(tmp_path / "g.cir"))[0] == 0
    assert cli("draw", HEADPHONE, "-o", str(tmp_path / "g.dot"))[0] == 0
    assert cli("check", HEADPHONE)[0] == 1  # the same plan has faults
    # the report judges the plan as check does: written either way, 1 when a finding reaches
    # --fail-on
    assert re.findall(r"(?:: |, )(\d) ", sub.choices["report"].epilog) == ["0", "1", "2"]
    assert cli("report", HEADPHONE, "-o", str(tmp_path / "r.html"))[0] == 1
    assert (tmp_path / "r.html").exists()


def test_export_has_no_option_that_does_nothing(cli):
    # --spice once said the same as --format spice, the only format and the default
    code, _, err = cli("export", HEADPHONE, "--spice")
    assert code == 2 and "--spice" in err
    plain, at_dc = cli("export", HEADPHONE)[1], cli("export", HEADPHONE, "--format", "spice")[1]
    assert plain == at_dc and ".op" in plain
    assert ".ac lin 1 100 100" in cli("export", HEADPHONE, "--frequency", "100")[1]

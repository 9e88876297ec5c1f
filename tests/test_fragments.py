"""Checking several plans: a file another plan includes is checked as part of that plan, never
alone, and a plan that cannot be read never stops the others from being checked and reported."""

import json
import shutil
from pathlib import Path

from helpers import EXAMPLES

FIELD = Path(__file__).parent / "field" / "home-studio-step-down"
GUITAR = next(e for e in EXAMPLES if e.name.startswith("guitar"))


def test_a_folder_with_an_outside_builders_include_fragment_is_checked(cli):
    # gear/comp-body.gplan has no mains statement and no header of ours: it is only included
    code, out, err = cli(
        "check", str(FIELD), "--format", "json", "--advice-budget", "0", "--fail-on", "never"
    )
    assert code == 0, err
    assert "passed over" in err and "comp-body.gplan" in err and "included by" in err
    files = sorted(Path(p["plan"]["file"]).name for p in json.loads(out)["plans"])
    assert files == [
        "home-studio-stepdown-as-strip.gplan",
        "home-studio.gplan",
        "us-valve-comp-stepdown.gplan",
        "us-valve-comp.gplan",
    ]


def test_a_fragment_named_alone_checks_the_plan_that_includes_it(cli, tmp_path, monkeypatch):
    # what the pre-commit hook does when only the fragment changed
    shutil.copytree(FIELD, tmp_path / "studio")
    monkeypatch.chdir(tmp_path / "studio")
    code, out, err = cli(
        "check",
        "gear/comp-body.gplan",
        "--format",
        "json",
        "--advice-budget",
        "0",
        "--fail-on",
        "never",
    )
    assert code == 0, err
    doc = json.loads(out)
    checked = [doc["plan"]["file"]] if "plan" in doc else [p["plan"]["file"] for p in doc["plans"]]
    assert sorted(Path(f).name for f in checked) == [
        "us-valve-comp-stepdown.gplan",
        "us-valve-comp.gplan",
    ]
    assert "comp-body.gplan" in err and "checked as part of each" in err


def test_one_plan_that_cannot_be_read_does_not_stop_the_others(cli, tmp_path):
    shutil.copy(GUITAR, tmp_path / "a.gplan")
    (tmp_path / "b.gplan").write_text("wire x: nowhere to star, 10 mm, 1 mm2\n")
    shutil.copy(GUITAR, tmp_path / "c.gplan")
    for jobs in ("1", "2"):
        code, out, err = cli(
            "check", str(tmp_path), "--format", "json", "--advice-budget", "0", "--jobs", jobs
        )
        doc = json.loads(out)
        assert code == 2  # a plan could not be used
        assert [Path(p["plan"]["file"]).name for p in doc["plans"]] == ["a.gplan", "c.gplan"]
        assert doc["plan_errors"][0]["errors"][0]["line"] == 1
        assert "b.gplan:1:9: error: undefined point or metal part 'nowhere'" in err
        assert "1 of 3 plans could not be read" in err
    code, out, err = cli("check", str(tmp_path), "--advice-budget", "0", "--format", "sarif")
    run = json.loads(out)["runs"][0]
    assert code == 2 and run["invocations"][0]["executionSuccessful"] is False
    assert any(r["ruleId"] == "plan-error" for r in run["results"])
    assert any(
        r["ruleId"] == "GC211" for r in run["results"]
    )  # the guitar head's fuse, still reported

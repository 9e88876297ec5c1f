"""SARIF logs validated against the SARIF 2.1.0 JSON schema (tests/reference/sarif, the OASIS
committee's schema), for every example and for a plan that cannot be read."""

import json
from pathlib import Path

import jsonschema
import pytest

from helpers import EXAMPLES

SCHEMA = json.loads(
    (Path(__file__).parent / "reference" / "sarif" / "sarif-2.1.0-rtm.5.json").read_text()
)
STUDIO = Path(__file__).resolve().parent.parent / "examples" / "studio" / "project-studio.gplan"


@pytest.mark.parametrize("path", [*EXAMPLES, STUDIO], ids=lambda p: p.stem)
def test_every_example_sarif_log_is_valid(cli, path):
    code, out, _ = cli("check", str(path), "--format", "sarif")
    log = json.loads(out)
    jsonschema.Draft4Validator(SCHEMA).validate(log)
    assert log["runs"][0]["results"], "the examples have findings"


def test_a_plan_error_is_a_sarif_result_at_its_location(cli, tmp_path):
    bad = tmp_path / "bad.gplan"
    bad.write_text('plan "x"\nwire w: a to b, 10 mmm\n')
    code, out, err = cli("check", str(bad), "--format", "sarif")
    assert code == 2 and "unknown unit 'mmm'" in err  # the one-line error still goes to stderr
    log = json.loads(out)
    jsonschema.Draft4Validator(SCHEMA).validate(log)
    (result,) = log["runs"][0]["results"]
    region = result["locations"][0]["physicalLocation"]["region"]
    assert result["ruleId"] == "plan-error" and result["level"] == "error"
    assert (region["startLine"], region["startColumn"]) == (2, 20)
    assert log["runs"][0]["invocations"] == [{"executionSuccessful": False}]


def test_protective_earth_results_and_rules_carry_the_caution_where_review_screens_show_it(cli):
    # review screens show a result's message and a rule's help, not the run's properties: each GC2
    # result and each GC2 rule's help says the fix is mains work and carries the caution; other
    # rules do not
    from groundcheck.core.caution import CAUTION, MAINS_WORK

    headphone = next(p for p in EXAMPLES if p.name.startswith("headphone"))
    run = json.loads(cli("check", str(headphone), "--format", "sarif")[1])["runs"][0]
    pe = [r for r in run["results"] if r["ruleId"].startswith("GC2")]
    assert pe and all(
        MAINS_WORK in r["message"]["text"] and CAUTION in r["message"]["text"] for r in pe
    )
    assert all(CAUTION not in r["message"]["text"] for r in run["results"] if r not in pe)
    rules = run["tool"]["driver"]["rules"]
    assert all((CAUTION in r["help"]["text"]) == r["id"].startswith("GC2") for r in rules)

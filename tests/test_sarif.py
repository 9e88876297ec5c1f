"""SARIF logs validated against the SARIF 2.1.0 JSON schema (tests/reference/sarif, the OASIS committee's schema),
for every example and for a plan that cannot be read."""

import json
from pathlib import Path

import jsonschema
import pytest

from helpers import EXAMPLES

SCHEMA = json.loads((Path(__file__).parent / "reference" / "sarif" / "sarif-2.1.0-rtm.5.json").read_text())
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
    assert code == 2 and "unknown unit 'mmm'" in err           # the one-line error still goes to stderr
    log = json.loads(out)
    jsonschema.Draft4Validator(SCHEMA).validate(log)
    (result,) = log["runs"][0]["results"]
    region = result["locations"][0]["physicalLocation"]["region"]
    assert result["ruleId"] == "plan-error" and result["level"] == "error"
    assert (region["startLine"], region["startColumn"]) == (2, 20)
    assert log["runs"][0]["invocations"] == [{"executionSuccessful": False}]

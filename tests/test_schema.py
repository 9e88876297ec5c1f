"""The JSON document of every example validates against its published schema (docs/schema/),
checked with the jsonschema package (an independent implementation of JSON Schema 2020-12)."""

import json

import jsonschema
import pytest

from helpers import EXAMPLES, ROOT

SCHEMA = json.loads((ROOT / "docs" / "schema" / "groundcheck-result.schema.json").read_text())
STUDIO = ROOT / "examples" / "studio" / "project-studio.gplan"


def test_the_schema_is_a_valid_schema():
    jsonschema.Draft202012Validator.check_schema(SCHEMA)


@pytest.mark.parametrize("path", [*EXAMPLES, STUDIO], ids=lambda p: p.name)
def test_example_documents_validate(cli, path):
    code, out, _ = cli("check", str(path), "--format", "json")
    jsonschema.validate(json.loads(out), SCHEMA, cls=jsonschema.Draft202012Validator)


def test_a_document_missing_a_key_does_not_validate(cli):
    doc = json.loads(cli("check", str(EXAMPLES[0]), "--format", "json")[1])
    del doc["summary"]["notices"]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, SCHEMA, cls=jsonschema.Draft202012Validator)


def test_a_plan_that_cannot_be_read_gives_a_json_document_with_its_errors(cli, tmp_path):
    bad = tmp_path / "bad.gplan"
    bad.write_text('plan "x"\npoint a pad\n')
    code, out, err = cli("check", str(bad), "--format", "json")
    errors_schema = json.loads(
        (ROOT / "docs" / "schema" / "groundcheck-errors.schema.json").read_text()
    )
    jsonschema.Draft202012Validator.check_schema(errors_schema)
    doc = json.loads(out)
    jsonschema.validate(doc, errors_schema, cls=jsonschema.Draft202012Validator)
    assert code == 2 and "bad.gplan:2:1: error" in err
    assert doc["caution"] and [(e["line"], e["column"]) for e in doc["errors"]] == [(2, 1)]
    assert "Never lift the protective earth" in doc["caution"]

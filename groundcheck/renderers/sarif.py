"""SARIF 2.1.0 output, the open standard for analysis results, so review systems show findings on
plan lines.

References: OASIS *Static Analysis Results Interchange Format (SARIF) Version
2.1.0*, 2020 (sections 3.13 run, 3.19 tool component, 3.27 result, 3.28 location).
"""

from __future__ import annotations


from ..core.jsontext import dumps as json_text
from pathlib import Path
from urllib.parse import quote

from ..core.version import __version__
from ..rules.results import Result
from ..rules.catalogue import RULES, protective_earth_rule
from ..core.caution import CAUTION, MAINS_WORK
from ..core.plain import clean

__all__ = ["sarif_document", "render_sarif", "sarif_errors", "SARIF_SCHEMA", "PLAN_ERROR_RULE"]

#: the rule id of a plan that cannot be read (a syntax or model error): not a check of the
#: catalogue
PLAN_ERROR_RULE = "plan-error"

SARIF_SCHEMA = "https://json.schemastore.org/sarif-2.1.0.json"
LEVEL = {"danger": "error", "fault": "error", "warning": "warning", "note": "note"}


def _uri(path: str) -> str:
    """A relative URI reference for a plan file (RFC 3986): the path percent-encoded, so that a
    name with '#', '%', a space or a non-ASCII letter stays one path (SARIF 2.1.0 3.10,
    artifactLocation.uri)."""
    if path.startswith("<"):
        return quote(path.strip("<>"), safe="")
    return quote(Path(path).as_posix(), safe="/")


def _rules() -> list[dict]:
    return [
        {
            "id": r.code,
            "name": r.name,
            "shortDescription": {"text": r.checks.split(".")[0] + "."},
            "fullDescription": {"text": r.checks},
            "help": {"text": f"{r.why} Fix: {r.fix}{_mains(r.code)} References: {r.references}."},
            "defaultConfiguration": {"level": LEVEL[r.severity]},
            "properties": {"severity": r.severity},
        }
        for r in RULES.values()
    ]


def _location(loc) -> dict:
    return {
        "physicalLocation": {
            "artifactLocation": {"uri": _uri(loc.file)},
            "region": {"startLine": max(1, loc.line), "startColumn": max(1, loc.column)},
        }
    }


def sarif_errors(errors) -> dict:
    """A SARIF log for a plan that could not be read: one error result per plan error, at its
    location, and an invocation that did not succeed (SARIF 2.1.0 §3.20)."""
    results = [
        {
            "ruleId": PLAN_ERROR_RULE,
            "level": "error",
            "message": {"text": e.message + (f" ({e.hint})" if e.hint else "")},
            "locations": [_location(e.location)],
        }
        for e in errors
    ]
    return clean(
        {
            "$schema": SARIF_SCHEMA,
            "version": "2.1.0",
            "runs": [
                {
                    "tool": {
                        "driver": {
                            "name": "groundcheck",
                            "version": __version__,
                            "semanticVersion": __version__,
                            "rules": _rules(),
                        }
                    },
                    "columnKind": "unicodeCodePoints",
                    "invocations": [{"executionSuccessful": False}],
                    "properties": {"caution": CAUTION},
                    "results": results,
                }
            ],
        }
    )


def _mains(code: str) -> str:
    """A protective-earth rule's words of caution, in its help and in each of its results' messages
    (code-review screens show those, not the run's properties)."""
    return f" {MAINS_WORK} {CAUTION}" if protective_earth_rule(code) else ""


def _message(f) -> str:
    """A result's text; a danger accepted in the plan says that it still counts as a danger (a
    review screen may hide a suppressed result's level, never its words)."""
    text = (f"{f.message}. Fix: {f.fix}" if f.fix else f.message) + _mains(f.code)
    if f.accepted is not None and f.severity == "danger":
        text += (
            f" (a danger accepted in the plan: {f.accepted}; it still counts as a danger: exit "
            "status 1 unless --fail-on never)"
        )
    return text


def sarif_document(results: list[Result]) -> dict:
    codes = list(RULES)
    rules = _rules()
    out = []
    for res in results:
        for f in res.findings:
            loc = _location(f.location)
            out.append(
                {
                    "ruleId": f.code,
                    "ruleIndex": codes.index(f.code),
                    "level": LEVEL[f.severity],
                    "message": {"text": _message(f)},
                    "locations": [loc],
                    "properties": {
                        "severity": f.severity,
                        "elements": list(f.elements),
                        "figures": f.figures,
                    },
                    **(
                        {"suppressions": [{"kind": "inSource", "justification": f.accepted}]}
                        if f.accepted is not None
                        else {}
                    ),
                }
            )
    return clean(
        {
            "$schema": SARIF_SCHEMA,
            "version": "2.1.0",
            "runs": [
                {
                    "tool": {
                        "driver": {
                            "name": "groundcheck",
                            "version": __version__,
                            "semanticVersion": __version__,
                            "rules": rules,
                        }
                    },
                    "columnKind": "unicodeCodePoints",
                    "invocations": [_invocation(results)],
                    "properties": {
                        "caution": CAUTION,
                        "notices": [n for res in results for n in res.notices],
                    },
                    "results": out,
                }
            ],
        }
    )


def _invocation(results: list[Result]) -> dict:
    """The run's invocation (SARIF 2.1.0 §3.20): each rule left out by selection or settings as a
    configuration override that disables it (§3.51), and every plan's verdict, what it left out and
    what it accepted as a notification (§3.58), so that a review screen shows what was not
    checked."""
    codes = list(RULES)
    left_out = sorted(
        {c for res in results for n in res.not_checked if n.location is None for c in n.codes},
        key=codes.index,
    )
    notes = []
    for res in results:
        level = "note" if res.clean() else "warning"
        verdict = f"{res.plan.file}: verdict: {res.verdict()}"
        notes.append({"level": level, "message": {"text": verdict}})
        for n in res.not_checked:
            note = {"level": "warning", "message": {"text": n.sentence()}}
            if n.location is not None:
                note["locations"] = [_location(n.location)]
                note["associatedRule"] = {"id": n.codes[0], "index": codes.index(n.codes[0])}
            notes.append(note)
        said = {
            n.sentence() for n in res.not_checked
        }  # the run's other notices (an accept comment
        notes += [
            {
                "level": "warning"
                if n.startswith("warning:")
                else "note",  # that accepts nothing)
                "message": {"text": f"{res.plan.file}: {n}"},
            }
            for n in res.notices
            if n not in said
        ]
    return {
        "executionSuccessful": True,
        "ruleConfigurationOverrides": [
            {"descriptor": {"id": c, "index": codes.index(c)}, "configuration": {"enabled": False}}
            for c in left_out
        ],
        "toolExecutionNotifications": notes,
    }


def render_sarif(results: list[Result]) -> str:
    return json_text(sarif_document(results)) + "\n"

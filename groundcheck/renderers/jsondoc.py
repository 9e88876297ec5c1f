"""The JSON document of a result: stable keys, no NaN or infinity, the same bytes on every run.

The layout is documented in ``docs/json.md``.
"""

from __future__ import annotations


from ..core.jsontext import dumps as json_text

from ..rules.results import Result
from ..core.caution import CAUTION
from ..core.plain import clean
from .json_results import (
    bonding_json,
    coupling_json,
    device_earth_json,
    hum_json,
    loop_json,
    rectifier_json,
    safety_json,
)

__all__ = ["result_document", "render_json", "errors_document", "clean", "SCHEMA_VERSION"]

#: bumped when a key is renamed or removed (adding keys does not bump it)
SCHEMA_VERSION = 2


def _transformer(t) -> dict:
    return {
        "name": t.name,
        "plugged": t.plugged,
        "primary_v": t.primary,
        "secondary_v": t.secondary,
        "rating_va": t.rating,
        "isolating": t.isolating,
    }


def result_document(result: Result) -> dict:
    """The result as plain data (the JSON document before serialisation)."""
    plan = result.plan
    doc = {
        "groundcheck": {"schema": SCHEMA_VERSION},
        "caution": CAUTION,
        "plan": {
            "title": plan.title,
            "file": plan.file,
            "files": list(plan.files),
            "mains": None
            if plan.mains is None
            else {"voltage_v": plan.mains.voltage, "frequency_hz": plan.mains.frequency},
            "supply": None
            if plan.supply is None
            else {
                "voltage_v": plan.supply.voltage,
                "frequency_hz": plan.supply.frequency,
                "system": plan.supply.system,
            },
            "transformers": [_transformer(t) for t in plan.transformers],
            "ambient_c": plan.ambient,
            "points": len(plan.points),
            "metal_parts": len(plan.metals),
            "conductors": len(plan.conductors),
            "stages": len(plan.stages),
            "channels": list(plan.channels),
        },
        "summary": {
            **result.counts(),
            "worst": result.worst(),
            "loops_total": result.loop_total,
            "notices": list(result.notices),
            "verdict": result.verdict(),
            "not_checked": [n.as_dict() for n in result.not_checked],
        },
        "findings": [f.as_dict() for f in result.findings],
        "loops": [loop_json(lp) for lp in result.loops],
        "protective_earth": None if result.safety is None else safety_json(result.safety),
        "hum": None if result.hum is None else hum_json(result.hum),
        "rectifiers": [rectifier_json(r) for r in result.rectifiers],
        "coupling": [coupling_json(row) for row in result.coupling],
        "bonding_test": None if result.bonding is None else bonding_json(result.bonding),
        "device_earths": None
        if result.device_earths is None
        else [device_earth_json(d) for d in result.device_earths],
        "outlets": None if result.outlets is None else _outlets(result.outlets),
        "network": None,
    }
    if result.circuit is not None:
        doc["network"] = {
            "nodes": len(result.circuit.nodes),
            "branches": len(result.circuit.branches),
            "metal_parts": result.circuit.plate_notes,
            "sources": result.hum.network if result.hum is not None else [],
        }
    return clean(doc)


def _outlets(o) -> dict:
    """The outlet-pair voltages of an installation and each loaded cable's EMF."""

    def spectrum(d: dict) -> list:
        return [{"frequency_hz": f, "volts": v} for f, v in sorted(d.items())]

    return {
        "pairs": [
            {
                "interconnect": p.interconnect,
                "a": p.a,
                "b": p.b,
                "unplugged_v": p.open_total,
                "planned_v": p.planned_total,
                "unplugged": spectrum(p.open),
                "planned": spectrum(p.planned),
                "drivers": [{"source": n, "kind": k, "volts": v} for n, k, v in p.drivers],
            }
            for p in o.pairs
        ],
        "induced": [
            {"cable": c, "frequency_hz": f, "emf_v": e, "mutual_h_per_m": m}
            for c, f, e, m in o.emfs
        ],
        "notes": list(o.notes),
    }


def render_json(result: Result) -> str:
    return json_text(result_document(result)) + "\n"


def errors_document(errors) -> dict:
    """The JSON document of a plan that could not be read: the caution and each plan error at its
    place (docs/schema/groundcheck-errors.schema.json)."""
    return clean(
        {
            "groundcheck": {"schema": SCHEMA_VERSION},
            "caution": CAUTION,
            "errors": [
                {
                    "file": e.location.file,
                    "line": e.location.line,
                    "column": e.location.column,
                    "message": e.message,
                    "hint": e.hint,
                }
                for e in errors
            ],
        }
    )

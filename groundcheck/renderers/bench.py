"""The bench record as a JSON document (docs/json.md, docs/schema/groundcheck-bench.schema.json)
and as text.

Reads :class:`groundcheck.measure.records.BenchRecord` only; no numeric library.
"""

from __future__ import annotations


from ..core.jsontext import dumps as json_text
import math

from ..core.errors import shown
from ..core.plain import clean
from ..rules.catalogue import severity_rank

__all__ = [
    "signed",
    "bench_document",
    "render_bench_json",
    "render_bench_text",
    "worst",
    "unit_of",
    "db",
]

#: bumped when a key is renamed or removed
BENCH_SCHEMA = 1


def db(x: float | None) -> float | None:
    """dB of an rms level (dBV, or dBFS when not calibrated), None for none or zero."""
    if x is None or x <= 0 or not math.isfinite(x):
        return None
    return round(20 * math.log10(x), 2)


def signed(x: float) -> float:
    """x rounded to 0.1, a negative zero made zero (so that it never reads "-0.0")."""
    return round(x, 1) + 0.0


def unit_of(record) -> str:
    return "dBV" if record.measured is not None and record.measured.calibrated else "dBFS"


def worst(record) -> str | None:
    """The worst severity among the bench findings."""
    return min((f.severity for f in record.findings), key=severity_rank, default=None)


def _recording(m) -> dict | None:
    if m is None:
        return None
    return {
        "file": m.path,
        "sample_rate_hz": m.rate,
        "channels": m.channels,
        "channel": m.channel + 1,
        "bits": m.bits,
        "float": m.floating,
        "seconds": round(m.seconds, 3),
        "segments": m.segments,
        "resolution_hz": m.resolution_hz,
        "method": m.window,
        "mains_hz": round(m.mains_hz, 3),
        "nominal_hz": m.nominal_hz,
        "lines_found": m.detected,
        "calibrated": m.calibrated,
        "calibration": m.calibration,
        "volts_per_full_scale": m.volts_per_unit,
        "noise_density_db": db(m.noise_density),
        "peak_full_scale": round(m.peak, 6),
        "clipping": None
        if m.clipping is None
        else {"samples": m.clipping.samples, "first_s": round(m.clipping.first_s, 4)},
    }


def _row(r) -> dict:
    diff = None
    if r.above_noise and r.predicted:
        diff = round(20 * math.log10(r.measured / r.predicted), 2)
    return {
        "harmonic": r.harmonic,
        "frequency_hz": round(r.frequency_hz, 3),
        "plan_frequency_hz": r.plan_frequency_hz,
        "measured_db": db(r.measured),
        "noise_db": db(r.noise),
        "above_noise": r.above_noise,
        "predicted_db": db(r.predicted),
        "difference_db": diff,
        "fitted_db": db(r.fitted),
        "contributors": list(r.contributors),
        "spl_db": _r(r.spl_db),
        "threshold_db": _r(r.threshold_db),
        "unexplained": r.unexplained,
    }


def _r(x):
    return None if x is None or not math.isfinite(x) else round(x, 2)


def _suspect(s) -> dict:
    return {
        "mechanism": s.mechanism,
        "source": s.source,
        "members": list(s.members),
        "planned_db": db(s.planned),
        "scale": round(s.scale, 4),
        "off_db": _r(s.off_db),
        "explained_db": db(s.explained),
        "excess_db": db(s.excess),
        "share_pct": s.share_pct,
    }


def _channel(c) -> dict:
    return {
        "channel": c.channel,
        "measured_total_db": db(c.measured_total),
        "predicted_total_db": db(c.predicted_total),
        "audible": c.audible,
        "margin_db": _r(c.margin_db),
        "summary": list(c.summary),
        "harmonics": [_row(r) for r in c.rows],
        "suspects": [_suspect(s) for s in c.suspects],
    }


def _bond(b) -> dict:
    return {
        "a": b.a,
        "b": b.b,
        "measured_ohm": b.measured_ohm,
        "test_current_a": b.test_current,
        "planned_ohm": b.planned_ohm,
        "limit_ohm": b.limit_ohm,
        "joints": list(b.joints),
        "location": b.location.as_dict(),
        "verdict": b.verdict,
    }


def bench_document(record) -> dict:
    """The bench record as plain data (the JSON document before serialisation).

    Parameters:
        record: the bench record.
    Returns:
        the document.
    References:
        docs/json.md (the bench document).
    """
    return clean(
        {
            "groundcheck": {"bench_schema": BENCH_SCHEMA},
            "cautions": list(record.cautions),
            "plan": {"file": record.plan_path, "title": record.plan_title},
            "unit": unit_of(record),
            "recording": _recording(record.measured),
            "channels": [_channel(c) for c in record.channels],
            "bonds": [_bond(b) for b in record.bonds],
            "findings": [f.as_dict() for f in record.findings],
            "worst": worst(record),
            "notes": list(record.notes),
        }
    )


def render_bench_json(record) -> str:
    return json_text(bench_document(record)) + "\n"


def _f(x, spec=".1f") -> str:
    return "–" if x is None else format(x, spec)


def _table(c, unit: str) -> list[str]:
    out = [
        f"  {'harmonic':>8} {'Hz':>8} {'measured':>9} {'planned':>9} {'diff':>7} {'fitted':>8}  "
        "contributors",
        f"  {'':>8} {'':>8} {unit:>9} {unit:>9} {'dB':>7} {unit:>8}",
    ]
    for r in c.rows:
        if not r.above_noise and not r.predicted:
            continue
        meas = _f(db(r.measured)) if r.above_noise else f"<{_f(db(r.noise), '.0f')}"
        diff = (
            _f(signed(20 * math.log10(r.measured / r.predicted)), "+.1f")
            if r.above_noise and r.predicted
            else "–"
        )
        mark = "  (not in the plan)" if r.unexplained else ""
        out.append(
            f"  {r.harmonic:>8} {r.frequency_hz:>8.1f} {meas:>9} {_f(db(r.predicted)):>9} "
            f"{diff:>7} {_f(db(r.fitted)):>8}  {', '.join(r.contributors) or '–'}{mark}"
        )
    return out


def _recording_text(m) -> list[str]:
    cal = f"calibrated: {m.calibration}" if m.calibrated else "not calibrated: levels in dBFS"
    return [
        f"recording {shown(m.path)}: {m.seconds:.1f} s, {m.rate} Hz, {m.bits}-bit"
        f"{' float' if m.floating else ''}, channel {m.channel + 1} of {m.channels}; {cal}",
        f"mains {m.mains_hz:.2f} Hz (nominal {m.nominal_hz:g} "
        f"Hz{'' if m.detected else ', no line found'}); {m.window}; {m.segments} segment(s) "
        "averaged",
    ]


def render_bench_text(record) -> str:
    """The bench record as plain text: cautions, recording, per channel the table, the suspects
    and the
    summary, the bonds, the findings, the notes.

    Parameters:
        record: the bench record.
    Returns:
        the text.
    References:
        none (presentation).
    """
    unit = unit_of(record)
    out = [f"groundcheck bench: {shown(record.plan_title)} ({shown(record.plan_path)})", ""]
    out += [f"! {c}" for c in record.cautions] + [""]
    if record.measured is not None:
        out += _recording_text(record.measured) + [""]
    for c in record.channels:
        verdict = {None: "audibility not judged", True: "audible", False: "inaudible"}[c.audible]
        out.append(
            f"channel {shown(c.channel)}: measured {_f(db(c.measured_total))} {unit}, planned "
            f"{_f(db(c.predicted_total))} dBV; {verdict}"
            + (
                f" (worst line {signed(c.margin_db):+.1f} dB against the threshold)"
                if c.margin_db is not None
                else ""
            )
        )
        out += _table(c, unit)
        out.append("  suspects (by hum added beyond the plan, then by hum explained):")
        for i, s in enumerate(c.suspects, 1):
            off = "not seen" if s.off_db is None else f"{signed(s.off_db):+.1f} dB"
            out.append(
                f"  {i}. {', '.join(s.members)} — {s.mechanism}; {off} against the plan, explains "
                f"{s.share_pct:.1f} % of the measured hum"
            )
        out += [f"  - {shown(s)}" for s in c.summary] + [""]
    if record.bonds:
        out.append("bonds measured:")
        for b in record.bonds:
            planned = "not joined" if b.planned_ohm is None else f"{b.planned_ohm * 1e3:.2f} mohm"
            limit = f", limit {b.limit_ohm * 1e3:.0f} mohm" if b.limit_ohm is not None else ""
            out.append(
                f"  {shown(b.location)} {shown(b.a)} to {shown(b.b)}: {b.measured_ohm * 1e3:.2f} "
                f"mohm, plan {planned}{limit}: {b.verdict}"
            )
        out.append("")
    for f in record.findings:
        out.append(f"{shown(f.location)}: {f.severity} {f.code} {shown(f.message)}")
        if f.fix:
            out.append(f"    fix: {shown(f.fix)}")
    out += [f"note: {shown(n)}" for n in record.notes]
    out.append(f"worst finding: {worst(record)}" if record.findings else "no bench finding")
    return "\n".join(out) + "\n"

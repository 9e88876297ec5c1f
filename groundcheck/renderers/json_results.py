"""The analyses' typed results as the JSON document's sections: every key named and every figure
rounded here, and nowhere else (the layout is documented in ``docs/json.md`` and held by the
schema in ``docs/schema``).

Rounding follows the figures' use: a level in dB to a hundredth, a resistance to a micro-ohm, a
current to the digits its measurement would give; :func:`groundcheck.core.plain.clean` then
limits every float to nine significant digits.
"""

from __future__ import annotations

import math

__all__ = [
    "rounded",
    "hum_json",
    "channel_json",
    "rectifier_json",
    "safety_json",
    "bonding_json",
    "device_earth_json",
    "coupling_json",
    "loop_json",
]


def rounded(x, d: int = 2):
    """``x`` rounded to ``d`` decimals; None for None or a value that is not finite."""
    if x is None:
        return None
    if isinstance(x, float) and not math.isfinite(x):
        return None
    return round(float(x), d)


def _spectrum_line(r) -> dict:
    row = {"frequency_hz": r.frequency, "volts": r.volts, "dbv": rounded(r.dbv)}
    row["volts_signed"] = r.volts_signed
    if r.threshold is not None:
        row.update(
            spl_db=rounded(r.spl), threshold_db=r.threshold, margin_db=rounded(r.spl - r.threshold)
        )
    return row


def _contributor(c) -> dict:
    return {
        "kind": c.kind,
        "element": c.element,
        "source": c.source,
        "volts": c.volts,
        "dbv": c.dbv,
        "share_pct": c.share,
    }


def channel_json(h) -> dict:
    """A channel's hum (:class:`groundcheck.physics.humtotals.ChannelHum`)."""
    return {
        "channel": h.channel,
        "total_v": h.total_v,
        "total_dbv": rounded(h.total_dbv),
        "total_signed_v": h.signed_v,
        "total_signed_dbv": rounded(h.signed_dbv),
        "signal_to_hum_db": rounded(h.signal_to_hum),
        "rated_output_v": h.rated_output,
        "audible": h.audible,
        "margin_db": rounded(h.margin_db),
        "spectrum": [_spectrum_line(r) for r in h.spectrum],
        "contributors": [_contributor(c) for c in h.contributors],
        "field_axes": [_field_axis(a) for a in h.field_axes],
        "covers": h.covers,
    }


def _crosstalk_line(x) -> dict:
    return {
        "from": x.source,
        "to": x.to,
        "frequency_hz": x.frequency,
        "volts": x.volts,
        "db": rounded(x.db),
    }


def _vector(v) -> list:
    return [round(float(x), 4) for x in v]


def _field_axis(a) -> dict:
    return {
        "source": a.source,
        "model": a.model,
        "axis_stated": a.axis_stated,
        "axis": _vector(a.axis),
        "chosen": a.chosen,
        "measure": a.measure,
        "level_v": a.level,
        "worst_axis": _vector(a.worst_axis),
        "worst_level_v": a.worst_level,
        "axes_v": dict(a.axes),
    }


def _source_pickup(s) -> dict:
    return {
        "flux_density_equiv_t": s.flux_density,
        "closest_mm": round(s.closest * 1e3, 1),
        "height_mm": round(s.height * 1e3, 3),
        "axis": _vector(s.axis),
        "axis_stated": s.axis_stated,
        "model": s.model,
        "size_mm": None if s.size is None else round(s.size * 1e3, 3),
        "per_frequency": [
            {"frequency_hz": x.frequency, "emf_v": x.emf, "current_a": x.current} for x in s.lines
        ],
    }


def _loop_pickup(lp) -> dict:
    return {
        "loop": lp.loop,
        "members": lp.members,
        "closed_by": lp.closed_by,
        "area_mm2": None if lp.area is None else lp.area * 1e6,
        "sources": {name: _source_pickup(s) for name, s in lp.sources.items()},
    }


def _feedback_line(x) -> dict:
    return {
        "source": x.source,
        "channel": x.channel,
        "frequency_hz": x.frequency,
        "volts": x.volts,
        "db": rounded(x.db),
        "input_volts": x.input_volts,
        "input_db": rounded(x.input_db),
    }


def hum_json(hum) -> dict:
    """The hum budget (:class:`groundcheck.physics.humtotals.HumResult`)."""
    return {
        "frequencies_hz": hum.frequencies,
        "channels": {k: channel_json(v) for k, v in hum.channels.items()},
        "rectifiers": [rectifier_json(r) for r in hum.rectifiers],
        "loops": [_loop_pickup(lp) for lp in hum.loops],
        "crosstalk": [_crosstalk_line(x) for x in hum.crosstalk],
        "feedback": [_feedback_line(x) for x in hum.feedback],
        "notes": hum.notes,
    }


def rectifier_json(r) -> dict:
    """A rectifier's steady state (:class:`groundcheck.physics.rectifier.RectifierResult`)."""
    out = {
        "name": r.name,
        "dc_voltage_v": round(r.dc_voltage, 4),
        "ripple_pp_v": round(r.ripple_pp, 5),
        "peak_current_a": round(r.peak_current, 5),
        "rms_current_a": round(r.rms_current, 5),
        "dc_current_a": round(r.dc_current, 6),
        "conduction_angle_deg": round(r.conduction_angle, 2),
    }
    if r.filter_current is not None:
        out.update(
            output_dc_v=round(r.output_dc, 4),
            output_ripple_pp_v=round(r.output_ripple_pp, 6),
            filter_rms_current_a=round(r.filter_rms, 6),
        )
    if r.critical_inductance is not None:
        out.update(
            critical_inductance_h=round(r.critical_inductance, 5),
            continuous_conduction=r.continuous,
        )
    if r.negative:
        out.update(polarity="negative")
    if r.return_current is not None:
        out.update(
            regulated_dc_v=round(r.output_dc, 4),
            regulated_ripple_pp_v=round(r.output_ripple_pp, 9),
            regulator_return_dc_a=round(float(r.return_current.mean()), 6),
        )
    return out


def _part_figures(p) -> dict:
    return {
        "part": p.part,
        "path_resistance_ohm": rounded(p.path_resistance, 7),
        "fault_current_a": rounded(p.fault_current, 3),
        "touch_voltage_v": rounded(p.touch_voltage, 3),
        "clear_time_s": rounded(p.clear_time, 6),
        "i2t_a2s": rounded(p.i2t, 3),
        "device": p.device,
        "prearc_s": rounded(p.prearc, 6),
        "arcing_s": rounded(p.arcing, 6),
        "stated_in_plan": list(p.stated),
    }


def _conductor_check(c) -> dict:
    return {
        "conductor": c.conductor,
        "area_mm2": round(c.area * 1e6, 4),
        "k": c.k,
        "required_mm2": round(c.required * 1e6, 4),
        "survives": c.survives,
    }


def safety_json(safety) -> dict:
    """The protective-earth figures (:class:`groundcheck.physics.safety.SafetyResult`)."""
    s = safety.supply
    return {
        "limit_ohm": safety.limit,
        "standard_limit_ohm": safety.standard_limit,
        "limit_relaxed": safety.relaxed,
        "system": s.system,
        "external_loop_ohm": rounded(s.ze, 6),
        "external_loop_stated": s.ze_stated,
        "circuit_line_ohm": rounded(s.circuit_line, 6),
        "circuit_protective_ohm": rounded(s.circuit_cpc, 6),
        "cord_line_ohm": rounded(s.cord_line, 6),
        "cord_pe_ohm": rounded(s.cord_pe, 6),
        "fuse_resistance_ohm": rounded(s.fuse_resistance, 6),
        "electrode_ohm": rounded(s.electrode, 6),
        "first_fault_v": rounded(s.first_fault_v, 6),
        "max_disconnection_s": s.max_time,
        "cable_temperature_c": s.cable_temperature,
        "earth_fault_max_a": rounded(s.earth_fault_max, 3),
        "short_circuit_a": rounded(s.short_circuit, 3),
        "short_circuit_stated": s.short_circuit_stated,
        "breaking_capacity_a": rounded(s.breaking_capacity, 3),
        "parts": [_part_figures(p) for p in safety.parts],
        "conductors": [_conductor_check(c) for c in safety.conductors],
    }


def _bond_test(t) -> dict:
    return {
        "test": t.name,
        "current_a": round(t.current, 4),
        "duration_s": t.duration,
        "basis": t.basis,
    }


def _degrees(x):
    return None if x is None or math.isinf(x) else round(x, 1)


def _mm2(x):
    return None if x is None else round(x * 1e6, 4)


def conductor_heat_json(c) -> dict:
    """One conductor in one bonding test
    (:class:`groundcheck.physics.bonding_heat.ConductorHeat`)."""
    return {
        "conductor": c.conductor,
        "test": c.test,
        "current_a": round(c.current, 4),
        "area_mm2": _mm2(c.area),
        "insulation": c.insulation,
        "adiabatic_c": _degrees(c.adiabatic),
        "steady_state_c": _degrees(c.steady),
        "reached_c": _degrees(c.reached),
        "melts": c.reached is not None and math.isinf(c.reached),
        "limit_c": c.limit,
        "continuous_limit_c": c.continuous_limit,
        "passes": c.passes,
        "contact_power_w": rounded(c.power, 4),
        "contact_drop_v": rounded(c.drop, 5),
        "thicker_mm2": _mm2(c.thicker),
    }


def _part_drop(p) -> dict:
    return {
        "part": p.part,
        "test": p.test,
        "current_a": p.current,
        "path_voltage_v": round(p.voltage, 5),
        "limit_v": p.limit,
    }


def bonding_json(b) -> dict:
    """The bonding tests (:class:`groundcheck.physics.bonding_test.BondingResult`)."""
    return {
        "ambient_c": b.ambient,
        "tests": [_bond_test(t) for t in b.tests],
        "conductors": [conductor_heat_json(c) for c in b.conductors],
        "parts": [_part_drop(p) for p in b.parts],
    }


def device_earth_json(d) -> dict:
    """An installation device's earth path (:class:`groundcheck.physics.device_earth`)."""
    out = {
        "device": d.device,
        "inlet": d.inlet,
        "resistance_ohm": rounded(d.resistance, 6),
    }
    if d.fault is not None:
        out["fault"] = _part_figures(d.fault)
    if d.through:
        out["through_isolators"] = list(d.through)
    return out


def coupling_json(row) -> dict:
    """A supply return sharing conductors with a stage
    (:class:`groundcheck.physics.coupling.SharedReturn`)."""
    return {
        "source": row.source,
        "stage": row.stage,
        "transfer_ohm": row.transfer,
        "shared": list(row.shared),
    }


def loop_json(lp) -> dict:
    """A listed loop (:class:`groundcheck.rules.context.LoopInfo`)."""
    return {
        "members": list(lp.loop.nodes),
        "conductors": list(lp.loop.edges),
        "closed_by": lp.closed_by,
        "area_mm2": rounded(lp.area * 1e6 if lp.area is not None else None, 3),
        "open_at": lp.open_at,
    }

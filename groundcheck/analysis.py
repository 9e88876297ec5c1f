"""Run every analysis on a plan and gather the findings: the library's ``analyze`` entry point."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .rules.topology import LoopInfo, audit
from .physics.circuit import Circuit, build_circuit
from .physics.coupling import SHARE_THRESHOLD, Source, branch_owner, pair_tests, source_injections
from .rules.catalogue import Finding, severity_rank
from .physics.hum import HumOptions, HumResult, hum_budget
from .model.records import Plan
from .physics.rectifier import simulate
from .physics.safety import DEFAULT_PE_LIMIT, STANDARD_PE_LIMIT, DeviceEarth, SafetyResult, installation_earths, protective_figures

__all__ = ["Options", "Result", "analyze"]

#: shared-return findings listed at the most (the strongest couplings first)
MAX_SHARED_FINDINGS = 200


@dataclass(frozen=True)
class Options:
    """Settings of an analysis run (each has a command-line option of the same meaning)."""

    pe_limit: float = DEFAULT_PE_LIMIT       # Ω
    max_frequency: float = 5000.0            # Hz
    contributor_level: float = -100.0        # dBV at the output
    crosstalk_limit: float = -60.0           # dB
    hum: bool = True                         # run the electrical hum budget
    jobs: int = 1                            # processes for the hum budget's frequencies


@dataclass
class Result:
    """Everything groundcheck found and computed for one plan."""

    plan: Plan
    findings: list[Finding]
    loops: list[LoopInfo]
    loop_total: int
    circuit: Circuit | None = None
    safety: SafetyResult | None = None
    hum: HumResult | None = None
    coupling: list[dict] = field(default_factory=list)
    options: Options = field(default_factory=Options)
    device_earths: tuple[DeviceEarth, ...] | None = None
    notices: list[str] = field(default_factory=list)      # what was relaxed or skipped: shown in every output
    protective: frozenset = frozenset()                    # conductors protective by topology or role (earthing.py)

    def counts(self) -> dict[str, int]:
        out = {"danger": 0, "fault": 0, "warning": 0, "note": 0}
        for f in self.findings:
            out[f.severity] += 1
        return out

    def worst(self) -> str | None:
        return min((f.severity for f in self.findings), key=severity_rank, default=None)


def _shared_returns(plan: Plan, circuit: Circuit) -> tuple[list[Finding], list[dict]]:
    """GC102: supply-return currents whose path shares conductors with a sensitive pair (resistive, DC)."""
    # a unit current between each source's ends shows the sharing: rectifiers need no simulation here
    sources = [Source(r.name, "rectifier", r.a, r.b, {0.0: 1.0}, r.channel, r.location) for r in plan.rectifiers]
    sources += [Source(c.name, "current", c.a, c.b, {0.0: 1.0}, c.channel, c.location) for c in plan.currents if c.role != "signal"]
    sources += [Source(h.name, "heater", h.a, h.b, {0.0: 1.0}, None, h.location) for h in plan.heaters if h.a and h.b]
    stages = list(plan.stages)
    if not sources or not stages:
        return [], []
    _, labels = circuit.components
    fac = circuit.at(0.0)
    src = fac.solve(source_injections(circuit, sources, 0.0))
    split = np.array([labels[circuit.point_node[st.a]] != labels[circuit.point_node[st.b]] for st in stages])
    ia = np.array([circuit.point_node[st.a] for st in stages])
    ib = np.array([circuit.point_node[st.b] for st in stages])
    # stages × sources, V per A: each stage's pair voltage from each source's unit current, which by
    # reciprocity equals Σ Z·I_source·I_test over the branches (the shares below)
    transfer = np.abs(src.V[ia] - src.V[ib])
    transfer[split] = 0.0                        # a stage across two islands has no defined pair voltage
    pairs = np.argwhere(transfer > 1e-6)
    if len(pairs) > MAX_SHARED_FINDINGS:
        order = np.argsort(-transfer[pairs[:, 0], pairs[:, 1]], kind="stable")[:MAX_SHARED_FINDINGS]
        pairs = pairs[np.sort(order)]
    # test currents only for the stages that share (not one column for every stage of a large installation)
    need = sorted({int(k) for k, _ in pairs})
    column = {k: i for i, k in enumerate(need)}
    test = fac.solve(pair_tests(circuit, [(stages[k].a, stages[k].b) for k in need]))
    owners = branch_owner(circuit)
    plan_conductors = {c.name: c for c in plan.conductors}
    W = fac.z[:, None] * src.I                                       # branches × sources
    findings, rows = [], []
    for k, si in pairs:
        s, st = sources[si], stages[k]
        if labels[circuit.point_node[s.a]] != labels[circuit.point_node[st.a]]:
            continue
        t_k = test.I[:, column[int(k)]]
        shares = W[:, si] * t_k
        carrying = (np.abs(src.I[:, si]) >= SHARE_THRESHOLD) & (np.abs(t_k) >= SHARE_THRESHOLD)
        if not carrying.any():
            continue
        tr = float(transfer[k, si])
        # name the conductors that make up most of the coupling (largest shares first, at most five)
        idx = [b for b in np.argsort(-np.abs(shares), kind="stable") if carrying[b]]
        total = np.abs(shares[idx]).sum()
        shared, acc = [], 0.0
        for b in idx:
            if owners[b] not in shared:
                shared.append(owners[b])
            acc += abs(shares[b])
            if acc >= 0.9 * total or len(shared) >= 5:
                break
        via_ic = [x for x in shared if x in plan_conductors and plan_conductors[x].kind == "interconnect"]
        rows.append({"source": s.name, "stage": st.name, "transfer_ohm": tr, "shared": shared})
        if via_ic:
            fix = (f"the current reaches the stage through the shield of {', '.join(via_ic)}: use a balanced "
                   "interconnect, or a ground-lift network on the signal side; never lift the protective earth")
        elif s.kind == "current" and any(c.name == s.name and c.role == "leakage" for c in plan.currents):
            fix = f"keep {st.a} and {st.b} off the conductors that carry {s.name}; give the stage its own reference wire"
        else:
            fix = (f"join {s.a} and {s.b} by a short wire of their own, then one wire to the star; "
                   f"take {st.b} and {st.a} to the signal star by wires that carry no supply current")
        findings.append(Finding(
            "GC102", "fault",
            f"{s.kind} return {s.name} ({s.a} → {s.b}) shares {', '.join(shared)} with stage {st.name} ({st.a} – {st.b})",
            s.location, (s.name, st.name, *shared),
            {"transfer_resistance_mohm": float(f"{tr * 1e3:.6g}"), "stage_gain_db": st.gain}, fix))
    return findings, rows


def _safety_findings(plan: Plan, safety: SafetyResult) -> list[Finding]:
    """GC206, GC207, GC208, GC211, GC214 from the protective-earth figures."""
    out = []
    m = plan.mains
    sup = safety.supply
    for p in safety.parts:
        part = plan.metal(p.part)
        figs = {"path_resistance_mohm": round(p.path_resistance * 1e3, 3), "limit_mohm": safety.limit * 1e3}
        if p.path_resistance > safety.limit:
            out.append(Finding("GC206", "danger",
                               f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the {safety.limit * 1e3:.0f} mΩ limit",
                               part.location, (p.part,), figs,
                               "shorten or thicken the protective conductor; clean and tighten the fastenings on its path"))
        elif safety.relaxed and p.path_resistance > STANDARD_PE_LIMIT:
            out.append(Finding("GC206", "note",
                               f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the "
                               f"{STANDARD_PE_LIMIT * 1e3:.0f} mΩ product-safety limit; passed only because --pe-limit relaxed "
                               f"the limit to {safety.limit * 1e3:.0f} mΩ",
                               part.location, (p.part,), {**figs, "standard_limit_mohm": STANDARD_PE_LIMIT * 1e3},
                               "shorten or thicken the protective conductor; clean and tighten the fastenings on its path"))
        out.extend(_disconnection(plan, safety, p))
    if m.fuse is None and m.clear_time is None and m.rcd is None and safety.parts:
        out.append(Finding("GC208", "note", "no fuse, breaker or RCD in the mains statement: disconnection not checked",
                           m.location, ("mains",), {}, "add e.g. ', fuse 2 A slow' to the mains statement"))
    worst = max((p.fault_current for p in safety.parts if p.fault_current is not None), default=None)
    if sup.breaking_capacity is not None and worst is not None and worst > sup.breaking_capacity:
        stated = m.breaking is not None or m.breaking_current is not None or m.fuse_kind.startswith("breaker")
        device = "breaker" if m.fuse_kind.startswith("breaker") else f"{m.breaking or 'low'}-breaking fuse"
        assumed = "" if stated else " (breaking capacity not stated: a low-breaking glass fuse assumed)"
        out.append(Finding("GC211", "danger" if stated else "warning",
                           f"a line-to-chassis fault draws up to {worst:.0f} A, beyond the {sup.breaking_capacity:.0f} A the "
                           f"{m.fuse:g} A {device} can break: it may keep arcing or burst instead of clearing{assumed}",
                           m.location, ("mains",), {"fault_current_a": round(worst, 2), "breaking_capacity_a": sup.breaking_capacity},
                           "use a fuse of a higher breaking capacity (a sand-filled ceramic, high-breaking type) of the same "
                           "rating and characteristic, and say so: ', breaking high'"))
    out.extend(_stated_contradictions(plan, safety))
    for row in safety.conductors:
        if not row.survives:
            c = plan_conductor(plan, row.conductor)
            out.append(Finding("GC207", "danger",
                               f"{row.conductor} ({row.area * 1e6:.4g} mm²) would not survive the fault until it is cleared: "
                               f"it needs {row.required * 1e6:.4g} mm² (k = {row.k:g})",
                               c.location if c else m.location, (row.conductor,), row.as_dict(),
                               "use a thicker protective conductor, or a faster or lower-rated fuse the equipment allows"))
    return out


#: a device's earth path to the main earthing terminal over this is reported, Ω: a final circuit's protective
#: conductor of 40 m of 1.5 mm² (about 0.5 Ω) plus a cord — a broken or corroded path, not a long one (common practice)
DEVICE_EARTH_LIMIT = 1.0


def _device_earth_findings(plan: Plan, earths) -> list[Finding]:
    """GC215: a placed device whose earth pin does not reach the main earthing terminal, or only through a high resistance."""
    out = []
    points = {p.name: p for p in plan.points}
    for d in earths:
        loc = points[d.inlet].location
        if d.resistance is None:
            out.append(Finding("GC215", "danger", f"device {d.device}: its earth pin does not reach the main earthing terminal "
                               "through protective conductors", loc, (d.device, d.inlet), {},
                               f"plug {d.device} into an earthed outlet and repair the protective connection on its path"))
        elif d.resistance > DEVICE_EARTH_LIMIT:
            out.append(Finding("GC215", "danger", f"device {d.device}: its earth path to the main earthing terminal is "
                               f"{d.resistance:.3g} Ω", loc, (d.device, d.inlet), {"resistance_ohm": round(d.resistance, 4)},
                               "find and repair the high-resistance joint on the path (cord, strip or building run)"))
    return out


def plan_conductor(plan: Plan, name: str):
    return next((c for c in plan.conductors if c.name == name), None)


def _device_text(m) -> str:
    parts = []
    if m.fuse is not None:
        parts.append(f"{m.fuse:g} A {m.fuse_kind.replace('breaker-', 'type ') + (' breaker' if m.fuse_kind.startswith('breaker') else ' fuse')}")
    if m.rcd is not None:
        parts.append(f"{m.rcd * 1e3:g} mA RCD")
    return " and ".join(parts) or "stated clearing"


def _disconnection(plan: Plan, safety: SafetyResult, p) -> list[Finding]:
    """GC208: the protective device does not disconnect within IEC 60364-4-41's maximum time."""
    m, sup = plan.mains, safety.supply
    if m.fuse is None and m.clear_time is None and m.rcd is None:
        return []
    part = plan.metal(p.part)
    limit = sup.max_time
    figs = {"fault_current_a": round(p.fault_current, 3), "touch_voltage_v": round(p.touch_voltage, 2),
            "max_disconnection_s": limit}
    system = "TT" if sup.system == "TT" else "TN"
    where = f"{system} at {m.voltage:g} V"
    if p.clear_time is None:
        return [Finding("GC208", "danger",
                        f"a line-to-{p.part} fault draws {p.fault_current:.3g} A, too little to be sure of opening the "
                        f"{_device_text(m)}; {p.touch_voltage:.0f} V against earth would stay on {p.part}",
                        part.location, (p.part,), figs,
                        "add a 30 mA RCD to the supply, or lower the fault loop's resistance or the fuse rating the equipment allows")]
    if limit is not None and p.clear_time > limit:
        stated = " (stated in plan)" if p.device == "stated" else ""
        return [Finding("GC208", "danger",
                        f"a line-to-{p.part} fault ({p.fault_current:.3g} A) is cleared by the {_device_text(m)} in up to "
                        f"{p.clear_time:.3g} s{stated}; IEC 60364-4-41 allows {limit:g} s ({where}), and {p.touch_voltage:.0f} V "
                        f"against earth is on {p.part} meanwhile",
                        part.location, (p.part,), {**figs, "clear_time_s": round(p.clear_time, 6)},
                        "protect the supply with a 30 mA RCD, or lower the fault loop's resistance or the fuse rating so that "
                        "the fuse clears within the limit")]
    return []


def _stated_contradictions(plan: Plan, safety: SafetyResult) -> list[Finding]:
    """GC214: a clearing time or I²t stated in the plan that the fuse table contradicts by more than 2×."""
    from .physics.protection import breaker_clearing, fuse_clearing
    m = plan.mains
    if m.fuse is None or (m.clear_time is None and m.fuse_i2t is None) or not safety.parts:
        return []
    p = max(safety.parts, key=lambda x: x.fault_current)
    if m.fuse_kind.startswith("breaker"):
        cl = breaker_clearing(m.fuse_kind.split("-", 1)[1], m.fuse, p.fault_current)
    else:
        cl = fuse_clearing(m.fuse_kind, m.fuse, p.fault_current, m.frequency)
    out = []
    for stated, table, what, unit in ((m.clear_time, cl.time if cl else None, "clearing time", "s"),
                                      (m.fuse_i2t, cl.i2t if cl else None, "I²t", "A²s")):
        if stated is None:
            continue
        if table is None or not 0.5 <= stated / table <= 2.0:
            tab = "no assured clearing" if table is None else f"{table:.3g} {unit}"
            out.append(Finding("GC214", "warning",
                               f"the plan states a {what} of {stated:.3g} {unit}; the {_device_text(m)}'s time-current limits "
                               f"give {tab} at {p.fault_current:.3g} A",
                               m.location, ("mains",), {"stated": stated, "table": table},
                               f"check the stated {what} against the fuse maker's data sheet, or remove it to use the table"))
    return out


def _hum_findings(plan: Plan, hum: HumResult, opts: Options) -> list[Finding]:
    out = []
    conductors = {c.name: c for c in plan.conductors}
    stages_by_ch: dict[str, list] = {}
    for s in plan.stages:
        stages_by_ch.setdefault(s.channel, []).append(s)
    for ch, h in hum.channels.items():
        loc = stages_by_ch[ch][0].location
        for c in h.contributors:
            if c["dbv"] is None or c["dbv"] < opts.contributor_level or c["share_pct"] < 10:
                continue
            if c["kind"] == "conductor":
                cond = conductors.get(c["element"])
                if cond is not None and cond.role == "protective":
                    fix = (f"the drop along protective conductor {c['element']} reaches the stage through a loop: break "
                           "the loop on the signal side (balanced interconnect or ground-lift network); never lift the "
                           "protective earth")
                else:
                    fix = f"move the {c['source']} current off {c['element']}: give it a return path of its own"
                out.append(Finding("GC301", "warning",
                                   f"{c['element']} puts {c['dbv']:.1f} dBV of {c['source']} hum and buzz at the {ch} output "
                                   f"({c['share_pct']:.0f} % of the channel's total)",
                                   cond.location if cond else loc, (c["element"], c["source"]),
                                   {"level_dbv": c["dbv"], "share_pct": c["share_pct"], "channel": ch}, fix))
            else:
                out.append(Finding("GC302", "warning",
                                   f"{c['element']} picks up {c['dbv']:.1f} dBV from {c['source']} at the {ch} output "
                                   f"({c['share_pct']:.0f} % of the channel's total)",
                                   loc, (c["element"], c["source"]), {"level_dbv": c["dbv"], "share_pct": c["share_pct"], "channel": ch},
                                   "open the loop, or make it smaller and move it away from the field source"))
        if h.audible:
            top = ", ".join(c["element"] for c in h.contributors[:3])
            out.append(Finding("GC303", "fault",
                               f"hum in the {ch} channel is audible at the listening position: {h.margin_db:.1f} dB above the "
                               f"threshold of hearing (total {h.total_dbv:.1f} dBV at the output)",
                               loc, (ch, *[c["element"] for c in h.contributors[:3]]),
                               {"margin_db": round(h.margin_db, 2), "total_dbv": round(h.total_dbv, 2),
                                "signal_to_hum_db": round(h.signal_to_hum, 2)},
                               f"fix the main contributors: {top}"))
    for row in hum.crosstalk:
        if row["frequency_hz"] == 1000.0 and row["db"] is not None and row["db"] > opts.crosstalk_limit:
            loc = stages_by_ch[row["to"]][0].location
            out.append(Finding("GC304", "warning",
                               f"crosstalk from {row['from']} into {row['to']} is {row['db']:.1f} dB at 1 kHz",
                               loc, (str(row["from"]), row["to"]), {"crosstalk_db": row["db"]},
                               "give each channel its own return to the star; join the channels at one point only"))
    return out


def analyze(plan: Plan, options: Options = Options()) -> Result:
    """Audit a plan's topology, solve its network, and compute its protective-earth and hum figures."""
    from .core.runtime import no_gc
    with no_gc():
        return _analyze(plan, options)


def _analyze(plan: Plan, options: Options) -> Result:
    findings, ctx = audit(plan)
    result = Result(plan, findings, ctx.loops, ctx.loop_total, options=options, notices=_notices(plan, options),
                    protective=ctx.route.conductors)
    if not plan.points and not plan.metals:
        return _finish(result)
    circuit = build_circuit(plan)
    result.circuit = circuit
    _, labels = circuit.components
    for st in plan.stages:
        if labels[circuit.point_node[st.a]] != labels[circuit.point_node[st.b]]:
            findings.append(Finding("GC401", "note", f"stage {st.name}: {st.a} and {st.b} are not connected to each other",
                                    st.location, (st.name, st.a, st.b), {},
                                    "connect both points of the stage to the ground system"))
    shared, rows = _shared_returns(plan, circuit)
    findings.extend(shared)
    result.coupling = rows
    safety = protective_figures(plan, ctx.route, options.pe_limit)
    result.safety = safety
    if safety is not None:
        findings.extend(_safety_findings(plan, safety))
    earths = installation_earths(plan, ctx.route)
    result.device_earths = earths
    if earths is not None:
        findings.extend(_device_earth_findings(plan, earths))
    if options.hum and plan.stages:
        rr = {r.name: simulate(r, plan.frequency) for r in plan.rectifiers}
        hum = hum_budget(plan, circuit, ctx.loops, rr,
                         HumOptions(options.max_frequency, options.contributor_level, options.crosstalk_limit),
                         jobs=options.jobs)
        result.hum = hum
        findings.extend(_hum_findings(plan, hum, options))
    return _finish(result)


def _notices(plan: Plan, options: Options) -> list[str]:
    """What this run relaxed or skipped, said in every output format."""
    out = []
    if options.pe_limit > STANDARD_PE_LIMIT * (1 + 1e-9) and plan.mains is not None:
        out.append(f"protective-path limit relaxed to {options.pe_limit * 1e3:g} mΩ by --pe-limit (the product-safety "
                   f"limit is {STANDARD_PE_LIMIT * 1e3:g} mΩ; paths over it are listed as notes)")
    if not options.hum and plan.stages:
        out.append("hum and buzz budget skipped (--no-hum): no hum figures or hum findings")
    elif plan.stages and options.max_frequency < plan.frequency:
        out.append(f"--max-frequency {options.max_frequency:g} Hz is below the mains frequency ({plan.frequency:g} Hz): "
                   "no hum line was computed")
    return out


def _finish(result: Result) -> Result:
    result.findings = sorted(result.findings, key=lambda f: f.sort_key())
    return result

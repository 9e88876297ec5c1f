"""Run every analysis on a plan and gather the findings: the library's ``analyze`` entry point."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .audit import LoopInfo, audit
from .circuit import Circuit, build_circuit
from .coupling import SHARE_THRESHOLD, Source, branch_owner, pair_tests, source_injections
from .findings import Finding, severity_rank
from .hum import HumOptions, HumResult, hum_budget
from .model import Plan
from .rectifier import simulate
from .safety import DEFAULT_PE_LIMIT, TOUCH_LIMIT, SafetyResult, protective_figures

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
    out = []
    m = plan.mains
    for p in safety.parts:
        part = plan.metal(p.part)
        if p.path_resistance > safety.limit:
            out.append(Finding("GC206", "danger",
                               f"protective path to {p.part} is {p.path_resistance * 1e3:.1f} mΩ, over the {safety.limit * 1e3:.0f} mΩ limit",
                               part.location, (p.part,), {"path_resistance_mohm": round(p.path_resistance * 1e3, 3),
                                                          "limit_mohm": safety.limit * 1e3},
                               "shorten or thicken the protective conductor; clean and tighten the fastenings on its path"))
        if m.fuse is None and m.clear_time is None:
            continue
        if p.clear_time is None:
            out.append(Finding("GC208", "danger",
                               f"a line-to-{p.part} fault draws {p.fault_current:.0f} A, too little to be sure of opening "
                               f"the {m.fuse:g} A {m.fuse_kind} device; the touch voltage would stay at {p.touch_voltage:.0f} V",
                               part.location, (p.part,), {"fault_current_a": round(p.fault_current, 2),
                                                          "touch_voltage_v": round(p.touch_voltage, 2)},
                               "lower the protective path's resistance or use a lower-rated fuse the equipment allows"))
        elif p.touch_voltage > TOUCH_LIMIT and p.clear_time > 0.4:
            out.append(Finding("GC208", "danger",
                               f"a fault at {p.part} leaves {p.touch_voltage:.0f} V on it for up to {p.clear_time:.2g} s",
                               part.location, (p.part,), {"touch_voltage_v": round(p.touch_voltage, 2), "clear_time_s": p.clear_time},
                               "lower the protective path's resistance so the fuse opens faster"))
    if m.fuse is None and m.clear_time is None and safety.parts:
        out.append(Finding("GC208", "note", "no fuse or breaker rating in the mains statement: fault clearing not checked",
                           m.location, ("mains",), {}, "add e.g. ', fuse 2 A slow' to the mains statement"))
    conductors = {c.name: c for c in plan.conductors}
    for row in safety.conductors:
        if not row["survives"]:
            c = conductors.get(row["conductor"])
            out.append(Finding("GC207", "danger",
                               f"{row['conductor']} ({row['area_mm2']} mm²) would not survive the fault until the fuse opens: "
                               f"it needs {row['required_mm2']} mm² (k = {row['k']:g})",
                               c.location if c else m.location, (row["conductor"],), dict(row),
                               "use a thicker protective conductor, or a faster or lower-rated fuse the equipment allows"))
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
    from .loader import no_gc
    with no_gc():
        return _analyze(plan, options)


def _analyze(plan: Plan, options: Options) -> Result:
    findings, ctx = audit(plan)
    result = Result(plan, findings, ctx.loops, ctx.loop_total, options=options)
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
    safety = protective_figures(plan, options.pe_limit)
    result.safety = safety
    if safety is not None:
        findings.extend(_safety_findings(plan, safety))
    if options.hum and plan.stages:
        rr = {r.name: simulate(r, plan.frequency) for r in plan.rectifiers}
        hum = hum_budget(plan, circuit, ctx.loops, rr,
                         HumOptions(options.max_frequency, options.contributor_level, options.crosstalk_limit),
                         jobs=options.jobs)
        result.hum = hum
        findings.extend(_hum_findings(plan, hum, options))
    return _finish(result)


def _finish(result: Result) -> Result:
    result.findings = sorted(result.findings, key=lambda f: f.sort_key())
    return result

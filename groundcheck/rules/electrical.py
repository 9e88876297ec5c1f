"""Rules on the electrical results: shared returns (GC102), hum contributors, loop pickup,
audibility and crosstalk (GC301–GC304), and network islands (GC401).  Each is a pure function of
:class:`Solved`."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..model.kinds import LEAKAGE, PROTECTIVE, SIGNAL, carries_load, joins_devices
from ..core.units import dbv
from .catalogue import Finding
from .context import AuditContext
from .registry import rule
from .results import Options

if TYPE_CHECKING:
    from ..model.records import Plan
    from ..physics.bonding_test import BondingResult
    from ..physics.circuit import Circuit
    from ..physics.coupling import SharedReturn
    from ..physics.hum import HumResult
    from ..physics.device_earth import DeviceEarth
    from ..physics.safety import SafetyResult

__all__ = [
    "Solved",
    "rule_shared_returns",
    "rule_islands",
    "rule_hum",
    "rule_loop_near_source",
    "series_runs",
]


@dataclass(frozen=True)
class Solved:
    """What the rules on electrical results read: the plan, its audit context and every analysis
    result."""

    plan: Plan
    ctx: AuditContext
    circuit: Circuit
    coupling: list[SharedReturn]
    safety: SafetyResult | None
    device_earths: tuple[DeviceEarth, ...] | None
    hum: HumResult | None
    options: Options
    bonding: BondingResult | None = None  # the product bonding test (physics.bonding_test)


@rule("GC102", needs="solve")
def rule_shared_returns(s: Solved) -> list[Finding]:
    """GC102: a supply-return current that shares conductors with a stage's sensitive pair.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC102 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    plan_conductors = {c.name: c for c in s.plan.conductors}
    leak = {c.name for c in s.plan.currents if c.role == LEAKAGE}
    channels = {st.name: st.channel for st in s.plan.stages}
    out = []
    for row in s.coupling:
        fix = _shared_fix(row, plan_conductors, leak)
        figures = {
            "transfer_resistance_mohm": float(f"{row.transfer * 1e3:.6g}"),
            "stage_gain_db": row.stage_gain,
        }
        severity, heard = "fault", ""
        level = _source_level(s, row, channels.get(row.stage))
        if level is None and not s.options.hum:
            heard = (
                "; not weighed against the hum budget (the hum figures were not computed: "
                "--no-hum), so it stays a fault; without --no-hum the budget says whether it is "
                "heard"
            )
        if level is not None:
            if level > 0:
                figures["level_dbv"] = round(dbv(level), 1)
            if level <= 0 or dbv(level) < s.options.contributor_level:
                severity = "note"
                heard = (
                    f"; the hum budget puts it at {dbv(level):.1f} dBV at the "
                    f"{channels[row.stage]} output, below the {s.options.contributor_level:g} dBV "
                    "contributor level"
                    if level > 0
                    else f"; the hum budget finds none of it at the {channels[row.stage]} output"
                )
        out.append(
            Finding(
                "GC102",
                severity,
                f"{'leakage current' if row.source in leak else f'{row.kind} return'} "
                f"{row.source} ({row.a} → {row.b}) shares {', '.join(row.shared)} with stage "
                f"{row.stage} ({row.stage_a} – {row.stage_b}){heard}",
                row.location,
                (row.source, row.stage, *row.shared),
                figures,
                fix,
            )
        )
    return out


def _shared_fix(row, plan_conductors: dict, leak: set) -> str:
    """What to do about one shared return: by where its current meets the stage (an interconnect's
    shield, balanced or not; a leakage current; a supply return)."""
    via_ic = [x for x in row.shared if x in plan_conductors and joins_devices(plan_conductors[x])]
    if via_ic and all(plan_conductors[x].balanced for x in via_ic):
        fix = (
            f"the current reaches the stage along the shield of {', '.join(via_ic)}, which the "
            "balanced input rejects by its common-mode rejection (the hum budget gives what is "
            "left); if it is heard, use an input of better rejection or a ground-lift network on "
            "the signal side; never lift the protective earth"
        )
    elif via_ic:
        fix = (
            f"the current reaches the stage through the shield of {', '.join(via_ic)}: use a "
            "balanced interconnect, or a ground-lift network on the signal side; never lift the "
            "protective earth"
        )
    elif row.kind == "current" and row.source in leak:
        fix = (
            f"keep {row.stage_a} and {row.stage_b} off the conductors that carry {row.source}; "
            "give the stage its own reference wire"
        )
    else:
        fix = (
            f"join {row.a} and {row.b} by a short wire of their own, then one wire to the star; "
            f"take {row.stage_b} and {row.stage_a} to the signal star by wires that carry no "
            "supply current"
        )
    return fix


def _source_level(s: Solved, row, channel: str | None) -> float | None:
    """The worst-case level (V) that a shared return's source puts at its stage's channel output,
    from the hum budget; None without one (no hum budget, or the channel not in it)."""
    if s.hum is None or channel not in s.hum.levels:
        return None
    group = "rectifier charging" if row.kind == "rectifier" else f"{row.kind}:{row.source}"
    return s.hum.levels[channel].get(group, 0.0)


@rule("GC401", needs="solve")
def rule_islands(s: Solved) -> list[Finding]:
    """GC401: a stage whose two points lie in parts of the network that are not connected.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC401 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    _, labels = s.circuit.components
    node = s.circuit.point_node
    return [
        Finding(
            "GC401",
            "note",
            f"stage {st.name}: {st.a} and {st.b} are not connected to each other",
            st.location,
            (st.name, st.a, st.b),
            {},
            "connect both points of the stage to the ground system",
        )
        for st in s.plan.stages
        if labels[node[st.a]] != labels[node[st.b]]
    ]


@rule("GC301", "GC302", "GC303", "GC304", needs="solve", hum=True)
def rule_hum(s: Solved) -> list[Finding]:
    """GC301–GC304: hum contributors, loop pickup, audibility and crosstalk from the hum budget.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC301–GC304 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    if s.hum is None:
        return []
    plan, hum, opts = s.plan, s.hum, s.options
    runs = series_runs(s.ctx)
    out = []
    conductors = {c.name: c for c in plan.conductors}
    # currents that reach a stage only round a loop through the installation: leakage, and the EMF
    # of loaded cables
    loop_driven = {c.name for c in plan.currents if c.role == LEAKAGE} | {
        f"{c.name}.induced" for c in plan.conductors if carries_load(c)
    }
    stages_by_ch: dict[str, list] = {}
    for st in plan.stages:
        stages_by_ch.setdefault(st.channel, []).append(st)
    solved = s
    for ch, h in hum.channels.items():
        loc = stages_by_ch[ch][0].location
        for c in _by_run(h.contributors, runs):
            if c["dbv"] is None or c["dbv"] < opts.contributor_level or c["share_pct"] < 10:
                continue
            if c["kind"] == "conductor":
                cond = conductors.get(c["element"])
                fix = _contributor_fix(c["element"], c["source"], cond, loop_driven)
                run = c.get("run", (c["element"],))
                what = run[0] if len(run) == 1 else f"{', '.join(run)} (in series)"
                out.append(
                    Finding(
                        "GC301",
                        "warning",
                        f"{what} {'puts' if len(run) == 1 else 'put'} {c['dbv']:.1f} dBV of "
                        f"{c['source']} hum and buzz at the {ch} output ({c['share_pct']:.0f} % "
                        "of the channel's total)",
                        cond.location if cond else loc,
                        (run[0], c["source"], *run[1:]),
                        {"level_dbv": c["dbv"], "share_pct": c["share_pct"], "channel": ch},
                        fix,
                    )
                )
            else:
                out.append(
                    Finding(
                        "GC302",
                        "warning",
                        f"{c['element']} picks up {c['dbv']:.1f} dBV from {c['source']} at the "
                        f"{ch} output ({c['share_pct']:.0f} % of the channel's total)",
                        loc,
                        (c["element"], c["source"]),
                        {"level_dbv": c["dbv"], "share_pct": c["share_pct"], "channel": ch},
                        "open the loop, or make it smaller and move it away from the field source",
                    )
                )
        if h.audible:
            out.append(_audible(ch, h, loc))
    for row in hum.crosstalk:
        if (
            row["frequency_hz"] == 1000.0
            and row["db"] is not None
            and row["db"] > opts.crosstalk_limit
        ):
            loc = stages_by_ch[row["to"]][0].location
            out.append(
                Finding(
                    "GC304",
                    "warning",
                    f"crosstalk from {row['from']} into {row['to']} is {row['db']:.1f} dB "
                    "at 1 kHz",
                    loc,
                    (str(row["from"]), row["to"]),
                    {"crosstalk_db": row["db"]},
                    _crosstalk_fix(solved, str(row["from"]), row["to"]),
                )
            )
    return out


def _crosstalk_fix(s: Solved, talker: str, listener: str) -> str:
    """What to do about crosstalk from channel ``talker`` into ``listener`` (GC304): name the
    conductors that the talker's signal current and the listener's stages share (least-resistance
    paths), as the place to act."""
    from ..physics.coupling import pair_path

    def owners(a: str, b: str) -> list[str]:
        return [s.circuit.branches[i].owner for i, _ in pair_path(s.circuit, a, b)]

    carried = {
        o
        for cur in s.plan.currents
        if cur.channel == talker and cur.role == SIGNAL
        for o in owners(cur.a, cur.b)
    }
    shared = sorted(
        {
            o
            for st in s.plan.stages
            if st.channel == listener
            for o in owners(st.a, st.b)
            if o in carried and o
        }
    )
    if not shared:
        return "give each channel its own return to the star; join the channels at one point only"
    return (
        f"the {talker} channel's return shares {', '.join(shared)} with the {listener} channel's "
        "reading: give each channel its own return up to the one point where they must meet, and "
        "keep what stays shared short and thick (a common shared by design, as a headphone "
        "lead's, gives crosstalk of about its resistance over the load's)"
    )


def series_runs(ctx: AuditContext) -> dict[str, tuple[str, ...]]:
    """Conductors in series: joined end to end at points where nothing else meets, no current
    enters and no stage reads, they carry one current and a stage sees their drops alike (by
    reciprocity, an EMF anywhere along the run drives the same currents), so a conductor written
    in two pieces is judged as one.

    Parameters:
        ctx: the audit context.
    Returns:
        each conductor of a run of two or more -> the run's conductors, sorted by name.
    References:
        Kirchhoff's current law (one current through a node with two branches and no source).
    """
    plan, G, cond = ctx.plan, ctx.G, ctx.conductors
    fed = {e for x in (*plan.currents, *plan.rectifiers, *plan.heaters) for e in (x.a, x.b)}
    fed |= {r.filter_point for r in plan.rectifiers}
    fed |= {e for st in plan.stages for e in (st.a, st.b, st.named)}
    read = {st.across for st in plan.stages}
    joined: dict[str, set[str]] = {}
    for p in G.nodes:
        if p in ctx.metals or p in fed:
            continue
        keys = [k for _, v, k in G.edges(p, keys=True) if v != p]
        if len(keys) != 2 or len(set(keys)) != 2 or not all(k in cond for k in keys):
            continue
        if any(not cond[k].connects or carries_load(cond[k]) or k in read for k in keys):
            continue
        run = joined.get(keys[0], {keys[0]}) | joined.get(keys[1], {keys[1]})
        for k in run:
            joined[k] = run
    return {k: tuple(sorted(run)) for k, run in joined.items()}


def _by_run(contributors: list[dict], runs: dict) -> list[dict]:
    """The contributors with those of one run and one source merged into one (at the place of the
    first): levels and shares added — exact for pieces of one kind and size, whose drops are in
    phase, an upper bound on the level otherwise."""
    out: list[dict] = []
    merged: dict[tuple, dict] = {}
    for c in contributors:
        run = runs.get(c["element"]) if c["kind"] == "conductor" else None
        if run is None:
            out.append(c)
            continue
        key = (run, c["source"])
        if key not in merged:
            merged[key] = dict(c, element=run[0], run=run, parts=[c])
            out.append(merged[key])
        else:
            m = merged[key]
            m["parts"].append(c)
            m["volts"] += c["volts"]
            m["share_pct"] = round(m["share_pct"] + c["share_pct"], 1)
            m["dbv"] = round(dbv(m["volts"]), 2)  # as the hum budget gives a level
    return out


def _contributor_fix(element: str, source: str, cond, loop_driven: set) -> str:
    """What to do about a conductor that carries a hum source's current to a stage (GC301)."""
    if cond is not None and cond.role == PROTECTIVE:
        return (
            f"the drop along protective conductor {element} reaches the stage through a loop: "
            "break the loop on the signal side (balanced interconnect or ground-lift network); "
            "never lift the protective earth"
        )
    if source in loop_driven and cond is not None and joins_devices(cond):
        if cond.balanced:
            return (
                f"{source} drives current round the loop along the shield of {element}: land the "
                "shield on the chassis where it enters at both ends ('shield-to chassis'), so "
                "that it stays out of the signal grounds; never lift the protective earth"
            )
        return (
            f"{source} drives current round the loop along the shield of {element}: use a "
            "balanced interconnect (its shield on the chassis where it enters), or a ground-lift "
            "network on the signal side; never lift the protective earth"
        )
    if source in loop_driven:
        return (
            f"{source} drives current round a loop through {element}, between an interconnect's "
            "shield and the protective earth: land that shield on the chassis where it enters "
            "('shield-to chassis'), or break the loop on the signal side; never lift the "
            "protective earth"
        )
    return f"move the {source} current off {element}: give it a return path of its own"


def _audible(ch: str, h, loc) -> Finding:
    """GC303: a channel whose hum is above the threshold of hearing, naming its three main
    contributors."""
    top: list[str] = []
    for c in h.contributors:
        label = f"{c['element']} ({c['source']}, {c['share_pct']:.0f} %)"
        if c["element"] not in [t.split(" (")[0] for t in top]:
            top.append(label)
        if len(top) == 3:
            break
    return Finding(
        "GC303",
        "fault",
        f"hum in the {ch} channel is above the ISO 226 threshold of hearing at the listener's "
        f"seat by {h.margin_db:.1f} dB (total {h.total_dbv:.1f} dBV at the output)",
        loc,
        (ch, *dict.fromkeys(c["element"] for c in h.contributors[:3])),
        {
            "margin_db": round(h.margin_db, 2),
            "total_dbv": round(h.total_dbv, 2),
            "signal_to_hum_db": round(h.signal_to_hum, 2),
        },
        "fix the main contributors first: " + "; ".join(top),
    )


@rule("GC305", needs="solve", hum=True)
def rule_loop_near_source(s: Solved) -> list[Finding]:
    """GC305: a loop that passes within a field source's size (or, with no size, its reference
    distance).

    Parameters:
        s: the solved network with its context.
    Returns:
        GC305 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    if s.hum is None:
        return []
    fields = {f.name: f for f in s.plan.fields}
    out = []
    for row in s.hum.loops:
        for name, entry in row["sources"].items():
            src = fields.get(name)
            if src is None:  # an AC heater pair: no size to be inside
                continue
            limit = src.size if src.size is not None else src.r_ref
            if entry["closest_mm"] * 1e-3 >= limit:
                continue
            if src.size is not None:
                what = (
                    f"inside its size ({src.size * 1e3:g} mm): its pickup is taken from the ring "
                    "model, exact at any distance for a round source"
                )
                fix = (
                    f"nothing to correct in the figure; to lower loop {row['loop']}'s pickup, "
                    f"route its conductors away from {name} or open it (the loop's own findings "
                    "say where)"
                )
            else:
                what = (
                    f"inside the {src.r_ref * 1e3:g} mm at which its strength is stated: the "
                    "point-dipole law is an extrapolation there"
                )
                fix = (
                    f"state the size of {name} ('size 60 mm') and its height, or route the loop "
                    "away from it"
                )
            out.append(
                Finding(
                    "GC305",
                    "note",
                    f"loop {row['loop']} passes {entry['closest_mm']:g} mm from the centre of "
                    f"{name}, {what}",
                    src.location,
                    (f"loop {row['loop']}", name),
                    {"closest_mm": entry["closest_mm"], "limit_mm": round(limit * 1e3, 3)},
                    fix,
                )
            )
    return out

"""Rules on the hum budget (:mod:`groundcheck.physics.hum`): hum contributors, loop pickup,
audibility and crosstalk (GC301–GC304), and loops that pass too close to a field source for its
model (GC305).

Pure functions of the solved network (:class:`~groundcheck.rules.electrical.Solved`), registered
under their codes (:mod:`groundcheck.rules.registry`); conductors in series are judged as one
(:func:`series_runs`).
"""

from __future__ import annotations

from dataclasses import replace

from ..model.kinds import SIGNAL, carries_load, joins_devices
from ..physics.hum_rows import Contributor
from ..physics.sources import LEAKAGE_GROUP
from ..physics.humsettings import (
    SIGNAL_FREQUENCY_TEXT,
    at_signal_frequency,
    far_below_hearing,
)
from .catalogue import Finding
from .hum_fixes import contributor_fix, pickup_fix
from .context import AuditContext
from .electrical import Solved
from .registry import rule

__all__ = ["rule_hum", "rule_loop_near_source", "series_runs"]

#: a contributor's least share of its channel's hum power for GC301/GC302, %, less rounding
TENTH = 10.0 - 1e-9


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
    plan = s.plan
    runs = series_runs(s.ctx)
    # currents reaching a stage only round a loop through the installation: leakage, cables' EMF
    leakage = plan.index.leakage
    loop_driven = (
        leakage
        | ({LEAKAGE_GROUP} if leakage else set())
        | {f"{c.name}.induced" for c in plan.conductors if carries_load(c)}
    )
    stages_by_ch: dict[str, list] = {}
    for st in plan.stages:
        stages_by_ch.setdefault(st.channel, []).append(st)
    out = []
    for ch, h in s.hum.channels.items():
        loc = stages_by_ch[ch][0].location
        out += _contributors(s, h, _by_run(h.contributors, runs), loc, loop_driven)
        if h.audible:
            out.append(_audible(ch, h, loc, loop_driven))
    out += _crosstalk(s, stages_by_ch)
    return out


def _contributors(s: Solved, h, contributors, loc, loop_driven: set) -> list[Finding]:
    """GC301 for each conductor (or run in series), GC302 for each loop, whose share of a
    channel's hum is above the contributor level and at least a tenth of the total; GC302 also
    for a loop heard on its own at the listener's seat (a 60 Hz pickup under a 120 Hz buzz)."""
    opts, ch = s.options, h.channel
    conductors = s.plan.index.conductors
    # a channel 20 dB or more below hearing at the listener's seat (the project's margin for an
    # estimate): its contributors are said as notes, the margin with them
    quiet = far_below_hearing(s.hum, ch)
    sev = "note" if quiet else "warning"
    heard = (
        f"; the channel stays {-s.hum.channels[ch].margin_db:.1f} dB below hearing at the "
        "listener's seat"
        if quiet
        else ""
    )
    out = []
    for c in contributors:
        # (to rounding: a share of exactly a tenth, split in two pieces, still meets it)
        if c.dbv < opts.contributor_level - 1e-9:
            continue
        share = _share_words(h, c)
        if share is None:
            continue
        if c.kind == "conductor":
            cond = conductors.get(c.element)
            fix = contributor_fix(c.element, c.source, cond, loop_driven)
            run = c.run or (c.element,)
            what = run[0] if len(run) == 1 else f"{', '.join(run)} (in series)"
            out.append(
                Finding(
                    "GC301",
                    sev,
                    f"{what} {'puts' if len(run) == 1 else 'put'} {c.dbv:.1f} dBV of "
                    f"{c.source} hum and buzz at the {ch} output ({share}){heard}",
                    cond.location if cond else loc,
                    (run[0], c.source, *run[1:]),
                    {"level_dbv": c.dbv, "share_pct": c.share, "channel": ch},
                    fix,
                )
            )
        elif c.kind == "loop":  # (a fed stage's supply ripple is no loop: GC303 counts it)
            out.append(
                Finding(
                    "GC302",
                    sev,
                    f"{c.element} picks up {c.dbv:.1f} dBV from {c.source} at the "
                    f"{ch} output ({share}){heard}",
                    loc,
                    (c.element, c.source),
                    {"level_dbv": c.dbv, "share_pct": c.share, "channel": ch},
                    pickup_fix(s.plan, c.source),
                )
            )
    return out


def _share_words(h, c) -> str | None:
    """How a contributor's part of the channel is said, or None when it is no finding: a tenth of
    the total or more; a loop's pickup is a source of its own and is said also when heard alone
    (a 60 Hz line under a louder 120 Hz buzz has a share of nothing); a conductor's drop is one
    piece of its source's path, and one that cancels part of the rest is never one to remove."""
    share = f"{c.share:.0f} % of the channel's total"
    if c.share >= TENTH:
        return share
    if c.kind != "loop" or c.share < 0:
        return None
    alone = h.heard_alone(c.kind, c.run or (c.element,), c.source)
    if alone is None or alone <= 0:
        return None
    if c.share < 0.5:
        share = "under 1 % of the channel's total"
    return share + f", heard on its own at the listener's seat by {alone:.1f} dB"


def _crosstalk(s: Solved, stages_by_ch: dict) -> list[Finding]:
    """GC304: crosstalk at the signal frequency between channels above the limit."""
    out = []
    fed = _fed_by(s)
    for row in s.hum.crosstalk:
        if (
            at_signal_frequency(row.frequency)
            and row.db > s.options.crosstalk_limit
            and (str(row.source), row.to) not in fed
        ):
            loc = stages_by_ch[row.to][0].location
            out.append(
                Finding(
                    "GC304",
                    "warning",
                    f"crosstalk from {row.source} into {row.to} is {row.db:.1f} dB "
                    f"at {SIGNAL_FREQUENCY_TEXT}",
                    loc,
                    (str(row.source), row.to),
                    {"crosstalk_db": row.db},
                    _crosstalk_fix(s, str(row.source), row.to),
                )
            )
    return out


def _fed_by(s: Solved) -> set:
    """(talker, listener) pairs where the listener channel carries the talker's own signal: its
    stages read a link that leaves a device whose stages are all the talker's (a guitar head's
    line out into the PA's channel): the talker's signal is meant to be there, so no crosstalk.
    A device of two channels (a stereo preamplifier) never says which one a link carries."""
    device_of = s.plan.index.device_of
    channels: dict = {}
    for st in s.plan.stages:
        dev = device_of(st.name)
        if dev is not None:
            channels.setdefault(dev, set()).add(st.channel)
    links = {c.name: c for c in s.plan.conductors if joins_devices(c)}
    out = set()
    for st in s.plan.stages:
        c = links.get(st.name.removesuffix(".input"))
        only = channels.get(device_of(c.a)) if c is not None else None
        if only is not None and len(only) == 1 and st.channel not in only:
            out.add((next(iter(only)), st.channel))
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
    fed |= {r.regulator_point for r in plan.rectifiers}
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


def _by_run(contributors: list[Contributor], runs: dict) -> list[Contributor]:
    """The contributors with those of one run and one source merged into one (at the place of the
    first): levels and shares added — exact for pieces of one kind and size, whose drops are in
    phase, an upper bound on the level otherwise."""
    out: list[Contributor] = []
    merged: dict[tuple, Contributor] = {}
    for c in contributors:
        run = runs.get(c.element) if c.kind == "conductor" else None
        if run is None:
            out.append(c)
            continue
        key = (run, c.source)
        if key not in merged:
            merged[key] = replace(c, element=run[0], run=run, parts=[c])
            out.append(merged[key])
        else:
            m = merged[key]
            m.parts.append(c)
            m.volts += c.volts
            m.share += c.share
    return out


def _audible(ch: str, h, loc, loop_driven=frozenset()) -> Finding:
    """GC303: a channel whose hum is above the threshold of hearing, naming its three main
    contributors (the first, when it comes round the installation, with what opens its loop)."""
    top: list[str] = []
    for c in h.contributors:
        if c.share < 0 or (top and c.share < 0.5):
            continue  # one that cancels part of the hum, or rounds to nothing, is not to fix
        label = f"{c.element} ({c.source}, {c.share:.0f} %)"
        if c.source in loop_driven and not top:
            label += (
                ": its current comes round a loop through the installation — plug the devices "
                "the loop joins into one outlet or strip, or use a balanced link"
            )
        if c.kind == "supply":  # a stage fed from a supply: its ripple, not a conductor
            label = (
                f"the ripple of {c.source} fed to stage {c.element} ({c.share:.0f} "
                f"%): filter {c.source} further (another RC or choke section) or regulate it"
            )
        if c.element not in [t.split(" (")[0] for t in top]:
            top.append(label)
        if len(top) == 3:
            break
    return Finding(
        "GC303",
        "fault",
        f"hum in the {ch} channel is above the ISO 226 threshold of hearing at the listener's "
        f"seat by {h.margin_db:.1f} dB (total {h.total_dbv:.1f} dBV at the output)",
        loc,
        (ch, *dict.fromkeys(c.element for c in h.contributors[:3])),
        {
            "margin_db": h.margin_db,
            "total_dbv": h.total_dbv,
            "signal_to_hum_db": h.signal_to_hum,
        },
        "fix the main contributors first (shares of the output's hum voltage): " + "; ".join(top),
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
    fields = s.plan.index.fields
    out = []
    for row in s.hum.loops:
        area = row.area
        if area is not None and area < 1e-8:  # a loop with no area (two conductors side by
            continue  # side, a chassis-only loop) picks nothing up wherever it passes
        for name, entry in row.sources.items():
            src = fields.get(name)
            if src is None:  # an AC heater pair: no size to be inside
                continue
            limit = src.size if src.size is not None else src.r_ref
            if entry.closest >= limit:
                continue
            if src.size is not None:
                what = (
                    f"inside its size ({src.size * 1e3:g} mm): its pickup is taken from the ring "
                    "model, exact at any distance for a round source"
                )
                fix = (
                    f"nothing to correct in the figure; to lower loop {row.loop}'s pickup, "
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
                    f"loop {row.loop} passes {round(entry.closest * 1e3, 1):g} mm from the centre "
                    f"of {name}, {what}",
                    src.location,
                    (f"loop {row.loop}", name),
                    {"closest_mm": entry.closest * 1e3, "limit_mm": limit * 1e3},
                    fix,
                )
            )
    return out

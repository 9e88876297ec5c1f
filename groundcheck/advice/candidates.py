"""Candidate changes of a plan, made from the findings' structured repair actions and the
analysis's results, each as edits placed by the parser's spans (:mod:`groundcheck.advice.edits`).

The vocabulary is the trade's (common practice): insulate a socket from the chassis, remove a
second chassis bond, terminate a shield at one end, re-route a return to its star, join a
rectifier's return ends directly, give the protective earth a stud of its own, thicken a protective
conductor, turn a second bond into a lift network, a balanced interconnect, a lift network on a
device's signal side, or plug two devices an interconnect joins into one outlet or strip.  A
candidate that would touch a conductor the protective earth relies on is marked and never tried.
"""

from __future__ import annotations

import math

from ..model.kinds import (
    PROTECTIVE,
    ROLES,
    SIGNAL,
    is_fastening,
    is_fastening_kind,
    is_hookup,
    joins_devices,
    shield_like,
)
from ..model.records import PE_POINT, Plan
from ..rules.catalogue import RULES
from ..rules.results import Result
from .changes import (
    ROUTE_ALLOWANCE,
    SOURCE_CLEARANCE,
    STANDARD_SECTIONS_MM2,
    STUD_CLEARANCE,
    Candidate,
    ChangeContext,
    delete_change,
    device_note,
    local_name,
    reroute,
    rephrase,
    squeeze,
)
from .edits import Edit
from .installation_changes import installation_candidates, shield_to_chassis
from .returns import insulate_candidates
from .supply_changes import supply_candidates

__all__ = ["Candidate", "candidates", "FINDING_GENERATORS", "BEFORE_FINDINGS", "AFTER_FINDINGS"]


def _loop_candidates(ctx: ChangeContext, add) -> None:
    insulate_candidates(ctx, add)  # a fastened socket first: the same edit keeps its words
    for lp in ctx.result.loops:
        if lp.closed_by == "chassis-structure" or not lp.open_at:
            continue
        c = ctx.cond[lp.open_at]
        if lp.closed_by == "shield-both-ends" and shield_like(c) and not joins_devices(c):
            continue  # answered by terminating one end, below
        if is_fastening(c, ctx.metals):
            add(
                delete_change(
                    ctx,
                    lp.open_at,
                    f"insulate {lp.open_at} from the metal (insulated socket or shoulder washers) "
                    f"to open the loop closed by {lp.closed_by}",
                    "GC101",
                    "insulate",
                )
            )
        else:
            add(
                delete_change(
                    ctx,
                    lp.open_at,
                    f"remove {lp.open_at} to open the loop closed by {lp.closed_by}",
                    "GC101",
                )
            )
        st = ctx.statement(c)
        if (
            lp.closed_by in ("second-chassis-bond", "mains-cords")
            and is_hookup(c)
            and st is not None
        ):
            ends = ctx.src.ends(st)
            if ends is not None:
                indent = ctx.src.lines_of(st.loc.file)[st.loc.line - 1][: st.loc.column - 1]
                new = f"{indent}lift {st.label}: {ends[0].text} to {ends[1].text}, 10 ohm, 47 nF"
                file = None if st.loc.file == ctx.plan.file else st.loc.file
                edit = Edit(st.loc.line, new, (), ctx.src.last_line(st), file)
                add(
                    Candidate(
                        f"replace {lp.open_at} by a lift network (10 Ω ∥ 47 nF)",
                        "GC101",
                        (edit,),
                        ctx.protective(c),
                        action="lift-network",
                        element=lp.open_at,
                    )
                )


def _finding_candidates(ctx: ChangeContext, add) -> None:
    """Each finding's candidates from the generators of the repair actions its rule's entry names
    (``Rule.actions``); an action answered over the whole result has none here."""
    for f in ctx.result.findings:
        for action in RULES[f.code].actions:
            if action in FINDING_GENERATORS:
                FINDING_GENERATORS[action](ctx, f, add)


def _terminate_shield(ctx: ChangeContext, f, add) -> None:
    """GC108: the shield terminated at the end the finding keeps (no action when the shield is
    an end's only return)."""
    if not f.actions:
        return
    ((_, shield, keep),) = f.actions
    c = ctx.cond[shield]
    st = ctx.statement(c)
    if st is not None:
        add(
            rephrase(
                ctx,
                c,
                ("terminated", "both"),
                f"terminated {local_name(c.name, st.label or '', keep)}",
                f"terminate shield {c.name} at {keep} only",
                f.code,
            )
        )


def _second_bond(ctx: ChangeContext, f, add) -> None:
    """GC105: each second chassis bond insulated (a fastening) or removed; a shield is lifted at
    one end instead (GC108), never removed."""
    for verb, e in f.actions:
        c = ctx.cond.get(e)
        if c is None or shield_like(c):
            continue
        what = (
            "insulate {e} from the metal (insulated socket or shoulder washers)"
            if verb == "insulate"
            else "remove the second chassis bond {e}"
        )
        action = "insulate" if verb == "insulate" else "remove"
        add(delete_change(ctx, e, what.format(e=e), f.code, action))


def _action_candidates(ctx: ChangeContext, f, add) -> None:
    """Any other rule's structured actions (a rule added later needs no code here): ("reroute",
    conductor, point) moves the conductor's end nearer the point onto it; ("remove", conductor) and
    ("insulate", fastening) delete it.  Each is evaluated like every candidate."""
    import networkx as nx

    for verb, name, *where in f.actions:
        c = ctx.cond.get(name)
        if c is None or f.code not in RULES:
            continue
        if verb in ("reroute", "move", "join") and where and where[0] in ctx.G:
            dist = nx.single_source_shortest_path_length(ctx.G, where[0])
            near = c.a if dist.get(c.a, 10**9) < dist.get(c.b, 10**9) else c.b
            far = c.b if near == c.a else c.a
            add(
                reroute(
                    ctx,
                    name,
                    near,
                    where[0],
                    f"take {far} to {where[0]} by its own wire ({name})",
                    f.code,
                    "join" if verb == "join" else "move",
                )
            )
        elif verb in ("remove", "insulate"):
            add(delete_change(ctx, name, f"{verb} {name}", f.code, verb))


def _star_candidates(ctx: ChangeContext, f, add) -> None:
    import networkx as nx

    for (
        verb,
        name,
        *where,
    ) in f.actions:  # a star reaching the common star through another channel's
        c = ctx.cond.get(name)
        if verb not in ("reroute", "join") or c is None or not where:
            continue
        dist = nx.single_source_shortest_path_length(ctx.G, where[0])
        near = c.a if dist.get(c.a, 10**9) < dist.get(c.b, 10**9) else c.b
        far = c.b if near == c.a else c.a
        if verb == "join":  # a supply's two returns meeting only at the star
            add(
                reroute(
                    ctx,
                    name,
                    near,
                    where[0],
                    f"join {far} straight to {where[0]} ({name}), so the supply's current "
                    "circulates between them and leaves the star",
                    f.code,
                    "join",
                )
            )
        else:
            add(
                reroute(
                    ctx,
                    name,
                    near,
                    where[0],
                    f"run {far} to {where[0]} by its own wire ({name})",
                    f.code,
                )
            )
    if f.actions:
        return
    stars = [e for e in f.elements if e in ctx.stars]
    if not stars:
        return
    dist = nx.single_source_shortest_path_length(ctx.G, stars[0])
    for c in ctx.plan.conductors:
        if (
            c.a in f.elements
            and c.b in f.elements
            and not ctx.protective(c)
            and stars[0] not in (c.a, c.b)
        ):
            near = c.a if dist.get(c.a, 10**9) < dist.get(c.b, 10**9) else c.b
            far = c.b if near == c.a else c.a
            add(
                reroute(
                    ctx,
                    c.name,
                    near,
                    stars[0],
                    f"run {far} to {stars[0]} by its own wire ({c.name})",
                    f.code,
                )
            )


def _stud_position(ctx: ChangeContext, part: str, near) -> tuple[float, float] | None:
    """A place for a new stud on ``part`` near ``near``: on the part, outside every other part's
    outline and every field source's footprint, and at least STUD_CLEARANCE from the part's other
    points."""
    metal = ctx.plan.metal(part)
    area = abs(metal.size[0] * metal.size[1]) if metal.size else math.inf
    # parts mounted on it (smaller than it: a transformer frame, a bracket); a cover or bottom
    # plate the size of the part lies over or under all of it and takes no room on its face
    others = [
        m
        for m in ctx.plan.metals
        if m.name != part and m.size is not None and abs(m.size[0] * m.size[1]) < area
    ]
    taken = [p.pos for p in ctx.plan.points if p.pos is not None]
    sources = [s.pos for s in ctx.plan.fields]
    for r in (20e-3, 30e-3, 40e-3, 60e-3):
        for k in range(8):
            a = math.pi / 4 * k
            q = (near[0] + r * math.cos(a), near[1] + r * math.sin(a))
            if not metal.contains(q) or any(m.contains(q) for m in others):
                continue
            if any(math.dist(q, t) < STUD_CLEARANCE for t in taken) or any(
                math.dist(q, s) < SOURCE_CLEARANCE for s in sources
            ):
                continue
            return q
    return None


def _own_stud(ctx: ChangeContext, f) -> Candidate | None:
    """GC202: the protective conductor moves to a new stud of its own, on the part the old stud
    sits on."""
    pe = next(
        (
            ctx.cond[e]
            for e in f.elements
            if e in ctx.cond
            and e in ctx.result.protective
            and not is_fastening_kind(ctx.cond[e].kind)
        ),
        None,
    )
    old_pt = ctx.plan.point(f.elements[1]) if len(f.elements) > 1 else None
    st = ctx.statement(pe) if pe is not None else None
    if st is None or old_pt is None or old_pt.pos is None:
        return None
    part = (
        old_pt.on
        if old_pt.on in ctx.metals
        else next(
            (
                k.b if k.b in ctx.metals else k.a
                for k in ctx.plan.conductors
                if is_fastening(k, ctx.metals) and old_pt.name in (k.a, k.b)
            ),
            None,
        )
    )
    ends = ctx.src.ends(st)
    where = _stud_position(ctx, part, old_pt.pos) if part is not None else None
    if where is None or ends is None:
        return None
    new_pt = next(
        n for n in ("pe_stud", "pe_stud2", "pe_stud3", "pe_stud4") if ctx.plan.point(n) is None
    )
    item = ends[1] if pe.b == old_pt.name else ends[0]
    changes = [(item, new_pt)]
    other = ctx.points.get(pe.a if pe.b == old_pt.name else pe.b)
    old_len = ctx.src.quantity(st, "length")
    if other is not None and other.pos is not None and old_len is not None:
        length = math.dist(other.pos, where) * (1 + ROUTE_ALLOWANCE)
        changes.append((old_len, f"{max(length, 10e-3) * 1e3:.0f} mm"))
    edit = ctx.src.replace(st, _written_protective(ctx, st, changes))  # its comment stays
    x, y = where[0] * 1e3, where[1] * 1e3
    edit = Edit(
        edit.line,
        edit.new,
        (
            f"point {new_pt}: stud, at {x:.0f},{y:.0f} on {part}",
            f"bolt {new_pt}_nut: {new_pt} to {part}",
        ),
        edit.last,
        edit.file,
    )
    return Candidate(
        f"give the protective earth a stud of its own ({new_pt} at {x:.0f},{y:.0f} on {part}, "
        f"clear of other parts and fastenings): {pe.name}'s end moves there, its section and "
        "comment kept",
        "GC202",
        (edit,),
        touches_protective=False,
        action="own-stud",
        element=pe.name,
    )


def _written_protective(ctx: ChangeContext, st, changes: list) -> list:
    """``changes`` of a protective conductor's statement, with its role written ``protective``: a
    role word it has is replaced, else ``, protective`` follows its last item (its section is
    never changed)."""
    if ctx.src.find(st, PROTECTIVE):
        return changes
    for word in (r for r in ROLES if r != PROTECTIVE):
        ph = ctx.src.find(st, word)
        if ph and len(ph) == 1:
            return changes + [(ph[0], "protective")]
    last = st.phrases[-1][-1]
    mine = dict((id(it), new) for it, new in changes)
    n, a, b = ctx.src.span(last)
    text = mine.get(id(last), ctx.src.lines_of(st.loc.file)[n - 1][a:b])
    return [c for c in changes if c[0] is not last] + [(last, text + ", protective")]


def _bonding_wire(ctx: ChangeContext, f) -> Candidate | None:
    """GC205, GC206: a touchable part with no protective path, or one through a poor contact
    (hinges, paint, anodised threads), gets a protective wire of its own from a new bonding stud
    beside the protective earth's stud (the protective earth keeps its fastener to itself, GC202)
    to a new stud on the part (common practice: each touchable part bonded by a conductor, never
    through its fixings)."""
    part = next((e for e in f.elements if e in ctx.metals), None)
    lead = next(
        (
            c
            for c in ctx.plan.conductors
            if PE_POINT in (c.a, c.b) and is_hookup(c) and ctx.protective(c)
        ),
        None,
    )
    if part is None or lead is None or ctx.plan.mains is None:
        return None
    landing = ctx.points.get(lead.b if lead.a == PE_POINT else lead.a)
    st = ctx.statement(lead)
    metal = ctx.plan.metal(part)
    if landing is None or landing.pos is None or st is None or metal is None or metal.size is None:
        return None
    home = next(
        (
            k.b if k.b in ctx.metals else k.a
            for k in ctx.plan.conductors
            if is_fastening(k, ctx.metals) and landing.name in (k.a, k.b)
        ),
        None,
    )
    if home is None or home == part:
        return None  # the path is the part itself: GC206's own fix (fastenings, the lead)
    start = _stud_position(ctx, home, landing.pos)
    (x0, y0), (w, h) = metal.origin, metal.size
    near = (min(max(landing.pos[0], x0), x0 + w), min(max(landing.pos[1], y0), y0 + h))
    end = _stud_position(ctx, part, near)
    if start is None or end is None:
        return None
    a = next(
        n for n in (f"{home}_bond", f"{home}_bond2", f"{home}_bond3") if ctx.plan.point(n) is None
    )
    b = next(n for n in (f"{part}_pe", f"{part}_pe2", f"{part}_pe3") if ctx.plan.point(n) is None)
    area = max(lead.area or 0.0, ctx.plan.mains.line_area or 0.0) * 1e6
    area = next((x for x in STANDARD_SECTIONS_MM2 if x >= area * (1 - 1e-9)), area)
    length = max(math.dist(start, end) * (1 + ROUTE_ALLOWANCE), 10e-3) * 1e3
    mm = [round(v * 1e3) for v in (*start, *end)]
    extra = (
        f"point {a}: stud, at {mm[0]},{mm[1]} on {home}",
        f"bolt {a}_nut: {a} to {home}",
        f"point {b}: stud, at {mm[2]},{mm[3]} on {part}",
        f"bolt {b}_nut: {b} to {part}",
        f"wire {b}_bond: {a} to {b}, {length:.0f} mm, {area:g} mm2, protective",
    )
    edit = _at_end(ctx, st, extra)
    return Candidate(
        f"bond {part} by a protective wire of its own ({b}_bond, {area:g} mm², from a new stud "
        f"{a} on {home} beside {landing.name} to a new stud {b} on {part}; bare metal under "
        "toothed washers)",
        f.code,
        (edit,),
        touches_protective=False,
        wire=length / 1e3,
        action="bond",
        element=part,
    )


def _at_end(ctx: ChangeContext, st, extra: tuple[str, ...]) -> Edit:
    """New statements at the end of the file ``st`` is in (top level), so that they never share
    lines with another change's edit (the combined set keeps both)."""
    lines = ctx.src.lines_of(st.loc.file)
    file = None if st.loc.file == ctx.plan.file else st.loc.file
    n = len(lines)
    if lines[-1] == "":
        return Edit(n, "\n".join(extra) + "\n", (), n, file)
    return Edit(n, lines[-1], extra, n, file)


def _thicker(ctx: ChangeContext, f) -> Candidate | None:
    """GC204: the protective conductor at the line conductor's cross-section (a change that only
    strengthens it)."""
    c = ctx.cond[f.elements[0]]
    st = ctx.statement(c)
    if st is None or ctx.plan.mains is None or ctx.plan.mains.line_area is None:
        return None
    line = ctx.plan.mains.line_area * 1e6
    area = next((a for a in STANDARD_SECTIONS_MM2 if a >= line * (1 - 1e-9)), line)
    new = f"{area:g} mm2"
    item = ctx.src.quantity(st, "area")
    if item is not None:
        edit = ctx.src.replace(st, [(item, new)])
    else:
        # 'AWG 18' written word first; a trace, bus bar or strap given by its width is made wider
        # by hand (the finding says so), never turned into a round wire by giving it an area
        ph = ctx.src.find(st, "AWG")
        if not ph:
            return None
        edit = ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
        edit = Edit(edit.line, squeeze(edit.new, new), edit.extra, edit.last)
    return Candidate(
        f"use {area:g} mm² (the standard size at least the line conductor's {line:.3g} mm²) for "
        f"protective conductor {c.name}",
        "GC204",
        (edit,),
        touches_protective=False,
        action="thicken",
        element=c.name,
    )


def _join_ends(ctx: ChangeContext, row, add) -> None:
    """A rectifier's return (its charging current, or its filter capacitor's ripple current) whose
    two ends are not joined by a conductor of their own: move the far end of a conductor leaving
    one end onto the other, so that the current circulates between them alone (common practice:
    reservoir negative and centre tap or bridge negative joined directly; a filter capacitor's
    negative to the reservoir's)."""
    if any({d.a, d.b} == {row.a, row.b} for d in ctx.plan.conductors):
        return
    for end, other in ((row.a, row.b), (row.b, row.a)):
        for d in ctx.plan.conductors:
            # a wire written 'signal' is a stage's reference, never a supply's return to join
            if (
                other in (d.a, d.b)
                and not shield_like(d)
                and not ctx.protective(d)
                and d.role != SIGNAL
            ):
                far = d.b if d.a == other else d.a
                add(
                    reroute(
                        ctx,
                        d.name,
                        far,
                        end,
                        f"join {other} straight to {end} ({d.name}), so the {row.source} current "
                        f"stays between them and leaves {', '.join(row.shared)}",
                        "GC102",
                        "join",
                    )
                )


def _shared_return_candidates(ctx: ChangeContext, add) -> None:
    """Shared returns: join the rectifier's ends directly, and re-route the stage's reference to
    the star.  Each row names its source's two ends (a rectifier's, its filter's, or a stated
    current's)."""
    plan = ctx.plan
    for row in ctx.result.coupling:
        if row.kind == "rectifier":
            _join_ends(ctx, row, add)
        stage = next((s for s in plan.stages if s.name == row.stage), None)
        if row.kind not in ("rectifier", "current") or stage is None:
            continue
        for shared in row.shared:
            c = ctx.cond.get(shared)
            if c is None:
                continue
            for end, other in ((row.a, row.b), (row.b, row.a)):
                for d in plan.conductors:
                    if other in (d.a, d.b) and d.name != shared and not ctx.protective(d):
                        far = d.b if d.a == other else d.a
                        if far in (c.a, c.b) and far != end:
                            add(
                                reroute(
                                    ctx,
                                    d.name,
                                    far,
                                    end,
                                    f"join {other} straight to {end} ({d.name}), so the "
                                    f"{row.source} current leaves {shared}",
                                    "GC102",
                                    "join",
                                )
                            )
            for p in (stage.b, stage.a):
                star = ctx.nearest_star(p)
                for d in plan.conductors:
                    if p in (d.a, d.b) and not ctx.protective(d):
                        far = d.b if d.a == p else d.a
                        if star and far != star and far in (c.a, c.b):
                            add(
                                reroute(
                                    ctx,
                                    d.name,
                                    far,
                                    star,
                                    f"take {p} to {star} by its own wire ({d.name})",
                                    "GC102",
                                )
                            )


def _crosstalk_candidates(ctx: ChangeContext, add) -> None:
    """GC304: a channel's signal return (its stated load current) that crosses another channel's
    reference: the wire leaving the return's far end is taken straight to where the current goes
    (its star), so the return no longer runs along the other channel's ground (common practice:
    each channel's load return to the star on a wire of its own)."""
    talkers = {f.elements[0] for f in ctx.result.findings if f.code == "GC304" and f.elements}
    for cur in ctx.plan.currents:
        if cur.role != SIGNAL or cur.channel not in talkers:
            continue
        goal = cur.b if cur.b in ctx.stars else ctx.nearest_star(cur.b)
        for d in ctx.plan.conductors:
            if cur.a in (d.a, d.b) and not shield_like(d) and not ctx.protective(d):
                far = d.b if d.a == cur.a else d.a
                # a wire that lands on a socket is the lead plugged into it (a headphone lead's
                # common): its end stays on the socket
                socket = far in ctx.points and ctx.points[far].kind in ("sleeve", "jack")
                if goal and far != goal and not socket:
                    add(
                        reroute(
                            ctx,
                            d.name,
                            far,
                            goal,
                            f"take {cur.a} to {goal} by its own wire ({d.name}), so the "
                            f"{cur.channel} channel's return leaves the other channel's ground",
                            "GC304",
                        )
                    )


#: the advisor's generator of each repair action a catalogue entry names (``Rule.actions``),
#: called with (context, finding, add) for every finding of a rule that names it
FINDING_GENERATORS = {
    "star-return": _star_candidates,
    "second-bond": _second_bond,
    "terminate-shield": _terminate_shield,
    "shield-to-chassis": lambda ctx, f, add: add(shield_to_chassis(ctx, f)),
    "own-stud": lambda ctx, f, add: add(_own_stud(ctx, f)),
    "thicken": lambda ctx, f, add: add(_thicker(ctx, f)),
    "bond": lambda ctx, f, add: add(_bonding_wire(ctx, f)),
    "carried": _action_candidates,
}

#: the generators of actions answered over the whole result (each loop of the loop list, each
#: coupling row, the installation), called once: those before the findings' own, and after
BEFORE_FINDINGS = {"open-loop": _loop_candidates, "own-return": _shared_return_candidates}
AFTER_FINDINGS = {
    "between-devices": installation_candidates,
    "installation-side": supply_candidates,
    "own-crosstalk-return": _crosstalk_candidates,
}


def candidates(plan: Plan, result: Result, text: str) -> list[Candidate]:
    """Candidate changes answering the plan's loop, shared-return, star, bonding and protective
    findings."""
    ctx = ChangeContext(plan, result, text)
    out: list[Candidate] = []

    def add(c):
        if c is not None and all(c.edits != x.edits for x in out):
            out.append(device_note(c, plan.file))

    # a shared return's join before the star's: the same join answers GC102 first
    for generate in BEFORE_FINDINGS.values():
        generate(ctx, add)
    _finding_candidates(ctx, add)
    for generate in AFTER_FINDINGS.values():
        generate(ctx, add)
    return out

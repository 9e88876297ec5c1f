"""Candidate changes of a plan, made from the findings' structured repair actions and the analysis's
results, each as edits placed by the parser's spans (:mod:`groundcheck.advice.edits`).

The vocabulary is the trade's (common practice): insulate a socket from the chassis, remove a second
chassis bond, terminate a shield at one end, re-route a return to its star, join a rectifier's return
ends directly, give the protective earth a stud of its own, thicken a protective conductor, turn a second
bond into a lift network, a balanced interconnect, or a lift network on a device's signal side.  A
candidate that would touch a conductor the protective earth relies on is marked and never tried.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

from ..model.kinds import is_fastening
from ..model.records import Plan
from ..rules.results import Result
from .edits import Edit, PlanText

__all__ = ["Candidate", "candidates", "STUD_CLEARANCE", "ROUTE_ALLOWANCE"]

#: a new stud keeps at least this distance from every other fastening and point of the part, m (common practice:
#: room for a nut, a lock washer and a crimp lug)
STUD_CLEARANCE = 15e-3
#: a field source's own footprint, for placing a new stud clear of a transformer, m (from memory: small mains
#: transformers are 50–100 mm across)
SOURCE_CLEARANCE = 40e-3
#: standard conductor cross-sections, mm² (IEC 60228's series)
STANDARD_SECTIONS_MM2 = (0.5, 0.75, 1.0, 1.5, 2.5, 4.0, 6.0, 10.0, 16.0, 25.0, 35.0, 50.0)
#: a re-routed wire's length: its straight-line length plus this share for dress and strain relief (common practice)
ROUTE_ALLOWANCE = 0.2


@dataclass(frozen=True)
class Candidate:
    title: str
    reason: str                     # the finding code(s) it answers
    edits: tuple[Edit, ...]
    touches_protective: bool = False


class _Ctx:
    def __init__(self, plan: Plan, result: Result, text: str):
        self.plan, self.result, self.text = plan, result, text
        self.src = PlanText(text, plan.file)
        self.cond = {c.name: c for c in plan.conductors}
        self.stars = [p.name for p in plan.points if p.kind == "star"]
        self.metals = {m.name for m in plan.metals}
        self.points = {p.name: p for p in plan.points}

    def protective(self, c) -> bool:
        """Protective by topology or by role (groundcheck.network.earthing): never removed, re-routed or lifted."""
        return c.name in self.result.protective or c.role == "protective"

    def statement(self, c):
        """The statement that wrote ``c`` in the main plan file, or None."""
        if c.location.file != self.plan.file:
            return None
        return self.src.statement(c.location.line)

    @cached_property
    def G(self):
        from ..network.graph import build_graph
        return build_graph(self.plan)

    def nearest_star(self, node: str) -> str | None:
        import networkx as nx
        best = None
        for s in self.stars:
            try:
                d = nx.shortest_path_length(self.G, node, s)
            except (nx.NetworkXNoPath, nx.NodeNotFound):
                continue
            if best is None or d < best[0]:
                best = (d, s)
        return best[1] if best else None


def _local(model_name: str, label: str, target: str) -> str:
    """How ``target`` is written inside the statement whose element is ``model_name`` (local label ``label``)."""
    prefix = model_name[: len(model_name) - len(label)]
    if prefix and target.startswith(prefix):
        return target[len(prefix):]
    return target


def _block_note(model_name: str, label: str) -> str:
    """A note when the edited statement sits in a block: the change applies to every placement."""
    return f" — in its block, so for every placement ({label})" if model_name != label else ""


def _delete(ctx: _Ctx, name: str, title: str, reason: str) -> Candidate | None:
    c = ctx.cond.get(name)
    st = ctx.statement(c) if c is not None else None
    if c is None or c.kind == "interconnect" or st is None:
        return None
    return Candidate(title + _block_note(c.name, st.label or ""), reason, (ctx.src.delete(st),), ctx.protective(c))


def _route_length(ctx: _Ctx, c, a: str, b: str) -> float | None:
    """Straight-line (or waypoint) length between two points with positions, plus the allowance; m."""
    pa, pb = ctx.points.get(a), ctx.points.get(b)
    if pa is None or pb is None or pa.pos is None or pb.pos is None:
        return None
    path = [pa.pos, *c.route, pb.pos]
    return sum(math.dist(p, q) for p, q in zip(path, path[1:])) * (1 + ROUTE_ALLOWANCE)


def _reroute(ctx: _Ctx, name: str, end: str, to: str, title: str, reason: str) -> Candidate | None:
    """Move the ``end`` of conductor ``name`` to point ``to``; its length follows the new route."""
    c = ctx.cond.get(name)
    st = ctx.statement(c) if c is not None else None
    if c is None or st is None or c.kind in ("interconnect", "shield") or to == end:
        return None
    items = ctx.src.ends(st)
    if items is None:
        return None
    label = st.label or ""
    ia, ib = items
    if c.b == end and ib.value == _local(c.name, label, end):
        changes, a, b = [(ib, _local(c.name, label, to))], c.a, to
    elif c.a == end and ia.value == _local(c.name, label, end):
        changes, a, b = [(ia, _local(c.name, label, to))], to, c.b
    else:
        return None
    if a == b:
        return None
    length = _route_length(ctx, c, a, b)
    old = ctx.src.quantity(st, "length")
    if length is not None and old is not None:
        changes.append((old, f"{length * 1e3:.0f} mm"))
        title += f"; new length {length * 1e3:.0f} mm (straight route + {ROUTE_ALLOWANCE:.0%})"
    edit = ctx.src.replace(st, changes, drop_comment=True)
    return Candidate(title + _block_note(c.name, label), reason, (edit,), ctx.protective(c))


def _rephrase(ctx: _Ctx, c, words: tuple[str, ...], new: str, title: str, reason: str, protective=None):
    """Replace the phrase of ``c``'s statement that starts with ``words`` by ``new``."""
    st = ctx.statement(c)
    ph = ctx.src.find(st, *words) if st is not None else None
    if not ph:
        return None
    edit = ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
    edit = Edit(edit.line, _squeeze(edit.new, new), edit.extra, edit.last)
    touches = ctx.protective(c) if protective is None else protective
    return Candidate(title, reason, (edit,), touches)


def _squeeze(text: str, new: str) -> str:
    """Blanks left by items replaced with nothing after ``new`` are removed (``terminated a`` not
    ``terminated a  ``)."""
    i = text.find(new)
    if i < 0:
        return text
    j = i + len(new)
    k = j
    while k < len(text) and text[k] in " \t":
        k += 1
    if k == len(text) or text[k] in ",#\n":
        return text[:j] + (" " if k < len(text) and text[k] == "#" else "") + text[k:]
    return text


def _loop_candidates(ctx: _Ctx, add) -> None:
    for lp in ctx.result.loops:
        if lp.closed_by == "chassis-structure" or not lp.open_at:
            continue
        c = ctx.cond[lp.open_at]
        if lp.closed_by == "shield-both-ends" and c.kind == "shield":
            continue          # answered by terminating one end, below
        if is_fastening(c, ctx.metals):
            add(_delete(ctx, lp.open_at, f"insulate {lp.open_at} from the metal (insulated socket or shoulder washers) "
                                         f"to open the loop closed by {lp.closed_by}", "GC101"))
        else:
            add(_delete(ctx, lp.open_at, f"remove {lp.open_at} to open the loop closed by {lp.closed_by}", "GC101"))
        st = ctx.statement(c)
        if lp.closed_by in ("second-chassis-bond", "mains-cords") and c.kind == "wire" and st is not None:
            ends = ctx.src.ends(st)
            if ends is not None:
                indent = ctx.src.lines[st.loc.line - 1][: st.loc.column - 1]
                new = f"{indent}lift {st.label}: {ends[0].text} to {ends[1].text}, 10 ohm, 47 nF"
                add(Candidate(f"replace {lp.open_at} by a lift network (10 Ω ∥ 47 nF)", "GC101",
                              (Edit(st.loc.line, new, (), ctx.src.last_line(st)),), ctx.protective(c)))


def _finding_candidates(ctx: _Ctx, add) -> None:
    for f in ctx.result.findings:
        if f.code == "GC108":
            (_, shield, keep), = f.actions
            c = ctx.cond[shield]
            st = ctx.statement(c)
            if st is not None:
                add(_rephrase(ctx, c, ("terminated", "both"), f"terminated {_local(c.name, st.label or '', keep)}",
                              f"terminate shield {c.name} at {keep} only", "GC108"))
        elif f.code == "GC105":
            for verb, e in f.actions:
                c = ctx.cond.get(e)
                if c is None or c.kind in ("shield", "interconnect"):
                    continue          # a shield is lifted at one end (GC108), not removed
                what = "insulate {e} from the metal (insulated socket or shoulder washers)" if verb == "insulate" \
                    else "remove the second chassis bond {e}"
                add(_delete(ctx, e, what.format(e=e), "GC105"))
        elif f.code == "GC103":
            _star_candidates(ctx, f, add)
        elif f.code == "GC202":
            add(_own_stud(ctx, f))
        elif f.code == "GC204":
            add(_thicker(ctx, f))


def _star_candidates(ctx: _Ctx, f, add) -> None:
    import networkx as nx
    stars = [e for e in f.elements if e in ctx.stars]
    if not stars:
        return
    dist = nx.single_source_shortest_path_length(ctx.G, stars[0])
    for c in ctx.plan.conductors:
        if c.a in f.elements and c.b in f.elements and not ctx.protective(c) and stars[0] not in (c.a, c.b):
            near = c.a if dist.get(c.a, 10 ** 9) < dist.get(c.b, 10 ** 9) else c.b
            far = c.b if near == c.a else c.a
            add(_reroute(ctx, c.name, near, stars[0], f"run {far} to {stars[0]} by its own wire ({c.name})", "GC103"))


def _stud_position(ctx: _Ctx, part: str, near) -> tuple[float, float] | None:
    """A place for a new stud on ``part`` near ``near``: on the part, outside every other part's outline and
    every field source's footprint, and at least STUD_CLEARANCE from the part's other points."""
    metal = ctx.plan.metal(part)
    area = abs(metal.size[0] * metal.size[1]) if metal.size else math.inf
    # parts mounted on it (smaller than it: a transformer frame, a bracket); a cover or bottom plate the size of
    # the part lies over or under all of it and takes no room on its face
    others = [m for m in ctx.plan.metals if m.name != part and m.size is not None and abs(m.size[0] * m.size[1]) < area]
    taken = [p.pos for p in ctx.plan.points if p.pos is not None]
    sources = [s.pos for s in ctx.plan.fields]
    for r in (20e-3, 30e-3, 40e-3, 60e-3):
        for k in range(8):
            a = math.pi / 4 * k
            q = (near[0] + r * math.cos(a), near[1] + r * math.sin(a))
            if not metal.contains(q) or any(m.contains(q) for m in others):
                continue
            if (any(math.dist(q, t) < STUD_CLEARANCE for t in taken)
                    or any(math.dist(q, s) < SOURCE_CLEARANCE for s in sources)):
                continue
            return q
    return None


def _own_stud(ctx: _Ctx, f) -> Candidate | None:
    """GC202: the protective conductor moves to a new stud of its own, bolted to the same part."""
    pe = next((ctx.cond[e] for e in f.elements if e in ctx.cond and e in ctx.result.protective
               and ctx.cond[e].kind not in ("bolt",)), None)
    old_pt = ctx.plan.point(f.elements[1]) if len(f.elements) > 1 else None
    st = ctx.statement(pe) if pe is not None else None
    if st is None or old_pt is None or old_pt.pos is None:
        return None
    part = next((k.b if k.b in ctx.metals else k.a for k in ctx.plan.conductors
                 if is_fastening(k, ctx.metals) and old_pt.name in (k.a, k.b)), None)
    ends = ctx.src.ends(st)
    where = _stud_position(ctx, part, old_pt.pos) if part is not None else None
    if where is None or ends is None:
        return None
    new_pt = next(n for n in ("pe_stud", "pe_stud2", "pe_stud3", "pe_stud4") if ctx.plan.point(n) is None)
    item = ends[1] if pe.b == old_pt.name else ends[0]
    changes = [(item, new_pt)]
    other = ctx.points.get(pe.a if pe.b == old_pt.name else pe.b)
    old_len = ctx.src.quantity(st, "length")
    if other is not None and other.pos is not None and old_len is not None:
        length = math.dist(other.pos, where) * (1 + ROUTE_ALLOWANCE)
        changes.append((old_len, f"{max(length, 10e-3) * 1e3:.0f} mm"))
    edit = ctx.src.replace(st, changes, drop_comment=True)
    x, y = where[0] * 1e3, where[1] * 1e3
    edit = Edit(edit.line, edit.new, (f"point {new_pt}: stud, at {x:.0f},{y:.0f} on {part}",
                                      f"bolt {new_pt}_nut: {new_pt} to {part}"), edit.last)
    return Candidate(f"give the protective earth a stud of its own ({new_pt} at {x:.0f},{y:.0f} on {part}, clear of "
                     "other parts and fastenings)", "GC202", (edit,), touches_protective=False)


def _thicker(ctx: _Ctx, f) -> Candidate | None:
    """GC204: the protective conductor at the line conductor's cross-section (a change that only strengthens it)."""
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
        # 'AWG 18' written word first; a trace, bus bar or strap given by its width is made wider by hand (the
        # finding says so), never turned into a round wire by giving it an area
        ph = ctx.src.find(st, "AWG")
        if not ph:
            return None
        edit = ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
        edit = Edit(edit.line, _squeeze(edit.new, new), edit.extra, edit.last)
    return Candidate(f"use {area:g} mm² (the standard size at least the line conductor's {line:.3g} mm²) for "
                     f"protective conductor {c.name}", "GC204", (edit,), touches_protective=False)


def _installation_interconnects(plan: Plan, result: Result) -> set[str]:
    """Interconnects in loops through mains cords, or sharing a supply or leakage current with a stage."""
    kinds = {c.name: c.kind for c in plan.conductors}
    names = {e for lp in result.loops if lp.closed_by == "mains-cords"
             for e in lp.loop.edges if kinds.get(e) == "interconnect"}
    names |= {e for row in result.coupling for e in row.shared if kinds.get(e) == "interconnect"}
    return names


def _installation_candidates(ctx: _Ctx, add) -> None:
    """Between pieces of equipment: a balanced interconnect, or a lift network on a device's signal side."""
    for name in sorted(_installation_interconnects(ctx.plan, ctx.result)):
        c = ctx.cond[name]
        st = ctx.statement(c)
        if st is None:
            continue
        ph = ctx.src.find(st, "unbalanced")
        if ph:
            add(Candidate(f"use a balanced interconnect for {name}", "GC101", (ctx.src.replace(st, [(ph[0],
                                                                                                     "balanced")]),)))
        for end in (c.a, c.b):
            pt = ctx.plan.point(end)
            if pt is None or not pt.group:
                continue
            dev = pt.group.split(".", 1)[0]
            bond = ctx.cond.get(f"{dev}.gnd_bond")
            dst = ctx.statement(bond) if bond is not None and bond.kind == "bolt" else None
            if dst is None:
                continue
            ph = ctx.src.find(dst, "signal-ground")
            if ph and len(ph) > 1:
                edit = ctx.src.replace(dst, [(ph[1], "lift")])
            else:
                last = dst.phrases[-1][-1]
                n, _, b = ctx.src.span(last)
                row = ctx.src.lines[n - 1]
                edit = ctx.src.replace(dst, [])
                rows = edit.new.split("\n")
                rows[n - dst.loc.line] = row[:b] + ", signal-ground lift" + row[b:]
                edit = Edit(edit.line, "\n".join(rows), (), edit.last)
            add(Candidate(f"give {dev} a ground-lift network between its signal ground and chassis (never the "
                          "protective earth)",
                          "GC101", (edit,)))


def _shared_return_candidates(ctx: _Ctx, add) -> None:
    """Shared returns: join the rectifier's ends directly, and re-route the stage's reference to the star."""
    plan = ctx.plan
    for row in ctx.result.coupling:
        src = next((r for r in (*plan.rectifiers, *plan.currents) if r.name == row.source), None)
        stage = next((s for s in plan.stages if s.name == row.stage), None)
        if src is None or stage is None:
            continue
        for shared in row.shared:
            c = ctx.cond.get(shared)
            if c is None:
                continue
            for end, other in ((src.a, src.b), (src.b, src.a)):
                for d in plan.conductors:
                    if other in (d.a, d.b) and d.name != shared and not ctx.protective(d):
                        far = d.b if d.a == other else d.a
                        if far in (c.a, c.b) and far != end:
                            add(_reroute(ctx, d.name, far, end, f"join {other} straight to {end} ({d.name}), "
                                         f"so the {src.name} current leaves {shared}", "GC102"))
            for p in (stage.b, stage.a):
                star = ctx.nearest_star(p)
                for d in plan.conductors:
                    if p in (d.a, d.b) and not ctx.protective(d):
                        far = d.b if d.a == p else d.a
                        if star and far != star and far in (c.a, c.b):
                            add(_reroute(ctx, d.name, far, star, f"take {p} to {star} by its own wire ({d.name})",
                                         "GC102"))


def candidates(plan: Plan, result: Result, text: str) -> list[Candidate]:
    """Candidate changes answering the plan's loop, shared-return, star, bonding and protective findings."""
    ctx = _Ctx(plan, result, text)
    out: list[Candidate] = []

    def add(c):
        if c is not None and all(c.edits != x.edits for x in out):
            out.append(c)

    _loop_candidates(ctx, add)
    _finding_candidates(ctx, add)
    _installation_candidates(ctx, add)
    _shared_return_candidates(ctx, add)
    return out

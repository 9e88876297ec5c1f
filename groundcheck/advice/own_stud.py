"""GC202's fix: the protective earth on a stud of its own, on the part the shared stud sits on,
beside the inlet; any other protective conductor on the shared stud (a valve cage's or a
transformer screen's bond) on a second stud beside it, so that none stays under a fastening that
holds another part (common practice: nothing else on the earth's stud)."""

from __future__ import annotations

import math

from ..model.kinds import PROTECTIVE, ROLES, is_fastening, is_fastening_kind
from ..model.records import PE_POINT
from .changes import ROUTE_ALLOWANCE, Candidate, ChangeContext, local_name
from .edits import Edit
from .protective_changes import device_frame, free_name, stud_position

__all__ = ["own_stud"]


def _shared_stud_wire(ctx: ChangeContext, f):
    """GC202's protective conductor (a wire, not a fastening) and the stud it shares."""
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
    return pe, old_pt


def _main_part(ctx: ChangeContext, point) -> str | None:
    """The part a protective earth's own new stud goes on: of the parts the old landing sits on or
    is fastened to, the one joined to the most other metal parts — the chassis, not a lid or a
    transformer's frame its fastening also holds (a lid comes off for service and would take the
    earth with it; common practice); then the larger, then the part it sits on, then by name."""
    parts = {
        k.b if k.b in ctx.metals else k.a
        for k in ctx.at(point.name)
        if is_fastening(k, ctx.metals)
    }
    if point.on in ctx.metals:
        parts.add(point.on)
    if not parts:
        return None
    joined: dict[str, set] = {m: set() for m in parts}
    for c in ctx.plan.conductors:
        for m in {c.a, c.b} & parts:
            joined[m] |= {c.a, c.b} & ctx.metals - {m}

    def area(m: str) -> float:
        size = ctx.plan.metal(m).size
        return abs(size[0] * size[1]) if size else 0.0

    return min(parts, key=lambda m: (-len(joined[m]), -area(m), m != point.on, m))


def own_stud(ctx: ChangeContext, f) -> Candidate | None:
    """GC202: the protective conductor moves to a new stud of its own, on the part the old stud
    sits on."""
    pe, old_pt = _shared_stud_wire(ctx, f)
    st = ctx.statement(pe) if pe is not None else None
    if st is None or old_pt is None or old_pt.pos is None:
        return None
    part = _main_part(ctx, old_pt)
    ends = ctx.src.ends(st)
    # beside the inlet when the lead comes from it (the shortest lead), else beside the old stud
    ends_pe = [e for e in (pe.a, pe.b) if e == PE_POINT or e.endswith("." + PE_POINT)]
    inlet = ctx.points.get(ends_pe[0]) if ends_pe else None
    near = [q.pos for q in (inlet, old_pt) if q is not None and q.pos is not None]
    where = None
    for q in near if part is not None else ():
        where = where or stud_position(ctx, part, q)
    if where is None or ends is None:
        return None
    # inside a block or a device's own plan the statement names its points without the prefix
    prefix = pe.name[: len(pe.name) - len(st.label or "")] if st.label else ""
    new_pt = free_name(ctx, tuple(prefix + n for n in ("pe_stud", "pe_stud2", "pe_stud3")))

    def local(name: str) -> str:
        return local_name(pe.name, st.label or "", name)

    item = ends[1] if pe.b == old_pt.name else ends[0]
    changes = [(item, local(new_pt))]
    other = ctx.points.get(pe.a if pe.b == old_pt.name else pe.b)
    old_len = ctx.src.quantity(st, "length")
    # (a core of a multi-core cable keeps its length: the cable runs its whole length)
    if other is not None and other.pos is not None and old_len is not None and not pe.bundle:
        length = math.dist(other.pos, where) * (1 + ROUTE_ALLOWANCE)
        changes.append((old_len, f"{max(length, 10e-3) * 1e3:.0f} mm"))
    edit = ctx.src.replace(st, _written_protective(ctx, st, changes))  # its comment stays
    lx, ly = (v * 1e3 for v in device_frame(ctx, pe.name, where))  # as its own plan writes it
    extra = (
        f"point {local(new_pt)}: stud, at {lx:.0f},{ly:.0f} on {local(part)}",
        f"bolt {local(new_pt)}_nut: {local(new_pt)} to {local(part)}, protective",
    )
    edit = Edit(edit.line, edit.new, extra, edit.last, edit.file)
    rest, said = _others_off(ctx, pe, old_pt, part, where, local, st)
    return Candidate(
        f"give the protective earth a stud of its own ({new_pt} at {lx:.0f},{ly:.0f} on {part}, "
        f"clear of other parts and fastenings): {pe.name}'s end moves there, its section and "
        "comment kept; bare metal under a toothed washer, a nut and a lock nut, nothing else on "
        f"it{said}",
        f.code,
        (edit, *rest),
        touches_protective=False,
        action="own-stud",
        element=pe.name,
    )


def _others_off(ctx: ChangeContext, pe, old_pt, part: str, where, local, st) -> tuple:
    """The other protective conductors on the shared stud (a valve cage's or a transformer
    screen's bond), each end moved to a second new stud beside it, so that none stays under the
    fastening that holds another part: (their edits, the title's words)."""
    others = [
        d
        for d in ctx.at(old_pt.name)
        if d is not pe and not is_fastening(d, ctx.metals) and ctx.protective(d)
    ]
    stmts = [ctx.statement(d) for d in others]
    if not others or any(t is None or t.loc.file != st.loc.file for t in stmts):
        return (), ""
    spot = stud_position(ctx, part, old_pt.pos, avoid=(where,))
    prefix = pe.name[: len(pe.name) - len(st.label or "")] if st.label else ""
    name = free_name(ctx, tuple(prefix + n for n in ("bond_stud", "bond_stud2", "bond_stud3")))
    if spot is None:
        return (), ""
    edits = []
    for d, t in zip(others, stmts):
        ends = ctx.src.ends(t)
        if ends is None:
            return (), ""
        item = ends[1] if d.b == old_pt.name else ends[0]
        edits.append(ctx.src.replace(t, _written_protective(ctx, t, [(item, local(name))])))
    lx, ly = (v * 1e3 for v in device_frame(ctx, pe.name, spot))
    first = edits[0]
    edits[0] = Edit(
        first.line,
        first.new,
        (
            f"point {local(name)}: stud, at {lx:.0f},{ly:.0f} on {local(part)}",
            f"bolt {local(name)}_nut: {local(name)} to {local(part)}, protective",
        ),
        first.last,
        first.file,
    )
    moved = ", ".join(d.name for d in others)
    return tuple(edits), (
        f"; {moved} to a second stud of {'their' if len(others) > 1 else 'its'} own beside it "
        f"({name} at {lx:.0f},{ly:.0f}), so that no protective conductor stays under the "
        f"fastening that holds another part"
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
            return changes + [(ph[0], PROTECTIVE)]
    last = st.phrases[-1][-1]
    mine = dict((id(it), new) for it, new in changes)
    n, a, b = ctx.src.span(last)
    text = mine.get(id(last), ctx.src.lines_of(st.loc.file)[n - 1][a:b])
    return [c for c in changes if c[0] is not last] + [(last, text + ", protective")]

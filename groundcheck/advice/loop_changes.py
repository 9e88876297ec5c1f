"""Opening a ground loop (common practice): insulate the fastening that closes it from the metal
(an insulated socket or shoulder washers), remove a second chassis bond or the wire that closes
it, or turn a second bond into a lift network (10 Ω ∥ 47 nF); a closed switch in a loop (a
ground-lift switch) is thrown open, the cheapest change there is; a shield grounded at both ends is
terminated at the end its rule keeps instead, never removed."""

from __future__ import annotations

from ..model.kinds import can_open, is_fastening, is_hookup, joins_devices, shield_like
from ..model.records import insulating_means
from ..rules.context import STRUCTURAL
from .changes import (
    Answer,
    Candidate,
    ChangeContext,
    NO_TOOL,
    appended,
    delete_change,
    local_name,
    rephrase,
)
from .edits import Edit
from .returns import insulate_candidates

__all__ = ["loop_candidates", "terminate_shield", "second_bond"]


def loop_candidates(ctx: ChangeContext, answer: Answer, add) -> None:
    """Each listed loop opened where its opener says (a fastened socket insulated first), passed
    to ``add``; the candidates answer ``answer``'s rule."""
    reason = answer.reason
    insulate_candidates(ctx, reason, add)  # a fastened socket first: the same edit keeps its words
    _throw_switches(ctx, reason, add)
    for lp in ctx.result.loops:
        if lp.closed_by in STRUCTURAL or not lp.open_at:
            continue
        c = ctx.cond[lp.open_at]
        if lp.closed_by == "shield-both-ends" and shield_like(c) and not joins_devices(c):
            continue  # answered by terminating one end, below
        if is_fastening(c, ctx.metals):
            add(
                delete_change(
                    ctx,
                    lp.open_at,
                    f"insulate {lp.open_at} from the metal ({_means(ctx, c)}) so that no ground "
                    "loop closes through it",
                    reason,
                    "insulate",
                )
            )
        else:
            add(
                delete_change(
                    ctx,
                    lp.open_at,
                    f"remove {lp.open_at} (it closes a ground loop)",
                    reason,
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
                        reason,
                        (edit,),
                        ctx.protective(c),
                        action="lift-network",
                        element=lp.open_at,
                    )
                )


def terminate_shield(ctx: ChangeContext, f, add) -> None:
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


def second_bond(ctx: ChangeContext, f, add) -> None:
    """GC105: each second chassis bond insulated (a fastening) or removed; a shield is lifted at
    one end instead (GC108), never removed."""
    for verb, e in f.actions:
        c = ctx.cond.get(e)
        if c is None or shield_like(c):
            continue
        what = (
            f"insulate {e} from the metal ({_means(ctx, c)})"
            if verb == "insulate"
            else f"remove the second chassis bond {e}"
        )
        action = "insulate" if verb == "insulate" else "remove"
        add(delete_change(ctx, e, what, f.code, action))


def _means(ctx, c) -> str:
    """How the fastening ``c`` is insulated from its metal, by the kind of the point it holds."""
    point = ctx.points.get(c.b if c.a in ctx.metals else c.a)
    return insulating_means(point.kind if point is not None else None)


def _throw_switches(ctx: ChangeContext, reason: str, add) -> None:
    """Every closed switch in a listed loop (a ground-lift switch left closed) thrown open: the
    builder put it there to be used.  Never one the protective earth runs through."""
    seen: set[str] = set()
    for lp in ctx.result.loops:
        for name in lp.loop.edges:
            c = ctx.cond.get(name)
            if name in seen or c is None or not can_open(c) or not c.closed:
                continue
            seen.add(name)
            st = ctx.statement(c)
            if st is None or ctx.protective(c):
                continue
            title = f"throw {name} open (its lift), so that no ground loop closes through it"
            ph = ctx.src.find(st, "closed")
            edit = ctx.src.replace(st, [(ph[0], "open")]) if ph else appended(ctx, st, "open")
            add(
                Candidate(
                    title, reason, (edit,), False, action="throw", element=name, work=NO_TOOL
                )
            )

"""GC101: the ground loops, each classified by what closes it (the audit context's
:class:`~groundcheck.rules.context.LoopInfo`), with the conductor to open and how.

A pure function of an :class:`~groundcheck.rules.context.AuditContext`, registered under its code
(:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

from ..model.kinds import is_fastening, joins_devices, shield_like
from ..model.records import SOCKET_KINDS, insulating_means
from ..network.graph import Loop
from .catalogue import Finding
from .context import LOOP_CLASSES, LOOP_LIST_LIMIT, STRUCTURAL, AuditContext
from .registry import rule
from .repairs import signal_shield

__all__ = ["rule_loops"]


def _loop_text(lp: Loop) -> str:
    return " → ".join(lp.nodes + lp.nodes[:1])


@rule("GC101")
def rule_loops(ctx: AuditContext) -> list[Finding]:
    """GC101: the ground loops, each classified by what closes it, with the conductor to open.

    Parameters:
        ctx: the audit context.
    Returns:
        GC101 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    out = []
    for info in ctx.loops:
        if info.closed_by in STRUCTURAL:
            continue
        figures = {"conductors": len(info.loop.edges)}
        if info.area is not None:
            figures["area_mm2"] = info.area * 1e6
        fix, actions = _loop_fix(info, ctx.conductors.get(info.open_at), ctx)
        out.append(
            Finding(
                "GC101",
                "warning",
                f"ground loop closed by {LOOP_CLASSES[info.closed_by]}: {_loop_text(info.loop)}",
                ctx.loc(info.open_at or info.loop.edges[-1]),
                info.loop.edges,
                figures,
                fix,
                actions,
            )
        )
    extra = (
        ctx.loop_total
        - len(ctx.loops)
        - sum(1 for c in ctx.plan.conductors if c.connects and c.a == c.b)
    )
    if extra > 0:
        out.append(
            Finding(
                "GC101",
                "note",
                f"{extra} more independent loops not listed (limit {LOOP_LIST_LIMIT})",
                ctx.plan.location,
                (),
                {"loops_total": ctx.loop_total},
                "open the loops listed first",
            )
        )
    return out


def _loop_fix(info, opener, ctx: AuditContext) -> tuple[str, tuple]:
    """What to do about a loop, by what closes it and where it opens: (the fix, its structured
    actions)."""
    if (
        info.closed_by == "mains-cords"
        and opener is not None
        and joins_devices(opener)
        and opener.balanced
    ):
        return (
            f"{info.open_at} is balanced: its input rejects the loop's current by its common-mode "
            "rejection (the hum budget gives what is left); if hum remains, plug the devices "
            "into one outlet or strip, or use an input of better rejection; never lift the "
            "protective earth"
        ), ()
    if info.closed_by == "shield-both-ends":
        # the loop's shield, when it carries a signal, keeps both ends (the loop opens at a
        # socket's fastening instead, which the loop table names too)
        found = (ctx.conductors.get(e) for e in info.loop.edges)
        shields = [c for c in found if c is not None and shield_like(c)]
        keep = next((k for c in shields if (k := signal_shield(ctx, c))), None)
        if keep is not None:
            return _own_return_fix(info, keep, ctx)
    if opener is not None and is_fastening(opener, ctx.metals):
        held = ctx.plan.point(opener.b if opener.a in ctx.metals else opener.a)
        means = insulating_means(held.kind if held is not None else None)
        where = f"insulate {info.open_at} from the metal ({means})"
        actions = (("insulate", info.open_at),)
    elif opener is not None:
        where, actions = f"open the loop at {info.open_at}", (("open", info.open_at),)
    else:
        where, actions = "open the loop outside the protective earth", ()
    return where + {
        "shield-both-ends": " (terminate the shield at one end only)",
        "channel-returns": " (join the channels at one point only)",
        "second-chassis-bond": " (keep one bond of the signal ground to the chassis)",
        "metal-return": " (return currents by wire, not through the metal)",
        "mains-cords": " (use a balanced interconnect or a ground-lift network on the signal "
        "side, with power diodes across it rated for a fault (GC226); never lift the protective "
        "earth)",
    }.get(info.closed_by, ""), actions


def _own_return_fix(info, keep: str, ctx: AuditContext) -> tuple[str, tuple]:
    """A loop through a shield that is a signal's only return: the shield keeps both ends
    (``keep`` says why: opened, the signal would lose its return, full-scale buzz); the loop opens
    at a socket fastened to the metal on it, insulated, else it is kept small."""
    for name in info.loop.edges:
        c = ctx.conductors.get(name)
        if c is None or not is_fastening(c, ctx.metals):
            continue
        point = c.b if c.a in ctx.metals else c.a
        p = ctx.plan.point(point)
        # a socket's own ground, not a deliberate bond
        if p is not None and p.kind in SOCKET_KINDS:
            return (
                f"{keep}; insulate {point} from the metal instead (insulated socket or "
                "shoulder washers), so that the loop opens there",
                (("insulate", point),),
            )
    return (
        f"{keep}; run the loop's leads together so that it encloses little area, or join their "
        "returns at one point",
        (),
    )

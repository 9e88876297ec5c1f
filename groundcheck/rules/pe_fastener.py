"""GC202: the protective conductor from the inlet lands on a fastener that holds something else —
another conductor, or a part its own fastening clamps (a stud on the chassis through a
transformer's foot); or another protective conductor (a second box's earth core) lands on a stud
that also takes a conductor that is not protective (a signal ground's bond) or clamps a part.

A fault when the stud also takes other wires; a danger when it also holds a part (a transformer's
foot, a bracket) and nothing else of the protective route earths the metal once that stud is
loosened: whoever takes the part out for service unearths the chassis without touching an earth
wire (common practice; product-safety standards forbid a protective connection that also fixes
another part — IEC 60335-1 cl. 28, IEC 62368-1, from memory)."""

from __future__ import annotations

import networkx as nx

from ..model.kinds import is_fastening
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext

__all__ = ["pe_fastener"]


def pe_fastener(ctx: AuditContext) -> list[Finding]:
    """GC202: a protective conductor lands on a fastener that holds something else — the lead from
    the inlet on a stud that takes other wires or clamps a part; any other protective conductor
    (a bond to a second box, an umbilical's earth core) on a stud that also takes a conductor
    that is not protective (a signal ground's bond) or clamps a part.

    Parameters:
        ctx: the audit context.
    Returns:
        GC202 findings, one per stud.
    References:
        the rule catalogue (rules/catalogue_pe.py), which names the code's sources.
    """
    out, seen = [], set()
    G = ctx.G
    for v, keys in G.adj[PE_POINT].items():
        for k in keys:
            if k in ctx.route and v not in ctx.metals and v not in seen:
                found = _landing(ctx, G.edges[PE_POINT, v, k]["conductor"], v, inlet=True)
                seen.add(v)
                out += [found] if found else []
    for c in ctx.plan.conductors:
        if c.name not in ctx.route or is_fastening(c, ctx.metals) or PE_POINT in (c.a, c.b):
            continue
        for v in (c.a, c.b):
            if v in ctx.metals or v in seen or v not in G:
                continue
            seen.add(v)
            found = _landing(ctx, c, v, inlet=False)
            out += [found] if found else []
    return out


def _landing(ctx: AuditContext, c, v: str, inlet: bool) -> Finding | None:
    """GC202 for protective conductor ``c`` landing on ``v``: what else the stud takes (for the
    inlet's lead anything; for another protective conductor what is not protective) and the
    part its fastening clamps; None when nothing."""
    k = c.name
    others = [kk for _, w, kk in ctx.G.edges(v, keys=True) if kk != k]
    # the stud's own fastening to the metal, whatever role the plan writes for it
    fastenings = sorted(kk for kk in others if is_fastening(ctx.conductors[kk], ctx.metals))
    if not fastenings:
        return None  # a wire joined to wires: no stud on the metal
    holds = [kk for kk in others if kk not in fastenings[:1]]
    if not inlet:
        holds = [kk for kk in holds if kk not in ctx.route]
    holds += _clamped_part(ctx, v, fastenings[:1])
    if not holds:
        return None
    parts = _parts_held(ctx, v, holds, fastenings[:1])
    danger = bool(parts) and not _earthed_without(ctx, v, _removed(ctx, parts))
    why = (
        f"servicing {' or '.join(parts)} undoes the metal's only protective bond"
        if danger
        else "servicing them loosens the earth"
    )
    what = "the protective earth" if inlet else f"protective conductor {k}"
    return Finding(
        "GC202",
        "danger" if danger else "fault",
        f"{what} lands on {v}, {_held(ctx, v, holds)}: {why}",
        c.location,
        (k, v, *sorted(holds)),
        {"other_items": len(holds), "holds_part": danger},
        f"give {what} a stud of its own, with nothing else on it "
        f"(only {what if inlet else k} moves: {', '.join(sorted(holds))} "
        f"{'stays as it is' if len(holds) == 1 else 'stay as they are'})",
    )


def _held(ctx: AuditContext, stud: str, holds: list[str]) -> str:
    """What else a protective stud takes, in words: each conductor with the point or part it goes
    to, and each part its fastening clamps."""
    out, clamps = [], []
    for h in sorted(holds):
        c = ctx.conductors.get(h)
        if c is None:
            clamps.append(h)
        else:
            out.append(f"{h} (to {c.b if c.a == stud else c.a})")
    point = ctx.plan.point(stud)
    on = f" to {point.on}" if point is not None and point.on else ""
    words = [f"which also takes {', '.join(out)}"] if out else []
    words += [f"whose fastening also clamps {m}{on}" for m in clamps]
    return ", and ".join(words)


def _clamped_part(ctx: AuditContext, stud: str, own: list) -> list[str]:
    """The part a protective stud's own fastening clamps when the stud sits ``on`` one metal part
    and is fastened to another: the fastening holds that other part (a transformer's foot, say)
    onto the one it sits on, so servicing the part loosens the protective earth."""
    point = ctx.plan.point(stud)
    if point is None or point.on is None or not own:
        return []
    c = ctx.conductors[own[0]]
    part = c.b if c.a == stud else c.a
    return [part] if part in ctx.metals and part != point.on else []


def _parts_held(ctx: AuditContext, stud: str, holds: list[str], own: list[str]) -> list[str]:
    """The metal parts whose servicing undoes a protective stud: a part its fastening clamps (with
    the part the stud sits on: the one fastening holds both), or a part another fastening bolts on
    through the stud (a transformer's foot)."""
    point = ctx.plan.point(stud)
    base = {point.on} if point is not None and point.on else set()
    for k in own:
        c = ctx.conductors[k]
        base.add(c.b if c.a == stud else c.a)
    out = set()
    for h in holds:
        c = ctx.conductors.get(h)
        if c is None:  # a clamped part: the fastening holds it and the part the stud is on
            out |= {h, *(base & {point.on})}
        elif is_fastening(c, ctx.metals):
            out |= {c.b if c.a == stud else c.a} - base
    return sorted(out)


def _removed(ctx: AuditContext, parts: list[str]) -> list[str]:
    """Of the parts a stud holds together, those taken out for service: all but the largest (the
    chassis a transformer's foot or a bracket is bolted to)."""
    if len(parts) < 2:
        return parts

    def area(name: str) -> float:
        m = ctx.plan.metal(name)
        return abs(m.size[0] * m.size[1]) if m is not None and m.size else 0.0

    largest = max(parts, key=lambda n: (area(n), n))
    return [n for n in parts if n != largest]


def _earthed_without(ctx: AuditContext, stud: str, serviced: list[str]) -> bool:
    """Whether every metal part the protective route reaches from the earth terminal, but the
    ``serviced`` ones (taken out with the stud's nut), is still reached with ``stud`` taken away (a
    second protective bond of its own keeps it earthed); a part earthed only through the stud is
    lost with it, whatever else stays earthed."""

    def reached(skip) -> set:
        G = nx.Graph()
        G.add_node(PE_POINT)
        for u, w, k in ctx.G.edges(keys=True):
            if k in ctx.route.keep and skip not in (u, w):
                G.add_edge(u, w)
        return nx.node_connected_component(G, PE_POINT) & ctx.metals

    return reached(stud) >= reached(None) - set(serviced)

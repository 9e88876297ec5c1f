"""GC202: the protective conductor from the inlet lands on a fastener that holds something else —
another conductor, or a part its own fastening clamps (a stud on the chassis through a
transformer's foot)."""

from __future__ import annotations

from ..model.kinds import is_fastening
from ..model.records import PE_POINT
from .catalogue import Finding
from .context import AuditContext

__all__ = ["pe_fastener"]


def pe_fastener(ctx: AuditContext) -> list[Finding]:
    """GC202: the protective conductor from the inlet lands on a fastener that holds something
    else.

    Parameters:
        ctx: the audit context.
    Returns:
        GC202 findings.
    References:
        the rule catalogue (rules/catalogue_pe.py), which names the code's sources.
    """
    out = []
    G = ctx.G
    for v, keys in G.adj[PE_POINT].items():
        for k in keys:
            c = G.edges[PE_POINT, v, k]["conductor"]
            if k not in ctx.route or v in ctx.metals:
                continue
            others = [kk for _, w, kk in G.edges(v, keys=True) if kk != k]
            # the stud's own fastening to the metal, whatever role the plan writes for it
            fastenings = sorted(
                kk for kk in others if is_fastening(ctx.conductors[kk], ctx.metals)
            )
            holds = [kk for kk in others if kk not in fastenings[:1]]
            holds += _clamped_part(ctx, v, fastenings[:1])
            if holds:
                out.append(
                    Finding(
                        "GC202",
                        "fault",
                        f"the protective earth lands on {v}, {_held(ctx, v, holds)}: "
                        "servicing them loosens the earth",
                        c.location,
                        (c.name, v, *sorted(holds)),
                        {"other_items": len(holds)},
                        "give the protective earth a stud of its own, with nothing else on it "
                        f"({', '.join(sorted(holds))} stay on the fastening they share now)",
                    )
                )
    return out


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

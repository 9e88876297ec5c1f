"""Each stage's input reference: the point its signal is measured against (an input's sleeve).

A channel's signal arrives referred to its source's ground (the sleeve of the input socket) and
reaches the stage along the signal ground, so the drop between the sleeve and the stage's ground
point is part of the stage's input.  ``stage NAME: A to B, reference P`` states that point;
without it the point is inferred when the plan leaves no doubt (see :func:`stage_inputs`).  An
assembled stage with a reference reads P to B: its ``a`` is P and ``named`` keeps the A written.
"""

from __future__ import annotations

from dataclasses import replace

from ..model.kinds import bonds_metal, is_lift, joins_devices
from ..model.records import Conductor, Point, Stage

__all__ = ["stage_inputs", "SOCKET_KINDS"]

#: point kinds that are a socket's ground contact: an input's source reference
SOCKET_KINDS = ("sleeve", "jack")


def _far_end(first: Point, socket: Point) -> bool:
    """The stage's first point sits on another metal part than the socket: it is the source's own
    ground at the far end of the lead (a reverb pan's transducer, a footswitch), so the stage
    already names its input's reference and the socket is no nearer the source."""
    return first.on is not None and socket.on is not None and first.on != socket.on


def _inferred(stages, points: dict[str, Point], conductors, taken: set[str]) -> dict[int, str]:
    """Stage index -> its inferred reference: the one socket point (sleeve or jack) of the stage's
    own block joined to the stage's first point by a conductor of its own (a wire, or a lead's
    shield even when it is terminated at one end only), which no stage, current or rectifier
    names; a socket two stages could claim, or a stage with two such sockets, gets none."""
    joined: dict[str, set[str]] = {}
    for c in conductors:
        if bonds_metal(c) or joins_devices(c) or is_lift(c):
            continue
        for x, y in ((c.a, c.b), (c.b, c.a)):
            px, py = points.get(x), points.get(y)
            if (
                px is not None
                and py is not None
                and py.kind in SOCKET_KINDS
                and py.group == px.group
                and not _far_end(px, py)
            ):
                joined.setdefault(x, set()).add(y)
    claims: dict[int, str] = {}
    for k, st in enumerate(stages):
        first = points.get(st.a)
        if (
            st.reference is not None
            or st.across is not None
            or first is None
            or first.kind in SOCKET_KINDS
        ):
            continue
        socks = joined.get(st.a, set()) - taken - {st.b}
        if len(socks) == 1:
            claims[k] = next(iter(socks))
    counts: dict[str, int] = {}
    for s in claims.values():
        counts[s] = counts.get(s, 0) + 1
    return {k: s for k, s in claims.items() if counts[s] == 1}


def stage_inputs(
    stages: list[Stage], points: dict[str, Point], conductors: list[Conductor], sources
) -> list[Stage]:
    """The stages with their input references applied: a stage with a reference P (stated, or
    inferred) reads P to B instead of A to B, ``named`` keeping A.

    Inference, only where it is unambiguous (plans that start their stages at the sleeve keep
    their figures): the stage's first point is not itself a socket point, and exactly one sleeve
    or jack point of the same block placement is joined to it by a conductor statement (not a
    fastening), named by no stage, current or rectifier, and joined that way to no other stage.
    ``reference A`` (the stage's own first point) keeps the pair as written.

    Parameters:
        stages: the plan's stages, names resolved.
        points: the plan's points by name.
        conductors: the plan's conductors.
        sources: the plan's currents and rectifiers (their ends are never an inferred reference).
    Returns:
        the stages, each reading its input's reference.
    References:
        common practice: an unbalanced input's signal is the voltage between its hot contact and
        its sleeve, so any drop between the sleeve and the stage's own ground adds to it.
    """
    taken = {x for st in stages for x in (st.a, st.b, st.reference) if x is not None}
    taken |= {x for s in sources for x in (s.a, s.b)}
    inferred = _inferred(stages, points, conductors, taken)
    out = []
    for k, st in enumerate(stages):
        ref = st.reference if st.reference is not None else inferred.get(k)
        if ref is None:
            out.append(st)
        elif ref == st.a:
            out.append(replace(st, reference=None))
        else:
            out.append(
                replace(st, a=ref, reference=ref, named=st.a, inferred=st.reference is None)
            )
    return out

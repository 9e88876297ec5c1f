"""Twisted pairs: two round conductors between the same two points written 'twisted with' each
other run along one line, so no area lies between them for a stray field to induce in."""

from __future__ import annotations

import difflib
from dataclasses import replace

from ..core.errors import PlanError
from ..model.records import Conductor

__all__ = ["twisted_pairs"]


def twisted_pairs(conductors: list[Conductor], refs: dict, errors: list) -> list[Conductor]:
    """Each twisted pair runs along one line, the route of the one of its two conductors written
    first: no area between them for a field to induce in. Its partner must be a conductor between
    the same two points.

    Parameters:
        conductors: the plan's conductors, in the order written.
        refs: conductor name -> where its 'twisted' is written.
        errors: where a partner that is no conductor, or joins other points, is reported.
    Returns:
        the conductors, the later of each pair on the earlier's route.
    References:
        Faraday's law: a loop of no area links no flux (common practice: twisting a pair).
    """
    order = {c.name: k for k, c in enumerate(conductors)}
    by_name = {c.name: c for c in conductors}
    line: dict[str, Conductor] = {}  # the later conductor of each pair -> the earlier
    for c in conductors:
        if c.twisted_with is None:
            continue
        o = by_name.get(c.twisted_with)
        loc = refs.get(c.name, c.location)
        if o is None or o is c or {o.a, o.b} != {c.a, c.b}:
            close = difflib.get_close_matches(c.twisted_with, list(by_name), n=1)
            why = "is no conductor" if o is None else "does not join the same two points"
            errors.append(
                PlanError(
                    f"{c.kind} {c.name} is twisted with {c.twisted_with!r}, which {why}",
                    loc,
                    f"did you mean {close[0]!r}?"
                    if o is None and close
                    else "a twisted pair's two conductors run between the same two points",
                )
            )
            continue
        first, later = (c, o) if order[c.name] < order[o.name] else (o, c)
        line[later.name] = first
    out = []
    for c in conductors:
        first = line.get(c.name)
        if first is not None:
            route = first.route if first.a == c.a else tuple(reversed(first.route))
            c = replace(c, route=route)
        out.append(c)
    return out

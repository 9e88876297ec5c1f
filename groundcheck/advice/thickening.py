"""The protective conductor made thicker (GC204: to the line conductor's size; GC223: to what
passes every bonding test it fails): in mm², or in AWG where the plan writes gauges (the thinnest
common gauge of at least the size needed, ASTM B258 areas).  A change that only strengthens the
protective path."""

from __future__ import annotations

import math

from ..rules.catalogue import RULES
from .changes import STANDARD_SECTIONS_MM2, Candidate, ChangeContext, squeeze
from .edits import Edit

__all__ = ["thicker"]


#: the gauges of hook-up and cord wire in common use, thinnest first
COMMON_GAUGES = (22, 20, 18, 16, 14, 12, 10, 8, 6, 4)


def _awg_area(n: int) -> float:
    """The area of an AWG gauge, mm²: d = 0.127 mm × 92^((36 − n)/39) (ASTM B258)."""
    d = 0.127 * 92 ** ((36 - n) / 39)
    return math.pi * d * d / 4


def _gauge(area: float) -> int | None:
    """The thinnest common AWG gauge of at least ``area`` mm² (None beyond the table)."""
    return next((n for n in COMMON_GAUGES if _awg_area(n) >= area * (1 - 1e-9)), None)


def thicker(ctx: ChangeContext, f) -> Candidate | None:
    """GC204: the protective conductor at the line conductor's cross-section; GC223: at the
    smallest standard size that passes the bonding test (each a change that only strengthens
    it)."""
    c = ctx.cond.get(f.elements[0]) if f.elements else None
    st = ctx.statement(c) if c is not None else None
    if st is None:
        return None
    size = _size(ctx, f)
    if size is None:
        return None
    area, need, why, passes = size
    new = f"{area:g} mm2"
    item = ctx.src.quantity(st, "area")
    gauge = _gauge(need) if item is not None and item.text.upper().endswith("AWG") else None
    if gauge is not None:  # a plan written in AWG gets a gauge, the thinnest common one that does
        new = f"{gauge} AWG"
        what = "the line conductor's" if passes is None else "what passes the bonding tests,"
        why = (
            f"{_awg_area(gauge):.3g} mm², the thinnest common gauge of at least {what} "
            f"{need:.3g} mm²"
        )
    if item is not None:
        edit = ctx.src.replace(st, [(item, new)])
    else:
        # 'AWG 18' written word first; a trace, bus bar or strap given by its width is made wider
        # by hand (the finding says so), never turned into a round wire by giving it an area
        ph = ctx.src.find(st, "AWG")
        if not ph:
            return None
        edit = ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
        edit = Edit(edit.line, squeeze(edit.new, new), edit.extra, edit.last, edit.file)
    return Candidate(
        f"use {new.replace('mm2', 'mm²')} ({why}) for protective conductor {c.name}",
        f.code,
        (edit,),
        touches_protective=False,
        action="thicken",
        element=c.name,
    )


def _size(ctx: ChangeContext, f):
    """(area, the size it is the standard step at or above, why, the bonding tests' size or
    None) for a protective conductor's thickening, or None when nothing says what it needs."""
    # the size that passes every bonding test the conductor fails (a finding with the size that
    # passes), and at least the line conductor's (a thickening finding without one): one size
    # answers both, so neither fix line leaves the other finding
    mine = [
        g
        for g in ctx.result.findings
        if g.elements[:1] == f.elements[:1] and "thicken" in RULES[g.code].actions
    ]
    tests = [g.figures["thicker_mm2"] for g in [f, *mine] if g.figures.get("thicker_mm2")]
    passes = max(tests) if tests else None
    line = None
    if (
        ctx.plan.mains is not None
        and ctx.plan.mains.line_area is not None
        and any(not g.figures.get("thicker_mm2") for g in [f, *mine])
    ):
        line = ctx.plan.mains.line_area * 1e6
    if passes is None and line is None:
        return None
    line_std = (
        None
        if line is None
        else next((a for a in STANDARD_SECTIONS_MM2 if a >= line * (1 - 1e-9)), line)
    )
    if passes is not None and (line_std is None or passes >= line_std):
        area = need = passes
        why = "the smallest standard size that passes the bonding tests"
    else:
        area, need = line_std, line
        why = f"the standard size at least the line conductor's {need:.3g} mm²"
    return area, need, why, passes

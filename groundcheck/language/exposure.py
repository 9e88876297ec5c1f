"""Which metal parts a hand can reach when the plan does not say: the safe default of the plan's
assembly (docs/language.md, metal parts)."""

from __future__ import annotations

from dataclasses import replace

from ..model.records import Metal
from ..model.supplies import elv_fed_high_tension

__all__ = ["settled_metals"]


def settled_metals(metals: list, mains, rectifiers: list, points: list) -> dict[str, Metal]:
    """Each metal part by name with its accessibility settled (:func:`_exposed`).

    Parameters:
        metals: the plan's metal records as written.
        mains: its mains record (None: none).
        rectifiers: its rectifier records.
        points: its point records.
    Returns:
        name -> metal record, ``touchable`` settled.
    References:
        none (the language's defaults).
    """
    elv_fed = elv_fed_high_tension(mains, rectifiers)
    pole = any(p.kind == "mains-pole" for p in points)
    return {m.name: _exposed(m, mains, elv_fed, pole) for m in metals}


def _exposed(m: Metal, mains, elv_fed: bool, pole: bool = False) -> Metal:
    """A metal part with its accessibility settled: as written, else touchable in class I equipment
    with a mains supply and in a box fed at extra-low voltage that makes a supply above it
    inside (``elv_fed``: GC229 holds its metal to that supply's return), or with a conductor of
    the mains landing in it (``pole``, a transformerless set: GC230), whatever class it is
    written — a part nobody wrote as ``internal`` is treated as one a hand can reach, the safe
    default — and internal elsewhere; a ``signal-only`` part is never held to protective
    bonding, so it defaults to internal."""
    if m.touchable is not None:
        return m
    class_i = mains is not None and mains.equipment_class == "I"
    return replace(m, touchable=(class_i or elv_fed or pole) and not m.signal_only)

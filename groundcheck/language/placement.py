"""Placement of a block or device: a translation and an optional mirror of the plan frame; errors
named by their placements."""

from __future__ import annotations

from dataclasses import dataclass, replace

from ..model.records import Conductor, Current, FieldSource, Heater, Metal, Point, Rectifier, Stage

__all__ = ["Transform", "name_placements", "place"]

#: an error in a block placed many times names this many of its placements, then how many more
_NAMED = 5


@dataclass(frozen=True)
class Transform:
    """Placement of a block: p' = (ox + sx·x, oy + sy·y); sx, sy are ±1 (mirroring)."""

    ox: float = 0.0
    oy: float = 0.0
    sx: float = 1.0
    sy: float = 1.0

    def __call__(self, p):
        return None if p is None else (self.ox + self.sx * p[0], self.oy + self.sy * p[1])

    def then(self, outer: "Transform") -> "Transform":
        return Transform(
            outer.ox + outer.sx * self.ox,
            outer.oy + outer.sy * self.oy,
            outer.sx * self.sx,
            outer.sy * self.sy,
        )


def name_placements(
    e, placed_at: dict, shadowed: dict | None = None, worded: dict | None = None
) -> None:
    """An error in a block's statement says which placements it is in (said once for all of them),
    and which of its names are the block's own that hide a name outside it.

    ``e``: a PlanError; ``placed_at``: (file, line) of each statement expanded in a placement ->
    the placements; ``shadowed``: (file, line) -> the names there that hide outer ones; ``worded``:
    a cache of the wording per (file, line), for many errors of one loader.  At most five
    placements are named, then how many more.
    """
    key = (e.location.file, e.location.line)
    element = getattr(e, "element", None)  # an error of one placed element: its placement only
    said = worded.get(key) if worded is not None and element is None else None
    if said is None:  # the placements of one statement, worded once (``worded`` keeps it)
        where = list(dict.fromkeys(placed_at.get(key, ())))
        if element is not None:
            where = (
                sorted((w for w in where if element.startswith(w + ".")), key=len)[-1:] or where
            )
        named = ", ".join(where[:_NAMED]) + (
            f" and {len(where) - _NAMED:,} more" if len(where) > _NAMED else ""
        )
        said = f" (in placement{'s' if len(where) > 1 else ''} {named})" if where else ""
        if worded is not None and element is None:
            worded[key] = said
    if said and "(in placement" not in e.message:
        e.message += said
    hidden = sorted((shadowed or {}).get(key, ()))
    if hidden and "hides" not in e.hint:
        said = ", ".join(repr(n) for n in hidden)
        e.hint = (e.hint + "; " if e.hint else "") + (
            f"{said} here is the block's own, which hides the "
            f"{'name' if len(hidden) == 1 else 'names'} outside it"
        )


def place(record, st, prefix: str, tf: Transform, scopes: tuple, outer: set[str], shadowed: dict):
    """Rename and move a record built inside a block placement (``outer``: the top level's names; a
    name of the block's own that hides one of them, or one of an enclosing block, is noted in
    ``shadowed`` for the errors of that statement).

    A name is looked up in the innermost block first, then in each
    enclosing block, then at the top level.
    """
    if not prefix:
        return record

    def res(name):
        for k, (pfx, local) in enumerate(scopes):
            if name in local:
                if name in outer or any(name in inner for _, inner in scopes[k + 1 :]):
                    shadowed.setdefault((st.loc.file, st.loc.line), set()).add(name)
                return pfx + name
        return name

    if isinstance(record, Metal):
        size = None if record.size is None else (record.size[0] * tf.sx, record.size[1] * tf.sy)
        return replace(record, name=prefix + record.name, origin=tf(record.origin), size=size)
    if isinstance(record, Point):
        return replace(
            record,
            name=prefix + record.name,
            pos=tf(record.pos),
            on=res(record.on),
            group=prefix.rstrip("."),
        )
    if isinstance(record, FieldSource):
        return replace(record, name=prefix + record.name, pos=tf(record.pos))
    return _rewired(record, st, prefix, tf, res)


def _rewired(record, st, prefix: str, tf: Transform, res):
    """A record between two points placed: renamed, its ends (and reference) looked up with
    ``res``, its route moved, and its channel the placement's unless the statement names one."""
    explicit = any(ph and ph[0].kind == "word" and ph[0].value == "channel" for ph in st.phrases)
    channel = prefix.split(".")[0]
    if isinstance(record, Conductor):
        return replace(
            record,
            name=prefix + record.name if record.name else "",
            a=res(record.a),
            b=res(record.b),
            route=tuple(tf(p) for p in record.route),
            channel=record.channel if explicit else channel,
            twisted_with=res(record.twisted_with),
        )
    if isinstance(record, Rectifier):
        return replace(
            record,
            name=prefix + record.name,
            a=res(record.a),
            b=res(record.b),
            channel=record.channel if explicit else channel,
            filter_point=res(record.filter_point),
            regulator_point=res(record.regulator_point),
        )
    if isinstance(record, Current):
        ch = record.channel if explicit else channel
        return replace(
            record, name=prefix + record.name, a=res(record.a), b=res(record.b), channel=ch
        )
    if isinstance(record, Stage):
        return replace(
            record,
            name=prefix + record.name,
            a=res(record.a),
            b=res(record.b),
            reference=res(record.reference),
            supply=res(record.supply),
            channel=record.channel if explicit else channel,
        )
    if isinstance(record, Heater):
        return replace(
            record,
            name=prefix + record.name,
            a=res(record.a),
            b=res(record.b),
            reference=res(record.reference),
            route=tuple(tf(p) for p in record.route),
        )
    return record

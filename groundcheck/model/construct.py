"""Building records fast: without a frozen dataclass's generated ``__init__`` (a large plan's
load spends most of its record-making time there), and from the values a worker process sent
back."""

from __future__ import annotations

from dataclasses import MISSING, fields, replace

__all__ = ["make", "from_values", "altered"]

_LAYOUT: dict[type, tuple[dict, frozenset]] = {}


def make(cls, **values):
    """``cls(**values)`` for a record class of this module, built without the generated
    ``__init__``.

    A frozen dataclass's ``__init__`` sets each of its fields through ``object.__setattr__``; for
    the twenty-odd fields of a :class:`Conductor` that is most of the cost of loading a large
    plan's wires. This fills the instance's ``__dict__`` with the defaults and the given values in
    one step: the same record (equal, and equally immutable afterwards), about four times faster.
    Unknown or missing fields raise :class:`TypeError` as the constructor would.  None of the
    records has ``__post_init__``.
    """
    defaults, names, factories = _layout(cls)
    if factories or not names.issuperset(values) or not values.keys() >= names - defaults.keys():
        return cls(**values)  # fresh default objects, or let the constructor name the bad field
    obj = object.__new__(cls)
    d = obj.__dict__
    d.update(defaults)
    d.update(values)
    return obj


def _layout(cls) -> tuple[dict, frozenset, bool]:
    """A record class's defaults, field names and whether a field has a default factory."""
    layout = _LAYOUT.get(cls)
    if layout is None:
        fs = fields(cls)
        defaults = {f.name: f.default for f in fs if f.default is not MISSING}
        factories = any(f.default_factory is not MISSING for f in fs)
        layout = _LAYOUT[cls] = (defaults, frozenset(f.name for f in fs), factories)
    return layout


def from_values(cls, names: tuple[str, ...], values: tuple):
    """A record of ``cls`` from the value of every field, ``names`` being all its fields in order.

    The bulk counterpart of :func:`make` for records sent back by a worker process
    (:mod:`groundcheck.language.bigfile`): nothing is defaulted or checked, as the values came from
    a record.
    """
    obj = object.__new__(cls)
    obj.__dict__.update(zip(names, values))
    return obj


def altered(record, **changes):
    """``dataclasses.replace(record, **changes)`` for a record class of this module, built as
    :func:`make` builds one: the record's field values with the changes, the same record (equal,
    and equally immutable) several times faster. Anything but a record's fields goes to
    ``dataclasses.replace``, which names the bad field; what is kept beside the fields (a cached
    property's value) is not carried over, as ``replace`` does not carry it.
    """
    layout = _layout(type(record))
    if layout[2] or not layout[1].issuperset(changes):
        return replace(record, **changes)
    obj = object.__new__(type(record))
    d = obj.__dict__
    d.update(record.__dict__)
    if len(d) != len(layout[1]):  # something kept beside the fields (a cached property's value)
        for k in [k for k in d if k not in layout[1]]:
            del d[k]
    d.update(changes)
    return obj

"""Plain data for JSON documents: numbers rounded to significant digits, numeric-library scalars
made Python numbers, non-finite values made None.  No numeric library is imported here: a scalar of
one is recognised by its ``item()`` method."""

from __future__ import annotations

import math
import re

__all__ = ["clean", "readable", "unsigned_zero"]

#: a zero written with a sign ("-0", "-0.0", "+0.00"), not part of a longer number
_SIGNED_ZERO = re.compile(r"(?<![\w.])[-+](0(?:\.0+)?)(?![\w.])")


def clean(x, digits: int = 9):
    """JSON-safe copy: numpy scalars to Python, non-finite floats to None, floats to ``digits``
    significant digits."""
    # the plain types first, by their exact type, and a container's plain values without a call
    # each (a large document holds hundreds of thousands of them)
    t = type(x)
    if t is float:
        return float(format(x, f".{digits}g")) if math.isfinite(x) else None
    if t is dict:
        out = {}
        spec = f".{digits}g"
        for k, v in x.items():
            tv = type(v)
            if tv is float:
                v = float(format(v, spec)) if math.isfinite(v) else None
            elif tv not in _AS_IS:
                v = clean(v, digits)
            out[k if type(k) is str else str(k)] = v
        return out
    if t is list or t is tuple:
        return [v if type(v) in _AS_IS else clean(v, digits) for v in x]
    if t in _AS_IS:
        return x
    return _clean_other(x, digits)


#: the types :func:`clean` returns as they are
_AS_IS = frozenset((str, int, bool, type(None)))


def _clean_other(x, digits: int):
    """:func:`clean` of anything but the plain types themselves (subclasses, numpy scalars,
    complex numbers)."""
    if isinstance(x, dict):
        return {str(k): clean(v, digits) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [clean(v, digits) for v in x]
    if (
        not isinstance(x, (bool, int, float, complex, str))
        and hasattr(x, "item")
        and type(x).__module__ == "numpy"
    ):
        x = x.item()
    if isinstance(x, bool):
        return x
    if isinstance(x, int):
        return int(x)
    if isinstance(x, float):
        if not math.isfinite(x):
            return None
        return float(f"{x:.{digits}g}")
    if isinstance(x, complex):
        return clean(abs(x), digits)
    return x


def readable(x, spec: str = ".4g", missing: str = "–") -> str:
    """A number for a reader: ``format(x, spec)`` with a negative zero shown unsigned ("-0.0" and
    "+0.0" read "0.0"), and ``missing`` for None or a value that is not finite."""
    if x is None or not math.isfinite(x):
        return missing
    text = format(x, spec)
    if float(text.strip()) == 0.0:  # shown as zero: no sign, the same width
        text = format(0.0, spec.replace("+", ""))
    return text


def unsigned_zero(text: str) -> str:
    """``text`` with every zero written with a sign ("-0.0 dB") written without it ("0.0 dB")."""
    return _SIGNED_ZERO.sub(r"\1", text)

"""JSON text of a plain document, indented by two spaces: the same characters as
``json.dumps(doc, indent=2, ensure_ascii=False)``, written without the standard library's
generators.

With an indent the standard library encodes in Python, one generator per level of the document,
and every piece of text climbs through each level above it: a large installation's 13 MB document
took 0.7 s. Here each container is written by one call that appends its pieces to a list. A
document holding anything but dicts with text keys, lists, tuples, text, numbers, booleans and
None is given to the standard library as it is, so nothing is ever written differently.
"""

from __future__ import annotations

import json
from json.encoder import encode_basestring

__all__ = ["dumps"]

_INF = float("inf")


class _NotPlain(Exception):
    """Something the plain writer leaves to the standard library."""


def dumps(doc) -> str:
    """``json.dumps(doc, indent=2, ensure_ascii=False)``, character for character.

    Parameters:
        doc: the document.
    Returns:
        its JSON text (no final newline).
    References:
        RFC 8259 (JSON); the standard library's ``json`` module, whose layout this reproduces.
    """
    out: list[str] = []
    try:
        _value(doc, out, "\n")
    except (_NotPlain, RecursionError):
        return json.dumps(doc, indent=2, ensure_ascii=False)
    return "".join(out)


def _float(x: float) -> str:
    if x != x:
        return "NaN"
    if x == _INF:
        return "Infinity"
    if x == -_INF:
        return "-Infinity"
    return float.__repr__(x)


def _scalar(o) -> str:
    t = type(o)
    if t is str:
        return encode_basestring(o)
    if t is float:
        return _float(o)
    if t is int:
        return int.__repr__(o)
    if o is None:
        return "null"
    if o is True:
        return "true"
    if o is False:
        return "false"
    raise _NotPlain


def _value(o, out: list, nl: str) -> None:
    t = type(o)
    if t is dict:
        _object(o, out, nl)
    elif t is list or t is tuple:
        _array(o, out, nl)
    else:
        out.append(_scalar(o))


def _object(o: dict, out: list, nl: str) -> None:
    if not o:
        out.append("{}")
        return
    inner = nl + "  "
    sep = "{" + inner
    for k, v in o.items():
        if type(k) is not str:
            raise _NotPlain  # the standard library writes such keys its own way
        t = type(v)
        if t is dict or t is list or t is tuple:
            out.append(sep + encode_basestring(k) + ": ")
            _value(v, out, inner)
        else:
            out.append(sep + encode_basestring(k) + ": " + _scalar(v))
        sep = "," + inner
    out.append(nl + "}")


def _array(o, out: list, nl: str) -> None:
    if not o:
        out.append("[]")
        return
    inner = nl + "  "
    sep = "[" + inner
    for v in o:
        t = type(v)
        if t is dict or t is list or t is tuple:
            out.append(sep)
            _value(v, out, inner)
        else:
            out.append(sep + _scalar(v))
        sep = "," + inner
    out.append(nl + "]")

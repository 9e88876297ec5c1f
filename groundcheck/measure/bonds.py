"""The bonding measurements file, and each measurement against the plan's own figure.

The file (``.gmeas``, UTF-8) holds one measurement a line, ``#`` starting a comment::

    # measured with a four-wire meter, leads nulled
    pe_stud to cover: 85 mohm at 10 A
    mains.pe to chassis: 0.04 ohm

``A to B`` name two points or metal parts of the plan; the resistance carries its unit; ``at
CURRENT`` is the
test current, when the meter states one.  Each line is parsed on its own (lark, the plan's
conventions), so every
error is reported where it stands, with a hint.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass
from pathlib import Path

from lark import Lark, Token, UnexpectedInput

from ..core.errors import Location, PlanError, PlanErrors
from ..core.units import UnitError, parse_quantity

__all__ = ["Measurement", "read_measurements", "parse_measurements", "MAX_BYTES", "MAX_LINES"]

#: the file's limits: 1 MiB, 10,000 measurements
MAX_BYTES = 1 << 20
MAX_LINES = 10_000
FORM = "write a measurement as: POINT to POINT: 85 mohm at 10 A"

GRAMMAR = r"""
start: NAME "to" NAME ":" quantity (_AT quantity)?
quantity: NUMBER UNIT
_AT: "at"
NAME: /[A-Za-z][A-Za-z0-9_.\-]*/
NUMBER: /[0-9]+(\.[0-9]+)?([eE][-+]?[0-9]+)?/
UNIT: /[A-Za-zµΩ]+/
%ignore /[ \t]+/
"""

_PARSER = Lark(GRAMMAR, parser="lalr", propagate_positions=True)


@dataclass(frozen=True)
class Measurement:
    """One measured resistance between two named points (SI units)."""

    a: str
    b: str
    resistance: float  # Ω
    current: float | None  # A, the test current when stated
    location: Location
    columns: tuple[int, int]  # where A and B are written


def read_measurements(path: str, names) -> list[Measurement]:
    """The measurements of a file, their names checked against the plan's.

    Parameters:
        path: the measurements file.
        names: the plan's point and metal-part names.
    Returns:
        the measurements in file order; PlanErrors with every located error.
    References:
        none (file reading).
    """
    p = Path(path)
    if not p.is_file():
        raise PlanErrors(
            [
                PlanError(
                    "no such measurements file", Location(path), "give the path of a text file"
                )
            ]
        )
    if p.stat().st_size > MAX_BYTES:
        raise PlanErrors(
            [
                PlanError(
                    f"the measurements file is over {MAX_BYTES >> 20} MiB",
                    Location(path),
                    "one measurement a line; split the file",
                )
            ]
        )
    try:
        text = p.read_text(encoding="utf-8")
    except UnicodeDecodeError as e:
        raise PlanErrors(
            [
                PlanError(
                    f"not UTF-8 text (byte {e.start})",
                    Location(path),
                    "save the measurements file as UTF-8",
                )
            ]
        ) from None
    return parse_measurements(text, path, names)


def parse_measurements(text: str, file: str, names) -> list[Measurement]:
    """The measurements of a text (see the module's description).

    Parameters:
        text: the file's text.
        file: its name, for locations.
        names: the plan's point and metal-part names.
    Returns:
        the measurements; PlanErrors with every located error.
    References:
        none (parsing).
    """
    out, errors = [], []
    names = set(names)
    lines = text.splitlines()
    if len(lines) > MAX_LINES:
        raise PlanErrors(
            [PlanError(f"more than {MAX_LINES:,} lines", Location(file), "split the file")]
        )
    for no, line in enumerate(lines, 1):
        body = line.split("#", 1)[0]
        if not body.strip():
            continue
        try:
            out.append(_measurement(body, Location(file, no, 1), names, line))
        except PlanError as e:
            errors.append(e)
    if errors:
        raise PlanErrors(errors)
    return out


def _error(message: str, loc: Location, col: int, hint: str, line: str) -> PlanError:
    return PlanError(message, Location(loc.file, loc.line, col), hint, line)


def _measurement(body: str, loc: Location, names: set, line: str) -> Measurement:
    try:
        tree = _PARSER.parse(body)
    except UnexpectedInput as e:
        col = getattr(e, "column", 1) or 1
        return _raise(_error("this is not a measurement", loc, col, FORM, line))
    a, b, *quantities = tree.children
    for tok in (a, b):
        if tok not in names:
            near = difflib.get_close_matches(str(tok), sorted(names), n=1)
            hint = f"did you mean {near[0]}?" if near else "name a point or metal part of the plan"
            _raise(
                _error(
                    f"the plan has no point or metal part {str(tok)!r}",
                    loc,
                    tok.column,
                    hint,
                    line,
                )
            )
    if a == b:
        _raise(_error("a measurement needs two different points", loc, b.column, FORM, line))
    ohm = _quantity(quantities[0], "resistance", loc, line)
    if ohm <= 0 or ohm > 1e9:
        _raise(
            _error(
                "a resistance from above 0 to 1 Gohm",
                loc,
                quantities[0].children[0].column,
                "a measured bond is a few milliohms",
                line,
            )
        )
    amps = _quantity(quantities[1], "current", loc, line) if len(quantities) > 1 else None
    if amps is not None and not 0 < amps <= 100:
        _raise(
            _error(
                "a test current from above 0 to 100 A",
                loc,
                quantities[1].children[0].column,
                "a bonding tester drives 0.2 to 25 A",
                line,
            )
        )
    return Measurement(str(a), str(b), ohm, amps, loc, (a.column, b.column))


def _quantity(tree, kind: str, loc: Location, line: str) -> float:
    number, unit = tree.children
    assert isinstance(number, Token)
    try:
        value, got = parse_quantity(str(number), str(unit))
    except (UnitError, ValueError) as e:
        return _raise(
            _error(
                f"{e}",
                loc,
                unit.column,
                f"a {kind}: {'mohm, ohm' if kind == 'resistance' else 'A, mA'}",
                line,
            )
        )
    if got != kind:
        _raise(
            _error(
                f"{number}{unit} is a {got}, not a {kind}",
                loc,
                number.column,
                f"a {kind}: {'mohm, ohm' if kind == 'resistance' else 'A, mA'}",
                line,
            )
        )
    return value


def _raise(e: PlanError):
    raise e

"""Rewritings of a plan's text that must change no figure and no finding (tests/test_invariants.py,
benchmarks/fuzz_campaign.py --invariants): the statements in another order, lengths and positions
in other units, a wire split into two in series at a new junction, each fastening written with
another fastening kind, and the role `protective` written or left out on the protective route.

Each works on the text of a generated plan (one statement a line, blocks closed by a `}` of their
own line, as tests/invariantplans.py and tests/test_repair_properties.py write them), so that the
rewriting is done without the code under test."""

from __future__ import annotations

import re
from random import Random

#: metres per unit, for the lengths written in other units (the SI definitions; 1 in = 25.4 mm
#: exactly, by the international yard and pound agreement of 1959)
METRES = {"mm": 1e-3, "cm": 1e-2, "m": 1.0, "in": 0.0254, "mil": 0.0254e-3}


def _units(text: str) -> list[list[str]]:
    """The statements as units that may be reordered: a line, or a whole block (its lines)."""
    out: list[list[str]] = []
    block: list[str] | None = None
    for line in text.splitlines():
        if block is not None:
            block.append(line)
            if line.strip() == "}":
                out.append(block)
                block = None
        elif line.rstrip().endswith("{"):
            block = [line]
        elif line.strip():
            out.append([line])
    return out


def reordered(text: str, rnd: Random) -> str:
    """The statements shuffled, at the top level and inside each block (a block stays whole)."""
    units = _units(text)
    for u in units:
        if len(u) > 2:
            inner = u[1:-1]
            rnd.shuffle(inner)
            u[1:-1] = inner
    rnd.shuffle(units)
    return "\n".join(line for u in units for line in u) + "\n"


_SIZE = re.compile(r"\b(\d+(?:\.\d+)?) x (\d+(?:\.\d+)?) mm\b")
_LENGTH = re.compile(r"\b(\d+(?:\.\d+)?) ?mm\b")
_POSITION = re.compile(r"\bat (-?\d+(?:\.\d+)?),(-?\d+(?:\.\d+)?)(?= *(?:,|$| on\b))")


def _in(value: str, unit: str) -> str:
    return repr(float(value) * METRES["mm"] / METRES[unit])


def in_units(text: str, rnd: Random, units=("cm", "m", "in", "mil")) -> str:
    """Every length written in mm (a conductor's length, a thickness, a size, a height) and every
    position (in mm when it has no unit) written in a unit drawn for each."""

    def size(m):
        u = rnd.choice(units)
        return f"{_in(m[1], u)} x {_in(m[2], u)} {u}"

    def length(m):
        u = rnd.choice(units)
        return f"{_in(m[1], u)} {u}"

    def position(m):
        u = rnd.choice(units)
        return f"at {_in(m[1], u)},{_in(m[2], u)} {u}"

    out = []
    for line in text.splitlines():
        line = _SIZE.sub(size, line)
        line = _LENGTH.sub(length, line)
        out.append(_POSITION.sub(position, line))
    return "\n".join(out) + "\n"


_WIRE = re.compile(r"^(\s*)wire (\S+): (\S+) to (\S+), (\d+(?:\.\d+)?) mm(,.*)$")
_POINT = re.compile(r"^\s*point (\S+): [^,]+, at (-?\d+),(-?\d+)")


_PLACE = re.compile(r"^place (\S+) as (\S+) at (-?\d+),(-?\d+)(, mirror( x)?)?$")
_INLET = re.compile(r"^mains .*inlet at (-?\d+),(-?\d+)")


def _positions(lines: list[str], ind: str) -> dict:
    """Where each point is, in the scope of a statement indented by ``ind``: a block's own points
    (inside a block), else the top level's, the inlet's `mains.pe` and the points of each placed
    block (moved and mirrored as docs/language.md says: mirrored about the block's origin, then
    moved)."""
    own = {
        p[1]: (float(p[2]), float(p[3]))
        for line in lines
        if (p := _POINT.match(line)) and line.startswith(ind + "point")
    }
    if ind:
        return own
    inner = {
        p[1]: (float(p[2]), float(p[3]))
        for line in lines
        if (p := _POINT.match(line)) and line.startswith("  point")
    }
    for line in lines:
        if m := _INLET.match(line):
            own["mains.pe"] = (float(m[1]), float(m[2]))
        if m := _PLACE.match(line):
            ox, oy = float(m[3]), float(m[4])
            for name, (x, y) in inner.items():
                if m[5] and m[6]:
                    x = -x
                elif m[5]:
                    y = -y
                own[f"{m[2]}.{name}"] = (x + ox, y + oy)
    return own


def wires(text: str) -> list[str]:
    """The names of the wires written with a length in mm that :func:`split_wire` can split."""
    return [m[2] for line in text.splitlines() if (m := _WIRE.match(line))]


def split_wire(text: str, name: str, share: float = 0.5) -> tuple[str, str, str]:
    """The wire ``name`` as two wires in series, ``share`` of its length from its first end to a
    new junction and the rest on to its second end, each with the wire's other attributes; the
    junction lies between the ends' positions in that ratio when both are written in its scope.
    Returns the text and the two new wires' names."""
    lines = text.splitlines()
    k = next(i for i, line in enumerate(lines) if (m := _WIRE.match(line)) and m[2] == name)
    m = _WIRE.match(lines[k])
    ind, a, b, length, rest = m[1], m[3], m[4], float(m[5]), m[6]
    where = _positions(lines, ind)
    j, first, second = f"{name}_j", f"{name}_a", f"{name}_b"
    at = ""
    if a in where and b in where:
        (xa, ya), (xb, yb) = where[a], where[b]
        at = f", at {xa + share * (xb - xa)!r},{ya + share * (yb - ya)!r}"
    lines[k : k + 1] = [
        f"{ind}point {j}: junction{at}",
        f"{ind}wire {first}: {a} to {j}, {length * share!r} mm{rest}",
        f"{ind}wire {second}: {j} to {b}, {length * (1 - share)!r} mm{rest}",
    ]
    return "\n".join(lines) + "\n", first, second


_FASTENING = re.compile(r"^(\s*)bolt (\S+:)")


def fastenings_as(text: str, kinds: list[str]) -> str:
    """Each fastening (written `bolt`) written with the next kind of ``kinds`` (cycled)."""
    out, n = [], 0
    for line in text.splitlines():
        if m := _FASTENING.match(line):
            line = f"{m[1]}{kinds[n % len(kinds)]} {m[2]}{line[m.end() :]}"
            n += 1
        out.append(line)
    return "\n".join(out) + "\n"


_ROLE = re.compile(r", protective\b")


def protective_written(text: str, names: set[str], write: bool) -> str:
    """The conductors ``names`` (by the name their statement gives, any block) with the role
    `protective` written (``write``) or left out (their kind's default role)."""
    out = []
    for line in text.splitlines():
        m = re.match(r"^\s*[a-z-]+ (\S+): ", line)
        if m and m[1] in names and not line.lstrip().startswith(("point", "metal", "stage")):
            body, hash_, comment = line.partition("#")
            body = _ROLE.sub("", body.rstrip())
            for role in (", signal", ", return", ", bond", ", shield"):
                if write and body.endswith(role):
                    body = body[: -len(role)]
            line = body + (", protective" if write else "") + (f"  #{comment}" if hash_ else "")
        out.append(line)
    return "\n".join(out) + "\n"


_RESISTOR = re.compile(r"^(\s*)wire (\S+): (\S+) to (\S+), ([0-9.e+-]+) ohm(,.*)$")


def split_resistor(text: str, name: str, share: float = 0.5) -> tuple[str, str, str]:
    """The wire ``name`` written with a stated resistance (no geometry) as two in series at a new
    junction, ``share`` of the resistance on the first."""
    lines = text.splitlines()
    k = next(i for i, line in enumerate(lines) if (m := _RESISTOR.match(line)) and m[2] == name)
    m = _RESISTOR.match(lines[k])
    ind, a, b, ohm, rest = m[1], m[3], m[4], float(m[5]), m[6]
    j, first, second = f"{name}_j", f"{name}_a", f"{name}_b"
    lines[k : k + 1] = [
        f"{ind}point {j}: junction",
        f"{ind}wire {first}: {a} to {j}, {ohm * share!r} ohm{rest}",
        f"{ind}wire {second}: {j} to {b}, {ohm * (1 - share)!r} ohm{rest}",
    ]
    return "\n".join(lines) + "\n", first, second

"""Generated plans for the invariant property tests (tests/test_invariants.py) and the long
campaign (benchmarks/fuzz_campaign.py --invariants): a channel block placed twice, mirrored, on
one plate, with the shared parts on the mirror's axis; and plans of stated resistances only (no
geometry), whose figures are linear in the resistances.

Every plan is a structure rendered to text by :func:`mirrored_text` or :func:`resistive_text`,
with a naming function, so that the same plan can be written under other names."""

from __future__ import annotations

import math
from dataclasses import dataclass

from hypothesis import strategies as st

#: the plate, mm: small enough that its grid (2 mm, half a fastener's radius) solves in a blink
PLATE = (120, 60)
AREAS = ("0.5 mm2", "0.75 mm2", "1 mm2")


@dataclass(frozen=True)
class Block:
    """One channel: points (the first is the channel's star), wires as (a, b, extra mm, area), the
    points bolted to the plate, a stage (a, b, gain dB) and maybe a signal current (a, b, mA)."""

    points: tuple[tuple[int, int], ...]
    wires: tuple[tuple[int, int, int, str], ...]
    bolted: tuple[int, ...]
    stage: tuple[int, int, int]
    current: tuple[int, int, float] | None


@dataclass(frozen=True)
class Mirrored:
    axis: str  # "x" (mirror x, about x = W/2) or "y" (about y = D/2)
    block: Block
    along: int  # where the shared parts sit along the axis, mm
    ripple_ma: float
    link_extra: int
    rectifier: bool
    field: bool


def _dist(p, q) -> float:
    return math.dist(p, q)


@st.composite
def blocks(draw, axis: str) -> Block:
    w, d = PLATE
    # the block lies on one side of the axis, 4 mm clear of it and of the edges, on a 2 mm pitch
    # (so that fastenings meet grid nodes on their circles, where rounding used to decide)
    xs = (w // 2 + 4, w - 4) if axis == "x" else (4, w - 4)
    ys = (4, d - 4) if axis == "x" else (4, d // 2 - 4)
    coord = st.tuples(st.integers(xs[0] // 2, xs[1] // 2), st.integers(ys[0] // 2, ys[1] // 2))
    cells = draw(st.lists(coord, min_size=2, max_size=5, unique=True))
    points = tuple((2 * x, 2 * y) for x, y in cells)
    n = len(points)
    wires = []
    for i in range(1, n):  # a tree: every point reaches the star
        j = draw(st.integers(0, i - 1))
        wires.append((i, j, draw(st.integers(0, 30)), draw(st.sampled_from(AREAS))))
    if n > 2 and draw(st.booleans()):  # and maybe a second path (a loop)
        i, j = draw(st.lists(st.integers(0, n - 1), min_size=2, max_size=2, unique=True))
        wires.append((i, j, draw(st.integers(0, 30)), draw(st.sampled_from(AREAS))))
    bolted = tuple(sorted(draw(st.sets(st.integers(0, n - 1), min_size=1, max_size=2))))
    a, b = draw(st.lists(st.integers(0, n - 1), min_size=2, max_size=2, unique=True))
    stage = (a, b, draw(st.sampled_from([0, 20, 34, 40])))
    current = None
    if draw(st.booleans()):
        c, e = draw(st.lists(st.integers(0, n - 1), min_size=2, max_size=2, unique=True))
        current = (c, e, draw(st.sampled_from([0.5, 1.5, 10.0])))
    return Block(points, tuple(wires), bolted, stage, current)


@st.composite
def mirrored_plans(draw, rectifiers: bool = True) -> Mirrored:
    """A mirrored plan; without ``rectifiers`` (the default suite's cheaper plans) its supply
    return is a stated ripple current rather than a simulated rectifier."""
    axis = draw(st.sampled_from(["x", "y"]))
    span = PLATE[1] if axis == "x" else PLATE[0]
    return Mirrored(
        axis,
        draw(blocks(axis)),
        2 * draw(st.integers(2, span // 2 - 2)),
        draw(st.sampled_from([20.0, 100.0, 300.0])),
        draw(st.integers(0, 40)),
        rectifiers and draw(st.booleans()),
        draw(st.booleans()),
    )


def identity(name: str) -> str:
    return name


def _on_axis(m: Mirrored, offset: int) -> tuple[int, int]:
    """A point of the shared parts: on the mirror's axis, ``offset`` mm along it from
    ``m.along``."""
    w, d = PLATE
    along = min(max(m.along + offset, 2), (d if m.axis == "x" else w) - 2)
    return (w // 2, along) if m.axis == "x" else (along, d // 2)


def _block_text(b: Block, name) -> list[str]:
    kinds = ["star"] + ["pad"] * (len(b.points) - 1)
    out = [f"block {name('chan')} {{"]
    for i, (p, k) in enumerate(zip(b.points, kinds)):
        out.append(
            f"  point {name(f'n{i}')}: {'stud' if i in b.bolted and i else k}, at {p[0]},{p[1]} "
            f"on {name('base')}"
        )
    for i in b.bolted:
        out.append(f"  bolt {name(f'f{i}')}: {name(f'n{i}')} to {name('base')}")
    for k, (i, j, extra, area) in enumerate(b.wires):
        length = math.ceil(_dist(b.points[i], b.points[j])) + 1 + extra
        out.append(
            f"  wire {name(f'w{k}')}: {name(f'n{i}')} to {name(f'n{j}')}, {length} mm, {area}, "
            "signal"
        )
    a, c, gain = b.stage
    out.append(f"  stage {name('v1')}: {name(f'n{a}')} to {name(f'n{c}')}, gain {gain} dB")
    if b.current is not None:
        i, j, ma = b.current
        out.append(f"  current {name('sig')}: {name(f'n{i}')} to {name(f'n{j}')}, {ma} mA, signal")
    out.append("}")
    return out


def mirrored_text(m: Mirrored, name=identity, extra: str = "") -> str:
    """The plan: the shared parts on the axis, the block placed as ``left`` and, mirrored, as
    ``right``."""
    w, d = PLATE
    pe, supply, ct = _on_axis(m, 0), _on_axis(m, 10), _on_axis(m, -10)
    inlet = _on_axis(m, 4)
    base, left, right = name("base"), name("left"), name("right")
    lines = [
        'plan "mirrored"',
        "mains 230 V 50 Hz, fuse 1 A slow, line-conductor 0.75 mm2, cord 2 m 0.75 mm2, inlet at "
        f"{inlet[0]},{inlet[1]}",
        f"metal {base}: aluminium 2 mm, {w} x {d} mm, touchable",
        f"point {name('pe')}: stud, at {pe[0]},{pe[1]} on {base}",
        f"wire {name('pe_lead')}: mains.pe to {name('pe')}, 25 mm, 1 mm2, protective",
        f"bolt {name('pe_nut')}: {name('pe')} to {base}",
        f"point {name('supply')}: cap, at {supply[0]},{supply[1]} on {base}",
        f"wire {name('supply_lead')}: {name('supply')} to {name('pe')}, 20 mm, 0.75 mm2, return",
    ]
    if m.rectifier:
        lines += [
            f"point {name('ct')}: centre-tap, at {ct[0]},{ct[1]} on {base}",
            f"wire {name('ct_lead')}: {name('ct')} to {name('supply')}, 30 mm, 0.5 mm2, return",
            f"rectifier {name('hv')}: {name('supply')} to {name('ct')}, full-wave, secondary 250 "
            "V, winding 90 ohm, diode 1 V, reservoir 47 uF, load 40 mA",
        ]
    else:
        lines.append(
            f"current {name('ripple')}: {name('supply')} to {name('pe')}, {m.ripple_ma} mA 100 Hz"
        )
    if m.field:
        lines.append(
            f"field {name('ptx')}: transformer, at {ct[0]},{ct[1]}, 30 uT at 5 cm, height 30 mm"
        )
    lines += _block_text(m.block, name)
    mirror = f"at {w},0, mirror x" if m.axis == "x" else f"at 0,{d}, mirror"
    lines += [
        f"place {name('chan')} as {left} at 0,0",
        f"place {name('chan')} as {right} {mirror}",
    ]
    star = m.block.points[0]
    length = math.ceil(_dist(star, supply)) + 1 + m.link_extra
    for raw, ch in (("left", left), ("right", right)):
        lines.append(
            f"wire {name(raw + '_link')}: {ch}.{name('n0')} to {name('supply')}, {length} mm, "
            "0.75 mm2, signal"
        )
    return "\n".join(lines) + "\n" + extra


@dataclass(frozen=True)
class Resistive:
    """Points joined by stated resistances (no geometry), stated currents and stages."""

    n: int
    resistors: tuple[tuple[int, int, float], ...]  # (a, b, Ω)
    currents: tuple[tuple[int, int, float, float], ...]  # (a, b, mA, Hz)
    stages: tuple[tuple[int, int, int], ...]  # (a, b, gain dB)
    kinds: tuple[str, ...] = ()  # each point's kind (all pads when empty)


@st.composite
def resistive_plans(draw, most: int = 7, stars: bool = False, ohms=None) -> Resistive:
    """Up to ``most`` points; with 12 or more, the resistors may outnumber the ten shares the hum
    budget names per source (physics/hum_shares.TOP_SHARES), so that which equal shares are named
    is a choice. With ``stars``, each point is a pad, a junction or a star (the star rules' chain
    search then meets paths of equal length). ``ohms``: the values drawn from (the default's span
    of 800 leaves some figures to rounding at 1e-9 when the statements are reordered)."""
    n = draw(st.integers(3, most))
    # no two values 1000 times apart: the hum budget lists a conductor whose share is above 1e-3
    # of its source's largest, and at exactly 1e-3 rounding decides (scaled or not)
    ohms = st.sampled_from(ohms or [0.0012, 0.01, 0.047, 0.22, 1.0])
    res = [(i, draw(st.integers(0, i - 1)), draw(ohms)) for i in range(1, n)]
    for _ in range(draw(st.integers(0, max(3, n // 2)))):
        a, b = draw(st.lists(st.integers(0, n - 1), min_size=2, max_size=2, unique=True))
        res.append((a, b, draw(ohms)))
    pair = st.lists(st.integers(0, n - 1), min_size=2, max_size=2, unique=True)
    currents = tuple(
        (
            *draw(pair),
            draw(st.sampled_from([1.0, 50.0, 200.0])),
            draw(st.sampled_from([0, 100, 150])),
        )
        for _ in range(draw(st.integers(1, 3)))
    )
    stages = tuple(
        (*draw(pair), draw(st.sampled_from([0, 20, 40]))) for _ in range(draw(st.integers(1, 2)))
    )
    kinds = ()
    if stars:
        kinds = tuple(draw(st.sampled_from(["pad", "junction", "star"])) for _ in range(n))
    return Resistive(n, tuple(res), currents, stages, kinds)


def resistive_text(r: Resistive, scale: float = 1.0, name=identity) -> str:
    """The plan, every resistance times ``scale``, every element named through ``name``."""
    lines = ['plan "resistive"']
    kinds = r.kinds or ("pad",) * r.n
    lines += [f"point {name(f'n{i}')}: {kinds[i]}" for i in range(r.n)]
    lines += [
        f"wire {name(f'w{k}')}: {name(f'n{a}')} to {name(f'n{b}')}, {ohm * scale!r} ohm, signal"
        for k, (a, b, ohm) in enumerate(r.resistors)
    ]
    lines += [
        f"current {name(f'i{k}')}: {name(f'n{a}')} to {name(f'n{b}')}, {ma} mA"
        + (f" {hz} Hz" if hz else "")
        for k, (a, b, ma, hz) in enumerate(r.currents)
    ]
    lines += [
        f"stage {name(f'g{k}')}: {name(f'n{a}')} to {name(f'n{b}')}, gain {g} dB, channel c{k}"
        for k, (a, b, g) in enumerate(r.stages)
    ]
    return "\n".join(lines) + "\n"


ROLE_WORDS = ("", ", protective", ", signal", ", return", ", bond")


@st.composite
def protective_plans(draw) -> str:
    """A chassis and a panel whose protective earth may run over parallel paths, each conductor's
    role drawn (written or not), with a signal circuit beside it: for the property that a conductor
    on the protective route gets the same verdicts whether or not the plan writes `protective`."""
    role = st.sampled_from(ROLE_WORDS)
    area = st.sampled_from(["0.5 mm2", "0.75 mm2", "1 mm2"])
    lines = [
        'plan "protective"',
        "mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2, inlet at 10,90",
        "metal deck: steel 1 mm, 160 x 100 mm, touchable",
        "metal panel: aluminium 2 mm, 160 x 40 mm, at 0,110, touchable",
        f"point pe_stud: stud, at {2 * draw(st.integers(5, 30))},80 on deck",
        f"wire pe_lead: mains.pe to pe_stud, {draw(st.integers(20, 60))} mm, 1 mm2{draw(role)}",
        f"bolt pe_nut: pe_stud to deck{draw(role)}",
        "point panel_stud: stud, at 80,130 on panel",
        f"bolt panel_nut: panel_stud to panel{draw(role)}",
        "point star: star, at 100,50 on deck",
        "point sleeve: sleeve, at 150,20 on deck",
        "wire in_gnd: sleeve to star, 60 mm, 0.5 mm2, signal",
        "stage v1: sleeve to star, gain 30 dB, channel main",
        f"wire star_bond: star to pe_stud, 70 mm, 0.75 mm2{draw(role)}",
    ]
    # the panel's protective paths: one to three, from the stud, the inlet or over a junction
    paths = draw(
        st.lists(
            st.sampled_from(["stud", "inlet", "junction", "strap"]),
            min_size=1,
            max_size=3,
            unique=True,
        )
    )
    for p in paths:
        if p == "stud":
            lines.append(
                f"wire bond_a: pe_stud to panel_stud, {draw(st.integers(60, 120))} mm, "
                f"{draw(area)}{draw(role)}"
            )
        elif p == "inlet":
            lines.append(
                f"wire bond_b: mains.pe to panel_stud, {draw(st.integers(60, 120))} mm, "
                f"{draw(area)}{draw(role)}"
            )
        elif p == "junction":
            lines += [
                "point tag: lug, at 40,100",
                f"wire bond_c: pe_stud to tag, 30 mm, {draw(area)}{draw(role)}",
                f"wire bond_d: tag to panel_stud, 50 mm, {draw(area)}{draw(role)}",
            ]
        else:
            lines.append(
                f"strap bond_e: deck to panel, 40 mm, width 10 mm, thickness 1 mm{draw(role)}"
            )
    if draw(st.booleans()):
        lines.append("bolt sleeve_nut: sleeve to deck")  # an uninsulated socket: a dead end
    return "\n".join(lines) + "\n"

"""Assembling a plan from its built statements: header records, names (each defined once), devices
merged in, every reference resolved (with "did you mean" hints), automatic names for unnamed
conductors; the inline acceptances (:mod:`.acceptances`) and the receiving stages of interconnects
(:mod:`.interconnects`) are gathered from their own modules."""

from __future__ import annotations

import difflib
import math
from dataclasses import replace
from pathlib import Path

from ..core.errors import LimitError, Location, PlanError
from ..model.kinds import joins_devices
from ..model.installation import Transformer, transformer_feeds
from ..model.records import (
    PE_POINT,
    Conductor,
    Current,
    FieldSource,
    Heater,
    Metal,
    Plan,
    Point,
    Rectifier,
    Stage,
)
from .acceptances import acceptances
from .exposure import settled_metals
from .devices import merge_device
from .installation import check_bundles, check_supplies, land_shields, leakage_currents
from .interconnects import interconnect_inputs
from .limits import LIMITS
from .stage_inputs import stage_inputs
from .transformer import place_transformers
from .twisting import twisted_pairs

__all__ = ["assemble", "HEADER_KEYWORDS"]

#: keywords of the plan header (one each per file; not allowed inside a block)
HEADER_KEYWORDS = (
    "plan",
    "mains",
    "supply",
    "ambient",
    "listening",
    "library",
    "device",
    "transformer",
)

_HEADER_FIELD = {
    "plan": "title",
    "mains": "mains",
    "supply": "supply",
    "ambient": "ambient",
    "listening": "listening",
}


#: the record types an assembly sorts its built records into
_GROUPED = (Metal, Point, Conductor, Rectifier, Current, Heater, Stage, FieldSource, Transformer)


def _collect(built: list, ld):
    """Sort built records into the header, groups by record type, devices and library folders;
    names once."""
    errors = ld.errors
    header: dict = {}
    groups: dict[type, list] = {t: [] for t in _GROUPED}
    names: dict[str, Location] = {}
    devices: list = []
    library_dirs: list[str] = []
    for st, record, refs in built:
        if st.keyword == "library":
            library_dirs.append(record)
        elif st.keyword == "device":
            if _new_name(record.name, st, names, errors, reserved=()):
                devices.append((record, refs))
        elif st.keyword in HEADER_KEYWORDS and st.keyword != "transformer":
            key = _HEADER_FIELD[st.keyword]
            if key in header:
                errors.append(PlanError(f"'{st.keyword}' is given twice", st.loc, "keep one"))
            header[key] = record
        else:
            name = getattr(record, "name", "")
            if not name or _new_name(name, st, names, errors, reserved=(PE_POINT,)):
                groups[type(record)].append((record, refs))
    return header, groups, names, devices, library_dirs


def _new_name(name: str, st, names: dict, errors: list, reserved: tuple) -> bool:
    """Whether ``name`` is defined for the first time (it is then entered in ``names`` with its
    location); a name defined before, or one of ``reserved``, is a duplicate, reported."""
    if name in names or name in reserved:
        first = names.get(name)
        errors.append(
            PlanError(
                f"duplicate name {name!r}",
                st.label_loc or st.loc,
                f"first defined at {first}"
                if first
                else "mains.pe is the mains inlet's protective terminal",
            )
        )
        return False
    names[name] = st.label_loc or st.loc
    return True


class _Resolver:
    """Checks that each name a record uses is defined, reporting the undefined ones with a hint."""

    def __init__(self, ld):
        self.ld = ld

    def __call__(self, name, loc, what, pool) -> bool:
        if name is None or name in pool or name in self.ld.broken:
            return True
        if name == PE_POINT:
            hint = "declare the supply with 'mains 230 V 50 Hz, ...' to get the inlet's mains.pe"
        else:
            close = difflib.get_close_matches(name, list(pool), n=1)
            ways = [f"'{k} {name}: ...'" for k in ("point", "metal") if k in what]
            hint = (
                f"did you mean {close[0]!r}?"
                if close
                else f"define it with {' or '.join(ways or [repr(f'point {name}: ...')])}"
            )
        self.ld.errors.append(PlanError(f"undefined {what} {name!r}", loc, hint))
        return False


def _check_points(groups, metals, check, errors) -> None:
    for p, refs, *_ in groups[Point]:
        if (
            p.on is not None
            and check(p.on, refs.get("on", p.location), "metal part", metals)
            and p.on in metals
        ):
            m = metals[p.on]
            if p.pos is not None and not m.contains(p.pos):
                e = PlanError(
                    f"point {p.name!r} at {p.pos[0] * 1e3:g},{p.pos[1] * 1e3:g} mm lies outside "
                    f"{m.name!r}",
                    p.location,
                    "positions are in the plan frame, in mm",
                )
                e.element = p.name  # named with its own placement only
                errors.append(e)


def _conductors(groups, nodes, check) -> list[Conductor]:
    """The conductors with their ends checked; an unnamed conductor is named by its kind and
    ends."""
    conductors = []
    auto: dict[str, int] = {}
    for c, refs, *_ in groups[Conductor]:
        ok = check(c.a, refs.get("a", c.location), "point or metal part", nodes)
        ok = check(c.b, refs.get("b", c.location), "point or metal part", nodes) and ok
        if not c.name:
            base = f"{c.kind}:{c.a}-{c.b}"
            auto[base] = auto.get(base, 0) + 1
            c = replace(c, name=base if auto[base] == 1 else f"{base}#{auto[base]}")
        conductors.append(c)
    return conductors


def _measured(conductors: list[Conductor], points: dict, errors: list) -> list[Conductor]:
    """Each conductor written without a length gets the length along its ends' positions and its
    ``via`` route; one whose ends have no positions (or one position) is an error at its
    statement."""
    out = []
    for c in conductors:
        if c.length_computed:
            ends = [getattr(points.get(e), "pos", None) for e in (c.a, c.b)]
            path = [ends[0], *c.route, ends[1]]
            length = None if None in ends else sum(math.dist(p, q) for p, q in zip(path, path[1:]))
            if not length:
                unplaced = [e for e, pos in zip((c.a, c.b), ends) if pos is None]
                why = (
                    f"{' and '.join(unplaced)} {'has' if len(unplaced) == 1 else 'have'} no "
                    "position"
                    if unplaced
                    else "its ends are at one position"
                )
                errors.append(
                    PlanError(
                        f"{c.kind} {c.name} needs a length: {why} to measure it by",
                        c.location,
                        "state it, e.g. ', 120 mm', or give both ends a position ('point NAME: "
                        "KIND, at X,Y')",
                    )
                )
                continue
            c = replace(c, length=length)
        out.append(c)
    return out


def _check_sources(groups, nodes, check) -> None:
    for group in (Rectifier, Current, Stage):
        for r, refs, *_ in groups[group]:
            check(r.a, refs.get("a", r.location), "point", nodes)
            check(r.b, refs.get("b", r.location), "point", nodes)
    rectifiers = {r.name for r, *_ in groups[Rectifier]}
    for st, refs, *_ in groups[Stage]:
        check(st.reference, refs.get("reference", st.location), "point", nodes)
        if st.supply is not None and st.supply not in rectifiers | check.ld.broken:
            close = difflib.get_close_matches(st.supply, list(rectifiers), n=1)
            check.ld.errors.append(
                PlanError(
                    f"stage {st.name} is fed from {st.supply!r}, which is no rectifier",
                    refs.get("supply", st.location),
                    f"did you mean {close[0]!r}?"
                    if close
                    else "name a rectifier of the plan ('rectifier NAME: ...')",
                )
            )
    for r, refs, *_ in groups[Rectifier]:
        check(r.filter_point, refs.get("filter_point", r.location), "point", nodes)
        check(r.regulator_point, refs.get("regulator_point", r.location), "point", nodes)
    valves = {r.name for r, *_ in groups[Rectifier] if r.diode_law == "valve"}
    for h, refs, *_ in groups[Heater]:
        for f in ("a", "b", "reference"):
            check(getattr(h, f), refs.get(f, h.location), "point", nodes)
        if h.rectifier is not None and h.rectifier not in valves | check.ld.broken:
            check.ld.errors.append(
                PlanError(
                    f"heater {h.name} heats {h.rectifier!r}, which is no valve rectifier",
                    refs.get("rectifier", h.location),
                    "name a rectifier of the plan written with 'valve …' (a solid-state "
                    "rectifier has no filament)",
                )
            )


def _own_references(stages, errors) -> list[Stage]:
    """The stages; a stated reference that is the stage's second point is reported (the input would
    read nothing) and dropped."""
    for st, refs, *_ in stages:
        if st.reference is not None and st.reference == st.b:
            errors.append(
                PlanError(
                    f"stage {st.name!r}: its reference is its own second point {st.b!r}",
                    refs.get("reference", st.location),
                    "name the input socket's sleeve (or the stage's first point)",
                )
            )
    return [st if st.reference != st.b else replace(st, reference=None) for st, *_ in stages]


def _transformers_and_leakage(groups, supply, points, placed, supplies, errors) -> list:
    """The installation's transformers placed (their outlets and cords), and each device's leakage
    current at the supply where it is plugged in (added to the currents)."""
    transformers = [t for t, *_ in groups[Transformer]]
    place_transformers(groups[Transformer], points, groups[Conductor], supply, errors)
    feeds = transformer_feeds(transformers, [c for c, *_ in groups[Conductor]], placed)
    landings = {}  # device -> the first point of it an interconnect lands on
    for c, *_ in groups[Conductor]:
        if joins_devices(c):
            for end in (c.a, c.b):
                landings.setdefault(end.split(".", 1)[0], end)
    own = {s[0]: s[1:] for s, _ in supplies}
    groups[Current] += [
        (x, {})
        for x in leakage_currents(list(placed.values()), own, supply, points, landings, feeds)
    ]
    return transformers


def _merge_devices(devices: list, ld, library_dirs: list, groups, metals, points, names):
    """Every placed device's elements merged in (see :func:`~.devices.merge_device`): the
    devices' own supplies ``((name, V, Hz), location)`` and the device placements with their
    protection class settled, and their own plans as loaded (name -> Plan)."""
    supplies = []
    classes: dict = {}
    own_plans: dict = {}
    for dev, refs in devices:
        if len(groups[Rectifier]) > LIMITS["rectifiers"]:
            break  # over the limit (said by _rectifier_limit): no more devices merged
        supply = merge_device(
            dev, refs, ld, library_dirs, groups, metals, points, names, classes, own_plans
        )
        if supply is not None:
            supplies.append((supply, dev.location))
    placed = {
        d.name: replace(d, equipment_class=classes.get(d.name, d.equipment_class))
        for d, _ in devices
    }
    return supplies, placed, own_plans


def _check_outlets(devices: list, groups, nodes: set, ld) -> None:
    """Each device and each isolating transformer plugged into an outlet that is defined."""
    isolating = [(t, r) for t, r, *_ in groups[Transformer] if t.isolating]  # no cord to check
    for dev, refs in [*devices, *isolating]:
        if dev.plugged is not None and dev.plugged not in nodes and dev.plugged not in ld.broken:
            ld.errors.append(
                PlanError(
                    f"undefined outlet {dev.plugged!r}",
                    refs.get("plugged", dev.location),
                    f"define it with 'point {dev.plugged}: outlet'",
                )
            )


def _rectifier_limit(groups, errors: list) -> None:
    """Devices' rectifiers count towards the plan's limit (each is simulated in time)."""
    if len(groups[Rectifier]) > LIMITS["rectifiers"]:
        r0 = groups[Rectifier][LIMITS["rectifiers"]][0]
        errors.append(
            LimitError(
                f"the plan has {len(groups[Rectifier])} rectifiers, over the limit of "
                f"{LIMITS['rectifiers']} (each is simulated in time)",
                r0.location,
                "describe a rack's identical supplies once, or split the installation",
            )
        )


def _stages(groups, points: dict, conductors: list, ld) -> list:
    """The stages with their inputs' references settled, and the interconnects' input stages."""
    stages = stage_inputs(
        _own_references(groups[Stage], ld.errors),
        points,
        conductors,
        [r for g in (Current, Rectifier) for r, *_ in groups[g]],
    )
    return stages + interconnect_inputs(conductors)


def assemble(built: list, file: str, ld) -> Plan:
    """The plan of a file's built ``(statement, record, refs)`` list; errors are added to
    ``ld.errors``."""
    header, groups, names, devices, library_dirs = _collect(built, ld)
    mains = header.get("mains")
    metals = settled_metals(
        [m for m, *_ in groups[Metal]],
        mains,
        [r for r, *_ in groups[Rectifier]],
        [p for p, *_ in groups[Point]],
    )
    points = {p.name: p for p, *_ in groups[Point]}
    if mains is not None:
        points[PE_POINT] = Point(PE_POINT, kind="inlet", pos=mains.inlet, location=mains.location)
    supplies, placed, own = _merge_devices(
        devices, ld, library_dirs, groups, metals, points, names
    )
    check_supplies(supplies, mains, header.get("supply"), ld.errors)
    transformers = _transformers_and_leakage(
        groups, header.get("supply"), points, placed, supplies, ld.errors
    )
    nodes = set(points) | set(metals)
    _check_outlets(devices, groups, nodes, ld)
    _rectifier_limit(groups, ld.errors)
    check = _Resolver(ld)
    _check_points(groups, metals, check, ld.errors)
    conductors = _measured(_conductors(groups, nodes, check), points, ld.errors)
    twist_refs = {
        c.name: refs["twisted_with"] for c, refs, *_ in groups[Conductor] if "twisted_with" in refs
    }
    conductors = twisted_pairs(conductors, twist_refs, ld.errors)
    _check_sources(groups, nodes, check)
    stages = _stages(groups, points, conductors, ld)
    if placed:
        conductors = land_shields(conductors, placed, metals, ld.errors)
    check_bundles(conductors, ld.errors)
    return Plan(
        title=header.get("title") or Path(file).stem,
        file=file,
        mains=mains,
        ambient=header.get("ambient", 20.0),
        listening=header.get("listening"),
        metals=tuple(metals.values()),
        points=tuple(points.values()),
        conductors=tuple(conductors),
        rectifiers=tuple(r for r, *_ in groups[Rectifier]),
        currents=tuple(r for r, *_ in groups[Current]),
        heaters=tuple(r for r, *_ in groups[Heater]),
        stages=tuple(stages),
        fields=tuple(r for r, *_ in groups[FieldSource]),
        files=tuple(ld.files),
        location=Location(file, 1, 1),
        device_supplies=tuple(s for s, _ in supplies),
        acceptances=acceptances(ld.sources),
        device_files=tuple(ld.device_files),
        supply=header.get("supply"),
        devices=tuple(placed.values()),
        transformers=tuple(transformers),
        device_plans=tuple(own.items()),
    )

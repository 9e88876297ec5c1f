"""Loading a plan: files and includes, block expansion, name resolution, validation → :class:`Plan`.

Public entry points: :func:`load` (a path, or ``-`` for standard input) and
:func:`load_text`.  Every problem is collected and raised together as
:class:`~groundcheck.core.errors.PlanErrors`.
"""

from __future__ import annotations

import os
import sys
from dataclasses import dataclass, replace
from pathlib import Path

from .bigfile import read_split, split_point
from ..core.errors import LimitError, Location, PlanError, PlanErrors
from ..model.records import DEFAULT_CORD, PE_POINT, Conductor, Current, Device, FieldSource, Heater, Metal, Plan, Point, Rectifier, Stage
from .phrases import Reader, Statement
from .statements import BUILDERS, KEYWORDS, build
from ..core.runtime import can_fork, no_gc
from .syntax import BlockDef, parse_text, suggest_keyword

__all__ = ["load", "load_text", "LIMITS", "PLAN_SUFFIX"]

#: the file extension of groundcheck plans
PLAN_SUFFIX = ".gplan"

#: size limits; each breach is a clear error rather than a hang or a memory blow-up
LIMITS = {
    "file_bytes": 16 * 1024 * 1024,
    "line_chars": 4000,
    "include_depth": 16,
    "block_depth": 8,
    "elements": 3_000_000,
}

HEADER_KEYWORDS = ("plan", "mains", "ambient", "listening", "library", "device")

#: devices placed inside devices, at most this deep
MAX_DEVICE_DEPTH = 8


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
        return Transform(outer.ox + outer.sx * self.ox, outer.oy + outer.sy * self.oy, outer.sx * self.sx, outer.sy * self.sy)


def load(path: str | Path, *, stdin_text: str | None = None, libraries: tuple[str, ...] = (),
         _devices: tuple[Path, ...] = (), jobs: int = 1) -> Plan:
    """Load the plan at ``path`` (``"-"`` reads standard input) and return the resolved model.

    ``libraries``: extra folders searched for device plans (after the plan's own ``library``
    statements; the environment variable ``GROUNDCHECK_LIBRARY`` adds more).  ``jobs``: see
    :func:`load_text`.
    """
    if str(path) == "-":
        text = stdin_text if stdin_text is not None else sys.stdin.read()
        return load_text(text, "<stdin>", root=Path.cwd(), libraries=libraries, jobs=jobs)
    p = Path(path)
    loc = Location(str(path), 0, 0)
    if not p.exists():
        raise PlanErrors([PlanError(f"no such plan file: {path}", loc, "check the path")])
    if p.is_dir():
        raise PlanErrors([PlanError(f"{path} is a folder, not a plan file", loc, f"name a {PLAN_SUFFIX} file")])
    text = _read(p, str(path))
    return load_text(text, str(path), root=p.resolve().parent, _resolved=p.resolve(), libraries=libraries,
                     _devices=_devices, jobs=jobs)


def _read(p: Path, shown: str) -> str:
    loc = Location(shown, 0, 0)
    try:
        size = p.stat().st_size
        if size > LIMITS["file_bytes"]:
            raise PlanErrors([LimitError(f"plan file is {size} bytes, over the limit of {LIMITS['file_bytes']}", loc,
                                         "split it with include")])
        data = p.read_bytes()
    except OSError as e:
        raise PlanErrors([PlanError(f"cannot read {shown}: {e.strerror}", loc, "check the path and permissions")]) from None
    return _decode(data, shown)


def _decode(data: bytes, shown: str) -> str:
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as e:
        before = data[: e.start]
        line = before.count(b"\n") + 1
        col = e.start - (before.rfind(b"\n") + 1) + 1
        raise PlanErrors([PlanError("the file is not UTF-8 text", Location(shown, line, col),
                                    "save the plan as UTF-8 text")]) from None
    if "\x00" in text:
        line = text[: text.index("\x00")].count("\n") + 1
        raise PlanErrors([PlanError("the file holds a NUL character: not a text plan", Location(shown, line, 1),
                                    "save the plan as UTF-8 text")])
    return text.lstrip("\ufeff")


class _Loader:
    def __init__(self, root: Path):
        self.root = root
        self.errors: list[PlanError] = []
        self.sources: dict[str, list[str]] = {}
        self.blocks: dict[str, BlockDef] = {}
        self.files: list[str] = []
        self.count = 0
        self._local_cache: dict[str, set[str]] = {}
        self.broken: set[str] = set()     # names of statements that failed: no follow-on errors for them

    # ---- files and includes ------------------------------------------------
    def read_items(self, text: str, shown: str, stack: tuple[Path, ...]) -> list:
        if len(text) > LIMITS["file_bytes"]:
            self.errors.append(LimitError(f"plan text is over the limit of {LIMITS['file_bytes']} bytes",
                                          Location(shown, 1, 1), "split it with include"))
            return []
        lines = text.split("\n")
        self.sources[shown] = lines
        self.files.append(shown)
        for i, line in enumerate(lines):
            if len(line) > LIMITS["line_chars"]:
                self.errors.append(LimitError(f"line is {len(line)} characters long, over the limit of {LIMITS['line_chars']}",
                                              Location(shown, i + 1, LIMITS["line_chars"] + 1), "break it with a trailing comma"))
                return []
        items, blocks = parse_text(text, shown, self.errors)
        for name, bd in blocks.items():
            if name in self.blocks and self.blocks[name] is not bd:
                self.errors.append(PlanError(f"block {name!r} is defined twice", bd.loc, f"first defined at {self.blocks[name].loc}"))
            self.blocks.setdefault(name, bd)
        out = []
        for it in items:
            if isinstance(it, Statement) and it.keyword == "include":
                out.extend(self.include(it, shown, stack))
            else:
                out.append(it)
        return out

    def include(self, st: Statement, shown: str, stack: tuple[Path, ...]) -> list:
        if len(st.phrases) != 1 or len(st.phrases[0]) != 1 or st.phrases[0][0].kind != "string":
            self.errors.append(PlanError("include takes one quoted path", st.loc, 'e.g. include "supply.gplan"'))
            return []
        item = st.phrases[0][0]
        if len(stack) >= LIMITS["include_depth"]:
            self.errors.append(LimitError(f"includes nested deeper than {LIMITS['include_depth']}", item.loc, "flatten the includes"))
            return []
        here = stack[-1].parent if stack else self.root
        target = (here / item.value).resolve()
        try:
            target.relative_to(self.root)
        except ValueError:
            self.errors.append(PlanError(f"include {item.value!r} lies outside the plan's folder", item.loc,
                                         "includes are confined to the folder of the main plan and below"))
            return []
        if target in stack:
            chain = " -> ".join(p.name for p in stack + (target,))
            self.errors.append(PlanError(f"include cycle: {chain}", item.loc, "a plan cannot include itself, directly or not"))
            return []
        if not target.is_file():
            self.errors.append(PlanError(f"included file {item.value!r} not found", item.loc, f"looked for {target}"))
            return []
        try:
            text = _read(target, str(target.relative_to(self.root)))
        except PlanErrors as e:
            self.errors.extend(e.errors)
            return []
        return self.read_items(text, str(target.relative_to(self.root)), stack + (target,))

    # ---- blocks --------------------------------------------------------------
    def local_names(self, block: str, seen: tuple[str, ...] = ()) -> set[str]:
        if block in self._local_cache:
            return self._local_cache[block]
        names: set[str] = set()
        bd = self.blocks.get(block)
        if bd is None or block in seen:
            return names
        for st in bd.body:
            if st.label:
                names.add(st.label)
            elif st.keyword == "place":
                try:
                    inner, prefix, _ = self.parse_place(st)
                except PlanError:
                    continue
                names |= {f"{prefix}.{n}" for n in self.local_names(inner, seen + (block,))}
        if not seen:
            self._local_cache[block] = names
        return names

    def parse_place(self, st: Statement) -> tuple[str, str, Transform]:
        if not st.phrases:
            raise PlanError("place needs a block and a name", st.loc, "e.g. 'place channel as left at 0,0'")
        r = Reader(st.phrases[0], st)
        block, bloc = r.name("a block name")
        if block not in self.blocks:
            raise PlanError(f"undefined block {block!r}", bloc, suggest_keyword(block, self.blocks) if self.blocks else "define it with 'block NAME { ... }'")
        r.expect("as")
        prefix, _ = r.name("a name for this placement")
        ox = oy = 0.0
        if r.keyword("at"):
            ox, oy = r.coord()
        r.finish()
        sx = sy = 1.0
        for ph in st.phrases[1:]:
            r = Reader(ph, st)
            r.expect("mirror")
            axis = r.word("an axis (x or y)", ("x", "y")) if not r.done else "y"
            if axis == "x":
                sx = -1.0
            else:
                sy = -1.0
            r.finish()
        return block, prefix, Transform(ox, oy, sx, sy)

    # ---- expansion -----------------------------------------------------------
    def expand(self, items: list, prefix: str, tf: Transform, scopes: tuple, depth: int,
               path: tuple[str, ...], out: list) -> None:
        for it in items:
            if isinstance(it, tuple):          # a block definition
                if prefix:
                    self.errors.append(PlanError("blocks are defined at the top level of a file", it[1].loc, "move the block out"))
                continue
            st: Statement = it
            try:
                if st.keyword == "place":
                    block, sub, inner_tf = self.parse_place(st)
                    if block in path:
                        raise PlanError(f"block {block!r} places itself", st.loc, "a block cannot contain itself, directly or not")
                    if depth + 1 > LIMITS["block_depth"]:
                        raise LimitError(f"blocks placed more than {LIMITS['block_depth']} deep", st.loc, "flatten the blocks")
                    new_prefix = f"{prefix}{sub}."
                    self.expand(self.blocks[block].body, new_prefix, inner_tf.then(tf),
                                ((new_prefix, self.local_names(block)),) + scopes, depth + 1, path + (block,), out)
                    continue
                if st.keyword not in BUILDERS:
                    raise PlanError(f"unknown keyword {st.keyword!r}", st.loc, suggest_keyword(st.keyword, KEYWORDS))
                if st.broken:
                    if st.label:
                        self.broken.add(prefix + st.label)
                    continue
                if prefix and st.keyword in HEADER_KEYWORDS:
                    raise PlanError(f"'{st.keyword}' belongs at the top level, not inside a block", st.loc, "move it out of the block")
                record, refs = build(st)
                self.count += 1
                if self.count > LIMITS["elements"]:
                    raise LimitError(f"plan expands to more than {LIMITS['elements']} elements", st.loc,
                                     "a block placed inside blocks multiplies; place fewer")
                out.append((st, self.place(record, st, prefix, tf, scopes), refs))
            except PlanError as e:
                self.errors.append(e)
                if st.label:
                    self.broken.add(prefix + st.label)
                if isinstance(e, LimitError):
                    return

    def place(self, record, st: Statement, prefix: str, tf: Transform, scopes: tuple):
        """Rename and move a record built inside a block placement.

        A name is looked up in the innermost block first, then in each
        enclosing block, then at the top level.
        """
        if not prefix:
            return record
        channel = prefix.split(".")[0]
        explicit_channel = any(ph and ph[0].kind == "word" and ph[0].value == "channel" for ph in st.phrases)

        def res(name):
            for pfx, local in scopes:
                if name in local:
                    return pfx + name
            return name

        if isinstance(record, Metal):
            size = None if record.size is None else (record.size[0] * tf.sx, record.size[1] * tf.sy)
            return replace(record, name=prefix + record.name, origin=tf(record.origin), size=size)
        if isinstance(record, Point):
            return replace(record, name=prefix + record.name, pos=tf(record.pos), on=res(record.on), group=prefix.rstrip("."))
        if isinstance(record, Conductor):
            return replace(record, name=prefix + record.name if record.name else "", a=res(record.a), b=res(record.b),
                           route=tuple(tf(p) for p in record.route),
                           channel=record.channel if explicit_channel else channel)
        if isinstance(record, (Rectifier, Current)):
            ch = record.channel if explicit_channel else channel
            return replace(record, name=prefix + record.name, a=res(record.a), b=res(record.b), channel=ch)
        if isinstance(record, Stage):
            return replace(record, name=prefix + record.name, a=res(record.a), b=res(record.b),
                           channel=record.channel if explicit_channel else channel)
        if isinstance(record, Heater):
            return replace(record, name=prefix + record.name, a=res(record.a), b=res(record.b), reference=res(record.reference))
        if isinstance(record, FieldSource):
            return replace(record, name=prefix + record.name, pos=tf(record.pos))
        return record


def load_text(text: str, file: str = "<plan>", *, root: Path | None = None, _resolved: Path | None = None,
              libraries: tuple[str, ...] = (), _devices: tuple[Path, ...] = (), jobs: int = 1) -> Plan:
    """Load a plan from its text.  ``file`` is the name shown in messages; includes resolve under ``root``.

    ``jobs`` > 1 lets a large flat file be read by two processes (:mod:`groundcheck.language.bigfile`), with
    the same plan and the same errors."""
    with no_gc():
        return _load_text(text, file, root=root, _resolved=_resolved, libraries=libraries, _devices=_devices, jobs=jobs)


def _load_text(text: str, file: str, *, root, _resolved, libraries, _devices, jobs: int = 1) -> Plan:
    root = (root or Path.cwd()).resolve()
    ld = _Loader(root)
    ld.libraries = tuple(libraries)
    ld.device_stack = _devices + ((_resolved,) if _resolved is not None else ())
    stack = (_resolved,) if _resolved is not None else ()
    at = split_point(text) if jobs > 1 and can_fork() and len(text) <= LIMITS["file_bytes"] else None
    if at is not None:
        # a large flat file: the second part is parsed and built by a forked worker (see bigfile.py)
        fresh = _Loader(root)
        fresh.libraries, fresh.device_stack = ld.libraries, ld.device_stack
        built = read_split(ld, text, file, at, fresh, Transform, LIMITS["elements"])
    else:
        items = ld.read_items(text, file, stack)
        if not ld.errors and not any(isinstance(i, Statement) for i in items) and not ld.blocks:
            ld.errors.append(PlanError("the plan is empty", Location(file, 1, 1), 'start with: plan "Title"'))
        built = []
        ld.expand(items, "", Transform(), (), 0, (), built)
    plan = None
    if not any(isinstance(e, LimitError) for e in ld.errors):
        plan = _assemble(built, file, ld)
    if ld.errors:
        for e in ld.errors:
            lines = ld.sources.get(e.location.file)
            if e.source_line is None and lines and 1 <= e.location.line <= len(lines):
                e.source_line = lines[e.location.line - 1]
        raise PlanErrors(ld.errors)
    assert plan is not None
    return plan


def _assemble(built: list, file: str, ld: _Loader) -> Plan:
    errors = ld.errors
    header: dict = {}
    groups: dict[type, list] = {t: [] for t in (Metal, Point, Conductor, Rectifier, Current, Heater, Stage, FieldSource)}
    names: dict[str, Location] = {}
    devices: list = []
    library_dirs: list[str] = []
    for st, record, refs in built:
        if st.keyword == "library":
            library_dirs.append(record)
            continue
        if st.keyword == "device":
            if record.name in names:
                errors.append(PlanError(f"duplicate name {record.name!r}", st.label_loc or st.loc, f"first defined at {names[record.name]}"))
                continue
            names[record.name] = st.label_loc or st.loc
            devices.append((record, refs))
            continue
        if st.keyword in HEADER_KEYWORDS:
            key = {"plan": "title", "mains": "mains", "ambient": "ambient", "listening": "listening"}[st.keyword]
            if key in header:
                errors.append(PlanError(f"'{st.keyword}' is given twice", st.loc, "keep one"))
            header[key] = record
            continue
        name = getattr(record, "name", "")
        if name:
            if name in names or name == PE_POINT:
                first = names.get(name)
                errors.append(PlanError(f"duplicate name {name!r}", st.label_loc or st.loc,
                                        f"first defined at {first}" if first else "mains.pe is the mains inlet's protective terminal"))
                continue
            names[name] = st.label_loc or st.loc
        groups[type(record)].append((record, refs))

    mains = header.get("mains")
    metals = {m.name: m for m, *_ in groups[Metal]}
    points = {p.name: p for p, *_ in groups[Point]}
    if mains is not None:
        points[PE_POINT] = Point(PE_POINT, kind="inlet", pos=mains.inlet, location=mains.location)
    for dev, refs in devices:
        _merge_device(dev, refs, ld, library_dirs, groups, metals, points, names)
    nodes = set(points) | set(metals)
    for dev, refs in devices:
        if dev.plugged is not None and dev.plugged not in nodes and dev.plugged not in ld.broken:
            errors.append(PlanError(f"undefined outlet {dev.plugged!r}", refs.get("plugged", dev.location),
                                    f"define it with 'point {dev.plugged}: outlet'"))

    def check(name, loc, what, pool):
        if name is not None and name not in pool and name not in ld.broken:
            if name == PE_POINT:
                hint = "declare the supply with 'mains 230 V 50 Hz, ...' to get the inlet's mains.pe"
            else:
                import difflib
                close = difflib.get_close_matches(name, list(pool), n=1)
                hint = f"did you mean {close[0]!r}?" if close else f"define it with 'point {name}: ...'"
            errors.append(PlanError(f"undefined {what} {name!r}", loc, hint))
            return False
        return True

    for p, refs, *_ in groups[Point]:
        if p.on is not None and check(p.on, refs.get("on", p.location), "metal part", metals) and p.on in metals:
            m = metals[p.on]
            if p.pos is not None and not m.contains(p.pos):
                errors.append(PlanError(f"point {p.name!r} at {p.pos[0]*1e3:g},{p.pos[1]*1e3:g} mm lies outside {m.name!r}",
                                        p.location, "positions are in the plan frame, in mm"))
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
    for group in (Rectifier, Current, Stage):
        for r, refs, *_ in groups[group]:
            check(r.a, refs.get("a", r.location), "point", nodes)
            check(r.b, refs.get("b", r.location), "point", nodes)
    for h, refs, *_ in groups[Heater]:
        for f in ("a", "b", "reference"):
            check(getattr(h, f), refs.get(f, h.location), "point", nodes)
    stages = [r for r, *_ in groups[Stage]]
    for c in conductors:
        if c.kind == "interconnect" and c.gain is not None:
            gain = c.gain - (c.cmrr if c.balanced else 0.0)
            stages.append(Stage(f"{c.name}.input", c.a, c.b, gain, c.channel or "main", c.location))
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
    )


def _find_device(source: str, dev: Device, ld: _Loader, library_dirs: list[str]) -> Path | None:
    here = ld.root
    candidates = [here / source]
    env = os.environ.get("GROUNDCHECK_LIBRARY", "")
    for lib in [*library_dirs, *ld.libraries, *[x for x in env.split(os.pathsep) if x]]:
        candidates.append((here / lib / source) if not Path(lib).is_absolute() else Path(lib) / source)
    for c in candidates:
        if c.is_file():
            return c.resolve()
    return None


def _simple_device(dev: Device) -> Plan:
    """A built-in device: a touchable chassis, the inlet's protective terminal bonded to it, and a
    signal ground joined to the chassis directly, through a lift network, or not at all."""
    n = dev.name
    loc = dev.location
    metals = (Metal(f"{n}.chassis", "steel", 1e-3, None, (0.0, 0.0), True, loc),)
    points = (Point(f"{n}.{PE_POINT}", "inlet", None, None, n, loc), Point(f"{n}.gnd", "terminal", None, None, n, loc))
    conductors = [Conductor(f"{n}.pe_bond", "bolt", f"{n}.{PE_POINT}", f"{n}.chassis", role="protective", contact=0.5e-3,
                            location=loc)]
    if dev.signal_ground == "chassis":
        conductors.append(Conductor(f"{n}.gnd_bond", "bolt", f"{n}.gnd", f"{n}.chassis", role="bond", contact=0.5e-3, location=loc))
    elif dev.signal_ground == "lift":
        conductors.append(Conductor(f"{n}.gnd_lift", "lift", f"{n}.gnd", f"{n}.chassis", resistance=10.0,
                                    capacitance=47e-9, location=loc))
    return Plan(title=n, file=str(loc.file), metals=metals, points=points, conductors=tuple(conductors), location=loc)


def _merge_device(dev: Device, refs: dict, ld: _Loader, library_dirs: list[str], groups: dict, metals: dict,
                  points: dict, names: dict) -> None:
    """Add a device's elements to the installation, prefixed with its name and moved to its place."""
    errors = ld.errors
    if dev.source == "simple":
        sub = _simple_device(dev)
        cord_default = DEFAULT_CORD
    else:
        path = _find_device(dev.source, dev, ld, library_dirs)
        if path is None:
            errors.append(PlanError(f"device plan {dev.source!r} not found", dev.location,
                                    "looked beside the plan and in the library folders (library \"DIR\", GROUNDCHECK_LIBRARY)"))
            return
        if path in ld.device_stack or len(ld.device_stack) >= MAX_DEVICE_DEPTH:
            errors.append(PlanError(f"device {dev.source!r} contains itself, or devices nest too deep", dev.location,
                                    "a device plan cannot place itself, directly or not"))
            return
        try:
            loaded = load(path, libraries=ld.libraries, _devices=ld.device_stack)
        except PlanErrors as e:
            errors.extend(e.errors)
            return
        prefix = dev.name + "."
        sub = _prefixed(loaded, prefix)
        m = loaded.mains
        cord_default = (m.cord_length, m.cord_section) if m else DEFAULT_CORD
    tf = Transform(dev.at[0], dev.at[1], 1.0, -1.0 if dev.mirror else 1.0)
    for x in sub.metals:
        size = None if x.size is None else (x.size[0], x.size[1] * tf.sy)
        metals[x.name] = replace(x, origin=tf(x.origin), size=size)
    for x in sub.points:
        points[x.name] = replace(x, pos=tf(x.pos))
    for x in sub.conductors:
        groups[Conductor].append((replace(x, route=tuple(tf(q) for q in x.route)), {}))
    for kind in (Rectifier, Current, Heater):
        for x in getattr(sub, {Rectifier: "rectifiers", Current: "currents", Heater: "heaters"}[kind]):
            groups[kind].append((x, {}))
    for x in sub.stages:
        groups[Stage].append((x, {}))
    for x in sub.fields:
        groups[FieldSource].append((replace(x, pos=tf(x.pos)), {}))
    pe = f"{dev.name}.{PE_POINT}"
    if dev.plugged is not None and pe in points:
        groups[Conductor].append((Conductor(f"{dev.name}.cord", "wire", pe, dev.plugged, role="protective",
                                            length=dev.cord_length or cord_default[0], area=dev.cord_area or cord_default[1],
                                            location=dev.location), {}))


def _prefixed(p: Plan, prefix: str) -> Plan:
    """A device plan with every name prefixed (channels too, so each device keeps its own)."""
    pre = lambda n: None if n is None else prefix + n  # noqa: E731
    return replace(
        p,
        metals=tuple(replace(m, name=pre(m.name)) for m in p.metals),
        points=tuple(replace(x, name=pre(x.name), on=pre(x.on), group=pre(x.group) if x.group else prefix.rstrip("."))
                     for x in p.points),
        conductors=tuple(replace(c, name=pre(c.name), a=pre(c.a), b=pre(c.b), channel=pre(c.channel)) for c in p.conductors),
        rectifiers=tuple(replace(r, name=pre(r.name), a=pre(r.a), b=pre(r.b), channel=pre(r.channel)) for r in p.rectifiers),
        currents=tuple(replace(r, name=pre(r.name), a=pre(r.a), b=pre(r.b), channel=pre(r.channel)) for r in p.currents),
        heaters=tuple(replace(h, name=pre(h.name), a=pre(h.a), b=pre(h.b), reference=pre(h.reference)) for h in p.heaters),
        stages=tuple(replace(s, name=pre(s.name), a=pre(s.a), b=pre(s.b), channel=pre(s.channel)) for s in p.stages),
        fields=tuple(replace(f, name=pre(f.name)) for f in p.fields),
    )

"""The building blocks of candidate changes: a candidate, the context the candidate makers read
(the plan, its analysis and its text by the parser's spans, device plans included), and the edits
they share: delete a statement, move a conductor's end (its length follows the new route), rephrase
an attribute."""

from __future__ import annotations

import dataclasses
import math
import re
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

from ..model.installation import transformer_feeds
from ..model.kinds import PROTECTIVE, is_fastening, is_fastening_kind, joins_devices, shield_like
from ..model.records import Plan
from ..network.earthing import earth_terminals
from ..rules.results import Result
from .edits import Edit, PlanTexts, direct_includes, shown_path, squeeze
from .pin_one import off_the_entry, shield_landings

__all__ = [
    "Answer",
    "Candidate",
    "ChangeContext",
    "STUD_CLEARANCE",
    "SOURCE_CLEARANCE",
    "STANDARD_SECTIONS_MM2",
    "ROUTE_ALLOWANCE",
    "ACTIONS",
    "local_name",
    "block_note",
    "device_note",
    "delete_change",
    "route_length",
    "reroute",
    "rephrase",
    "squeeze",
    "appended",
    "NO_TOOL",
]

#: a new stud keeps at least this distance from every other fastening and point of the part, m
#: (common practice: room for a nut, a lock washer and a crimp lug)
STUD_CLEARANCE = 15e-3
#: a field source's own footprint, for placing a new stud clear of a transformer, m (from memory:
#: small mains transformers are 50–100 mm across)
SOURCE_CLEARANCE = 40e-3
#: standard conductor cross-sections, mm² (IEC 60228's series)
STANDARD_SECTIONS_MM2 = (0.5, 0.75, 1.0, 1.5, 2.5, 4.0, 6.0, 10.0, 16.0, 25.0, 35.0, 50.0)
#: a re-routed wire's length: its straight-line length plus this share for dress and strain relief
#: (common practice)
ROUTE_ALLOWANCE = 0.2


#: the actions of candidates (Candidate.action), each a trade's change: insulate a fastened
#: socket, jack, pot or terminal from the metal; remove a conductor; replace one by a lift network;
#: move a conductor's end; join two returns' ends; terminate a shield at one end; land a shield on
#: the chassis; use a balanced link; give a device a ground-lift network; plug a device in
#: elsewhere; give the protective earth its own stud; thicken a protective conductor; bond a part
#: by a protective wire of its own; on the installation's side (a qualified electrician's work), an
#: RCD on the supply circuit or a lower earth-electrode resistance; a fuse of a higher breaking
#: capacity; twist an AC heater pair
ACTIONS = (
    "insulate",
    "remove",
    "throw",
    "lift-network",
    "move",
    "join",
    "return-to",
    "terminate-at",
    "shield-to-chassis",
    "balance",
    "device-lift",
    "replug",
    "own-stud",
    "thicken",
    "bond",
    "ht-bond",
    "rcd",
    "electrode",
    "fuse",
    "twist",
)


@dataclass(frozen=True)
class Candidate:
    title: str
    reason: str  # the finding code(s) it answers
    edits: tuple[Edit, ...]
    touches_protective: bool = False
    wire: float = 0.0  # metres of wire the change lays (a re-routed wire's new length): its size
    moves_plug: bool = (
        False  # it plugs a device in elsewhere: the building's runs its earth used may change
    )
    action: str = ""  # what it does, in one word of :data:`ACTIONS`
    element: str = ""  # the element it changes (model name), or the one it answers
    refused: str = ""  # why it is considered, never tried (bought equipment, say)
    #: work beyond its edits and wire, in the same rank as wire's metres: an earth electrode
    #: improved (rods driven, re-measured through the seasons) is more than an RCD fitted; below
    #: zero for a change made with no tool at all (:data:`NO_TOOL`)
    work: float = 0.0


#: a change made with no tool (a switch thrown) ranks before any change of the same gain made
#: with one, as if it saved this much wire, m (common practice: use the lift before unbolting)
NO_TOOL = -0.01


@dataclass(frozen=True)
class Answer:
    """What a generator of a repair action answers over the whole result: the rules whose
    catalogue entries name the action (their codes, in the catalogue's order) and the result's
    findings of those rules."""

    codes: tuple[str, ...]
    findings: tuple = ()

    @property
    def reason(self) -> str:
        """The rule its candidates answer: the first (in the catalogue's order) with a finding,
        else the first."""
        found = {f.code for f in self.findings}
        return next((c for c in self.codes if c in found), self.codes[0])


class ChangeContext:
    def __init__(self, plan: Plan, result: Result, text: str):
        self.plan, self.result, self.text = plan, result, text
        self.src = PlanTexts(text, plan.file)
        self.cond = {c.name: c for c in plan.conductors}
        self.stars = [p.name for p in plan.points if p.kind == "star"]
        self.metals = {m.name for m in plan.metals}
        self.points = {p.name: p for p in plan.points}
        self._nearest: dict[str, str | None] = {}

    @cached_property
    def feeds(self) -> dict:
        """Each point on a transformer's secondary side -> that transformer
        (:func:`groundcheck.model.installation.transformer_feeds`), found once per plan."""
        plan = self.plan
        return transformer_feeds(plan.transformers, plan.conductors, plan.index.devices)

    def protective(self, c) -> bool:
        """Protective by topology or by role (groundcheck.network.earthing): never removed,
        re-routed or lifted."""
        return c.name in self.result.protective or c.role == PROTECTIVE

    def same_file(self, st, point: str) -> bool:
        """Whether point ``point`` can be named in statement ``st``: any in the main plan or its
        includes (one namespace); in a device's own plan, only a point written in it."""
        if st.loc.file == self.plan.file or st.loc.file in self.included:
            return True
        p = self.points.get(point)
        return p is not None and p.location.file == st.loc.file

    def file_name(self, name: str, st) -> str:
        """``name`` as the file of statement ``st`` sees it: without the device's prefix when the
        statement is in a placed device's own plan (a block inside it still shows its
        placement's)."""
        if st.loc.file == self.plan.file:
            return name
        dev = self.plan.index.device_of(name)
        return name[len(dev) + 1 :] if dev and name.startswith(dev + ".") else name

    def statement(self, c):
        """The statement that wrote ``c``: in the main plan, a file it includes (changed as a copy:
        :mod:`.apply`) or a placed device's own plan (its name prefixed); else None."""
        f = c.location.file
        if f == self.plan.file:
            return self.src.statement(c.location.line)
        if f in self.included or (f not in self.plan.files and "." in c.name):
            return self.src.statement(c.location.line, f)
        return None

    @cached_property
    def included(self) -> dict:  # the files the main plan's include statements name
        return direct_includes(self.plan, self.src)

    @cached_property
    def _ends(self) -> dict[str, list]:
        at: dict[str, list] = {}
        for c in self.plan.conductors:
            for end in dict.fromkeys((c.a, c.b)):
                at.setdefault(end, []).append(c)
        return at

    def at(self, point: str) -> list:
        """The conductors with an end on ``point``, in the plan's order."""
        return self._ends.get(point, [])

    def fastened_to(self, point: str) -> str | None:
        """The metal part a fastening holds ``point`` to (a lug, stud or bolted socket; the first
        in the plan's order), None when no fastening holds it."""
        held = (k for k in self.at(point) if point in (k.a, k.b) and is_fastening(k, self.metals))
        k = next(held, None)
        return None if k is None else (k.b if k.b in self.metals else k.a)

    @cached_property
    def shield_landings(self) -> dict[str, str]:
        """Where balanced links' shields land on a signal ground (:mod:`.pin_one`), once."""
        return shield_landings(self.plan)

    @cached_property
    def G(self):
        from ..network.graph import build_graph

        return build_graph(self.plan)

    def nearest_star(self, node: str) -> str | None:
        """The star a return from ``node`` should go to: the star of its own block placement or
        device when it has one (a channel's returns gather at the channel's star), else the nearest
        star in the network."""
        if node not in self._nearest:
            self._nearest[node] = self._nearest_star(node)
        return self._nearest[node]

    def _nearest_star(self, node: str) -> str | None:
        import networkx as nx

        group = self.points[node].group if node in self.points else None
        own = [s for s in self.stars if group and self.points[s].group == group]
        best = None
        for s in own or self.stars:
            try:
                d = nx.shortest_path_length(self.G, node, s)
            except (nx.NetworkXNoPath, nx.NodeNotFound):
                continue
            if best is None or d < best[0]:
                best = (d, s)
        return best[1] if best else None


def local_name(model_name: str, label: str, target: str) -> str:
    """How ``target`` is written inside the statement whose element is ``model_name`` (local label
    ``label``): relative to the innermost placement (or device) that holds both.

    >>> local_name("phono.right.in_gnd", "in_gnd", "phono.star")
    'star'
    >>> local_name("right.in_gnd", "in_gnd", "right.k1")
    'k1'
    >>> local_name("right.in_gnd", "in_gnd", "star")
    'star'
    """
    # the innermost scope that holds the target: the block placement's prefix, then each
    # enclosing one (a device's own plan names its points without the device's prefix)
    prefix = model_name[: len(model_name) - len(label)]
    while prefix:
        if target.startswith(prefix):
            return target[len(prefix) :]
        prefix = prefix[: prefix.rstrip(".").rfind(".") + 1]
    return target


def block_note(model_name: str, label: str) -> str:
    """A note when the edited statement sits in a block: the change applies to every placement.  (A
    device's own plan gets :func:`device_note` instead.)"""
    return f" — in its block, so for every placement ({label})" if model_name != label else ""


def device_note(c: "Candidate", main: str, plan=None) -> "Candidate":
    """A candidate that edits a device's own plan says so: a separate diff, a changed copy on
    --apply; a plan placed as several devices (two monoblocks) names them all, since the change is
    made in each."""
    files = sorted({e.file for e in c.edits if e.file is not None})
    if not files:
        return c
    where = ", ".join(shown_path(f, Path(main).parent) for f in files)
    placed = sorted(
        name for name, own in (plan.device_plans if plan is not None else ()) if own.file in files
    )
    each = f", placed as {' and '.join(placed)}: the change is made in each"
    every = each if len(placed) > 1 else ""
    what = "the device's own plan" if placed else "the included file"
    return dataclasses.replace(
        c,
        title=c.title + f" — in {what} {where}{every} (a separate diff; "
        "--apply writes a changed copy beside the new plan, never the original)",
    )


def delete_change(
    ctx: ChangeContext, name: str, title: str, reason: str, action: str = "remove"
) -> Candidate | None:
    c = ctx.cond.get(name)
    st = ctx.statement(c) if c is not None else None
    if c is None or joins_devices(c) or st is None or st.keyword != c.kind:
        return None  # (a conductor a 'device ...: simple' statement makes: bought equipment's)
    note = block_note(ctx.file_name(c.name, st), st.label or "")
    return Candidate(
        title + note, reason, (ctx.src.delete(st),), ctx.protective(c), action=action, element=name
    )


def route_length(ctx: ChangeContext, c, a: str, b: str) -> float | None:
    """Straight-line (or waypoint) length between two points with positions, plus the allowance;
    m."""
    pa, pb = ctx.points.get(a), ctx.points.get(b)
    if pa is None or pb is None or pa.pos is None or pb.pos is None:
        return None
    path = [pa.pos, *c.route, pb.pos]
    return sum(math.dist(p, q) for p, q in zip(path, path[1:])) * (1 + ROUTE_ALLOWANCE)


#: a phrase removed by a move: its first item's stand-in, taken out with its comma
_GONE = "\x00"


def reroute(
    ctx: ChangeContext, name: str, end: str, to: str, title: str, reason: str, action: str = "move"
) -> Candidate | None:
    """Move the ``end`` of conductor ``name`` to point ``to``; its length follows the new route.
    None when the statement is in a device's own plan and ``to`` is not in that plan (one
    statement never names points of two files)."""
    c = ctx.cond.get(name)
    st = ctx.statement(c) if c is not None else None
    if c is None or st is None or shield_like(c) or to == end:
        return None
    terminals = earth_terminals(ctx.plan)
    if to in terminals["inlet"] and not ctx.protective(c):
        return None  # an inlet's protective terminal takes the protective conductor alone
    if to in terminals["earthing-terminal"]:
        title += " — work at the main earthing terminal, for a qualified electrician"
    if is_fastening_kind(c.kind):
        return None  # a bolt holds a point to the metal under it: it runs nowhere else
    if not ctx.same_file(st, to):
        return None
    items = ctx.src.ends(st)
    if items is None:
        return None
    label = st.label or ""
    ia, ib = items
    if c.b == end and ib.value == local_name(c.name, label, end):
        changes, a, b = [(ib, local_name(c.name, label, to))], c.a, to
    elif c.a == end and ia.value == local_name(c.name, label, end):
        changes, a, b = [(ia, local_name(c.name, label, to))], to, c.b
    else:
        return None
    if a == b:
        return None
    via = ctx.src.find(st, "via") if c.route else None
    if via:  # the old waypoints led to the old end: the moved wire runs straight
        changes += [(via[0], _GONE)] + [(it, "") for it in via[1:]]
        c = dataclasses.replace(c, route=())
    length = route_length(ctx, c, a, b)
    old = ctx.src.quantity(st, "length")
    if length is not None and old is not None:
        changes.append((old, f"{length * 1e3:.0f} mm"))
        title += f"; new length {length * 1e3:.0f} mm (straight route + {ROUTE_ALLOWANCE:.0%})"
    edit = ctx.src.replace(st, changes, drop_comment=True)
    if via:
        edit = dataclasses.replace(edit, new=re.sub(rf",\s*{_GONE}[ \t]*", "", edit.new))
    note = block_note(ctx.file_name(c.name, st), label)
    why = off_the_entry(ctx, c, end, to)  # a balanced shield's landing kept at the entry
    return Candidate(
        title + note,
        reason,
        (edit,),
        ctx.protective(c),
        wire=length or 0.0,
        action=action,
        element=name,
        refused=why,
    )


def rephrase(
    ctx: ChangeContext,
    c,
    words: tuple[str, ...],
    new: str,
    title: str,
    reason: str,
    protective=None,
    action: str = "terminate-at",
):
    """Replace the phrase of ``c``'s statement that starts with ``words`` by ``new``."""
    st = ctx.statement(c)
    ph = ctx.src.find(st, *words) if st is not None else None
    if not ph:
        return None
    edit = ctx.src.replace(st, [(ph[0], new)] + [(it, "") for it in ph[1:]])
    edit = Edit(edit.line, squeeze(edit.new, new), edit.extra, edit.last, edit.file)
    touches = ctx.protective(c) if protective is None else protective
    return Candidate(title, reason, (edit,), touches, action=action, element=c.name)


def appended(ctx: ChangeContext, st, phrase: str) -> Edit:
    """The statement ``st`` with ``, phrase`` after its last item (before any comment)."""
    n, _, b = ctx.src.span(st.phrases[-1][-1])
    edit = ctx.src.replace(st, [])
    rows = edit.new.split("\n")
    row = rows[n - st.loc.line]
    rows[n - st.loc.line] = row[:b] + ", " + phrase + row[b:]
    return Edit(edit.line, "\n".join(rows), (), edit.last, edit.file)

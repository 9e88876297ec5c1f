"""Drawings of a plan as Graphviz DOT source: the physical view and the topology view.

Visual scheme (groundcheck's own):

- metal parts: pale rounded outlines at their size and place;
- points: small discs; a point fastened to metal is a filled square ("stud"); a star point is a
  star; the inlet's protective terminal is a green triangle;
- conductors by role: protective green-and-yellow striped (the trade's colours), supply return
  orange, signal reference blue, shield grey dashed, fastening bond dark dotted, lift network
  purple dashed, heater ochre;
- each ground loop is underlaid with a translucent amber band; where it runs through a metal part
  the straight line between the two fastenings is drawn dashed;
- a conductor or point named in a finding is haloed red and labelled with the finding codes;
- a legend sits beside the drawing.

Every string from the plan is quoted for DOT (and Graphviz escapes it again in SVG).
"""

from __future__ import annotations

from collections import defaultdict

from ..model.kinds import (
    SIGNAL,
    is_fastening,
    is_fastening_kind,
    is_lift,
    joins_devices,
    shield_like,
)
from ..rules.results import Result
from .dotbase import (
    LEGEND_SIZE,
    LIFT_STYLE,
    LOOP_HALO,
    PROBLEM_HALO,
    ROLE_STYLE,
    attrs as _attrs,
    dot_quote,
    element_class,
    legend as _legend,
    problems as _problems,
)
from .dottopology import topology_dot
from .system import system_dot

__all__ = [
    "physical_dot",
    "topology_dot",
    "dot_quote",
    "element_class",
    "ROLE_STYLE",
    "has_physical_view",
]


def has_physical_view(plan) -> bool:
    """Whether the plan can be drawn physically: it places devices (the system view) or gives
    positions."""
    return bool(plan.devices) or any(p.pos is not None for p in plan.points)


def physical_dot(result: Result) -> str:
    """The physical view: metal parts, points at their positions, conductors along their routes
    (neato)."""
    plan = result.plan
    if plan.devices:
        return system_dot(result)
    marks = _problems(result)
    positioned = {p.name: p.pos for p in plan.points if p.pos is not None}
    box = _extent(plan, positioned)
    if box is None:
        return topology_dot(result)
    x0, x1, y0, y1 = box
    extent = max(x1 - x0, y1 - y0, 1e-3)
    if y1 - y0 > 3 * (x1 - x0):
        # a part far behind the rest (a footswitch on its cable) would squeeze the chassis into a
        # strip too narrow for its labels: the drawing grows tall instead, up to 30 in
        extent = max(x1 - x0, (y1 - y0) / 3, 1e-3)
    scale = 720.0 / extent  # points per metre: the drawing is about 10 in across

    def P(q):
        return ((q[0] - x0) * scale + 20, (q[1] - y0) * scale + 20)

    lines = [
        "graph physical {",
        f"  graph [label={dot_quote(plan.title)}, labelloc=t, fontsize=14, "
        "fontname=Helvetica, "
        'splines=line, outputorder=nodesfirst, bgcolor="white", inputscale=72, forcelabels=true];',
        "  node [fontname=Helvetica, fontsize=8];",
        "  edge [fontname=Helvetica, fontsize=8];",
    ]
    _metals(plan, marks, scale, P, lines)
    _frame_marks((x1 - x0) * scale, scale, lines)
    _points(plan, marks, positioned, P, lines)
    _conductors(result, marks, positioned, P, lines)
    _metal_loops(result, positioned, lines)
    _fields(plan, scale, P, lines)
    missing = physical_omissions(result)
    if any(missing):
        note = (
            f"not drawn here: {missing[0]} points and {missing[1]} conductors without positions "
            "(groundcheck draw --view topology shows every one)"
        )
        lines.append(
            f'  {dot_quote("note:omitted")} [shape=note, fontsize=9, fontcolor="#a04000", '
            f'color="#a04000", label={dot_quote(note)}, pos="{20:.1f},{-30:.1f}!"];'
        )
    # the legend clear of the drawing and of the labels Graphviz puts beside its right edge
    lines.append(_legend((x1 - x0) * scale + 20 + 90 + LEGEND_SIZE[0] / 2, 80))
    lines.append("}")
    return "\n".join(lines) + "\n"


def _extent(plan, positioned: dict):
    """(x0, x1, y0, y1) in metres: the points, metal parts, the routes' waypoints and the field
    sources' circles, so that the legend beside them covers none; None without a point or part
    placed."""
    routes = [w for c in plan.conductors for w in c.route]
    fields = [(f.pos, (f.size or 0) / 2) for f in plan.fields]
    xs = (
        [q[0] for q in positioned.values()]
        + [m.origin[0] + d for m in plan.metals if m.size for d in (0, m.size[0])]
        + [w[0] for w in routes]
        + [q[0] + d for q, r in fields for d in (-r, r)]
    )
    ys = (
        [q[1] for q in positioned.values()]
        + [m.origin[1] + d for m in plan.metals if m.size for d in (0, m.size[1])]
        + [w[1] for w in routes]
        + [q[1] + d for q, r in fields for d in (-r, r)]
    )
    if not positioned and not any(m.size for m in plan.metals):
        return None
    return min(xs), max(xs), min(ys), max(ys)


#: scale bar lengths to choose from, m
SCALE_BARS = (0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0)


def _frame_marks(width: float, scale: float, lines: list[str]) -> None:
    """Under the drawing: which side is the front panel (the plan frame's y = 0 side,
    docs/language.md), and a scale bar of a round length, about a sixth of the drawing's width."""
    lines.append(
        '  "frame:front" [shape=plaintext, fontsize=9, fontcolor="#555555", label="▼ front panel '
        f'▼", pos="{20 + width / 2:.1f},6!"];'
    )
    bar = next((b for b in SCALE_BARS if b * scale >= width / 6), SCALE_BARS[-1])
    length = bar * scale
    lines.append('  "frame:bar0" [shape=point, width=0.03, color="#333333", pos="20,-10!"];')
    lines.append(
        f'  "frame:bar1" [shape=point, width=0.03, color="#333333", pos="{20 + length:.1f},-10!"];'
    )
    lines.append('  "frame:bar0" -- "frame:bar1" [penwidth=2.5, color="#333333"];')
    lines.append(
        f'  "frame:barlabel" [shape=plaintext, fontsize=9, label="{bar * 1e3:g} mm", '
        f'pos="{20 + length + 24:.1f},-10!"];'
    )


def _metals(plan, marks, scale, P, lines) -> None:
    # parts stacked on one outline (a cover over its deck) share one label, so that neither hides
    # the other
    shared: dict = {}
    for m in plan.metals:
        if m.size is not None:
            key = (
                round(m.origin[0] + m.size[0] / 2, 6),
                round(min(m.origin[1], m.origin[1] + m.size[1]), 6),
            )
            shared.setdefault(key, []).append(m)
    for m in plan.metals:
        if m.size is None:
            continue
        key = (
            round(m.origin[0] + m.size[0] / 2, 6),
            round(min(m.origin[1], m.origin[1] + m.size[1]), 6),
        )
        group = shared[key]
        w, h = abs(m.size[0]) * scale / 72, abs(m.size[1]) * scale / 72
        cx = m.origin[0] + m.size[0] / 2
        cy = m.origin[1] + m.size[1] / 2
        px, py = P((cx, cy))
        style = {
            "shape": "box",
            "style": "rounded,filled",
            "fillcolor": "#f3f0e8" if m.touchable else "#ebebeb",
            "color": "#e03030" if m.name in marks else "#9a9a9a",
            "width": f"{w:.3f}",
            "height": f"{h:.3f}",
            "fixedsize": "true",
            "label": " + ".join(
                x.name + (" [" + ", ".join(marks[x.name]) + "]" if x.name in marks else "")
                for x in group
            )
            if m is group[0]
            else "",
            "labelloc": "b",
            "fontcolor": "#666666",
            "pos": f"{px:.1f},{py:.1f}!",
        }
        style["class"] = element_class(m.name)
        lines.append(f"  {dot_quote('metal:' + m.name)} [{_attrs(style)}];")


def _points(plan, marks, positioned, P, lines) -> None:
    metal_names = {m.name for m in plan.metals}
    fastened = {
        c.a if c.b in metal_names else c.b for c in plan.conductors if is_fastening(c, metal_names)
    }
    for name, q in positioned.items():
        p = plan.point(name)
        px, py = P(q)
        style = {
            "shape": "circle",
            "width": "0.09",
            "height": "0.09",
            "style": "filled",
            "fillcolor": "#ffffff",
            "color": "#333333",
            "label": "",
            "xlabel": name,
            "pos": f"{px:.1f},{py:.1f}!",
        }
        if p.kind == "star":
            style.update(shape="star", width="0.22", height="0.22", fillcolor="#ffd54f")
        elif name == "mains.pe":
            style.update(shape="triangle", width="0.18", height="0.18", fillcolor="#2f7d32")
        elif name in fastened:
            style.update(shape="square", width="0.11", height="0.11", fillcolor="#555555")
        if name in marks:
            style.update(
                color="#e03030",
                penwidth="2.5",
                xlabel=f"{name} [{', '.join(marks[name])}]",
                fontcolor="#b00000",
            )
        style["class"] = element_class(name)
        lines.append(f"  {dot_quote(name)} [{_attrs(style)}];")


def _one_end_shield(c) -> bool:
    """A shield within a box terminated at one end: drawn dotted (an interconnect is drawn between
    boxes)."""
    return shield_like(c) and not joins_devices(c) and not c.connects


def _conductors(result, marks, positioned, P, lines) -> None:
    plan = result.plan
    loop_members = defaultdict(int)
    for lp in result.loops:
        for e in lp.loop.edges:
            loop_members[e] += 1
    way = 0
    for c in plan.conductors:
        if is_fastening_kind(c.kind) or not c.connects and not _one_end_shield(c):
            continue
        if c.a not in positioned or c.b not in positioned:
            continue
        chain = [c.a]
        for w_ in c.route:
            way += 1
            wname = f"via:{c.name}:{way}"
            px, py = P(w_)
            lines.append(
                f'  {dot_quote(wname)} [shape=point, width=0.01, label="", '
                f'pos="{px:.1f},{py:.1f}!"];'
            )
            chain.append(wname)
        chain.append(c.b)
        style = dict(LIFT_STYLE if is_lift(c) else ROLE_STYLE.get(c.role, ROLE_STYLE[SIGNAL]))
        if _one_end_shield(c):
            style["style"] = "dotted"
        # halos are stripes of one edge (a colour list), so they overlay the conductor exactly
        base = style["color"]
        if c.name in marks:
            base = f"{PROBLEM_HALO}:{base}:{PROBLEM_HALO}"
        if loop_members.get(c.name):
            base = f"{LOOP_HALO}:{base}:{LOOP_HALO}"
        style["color"] = base
        style["class"] = element_class(c.name)
        for k, (u, v) in enumerate(zip(chain, chain[1:])):
            seg = dict(style)
            if k == (len(chain) - 2) // 2:
                label = c.name + (" [" + ", ".join(marks[c.name]) + "]" if c.name in marks else "")
                # an external label, which Graphviz places clear of the others (forcelabels)
                seg.update(xlabel=label, fontcolor="#b00000" if c.name in marks else "#333333")
            lines.append(f"  {dot_quote(u)} -- {dot_quote(v)} [{_attrs(seg)}];")


def _metal_loops(result, positioned, lines) -> None:
    plan = result.plan
    # loops through a metal part: the straight line between the fastenings it enters and leaves by
    metals = {m.name for m in plan.metals}
    passages: dict = {}  # one dashed line per passage, naming every loop that takes it
    for i, lp in enumerate(result.loops, 1):
        n = len(lp.loop.nodes)
        for j, node in enumerate(lp.loop.nodes):
            if node in metals:
                before, after = lp.loop.nodes[j - 1], lp.loop.nodes[(j + 1) % n]
                if before in positioned and after in positioned:
                    passages.setdefault((frozenset((before, after)), node), (before, after, []))[
                        2
                    ].append(i)
    for (_, node), (before, after, numbers) in passages.items():
        words = (
            f"loop {numbers[0]}" if len(numbers) == 1 else "loops " + ", ".join(map(str, numbers))
        )
        lines.append(
            f"  {dot_quote(before)} -- {dot_quote(after)} "
            f"[color={dot_quote(LOOP_HALO + ':#c08000:' + LOOP_HALO)}, style=dashed, "
            f'label={dot_quote(f"{words} through {node}")}, fontcolor="#a06000"];'
        )


#: the drawn diameter of a field source whose size the plan does not state, inches
FIELD_MARK = 0.3


def _fields(plan, scale: float, P, lines) -> None:
    """Each field source as a double circle at its place: as wide as its stated size (at the
    drawing's scale, ``scale`` points per metre), a small mark when none is stated."""
    for f in plan.fields:
        px, py = P(f.pos)
        d = FIELD_MARK if f.size is None else f.size * scale / 72
        lines.append(
            f"  {dot_quote('field:' + f.name)} [shape=doublecircle, width={d:.3f}, "
            f"height={d:.3f}, fixedsize=true, style=filled, "
            'fillcolor="#fde3e380", color="#c04040", label="", '
            f"xlabel={dot_quote(f.name + ' (' + f.kind + ')')}, "
            f'pos="{px:.1f},{py:.1f}!"];'
        )


def physical_omissions(result: Result) -> tuple[int, int]:
    """How many points and conductors the physical view cannot draw (no position): (points,
    conductors); an installation's view draws every device as a box and every point and conductor
    outside them."""
    plan = result.plan
    if plan.devices:
        return 0, 0
    positioned = {p.name for p in plan.points if p.pos is not None} | {
        m.name for m in plan.metals if m.size
    }
    points = sum(1 for p in plan.points if p.pos is None)
    conductors = sum(
        1
        for c in plan.conductors
        if not is_fastening_kind(c.kind) and not (c.a in positioned and c.b in positioned)
    )
    return points, conductors

"""The physical view of an installation: the whole system as one drawing.

Laid out on a grid of our own, so that nothing overlaps by construction: the main earthing terminal
on top, the outlets below it, strips and other plug points below their outlet, and each device as a
labelled box below the point it is plugged into (one column per device).  Building runs join the
building points, each device's mains cord joins its box to its plug point, and interconnects join
the boxes below them, routed around the other boxes.  Loops are banded and findings haloed as in
the chassis drawing; a device touched by a finding is outlined red with its codes.  A device's own
wiring is drawn with its own plan.
"""

from __future__ import annotations

from ..model.kinds import SIGNAL, joins_devices
from ..model.installation import device_of
from ..rules.results import Result
from .dotbase import LOOP_HALO, PROBLEM_HALO, ROLE_STYLE, attrs as _attrs, dot_quote, element_class
from .dotbase import legend as _legend, problems as _problems

__all__ = [
    "system_dot",
    "COLUMN",
    "ROW",
    "GAP",
    "LANE",
    "LANE_TOP",
    "box_rows",
    "box_width",
    "CLASS_II_CORD",
]

#: grid spacing, points: a column for a point without devices, a row per level of the building
#: wiring, and the gap between device boxes
COLUMN = 150.0
ROW = 110.0
GAP = 30.0


def _tree(plan, devices: dict) -> tuple[dict, list]:
    """The building points' parent (towards the main earthing terminal) and the terminals at the
    top."""
    inside = {p.name for p in plan.points if p.group} | {m.name for m in plan.metals}
    building = [p.name for p in plan.points if p.name not in inside]
    adj: dict = {n: [] for n in building}
    for c in plan.conductors:
        if c.a in adj and c.b in adj:
            adj[c.a].append(c.b)
            adj[c.b].append(c.a)
    tops = [
        p.name for p in plan.points if p.name in adj and p.kind == "earthing-terminal"
    ] or building[:1]
    parent: dict = {}
    order = []
    for top in tops + building:
        if top in parent:
            continue
        parent[top] = None
        queue = [top]
        while queue:
            u = queue.pop(0)
            order.append(u)
            for v in adj[u]:
                if v not in parent:
                    parent[v] = u
                    queue.append(v)
    return parent, order


def _layout(plan, widths: dict) -> tuple[dict, dict]:
    """Positions (points) of building points and device boxes, and each building point's depth."""
    devices = {d.name: d for d in plan.devices}
    parent, order = _tree(plan, devices)
    depth = {}
    for n in order:
        depth[n] = 0 if parent[n] is None else depth[parent[n]] + 1
    children: dict = {n: [] for n in order}
    for n in order:
        if parent[n] is not None:
            children[parent[n]].append(n)
    plugged: dict = {}
    for d in plan.devices:
        plugged.setdefault(d.plugged if d.plugged in parent else None, []).append(d.name)
    pos: dict = {}
    cursor = [20.0]
    bottom = max(depth.values(), default=0) + 1

    def column(width: float) -> float:
        x = cursor[0] + width / 2
        cursor[0] += width + GAP
        return x

    def place(n) -> float:
        xs = [place(k) for k in children[n]]
        for dev in plugged.get(n, []):
            pos["device:" + dev] = (column(widths[dev]), 20.0)
            xs.append(pos["device:" + dev][0])
        if not xs:
            xs = [column(COLUMN - GAP)]
        pos[n] = (sum(xs) / len(xs), 20.0 + (bottom - depth[n]) * ROW)
        return pos[n][0]

    for n in order:
        if parent[n] is None:
            place(n)
    for dev in plugged.get(None, []):  # plugged nowhere (or into a point the drawing lacks)
        pos["device:" + dev] = (column(widths[dev]), 20.0)
    return pos, depth


#: under a class II device's box: why no cord line joins it to its plug point
CLASS_II_CORD = "no cord line: a class II cord has no protective core"


def box_rows(d, codes) -> list[str]:
    """A device box's label: its name with its finding codes, then what it is (and, for a class
    II device, why no cord line is drawn)."""
    kind = "simple" if d.source == "simple" else d.source.replace("\\", "/").rsplit("/", 1)[-1]
    rows = [
        d.name + (f" [{', '.join(codes)}]" if codes else ""),
        f"({kind}{', class II' if d.equipment_class == 'II' else ''})",
    ]
    if d.equipment_class == "II":
        rows.append(CLASS_II_CORD)
    return rows


def box_width(d, codes=()) -> float:
    """A device box's width, points: its longest label row at about 0.55 of the 9 pt font per
    character, plus margins."""
    return max(100.0, 0.55 * 9 * max(len(r) for r in box_rows(d, codes)) + 20)


def _device_marks(plan, marks: dict) -> dict:
    """Finding codes per device: those of its own elements."""
    devices = {d.name for d in plan.devices}
    out: dict = {}
    for name, codes in marks.items():
        dev = device_of(name, devices)
        if dev is not None:
            out.setdefault(dev, set()).update(codes)
    return {dev: sorted(codes) for dev, codes in out.items()}


#: interconnects run below the device boxes, each on a lane of its own (points below the boxes'
#: centres)
LANE_TOP = -30.0
LANE = 22.0


def _lanes(plan, pos: dict) -> dict:
    """Each interconnect between two drawn boxes: its lane (index) and where it leaves each box (x
    offsets), the ends of one box spread across its width (one slot per end) so that no two run
    down the same line."""
    icons = [c for c in plan.conductors if joins_devices(c)]
    devices = {d.name for d in plan.devices}
    ends = [[device_of(e, devices) for e in (c.a, c.b)] for c in icons]
    slots: dict = {}
    for pair in ends:
        for dev in pair:
            slots[dev] = slots.get(dev, 0) + 1
    taken: dict = {}
    out = {}
    for k, (c, pair) in enumerate(zip(icons, ends)):
        offs = []
        for dev in pair:
            i = taken[dev] = taken.get(dev, -1) + 1
            offs.append(-50 + 100 * (i + 0.5) / slots[dev])
        out[c.name] = (k, offs)
    return out


def _lane(c, ends, style, label, lanes, pos, lines) -> None:
    """An interconnect drawn down from each box to its lane and along it, labelled on the lane."""
    k, (oa, ob) = lanes[c.name]
    y = LANE_TOP - LANE * k
    (xa, _), (xb, _) = pos[ends[0]], pos[ends[1]]
    ta, tb = f"lane:{c.name}:a", f"lane:{c.name}:b"
    for t, x in ((ta, xa + oa), (tb, xb + ob)):
        lines.append(
            f'  {dot_quote(t)} [shape=point, width=0.01, label="", pos="{x:.1f},{y:.1f}!"];'
        )
    plain = {key: v for key, v in style.items()}
    lines.append(f"  {dot_quote(ends[0])} -- {dot_quote(ta)} [{_attrs(plain)}];")
    lines.append(f"  {dot_quote(tb)} -- {dot_quote(ends[1])} [{_attrs(plain)}];")
    middle = dict(style, xlabel=label, fontcolor="#b00000" if "[" in label else "#333333")
    lines.append(f"  {dot_quote(ta)} -- {dot_quote(tb)} [{_attrs(middle)}];")


def _nodes(plan, pos: dict, marks: dict, dev_marks: dict, lines: list) -> None:
    """Each device as a labelled box, each building point as a small symbol with its name and
    kind."""
    devices = {d.name: d for d in plan.devices}
    kinds = {
        t.name: f"transformer {t.primary:g}/{t.secondary:g} V"
        + (", isolating" if t.isolating else "")
        for t in plan.transformers
    }
    for name, (x, y) in pos.items():
        if name.startswith("device:"):
            d = devices[name[7:]]
            rows = box_rows(d, dev_marks.get(d.name, ()))
            label = "\\n".join(dot_quote(r)[1:-1] for r in rows)
            style = {
                "shape": "box",
                "style": "rounded,filled",
                "fillcolor": "#f3f0e8",
                "color": "#e03030" if d.name in dev_marks else "#9a9a9a",
                "fontcolor": "#333333",
                "penwidth": "2.2" if d.name in dev_marks else "1",
                "height": f"{0.6 if len(rows) < 3 else 0.75:g}",
                "margin": "0.12,0.06",
                "width": f"{box_width(d, dev_marks.get(d.name, ())) / 72:.2f}",
                "pos": f"{x:.1f},{y:.1f}!",
            }
            lines.append(
                f'  {dot_quote(name)} [label="{label}", {_attrs(style)}, '
                f"class={dot_quote(element_class(d.name))}];"
            )
            continue
        p = plan.point(name)
        label = name + (f" [{', '.join(marks[name])}]" if name in marks else "")
        shape = {"earthing-terminal": "invtriangle", "outlet": "square"}.get(p.kind, "circle")
        lines.append(
            f"  {dot_quote(name)} [shape={shape}, width=0.16, height=0.16, fixedsize=true, "
            "style=filled, "
            f'fillcolor="#2f7d32", label="", '
            f"xlabel={dot_quote(f'{label} ({kinds.get(name, p.kind)})')}, "
            f'pos="{x:.1f},{y:.1f}!", class={dot_quote(element_class(name))}];'
        )


def _edges(result, pos: dict, marks: dict, lanes: dict, lines: list) -> None:
    """Building runs and cords as straight lines, interconnects on their lanes; loops banded,
    findings haloed."""
    plan = result.plan
    devices = {d.name for d in plan.devices}
    loops = {e for lp in result.loops for e in lp.loop.edges}
    for c in plan.conductors:
        ends = [
            e if e in pos else (f"device:{d}" if (d := device_of(e, devices)) else None)
            for e in (c.a, c.b)
        ]
        if None in ends or ends[0] == ends[1] or (not c.connects and not joins_devices(c)):
            continue
        style = dict(ROLE_STYLE.get(c.role, ROLE_STYLE[SIGNAL]))
        if joins_devices(c) and not c.connects:
            style["style"] = "dotted"
        if c.name in marks:
            style["color"] = f"{PROBLEM_HALO}:{style['color']}:{PROBLEM_HALO}"
        if c.name in loops:
            style["color"] = f"{LOOP_HALO}:{style['color']}:{LOOP_HALO}"
        label = c.name + (f" [{', '.join(marks[c.name])}]" if c.name in marks else "")
        style["class"] = element_class(c.name)
        if joins_devices(c):
            _lane(c, ends, style, label, lanes, pos, lines)
            continue
        if not c.name.endswith(".cord"):
            style.update(xlabel=label, fontcolor="#b00000" if c.name in marks else "#333333")
        lines.append(f"  {dot_quote(ends[0])} -- {dot_quote(ends[1])} [{_attrs(style)}];")


def system_dot(result: Result) -> str:
    """The physical view of an installation (neato, every position pinned)."""
    plan = result.plan
    marks = _problems(result)
    dev_marks = _device_marks(plan, marks)
    pos, _ = _layout(plan, {d.name: box_width(d, dev_marks.get(d.name, ())) for d in plan.devices})
    lanes = _lanes(plan, pos)
    lines = [
        "graph physical {",
        f"  graph [label={dot_quote(plan.title)}, labelloc=t, fontsize=14, "
        'fontname=Helvetica, splines=line, outputorder=nodesfirst, bgcolor="white", '
        "forcelabels=true, "
        'inputscale=72, sep="+8"];',
        "  node [fontname=Helvetica, fontsize=9];",
        "  edge [fontname=Helvetica, fontsize=8];",
    ]
    _nodes(plan, pos, marks, dev_marks, lines)
    _edges(result, pos, marks, lanes, lines)
    width = max((x for x, _ in pos.values()), default=0.0)
    note = (
        "each device is drawn as a box; its own wiring is in its own plan's drawing (groundcheck "
        "draw DEVICE.gplan); mains cords are the lines from a box up to its plug point"
    )
    lines.append(
        f'  {dot_quote("note:system")} [shape=note, fontsize=9, fontcolor="#555555", '
        'color="#999999", '
        f"label={dot_quote(note)}, "
        f'pos="{20 + width / 2:.1f},{LANE_TOP - LANE * (len(lanes) + 1):.1f}!"];'
    )
    lines.append(_legend(width + 260, 120))
    lines.append("}")
    return "\n".join(lines) + "\n"

"""The topology view as Graphviz DOT source (laid out by dot): every point, part and conductor,
each device or block placement in a box of its own; the visual scheme is the physical view's
(:mod:`groundcheck.renderers.dot`)."""

from __future__ import annotations

from ..model.index import outermost
from ..model.kinds import SIGNAL, is_lift
from ..rules.results import Result
from .dotbase import (
    LIFT_STYLE,
    PROBLEM_HALO,
    ROLE_STYLE,
    attrs as _attrs,
    dot_quote,
    element_class,
    legend as _legend,
    problems as _problems,
)

__all__ = ["topology_dot"]


def topology_dot(result: Result) -> str:
    """The topology view, laid out automatically: every point, part and conductor, for plans
    without positions."""
    plan = result.plan
    marks = _problems(result)
    lines = [
        "graph topology {",
        f"  graph [label={dot_quote(plan.title)}, labelloc=t, fontsize=14, fontname=Helvetica, "
        "rankdir=LR, overlap=false];",
        "  node [fontname=Helvetica, fontsize=9];",
        "  edge [fontname=Helvetica, fontsize=8];",
    ]
    _topology_nodes(plan, marks, lines)
    for c in plan.conductors:
        style = dict(LIFT_STYLE if is_lift(c) else ROLE_STYLE.get(c.role, ROLE_STYLE[SIGNAL]))
        style["label"] = c.name + (
            " [" + ", ".join(marks[c.name]) + "]" if c.name in marks else ""
        )
        style["class"] = element_class(c.name)
        if not c.connects:
            style["style"] = "dotted"
        if c.name in marks:
            style["fontcolor"] = "#b00000"
            style["color"] = f"{PROBLEM_HALO}:{style['color']}:{PROBLEM_HALO}"
        lines.append(f"  {dot_quote(c.a)} -- {dot_quote(c.b)} [{_attrs(style)}];")
    lines.append(_legend(0, 0).replace(', pos="0.0,0.0!"', ""))
    lines.append("}")
    return "\n".join(lines) + "\n"


def _topology_nodes(plan, marks, lines: list[str]) -> None:
    """Every part and point, those of a device or block placement in a box of their own."""
    clusters = _clusters(plan)
    node_lines: dict[str | None, list[str]] = {}
    for m in plan.metals:
        style = {
            "shape": "box",
            "style": "rounded,filled",
            "fillcolor": "#f3f0e8",
            "label": m.name,
            "color": "#e03030" if m.name in marks else "#9a9a9a",
            "class": element_class(m.name),
        }
        node_lines.setdefault(clusters.get(m.name), []).append(
            f"  {dot_quote(m.name)} [{_attrs(style)}];"
        )
    for p in plan.points:
        label = p.name + (f" [{', '.join(marks[p.name])}]" if p.name in marks else "")
        style = {"shape": "ellipse", "label": label, "class": element_class(p.name)}
        if p.kind == "star":
            style.update(
                shape="star",
                width="0.4",
                height="0.4",
                fixedsize="true",
                label="",
                xlabel=label,
                style="filled",
                fillcolor="#ffd54f",
            )
        elif p.name == "mains.pe":
            style.update(shape="triangle", style="filled", fillcolor="#bfe3c0")
        if p.name in marks:
            style.update(color="#e03030", penwidth="2")
        node_lines.setdefault(clusters.get(p.name), []).append(
            f"  {dot_quote(p.name)} [{_attrs(style)}];"
        )
    for key in sorted(node_lines, key=lambda k: (k is not None, k or "")):
        if key is None:
            lines.extend(node_lines[key])
            continue
        # each device or block placement in a box of its own
        lines.append(
            f"  subgraph {dot_quote('cluster_' + key)} {{ label={dot_quote(key)}; style=rounded; "
            'color="#b0b0b0"; fontcolor="#606060"; fontsize=11;'
        )
        lines.extend("  " + x for x in node_lines[key])
        lines.append("  }")


def _clusters(plan) -> dict[str, str]:
    """Each point or metal part placed by a device or block placement -> that placement's name."""
    out = {p.name: outermost(p.group) for p in plan.points if p.group}
    groups = set(out.values())
    for m in plan.metals:
        head = m.name.split(".", 1)[0]
        if "." in m.name and head in groups:
            out[m.name] = head
    return out

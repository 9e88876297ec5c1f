"""No label of a drawing overlaps another label or a mark, on every example and field plan, in
both views and with both renderers: each text of the SVG is measured as a box (Helvetica at about
half its font size per character, 0.8 of the size above the baseline and 0.2 below), each mark as
the box of its node's shapes (a point, star, stud or terminal; metal parts, field sources, device
boxes, notes and the legend are areas a label may lie over)."""

import itertools
import shutil
import xml.etree.ElementTree as ET

import pytest

from groundcheck.renderers.dot import physical_dot, topology_dot
from groundcheck.renderers.drawing import available_renderers, render_dot
from helpers import EXAMPLES, ROOT, SHARED_ANALYSIS, analysed, corpus_sample, not_included

NS = "{http://www.w3.org/2000/svg}"
PLANS = [
    *EXAMPLES,
    *sorted((ROOT / "examples" / "studio").glob("*.gplan")),
    # half of the field folders in the suite, all with GROUNDCHECK_WHOLE_CORPUS=1
    *corpus_sample(not_included(sorted((ROOT / "tests" / "field").glob("*/*.gplan")))),
]
AREAS = ("metal:", "field:", "device:", "note:", "legend", "frame:", "lane:")


def boxes(svg: bytes):
    """(labels, marks): each label as (x0, y0, x1, y1, text, its node or edge), each mark as
    (x0, y0, x1, y1, its node)."""
    labels, marks = [], []
    for g in ET.fromstring(svg).iter(NS + "g"):
        kind, title = g.get("class", "").split(), g.find(NS + "title")
        if title is None or not ({"node", "edge"} & set(kind)):
            continue
        name = title.text
        for t in g.findall(NS + "text"):
            size, text = float(t.get("font-size", "8")), "".join(t.itertext())
            if text.strip():
                w, x, y = 0.5 * size * len(text), float(t.get("x")), float(t.get("y"))
                x0 = {"middle": x - w / 2, "end": x - w}.get(t.get("text-anchor", "start"), x)
                labels.append((x0, y - 0.8 * size, x0 + w, y + 0.2 * size, text, name))
        if "node" not in kind or name.startswith(AREAS):
            continue
        for el in g:
            if el.tag == NS + "ellipse":
                cx, cy, rx, ry = (float(el.get(k)) for k in ("cx", "cy", "rx", "ry"))
                marks.append((cx - rx, cy - ry, cx + rx, cy + ry, name))
            elif el.tag == NS + "polygon":
                pts = [tuple(map(float, p.split(","))) for p in el.get("points").split()]
                xs, ys = [p[0] for p in pts], [p[1] for p in pts]
                marks.append((min(xs), min(ys), max(xs), max(ys), name))
    return labels, marks


def _meet(a, b) -> bool:
    return a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]


def overlaps(svg: bytes) -> list[tuple[str, str]]:
    labels, marks = boxes(svg)
    return [(a[4], b[4]) for a, b in itertools.combinations(labels, 2) if _meet(a, b)] + [
        (a[4], m[4]) for a in labels for m in marks if a[5] != m[4] and _meet(a, m)
    ]


def test_the_measure_finds_an_overlap():
    # two labels 10 points apart at 8 points: "abcdefgh" is 32 points wide, so they meet; a mark
    # under a third label meets it; a node's own mark does not count
    svg = """<svg xmlns="http://www.w3.org/2000/svg"><g class="graph">
    <g id="node1" class="node"><title>a</title><ellipse cx="0" cy="0" rx="3" ry="3"/>
    <text x="0" y="20" font-size="8">abcdefgh</text></g>
    <g id="node2" class="node"><title>b</title><text x="10" y="20" font-size="8">ijk</text></g>
    <g id="node3" class="node"><title>c</title><text x="0" y="2" font-size="8">x</text></g>
    </g></svg>""".encode()
    assert sorted(overlaps(svg)) == [("abcdefgh", "ijk"), ("x", "a")]


@pytest.mark.skipif(shutil.which("neato") is None, reason="needs Graphviz")
@pytest.mark.xdist_group(SHARED_ANALYSIS)  # each plan analysed once, with the report's tables
@pytest.mark.parametrize("path", PLANS, ids=lambda p: str(p.relative_to(ROOT)))
def test_no_label_overlaps_a_label_or_a_mark(path):
    result = analysed(path)
    found = {}
    for renderer in [r for r in ("system", "wasm") if r in available_renderers()]:
        for view, source, engine in (
            ("physical", physical_dot(result), "neato"),
            ("topology", topology_dot(result), "dot"),
        ):
            hits = overlaps(render_dot(source, "svg", engine, renderer)[0])
            if hits:
                found[f"{view} by {renderer}"] = hits
    assert found == {}

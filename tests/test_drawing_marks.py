"""What the drawings show, measured in the SVG Graphviz writes: sizes at the drawing's own scale,
and the legend with its caution whichever Graphviz drew it."""

import re
import shutil
import xml.etree.ElementTree as ET

import pytest

from helpers import EXAMPLES

NS = "{http://www.w3.org/2000/svg}"
HEADPHONE = next(p for p in EXAMPLES if p.name == "headphone-amp-100v.gplan")


def _nodes(svg_path) -> dict[str, ET.Element]:
    root = ET.parse(svg_path).getroot()
    return {
        g.find(NS + "title").text: g
        for g in root.iter(NS + "g")
        if "node" in g.get("class", "").split() and g.find(NS + "title") is not None
    }


@pytest.mark.skipif(shutil.which("neato") is None, reason="needs Graphviz")
def test_a_field_source_is_drawn_at_its_stated_size(cli, tmp_path):
    # the headphone example's toroid is stated 70 mm across; the scale bar under the drawing
    # gives points per millimetre (its two ends' centres and its label), so the inner circle's
    # diameter read back in millimetres is 70 within 2 %
    out = tmp_path / "d.svg"
    assert cli("draw", str(HEADPHONE), "-o", str(out))[0] == 0
    nodes = _nodes(out)
    ends = [float(nodes[f"frame:bar{k}"].find(NS + "ellipse").get("cx")) for k in (0, 1)]
    label = "".join(nodes["frame:barlabel"].find(NS + "text").itertext())
    per_mm = (ends[1] - ends[0]) / float(re.fullmatch(r"([\d.]+) mm", label)[1])
    inner = min(float(e.get("rx")) for e in nodes["field:toroid"].iter(NS + "ellipse"))
    assert 2 * inner / per_mm == pytest.approx(70.0, rel=0.02)


def _legend(svg_path) -> tuple[list[str], list[str]]:
    """The legend's words and its swatches' colours, in order."""
    g = _nodes(svg_path)["legend"]
    words = ["".join(t.itertext()) for t in g.iter(NS + "text")]
    colours = [p.get("fill") for p in g.iter(NS + "polygon") if p.get("fill") not in ("none",)]
    return [w for w in words if w.strip()], colours


@pytest.mark.skipif(shutil.which("neato") is None, reason="needs Graphviz")
@pytest.mark.parametrize("view", ["physical", "topology"])
def test_both_renderers_draw_the_same_legend_and_caution(cli, tmp_path, view):
    from groundcheck.renderers.drawing import available_renderers
    from groundcheck.renderers.dotbase import DRAWING_CAUTION, LEGEND_ROWS

    if "wasm" not in available_renderers():
        pytest.skip("no WebAssembly Graphviz")
    drawn = {}
    for renderer in ("system", "wasm"):
        out = tmp_path / f"{renderer}.svg"
        argv = ("draw", str(HEADPHONE), "-o", str(out), "--view", view, "--renderer", renderer)
        assert cli(*argv)[0] == 0
        drawn[renderer] = _legend(out)
    assert drawn["wasm"] == drawn["system"]
    words, colours = drawn["wasm"]
    # every row's words and colour, and the whole caution, line by line
    assert words == ["legend", *(w for _, w in LEGEND_ROWS), *DRAWING_CAUTION]
    assert colours == [c for c, _ in LEGEND_ROWS]


INSTALLATIONS = [
    *sorted((HEADPHONE.parent / "studio").glob("*.gplan")),
    *sorted(
        (HEADPHONE.parent.parent / "tests" / "field" / "home-studio-step-down").glob("*.gplan")
    ),
]


@pytest.mark.parametrize("path", INSTALLATIONS, ids=lambda p: p.stem)
def test_a_device_without_a_cord_line_says_why(path):
    # an installation's drawing joins each device's box to its plug point by its cord's protective
    # core; a class II device has none, and its box, the text report and the HTML report say so
    from groundcheck import analyze, load
    from groundcheck.renderers.dot import element_class, physical_dot
    from groundcheck.renderers.html import html_report
    from groundcheck.renderers.system import CLASS_II_CORD
    from groundcheck.renderers.text import text_report
    from groundcheck.renderers.textearth import CLASS_II_WORDS

    result = analyze(load(path))
    dot, text = physical_dot(result), text_report(result)
    page = html_report(result, None, None)
    quiet = []
    for d in result.plan.devices:
        box = re.search(rf'"device:{re.escape(d.name)}" \[[^\n]*label="([^"]*)"', dot)[1]
        cord = re.search(rf'class="{element_class(d.name + ".cord")}"', dot)
        if cord is None:
            quiet += [] if CLASS_II_CORD in box else [d.name]
            assert f"{d.name}: {CLASS_II_WORDS}" in text and f"{d.name}: {CLASS_II_WORDS}" in page
        else:
            assert CLASS_II_CORD not in box
    assert quiet == []
    assert any(d.equipment_class == "II" for d in result.plan.devices) == (CLASS_II_WORDS in text)


def test_the_label_grid_counts_what_comparing_with_every_box_counts():
    # the overlap pass keeps boxes in cells (renderers/drawing._Boxes); on random boxes of label
    # and mark sizes, some touching within the 0.5-point gap, some on cell boundaries, its count
    # of the boxes a box meets equals the count over every box, by the comparison itself
    import random

    from groundcheck.renderers.drawing import _Boxes, _meet

    rng = random.Random(5)
    for _ in range(200):
        kept, boxes = [], _Boxes()
        for _ in range(rng.randint(1, 60)):
            x, y = (
                rng.choice([rng.uniform(-100, 300), 32.0 * rng.randint(-3, 9)]),
                rng.uniform(-100, 300),
            )
            box = (x, y, x + rng.uniform(0, 80), y + rng.uniform(0, 12))
            owner = rng.choice([None, "a", "b"])
            kept.append((box, owner))
            boxes.add(box, owner)
        for _ in range(20):
            x, y = rng.uniform(-120, 320), rng.uniform(-120, 320)
            probe = (x, y, x + rng.uniform(0, 90), y + rng.uniform(0, 15))
            mine = rng.choice([None, "a", "b"])
            brute = sum(_meet(probe, b) for b, o in kept if mine is None or o != mine)
            assert boxes.meeting(probe, mine) == brute
            # asked to stop at a count no longer wanted: that count when it is reached
            enough = rng.randint(1, 4)
            assert boxes.meeting(probe, mine, enough) == min(brute, enough)

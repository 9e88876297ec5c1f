"""Reports: terminal text, DOT drawings, real renders, the HTML report in headless Chromium,
SARIF."""

import json
from pathlib import Path
from urllib.parse import unquote
import re
import shutil
import subprocess

import pytest

from groundcheck import load, load_text
from groundcheck.analysis import analyze
from groundcheck.renderers.drawing import available_renderers, render_dot
from groundcheck.renderers.dot import physical_dot, topology_dot
from groundcheck.renderers.html import html_report
from groundcheck.renderers.jsondoc import render_json
from groundcheck.renderers.sarif import sarif_document
from groundcheck.renderers.text import text_report

from helpers import EXAMPLES, WHOLE_CORPUS

RESULTS = {p.name: analyze(load(p)) for p in EXAMPLES}
HEADPHONE = RESULTS["headphone-amp-100v.gplan"]
DUAL = RESULTS["dual-mono-phono-stage.gplan"]


@pytest.mark.parametrize("name", sorted(RESULTS))
def test_terminal_report_as_text(name):
    r = RESULTS[name]
    text = text_report(r, width=120)
    assert text.splitlines()[0].startswith(r.plan.title)
    assert "Verdict:" in text.split("\n\n")[0]  # the summary comes first
    assert " ".join(text.split()).count("Never lift the protective earth") == 1
    for f in r.findings:
        assert f.code in text
    assert "Hum and buzz at the output" in text and "Protective earth (line-to-part fault" in text
    assert "\x1b[" not in text  # no colour codes when not a terminal
    coloured = text_report(r, width=120, color=True)
    assert "\x1b[" in coloured


def test_physical_dot_marks_problems():
    src = physical_dot(DUAL)
    assert '"gnd_post"' in src and "arm_gnd [GC101, GC105]" in src
    arm_line = next(line for line in src.splitlines() if "arm_gnd [" in line)
    assert "#e0303088" in arm_line  # problem halo
    assert "#f5a80066" in arm_line  # loop band
    assert "loop 1 through base" in src
    # the front panel's side (the plan frame's y = 0) and a scale bar: the shortest round length at
    # least a sixth of the drawing's width, 100 mm for the 360 mm base (60 mm and over)
    assert "▼ front panel ▼" in src and 'label="100 mm"' in src
    assert "legend" in src


def test_topology_dot_has_every_conductor():
    src = topology_dot(DUAL)
    for c in DUAL.plan.conductors:
        assert c.name in src


@pytest.mark.parametrize("renderer", ["system", "wasm"])
def test_real_render_to_svg(renderer, tmp_path):
    if renderer not in available_renderers():
        pytest.skip(f"{renderer} Graphviz renderer not available here")
    svg, how = render_dot(physical_dot(DUAL), "svg", "neato", renderer)
    assert (
        svg.lstrip().startswith(b"<?xml") and b"<svg" in svg and b"arm_gnd [GC101, GC105]" in svg
    )
    assert ("WebAssembly" in how) == (renderer == "wasm")


def test_the_report_draws_both_views_with_the_webassembly_renderer_without_aborting():
    # the report draws its two views side by side in threads; two threads inside the WebAssembly
    # runtime at once aborted the whole process (found when the system Graphviz was missing).
    # Run in a child process, so that an abort is a failure here, not a lost test worker.
    if "wasm" not in available_renderers():
        pytest.skip("WebAssembly Graphviz renderer not available here")
    code = (
        "from groundcheck import load\n"
        "from groundcheck.analysis import analyze\n"
        "from groundcheck.renderers.formats import both_views\n"
        f"r = analyze(load({str(EXAMPLES[1])!r}))\n"
        "for _ in range(3):\n"
        "    views, problems = both_views(r, 'wasm')\n"
        "    assert not problems and all(v is not None for v in views), problems\n"
    )
    import sys

    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, timeout=300)
    assert proc.returncode == 0, proc.stderr.decode(errors="replace")[-2000:]


def test_draw_command(cli, tmp_path):
    out = tmp_path / "m.svg"
    code, _, err = cli("draw", str(EXAMPLES[1]), "-o", str(out))
    assert code == 0 and out.read_bytes().count(b"<svg") == 1 and "wrote the physical view" in err
    assert b"never lift the protective earth" in out.read_bytes()  # the caution, under the legend
    code, _, err = cli(
        "draw", str(EXAMPLES[1]), "-o", str(tmp_path / "m.dot"), "--view", "topology"
    )
    assert code == 0 and (tmp_path / "m.dot").read_text().startswith("graph topology")
    code, _, err = cli("draw", str(EXAMPLES[1]), "-o", str(tmp_path / "m.xyz"))
    assert code == 2 and "cannot tell the drawing format" in err


CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.skipif(
    CHROMIUM is None,
    reason="headless Chromium is not installed (Debian package 'chromium'; .ci/run installs it)",
)
# one example in the suite, every one with GROUNDCHECK_WHOLE_CORPUS=1 (benchmarks/README.md)
@pytest.mark.parametrize("name", sorted(RESULTS) if WHOLE_CORPUS else sorted(RESULTS)[:1])
def test_html_report_in_headless_chromium(name, tmp_path, cli):
    html = tmp_path / "report.html"
    code, _, _ = cli(
        "report",
        str(next(p for p in EXAMPLES if p.name == name)),
        "-o",
        str(html),
        "--fail-on",
        "danger",
    )
    assert code == (1 if RESULTS[name].fails("danger") else 0)
    text = html.read_text()
    assert not re.search(r'(src|href)\s*=\s*"https?:', text)  # no network fetches
    flags = [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        f"--user-data-dir={tmp_path / 'profile'}",
        "--enable-logging=stderr",
        "--v=0",
    ]
    shot = tmp_path / "report.png"
    proc = subprocess.run(
        [CHROMIUM, *flags, f"--screenshot={shot}", "--window-size=1200,3000", html.as_uri()],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert shot.exists() and shot.stat().st_size > 10_000  # a screenshot written for inspection
    assert "CONSOLE" not in proc.stderr and "Uncaught" not in proc.stderr
    dom = subprocess.run(
        [CHROMIUM, *flags, "--dump-dom", html.as_uri()],
        capture_output=True,
        text=True,
        timeout=120,
    ).stdout
    assert 'id="physical"' in dom and 'id="topology"' in dom and dom.count("<svg") >= 3
    assert 'id="findings"' in dom and 'id="protective-earth"' in dom and 'class="chart"' in dom
    assert "threshold of hearing" in dom


def test_sarif_required_fields():
    # SARIF 2.1.0 (OASIS): required properties of sarifLog, run, tool.driver, result, location
    doc = sarif_document([HEADPHONE, DUAL])
    assert doc["version"] == "2.1.0" and doc["$schema"].endswith("sarif-2.1.0.json")
    run = doc["runs"][0]
    driver = run["tool"]["driver"]
    assert driver["name"] == "groundcheck"
    ids = [r["id"] for r in driver["rules"]]
    assert len(ids) == len(set(ids))
    assert len(run["results"]) == len(HEADPHONE.findings) + len(DUAL.findings)
    for res in run["results"]:
        assert res["message"]["text"]
        assert res["level"] in ("error", "warning", "note", "none")
        assert driver["rules"][res["ruleIndex"]]["id"] == res["ruleId"]
        loc = res["locations"][0]["physicalLocation"]
        assert loc["artifactLocation"]["uri"].endswith(".gplan")
        assert loc["region"]["startLine"] >= 1 and loc["region"]["startColumn"] >= 1


HOSTILE = (
    "plan \"<script>alert(1)</script> & 'quoted' \\\\ {x}\"\n"
    + "mains 230 V 50 Hz, fuse 1 A slow, line-conductor 0.75 mm2\n"
    "metal deck: aluminium 2 mm, 100 x 100 mm, touchable\npoint pe: stud, at 10,10 on deck\nwire "
    "pe_lead: mains.pe to pe, 50 mm, 0.5 mm2, protective\nbolt b: pe to deck\npoint s: star, at "
    "50,50 on deck\nwire w: s to s, 10 mm, 0.5 mm2\n"
)


def test_hostile_strings_are_escaped_everywhere(tmp_path):
    name = str(tmp_path / "x<script>&\"'.gplan")
    r = analyze(load_text(HOSTILE, name))
    assert r.findings
    html = html_report(
        r,
        *[
            render_dot(src, "svg", eng)[0]
            for src, eng in ((physical_dot(r), "neato"), (topology_dot(r), "dot"))
        ],
    )
    assert "<script>" not in html and "&lt;script&gt;" in html
    doc = json.loads(render_json(r))
    assert doc["plan"]["title"].startswith(
        "<script>"
    )  # JSON keeps the text, escaped by the encoder
    sarif = sarif_document([r])
    uri = sarif["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["artifactLocation"][
        "uri"
    ]
    assert "<" not in uri and unquote(uri).endswith(
        "x<script>&\"'.gplan"
    )  # percent-encoded (RFC 3986)
    json.dumps(sarif)
    for src in (physical_dot(r), topology_dot(r)):
        label = next(line for line in src.splitlines() if "labelloc=t" in line)
        assert '\\"' not in label or label.count('"') % 2 == 0
        svg, _ = render_dot(src, "svg", "neato")
        assert b"<script>" not in svg


def test_text_to_a_file_or_pipe_is_not_wrapped(cli):
    code, out, _ = cli("check", str(EXAMPLES[0]))
    lines = out.splitlines()
    heads = [ln for ln in lines if ln.startswith("  GC")]
    assert heads and all(re.match(r"  GC\d{3} \S+:\d+:\d+  \S", ln) for ln in heads)
    assert len(heads) == sum(1 for ln in lines if ln.startswith("      fix: "))
    # each finding is one line, its figures and fix indented on their own lines, nothing ends in
    # blanks
    assert all(not ln.endswith(" ") for ln in lines)
    assert "_mohm" not in out and " = " not in out.split("Caution")[1].split("Hum and buzz")[0]


@pytest.mark.skipif(shutil.which("neato") is None, reason="needs Graphviz")
@pytest.mark.parametrize(
    "path",
    [
        *EXAMPLES,
        EXAMPLES[0].parent / "studio" / "project-studio.gplan",
        EXAMPLES[0].parent / "studio" / "recording-room.gplan",
    ],
    ids=lambda p: p.stem,
)
def test_drawing_labels_do_not_overlap(cli, path, tmp_path):
    # every text of the SVG as a box (Helvetica at about half the font size per character, 0.8 size
    # above the baseline and 0.2 below); no two boxes may meet
    import itertools
    import xml.etree.ElementTree as ET

    out = tmp_path / "d.svg"
    code, _, _ = cli("draw", str(path), "-o", str(out))
    assert code == 0
    boxes = []
    for t in ET.parse(out).getroot().iter("{http://www.w3.org/2000/svg}text"):
        size, text = float(t.get("font-size", "8")), "".join(t.itertext())
        w, x = 0.5 * size * len(text), float(t.get("x"))
        x0 = {"middle": x - w / 2, "end": x - w}.get(t.get("text-anchor", "start"), x)
        y = float(t.get("y"))
        boxes.append((x0, y - 0.8 * size, x0 + w, y + 0.2 * size, text))
    hits = [
        (a[4], b[4])
        for a, b in itertools.combinations(boxes, 2)
        if a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]
    ]
    assert hits == []


def test_html_report_shows_each_findings_plan_line_coloured(tmp_path, cli):
    html = tmp_path / "r.html"
    head = next(p for p in EXAMPLES if p.name == "guitar-head.gplan")
    cli("report", str(head), "-o", str(html))
    text = html.read_text()
    # GC102 points at the rectifier statement (line 35): shown under the finding, its keyword
    # coloured
    assert text.count('<pre class="planline">') == len(RESULTS["guitar-head.gplan"].findings)
    row = next(r for r in text.split("<tr>") if ">GC102<" in r)
    assert (
        '<pre class="planline"><span style="' in row
        and ">rectifier</span>" in row
        and "res_neg" in row
    )
    # the drawings' note names the program of each view
    assert "the physical view by" in text and "the topology by" in text and "(dot)" in text
    # the topology fits the column, and a box shows it at full size (scrolled;
    # tests/test_html_tables.py measures both in a browser)
    assert 'class="drawing fits" id="topology"' in text and 'id="topology-zoom"' in text


def test_compare_page_has_totals_charts_and_both_drawings(tmp_path, cli):
    headphone = next(p for p in EXAMPLES if p.name == "headphone-amp-100v.gplan")
    fixed = tmp_path / "fixed.gplan"
    assert cli("suggest", str(headphone), "--apply", str(fixed))[0] == 0
    code, page, _ = cli("compare", str(headphone), str(fixed), "--format", "html")
    assert code == 0 and page.startswith("<!DOCTYPE html>") and "<style>" in page
    totals = page[page.index('id="totals"') : page.index("</table>", page.index('id="totals"'))]
    # the headphone amplifier's planted mistakes: one danger (GC206) and six faults (GC102, GC303
    # and GC306, each load return read back by its own input, per channel)
    assert "<td>danger</td><td class=num>1</td><td class=num>0</td>" in totals
    assert "<td>fault</td><td class=num>6</td><td class=num>0</td>" in totals
    assert "hum, left" in totals and "(removed)" in totals
    assert page.count('aria-label="hum of channel') == 2  # a before/after chart per channel
    assert 'id="before"' in page and 'id="after"' in page and page.count("<svg") >= 4
    assert "<td class=num>4 Ω</td>" in page  # the front panel's 4 ohm contact
    assert "Never lift the protective earth" in page


def test_the_earth_line_names_protective_findings_a_path_within_its_limit_does_not_show(cli):
    # the field plan push-pull-el84: its protective path is a few milliohms, but the protective
    # earth shares the transformer's stud (GC202); the summary line says so
    plan = Path(__file__).resolve().parent / "field" / "push-pull-el84" / "plan.gplan"
    _, out, _ = cli("check", str(plan), "--advice-budget", "0")
    line = next(x for x in out.splitlines() if x.startswith("Protective earth:"))
    assert "within limit, but see GC202 below" in line


def test_a_loop_table_never_asks_to_cut_an_unbalanced_links_screen(cli):
    # an outside builder read "open at │ sub_link" as "cut the sub's RCA screen", the signal's
    # return; the cell says how such a loop opens
    flat = Path(__file__).parent / "field" / "flat-hifi-lift" / "flat.gplan"
    out = cli("check", str(flat), "--no-hum")[1]
    rows = [x for x in out.splitlines() if "mains-cords" in x and "sub_link" in x]
    assert rows and all("never cut its screen" in x for x in rows), rows

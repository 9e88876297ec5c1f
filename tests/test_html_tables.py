"""The HTML report's rectifier and loop-pickup tables: every figure they print checked against
ngspice or a hand calculation here, or named where it is checked; and no Python value, exponent or
empty cell in them on any example or field plan."""

import functools
import math
import re
from html.parser import HTMLParser

import numpy as np
import pytest

from groundcheck import analyze
from groundcheck.renderers.html import html_report
from helpers import (
    EXAMPLES,
    ROOT,
    SHARED_ANALYSIS,
    analysed,
    corpus_sample,
    field_rooms,
    needs_ngspice,
    plan,
)
from test_plain_words import PYTHON
from test_rectifier_exact import _ngspice_bridge

#: the field corpus's rooms and lone plans (a device's own plan is rendered inside its room), half
#: of the folders in the suite (helpers.corpus_sample)
FIELD = corpus_sample(field_rooms())
STUDIO = sorted((ROOT / "examples" / "studio").glob("*.gplan"))


class _Table(HTMLParser):
    """The rows (lists of cell texts) of the table with the given id."""

    def __init__(self, table_id: str):
        super().__init__()
        self.id, self.rows, self._in, self._cell = table_id, [], False, None

    def handle_starttag(self, tag, attrs):
        if tag == "table" and dict(attrs).get("id") == self.id:
            self._in = True
        elif self._in and tag == "tr":
            self.rows.append([])
        elif self._in and tag in ("td", "th"):
            self._cell = ""

    def handle_endtag(self, tag):
        if tag == "table":
            self._in = False
        elif self._in and tag in ("td", "th") and self._cell is not None:
            self.rows[-1].append(self._cell)
            self._cell = None

    def handle_data(self, data):
        if self._cell is not None:
            self._cell += data


def table(page: str, table_id: str) -> list[dict]:
    p = _Table(table_id)
    p.feed(page)
    if not p.rows:
        return []
    head, *body = p.rows
    return [dict(zip(head, row)) for row in body]


def _value(text: str) -> float:
    """'23.2 µV' -> 2.32e-05; '345.0 V' -> 345.0; '64.6°' -> 64.6."""
    number, unit = re.fullmatch(r"(-?[\d.]+)\s*([pnµmk]?)\S*", text).groups()
    return float(number) * {"p": 1e-12, "n": 1e-9, "µ": 1e-6, "m": 1e-3, "": 1, "k": 1e3}[unit]


@needs_ngspice
def test_the_rectifier_table_of_the_phono_example_against_ngspice():
    # the phono example's bridge as written in the plan, built from four diodes in ngspice (the
    # helper of tests/test_rectifier_exact.py): the reservoir's and the filter's DC voltage within
    # 1 %, the reservoir's ripple within 3 %; the DC current is the load the plan states (by
    # hand: a capacitor passes no DC, so the diodes' mean current is the load's).  The peak and
    # rms charging currents and the conduction angle are checked against an ngspice transient in
    # tests/test_hum.py::test_rectifier_against_ngspice_transient (same simulation).
    path = next(e for e in EXAMPLES if e.name.startswith("dual-mono"))
    result = analysed(path)
    r = next(x for x in result.plan.rectifiers if x.name == "hv")
    row = next(
        x for x in table(html_report(result, None, None), "rectifiers") if x["rectifier"] == "hv"
    )
    v1, v2 = _ngspice_bridge(
        r.secondary,
        r.winding,
        r.diode_drop,
        r.capacitance,
        r.filter_resistance,
        r.filter_capacitance,
        r.load_current,
        result.plan.frequency,
    )
    assert _value(row["DC voltage"]) == pytest.approx(v1.mean(), rel=0.01)
    assert _value(row["filter output"]) == pytest.approx(v2.mean(), rel=0.01)
    assert _value(row["ripple"]) == pytest.approx(v1.max() - v1.min(), rel=0.03)
    assert _value(row["DC current"]) == pytest.approx(r.load_current, rel=1e-3)


def test_the_pickup_table_of_a_loop_solved_by_hand():
    # the loop of tests/test_hum.py::test_single_loop_solved_by_hand: a 100 mm square of two
    # wires (10 and 30 mΩ) 950 mm from a transformer given as 1 µT at 100 mm; its dipole field in
    # the deck's plane is B = K/r³ (Jackson §5.6, on the equator), integrated over the square by
    # Gauss-Legendre quadrature; EMF = 2πf·Φ (Faraday) and the loop current EMF / 40 mΩ (Ohm)
    p = plan("""
        listening output 1 V
        point a: pad, at 0,0
        point b: pad, at 100,0
        wire w1: a to b, 100 mm, resistance 10 mohm
        wire w2: b to a, 300 mm, resistance 30 mohm, via 100,100 0,100
        stage s: a to b, gain 20 dB
        field t: transformer, at 1000,50, 1 uT at 100 mm
        """)
    t, w = np.polynomial.legendre.leggauss(24)
    x = 0.05 * (t + 1)
    X, Y = np.meshgrid(x, x)
    phi = float(w @ (1e-6 * 0.1**3 / ((X - 1.0) ** 2 + (Y - 0.05) ** 2) ** 1.5) @ w) * 0.05**2
    emf = 2 * math.pi * 50 * phi
    (row,) = table(html_report(analyze(p), None, None), "pickup")
    assert (row["loop"], row["source"], row["frequency"], row["direction"]) == (
        "1",
        "t",
        "50 Hz",
        "worst: z",
    )
    assert row["area"] == "10000 mm²"  # 100 mm × 100 mm
    assert row["closest"] == "900 mm"  # from x = 1000 mm to the square's side at x = 100 mm
    assert _value(row["EMF"]) == pytest.approx(emf, rel=5e-3)  # printed to 3 digits
    assert _value(row["loop current"]) == pytest.approx(emf / 0.040, rel=5e-3)


@functools.lru_cache(maxsize=None)
def _analysed(path):
    """A plan's analysis and its report's two tables, once per test process (two tests read
    them)."""
    result = analysed(path)
    page = html_report(result, None, None)
    return result, {t: table(page, t) for t in ("rectifiers", "pickup")}


def _tables(path) -> dict[str, list[dict]]:
    return _analysed(path)[1]


#: the tests that read each plan's tables run in one process, so each plan is analysed and
#: rendered once
SHARED = pytest.mark.xdist_group(SHARED_ANALYSIS)


@SHARED
@pytest.mark.parametrize(
    "path", [*EXAMPLES, *STUDIO, *FIELD], ids=lambda p: str(p.relative_to(ROOT))
)
def test_the_tables_show_no_python_value_exponent_or_empty_cell(path):
    tables = _tables(path)
    cells = [c for rows in tables.values() for row in rows for c in row.values()]
    assert [c for c in cells if PYTHON.search(c) or re.search(r"\de[+-]?\d", c) or not c] == []


@SHARED
def test_every_plan_with_a_rectifier_or_a_loop_has_its_table():
    # one row per rectifier; one row per loop, field source and harmonic in the analysis's figures
    for path in [*EXAMPLES, *FIELD]:
        result, tables = _analysed(path)
        assert len(tables["rectifiers"]) == len(result.rectifiers), path
        expected = sum(
            max(1, len(s.lines))
            for row in (result.hum.loops if result.hum else [])[:200]
            for s in row.sources.values()
        )
        assert len(tables["pickup"]) == expected, path


def test_the_topology_fits_its_panel_and_zooms_to_full_size(tmp_path, cli):
    # the guitar head's topology is wider than the report's column: drawn to the column's width,
    # and at its own width (scrolled in its panel) once "at full size" is ticked
    from browser import CHROMIUM, Browser

    if CHROMIUM is None:
        pytest.skip("no Chromium")
    page = tmp_path / "r.html"
    path = next(e for e in EXAMPLES if e.name == "guitar-head.gplan")
    cli("report", str(path), "-o", str(page), "--renderer", "system")
    browser = Browser(page.as_uri(), str(tmp_path / "profile"))
    try:
        browser.wait_for("!!document.querySelector('#topology svg')")
        size = (
            "(() => { const d = document.getElementById('topology'); "
            "const s = d.querySelector('svg'); "
            "return [d.clientWidth, s.getBoundingClientRect().width, "
            "s.width.baseVal.value]; })()"
        )
        panel, drawn, natural = browser.js(size)
        assert natural > panel  # a drawing wider than the column, so that fitting means something
        assert drawn <= panel + 0.5
        browser.js("document.getElementById('topology-zoom').click()")
        panel, drawn, natural = browser.js(size)
        assert drawn == pytest.approx(natural, abs=0.5)
        assert browser.js("document.getElementById('topology').scrollWidth") > panel
    finally:
        browser.close()

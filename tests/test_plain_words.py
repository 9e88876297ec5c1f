"""No Python value shows in any output: every example rendered in every format (check as text, JSON
and SARIF, with and without the hum figures; the HTML report; suggest as text and JSON; compare of
the plan and its suggested fix as text, JSON and HTML; both drawings as SVG and DOT with their
messages; explain) is searched for None, True, False, nan, inf and a negative zero in the words a
reader sees."""

import json
import re
import shutil
from pathlib import Path
from html.parser import HTMLParser

import pytest

from helpers import EXAMPLES, ROOT

PLANS = [*EXAMPLES, *sorted((ROOT / "examples" / "studio").glob("*.gplan"))]
#: a Python value written into text: the words themselves, or a zero with a minus sign ("-0", "-0.0
#: dB")
PYTHON = re.compile(
    r"(?<![\w.])(None|True|False|nan|NaN|inf|-inf|Infinity|-0(\.0*)?)(?![\w.])"
    r"|–\s*dBV?\b"
)  # and a dash standing where a level should be ("(– dB)")


class _Words(HTMLParser):
    """The text a reader sees in HTML or SVG: text nodes and titles, not attributes, scripts or
    styles."""

    def __init__(self):
        super().__init__()
        self.words, self._skip = [], 0

    def handle_starttag(self, tag, attrs):
        self._skip += tag in ("script", "style")

    def handle_endtag(self, tag):
        self._skip -= tag in ("script", "style")

    def handle_data(self, data):
        if not self._skip:
            self.words.append(data)


def _seen(markup: str) -> str:
    p = _Words()
    p.feed(markup)
    return "\n".join(p.words)


def _strings(doc) -> list[str]:
    if isinstance(doc, dict):
        return [s for k, v in doc.items() for s in (k, *_strings(v))]
    if isinstance(doc, list):
        return [s for v in doc for s in _strings(v)]
    return [doc] if isinstance(doc, str) else []


def _hits(name: str, text: str) -> list[str]:
    return [
        f"{name}:{n}: {m.group(0)!r} in {line.strip()[:120]!r}"
        for n, line in enumerate(text.splitlines(), 1)
        for m in PYTHON.finditer(line)
    ]


def _outputs(cli, path, tmp_path) -> dict[str, str]:
    work = tmp_path / "plans"  # a copy, so the fixed plan sits beside its devices
    shutil.copytree(path.parent, work)
    p = str(work / path.name)
    # the advisor's fix lines once (in the text; the other formats carry the same sentences), the
    # rules' own fix lines in the others
    out = {"check text": cli("check", p, "--advice-budget", "10")[1]}
    for f in ("json", "sarif"):
        out[f"check {f}"] = cli("check", p, "--format", f, "--advice-budget", "0")[1]
    out["check --no-hum"] = cli("check", p, "--no-hum", "--advice-budget", "0")[1]
    cli("report", p, "-o", str(tmp_path / "r.html"))
    out["report html"] = (tmp_path / "r.html").read_text()
    fixed = work / "fixed.gplan"
    code, out["suggest text"], out["suggest message"] = cli("suggest", p, "--apply", str(fixed))
    out["suggest json"] = cli("suggest", p, "--format", "json")[1]
    after = str(fixed) if fixed.exists() else p
    for f in ("text", "json", "html"):
        out[f"compare {f}"] = cli("compare", p, after, "--format", f)[1]
    for view in ("physical", "topology"):
        _, dot, msg = cli("draw", p, "-o", "-", "--as", "dot", "--view", view)
        out[f"draw {view} dot"], out[f"draw {view} dot message"] = dot, msg
        _, _, msg = cli("draw", p, "-o", str(tmp_path / f"{view}.svg"), "--view", view)
        out[f"draw {view} svg message"] = msg
        out[f"draw {view} svg"] = (tmp_path / f"{view}.svg").read_text()
    return out


def _reader_text(kind: str, text: str) -> str:
    if kind.endswith(("json", "sarif")):
        return "\n".join(_strings(json.loads(text)))
    if kind.endswith(("html", "svg")):
        return _seen(text)
    if kind.endswith("dot"):  # labels and tooltips: the words the drawing will show
        return "\n".join(re.findall(r'(?:label|tooltip)="((?:[^"\\]|\\.)*)"', text))
    return text


@pytest.mark.parametrize("path", PLANS, ids=lambda p: p.name)
def test_no_python_value_in_any_output(cli, path, tmp_path):
    outputs = _outputs(cli, path, tmp_path)
    # every output was written (a message on standard error may be empty)
    assert [k for k, v in outputs.items() if not v and "message" not in k] == []
    hits = [h for kind, text in outputs.items() for h in _hits(kind, _reader_text(kind, text))]
    assert hits == []


def test_no_python_value_in_explain(cli):
    code, every, _ = cli("explain")
    assert code == 0 and "GC101" in every
    texts = {"explain": every}
    for rule in sorted(set(re.findall(r"\bGC\d{3}\b", every))):
        texts[f"explain {rule}"] = cli("explain", rule)[1]
    assert [h for k, t in texts.items() for h in _hits(k, t)] == []


def test_the_search_finds_what_it_looks_for():
    # the pattern itself: Python's words and a signed zero are found, ordinary figures and words
    # are not
    for leak in (
        "level None dBV",
        "audible False → True",
        "(-0.0 dB)",
        "-0 dB",
        "nan V",
        "inf A",
        "NaN",
        "(– dB)",
    ):
        assert PYTHON.search(leak), leak
    for fine in (
        "-0.05 dB",
        "0.0 dB",
        "-10.0 dBV",
        "information",
        "Nonesuch",
        "falsely",
        "4.0",
        "a-0.0b",
        "a – b, 3 dB",
    ):
        assert not PYTHON.search(fine), fine
    assert _seen(
        "<p>ok <b>None</b></p><style>x{}</style><svg><title>True</title></svg>"
    ).split() == ["ok", "None", "True"]


def test_a_tiny_negative_share_is_written_without_its_sign(cli):
    """A contributor that cancels a hair of the hum (a share of -0.3 %) rounds to "0 %", not
    "-0 %" (an outside builder's plan showed "r_sl (rectifier charging) -0 %")."""
    plan = Path(__file__).parent / "plans" / "line-preamp-anodised-facia.gplan"
    _, out, _ = cli("check", str(plan), "--fail-on", "never")
    lines = [x for x in out.splitlines() if "main contributors" in x]
    assert lines and _hits("check text", "\n".join(lines)) == []

"""Names of companies and products stay out of the examples, the docs and the code (a short, general
list kept here); the planted mistakes of the examples are called planted, not seeded."""

import re

from helpers import ROOT

#: makers' and products' names that have crept into audio-grounding texts before (kept short and general)
BRAND_WORDS = ("RCA", "Neutrik", "Switchcraft", "Cliff", "Hammond", "Philips", "Fender", "Marshall", "Vox", "Mullard",
               "Telefunken", "Belden", "Mogami", "Canare", "Jensen", "Neumann", "Tektronix", "Bel Air")
WHERE = ("examples", "docs", "groundcheck", "README.md", "DEVELOPERS.md", "grammar", "benchmarks")


def _files():
    for name in WHERE:
        p = ROOT / name
        for f in ([p] if p.is_file() else sorted(p.rglob("*"))):
            if f.is_file() and f.suffix in (".py", ".md", ".gplan", ".lark", ".json", ".css", ".html", ""):
                yield f


def test_no_company_or_product_names():
    pattern = re.compile(r"\b(" + "|".join(re.escape(w) for w in BRAND_WORDS) + r")\b")
    hits = [f"{f.relative_to(ROOT)}:{n}: {m.group(0)}" for f in _files()
            for n, line in enumerate(f.read_text(encoding="utf-8", errors="replace").splitlines(), 1)
            for m in pattern.finditer(line)]
    assert hits == []


def test_examples_say_planted_mistakes():
    for f in (ROOT / "examples").rglob("*.gplan"):
        assert "seeded" not in f.read_text().lower(), f

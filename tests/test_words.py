"""Words of the examples: the planted mistakes of the examples are called planted, not seeded.

Keeping makers' and products' names out of the repository is checked outside it (a list of such
names kept here would put them into the repository itself)."""

from helpers import ROOT


def test_examples_say_planted_mistakes():
    plans = sorted((ROOT / "examples").rglob("*.gplan"))
    assert plans  # the test reads real files
    for f in plans:
        assert "seeded" not in f.read_text().lower(), f

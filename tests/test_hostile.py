"""Regression cases of hostile and extreme plans (tests/hostile/): each is refused with one located error
line and exit status 2 — no traceback, no hang, no unbounded memory — or, where noted, read correctly."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

HOSTILE = Path(__file__).parent / "hostile"
REFUSED = sorted(p for p in HOSTILE.glob("*.gplan") if p.name not in ("awg-0000.gplan", "sarif uri #1 100%.gplan")
                 and not p.name.startswith("terminal-escape-title"))


@pytest.mark.parametrize("path", REFUSED, ids=lambda p: p.stem)
def test_refused_with_a_located_error(path):
    # a fresh process with an address-space limit: an unbounded allocation would fail loudly here
    code = ("import resource, sys; resource.setrlimit(resource.RLIMIT_AS, (3 << 30, 3 << 30)); "
            "from groundcheck.cli import main; sys.exit(main(['check', sys.argv[1]]))")
    r = subprocess.run([sys.executable, "-c", code, str(path)], capture_output=True, text=True, timeout=60)
    assert r.returncode == 2, r.stderr[-800:]
    assert "Traceback" not in r.stderr and "internal error" not in r.stderr
    first = r.stderr.splitlines()[0]
    assert first.startswith(f"{path}:") and ": error: " in first


def test_awg_0000_is_four_aught():
    from groundcheck import load
    (w,) = load(HOSTILE / "awg-0000.gplan").conductors
    # ASTM B258: AWG 4/0 (written 0000) is 0.4600 in = 11.684 mm across
    assert w.diameter == pytest.approx(11.684e-3, rel=1e-4)


ESC = "\x1b"


def test_escape_sequences_never_reach_the_terminal(cli):
    for name in ("terminal-escape-title.gplan", "terminal-escape-error-line.gplan"):
        code, out, err = cli("check", str(HOSTILE / name))
        assert ESC not in out and ESC not in err and "\\x1b" in out + err


def test_sarif_uris_are_percent_encoded(cli):
    code, out, _ = cli("check", str(HOSTILE / "sarif uri #1 100%.gplan"), "--format", "sarif")
    uris = {loc["physicalLocation"]["artifactLocation"]["uri"] for r in json.loads(out)["runs"][0]["results"]
            for loc in r["locations"]}
    assert uris and all("#" not in u and " " not in u and "%25" in u for u in uris)


def test_output_never_over_a_file_the_plan_read(cli, tmp_path):
    for f in (HOSTILE / "include-overwrite").iterdir():
        (tmp_path / f.name).write_text(f.read_text())
    part = tmp_path / "part.gplan"
    before = part.read_text()
    code, _, err = cli("check", str(tmp_path / "main.gplan"), "-o", str(part))
    assert code == 2 and "a plan this run read" in err and part.read_text() == before
    code, _, err = cli("check", str(tmp_path / "main.gplan"), "-o", "/dev/null")
    assert code == 2 and "not a regular file" in err


def test_a_lone_carriage_return_never_misplaces_an_edit(tmp_path):
    from groundcheck import load
    from groundcheck.advice.repair import apply_edits, suggest
    from groundcheck.analysis import Options
    src = HOSTILE / "suggest-lone-cr" / "plan.gplan"
    f = tmp_path / "plan.gplan"
    f.write_bytes(src.read_bytes())
    text = f.read_bytes().decode("utf-8")
    assert "\r" in text
    _, evs = suggest(load(f), text, Options(), tmp_path, f.resolve(), budget=30)
    for e in evs:
        new = apply_edits(text, e.candidate.edits)
        changed = [a for a, b in zip(text.split("\n"), new.split("\n")) if a != b]
        # every line an edit changes belongs to the element the suggestion names
        names = [w for w in e.candidate.title.replace("(", " ").replace(")", " ").split() if "_" in w or "." in w]
        assert all(any(n.split(".")[-1] in line for n in names) for line in changed), e.candidate.title


def test_a_lone_carriage_return_in_the_command(cli, tmp_path):
    # the command reads the plan as the loader does (no newline translation), so the edit lands on the line
    # of the element the suggestion names
    f = tmp_path / "plan.gplan"
    f.write_bytes((HOSTILE / "suggest-lone-cr" / "plan.gplan").read_bytes())
    out = json.loads(cli("suggest", str(f), "--format", "json")[1])
    for s in out["suggestions"]:
        removed = [ln[1:] for ln in s["diff"].splitlines() if ln.startswith("-") and not ln.startswith("---")]
        words = s["title"].split()
        element = words[1] if words[0] in ("remove", "insulate") else s["title"].split("(")[1].split(")")[0]
        assert all(element.split(".")[-1] in ln for ln in removed), (s["title"], removed)

"""Regression cases of hostile and extreme plans (tests/hostile/): each is refused with one located
error line and exit status 2 — no traceback, no hang, no unbounded memory — or, where noted, read
correctly."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

HOSTILE = Path(__file__).parent / "hostile"
REFUSED = sorted(
    p
    for p in HOSTILE.glob("*.gplan")
    if p.name not in ("awg-0000.gplan", "sarif uri #1 100%.gplan")
    and not p.name.startswith("terminal-escape-title")
)


#: every refused plan checked by one fresh process with an address-space limit (an unbounded
#: allocation would fail loudly there): each plan's exit status and standard error
_REFUSING = """
import contextlib, io, json, resource, sys
resource.setrlimit(resource.RLIMIT_AS, (3 << 30, 3 << 30))
from groundcheck.cli import main
seen = {}
for path in sys.argv[1:]:
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        code = main(["check", path])
    seen[path] = [code, err.getvalue()]
sys.__stdout__.write(json.dumps(seen))
"""


@pytest.fixture(scope="module")
def refusals() -> dict:
    r = subprocess.run(
        [sys.executable, "-c", _REFUSING, *map(str, REFUSED)],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert r.returncode == 0, r.stderr[-800:]
    return json.loads(r.stdout)


@pytest.mark.parametrize("path", REFUSED, ids=lambda p: p.stem)
def test_refused_with_a_located_error(path, refusals):
    code, err = refusals[str(path)]
    assert code == 2, err[-800:]
    assert "Traceback" not in err and "internal error" not in err
    first = err.splitlines()[0]
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
    uris = {
        loc["physicalLocation"]["artifactLocation"]["uri"]
        for r in json.loads(out)["runs"][0]["results"]
        for loc in r["locations"]
    }
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
        names = [
            w
            for w in e.candidate.title.replace("(", " ").replace(")", " ").split()
            if "_" in w or "." in w
        ]
        if e.candidate.element == "mains":  # an edit of the mains statement (a fuse, an RCD)
            names = ["mains "]
        assert all(any(n.split(".")[-1] in line for n in names) for line in changed), (
            e.candidate.title
        )


def test_a_lone_carriage_return_in_the_command(cli, tmp_path):
    # the command reads the plan as the loader does (no newline translation), so the edit lands on
    # the line of the element the suggestion names
    f = tmp_path / "plan.gplan"
    f.write_bytes((HOSTILE / "suggest-lone-cr" / "plan.gplan").read_bytes())
    out = json.loads(cli("suggest", str(f), "--format", "json")[1])
    for s in out["suggestions"]:
        removed = [
            ln[1:]
            for ln in s["diff"].splitlines()
            if ln.startswith("-") and not ln.startswith("---")
        ]
        words = s["title"].split()
        element = (
            "mains "  # an edit of the mains statement (a fuse, an RCD)
            if s["element"] == "mains"
            else words[1]
            if words[0] in ("remove", "insulate")
            else s["title"].split("(")[1].split(")")[0]
        )
        assert all(element.split(".")[-1] in ln for ln in removed), (s["title"], removed)


def test_sigterm_during_a_write_leaves_no_temporary_file(tmp_path):
    import signal
    import subprocess
    import sys
    import time
    from helpers import EXAMPLES

    out = tmp_path / "report.json"
    # the rename that ends the write is held up, so SIGTERM lands while the temporary file exists
    code = (
        "import os, sys, time\nos.replace = lambda *a: time.sleep(60)\nfrom groundcheck.cli "
        f"import main\nsys.exit(main(['check', {str(EXAMPLES[0])!r}, '--format', 'json', '-o', "
        f"{str(out)!r}]))\n"
    )
    proc = subprocess.Popen([sys.executable, "-c", code], stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    while not list(tmp_path.glob(".groundcheck-*")) and time.monotonic() < deadline:
        time.sleep(0.05)
    assert list(tmp_path.glob(".groundcheck-*")), "the write never started"
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=30)
    assert proc.returncode == 128 + signal.SIGTERM and "Traceback" not in err
    assert list(tmp_path.iterdir()) == []


def test_main_leaves_no_signal_handler_behind(tmp_path, monkeypatch):
    """main() is callable from tests and other programs: SIGTERM is turned into an exit only
    while an output file is written; afterwards the process has the handler it had before."""
    import os
    import signal
    from groundcheck.cli import main
    from helpers import EXAMPLES

    seen = []
    real_replace = os.replace

    def spy(src, dst):
        # the output file's rename only (a plate's result kept in the cache folder is renamed
        # into place too, on a run that computes it)
        if os.path.basename(dst) == "report.json":
            seen.append(signal.getsignal(signal.SIGTERM))
        return real_replace(src, dst)

    monkeypatch.setattr(os, "replace", spy)
    previous = signal.signal(signal.SIGTERM, signal.SIG_DFL)  # as a fresh process has it
    try:
        out = tmp_path / "report.json"
        assert main(
            ["check", str(EXAMPLES[0]), "--format", "json", "-o", str(out), "--advice-budget", "0"]
        ) in (0, 1)
        assert out.exists() and len(seen) == 1
        # held while the file was written, and gone afterwards
        assert seen[0] not in (signal.SIG_DFL, signal.SIG_IGN, None)
        assert signal.getsignal(signal.SIGTERM) == signal.SIG_DFL
        main(
            ["check", str(EXAMPLES[0]), "--format", "json", "--advice-budget", "0"]
        )  # to standard output: nothing held
        assert signal.getsignal(signal.SIGTERM) == signal.SIG_DFL and len(seen) == 1
        # a caller's own handler is kept, during the write too
        own = lambda signum, frame: None  # noqa: E731
        signal.signal(signal.SIGTERM, own)
        main(
            ["check", str(EXAMPLES[0]), "--format", "json", "-o", str(out), "--advice-budget", "0"]
        )
        assert seen[1] is own and signal.getsignal(signal.SIGTERM) is own
    finally:
        signal.signal(signal.SIGTERM, previous)


def test_a_dying_worker_is_an_error_not_a_wait():
    import os
    from groundcheck.physics.sweep import WorkerError, map_frequencies

    def work(f):
        if f == 200.0:
            os._exit(9)  # a worker killed mid-way (out of memory, a signal)
        return f

    with pytest.raises(WorkerError, match="--jobs 1"):
        map_frequencies(work, [50.0, 100.0, 150.0, 200.0], jobs=2)
    assert map_frequencies(lambda f: 2 * f, [50.0, 100.0, 150.0], jobs=2) == [100.0, 200.0, 300.0]


def test_jobs_is_capped_at_the_processors_available():
    from groundcheck.cli.common import available_cpus, processes_type

    assert processes_type("500") == available_cpus() and processes_type("1") == 1


def test_absurd_rectifier_figures_give_a_located_error_not_absurd_volts():
    from groundcheck import PlanErrors, load_text
    from groundcheck.analysis import analyze
    from helpers import EXAMPLES

    head = next(p for p in EXAMPLES if p.name == "guitar-head.gplan").read_text()
    # a valve "rated" at a nanoampere: refused where it is written
    with pytest.raises(PlanErrors) as e:
        load_text(head.replace("valve 50 V at 250 mA", "valve 50 V at 0.000001 mA"), "h.gplan")
    assert e.value.errors[0].location.line == 35 and "0.1 to 10000 mA" in e.value.errors[0].message
    # a secondary of a nanovolt behind a 50 V valve: no steady state is claimed (it once gave 1.1
    # MV)
    with pytest.raises(PlanErrors) as e:
        analyze(load_text(head.replace("secondary 280 V", "secondary 0.000000001 V"), "h.gplan"))
    # (now refused as it is read: the peak cannot deliver the load through the valve's drop)
    assert e.value.errors[0].location.line == 35 and "cannot deliver" in e.value.errors[0].message

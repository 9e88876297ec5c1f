"""Regression cases of the second hostile round (tests/hostile/round2/, one folder per defect):
each is refused with a clear located error and exit status 2, or read correctly; nothing a run read
is ever written."""

import os
import subprocess
import sys
from pathlib import Path

import pytest

from helpers import WHOLE_CORPUS

ROUND2 = Path(__file__).parent / "hostile" / "round2"


def _copy(folder: str, dest: Path) -> None:
    for f in (ROUND2 / folder).iterdir():
        (dest / f.name).write_bytes(f.read_bytes())


def _run(*argv, cwd=None, stdin=None, timeout=60, limit_gb=1):
    """The command in a fresh process under an address-space limit: (status, stdout, stderr)."""
    code = (
        "import resource, sys; resource.setrlimit(resource.RLIMIT_AS, ({0} << 30, {0} << 30)); "
        "from groundcheck.cli import main; sys.exit(main(sys.argv[1:]))"
    ).format(limit_gb)
    env = {**os.environ, "PYTHONPATH": str(Path(__file__).parents[1])}
    r = subprocess.run(
        [sys.executable, "-c", code, *argv],
        capture_output=True,
        cwd=cwd,
        stdin=stdin,
        timeout=timeout,
        env=env,
    )
    return r.returncode, r.stdout.decode("utf-8", "replace"), r.stderr.decode("utf-8", "replace")


@pytest.mark.parametrize("how", ["path", "symlink", "hard link"])
def test_jobs_never_write_over_an_included_plan(tmp_path, monkeypatch, cli, how):
    # in the test's own process (the refusal comes before any analysis: no memory limit needed)
    _copy("01-jobs-overwrites-include", tmp_path)
    monkeypatch.chdir(tmp_path)
    part = tmp_path / "part.gplan"
    before = part.read_bytes()
    out = {"path": part, "symlink": tmp_path / "link.gplan", "hard link": tmp_path / "hard.gplan"}[
        how
    ]
    if how == "symlink":
        out.symlink_to(part)
    elif how == "hard link":
        os.link(part, out)
    for jobs in ("1", "2"):
        # (the output's guard is the test; the cli fixture leaves the advisor's fix lines out)
        code, _, err = cli("check", "main.gplan", "other.gplan", "--jobs", jobs, "-o", str(out))
        assert code == 2 and "a plan this run read" in err, err[-500:]
        assert part.read_bytes() == before


LIMITS_CASES = sorted((ROUND2 / "03-unclosed-block-bypasses-limit").glob("*.gplan"))


@pytest.mark.parametrize("path", LIMITS_CASES, ids=lambda p: p.stem)
def test_a_broken_block_is_still_bounded(path):
    # one deleted '}' or one duplicated 'place' line once ran to gigabytes of memory or of error
    # text; under a 1 GiB address-space cap it is now a short list of located errors
    code, out, err = _run("check", str(path), timeout=60)
    assert code == 2 and "Traceback" not in err and "internal error" not in err, err[-500:]
    assert len(err) < 20_000 and err.startswith(f"{path}:")
    # the placements' walk is over its limit (40,000 statements), said before anything is expanded
    assert "block placements walk" in err and "counted before expanding" in err


def test_error_output_is_capped(cli, tmp_path):
    f = tmp_path / "many.gplan"
    f.write_text(
        'plan "x"\nmetal m: steel 1 mm, 10 x 10 mm\n'
        + "".join(f"point p{i}: bogus\n" for i in range(120))
    )
    code, _, err = cli("check", str(f))
    assert code == 2
    assert err.count(": error: ") == 50 and "and 70 more errors" in err


def test_only_regular_files_are_plans(tmp_path):
    fifo = tmp_path / "fifo.gplan"
    os.mkfifo(fifo)
    for path in (fifo, Path("/dev/zero")):
        code, _, err = _run("check", str(path), timeout=30)
        assert code == 2 and "not a regular file" in err and "Traceback" not in err


def test_standard_input_is_bounded_and_utf8(tmp_path):
    with open("/dev/zero", "rb") as zero:
        code, _, err = _run("check", "-", stdin=zero, timeout=60)
    assert code == 2 and "over the limit of 16777216 bytes" in err
    with open(ROUND2 / "05-stdin" / "stdin-invalid-utf8.gplan", "rb") as f:
        code, out, err = _run("check", "-", stdin=f, timeout=60)
    assert (
        code == 2
        and err.startswith("<stdin>:1:8: error: the file is not UTF-8 text")
        and out == ""
    )


def test_a_folder_check_reads_no_link_and_no_special_file(tmp_path):
    from helpers import EXAMPLES

    head = next(p for p in EXAMPLES if p.name == "guitar-head.gplan").read_bytes()
    (tmp_path / "a.gplan").write_bytes(head)
    (tmp_path / "b.gplan").symlink_to("/etc/passwd")
    (tmp_path / "z.gplan").symlink_to("/dev/zero")
    os.mkfifo(tmp_path / "f.gplan")
    outside = tmp_path.parent / (tmp_path.name + "-outside")
    outside.mkdir()
    (outside / "secret.gplan").write_text("SECRET-LINE\n")
    (tmp_path / "linked").symlink_to(outside, target_is_directory=True)
    code, out, err = _run(
        "check", str(tmp_path), "--format", "json", "--advice-budget", "0", timeout=120, limit_gb=3
    )
    assert code in (0, 1) and "Traceback" not in err
    assert (
        "root:" not in out + err and "SECRET" not in out + err and "/etc/passwd" not in out + err
    )
    assert err.count("passed over") == 3


def test_library_and_include_stay_in_the_plan_folder(tmp_path):
    from groundcheck import PlanErrors, load_text

    for line, said in (
        ('library "/"', "outside the plan's folder"),
        ('library "../x"', "outside the plan's folder"),
        ('include "/etc/x.gplan"', "absolute path"),
        ('include "../x.gplan"', "outside"),
    ):
        with pytest.raises(PlanErrors) as e:
            load_text(
                f'plan "x"\n{line}\nmetal m: steel 1 mm, 10 x 10 mm\n', "p.gplan", root=tmp_path
            )
        assert said in e.value.errors[0].message and e.value.errors[0].location.line == 2
    # a library folder inside the plan's folder that is a link out of it is not searched
    (tmp_path / "proj").mkdir()
    (tmp_path / "elsewhere").mkdir()
    (tmp_path / "elsewhere" / "secret.gplan").write_text('plan "s"\nSECRET-LINE-42\n')
    (tmp_path / "proj" / "lib").symlink_to(tmp_path / "elsewhere", target_is_directory=True)
    with pytest.raises(PlanErrors) as e:
        load_text(
            'plan "d"\nsupply 230 V 50 Hz\nlibrary "lib"\npoint met: earthing-terminal\npoint o: '
            "outlet\n"
            'wire r: o to met, 5 m, 2.5 mm2, protective\ndevice d: "secret.gplan", plugged o\n',
            "p.gplan",
            root=tmp_path / "proj",
        )
    assert "SECRET" not in str(e.value) and "not found" in str(e.value)


def test_tt_loop_smaller_than_its_electrode_is_refused():
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / "02-tt-danger-passed" / "plan.gplan")
    err = e.value.errors[0]
    assert err.location.line == 2 and "larger than the whole external loop" in err.message


def test_the_implausible_ratings_base_plan_is_refused_on_purpose():
    # the reproducer's base plan states a 100 Ω electrode inside a 21 Ω external loop: figures that
    # cannot both hold (in TT the loop runs through the electrode), so it is a located error at the
    # electrode, not the GC208 danger its cmd.sh once expected; electrode-alone.gplan (below) is
    # that plan made consistent
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / "13-implausible-ratings" / "base.gplan")
    err, *follow = e.value.errors
    assert (err.location.line, err.location.column) == (2, 72)
    assert "earth electrode (100 Ω) is larger than the whole external loop (21 Ω)" in err.message
    # the refused mains statement's mains.pe is not said to be undefined as well (an outside
    # reviewer: the follow-on error told him to add a statement he had written)
    assert follow == []


def test_tt_electrode_alone_keeps_the_danger():
    from groundcheck import load
    from groundcheck.analysis import analyze

    r = analyze(load(ROUND2 / "13-implausible-ratings" / "electrode-alone.gplan"))
    (p,) = r.safety.parts
    # Ohm's law by hand: the 100 Ω electrode alone bounds the fault current at 120 V / 100 Ω = 1.2
    # A, far under what trips a 16 A type B breaker (3 × 16 = 48 A, IEC 60898-1); the touch voltage
    # stays under the 120 V supply
    assert 120 / 105 < p.fault_current <= 120 / 100 and p.touch_voltage <= 120
    assert p.clear_time is None
    assert any(f.code == "GC208" and f.severity == "danger" for f in r.findings)


@pytest.mark.parametrize(
    "name, column, said",
    [
        ("breaker-1nA.gplan", 28, "500 mA to 125 A"),
        ("fuse-1pA.gplan", 25, "1 mA to 125 A"),
        ("tt-ze-0.gplan", 106, "more than zero"),
    ],
)
def test_implausible_ratings_are_located_errors(name, column, said):
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / "13-implausible-ratings" / name)
    err = e.value.errors[0]
    assert (err.location.line, err.location.column) == (2, column) and said in err.message


@pytest.mark.parametrize(
    "phrase, said",
    [
        ("breaker 200 A", "500 mA to 125 A"),
        ("rcd 1 mA", "4 mA to 3 A"),
        ("rcd 30 A", "4 mA to 3 A"),
        ("loop-impedance 1 mohm", "10 mΩ to 100 kΩ"),
        ("loop-impedance 1 Mohm", "10 mΩ to 100 kΩ"),
        ("fuse 500 A", "1 mA to 125 A"),
    ],
)
def test_rating_ranges(phrase, said):
    from groundcheck import PlanErrors, load_text

    with pytest.raises(PlanErrors) as e:
        load_text(
            f'plan "x"\nmains 230 V 50 Hz, {phrase}\nmetal m: steel 1 mm, 10 x 10 mm\n', "p.gplan"
        )
    err = e.value.errors[0]
    assert err.location.line == 2 and said in err.message and "plausible" in err.message
    # the edges themselves are accepted
    for ok in (
        "breaker 0.5 A",
        "breaker 125 A",
        "rcd 4 mA",
        "rcd 3 A",
        "loop-impedance 10 mohm",
        "fuse 1 mA",
    ):
        load_text(
            f'plan "x"\nmains 230 V 50 Hz, {ok}\nmetal m: steel 1 mm, 10 x 10 mm\n', "p.gplan"
        )


RAW = ("\x9b", "\x9d", "\x85", "\u202e", "\u202c", "\u200b", "\x1b")


def test_controls_never_reach_the_terminal_nor_a_page(cli, tmp_path):
    title = ROUND2 / "10-terminal-controls" / "title.gplan"
    code, out, err = cli("check", str(title))
    assert not any(c in out + err for c in RAW) and "\\x9b" in out
    code, out, err = cli("check", str(ROUND2 / "10-terminal-controls" / "errline.gplan"))
    assert code == 2 and not any(c in err for c in RAW) and "\\u202e" in err
    cli("compare", str(title), str(title), "--format", "html", "-o", str(tmp_path / "r.html"))
    page = (tmp_path / "r.html").read_text()
    assert not any(c in page for c in RAW) and "\\x9b" in page


def test_a_file_name_with_escape_sequences_is_shown_escaped(tmp_path):
    import shutil

    if shutil.which("script") is None:
        pytest.skip("needs script(1) for a terminal")
    name = tmp_path / "f\x1b[2J\x1b]0;PWNED.gplan"
    name.write_bytes((ROUND2 / "10-terminal-controls" / "title.gplan").read_bytes())
    env = {**os.environ, "PYTHONPATH": str(Path(__file__).parents[1])}
    cmd = f"{sys.executable} -m groundcheck check {tmp_path}/f*PWNED.gplan"
    r = subprocess.run(
        ["script", "-qc", cmd, "/dev/null"], capture_output=True, env=env, timeout=120
    )
    assert b"analysing" in r.stdout and b"\x1b[2J" not in r.stdout and b"\x1b]0;" not in r.stdout


@pytest.mark.parametrize(
    "path, line, column, char",
    [
        ("11-homoglyph-names/homoglyph.gplan", 48, 9, "U+0430"),
        ("15-unicode-digits/fuse-fullwidth-5.gplan", 2, 25, "U+FF15"),
        ("15-unicode-digits/secondary-arabic-indic-12.gplan", 28, 51, "U+0661"),
    ],
)
def test_look_alike_letters_and_foreign_digits_are_errors(path, line, column, char):
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / path)
    err = e.value.errors[0]
    assert (err.location.line, err.location.column) == (line, column) and char in err.message


def test_unit_signs_stay_readable():
    from groundcheck import load_text

    p = load_text(
        'plan "x"\nmetal m: steel 1 mm, 10 x 10 mm\npoint a: stud, at 1,1 on m\n'
        "wire w: a to m, 10 mm, resistance 5 mΩ\nambient 25 °C\n",
        "p.gplan",
    )
    assert p.conductors[0].resistance == pytest.approx(5e-3)


@pytest.mark.parametrize("mask, mode", [(0o077, 0o600), (0o022, 0o644), (0o002, 0o664)])
def test_outputs_respect_the_umask(cli, tmp_path, mask, mode):
    from helpers import EXAMPLES

    old = os.umask(mask)
    try:
        cli("check", str(EXAMPLES[0]), "--format", "json", "-o", str(tmp_path / "out.json"))
    finally:
        os.umask(old)
    assert (
        tmp_path / "out.json"
    ).stat().st_mode & 0o777 == mode  # 0666 less the mask, as open(2) does


@pytest.mark.parametrize(
    "name, peak, needed",
    [
        # by hand: Child's law through the stated point (50 V at 250 mA) gives 50·(30/250)^(2/3) =
        # 12.16 V at the 30 mA load, and the 2.2 kΩ filter resistor 66 V: 78.16 V, over the
        # secondary's √2·4 = 5.657 V peak
        ("secondary-4V.gplan", "5.657 V peak", "78.16 V"),
        ("secondary-1e-7V.gplan", "1.414e-07 V peak", "78.16 V"),
    ],
)
def test_a_valve_rectifier_below_its_drop_is_refused_as_read(name, peak, needed):
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / "14-valve-rectifier-slow" / name)
    err = e.value.errors[0]
    assert err.location.line == 28 and peak in err.message and needed in err.message


def test_the_filter_resistor_counts_in_what_a_rectifier_can_deliver():
    from groundcheck import PlanErrors, load

    with pytest.raises(PlanErrors) as e:
        load(ROUND2 / "14-valve-rectifier-slow" / "filter-4.3Gohm.gplan")
    assert "cannot deliver 0.03 A" in e.value.errors[0].message


#: Ctrl-C with GROUNDCHECK_WHOLE_CORPUS=1 (benchmarks/README.md): the two share the guard
SIGNALS = ["SIGTERM to the run", "Ctrl-C to its process group"][: 2 if WHOLE_CORPUS else 1]


@pytest.mark.parametrize("how", SIGNALS)
def test_a_signal_stops_a_jobs_run_and_its_workers(tmp_path, how):
    # SIGTERM (kill) reaches the run's own process; Ctrl-C on a terminal reaches every process of
    # the foreground group, the workers included.  Both once waited for every queued task (203 s)
    import signal
    import time

    plan = ROUND2 / "09-sigterm-jobs" / "jobsplan.gplan"
    env = {**os.environ, "PYTHONPATH": str(Path(__file__).parents[1])}
    out = tmp_path / "out.json"
    proc = subprocess.Popen(
        [
            sys.executable,
            "-m",
            "groundcheck",
            "check",
            str(plan),
            "--jobs",
            "2",
            "--format",
            "json",
            "-o",
            str(out),
        ],
        env=env,
        stderr=subprocess.PIPE,
        start_new_session=True,
    )

    def children():
        try:
            return [
                int(p)
                for p in Path(f"/proc/{proc.pid}/task/{proc.pid}/children").read_text().split()
            ]
        except OSError:
            return []

    deadline = time.monotonic() + 120
    while len(children()) < 2 and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.1)
    time.sleep(0.5)  # the workers busy and tasks queued behind them
    workers = children()
    if proc.poll() is not None or len(workers) < 2:
        pytest.skip("the run ended before its workers started")
    sent = time.monotonic()
    if how.startswith("SIGTERM"):
        proc.send_signal(signal.SIGTERM)
    else:
        os.killpg(proc.pid, signal.SIGINT)
    try:
        proc.wait(timeout=45)  # a bound against the old 203 s, not a timing (about 0.1 s here)
    finally:
        if proc.poll() is None:
            os.killpg(proc.pid, signal.SIGKILL)
    print(f"{how}: the run ended {time.monotonic() - sent:.2f} s after the signal")
    assert proc.returncode in (130, -signal.SIGTERM, 143), proc.returncode

    def running(w):
        try:
            return Path(f"/proc/{w}/stat").read_text().rsplit(")", 1)[1].split()[0] != "Z"
        except (OSError, IndexError):
            return False

    deadline = time.monotonic() + 5
    while any(map(running, workers)) and time.monotonic() < deadline:
        time.sleep(0.1)
    alive = [w for w in workers if running(w)]
    for w in alive:  # never left behind by the test itself
        os.kill(w, signal.SIGKILL)
    assert not alive and not out.exists() and not list(tmp_path.glob(".groundcheck-*"))

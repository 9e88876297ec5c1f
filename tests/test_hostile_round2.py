"""Regression cases of the second hostile round (tests/hostile/round2/, one folder per defect): each is refused
with a clear located error and exit status 2, or read correctly; nothing a run read is ever written."""

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROUND2 = Path(__file__).parent / "hostile" / "round2"


def _copy(folder: str, dest: Path) -> None:
    for f in (ROUND2 / folder).iterdir():
        (dest / f.name).write_bytes(f.read_bytes())


def _run(*argv, cwd=None, stdin=None, timeout=60, limit_gb=1):
    """The command in a fresh process under an address-space limit: (status, stdout, stderr)."""
    code = ("import resource, sys; resource.setrlimit(resource.RLIMIT_AS, ({0} << 30, {0} << 30)); "
            "from groundcheck.cli import main; sys.exit(main(sys.argv[1:]))").format(limit_gb)
    env = {**os.environ, "PYTHONPATH": str(Path(__file__).parents[1])}
    r = subprocess.run([sys.executable, "-c", code, *argv], capture_output=True, cwd=cwd, stdin=stdin,
                       timeout=timeout, env=env)
    return r.returncode, r.stdout.decode("utf-8", "replace"), r.stderr.decode("utf-8", "replace")


@pytest.mark.parametrize("how", ["path", "symlink", "hard link"])
def test_jobs_never_write_over_an_included_plan(tmp_path, how):
    _copy("01-jobs-overwrites-include", tmp_path)
    part = tmp_path / "part.gplan"
    before = part.read_bytes()
    out = {"path": part, "symlink": tmp_path / "link.gplan", "hard link": tmp_path / "hard.gplan"}[how]
    if how == "symlink":
        out.symlink_to(part)
    elif how == "hard link":
        os.link(part, out)
    for jobs in ("1", "2"):
        code, _, err = _run("check", "main.gplan", "other.gplan", "--jobs", jobs, "-o", str(out), cwd=tmp_path,
                            limit_gb=3)
        assert code == 2 and "a plan this run read" in err, err[-500:]
        assert part.read_bytes() == before


LIMITS_CASES = sorted((ROUND2 / "03-unclosed-block-bypasses-limit").glob("*.gplan"))


@pytest.mark.parametrize("path", LIMITS_CASES, ids=lambda p: p.stem)
def test_a_broken_block_is_still_bounded(path):
    # one deleted '}' or one duplicated 'place' line once ran to gigabytes of memory or of error text; under a
    # 1 GiB address-space cap it is now a short list of located errors
    code, out, err = _run("check", str(path), timeout=60)
    assert code == 2 and "Traceback" not in err and "internal error" not in err, err[-500:]
    assert len(err) < 20_000 and err.startswith(f"{path}:")
    assert "more)" in err or "rectifiers" in err      # a placement list is cut short, never 10,000 long


def test_error_output_is_capped(cli, tmp_path):
    f = tmp_path / "many.gplan"
    f.write_text('plan "x"\nmetal m: steel 1 mm, 10 x 10 mm\n' + "".join(f"point p{i}: bogus\n" for i in range(120)))
    code, _, err = cli("check", str(f))
    assert code == 2
    assert err.count(": error: ") == 50 and "and 70 more errors" in err

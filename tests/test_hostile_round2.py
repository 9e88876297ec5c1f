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

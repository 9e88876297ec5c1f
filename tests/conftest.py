"""Fixtures shared by the tests."""

import pytest

from groundcheck.cli import main


@pytest.fixture
def cli(capsys):
    """Run the command; returns (exit status, stdout, stderr)."""

    def run(*argv):
        code = main(list(argv))
        out = capsys.readouterr()
        return code, out.out, out.err

    return run

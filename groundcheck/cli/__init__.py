"""The ``groundcheck`` command: a thin layer over the library.

Each command is one function in its own module, decorated with its options and formats
(``cli/registry.py``); importing the modules below registers them, in the order
``groundcheck --help`` lists them.  :func:`main` parses a command line, runs its command and turns
every error into a one-line message and an exit status; it leaves the process as it found it (no
signal handler stays installed), so tests and other programs may call it.

Exit status: 0 clean, 1 findings at or above ``--fail-on``, 2 the plan or the command could not
be used.
"""

from __future__ import annotations

import os
import sys

from ..core.errors import GroundcheckError, PlanErrors, shown
from . import checking, explain, drawing, advice, export, live, bench, completion  # noqa: F401
from .checking import errors_output
from .registry import COMMANDS, build_parser

__all__ = ["main", "build_parser", "COMMANDS"]


def main(argv: list[str] | None = None) -> int:
    """Run the command line ``argv`` (default: the process's arguments); the exit status.

    SIGTERM is turned into an exit only while an output file is written
    (``renderers.output.write_atomic``), and the live view's own handler only while it serves, so
    the caller's handlers are as they were afterwards."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as e:  # --help, --version and usage errors end here
        return e.code if isinstance(e.code, int) else 2
    if not args.command:
        parser.print_help()
        return 2
    try:
        return COMMANDS[args.command].run(args)
    except PlanErrors as e:
        sys.stderr.write(e.render() + "\n")
        errors_output(e, args)
        return 2
    except GroundcheckError as e:
        sys.stderr.write(f"groundcheck: error: {shown(e)}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("groundcheck: interrupted\n")
        return 130
    except BrokenPipeError:
        try:
            sys.stdout = open(os.devnull, "w")  # noqa: SIM115 - the rest of the run writes nowhere
        except OSError:
            pass
        return 0
    except OSError as e:  # a full disk, an unwritable folder, a file that vanished
        where = f" ({e.filename})" if e.filename else ""
        sys.stderr.write(shown(f"groundcheck: error: {e.strerror or e}{where}") + "\n")
        return 2
    except Exception as e:  # the last line of defence: never a traceback, never exit 1
        if os.environ.get("GROUNDCHECK_DEBUG") or getattr(args, "debug", False):
            raise
        return _internal_error(e)


def _internal_error(e: Exception) -> int:
    sys.stderr.write(
        f"groundcheck: internal error: {type(e).__name__}: {shown(e)} — please report it with "
        "the plan; run with GROUNDCHECK_DEBUG=1 for the traceback\n"
    )
    return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

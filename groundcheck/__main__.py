"""``python -m groundcheck`` and the ``groundcheck`` command: Ctrl-C and SIGTERM end it at once
with status 130 or 143, from its first step on, with no traceback and no half-written output
(:func:`groundcheck.core.runtime.stop_at_once`)."""

import sys

from .core.runtime import stop_at_once


def run() -> int:
    """Import the command line and run it; the exit status."""
    stop_at_once()
    try:
        from .cli import main

        return main()
    except KeyboardInterrupt:  # main() answers one of its own; this is one before it or around it
        return 130


if __name__ == "__main__":
    sys.exit(run())

"""``python -m groundcheck`` and the ``groundcheck`` command: a Ctrl-C while the command line is
still being imported or its arguments read ends it quietly with status 130, as one later does."""

import sys


def run() -> int:
    """Import the command line and run it; the exit status."""
    try:
        from .cli import main

        return main()
    except KeyboardInterrupt:  # main() answers one of its own; this is one before it or around it
        return 130


if __name__ == "__main__":
    sys.exit(run())

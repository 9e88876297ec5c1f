"""``python -m groundcheck`` and the ``groundcheck`` command: a Ctrl-C while the command line is
still being imported ends it quietly with status 130, as one later does."""

import sys


def run() -> int:
    """Import the command line and run it; the exit status."""
    try:
        from .cli import main
    except KeyboardInterrupt:
        return 130
    return main()


if __name__ == "__main__":
    sys.exit(run())

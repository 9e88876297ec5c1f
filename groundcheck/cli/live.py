"""``groundcheck watch``: its options, here so that the other commands never import the live view's
server (``cli/watch.py``, with ``http.server`` and what it pulls in)."""

from __future__ import annotations

from .common import add_analysis_options
from .drawing import RENDERER
from .registry import command, opt

__all__ = ["cmd_watch", "DEFAULT_PORT"]

#: the port the live view is served on unless --port says otherwise
DEFAULT_PORT = 8470


@command(
    "watch",
    help="show the plan live in the browser, re-checked whenever it is saved",
    description="Serve a page on this computer (127.0.0.1 only) with the "
    "drawings, findings, hum and protective-earth tables; it refreshes by itself within a "
    "fraction of a second of the plan, or a file it includes or places, being saved.  Ctrl-C "
    "stops.\n\nExample:\n  groundcheck watch examples/guitar-head.gplan --open",
    options=(
        opt("plan", metavar="PLAN"),
        opt(
            "--port",
            type=int,
            default=DEFAULT_PORT,
            metavar="N",
            help=f"the local port to serve on (default {DEFAULT_PORT}; 0 picks a free one)",
        ),
        opt("--open", action="store_true", help="open the page in the default web browser"),
        RENDERER,
        add_analysis_options,
    ),
)
def cmd_watch(args) -> int:
    from .watch import serve  # the live view's server (http.server, ssl): watch only

    return serve(args)

"""The commands that draw: ``draw`` (the physical or topology view as SVG, PNG or DOT) and
``report`` (one self-contained HTML file with both drawings)."""

from __future__ import annotations

import sys
from pathlib import Path

from ..core.errors import shown
from ..renderers.formats import DRAWING_FORMATS
from ..renderers.output import write_atomic
from .checking import ADVICE_BUDGET, advised, analyze_with_progress
from .common import (
    FAIL_HELP,
    FAIL_LEVELS,
    UsageError,
    add_analysis_options,
    fail_on,
    load_plan,
    options_of,
)
from .exit_status import say_passed_dangers
from .registry import FormatOption, command, opt

__all__ = ["cmd_draw", "cmd_report", "written_epilog", "RENDERER"]


def written_epilog(what: str) -> str:
    """The exit statuses of a command that writes ``what`` and judges nothing (draw, export)."""
    return (
        f"Exit status: 0 {what} was written, 2 the plan or the command could not be used (nothing "
        "written)."
    )


#: the report's exit statuses: it judges the plan as check does
REPORT_EPILOG = (
    "Exit status: 0 the report was written and no finding reaches --fail-on, 1 the report was "
    "written and a finding reaches --fail-on, 2 the plan or the command could not be used (no "
    "report written)."
)

#: which Graphviz draws (draw, report, watch)
RENDERER = opt(
    "--renderer",
    choices=("auto", "system", "wasm"),
    default="auto",
    help="system Graphviz, the bundled WebAssembly Graphviz, or auto (system first)",
)


@command(
    "draw",
    help="draw the plan with every problem marked",
    description="Draw the physical view (metal parts, points at their positions, conductors "
    "by role, loops and problems marked) or the topology view.\n\nExample:\n  groundcheck "
    "draw examples/headphone-amp-100v.gplan -o ground.svg",
    epilog=written_epilog("the drawing"),
    formats=DRAWING_FORMATS,
    options=(
        opt("plan", metavar="PLAN"),
        opt(
            "-o",
            "--output",
            metavar="FILE",
            required=True,
            help="FILE.svg, FILE.png or FILE.dot; '-' writes to standard output (SVG, or --as dot "
            "or png)",
        ),
        FormatOption(
            ("--as",),
            dict(
                dest="as_format",
                default=None,
                help="the drawing format, when the output's name does not tell it (default svg "
                "for '-')",
            ),
        ),
        opt(
            "--view",
            choices=("physical", "topology"),
            default="physical",
            help="physical (needs positions; default) or topology (laid out automatically)",
        ),
        RENDERER,
    ),
)
def cmd_draw(args) -> int:
    from ..analysis import Options, analyze
    from ..renderers.dot import has_physical_view, physical_dot, physical_omissions, topology_dot

    to_stdout = args.output == "-"
    out = Path(args.output)
    fmt = args.as_format or ("svg" if to_stdout else out.suffix.lower().lstrip("."))
    fmt = _drawing_format(fmt, args.output)
    plan = load_plan(args.plan)
    result = analyze(plan, Options(hum=False))
    view = args.view if (args.view == "topology" or has_physical_view(plan)) else "topology"
    source = physical_dot(result) if view == "physical" else topology_dot(result)
    engine = "neato" if view == "physical" else "dot"
    data, how = DRAWING_FORMATS[fmt].render(source, engine, args.renderer)
    if to_stdout:
        stream = sys.stdout.buffer
        stream.write(data if isinstance(data, bytes) else data.encode("utf-8"))
        stream.flush()
    else:
        write_atomic(out, data, protect=[Path(args.plan)])
    note = "" if view == args.view else " (the plan has no positions: topology view)"
    where = "standard output" if to_stdout else shown(out)
    sys.stderr.write(f"groundcheck: wrote the {view} view to {where} {how}{note}\n")
    if any(missing := physical_omissions(result) if view == "physical" else (0, 0)):
        sys.stderr.write(
            f"groundcheck: note: the physical view leaves out {missing[0]} points and "
            f"{missing[1]} conductors that have no positions; --view topology shows every one\n"
        )
    if view == "physical" and plan.devices:  # an installation: its devices as boxes
        sys.stderr.write(
            "groundcheck: note: devices are drawn as boxes; a device's own wiring is in the "
            "drawing of its own plan, and --view topology shows every element\n"
        )
    return 0


def _drawing_format(fmt: str, output: str) -> str:
    """The drawing format of the output's suffix (``gv`` is DOT too), or a usage error."""
    fmt = "dot" if fmt == "gv" else fmt
    if fmt not in DRAWING_FORMATS:
        raise UsageError(
            f"cannot tell the drawing format from {output!r} (end it in .svg, .png or .dot, "
            "or give --as svg|png|dot)"
        )
    return fmt


@command(
    "report",
    help="write a self-contained HTML report",
    description="One HTML file with the summary, findings, drawings, hum spectrum and "
    "protective-earth, rectifier and loop-pickup tables; no network fetches.\n\nExample:\n  "
    "groundcheck report examples/dual-mono-phono-stage.gplan -o report.html",
    epilog=REPORT_EPILOG,
    options=(
        opt("plan", metavar="PLAN"),
        opt(
            "-o",
            "--output",
            metavar="FILE",
            required=True,
            help="the HTML file to write (FILE.html)",
        ),
        RENDERER,
        opt("--fail-on", choices=FAIL_LEVELS, default=None, help=FAIL_HELP),
        ADVICE_BUDGET,
        add_analysis_options,
    ),
)
def cmd_report(args) -> int:
    from ..analysis import analyze
    from ..renderers.formats import html_document

    plan = load_plan(args.plan)
    result = advised(
        analyze_with_progress(analyze, plan, options_of(args), args.plan),
        args.plan,
        args.advice_budget,
    )
    html, warning = html_document(result, args.renderer)
    if warning:
        sys.stderr.write(f"groundcheck: warning: {warning}\n")
    write_atomic(Path(args.output), html, protect=[Path(args.plan)])
    sys.stderr.write(f"groundcheck: wrote {args.output}\n")
    say_passed_dangers(args, [result])
    return 1 if result.fails(fail_on(args)) else 0

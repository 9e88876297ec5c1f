"""The ``groundcheck`` command: a thin layer over the library.

Exit status: 0 clean, 1 findings at or above ``--fail-on``, 2 the plan or the
command could not be used.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from ..core.version import __version__
from ..core.caution import CAUTION, MAINS_WORK
from ..core.errors import GroundcheckError, PlanErrors, shown
from ..rules.catalogue import RULES, protective_earth_rule
from ..rules.selection import UnknownRule, rule_codes
from ..renderers.formats import CHECK_FORMATS
from ..renderers.output import write_atomic
from .advice import SUGGEST_EPILOG, add_fix_option, advised, cmd_compare, cmd_suggest
from .checking import analyze_with_progress, check_each, with_errors
from .bench import add_bench_command, cmd_bench
from .common import (
    FAIL_HELP,
    FAIL_LEVELS,
    fail_on,
    Parser,
    UsageError,
    add_analysis_options,
    add_watch_command,
    load_plan,
    options_of,
    plan_paths,
    processes_type,
    quantity_type,
    seconds_type,
    write_output,
)

__all__ = ["main"]

EPILOG = (
    "Exit status: 0 clean, 1 findings at or above --fail-on, 2 the plan or the command could not "
    "be used."
)
#: commands that write a file and judge nothing (draw, export)
WRITE_EPILOG = "Exit status: 0 the file was written, 2 the plan or the command could not be used."
COMPARE_EPILOG = (
    "Exit status: 0 nothing --fail-on asks about, 1 the after-plan introduces a finding "
    "(--fail-on introduced) or one at least as severe as the worst before (--fail-on worse), 2 a "
    "plan or the command could not be used."
)


def build_parser() -> argparse.ArgumentParser:
    p = Parser(
        prog="groundcheck",
        description="Audit the ground (earthing) wiring plan of mains-powered audio "
        "equipment before anyone solders.",
        epilog=EPILOG,
    )
    p.add_argument("--version", action="version", version=f"groundcheck {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)
    _check_command(sub)
    _explain_command(sub)
    _draw_command(sub)
    _report_command(sub)
    _suggest_command(sub)
    _compare_command(sub)
    _export_command(sub)
    add_watch_command(sub)
    add_bench_command(sub)
    sub.add_parser(
        "completion",
        help="print a shell completion script",
        description='Example:\n  eval "$(groundcheck completion bash)"   (zsh: run '
        "'autoload -U bashcompinit && bashcompinit' first)",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    ).add_argument(
        "shell", choices=("bash", "zsh"), help="bash, or zsh (through its bash compatibility)"
    )
    return p


def _check_command(sub) -> None:
    c = sub.add_parser(
        "check",
        help="audit plans and print the findings",
        description="Audit plans: loops, shared returns, stars, chassis bonds, protective earth, "
        "hum and buzz.\n\nExample:\n  groundcheck check examples/headphone-amp-100v.gplan "
        "--format json",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=EPILOG,
    )
    c.add_argument(
        "plans",
        nargs="+",
        metavar="PLAN",
        help="plan files or folders (every .gplan below a folder is "
        "checked); '-' reads standard input",
    )
    c.add_argument(
        "--format", choices=CHECK_FORMATS, default="text", help="output format (default text)"
    )
    c.add_argument("--fail-on", choices=FAIL_LEVELS, default=None, help=FAIL_HELP)
    c.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write the report to FILE instead of standard output",
    )
    c.add_argument(
        "--jobs",
        type=processes_type,
        default=1,
        metavar="N",
        help="use N processes: several plans are checked side by side; for one plan, a large flat "
        "file is read by two and the solves (the hum budget's frequencies, the shared returns, "
        "the outlet voltages) are shared among N (Linux; default 1; at most the processors "
        "available)",
    )
    add_fix_option(c)
    add_analysis_options(c)


def _explain_command(sub) -> None:
    e = sub.add_parser(
        "explain",
        help="say what a rule checks, why, and how to fix it",
        description="Example:\n  groundcheck explain GC102",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    e.add_argument(
        "code", metavar="RULE", nargs="?", help="rule code or name (none: list every rule)"
    )


def _draw_command(sub) -> None:
    d = sub.add_parser(
        "draw",
        help="draw the plan with every problem marked",
        description="Draw the physical view (metal parts, points at their positions, conductors "
        "by role, loops and problems marked) or the topology view.\n\nExample:\n  groundcheck "
        "draw examples/headphone-amp-100v.gplan -o ground.svg",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=WRITE_EPILOG,
    )
    d.add_argument("plan", metavar="PLAN")
    d.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        required=True,
        help="FILE.svg, FILE.png or FILE.dot; '-' writes to standard output (SVG, or --as dot or "
        "png)",
    )
    d.add_argument(
        "--as",
        dest="as_format",
        choices=("svg", "png", "dot"),
        default=None,
        help="the drawing format, when the output's name does not tell it (default svg for '-')",
    )
    d.add_argument(
        "--view",
        choices=("physical", "topology"),
        default="physical",
        help="physical (needs positions; default) or topology (laid out automatically)",
    )
    d.add_argument(
        "--renderer",
        choices=("auto", "system", "wasm"),
        default="auto",
        help="system Graphviz, the bundled WebAssembly Graphviz, or auto (system first)",
    )


def _report_command(sub) -> None:
    h = sub.add_parser(
        "report",
        help="write a self-contained HTML report",
        description="One HTML file with the summary, findings, drawings, hum spectrum and "
        "protective-earth table; no network fetches.\n\nExample:\n  groundcheck report "
        "examples/dual-mono-phono-stage.gplan -o report.html",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=EPILOG,
    )
    h.add_argument("plan", metavar="PLAN")
    h.add_argument(
        "-o", "--output", metavar="FILE", required=True, help="the HTML file to write (FILE.html)"
    )
    h.add_argument(
        "--renderer",
        choices=("auto", "system", "wasm"),
        default="auto",
        help="system Graphviz, the bundled WebAssembly Graphviz, or auto (system first)",
    )
    h.add_argument("--fail-on", choices=FAIL_LEVELS, default=None, help=FAIL_HELP)
    add_fix_option(h)
    add_analysis_options(h)


def _suggest_command(sub) -> None:
    s = sub.add_parser(
        "suggest",
        help="propose changes that fix the findings, ranked by their predicted gain",
        description="Try candidate changes on the plan (lift a shield end, remove a redundant "
        "bond, re-route a return, join a rectifier's ends, give the protective earth its own stud "
        "...), re-run the analysis for each and rank them. Changes that would weaken the "
        "protective earth are never proposed.\n\nExample:\n  groundcheck suggest "
        "examples/dual-mono-phono-stage.gplan --apply fixed.gplan",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=SUGGEST_EPILOG,
    )
    s.add_argument("plan", metavar="PLAN")
    s.add_argument(
        "--apply",
        metavar="NEW_PLAN",
        help="write the plan with the changes applied to this new file",
    )
    s.add_argument(
        "--pick",
        type=int,
        metavar="N",
        help="with --apply: apply suggestion N instead of the combined set",
    )
    s.add_argument(
        "--force",
        action="store_true",
        help="with --apply: replace NEW_PLAN if it exists (never the plan itself)",
    )
    s.add_argument(
        "--budget",
        type=seconds_type,
        default=25.0,
        metavar="SECONDS",
        help="time for trying candidates and combining them (default 25 s); what is not tried is "
        "listed",
    )
    s.add_argument(
        "--format", choices=("text", "json"), default="text", help="output format (default text)"
    )
    add_analysis_options(s)


def _compare_command(sub) -> None:
    cp = sub.add_parser(
        "compare",
        help="compare two plans: findings, loops, hum per harmonic, protective earth",
        description="Example:\n  groundcheck compare before.gplan after.gplan --format html -o "
        "changes.html",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=COMPARE_EPILOG,
    )
    cp.add_argument("before", metavar="BEFORE")
    cp.add_argument("after", metavar="AFTER")
    cp.add_argument(
        "--format",
        choices=("text", "json", "html"),
        default="text",
        help="output format (default text)",
    )
    cp.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write the comparison to FILE instead of standard output",
    )
    cp.add_argument(
        "--fail-on",
        choices=("never", "introduced", "worse"),
        default="never",
        help="exit 1 when the after-plan introduces a finding (introduced) or a finding at least "
        "as severe as the worst before (worse); default never",
    )
    add_analysis_options(cp)


def _export_command(sub) -> None:
    x = sub.add_parser(
        "export",
        help="write the ground network in another format",
        description="Example:\n  groundcheck export examples/dual-mono-phono-stage.gplan --format "
        "spice -o ground.cir",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=WRITE_EPILOG,
    )
    x.add_argument("plan", metavar="PLAN")
    x.add_argument(
        "--format",
        choices=("spice",),
        default="spice",
        help="spice: a plain SPICE netlist, elements named after the plan's conductors (R, L, C "
        "and the plan's current sources; the default)",
    )
    x.add_argument("--spice", action="store_true", help="the same as --format spice")
    x.add_argument(
        "--frequency",
        type=quantity_type("frequency", "Hz"),
        metavar="HZ",
        help="AC analysis at this frequency (default: DC operating point)",
    )
    x.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write the netlist to FILE instead of standard output",
    )


def cmd_check(args) -> int:
    args.plans = plan_paths(args.plans)
    results, failed = check_each(args)
    for _path, e in failed:
        sys.stderr.write(e.render() + "\n")
    if failed:
        sys.stderr.write(
            f"groundcheck: {len(failed)} of {len(args.plans)} plans could not be read: "
            f"{', '.join(shown(p) for p, _ in failed)}; the others were checked\n"
        )
    failing = any(r.fails(fail_on(args)) for r in results)
    status = 2 if failed else 1 if failing else 0
    if args.format == "text" and not args.output and sys.stdout.isatty():
        from rich.console import Console
        from ..renderers.text import print_report

        console = Console(highlight=False)
        for i, r in enumerate(results):
            print_report(r, console, caution=i == 0)
        return status
    from ..renderers.formats import render_results

    if failed and args.format in ("json", "sarif"):
        text = with_errors(results, [e for _, e in failed], args.format)
    else:
        text = render_results(results, args.format) if results else ""
    write_output(text, args.output, args.plans)
    return status


def cmd_explain(args) -> int:
    codes = rule_codes(args.code) if args.code else tuple(RULES)  # a family lists its rules
    if codes is None:
        raise UsageError(str(UnknownRule(args.code)))
    if len(codes) > 1:
        for code in codes:
            r = RULES[code]
            print(f"{code}  {r.severity:<8} {r.name:<28} {r.checks.split('. ')[0].rstrip('.')}")
        print(f"\n{CAUTION}")
        return 0
    code = codes[0]
    r = RULES[code]
    print(f"{r.code} {r.name} ({r.severity})\n")
    print(f"Checks:  {r.checks}\n")
    print(f"Why:     {r.why}\n")
    print(f"Fix:     {r.fix}\n")
    if protective_earth_rule(code):
        print(f"         {MAINS_WORK}\n")
    print(f"References: {r.references}\n")
    print(CAUTION)
    return 0


def cmd_export(args) -> int:
    from ..physics.circuit import build_circuit
    from ..renderers.spice import to_spice
    from ..physics.coupling import plan_sources
    from ..physics.rectifier import simulate

    plan = load_plan(args.plan)
    circuit = build_circuit(plan)
    f = args.frequency or 0.0
    results = {r.name: simulate(r, plan.frequency) for r in plan.rectifiers}
    sources = [
        (s.name, s.a, s.b, s.parts[f])
        for s in plan_sources(plan, results, max(f, plan.frequency), circuit)
        if abs(s.parts.get(f, 0)) > 0
    ]
    if args.frequency:
        text = to_spice(circuit, plan.title, sources, frequency=f, analysis="ac")
    else:
        text = to_spice(circuit, plan.title, sources)
    write_output(text, args.output, [args.plan])
    return 0


def cmd_draw(args) -> int:
    from ..analysis import Options, analyze
    from ..renderers.drawing import render_dot
    from ..renderers.dot import has_physical_view, physical_dot, physical_omissions, topology_dot

    to_stdout = args.output == "-"
    out = Path(args.output)
    fmt = args.as_format or ("svg" if to_stdout else out.suffix.lower().lstrip("."))
    if fmt not in ("svg", "png", "dot", "gv"):
        raise UsageError(
            f"cannot tell the drawing format from {args.output!r} (end it in .svg, .png or .dot, "
            "or give --as svg|png|dot)"
        )
    fmt = "dot" if fmt == "gv" else fmt
    plan = load_plan(args.plan)
    result = analyze(plan, Options(hum=False))
    view = args.view if (args.view == "topology" or has_physical_view(plan)) else "topology"
    source = physical_dot(result) if view == "physical" else topology_dot(result)
    data, how = render_dot(source, fmt, "neato" if view == "physical" else "dot", args.renderer)
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
    return 1 if result.fails(fail_on(args)) else 0


def cmd_watch(args) -> int:
    from .watch import cmd_watch as watch  # the live view's server (http.server, ssl): watch only

    return watch(args)


def cmd_completion(args) -> int:
    from .completion import bash_completion

    sys.stdout.write(bash_completion(build_parser()))
    return 0


COMMANDS = {
    "check": cmd_check,
    "suggest": cmd_suggest,
    "compare": cmd_compare,
    "explain": cmd_explain,
    "draw": cmd_draw,
    "report": cmd_report,
    "export": cmd_export,
    "completion": cmd_completion,
    "watch": cmd_watch,
    "bench": cmd_bench,
}


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as e:  # --help, --version and usage errors end here
        return e.code if isinstance(e.code, int) else 2
    if not args.command:
        parser.print_help()
        return 2
    # no process-wide handler here: SIGTERM is turned into an exit only while an output is written
    # (renderers.output.write_atomic), so main() leaves a caller's process as it found it
    try:
        return COMMANDS[args.command](args)
    except PlanErrors as e:
        sys.stderr.write(e.render() + "\n")
        if args.command == "check" and getattr(args, "format", None) in ("sarif", "json"):
            import json
            from ..renderers.jsondoc import errors_document
            from ..renderers.sarif import sarif_errors

            doc = (sarif_errors if args.format == "sarif" else errors_document)(e.errors)
            try:
                write_output(
                    json.dumps(doc, indent=2, ensure_ascii=False) + "\n",
                    args.output,
                    [p for p in args.plans if p != "-"],
                )
            except (
                GroundcheckError
            ) as out:  # the output names a plan the run read: said, not written
                sys.stderr.write(f"groundcheck: error: {shown(out)}\n")
        return 2
    except GroundcheckError as e:
        sys.stderr.write(f"groundcheck: error: {shown(e)}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("groundcheck: interrupted\n")
        return 130
    except BrokenPipeError:
        try:
            sys.stdout = open(os.devnull, "w")
        except OSError:
            pass
        return 0
    except OSError as e:  # a full disk, an unwritable folder, a file that vanished
        sys.stderr.write(
            shown(
                f"groundcheck: error: {e.strerror or e}{f' ({e.filename})' if e.filename else ''}"
            )
            + "\n"
        )
        return 2
    # the last line of defence: never a traceback, never exit 1
    except Exception as e:
        if os.environ.get("GROUNDCHECK_DEBUG") or getattr(args, "debug", False):
            raise
        sys.stderr.write(
            f"groundcheck: internal error: {type(e).__name__}: {shown(e)} — please report it with "
            "the plan; run with GROUNDCHECK_DEBUG=1 for the traceback\n"
        )
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

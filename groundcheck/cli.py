"""The ``groundcheck`` command: a thin layer over the library.

Exit status: 0 clean, 1 findings at or above ``--fail-on``, 2 the plan or the
command could not be used.
"""

from __future__ import annotations

import argparse
import os
import sys
from dataclasses import replace
from pathlib import Path

from .core.version import __version__
from .core.errors import GroundcheckError, PlanErrors
from .rules.catalogue import RULES, SEVERITIES
from .language.loader import load
from .renderers.formats import CHECK_FORMATS
from .renderers.output import write_atomic
from .core.units import UnitError, parse_quantity

__all__ = ["main"]

EPILOG = "Exit status: 0 clean, 1 findings at or above --fail-on, 2 the plan or the command could not be used."


class UsageError(GroundcheckError):
    """A command line that cannot be used."""


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2, no traceback
        self.exit(2, f"groundcheck: error: {message} (see 'groundcheck {self.prog.split()[-1]} --help')\n"
                  if " " in self.prog else f"groundcheck: error: {message} (see 'groundcheck --help')\n")


def _quantity(kind: str, unit: str):
    def conv(text: str) -> float:
        t = text.strip()
        num = t.rstrip("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZµΩ°²/ ")
        rest = t[len(num):].strip()
        try:
            if not rest:
                return float(num)
            value, k = parse_quantity(num, rest)
        except (ValueError, UnitError) as e:
            raise argparse.ArgumentTypeError(f"{text!r} is not a {kind} ({e})") from None
        if k != kind:
            raise argparse.ArgumentTypeError(f"{text!r} is a {k}, not a {kind}")
        return value
    conv.__name__ = kind
    return conv


def _processes(text: str) -> int:
    """A number of processes: a whole number from 1 up."""
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of processes") from None
    if n < 1:
        raise argparse.ArgumentTypeError(f"{text!r}: give at least 1 process")
    return n


def _add_analysis_options(p):
    g = p.add_argument_group("analysis")
    g.add_argument("--pe-limit", type=_quantity("resistance", "ohm"), default=0.1, metavar="OHM",
                   help="protective-path resistance limit (default 0.1 ohm, the usual product-safety bonding limit)")
    g.add_argument("--max-frequency", type=_quantity("frequency", "Hz"), default=5000.0, metavar="HZ",
                   help="highest harmonic analysed (default 5 kHz)")
    g.add_argument("--hum-level", type=float, default=-100.0, metavar="DBV",
                   help="report hum contributors above this level at the output (default -100 dBV)")
    g.add_argument("--no-hum", action="store_true", help="skip the hum and buzz budget (topology and safety only)")


def _options(args):
    from .analysis import Options
    return Options(pe_limit=args.pe_limit, max_frequency=args.max_frequency, contributor_level=args.hum_level,
                   hum=not args.no_hum, jobs=getattr(args, "jobs", 1))


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="groundcheck", description="Audit the ground (earthing) wiring plan of mains-powered audio "
                "equipment before anyone solders.", epilog=EPILOG)
    p.add_argument("--version", action="version", version=f"groundcheck {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    _check_command(sub)
    _explain_command(sub)
    _draw_command(sub)
    _report_command(sub)
    _suggest_command(sub)
    _compare_command(sub)
    _export_command(sub)
    return p


def _check_command(sub) -> None:
    c = sub.add_parser("check", help="audit plans and print the findings",
                       description="Audit plans: loops, shared returns, stars, chassis bonds, protective earth, hum and buzz.\n\n"
                       "Example:\n  groundcheck check examples/monoblock-power-amp.gplan --format json",
                       formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    c.add_argument("plans", nargs="+", metavar="PLAN", help="plan files ('-' reads standard input)")
    c.add_argument("--format", choices=CHECK_FORMATS, default="text", help="output format (default text)")
    c.add_argument("--fail-on", choices=SEVERITIES, default="fault", help="exit 1 when a finding is at least this severe (default fault)")
    c.add_argument("-o", "--output", metavar="FILE", help="write the report to FILE instead of standard output")
    c.add_argument("--jobs", type=_processes, default=1, metavar="N", help="use N processes: several plans are checked side by side; for one plan, a large flat "
                   "file is read by two and the hum budget's frequencies are shared among N (Linux; default 1)")
    _add_analysis_options(c)


def _explain_command(sub) -> None:
    e = sub.add_parser("explain", help="say what a rule checks, why, and how to fix it",
                       description="Example:\n  groundcheck explain GC102", formatter_class=argparse.RawDescriptionHelpFormatter)
    e.add_argument("code", metavar="CODE", nargs="?", help="rule code, e.g. GC102 (none: list every rule)")


def _draw_command(sub) -> None:
    d = sub.add_parser("draw", help="draw the plan with every problem marked",
                       description="Draw the physical view (metal parts, points at their positions, conductors by role, "
                       "loops and problems marked) or the topology view.\n\nExample:\n"
                       "  groundcheck draw examples/monoblock-power-amp.gplan -o monoblock.svg",
                       formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    d.add_argument("plan", metavar="PLAN")
    d.add_argument("-o", "--output", metavar="FILE", required=True, help="FILE.svg, FILE.png or FILE.dot")
    d.add_argument("--view", choices=("physical", "topology"), default="physical",
                   help="physical (needs positions; default) or topology (laid out automatically)")
    d.add_argument("--renderer", choices=("auto", "system", "wasm"), default="auto",
                   help="system Graphviz, the bundled WebAssembly Graphviz, or auto (system first)")


def _report_command(sub) -> None:
    h = sub.add_parser("report", help="write a self-contained HTML report",
                       description="One HTML file with the summary, findings, drawings, hum spectrum and protective-earth "
                       "table; no network fetches.\n\nExample:\n  groundcheck report examples/dual-mono-line-stage.gplan -o report.html",
                       formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    h.add_argument("plan", metavar="PLAN")
    h.add_argument("-o", "--output", metavar="FILE", required=True, help="the HTML file to write (FILE.html)")
    h.add_argument("--renderer", choices=("auto", "system", "wasm"), default="auto",
                   help="system Graphviz, the bundled WebAssembly Graphviz, or auto (system first)")
    h.add_argument("--fail-on", choices=SEVERITIES, default="fault", help="exit 1 when a finding is at least this severe (default fault)")
    _add_analysis_options(h)


def _suggest_command(sub) -> None:
    s = sub.add_parser("suggest", help="propose changes that fix the findings, ranked by their predicted gain",
                       description="Try candidate changes on the plan (lift a shield end, remove a redundant bond, re-route "
                       "a return, join a rectifier's ends, give the protective earth its own stud ...), re-run the analysis for "
                       "each and rank them. Changes that would weaken the protective earth are never proposed.\n\nExample:\n"
                       "  groundcheck suggest examples/dual-mono-line-stage.gplan --apply fixed.gplan",
                       formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    s.add_argument("plan", metavar="PLAN")
    s.add_argument("--apply", metavar="NEW_PLAN", help="write the plan with the changes applied to this new file")
    s.add_argument("--pick", type=int, metavar="N", help="with --apply: apply suggestion N instead of the combined set")
    s.add_argument("--format", choices=("text", "json"), default="text", help="output format (default text)")
    _add_analysis_options(s)


def _compare_command(sub) -> None:
    cp = sub.add_parser("compare", help="compare two plans: findings, loops, hum per harmonic, protective earth",
                        description="Example:\n  groundcheck compare before.gplan after.gplan --format html -o changes.html",
                        formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    cp.add_argument("before", metavar="BEFORE")
    cp.add_argument("after", metavar="AFTER")
    cp.add_argument("--format", choices=("text", "json", "html"), default="text", help="output format (default text)")
    cp.add_argument("-o", "--output", metavar="FILE", help="write the comparison to FILE instead of standard output")
    _add_analysis_options(cp)


def _export_command(sub) -> None:
    x = sub.add_parser("export", help="write the ground network in another format",
                       description="Example:\n  groundcheck export examples/dual-mono-line-stage.gplan --spice -o ground.cir",
                       formatter_class=argparse.RawDescriptionHelpFormatter, epilog=EPILOG)
    x.add_argument("plan", metavar="PLAN")
    x.add_argument("--spice", action="store_true", required=True, help="a plain SPICE netlist (R, L, C, current sources)")
    x.add_argument("--frequency", type=_quantity("frequency", "Hz"), metavar="HZ",
                   help="AC analysis at this frequency (default: DC operating point)")
    x.add_argument("-o", "--output", metavar="FILE", help="write the netlist to FILE instead of standard output")


def _load(path: str, jobs: int = 1):
    return load(path, jobs=jobs)


def _write(text: str, output: str | None, inputs: list[str]) -> None:
    if output is None or output == "-":
        sys.stdout.write(text)
        return
    write_atomic(Path(output), text, protect=[Path(i) for i in inputs if i != "-"])


class _Rendered(GroundcheckError):
    """Plan errors already rendered to text (from a worker process)."""


def _check_one(path: str, options):
    """Load and analyse one plan in a worker process: (True, result) or (False, rendered errors)."""
    from .analysis import analyze
    try:
        return True, analyze(_load(path), options)
    except PlanErrors as e:
        return False, e.render()


def _analyze_with_progress(analyze, plan, options, label: str):
    """Run the analysis with a transient progress line on an interactive terminal."""
    if not sys.stderr.isatty():
        return analyze(plan, options)
    from rich.console import Console
    with Console(stderr=True).status(f"analysing {label} ({len(plan.conductors)} conductors)…"):
        return analyze(plan, options)


def cmd_check(args) -> int:
    from .analysis import analyze
    results = []
    if args.jobs > 1 and len(args.plans) > 1:
        from concurrent.futures import ProcessPoolExecutor
        with ProcessPoolExecutor(max_workers=args.jobs) as pool:
            outcomes = list(pool.map(_check_one, args.plans, [replace(_options(args), jobs=1)] * len(args.plans)))
        for ok, value in outcomes:
            if not ok:
                raise _Rendered(value)
            results.append(value)
    else:
        for path in args.plans:
            plan = _load(path, args.jobs)
            results.append(_analyze_with_progress(analyze, plan, _options(args), path))
    failing = any(r.fails(args.fail_on) for r in results)
    if args.format == "text" and not args.output:
        from rich.console import Console
        from .renderers.text import print_report
        console = Console(highlight=False)
        for i, r in enumerate(results):
            print_report(r, console, caution=i == 0)
        return 1 if failing else 0
    from .renderers.formats import render_results
    _write(render_results(results, args.format), args.output, args.plans)
    return 1 if failing else 0


def cmd_explain(args) -> int:
    if not args.code:
        for code, r in RULES.items():
            print(f"{code}  {r.severity:<8} {r.name}")
        return 0
    code = args.code.upper()
    if code not in RULES:
        raise UsageError(f"unknown rule code {args.code!r} (run 'groundcheck explain' to list the rules)")
    r = RULES[code]
    print(f"{r.code} {r.name} ({r.severity})\n")
    print(f"Checks:  {r.checks}\n")
    print(f"Why:     {r.why}\n")
    print(f"Fix:     {r.fix}\n")
    print(f"References: {r.references}")
    return 0


def cmd_export(args) -> int:
    from .physics.circuit import build_circuit
    from .renderers.spice import to_spice
    plan = _load(args.plan)
    circuit = build_circuit(plan)
    if args.frequency:
        text = to_spice(circuit, plan.title, frequency=args.frequency, analysis="ac")
    else:
        text = to_spice(circuit, plan.title)
    _write(text, args.output, [args.plan])
    return 0


def _drawings(result, renderer: str, fmt: str = "svg"):
    from .renderers.drawing import render_dot
    from .renderers.dot import physical_dot, topology_dot
    phys = render_dot(physical_dot(result), fmt, "neato", renderer)
    topo = render_dot(topology_dot(result), fmt, "dot", renderer)
    return phys, topo


def cmd_draw(args) -> int:
    from .analysis import Options, analyze
    from .renderers.drawing import render_dot
    from .renderers.dot import physical_dot, topology_dot
    out = Path(args.output)
    fmt = out.suffix.lower().lstrip(".")
    if fmt not in ("svg", "png", "dot", "gv"):
        raise UsageError(f"cannot tell the drawing format from {args.output!r} (end it in .svg, .png or .dot)")
    fmt = "dot" if fmt == "gv" else fmt
    plan = _load(args.plan)
    result = analyze(plan, Options(hum=False))
    has_pos = any(p.pos is not None for p in plan.points)
    view = args.view if (args.view == "topology" or has_pos) else "topology"
    source = physical_dot(result) if view == "physical" else topology_dot(result)
    data, how = render_dot(source, fmt, "neato" if view == "physical" else "dot", args.renderer)
    write_atomic(out, data, protect=[Path(args.plan)])
    note = "" if view == args.view else " (the plan has no positions: topology view)"
    sys.stderr.write(f"groundcheck: wrote the {view} view to {out} with {how}{note}\n")
    return 0


def cmd_report(args) -> int:
    from .analysis import analyze
    from .renderers.drawing import DrawingError
    from .renderers.html import html_report
    plan = _load(args.plan)
    result = _analyze_with_progress(analyze, plan, _options(args), args.plan)
    try:
        (phys, how), (topo, _) = _drawings(result, args.renderer)
    except DrawingError as e:
        sys.stderr.write(f"groundcheck: warning: {e}; the report has no drawings\n")
        phys = topo = None
        how = ""
    write_atomic(Path(args.output), html_report(result, phys, topo, how), protect=[Path(args.plan)])
    sys.stderr.write(f"groundcheck: wrote {args.output}\n")
    return 1 if result.fails(args.fail_on) else 0


def cmd_suggest(args) -> int:
    import json
    from .core.plain import clean
    from .renderers.text import CAUTION
    from .advice.repair import apply_edits, greedy, suggest
    from .advice.report import suggestions_document, suggestions_text
    if args.plan == "-":
        raise UsageError("suggest needs a plan file, not standard input (its edits are shown against the file)")
    path = Path(args.plan)
    plan = _load(args.plan)
    text = path.read_text(encoding="utf-8").lstrip("\ufeff")
    root, resolved = path.resolve().parent, path.resolve()
    before, evs = suggest(plan, text, _options(args), root, resolved)
    chosen, final, final_text = greedy(plan, text, _options(args), root, resolved)
    name = path.name
    useful = [e for e in evs if not e.rejected]
    if args.format == "json":
        doc = suggestions_document(plan, text, name, evs, chosen, final, final_text)
        sys.stdout.write(json.dumps(clean(doc), indent=2, ensure_ascii=False) + "\n")
    else:
        sys.stdout.write(suggestions_text(plan, text, name, evs, chosen, final, CAUTION))
    if args.apply:
        if args.pick is not None:
            if not 1 <= args.pick <= len(useful):
                raise UsageError(f"--pick takes 1 to {len(useful)}")
            new_text = apply_edits(text, useful[args.pick - 1].candidate.edits)
        else:
            new_text = final_text
        target = Path(args.apply)
        if target.exists():
            raise UsageError(f"{args.apply} exists; --apply writes a new file and never replaces one")
        write_atomic(target, new_text, protect=[path])
        sys.stderr.write(f"groundcheck: wrote the changed plan to {target}\n")
    return 0


def cmd_compare(args) -> int:
    from .analysis import analyze
    from .advice.compare import compare, compare_html, compare_json, compare_text
    d = compare(analyze(_load(args.before), _options(args)), analyze(_load(args.after), _options(args)))
    text = {"text": compare_text, "json": compare_json, "html": compare_html}[args.format](d)
    _write(text, args.output, [args.before, args.after])
    return 0


COMMANDS = {"check": cmd_check, "suggest": cmd_suggest, "compare": cmd_compare, "explain": cmd_explain, "draw": cmd_draw, "report": cmd_report, "export": cmd_export}


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as e:           # --help, --version and usage errors end here
        return e.code if isinstance(e.code, int) else 2
    if not args.command:
        parser.print_help()
        return 2
    try:
        return COMMANDS[args.command](args)
    except PlanErrors as e:
        sys.stderr.write(e.render() + "\n")
        return 2
    except _Rendered as e:
        sys.stderr.write(str(e) + "\n")
        return 2
    except GroundcheckError as e:
        sys.stderr.write(f"groundcheck: error: {e}\n")
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


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())

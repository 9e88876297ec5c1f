"""What every command shares: the usage error, option types with units, the analysis options,
loading a plan and writing an output."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from ..core.errors import GroundcheckError, shown
from ..core.units import UnitError, parse_quantity
from ..language.loader import load
from ..renderers.output import write_atomic
from ..physics.humsettings import PLATE_CURRENTS
from ..physics.protection import MAX_PE_LIMIT
from ..rules.results import FAIL_LEVELS, Options
from ..rules.selection import UnknownRule, codes_of
from ..language.fragments import resolved as _resolved
from .settings import load_settings, shown_value

__all__ = [
    "FAIL_HELP",
    "FAIL_LEVELS",
    "UsageError",
    "Parser",
    "quantity_type",
    "seconds_type",
    "processes_type",
    "add_analysis_options",
    "options_of",
    "load_plan",
    "write_output",
    "plan_paths",
]


class UsageError(GroundcheckError):
    """A command line that cannot be used."""


class Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2, no traceback
        self.exit(
            2,
            f"groundcheck: error: {message} (see 'groundcheck {self.prog.split()[-1]} --help')\n"
            if " " in self.prog
            else f"groundcheck: error: {message} (see 'groundcheck --help')\n",
        )


def _checked(value: float, text: str, kind: str, positive: bool) -> float:
    if value != value or abs(value) == float("inf") or abs(value) > 1e9:
        raise argparse.ArgumentTypeError(f"{text!r} is not a finite {kind}")
    if positive and value <= 0:
        raise argparse.ArgumentTypeError(f"{text!r}: the {kind} must be more than zero")
    return value


def quantity_type(kind: str, unit: str, positive: bool = True):
    def conv(text: str) -> float:
        t = text.strip()
        num = t.rstrip("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZµΩ°²/ ")
        rest = t[len(num) :].strip()
        try:
            if not rest:
                return _checked(float(num), text, kind, positive)
            value, k = parse_quantity(num, rest)
        except (ValueError, UnitError) as e:
            raise argparse.ArgumentTypeError(f"{text!r} is not a {kind} ({e})") from None
        if k != kind:
            raise argparse.ArgumentTypeError(f"{text!r} is a {k}, not a {kind}")
        return _checked(value, text, kind, positive)

    conv.__name__ = kind
    return conv


def level_type(text: str) -> float:
    """A level in dB(V): a finite number, an optional 'dBV' or 'dB' after it."""
    t = text.strip()
    for suffix in ("dBV", "dB"):
        if t.endswith(suffix):
            t = t[: -len(suffix)].strip()
    try:
        value = float(t)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a level in dBV") from None
    if value != value or abs(value) > 300:
        raise argparse.ArgumentTypeError(f"{text!r} is not a level from -300 to 300 dBV")
    return value


def seconds_type(text: str) -> float:
    try:
        value = float(text.rstrip("s").strip())
    except ValueError:
        value = float("nan")
    if not value > 0 or value == float("inf"):
        raise argparse.ArgumentTypeError(f"expected a time in seconds above 0, got {text!r}")
    return value


def processes_type(text: str) -> int:
    """A number of processes: a whole number from 1 up."""
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of processes") from None
    if n < 1:
        raise argparse.ArgumentTypeError(f"{text!r}: give at least 1 process")
    return min(n, available_cpus())


def available_cpus() -> int:
    """The processors this process may run on (--jobs is capped there: more processes only
    compete)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


#: --fail-on of check and report
FAIL_HELP = (
    "exit 1 when an open finding, or a danger accepted in the plan, is at least this severe "
    "(default fault; never: exit 0 whatever is found)"
)

#: the analysis defaults, read from their one home (the Options record)
_DEFAULT = Options()


def _pe_limit(text: str) -> float:
    """--pe-limit: a resistance more than 0 and at most MAX_PE_LIMIT."""
    value = quantity_type("resistance", "ohm")(text)
    if value > MAX_PE_LIMIT:
        raise argparse.ArgumentTypeError(
            f"{text!r}: the protective-path limit is at most {MAX_PE_LIMIT:g} ohm (a path above "
            "it is no bond by any equipment standard's measure)"
        )
    return value


def _plate_current_option(g) -> None:
    g.add_argument(
        "--plate-current",
        choices=PLATE_CURRENTS,
        default=_DEFAULT.plate_current,
        help="how a loop's current crosses a chassis plate in the stray-field pickup: resistive "
        "(spread as at DC, the default) or inductive (crowding under the loop's wire at each "
        "line's frequency; slower; steel plates stay resistive)",
    )


def add_analysis_options(p):
    g = p.add_argument_group("analysis")
    g.add_argument(
        "--pe-limit",
        type=_pe_limit,
        default=_DEFAULT.pe_limit,
        metavar="OHM",
        help=f"protective-path resistance limit (default {_DEFAULT.pe_limit:g} ohm, the usual "
        f"product-safety bonding limit; at most {MAX_PE_LIMIT:g} ohm: a relaxed limit is said in "
        "every output and a path over 0.1 ohm stays a warning)",
    )
    g.add_argument(
        "--max-frequency",
        type=quantity_type("frequency", "Hz"),
        default=_DEFAULT.max_frequency,
        metavar="HZ",
        help=f"highest harmonic analysed (default {_DEFAULT.max_frequency:g} Hz)",
    )
    g.add_argument(
        "--hum-level",
        type=level_type,
        default=_DEFAULT.contributor_level,
        metavar="DBV",
        help="report hum contributors above this level at the output (default "
        f"{_DEFAULT.contributor_level:g} dBV)",
    )
    _plate_current_option(g)
    g.add_argument(
        "--no-hum",
        action="store_true",
        help="skip the hum and buzz budget (topology and safety only)",
    )
    g.add_argument(
        "--only-rules",
        type=_words,
        metavar="RULES",
        default=None,
        help="check only these rules: codes (GC206), families (GC2: every "
        "protective-earth rule) or names, comma-separated; every rule left out is listed as not "
        "checked (default: every rule)",
    )
    g.add_argument(
        "--leave-out",
        type=_words,
        metavar="RULES",
        default=None,
        help="do not check these rules (codes, families or names, comma-separated); "
        "each is listed as not checked in every output",
    )
    g.add_argument(
        "--allow-accept-danger",
        action="store_true",
        default=None,
        help="let a '# accept' comment accept a danger finding too; it still counts "
        "as a danger (exit status 1 unless --fail-on never), and every output says so",
    )


def _words(text: str) -> tuple[str, ...]:
    words = tuple(w.strip() for w in text.split(",") if w.strip())
    if not words:
        raise argparse.ArgumentTypeError("give at least one rule code, family or name")
    try:
        codes_of(words)
    except UnknownRule as e:
        raise argparse.ArgumentTypeError(str(e)) from None
    return words


def _setting(args, name: str, config: dict, default):
    value = getattr(args, name.replace("-", "_"), None)
    if value is not None:
        return value
    value = config.get(name, default)
    return tuple(value) if isinstance(value, list) else value


def _rules(args, name: str, config: dict) -> tuple[tuple[str, ...], str]:
    """A rule selection and where it came from, as the outputs name it."""
    value = getattr(args, name.replace("-", "_"), None)
    if value is not None:
        return tuple(value), f"--{name} {','.join(value)}"
    if name in config:
        where = getattr(args, "config_file", None) or "the settings file"
        return tuple(config[name]), f"{name} = {shown_value(config[name])} in {where}"
    return (), f"--{name}"


def _config(args) -> dict:
    """The settings file's values, read once per command (stored on ``args``)."""
    config = getattr(args, "config", None)
    if config is None:
        try:
            config, args.config_file = load_settings()
        except GroundcheckError as e:
            raise UsageError(str(e)) from None
        args.config = config
    return config


def options_of(args):
    config = _config(args)
    only, only_origin = _rules(args, "only-rules", config)
    leave, leave_origin = _rules(args, "leave-out", config)
    allow = _setting(args, "allow-accept-danger", config, _DEFAULT.allow_accept_danger)
    return Options(
        pe_limit=args.pe_limit,
        max_frequency=args.max_frequency,
        contributor_level=args.hum_level,
        plate_current=args.plate_current,
        hum=not args.no_hum,
        jobs=getattr(args, "jobs", 1),
        only_rules=only,
        leave_out=leave,
        only_rules_origin=only_origin,
        leave_out_origin=leave_origin,
        allow_accept_danger=bool(allow),
    )


def fail_on(args) -> str:
    """--fail-on, else the settings file's fail-on, else fault."""
    return _setting(args, "fail-on", _config(args), "fault")


def load_plan(path: str, jobs: int = 1):
    return load(path, jobs=jobs)


def write_output(text: str, output: str | None, inputs: list[str]) -> None:
    if output is None or output == "-":
        sys.stdout.write(text)
        return
    write_atomic(Path(output), text, protect=[Path(i) for i in inputs if i != "-"])


def _plans_in(folder: Path) -> list[str]:
    """The regular .gplan files below ``folder``, sorted: hidden folders, links and special files
    are passed over (a note names each link, never its target), so a folder check never reads
    outside the folder."""
    found = []
    for here, dirs, files in os.walk(folder):  # never descends through a linked folder
        dirs[:] = sorted(
            d for d in dirs if not d.startswith(".") and not os.path.islink(os.path.join(here, d))
        )
        for f in files:
            path = os.path.join(here, f)
            if not f.endswith(".gplan") or f.startswith("."):
                continue
            if os.path.islink(path) or not os.path.isfile(path):
                sys.stderr.write(
                    f"groundcheck: note: passed over {shown(path)}: "
                    f"{'a link' if os.path.islink(path) else 'not a regular file'}\n"
                )
                continue
            found.append(path)
    return sorted(found)


def plan_paths(names: list[str]) -> list[str]:
    """The plans named: a folder stands for every .gplan file below it (sorted; hidden folders
    skipped)."""
    out = []
    for name in names:
        p = Path(name)
        if name != "-" and p.is_dir():
            found = _plans_in(p)
            if not found:
                raise UsageError(f"folder {name} holds no .gplan file")
            out.extend(found)
        else:
            out.append(name)
    return _without_fragments(out)


def _without_fragments(paths: list[str]) -> list[str]:
    """``paths`` less the files another plan includes (a fragment is checked as part of the plan
    that includes it: a note names that plan, and it is checked in the fragment's place when it is
    not among ``paths``).  The includers are looked for among ``paths`` and the plans in each one's
    folder and the folders above it, up to the current folder."""
    from ..language.fragments import fragments_among, neighbours

    files = [Path(p) for p in paths if p != "-"]
    pool = {_resolved(p): p for p in files}
    for p in files:
        for n in neighbours(p, Path.cwd()):
            pool.setdefault(_resolved(n), n)
    included = fragments_among(list(pool.values()))
    if not included:
        return paths
    out: list[str] = []
    chosen = {_resolved(Path(p)) for p in paths if p != "-" and _resolved(Path(p)) not in included}
    for name in paths:
        by = _tops(_resolved(Path(name)), included) if name != "-" else []
        if not by:  # included by nothing, or only round a cycle: its own check says
            out.append(name)
            continue
        sys.stderr.write(
            f"groundcheck: note: passed over {shown(name)}: it is included by "
            f"{', '.join(shown(b) for b in by)} and checked as part of "
            f"{'it' if len(by) == 1 else 'each'}\n"
        )
        for top in by:
            if _resolved(top) not in chosen:
                chosen.add(_resolved(top))
                out.append(_relative(top))
    return out


def _tops(path: Path, included: dict) -> list[Path]:
    """The plans at the top of the chains of includes that lead to ``path`` (none for a file that
    nothing includes, or that only a cycle of includes reaches)."""
    tops, todo, seen = [], [path], {path}
    while todo:
        for by in included.get(todo.pop(), ()):
            key = _resolved(by)
            if key in seen:
                continue
            seen.add(key)
            (todo if key in included else tops).append(key if key in included else by)
    return tops


def _relative(p: Path) -> str:
    try:
        return str(_resolved(p).relative_to(Path.cwd().resolve()))
    except ValueError:
        return str(p)

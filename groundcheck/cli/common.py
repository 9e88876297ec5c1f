"""What every command shares: the usage error, option types with units, the analysis options, loading a
plan and writing an output."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from ..core.errors import GroundcheckError
from ..core.units import UnitError, parse_quantity
from ..language.loader import load
from ..renderers.output import write_atomic
from ..rules.results import Options

__all__ = ["UsageError", "Parser", "quantity_type", "seconds_type", "processes_type", "add_analysis_options",
           "options_of", "load_plan", "write_output", "plan_paths"]


class UsageError(GroundcheckError):
    """A command line that cannot be used."""


class Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2, no traceback
        self.exit(2, f"groundcheck: error: {message} (see 'groundcheck {self.prog.split()[-1]} --help')\n"
                  if " " in self.prog else f"groundcheck: error: {message} (see 'groundcheck --help')\n")


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
        rest = t[len(num):].strip()
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
    """The processors this process may run on (--jobs is capped there: more processes only compete)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


#: the analysis defaults, read from their one home (the Options record)
_DEFAULT = Options()


def add_analysis_options(p):
    g = p.add_argument_group("analysis")
    g.add_argument("--pe-limit", type=quantity_type("resistance", "ohm"), default=_DEFAULT.pe_limit, metavar="OHM",
                   help=f"protective-path resistance limit (default {_DEFAULT.pe_limit:g} ohm, the usual "
                        "product-safety "
                   "bonding limit)")
    g.add_argument("--max-frequency", type=quantity_type("frequency", "Hz"), default=_DEFAULT.max_frequency,
                   metavar="HZ",
                   help=f"highest harmonic analysed (default {_DEFAULT.max_frequency:g} Hz)")
    g.add_argument("--hum-level", type=level_type, default=_DEFAULT.contributor_level, metavar="DBV",
                   help="report hum contributors above this level at the output (default "
                        f"{_DEFAULT.contributor_level:g} dBV)")
    g.add_argument("--no-hum", action="store_true", help="skip the hum and buzz budget (topology and safety only)")
    g.add_argument("--select", type=_words, metavar="RULES", default=None,
                   help="report only these rules (codes or names, comma-separated; default: every rule)")
    g.add_argument("--ignore", type=_words, metavar="RULES", default=None,
                   help="never report these rules (codes or names, comma-separated)")
    g.add_argument("--allow-accept-danger", action="store_true", default=None,
                   help="let a '# accept' comment accept a danger finding too (by default dangers are never accepted)")


def _words(text: str) -> tuple[str, ...]:
    return tuple(w.strip() for w in text.split(",") if w.strip())


CONFIG_KEYS = ("select", "ignore", "fail-on", "allow-accept-danger")


def load_config(start: Path | None = None) -> tuple[dict, Path | None]:
    """Settings from ``groundcheck.toml`` (top-level keys) or the ``[tool.groundcheck]`` table of
    ``pyproject.toml``, in the current folder or the nearest folder above it; command-line options win."""
    import tomllib
    here = (start or Path.cwd()).resolve()
    for folder in (here, *here.parents):
        for name, table in (("groundcheck.toml", None), ("pyproject.toml", ("tool", "groundcheck"))):
            f = folder / name
            if not f.is_file():
                continue
            try:
                data = tomllib.loads(f.read_text(encoding="utf-8"))
            except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as e:
                raise UsageError(f"{f}: cannot read the settings ({e})") from None
            for key in table or ():
                data = data.get(key, {}) if isinstance(data, dict) else {}
            if table is not None and not data:
                continue
            unknown = sorted(set(data) - set(CONFIG_KEYS))
            if unknown:
                raise UsageError(f"{f}: unknown setting {unknown[0]!r} (settings: {', '.join(CONFIG_KEYS)})")
            return data, f
    return {}, None


def _setting(args, name: str, config: dict, default):
    value = getattr(args, name.replace("-", "_"), None)
    if value is not None:
        return value
    value = config.get(name, default)
    return tuple(value) if isinstance(value, list) else value


def _config(args) -> dict:
    """The settings file's values, read once per command (``main`` stores them on ``args``)."""
    config = getattr(args, "config", None)
    if config is None:
        config = args.config = load_config()[0]
    return config


def options_of(args):
    config = _config(args)
    return Options(pe_limit=args.pe_limit, max_frequency=args.max_frequency, contributor_level=args.hum_level,
                   hum=not args.no_hum, jobs=getattr(args, "jobs", 1), select=_setting(args, "select", config,
                                                                                       _DEFAULT.select),
                   ignore=_setting(args, "ignore", config, _DEFAULT.ignore),
                   allow_accept_danger=bool(_setting(args, "allow-accept-danger", config,
                                                     _DEFAULT.allow_accept_danger)))


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


def plan_paths(names: list[str]) -> list[str]:
    """The plans named: a folder stands for every .gplan file below it (sorted; hidden folders
    skipped)."""
    out = []
    for name in names:
        p = Path(name)
        if name != "-" and p.is_dir():
            found = sorted(str(f) for f in p.rglob("*.gplan")
                           if not any(part.startswith(".") for part in f.parts))
            if not found:
                raise UsageError(f"folder {name} holds no .gplan file")
            out.extend(found)
        else:
            out.append(name)
    return out

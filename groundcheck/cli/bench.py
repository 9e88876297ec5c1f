"""``groundcheck bench``: a recording of the finished build's hum and its bonding measurements
against the plan.

Thin: parse the options, call :mod:`groundcheck.measure`, render.  The numeric imports stay inside
the handler.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..core.errors import PlanErrors, PlanError
from ..renderers.formats import BENCH_FORMATS
from .common import (
    FAIL_HELP,
    FAIL_LEVELS,
    UsageError,
    add_analysis_options,
    fail_on,
    load_plan,
    options_of,
    quantity_type,
    write_output,
)
from .registry import FORMAT, command, opt

__all__ = ["cmd_bench", "BENCH_EPILOG"]

BENCH_EPILOG = (
    "Exit status: 0 no bench finding at or above --fail-on, 1 a bench finding at or above it (a "
    "bond over the limit or far above the plan, hum above the plan), 2 the plan, a recording, the "
    "measurements file or the command could not be used."
)

#: recordings longer than this show a progress line on a terminal, s
PROGRESS_AFTER_S = 120.0


def _track(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        n = 0
    if n < 1:
        raise argparse.ArgumentTypeError(f"{text!r}: the file's channels are numbered from 1")
    return n


#: the recording and how to read it
_RECORDING = (
    opt("--recording", metavar="WAV", help="the recorded output (WAV: 16/24/32-bit PCM or float)"),
    opt(
        "--channel",
        metavar="NAME",
        help="the plan's channel the recording is of (needed when the plan has several)",
    ),
    opt(
        "--track",
        type=_track,
        default=1,
        metavar="N",
        help="which of the file's channels to read (default 1, the first)",
    ),
    opt(
        "--full-scale",
        type=quantity_type("voltage", "V"),
        metavar="VOLTS",
        help="calibration: the rms voltage of a sine that just reaches digital full scale (the "
        "interface's maximum input level)",
    ),
    opt(
        "--calibration",
        nargs=2,
        metavar=("TONE_WAV", "VOLTS"),
        help="calibration: a recording of a tone of this rms voltage, made with the same settings",
    ),
    opt(
        "--mains-frequency",
        type=quantity_type("frequency", "Hz"),
        metavar="HZ",
        help="the mains frequency (default: found in the recording, 50 or 60 Hz within 2 %%)",
    ),
)


def _calibration(args) -> tuple[float | None, str]:
    """Volts for 1.0 of digital full scale, and how they were found."""
    from ..measure.lines import tone_level

    if args.full_scale and args.calibration:
        raise UsageError("give --full-scale or --calibration, not both")
    if args.full_scale:
        return args.full_scale * 2**0.5, f"full scale = {args.full_scale:g} V rms sine"
    if args.calibration:
        tone, text = args.calibration
        try:
            volts = quantity_type("voltage", "V")(text)
        except argparse.ArgumentTypeError as e:
            raise UsageError(f"--calibration: {e}") from None
        level = tone_level(tone, args.track - 1)
        if level <= 0:
            raise PlanErrors(
                [
                    PlanError(
                        "the calibration recording holds no tone",
                        _where(tone),
                        "record the tone with the same gain",
                    )
                ]
            )
        return volts / level, f"a {volts:g} V rms tone ({tone}) read {20 * _log10(level):.2f} dBFS"
    return None, ""


def _where(path):
    from ..core.errors import Location

    return Location(path)


def _log10(x: float) -> float:
    import math

    return math.log10(x * 2**0.5)


def _progress(seconds: float):
    if seconds < PROGRESS_AFTER_S or not sys.stderr.isatty():
        return None
    shown = [-1]

    def tick(done: int, total: int) -> None:
        pct = 100 * done // max(total, 1)
        if pct != shown[0]:
            shown[0] = pct
            sys.stderr.write(f"\rgroundcheck: reading the recording {pct:3d} %")
            if done >= total:
                sys.stderr.write("\n")

    return tick


@command(
    "bench",
    help="compare a recording of the build's hum and its bond measurements with the plan",
    description="Read a recording of the finished amplifier's output (WAV), measure the mains "
    "line and its harmonics, compare them with the plan's predicted spectrum, fit the plan's "
    "contributors to say which conductor to suspect, and check measured bond resistances "
    "against the plan.\n\nExamples:\n  groundcheck bench amp.gplan --recording left.wav "
    "--channel left --full-scale 1.23V\n  groundcheck bench amp.gplan --bonds bonds.gmeas "
    "--format html -o bench.html",
    epilog=BENCH_EPILOG,
    formats=BENCH_FORMATS,
    options=(
        opt("plan", metavar="PLAN"),
        *_RECORDING,
        opt(
            "--bonds",
            metavar="FILE",
            help="a bonding measurements file: one 'A to B: 85 mohm at 10 A' a line",
        ),
        FORMAT,
        opt(
            "-o",
            "--output",
            metavar="FILE",
            help="write the bench record to FILE instead of standard output",
        ),
        opt("--fail-on", choices=FAIL_LEVELS, default=None, help=FAIL_HELP),
        add_analysis_options,
    ),
)
def cmd_bench(args) -> int:
    from ..analysis import analyze
    from ..measure.audio import RecordingError, wav_format
    from ..measure.bench import bench_record, pick_channel
    from ..measure.bonds import read_measurements
    from ..measure.lines import measure
    from ..measure.planned import planned_bonds

    if not args.recording and not args.bonds:
        raise UsageError("give a --recording, a --bonds file, or both")
    if args.recording and args.no_hum:
        raise UsageError("--no-hum leaves no planned spectrum to compare a recording with")
    plan = load_plan(args.plan)
    names = {p.name for p in plan.points} | {m.name for m in plan.metals}
    measurements = read_measurements(args.bonds, names | {"mains.pe"}) if args.bonds else []
    result = analyze(plan, options_of(args))
    measured, channel = None, None
    try:
        if args.recording:
            try:
                channel = pick_channel(result, args.channel)
            except ValueError as e:
                raise UsageError(str(e)) from None
            volts, how = _calibration(args)
            fmt = wav_format(args.recording)
            measured = measure(
                args.recording,
                args.track - 1,
                args.mains_frequency,
                plan.frequency,
                max(result.hum.frequencies, default=args.max_frequency),
                volts,
                how,
                _progress(fmt.seconds),
            )
    except RecordingError as e:
        raise PlanErrors([e]) from None
    record = bench_record(result, measured, channel, planned_bonds(result, measurements))
    write_output(
        BENCH_FORMATS[args.format].render(record),
        args.output,
        [p for p in (args.plan, args.recording, args.bonds) if p],
    )
    if args.output:
        sys.stderr.write(f"groundcheck: wrote {Path(args.output)}\n")
    return 1 if _fails(record, fail_on(args)) else 0


def _fails(record, level: str) -> bool:
    from ..rules.catalogue import severity_rank

    if level == "never":
        return False
    return any(severity_rank(f.severity) <= severity_rank(level) for f in record.findings)

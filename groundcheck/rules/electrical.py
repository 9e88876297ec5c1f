"""Rules on the electrical results: shared returns (GC102) and network islands (GC401), and
:class:`Solved`, what every rule on the solved network reads.  Each rule is a pure function of
:class:`Solved`; the rules on the hum budget (GC301–GC305) are :mod:`.hum_rules`."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..core.units import dbv
from ..model.kinds import joins_devices
from ..physics.sources import plan_sources, source_group
from ..physics.hearing import heard_threshold, spl_of
from ..physics.humsettings import (
    QUIET_MARGIN_DB,
    channel_listenings,
    far_below_hearing,
    spectrum_cut,
)
from .catalogue import Finding
from .context import AuditContext
from .registry import rule
from .results import Options

if TYPE_CHECKING:
    from ..model.records import Plan
    from ..physics.bonding_test import BondingResult
    from ..physics.circuit import Circuit
    from ..physics.coupling import SharedReturn
    from ..physics.device_earth import DeviceEarth
    from ..physics.hum import HumResult
    from ..physics.safety import SafetyResult

__all__ = ["Solved", "rule_shared_returns", "rule_islands"]


@dataclass(frozen=True)
class Solved:
    """What the rules on electrical results read: the plan, its audit context and every analysis
    result."""

    plan: Plan
    ctx: AuditContext
    circuit: Circuit
    coupling: list[SharedReturn]
    safety: SafetyResult | None
    device_earths: tuple[DeviceEarth, ...] | None
    hum: HumResult | None
    options: Options
    bonding: BondingResult | None = None  # the product bonding test (physics.bonding_test)


@rule("GC102", needs="solve")
def rule_shared_returns(s: Solved) -> list[Finding]:
    """GC102: a supply-return current that shares conductors with a stage's sensitive pair.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC102 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    plan_conductors = s.plan.index.conductors
    leak = s.plan.index.leakage
    channels = {st.name: st.channel for st in s.plan.stages}
    out = []
    # devices whose earth pin reaches no main earthing terminal (GC215): their leakage returns by
    # the shields that hold their chassis near earth
    unearthed = {d.device for d in (s.device_earths or ()) if d.resistance is None}
    amps = _ac_currents(s)
    lines = _lines(s) if leak else {}
    # where a return goes: the star, or in a plan without one (a ground bus) its common point
    star = (
        "the star"
        if any(p.kind == "star" for p in s.plan.points)
        else "the signal ground's common point"
    )
    for row in s.coupling:
        fix = _shared_fix(row, plan_conductors, leak, star)
        dev = s.plan.index.device_of(row.source) if row.source in leak else None
        holding, held = _holding(s, row, plan_conductors, unearthed)
        if dev in unearthed:
            fix = _unearthed_fix(dev, holding, held)
        elif holding:
            fix = (
                f"the shield of {', '.join(holding)} is what holds the chassis of "
                f"{', '.join(held)} (no earth path of its own) near earth: restore its protective "
                "earth first, and never lift that shield or put a ground-lift network in it; "
                "never lift a protective earth"
            )
        figures = {
            "transfer_resistance_mohm": float(f"{row.transfer * 1e3:.6g}"),
            "stage_gain_db": row.stage_gain,
        }
        below, heard = _weighed(s, row, channels.get(row.stage), figures, amps)
        if not below and row.source in leak:
            quiet = _quiet_leakage(s, row, channels.get(row.stage), amps, lines.get(row.source))
            below, heard = (True, quiet) if quiet is not None else (below, heard)
        out.append(
            Finding(
                "GC102",
                "note" if below else "fault",
                f"{'leakage current' if row.source in leak else f'{row.kind} return'} "
                f"{row.source} ({row.a} → {row.b}) shares {', '.join(row.shared)} with stage "
                f"{row.stage} ({row.stage_a} – {row.stage_b}){heard}",
                row.location,
                (row.source, row.stage, *row.shared),
                figures,
                fix,
            )
        )
    return out


def _weighed(s: Solved, row, channel: str | None, figures: dict, amps: dict) -> tuple[bool, str]:
    """Whether a shared return is below the contributor level (a note; otherwise, and when the
    budget was not run, a fault), and what the hum budget says of it; its level goes into
    ``figures``."""
    level = _source_level(s, row, channel, amps)
    if level is None:
        if s.options.hum:
            return False, ""
        return False, (
            "; not weighed against the hum budget (the hum figures were not computed: "
            "--no-hum), so it stays a fault; without --no-hum the budget says whether it is "
            "heard"
        )
    if level > 0:
        figures["level_dbv"] = dbv(level)
    # a level at the contributor level (to 1e-9 dB) is not below it: 1 mA through 10 mΩ read at
    # 0 dB is exactly -100 dBV, and the last bit of the solve would decide
    if level > 0 and dbv(level) >= s.options.contributor_level - 1e-9:
        return False, ""
    if spectrum_cut(s.options):
        return False, (
            f"; not weighed against the hum budget (--max-frequency {s.options.max_frequency:g} "
            "Hz leaves out the lines above it), so it stays a fault"
        )
    return True, (
        f"; through this stage it puts about {dbv(level):.1f} dBV at the {channel} output "
        f"(its current × the transfer resistance × the gain, at most the hum budget's figure for "
        f"it), below the {s.options.contributor_level:g} dBV contributor level"
        if level > 0
        else f"; the hum budget finds none of it at the {channel} output"
    )


def _holding(s: Solved, row, plan_conductors: dict, unearthed: set):
    """The interconnects among a shared return's conductors that have an unearthed device at an
    end (their shields are what hold its chassis near earth), and those devices."""
    device_of = s.plan.index.device_of
    holding, held = [], set()
    for x in row.shared:
        c = plan_conductors.get(x)
        if c is None or not joins_devices(c):
            continue
        ends = {device_of(c.a), device_of(c.b)} & unearthed
        if ends:
            holding.append(x)
            held |= ends
    return holding, sorted(held)


def _unearthed_fix(dev: str, holding: list[str], devices: list[str]) -> str:
    """A leakage current of a device with no earth path: its own earth comes first; the shields
    of its links are what hold its chassis near earth meanwhile."""
    held = (
        f"; the shield of {', '.join(holding)} is what holds the chassis of "
        f"{', '.join(devices)} near earth meanwhile: never lift it or put a ground-lift "
        "network in it"
        if holding
        else ""
    )
    return (
        f"restore {dev}'s protective earth first (its earth pin reaches no main earthing "
        f"terminal, GC215){held}; never lift a protective earth"
    )


def _shared_fix(row, plan_conductors: dict, leak: set, star: str = "the star") -> str:
    """What to do about one shared return: by where its current meets the stage (an interconnect's
    shield, balanced or not; a leakage current; a supply return)."""
    via_ic = [x for x in row.shared if x in plan_conductors and joins_devices(plan_conductors[x])]
    if via_ic and all(plan_conductors[x].balanced for x in via_ic):
        fix = (
            f"the current reaches the stage along the shield of {', '.join(via_ic)}, which the "
            "balanced input rejects by its common-mode rejection (the hum budget gives what is "
            "left); if it is heard, use an input of better rejection or a ground-lift network on "
            "the signal side, with power diodes across it rated for a fault (GC226); never lift "
            "the protective earth"
        )
    elif via_ic:
        # an unbalanced link's shield is its signal's return: it stays, and bought or
        # unbalanced equipment takes no balanced link or lift network (the advisor refuses both)
        fix = (
            f"the current reaches the stage through the shield of {', '.join(via_ic)}, the "
            "signal's return on an unbalanced link, which stays: plug the devices it joins into "
            "one outlet or strip, so the current has a short way home, or use a link with a "
            "heavier shield; a balanced link only between balanced sockets, a ground-lift "
            "network only in equipment of your own build; never lift the protective earth"
        )
    elif row.kind == "current" and row.source in leak:
        fix = (
            f"keep {row.stage_a} and {row.stage_b} off the conductors that carry {row.source}; "
            "give the stage its own reference wire"
        )
    else:
        fix = (
            f"join {row.a} and {row.b} by a short wire of their own, then one wire to {star}; "
            f"take {row.stage_b} and {row.stage_a} to "
            f"{'the signal star' if star == 'the star' else star} by wires that carry no supply "
            "current"
        )
    return fix


def _source_level(s: Solved, row, channel: str | None, amps: dict) -> float | None:
    """The level (V) this shared return puts at its stage's output: the source's AC current (rms
    over its hum lines) times the transfer resistance to the stage's pair times the stage's gain,
    and never above what the hum budget finds of the source's whole group at the channel; None
    without a hum budget (or the channel not in it)."""
    if s.hum is None or channel not in s.hum.levels:
        return None
    group = source_group(row.kind, row.source, s.plan.index.leakage)
    whole = s.hum.levels[channel].get(group, 0.0)
    current = amps.get(row.source)
    if current is None:
        return whole
    return min(whole, current * abs(row.transfer) * 10 ** (row.stage_gain / 20))


def _quiet_leakage(s: Solved, row, ch: str | None, amps: dict, lines) -> str | None:
    """Why a leakage current's shared return is a note (None when it is not): a leakage current's
    way home through the links is the installation's, not a wiring mistake of the equipment, and
    heard nowhere — the whole channel far below hearing, or this source's own share (never on
    hum lines cut short by ``--max-frequency``)."""
    if spectrum_cut(s.options):
        return None
    if far_below_hearing(s.hum, ch):
        return f"; the {ch} channel's hum stays {QUIET_MARGIN_DB:g} dB or more below hearing"
    return _quiet_share(s, row, ch, amps, lines)


def _quiet_share(s: Solved, row, channel: str | None, amps: dict, lines) -> str | None:
    """Why a leakage current's share is of no consequence, or None: the level it puts at the
    channel's output, at the listener's seat, stays :data:`QUIET_MARGIN_DB` or more below the
    threshold of hearing at every frequency it has a line at (the lowest threshold of them taken,
    as if all of it were there), whatever else the channel hears."""
    level = _source_level(s, row, channel, amps)
    listening = channel_listenings(s.plan, s.plan.stages, [channel]).get(channel)
    if not level or listening is None or not listening.verdict or not lines:
        return None
    margin = spl_of(level, listening) - min(
        heard_threshold(f, listening.background) for f in lines
    )
    if margin > -QUIET_MARGIN_DB:
        return None
    return (
        f"; it puts about {dbv(level):.1f} dBV at the {channel} output, {-margin:.0f} dB below "
        f"hearing at the seat, past the {QUIET_MARGIN_DB:g} dB margin the project keeps for its "
        "estimates: heard nowhere, a note"
    )


def _lines(s: Solved) -> dict:
    """Each hum source's frequencies with a line, Hz ({} without the rectifiers' figures)."""
    return {
        src.name: tuple(sorted(f for f, i in src.parts.items() if f > 0 and abs(i) > 0))
        for src in _sources(s)
    }


def _ac_currents(s: Solved) -> dict:
    """Each hum source's AC current, rms over its lines, A ({} without the rectifiers' figures)."""
    return {
        src.name: math.sqrt(sum(abs(i) ** 2 for f, i in src.parts.items() if f > 0))
        for src in _sources(s)
    }


def _sources(s: Solved) -> list:
    """The plan's hum sources with their lines ([] without the hum budget or the rectifiers'
    figures)."""
    if s.hum is None:
        return []
    results = {r.name: r for r in s.hum.rectifiers}
    if not all(r.name in results for r in s.plan.rectifiers):
        return []
    return list(plan_sources(s.plan, results, s.options.max_frequency))


@rule("GC401", needs="solve")
def rule_islands(s: Solved) -> list[Finding]:
    """GC401: a stage whose two points lie in parts of the network that are not connected.

    Parameters:
        s: the solved network with its context.
    Returns:
        GC401 findings.
    References:
        the rule catalogue (rules/catalogue.py), which names each code's sources.
    """
    _, labels = s.circuit.components
    node = s.circuit.point_node
    return [
        Finding(
            "GC401",
            "note",
            f"stage {st.name}: {st.a} and {st.b} are not connected to each other",
            st.location,
            (st.name, st.a, st.b),
            {},
            "connect both points of the stage to the ground system",
        )
        for st in s.plan.stages
        if labels[node[st.a]] != labels[node[st.b]]
    ]

"""A supply rail's ripple in a channel's hum: the share of each stage that states the rectifier
feeding it and its supply rejection, and what each channel's figure covers.

A stage fed from a rail (``fed from NAME, rejection 20 dB``) puts the rail's ripple, less its
supply rejection (referred to its input), times its gain at the output: per harmonic of the mains,
the rail's rms ripple phasor × 10^((gain − rejection)/20). The rejection's phase is not stated, so
the supply's share is a group of its own that adds in power with the ground-borne groups (as every
source of unknown relative phase does in the budget); the stages fed from one rail add within that
group as the stages of a channel do, in magnitude for the worst case and as phasors for the signed
sum.

References: P. Horowitz, W. Hill, *The Art of Electronics*, 3rd ed., §9.1 (ripple on a supply
rail and a circuit's rejection of it); the Fourier series of the rail's periodic ripple.
"""

from __future__ import annotations

from ..core.units import ratio_of_db
from .rectifier import harmonic_phasors

__all__ = ["rail_of", "supply_shares", "coverage"]


def rail_of(result, tap: str):
    """The rail's voltage over one period: the reservoir's, or the rail its load is fed from.

    Parameters:
        result: a rectifier's steady state.
        tap: ``reservoir`` or ``output``.
    Returns:
        the voltage samples over one mains period, V.
    References:
        none (selection).
    """
    return result.voltage if tap == "reservoir" else result.rail_voltage()


def _rail_words(result, tap: str) -> str:
    if tap == "reservoir" or result.output_dc is None:
        return "reservoir"
    return "regulated output" if result.return_current is not None else "filter output"


def supply_shares(b, merged) -> None:
    """Add each fed stage's share of its rail's ripple to its channel's parts in ``merged``.

    Parameters:
        b: the hum budget (:class:`groundcheck.physics.hum.HumBudget`).
        merged: its merged parts (:class:`groundcheck.physics.humtotals.Merged`).
    Returns:
        None; the shares are added to ``merged`` under the group ``supply:RECTIFIER``.
    References:
        Horowitz and Hill, §9.1 (see the module).
    """
    nmax = int(max(b.freqs, default=0.0) // b.f0)
    for st in b.stages:
        if st.supply is None or st.supply not in b.rectifier_results or nmax < 1:
            continue
        ripple = harmonic_phasors(rail_of(b.rectifier_results[st.supply], st.supply_tap), nmax)
        scale = ratio_of_db(st.gain - st.supply_rejection)
        group = f"supply:{st.supply}"
        for f in b.freqs:
            k = int(round(f / b.f0))
            if abs(k * b.f0 - f) > 1e-6 or not 1 <= k <= nmax:
                continue
            share = complex(ripple[k]) * scale
            merged.out[st.channel][f][group] += share
            merged.in_phase[st.channel][f][group] += abs(share)
            merged.contrib[st.channel][("supply", st.name, group)][f] += share


def coverage(b, channel: str) -> dict:
    """What a channel's hum figure covers: the ground system and stray fields always; the supply
    ripple of the stages that state their supply; the rails left out, with their ripple.

    Parameters:
        b: the hum budget.
        channel: the channel's name.
    Returns:
        a dict: ``carried_by`` (list of words), ``supply_ripple`` (included, partly included, not
        included), ``fed`` (per fed stage: rectifier, rail, rejection), ``not_fed`` (the
        channel's stages without a stated supply) and ``rails_left_out`` (each rectifier whose
        rail no stage of the channel states, with its peak-to-peak ripple).
    References:
        none (bookkeeping).
    """
    stages = [s for s in b.stages if s.channel == channel]
    fed = [s for s in stages if s.supply is not None and s.supply in b.rectifier_results]
    not_fed = [s.name for s in stages if s not in fed]
    used = {s.supply for s in fed}
    left = []
    # the rectifiers of this channel, and those of no channel
    mine = {r.name for r in b.plan.rectifiers if r.channel in (None, channel)}
    for name, res in b.rectifier_results.items():
        if name in used or name not in mine:
            continue
        rail = res.ripple_pp if res.output_ripple_pp is None else res.output_ripple_pp
        left.append(
            {
                "rectifier": name,
                "rail": _rail_words(res, "output"),
                "ripple_pp_v": round(float(rail), 6),
            }
        )
    state = "not included" if not fed else ("partly included" if not_fed else "included")
    return {
        "carried_by": ["ground system", "stray fields"] + (["supply ripple"] if fed else []),
        "supply_ripple": state,
        "fed": [
            {
                "stage": s.name,
                "rectifier": s.supply,
                "rail": _rail_words(b.rectifier_results[s.supply], s.supply_tap),
                "rejection_db": s.supply_rejection,
            }
            for s in fed
        ],
        "not_fed": not_fed,
        "rails_left_out": left,
    }

"""Which of the plan's mechanisms the measured hum looks like: a non-negative least-squares fit of
the measured harmonic levels over the contributors' predicted spectra.

The fit is on magnitudes: a recording's lines carry no phase relation to the plan's, so each
mechanism's planned spectrum (its contributors' levels added in phase, the plan's own worst case)
is scaled by a factor of its own, a ≥ 0, and Σ a_g·|P_g(f_k)| is fitted to the measured levels,
each harmonic weighted by the inverse of its measured level (or of the noise, where the line is
below it), down to 40 dB below the strongest measured line: a relative error, so a line 40 dB down
counts as much as the fundamental, and a line further down, or one the plan predicts and the
recording lacks, counts as one 40 dB down. A line below the noise is fitted to zero, so a mechanism
whose planned lines the recording does not show is scaled down.

Contributors whose spectra have the same shape (the conductors one source's current runs through,
mostly resistive, give proportional spectra) cannot be told apart by any recording: they are one
mechanism, its conductors listed largest planned first.
"""

from __future__ import annotations

import numpy as np

from .records import Suspect

__all__ = ["Mechanism", "mechanisms", "fit", "SAME_SHAPE", "RELEVANT"]

#: two contributors whose spectra (as vectors over the harmonics) are closer than this cosine
#: are one shape
SAME_SHAPE = 0.999
#: contributors below this fraction of the channel's largest one (−80 dB) are left out of the fit
RELEVANT = 1e-4
#: the range of the relative weights, below the strongest measured line (40 dB)
RANGE = 1e-2


class Mechanism:
    """One shape of the plan: its source group, its members and its planned spectrum over the
    harmonics."""

    def __init__(self, group: str, members: list[tuple[str, float]], spectrum: np.ndarray):
        self.group = group
        self.members = members  # (label, planned level), largest first
        self.spectrum = spectrum  # planned |V| per harmonic (in phase)

    @property
    def planned(self) -> float:
        return float(np.sqrt((self.spectrum**2).sum()))


def _label(kind: str, name: str) -> str:
    return name if kind == "loop" else f"conductor {name}"


def mechanisms(lines: dict, plan_freqs: list[float]) -> list[Mechanism]:
    """The plan's mechanisms for one channel: contributors grouped by source and shape.

    Parameters:
        lines: (kind, element, group) -> {Hz: complex V}, the channel's contributors
        (``ChannelHum.lines``).
        plan_freqs: the plan's frequency of each harmonic compared, Hz.
    Returns:
        the mechanisms, largest planned first.
    References:
        none (bookkeeping: a cosine between spectra).
    """
    rows = []
    for (kind, name, group), per_f in lines.items():
        v = np.array([abs(per_f.get(f, 0.0)) for f in plan_freqs])
        rows.append((kind, name, group, v, float(np.sqrt((v**2).sum()))))
    top = max((r[4] for r in rows), default=0.0)
    rows = sorted(
        (r for r in rows if r[4] > max(RELEVANT * top, 1e-15)), key=lambda r: (-r[4], r[1])
    )
    out: list[Mechanism] = []
    for kind, name, group, v, level in rows:
        for m in out:
            if m.group == group and float(v @ m.spectrum) / (level * m.planned) > SAME_SHAPE:
                m.members.append((_label(kind, name), level))
                m.spectrum = m.spectrum + v
                break
        else:
            out.append(Mechanism(group, [(_label(kind, name), level)], v.copy()))
    return out


def fit(
    mechs: list[Mechanism], measured: np.ndarray, noise: np.ndarray, words, calibrated: bool = True
) -> tuple[list[Suspect], np.ndarray]:
    """Scale each mechanism's planned spectrum to the measured levels (non-negative least squares,
    relative
    weights) and rank them by the hum they add beyond the plan, then by what they explain.

    Parameters:
        mechs: the channel's mechanisms.
        measured: the measured level per harmonic (0 where the line is below the noise), V or
        relative units.
        noise: the noise in each line's bandwidth, same units.
        words: a function of a source group giving the mechanism in the trade's words.
        calibrated: whether the levels are volts (else the scales are relative and no excess is
        said).
    Returns:
        (the suspects, best first; the fitted level per harmonic).
    References:
        C. L. Lawson, R. J. Hanson, *Solving Least Squares Problems*, 1974 (NNLS, as
        scipy.optimize.nnls).
    """
    from scipy.optimize import nnls

    if not mechs:
        return [], np.zeros_like(measured)
    # relative weights over the 40 dB below the strongest measured line; a line further down (or
    # absent where the plan predicts one) counts as one 40 dB down, so that a few small planned
    # lines the recording lacks cannot scale away a mechanism that matches its main lines
    floor = RANGE * float(measured.max(initial=0.0))
    weight = 1.0 / np.maximum(np.maximum(np.maximum(measured, noise), floor), 1e-300)
    A = np.column_stack([m.spectrum for m in mechs])
    try:
        scale, _ = nnls(A * weight[:, None], measured * weight, maxiter=50 * len(mechs) + 100)
    except RuntimeError:  # did not converge: no fit rather than a wrong one
        scale = np.zeros(len(mechs))
    fitted = A @ scale
    power = float((measured**2).sum()) or 1.0
    suspects = []
    for m, a in zip(mechs, scale):
        explained = float(a) * m.planned
        suspects.append(
            Suspect(
                words(m.group),
                m.group.split(":", 1)[-1],
                tuple(lab for lab, _ in m.members),
                m.planned,
                float(a),
                explained,
                max(explained - m.planned, 0.0) if calibrated else 0.0,
                round(100 * explained**2 / power, 1),
            )
        )
    suspects.sort(key=lambda s: (-s.excess, -s.explained, s.members))
    return suspects, fitted

"""The loops' pickup at the outputs: each field source's direction per channel, and what it puts
there.

The frequencies' solves give, per unit flux through each loop, the drop it leaves across every
stage (at the output) and the loop's current (:meth:`groundcheck.physics.hum.HumBudget._pickup`).
Here each field source's fluxes are applied: for each channel its stated axis, or the direction
worst at that channel's output (:func:`groundcheck.physics.orient.worst_axis`, the
threshold-weighted total); the channel's hum from the source at each frequency is Σ_k |Σ_l
D_kl·Φ_l| over its stages (added in magnitude, as a stage may invert; the loops of one source add
as phasors, their EMFs having one phase).  Each loop's row in the pickup table gives the EMF at the
direction that puts the most flux through that loop alone (or the stated axis).

References: Faraday's law; :mod:`groundcheck.physics.orient`; ISO 226:2003 (the weights).
"""

from __future__ import annotations

import math

import numpy as np

from .impedance import resistivity
from .hearing import heard_threshold
from .heater_field import pair_geometry, pair_path_flux
from .hum_rows import FieldAxis, LoopPickup, PickupLine, SourcePickup
from .humtotals import FLOOR_V
from .orient import AXES, channel_objective, fixed_fluxes, source_fluxes, stated_axis, worst_axis
from .plate_paths import loop_passages
from .workload import check_search

__all__ = [
    "at_line",
    "field_pickup",
    "flux_models",
    "pickup_columns",
    "source_lines",
    "MEASURE_WEIGHTED",
    "MEASURE_RMS",
]

#: what the worst direction maximises, as the JSON names it
MEASURE_WEIGHTED = "threshold-weighted total"
MEASURE_RMS = "rms total"


def source_lines(src, f0: float, freqs) -> list[tuple[float, float]]:
    """(frequency, level relative to the fundamental) of a field source's lines among the given
    frequencies.

    Parameters:
        src: the field source (or AC heater pair).
        f0: the mains frequency, Hz.
        freqs: the frequencies, Hz.
    Returns:
        (frequency, ratio to the fundamental) of each line found among them.
    References:
        none (bookkeeping).
    """
    scale = {1: 1.0, **{n: ratio for n, ratio in src.harmonics}}
    return [(f, ratio) for n, ratio in scale.items() for f in freqs if abs(n * f0 - f) <= 1e-9]


def flux_models(b, plan, circuit, loops) -> dict:
    """Each field source's and AC heater pair's flux through the loops that take an EMF, as a
    function of its direction (:mod:`groundcheck.physics.orient`); with the inductive plate spread
    (``b.plate_current``), per line of each source (:mod:`groundcheck.physics.plate_spread`).

    Parameters:
        b: the hum budget (its loops taking an EMF, field sources, AC heater pairs, frequencies).
        plan, circuit, loops: the plan, its circuit and its independent loops.
    Returns:
        source name -> its LoopFluxes.
    References:
        :mod:`groundcheck.physics.orient`; :mod:`groundcheck.physics.heater_field`.
    """
    closed = {li: [*loops[li].polygon, loops[li].polygon[0]] for li in b.pick_loops}
    passages = loop_passages(plan, circuit, loops)
    if b.plate_current == "inductive":
        from .plate_spread import line_fluxes

        rho = lambda metal: resistivity(metal.material, plan.ambient)
        build = lambda src: line_fluxes(
            src, closed, passages, [f for f, _ in source_lines(src, b.f0, b.freqs)], rho
        )
    else:
        build = lambda src: source_fluxes(src, closed, passages)
    models, searched = {}, 0
    for src in plan.fields:  # a sized source's searches counted before any of them runs
        models[src.name] = build(src)
        searched = check_search(src, models[src.name], len(b.channels), searched)
    for name, (_, h) in b.pairs.items():
        spacing, height = pair_geometry(h)
        models[name] = fixed_fluxes(
            b.fields[name],
            b.pick_loops,
            [
                pair_path_flux(h.route, spacing, height, h.current, closed[li])
                for li in b.pick_loops
            ],
        )
    return models


def field_pickup(b, merged) -> dict[str, list[dict]]:
    """Apply every field source's fluxes to the merged budget: each channel's output groups and
    contributors, and the pickup table's rows; return each channel's directions.

    Parameters:
        b: the hum budget (:class:`groundcheck.physics.hum.HumBudget`).
        merged: its merged frequencies (:class:`groundcheck.physics.humtotals.Merged`), with
        ``pickup``.
    Returns:
        channel -> one row per oriented field source: the direction used and the hum it and the
        axes give.
    References:
        the module's description.
    """
    out: dict[str, list[dict]] = {ch: [] for ch in b.channels}
    if not merged.pickup or not b.models:
        return out
    freqs = sorted(merged.pickup)
    weighed = {ch: _weights(b.listening_of(ch), freqs) for ch in b.channels}
    stages = {
        ch: [k for k, st in enumerate(b.stages) if b.valid_stage[k] and st.channel == ch]
        for ch in b.channels
    }
    for name, model in b.models.items():
        src = b.fields[name]
        spectrum = source_lines(src, b.f0, freqs)
        if not spectrum:
            continue
        for ch, ks in stages.items():
            verdict, weight = weighed[ch]
            parts = [
                (ratio * _on_columns(model, f, merged.pickup[f][0][ks]), weight[f])
                for f, ratio in spectrum
            ]
            if model.oriented and not any(np.any(G) for G, _ in parts):
                continue  # no stage of the channel reads any loop: nothing to add
            if model.oriented:
                m, row = _channel_axis(
                    model, parts, src, MEASURE_WEIGHTED if verdict else MEASURE_RMS
                )
                if row.worst_level >= FLOOR_V:  # below, the source puts nothing at this output
                    out[ch].append(row)
                phi = model.fluxes(m)[0]
                b.directions[(ch, name)] = m
            else:
                phi = model.fixed
            _apply(
                b,
                merged,
                ch,
                ks,
                f"field:{name}",
                [(f, r, merged.pickup[f][0], at_line(model, f, phi)) for f, r in spectrum],
            )
        _loop_rows(b, merged, model, spectrum)
    return out


def _weights(listening, freqs) -> tuple[bool, dict]:
    """Whether a channel's hum gets a verdict, and each frequency's weight in its worst
    direction's measure: 1 over the threshold of hearing's power (through its own listening),
    else 1."""
    verdict = listening is not None and listening.verdict
    return verdict, {
        f: 10 ** (-heard_threshold(f, listening.background) / 10) if verdict else 1.0
        for f in freqs
    }


def _level(model, parts, m) -> float:
    """The source's rms total at the channel's output for the direction m (V)."""
    return float(math.sqrt(channel_objective([(G, 1.0) for G, _ in parts])(model.fluxes(m))[0]))


def _channel_axis(model, parts, src, measure_name: str) -> tuple[np.ndarray, dict]:
    """The direction used for one channel (stated, or worst at its output) and the channel's
    row."""
    worst = _quadratic_worst(model, parts)
    if worst is None:
        worst, _ = worst_axis(model, channel_objective(parts))
    stated = stated_axis(src)
    used = worst if stated is None else stated
    axes = {}
    for word, vec in AXES.items():
        v = np.array(vec, dtype=float)
        axes[word] = (
            _level(model, parts, v) if np.allclose(model.admit(v[None, :])[0], v) else None
        )
    return used, FieldAxis(
        src.name,
        model.model,
        src.axis,
        _vector(used),
        "stated" if stated is not None else "worst at the output",
        measure_name,
        _level(model, parts, used),
        _vector(worst),
        _level(model, parts, worst),
        axes,
    )


def _vector(m) -> tuple[float, float, float]:
    return (float(m[0]), float(m[1]), float(m[2]))


def _on_columns(model, f: float, G: np.ndarray) -> np.ndarray:
    """The drops per unit flux of the loops (stages × loops) as drops per unit flux of the model's
    columns at the line f (the same, but for a model whose columns differ by line)."""
    return G if model.combine is None else G @ model.combine[f].T


def at_line(model, f: float, phi: np.ndarray) -> np.ndarray:
    """The loops' fluxes at a line from the model's columns' fluxes.

    Parameters:
        model: a source's LoopFluxes.
        f: the line's frequency, Hz.
        phi: the fluxes of the model's columns (the last axis), Wb.
    Returns:
        the loops' fluxes at the line (complex where the model's columns differ by line), Wb.
    References:
        none (bookkeeping of the inductive plate spread's columns).
    """
    return phi if model.combine is None else phi @ model.combine[f]


def _apply(b, merged, ch: str, ks: list, group: str, spectrum) -> None:
    """Add a source's drops, for each line's fluxes phi, to the channel's output group, worst case
    and contributors."""
    for f, ratio, D, phi in spectrum:
        drops = ratio * D[ks] * phi[None, :]  # the channel's stages × loops
        per_stage = drops.sum(axis=1)
        merged.out[ch][f][group] += complex(per_stage.sum())
        merged.in_phase[ch][f][group] += float(np.abs(per_stage).sum())
        for col, li in enumerate(b.pick_loops):
            share = complex(drops[:, col].sum())
            if share != 0:
                merged.contrib[ch][("loop", f"loop {li + 1}", group)][f] += share


def _loop_rows(b, merged, model, spectrum) -> None:
    """The pickup table's rows of one source: per loop, the EMF and current at each frequency for
    the direction that puts the most flux through that loop alone (or the stated axis)."""
    src = b.fields[model.src.name]
    stated = stated_axis(src) if model.oriented else None
    first = spectrum[0][0]
    for col, li in enumerate(b.pick_loops if model.combine is not None else model.loops):
        if not model.oriented:
            m, phis = np.zeros(3), np.full(len(spectrum), float(model.fixed[col]))
        else:
            m = stated if stated is not None else _loop_worst(model, col, first)
            all_cols = model.fluxes(m)[0]
            phis = np.array([at_line(model, f, all_cols)[col] for f, _ in spectrum])
        info = b.loops[li]
        row = merged.loop_rows.setdefault(
            li, LoopPickup(li + 1, list(info.loop.nodes), info.closed_by, info.area)
        )
        row.sources[src.name] = SourcePickup(
            # a loop of no area to speak of (its conductors in line) has no mean flux density
            abs(phis[0]) / info.area if (info.area or 0) > AREA_FLOOR else None,
            b.closest(src.name, info.polygon),
            src.height,
            _vector(m),
            src.axis,
            model.model,
            src.size,
            tuple(
                PickupLine(
                    f,
                    2 * math.pi * f * abs(ratio * phi),
                    float(abs(ratio * phi * merged.pickup[f][1][col])),
                )
                for (f, ratio), phi in zip(spectrum, phis)
            ),
        )


#: a loop's outline enclosing less than this (m²: 1 µm², rounding on collinear conductors) has
#: no area
AREA_FLOOR = 1e-12

#: a loop's largest flux below this (Wb: under 1 pV of EMF at 150 Hz) gives it no worst direction
#: of its own; the report then shows z
FLUX_FLOOR = 1e-15


def _loop_worst(model, col: int, line: float) -> np.ndarray:
    """The direction that puts the most flux through one loop (at the source's first line where
    the fluxes differ by line): for the dipole F/|F| (Cauchy–Schwarz, the flux being F·m̂), for the
    ring the search."""
    if model.combine is not None:
        c = model.combine[line][:, col]
        cols = np.flatnonzero(c)
        m, top = worst_axis(model.only(cols), lambda p: np.abs(p @ c[cols]) ** 2)
        return m if math.sqrt(max(top, 0.0)) > FLUX_FLOOR else np.array([0.0, 0.0, 1.0])
    if model.F is None:
        m, top = worst_axis(model.only(col), lambda p: p[:, 0] ** 2)
        # a loop with no flux to speak of has no worst direction: its search meets rounding only
        return m if math.sqrt(max(top, 0.0)) > FLUX_FLOOR else np.array([0.0, 0.0, 1.0])
    F = model.F[col]
    norm = float(np.linalg.norm(F))
    if norm <= FLUX_FLOOR:
        return np.array([0.0, 0.0, 1.0])
    m = F / norm
    k = int(np.argmax(np.abs(m)))
    return m if m[k] > 0 else -m


def _quadratic_worst(model, parts) -> np.ndarray | None:
    """For the dipole and a channel of one stage the measure is a quadratic form, Σ_f w·|c_f·m̂|² =
    m̂ᵀ·S·m̂ with S = Σ_f w·Re(c̄_f c_fᵀ), c_f = G_f·F: its largest eigenvector, exactly (the
    Rayleigh quotient); else None."""
    if model.F is None or any(G.shape[0] != 1 for G, _ in parts):
        return None
    S = np.zeros((3, 3))
    for G, weight in parts:
        c = (G @ model.F)[0]
        S += weight * np.real(np.outer(np.conj(c), c))
    w, V = np.linalg.eigh(S)
    m = V[:, int(np.argmax(w))]
    k = int(np.argmax(np.abs(m)))
    return m if m[k] > 0 else -m


def pickup_columns(circuit, loops, names) -> tuple[list, np.ndarray, np.ndarray]:
    """The loops that take a series EMF (an outline, and a chord that is a branch): their indices,
    each one's chord branch and the EMF's sign along it (+1 when the branch runs the loop's way).

    Parameters:
        circuit: the circuit.
        loops: the independent loops.
        names: conductor name -> branch index.
    Returns:
        (loop indices, chord branches, signs).
    References:
        Faraday's law (the loop's EMF in series with its chord).
    """
    cols, branch, sign = [], [], []
    for li, info in enumerate(loops):
        if info.polygon is None:
            continue
        lp = info.loop
        bi = names.get(lp.edges[lp.chord])
        if bi is None:
            continue
        b = circuit.branches[bi]
        start = lp.nodes[lp.chord]
        forward = b.n1 == circuit.point_node.get(start) or b.n1 in circuit.nodes_of_metal(start)
        cols.append(li)
        branch.append(bi)
        sign.append(1.0 if forward else -1.0)
    return cols, np.array(branch, dtype=int), np.array(sign)

"""The hum budget's stated and simulated currents at one frequency: each one's voltage at every
channel's output, its largest conductor shares, and the JSON ``network`` section's rows.

By reciprocity a branch's share of a channel is its drop Z_b·I_b under the source times the
channel's test current in that branch (every stage's 1 A test weighted by its gain); a source's
output is the sum of its shares.  A group's sources (the rectifiers, the leakage currents: one
mains line, their phasors added) have their drops summed first, so a conductor's share of the
group is exact; the ten largest shares are named per group and channel, the rest summed as "other
conductors" (see :mod:`groundcheck.physics.hum` for how the parts are combined).

References: reciprocity (Penfield, Spence, Duinker, *Tellegen's Theorem and Electrical Networks*,
1970).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .coupling import channel_tests, source_injections
from .sources import LEAKAGE_GROUP, source_group
from .ranking import largest

__all__ = [
    "source_part",
    "pooled_shares",
    "run_columns",
    "Runs",
    "TOP_SHARES",
    "NETWORK_ROWS",
    "SOURCE_CHUNK",
]

#: conductors named per source and stage as hum contributors (the rest are summed)
TOP_SHARES = 10

#: conductors listed per source in the JSON ``network`` section (the largest currents)
NETWORK_ROWS = 50

#: sources solved together in the hum budget (their branches × sources arrays bound the memory)
SOURCE_CHUNK = 128


class Runs(NamedTuple):
    """Conductors in series as one column each (:func:`run_columns`)."""

    #: the branches in no run
    singles: np.ndarray
    #: the runs' branches, run by run
    members: np.ndarray
    #: each run's branches as a list
    groups: list
    #: runs × members, a one where the member belongs to the run: Σ of a run's shares by one
    #: sparse product
    gather: object
    #: each column's place in the canonical order: the single branches', then each run's first
    rank: np.ndarray
    #: each column's branches: a single branch's alone, then each run's
    cols: list


def run_columns(owners: list[str], runs: dict, rank: np.ndarray) -> Runs | None:
    """The branches of conductors in series (``runs``: each conductor of a run -> the run's
    conductors) as one column each run, so that a conductor written in two pieces takes one of the
    TOP_SHARES places, as it is one contributor; ``None`` when no run joins two branches.

    Parameters:
        owners: each branch's owner.
        runs: the runs in series (:func:`groundcheck.rules.hum_rules.series_runs`).
        rank: each branch's place in the canonical order
            (:func:`groundcheck.physics.coupling.owner_ranks`).
    Returns:
        the :class:`Runs`, or ``None``.
    References:
        Kirchhoff's current law (a run carries one current).
    """
    from scipy.sparse import csr_matrix

    keyed: dict[tuple, list[int]] = {}
    for bi, o in enumerate(owners):
        run = runs.get(o)
        if run is not None:
            keyed.setdefault(run, []).append(bi)
    groups = [sorted(m) for m in keyed.values() if len(m) > 1]
    if not groups:
        return None
    grouped = {bi for m in groups for bi in m}
    singles = np.array([bi for bi in range(len(owners)) if bi not in grouped], dtype=int)
    members = np.array([bi for m in groups for bi in m], dtype=int)
    which = np.array([g for g, m in enumerate(groups) for _ in m], dtype=int)
    gather = csr_matrix(
        (np.ones(len(members)), (which, np.arange(len(members)))),
        shape=(len(groups), len(members)),
    )
    order = np.concatenate([rank[singles], [min(rank[m] for m in r) for r in groups]])
    cols = [[int(bi)] for bi in singles] + groups
    return Runs(singles, members, groups, gather, order.astype(int), cols)


def _largest(mags, rank):
    """The TOP_SHARES largest of each row, equal ones (to 1e-9 of the row's largest) taken in the
    owners' canonical order (``rank``: :func:`groundcheck.physics.coupling.owner_ranks`), neither
    by their names nor by the order the plan writes its conductors in."""
    nb = mags.shape[1]
    k = min(nb, TOP_SHARES + 8)
    near = np.argpartition(mags, nb - k, axis=1)[:, nb - k :]
    rows = np.arange(len(mags))[:, None]
    peak = np.maximum(mags.max(axis=1), 1e-300)[:, None]
    q = np.round(mags[rows, near] / peak, 9)
    order = np.lexsort((rank[near], -q), axis=1)
    out = near[rows, order[:, :TOP_SHARES]]
    if near.shape[1] < nb:
        # a row whose tenth share ties with the last one sought may have more equal ones
        # outside them: chosen among the whole row (shares under a thousandth of the largest
        # are never named, so their ties do not matter)
        ends = np.take_along_axis(q, order[:, [TOP_SHARES - 1, -1]], axis=1)
        for r in np.flatnonzero((ends[:, 0] == ends[:, 1]) & (ends[:, 0] >= 1e-3)):
            qr = np.round(mags[r] / peak[r], 9)
            out[r] = np.lexsort((rank, -qr))[:TOP_SHARES]
    return out


def source_part(b, f: float, fac, active: list, part) -> None:
    """Each stated or simulated current's branch drops, summed per source group into ``part``
    (their outputs and conductor shares follow once the frequency is whole:
    :func:`pooled_shares`); the sources are solved SOURCE_CHUNK at a time, so a large
    installation's branches × sources arrays stay small (the channels' test currents are solved
    once).

    Parameters:
        b: the hum budget (:class:`groundcheck.physics.hum.HumBudget`).
        f: the frequency, Hz.
        fac: the circuit factorised at f.
        active: the sources with a part at f.
        part: the frequency's part, filled in (group drops, test currents, worst case,
            network rows, probes).
    Returns:
        None.
    References:
        reciprocity (Penfield, Spence, Duinker, 1970); the module's description.
    """
    gains = b.gains_at(fac)
    tests = (
        b.tests
        if not any(x is not None for x in b.across)
        else channel_tests(
            b.circuit,
            [b.stages[k] for k in b.valid_idx],
            b.channels,
            gains[b.valid_idx],
        )
    )
    TC = fac.solve(tests).I  # branches × channels
    for lo in range(0, len(active), SOURCE_CHUNK):
        _source_chunk(b, f, fac, active[lo : lo + SOURCE_CHUNK], gains, TC, part)


def _source_chunk(b, f, fac, active, gains, TC, part) -> None:
    leakage = b.plan.index.leakage
    alone, summed = _columns(b, f, active, leakage)
    J = source_injections(b.circuit, alone, f)
    if summed:
        J = np.column_stack([J, _summed_injection(b.circuit, summed, f)])
    both = fac.solve(J)
    # each column's group: a source's own, then the leakage currents summed (one mains line)
    groups = [source_group(s.kind, s.name, leakage) for s in alone]
    leak = np.array([s.name in leakage for s in alone] + [True] * bool(summed), dtype=bool)
    groups += [LEAKAGE_GROUP] * bool(summed)
    if b.probe_a.size:
        dv = both.V[b.probe_a] - both.V[b.probe_b]  # probes × columns
        power = (np.abs(dv[:, ~leak]) ** 2).sum(axis=1)
        part.probes = power if part.probes is None else part.probes + power
        together = dv[:, leak].sum(axis=1)
        part.probe_leak = together if part.probe_leak is None else part.probe_leak + together
    # each stage's own drop (node voltages of the source solves) from each group, its sources'
    # phasors added (the rectifiers, the leakage currents: one mains line), for the worst case:
    # every stage in phase (folded in once the frequency is whole, Merged.fold)
    stage_v = (both.V[b.stage_a] - both.V[b.stage_b]) * np.abs(gains[b.valid_idx])[:, None]
    at = part.stage_drops
    for g in dict.fromkeys(groups):
        v = stage_v[:, [j for j, x in enumerate(groups) if x == g]].sum(axis=1)
        at[g] = at[g] + v if g in at else v
    _network_rows(b, f, fac, alone, both, part)
    # by reciprocity a branch's share of a channel is its drop Z_b·I_b (both.dv: no EMF here)
    # times the channel's test current in it: a group's drops are summed here (its sources'
    # phasors added) and its shares ranked once the frequency is whole (:func:`pooled_shares`),
    # so that a conductor's share of a group is its whole share, not a sum of each source's ten
    # largest
    pooled = part.pooled
    for g in dict.fromkeys(groups):
        cols = [j for j, x in enumerate(groups) if x == g]
        z = both.dv[:, cols].sum(axis=1) if len(cols) > 1 else both.dv[:, cols[0]]
        pooled[g] = pooled[g] + z if g in pooled else z.copy()
    part.tests = TC


def _summed_injection(circuit, sources, f: float) -> np.ndarray:
    """The sum of the sources' injected currents at f (a node's entries added in the sources'
    order), A."""
    j = np.zeros(len(circuit.nodes), dtype=complex)
    for s in sources:
        i = s.parts.get(f, 0)
        j[circuit.point_node[s.a]] += i
        j[circuit.point_node[s.b]] -= i
    return j


def _columns(b, f, active, leakage) -> tuple[list, list]:
    """The sources solved each in a column of its own, and the leakage currents solved as one
    column of their sum: at a frequency past a leakage current's first, nothing is read of it
    alone (its network rows are read at its first frequency, :func:`_network_rows`) and all that
    is read of the group — its stages' drops, its branches' drops, its probes' voltage — adds
    (superposition)."""
    alone, summed = [], []
    for s in active:
        later = s.kind != "rectifier" and s.name in leakage and f != min(s.parts)
        (summed if later else alone).append(s)
    return alone, summed


def pooled_shares(b, pooled: dict, TC, sink) -> None:
    """Each source group's output in each channel and its largest conductor shares, once a
    frequency's sources are all solved: added to ``sink`` (its ``out`` and ``contrib`` lists).

    Parameters:
        b: the hum budget (:class:`groundcheck.physics.hum.HumBudget`).
        pooled: each group -> its sources' branch drops Z_b·I_b summed (their phasors added), V.
        TC: the channels' test currents in each branch (branches × channels), A per A.
        sink: filled in (``out``: (channel, group, phasor); ``contrib``: (channel, label,
            phasor)).
    Returns:
        None.
    References:
        reciprocity (Penfield, Spence, Duinker, 1970); the module's description.
    """
    groups = list(pooled)
    zi = np.column_stack([pooled[g] for g in groups])  # branches × groups
    drops = np.ascontiguousarray(np.abs(zi).T)
    v_all = zi.T @ TC  # groups × channels
    mags = np.empty_like(drops)
    for ci, ch in enumerate(b.channels):
        np.multiply(drops, np.abs(TC[:, ci])[None, :], out=mags)
        _shares(b, ch, mags, zi, TC[:, ci], v_all[:, ci], groups, sink)


def _shares(b, ch, mags_all, zi, tc, v_all, groups, part) -> None:
    """Each group's output in one channel and its largest conductor shares (``mags_all``:
    groups × branches, each branch's |share|; the share itself is zi·tc, ``zi`` branches ×
    groups); the rest, each below the tenth largest, summed as other.  Conductors in series
    (``b.runs``, :func:`run_columns`) are ranked as one, by the size of their summed share."""
    if b.runs is not None:
        _run_shares(b, ch, mags_all, zi, tc, v_all, groups, part)
        return
    nb = mags_all.shape[1]
    rows = np.arange(len(groups))[:, None]
    tops = _tops(mags_all, b.owner_rank, len(groups))
    top_shares = zi[tops, rows] * tc[tops]  # groups × TOP_SHARES
    _emit(b, ch, mags_all[rows, tops], top_shares, tops, None, v_all, groups, part, nb)


def _run_shares(b, ch, mags_all, zi, tc, v_all, groups, part) -> None:
    """:func:`_shares` with the runs in series as one column each: the single branches' |share|
    and each run's |Σ share| side by side, ranked together."""
    singles, members, _, gather, rank, cols = b.runs
    # each run's Σ share per group, its members' shares added in their order
    run_sum = np.asarray(gather @ (zi[members, :] * tc[members, None])).T  # groups × runs
    mags = np.concatenate([mags_all[:, singles], np.abs(run_sum)], axis=1)
    rows = np.arange(len(groups))[:, None]
    tops = _tops(mags, rank, len(groups))
    ns = len(singles)
    row_of = np.broadcast_to(rows, tops.shape)
    single = tops < ns
    top_shares = np.empty(tops.shape, dtype=complex)
    picked = singles[tops[single]]
    top_shares[single] = zi[picked, row_of[single]] * tc[picked]
    top_shares[~single] = run_sum[row_of[~single], tops[~single] - ns]
    _emit(
        b,
        ch,
        mags[rows, tops],
        top_shares,
        tops,
        cols,
        v_all,
        groups,
        part,
        mags.shape[1],
        (zi, tc),
    )


def _tops(mags, rank, n):
    """The columns of the TOP_SHARES largest per row (all, when there are no more)."""
    nb = mags.shape[1]
    if nb > TOP_SHARES:
        return _largest(mags, rank)
    return np.broadcast_to(np.arange(nb), (n, nb))


#: an output within this fraction of its largest share is the shares' rounding, not a figure
CANCELLED = 64 * np.finfo(float).eps


def _emit(b, ch, top_mags, top_shares, tops, cols, v_all, groups, part, ncols, each=None):
    """Each group's output and its named shares (a column's branches each under its owner, a
    run's members with their own shares; ``cols`` ``None``: each column is its branch) into
    ``part``; the rest as other conductors."""
    owners = b.owners
    # the largest share is among the tops
    peak = top_mags.max(axis=1) if ncols else np.zeros(len(groups))
    kept = top_mags > 1e-3 * np.maximum(peak, 1e-300)[:, None]
    rests = (v_all - np.where(kept, top_shares, 0).sum(axis=1)).tolist()
    # plain Python numbers from here: the merge adds tens of thousands of them one by one
    v_list, tops_list = v_all.tolist(), tops.tolist()
    shares_list, kept_list, peak_list = top_shares.tolist(), kept.tolist(), peak.tolist()
    many = ncols > TOP_SHARES
    for si, group in enumerate(groups):
        v_out = v_list[si]
        # shares that cancel to within their rounding (a balanced bridge) leave no output: the
        # same whether the rounding leaves an exact zero or noise (resistances scaled by ten)
        if abs(v_out) <= CANCELLED * peak_list[si]:
            continue
        part.out.append((ch, group, v_out))
        for col, share, keep in zip(tops_list[si], shares_list[si], kept_list[si]):
            if not keep:
                continue
            if cols is None or len(cols[col]) == 1:
                bi = col if cols is None else cols[col][0]
                part.contrib.append((ch, ("conductor", owners[bi], group), share))
                continue
            zi, tc = each  # a member's own share
            for bi in cols[col]:
                own = complex(zi[bi, si] * tc[bi])
                part.contrib.append((ch, ("conductor", owners[bi], group), own))
        rest = rests[si]
        if many and abs(rest) > 1e-3 * abs(v_out):
            part.contrib.append((ch, ("conductor", "other conductors", group), rest))


def _network_rows(b, f, fac, active, both, part) -> None:
    """The JSON network section's rows: each source's largest branch currents at its first
    frequency."""
    circuit = b.circuit
    admittance = np.abs(fac.y)
    for si, s in enumerate(active):
        first = abs(f - 2 * b.f0) < 1e-9 if s.kind == "rectifier" else f == min(s.parts)
        if not first:
            continue
        mags = np.abs(both.dv[:, si]) * admittance  # |I|
        sig = np.flatnonzero(mags > 1e-3 * abs(s.parts[f]))
        sig = sig[largest(mags[sig], NETWORK_ROWS)]
        I = both.dv[sig, si] * fac.y[sig]
        part.network.append(
            {
                "source": s.name,
                "frequency_hz": f,
                "source_current_a": abs(s.parts[f]),
                "conductors": [
                    {
                        "branch": circuit.branches[bi].name,
                        "current_a": float(abs(i)),
                        "drop_v": float(abs(i * fac.z[bi])),
                    }
                    for bi, i in zip(sig, I)
                ],
            }
        )

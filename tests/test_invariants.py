"""Invariants that prove the model has no favourites, as property tests over generated plans
(tests/invariantplans.py; benchmarks/fuzz_campaign.py --invariants N runs many more):

- a block placed twice, mirrored in x or in y, gives the two channels identical figures;
- renaming every element changes no figure;
- renaming every element and writing the statements in another order lists the same loops, makes
  the same findings and the same figures (elements that differ in nothing but their names, such as
  two identical wires side by side, count as one);
- adding an element connected to nothing changes no figure;
- scaling every resistance by k scales every drop by k (plans of stated resistances).

"Identical" is to 1e-9 relative (with a floor of 1e-15 V or Ω, far below any figure printed)."""

from __future__ import annotations

import dataclasses
import re
from random import Random

import numpy as np
from hypothesis import HealthCheck, Phase, given, settings, strategies as st

from groundcheck import analyze, load_text
from groundcheck.physics.coupling import LISTED_TRANSFER
from groundcheck.physics.humtotals import FLOOR_V
from groundcheck.physics.plate import contact_groups, reduce_plate
from groundcheck.rules.context import AuditContext
from groundcheck.rules.stars import rule_stars
from figures import differences, result_figures
from invariantplans import (
    AREAS,
    Block,
    Mirrored,
    Resistive,
    mirrored_plans,
    mirrored_text,
    resistive_plans,
    resistive_text,
)
from rewrites import reordered

REL, FLOOR = 1e-9, 1e-15
#: a modest count in the default suite; the campaign runs thousands
EXAMPLES = dict(
    deadline=None,
    database=None,
    derandomize=True,
    suppress_health_check=[HealthCheck.too_slow],
    phases=[Phase.explicit, Phase.reuse, Phase.generate, Phase.shrink],
)


def _close(a: float, b: float) -> bool:
    return abs(a - b) <= REL * max(abs(a), abs(b)) + FLOOR


def _same(got: dict, want: dict) -> list[str]:
    """The keys where two figure dicts differ (a missing key is a difference)."""
    return [
        f"{k}: {got.get(k)!r} != {want.get(k)!r}"
        for k in sorted(set(got) | set(want), key=str)
        if k not in got or k not in want or not _close(got[k], want[k])
    ]


def _swap(name: str) -> str:
    """The element of the other channel: left <-> right."""
    for a, b in (("left", "right"), ("right", "left")):
        if name.startswith(a):
            return b + name[len(a) :]
    return name


def _group(group: str, swap) -> str:
    """A hum source group ('current:NAME', 'rectifier charging') with its name passed through
    ``swap``."""
    kind, colon, name = group.rpartition(":")
    return kind + colon + swap(name) if colon else group


def _channel_figures(result, ch: str, swap=lambda s: s) -> dict:
    """A channel's hum (total, signed, per frequency, per contributor, per source group) and its
    stages' transfer resistances, keyed by names passed through ``swap``."""
    h = result.hum.channels[ch]

    def element(name: str):
        """An element by its name, a listed loop ("loop N") by its conductors."""
        if name.startswith("loop ") and name[5:].isdigit():
            return frozenset(swap(e) for e in result.loops[int(name[5:]) - 1].loop.edges)
        return swap(name)

    out = {"total": h.total_v, "signed": h.signed_v}
    out |= {("f", s.frequency): s.volts for s in h.spectrum}
    out |= {("c", element(c.element), swap(c.source)): c.volts for c in h.contributors}
    out |= {("g", _group(g, swap)): v for g, v in result.hum.levels[ch].items()}
    out |= {
        ("t", swap(c.stage), swap(c.source)): c.transfer
        for c in result.coupling
        if c.stage.startswith(ch + ".")
    }
    return out


def _all_figures(result) -> list[float]:
    """Every figure of a result with the names left out, in order of size: hum totals, spectra and
    contributors, transfer resistances, protective path resistances."""
    out = []
    for h in result.hum.channels.values():
        out += (
            [h.total_v, h.signed_v]
            + [s.volts for s in h.spectrum]
            + [c.volts for c in h.contributors]
        )
    out += [c.transfer for c in result.coupling]
    if result.safety is not None:
        out += [p.path_resistance for p in result.safety.parts]
    return sorted(out)


def _same_lists(a: list[float], b: list[float]) -> bool:
    return len(a) == len(b) and all(_close(x, y) for x, y in zip(a, b))


def test_disc_on_the_grid_takes_the_nodes_on_its_circle():
    """A 4 mm fastening on a 2 mm grid holds the lattice points with i² + j² <= 2² — 1 + 4 + 4
    + 4 = 13, counted by hand — wherever it sits; the exact d² <= r² took 11 at (380, 40), 9 at
    its mirror image (380, 160) and 13 at (20, 40) on this grid."""
    w, d, h = 0.4, 0.2, 0.002
    xs, ys = np.linspace(0, w, 201), np.linspace(0, d, 101)
    X, Y = (a.ravel() for a in np.meshgrid(xs, ys))
    for c in ((0.38, 0.04), (0.38, 0.16), (0.02, 0.04), (0.02, 0.16), (0.2, 0.1), (0.123, 0.077)):
        g = contact_groups(X, Y, [c], 4e-3, h)
        want = 13 if all(abs(v / h - round(v / h)) < 1e-9 for v in c) else None
        if want:
            assert np.count_nonzero(g == 0) == want, c
    # two discs that share nodes: a node belongs to the nearer centre, one as near to both to
    # neither, whatever the order the contacts are given in
    two = [(0.1, 0.1), (0.106, 0.1)]
    a, b = contact_groups(X, Y, two, 4e-3, h), contact_groups(X, Y, two[::-1], 4e-3, h)
    assert np.array_equal(a == 0, b == 1) and np.array_equal(a == 1, b == 0)
    assert np.count_nonzero(a == 0) == np.count_nonzero(a == 1)


def test_mirrored_fastenings_have_mirrored_resistances():
    """On a 400 x 200 mm plate, the resistance from a fastening at (380, 40) mm to the centre
    equals its mirror image's at (380, 160) and at (20, 40) (before, 3.5-4.8 % apart)."""
    args = (0.4, 0.2, 2e-3, 2.65e-8)
    r = [
        reduce_plate(*args, [c, (0.2, 0.1)], ["a", "b"], estimate_error=False).resistance(0, 1)
        for c in ((0.38, 0.04), (0.38, 0.16), (0.02, 0.04), (0.02, 0.16))
    ]
    assert all(_close(x, r[0]) for x in r[1:]), r


def test_overlapping_discs_mirrored_about_a_fastening_between_them_are_alike():
    """Found by the campaign: fastenings at (4, 26) and (4, 34) mm, mirrored about one at (4, 30)
    whose disc both overlap (4 mm radius). A grid edge entered by two discs at one place, their
    centres equally near its middle, went to whichever centre was nearer by the last bit of a
    rounded position: 274 kS to one side and 324 kS to the other (18 % apart)."""
    contacts = [(0.004, 0.030), (0.004, 0.026), (0.004, 0.034)]
    g = reduce_plate(
        0.12, 0.06, 2e-3, 2.65e-8, contacts, ["axis", "low", "high"], estimate_error=False
    ).conductance
    assert _close(g[0, 1], g[0, 2]) and _close(g[1, 1], g[2, 2]), g


def mirrored_channels_are_equal(m) -> None:
    result = analyze(load_text(mirrored_text(m), "mirrored.gplan"))
    left = _channel_figures(result, "left")
    right = _channel_figures(result, "right", _swap)
    assert not _same(right, left), (mirrored_text(m), _same(right, left))


def _renamed(name: str) -> str:
    return "q" + name[::-1]


def names_change_nothing(m) -> None:
    before = analyze(load_text(mirrored_text(m), "named.gplan"))
    after = analyze(load_text(mirrored_text(m, _renamed), "named.gplan"))
    assert _same_lists(_all_figures(after), _all_figures(before))
    assert sorted(f.code for f in after.findings) == sorted(f.code for f in before.findings)


def _twins(plan) -> dict:
    """Each conductor's name -> the first name (in sort order) among the conductors that join the
    same two points and differ in nothing but their names: no model can tell them apart, so a
    choice among them (which one a loop is opened at, which one a finding names) may follow the
    names, and the comparison counts them as one."""
    groups: dict = {}
    for c in plan.conductors:
        key = (frozenset((c.a, c.b)), dataclasses.replace(c, name="", a="", b=""))
        groups.setdefault(key, []).append(c.name)
    return {n: min(names) for names in groups.values() for n in names}


def _classes(plan) -> dict:
    """For a plan of points, stated resistances, currents and stages (tests/invariantplans.py's
    resistive plans): each element's name -> the first name (in sort order) of the elements no
    figure tells apart, by colour refinement written here apart from the package's
    (network/canonical.py): a point starts from its kind and the ends of currents and stages on
    it, a wire from its resistance; a point's colour then takes its wires' and neighbours' colours,
    round after round, until the classes stop splitting. Two pads hung alike from one point (or
    two paths alike between two points) are one class: the package names the first by name among
    such elements, and renaming them may name the other."""
    colour = {p.name: (p.kind,) for p in plan.points}
    for s in plan.stages:
        colour[s.a] += (("stage", "a", s.gain, s.channel),)
        colour[s.b] += (("stage", "b", s.gain, s.channel),)
    for c in plan.currents:
        colour[c.a] += (("current", "a", repr(c.parts)),)
        colour[c.b] += (("current", "b", repr(c.parts)),)
    colour = {n: repr(sorted(map(repr, v))) for n, v in colour.items()}
    wires = [(c.name, c.a, c.b, repr(c.resistance)) for c in plan.conductors]
    count = len(set(colour.values()))
    for _ in range(len(colour)):
        around = {n: [] for n in colour}
        for _, a, b, r in wires:
            around[a].append((r, colour[b]))
            around[b].append((r, colour[a]))
        colour = {n: repr((colour[n], sorted(around[n]))) for n in colour}
        if len(set(colour.values())) == count:
            break
        count = len(set(colour.values()))
    keys = {n: ("point", colour[n]) for n in colour}
    keys |= {w: ("wire", r, tuple(sorted((colour[a], colour[b])))) for w, a, b, r in wires}
    first: dict = {}
    for n in sorted(keys):
        first.setdefault(keys[n], n)
    return {n: first[keys[n]] for n in keys}


def _alike_renamed(before, after, back, skip=(), alike=None) -> list[str]:
    """Where two results differ, the second's names passed through ``back`` (to the first's) and
    twins (:func:`_twins`) counted as one (``skip``: fields and keys left out; ``alike``: a name ->
    its class's first name, for more than twins)."""
    twins = alike if alike is not None else _twins(before.plan)
    want = result_figures(before, lambda s: twins.get(s, _PLATE_BRANCH.sub(r"\1", s)), skip)
    got = result_figures(after, lambda s: twins.get(back(s), back(s)), skip)
    return differences(got, want)


#: a plate's branch is labelled by its part and the numbers of its two contacts, numbered in the
#: order the plan writes its fastenings: the numbers are no name of the model's
_PLATE_BRANCH = re.compile(r"^(plate:.*):\d+~\d+$")


def _back(label: str, atoms: dict) -> str:
    """A label or sentence of the renamed plan in the original's names (each word mapped back), a
    plate branch's contact numbers left out."""
    label = "".join(atoms.get(p, p) for p in re.split(r"([^A-Za-z0-9_]+)", label))
    return _PLATE_BRANCH.sub(r"\1", label)


def renamed_and_reordered(m, rnd) -> None:
    """The loops listed (their members, what closes each, where to open it), every finding and
    every figure: alike when every element is renamed (the names' sort order scrambled) and the
    statements are shuffled (at the top level and inside the block)."""
    before = analyze(load_text(mirrored_text(m), "plan.gplan"))
    atoms: dict = {}

    def name(s: str) -> str:
        atoms[_renamed(s)] = s
        return _renamed(s)

    text = reordered(mirrored_text(m, name), rnd)
    after = analyze(load_text(text, "plan.gplan"))
    diff = _alike_renamed(before, after, lambda s: _back(s, atoms))
    assert not diff, (mirrored_text(m), text, diff)


ISLAND = (
    "point island_a: pad\npoint island_b: pad\nwire island: island_a to island_b, 40 mm, 0.5 mm2, "
    "signal\n"
)


def unconnected_changes_nothing(m, extra) -> None:
    before = analyze(load_text(mirrored_text(m), "plain.gplan"))
    after = analyze(load_text(mirrored_text(m, extra=extra), "plain.gplan"))
    assert _same_lists(_all_figures(after), _all_figures(before))
    for ch in before.hum.channels:
        assert not _same(_channel_figures(after, ch), _channel_figures(before, ch))


def resistive_renamed_and_reordered(r, rnd) -> None:
    """Networks of stated resistances with stars, junctions and pads, and more resistors than the
    hum budget names per source: every figure and finding alike when every element is renamed and
    the statements are shuffled (the chain search's paths of equal length, the equal shares named
    among the ten per source). The rounded figures are left out — a contributor's share and a
    finding's figures: a network of a few resistance values often gives a short decimal, such as
    11/16 = 68.75 % or 26.73125 mΩ, whose rounding falls on the half, where rounding noise decides;
    the unrounded figures they are rounded from (levels, transfer resistances) are compared.
    Elements that nothing but their names tells apart count as one (:func:`_classes`)."""
    before = analyze(load_text(resistive_text(r), "plan.gplan"))
    atoms: dict = {}

    def name(s: str) -> str:
        atoms[_renamed(s)] = s
        return _renamed(s)

    text = reordered(resistive_text(r, name=name), rnd)
    after = analyze(load_text(text, "plan.gplan"))
    classes = _classes(before.plan)
    diff = _alike_renamed(
        before, after, lambda s: _back(s, atoms), {"share_pct", "figures"}, classes
    )
    assert not diff, (resistive_text(r), text, diff)


def _listed_alike(was: dict, now: dict, k: float, floor: float) -> list:
    """The figures that do not scale by k: both listed and not k times as large, or listed on one
    side only though the other side's figure would have been above the listing floor."""
    bad = []
    for key in set(was) | set(now):
        if key in was and key in now:
            ok = _close(now[key], k * was[key])
        else:
            ok = (now[key] / k if key in now else was[key] * k) <= floor
        bad += [] if ok else [(key, was.get(key), now.get(key))]
    return bad


def drops_scale_with_resistance(r, k) -> None:
    """Stated currents through stated resistances: every drop, so every hum figure and transfer
    resistance, is k times as large when every resistance is (Ohm's law, the network being
    linear). A contributor is listed above 1e-12 V and a shared return above 1 µΩ, so a row may
    appear or go only where its figure on the other side is under that floor."""
    before = analyze(load_text(resistive_text(r), "scaled.gplan"))
    after = analyze(load_text(resistive_text(r, k), "scaled.gplan"))
    for ch in before.hum.channels:
        was, now = _channel_figures(before, ch), _channel_figures(after, ch)
        assert not _listed_alike(was, now, k, FLOOR_V), resistive_text(r)
    was = {(c.stage, c.source): c.transfer for c in before.coupling}
    now = {(c.stage, c.source): c.transfer for c in after.coupling}
    assert not _listed_alike(was, now, k, LISTED_TRANSFER), resistive_text(r)


#: each property, its strategies and how many plans the default suite gives it (the campaign,
#: benchmarks/fuzz_campaign.py --invariants N, gives each N: 10,000 each, benchmarks/README.md);
#: the mirrored plans' four take 80 each (an analysis each, or two), to keep the suite within its
#: three minutes
PROPERTIES = {
    "mirrored channels are equal": (mirrored_channels_are_equal, (mirrored_plans(),), 80),
    "names change no figure": (names_change_nothing, (mirrored_plans(rectifiers=False),), 80),
    "renamed and reordered: the same loops, findings and figures": (
        renamed_and_reordered,
        (mirrored_plans(rectifiers=False), st.randoms()),
        80,
    ),
    "an unconnected element changes no figure": (
        unconnected_changes_nothing,
        (mirrored_plans(rectifiers=False), st.sampled_from(["point alone: pad\n", ISLAND])),
        80,
    ),
    "resistive networks renamed and reordered: the same figures and findings": (
        resistive_renamed_and_reordered,
        (resistive_plans(most=14, stars=True, ohms=[0.01, 0.022, 0.047]), st.randoms()),
        100,
    ),
    "drops scale with resistance": (
        drops_scale_with_resistance,
        (resistive_plans(), st.sampled_from([0.5, 2.0, 10.0, 0.03])),
        100,
    ),
}


def _suite(name: str):
    check, strategies, count = PROPERTIES[name]
    return settings(max_examples=count, **EXAMPLES)(given(*strategies)(check))


test_a_block_placed_twice_mirrored_gives_both_channels_the_same_figures = _suite(
    "mirrored channels are equal"
)
test_renaming_every_element_changes_no_figure = _suite("names change no figure")
test_renamed_and_reordered_plans_list_the_same_loops_and_findings = _suite(
    "renamed and reordered: the same loops, findings and figures"
)
test_an_element_connected_to_nothing_changes_no_figure = _suite(
    "an unconnected element changes no figure"
)
test_scaling_every_resistance_scales_every_drop = _suite("drops scale with resistance")
test_renamed_and_reordered_resistive_networks_give_the_same_figures_and_findings = _suite(
    "resistive networks renamed and reordered: the same figures and findings"
)


def test_equal_shares_of_two_different_wires_are_named_alike_under_new_names():
    """Found by the campaign (benchmarks/fuzz_campaign.py --invariants 2000): `left_link` (51 mm
    of 0.75 mm²) and `left.w0` (34 mm of 0.5 mm²) have equal resistances, 51/0.75 = 34/0.5 = 68
    (worked by hand), so equal shares of a coupling; GC102 names one of them by the name's order,
    and renamed the other."""
    wires = ((1, 0, 0, AREAS[0]), (2, 1, 0, AREAS[0]))
    block = Block(((106, 6), (98, 38), (64, 4)), wires, (1, 2), (2, 0, 0), None)
    m = Mirrored("x", block, 4, 20.0, 3, False, False)
    renamed_and_reordered(m, Random(0))


def _chain_plan(name=lambda s: s) -> str:
    """Twelve 10 mΩ wires in series from n0 to n12, 100 mA at 100 Hz through them, a stage of 0 dB
    across the whole chain: each wire's share of the hum is 10 mΩ × 100 mA = 1 mV (Ohm's law,
    worked by hand), twelve equal shares of which the budget names ten.  A stage of another
    channel reads each joint, so the wires are twelve contributors, not one run in series."""
    lines = ['plan "chain"'] + [f"point {name(f'n{i}')}: pad" for i in range(13)]
    lines += [
        f"wire {name(f'w{k:02d}')}: {name(f'n{k}')} to {name(f'n{k + 1}')}, 0.01 ohm, signal"
        for k in range(12)
    ]
    lines += [
        f"current {name('i')}: {name('n0')} to {name('n12')}, 100 mA 100 Hz",
        f"stage {name('g')}: {name('n0')} to {name('n12')}, gain 0 dB, channel c",
    ]
    lines += [
        f"stage {name(f't{k:02d}')}: {name(f'n{k}')} to {name('n0')}, gain 0 dB, channel d"
        for k in range(1, 12)
    ]
    return "\n".join(lines) + "\n"


def test_equal_hum_shares_are_named_alike_under_new_names():
    """Found by the campaign: the ten equal shares named per source were taken by name, so renaming
    the wires (their names' order reversed) named others; now by the network's canonical order."""
    atoms: dict = {}

    def name(s: str) -> str:
        atoms[_renamed(s)] = s
        return _renamed(s)

    named = []
    for text in (_chain_plan(), _chain_plan(name)):
        h = analyze(load_text(text, "chain.gplan")).hum.channels["c"]
        named.append(sorted(atoms.get(c.element, c.element) for c in h.contributors))
        shares = [c.volts for c in h.contributors if c.element != "other conductors"]
        assert len(shares) == 10 and all(_close(v, 1e-3) for v in shares), shares
    assert named[0] == named[1], named


def test_a_chain_is_found_whatever_the_order_of_the_statements():
    """Found by the campaign: t reaches star s in two hops through u (a stage's end) and through j
    (a junction); the chain search took the one the star's adjacency met first, so the order of
    the statements decided whether GC103 said "t reaches it through u". Every order of the six
    statements gives one answer."""
    head = ['plan "tie"', "point s: star", "point t: pad", "point u: pad", "point j: junction"]
    body = [
        "wire tu: t to u, 0.01 ohm, signal",
        "wire us: u to s, 0.01 ohm, signal",
        "wire tj: t to j, 0.01 ohm, signal",
        "wire js: j to s, 0.01 ohm, signal",
        "stage g1: t to s, gain 20 dB, channel a",
        "stage g2: u to s, gain 20 dB, channel a",
    ]
    rnd, seen = Random(3), set()
    for _ in range(40):
        rnd.shuffle(body)
        plan = load_text("\n".join(head + body) + "\n", "tie.gplan")
        seen.add(tuple(sorted((f.code, f.elements) for f in rule_stars(AuditContext(plan)))))
    assert len(seen) == 1, seen


def test_a_source_that_misses_a_channels_stages_leaves_it_no_level():
    """Found by the campaign: the ripple current runs from the supply to the protective stud, and
    each channel's stage reads the drop of a wire that is a dead end (n1 hangs from n0 by w0
    alone), which carries none of it (Kirchhoff's current law): no level. The solve left 1e-21 V
    of rounding there in one writing and an exact zero in another, and the budget listed the
    group in the first only."""
    block = Block(((92, 4), (64, 4)), ((1, 0, 0, "0.5 mm2"),), (0,), (0, 1, 0), None)
    m = Mirrored("x", block, 4, 20.0, 0, False, False)
    levels = analyze(load_text(mirrored_text(m), "dead-end.gplan")).hum.levels
    assert all("current:ripple" not in levels[ch] for ch in ("left", "right")), levels


def test_the_bond_kept_is_the_same_whatever_the_order_of_two_protective_landings():
    """The protective earth lands on two studs (pe_stud at 20,180 and stud2 at 280,20 mm), and the
    signal ground is bonded to the chassis twice (bond1 at pe_stud, jstar through j's bolt at
    250,30): the loop is opened at the crossing farthest from the landing, and which landing was
    measured from followed the order of the two protective wires' statements (bond1 opened in one
    order, jstar in the other). Every order now opens one and the same."""
    head = [
        'plan "two landings"',
        "mains 230 V 50 Hz, fuse 1 A slow, line-conductor 0.75 mm2, inlet at 150,190",
    ]
    body = [
        "metal deck: steel 1 mm, 300 x 200 mm, touchable",
        "point pe_stud: stud, at 20,180 on deck",
        "point stud2: stud, at 280,20 on deck",
        "wire pe_lead: mains.pe to pe_stud, 140 mm, 1 mm2, protective",
        "wire pe_b: mains.pe to stud2, 220 mm, 1 mm2, protective",
        "bolt pe_nut: pe_stud to deck",
        "bolt nut2: stud2 to deck",
        "point star: star, at 150,100 on deck",
        "point j: junction, at 250,30 on deck",
        "wire bond1: star to pe_stud, 160 mm, 0.75 mm2, signal",
        "wire jstar: j to star, 120 mm, 0.5 mm2, signal",
        "bolt jn: j to deck",
        "point k: pad, at 150,60 on deck",
        "wire kw: k to star, 40 mm, 0.5 mm2, signal",
        "stage v1: k to star, gain 20 dB",
    ]
    rnd, seen = Random(1), set()
    for _ in range(20):
        rnd.shuffle(body)
        ctx = AuditContext(load_text("\n".join(head + body) + "\n", "landings.gplan"))
        seen.add(tuple(sorted((i.closed_by, i.open_at) for i in ctx.loops)))
    assert len(seen) == 1, seen


def test_a_shared_return_at_the_contributor_level_is_judged_alike_in_any_order():
    """Found by the resistive property: 1 mA through w0's 10 mΩ read by a stage of 0 dB is
    1e-3 × 0.01 = 1e-5 V, 20·log10(1e-5) = -100 dBV (worked by hand): exactly the contributor
    level. Whether GC102 was a fault or a note (below the level) followed the last bit of the
    solve, which the order of the statements changed; at the level it is not below it."""
    lines = [f"point n{i}: pad" for i in range(12)]
    lines += [f"wire w{k}: n{k + 1} to n0, 0.01 ohm, signal" for k in range(11)]
    lines += ["current i0: n0 to n1, 1.0 mA 100 Hz", "stage g0: n0 to n1, gain 0 dB, channel c0"]
    seen = set()
    for seed in (0, 137):  # two orders: the second one's solve put the level a bit below
        order = list(lines)
        Random(seed).shuffle(order)
        result = analyze(load_text('plan "level"\n' + "\n".join(order) + "\n", "level.gplan"))
        seen |= {(f.code, f.severity) for f in result.findings if f.code == "GC102"}
    assert seen == {("GC102", "fault")}, seen


def test_the_conductors_named_for_most_of_a_coupling_do_not_follow_the_order():
    """Found by the resistive property: 1 mA from n0 to n1 over w0 ∥ w2 (10 mΩ each) and over
    w1 + w3 (10 mΩ each) splits 0.8 / 0.2 (current division, by hand), and so does the stage's
    test current: the shares are 0.4² : 0.4² : 0.2² : 0.2² of R, and w0, w2 and one of w1, w3
    make exactly 90 % (0.36 of 0.40). GC102 names the conductors that make up 90 % of the coupling:
    three, or four when the sum's last bit fell short, by the order of the statements."""
    base = [
        "point n0: pad",
        "point n1: pad",
        "point n2: pad",
        "wire w0: n1 to n0, 0.01 ohm, signal",
        "wire w1: n2 to n0, 0.01 ohm, signal",
        "wire w2: n0 to n1, 0.01 ohm, signal",
        "wire w3: n1 to n2, 0.01 ohm, signal",
        "current i0: n0 to n1, 1.0 mA",
        "stage g0: n0 to n1, gain 0 dB, channel c0",
    ]
    named = set()
    for seed in (0, 2):  # two orders: the second one's sum fell a bit short of 90 %
        order = list(base)
        Random(seed).shuffle(order)
        text = 'plan "ninety"\n' + "\n".join(order) + "\n"
        (row,) = analyze(load_text(text, "ninety.gplan")).coupling
        named.add(row.shared)
    assert len(named) == 1 and len(next(iter(named))) == 3, named


def test_a_return_with_a_clear_route_as_short_is_no_chain():
    """Found by the campaign: t reached its star s in two hops through u (a stage's end) and
    through j (a plain junction); which route the search took was decided by the network's
    canonical order, which a wire split in two changes, and with it GC103. A return is chained
    only when every shortest route passes another return."""
    head = 'plan "tie"\npoint s: star\npoint t: pad\npoint u: pad\npoint j: junction\n'
    body = (
        "wire tu: t to u, 0.01 ohm, signal\nwire us: u to s, 0.01 ohm, signal\n"
        "stage g1: t to s, gain 20 dB, channel a\nstage g2: u to s, gain 20 dB, channel a\n"
    )
    clear = "wire tj: t to j, 0.01 ohm, signal\nwire js: j to s, 0.01 ohm, signal\n"
    chained = [
        f
        for f in rule_stars(AuditContext(load_text(head + body, "tie.gplan")))
        if f.code == "GC103"
    ]
    assert len(chained) == 1 and "t reaches it through u" in chained[0].message
    both = rule_stars(AuditContext(load_text(head + body + clear, "tie.gplan")))
    assert not [f for f in both if f.code == "GC103"]


def test_a_mirrored_placement_names_the_same_loops_in_both_channels():
    """Found by the 1,000-plan campaign: the two mirrored channels' hum totals were equal, but each
    channel's loops came from a different cycle basis (positions in the canonical colours ordered
    two points of one channel by where they lie, the other way round in its mirror image), so the
    share named per loop differed. Positions now only break ties among elements alike."""
    from pathlib import Path

    text = (Path(__file__).parent / "plans" / "mirror-basis" / "mirrored.gplan").read_text()
    result = analyze(load_text(text, "mirrored.gplan"))
    left = _channel_figures(result, "left")
    assert not _same(_channel_figures(result, "right", _swap), left)


def test_a_balanced_bridge_lists_no_contributor_at_any_scale():
    """Found by the campaign: c1's stage across a balanced bridge (n3 and n1 at one potential), its
    four arms' shares cancelling exactly. With the resistances as written their sum rounded to
    noise and four 12 µV contributors were listed; times ten it rounded to an exact zero and none
    were: a listing that followed the last bit. Now none at every scale."""
    bridge = Resistive(
        n=4,
        resistors=(
            (1, 0, 0.047),
            (2, 0, 0.0012),
            (3, 2, 0.047),
            (3, 0, 0.047),
            (3, 1, 0.22),
            (1, 2, 0.047),
        ),
        currents=((2, 0, 50.0, 100),),
        stages=((0, 1, 0), (3, 1, 0)),
    )
    for k in (0.5, 2.0, 10.0, 0.03):
        drops_scale_with_resistance(bridge, k)

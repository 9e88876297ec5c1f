"""A candidate judged: its edits applied to the plan's text, the edited plan re-analysed, and the
result weighed against the plan's own.

Safety: a candidate that deletes or re-routes a protective conductor is never tried; a candidate
whose re-analysis raises any protective path's resistance, takes a conductor off the protective
route, leaves a touchable part unbonded, adds a danger, sends a supply's current through the star
or leaves a socket or stage without its wired return is rejected; so is one that makes a channel
louder without clearing a danger or fault, or gains nothing.  All are listed as considered and
rejected.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from ..analysis import Options, Result, analyze
from ..core.errors import PlanErrors
from ..core.units import dbv
from ..language.loader import load_text, substituted
from ..model.kinds import is_fastening_kind
from ..model.records import Plan
from ..physics.humsettings import far_below_hearing
from ..rules.catalogue import RULES, severity_rank
from ..rules.live_chassis import LIVE_CHASSIS
from ..rules.rule_families import HUM, PROTECTIVE_EARTH
from .changes import Candidate
from .edits import apply_edits, edited_texts
from .supply_paths import supply_on_signal
from .fixes import identity
from .hearing import HUM_FLOOR_DBV, heard_changes, share_only
from .returns import dead_screen_ends, lost_circuit, lost_wired_returns, metals_cut_loose

#: the key of :attr:`Evaluation.net` that counts protective-earth faults (among the faults)
PE_FAULT = "protective-earth fault"
#: the rejection of a change that brings a danger (the combined set tries it again last)
ADDS_DANGER = "it would add a danger finding"
#: how a rejection for a louder channel begins (the combined set tries such changes again last: on
#: the plan as changed they may no longer be louder)
MAKES_LOUDER = "it would make the "
#: the rejection of a change that sends more working current through protective conductors (the
#: combined set tries it again last: once a kept change takes the return off the shared path, it
#: may send none)
MORE_PE_CURRENT = "it would send more of a supply's working current through a protective conductor"

__all__ = [
    "MAKES_LOUDER",
    "MORE_PE_CURRENT",
    "Evaluation",
    "evaluate",
    "HUM_FLOOR_DBV",
    "LOUDER_DB",
    "PE_TOLERANCE",
]


@dataclass
class Evaluation:
    candidate: Candidate
    result: Result | None
    score: float = 0.0
    hum_change_db: dict = field(default_factory=dict)  # channel -> dB (negative: less hum)
    cleared: list = field(default_factory=list)
    introduced: list = field(default_factory=list)
    rejected: str = ""
    hum_before_dbv: dict = field(default_factory=dict)  # channel -> dBV (floored at HUM_FLOOR_DBV)
    hum_after_dbv: dict = field(default_factory=dict)
    net: dict = field(default_factory=dict)  # severity -> findings cleared less those introduced
    cleared_keys: set = field(default_factory=set)  # identities it clears (fixes.identity)
    #: channel -> change of how far its hum stands above hearing (dB, :func:`heard_level`), for
    #: the channels with a listening verdict: what the ranking and the louder test read there
    heard_change_db: dict = field(default_factory=dict)
    #: the supplies' current the change leaves on signal wiring, A (:func:`supply_on_signal`)
    on_signal: float = 0.0

    def judged_change_db(self) -> dict:
        """Each channel's change as the advice judges it: above hearing where the plan has a
        listening verdict, else its total level."""
        return {ch: self.heard_change_db.get(ch, d) for ch, d in self.hum_change_db.items()}

    def rank_key(self):
        """Sort key, best first: dangers cleared (net of those introduced), protective-earth faults
        cleared (net: a bond that can loosen comes before the hum), faults cleared (net), hum gain,
        findings introduced, size of the change (statements edited), the supplies' current it
        leaves on signal wiring (to the mA: :func:`supply_on_signal`), metres of wire laid, then
        warnings and notes cleared (net: of two joins alike in all that, the one that also
        takes a load's return off the bus), and only then the title."""
        judged = self.judged_change_db().values()
        gain = sum(max(0.0, -d) for d in judged) - sum(max(0.0, d) for d in judged)
        return (
            bool(self.rejected),
            -self.net.get("danger", 0),
            -self.net.get(PE_FAULT, 0),
            -self.net.get("fault", 0),
            -round(gain, 1),
            len(self.introduced),
            len(self.candidate.edits),
            round(self.on_signal, 3),
            round(self.candidate.wire + self.candidate.work, 4),
            -self.net.get("warning", 0),
            -self.net.get("note", 0),
            self.candidate.title,
        )


#: a change that makes a channel's hum louder by more than this (dB: the figures' own rounding),
#: clearing no danger or fault, is rejected
LOUDER_DB = 0.05

#: a protective path may change by this much (relative) before a change counts as weakening it: the
#: plate model's own accuracy (see groundcheck.plate)
PE_TOLERANCE = 0.06


def _hum_db(r: Result) -> dict[str, float]:
    if r.hum is None:
        return {}
    return {ch: max(HUM_FLOOR_DBV, dbv(h.total_v)) for ch, h in r.hum.channels.items()}


def _keys(r: Result):
    return {identity(f): f for f in r.open_findings()}


def _label(f) -> str:
    shown = ", ".join(f.elements[:3]) + ("…" if len(f.elements) > 3 else "")
    return f"{f.code} {shown}".strip()


def _pe(r: Result) -> dict[str, float]:
    return {} if r.safety is None else {p.part: p.path_resistance for p in r.safety.parts}


def evaluate(
    base_text: str,
    plan: Plan,
    before: Result,
    cand: Candidate,
    options: Options,
    root: Path | None = None,
    resolved: Path | None = None,
) -> Evaluation:
    """Apply a candidate to the text, re-analyse, and score it against ``before``."""
    if cand.touches_protective:
        return Evaluation(cand, None, rejected="it would change a protective conductor")
    if cand.refused:
        return Evaluation(cand, None, rejected=cand.refused)
    p = _edited_plan(base_text, plan, cand, root, resolved)
    if isinstance(p, str):
        return Evaluation(cand, None, rejected=p)
    after = analyze(p, options)
    return _judged(cand, plan, p, before, after)


def _edited_plan(base_text: str, plan: Plan, cand: Candidate, root, resolved) -> Plan | str:
    """The plan with the candidate's edits, or why it is refused before any analysis: it does not
    load, or it takes a socket's or a stage's only wired return away."""
    text = apply_edits(base_text, cand.edits)
    try:
        with substituted(edited_texts(cand.edits)):
            p = load_text(text, plan.file, root=root, _resolved=resolved)
    except PlanErrors as e:
        return f"the edited plan does not load ({e.errors[0].one_line()})"
    unwired = lost_wired_returns(plan, p)
    if unwired:
        return (
            f"it would leave {', '.join(unwired[:3])} without "
            "a wired return (the signal would return through the chassis, or not at all)"
        )
    cut = lost_circuit(plan, p)
    if cut:
        return (
            f"it would leave {', '.join(cut[:3])} joined to none of its circuit (its signal "
            "would have to return through other equipment and the mains)"
        )
    loose = metals_cut_loose(plan, p)
    if loose:
        touchable = [m for m in loose if plan.metal(m) is not None and plan.metal(m).touchable]
        why = (
            "touchable metal earthed by nothing: a fault inside would leave it live"
            if touchable
            else "a screen or box that floats picks up the hum it should keep out"
        )
        return f"it would leave {', '.join(loose[:3])} joined to no earth at all ({why})"
    dead = dead_screen_ends(plan, p)
    if dead:
        return (
            f"it would leave the shield of {', '.join(dead[:3])} going on to nothing: the "
            "return of an unbalanced link, which the signal needs"
        )
    return p


def _unlives(cand: Candidate, after: Result) -> bool:
    """Whether ``cand`` answers the live-chassis rule and leaves no metal on the mains: the
    protective-earth checks the live metal kept from being made (its earth path, its cord) then
    apply for the first time — their findings are listed, not held against the change."""
    return cand.reason.split(",")[0] == LIVE_CHASSIS and not any(
        f.code == LIVE_CHASSIS for f in after.findings
    )


def _judged(cand: Candidate, plan: Plan, p: Plan, before: Result, after: Result) -> Evaluation:
    """The evaluation of candidate ``cand`` whose edited plan ``p`` analyses to ``after``: the
    protective earth's checks first, then the findings cleared and introduced, then the score."""
    ev = Evaluation(cand, after, on_signal=supply_on_signal(after))
    ev.rejected = _protective_harm(cand, plan, p, before, after)
    if ev.rejected:
        return ev
    k0, k1 = _keys(before), _keys(after)
    # a contributor that only crossed its share's line because the rest of the hum fell is no
    # finding the change brought: it was there, no louder, before
    k1 = {k: f for k, f in k1.items() if k in k0 or not share_only(f, before)}
    ev.cleared_keys = set(k0.keys() - k1.keys())
    ev.cleared = sorted(_label(k0[k]) for k in ev.cleared_keys)
    ev.introduced = sorted(_label(k1[k]) for k in k1.keys() - k0.keys())
    new = k1.keys() - k0.keys()
    unlive = _unlives(cand, after)
    for sign, keys, found in ((1, k0.keys() - k1.keys(), k0), (-1, new, k1)):
        for k in keys:  # the findings' own severities, not their rules' defaults
            f = found[k]
            if sign < 0 and unlive and RULES[f.code].family == PROTECTIVE_EARTH:
                continue  # a check the live metal kept from being made: listed, not counted
            ev.net[f.severity] = ev.net.get(f.severity, 0) + sign
            if f.severity == "fault" and RULES[f.code].family == PROTECTIVE_EARTH:
                ev.net[PE_FAULT] = ev.net.get(PE_FAULT, 0) + sign
    added = sorted(k1[k].code for k in new if k1[k].severity == "danger")
    if not unlive and added:
        ev.rejected = f"{ADDS_DANGER} ({', '.join(dict.fromkeys(added))})"
        return ev
    # a protective conductor made thicker takes a larger share of a return that runs there: the
    # protective fix stands (the return is the other finding's to fix)
    pe_fix = RULES[cand.reason.split(",")[0]].family == PROTECTIVE_EARTH
    if not pe_fix and _more_pe_current(before, after):
        ev.rejected = MORE_PE_CURRENT
        return ev
    outlets = {p.name for p in after.plan.points if p.kind == "outlet"}
    # a device plugged in elsewhere may leave an unwired outlet on its own: that is no part of the
    # signal ground
    if any(
        "unconnected" in RULES[k1[k].code].refusals
        and not (cand.moves_plug and set(k1[k].elements) <= outlets)
        for k in new
    ):
        ev.rejected = "it would leave part of the signal ground unconnected"
        return ev
    _score(ev, before, after, k0, k1)
    return ev


def _more_pe_current(before: Result, after: Result) -> bool:
    """Whether a change sends a larger share of some supply's working current through protective
    conductors (the findings whose rule refuses that, GC224, by source: their largest share)."""

    def shares(r: Result) -> dict:
        out: dict = {}
        for f in r.findings:
            if "pe-current" in RULES[f.code].refusals:
                out[f.elements[0]] = max(out.get(f.elements[0], 0.0), f.figures.get("share", 1.0))
        return out

    was = shares(before)
    return any(x > was.get(src, 0.0) + 0.005 for src, x in shares(after).items())


def _protective_harm(cand: Candidate, plan: Plan, p: Plan, before: Result, after: Result) -> str:
    """Why the change is refused for the supply's returns or the protective earth (empty when it
    is not): a supply's current sent through the star, a conductor taken off the protective
    route, a protective path weakened."""
    if _through_star(cand, after):
        return "it would send a supply's charging or ripple current through the star"
    # a device plugged in elsewhere leaves the building runs it used, but no conductor: its earth
    # path is checked again below (a broken or long one is a danger, GC215)
    lost = (
        sorted(before.protective - after.protective - _left_stud(cand, plan, p))
        if not cand.moves_plug
        else []
    )
    if lost:
        return f"it would take {', '.join(lost[:3])} off the protective route"
    pe0, pe1 = _pe(before), _pe(after)
    # a change that answers a protective-earth finding (its own stud, say) may lengthen a path a
    # little, as long as every path stays within the limit; any other change must not weaken the
    # protective earth at all
    pe_fix = RULES[cand.reason.split(",")[0]].family == PROTECTIVE_EARTH
    limit = after.safety.limit if after.safety is not None else 0.0
    if any(
        part not in pe1
        or (pe1[part] > r * (1 + PE_TOLERANCE) + 1e-5 and not (pe_fix and pe1[part] <= limit))
        for part, r in pe0.items()
    ):
        return "it would weaken the protective-earth path"
    return ""


def _left_stud(cand: Candidate, plan: Plan, after: Plan) -> set[str]:
    """The fastenings of the stud a protective wire left for a stud of its own (GC202's fix), or
    of the post a source's earth wire left for the box its signal goes to: the wire no longer
    runs through them, and its new stud's or post's own fastening carries it instead."""
    if cand.action not in ("own-stud", "earth-wire"):
        return set()
    c0, c1 = (
        next((c for c in x.conductors if c.name == cand.element), None) for x in (plan, after)
    )
    if c0 is None or c1 is None:
        return set()
    left = {c0.a, c0.b} - {c1.a, c1.b}
    return {c.name for c in plan.conductors if is_fastening_kind(c.kind) and left & {c.a, c.b}}


def _through_star(cand: Candidate, after: Result) -> bool:
    """Whether a moved conductor lands where a supply's two returns then meet only at the star
    (GC103's 'join' finding names the star and both returns' points): the trade joins them
    before it."""
    if cand.action not in ("move", "join"):
        return False
    c = next((c for c in after.plan.conductors if c.name == cand.element), None)
    return c is not None and any(
        "through-star" in RULES[f.code].refusals
        and f.actions
        and f.actions[0][0] == "join"
        and {c.a, c.b} <= set(f.elements)
        for f in after.findings
    )


def _faults_not_of_hum(k0: dict, k1: dict) -> int:
    """Faults cleared less faults brought, counting only rules that are no hum mechanism (not the
    hum family's, not a shared return's)."""

    def counts(f) -> bool:
        rule = RULES[f.code]
        return f.severity == "fault" and not (rule.family is HUM or rule.hum_mechanism)

    cleared = sum(1 for k in k0.keys() - k1.keys() if counts(k0[k]))
    brought = sum(1 for k in k1.keys() - k0.keys() if counts(k1[k]))
    return cleared - brought


def _louder_words(ch: str, d: float, total: float, heard: bool) -> str:
    """Why a change is rejected as louder: the total's change, or, where the plan judges what is
    heard, how much more the hum stands above hearing, with the total's change beside it."""
    if not heard:
        return f"{MAKES_LOUDER}{ch} hum {d:.1f} dB louder"
    said = (
        "unchanged"
        if abs(total) < 0.05
        else (f"{total:.1f} dB louder" if total > 0 else f"{-total:.1f} dB quieter")
    )
    return (
        f"{MAKES_LOUDER}{ch} hum louder where it is heard: {d:.1f} dB more above hearing at the "
        f"seat (its total {said})"
    )


def _score(ev: Evaluation, before: Result, after: Result, k0: dict, k1: dict) -> None:
    """The hum change and score of a candidate that passed the safety checks; rejected when it
    makes a channel louder without clearing a danger or fault, or gains nothing."""
    h0, h1 = _hum_db(before), _hum_db(after)
    ev.hum_before_dbv, ev.hum_after_dbv = h0, {ch: h1.get(ch, HUM_FLOOR_DBV) for ch in h0}
    ev.hum_change_db = {ch: ev.hum_after_dbv[ch] - h0[ch] for ch in h0}
    ev.heard_change_db = heard_changes(before, after, h0)
    judged = ev.judged_change_db()
    weight = {0: 30.0, 1: 10.0, 2: 3.0, 3: 0.5}
    score = sum(max(0.0, -d) for d in judged.values()) - sum(max(0.0, d) for d in judged.values())
    score += sum(weight[severity_rank(k0[k].severity)] for k in k0.keys() - k1.keys())
    score -= sum(weight[severity_rank(k1[k].severity)] for k in k1.keys() - k0.keys())
    ev.score = score
    louder = {
        ch: d for ch, d in judged.items() if d > LOUDER_DB and not far_below_hearing(after.hum, ch)
    }
    safety = ev.net.get("danger", 0) > 0 or (
        ev.net.get("danger", 0) == 0 and ev.net.get(PE_FAULT, 0) > 0
    )
    if louder and not safety and _faults_not_of_hum(k0, k1) <= 0:
        # advice that makes a channel hum more is no advice, unless it clears a danger or a fault
        # that is no hum mechanism (a shared return 'cleared' while the channel gets louder is
        # no gain: an outside builder was offered a socket panel 3.8 dB louder for one GC102)
        ch, d = max(louder.items(), key=lambda kv: kv[1])
        ev.rejected = _louder_words(ch, d, ev.hum_change_db[ch], ch in ev.heard_change_db)
        qch, qd = min(judged.items(), key=lambda kv: kv[1])
        if qd < -LOUDER_DB:  # what it would gain elsewhere: a step to make with another, not alone
            ev.rejected += f", though {qch} would be {-qd:.1f} dB quieter"
    elif score <= 1e-9 and safety:
        # a danger or a protective-earth fault cleared (and no danger brought) is never "no
        # gain", whatever hum findings it moves
        ev.score = 1e-6
    elif score <= 1e-9:
        ev.rejected = "no predicted gain: no hum removed and no finding cleared on balance"

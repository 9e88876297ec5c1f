"""Candidate changes of a plan, made from the findings' structured repair actions and the
analysis's results, each as edits placed by the parser's spans (:mod:`groundcheck.advice.edits`).

The registry of generators, one per repair action a rule's entry names; the generators live by
kind of repair: opening loops (:mod:`.loop_changes`), re-routing returns
(:mod:`.routing_changes`), the protective earth's own repairs (:mod:`.protective_changes`),
insulating fastened sockets (:mod:`.returns`), changes between devices
(:mod:`.installation_changes`) and on the installation's side (:mod:`.supply_changes`).

The vocabulary is the trade's (common practice): insulate a socket from the chassis, remove a
second chassis bond, terminate a shield at one end, re-route a return to its star, join a
rectifier's return ends directly, give the protective earth a stud of its own, thicken a protective
conductor, turn a second bond into a lift network, a balanced interconnect, a lift network on a
device's signal side, or plug two devices an interconnect joins into one outlet or strip.  A
candidate that would touch a conductor the protective earth relies on is marked and never tried.
"""

from __future__ import annotations

from ..model.records import Plan
from ..rules.catalogue import RULES
from ..rules.live_chassis import LIVE_CHASSIS as _LIVE, live_network
from ..rules.results import Result
from .changes import Answer, Candidate, ChangeContext, device_note
from .installation_changes import earthed_outlets, installation_candidates, shield_to_chassis
from .shield_landings import shields_together
from .loop_changes import loop_candidates, second_bond, terminate_shield
from .ht_bond import ht_return_bond
from .own_stud import own_stud
from .protective_changes import bonding_wire
from .returns import refuse
from .thickening import thicker
from .routing_changes import (
    carried_actions,
    crosstalk_candidates,
    shared_return_candidates,
    star_candidates,
)
from .live_changes import unlive
from .supply_changes import high_breaking, it_electrode, socket_rcd, tt_electrode, twist_heater

__all__ = [
    "Candidate",
    "candidates",
    "answer",
    "FINDING_GENERATORS",
    "BEFORE_FINDINGS",
    "AFTER_FINDINGS",
]


def _finding_candidates(ctx: ChangeContext, add) -> None:
    """Each finding's candidates from the generators of the repair actions its rule's entry names
    (``Rule.actions``); an action answered over the whole result has none here."""
    for f in ctx.result.findings:
        for action in RULES[f.code].actions:
            if action in FINDING_GENERATORS:
                FINDING_GENERATORS[action](ctx, f, add)


#: the advisor's generator of each repair action a catalogue entry names (``Rule.actions``),
#: called with (context, finding, add) for every finding of a rule that names it
FINDING_GENERATORS = {
    "star-return": star_candidates,
    "second-bond": second_bond,
    "terminate-shield": terminate_shield,
    "own-stud": lambda ctx, f, add: add(own_stud(ctx, f)),
    "thicken": lambda ctx, f, add: add(thicker(ctx, f)),
    "bond": lambda ctx, f, add: add(bonding_wire(ctx, f)),
    "ht-bond": lambda ctx, f, add: add(ht_return_bond(ctx, f)),
    "unlive": unlive,
    "high-breaking": high_breaking,
    "twist": twist_heater,
    "carried": carried_actions,
}

#: the generators of actions answered over the whole result (each loop of the loop list, each
#: coupling row, the installation), called once with (context, :class:`Answer`, add): those
#: before the findings' own, and after
BEFORE_FINDINGS = {"open-loop": loop_candidates, "own-return": shared_return_candidates}
AFTER_FINDINGS = {
    "between-devices": installation_candidates,
    "earthed-outlet": earthed_outlets,
    "rcd-at-socket": socket_rcd,
    "tt-electrode": tt_electrode,
    "it-electrode": it_electrode,
    "own-crosstalk-return": crosstalk_candidates,
    "shield-to-chassis": lambda ctx, a, add: shields_together(ctx, a, add, shield_to_chassis),
}


def answer(result: Result, action: str) -> Answer:
    """The rules whose entries name ``action`` (catalogue order) and their findings in
    ``result``."""
    codes = tuple(code for code, rule in RULES.items() if action in rule.actions)
    return Answer(codes, tuple(f for f in result.findings if f.code in codes))


def candidates(plan: Plan, result: Result, text: str) -> list[Candidate]:
    """Candidate changes answering the plan's loop, shared-return, star, bonding and protective
    findings."""
    ctx = ChangeContext(plan, result, text)
    out: list[Candidate] = []
    seen: set = set()  # the edits of the candidates made so far: a change is offered once

    def add(c):
        if c is not None and c.edits not in seen:
            seen.add(c.edits)
            out.append(device_note(c, plan.file, plan))

    # a shared return's join before the star's: the same join answers the shared return first
    for action, generate in BEFORE_FINDINGS.items():
        generate(ctx, answer(result, action), add)
    _finding_candidates(ctx, add)
    for action, generate in AFTER_FINDINGS.items():
        generate(ctx, answer(result, action), add)
    return _on_live_metal(ctx, result, out)


def _on_live_metal(ctx: ChangeContext, result: Result, out: list[Candidate]) -> list[Candidate]:
    """On a set whose chassis is on a pole of the mains, a change that insulates or lifts a socket
    or a bond of that network is considered, never tried: the socket's sleeve stays joined to the
    live chassis through its wiring, so the change makes nothing safe and would read as if it did
    (common practice: such a set is made safe by an isolating transformer first)."""
    if not any(f.code == _LIVE for f in result.findings):
        return out
    live = set(live_network(ctx.plan, ctx.G))
    why = (
        f"the set's chassis is on a pole of the mains ({_LIVE}): every socket and bond of its "
        "ground stays live through its wiring, so no change to them makes it safe — the tie to "
        f"the mains comes out first ({_LIVE}'s fix says how)"
    )
    return [
        refuse(c, why)
        if c.reason.split(",")[0] != _LIVE
        and c.action in ("insulate", "lift-network", "remove", "terminate-at")
        and (c.element in live or any(e in live for e in _ends(ctx, c.element)))
        else c
        for c in out
    ]


def _ends(ctx: ChangeContext, name: str) -> tuple:
    c = ctx.cond.get(name)
    return () if c is None else (c.a, c.b)

"""Installation-side changes for a protective-earth danger that the equipment's own wiring cannot
cure: a residual-current device (RCD) on the supply circuit, a more sensitive one, or a lower
earth-electrode resistance on a TT supply.  Each is an edit of the plan's ``mains`` statement (the
plan then states the installation as it would be), evaluated like every candidate; each title says
that the work is a qualified electrician's, to the local wiring rules, and never a change to the
protective earth of the equipment (none lifts, removes or thins a protective conductor).

Answers: GC208 (a fault not disconnected in time), GC220 (TT: electrode × the RCD's rating over
50 V), GC231 (IT: electrode × the first-fault current over 50 V), GC221 (TT protected by a fuse
or breaker alone); and in the equipment, GC211 (a fuse whose
breaking capacity is below the prospective fault current: a high-breaking fuse of the same rating
and characteristic, which the mains statement then states).
"""

from __future__ import annotations


from ..physics.safety import TOUCH_LIMIT
from ..rules.earthing_system import STABLE_ELECTRODE, electrode_target
from ..rules.catalogue import RULES
from ..physics.heater_field import source_heater
from .changes import Answer, Candidate, ChangeContext, appended
from .protective_changes import equipment_mains
from .edits import Edit

__all__ = [
    "socket_rcd",
    "tt_electrode",
    "it_electrode",
    "high_breaking",
    "RCD_RATINGS",
    "SOCKET_RCD",
    "electrode_target",
]

#: rated residual operating currents IΔn of general-type RCDs, A (IEC 61008-1's preferred values,
#: from memory)
RCD_RATINGS = (0.01, 0.03, 0.1, 0.3, 0.5)
#: the rating used for socket-outlet circuits, A (IEC 60364-4-41 411.3.3's additional protection:
#: IΔn at most 30 mA, from memory)
SOCKET_RCD = 0.03

_DEFER = (
    "installation work for a qualified electrician, to the local wiring rules; it does not mend "
    "the equipment's own protective earth, whose findings keep their own fixes"
)


#: the work of improving an earth electrode, ranked as metres of wire laid (see Candidate.work):
#: more than fitting an RCD, which an electrician does in the board (common practice)
ELECTRODE_WORK = 10.0


def _set(ctx: ChangeContext, st, word: str, value: str) -> Edit:
    """The statement's ``word`` phrase given ``value`` (added when the statement has none)."""
    ph = ctx.src.find(st, word)
    if ph and len(ph) == 2:
        return ctx.src.replace(st, [(ph[1], value)])
    return appended(ctx, st, f"{word} {value}")


def _rcd(ctx: ChangeContext, st, rating: float, reason: str, why: str) -> Candidate:
    ma = f"{rating * 1e3:g} mA"
    word = _stated(ctx)[1]
    circuit = "supply circuit" if word == "mains" else "installation's outlets"
    return Candidate(
        f"have the {circuit} protected by a {ma} RCD ({why}): {_DEFER}; the {word} statement "
        f"then states 'rcd {ma}'",
        reason,
        (_set(ctx, st, "rcd", ma),),
        action="rcd",
        element="mains",
    )


def _mains_statement(ctx: ChangeContext):
    """The plan's own mains statement, or an installation's supply statement, whose RCD and
    electrode protect the devices plugged into it (None when the plan states neither, or a
    device's plan does)."""
    m = _stated(ctx)[0]
    if m is None or m.location.file != ctx.plan.file:
        return None
    return ctx.src.statement(m.location.line)


def _stated(ctx: ChangeContext):
    """The record the installation-side change edits, and its statement's word."""
    return (ctx.plan.mains, "mains") if ctx.plan.mains else (ctx.plan.supply, "supply")


def socket_rcd(ctx: ChangeContext, answer: Answer, add) -> None:
    """A fault not disconnected in time, or a TT supply protected by a fuse or breaker alone (the
    findings of ``answer``, at their rules' own severity): the supply circuit protected by a
    socket-outlet circuit's RCD, passed to ``add``.

    Parameters:
        ctx: the change context.
        answer: the rules naming the action and their findings.
        add: takes a candidate.
    Returns:
        nothing (the candidates go to ``add``).
    References:
        IEC 60364-4-41 411.3.3 and 411.5.2 (from memory); :data:`SOCKET_RCD`.
    """
    # a finding at its rule's own severity: a disconnection-time note only says that no
    # protective device is stated
    found = tuple(f for f in answer.findings if f.severity == RULES[f.code].severity)
    m, st = _stated(ctx)[0], _mains_statement(ctx)
    if st is None or not found or (m.rcd is not None and m.rcd <= SOCKET_RCD):
        return
    why = "it disconnects a fault to the metal within the time allowed, whatever the fault loop"
    add(_rcd(ctx, st, SOCKET_RCD, Answer(answer.codes, found).reason, why))


def tt_electrode(ctx: ChangeContext, answer: Answer, add) -> None:
    """A TT supply whose electrode times the RCD's rating exceeds the touch-voltage limit (the
    findings of ``answer``): a more sensitive RCD, and the electrode improved to a target, passed
    to ``add``.

    Parameters:
        ctx: the change context.
        answer: the rules naming the action and their findings.
        add: takes a candidate.
    Returns:
        nothing (the candidates go to ``add``).
    References:
        IEC 60364-4-41 411.5.3 (from memory); the ratings of :data:`RCD_RATINGS`.
    """
    (m, word), st = _stated(ctx), _mains_statement(ctx)
    if st is None or not answer.findings or m.rcd is None:
        return
    r_a = ctx.result.safety.supply.electrode if ctx.result.safety is not None else m.electrode
    finer = [r for r in RCD_RATINGS if r < m.rcd and (r_a is None or r_a * r <= TOUCH_LIMIT)]
    if finer:
        why = f"electrode × rating within {TOUCH_LIMIT:g} V"
        add(_rcd(ctx, st, finer[-1], answer.reason, why))
    target = electrode_target(m.rcd)
    if r_a is None or target < r_a:
        why = (
            f"{target:g} Ω × {m.rcd * 1e3:g} mA is within {TOUCH_LIMIT:g} V, and an electrode "
            f"above {STABLE_ELECTRODE:g} Ω may not stay so"
        )
        add(_electrode(ctx, st, word, target, why, answer.reason))


def _electrode(ctx: ChangeContext, st, word: str, target: float, why: str, reason: str):
    """The installation's earth electrode improved to ``target`` Ω: the statement ``st`` (of
    ``word``, mains or supply) then states it."""
    return Candidate(
        f"have the installation's earth electrode measured and improved to at most {target:g} Ω "
        f"(a target: {why}): {_DEFER}; the {word} statement then states 'electrode {target:g} "
        "ohm'",
        reason,
        (_set(ctx, st, "electrode", f"{target:g} ohm"),),
        action="electrode",
        element="mains",
        work=ELECTRODE_WORK,
    )


def it_electrode(ctx: ChangeContext, answer: Answer, add) -> None:
    """An IT supply whose electrode times its first-fault current exceeds the touch-voltage limit
    (GC231's dangers in ``answer``): the electrode improved to a target, passed to ``add``.

    Parameters:
        ctx: the change context.
        answer: the rules naming the action and their findings.
        add: takes a candidate.
    Returns:
        nothing (the candidate goes to ``add``).
    References:
        IEC 60364-4-41 411.6.2 (from memory).
    """
    (m, word), st = _stated(ctx), _mains_statement(ctx)
    dangers = [f for f in answer.findings if f.severity == "danger"]
    if st is None or not dangers or m.first_fault is None or m.electrode is None:
        return
    target = electrode_target(m.first_fault)
    if target >= m.electrode:
        return
    why = f"{target:g} Ω × {m.first_fault:g} A is within {TOUCH_LIMIT:g} V"
    add(_electrode(ctx, st, word, target, why, Answer(answer.codes, tuple(dangers)).reason))


def high_breaking(ctx: ChangeContext, f, add) -> None:
    """A fuse whose breaking capacity is below the prospective current (finding ``f``): the same
    rating and characteristic in a high-breaking (sand-filled ceramic) fuse, the mains statement
    then stating ``breaking high``; passed to ``add``.  None for a breaker, a stated breaking
    current or a fuse already high-breaking (the remedy is then the installation's).

    Parameters:
        ctx: the change context.
        f: the finding answered.
        add: takes a candidate.
    Returns:
        nothing (the candidate goes to ``add``).
    References:
        IEC 60127-2's breaking-capacity categories (from memory): high-breaking 1500 A.
    """
    m, st = ctx.plan.mains, _mains_statement(ctx)
    if m is None:  # an installation: the fuse is in the device's own plan
        m, _ = equipment_mains(ctx, f.elements[0] if f.elements else None)
        st = ctx.src.statement(m.location.line, m.location.file) if m is not None else None
    if (
        m is None
        or st is None
        or m.fuse_kind.startswith("breaker")
        or m.breaking == "high"
        or m.breaking_current is not None
    ):
        return
    add(
        Candidate(
            "use a high-breaking (sand-filled ceramic) fuse of the same rating and characteristic "
            "in the equipment's fuse holder; the mains statement then states 'breaking high'",
            f.code,
            (_set(ctx, st, "breaking", "high"),),
            action="fuse",
            element="mains",
        )
    )


def twist_heater(ctx: ChangeContext, f, add) -> None:
    """An AC heater pair run open (a field source, finding ``f`` its loop pickup, GC302): the pair
    twisted along its run, the heater statement then saying ``twisted``; passed to ``add``.

    Parameters:
        ctx: the change context.
        f: the finding answered (its second element is the field source).
        add: takes a candidate.
    Returns:
        nothing (the candidate goes to ``add``).
    References:
        common practice: a twisted pair's field falls off within a few lay lengths
        (docs/language.md, heater).
    """
    h = source_heater(ctx.plan.heaters, f.elements[1]) if len(f.elements) > 1 else None
    if h is None or not h.ac or h.twisted or not h.route:
        return
    st = ctx.src.statement(h.location.line, h.location.file)
    if st is None or h.location.file != ctx.plan.file:
        return
    add(
        Candidate(
            f"twist the heater pair {h.name} tightly along its whole run, from the winding to the "
            "valve (its field then stays within a few twists of the pair); the heater statement "
            "then says 'twisted'",
            f.code,
            (appended(ctx, st, "twisted"),),
            action="twist",
            element=h.name,
        )
    )

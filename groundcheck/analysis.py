"""Run every analysis on a plan and gather the findings: the library's ``analyze`` entry point.

The pipeline: audit context (graph, loops, protective route) → topology rules → circuit → analyses
(shared returns, protective-earth figures, device earth paths, hum budget) → rules on their
results. Every rule comes from the registry (:mod:`groundcheck.rules.registry`).
"""

from __future__ import annotations

from dataclasses import replace
from functools import partial

from .core.runtime import no_gc, one_blas_thread
from .model.records import Plan
from .physics.bonding_test import bonding_figures
from .physics.circuit import build_circuit
from .physics.coupling import rows_cost, shared_returns, transfer_tasks
from .rules.hum_rules import series_runs
from .rules.signal_networks import floating_signal_grounds
from .physics.hum import HumBudget, HumOptions
from .physics.humsettings import spectrum_cut
from .physics.outlets import OutletWork
from .physics.protection import STANDARD_PE_LIMIT
from .physics.rectifier import simulate
from .physics.device_earth import installation_earths
from .physics.safety import protective_figures
from .physics.sweep import run_tasks
from .physics.workload import check_devices, check_work, same_figures
from .rules.placed_supply import placed_supply_findings
from .rules.simple_disconnection import simple_device_disconnection
from .rules import families  # noqa: F401 - every family of rules registers itself
from .rules.context import AuditContext
from .rules.electrical import Solved
from .rules.registry import functions, hum_codes
from .rules.acceptance import apply_acceptances
from .core.errors import Location, PlanError, PlanErrors, UnknownChoice
from .rules.catalogue import RULES
from .rules.results import Options, Result
from .rules.selection import NotChecked, UnknownRule, codes_of, rule_codes

__all__ = ["Options", "Result", "analyze", "audit", "netlist_of"]


def audit(plan: Plan, ctx: AuditContext | None = None):
    """Run every topology rule; returns the findings and the context (graph, loops) they used."""
    ctx = ctx or AuditContext(plan)
    findings = []
    for r in functions("topology"):
        findings.extend(r.func(ctx))
    return findings, ctx


def analyze(plan: Plan, options: Options = Options()) -> Result:
    """Audit a plan's topology, solve its network, and compute its protective-earth and hum
    figures.

    The solves run with one BLAS thread (:func:`groundcheck.core.runtime.one_blas_thread`); the
    caller's setting is back when it returns."""
    with no_gc(), one_blas_thread():
        return _analyze(plan, options)


def netlist_of(
    plan: Plan,
    frequency: float,
    group: str | None = None,
    channel: str | None = None,
    plate_current: str = HumOptions.plate_current,
):
    """The plan's circuit and what a netlist at ``frequency`` holds besides it: the hum budget's
    currents, its loops' EMFs for the field directions it uses for ``channel``, and the stages'
    readings (:mod:`groundcheck.physics.hum_netlist`).

    Parameters:
        plan: the plan.
        frequency: Hz (0: DC).
        group: one source group, or None for all (an unknown one: an UnknownChoice naming them).
        channel: the channel whose directions and stages (None: the first).
        plate_current: how loop currents cross plates (``HumOptions.plate_current``).
    Returns:
        (circuit, NetlistSources).
    References:
        the module's description.
    """
    from .physics.hum_netlist import netlist_sources, source_groups

    with no_gc(), one_blas_thread():
        check_devices(plan)
        _, ctx = audit(plan)
        circuit = build_circuit(plan)
        top = max(Options().max_frequency, frequency)
        check_work(plan, ctx.loops, circuit, top, True)
        opts = HumOptions(top, plate_current=plate_current)
        budget = HumBudget(plan, circuit, ctx.loops, _simulated(plan), opts, (), series_runs(ctx))
        if channel is not None and channel not in budget.channels:
            raise UnknownChoice(
                f"no channel {channel!r} (the plan's: {', '.join(budget.channels)})"
            )
        groups = source_groups(budget, frequency)
        if group is not None and group not in groups:
            raise UnknownChoice(
                f"no source {group!r} with a line at {frequency:g} Hz (there: "
                f"{', '.join(groups) or 'none'})"
            )
        if budget.models and frequency > 0:  # the field directions: chosen as the budget merges
            tasks, _ = budget.tasks(1)
            budget.result(run_tasks(tasks, 1, None))
        return circuit, netlist_sources(budget, frequency, group, channel)


def _analyze(plan: Plan, options: Options) -> Result:
    errors = _acceptance_errors(plan)
    if errors:
        raise PlanErrors(errors)
    check_devices(plan)
    findings, ctx = audit(plan)
    result = Result(
        plan,
        findings,
        ctx.loops,
        ctx.loop_total,
        options=options,
        notices=_notices(plan, options),
        protective=ctx.route.keep,
    )
    if not plan.points and not plan.metals:
        return _finish(result)
    circuit = build_circuit(plan)
    check_work(
        plan, ctx.loops, circuit, options.max_frequency, options.hum
    )  # refused before the work
    result.circuit = circuit
    result.safety = protective_figures(plan, ctx.route, options.pe_limit, circuit)
    result.device_earths = installation_earths(plan, ctx.route, circuit)
    result.bonding = bonding_figures(plan, ctx.route, circuit)
    rr = _simulated(plan) if options.hum else {}
    result.rectifiers = list(rr.values())
    _solve(plan, ctx, circuit, rr, options, result)
    _no_verdict_when_floating(plan, ctx, result)
    _no_verdict_when_cut(result, options)
    if result.hum is not None:
        result.hum.notes += [
            f"stage {st.name} reads its input from {st.a}, the socket wired to {st.named} "
            f"(inferred: write 'reference {st.named}' on it to keep the pair as written)"
            for st in plan.stages
            if st.inferred
        ]
    # the placed devices' faults on the installation's supply first: GC215 reads whether a long
    # earth path still clears in time
    placed = _placed_devices(plan, options, result)
    solved = Solved(
        plan,
        ctx,
        circuit,
        result.coupling,
        result.safety,
        result.device_earths,
        result.hum,
        options,
        result.bonding,
    )
    for r in functions("solve"):
        findings.extend(r.func(solved))
    # a placed device's own finding, carried with what its installation adds, replaces the same
    # finding found again on the installation's network
    carried = {(f.code, f.elements) for f in placed}
    findings[:] = [f for f in findings if (f.code, f.elements) not in carried]
    findings.extend(placed)
    return _finish(result)


def _placed_devices(plan: Plan, options: Options, result: Result) -> list:
    """The findings of each placed device checked on the installation's supply (its own plan's
    protective-earth findings carried, a bought device's disconnection), its worst fault set on
    its row of the device earth table."""
    faults: dict = {}
    placed = placed_supply_findings(plan, options, analyze, faults)
    placed += simple_device_disconnection(plan, faults)
    if faults and result.device_earths:
        result.device_earths = tuple(
            replace(d, fault=faults.get(d.device)) for d in result.device_earths
        )
    return placed


def _no_verdict_when_floating(plan: Plan, ctx, result: Result) -> None:
    """A channel whose stages read points of a floating signal ground (GC106) gets no verdict of
    'inaudible': what a floating ground picks up (capacitively, from the mains wiring and the
    transformer) is not in the model, so a quiet computed hum says nothing of what is heard. A
    computed hum already audible stays audible (the pickup only adds), with a note."""
    if result.hum is None:
        return
    floating = set().union(*floating_signal_grounds(ctx))
    for ch, h in result.hum.channels.items():
        stages = [s for s in plan.stages if s.channel == ch]
        if not any({s.a, s.b, s.reference} & floating for s in stages):
            continue
        if h.audible:
            result.hum.notes.append(
                f"{ch}: its signal ground floats (GC106); the hum a floating ground picks up from "
                "the mains wiring and the transformer is not in the model, so the real hum is "
                "likely louder than computed"
            )
            continue
        h.audible, h.margin_db = None, None
        result.hum.notes.append(
            f"{ch}: no audibility verdict: its signal ground floats (GC106), and the hum a "
            "floating ground picks up from the mains wiring and the transformer is not in "
            "the model"
        )


def _no_verdict_when_cut(result: Result, options: Options) -> None:
    """A channel found inaudible on hum lines computed only up to ``--max-frequency`` (below the
    default) gets no verdict of 'inaudible': the lines left out may be the ones heard (a
    full-wave rectifier has none below twice the mains frequency). An audible one stays audible."""
    if result.hum is None or not spectrum_cut(options):
        return
    for ch, h in result.hum.channels.items():
        if h.audible is False:
            h.audible, h.margin_db = None, None
            result.hum.notes.append(
                f"{ch}: no audibility verdict: --max-frequency {options.max_frequency:g} Hz "
                "leaves out the hum lines above it, which may be the ones heard"
            )


def _simulated(plan: Plan) -> dict:
    """Each rectifier's steady state; rectifiers of the same figures (a rack of identical supplies)
    are simulated once, each result under its own name."""
    out, by_figures = {}, {}
    for r in plan.rectifiers:
        key = same_figures(r)
        if key not in by_figures:
            by_figures[key] = simulate(r, plan.frequency)
        out[r.name] = replace(by_figures[key], name=r.name)
    return out


def _solve(
    plan: Plan, ctx: AuditContext, circuit, rr: dict, options: Options, result: Result
) -> None:
    """The shared returns, the hum budget and the outlet voltages: their solves as one set of
    independent tasks, so that with ``jobs`` > 1 the processes share all of them (the costliest
    first), not only the hum budget's frequencies; the shared returns' transfers first, in slices,
    as the rows they list depend on them all.  The results are the same for any number of
    processes."""
    budget = outlets = None
    listed = run_tasks(transfer_tasks(plan, circuit, options.jobs), options.jobs)
    tasks = [partial(shared_returns, plan, circuit, listed)]
    costs = [rows_cost(plan, circuit)]
    if options.hum and plan.devices:
        outlets = OutletWork(plan, circuit, rr, options.max_frequency)
    if options.hum and plan.stages:
        budget = HumBudget(
            plan,
            circuit,
            ctx.loops,
            rr,
            HumOptions.of(options),
            outlets.pairs if outlets is not None else (),
            series_runs(ctx),
        )
        hum_tasks, hum_costs = budget.tasks(options.jobs)
        tasks += hum_tasks
        costs += hum_costs
    if outlets is not None:
        tasks.append(outlets.unplugged)
        costs.append(len(outlets.sources) * len(circuit.nodes) * len(outlets.freqs) / 4)
    done = run_tasks(tasks, options.jobs, costs)
    result.coupling = done[0]
    if budget is not None:
        result.hum = budget.result(done[1 : 1 + len(hum_tasks)])
    if outlets is not None:
        result.outlets = outlets.result(
            done[-1], result.hum.probes if result.hum is not None else None
        )


def _notices(plan: Plan, options: Options) -> list[str]:
    """What this run relaxed or skipped, said in every output format."""
    out = []
    # an installation's devices are checked on its supply with the same limit
    earthed = plan.mains is not None or any(p.mains for _, p in plan.device_plans)
    if options.pe_limit > STANDARD_PE_LIMIT * (1 + 1e-9) and earthed:
        out.append(
            f"protective-path limit relaxed to {options.pe_limit * 1e3:g} mΩ by --pe-limit (the "
            f"product-safety limit is {STANDARD_PE_LIMIT * 1e3:g} mΩ; a path over it stays a "
            "warning, never a fault or a danger)"
        )
    if plan.stages and options.hum and options.contributor_level > HumOptions.contributor_level:
        out.append(
            f"contributor level raised to {options.contributor_level:g} dBV by --hum-level (the "
            f"default is {HumOptions.contributor_level:g} dBV): a shared return or contributor "
            "below it is a note, whatever the channel's verdict"
        )
    measured = [c for c in plan.conductors if c.length_computed]
    if measured:
        named = ", ".join(f"{c.kind} {c.name} {c.length * 1e3:.0f} mm" for c in measured[:5])
        more = f" and {len(measured) - 5} more" if len(measured) > 5 else ""
        out.append(
            f"lengths not stated, measured along the ends' positions and routes: {named}{more}"
        )
    if not options.hum and plan.stages:
        out.append("hum and buzz budget skipped (--no-hum): no hum figures or hum findings")
    elif plan.stages and spectrum_cut(options):
        none = (
            f"; that is below the mains frequency ({plan.frequency:g} Hz), so no hum line was "
            "computed"
            if options.max_frequency < plan.frequency
            else ""
        )
        out.append(
            f"hum lines computed up to {options.max_frequency:g} Hz only (--max-frequency; the "
            f"default is {HumOptions.max_frequency:g} Hz){none}. No channel is judged inaudible "
            "and no shared return is judged quiet on the lines left, so the hum findings keep "
            "their full severity"
        )
    return out


def _finish(result: Result) -> Result:
    """The findings of the rules the run checks, acceptances applied; what was left out is said as
    not checked."""
    opts = result.options
    wanted = codes_of(opts.only_rules, opts.only_rules_origin) if opts.only_rules else set(RULES)
    unwanted = codes_of(opts.leave_out, opts.leave_out_origin)
    if set(RULES) - wanted:
        result.not_checked.append(
            NotChecked(
                tuple(c for c in RULES if c not in wanted),
                f"not among the rules chosen by {opts.only_rules_origin}",
            )
        )
    if unwanted & wanted:
        result.not_checked.append(
            NotChecked(
                tuple(c for c in RULES if c in unwanted and c in wanted),
                f"left out by {opts.leave_out_origin}",
            )
        )
    unheard = [c for c in hum_codes() if c in wanted and c not in unwanted]
    judged = wanted - unwanted
    if not opts.hum and result.plan.stages and unheard:
        result.not_checked.append(
            NotChecked(tuple(unheard), "judged from the hum figures, which --no-hum leaves out")
        )
        judged -= set(unheard)
    withheld = [
        ch
        for ch, h in (result.hum.channels.items() if result.hum is not None else ())
        if h.audible is None and spectrum_cut(opts)
    ]
    if withheld and "GC303" in judged:
        result.not_checked.append(
            NotChecked(
                ("GC303",),
                f"the audibility of {', '.join(withheld)}: judged from hum lines up to "
                f"{opts.max_frequency:g} Hz only (--max-frequency), which may leave out the ones "
                "heard",
            )
        )
        judged.discard("GC303")
    findings = [f for f in result.findings if f.code in wanted and f.code not in unwanted]
    done = apply_acceptances(findings, result.plan.acceptances, opts.allow_accept_danger, judged)
    result.not_checked += done.not_checked
    result.notices += done.notices
    result.findings = sorted(done.findings, key=lambda f: f.sort_key())
    result.notices += [n.sentence() for n in result.not_checked]
    for f in result.accepted_dangers():
        result.notices.append(
            f"a danger was accepted in the plan at {f.location.file}:{f.location.line}: {f.code} "
            f"{f.rule.name} — it still counts as a danger (worst finding, exit status 1 unless "
            "--fail-on never)"
        )
    return result


def _acceptance_errors(plan: Plan) -> list[PlanError]:
    """An accept comment's word that names no rule: an error at the word, with the nearest rule
    suggested."""
    errors = []
    for file, line, codes, _reason, *columns in plan.acceptances:
        for i, word in enumerate(codes):
            if rule_codes(word) is None:
                col = columns[0][i] if columns else 1
                errors.append(
                    PlanError(
                        f"unknown rule {word!r} in an accept comment",
                        Location(file, line, col),
                        UnknownRule(word).hint,
                    )
                )
    return errors

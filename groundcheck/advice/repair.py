"""Repair advisor: candidate changes to a plan, each tried by re-running the analysis.

Each candidate is a small edit of the plan's text (so the user can apply it as a unified diff):
lift a shield at one end, remove a redundant chassis bond, re-route a return to its star, join a
rectifier's two return ends directly, give the protective earth a stud of its own, thicken an
undersized protective conductor, or turn a second chassis bond into a lift network.

Safety: a candidate that deletes or re-routes a protective conductor is never tried; a candidate
whose re-analysis raises any protective path's resistance, leaves a touchable part unbonded or
adds a danger is rejected; both are listed as considered and rejected.

The combined search is greedy forward selection: at each step every remaining candidate is tried
on the plan as changed so far, the best is kept, and the search stops when every channel is
inaudible and no fault or danger is left, when nothing improves, or after :data:`MAX_STEPS` steps.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path

from ..analysis import Options, Result, analyze
from ..core.errors import PlanErrors
from ..rules.catalogue import severity_rank
from ..language.loader import load_text
from ..model.records import Plan

__all__ = ["Edit", "Candidate", "Evaluation", "candidates", "evaluate", "suggest", "greedy", "apply_edits", "unified_diff",
           "text_diff", "suggestions_document", "suggestions_text", "MAX_STEPS"]

MAX_STEPS = 8


@dataclass(frozen=True)
class Edit:
    """Replace line ``line`` (1-based) of the main plan file; ``new`` None comments it out; ``extra`` lines are added after it."""

    line: int
    new: str | None
    extra: tuple[str, ...] = ()


@dataclass(frozen=True)
class Candidate:
    title: str
    reason: str                     # the finding code(s) it answers
    edits: tuple[Edit, ...]
    touches_protective: bool = False


@dataclass
class Evaluation:
    candidate: Candidate
    result: Result | None
    score: float = 0.0
    hum_change_db: dict = field(default_factory=dict)   # channel -> dB (negative: less hum)
    cleared: list = field(default_factory=list)
    introduced: list = field(default_factory=list)
    rejected: str = ""
    hum_before_dbv: dict = field(default_factory=dict)  # channel -> dBV (floored at HUM_FLOOR_DBV)
    hum_after_dbv: dict = field(default_factory=dict)

    def rank_key(self, before: Result | None = None):
        """Sort key, best first: dangers cleared, faults cleared, hum gain, findings introduced, size of the change."""
        sev = lambda items, s: sum(1 for x in items if x.split(" ", 1)[0] in _CODES_BY_SEVERITY[s])  # noqa: E731
        gain = sum(max(0.0, -d) for d in self.hum_change_db.values()) - sum(max(0.0, d) for d in self.hum_change_db.values())
        return (bool(self.rejected), -sev(self.cleared, "danger"), -sev(self.cleared, "fault"), -round(gain, 1),
                len(self.introduced), len(self.candidate.edits), self.candidate.title)

    def as_dict(self, diff: str = "") -> dict:
        return {"title": self.candidate.title, "answers": self.candidate.reason, "score": round(self.score, 3),
                "hum_change_db": {k: round(v, 2) for k, v in self.hum_change_db.items()},
                "findings_cleared": self.cleared, "findings_introduced": self.introduced,
                "rejected": self.rejected or None, "diff": diff}


def apply_edits(text: str, edits) -> str:
    lines = text.split("\n")
    out = list(lines)
    for e in sorted(edits, key=lambda e: -e.line):
        i = e.line - 1
        old = lines[i]
        new = ("# " + old.strip() + "   # removed by groundcheck suggest") if e.new is None else e.new
        indent = old[: len(old) - len(old.lstrip())]
        out[i: i + 1] = [new] + [indent + x for x in e.extra]
    return "\n".join(out)


def text_diff(old: str, new: str, name: str) -> str:
    """A unified diff of a plan file's text (paths a/NAME and b/NAME, one line of context)."""
    return "".join(difflib.unified_diff(old.splitlines(True), new.splitlines(True), f"a/{name}", f"b/{name}", n=1))


def unified_diff(text: str, edits, name: str) -> str:
    return text_diff(text, apply_edits(text, edits), name)


# --- reading and writing single statements --------------------------------------------------------

_HEAD = re.compile(r"^(?P<indent>\s*)(?P<kw>[\w-]+)\s+(?P<label>[\w.\-]+)\s*:\s*(?P<a>[\w.\-]+)\s+to\s+(?P<b>[\w.\-]+)(?P<rest>.*)$")


def _statement(lines, line_no):
    if not 1 <= line_no <= len(lines):
        return None
    m = _HEAD.match(lines[line_no - 1])
    if m is None or lines[line_no - 1].rstrip().endswith(","):
        return None
    return m


def _local(model_name: str, label: str, target: str) -> str:
    """How ``target`` is written inside the statement whose element is ``model_name`` (local label ``label``)."""
    prefix = model_name[: len(model_name) - len(label)]
    if prefix and target.startswith(prefix):
        return target[len(prefix):]
    return target


class _Ctx:
    def __init__(self, plan: Plan, result: Result, text: str):
        self.plan, self.result, self.text = plan, result, text
        self.lines = text.split("\n")
        self.cond = {c.name: c for c in plan.conductors}
        self.stars = [p.name for p in plan.points if p.kind == "star"]
        self.metals = {m.name for m in plan.metals}

    def protective(self, c) -> bool:
        """Protective by topology or by role (groundcheck.earthing): never removed, re-routed or lifted."""
        return c.name in self.result.protective or c.role == "protective"

    def in_main(self, c) -> bool:
        return c.location.file == self.plan.file

    @cached_property
    def G(self):
        from ..network.graph import build_graph
        return build_graph(self.plan)

    def nearest_star(self, node: str) -> str | None:
        import networkx as nx
        G = self.G
        best = None
        for s in self.stars:
            try:
                d = nx.shortest_path_length(G, node, s)
            except (nx.NetworkXNoPath, nx.NodeNotFound):
                continue
            if best is None or d < best[0]:
                best = (d, s)
        return best[1] if best else None


def _delete(ctx: _Ctx, name: str, title: str, reason: str) -> Candidate | None:
    c = ctx.cond.get(name)
    if c is None or c.kind == "interconnect" or not ctx.in_main(c) or _statement(ctx.lines, c.location.line) is None:
        return None
    return Candidate(title, reason, (Edit(c.location.line, None),), ctx.protective(c))


def _reroute(ctx: _Ctx, name: str, end: str, to: str, title: str, reason: str) -> Candidate | None:
    """Move the ``end`` of conductor ``name`` to point ``to``."""
    c = ctx.cond.get(name)
    if c is None or c.kind in ("interconnect", "shield") or not ctx.in_main(c) or to == end:
        return None
    m = _statement(ctx.lines, c.location.line)
    if m is None:
        return None
    label = m["label"]
    new_local = _local(c.name, label, to)
    if _local(c.name, label, end) not in (m["a"], m["b"]):
        return None
    a, b = m["a"], m["b"]
    if _local(c.name, label, end) == b and c.b == end:
        b = new_local
    elif _local(c.name, label, end) == a and c.a == end:
        a = new_local
    else:
        return None
    if a == b:
        return None
    new = f"{m['indent']}{m['kw']} {label}: {a} to {b}{m['rest']}"
    return Candidate(title + _block_note(c.name, label), reason, (Edit(c.location.line, new),), ctx.protective(c))


def _block_note(model_name: str, label: str) -> str:
    """A note when the edited statement sits in a block: the change applies to every placement."""
    return f" — in its block, so for every placement ({label})" if model_name != label else ""


def _replace_in_line(ctx: _Ctx, name: str, old: str, new: str, title: str, reason: str, protective=None) -> Candidate | None:
    c = ctx.cond.get(name)
    if c is None or not ctx.in_main(c):
        return None
    line = ctx.lines[c.location.line - 1]
    if old not in line or line.rstrip().endswith(","):
        return None
    touches = ctx.protective(c) if protective is None else protective
    return Candidate(title, reason, (Edit(c.location.line, line.replace(old, new, 1)),), touches)


def candidates(plan: Plan, result: Result, text: str) -> list[Candidate]:
    """Candidate changes answering the plan's loop, shared-return, star, bonding and protective findings."""
    ctx = _Ctx(plan, result, text)
    out: list[Candidate] = []

    def add(c):
        if c is not None and all(c.edits != x.edits for x in out):
            out.append(c)

    for lp in result.loops:
        if lp.closed_by == "chassis-structure" or not lp.open_at:
            continue
        c = ctx.cond[lp.open_at]
        if lp.closed_by == "shield-both-ends" and c.kind == "shield":
            continue          # answered by lifting one end, below
        what = "insulate" if c.kind == "bolt" else "remove"
        how = " from the metal (insulated socket or shoulder washers)" if what == "insulate" else ""
        add(_delete(ctx, lp.open_at, f"{what} {lp.open_at}{how} to open the loop closed by {lp.closed_by}", "GC101"))
        if lp.closed_by in ("second-chassis-bond", "mains-cords") and c.kind == "wire":
            m = _statement(ctx.lines, c.location.line)
            if m is not None and ctx.in_main(c):
                new = f"{m['indent']}lift {m['label']}: {m['a']} to {m['b']}, 10 ohm, 47 nF"
                add(Candidate(f"replace {lp.open_at} by a lift network (10 Ω ∥ 47 nF)", "GC101",
                              (Edit(c.location.line, new),), ctx.protective(c)))
    for f in result.findings:
        if f.code == "GC108":
            (_, shield, keep), = f.actions
            c = ctx.cond[shield]
            m = _statement(ctx.lines, c.location.line)
            if m is not None:
                add(_replace_in_line(ctx, c.name, "terminated both", f"terminated {_local(c.name, m['label'], keep)}",
                                     f"terminate shield {c.name} at {keep} only", "GC108"))
        elif f.code == "GC105":
            for verb, e in f.actions:
                c = ctx.cond.get(e)
                if c is None or c.kind in ("shield", "interconnect"):
                    continue          # a shield is lifted at one end (GC108), not removed
                if verb == "insulate":
                    add(_delete(ctx, e, f"insulate {e} from the metal (insulated socket or shoulder washers)", "GC105"))
                else:
                    add(_delete(ctx, e, f"remove the second chassis bond {e}", "GC105"))
        elif f.code == "GC103":
            import networkx as nx
            G = ctx.G
            stars = [e for e in f.elements if e in ctx.stars]
            if not stars:
                continue
            dist = nx.single_source_shortest_path_length(G, stars[0])
            for c in plan.conductors:
                if c.a in f.elements and c.b in f.elements and not ctx.protective(c) and stars[0] not in (c.a, c.b):
                    near = c.a if dist.get(c.a, 10 ** 9) < dist.get(c.b, 10 ** 9) else c.b
                    far = c.b if near == c.a else c.a
                    add(_reroute(ctx, c.name, near, stars[0], f"run {far} to {stars[0]} by its own wire ({c.name})", "GC103"))
        elif f.code == "GC202":
            pe = next((ctx.cond[e] for e in f.elements if e in ctx.cond and ctx.cond[e].role == "protective"), None)
            old_pt = plan.point(f.elements[1]) if len(f.elements) > 1 else None
            if pe is not None and old_pt is not None and old_pt.pos is not None and ctx.in_main(pe):
                part = next((ctx.cond[k].b if ctx.cond[k].b in ctx.metals else ctx.cond[k].a for k in ctx.cond
                             if ctx.cond[k].kind == "bolt" and old_pt.name in (ctx.cond[k].a, ctx.cond[k].b)
                             and (ctx.cond[k].a in ctx.metals) != (ctx.cond[k].b in ctx.metals)), None)
                m = _statement(ctx.lines, pe.location.line)
                if part is not None and m is not None:
                    x, y = old_pt.pos[0] * 1e3 + 15, old_pt.pos[1] * 1e3
                    metal = plan.metal(part)
                    if not metal.contains((x / 1e3, y / 1e3)):
                        x -= 30
                    new_pt = "pe_stud" if plan.point("pe_stud") is None else "pe_stud2"
                    a, b = m["a"], m["b"]
                    if pe.b == old_pt.name:
                        b = new_pt
                    else:
                        a = new_pt
                    add(Candidate(f"give the protective earth a stud of its own ({new_pt})", "GC202",
                                  (Edit(pe.location.line, f"{m['indent']}{m['kw']} {m['label']}: {a} to {b}{m['rest']}",
                                        (f"point {new_pt}: stud, at {x:g},{y:g} on {part}",
                                         f"bolt {new_pt}_nut: {new_pt} to {part}")),),
                                  touches_protective=False))
        elif f.code == "GC204":
            c = ctx.cond[f.elements[0]]
            line_area = plan.mains.line_area * 1e6
            m = re.search(r"(\d+(\.\d+)?\s*(mm2|mm²)|\d+\s*AWG|AWG\s*\d+)", ctx.lines[c.location.line - 1])
            if m:
                add(_replace_in_line(ctx, c.name, m.group(0), f"{line_area:g} mm2",
                                     f"use {line_area:g} mm² for protective conductor {c.name}", "GC204", protective=False))
    # between pieces of equipment: a balanced interconnect, or a lift network on a device's signal side
    for name in sorted(_installation_interconnects(plan, result)):
        c = ctx.cond[name]
        if not ctx.in_main(c):
            continue
        line = ctx.lines[c.location.line - 1]
        if "unbalanced" in line and not line.rstrip().endswith(","):
            add(Candidate(f"use a balanced interconnect for {name}", "GC101", (Edit(c.location.line, line.replace("unbalanced", "balanced", 1)),)))
        for end in (c.a, c.b):
            pt = plan.point(end)
            if pt is None or not pt.group:
                continue
            dev = pt.group.split(".", 1)[0]
            bond = ctx.cond.get(f"{dev}.gnd_bond")
            if bond is None or bond.kind != "bolt" or not ctx.in_main(bond):
                continue
            dline = ctx.lines[bond.location.line - 1]
            if dline.rstrip().endswith(","):
                continue
            new = dline.replace("signal-ground chassis", "signal-ground lift") if "signal-ground chassis" in dline \
                else dline.rstrip() + ", signal-ground lift"
            add(Candidate(f"give {dev} a ground-lift network between its signal ground and chassis (never the protective earth)",
                          "GC101", (Edit(bond.location.line, new),)))
    # shared returns: join the rectifier's ends directly, and re-route the stage's reference to the star
    for row in result.coupling:
        src = next((r for r in (*plan.rectifiers, *plan.currents) if r.name == row.source), None)
        stage = next((s for s in plan.stages if s.name == row.stage), None)
        if src is None or stage is None:
            continue
        for shared in row.shared:
            c = ctx.cond.get(shared)
            if c is None:
                continue
            for end, other in ((src.a, src.b), (src.b, src.a)):
                for d in plan.conductors:
                    if other in (d.a, d.b) and d.name != shared and not ctx.protective(d):
                        far = d.b if d.a == other else d.a
                        if far in (c.a, c.b) and far != end:
                            add(_reroute(ctx, d.name, far, end, f"join {other} straight to {end} ({d.name}), "
                                         f"so the {src.name} current leaves {shared}", "GC102"))
            for p in (stage.b, stage.a):
                star = ctx.nearest_star(p)
                for d in plan.conductors:
                    if p in (d.a, d.b) and not ctx.protective(d):
                        far = d.b if d.a == p else d.a
                        if star and far != star and far in (c.a, c.b):
                            add(_reroute(ctx, d.name, far, star, f"take {p} to {star} by its own wire ({d.name})", "GC102"))
    return out


_CODES_BY_SEVERITY: dict[str, set[str]] = {}


def _codes_by_severity():
    from ..rules.catalogue import RULES
    for code, rule in RULES.items():
        _CODES_BY_SEVERITY.setdefault(rule.severity, set()).add(code)


_codes_by_severity()

#: hum totals are compared down to this level, dBV: below it a change is of no consequence
HUM_FLOOR_DBV = -140.0

#: a protective path may change by this much (relative) before a change counts as weakening it: the
#: plate model's own accuracy (see groundcheck.plate)
PE_TOLERANCE = 0.06


def _installation_interconnects(plan: Plan, result: Result) -> set[str]:
    """Interconnects in loops through mains cords, or sharing a supply or leakage current with a stage."""
    kinds = {c.name: c.kind for c in plan.conductors}
    names = {e for lp in result.loops if lp.closed_by == "mains-cords" for e in lp.loop.edges if kinds.get(e) == "interconnect"}
    names |= {e for row in result.coupling for e in row.shared if kinds.get(e) == "interconnect"}
    return names


def _hum_db(r: Result) -> dict[str, float]:
    if r.hum is None:
        return {}
    return {ch: max(HUM_FLOOR_DBV, 20 * math.log10(h.total_v) if h.total_v > 0 else HUM_FLOOR_DBV)
            for ch, h in r.hum.channels.items()}


def _keys(r: Result):
    return {(f.code, tuple(sorted(f.elements))): f for f in r.findings}


def _pe(r: Result) -> dict[str, float]:
    return {} if r.safety is None else {p.part: p.path_resistance for p in r.safety.parts}


def evaluate(base_text: str, plan: Plan, before: Result, cand: Candidate, options: Options,
             root: Path | None = None, resolved: Path | None = None) -> Evaluation:
    """Apply a candidate to the text, re-analyse, and score it against ``before``."""
    if cand.touches_protective:
        return Evaluation(cand, None, rejected="it would change a protective conductor")
    text = apply_edits(base_text, cand.edits)
    try:
        p = load_text(text, plan.file, root=root, _resolved=resolved)
    except PlanErrors as e:
        return Evaluation(cand, None, rejected=f"the edited plan does not load ({e.errors[0].one_line()})")
    after = analyze(p, options)
    ev = Evaluation(cand, after)
    lost = sorted(before.protective - after.protective)
    if lost:
        ev.rejected = f"it would take {', '.join(lost[:3])} off the protective route"
        return ev
    pe0, pe1 = _pe(before), _pe(after)
    if any(part not in pe1 or pe1[part] > r * (1 + PE_TOLERANCE) + 1e-5 for part, r in pe0.items()):
        ev.rejected = "it would weaken the protective-earth path"
        return ev
    k0, k1 = _keys(before), _keys(after)
    ev.cleared = sorted(f"{k[0]} {', '.join(k[1])}" for k in k0.keys() - k1.keys())
    ev.introduced = sorted(f"{k[0]} {', '.join(k[1])}" for k in k1.keys() - k0.keys())
    new = k1.keys() - k0.keys()
    if any(k1[k].severity == "danger" for k in new):
        ev.rejected = "it would add a danger finding"
        return ev
    if any(k[0] in ("GC106", "GC109", "GC401") for k in new):
        ev.rejected = "it would leave part of the signal ground unconnected"
        return ev
    h0, h1 = _hum_db(before), _hum_db(after)
    ev.hum_before_dbv, ev.hum_after_dbv = h0, {ch: h1.get(ch, HUM_FLOOR_DBV) for ch in h0}
    ev.hum_change_db = {ch: ev.hum_after_dbv[ch] - h0[ch] for ch in h0}
    weight = {0: 30.0, 1: 10.0, 2: 3.0, 3: 0.5}
    score = sum(max(0.0, -d) for d in ev.hum_change_db.values()) - sum(max(0.0, d) for d in ev.hum_change_db.values())
    score += sum(weight[severity_rank(k0[k].severity)] for k in k0.keys() - k1.keys())
    score -= sum(weight[severity_rank(k1[k].severity)] for k in k1.keys() - k0.keys())
    ev.score = score
    return ev


def suggest(plan: Plan, text: str, options: Options = Options(), root: Path | None = None,
            resolved: Path | None = None) -> tuple[Result, list[Evaluation]]:
    """Every candidate evaluated; the useful ones first (best score), the rejected ones last."""
    before = analyze(plan, options)
    evs = [evaluate(text, plan, before, c, options, root, resolved) for c in candidates(plan, before, text)]
    evs.sort(key=lambda e: e.rank_key())
    return before, evs


def greedy(plan: Plan, text: str, options: Options = Options(), root: Path | None = None,
           resolved: Path | None = None) -> tuple[list[Evaluation], Result, str]:
    """The smallest set of changes found by greedy forward selection (see the module's docstring)."""
    current_text, current_plan = text, plan
    current = analyze(plan, options)
    chosen: list[Evaluation] = []
    for _ in range(MAX_STEPS):
        if not current.findings:
            break
        evs = [evaluate(current_text, current_plan, current, c, options, root, resolved)
               for c in candidates(current_plan, current, current_text)]
        good = [e for e in evs if not e.rejected and e.score > 1e-9]
        if not good:
            break
        best = max(good, key=lambda e: (e.score, e.candidate.title))
        chosen.append(best)
        current_text = apply_edits(current_text, best.candidate.edits)
        current_plan, current = best.result.plan, best.result
    return chosen, current, current_text


def _level(dbv: float) -> str:
    return f"below {HUM_FLOOR_DBV:.0f} dBV" if dbv <= HUM_FLOOR_DBV else f"{dbv:.1f} dBV"


def _hum_change_words(ch: str, before: float, after: float) -> str:
    """'left: −47.1 → −96.3 dBV (49.2 dB quieter)': real levels, and the change in words."""
    d = after - before
    change = "unchanged" if abs(d) < 0.05 else (f"{-d:.1f} dB quieter" if d < 0 else f"{d:.1f} dB louder")
    if after <= HUM_FLOOR_DBV:
        change = "hum removed from this channel" if before > HUM_FLOOR_DBV else "unchanged"
    return f"hum {ch}: {_level(before)} → {_level(after)} ({change})"


def _hum_words(ch: str, h) -> str:
    level = f"{20 * math.log10(h.total_v):.1f} dBV" if h.total_v > 0 else "none computed (below 1 pV)"
    verdict = {True: "audible", False: "inaudible", None: "no verdict"}[h.audible]
    return f"{ch} {level} ({verdict})"


def suggestions_document(plan: Plan, text: str, name: str, evs: list[Evaluation], chosen: list[Evaluation],
                         final: Result, final_text: str) -> dict:
    """The suggestions as plain data (``groundcheck suggest --format json``)."""
    return {"plan": plan.file,
            "suggestions": [e.as_dict(unified_diff(text, e.candidate.edits, name)) for e in evs if not e.rejected],
            "rejected": [e.as_dict() for e in evs if e.rejected],
            "combined": {"search": "greedy forward selection, every remaining change re-analysed at each step",
                         "changes": [e.candidate.title for e in chosen],
                         "findings_left": [f"{f.code} {f.severity}" for f in final.findings],
                         "diff": text_diff(text, final_text, name)}}


def suggestions_text(plan: Plan, text: str, name: str, evs: list[Evaluation], chosen: list[Evaluation],
                     final: Result, caution: str) -> str:
    """The suggestions as the terminal shows them: each with its predicted effect and its diff."""
    useful = [e for e in evs if not e.rejected]
    rejected = [e for e in evs if e.rejected]
    out = [f"Suggestions for {plan.file} (each re-analysed; best first)", caution, ""]
    if not useful:
        out.append("No change found that improves the plan.")
    for i, e in enumerate(useful, 1):
        hum = "; ".join(_hum_change_words(ch, e.hum_before_dbv[ch], e.hum_after_dbv[ch]) for ch in e.hum_change_db)
        out.append(f"{i}. {e.candidate.title}  [answers {e.candidate.reason}]")
        cleared = f"clears {len(e.cleared)} finding" + ("" if len(e.cleared) == 1 else "s")
        out.append(f"   predicted: {hum or 'no hum figures'}; {cleared}"
                   + (f"; introduces: {', '.join(e.introduced)}" if e.introduced else ""))
        out.append("   " + unified_diff(text, e.candidate.edits, name).replace("\n", "\n   ").rstrip())
        out.append("")
    if rejected:
        out.append("Considered and rejected:")
        out.extend(f"  - {e.candidate.title}: {e.rejected}" for e in rejected)
        out.append("")
    out.append(f"Combined (greedy search): {len(chosen)} change(s): " + "; ".join(e.candidate.title for e in chosen))
    left = [f"{f.code} {f.severity}" for f in final.findings]
    out.append("  leaves no finding" if not left else f"  leaves: {', '.join(left)}")
    if final.hum is not None:
        out.append("  hum after: " + ", ".join(_hum_words(ch, h) for ch, h in final.hum.channels.items()))
    return "\n".join(out) + "\n"

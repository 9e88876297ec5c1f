"""Topology rules: loops, stars, chassis bonds, shields, heaters and the protective earth.

Each rule is a pure function of an :class:`AuditContext` returning findings.
:func:`audit` runs them all.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field
from functools import cached_property

import networkx as nx
import numpy as np
import scipy.sparse as sp
import scipy.sparse.csgraph as csgraph

from ..core.errors import Location
from .catalogue import Finding
from ..network.earthing import ProtectiveRoute, earth_terminals, protective_route, signal_points
from ..model.kinds import PROTECTIVE_ROLES, bonds_metal, can_carry_protective, cross_section, is_fastening, section_checked
from ..model.records import PE_POINT, Conductor, Plan
from ..network.graph import Loop, build_graph, components, edges_of, fundamental_loops, loop_polygon, polygon_area

__all__ = ["AuditContext", "audit", "LoopInfo", "classify_loop", "LOOP_LIST_LIMIT"]

#: how many loops are listed one by one (the count is always exact)
LOOP_LIST_LIMIT = 500

LOOP_CLASSES = {
    "mains-cords": "an interconnect shield and the protective earth through two mains cords",
    "shield-both-ends": "a shield terminated at both ends",
    "channel-returns": "the returns of two channels tied in two places",
    "second-chassis-bond": "a second bond of the signal ground to a metal part",
    "metal-return": "a metal part used as a return path",
    "chassis-structure": "metal parts and their fastenings only",
    "parallel-wiring": "two wires in parallel",
}


@dataclass(frozen=True)
class LoopInfo:
    """A listed loop: members in order, what closes it, its area (None without positions)."""

    loop: Loop
    closed_by: str
    area: float | None                      # m²
    open_at: str                            # the conductor to open to break it
    polygon: tuple | None = None

    def as_dict(self) -> dict:
        return {"members": list(self.loop.nodes), "conductors": list(self.loop.edges), "closed_by": self.closed_by,
                "area_mm2": None if self.area is None else round(self.area * 1e6, 3), "open_at": self.open_at}


@dataclass
class AuditContext:
    """What the rules read: the plan, its graph, and facts derived once."""

    plan: Plan
    G: nx.MultiGraph = field(default=None)

    def __post_init__(self):
        if self.G is None:
            self.G = build_graph(self.plan)

    @cached_property
    def conductors(self) -> dict[str, Conductor]:
        return {c.name: c for c in self.plan.conductors}

    @cached_property
    def metals(self) -> set[str]:
        return {m.name for m in self.plan.metals}

    @cached_property
    def chassis_side(self) -> set[str]:
        """Metal parts, points fastened or strapped to one, and the earth terminals."""
        side = set(self.metals)
        for c in self.plan.conductors:
            if c.connects and bonds_metal(c):
                if c.a in self.metals:
                    side.add(c.b)
                if c.b in self.metals:
                    side.add(c.a)
        side.update(n for n in self.earth_terminals if n in self.G)
        return side

    @cached_property
    def signal_points(self) -> set[str]:
        return signal_points(self.plan)

    @cached_property
    def earth_terminals(self) -> list[str]:
        """Every earth terminal of the plan: main earthing terminals, outlets, inlets (mains.pe and devices')."""
        terms = earth_terminals(self.plan)
        return sorted(n for k in terms for n in terms[k])

    @cached_property
    def route(self) -> ProtectiveRoute:
        """The protective route (:mod:`groundcheck.network.earthing`): what is protective by topology or role."""
        return protective_route(self.plan, self.adj)

    @cached_property
    def protective_path(self) -> frozenset:
        """Conductors that are protective by topology or by role: never to be opened."""
        return self.route.conductors

    @cached_property
    def source_pairs(self) -> set[frozenset]:
        """The two ends of each rectifier and stated current: joined on purpose."""
        return {frozenset((r.a, r.b)) for r in (*self.plan.rectifiers, *self.plan.currents)}

    @cached_property
    def edges(self) -> list[tuple]:
        """Every edge once as (u, v, conductor name, data)."""
        return edges_of(self.G)

    @cached_property
    def adj(self) -> dict:
        """The graph's adjacency as plain dicts: node -> neighbour -> conductor name -> data."""
        return dict(self.G.adjacency())

    @cached_property
    def parts(self) -> tuple[list, np.ndarray, int]:
        """Connected parts of the graph: (nodes, part label of each, number of parts)."""
        return components(self.G, self.edges)

    @cached_property
    def loop_total(self) -> int:
        order, _, ncomp = self.parts
        return len(self.edges) - len(order) + ncomp if order else 0

    @cached_property
    def loops(self) -> list[LoopInfo]:
        out = []
        for lp in fundamental_loops(self.G, limit=LOOP_LIST_LIMIT, edges=self.edges):
            closed_by = classify_loop(self, lp)
            poly = loop_polygon(self.G, lp)
            area = polygon_area(poly) if poly is not None else None
            out.append(LoopInfo(lp, closed_by, area, _open_at(self, lp, closed_by), tuple(poly) if poly else None))
        return out

    def loc(self, name: str) -> Location:
        c = self.conductors.get(name)
        if c is not None:
            return c.location
        n = self.G.nodes.get(name, {})
        obj = n.get("point") or n.get("metal")
        return obj.location if obj is not None else self.plan.location


def classify_loop(ctx: AuditContext, lp: Loop) -> str:
    """What closes a loop: one of :data:`LOOP_CLASSES`."""
    cs = [ctx.conductors[e] for e in lp.edges]
    kinds = {c.kind for c in cs}
    roles = {c.role for c in cs}
    has_metal = any(n in ctx.metals for n in lp.nodes)
    if "interconnect" in kinds and "protective" in roles:
        return "mains-cords"
    if kinds & {"shield", "interconnect"}:
        return "shield-both-ends"
    known = set(ctx.plan.channels)
    channels = {c.channel for c in cs if c.channel in known} | {_node_channel(ctx, n) for n in lp.nodes} & known
    if len(channels) >= 2:
        return "channel-returns"
    if has_metal and roles <= {"bond", "protective"}:
        return "chassis-structure"
    if has_metal and "signal" in roles:
        return "second-chassis-bond"
    if has_metal:
        return "metal-return"
    return "parallel-wiring"


def _node_channel(ctx: "AuditContext", name: str) -> str | None:
    """The placement (block or device) a point was placed by: in a dual-mono plan, its channel."""
    data = ctx.G.nodes[name] if name in ctx.G else {}
    point = data.get("point")
    return point.group.split(".", 1)[0] if point is not None and point.group else None


def _open_at(ctx: AuditContext, lp: Loop, closed_by: str) -> str:
    """The conductor to open: never a protective conductor or a fastening of metal parts."""
    cs = [ctx.conductors[e] for e in lp.edges]
    candidates = [c for c in cs if c.role != "protective" and c.name not in ctx.protective_path
                  and not (bonds_metal(c) and c.role == "bond" and (c.a in ctx.metals and c.b in ctx.metals))]
    if not candidates:
        return ""
    if closed_by == "mains-cords":
        ic = [c for c in candidates if c.kind == "interconnect"]
        if ic:
            return ic[0].name
    if closed_by == "shield-both-ends":
        sh = [c for c in candidates if c.kind in ("shield", "interconnect")]
        if sh:
            return sh[0].name
    if closed_by == "channel-returns":
        ties = [c for c in candidates if not c.channel and _node_channel(ctx, c.a) and _node_channel(ctx, c.b)
                and _node_channel(ctx, c.a) != _node_channel(ctx, c.b)]
        if ties:
            return ties[0].name
    if closed_by == "second-chassis-bond":
        # a signal point fastened to the metal (an uninsulated jack, say) is the bond to remove
        ends = {x for st in ctx.plan.stages for x in (st.a, st.b)} | {x for r in ctx.plan.currents for x in (r.a, r.b)}
        bolts = [c for c in candidates if c.kind == "bolt" and ((c.a in ctx.metals and c.b in ends)
                                                                or (c.b in ctx.metals and c.a in ends))]
        if bolts:
            return bolts[0].name
        # otherwise keep the bond nearest the protective earth and open the farthest
        crossing = [c for c in candidates if (c.a in ctx.chassis_side) != (c.b in ctx.chassis_side)]
        if crossing:
            return max(crossing, key=lambda c: (_pe_distance(ctx, c.a if c.a in ctx.chassis_side else c.b), c.name)).name
    return candidates[-1].name


def _pe_distance(ctx: AuditContext, node: str) -> float:
    """Straight-line distance from a chassis-side point to the protective-earth landing (0 when unknown)."""
    pe = [v for v in ctx.G.adj.get(PE_POINT, {}) if ctx.G.nodes[v].get("pos") is not None]
    here = ctx.G.nodes[node].get("pos") if node in ctx.G else None
    if not pe or here is None:
        return 0.0
    p = ctx.G.nodes[pe[0]]["pos"]
    return ((p[0] - here[0]) ** 2 + (p[1] - here[1]) ** 2) ** 0.5


def _loop_text(lp: Loop) -> str:
    return " → ".join(lp.nodes + lp.nodes[:1])


def rule_loops(ctx: AuditContext) -> list[Finding]:
    out = []
    for info in ctx.loops:
        if info.closed_by == "chassis-structure":
            continue
        figures = {"conductors": len(info.loop.edges)}
        if info.area is not None:
            figures["area_mm2"] = round(info.area * 1e6, 1)
        opener = ctx.conductors.get(info.open_at)
        if opener is not None and is_fastening(opener, ctx.metals):
            where, actions = f"insulate {info.open_at} from the metal (insulated socket or shoulder washers)", (("insulate", info.open_at),)
        elif opener is not None:
            where, actions = f"open the loop at {info.open_at}", (("open", info.open_at),)
        else:
            where, actions = "open the loop outside the protective earth", ()
        fix = where + \
            {"shield-both-ends": " (terminate the shield at one end only)",
             "channel-returns": " (join the channels at one point only)",
             "second-chassis-bond": " (keep one bond of the signal ground to the chassis)",
             "metal-return": " (return currents by wire, not through the metal)",
             "mains-cords": " (use a balanced interconnect or a ground-lift network on the signal side; never lift the protective earth)"}.get(info.closed_by, "")
        out.append(Finding("GC101", "warning",
                           f"ground loop closed by {LOOP_CLASSES[info.closed_by]}: {_loop_text(info.loop)}",
                           ctx.loc(info.open_at or info.loop.edges[-1]), info.loop.edges, figures, fix, actions))
    extra = ctx.loop_total - len(ctx.loops) - sum(1 for c in ctx.plan.conductors if c.connects and c.a == c.b)
    if extra > 0:
        out.append(Finding("GC101", "note", f"{extra} more independent loops not listed (limit {LOOP_LIST_LIMIT})",
                           ctx.plan.location, (), {"loops_total": ctx.loop_total}, "open the loops listed first"))
    return out


def _bfs(adj: dict, sources, allowed=None):
    """Hop distances and parents from any of ``sources`` over nodes passing ``allowed`` (``adj``: node -> neighbours)."""
    dist, parent = {}, {}
    q = deque()
    for s in sources:
        dist[s], parent[s] = 0, None
        q.append(s)
    while q:
        u = q.popleft()
        for v in adj[u]:
            if v not in dist and (allowed is None or allowed(v)):
                dist[v], parent[v] = dist[u] + 1, u
                q.append(v)
    return dist, parent


def rule_stars(ctx: AuditContext) -> list[Finding]:
    out = []
    stars = [p for p in ctx.plan.points if p.kind == "star" and p.name in ctx.G]
    if not stars:
        return out
    terminals = {t for t in ctx.signal_points if t in ctx.G and t not in ctx.chassis_side}
    star_names = {s.name for s in stars}
    allowed = lambda v: v not in ctx.metals  # noqa: E731
    for s in stars:
        degree = ctx.G.degree(s.name)
        if degree == 1:
            (u, v, k), = ctx.G.edges(s.name, keys=True)
            out.append(Finding("GC104", "note", f"star {s.name} has a single branch ({k})", s.location, (s.name, k),
                               {"branches": 1}, "connect the returns that should gather there, or call it a junction"))
    # each terminal belongs to its nearest star; a chain is a terminal whose path passes another terminal
    dist, parent = _bfs(ctx.adj, sorted(star_names), allowed)
    groups = {p.name: p.group for p in ctx.plan.points}
    chains: dict[str, list[tuple[str, str]]] = {}
    for t in sorted(terminals - star_names):
        if t not in dist:
            continue
        path = [t]
        while parent[path[-1]] is not None:
            path.append(parent[path[-1]])
        star = path[-1]
        if groups.get(star) and groups.get(t) != groups.get(star):
            continue          # a star placed in a block or device gathers that placement's returns only
        via = [n for n in path[1:-1] if n in terminals and frozenset((t, n)) not in ctx.source_pairs]
        if via:
            chains.setdefault(star, []).append((t, via[0]))
    for star, pairs in sorted(chains.items()):
        desc = "; ".join(f"{t} reaches it through {u}" for t, u in pairs)
        elements = tuple(sorted({star, *(x for p in pairs for x in p)}))
        first = min((ctx.loc(t) for t, _ in pairs))
        out.append(Finding("GC103", "warning", f"star {star} is partly a chain: {desc}", first, elements,
                           {"chained_returns": len(pairs)},
                           "; ".join(f"run {t} to {star} by a wire of its own" for t, _ in pairs)))
    return out


def rule_signal_bonds(ctx: AuditContext) -> list[Finding]:
    out = []
    G = ctx.G
    side = ctx.chassis_side
    # signal-ground networks: connected parts of the graph without the chassis side and protective conductors
    order = list(G.nodes)
    idx = {n: i for i, n in enumerate(order)}
    rows, cols = [], []
    crossing = []            # (signal-side node, chassis-side node, conductor): the bonds
    for u, v, k, d in ctx.edges:
        us, vs = u in side, v in side
        if not us and not vs:
            if d["conductor"].role != "protective":
                rows.append(idx[u])
                cols.append(idx[v])
        elif us != vs and d["conductor"].kind != "interconnect":
            crossing.append((v, u, k) if us else (u, v, k))
    n = len(order)
    A = sp.coo_matrix((np.ones(len(rows)), (rows, cols)), shape=(n, n))
    _, labels = csgraph.connected_components(A, directed=False)
    members: dict[int, list[str]] = {}
    for name in order:
        if name not in side:
            members.setdefault(int(labels[idx[name]]), []).append(name)
    bonds_of: dict[int, dict[str, list[str]]] = {}
    for node, chassis, k in crossing:
        bonds_of.setdefault(int(labels[idx[node]]), {}).setdefault(chassis, []).append(k)
    for label in sorted(members, key=lambda k: min(members[k])):
        comp = sorted(members[label])
        if not set(comp) & ctx.signal_points:
            continue
        places = {c: sorted(ks) for c, ks in bonds_of.get(label, {}).items()}
        name = _component_name(ctx, comp)
        if len(places) > 1:
            desc = ", ".join(f"{p} (by {', '.join(ks)})" for p, ks in sorted(places.items()))
            bonds = sorted(places)
            # keep the bond nearest the protective earth
            keep = _nearest_pe(ctx, bonds)
            others = [b for b in bonds if b != keep]
            first_other = places[others[0]][0]
            actions = _unbond_actions(ctx, others, places)
            words = "; ".join(("insulate " + k + " from the metal (insulated socket or shoulder washers)") if verb == "insulate"
                              else f"remove {k}" for verb, k in actions)
            out.append(Finding("GC105", "warning", f"signal ground {name} is bonded to the chassis at {len(places)} places: {desc}",
                               ctx.loc(first_other), tuple(k for p in bonds for k in places[p]),
                               {"bonds": len(places)},
                               f"keep the bond at {keep}, nearest the protective earth; {words}", actions))
        elif not places:
            first = min(ctx.loc(n) for n in comp)
            out.append(Finding("GC106", "warning", f"signal ground {name} is floating: it reaches neither the chassis nor the protective earth",
                               first, tuple(comp[:12]), {"points": len(comp)},
                               "bond the signal star to the chassis at one place near the protective-earth stud"))
    return out


def _unbond_actions(ctx: AuditContext, others: list[str], places: dict) -> tuple:
    """How to undo each extra bond: a point of the signal circuit fastened to the metal (a socket) is
    insulated from it, keeping its own ground wire; any other bond conductor is removed."""
    actions = []
    for p in others:
        fastenings = [c.name for c in ctx.plan.conductors
                      if p in (c.a, c.b) and is_fastening(c, ctx.metals) and p in ctx.signal_points]
        if fastenings:
            actions.extend(("insulate", k) for k in sorted(fastenings))
        else:
            actions.extend(("remove", k) for k in places[p])
    return tuple(actions)


def _component_name(ctx: AuditContext, comp: list[str]) -> str:
    stars = [n for n in comp if n in ctx.G and ctx.G.nodes[n].get("point") is not None and ctx.G.nodes[n]["point"].kind == "star"]
    if stars:
        return "around " + ", ".join(stars[:3]) + ("…" if len(stars) > 3 else "")
    return "at " + ", ".join(comp[:3]) + ("…" if len(comp) > 3 else "")


def _nearest_pe(ctx: AuditContext, candidates: list[str]) -> str:
    if PE_POINT not in ctx.G:
        return candidates[0]
    dist, _ = _bfs(ctx.adj, [PE_POINT], lambda v: v in ctx.chassis_side)
    return min(candidates, key=lambda c: (dist.get(c, 10 ** 9), c))


def rule_protective_earth(ctx: AuditContext) -> list[Finding]:
    """GC201–GC205, GC209, GC210: the protective route of a class I plan with a mains inlet."""
    plan = ctx.plan
    if plan.mains is None or plan.mains.equipment_class == "II" or PE_POINT not in ctx.G:
        return []
    route = ctx.route
    bonded = route.reached & ctx.metals
    out: list[Finding] = []
    if not bonded:
        out.append(_pe_not_reaching(ctx))
    out.extend(_pe_fastener(ctx))
    out.extend(_pe_terminal_other_use(ctx))
    out.extend(_pe_unmarked(ctx))
    out.extend(_pe_sections(ctx))
    for m in plan.metals:
        if m.touchable and m.name not in bonded:
            out.append(Finding("GC205", "danger", f"touchable part {m.name} is not bonded to the protective earth by protective conductors",
                               m.location, (m.name,), {},
                               f"bond {m.name} to the protective-earth stud with a protective conductor or a fastening rated for it"))
    return out


def _pe_not_reaching(ctx: AuditContext) -> Finding:
    """GC203 when the inlet reaches metal only through something that cannot be protective, else GC201."""
    G, mloc = ctx.G, ctx.plan.mains.location
    reach = nx.node_connected_component(G, PE_POINT) & ctx.metals
    if not reach:
        return Finding("GC201", "danger", "the mains inlet's protective terminal reaches no metal part", mloc, (PE_POINT,), {},
                       "run a green-and-yellow protective conductor from the inlet's earth terminal straight to a chassis stud of its own")
    target = sorted(reach)[0]
    path = nx.shortest_path(G, PE_POINT, target)
    bad = [k for u, v in zip(path, path[1:]) for k, d in G[u][v].items()
           if not can_carry_protective(d["conductor"]) or (v in ctx.signal_points and v != target)]
    return Finding("GC203", "danger",
                   f"the protective earth reaches {target} only through {', '.join(bad) or 'the signal circuit'}, "
                   "which is not a protective conductor",
                   ctx.loc(bad[0]) if bad else mloc, tuple(bad), {},
                   "connect the inlet's protective terminal straight to the chassis with a protective conductor; "
                   "lift networks and switches belong between signal ground and chassis, never in the protective path")


def _pe_fastener(ctx: AuditContext) -> list[Finding]:
    """GC202: the protective conductor from the inlet lands on a fastener that holds something else."""
    out = []
    G = ctx.G
    for v, keys in G.adj[PE_POINT].items():
        for k in keys:
            c = G.edges[PE_POINT, v, k]["conductor"]
            if k not in ctx.route or v in ctx.metals:
                continue
            others = [kk for _, w, kk in G.edges(v, keys=True) if kk != k]
            fastenings = [kk for kk in others if is_fastening(ctx.conductors[kk], ctx.metals)
                          and ctx.conductors[kk].role in PROTECTIVE_ROLES]
            holds = [kk for kk in others if kk not in fastenings[:1]]
            if holds:
                out.append(Finding("GC202", "fault",
                                   f"the protective earth lands on {v}, a fastener that also holds {', '.join(sorted(holds))}",
                                   c.location, (c.name, v, *sorted(holds)), {"other_items": len(holds)},
                                   f"give the protective earth a stud of its own; move {', '.join(sorted(holds))} to another fastener"))
    return out


def _pe_terminal_other_use(ctx: AuditContext) -> list[Finding]:
    """GC210: a conductor on the inlet's protective terminal that is not part of the protective route."""
    out = []
    for keys in ctx.G.adj[PE_POINT].values():
        for k in sorted(keys):
            if k in ctx.route:
                continue
            c = ctx.conductors[k]
            out.append(Finding("GC210", "fault",
                               f"{c.kind} {c.name} ({c.role}) lands on the inlet's protective terminal",
                               c.location, (c.name, PE_POINT), {},
                               f"take {c.name} to its own place (a signal ground bonds to the chassis near the protective-earth "
                               "stud, not on the inlet's terminal); only the protective conductor belongs on the inlet's earth terminal"))
    return out


def _pe_unmarked(ctx: AuditContext) -> list[Finding]:
    """GC209: conductors the protective earth relies on whose role does not say protective."""
    return [Finding("GC209", "warning",
                    f"{ctx.conductors[k].kind} {k} carries the protective earth but is written as {ctx.conductors[k].role}",
                    ctx.loc(k), (k,), {},
                    f"write {k} as 'protective' and use green-and-yellow wire of at least the line conductor's size; "
                    "groundcheck treats it as protective and never suggests removing it")
            for k in ctx.route.unmarked]


def _pe_sections(ctx: AuditContext) -> list[Finding]:
    """GC204: a conductor on the protective route thinner than the line conductor."""
    line = ctx.plan.mains.line_area
    if line is None:
        return []
    out = []
    for c in ctx.plan.conductors:
        area = cross_section(c)
        if c.name in ctx.route and section_checked(c) and area is not None and area < line * (1 - 1e-6):
            out.append(Finding("GC204", "danger",
                               f"protective conductor {c.name} is {area * 1e6:.3g} mm², thinner than the line conductor ({line * 1e6:.3g} mm²)",
                               c.location, (c.name,), {"area_mm2": round(area * 1e6, 4), "line_area_mm2": round(line * 1e6, 4)},
                               f"use at least {line * 1e6:.3g} mm² (IEC 60364-5-54 Table 54.2)"))
    return out


def rule_class_ii(ctx: AuditContext) -> list[Finding]:
    """GC212, GC213: a class II plan has no protective earth to check, and must not have an earth terminal in use."""
    m = ctx.plan.mains
    if m is None or m.equipment_class != "II":
        return []
    out = [Finding("GC213", "note", "class II equipment: safety rests on double or reinforced insulation, which the plan "
                   "does not describe; protective-earth figures are skipped", m.location, ("mains",), {},
                   "have the insulation checked against the product-safety standard by a qualified person")]
    if PE_POINT in ctx.G:
        for _, v, k in sorted(ctx.G.edges(PE_POINT, keys=True)):
            c = ctx.conductors[k]
            out.append(Finding("GC212", "fault", f"{c.kind} {k} joins {v} to the earth terminal of class II equipment, which has none",
                               c.location, (k, v), {},
                               "make the equipment class I (three-core cord, protective earth to every touchable part), "
                               "or remove the connection"))
    return out


def rule_heaters(ctx: AuditContext) -> list[Finding]:
    return [Finding("GC107", "warning", f"heater supply {h.name} has no reference to ground", h.location, (h.name,),
                    {"current_a": h.current},
                    "reference it: centre tap or two equal resistors to ground, or an elevated DC reference")
            for h in ctx.plan.heaters if h.reference is None]


def rule_shields(ctx: AuditContext) -> list[Finding]:
    out = []
    both = [c for c in ctx.plan.conductors if c.kind == "shield" and c.terminated == "both"]
    if not both:
        return out
    stars = [p.name for p in ctx.plan.points if p.kind == "star" and p.name in ctx.G]
    refs = set(stars) | {s.b for s in ctx.plan.stages}
    dist, _ = _bfs(ctx.adj, sorted(refs)) if refs else ({}, {})
    for c in both:
        da, db = dist.get(c.a, 10 ** 9), dist.get(c.b, 10 ** 9)
        keep, lift = (c.a, c.b) if da <= db else (c.b, c.a)
        out.append(Finding("GC108", "warning", f"shield {c.name} is terminated at both ends ({c.a} and {c.b})",
                           c.location, (c.name,), {},
                           f"terminate {c.name} at {keep} only and leave the end at {lift} unconnected",
                           (("terminate-at", c.name, keep),)))
    return out


def rule_unconnected(ctx: AuditContext) -> list[Finding]:
    out = []
    order, labels, _ = ctx.parts
    members: dict[int, set] = {}
    for name, label in zip(order, labels.tolist()):
        members.setdefault(label, set()).add(name)
    for comp in members.values():
        if comp & ctx.metals or PE_POINT in comp or comp & ctx.signal_points:
            continue
        names = sorted(comp)
        out.append(Finding("GC109", "warning", f"{', '.join(names[:6])}{'…' if len(names) > 6 else ''} reach no ground",
                           min(ctx.loc(n) for n in names), tuple(names[:20]), {"points": len(names)},
                           "connect these points, or remove them from the plan"))
    for c in ctx.plan.conductors:
        if c.a == c.b:
            out.append(Finding("GC110", "warning", f"{c.kind} {c.name} has both ends at {c.a}", c.location, (c.name,), {},
                               "name the conductor's real ends"))
    return out


TOPOLOGY_RULES = (rule_loops, rule_stars, rule_signal_bonds, rule_protective_earth, rule_class_ii, rule_heaters,
                  rule_shields, rule_unconnected)


def audit(plan: Plan, ctx: AuditContext | None = None) -> tuple[list[Finding], AuditContext]:
    """Run every topology rule; returns the findings and the context (graph, loops) they used."""
    ctx = ctx or AuditContext(plan)
    findings: list[Finding] = []
    for rule in TOPOLOGY_RULES:
        findings.extend(rule(ctx))
    return findings, ctx

"""The electrical network of a plan: its nodes and branches, built from the plan's points,
conductors and metal parts.

Nodes are the plan's points plus, for each metal part, either one node (when
the plate's spreading resistance cannot or need not be computed) or one node
per fastening point joined by the plate's Kron-reduced network
(:mod:`groundcheck.physics.plate`).  The network and its solve are
:mod:`groundcheck.physics.nodal`'s.

References: C.-W. Ho, A. Ruehli, P. Brennan, "The modified nodal approach to
network analysis", IEEE Trans. Circuits Syst. 22(6), 1975 (nodal formulation).
"""

from __future__ import annotations

import math

from ..model.kinds import is_fastening_kind, is_lift
from ..model.records import Plan
from .impedance import MATERIALS, conductor_resistance, resistivity
from .nodal import XY, Branch, Circuit, Factored, Solution
from .plate import permeability, reduce_plate

__all__ = [
    "Branch",
    "Circuit",
    "Factored",
    "Solution",
    "build_circuit",
    "conductor_resistance",
]


def _segment_path(plan: Plan, c, pos: dict[str, XY]) -> tuple[XY, ...]:
    pa, pb = pos.get(c.a), pos.get(c.b)
    if pa is None or pb is None:
        return ()
    return (pa,) + tuple(c.route) + (pb,)


def build_circuit(plan: Plan, *, plates: bool = True) -> Circuit:
    """The electrical network of a plan at its ambient temperature.

    With ``plates`` (default), a metal part of known size and material with
    two or more positioned fasteners is replaced by its Kron-reduced plate
    network; otherwise each part is one ideal node.

    Parameters:
        plan: the plan.
        plates: model each metal part with two or more fastening spots as a plate grid (False: a
        node).
    Returns:
        the Circuit: nodes, branches with R and L, references per connected part.
    References:
        C.-W. Ho, A. Ruehli, P. Brennan, the modified nodal approach (IEEE Trans. Circuits Syst.,
        1975).
    """
    bld = _Builder(plan)
    metals = plan.index.metals
    conductors = [c for c in plan.conductors if c.connects]
    fasteners = _fasteners(plan, metals, conductors)
    for name, m in metals.items():
        bld.metal(m, fasteners[name], plates)
    for c in conductors:
        bld.conductor(c, metals)
    return Circuit(
        bld.nodes, bld.branches, bld.positions, bld.plate_notes, bld.point_node, bld.metal_nodes
    )


def _fasteners(plan: Plan, metals: dict, conductors) -> dict[str, list[tuple[str, XY]]]:
    """Fastening positions on each metal part: (conductor, position or None)."""
    pos = {p.name: p.pos for p in plan.points if p.pos is not None}
    fasteners: dict[str, list[tuple[str, XY]]] = {m: [] for m in metals}
    for c in conductors:
        for end, other in ((c.a, c.b), (c.b, c.a)):
            if end in metals:
                where = (
                    pos.get(other) if other not in metals else (c.route[0] if c.route else None)
                )
                if where is None and other in metals:
                    m = metals[end]
                    if m.size is not None:
                        where = (m.origin[0] + m.size[0] / 2, m.origin[1] + m.size[1] / 2)
                fasteners[end].append((c.name, where))
    # by conductor name, so that a plate's nodes and branches are numbered alike whatever order
    # the plan writes its fastenings in
    return {m: sorted(fs, key=lambda f: f[0]) for m, fs in fasteners.items()}


class _Builder:
    """Nodes and branches of a circuit as they are added."""

    def __init__(self, plan: Plan):
        self.plan, self.T = plan, plan.ambient
        self.nodes: list[str] = []
        self.index: dict[str, int] = {}
        self.positions: dict[str, XY] = {}
        self.branches: list[Branch] = []
        self.plate_notes: dict[str, dict] = {}
        self.metal_contact: dict[tuple[str, str], int] = {}  # (metal, conductor) -> node
        self.metal_nodes: dict[str, tuple[int, ...]] = {}
        self.point_node: dict[str, int] = {}
        for p in plan.points:
            self.point_node[p.name] = self.node(p.name, p.pos)
        self.pos = {p.name: p.pos for p in plan.points if p.pos is not None}

    def node(self, name: str, p: XY | None = None) -> int:
        if name not in self.index:
            self.index[name] = len(self.nodes)
            self.nodes.append(name)
            if p is not None:
                self.positions[name] = p
        return self.index[name]

    def metal(self, m, fs: list, plates: bool) -> None:
        """A metal part: one ideal node, or its contact spots joined by the Kron-reduced plate
        network."""
        name = m.name
        gridable = (
            plates
            and m.size is not None
            and m.material in MATERIALS
            and len(fs) >= 2
            and all(w is not None for _, w in fs)
            and len(fs) <= 60
        )
        if not gridable:
            self.point_node[name] = self.node(name)
            self.metal_nodes[name] = (self.point_node[name],)
            for cname, _ in fs:
                self.metal_contact[(name, cname)] = self.point_node[name]
            self.plate_notes[name] = {"model": "ideal node", "fasteners": len(fs)}
            return
        # distinct contact positions (fasteners at one spot share a node)
        spots: list[XY] = []
        spot_of: dict[str, int] = {}
        for cname, w in fs:
            for i, s in enumerate(spots):
                if math.dist(s, w) < 1e-6:
                    spot_of[cname] = i
                    break
            else:
                spot_of[cname] = len(spots)
                spots.append(w)
        spot_nodes = [self.node(f"{name}@{i + 1}", s) for i, s in enumerate(spots)]
        self.point_node[name] = spot_nodes[0]
        self.metal_nodes[name] = tuple(spot_nodes)
        for cname, _ in fs:
            self.metal_contact[(name, cname)] = spot_nodes[spot_of[cname]]
        if len(spots) >= 2:
            self.plate(m, spots, spot_nodes)
        else:
            self.plate_notes[name] = {"model": "one fastening spot", "fasteners": len(fs)}

    def plate(self, m, spots: list, spot_nodes: list[int]) -> None:
        x0 = min(m.origin[0], m.origin[0] + m.size[0])
        y0 = min(m.origin[1], m.origin[1] + m.size[1])
        rho = resistivity(m.material, self.T)
        res = reduce_plate(
            m.size[0],
            m.size[1],
            m.thickness,
            rho,
            [(s[0] - x0, s[1] - y0) for s in spots],
            [self.nodes[i] for i in spot_nodes],
        )
        G = res.conductance
        for i in range(len(spots)):
            for j in range(i + 1, len(spots)):
                g = -G[i, j]
                if g > 1e-12 * abs(G[i, i]):
                    self.branches.append(
                        Branch(
                            spot_nodes[i],
                            spot_nodes[j],
                            f"plate:{m.name}:{i + 1}~{j + 1}",
                            1.0 / g,
                            rho=rho,
                            path=(spots[i], spots[j]),
                            metal=m.name,
                            sheet=m.thickness,
                            mu_r=permeability(m),
                        )
                    )
        self.plate_notes[m.name] = {
            "model": "plate grid",
            "fasteners": len(spots),
            "grid_step_mm": res.step * 1e3,
            "estimated_error": res.error,
        }

    def conductor(self, c, metals: dict) -> None:
        r, ind, radius = conductor_resistance(c, self.T)
        ends = [
            self.metal_contact[(end, c.name)] if end in metals else self.point_node[end]
            for end in (c.a, c.b)
        ]
        rho = resistivity(c.material if c.material in MATERIALS else "copper", self.T)
        path = _segment_path(self.plan, c, self.pos)
        if not path:
            pa = self.positions.get(self.nodes[ends[0]])
            pb = self.positions.get(self.nodes[ends[1]])
            if pa is not None and pb is not None and is_fastening_kind(c.kind):
                path = (pa, pb)
        self.branches.append(
            Branch(
                ends[0],
                ends[1],
                c.name,
                r,
                ind,
                radius,
                rho,
                c.capacitance if is_lift(c) else None,
                path,
                c.name,
            )
        )

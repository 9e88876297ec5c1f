"""The plan's own figure for a measured pair of points: the DC resistance between them in the
whole ground
network, the joints on the path between them, and whether the pair is a protective bond held to
the limit."""

from __future__ import annotations

from ..model.kinds import is_fastening_kind
from ..model.records import PE_POINT
from ..physics.dc_paths import dc_resistance, element_nodes
from ..rules.bench import MeasuredBond

__all__ = ["planned_bonds"]


def _joints(plan, circuit, a: int, b: int) -> tuple[str, ...]:
    """The conductors on the least-resistance path from node a to node b: fastenings first, then
    the rest in
    path order."""
    from scipy.sparse.csgraph import dijkstra

    best, matrix = circuit.least_resistance_graph
    _, pred = dijkstra(matrix, indices=a, return_predecessors=True)
    kinds = {c.name: c.kind for c in plan.conductors}
    owners, node = [], b
    while node != a and node >= 0:
        prev = int(pred[node])
        if prev < 0:
            break
        owner = circuit.branches[best[(min(prev, node), max(prev, node))]].conductor
        if owner is not None and owner not in owners:
            owners.append(owner)
        node = prev
    owners.reverse()
    return tuple(sorted(owners, key=lambda o: not is_fastening_kind(kinds.get(o, ""))))


def _protective(plan, result, a: str, b: str) -> bool:
    """Whether a pair is a protective bond: one end the protective-earth terminal or a point a
    protective
    conductor ends on, the other touchable metal or a point on it."""
    ends = {PE_POINT}
    for c in plan.conductors:
        if c.name in result.protective:
            ends.update((c.a, c.b))

    def touchable(name: str) -> bool:
        m = plan.metal(name)
        if m is None:
            p = plan.point(name)
            m = plan.metal(p.on) if p is not None and p.on else None
        return m is not None and bool(m.touchable) and not getattr(m, "signal_only", False)

    return (a in ends and touchable(b)) or (b in ends and touchable(a))


def planned_bonds(result, measurements) -> tuple[MeasuredBond, ...]:
    """Each measurement with the plan's resistance between its points, the path's joints and the
    limit.

    Parameters:
        result: the plan's analysis (``rules.results.Result``, with its circuit).
        measurements: the measurements file's records
        (:class:`groundcheck.measure.bonds.Measurement`).
    Returns:
        one :class:`MeasuredBond` per measurement.
    References:
        nodal analysis at DC (a unit current between the two nodes; the voltage is the resistance).
    """
    plan, circuit = result.plan, result.circuit
    limit = (
        result.options.pe_limit
        if plan.mains is not None and plan.mains.equipment_class != "II"
        else None
    )
    out = []
    for m in measurements:
        na, nb = element_nodes(circuit, m.a), element_nodes(circuit, m.b)
        planned = dc_resistance(circuit, na, nb) if na and nb else None
        joints = _joints(plan, circuit, na[0], nb[0]) if planned is not None else ()
        protective = limit is not None and _protective(plan, result, m.a, m.b)
        out.append(
            MeasuredBond(
                m.a,
                m.b,
                m.resistance,
                planned,
                limit if protective else None,
                joints,
                m.location,
                m.current,
            )
        )
    return tuple(out)

"""The DC resistance the plan's circuit puts between two of its elements (a point, or any spot of a
metal part): the bench's planned figure for a measured bond, and the case-to-return bond of a box
fed at extra-low voltage (GC229)."""

from __future__ import annotations

import numpy as np

__all__ = ["element_nodes", "dc_resistance"]


def element_nodes(circuit, name: str) -> tuple[int, ...]:
    """The circuit's nodes of an element: a point's one node, or every node of a metal part's
    mesh.

    Parameters:
        circuit: the plan's circuit (:class:`groundcheck.physics.nodal.Circuit`).
        name: a point or metal part.
    Returns:
        the node indices (none for a name the circuit does not hold).
    References:
        none (lookup).
    """
    if name in circuit.point_node:
        return (circuit.point_node[name],)
    return tuple(circuit.nodes_of_metal(name))


def dc_resistance(circuit, a: tuple[int, ...], b: tuple[int, ...]) -> float | None:
    """The largest DC resistance between a node of ``a`` and a node of ``b`` (the worst spot a
    probe may touch, or a fault may land on), Ω; None when they are not joined.

    Parameters:
        circuit: the plan's circuit.
        a, b: node indices (:func:`element_nodes`).
    Returns:
        the resistance, or None.
    References:
        nodal analysis at DC (a unit current between the two nodes; the voltage is the resistance).
    """
    _, labels = circuit.components
    pairs = [(i, j) for i in a for j in b if labels[i] == labels[j]]
    if not pairs:
        return None
    J = np.zeros((len(circuit.nodes), len(pairs)), dtype=complex)
    for k, (i, j) in enumerate(pairs):
        J[i, k] += 1.0
        J[j, k] -= 1.0
    sol = circuit.at(0.0).solve(J, currents=False)
    return max(float(abs(sol.V[i, k] - sol.V[j, k])) for k, (i, j) in enumerate(pairs))

"""Export of the ground network as a plain SPICE netlist (resistors, inductors, capacitors, current
sources).

Node names are ``n<index>`` in the circuit's node order, with a comment
mapping each to the plan's name; each element is named after its conductor
(``R_left_sup_gnd``, letters other than A–Z, a–z, 0–9 and _ made _), a plate
branch after its part (``R_plate_deck_1_2``); the reference node of the part holding the
mains inlet's protective terminal is SPICE ground ``0``.  Every other
connected part gets a 1 GΩ resistor to ground so the netlist is never
singular; groundcheck references each island on its own, which that resistor
reproduces to within its leakage.
"""

from __future__ import annotations

import math
import re
import textwrap

from ..core.caution import CAUTION
from ..physics.circuit import Circuit

__all__ = ["to_spice"]


class _Names:
    """SPICE element names after the plan's names, sanitised and made unique."""

    def __init__(self):
        self.used: set[str] = set()

    def __call__(self, kind: str, name: str) -> str:
        base = f"{kind}_{re.sub(r'[^A-Za-z0-9_]', '_', name) or 'x'}"
        out, n = base, 1
        while out.lower() in self.used:  # SPICE names are not case-sensitive
            n += 1
            out = f"{base}_{n}"
        self.used.add(out.lower())
        return out


def _safe(text: str) -> str:
    return "".join(ch if 32 <= ord(ch) < 127 else "?" for ch in text).replace("\n", " ")


def to_spice(
    circuit: Circuit,
    title: str,
    sources=(),
    frequency: float | None = None,
    analysis: str = "op",
    emfs=(),
    readings=(),
    notes=(),
) -> str:
    """The netlist text.

    ``sources``: (name, from point, to point, rms amperes) current sources;
    with ``analysis="ac"`` they are AC sources (magnitude √2·rms, SPICE uses
    peak) and an ``.ac`` line at ``frequency`` is added; with ``"op"`` they
    are DC.  ``emfs``: (label, branch index, rms volts) EMFs in series with a branch, driving
    current from its first node to its second (a voltage source between the first node and the
    branch's elements).  ``readings``: stages
    (:class:`groundcheck.physics.hum_netlist.Reading`), each read at a node of its own whose
    voltage is the drop along the stage's path (its points' difference plus the EMFs on the path,
    summed by voltage-controlled voltage sources).  ``notes``: comment lines.  An AC netlist has a
    ``.print ac`` line of every node voltage (ngspice prints each as real, imaginary); an
    operating point's node voltages are printed by ngspice itself.
    """
    refs = set(int(r) for r in circuit.references)
    main_ref = (
        int(circuit.references[circuit.components[1][circuit.point_node.get("mains.pe", 0)]])
        if circuit.nodes
        else 0
    )
    name = {i: ("0" if i == main_ref else f"n{i}") for i in range(len(circuit.nodes))}
    lines = [f"* groundcheck ground network: {_safe(title)}"]
    lines += ["* " + part for part in textwrap.wrap(CAUTION, 100)]
    for i, n in enumerate(circuit.nodes):
        lines.append(f"* {name[i]} = {_safe(n)}")
    lines += ["* " + part for note in notes for part in textwrap.wrap(_safe(note), 100)]
    ac = analysis == "ac"
    z = circuit.impedance(frequency if ac else 0.0)
    w = 2 * math.pi * frequency if ac else 0.0
    el = _Names()
    start = _emfs(circuit, name, emfs, ac, el, lines)
    lines += _branches(circuit, name, z, w if ac else None, el, start)
    for r in sorted(refs - {main_ref}):
        lines.append(f"{el('R', f'island{r}')} {name[r]} 0 1e9")
    read_nodes = _readings(circuit, name, emfs, readings, el, lines)
    for src, a, b, amps in sources:
        ia, ib = name[circuit.point_node[a]], name[circuit.point_node[b]]
        # SPICE current source I n+ n-: current flows from n+ through the source to n-;
        # to inject into a (and draw from b) the source runs from b to a.  rms phasor -> SPICE peak
        # and phase
        element = el("I", src)
        lines += [f"* {element} = {_safe(src)}", f"{element} {ib} {ia} {_ac(amps, ac)}"]
    printed = [f"v({name[i]})" for i in range(len(circuit.nodes)) if name[i] != "0"]
    lines += _analysis(frequency if ac else None, printed + [f"v({x})" for x in read_nodes])
    return "\n".join(lines) + "\n"


def _analysis(frequency: float | None, printed: list) -> list[str]:
    """The analysis and its printout: at a frequency an AC analysis printing ``printed`` (ngspice
    prints each as real, imaginary), else an operating point, whose node voltages ngspice prints
    by itself."""
    if frequency is None:
        return [".op", ".end"]
    out = [f".ac lin 1 {frequency:.12g} {frequency:.12g}"]
    if printed:
        out.append(f".print ac {' '.join(printed)}")
    return out + [".end"]


def _ac(value: complex, ac: bool) -> str:
    """A source's value: at an AC analysis its peak amplitude (√2 × the rms phasor) and phase in
    degrees, else its DC value (the real part)."""
    value = complex(value)
    if not ac:
        return f"DC {value.real:.12g}"
    return (
        f"DC 0 AC {abs(value) * math.sqrt(2):.12g} "
        f"{math.degrees(math.atan2(value.imag, value.real)):.12g}"
    )


def _emfs(circuit: Circuit, name: dict, emfs, ac: bool, el: "_Names", lines: list) -> dict:
    """Each EMF as a voltage source from its branch's first node to a node of its own, where the
    branch's elements then begin; returns branch index -> that node."""
    start = {}
    for label, bi, volts in emfs:
        start[bi] = f"e{bi}"
        element = el("V", "emf_" + label)
        lines.append(f"* {element} = the loop EMF in {_safe(label)}")
        lines.append(f"{element} e{bi} {name[circuit.branches[bi].n1]} {_ac(volts, ac)}")
    return start


def _readings(circuit: Circuit, name: dict, emfs, readings, el: _Names, lines: list) -> list:
    """Each stage's reading node: its points' difference, plus each EMF on its path (the EMF
    source's far node less its near one, with the path's sign), summed along a chain of
    voltage-controlled voltage sources; the chain's last node is the reading."""
    out = []
    for k, rd in enumerate(readings):
        a, b = name[circuit.point_node[rd.a]], name[circuit.point_node[rd.b]]
        node = f"s{k}_0"
        lines.append(f"{el('E', 'read_' + rd.stage)} {node} 0 {a} {b} 1")
        for j, (idx, sign) in enumerate(rd.emfs, 1):
            bi = emfs[idx][1]
            near = name[circuit.branches[bi].n1]
            lines.append(f"{el('E', 'read_' + rd.stage)} s{k}_{j} {node} e{bi} {near} {sign}")
            node = f"s{k}_{j}"
        phase = math.degrees(math.atan2(rd.gain.imag, rd.gain.real))
        lines.append(
            f"* {node} = the reading of stage {_safe(rd.stage)} (channel {_safe(rd.channel)}): "
            f"the drop along its path from {_safe(rd.a)} to {_safe(rd.b)}; at the output, times "
            f"its gain {abs(rd.gain):.12g} at {phase:.6g} deg"
        )
        out.append(node)
    return out


def _branches(
    circuit: Circuit, name: dict, z, w: float | None, el: _Names, start: dict | None = None
) -> list[str]:
    """Each branch as SPICE elements: R, or R and C for a capacitor, or R in series with L at an
    AC analysis's angular frequency ``w`` (None: an operating point, resistances only); a branch
    in ``start`` begins at that node (after its EMF source) instead of its first node."""
    out = []
    start = start or {}
    for k, b in enumerate(circuit.branches):
        a, c = start.get(k, name[b.n1]), name[b.n2]
        label = b.name or f"branch{k}"
        if b.cap is not None and w is not None:
            out.append(f"{el('R', label)} {a} {c} {max(b.r, 1e-9):.12g}")
            out.append(f"{el('C', label)} {a} {c} {b.cap:.12g}")
        elif w is not None and z[k].imag > 0:
            # resistance at this frequency (skin effect included) in series with the
            # self-inductance
            out.append(f"{el('R', label)} {a} m{k} {z[k].real:.12g}")
            out.append(f"{el('L', label)} m{k} {c} {z[k].imag / w:.12g}")
        else:
            out.append(f"{el('R', label)} {a} {c} {z[k].real:.12g}")
    return out

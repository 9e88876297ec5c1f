"""Export of the ground network as a plain SPICE netlist (resistors, inductors, capacitors, current sources).

Node names are ``n<index>`` in the circuit's node order, with a comment
mapping each to the plan's name; the reference node of the part holding the
mains inlet's protective terminal is SPICE ground ``0``.  Every other
connected part gets a 1 GΩ resistor to ground so the netlist is never
singular; groundcheck references each island on its own, which that resistor
reproduces to within its leakage.
"""

from __future__ import annotations

import math

from ..physics.circuit import Circuit

__all__ = ["to_spice"]


def _safe(text: str) -> str:
    return "".join(ch if 32 <= ord(ch) < 127 else "?" for ch in text).replace("\n", " ")


def to_spice(circuit: Circuit, title: str, sources=(), frequency: float | None = None,
             analysis: str = "op") -> str:
    """The netlist text.

    ``sources``: (name, from point, to point, rms amperes) current sources;
    with ``analysis="ac"`` they are AC sources (magnitude √2·rms, SPICE uses
    peak) and an ``.ac`` line at ``frequency`` is added; with ``"op"`` they
    are DC.  An AC netlist has a ``.print ac`` line of every node voltage (real and imaginary parts); an
    operating point's node voltages are printed by ngspice itself.
    """
    refs = set(int(r) for r in circuit.references)
    main_ref = int(circuit.references[circuit.components[1][circuit.point_node.get("mains.pe",
                                                                                   0)]]) if circuit.nodes else 0
    name = {i: ("0" if i == main_ref else f"n{i}") for i in range(len(circuit.nodes))}
    lines = [f"* groundcheck ground network: {_safe(title)}"]
    for i, n in enumerate(circuit.nodes):
        lines.append(f"* {name[i]} = {_safe(n)}")
    ac = analysis == "ac"
    z = circuit.impedance(frequency if ac else 0.0)
    w = 2 * math.pi * frequency if ac else 0.0
    for k, b in enumerate(circuit.branches):
        a, c = name[b.n1], name[b.n2]
        if b.cap is not None and ac:
            lines.append(f"R{k} {a} {c} {max(b.r, 1e-9):.12g}")
            lines.append(f"C{k} {a} {c} {b.cap:.12g}")
        elif ac and z[k].imag > 0:
            # resistance at this frequency (skin effect included) in series with the self-inductance
            lines.append(f"R{k} {a} m{k} {z[k].real:.12g}")
            lines.append(f"L{k} m{k} {c} {z[k].imag / w:.12g}")
        else:
            lines.append(f"R{k} {a} {c} {z[k].real:.12g}")
    for r in sorted(refs - {main_ref}):
        lines.append(f"RISL{r} {name[r]} 0 1e9")
    for k, (src, a, b, amps) in enumerate(sources):
        ia, ib = name[circuit.point_node[a]], name[circuit.point_node[b]]
        # SPICE current source I n+ n-: current flows from n+ through the source to n-;
        # to inject into a (and draw from b) the source runs from b to a.  rms phasor -> SPICE peak and phase
        amps = complex(amps)
        lines.append(f"* I{k} = {_safe(src)}")
        if analysis == "ac":
            lines.append(f"I{k} {ib} {ia} DC 0 AC {abs(amps) * math.sqrt(2):.12g} "
                         f"{math.degrees(math.atan2(amps.imag, amps.real)):.12g}")
        else:
            lines.append(f"I{k} {ib} {ia} DC {amps.real:.12g}")
    printed = " ".join(f"v({name[i]})" for i in range(len(circuit.nodes)) if name[i] != "0")
    if analysis == "ac":
        lines.append(f".ac lin 1 {frequency:.12g} {frequency:.12g}")
        if printed:
            lines.append(f".print ac {printed.replace('v(', 'vr(')} {printed.replace('v(', 'vi(')}")
    else:
        lines.append(".op")                 # ngspice prints every node voltage of an operating point by itself
    lines.append(".end")
    return "\n".join(lines) + "\n"

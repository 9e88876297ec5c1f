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
    circuit: Circuit, title: str, sources=(), frequency: float | None = None, analysis: str = "op"
) -> str:
    """The netlist text.

    ``sources``: (name, from point, to point, rms amperes) current sources;
    with ``analysis="ac"`` they are AC sources (magnitude √2·rms, SPICE uses
    peak) and an ``.ac`` line at ``frequency`` is added; with ``"op"`` they
    are DC.  An AC netlist has a ``.print ac`` line of every node voltage (real and imaginary
    parts); an operating point's node voltages are printed by ngspice itself.
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
    ac = analysis == "ac"
    z = circuit.impedance(frequency if ac else 0.0)
    w = 2 * math.pi * frequency if ac else 0.0
    el = _Names()
    lines += _branches(circuit, name, z, w if ac else None, el)
    for r in sorted(refs - {main_ref}):
        lines.append(f"{el('R', f'island{r}')} {name[r]} 0 1e9")
    for src, a, b, amps in sources:
        ia, ib = name[circuit.point_node[a]], name[circuit.point_node[b]]
        # SPICE current source I n+ n-: current flows from n+ through the source to n-;
        # to inject into a (and draw from b) the source runs from b to a.  rms phasor -> SPICE peak
        # and phase
        amps = complex(amps)
        element = el("I", src)
        lines.append(f"* {element} = {_safe(src)}")
        if analysis == "ac":
            lines.append(
                f"{element} {ib} {ia} DC 0 AC {abs(amps) * math.sqrt(2):.12g} "
                f"{math.degrees(math.atan2(amps.imag, amps.real)):.12g}"
            )
        else:
            lines.append(f"{element} {ib} {ia} DC {amps.real:.12g}")
    printed = " ".join(f"v({name[i]})" for i in range(len(circuit.nodes)) if name[i] != "0")
    if analysis == "ac":
        lines.append(f".ac lin 1 {frequency:.12g} {frequency:.12g}")
        if printed:
            lines.append(
                f".print ac {printed.replace('v(', 'vr(')} {printed.replace('v(', 'vi(')}"
            )
    else:
        lines.append(".op")  # ngspice prints every node voltage of an operating point by itself
    lines.append(".end")
    return "\n".join(lines) + "\n"


def _branches(circuit: Circuit, name: dict, z, w: float | None, el: _Names) -> list[str]:
    """Each branch as SPICE elements: R, or R and C for a capacitor, or R in series with L at an
    AC analysis's angular frequency ``w`` (None: an operating point, resistances only)."""
    out = []
    for k, b in enumerate(circuit.branches):
        a, c = name[b.n1], name[b.n2]
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

"""The caution every output of groundcheck carries (terminal, JSON, SARIF, HTML, suggestions,
comparisons, and the explanations of the protective-earth rules)."""

__all__ = ["CAUTION", "MAINS_WORK"]

CAUTION = (
    "Caution: mains and valve circuits carry lethal voltages, and filter capacitors hold a charge "
    "after switch-off. Never lift the protective earth. These figures are estimates from the "
    "plan, not measurements; follow local electrical codes and have mains work checked by a "
    "qualified person."
)

#: added to the explanation of every protective-earth rule, whose fixes are mains wiring
MAINS_WORK = (
    "This fix is mains wiring: disconnect the equipment from the supply, discharge the filter "
    "capacitors through a suitable resistor and measure before touching, follow your local "
    "electrical code, and have the work checked by a qualified person."
)

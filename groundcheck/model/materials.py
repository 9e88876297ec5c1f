"""The conductor materials the language names: resistivity at 20 °C and its temperature
coefficient, each with its source.  One table, read by the statement reader (the words it
accepts) and by the physics (the figures)."""

from __future__ import annotations

__all__ = ["MATERIALS", "MATERIAL_ALIASES"]

#: resistivity at 20 °C (Ω·m) and temperature coefficient α₂₀ (1/K), with where each comes from
MATERIALS: dict[str, tuple[float, float, str]] = {
    "copper": (1.7241e-8, 0.00393, "IEC 60028, annealed copper 100 % IACS"),
    "aluminium": (2.65e-8, 0.0039, "CRC Handbook, pure aluminium"),
    "aluminium-1350": (2.8264e-8, 0.00403, "IEC 60889, hard-drawn aluminium"),
    "aluminium-5052": (
        4.99e-8,
        0.0039,
        "ASM Handbook vol. 2 (from memory); alpha of pure aluminium assumed",
    ),
    "aluminium-6061": (
        3.99e-8,
        0.0039,
        "ASM Handbook vol. 2 (from memory); alpha of pure aluminium assumed",
    ),
    "brass": (5.99e-8, 0.0015, "CRC-derived tables; alpha from memory"),
    "steel": (1.43e-7, 0.0045, "carbon steel 1010; alpha from memory"),
    "stainless": (7.2e-7, 0.001, "ASM, stainless 304; alpha from memory"),
    "silver": (1.59e-8, 0.0038, "CRC Handbook (from memory)"),
}

#: other spellings the language accepts, and the material each stands for
MATERIAL_ALIASES = {"aluminum": "aluminium", "tinned-copper": "copper"}

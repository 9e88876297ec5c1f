"""The rule registry: every rule function registered under the codes it makes, with what it needs.

A rule is a pure function returning findings.  ``needs="topology"`` rules take the
:class:`~groundcheck.rules.context.AuditContext`; ``needs="solve"`` rules take the
:class:`~groundcheck.rules.electrical.Solved` results of the electrical analyses.  Every code of
the catalogue (:mod:`groundcheck.rules.catalogue`) is registered to exactly one function (tested),
so the catalogue and the code cannot drift apart.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from .catalogue import RULES

__all__ = ["RuleFunction", "REGISTRY", "rule", "functions", "codes_registered", "hum_codes"]


@dataclass(frozen=True)
class RuleFunction:
    codes: tuple[str, ...]
    needs: str
    func: Callable
    hum: bool = False  # judged from the hum figures (nothing to judge without them: --no-hum)

    @property
    def name(self) -> str:
        return f"{self.func.__module__}.{self.func.__qualname__}"


#: every registered rule function, in registration order (the order findings are made in)
REGISTRY: list[RuleFunction] = []


def rule(*codes: str, needs: str = "topology", hum: bool = False):
    """Register the decorated function as the maker of ``codes``.

    Parameters:
        codes: the rule codes the function makes.
        needs: context (the graph) or solved (the electrical solve).
        hum: whether its findings are judged from the hum figures (a run without them cannot judge
        it).
    Returns:
        a decorator that registers the function.
    References:
        none (registry).
    """
    unknown = [c for c in codes if c not in RULES]
    if unknown:
        raise ValueError(f"rule codes not in the catalogue: {unknown}")

    def deco(func):
        REGISTRY.append(RuleFunction(tuple(codes), needs, func, hum))
        return func

    return deco


def functions(needs: str) -> list[RuleFunction]:
    """The registered functions that need ``needs`` (the families register themselves when
    imported: :mod:`groundcheck.rules.families` imports them all).

    Parameters:
        needs: context or solved.
    Returns:
        the registered functions that need it.
    References:
        none (registry).
    """
    return [r for r in REGISTRY if r.needs == needs]


def codes_registered() -> dict[str, list[str]]:
    """Each code -> the names of the functions registered for it (exactly one each, when all is
    well).

    Parameters:
        (none)
    Returns:
        each code -> the names of the functions registered for it.
    References:
        none (registry).
    """
    out: dict[str, list[str]] = {}
    for r in REGISTRY:
        for c in r.codes:
            out.setdefault(c, []).append(r.name)
    return out


def hum_codes() -> tuple[str, ...]:
    """The codes judged from the hum figures, in catalogue order.

    Parameters:
        (none)
    Returns:
        the codes of the functions registered with ``hum=True``.
    References:
        none (registry).
    """
    codes = {c for r in REGISTRY if r.hum for c in r.codes}
    return tuple(c for c in RULES if c in codes)

"""A catalogue entry: the rule's words, and what follows from it.

Each family's entries (``catalogue_topology.py``, ``catalogue_pe.py``, ``catalogue_hum.py``,
``catalogue_model.py``) are written with :func:`entry`, which checks what an entry declares;
:mod:`groundcheck.rules.catalogue` gathers them in its one table of rules.
"""

from __future__ import annotations

from dataclasses import dataclass

from .rule_families import Family

__all__ = ["SEVERITIES", "IDENTITIES", "REFUSALS", "Rule", "entry"]

#: severities from the most to the least serious
SEVERITIES = ("danger", "fault", "warning", "note")

#: what identifies a finding before and after a change: its elements in any order, or the first
#: two in order (a source and the stage it reaches, an element and its source)
IDENTITIES = ("elements", "pair", "first")

#: the advisor's refusals a finding can raise when a change brings it about: part of the signal
#: ground left unconnected; a supply's charging or ripple current sent through the star; a supply's
#: working current sent through a protective conductor
REFUSALS = ("unconnected", "through-star", "pe-current")


@dataclass(frozen=True)
class Rule:
    """A catalogue entry: the rule's words, and what follows from it — its family, the severities
    its findings may have (``variants``, the default first), what identifies a finding
    (:data:`IDENTITIES`) and the advisor's repair actions for it (``advice/candidates.py``
    registers a generator under each; ``carried``: the finding's own structured actions) and the
    advisor's refusals its findings raise when a change brings one about (:data:`REFUSALS`)."""

    code: str
    name: str
    family: Family
    severity: str
    checks: str
    why: str
    fix: str
    references: str = "common practice"
    variants: tuple[str, ...] = ()
    identity: str = "elements"
    actions: tuple[str, ...] = ("carried",)
    refusals: tuple[str, ...] = ()
    #: its findings are a hum mechanism (a shared return): a change that makes a channel louder
    #: is not excused by clearing one (the hum family's findings are such by their family)
    hum_mechanism: bool = False


def entry(
    code,
    name,
    family,
    severity,
    checks,
    why,
    fix,
    references="common practice",
    *,
    variants=(),
    identity="elements",
    actions=("carried",),
    refusals=(),
    hum_mechanism=False,
) -> Rule:
    """One catalogue entry, its declarations checked.

    Parameters:
        code, name, family, severity: the rule's code, name, family and default severity.
        checks, why, fix, references: the text ``groundcheck explain`` prints.
        variants: the severities its findings may have, the default first (default: the default
            severity only).
        identity: what identifies a finding (one of :data:`IDENTITIES`).
        actions: the advisor's repair actions for its findings.
        refusals: the advisor's refusals (:data:`REFUSALS`) a change that brings a finding of
            it about meets.
        hum_mechanism: its findings are a hum mechanism (see :class:`Rule`).
    Returns:
        the entry.
    Raises:
        ValueError: for variants that do not start with the default or name no severity, or an
        unknown identity.
    References:
        none (bookkeeping).
    """
    variants = variants or (severity,)
    if (
        variants[0] != severity
        or not set(variants) <= set(SEVERITIES)
        or identity not in IDENTITIES
        or not set(refusals) <= set(REFUSALS)
    ):
        raise ValueError(
            f"{code}: variants {variants} (default {severity}), identity {identity}, "
            f"refusals {refusals}"
        )
    words = (checks, why, fix, references)
    return Rule(
        code, name, family, severity, *words, variants, identity, actions, refusals, hum_mechanism
    )

"""Which rules a run checks, and what it leaves out.

A rule word is a code (``GC206``), a family of codes by its first digits (``GC2``: every
protective-earth rule, ``GC21``: GC210 to GC219) or a rule's name (``pe-resistance``).  A word
that names no rule is an error with the nearest valid word suggested, never a selection of
nothing.  What a run leaves out — rules by selection or settings, findings by an accept
comment — is a :class:`NotChecked` entry that every output shows.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..core.errors import GroundcheckError, Location
from .catalogue import RULES
from .rule_families import FAMILIES

__all__ = ["UnknownRule", "NotChecked", "rule_codes", "codes_of", "nearest", "rule_list"]


#: characters people type for one another (a letter O for a zero, …): a cheap substitution when
#: ranking the nearest code, so that GC2O6 suggests GC206 rather than GC216 (common practice)
_LOOKALIKE = {
    frozenset(p) for p in ("O0", "o0", "Q0", "D0", "I1", "l1", "i1", "S5", "s5", "B8", "Z2", "z2")
}


class UnknownRule(GroundcheckError):
    """A rule word that names no rule (the message suggests the nearest valid one)."""

    def __init__(self, word: str, where: str = ""):
        self.word, self.suggestion = word, nearest(word)
        self.hint = (
            f"did you mean {self.suggestion}? " if self.suggestion else ""
        ) + "'groundcheck explain' lists the rules"
        prefix = f"{where}: " if where else ""
        super().__init__(f"{prefix}unknown rule {word!r} ({self.hint})")


def rule_codes(word: str) -> tuple[str, ...] | None:
    """The codes one rule word stands for, in catalogue order; None when it names no rule.

    Parameters:
        word: a code, a family of codes by its first digits, or a rule's name (any case).
    Returns:
        the codes, or None.
    References:
        none (the catalogue).
    """
    w = word.strip()
    u = w.upper()
    if u in RULES:
        return (u,)
    family = next((f for f in FAMILIES if f.word == u), None)
    if family is not None:
        return tuple(c for c, r in RULES.items() if r.family == family) or None
    if u.startswith("GC") and u[2:].isdigit() and len(u) < 5:
        found = tuple(c for c in RULES if c.startswith(u))
        return found or None
    by_name = {r.name: c for c, r in RULES.items()}
    return (by_name[w.lower()],) if w.lower() in by_name else None


def codes_of(words, where: str = "") -> set[str]:
    """Every code the words stand for.

    Parameters:
        words: rule words (codes, families, names).
        where: what the words came from (an option, a settings file's key), named in the error.
    Returns:
        the set of codes.
    Raises:
        UnknownRule: for the first word that names no rule.
    References:
        none (the catalogue).
    """
    out: set[str] = set()
    for w in words:
        codes = rule_codes(w)
        if codes is None:
            raise UnknownRule(w, where)
        out.update(codes)
    return out


def _distance(a: str, b: str) -> float:
    """Edit distance (Levenshtein), letters of either case the same, a look-alike substitution
    (O for 0, l for 1 …) costing a quarter."""
    prev = [float(j) for j in range(len(b) + 1)]
    for i, ca in enumerate(a, 1):
        cur = [float(i)]
        for j, cb in enumerate(b, 1):
            same = ca.upper() == cb.upper()
            sub = 0.0 if same else (0.25 if frozenset((ca, cb)) in _LOOKALIKE else 1.0)
            cur.append(min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + sub))
        prev = cur
    return prev[-1]


def nearest(word: str) -> str | None:
    """The valid code, family or name nearest to ``word``.

    Parameters:
        word: a word that names no rule.
    Returns:
        the nearest code or name (letters of either case alike), or None when none is within a
        third of the word's length plus one edit.
    References:
        Levenshtein edit distance (common practice), look-alike characters cheaper (from memory).
    """
    w = word.strip()
    families = {f.word for f in FAMILIES} | {c[:4] for c in RULES}  # GC2, and GC21 …
    cands = [(_distance(w, c), c) for c in (*RULES, *sorted(families))]
    cands += [(_distance(w.lower(), r.name), r.name) for r in RULES.values()]
    best, name = min(cands, key=lambda t: (t[0], t[1]))
    return name if best <= 1 + len(w) / 3 else None


def rule_list(codes) -> str:
    """Codes as people read them.

    Parameters:
        codes: rule codes.
    Returns:
        a whole family as 'every GC2xx rule (protective earth)', the rest by code, comma-separated.
    References:
        none (the catalogue).
    """
    codes = sorted(set(codes))
    parts = []
    for family in FAMILIES:
        mine = [c for c in codes if c in RULES and RULES[c].family == family]
        whole = [c for c in RULES if RULES[c].family == family]
        if mine and mine == whole:
            parts.append(f"every {family.word}xx rule ({family.name})")
        else:
            parts.extend(mine)
    parts.extend(c for c in codes if c not in RULES)
    return ", ".join(parts)


@dataclass(frozen=True)
class NotChecked:
    """Rules a run left out (``location`` None), or a finding accepted in the plan (at its
    ``location``, with its ``severity``)."""

    codes: tuple[str, ...]
    why: str  # 'left out by --leave-out GC2', 'accepted in the plan: …'
    location: Location | None = None
    severity: str | None = None  # an accepted finding's severity

    def short(self) -> str:
        """The entry in a verdict line."""
        if self.location is None:
            return rule_list(self.codes)
        loc = f"{self.location.file}:{self.location.line}"
        return f"{', '.join(self.codes)} at {loc} (accepted {self.severity})"

    def sentence(self) -> str:
        """The entry as a notice."""
        if self.location is None:
            return f"not checked: {rule_list(self.codes)} — {self.why}"
        return (
            f"not checked at {self.location.file}:{self.location.line}: {', '.join(self.codes)} "
            f"({self.severity}) — {self.why}"
        )

    def as_dict(self) -> dict:
        return {
            "rules": list(self.codes),
            "why": self.why,
            "severity": self.severity,
            "location": None if self.location is None else self.location.as_dict(),
        }

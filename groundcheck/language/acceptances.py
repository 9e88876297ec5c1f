"""The plan's inline acceptances: ``# accept [ELEMENT] CODE[, CODE]: reason`` comments, read from
the text of every file the plan is made of."""

from __future__ import annotations

import re

__all__ = ["acceptances"]

#: an inline acceptance: '# accept GC101: the chassis-structure loop is intended' (codes or rule
#: names, a reason)
_ACCEPT = re.compile(
    r"#\s*accept\s+(?:([A-Za-z][\w-]*(?:\.[\w-]+)+)\s+)?([\w-]+(?:\s*,\s*[\w-]+)*)\s*:\s*"
    r"(\S.*?)\s*$"
)


def acceptances(sources: dict) -> tuple:
    """The ``# accept [ELEMENT] CODE[, CODE]: reason`` comments of the plan's files:
    (file, line, codes, reason, columns, element), ``columns`` the 1-based column of each code (an
    error points at a word that names no rule), ``element`` a dotted name (``left.in_gnd``: one
    placement of a block) or None."""
    out = []
    for file, lines in sources.items():
        for i, line in enumerate(lines, 1):
            if "accept" in line:
                m = _ACCEPT.search(line)
                if m:
                    words = [
                        (w.group(), m.start(2) + w.start() + 1)
                        for w in re.finditer(r"[\w-]+", m.group(2))
                    ]
                    out.append(
                        (
                            file,
                            i,
                            tuple(w for w, _ in words),
                            m.group(3),
                            tuple(c for _, c in words),
                            m.group(1),
                        )
                    )
    return tuple(out)

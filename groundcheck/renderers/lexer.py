"""A Pygments lexer for the plan language (``.gplan``), registered under the name ``gplan`` by the
package's entry point, so that documentation tools and terminals can colour plans.

Statement keywords come from the language's own table; a quantity is a number with its unit word;
the roles, kinds of point and the other fixed words of the language are names of their own class.
"""

from __future__ import annotations

from pygments.lexer import RegexLexer, bygroups, words
from pygments.token import (
    Comment,
    Keyword,
    Name,
    Number,
    Operator,
    Punctuation,
    String,
    Text,
    Whitespace,
)

from ..model.kinds import ROLES
from ..language.statements import KEYWORDS

__all__ = ["PlanLexer"]

#: fixed words inside statements: roles, kinds of point, terminations and the like (common to many
#: statements)
ATTRIBUTE_WORDS = ROLES + (
    "to",
    "at",
    "on",
    "via",
    "touchable",
    "terminated",
    "both",
    "balanced",
    "unbalanced",
    "channel",
    "gain",
    "full-wave",
    "bridge",
    "half-wave",
    "secondary",
    "winding",
    "reservoir",
    "load",
    "diode",
    "leakage",
    "filter",
    "valve",
    "regulator",
    "series",
    "shunt",
    "rejection",
    "dropout",
    "quiescent",
    "fed",
    "shockley",
    "height",
    "axis",
    "size",
    "harmonic",
    "fuse",
    "breaker",
    "cord",
    "inlet",
    "system",
    "class",
    "breaking",
    "speaker",
    "speakers",
    "headphones",
    "per",
    "room-gain",
    "background",
    "distance",
    "impedance",
    "output",
    "amp-gain",
    "wiring",
    "spacing",
    "twisted",
    "reference",
    "floating",
    "ac",
    "dc",
    "plugged",
    "simple",
    "signal-ground",
    "mirror",
    "as",
    "lift",
    "open",
    "closed",
    "contact",
    "resistance",
    "width",
    "thickness",
    "library",
    "cores",
    "line-cores",
    "shield-to",
    "chassis",
    "in",
    "y-capacitor",
    "earthing-terminal",
    "mains-pole",
    "outlet",
    "L-N-PE",
    "L-PE-N",
    "round",
    "signal-only",
    "primary",
    "rating",
    "earthed",
    "isolating",
    "draws",
)


class PlanLexer(RegexLexer):
    """groundcheck plan files."""

    name = "groundcheck plan"
    aliases = ["gplan"]
    filenames = ["*.gplan"]
    mimetypes = ["text/x-gplan"]

    tokens = {
        "root": [
            (r"#.*?$", Comment.Single),
            (r"\n", Whitespace),
            (r"[ \t]+", Whitespace),
            (r'"[^"\n]*"', String.Double),
            (
                r"(?m)^([ \t]*)(" + "|".join(sorted(KEYWORDS, key=len, reverse=True)) + r")\b",
                bygroups(Whitespace, Keyword.Declaration),
            ),
            (r"([^\W\d][\w.\-]*)([ \t]*)(:)", bygroups(Name.Variable, Whitespace, Punctuation)),
            (
                r"[+-]?\d+(\.\d*)?([eE][+-]?\d+)?[ "
                r"\t]*(mm2|mm|cm|m|in|AWG|mohm|kohm|ohm|mA|A|kV|mV|V|kHz|Hz|uT|mT|"
                r"T|uF|nF|pF|F|mH|uH|H|dB|C|s|ms|kVA|VA)?\b",
                Number,
            ),
            (r"\d+(\.\d*)?,\d+(\.\d*)?", Number),
            (words(ATTRIBUTE_WORDS, suffix=r"\b"), Name.Attribute),
            (r"[{}]", Punctuation),
            (r",", Punctuation),
            (r"x\b", Operator),
            (r"[^\W\d][\w.\-/@]*", Name),
            (r".", Text),
        ],
    }

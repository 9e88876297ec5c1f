"""Transformers between the wall and devices: the ``transformer`` statement, and placing a
transformer in an installation (its secondary outlet as a point; an earthed secondary's outlet
bonded through the primary cord's protective conductor).

A transformer changes the voltage, never the frequency: its secondary gives the supply's
frequency, so a stated secondary frequency other than the supply's is an error.
"""

from __future__ import annotations

from ..core.errors import PlanError
from ..model.installation import Transformer
from ..model.kinds import CORD_KIND, PROTECTIVE
from ..model.records import DEFAULT_CORD, Conductor, Point
from .phrases import Reader, Statement
from .reading import Refs, need_label, unknown

__all__ = ["transformer", "place_transformers", "TRANSFORMER_WORDS"]

#: the attributes a transformer statement takes
TRANSFORMER_WORDS = ("plugged", "primary", "secondary", "rating", "earthed", "isolating", "cord")


def transformer(stmt: Statement):
    """'transformer NAME: plugged OUTLET, primary 230 V, secondary 120 V, rating 500 VA,
    earthed|isolating, cord 1.8 m 0.75 mm2'."""
    name = need_label(stmt)
    kw: dict = {}
    refs: Refs = {}
    for ph in stmt.phrases:
        r = Reader(ph, stmt)
        it = r.peek()
        word = r.word("an attribute")
        if word == "plugged":
            r.keyword("into")
            kw["plugged"], refs["plugged"] = r.name("an outlet")
        elif word == "primary":
            kw["primary"] = r.quantity("voltage", "primary voltage")
        elif word == "secondary":
            kw["secondary"] = r.quantity("voltage", "secondary voltage")
            if not r.done:
                kw["frequency"] = r.quantity("frequency", "secondary frequency")
        elif word == "rating":
            kw["rating"] = r.quantity("apparent power", "rating")
        elif word in ("earthed", "isolating"):
            if kw.setdefault("isolating", word == "isolating") != (word == "isolating"):
                raise PlanError(
                    "a transformer's secondary is earthed or isolating, not both",
                    it.loc,
                    "keep one",
                )
        elif word == "cord":
            kw["cord_length"] = r.quantity("length", "cord length")
            if not r.done:
                kw["cord_area"] = r.quantity("area", "cord conductor area")
        else:
            raise unknown(stmt, it, TRANSFORMER_WORDS)
        r.finish()
    for need in ("plugged", "primary", "secondary"):
        if need not in kw:
            raise PlanError(
                f"transformer {name} needs '{need}'",
                stmt.loc,
                f"e.g. transformer {name}: plugged wall, primary 230 V, secondary 120 V",
            )
    return Transformer(name=name, location=stmt.loc, **kw), refs


def place_transformers(
    transformers: list, points: dict, conductors: list, supply, errors: list
) -> None:
    """Each transformer (``(record, refs)``) with its secondary outlet as a point of kind
    ``outlet`` under its name; an earthed secondary's outlet joined to the outlet its primary is
    plugged into by the cord's protective conductor (``NAME.cord``), as a device's earth pin is.
    Needs the installation's ``supply``; a stated secondary frequency must be the supply's."""
    for t, refs, *_ in transformers:
        if t.plugged == t.name:
            errors.append(
                PlanError(
                    f"transformer {t.name} is plugged into its own secondary",
                    refs.get("plugged", t.location),
                    "plug its primary into an outlet or strip of the supply",
                )
            )
            continue
        if supply is None:
            errors.append(
                PlanError(
                    f"transformer {t.name} needs the installation's supply",
                    t.location,
                    "state it with 'supply 230 V 50 Hz, system TN-S'",
                )
            )
            continue
        if t.frequency is not None and abs(t.frequency - supply.frequency) > 1e-9:
            errors.append(
                PlanError(
                    f"transformer {t.name}: a secondary at {t.frequency:g} Hz from a "
                    f"{supply.frequency:g} Hz supply",
                    t.location,
                    "a transformer changes the voltage, not the frequency: its secondary gives "
                    f"{supply.frequency:g} Hz (a device for another frequency needs a frequency "
                    "converter)",
                )
            )
        points[t.name] = Point(t.name, "outlet", None, None, None, t.location)
        if not t.isolating:
            cord = Conductor(
                f"{t.name}.cord",
                CORD_KIND,
                t.name,
                t.plugged,
                role=PROTECTIVE,
                length=t.cord_length or DEFAULT_CORD[0],
                area=t.cord_area or DEFAULT_CORD[1],
                location=t.location,
            )
            conductors.append((cord, {"b": refs.get("plugged", t.location)}))

"""Before/after comparison of two analyses: findings, loops, hum per harmonic, protective earth,
and an installation's outlet-pair voltages."""

from __future__ import annotations

import dataclasses
from ..core.jsontext import dumps as json_text
import re

from ..rules.results import Result
from ..core.caution import CAUTION
from ..core.plain import clean, readable
from ..core.units import dbv
from ..model.kinds import PROTECTIVE, is_fastening
from ..rules.catalogue import RULES, severity_rank
from .fixes import identity

__all__ = ["compare", "compare_text", "compare_json"]

_LOOP = re.compile(r"^loop (\d+)$")


def _by_members(f, loops: list):
    """``f`` with each 'loop N' it names written as the loop's conductors: loops are numbered as
    each plan lists them, so loop 2 of one plan may be loop 3 of the other."""
    names = []
    for e in f.elements:
        m = _LOOP.match(e)
        n = int(m[1]) if m else 0
        names.append(f"loop of {', '.join(sorted(loops[n - 1]))}" if 0 < n <= len(loops) else e)
    return dataclasses.replace(f, elements=tuple(names)) if names != list(f.elements) else f


def _renamed(fixed: list, introduced: list, protective: set) -> list[tuple]:
    """Pairs of a fixed and an introduced finding of one rule that name the same elements but for
    protective conductors and fastenings (``protective``: their names in either plan): a loop
    through the protective earth whose earth moved to a stud of its own is the same loop, its
    closing links and cords unchanged."""
    pairs = []
    for f in list(fixed):
        for g in introduced:
            a, b = set(f.elements), set(g.elements)
            if (
                f.code == g.code
                and RULES[f.code].identity == "elements"
                and a != b
                and len(a & b) >= 3
                and (a ^ b) <= protective
            ):
                pairs.append((f, g))
                fixed.remove(f)
                introduced.remove(g)
                break
    return pairs


def _protective_names(*results) -> set[str]:
    """The protective conductors' and fastenings' names of the results' plans."""
    out = set()
    for r in results:
        metals = r.plan.index.metals
        out |= {
            c.name for c in r.plan.conductors if c.role == PROTECTIVE or is_fastening(c, metals)
        }
    return out


def _matched(
    before: list, after: list, loops_before=(), loops_after=(), protective=frozenset()
) -> dict[str, list]:
    """Findings fixed, kept and introduced, each keyed by its stable identity (``fixes.identity``:
    code, elements, their roles, the channel).  Findings that share one identity are counted, never
    merged: two before and one after is one kept and one fixed, so an introduced finding cannot
    hide behind a fixed one of the same key."""
    groups: dict[tuple, tuple[list, list]] = {}
    for side, findings, loops in ((0, before, loops_before), (1, after, loops_after)):
        for f in findings:
            groups.setdefault(identity(_by_members(f, loops)), ([], []))[side].append(f)
    out: dict[str, list] = {"fixed": [], "kept": [], "introduced": [], "worse": []}
    for key in sorted(groups, key=repr):
        b, a = groups[key]
        out["kept"] += a[: len(b)]
        out["fixed"] += b[len(a) :]
        out["introduced"] += a[len(b) :]
        out["worse"] += [(x, y, w) for x, y in zip(b, a) if (w := _worsened(x, y))]
    for b, a in _renamed(out["fixed"], out["introduced"], set(protective)):
        out["kept"].append(a)
        if w := _worsened(b, a):
            out["worse"].append((b, a, w))
    return out


#: figures that grow as a finding gets worse: hum and feedback levels (dB), and the protective
#: earth's path resistance, touch voltage and clearing time
_WORSE_WHEN_HIGHER = (
    "level_dbv",
    "total_dbv",
    "feedback_db",
    "crosstalk_db",
    "input_db",
    "worst_input_db",
    "touch_voltage_v",
    "path_resistance_mohm",
    "resistance_ohm",
    "transfer_resistance_mohm",
    "clear_time_s",
)


#: a figure key's unit suffix and how it is written
_UNIT_OF = (
    ("_mohm", "mΩ"),
    ("_ohm", "Ω"),
    ("_dbv", "dBV"),
    ("_db", "dB"),
    ("_v", "V"),
    ("_s", "s"),
)


def _named(key: str) -> tuple[str, str]:
    """A figure key as words and its unit: 'level_dbv' -> ('level', 'dBV')."""
    for suffix, unit in _UNIT_OF:
        if key.endswith(suffix):
            return key[: -len(suffix)].replace("_", " "), unit
    return key.replace("_", " "), ""


def _worsened(before, after) -> str:
    """How a finding kept from ``before`` to ``after`` got worse, in words ('' when it did not): a
    severer severity, a level 0.5 dB or more higher, or another figure of
    :data:`_WORSE_WHEN_HIGHER` 5 % or more higher."""
    if severity_rank(after.severity) < severity_rank(before.severity):
        return f"{before.severity} → {after.severity}"
    for key in _WORSE_WHEN_HIGHER:
        x, y = before.figures.get(key), after.figures.get(key)
        if not isinstance(x, (int, float)) or not isinstance(y, (int, float)):
            continue
        name, unit = _named(key)
        if key.endswith("_db") or key.endswith("_dbv"):
            if y - x >= 0.5:
                return f"{name} {x:.1f} → {y:.1f} {unit} (+{y - x:.1f} dB)"
        elif x > 0 and y >= x * 1.05:
            return f"{name} {x:.3g} → {y:.3g} {unit}".rstrip()
    return ""


def _db(v):
    return dbv(v) if v and v > 0 else None


def compare(before: Result, after: Result) -> dict:
    """What changed from ``before`` to ``after`` (plain data)."""
    matched = _matched(
        before.findings,
        after.findings,
        [info.loop.edges for info in before.loops],
        [info.loop.edges for info in after.loops],
        _protective_names(before, after),
    )
    row = lambda f: {"code": f.code, "severity": f.severity, "message": f.message}  # noqa: E731
    return clean(
        {
            "caution": CAUTION,
            "before": before.plan.file,
            "after": after.plan.file,
            "verdict": {"before": before.verdict(), "after": after.verdict()},
            "not_checked": {
                "before": [n.as_dict() for n in before.not_checked],
                "after": [n.as_dict() for n in after.not_checked],
            },
            "notices": {"before": list(before.notices), "after": list(after.notices)},
            "findings": {
                **{k: [row(f) for f in v] for k, v in matched.items() if k != "worse"},
                "worse": [
                    {**row(a), "severity_before": b.severity, "how": how}
                    for b, a, how in matched["worse"]
                ],
            },
            "loops": _loops(before, after),
            "hum": {ch: _channel(before, after, ch) for ch in _channels(before, after)},
            "protective_earth": _protective(before, after),
            "outlets": _outlets(before, after),
        }
    )


def _loops(before: Result, after: Result) -> dict:
    """The loops removed and added (each by its conductors) and the totals."""
    lb = {frozenset(lp.loop.edges) for lp in before.loops}
    la = {frozenset(lp.loop.edges) for lp in after.loops}
    removed, added = sorted(lb - la, key=sorted), sorted(la - lb, key=sorted)
    # a loop whose protective conductors or fastenings were renamed (an earth moved to a stud of
    # its own) is the same loop
    protective = _protective_names(before, after)
    for k in list(removed):
        same = next((x for x in added if len(k & x) >= 3 and (k ^ x) <= protective), None)
        if same is not None:
            removed.remove(k)
            added.remove(same)
    return {
        "removed": [sorted(k) for k in removed],
        "added": [sorted(k) for k in added],
        "total_before": before.loop_total,
        "total_after": after.loop_total,
    }


def _channels(before: Result, after: Result) -> list[str]:
    return sorted(
        set(before.hum.channels if before.hum else ())
        | set(after.hum.channels if after.hum else ())
    )


def _channel(before: Result, after: Result, ch: str) -> dict:
    """One channel's hum before and after: the totals, the verdicts, the spectrum line by line."""
    hb = before.hum.channels.get(ch) if before.hum else None
    ha = after.hum.channels.get(ch) if after.hum else None
    sb = {r.frequency: r.volts for r in (hb.spectrum if hb else [])}
    sa = {r.frequency: r.volts for r in (ha.spectrum if ha else [])}
    rows = []
    for f in sorted(set(sb) | set(sa)):
        b, a = _db(sb.get(f)), _db(sa.get(f))
        if b is None and a is None:
            continue
        rows.append(
            {
                "frequency_hz": f,
                "before_dbv": b,
                "after_dbv": a,
                "change_db": None if b is None or a is None else a - b,
            }
        )
    tb, ta = _db(hb.total_v) if hb else None, _db(ha.total_v) if ha else None
    return {
        "before_dbv": tb,
        "after_dbv": ta,
        "change_db": None if tb is None or ta is None else ta - tb,
        "audible_before": hb.audible if hb else None,
        "audible_after": ha.audible if ha else None,
        "spectrum": rows,
    }


def _protective(before: Result, after: Result) -> list[dict]:
    """Each part's protective path and touch voltage, before and after; in an installation each
    placed device's earth pin's path to the main earthing terminal too, with its worst part's touch
    voltage on the installation's supply."""
    pb = {p.part: p for p in (before.safety.parts if before.safety else ())}
    pa = {p.part: p for p in (after.safety.parts if after.safety else ())}
    rows = [
        {
            "part": k,
            "before_ohm": pb[k].path_resistance if k in pb else None,
            "after_ohm": pa[k].path_resistance if k in pa else None,
            "touch_before_v": pb[k].touch_voltage if k in pb else None,
            "touch_after_v": pa[k].touch_voltage if k in pa else None,
        }
        for k in sorted(set(pb) | set(pa))
    ]
    db = {d.device: d for d in before.device_earths or ()}
    da = {d.device: d for d in after.device_earths or ()}
    touch = lambda d: getattr(d.fault, "touch_voltage", None) if d else None  # noqa: E731
    return rows + [
        {
            "part": f"{k}'s earth pin",
            "before_ohm": db[k].resistance if k in db else None,
            "after_ohm": da[k].resistance if k in da else None,
            "touch_before_v": touch(db.get(k)),
            "touch_after_v": touch(da.get(k)),
        }
        for k in sorted(set(db) | set(da))
    ]


def _outlets(before: Result, after: Result) -> list[dict]:
    """Each interconnect's outlet-pair voltage, unplugged and as planned, before and after
    (installations)."""
    ob = {p.interconnect: p for p in (before.outlets.pairs if before.outlets else ())}
    oa = {p.interconnect: p for p in (after.outlets.pairs if after.outlets else ())}
    pair = lambda p: None if p is None else f"{p.a} – {p.b}"  # noqa: E731
    return [
        {
            "interconnect": k,
            "between": pair(oa.get(k) or ob[k]),
            # a device plugged in elsewhere spans other outlets after: each figure with its own
            "between_before": pair(ob.get(k)),
            "between_after": pair(oa.get(k)),
            "unplugged_before_v": ob[k].open_total if k in ob else None,
            "unplugged_after_v": oa[k].open_total if k in oa else None,
            "planned_before_v": ob[k].planned_total if k in ob else None,
            "planned_after_v": oa[k].planned_total if k in oa else None,
        }
        for k in sorted(set(ob) | set(oa))
    ]


def _u(x, unit: str) -> str:
    """A figure with its unit (three significant figures, never an exponent from 1 on: 8000,
    not 8e+03), or 'absent' (no unit) when there is none."""
    if x is None:
        return "absent"
    return f"{readable(x, '.0f' if abs(x) >= 1000 else '.3g')} {unit}"


#: a channel's verdict in words (None: no verdict could be reached, e.g. no listening statement)
_HEARD = {True: "audible", False: "inaudible", None: "no verdict"}


def _level(dbv_value) -> str:
    return "no hum" if dbv_value is None else f"{readable(dbv_value, '.1f')} dBV"


def _hum_line(ch: str, h: dict) -> str:
    """'Hum, left: -86.2 dBV → no hum; inaudible → inaudible' (the change in dB when both levels
    exist)."""
    change = "" if h["change_db"] is None else f" ({readable(h['change_db'], '+.1f')} dB)"
    heard = f"{_HEARD[h['audible_before']]} → {_HEARD[h['audible_after']]}"
    return f"Hum, {ch}: {_level(h['before_dbv'])} → {_level(h['after_dbv'])}{change}; {heard}"


def compare_text(d: dict) -> str:
    out = [
        f"Compare {d['before']} → {d['after']}",
        d["caution"],
        f"Verdict before: {d['verdict']['before']}",
        f"Verdict after: {d['verdict']['after']}",
    ]
    for when in ("before", "after"):
        out += [f"Notice ({when}): {n}" for n in d["notices"][when]]
    out.append("")
    fnd = d["findings"]
    out.append(
        f"Findings: {len(fnd['fixed'])} fixed, {len(fnd['kept'])} kept "
        f"({len(fnd.get('worse', []))} of them worse), {len(fnd['introduced'])} introduced"
    )
    for tag in ("fixed", "introduced", "kept"):
        for f in fnd[tag]:
            out.append(f"  {tag:<10} {f['code']} {f['severity']:<8} {f['message']}")
    for f in fnd.get("worse", []):
        out.append(
            f"  {'worse':<10} {f['code']} {f['severity']:<8} kept, and worse ({f['how']}): "
            f"{f['message']}"
        )
    lp = d["loops"]
    out.append(
        f"Loops: {lp['total_before']} → {lp['total_after']} ({len(lp['removed'])} removed, "
        f"{len(lp['added'])} added)"
    )
    for k in lp["removed"]:
        out.append(f"  removed   {', '.join(k)}")
    for k in lp["added"]:
        out.append(f"  added     {', '.join(k)}")
    for ch, h in d["hum"].items():
        out.append(_hum_line(ch, h))
        for r in h["spectrum"][:12]:
            change = "" if r["change_db"] is None else f"  {readable(r['change_db'], '+.1f')} dB"
            out.append(
                f"  {r['frequency_hz']:>7g} Hz  {_level(r['before_dbv']):>10} → "
                f"{_level(r['after_dbv']):>10}{change}"
            )
    for p in d["protective_earth"]:
        out.append(
            f"Protective path to {p['part']}: "
            f"{_u(p['before_ohm'] and p['before_ohm'] * 1e3, 'mΩ')} → "
            f"{_u(p['after_ohm'] and p['after_ohm'] * 1e3, 'mΩ')}; touch voltage "
            f"{_u(p['touch_before_v'], 'V')} → {_u(p['touch_after_v'], 'V')}"
        )
    for o in d.get("outlets", []):
        mv = lambda v: _u(None if v is None else v * 1e3, "mV")  # noqa: E731
        where = o["between"]
        if o.get("between_before") and o["between_before"] != o.get("between_after"):
            where = f"{o['between_before']} before, {o['between_after'] or 'none'} after"
        out.append(
            f"Outlet voltage across {o['interconnect']} ({where}): unplugged "
            f"{mv(o['unplugged_before_v'])} → {mv(o['unplugged_after_v'])}, as planned "
            f"{mv(o['planned_before_v'])} → {mv(o['planned_after_v'])}"
        )
    return "\n".join(out) + "\n"


def compare_json(d: dict) -> str:
    return json_text(d) + "\n"

"""``groundcheck explain``: what a rule checks, why, and how to fix it (every rule, or a family's,
listed in one line each)."""

from __future__ import annotations

from ..core.caution import CAUTION, MAINS_WORK
from ..rules.catalogue import RULES, protective_earth_rule
from ..rules.selection import UnknownRule, rule_codes
from .common import UsageError
from .registry import command, opt

__all__ = ["cmd_explain"]


@command(
    "explain",
    help="say what a rule checks, why, and how to fix it",
    description="Example:\n  groundcheck explain GC102",
    options=(
        opt("code", metavar="RULE", nargs="?", help="rule code or name (none: list every rule)"),
    ),
)
def cmd_explain(args) -> int:
    codes = rule_codes(args.code) if args.code else tuple(RULES)  # a family lists its rules
    if codes is None:
        raise UsageError(str(UnknownRule(args.code)))
    if len(codes) > 1:
        for code in codes:
            r = RULES[code]
            print(f"{code}  {r.severity:<8} {r.name:<28} {r.checks.split('. ')[0].rstrip('.')}")
        print(f"\n{CAUTION}")
        return 0
    code = codes[0]
    r = RULES[code]
    # a rule whose findings may be of another severity than its usual one says which (an outside
    # builder read "(fault)" above a danger the rule had found)
    others = [v for v in r.variants if v != r.severity]
    also = f"; its findings may also be {' or '.join(others)}" if others else ""
    print(f"{r.code} {r.name} ({r.severity}{also})\n")
    print(f"Checks:  {r.checks}\n")
    print(f"Why:     {r.why}\n")
    print(f"Fix:     {r.fix}\n")
    if protective_earth_rule(code):
        print(f"         {MAINS_WORK}\n")
    print(f"References: {r.references}\n")
    print(CAUTION)
    return 0

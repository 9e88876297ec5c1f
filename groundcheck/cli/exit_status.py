"""What a run's exit status does not say, said on standard error: a danger that ``fail-on never``
lets pass, and rules that can find a danger left out by a rule selection."""

from __future__ import annotations

import sys

from .common import fail_on
from .settings import shown_value

__all__ = ["say_passed_dangers"]


def _say_unchecked_dangers(results) -> None:
    """A warning on standard error when a rule selection left out rules that can find a danger:
    a danger they would find cannot fail the run, whatever --fail-on says."""
    from ..rules.catalogue import SAFETY_RULES
    from ..rules.selection import rule_list

    left = {}
    for r in results:
        for n in r.not_checked:
            codes = [c for c in n.codes if c in SAFETY_RULES]
            if codes and n.location is None:
                left.setdefault(n.why, set()).update(codes)
    for why, codes in left.items():
        sys.stderr.write(
            f"groundcheck: warning: rules that can find a danger were not checked "
            f"({rule_list(tuple(sorted(codes)))}, {why}): a danger they would find cannot fail "
            "this run\n"
        )


def say_passed_dangers(args, results) -> None:
    """A warning on standard error when the run found a danger and its exit status will not say
    so (``fail-on never``, from the command line or a settings file found above the current
    folder): a danger never passes without a word, whatever the output format."""
    level = fail_on(args)
    _say_unchecked_dangers(results)
    dangers = sum(1 for r in results for f in r.findings if f.severity == "danger")
    if not dangers or any(r.fails(level) for r in results):
        return
    where = (
        f"--fail-on {level}"
        if getattr(args, "fail_on", None) is not None
        else f"fail-on = {shown_value(level)} in {getattr(args, 'config_file', None)}"
    )
    sys.stderr.write(
        f"groundcheck: warning: {dangers} danger finding{'s' if dangers != 1 else ''}, yet the "
        f"exit status is 0: {where} (a danger is mains wiring that can kill; see the report)\n"
    )

"""The check context of a demo case (or an edited copy of its text), for the check tests."""

from __future__ import annotations

from stiff import CASES_DIR
from stiff.case import parse_case
from stiff.check import run_check
from stiff.checks.context import CheckContext

FIVE_BAR = (CASES_DIR / "five_bar_leg.toml").read_text(encoding="utf-8")
HOPPING = (CASES_DIR / "hopping_leg.toml").read_text(encoding="utf-8")


def context_of(text: str) -> CheckContext:
    """`stiff check` of a case file's text, as the checks' context (its load cases solved)."""
    r = run_check(parse_case(text))
    return CheckContext(r.case, r.built, r.load_cases)

"""Failure checks: lugs, printed segments, tubes, sockets, pins, actuators, springs, targets.

Each check module has ``checks(ctx) -> list[CheckRows]``: every check of every item in every
load set of the context, each over the load set's B poses at once (``stiff.checks.base``), and
some ``warnings(ctx) -> list[str]``. ``run_checks`` gives `stiff check`'s records (B = 1);
``check_rows`` the rows themselves, for sweeps and maps that check many poses or variants in one
pass.
"""

from __future__ import annotations

from collections.abc import Callable

from stiff.checks import duty, lugs, pins, segments, sockets, tubes
from stiff.checks.base import CheckRecord, CheckRows, expand
from stiff.checks.context import CheckContext

CHECKS: tuple[Callable[[CheckContext], list[CheckRows]], ...] = (
    lugs.checks,
    pins.checks,
    segments.checks,
    tubes.checks,
    sockets.checks,
    duty.checks,
)
WARNINGS: tuple[Callable[[CheckContext], list[str]], ...] = (
    lugs.warnings, pins.warnings, tubes.warnings, sockets.warnings)


def check_rows(ctx: CheckContext) -> tuple[CheckRows, ...]:
    """Every check of every module over every load set, in order."""
    return tuple(row for check in CHECKS for row in check(ctx))


def run_checks(ctx: CheckContext) -> tuple[tuple[CheckRecord, ...], tuple[str, ...]]:
    """Every check record and every check warning of a solved case."""
    records = tuple(expand(check_rows(ctx)))
    warnings = tuple(w for warn in WARNINGS for w in warn(ctx))
    return records, warnings

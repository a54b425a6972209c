"""Failure checks: lugs, printed segments, tubes, sockets, pins, actuators, springs, targets.

``run_checks(ctx)`` runs every check module over every load case; each module has
``checks(ctx) -> list[CheckRecord]`` and some ``warnings(ctx) -> list[str]``.
"""

from __future__ import annotations

from collections.abc import Callable

from stiff.checks import duty, lugs, pins, segments, sockets, tubes
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext

CHECKS: tuple[Callable[[CheckContext], list[CheckRecord]], ...] = (
    lugs.checks,
    pins.checks,
    segments.checks,
    tubes.checks,
    sockets.checks,
    duty.checks,
)
WARNINGS: tuple[Callable[[CheckContext], list[str]], ...] = (
    lugs.warnings, pins.warnings, tubes.warnings, sockets.warnings)


def run_checks(ctx: CheckContext) -> tuple[tuple[CheckRecord, ...], tuple[str, ...]]:
    """Every check record and every check warning of a solved case."""
    records = tuple(r for check in CHECKS for r in check(ctx))
    warnings = tuple(w for warn in WARNINGS for w in warn(ctx))
    return records, warnings

"""Failure checks: lugs, printed segments, tubes, sockets, pins, actuators, springs, targets.

Each check module has ``checks(ctx) -> list[CheckRows]``: every check of every item in every
load set of the context, each over the load set's B poses at once (``stiff.checks.base``), and
some ``warnings(ctx) -> list[str]``. ``run_checks`` gives `stiff check`'s records (B = 1);
``check_rows`` the rows themselves, for sweeps and maps that check many poses or variants in one
pass.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from stiff.checks import duty, lugs, pins, segments, sockets, tubes
from stiff.checks.base import CheckRecord, CheckRows, FloatArray, expand
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


def check_rows(ctx: CheckContext, screen: bool = False) -> tuple[CheckRows, ...]:
    """Every check of every module over every load set, in order.

    With ``screen`` (sweeps and maps) the frame's linear buckling factor is solved only in the
    poses where it could matter: where its lower bound is below the cutoff of its load set and
    pose (:func:`frame_cutoffs`). Elsewhere its rows hold the bound, which is at or below the
    true factor and at or above every threshold that decides the pose's results, so the
    lowest factor of any set of load cases, the worst utilisation, whether every check is met
    and which checks miss are those of the full solve.
    """
    if not screen or not any(p.kind == "tube" for p in ctx.case.parts):
        return tuple(row for check in CHECKS for row in check(ctx))
    rows = {check: (tubes.without_frame(ctx) if check is tubes.checks else check(ctx))
            for check in CHECKS}
    cutoffs = frame_cutoffs(ctx, [r for got in rows.values() for r in got])
    rows[tubes.checks] = tubes.checks(ctx, cutoffs)
    return tuple(row for check in CHECKS for row in rows[check])


def frame_cutoffs(ctx: CheckContext, rows: list[CheckRows]) -> list[FloatArray]:
    """(B,) per load set: below what the frame's buckling factor must be solved exactly.

    The largest of its required factor, the lowest factor of the load set's other checks in
    that pose and the factor at which its utilisation would reach theirs: a factor above all
    three is not the lowest, not the worst utilisation and is met.
    """
    required = ctx.required("buckling")
    by_case: dict[str, list[CheckRows]] = {}
    for r in rows:
        by_case.setdefault(r.load_case, []).append(r)
    out = []
    for loads in ctx.loads:
        mine = by_case.get(loads.name, [])
        if not mine:
            out.append(np.full(loads.size, np.inf))
            continue
        sf = np.stack([r.safety_factors for r in mine])
        need = np.array([r.required_factor for r in mine])[:, None]
        util = np.where(np.isfinite(sf), np.inf, 0.0)
        with np.errstate(over="ignore"):
            np.divide(need, sf, out=util, where=np.isfinite(sf) & (sf > 0.0))
        util = util.max(axis=0)
        by_util = np.divide(required, util, out=np.full(util.shape, np.inf), where=util > 0)
        out.append(np.maximum(np.maximum(required, sf.min(axis=0)), by_util))
    return out


def run_checks(ctx: CheckContext) -> tuple[tuple[CheckRecord, ...], tuple[str, ...]]:
    """Every check record and every check warning of a solved case."""
    records = tuple(expand(check_rows(ctx)))
    warnings = tuple(w for warn in WARNINGS for w in warn(ctx))
    return records, warnings

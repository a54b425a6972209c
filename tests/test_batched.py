"""The batched path (stiff.pose_batch, stiff.batched) gives `stiff check`'s numbers.

Reference: `stiff check` itself (stiff.check.run_check), one pose at a time, whose load cases and
checks are verified against published sources in tests/verification/. Here the batched solves
and the checks over arrays of poses must reproduce it record by record, to round-off.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from stiff import CASES_DIR
from stiff.batched import (
    all_met,
    case_geometry,
    check_variant,
    grid_geometry,
    not_met,
    worst_utilisation,
)
from stiff.case import load_case
from stiff.check import CheckResult, run_check
from stiff.checks.base import CheckRecord, CheckRows, expand
from stiff.cli import cli
from stiff.loads import load_case_names
from stiff.sweep import run_sweep
from stiff.sweep_spec import parse_specs
from stiff.workspace import evaluate_pose, evaluate_poses, grid_angles, pose_case

DEMOS = sorted(CASES_DIR.glob("*.toml"))
REL = 1e-9


def _key(r: CheckRecord) -> tuple[str, str, str]:
    return (r.item, r.mode, r.load_case)


def _same_records(batched: list[CheckRecord], full: CheckResult, scale: float) -> None:
    """Record for record: names, required factors and numbers to round-off.

    ``scale`` is the largest demand of the case: a demand that is round-off (a member with no
    load) may differ by a few 1e-12 of it, so demands compare with that absolute floor."""
    assert [_key(r) for r in batched] == [_key(r) for r in full.checks]
    for a, b in zip(batched, full.checks, strict=True):
        assert a.required_factor == b.required_factor
        assert a.unit == b.unit
        assert math.isclose(a.demand, b.demand, rel_tol=REL, abs_tol=1e-9 * scale), _key(a)
        assert math.isclose(a.capacity, b.capacity, rel_tol=REL, abs_tol=1e-9 * scale), _key(a)


def _scale(result: CheckResult) -> float:
    return max(abs(r.demand) for r in result.checks if math.isfinite(r.demand))


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_one_pose_gives_the_records_of_stiff_check(path: Path) -> None:
    """The case's own pose through the batched path: every record of `stiff check`."""
    case = load_case(path)
    full = run_check(case)
    checked = check_variant(case, case_geometry(case), screen=False)
    _same_records(expand(checked.checks.rows), full, _scale(full))
    C = checked.checks.compliance_mm_per_N[0]
    assert np.allclose(C, full.stiffness.compliance_mm_per_N, rtol=REL, atol=0.0)
    if full.landing is not None:
        assert checked.checks.landings is not None
        assert math.isclose(float(checked.checks.landings.peak_N[0]), full.landing.peak_N,
                            rel_tol=REL)


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_poses_checked_together_give_each_pose_alone(path: Path) -> None:
    """Three poses of a map checked at once: entry p of every row is `stiff check` of the case
    moved to pose p (landing there too)."""
    case = load_case(path)
    _, _, grid = grid_angles(case, 3)
    chosen = grid[::3][:3]
    geometry = grid_geometry(case, chosen)
    checked = check_variant(pose_case(case, tuple(chosen[geometry.reached[0]])), geometry,
                            screen=False)
    rows = checked.checks.rows
    for p, k in enumerate(geometry.reached):
        full = run_check(pose_case(case, tuple(chosen[k])))
        mine = [row.record(p) for row in rows if row.mask[p]]
        _same_records(mine, full, _scale(full))
        assert np.allclose(checked.checks.compliance_mm_per_N[p],
                           full.stiffness.compliance_mm_per_N, rtol=REL, atol=0.0)


def test_map_batches_give_the_rows_of_each_pose_alone() -> None:
    """`stiff map`'s batched rows equal `stiff check` of each grid pose taken alone
    (evaluate_pose), unreachable poses included."""
    case = load_case(CASES_DIR / "camera_arm.toml")
    _, _, grid = grid_angles(case, 3)
    items = list(enumerate(grid))
    together = evaluate_poses(case, items)
    for row, (k, angles) in zip(together, items, strict=True):
        alone = evaluate_pose(case, k, angles)
        assert row.reachable == alone.reachable
        if not row.reachable:
            continue
        assert row.min_factor_check == alone.min_factor_check
        for name in ("foot_x_mm", "foot_y_mm", "vertical_mm_per_N", "lateral_mm_per_N",
                     "min_factor", "singularity"):
            assert math.isclose(getattr(row, name), getattr(alone, name), rel_tol=REL,
                                abs_tol=1e-12), name


def test_more_poses_never_raise_a_variants_lowest_factor() -> None:
    """Checking each variant in the map's poses too can only lower (or keep) its minimum
    factor and keep its compliance, which is the case's own pose's."""
    case = load_case(CASES_DIR / "camera_arm.toml")
    variables = parse_specs(case, ["*.walls=2,4"])
    alone = run_sweep(case, variables, workers=1)
    _, _, grid = grid_angles(case, 3)
    wider = run_sweep(case, variables, workers=1, poses=grid)
    for a, b in zip(alone, wider, strict=True):
        assert b.min_factor <= a.min_factor
        assert b.vertical_mm_per_N == pytest.approx(a.vertical_mm_per_N, rel=REL)


def test_sweep_command_over_the_map_poses(tmp_path: Path) -> None:
    """`stiff sweep --map-steps` runs and writes its variants."""
    out = tmp_path / "out"
    result = CliRunner().invoke(cli, ["sweep", str(CASES_DIR / "camera_arm.toml"), "--vary",
                                      "lower_arm.walls=2,3", "--map-steps", "2", "--out",
                                      str(out)])
    assert result.exit_code in (0, 1), result.output
    assert (out / "sweep.csv").read_text(encoding="utf-8").count("\n") == 3


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_screening_the_frame_buckling_keeps_every_result(path: Path) -> None:
    """With the frame's buckling factor solved only where it can matter, each pose's lowest
    factor (over all load cases and over the map's), the worst utilisation, whether all is
    met and the misses are those of the full solve; screened factors are lower bounds."""
    case = load_case(path)
    _, _, grid = grid_angles(case, 3)
    geometry = case_geometry(case, grid)
    full = check_variant(case, geometry, screen=False).checks
    fast = check_variant(case, geometry, screen=True).checks
    assert [_key_rows(r) for r in fast.rows] == [_key_rows(r) for r in full.rows]
    assert np.all(fast.factors <= full.factors * (1 + REL))  # round-off of a smaller batch
    subsets = (None, ("stance", "payload", "landing", full.load_case_names[0]))
    for names in subsets:
        low_full, which_full = full.lowest(names)
        low_fast, which_fast = fast.lowest(names)
        assert np.allclose(low_fast, low_full, rtol=REL, atol=0.0)
        assert [None if r is None else _key_rows(r) for r in which_full] == [
            None if r is None else _key_rows(r) for r in which_fast]
    assert math.isclose(worst_utilisation(fast), worst_utilisation(full), rel_tol=REL)
    assert all_met(fast) == all_met(full)
    assert not_met(fast) == not_met(full)


def _key_rows(r: CheckRows) -> tuple[str, str, str]:
    return (r.item, r.mode, r.load_case)


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_load_case_names_are_those_of_the_load_cases(path: Path) -> None:
    """load_case_names (used to check names without solving) lists `stiff check`'s load
    cases in order."""
    full = run_check(load_case(path))
    assert load_case_names(full.case) == tuple(r.name for r in full.load_cases)


def test_checking_some_load_cases_gives_their_rows_of_the_full_check() -> None:
    """Only the chosen load cases: the same rows and factors as those load cases of the full
    check, and their lowest factor."""
    case = load_case(CASES_DIR / "five_bar_leg.toml")
    _, _, grid = grid_angles(case, 3)
    geometry = case_geometry(case, grid)
    chosen = ("stance", "landing", "slip fore", "slip aft")
    full = check_variant(case, geometry).checks
    some = check_variant(case, geometry, only=chosen).checks
    assert some.load_case_names == chosen
    mine = [r for r in full.rows if r.load_case in chosen]
    assert [_key_rows(r) for r in some.rows] == [_key_rows(r) for r in mine]
    low_full, _ = full.lowest(chosen)
    low_some, _ = some.lowest()
    assert np.allclose(low_some, low_full, rtol=REL, atol=0.0)


def test_sweep_over_some_load_cases_and_a_bad_name(tmp_path: Path) -> None:
    """`stiff sweep --load-cases` runs and says so; an unknown name is exit 2 in one line."""
    arm = str(CASES_DIR / "camera_arm.toml")
    good = CliRunner().invoke(cli, ["sweep", arm, "--vary", "lower_arm.walls=2,3",
                                    "--load-cases", "payload,landing", "--out",
                                    str(tmp_path / "a")])
    assert good.exit_code in (0, 1), good.output
    assert "load cases checked: payload,landing" in good.output
    bad = CliRunner().invoke(cli, ["sweep", arm, "--vary", "lower_arm.walls=2,3",
                                   "--load-cases", "payload,jump", "--out", str(tmp_path / "b")])
    assert bad.exit_code == 2
    assert "no load case 'jump'" in bad.output
    assert len(bad.output.strip().splitlines()) == 1
    assert "Traceback" not in bad.output

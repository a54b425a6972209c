"""Sweeps over numeric case values, `stiff check --sweep`, and maps over foot targets.

A case value is set in the parsed case file and read through the case reader, so a variant is
exactly the case file with the value written in; these tests hold the sweep to that.
"""

from __future__ import annotations

import math
import re
from dataclasses import replace
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import pytest
from click.testing import CliRunner

from stiff import CASES_DIR
from stiff.case import load_case
from stiff.check import run_check
from stiff.cli import cli
from stiff.kinematics import solve_pose
from stiff.linkage import linkage
from stiff.sweep import amounts, run_sweep
from stiff.sweep_spec import parse_specs
from stiff.workspace import evaluate_pose, grid_targets

ARM = CASES_DIR / "camera_arm.toml"  # printed parts only, one actuator
LEG = CASES_DIR / "five_bar_leg.toml"  # two actuators
DEMOS = sorted(CASES_DIR.glob("*.toml"))


def _edited(tmp_path: Path, pattern: str, new: str) -> Path:
    """The camera arm with the one match of ``pattern`` replaced by ``new``."""
    text = ARM.read_text(encoding="utf-8")
    edited, count = re.subn(pattern, new, text, flags=re.S)
    assert count == 1
    path = tmp_path / "arm.toml"
    path.write_text(edited, encoding="utf-8")
    return path


@pytest.mark.parametrize(("spec", "pattern", "new"), [
    ("loads.drop_height_mm=25", r"drop_height_mm = 10\.0", "drop_height_mm = 25"),
    ("joints.A.pin_diameter_mm=3.5", r"(\[joints\.A\].*?)pin_diameter_mm = 4\.0",
     r"\g<1>pin_diameter_mm = 3.5"),
])
def test_a_case_value_sweep_reproduces_stiff_check_of_the_edited_file(
        tmp_path: Path, spec: str, pattern: str, new: str) -> None:
    case = load_case(ARM)
    variables = parse_specs(case, [spec])
    (row,) = run_sweep(case, variables, workers=1)
    single = run_check(load_case(_edited(tmp_path, pattern, new)))
    C = single.stiffness.compliance_mm_per_N
    assert not row.error
    assert row.vertical_mm_per_N == float(C[1, 1])  # exactly: the same computation
    assert row.lateral_mm_per_N == single.stiffness.lateral_mm_per_N
    assert row.principal_mm_per_N == float(single.stiffness.principal_mm_per_N[0])
    assert row.min_factor == min(r.safety_factor for r in single.checks)
    assert row.all_met == single.all_met
    assert row.mass_g == amounts(single.case, single.built).mass_g


def test_a_case_value_range_and_a_part_setting_combine() -> None:
    case = load_case(ARM)
    variables = parse_specs(case, ["loads.drop_height_mm=10:30:10", "*.walls=3"])
    assert variables[0].name == "loads.drop_height_mm"
    assert variables[0].values == (10, 20, 30)
    assert variables[1].name == "*.walls"


@pytest.mark.parametrize(("spec", "why"), [
    ("loads.drop_hieght_mm=20", "unknown key 'drop_hieght_mm'; did you mean 'drop_height_mm'"),
    ("joints.Z.pin_diameter_mm=3", "unknown key 'joints.Z'"),
    ("loads.drop_height_mm=-5", "loads.drop_height_mm: must be at least 0, got -5"),
    ("joints.A.pin_diameter_mm=4,5", "hole 4.1 mm is smaller than the pin 5 mm"),
    ("parts.lower_arm.kind=1", "'parts.lower_arm.kind' is text, not a number"),
    ("parts.lower_arm.section.walls=2.5", "must be a whole number, got 2.5"),
    ("loads.drop_height_mm=ten", "'ten' is not a number"),
])
def test_bad_case_value_specs_are_exit_2_in_one_line(tmp_path: Path, spec: str,
                                                     why: str) -> None:
    result = CliRunner().invoke(cli, ["sweep", str(ARM), "--vary", spec, "--out",
                                      str(tmp_path)])
    assert result.exit_code == 2, result.output
    assert why in result.output
    assert spec in result.output
    assert len(result.output.strip().splitlines()) == 1
    assert "Traceback" not in result.output


def test_check_sweep_puts_the_sweep_in_the_report_and_the_summary(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["check", str(ARM), "--sweep", "*.walls=2,3",
                                      "--sweep", "loads.drop_height_mm=10,20",
                                      "--out", str(tmp_path)])
    assert result.exit_code in (0, 1), result.output
    assert "4 variants of *.walls, loads.drop_height_mm" in result.output
    assert "sensitivity" in result.output
    assert (tmp_path / "sweep.csv").read_text(encoding="utf-8").count("\n") == 5
    html = (tmp_path / "report.html").read_text(encoding="utf-8")
    md = (tmp_path / "report.md").read_text(encoding="utf-8")
    for text in (html, md):
        assert "Design sweep" in text and "which variable matters most" in text
        assert "sweep.csv" in text
    assert "href='sweep.csv'" in html
    assert (tmp_path / "figures" / "sweep_pareto.png").stat().st_size > 0


def test_check_sweep_with_a_bad_spec_is_exit_2_before_solving(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["check", str(ARM), "--sweep", "nope.walls=2",
                                      "--out", str(tmp_path)])
    assert result.exit_code == 2, result.output
    assert "unknown part 'nope'" in result.output
    assert len(result.output.strip().splitlines()) == 1
    assert not (tmp_path / "report.html").exists()


@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_map_on_every_demo_case_writes_its_maps(tmp_path: Path, path: Path) -> None:
    case = load_case(path)
    result = CliRunner().invoke(cli, ["map", str(path), "--out", str(tmp_path), "--steps", "2"])
    assert result.exit_code == 0, result.output
    lines = (tmp_path / "map.csv").read_text(encoding="utf-8").splitlines()
    assert len(lines) == 1 + 2 ** min(len(case.actuators), 2)
    for metric in ("vertical", "lateral", "min_factor", "singularity", "angles"):
        assert (tmp_path / f"map_{metric}.png").stat().st_size > 0


def test_map_over_foot_targets_writes_targets_and_reasons(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["map", str(LEG), "--out", str(tmp_path), "--steps", "3",
                                      "--grid", "foot"])
    assert result.exit_code == 0, result.output
    assert "3 x 3 foot targets over x" in result.output
    lines = (tmp_path / "map.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("pose,target_x_mm,target_y_mm,servo_a_deg,servo_b_deg,reachable")
    rows = [line.split(",") for line in lines[1:]]
    assert len(rows) == 9
    reached = [r for r in rows if r[5] == "True"]
    assert reached and len(reached) < 9
    for r in reached:  # the foot is where it was aimed
        assert float(r[6]) == pytest.approx(float(r[1]), abs=1e-3)
        assert float(r[7]) == pytest.approx(float(r[2]), abs=1e-3)
    assert all(r[-1] for r in rows if r[5] == "False")  # every unreachable target says why
    assert (tmp_path / "map_min_factor.png").stat().st_size > 0


def test_a_foot_target_grid_needs_two_actuators(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["map", str(ARM), "--out", str(tmp_path), "--grid", "foot"])
    assert result.exit_code == 2, result.output
    assert "needs two actuators" in result.output
    assert len(result.output.strip().splitlines()) == 1


def test_a_foot_target_at_a_singular_pose_is_flagged() -> None:
    """The five-bar with both cranks at ±170° folds nearly straight (measure ~1e-3): aimed at
    that foot position, the target grid solves to that pose and the map flags it."""
    case = load_case(LEG)
    wide = replace(case, actuators=tuple(
        replace(a, angle_min_rad=math.radians(-170.0), angle_max_rad=math.radians(170.0))
        for a in case.actuators))
    link = linkage(case)
    x, y = solve_pose(link, (math.radians(170.0), math.radians(-170.0))).node_xy_mm[
        link.node_names.index(case.foot)]
    grid = grid_targets(wide, steps=2, x_mm=(x, x + 1.0), y_mm=(y, y + 1.0), workers=1)
    assert grid.targets_mm[0] == (x, y)
    angles = grid.angles_rad[0]
    assert angles == pytest.approx((math.radians(170.0), math.radians(-170.0)), abs=1e-6)
    row = evaluate_pose(wide, 0, angles)
    assert row.reachable and row.near_singular

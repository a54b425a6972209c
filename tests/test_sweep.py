"""Design sweeps and workspace maps: a sweep reproduces `stiff check`, monotone trends in walls,
infill and tube size, the recommendation, unreachable poses, and bad --vary specifications."""

from __future__ import annotations

import itertools
import math
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt
import pytest
from click.testing import CliRunner

import stiff.pool
from stiff import CASES_DIR
from stiff.case import load_case
from stiff.check import run_check
from stiff.cli import cli
from stiff.report.sweep_plots import angle_plot, map_plot, pareto_plot
from stiff.sweep import amounts, pareto_front, recommend, run_sweep, sensitivity
from stiff.sweep_spec import MAX_VARIANTS, SweepSpecError, apply_values, parse_specs
from stiff.workspace import evaluate_pose, workspace_map

ARM = CASES_DIR / "camera_arm.toml"  # printed parts only; ~0.25 s a check
HOP = CASES_DIR / "hopping_leg.toml"  # tubes; misses a check as shipped
LEG = CASES_DIR / "five_bar_leg.toml"
ARM_LOWER = ('section = { material = "PETG", width_mm = 12.0, depth_mm = 16.0, walls = 4, '
             'skins = 4, infill_percent = 35, pattern = "gyroid", build = "flat" }')


def test_one_variable_sweep_reproduces_stiff_check_of_the_edited_file(tmp_path: Path) -> None:
    """Each variant's numbers equal `stiff check` on the case file edited to that value."""
    case = load_case(ARM)
    variables = parse_specs(case, ["lower_arm.walls=2,3"])
    rows = run_sweep(case, variables)
    text = ARM.read_text(encoding="utf-8")
    assert text.count(ARM_LOWER) == 1
    for row, walls in zip(rows, (2, 3), strict=True):
        edited = tmp_path / f"arm_{walls}.toml"
        edited.write_text(text.replace(ARM_LOWER, ARM_LOWER.replace("walls = 4",
                                                                    f"walls = {walls}")),
                          encoding="utf-8")
        single = run_check(load_case(edited))
        C = single.stiffness.compliance_mm_per_N
        assert row.values == (walls,)
        assert row.vertical_mm_per_N == float(C[1, 1])  # exactly: the same computation
        assert row.lateral_mm_per_N == single.stiffness.lateral_mm_per_N
        assert row.principal_mm_per_N == float(single.stiffness.principal_mm_per_N[0])
        assert row.min_factor == min(r.safety_factor for r in single.checks)
        assert row.all_met == single.all_met
        assert row.mass_g == amounts(single.case, single.built).mass_g


@pytest.mark.parametrize("spec", ["*.walls=2,3,4", "*.infill=15,35,70"])
def test_more_walls_or_infill_never_increases_compliance(spec: str) -> None:
    case = load_case(ARM)
    rows = run_sweep(case, parse_specs(case, [spec]))
    assert not any(r.error for r in rows)
    for a, b in itertools.pairwise(rows):
        assert b.vertical_mm_per_N <= a.vertical_mm_per_N
        assert b.lateral_mm_per_N <= a.lateral_mm_per_N
        assert b.principal_mm_per_N <= a.principal_mm_per_N
        assert b.mass_g > a.mass_g and b.print_time_min > a.print_time_min


def test_a_larger_tube_never_increases_compliance() -> None:
    case = load_case(HOP)
    rows = [r for r in run_sweep(case, parse_specs(case, ["push_rod.size=4x2,5x3,6x4"]))
            if not r.error]
    assert len(rows) >= 2
    for a, b in itertools.pairwise(rows):
        assert b.vertical_mm_per_N <= a.vertical_mm_per_N
        assert b.lateral_mm_per_N <= a.lateral_mm_per_N


def test_pool_gives_the_serial_rows(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(stiff.pool, "POOL_ABOVE", 1)  # two variants through the pool
    case = load_case(ARM)
    variables = parse_specs(case, ["*.infill=20,60"])
    done: list[int] = []
    pooled = run_sweep(case, variables, progress=done.append)
    assert pooled == run_sweep(case, variables, workers=1)
    assert sum(done) == 2


def test_recommendation_meets_every_check_and_target(tmp_path: Path) -> None:
    case = load_case(ARM)
    variables = parse_specs(case, ["*.walls=2,3", "head.infill=20,60"])
    rows = run_sweep(case, variables, workers=1)
    best, meets = recommend(rows)
    assert best is not None and meets
    assert best.mass_g == min(r.mass_g for r in rows if r.all_met)
    assert run_check(apply_values(case, variables, best.values)).all_met
    assert best.index in pareto_front(rows) or not all(r.all_met for r in rows)
    fastest, _ = recommend(rows, "time")
    assert fastest is not None
    assert fastest.print_time_min == min(r.print_time_min for r in rows if r.all_met)
    assert {s.variable for s in sensitivity(variables, rows)} == {"*.walls", "head.infill"}
    assert pareto_plot(rows, recommended=best.index) is not None
    plt.close("all")


def test_when_no_variant_meets_everything_the_output_says_so(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["sweep", str(HOP), "--vary", "push_rod.size=5x3,6x4",
                                      "--out", str(tmp_path)])
    assert result.exit_code == 1, result.output
    assert "NO variant meets every check and target" in result.output
    assert "misses " in result.output
    assert (tmp_path / "sweep.csv").read_text(encoding="utf-8").count("\n") == 3
    assert (tmp_path / "sweep.png").stat().st_size > 0


def test_sweep_command_recommends_and_writes(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["sweep", str(ARM), "--vary", "*.walls=2,3", "--out",
                                      str(tmp_path), "--prefer", "time"])
    assert result.exit_code == 0, result.output
    assert "recommended (fastest to print meeting everything)" in result.output
    assert "governing check of every item" in result.output
    header = (tmp_path / "sweep.csv").read_text(encoding="utf-8").splitlines()[0]
    assert header.startswith("variant,*.walls,mass_g,printed_volume_cm3")


@pytest.mark.parametrize(("spec", "why"), [
    ("nope.walls=2,3", "unknown part 'nope'"),
    ("crank_a.walls=5:2:1", "has no values"),
    ("crank_a.walls=", "no values given"),
    ("crank_a.pattern=zigzag", "unknown pattern 'zigzag'"),
    ("crank_a.size=6x4", "crank_a is a printed part"),
    ("link_a.size=7x5", "unknown size '7x5'"),
    ("crank_a.infill=0,20", "infill is a percentage"),
    ("crank_a.walls=2.5", "not a whole number"),
    ("crank_a.colour=red", "unknown setting 'colour'"),
    ("crank_a", "expected PART.SETTING=VALUES"),
    ("crank_a.walls=1:2001:1", "more than 2000"),
])
def test_bad_vary_specs_are_exit_2_in_one_line(tmp_path: Path, spec: str, why: str) -> None:
    result = CliRunner().invoke(cli, ["sweep", str(LEG), "--vary", spec, "--out",
                                      str(tmp_path)])
    assert result.exit_code == 2, result.output
    assert why in result.output
    assert len(result.output.strip().splitlines()) == 1


def test_too_many_variants_and_a_setting_twice_are_refused() -> None:
    case = load_case(LEG)
    with pytest.raises(SweepSpecError, match=f"more than the maximum {MAX_VARIANTS}"):
        parse_specs(case, ["*.walls=1:50:1", "*.infill=1:50:1"])
    with pytest.raises(SweepSpecError, match="already varied"):
        parse_specs(case, ["*.walls=2,3", "crank_a.walls=4,5"])


def test_a_map_records_unreachable_poses_without_crashing(tmp_path: Path) -> None:
    """The 2 x 2 corners of the hopping leg's actuator ranges: it cannot reach some of them."""
    result = CliRunner().invoke(cli, ["map", str(HOP), "--out", str(tmp_path), "--steps", "2"])
    assert result.exit_code == 0, result.output
    assert "unreachable pose" in result.output
    lines = (tmp_path / "map.csv").read_text(encoding="utf-8").splitlines()
    assert len(lines) == 5
    lost = [line.split(",") for line in lines[1:] if line.split(",")[3] == "False"]
    assert 0 < len(lost) < 4
    assert all(row[-1] and row[6] == "nan" for row in lost)  # why given, no compliance
    assert (tmp_path / "map_angles.png").stat().st_size > 0


def test_map_plots_draw_on_a_given_axes() -> None:
    case = load_case(ARM)
    result = workspace_map(case, steps=2, workers=1)
    _, ax = plt.subplots()
    assert map_plot(result, "min_factor", ax=ax) is ax
    _, ax = plt.subplots()
    assert angle_plot(result, [a.name for a in case.actuators], ax=ax) is ax
    plt.close("all")


def test_a_pose_near_a_singularity_is_flagged() -> None:
    """The five-bar with both cranks near 170° folds nearly straight (measure ~1e-3)."""
    case = load_case(LEG)
    row = evaluate_pose(case, 0, (math.radians(170.0), math.radians(-170.0)))
    assert row.reachable and row.near_singular


def test_map_command_on_the_camera_arm(tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["map", str(ARM), "--out", str(tmp_path), "--steps", "3"])
    assert result.exit_code == 0, result.output
    assert "3 poses over lift; 3 reachable" in result.output
    lines = (tmp_path / "map.csv").read_text(encoding="utf-8").splitlines()
    assert len(lines) == 4 and lines[0].startswith("pose,lift_deg,reachable,foot_x_mm")
    for metric in ("vertical", "lateral", "min_factor", "singularity", "angles"):
        assert (tmp_path / f"map_{metric}.png").stat().st_size > 0


def test_an_out_folder_that_is_a_file_is_exit_2_in_one_line(tmp_path: Path) -> None:
    taken = tmp_path / "taken"
    taken.write_text("", encoding="utf-8")
    result = CliRunner().invoke(cli, ["map", str(ARM), "--out", str(taken), "--steps", "2"])
    assert result.exit_code == 2, result.output
    assert "cannot write into" in result.output
    assert len(result.output.strip().splitlines()) == 1

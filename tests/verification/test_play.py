"""Joint play at the foot against the clearance geometry worked by hand.

Sources:
- A pin of diameter d in a bore d + 2c over a bearing length L tilts by θ = 2c/L and shifts
  radially by c (REFERENCES.md §4; common practice, derived).
- Clearance as a short free link at each pin (Ting, Zhu & Watkins, Mech. Mach. Theory
  35(3):391–401, 2000): in an open chain held by its actuators a gap δ at a pin translates
  everything beyond it by δ, so the foot moves by δ (statics and geometry by hand).
- A tilt θ about an in-plane axis through a pin moves a point at in-plane distance r from it
  out of the plane by at most θ r (small rotations, by hand).
- For a closed linkage, the frame model's foot motion per unit gap must equal the loop-closure
  kinematics with that pin split: dz = Φ_z⁻¹ E δ (implicit differentiation of the
  constraints; ``stiff.kinematics``).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.build import build
from stiff.case import load_case, parse_case
from stiff.case_model import Case
from stiff.kinematics import _jacobians
from stiff.linkage import case_pose, linkage
from stiff.materials import load_library
from stiff.play import FootPlay, foot_play, gap_gains

LIB = load_library()
CASES = Path(__file__).resolve().parents[2] / "cases"


def servo_arm(clearance: float, length: float = 150.0, lug: str = "",
              bearing: str = "bearing_length_mm = 10.0") -> str:
    """A printed arm on a body servo, the foot at its tip."""
    return f"""
title = "servo arm"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
tip = {{ x_mm = {length * math.cos(0.3)!r}, y_mm = {-length * math.sin(0.3)!r} }}
[parts.arm]
kind = "printed"
nodes = ["root", "tip"]
z_mm = 5.0
section = {{ material = "PETG", width_mm = 8.0, depth_mm = 12.0 }}
[joints.root]
kind = "driven"
node = "root"
parts = ["body", "arm"]
actuator = "servo"
pin_diameter_mm = 4.0
clearance_mm = {clearance!r}
{bearing}
{lug}
[actuators.servo]
stall_torque_Nm = 2.0
proportional_band_deg = 3.0
angle_deg = 0.0
"""


def play_of(text: str) -> tuple[Case, FootPlay]:
    case = parse_case(text, Path("play.toml"), LIB)
    return case, foot_play(case, build(case, case_pose(case)))


def test_single_pinned_bar_by_hand() -> None:
    c, R = 0.05, 150.0
    _, play = play_of(servo_arm(c, R))
    (j,) = play.joints
    # the servo holds the arm's rotation: the gap translates the arm, gain 1 in any direction
    assert j.gain == pytest.approx(1.0, rel=1e-9)
    assert play.in_plane_worst_mm == pytest.approx(c, rel=1e-9)
    assert play.in_plane_rss_mm == pytest.approx(c, rel=1e-9)
    # tilt 2c/L over the 10 mm bearing, times the 150 mm arm
    assert j.tilt_play_rad == pytest.approx(2 * c / 10.0, rel=1e-12)
    assert j.lever_arm_mm == pytest.approx(R, rel=1e-12)
    assert play.out_of_plane_worst_mm == pytest.approx(
        2 * c / 10.0 * R, rel=1e-12)
    assert j.share_in_plane == 1.0 and j.share_out_of_plane == 1.0


def test_lug_thickness_is_the_bearing_length() -> None:
    c, R = 0.1, 120.0
    lug = 'lugs.arm = { hole_mm = 4.2, thickness_mm = 6.0, width_mm = 12.0, edge_mm = 6.0 }'
    _, play = play_of(servo_arm(c, R, lug=lug, bearing=""))
    (j,) = play.joints
    # the body gives no bearing length, so the arm's 6 mm lug sets the tilt
    assert j.bearing_length_mm == 6.0
    assert play.out_of_plane_worst_mm == pytest.approx(
        2 * c / 6.0 * R, rel=1e-12)


def test_section_width_is_the_bearing_length_without_lug_or_key() -> None:
    _, play = play_of(servo_arm(0.05, 100.0, bearing=""))
    assert play.joints[0].bearing_length_mm == 8.0


def two_link_leg(c_hip: float, c_knee: float) -> str:
    return f"""
title = "two links"
foot = "foot"
[body]
nodes = ["hip"]
[nodes]
hip = {{ x_mm = 0.0, y_mm = 0.0 }}
knee = {{ x_mm = 30.0, y_mm = -100.0 }}
foot = {{ x_mm = -10.0, y_mm = -190.0 }}
[parts.thigh]
kind = "tube"
nodes = ["hip", "knee"]
z_mm = 6.0
material = "CF-pultruded"
size = "8x6"
[parts.shin]
kind = "tube"
nodes = ["knee", "foot"]
z_mm = 14.0
material = "CF-pultruded"
size = "6x4"
[joints.hip]
kind = "driven"
node = "hip"
parts = ["body", "thigh"]
actuator = "hip_servo"
pin_diameter_mm = 4.0
clearance_mm = {c_hip!r}
bearing_length_mm = 12.0
[joints.knee]
kind = "driven"
node = "knee"
parts = ["thigh", "shin"]
actuator = "knee_servo"
pin_diameter_mm = 3.0
clearance_mm = {c_knee!r}
bearing_length_mm = 8.0
[actuators.hip_servo]
stall_torque_Nm = 3.0
proportional_band_deg = 2.0
angle_deg = 0.0
[actuators.knee_servo]
stall_torque_Nm = 3.0
proportional_band_deg = 2.0
angle_deg = 0.0
mass_kg = 0.06
"""


def test_open_chain_sums_and_rss_by_hand() -> None:
    c1, c2 = 0.04, 0.07
    _, p = play_of(two_link_leg(c1, c2))
    # each gap translates the chain beyond it: the foot moves c1 and c2
    assert p.in_plane_worst_mm == pytest.approx(c1 + c2, rel=1e-9)
    assert p.in_plane_rss_mm == pytest.approx(math.hypot(c1, c2), rel=1e-9)
    r_hip = math.hypot(-10.0, -190.0)
    r_knee = math.hypot(-40.0, -90.0)
    t_hip, t_knee = 2 * c1 / 12.0, 2 * c2 / 8.0
    assert p.out_of_plane_worst_mm == pytest.approx(
        t_hip * r_hip + t_knee * r_knee, rel=1e-12)
    assert p.out_of_plane_rss_mm == pytest.approx(
        math.hypot(t_hip * r_hip, t_knee * r_knee), rel=1e-12)
    assert p.chain == ("hip", "knee")
    # ranked by contribution: the knee's looser, shorter bearing comes first
    assert [j.name for j in p.joints] == ["knee", "hip"]


def test_five_bar_gains_equal_split_pin_kinematics() -> None:
    case = load_case(CASES / "five_bar_leg.toml", LIB)
    link = linkage(case)
    pose = case_pose(case, link)
    built = build(case, pose)
    moving = np.array(link.moving)
    z = np.column_stack([pose.rotation_rad[moving], pose.shift_mm[moving]]).reshape(-1)
    Jz, _ = _jacobians(link, z, pose.angles_rad)
    rows = np.cumsum([0] + [2 + (j.kind != "pin") for j in link.joints])
    foot = link.node_names.index(case.foot)
    part = link.node_part[foot]
    q = np.asarray(link.node_xy_mm[foot])
    phi = pose.rotation_rad[part]
    # d(foot)/dz: the carrying part's rotation (dR/dφ q) and shift (identity)
    Fz = np.zeros((2, z.size))
    k = list(moving).index(part)
    Fz[:, 3 * k] = np.array([[-math.sin(phi), -math.cos(phi)],
                             [math.cos(phi), -math.sin(phi)]]) @ q
    Fz[:, 3 * k + 1: 3 * k + 3] = np.eye(2)
    gains = gap_gains(built)
    checked = 0
    for i, j in enumerate(link.joints):
        if j.kind == "fixed":
            continue
        E = np.zeros((Jz.shape[0], 2))
        E[rows[i], 0] = E[rows[i] + 1, 1] = 1.0
        expected = Fz @ np.linalg.solve(Jz, E)
        # the five-bar with its servos held is determinate, so the imposed gap strains
        # nothing and the frame gives the kinematics to rounding; the constraint Jacobian is
        # by central differences, good to ~1e-9
        np.testing.assert_allclose(gains[i], expected, rtol=1e-6, atol=1e-8)
        checked += 1
    assert checked == 5


def test_five_bar_out_of_plane_takes_the_lighter_side() -> None:
    case = load_case(CASES / "five_bar_leg.toml", LIB)
    built = build(case, case_pose(case))
    play = foot_play(case, built)
    by = {j.name: j for j in play.joints}
    side_a = by["hip_a"].lever_play_mm + by["elbow_a"].lever_play_mm
    side_b = by["hip_b"].lever_play_mm + by["elbow_b"].lever_play_mm
    # both chains bound the same motion; the foot pin itself has no lever arm
    assert by["foot"].lever_play_mm == pytest.approx(0.0, abs=1e-9)
    assert play.out_of_plane_worst_mm == pytest.approx(min(side_a, side_b), rel=1e-12)
    # hip_a has a 6 mm bearing, hip_b its 9 mm crank: side b is the tighter chain
    assert side_b < side_a and "hip_b" in play.chain
    theta = 2 * 0.05 / 9.0
    xy = built.model.xyz
    r = float(np.linalg.norm(xy[built.foot, :2] - xy[built.node_of[("crank_b", "hip_b")], :2]))
    assert by["hip_b"].lever_play_mm == pytest.approx(theta * r, rel=1e-12)


@settings(max_examples=15, deadline=None)
@given(c=st.floats(min_value=1e-3, max_value=0.3), k=st.floats(min_value=0.1, max_value=10.0))
def test_play_scales_linearly_with_clearance(c: float, k: float) -> None:
    _, base = play_of(two_link_leg(c, 0.5 * c))
    _, scaled = play_of(two_link_leg(k * c, 0.5 * k * c))
    for name in ("in_plane_worst_mm", "in_plane_rss_mm", "out_of_plane_worst_mm",
                 "out_of_plane_rss_mm"):
        # linear in the clearance: rounding only
        assert getattr(scaled, name) == pytest.approx(k * getattr(base, name), rel=1e-9)

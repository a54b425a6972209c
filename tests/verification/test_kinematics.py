"""Pose solving against published linkage relations.

Sources:
- Freudenstein, "Approximate synthesis of four-bar linkages", Trans. ASME 77 (1955) 853–861:
  K1 cos θ4 − K2 cos θ2 + K3 = cos(θ2 − θ4), K1 = d/a, K2 = d/c,
  K3 = (a² − b² + c² + d²)/(2ac) for crank a, coupler b, rocker c, ground d (confirmed).
- Transmission angle of a four-bar: cos μ = (b² + c² − a² − d² + 2ad cos θ2)/(2bc)
  (law of cosines; Norton, Design of Machinery, 5th ed. §4.10, from memory).
- A parallelogram linkage copies the driving link's rotation to the opposite link (common
  practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.errors import PoseError
from stiff.kinematics import (
    KinJoint,
    Linkage,
    foot_jacobian,
    solve_foot_target,
    solve_pose,
)

A, B, C, D = 40.0, 100.0, 80.0, 90.0  # crank, coupler, rocker, ground [mm]; Grashof crank-rocker


def four_bar(theta2_ref: float = math.radians(60.0), a: float = A, b: float = B,
             c: float = C, d: float = D) -> Linkage:
    """Crank AB driven at A, coupler BC, rocker CD, ground A–D, open (upper) assembly."""
    pb = np.array([a * math.cos(theta2_ref), a * math.sin(theta2_ref)])
    pd = np.array([d, 0.0])
    dist = float(np.linalg.norm(pd - pb))
    x = (b * b - c * c + dist * dist) / (2 * dist)
    u = (pd - pb) / dist
    pc = pb + x * u + math.sqrt(b * b - x * x) * np.array([-u[1], u[0]])
    joints = (
        KinJoint("A", "driven", 0, 1, (0.0, 0.0), 0),
        KinJoint("B", "pin", 1, 2, (float(pb[0]), float(pb[1]))),
        KinJoint("C", "pin", 2, 3, (float(pc[0]), float(pc[1]))),
        KinJoint("D", "pin", 0, 3, (d, 0.0)),
    )
    return Linkage(
        part_names=("body", "crank", "coupler", "rocker"), body=0, joints=joints,
        actuator_names=("motor",), reference_angles_rad=(theta2_ref,),
        node_names=("A", "B", "C", "D"),
        node_xy_mm=((0.0, 0.0), (float(pb[0]), float(pb[1])), (float(pc[0]), float(pc[1])),
                    (d, 0.0)),
        node_part=(0, 1, 2, 3))


@pytest.mark.parametrize("deg", [0.0, 45.0, 90.0, 135.0, 180.0, 225.0, 300.0, 359.0])
def test_four_bar_output_angle_satisfies_freudenstein(deg: float) -> None:
    link = four_bar()
    pose = solve_pose(link, [math.radians(deg)])
    pc = pose.node_xy_mm[2]
    theta2 = math.radians(deg)
    theta4 = math.atan2(pc[1], pc[0] - D)
    k1, k2, k3 = D / A, D / C, (A * A - B * B + C * C + D * D) / (2 * A * C)
    # loop closure is solved to 1e-9 mm on ~100 mm links: the identity holds to ~1e-10
    assert k1 * math.cos(theta4) - k2 * math.cos(theta2) + k3 == pytest.approx(
        math.cos(theta2 - theta4), abs=1e-9)
    # same assembly branch as drawn: C stays above the line B–D
    pb = pose.node_xy_mm[1]
    cross = (D - pb[0]) * (pc[1] - pb[1]) - (0.0 - pb[1]) * (pc[0] - pb[0])
    assert cross > 0
    cos_mu = (B * B + C * C - A * A - D * D + 2 * A * D * math.cos(theta2)) / (2 * B * C)
    mu = math.degrees(math.acos(cos_mu))
    assert pose.transmission_deg[0][1] == pytest.approx(min(mu, 180 - mu), abs=1e-6)


def test_four_bar_that_cannot_close_names_its_loop() -> None:
    """A non-Grashof four-bar (crank longer than the rest allow) cannot reach every angle."""
    link = four_bar(math.radians(30.0), a=60.0, b=50.0, c=70.0, d=90.0)
    with pytest.raises(PoseError) as err:
        solve_pose(link, [math.radians(180.0)])
    assert "loop through A, B, C, D" in str(err.value)


def parallelogram(side: float = 120.0, height: float = 50.0) -> Linkage:
    """Driven link at A (body), coupler parallel to the ground, follower at D."""
    joints = (
        KinJoint("A", "driven", 0, 1, (0.0, 0.0), 0),
        KinJoint("B", "pin", 1, 2, (0.0, height)),
        KinJoint("C", "pin", 2, 3, (side, height)),
        KinJoint("D", "pin", 0, 3, (side, 0.0)),
    )
    return Linkage(part_names=("body", "driver", "coupler", "follower"), body=0, joints=joints,
                   actuator_names=("motor",), reference_angles_rad=(math.pi / 2,),
                   node_names=("A", "B", "C", "D", "tip"),
                   node_xy_mm=((0, 0), (0, height), (side, height), (side, 0),
                               (side, height + 30.0)),
                   node_part=(0, 1, 2, 3, 3))


@settings(max_examples=30, deadline=None)
@given(st.floats(min_value=10.0, max_value=170.0))
def test_parallelogram_copies_the_driving_angle(deg: float) -> None:
    pose = solve_pose(parallelogram(), [math.radians(deg)])
    change = math.radians(deg) - math.pi / 2
    assert pose.rotation_rad[3] == pytest.approx(change, abs=1e-9)
    assert pose.rotation_rad[2] == pytest.approx(0.0, abs=1e-9)  # coupler stays level


def test_inverse_kinematics_round_trip() -> None:
    link = four_bar()
    there = solve_pose(link, [math.radians(110.0)])
    back = solve_foot_target(link, 2, [there.node_xy_mm[2][0], there.node_xy_mm[2][1] + 0.0],
                             start_rad=[math.radians(80.0)])
    # one actuator cannot place a point in x and y at will, but a point on its path it can
    assert back.angles_rad[0] == pytest.approx(math.radians(110.0), abs=1e-7)


def test_foot_jacobian_matches_finite_difference_of_poses() -> None:
    link = four_bar()
    th = math.radians(75.0)
    J = foot_jacobian(link, solve_pose(link, [th]), 2)
    h = 1e-5
    numeric = (solve_pose(link, [th + h]).node_xy_mm[2] - solve_pose(link, [th - h]).node_xy_mm[2]
               ) / (2 * h)
    assert J[:, 0] == pytest.approx(numeric, rel=1e-6, abs=1e-8)


def test_underactuated_linkage_is_refused() -> None:
    base = four_bar()
    loose = Linkage(**{**base.__dict__, "joints": (
        KinJoint("A", "pin", 0, 1, (0.0, 0.0)), *base.joints[1:])})
    with pytest.raises(PoseError, match="degree"):
        solve_pose(loose, [math.radians(60.0)])

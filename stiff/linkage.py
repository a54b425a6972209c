"""A case's linkage for the kinematics, and the case's pose.

The body is part 0 of the linkage; the case's parts follow in their order. A pin or fixed
joint among several parts ties each to the next in the order given; a driven joint ties its
housing side (first part) to its output (second).
"""

from __future__ import annotations

import numpy as np

from stiff.case_model import BODY, Case
from stiff.kinematics import (
    KinJoint,
    Linkage,
    Pose,
    reference_pose,
    solve_foot_target,
    solve_pose,
)


def part_index(case: Case) -> dict[str, int]:
    """Linkage part index of every part name, the body first."""
    return {BODY: 0, **{p.name: i + 1 for i, p in enumerate(case.parts)}}


def linkage(case: Case) -> Linkage:
    """The case as a planar linkage of rigid parts."""
    index = part_index(case)
    actuators = {a.name: i for i, a in enumerate(case.actuators)}
    joints = []
    for j in case.joints:
        at = case.nodes[j.node]
        pairs = list(zip(j.parts[:-1], j.parts[1:], strict=True))
        for a, b in pairs:
            name = j.name if len(pairs) == 1 else f"{j.name} ({a}-{b})"
            joints.append(KinJoint(name=name, kind=j.kind, parent=index[a], child=index[b],
                                   at_mm=at, actuator=actuators[j.actuator]
                                   if j.kind == "driven" and j.actuator else None))
    names = tuple(case.nodes)
    carrier = []
    for n in names:
        owner = next((p.name for p in case.parts if n in p.nodes), BODY)
        carrier.append(index[owner])
    return Linkage(
        part_names=tuple(index), body=0, joints=tuple(joints),
        actuator_names=tuple(a.name for a in case.actuators),
        reference_angles_rad=tuple(a.angle_rad for a in case.actuators),
        node_names=names, node_xy_mm=tuple(case.nodes[n] for n in names),
        node_part=tuple(carrier))


def case_pose(case: Case, link: Linkage | None = None) -> Pose:
    """The pose the case asks for: its actuator angles, its foot target, or as drawn."""
    link = link or linkage(case)
    if case.pose_foot_mm is not None:
        foot = link.node_names.index(case.foot)
        return solve_foot_target(link, foot, case.pose_foot_mm)
    angles = np.array([(case.pose_angles_rad or {}).get(a.name, a.angle_rad)
                       for a in case.actuators])
    if np.array_equal(angles, np.asarray(link.reference_angles_rad, dtype=float)):
        return reference_pose(link)
    return solve_pose(link, angles)

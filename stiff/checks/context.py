"""What the checks read: the case, its model, the solved load cases, and the forces on each
part at each joint and at each member end.

Forces at a joint come from the connectors: a connector from part a's node to part b's node
carries f = k·Δ (``stiff.fe.results``), which pushes part a by +f and part b by −f. A part at a
pin joined to two neighbours (the middle of a clevis) takes the sum from both connectors.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.build import Built
from stiff.case_model import BODY, Case, Joint, Part
from stiff.checks.allowables import Duty, FailureKind, duty
from stiff.loads import LoadCaseResult

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True)
class CheckContext:
    """Everything a check module needs."""

    case: Case
    built: Built
    results: tuple[LoadCaseResult, ...]

    def duty(self, load_case: str) -> Duty:
        """Temperature, sustained and repeated loading of a load case."""
        return duty(load_case, self.case.loads.service_temperature_C, self.case.loads.cycles)

    def required(self, kind: FailureKind) -> float:
        """Required safety factor of a kind of failure."""
        return self.case.factors.of(kind)

    @property
    def samples(self) -> int | None:
        """Tests behind the table's means (None: a known population)."""
        return self.case.factors.samples


@dataclass(frozen=True)
class JointForce:
    """The force and moment the pin puts on one part at a joint, global axes.

    ``force_N`` (x, y, z) and ``moment_Nmm`` (x, y, z); ``planes`` are the in-plane forces
    [N] across each shear plane of the pin that touches this part (one per neighbour).
    """

    joint: Joint
    part: str
    force_N: FloatArray
    moment_Nmm: FloatArray
    planes: tuple[float, ...]

    @property
    def bearing_N(self) -> float:
        """In-plane (bearing) force on the part [N]."""
        return float(math.hypot(self.force_N[0], self.force_N[1]))

    @property
    def tilt_Nmm(self) -> float:
        """Moment about the in-plane axes: the pin tilting in the part's bore [N·mm]."""
        return float(math.hypot(self.moment_Nmm[0], self.moment_Nmm[1]))


def joint_forces(ctx: CheckContext, result: LoadCaseResult, joint: Joint) -> list[JointForce]:
    """Force on every part (not the body) at a joint in one load case."""
    forces = result.solution.connector_forces[0]
    totals: dict[str, FloatArray] = {}
    planes: dict[str, list[float]] = {}
    k = 0
    for i, name in enumerate(ctx.built.connector_joint):
        if name != joint.name:
            continue
        a, b = joint.parts[k], joint.parts[k + 1]
        k += 1
        f = forces[i]
        shear = float(math.hypot(f[0], f[1]))
        for part, sign in ((a, 1.0), (b, -1.0)):
            totals[part] = totals.get(part, np.zeros(6)) + sign * f
            planes.setdefault(part, []).append(shear)
    return [JointForce(joint, p, totals[p][:3], totals[p][3:], tuple(planes[p]))
            for p in joint.parts if p != BODY]


@dataclass(frozen=True)
class MemberForces:
    """A member's internal forces at its two ends in one load case, local axes.

    axial [N] (tension +), shear_y, shear_z [N], torque [N·mm], and bending moments about
    local y (out of plane) and z (in plane) [N·mm], each (end 1, end 2).
    """

    index: int
    part: Part
    segment: tuple[str, str]
    length_mm: float
    axial_N: float
    shear_y_N: tuple[float, float]
    shear_z_N: tuple[float, float]
    torque_Nmm: float
    moment_y_Nmm: tuple[float, float]
    moment_z_Nmm: tuple[float, float]


def member_forces(ctx: CheckContext, result: LoadCaseResult) -> list[MemberForces]:
    """Internal forces of every member in one load case."""
    f = result.solution.beam_forces[0]
    xyz = ctx.built.model.xyz
    nodes = ctx.built.model.beams.nodes
    lengths = np.linalg.norm(xyz[nodes[:, 1]] - xyz[nodes[:, 0]], axis=1)
    out = []
    for i, part_name in enumerate(ctx.built.beam_part):
        e = f[i]
        out.append(MemberForces(
            index=i, part=ctx.case.part(part_name), segment=ctx.built.beam_segment[i],
            length_mm=float(lengths[i]), axial_N=float(e[6]),
            shear_y_N=(float(e[1]), float(e[7])), shear_z_N=(float(e[2]), float(e[8])),
            torque_Nmm=float(e[9]),
            moment_y_Nmm=(float(e[4]), float(e[10])), moment_z_Nmm=(float(e[5]), float(e[11]))))
    return out


def member_direction(ctx: CheckContext, part: Part, node: str) -> FloatArray | None:
    """Unit vector (x, y) along the part from ``node`` towards its next node, in the pose."""
    for a, b in part.segments:
        if node in (a, b):
            other = b if node == a else a
            p = ctx.built.model.xyz[ctx.built.node_of[(part.name, node)], :2]
            q = ctx.built.model.xyz[ctx.built.node_of[(part.name, other)], :2]
            d = q - p
            n = float(np.linalg.norm(d))
            return d / n if n > 0 else None
    return None

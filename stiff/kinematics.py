"""Poses of planar closed-chain linkages: loop closure, inverse kinematics, Jacobians.

Every part is a rigid body in the linkage plane. Its pose is a rotation φ and a shift t from
the reference pose, so a point p of the part sits at R(φ) p + t. Joints tie two parts:

* pin: the joint point is the same on both parts (2 equations);
* fixed: also the same rotation (3 equations);
* driven: a pin whose relative rotation is set by an actuator angle
  θ = θ_ref + (φ_child − φ_parent) (3 equations).

The body part does not move. With as many equations as unknowns the pose follows from the
actuator angles; it is found by Gauss–Newton from the reference pose, stepping the angles a few
degrees at a time so that the linkage stays on the assembly branch it was drawn in (a four-bar
does not flip to its crossed form). A loop that cannot close, or a pose where the constraint
Jacobian turns singular on the way, raises :class:`PoseError` naming the loop.

Jacobian of the foot: from Φ(z, θ) = 0, dz/dθ = −Φ_z⁻¹ Φ_θ and d(foot)/dθ = f_z dz/dθ
(implicit differentiation). Units: mm, rad.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from stiff.errors import PoseError

FloatArray = npt.NDArray[np.float64]
JointKind = Literal["pin", "fixed", "driven"]

#: Largest actuator-angle step of the continuation [rad] (5°).
STEP_RAD = math.radians(5.0)
#: Loop closure tolerance, relative to the linkage's size (Newton converges quadratically, so
#: this costs one more iteration than a loose tolerance and leaves angles exact to ~1e-12).
CLOSURE = 1e-12
#: Transmission angles outside 40°–140° transmit force poorly (Norton, Design of Machinery,
#: 5th ed. §3.3, from memory; common practice).
TRANSMISSION_LIMIT_DEG = 40.0
#: Below this inverse condition number of the scaled constraint Jacobian a pose is reported
#: as near a singularity (common practice: forces in the links grow as 1/measure).
SINGULAR_WARNING = 0.005


@dataclass(frozen=True)
class KinJoint:
    """A joint between two parts, as far as their motion is concerned."""

    name: str
    kind: JointKind
    parent: int  # part index
    child: int  # part index
    at_mm: tuple[float, float]  # joint point in the reference pose
    actuator: int | None = None  # index into the linkage's actuators for driven joints


@dataclass(frozen=True)
class Linkage:
    """Parts, joints and actuators of a planar linkage in its reference pose."""

    part_names: tuple[str, ...]
    body: int  # index of the part that does not move
    joints: tuple[KinJoint, ...]
    actuator_names: tuple[str, ...]
    reference_angles_rad: tuple[float, ...]  # actuator angles in the reference pose
    node_names: tuple[str, ...]
    node_xy_mm: tuple[tuple[float, float], ...]
    node_part: tuple[int, ...]  # a part that carries each node

    @property
    def moving(self) -> tuple[int, ...]:
        """Indices of the parts that move."""
        return tuple(i for i in range(len(self.part_names)) if i != self.body)

    @property
    def size_mm(self) -> float:
        """A characteristic length: the span of the nodes."""
        xy = np.asarray(self.node_xy_mm)
        return max(float(np.ptp(xy, axis=0).max()), 1.0)


@dataclass(frozen=True)
class Pose:
    """Where every part and node is for given actuator angles."""

    angles_rad: FloatArray  # (n_actuators,)
    rotation_rad: FloatArray  # (n_parts,) φ of each part
    shift_mm: FloatArray  # (n_parts, 2) t of each part
    node_xy_mm: FloatArray  # (n_nodes, 2) each node on its carrying part
    singularity: float  # inverse condition of the scaled constraint Jacobian, 0 = singular
    transmission_deg: tuple[tuple[str, float], ...]  # (loop, worst transmission angle)
    warnings: tuple[str, ...]

    def point_on(self, part: int, xy_ref: npt.ArrayLike) -> FloatArray:
        """Where a point of ``part`` given in the reference pose is now [mm]."""
        return _place(self.rotation_rad[part], self.shift_mm[part], np.asarray(xy_ref, float))


def _rot(phi: float) -> FloatArray:
    c, s = math.cos(phi), math.sin(phi)
    return np.array([[c, -s], [s, c]])


def _place(phi: float, t: FloatArray, p: FloatArray) -> FloatArray:
    return p @ _rot(phi).T + t


def _unpack(link: Linkage, z: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Part rotations (n_parts,) and shifts (n_parts, 2) from the unknowns z."""
    n = len(link.part_names)
    phi = np.zeros(n)
    t = np.zeros((n, 2))
    moving = np.array(link.moving, dtype=np.intp)
    zz = z.reshape(-1, 3)
    phi[moving] = zz[:, 0]
    t[moving] = zz[:, 1:]
    return phi, t


def _equations(link: Linkage, z: FloatArray, angles: FloatArray) -> FloatArray:
    """Constraint residuals Φ(z, θ): mm for positions, rad × size for angles."""
    phi, t = _unpack(link, z)
    size = link.size_mm
    out: list[float] = []
    for j in link.joints:
        q = np.asarray(j.at_mm)
        gap = _place(phi[j.child], t[j.child], q) - _place(phi[j.parent], t[j.parent], q)
        out.extend(gap)
        if j.kind == "fixed":
            out.append(size * (phi[j.child] - phi[j.parent]))
        elif j.kind == "driven" and j.actuator is not None:
            change = angles[j.actuator] - link.reference_angles_rad[j.actuator]
            out.append(size * (phi[j.child] - phi[j.parent] - change))
    return np.asarray(out)


def _jacobians(link: Linkage, z: FloatArray, angles: FloatArray) -> tuple[FloatArray, FloatArray]:
    """∂Φ/∂z and ∂Φ/∂θ of the residuals of :func:`_equations`, in closed form.

    A joint's gap R(φ_c) q + t_c − R(φ_p) q − t_p has ∂/∂φ = ±R'(φ) q and ∂/∂t = ±I; an angle
    row size·(φ_c − φ_p − Δθ) has ±size on the rotations and −size on its actuator's angle.
    """
    phi, _ = _unpack(link, z)
    column = {part: 3 * k for k, part in enumerate(link.moving)}
    size = link.size_mm
    rows = sum(2 + (j.kind == "fixed" or (j.kind == "driven" and j.actuator is not None))
               for j in link.joints)
    Jz = np.zeros((rows, z.size))
    Ja = np.zeros((rows, angles.size))
    r = 0
    for j in link.joints:
        q = np.asarray(j.at_mm, dtype=float)
        for part, sign in ((j.child, 1.0), (j.parent, -1.0)):
            if part not in column:
                continue
            c, s_ = math.cos(phi[part]), math.sin(phi[part])
            col = column[part]
            Jz[r:r + 2, col] = sign * np.array([-s_ * q[0] - c * q[1], c * q[0] - s_ * q[1]])
            Jz[r, col + 1] = Jz[r + 1, col + 2] = sign
        r += 2
        if j.kind == "fixed" or (j.kind == "driven" and j.actuator is not None):
            for part, sign in ((j.child, 1.0), (j.parent, -1.0)):
                if part in column:
                    Jz[r, column[part]] = sign * size
            if j.kind == "driven" and j.actuator is not None:
                Ja[r, j.actuator] = -size
            r += 1
    return Jz, Ja


def _scaled(link: Linkage, Jz: FloatArray) -> FloatArray:
    """Constraint Jacobian with rotation unknowns scaled by the linkage size (mm per mm)."""
    scale = np.tile([1.0 / link.size_mm, 1.0, 1.0], Jz.shape[1] // 3)
    out: FloatArray = Jz * scale
    return out


def singularity_measure(link: Linkage, Jz: FloatArray) -> float:
    """Inverse condition number of the scaled constraint Jacobian (1 good, 0 singular)."""
    if Jz.size == 0:
        return 1.0
    s = np.linalg.svd(_scaled(link, Jz), compute_uv=False)
    return float(s[-1] / s[0]) if s[0] > 0 else 0.0


def loops(link: Linkage) -> tuple[tuple[int, ...], ...]:
    """Independent loops of the linkage as tuples of joint indices (a cycle basis)."""
    n = len(link.part_names)
    parent = list(range(n))

    def root(a: int) -> int:
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    tree: list[int] = []
    chords: list[int] = []
    for k, j in enumerate(link.joints):
        a, b = root(j.parent), root(j.child)
        if a == b:
            chords.append(k)
        else:
            parent[a] = b
            tree.append(k)
    out = []
    for c in chords:
        path = _tree_path(link, tree, link.joints[c].parent, link.joints[c].child)
        out.append(tuple([*path, c]))
    return tuple(out)


def _tree_path(link: Linkage, tree: list[int], start: int, goal: int) -> list[int]:
    """Joint indices on the spanning-tree path between two parts."""
    adj: dict[int, list[tuple[int, int]]] = {}
    for k in tree:
        j = link.joints[k]
        adj.setdefault(j.parent, []).append((j.child, k))
        adj.setdefault(j.child, []).append((j.parent, k))
    seen = {start: -1}
    via: dict[int, tuple[int, int]] = {}
    stack = [start]
    while stack:
        p = stack.pop()
        for q, k in adj.get(p, []):
            if q not in seen:
                seen[q] = k
                via[q] = (p, k)
                stack.append(q)
    path: list[int] = []
    node = goal
    while node != start and node in via:
        node, k = via[node]
        path.append(k)
    return path[::-1]


def loop_name(link: Linkage, loop: tuple[int, ...]) -> str:
    """'loop through hip, knee, ankle' from its joints."""
    return "loop through " + ", ".join(link.joints[k].name for k in loop)


def transmission_angles(link: Linkage, pose_phi: FloatArray, pose_t: FloatArray) -> tuple[
        tuple[str, float], ...]:
    """Worst transmission angle of each loop [deg], 90° best, 0° or 180° locked.

    At a pin between two passive parts (neither the body nor a part an actuator turns) the two
    parts point towards their next joints in the loop; the angle μ between those directions is
    the transmission angle (for a four-bar driven at its crank, the coupler–rocker angle), and
    the loop's figure is the pin with the smallest min(μ, 180° − μ).
    """
    driving = {link.body} | {j.child for j in link.joints if j.kind == "driven"}
    out = []
    for lp in loops(link):
        joints = [link.joints[k] for k in lp]
        worst = 90.0
        for idx, j in enumerate(joints):
            if j.kind != "pin" or j.parent in driving or j.child in driving:
                continue
            here = _place(pose_phi[j.parent], pose_t[j.parent], np.asarray(j.at_mm))
            dirs = []
            for part in (j.parent, j.child):
                other = next((o for o in joints[idx + 1:] + joints[:idx]
                              if part in (o.parent, o.child)), None)
                if other is None:
                    break
                there = _place(pose_phi[part], pose_t[part], np.asarray(other.at_mm))
                dirs.append(there - here)
            if len(dirs) != 2 or min(np.linalg.norm(d) for d in dirs) == 0.0:
                continue
            cos = float(np.dot(dirs[0], dirs[1]) / (np.linalg.norm(dirs[0]) *
                                                    np.linalg.norm(dirs[1])))
            mu = math.degrees(math.acos(max(-1.0, min(1.0, cos))))
            worst = min(worst, min(mu, 180.0 - mu))
        out.append((loop_name(link, lp), worst))
    return tuple(out)


def _newton(link: Linkage, z: FloatArray, angles: FloatArray) -> tuple[FloatArray, float]:
    """Gauss–Newton on Φ(z, θ) = 0 from z; returns z and the final residual norm [mm]."""
    res = _equations(link, z, angles)
    for _ in range(30):
        if np.abs(res).max(initial=0.0) <= CLOSURE * link.size_mm:
            break
        Jz, _ = _jacobians(link, z, angles)
        step, *_ = np.linalg.lstsq(Jz, -res, rcond=None)
        z = z + step
        res = _equations(link, z, angles)
    return z, float(np.abs(res).max(initial=0.0))


def _check_determinate(link: Linkage) -> None:
    """The actuators must fix the pose: as many independent equations as unknowns."""
    n_eq = sum(2 + (j.kind != "pin") for j in link.joints)
    n_z = 3 * len(link.moving)
    if n_eq < n_z:
        raise PoseError(f"the linkage has {n_z - n_eq} more degree(s) of freedom than its "
                        "actuators and fixed joints hold: add a driven joint or a fixed joint")


def _failing_loop(link: Linkage, z: FloatArray, angles: FloatArray) -> str:
    """Name of the loop whose closure is worst at z."""
    res = _equations(link, z, angles)
    per_joint = []
    i = 0
    for j in link.joints:
        n = 2 + (j.kind != "pin")
        per_joint.append(float(np.abs(res[i:i + n]).max()))
        i += n
    worst = int(np.argmax(per_joint))
    for lp in loops(link):
        if worst in lp:
            return loop_name(link, lp)
    return f"joint {link.joints[worst].name}"


def solve_pose(link: Linkage, angles_rad: npt.ArrayLike) -> Pose:
    """The pose for given actuator angles, on the reference pose's assembly branch.

    Parameters
    ----------
    link : the linkage
    angles_rad : (n_actuators,) actuator angles [rad], as defined in the case
    """
    _check_determinate(link)
    target = np.asarray(angles_rad, dtype=float).reshape(-1)
    start = np.asarray(link.reference_angles_rad, dtype=float)
    if target.size != start.size:
        raise PoseError(f"{target.size} actuator angles given for {start.size} actuators")
    n_steps = max(1, math.ceil(np.abs(target - start).max(initial=0.0) / STEP_RAD))
    z = np.zeros(3 * len(link.moving))
    measure = 1.0
    for k in range(1, n_steps + 1):
        angles = start + (target - start) * k / n_steps
        z, residual = _newton(link, z, angles)
        if residual > 1e-6 * link.size_mm:
            raise PoseError(f"the linkage cannot reach the asked actuator angles: the "
                            f"{_failing_loop(link, z, angles)} cannot close "
                            f"(gap {residual:.3g} mm)")
        Jz, _ = _jacobians(link, z, angles)
        measure = singularity_measure(link, Jz)
        if measure < 1e-9:
            raise PoseError(f"the linkage jams on the way to the asked angles: the "
                            f"{_failing_loop(link, z, angles)} passes a singular (locked) "
                            "position")
    return _pose(link, z, target, measure)


def reference_pose(link: Linkage) -> Pose:
    """The pose as drawn: every part where the case puts it, actuators at their angles.

    Needs no loop closure, so it also serves linkages that springs or supports hold rather
    than actuators (their drawn pose is the only one asked of them).
    """
    z = np.zeros(3 * len(link.moving))
    angles = np.asarray(link.reference_angles_rad, dtype=float)
    residual = float(np.abs(_equations(link, z, angles)).max(initial=0.0))
    if residual > 1e-6 * link.size_mm:
        raise PoseError(f"the drawn pose does not close: the {_failing_loop(link, z, angles)} "
                        f"is open by {residual:.3g} mm; check the node coordinates")
    Jz, _ = _jacobians(link, z, angles)
    measure = singularity_measure(link, Jz) if Jz.shape[0] >= Jz.shape[1] else 1.0
    return _pose(link, z, angles, measure)


def _pose(link: Linkage, z: FloatArray, angles: FloatArray, measure: float) -> Pose:
    phi, t = _unpack(link, z)
    xy = np.array([_place(phi[p], t[p], np.asarray(q))
                   for p, q in zip(link.node_part, link.node_xy_mm, strict=True)])
    trans = transmission_angles(link, phi, t)
    warnings = [f"{name}: transmission angle {angle:.0f}° is below {TRANSMISSION_LIMIT_DEG:.0f}°"
                " (forces in its links grow; keep it between 40° and 140°)"
                for name, angle in trans if angle < TRANSMISSION_LIMIT_DEG]
    if measure < SINGULAR_WARNING:
        warnings.append(f"the pose is near a singular position (measure {measure:.3g}): "
                        "joint forces grow without bound there")
    return Pose(angles_rad=angles, rotation_rad=phi, shift_mm=t,
                node_xy_mm=xy.reshape(-1, 2), singularity=measure,
                transmission_deg=trans, warnings=tuple(warnings))


def _point(link: Linkage, node: int, z: FloatArray) -> FloatArray:
    phi, t = _unpack(link, z)
    p = link.node_part[node]
    return _place(phi[p], t[p], np.asarray(link.node_xy_mm[node]))


def foot_jacobian(link: Linkage, pose: Pose, foot: int) -> FloatArray:
    """d(foot x, y)/d(actuator angles) [mm/rad], shape (2, n_actuators)."""
    moving = np.array(link.moving, dtype=np.intp)
    z = np.column_stack([pose.rotation_rad[moving], pose.shift_mm[moving]]).reshape(-1)
    Jz, Ja = _jacobians(link, z, pose.angles_rad)
    dz, *_ = np.linalg.lstsq(Jz, -Ja, rcond=None)
    h = 1e-7
    Fz = np.empty((2, z.size))
    for k in range(z.size):
        d = np.zeros(z.size)
        d[k] = h
        Fz[:, k] = (_point(link, foot, z + d) - _point(link, foot, z - d)) / (2 * h)
    out: FloatArray = Fz @ dz
    return out


def solve_foot_target(
    link: Linkage, foot: int, target_mm: npt.ArrayLike, *, start_rad: npt.ArrayLike | None = None
) -> Pose:
    """Actuator angles that put the foot node at ``target_mm`` (x, y), and that pose.

    Newton on the actuator angles with the foot Jacobian, each step solved by ``solve_pose``
    so the linkage stays on its assembly branch. Needs as many actuators as foot coordinates
    (two); with more, the least-norm change of angles is taken.
    """
    goal = np.asarray(target_mm, dtype=float).reshape(2)
    angles = np.asarray(link.reference_angles_rad if start_rad is None else start_rad, float)
    pose = solve_pose(link, angles)
    for _ in range(40):
        miss = goal - pose.node_xy_mm[foot]
        if np.abs(miss).max() <= 1e-7 * link.size_mm:
            return pose
        J = foot_jacobian(link, pose, foot)
        step, *_ = np.linalg.lstsq(J, miss, rcond=None)
        limit = 2 * STEP_RAD
        step = step * min(1.0, limit / max(float(np.abs(step).max()), 1e-300))
        pose = solve_pose(link, pose.angles_rad + step)
    raise PoseError(f"the foot cannot reach ({goal[0]:.1f}, {goal[1]:.1f}) mm: the closest "
                    f"pose found misses it by {np.linalg.norm(goal - pose.node_xy_mm[foot]):.3g}"
                    " mm")

"""`stiff check`: a case in its pose, through the frame model, to the numbers a designer asks.

At the case's pose: the foot's compliance and its principal directions, the out-of-plane
(lateral) compliance and twist, where the give comes from, and a stance load case: the leg's
share of the robot's weight pushing up on the foot, with the springs' preload, giving the foot
deflection and each actuator's torque against its stall torque. Deflection targets in the
case are checked against the stance case (and against a lateral push of ``lateral_fraction``
of the stance force when the case gives one).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from stiff.build import Built, build
from stiff.case import Case
from stiff.fe import preload_loads, solve_static
from stiff.kinematics import Pose, foot_jacobian
from stiff.linkage import case_pose, linkage
from stiff.stiffness import FootStiffness, foot_stiffness
from stiff.units import G_MM_PER_S2


@dataclass(frozen=True)
class ActuatorDemand:
    """An actuator's torque in a load case [N·mm] against its stall torque."""

    name: str
    torque_Nmm: float
    stall_torque_Nmm: float

    @property
    def margin(self) -> float:
        """Stall torque over demand (∞ when the demand is zero)."""
        if abs(self.torque_Nmm) <= 1e-9 * self.stall_torque_Nmm:
            return math.inf
        return self.stall_torque_Nmm / abs(self.torque_Nmm)


@dataclass(frozen=True)
class LoadCaseResult:
    """One load case: what pushes on the foot and what the leg does."""

    name: str
    description: str
    foot_force_N: tuple[float, float, float]
    foot_deflection_mm: tuple[float, float, float]
    actuators: tuple[ActuatorDemand, ...]
    spring_forces_N: tuple[tuple[str, float], ...]


@dataclass(frozen=True)
class TargetCheck:
    """A deflection target against its value."""

    name: str
    load_case: str
    demand_mm: float
    limit_mm: float

    @property
    def met(self) -> bool:
        """True when the deflection is within the limit."""
        return self.demand_mm <= self.limit_mm


@dataclass(frozen=True)
class CheckResult:
    """Everything `stiff check` reports for a case."""

    case: Case
    pose: Pose
    built: Built
    foot_xy_mm: tuple[float, float]
    foot_jacobian_mm_per_rad: np.ndarray  # (2, n_actuators)
    stiffness: FootStiffness
    load_cases: tuple[LoadCaseResult, ...]
    targets: tuple[TargetCheck, ...]
    warnings: tuple[str, ...]

    @property
    def all_met(self) -> bool:
        """True when every target is met."""
        return all(t.met for t in self.targets)


def stance_force_N(case: Case) -> tuple[str, float, str]:
    """The static load case's name, its vertical foot force [N] (+ up) and its basis."""
    loads = case.loads
    if loads.payload_t is not None:
        return "payload", -loads.payload_t * G_MM_PER_S2, (
            f"the weight of a {loads.payload_t * 1e3:g} kg payload hanging from the foot node")
    if loads.robot_mass_t is None:
        return "stance", 10.0, ("no robot mass in the case: a 10 N upward foot force is used to "
                                "show the actuator torques; give loads.robot_mass_kg")
    legs = loads.legs_in_stance or loads.legs
    force = loads.robot_mass_t * G_MM_PER_S2 / legs
    return "stance", force, (f"robot weight {loads.robot_mass_t * 1e3:g} kg × g shared by "
                             f"{legs} legs in stance")


def _load_case(built: Built, case: Case, name: str, description: str,
               foot_force: tuple[float, float, float], with_preload: bool) -> LoadCaseResult:
    model = built.model
    loads = np.zeros((1, model.n_nodes, 6))
    loads[0, built.foot, :3] = foot_force
    if with_preload:
        loads[0] += preload_loads(model)
    sol = solve_static(model, loads)
    demand = []
    for i, act in enumerate(built.connector_actuator):
        if act is None:
            continue
        a = case.actuator(act)
        demand.append(ActuatorDemand(act, float(sol.connector_forces[0, i, 5]),
                                     a.stall_torque_Nmm))
    springs = tuple((n, float(f)) for n, f in zip(built.spring_names, sol.spring_forces[0],
                                                  strict=True))
    d = sol.displacements[0, built.foot, :3]
    return LoadCaseResult(name=name, description=description, foot_force_N=foot_force,
                          foot_deflection_mm=(float(d[0]), float(d[1]), float(d[2])),
                          actuators=tuple(demand), spring_forces_N=springs)


def run_check(case: Case) -> CheckResult:
    """Solve the case's pose and everything `stiff check` reports."""
    link = linkage(case)
    pose = case_pose(case, link)
    built = build(case, pose)
    warnings = list(built.warnings)
    name, force, basis = stance_force_N(case)
    if case.loads.robot_mass_t is None and case.loads.payload_t is None:
        warnings.append(basis)
    way = "upward" if force >= 0 else "downward"
    stance = _load_case(built, case, name, f"{way} foot force {abs(force):.3g} N ({basis}), "
                        "with the springs' preload", (0.0, force, 0.0), with_preload=True)
    cases = [stance]
    targets = []
    t = case.targets
    if t.max_foot_deflection_mm is not None:
        dx, dy, _ = stance.foot_deflection_mm
        targets.append(TargetCheck("foot deflection in the linkage plane", name,
                                   math.hypot(dx, dy), t.max_foot_deflection_mm))
    if case.loads.lateral_fraction:
        side = abs(force) * case.loads.lateral_fraction
        lateral = _load_case(built, case, "lateral push", f"sideways foot force {side:.3g} N "
                             f"({case.loads.lateral_fraction:g} of the {name} force), out of "
                             "the linkage plane", (0.0, 0.0, side), with_preload=False)
        cases.append(lateral)
        if t.max_lateral_deflection_mm is not None:
            targets.append(TargetCheck("lateral foot deflection", lateral.name,
                                       abs(lateral.foot_deflection_mm[2]),
                                       t.max_lateral_deflection_mm))
    for lc in cases:
        for a in lc.actuators:
            if a.margin < 1.0:
                warnings.append(f"{lc.name}: actuator {a.name} needs {abs(a.torque_Nmm) / 1e3:.3g}"
                                f" N·m, more than its stall torque "
                                f"{a.stall_torque_Nmm / 1e3:.3g} N·m")
    foot_index = link.node_names.index(case.foot)
    xy = pose.node_xy_mm[foot_index]
    return CheckResult(
        case=case, pose=pose, built=built, foot_xy_mm=(float(xy[0]), float(xy[1])),
        foot_jacobian_mm_per_rad=foot_jacobian(link, pose, foot_index),
        stiffness=foot_stiffness(built), load_cases=tuple(cases), targets=tuple(targets),
        warnings=tuple(warnings))

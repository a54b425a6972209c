"""`stiff check`: a case in its pose, through the frame model, to the numbers a designer asks.

At the case's pose: the foot's compliance and its principal directions, the out-of-plane
(lateral) compliance and twist, where the give comes from; the landing estimate; and every
load case (``stiff.loads``) with the foot deflection, each actuator's torque against its stall
torque and each spring's force and length. Deflection targets are checked in every load case
the case names (``targets.deflection_cases``; by default the static ones: stance or payload,
and the lateral push).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from threadpoolctl import threadpool_limits

from stiff.build import Built, build
from stiff.case_model import Case
from stiff.checks import run_checks
from stiff.checks.base import CheckRecord, governing, worst_first
from stiff.checks.context import CheckContext
from stiff.errors import CaseError, PoseError
from stiff.kinematics import Linkage, Pose, foot_jacobian, solve_pose
from stiff.landing import LandingResult
from stiff.linkage import case_pose, linkage
from stiff.loads import (
    LoadCaseResult,
    landing,
    load_cases,
    solve_load_cases,
    weight_on_leg_N,
)
from stiff.play_modes import PlayAndModes, play_and_modes
from stiff.stiffness import FootStiffness, foot_stiffness


@dataclass(frozen=True)
class CheckResult:
    """Everything `stiff check` reports for a case."""

    case: Case
    pose: Pose
    built: Built
    foot_xy_mm: tuple[float, float]
    foot_jacobian_mm_per_rad: np.ndarray  # (2, n_actuators)
    stiffness: FootStiffness
    landing: LandingResult | None
    load_cases: tuple[LoadCaseResult, ...]
    checks: tuple[CheckRecord, ...]
    dynamics: PlayAndModes
    warnings: tuple[str, ...]

    @property
    def all_met(self) -> bool:
        """True when every check and target (play targets too) reaches its required factor."""
        return all(c.status == "met" for c in self.checks) and self.dynamics.all_met

    @property
    def governing(self) -> list[CheckRecord]:
        """The governing check of every item, worst first."""
        return worst_first(governing(self.checks).values())


def landing_pose(case: Case, link: Linkage) -> Pose | None:
    """The pose the case lands in, when it names a landing pose of its own."""
    if case.loads.landing_angles_rad is None:
        return None
    asked = dict(case.loads.landing_angles_rad)
    for a in case.actuators:
        value = asked.get(a.name, a.angle_rad)
        if (a.angle_min_rad is not None and value < a.angle_min_rad) or (
                a.angle_max_rad is not None and value > a.angle_max_rad):
            raise CaseError(case.file, f"loads.landing_angles_deg.{a.name}",
                            f"{math.degrees(value):g}° is outside the actuator's range")
    angles = [asked.get(a.name, a.angle_rad) for a in case.actuators]
    try:
        pose = solve_pose(link, angles)
    except PoseError as err:
        raise CaseError(case.file, "loads.landing_angles_deg",
                        f"the leg cannot reach this landing pose: {err}") from None
    return pose


def _landing_at(case: Case, link: Linkage) -> tuple[Pose, Built] | None:
    pose = landing_pose(case, link)
    return None if pose is None else (pose, build(case, pose))


def _warnings(results: tuple[LoadCaseResult, ...], land: LandingResult | None) -> list[str]:
    out = []
    for r in results:
        for a in r.actuators:
            if a.margin < 1.0 and not r.case.foot_held:
                out.append(f"{r.name}: actuator {a.name} needs {abs(a.torque_Nmm) / 1e3:.3g} "
                           f"N·m, more than its stall torque {a.stall_torque_Nmm / 1e3:.3g} N·m")
        for s in r.springs:
            if s.max_length_mm is not None and s.length_mm > s.max_length_mm:
                out.append(f"{r.name}: spring {s.name} stretches to {s.length_mm:.1f} mm, beyond"
                           f" its maximum length {s.max_length_mm:g} mm")
    if land is not None:
        out.extend(f"landing: {e}" for e in land.events)
    return out


def run_check(case: Case) -> CheckResult:
    """Solve the case's pose and everything `stiff check` reports.

    numpy's BLAS runs on one thread meanwhile (restored after): on matrices this small a
    threaded BLAS costs more than it gains (about 3× on a check of the five-bar demo).
    """
    with threadpool_limits(limits=1, user_api="blas"):
        return _run_check(case)


def _run_check(case: Case) -> CheckResult:
    link = linkage(case)
    pose = case_pose(case, link)
    built = build(case, pose)
    foot_index = link.node_names.index(case.foot)
    jacobian = foot_jacobian(link, pose, foot_index)
    landing_at = _landing_at(case, link)
    land_pose, land_built = landing_at or (pose, built)
    land_jac = jacobian if landing_at is None else foot_jacobian(link, land_pose, foot_index)
    land = landing(case, land_built, land_pose, land_jac)
    cases = load_cases(case, built, land)
    at_landing = tuple(lc for lc in cases if lc.name == "landing" or lc.name.startswith("slip"))
    rest = tuple(lc for lc in cases if lc not in at_landing)
    if landing_at is None:
        results = solve_load_cases(case, built, cases)
    else:
        results = solve_load_cases(case, built, rest) + solve_load_cases(case, land_built,
                                                                         at_landing)
    warnings = list(built.warnings)
    if case.loads.robot_mass_t is None and case.loads.payload_t is None:
        warnings.append(weight_on_leg_N(case)[1])
    warnings += _warnings(results, land)
    records, check_warnings = run_checks(CheckContext(case, built, results))
    warnings += check_warnings
    xy = pose.node_xy_mm[foot_index]
    return CheckResult(
        case=case, pose=pose, built=built, foot_xy_mm=(float(xy[0]), float(xy[1])),
        foot_jacobian_mm_per_rad=jacobian, stiffness=foot_stiffness(built), landing=land,
        load_cases=results, checks=records, dynamics=play_and_modes(case, built, pose),
        warnings=tuple(warnings))

"""Workspace maps: the case over a grid of actuator angles, where the leg is soft, weak or near
a singular pose, and which poses it cannot reach.

The grid: for each actuator, ``steps`` angles evenly over its range (``angle_min``..``angle_max``
in the case), or ±:data:`HALF_SPAN_DEG` about its angle in the case's pose (the asked angles, or
those of its foot target) when it has no range. One actuator
gives a line, two a grid; with more, the first two are mapped and the others held at their
pose angles (said in :attr:`WorkspaceMap.held`).

Every grid pose goes through :func:`stiff.check.run_check` on the case with its pose replaced
(``pose_angles_rad``; a foot target or a separate landing pose of the case is dropped, so the
landing is taken in the mapped pose). A pose the linkage cannot reach, or where it jams, is
recorded with the reason (``reachable`` False), never raised. Per pose: foot position [mm],
vertical (C_yy) and lateral (C_zz) compliance [mm/N], the minimum safety factor over the
checks in the stance (or payload) and landing load cases, and the singularity measure
(inverse condition of the scaled constraint Jacobian: 1 well conditioned, 0 singular). A pose
whose measure is below :data:`NEAR_SINGULAR` is flagged: there the forces in the links grow as
1/measure.
"""

from __future__ import annotations

import csv
import itertools
import math
from collections.abc import Callable
from dataclasses import dataclass, replace
from functools import partial
from pathlib import Path

import numpy as np

from stiff.case_model import Case
from stiff.check import run_check
from stiff.errors import PoseError, StiffError
from stiff.kinematics import SINGULAR_WARNING
from stiff.linkage import case_pose
from stiff.pool import WORKERS, map_items

#: Half the span mapped about the pose for an actuator without a range [°].
HALF_SPAN_DEG = 30.0
#: Steps per actuator by default.
DEFAULT_STEPS = 7
#: Flag poses whose singularity measure is below this (the kinematics' own warning level).
NEAR_SINGULAR = SINGULAR_WARNING
#: Load cases whose checks give a pose's minimum factor (the first static case is added).
MAP_LOAD_CASES = ("stance", "payload", "landing")


class MapError(StiffError):
    """A map cannot be made as asked (no actuators, too few steps); exit code 2."""


@dataclass(frozen=True)
class PoseRow:
    """One grid pose: its angles [rad] and results (NaN where unreachable)."""

    index: int
    angles_rad: tuple[float, ...]
    reachable: bool
    foot_x_mm: float
    foot_y_mm: float
    vertical_mm_per_N: float
    lateral_mm_per_N: float
    min_factor: float
    min_factor_check: str
    singularity: float
    why: str = ""  # why the pose is unreachable

    @property
    def near_singular(self) -> bool:
        """True when the pose is reachable and near a singular position."""
        return self.reachable and self.singularity < NEAR_SINGULAR


@dataclass(frozen=True)
class WorkspaceMap:
    """A map: the actuators it varies, those it holds, and one row per grid pose."""

    mapped: tuple[str, ...]
    held: tuple[str, ...]
    shape: tuple[int, ...]  # steps along each mapped actuator
    rows: tuple[PoseRow, ...]

    @property
    def unreachable(self) -> tuple[PoseRow, ...]:
        """Poses the mechanism cannot reach or where it jams."""
        return tuple(r for r in self.rows if not r.reachable)

    @property
    def near_singular(self) -> tuple[PoseRow, ...]:
        """Reachable poses near a singular position."""
        return tuple(r for r in self.rows if r.near_singular)


def grid_angles(case: Case, steps: int = DEFAULT_STEPS
                ) -> tuple[tuple[str, ...], tuple[str, ...], list[tuple[float, ...]]]:
    """The mapped and held actuators and every grid pose's angles [rad], all actuators in the
    case's order (the last mapped actuator fastest)."""
    if not case.actuators:
        raise MapError("the case has no actuators to map")
    if steps < 2:
        raise MapError(f"--steps must be at least 2, got {steps}")
    try:  # the case's pose, also when it is given as a foot target
        at = case_pose(case).angles_rad
    except PoseError:
        at = np.array([(case.pose_angles_rad or {}).get(a.name, a.angle_rad)
                       for a in case.actuators])
    pose = {a.name: float(x) for a, x in zip(case.actuators, at, strict=True)}
    mapped = case.actuators[:2]
    axes = []
    for a in mapped:
        span = math.radians(HALF_SPAN_DEG)
        lo = a.angle_min_rad if a.angle_min_rad is not None else pose[a.name] - span
        hi = a.angle_max_rad if a.angle_max_rad is not None else pose[a.name] + span
        axes.append(np.linspace(lo, hi, steps))
    names = tuple(a.name for a in mapped)
    grid = []
    for combo in itertools.product(*axes):
        chosen = dict(zip(names, combo, strict=True))
        grid.append(tuple(float(chosen.get(a.name, pose[a.name])) for a in case.actuators))
    held = tuple(a.name for a in case.actuators[2:])
    return names, held, grid


def pose_case(case: Case, angles_rad: tuple[float, ...]) -> Case:
    """The case in the pose ``angles_rad`` (one per actuator [rad]), landing there too."""
    return replace(case, pose_angles_rad={a.name: x for a, x in zip(case.actuators, angles_rad,
                                                                     strict=True)},
                   pose_foot_mm=None, loads=replace(case.loads, landing_angles_rad=None))


def evaluate_pose(case: Case, index: int, angles_rad: tuple[float, ...]) -> PoseRow:
    """One grid pose through `stiff check`; an unreachable pose is a row with its reason."""
    nan = math.nan
    try:
        result = run_check(pose_case(case, angles_rad))
    except StiffError as err:
        return PoseRow(index, angles_rad, False, nan, nan, nan, nan, nan, "", nan,
                       why=str(err).replace("\n", " "))
    names = {*MAP_LOAD_CASES, result.load_cases[0].name}
    records = [r for r in result.checks if r.load_case in names]
    lowest = min(records, key=lambda r: r.safety_factor) if records else None
    C = result.stiffness.compliance_mm_per_N
    return PoseRow(
        index, angles_rad, True, result.foot_xy_mm[0], result.foot_xy_mm[1], float(C[1, 1]),
        float(C[2, 2]), lowest.safety_factor if lowest else math.inf,
        f"{lowest.item}: {lowest.mode} ({lowest.load_case})" if lowest else "",
        result.pose.singularity)


def workspace_map(case: Case, steps: int = DEFAULT_STEPS,
                  progress: Callable[[int], None] | None = None,
                  workers: int = WORKERS) -> WorkspaceMap:
    """Map the case over its actuator-angle grid (see the module docstring).

    Parameters
    ----------
    case : the case
    steps : angles per mapped actuator [-]
    progress : called with the number of poses just finished
    workers : processes when there are more than :data:`stiff.pool.POOL_ABOVE` poses
    """
    mapped, held, grid = grid_angles(case, steps)
    rows = map_items(partial(_evaluate_item, case), list(enumerate(grid)), workers, progress)
    return WorkspaceMap(mapped, held, (steps,) * len(mapped), tuple(rows))


def _evaluate_item(case: Case, item: tuple[int, tuple[float, ...]]) -> PoseRow:
    return evaluate_pose(case, item[0], item[1])


def write_map_csv(path: Path, case: Case, result: WorkspaceMap) -> Path:
    """One line per grid pose: every actuator's angle [°] and the results (units in keys)."""
    path.parent.mkdir(parents=True, exist_ok=True)
    with path.open("w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow(["pose", *(f"{a.name}_deg" for a in case.actuators), "reachable",
                         "foot_x_mm", "foot_y_mm", "vertical_mm_per_N", "lateral_mm_per_N",
                         "min_factor", "min_factor_check", "singularity", "near_singular",
                         "why"])
        for r in result.rows:
            writer.writerow([r.index, *(f"{math.degrees(x):.6g}" for x in r.angles_rad),
                             r.reachable, f"{r.foot_x_mm:.6g}", f"{r.foot_y_mm:.6g}",
                             f"{r.vertical_mm_per_N:.6g}", f"{r.lateral_mm_per_N:.6g}",
                             f"{r.min_factor:.6g}", r.min_factor_check, f"{r.singularity:.6g}",
                             r.near_singular, r.why])
    return path

"""Sweeps and maps through the batched path: each variant checked in all its poses in one pass.

A variant's linkage geometry (nodes, parts, joints, actuators, pose) decides its poses; print
settings and tube sizes do not, so the poses and their foot Jacobians are solved once and
shared by every variant with the same geometry (:class:`Geometry`). Each variant is then built
once (printed sections come from ``stiff.build``'s cache, so a section met before costs
nothing) and checked in all its poses at once (``stiff.pose_batch.check_poses``).

The numbers are those of `stiff check` of the variant's case file in each pose; play targets,
when the case has any, are evaluated in the case's pose as `stiff check` does.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.build import Built, Sections, build
from stiff.case_model import Case
from stiff.check import landing_pose
from stiff.checks.base import CheckRows
from stiff.errors import StiffError
from stiff.kinematics import Linkage, Pose, foot_jacobian, solve_pose
from stiff.linkage import case_pose, linkage
from stiff.play import foot_play, play_targets
from stiff.pose_batch import PoseChecks, check_poses

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True)
class Geometry:
    """The poses a case is checked in, with their foot Jacobians [mm/rad].

    ``landing`` holds the landing poses (one per pose) when the case lands in a pose of its
    own; ``why`` the reason for every asked pose that could not be reached (by index).
    """

    link: Linkage
    poses: tuple[Pose, ...]
    jacobians: tuple[FloatArray, ...]
    landing: tuple[tuple[Pose, ...], tuple[FloatArray, ...]] | None
    reached: tuple[int, ...]  # index of each pose among those asked
    why: dict[int, str]


def geometry_key(case: Case) -> str:
    """A key equal for cases whose linkage and poses are the same."""
    return repr((sorted(case.nodes.items()), case.body_nodes, case.foot,
                 [(p.name, p.nodes, p.segments) for p in case.parts],
                 [(j.name, j.node, j.parts, j.kind, j.actuator) for j in case.joints],
                 [(a.name, a.angle_rad, a.angle_min_rad, a.angle_max_rad)
                  for a in case.actuators],
                 case.pose_angles_rad, case.pose_foot_mm, case.loads.landing_angles_rad))


def _reach(link: Linkage, asked: Sequence[Sequence[float]], first: int = 0
           ) -> tuple[list[Pose], list[int], dict[int, str]]:
    """The poses of ``asked`` (actuator angles [rad]) the linkage reaches, their indices
    (from ``first``), and why each other one is not reached."""
    poses, reached, why = [], [], {}
    for k, angles in enumerate(asked, start=first):
        try:
            poses.append(solve_pose(link, list(angles)))
            reached.append(k)
        except StiffError as err:
            why[k] = str(err).replace("\n", " ")
    return poses, reached, why


def case_geometry(case: Case, extra_angles: Sequence[Sequence[float]] = ()) -> Geometry:
    """The case's own pose, then each of ``extra_angles`` (actuator angles [rad]) it reaches.

    The case's own pose must be reachable (PoseError/CaseError otherwise, as `stiff check`);
    an extra pose that is not is left out with its reason. Extra poses land in themselves.
    """
    link = linkage(case)
    foot = link.node_names.index(case.foot)
    more, reached, why = _reach(link, extra_angles, first=1)
    poses = [case_pose(case, link), *more]
    jacobians = tuple(foot_jacobian(link, p, foot) for p in poses)
    own = landing_pose(case, link)
    landing = None
    if own is not None:
        landing = ((own, *poses[1:]), (foot_jacobian(link, own, foot), *jacobians[1:]))
    return Geometry(link, tuple(poses), jacobians, landing, (0, *reached), why)


def grid_geometry(case: Case, grid: Sequence[Sequence[float]]) -> Geometry:
    """The poses of a grid of actuator angles [rad] the case reaches, each landing in itself
    (the case's own pose and landing pose are not used); may hold no pose."""
    link = linkage(case)
    foot = link.node_names.index(case.foot)
    poses, reached, why = _reach(link, grid)
    jacobians = tuple(foot_jacobian(link, p, foot) for p in poses)
    return Geometry(link, tuple(poses), jacobians, None, tuple(reached), why)


@dataclass(frozen=True)
class Checked:
    """A variant checked in its poses: the batched results and its model in its own pose."""

    checks: PoseChecks
    built: Built
    play_met: bool


def check_variant(case: Case, geometry: Geometry, screen: bool = True,
                  only: Sequence[str] | None = None, sections: Sections | None = None
                  ) -> Checked:
    """Build the case in its pose and check it in every pose of ``geometry``.

    ``screen``: the frame's buckling factor only where it can decide a pose's results (its
    rows elsewhere hold a lower bound; ``stiff.checks.check_rows``): the lowest factors, worst
    utilisation and misses are those of the full solve. ``only``: the load cases to solve and
    check (all by default). ``sections``: printed sections kept across variants
    (``stiff.build.Sections``).
    """
    built = build(case, geometry.poses[0], sections)
    checks = check_poses(case, built, geometry.poses, geometry.jacobians, geometry.landing,
                         screen=screen, only=only)
    t = case.targets
    play_met = True
    if t.max_play_mm is not None or t.max_lateral_play_mm is not None:
        play_met = all(x.met for x in play_targets(case, foot_play(case, built)))
    return Checked(checks, built, play_met)


def governing_rows(checks: PoseChecks) -> list[tuple[CheckRows, int, float]]:
    """The governing check of each item over every pose: (row, pose, utilisation), worst
    first; ties go to the first row and pose, as `stiff check`'s ``governing`` does."""
    U = checks.utilisations
    if not U.size:
        return []
    row_max = U.max(axis=1)
    row_at = U.argmax(axis=1)
    by_item: dict[str, list[int]] = {}
    for i, r in enumerate(checks.rows):
        by_item.setdefault(r.item, []).append(i)
    best = []
    for rows in by_item.values():
        i = rows[int(np.argmax(row_max[rows]))]
        best.append((checks.rows[i], int(row_at[i]), float(row_max[i])))
    return sorted(best, key=lambda t: -t[2])


def not_met(checks: PoseChecks) -> list[str]:
    """Each item whose governing check misses its required factor, as one phrase."""
    out = []
    for r, k, _ in governing_rows(checks):
        sf = float(r.safety_factors[k])
        if sf < r.required_factor:
            out.append(f"{r.item}: {r.mode} ({r.load_case}) factor {sf:.3g} < "
                       f"{r.required_factor:g}")
    return out


def all_met(checks: PoseChecks) -> bool:
    """True when every check reaches its required factor in every pose."""
    return bool(np.all(checks.factors >= checks.required[:, None]))


def worst_utilisation(checks: PoseChecks) -> float:
    """The largest required over actual factor of any check in any pose (0: none)."""
    U = checks.utilisations
    return float(U.max()) if U.size else 0.0


def lowest_check(checks: PoseChecks, load_cases: Sequence[str] | None = None
                 ) -> tuple[float, str]:
    """The lowest safety factor over every pose and the check giving it (item: mode (case))."""
    low, which = checks.lowest(load_cases)
    if not low.size or not np.isfinite(low).any():
        return math.inf, ""
    p = int(np.argmin(low))
    row = which[p]
    return float(low[p]), "" if row is None else f"{row.item}: {row.mode} ({row.load_case})"

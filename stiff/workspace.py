"""Workspace maps: the case over a grid of actuator angles or of foot targets, where the leg is
soft, weak or near a singular pose, and which poses it cannot reach.

The grid: for each actuator, ``steps`` angles evenly over its range (``angle_min``..``angle_max``
in the case), or ±:data:`HALF_SPAN_DEG` about its angle in the case's pose (the asked angles, or
those of its foot target) when it has no range. One actuator
gives a line, two a grid; with more, the first two are mapped and the others held at their
pose angles (said in :attr:`WorkspaceMap.held`).

Every grid pose is checked as :func:`stiff.check.run_check` checks the case with its pose
replaced (``pose_angles_rad``; a foot target or a separate landing pose of the case is dropped,
so the landing is taken in the mapped pose), through the batched path, 8 poses a batch
(:func:`evaluate_poses`; :func:`evaluate_pose` is the one-pose reference). A pose the linkage
cannot reach, or where it jams, is recorded with the reason (``reachable`` False), never raised.
Per pose: foot position [mm], vertical (C_yy) and lateral (C_zz) compliance [mm/N], the minimum
safety factor over the checks in the stance (or payload) and landing load cases, and the
singularity measure (inverse condition of the scaled constraint Jacobian: 1 well conditioned, 0
singular). A pose whose measure is below :data:`NEAR_SINGULAR` is flagged: there the forces in
the links grow as 1/measure.

The foot-target grid (:func:`grid_targets`, two actuators): ``steps`` x ``steps`` foot positions
evenly over a box [mm], by default the box of the foot positions the angle grid reaches. Each
target is solved by the inverse kinematics (:func:`stiff.kinematics.solve_foot_target`),
started from the angles of the angle-grid pose whose foot is nearest. A target is unreachable,
with its reason, when the inverse kinematics fails, when its angles leave an actuator's range,
or when it lies outside the angle grid's image (no triangle of a grid cell whose four corner
poses are reachable holds it): there the search would only wander along the edge of the
workspace (some 10 s a target), so the edge is as fine as ``steps`` samples it. The reachable
targets' angles go through the same evaluation as the angle grid (:func:`workspace_map` with
``poses``).
"""

from __future__ import annotations

import csv
import itertools
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from functools import partial
from pathlib import Path

import numpy as np
import numpy.typing as npt

from stiff.batched import check_variant, grid_geometry
from stiff.build import Sections
from stiff.case_model import Case
from stiff.check import run_check
from stiff.errors import PoseError, StiffError
from stiff.kinematics import SINGULAR_WARNING, Linkage, solve_foot_target, solve_pose
from stiff.linkage import case_pose, linkage
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
    shape: tuple[int, ...]  # steps along each mapped actuator (x, y for foot targets)
    rows: tuple[PoseRow, ...]
    #: For a foot-target map, each row's target (x, y) [mm], in the rows' order; else empty.
    targets_mm: tuple[tuple[float, float], ...] = ()

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


def evaluate_poses(case: Case, items: Sequence[tuple[int, tuple[float, ...]]],
                   sections: Sections | None = None) -> list[PoseRow]:
    """Grid poses checked together through the batched path (``stiff.batched``): the same
    rows as :func:`evaluate_pose` of each, in one pass. When the batch cannot be solved as a
    whole (a pose where the linkage is a mechanism), each pose is evaluated alone."""
    grid = [angles for _, angles in items]
    try:
        geometry = grid_geometry(pose_case(case, grid[0]), grid)
        if not geometry.poses:
            checked = None
        else:
            at = pose_case(case, grid[geometry.reached[0]])
            checked = check_variant(at, geometry, only=MAP_LOAD_CASES, sections=sections)
    except StiffError:
        return [evaluate_pose(case, k, angles) for k, angles in items]
    nan = math.nan
    rows = {i: PoseRow(items[i][0], items[i][1], False, nan, nan, nan, nan, nan, "", nan,
                       why=why) for i, why in geometry.why.items()}
    if checked is not None:
        pc = checked.checks
        names = [*MAP_LOAD_CASES, pc.load_case_names[0]]
        low, which = pc.lowest(names)
        foot = geometry.link.node_names.index(case.foot)
        for p, i in enumerate(geometry.reached):
            xy = pc.poses[p].node_xy_mm[foot]
            row = which[p]
            C = pc.compliance_mm_per_N[p]
            rows[i] = PoseRow(
                items[i][0], items[i][1], True, float(xy[0]), float(xy[1]), float(C[1, 1]),
                float(C[2, 2]), float(low[p]),
                "" if row is None else f"{row.item}: {row.mode} ({row.load_case})",
                pc.poses[p].singularity)
    return [rows[i] for i in range(len(items))]


def _evaluate_batch(case: Case, sections: Sections,
                    items: Sequence[tuple[int, tuple[float, ...]]]) -> list[PoseRow]:
    return evaluate_poses(case, items, sections)


#: Grid poses checked together in one batch (and handed to a worker at a time).
POSES_PER_BATCH = 8


def workspace_map(case: Case, steps: int = DEFAULT_STEPS,
                  progress: Callable[[int], None] | None = None,
                  workers: int = WORKERS,
                  poses: Sequence[tuple[float, ...]] | None = None) -> WorkspaceMap:
    """Map the case over its actuator-angle grid (see the module docstring).

    Parameters
    ----------
    case : the case
    steps : angles per mapped actuator [-]
    progress : called with the number of poses just finished
    workers : processes when there are more than :data:`stiff.pool.POOL_ABOVE` batches
    poses : the poses' angles [rad] (every actuator, the case's order) instead of the angle
        grid, as :func:`grid_targets` gives them; the map's shape is then left to the caller
    """
    mapped, held, grid = grid_angles(case, steps) if poses is None else _given(case, poses)
    items = list(enumerate(grid))
    batches = [items[a:a + POSES_PER_BATCH] for a in range(0, len(items), POSES_PER_BATCH)]

    def done(n: int) -> None:  # n batches finished; all but the last are full
        if progress is not None:
            progress(n * POSES_PER_BATCH)

    parts = map_items(partial(_evaluate_batch, case, Sections()), batches, workers,
                      None if progress is None else done)
    rows = [r for part in parts for r in part]
    return WorkspaceMap(mapped, held, (steps,) * len(mapped), tuple(rows))


def write_map_csv(path: Path, case: Case, result: WorkspaceMap) -> Path:
    """One line per grid pose: its foot target [mm] (a foot-target map), every actuator's
    angle [°] and the results (units in keys)."""
    path.parent.mkdir(parents=True, exist_ok=True)
    aimed = ("target_x_mm", "target_y_mm") if result.targets_mm else ()
    with path.open("w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow(["pose", *aimed, *(f"{a.name}_deg" for a in case.actuators),
                         "reachable", "foot_x_mm", "foot_y_mm", "vertical_mm_per_N",
                         "lateral_mm_per_N", "min_factor", "min_factor_check", "singularity",
                         "near_singular", "why"])
        for r in result.rows:
            target = [f"{t:.6g}" for t in result.targets_mm[r.index]] if aimed else []
            writer.writerow([r.index, *target, *(f"{math.degrees(x):.6g}" for x in r.angles_rad),
                             r.reachable, f"{r.foot_x_mm:.6g}", f"{r.foot_y_mm:.6g}",
                             f"{r.vertical_mm_per_N:.6g}", f"{r.lateral_mm_per_N:.6g}",
                             f"{r.min_factor:.6g}", r.min_factor_check, f"{r.singularity:.6g}",
                             r.near_singular, r.why])
    return path


# ---------------------------------------------------------------------------------------------
# Foot-target grid


def _given(case: Case, poses: Sequence[tuple[float, ...]]
           ) -> tuple[tuple[str, ...], tuple[str, ...], list[tuple[float, ...]]]:
    """Given poses as :func:`grid_angles` returns a grid (the first two actuators mapped)."""
    names = tuple(a.name for a in case.actuators)
    return names[:2], names[2:], [tuple(p) for p in poses]


@dataclass(frozen=True)
class TargetGrid:
    """A grid of foot targets [mm], x slowest, and what the inverse kinematics made of them.

    ``angles_rad`` holds every actuator's angle [rad] of each reachable target and ``why`` the
    reason of each unreachable one, both keyed by the target's index in ``targets_mm``.
    """

    mapped: tuple[str, ...]
    shape: tuple[int, int]
    targets_mm: tuple[tuple[float, float], ...]
    angles_rad: dict[int, tuple[float, ...]]
    why: dict[int, str]

    @property
    def reachable(self) -> tuple[int, ...]:
        """Indices of the targets the leg reaches, in order."""
        return tuple(sorted(self.angles_rad))


def _grid_feet(case: Case, link: Linkage, foot: int, steps: int, workers: int
               ) -> tuple[list[tuple[float, ...]], npt.NDArray[np.float64]]:
    """The angle grid's poses and their feet (n, 2) [mm], NaN where a pose is unreachable."""
    _, _, grid = grid_angles(case, steps)
    feet = map_items(partial(_foot_at, link, foot), grid, workers)
    return grid, np.array([f if f is not None else (math.nan, math.nan) for f in feet])


def _inside(targets: npt.NDArray[np.float64], feet: npt.NDArray[np.float64], steps: int
            ) -> npt.NDArray[np.bool_]:
    """Which targets (n, 2) lie in the angle grid's image: in one of the two triangles of a
    grid cell whose four corner poses are all reachable (boundary included)."""
    cells = feet.reshape(steps, steps, 2)
    a, b = cells[:-1, :-1].reshape(-1, 2), cells[1:, :-1].reshape(-1, 2)
    c, d = cells[1:, 1:].reshape(-1, 2), cells[:-1, 1:].reshape(-1, 2)
    tri = np.concatenate([np.stack([a, b, c], 1), np.stack([a, c, d], 1)])  # (m, 3, 2)
    tri = tri[np.isfinite(tri).all(axis=(1, 2))]
    e1, e2 = tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0]
    det = e1[:, 0] * e2[:, 1] - e1[:, 1] * e2[:, 0]
    tri, e1, e2, det = tri[det != 0], e1[det != 0], e2[det != 0], det[det != 0]
    p = targets[:, None, :] - tri[None, :, 0]  # (n, m, 2)
    u = (p[..., 0] * e2[:, 1] - p[..., 1] * e2[:, 0]) / det
    v = (e1[:, 0] * p[..., 1] - e1[:, 1] * p[..., 0]) / det
    tol = 1e-9
    hit: npt.NDArray[np.bool_] = ((u >= -tol) & (v >= -tol) & (u + v <= 1 + tol)).any(axis=1)
    return hit


def _foot_at(link: Linkage, foot: int, angles: tuple[float, ...]) -> tuple[float, float] | None:
    try:
        xy = solve_pose(link, angles).node_xy_mm[foot]
    except PoseError:
        return None
    return float(xy[0]), float(xy[1])


def _axis(given: tuple[float, float] | None, seen: npt.NDArray[np.float64], steps: int,
          what: str) -> npt.NDArray[np.float64]:
    lo, hi = given if given is not None else (float(seen.min()), float(seen.max()))
    if not hi > lo:
        raise MapError(f"the foot-target range along {what} is empty ({lo:g} to {hi:g} mm)")
    out: npt.NDArray[np.float64] = np.linspace(lo, hi, steps)
    return out


def grid_targets(case: Case, steps: int = DEFAULT_STEPS, x_mm: tuple[float, float] | None = None,
                 y_mm: tuple[float, float] | None = None, workers: int = WORKERS,
                 progress: Callable[[int], None] | None = None) -> TargetGrid:
    """A ``steps`` x ``steps`` grid of foot targets and the actuator angles of each reachable
    one (see the module docstring).

    Parameters
    ----------
    case : the case; it needs exactly two actuators (one per foot coordinate)
    steps : targets along x and along y [-]
    x_mm, y_mm : the grid's range of foot x and y [mm]; default the angle grid's feet's box
    workers : processes for the kinematics when there are many targets
    progress : called with the number of targets just solved
    """
    if len(case.actuators) != 2:
        raise MapError(f"a foot-target grid needs two actuators (one per foot coordinate); "
                       f"the case has {len(case.actuators)}: map its actuator angles instead")
    if steps < 2:
        raise MapError(f"--steps must be at least 2, got {steps}")
    link = linkage(case)
    foot = link.node_names.index(case.foot)
    starts, feet = _grid_feet(case, link, foot, steps, workers)
    seen = feet[np.isfinite(feet[:, 0])]
    if not seen.size:
        raise MapError("the leg reaches no pose of its actuator-angle grid")
    xs = _axis(x_mm, seen[:, 0], steps, "x")
    ys = _axis(y_mm, seen[:, 1], steps, "y")
    targets = [(float(x), float(y)) for x in xs for y in ys]
    at = np.asarray(targets)
    gap = np.linalg.norm(at[:, None, :] - np.nan_to_num(feet, nan=np.inf)[None, :, :], axis=-1)
    nearest = gap.argmin(axis=1)
    inside = _inside(at, feet, steps)
    items = [(k, t, starts[int(nearest[k])], bool(inside[k])) for k, t in enumerate(targets)]
    solved = map_items(partial(_reach, case, link, foot), items, workers, progress)
    return TargetGrid(tuple(a.name for a in case.actuators), (steps, steps), tuple(targets),
                      {k: a for k, a, _ in solved if a is not None},
                      {k: w for k, a, w in solved if a is None})


def _reach(case: Case, link: Linkage, foot: int,
           item: tuple[int, tuple[float, float], tuple[float, ...], bool]
           ) -> tuple[int, tuple[float, ...] | None, str]:
    """One target's actuator angles [rad] from the inverse kinematics, or why there are none."""
    index, target, start, inside = item
    if not inside:
        return index, None, ("outside the foot positions the angle grid reaches over the "
                             "actuators' ranges (a finer --steps samples the edge closer)")
    try:
        angles = solve_foot_target(link, foot, target, start_rad=start).angles_rad
    except PoseError as err:
        return index, None, str(err).replace("\n", " ")
    for a, x in zip(case.actuators, angles, strict=True):
        if (a.angle_min_rad is not None and x < a.angle_min_rad - 1e-9) or (
                a.angle_max_rad is not None and x > a.angle_max_rad + 1e-9):
            return index, None, (f"needs {a.name} at {math.degrees(x):.1f}°, outside its "
                                 "range")
    return index, tuple(float(x) for x in angles), ""


def target_map(case: Case, steps: int = DEFAULT_STEPS, x_mm: tuple[float, float] | None = None,
               y_mm: tuple[float, float] | None = None,
               progress: Callable[[int], None] | None = None,
               workers: int = WORKERS) -> WorkspaceMap:
    """Map the case over a grid of foot targets: the reachable ones evaluated as any pose
    (:func:`workspace_map` with their angles), the others rows with their reason; the rows
    in the targets' order (x slowest), ``progress`` counting targets solved, then poses."""
    grid = grid_targets(case, steps, x_mm, y_mm, workers, progress)
    reach = grid.reachable
    done = workspace_map(case, steps, progress, workers,
                         poses=[grid.angles_rad[k] for k in reach])
    rows = {k: replace(r, index=k) for k, r in zip(reach, done.rows, strict=True)}
    nan = math.nan
    lost = {k: PoseRow(k, (nan,) * len(case.actuators), False, nan, nan, nan, nan, nan, "",
                       nan, why=w) for k, w in grid.why.items()}
    every = {**rows, **lost}
    return WorkspaceMap(grid.mapped, (), grid.shape,
                        tuple(every[k] for k in range(len(grid.targets_mm))), grid.targets_mm)

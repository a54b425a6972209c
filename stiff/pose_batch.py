"""One design at many poses in one pass: what sweeps and maps compute for each pose.

The frame model of the case is built once (``stiff.build``) and its poses stacked into one
batched model: only the node positions and the springs' tensions change from pose to pose.
Every load case of ``stiff.loads`` is then solved for all poses together (one batched solve per
group of load cases sharing a model), the landing is estimated in each pose (its force-stroke
curve from batched solves of the leg with its actuators yielding), and every check runs once
over arrays of poses (``stiff.checks.check_rows``).

The numbers are those `stiff check` gives for the case in each pose: the same engine, formulas
and load cases; batched solves agree with one-by-one solves to round-off (tested). What is not
computed here: the report's energy breakdown, play and natural frequencies (asked for only by
play targets, see :func:`stiff.sweep`), and the check warnings.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace

import numpy as np
import numpy.typing as npt

from stiff.build import Built, spring_tensions
from stiff.case_model import BODY, Case
from stiff.checks import check_rows
from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext, LoadSet
from stiff.fe import FrameModel, compliance, node_dofs, preload_loads, solve_static
from stiff.fe.solve import Reductions
from stiff.fe.sound import solve_static_sound
from stiff.kinematics import Pose
from stiff.landing import LandingResult, curve_arrays, simulate_landing, simulate_landings
from stiff.linkage import part_index
from stiff.loads import (
    LoadCase,
    curve_from_responses,
    freed,
    held_foot,
    impact_forces,
    landing_damping,
    landing_mass,
    load_case_names,
    load_cases,
)
from stiff.yielding import Response, yield_responses

FloatArray = npt.NDArray[np.float64]
IMPACT_PREFIXES = ("landing", "slip")


def pose_xyz(case: Case, built: Built, poses: Sequence[Pose]) -> FloatArray:
    """(P, n_nodes, 3) every model node's position [mm] in each pose."""
    index = part_index(case)
    n = built.model.n_nodes
    part = np.zeros(n, np.intp)
    ref = np.zeros((n, 2))
    z = np.zeros(n)
    body = np.zeros(n, bool)
    for (name, node), i in built.node_of.items():
        ref[i] = case.nodes[node]
        body[i] = name == BODY
        z[i] = case.body_z_mm if body[i] else case.part(name).z_mm
        part[i] = 0 if body[i] else index[name]
    phi = np.array([p.rotation_rad for p in poses])[:, part]  # (P, n)
    shift = np.array([p.shift_mm for p in poses])[:, part]  # (P, n, 2)
    c, s = np.cos(phi), np.sin(phi)
    x = ref[:, 0] * c + ref[:, 1] * -s + shift[..., 0]
    y = ref[:, 0] * s + ref[:, 1] * c + shift[..., 1]
    xy = np.where(body[:, None], ref, np.stack([x, y], axis=-1))
    return np.concatenate([xy, np.broadcast_to(z[:, None], (*xy.shape[:-1], 1))], axis=-1)


@dataclass(frozen=True)
class PoseModels:
    """The case's frame model stacked over poses, and each spring's length [mm] in each."""

    model: FrameModel  # batch (P,)
    spring_length_mm: FloatArray  # (P, n_springs)


def pose_models(case: Case, built: Built, poses: Sequence[Pose]) -> PoseModels:
    """The batched model of ``built`` in every pose (positions and spring tensions)."""
    xyz = pose_xyz(case, built, poses)
    model = built.model
    springs = model.springs
    if not springs.count:
        return PoseModels(replace(model, xyz=xyz), np.zeros((len(poses), 0)))
    a, b = springs.nodes[:, 0], springs.nodes[:, 1]
    length = np.linalg.norm(xyz[:, b] - xyz[:, a], axis=-1)
    tension = spring_tensions(case, length)
    return PoseModels(replace(model, xyz=xyz, springs=replace(springs, tension=tension)),
                      length)


def _unit_up(model: FrameModel, foot: int, direction: float) -> FloatArray:
    loads = np.zeros((1, model.n_nodes, 6))
    loads[0, foot, 1] = direction
    return loads


def _responses_of(built: Built, model: FrameModel, direction: float,
                  memo: Reductions | None = None) -> list[Response]:
    """Each pose's :data:`stiff.loads.Response` of a batched model (None where a mechanism:
    with its actuators yielded the leg holds nothing more)."""
    sol, sound = solve_static_sound(model, _unit_up(model, built.foot, direction), memo)
    uy = sol.displacements[:, 0, built.foot, 1] * direction  # compliance: u_y per newton up
    torques = sol.connector_forces[:, 0, :, 5]
    driven = built.driven()
    return [(float(uy[p]), {a: float(torques[p, i]) for i, a in driven}) if sound[p] else None
            for p in range(uy.shape[0])]


@dataclass(frozen=True)
class PoseLandings:
    """The landing in each pose: the first pose's in full (for the load cases' descriptions)
    and every pose's peak foot force [N]."""

    first: LandingResult
    peak_N: FloatArray  # (P,)


def pose_landings(case: Case, built: Built, models: PoseModels, poses: Sequence[Pose],
                  jacobians: Sequence[FloatArray], memo: Reductions | None = None
                  ) -> PoseLandings | None:
    """The landing in each pose (as :func:`stiff.loads.landing` there), or None without a
    drop. The leg's response with each set of actuators yielded comes for all poses at once
    from the intact leg's solution (``stiff.yielding``), only for the sets some pose's curve
    reaches; the drops are simulated together
    (``stiff.landing.simulate_landings``, of which `stiff check`'s is the one-leg case)."""
    drop = landing_mass(case)
    height = case.loads.drop_height_mm
    if drop is None or height is None:
        return None
    mass, direction = drop
    cache: dict[frozenset[str], list[Response]] = {}
    update = yield_responses(built, models.model, direction, memo)

    def response_at(p: int) -> Callable[[frozenset[str]], Response]:
        def get(yielded: frozenset[str]) -> Response:
            if yielded not in cache:
                cache[yielded] = (update.response(yielded) if update is not None else
                                  _responses_of(built, freed(built, models.model, yielded),
                                                direction, memo))
            return cache[yielded][p]
        return get

    damping = landing_damping(case)
    pad = case.loads.foot_pad_N_per_mm
    curves = [curve_from_responses(case, pose, jac, pad, direction, response_at(p))
              for p, (pose, jac) in enumerate(zip(poses, jacobians, strict=True))]
    starts, forces, slopes = curve_arrays(curves)
    batch = simulate_landings(mass, height, starts, forces, slopes, damping)
    return PoseLandings(simulate_landing(mass, height, curves[0], damping), batch.peak_N)


@dataclass(frozen=True)
class _Group:
    """Load cases solved on one model: (held foot, stalled actuator) as in stiff.loads."""

    held: bool
    stalled: str | None
    cases: list[tuple[LoadCase, FloatArray]]  # each with its foot force (P, 3)


def _groups(cases: Sequence[tuple[LoadCase, FloatArray]]) -> list[_Group]:
    groups: dict[tuple[bool, str | None], _Group] = {}
    for lc, force in cases:
        key = (lc.foot_held, lc.stalled[0] if lc.stalled else None)
        groups.setdefault(key, _Group(key[0], key[1], [])).cases.append((lc, force))
    return list(groups.values())


def _group_loads(model: FrameModel, built: Built, group: _Group) -> FloatArray:
    """(P, c, n_nodes, 6) the group's loads in every pose."""
    P = model.batch_shape[0]
    loads = np.zeros((P, len(group.cases), model.n_nodes, 6))
    preload = preload_loads(model)
    for j, (lc, force) in enumerate(group.cases):
        loads[:, j, built.foot, :3] = force
        for nl in lc.extra:
            loads[:, j, nl.node, :3] += nl.force_N
            loads[:, j, nl.node, 3:] += nl.moment_Nmm
        if lc.with_preload:
            loads[:, j] += preload
    return loads


def solve_sets(case: Case, built: Built, models: PoseModels,
               cases: Sequence[tuple[LoadCase, FloatArray]], memo: Reductions | None = None
               ) -> dict[str, LoadSet]:
    """Every load case solved in every pose, as load sets (by name)."""
    out: dict[str, LoadSet] = {}
    driven = built.driven()
    base = models.model
    for g in _groups(cases):
        model = freed(built, base, frozenset({g.stalled})) if g.stalled else base
        model = held_foot(model, built.foot) if g.held else model
        sol = solve_static(model, _group_loads(model, built, g), memo)
        for j, (lc, _) in enumerate(g.cases):
            torque = sol.connector_forces[:, j, [i for i, _ in driven], 5].copy()
            for col, (_, a) in enumerate(driven):
                if lc.stalled is not None and lc.stalled[0] == a:
                    torque[:, col] = lc.stalled[1]
            forces = sol.spring_forces[:, j]
            rates = np.array([s.rate_N_per_mm for s in case.springs])
            tension = np.broadcast_to(model.springs.tension, forces.shape)
            one = type(sol)(**{f: getattr(sol, f)[:, j:j + 1]
                               for f in type(sol).__dataclass_fields__})
            out[lc.name] = LoadSet(
                name=lc.name, foot_held=lc.foot_held, model=model, solution=one,
                xyz_mm=np.asarray(model.xyz), connector_forces=sol.connector_forces[:, j],
                beam_forces=sol.beam_forces[:, j],
                foot_deflection_mm=sol.displacements[:, j, built.foot, :3],
                actuator_names=tuple(a for _, a in driven), actuator_torque_Nmm=torque,
                stall_torque_Nmm=np.array([case.actuator(a).stall_torque_Nmm
                                           for _, a in driven]),
                spring_names=tuple(s.name for s in case.springs), spring_force_N=forces,
                spring_length_mm=models.spring_length_mm + (forces - tension) / rates
                if case.springs else np.zeros(forces.shape),
                spring_max_mm=tuple(s.max_length_mm for s in case.springs))
    return out


@dataclass(frozen=True)
class PoseChecks:
    """A case checked in P poses at once.

    ``compliance_mm_per_N`` is the foot's 3x3 compliance (x, y in the linkage plane, z out of
    it) in each pose; ``rows`` every check over the poses (``stiff.checks.base.CheckRows``,
    each of length P); ``landings`` the landing in each pose (None without a drop).
    """

    case: Case
    built: Built
    poses: tuple[Pose, ...]
    compliance_mm_per_N: FloatArray  # (P, 3, 3)
    landings: PoseLandings | None
    load_case_names: tuple[str, ...]
    rows: tuple[CheckRows, ...]
    factors: FloatArray  # (rows, P) every row's safety factor in every pose (∞: none)
    required: FloatArray  # (rows,) every row's required factor
    utilisations: FloatArray  # (rows, P) required over actual factor (0 where ∞)

    def lowest(self, load_cases: Sequence[str] | None = None
               ) -> tuple[FloatArray, list[CheckRows | None]]:
        """(P,) the minimum safety factor in each pose over the checks of ``load_cases``
        (every load case by default), and the row that gives it (None: no check); ties go
        to the first row, as `stiff check`'s records are ordered."""
        P = len(self.poses)
        picked = np.array([load_cases is None or r.load_case in load_cases
                           for r in self.rows], bool)
        if not picked.any():
            return np.full(P, math.inf), [None] * P
        index = np.flatnonzero(picked)
        sf = self.factors[index]
        at = np.argmin(sf, axis=0)
        low = sf[at, np.arange(P)]
        return low, [self.rows[int(index[k])] if math.isfinite(low[p]) else None
                     for p, k in enumerate(at)]


def check_poses(case: Case, built: Built, poses: Sequence[Pose],
                jacobians: Sequence[FloatArray],
                landing_at: tuple[Sequence[Pose], Sequence[FloatArray]] | None = None,
                screen: bool = False, only: Sequence[str] | None = None) -> PoseChecks:
    """Check the case built as ``built`` in every one of ``poses`` at once.

    Parameters
    ----------
    case, built : the case and its frame model in any pose (its layout is used)
    poses : the poses to check; ``jacobians`` their foot Jacobians [mm/rad]
    landing_at : the poses (and Jacobians) the landing and slips are taken in, one per pose
        (a case with a landing pose of its own); by default each pose itself
    screen : solve the frame's buckling factor only where it can decide a pose's results
        (``stiff.checks.check_rows``); its rows elsewhere hold a lower bound
    only : the names of the load cases to solve and check (all by default; unknown names are
        ignored here, see :func:`stiff.loads.load_case_names`)
    """
    models = pose_models(case, built, poses)
    land_poses, land_jac = landing_at if landing_at is not None else (poses, jacobians)
    land_models = models if landing_at is None else pose_models(case, built, land_poses)
    lands = only is None or any(n.startswith(IMPACT_PREFIXES) for n in only)
    memo = Reductions()
    landings = (pose_landings(case, built, land_models, land_poses, land_jac, memo) if lands
                else None)
    every = load_cases(case, built, landings.first if landings else None)
    template = every if only is None else tuple(lc for lc in every if lc.name in only)
    P = len(poses)
    peaks = landings.peak_N if landings else np.zeros(P)
    impact = {k: np.stack(v, axis=-1) for k, v in impact_forces(case, peaks).items()}
    rest, hits = [], []
    for lc in template:
        force = impact.get(lc.name)
        if force is not None:
            hits.append((lc, force))
        else:
            rest.append((lc, np.broadcast_to(np.asarray(lc.foot_force_N, float), (P, 3))))
    sets = solve_sets(case, built, models, rest, memo)
    sets.update(solve_sets(case, built, land_models, hits, memo))
    ordered = tuple(sets[lc.name] for lc in template)
    names = None if only is None else load_case_names(case)
    rows = check_rows(CheckContext(case, built, ordered, names, memo), screen=screen)
    C = compliance(models.model, node_dofs(models.model, built.foot, "ux uy uz"), memo)
    C = 0.5 * (C + np.swapaxes(C, -1, -2))  # as stiff.stiffness.foot_stiffness
    factors, required, utilisations = _factor_table(rows, len(poses))
    return PoseChecks(case=case, built=built, poses=tuple(poses), compliance_mm_per_N=C,
                      landings=landings,
                      load_case_names=tuple(lc.name for lc in template), rows=rows,
                      factors=factors, required=required, utilisations=utilisations)


def _factor_table(rows: Sequence[CheckRows], P: int
                  ) -> tuple[FloatArray, FloatArray, FloatArray]:
    """(factors (rows, P), required (rows,), utilisations (rows, P)) of the rows."""
    if not rows:
        return np.zeros((0, P)), np.zeros(0), np.zeros((0, P))
    sf = np.stack([r.safety_factors for r in rows])
    required = np.array([r.required_factor for r in rows], float)
    util = np.where(np.isfinite(sf), np.inf, 0.0)  # a zero capacity: infinite utilisation
    with np.errstate(over="ignore"):
        np.divide(required[:, None], sf, out=util, where=np.isfinite(sf) & (sf > 0.0))
    return sf, required, util

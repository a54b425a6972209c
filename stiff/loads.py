"""Load cases from a case's duty, solved through the frame model.

* stance: the leg's share of the robot's weight pushing up on the foot (or, for an arm, its
  payload hanging from it), with the springs' preload;
* landing: the peak foot force of a drop (``stiff.landing``), straight up;
* slip fore / slip aft: the landing force with a tangential part μN, and a lateral part of
  ``lateral_fraction`` of N out of the plane (the foot skidding sideways);
* lateral push: without a drop, ``lateral_fraction`` of the static force sideways;
* stall: each actuator at its stall torque, both ways, with the foot held by the ground
  (an actuator can break its own linkage);
* the case's own static loads at any node.

Defaults and their provenance (used when the case does not say):

* legs sharing a landing: the legs in stance (the case's ``legs_in_stance``, else ``legs``);
* damping of the landing: none (ζ = 0), which gives the highest peak (conservative);
* friction μ for slip: 0.5 (common practice for printed or rubber feet on hard floors; give
  your own);
* lateral fraction: 0.2 of the vertical force (common practice for a foot skidding sideways).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Collection
from dataclasses import dataclass, replace
from typing import TypeVar

import numpy as np

from stiff.build import Built
from stiff.case_model import Case
from stiff.errors import MechanismError
from stiff.fe import (
    FrameModel,
    Solution,
    compliance,
    node_dofs,
    preload_loads,
    solve_static,
    stack,
)
from stiff.kinematics import Pose
from stiff.landing import ForceCurve, LandingResult, Stage, simulate_landing
from stiff.units import G_MM_PER_S2
from stiff.yielding import Response, yield_responses

F = TypeVar("F", float, np.ndarray)

DEFAULT_FRICTION = 0.5
DEFAULT_LATERAL_FRACTION = 0.2
DEFAULT_DAMPING = 0.0
#: Load cases the deflection targets apply to unless the case names its own: the static
#: ones, where a designer asks how precisely the foot holds its place.
STATIC_CASES = ("stance", "payload", "lateral push")


@dataclass(frozen=True)
class NodeLoad:
    """A force [N] and moment [N·mm] at one model node."""

    node: int
    force_N: tuple[float, float, float]
    moment_Nmm: tuple[float, float, float] = (0.0, 0.0, 0.0)


@dataclass(frozen=True)
class LoadCase:
    """One load case: what pushes where, and whether the ground holds the foot."""

    name: str
    description: str
    foot_force_N: tuple[float, float, float]
    extra: tuple[NodeLoad, ...] = ()
    foot_held: bool = False
    with_preload: bool = True
    stalled: tuple[str, float] | None = None  # an actuator applying its stall torque [N·mm]


@dataclass(frozen=True)
class ActuatorDemand:
    """An actuator's torque in a load case [N·mm] against its stall torque."""

    name: str
    torque_Nmm: float
    stall_torque_Nmm: float
    saturating_foot_force_N: float | None  # |foot force| at which it would stall, this case

    @property
    def margin(self) -> float:
        """Stall torque over demand (∞ when the demand is zero)."""
        if abs(self.torque_Nmm) <= 1e-9 * self.stall_torque_Nmm:
            return math.inf
        return self.stall_torque_Nmm / abs(self.torque_Nmm)


@dataclass(frozen=True)
class SpringState:
    """A spring's tension [N] and length [mm] in a load case."""

    name: str
    force_N: float
    length_mm: float
    max_length_mm: float | None


@dataclass(frozen=True)
class LoadCaseResult:
    """One solved load case."""

    case: LoadCase
    foot_deflection_mm: tuple[float, float, float]
    actuators: tuple[ActuatorDemand, ...]
    springs: tuple[SpringState, ...]
    solution: Solution  # element and joint forces for the checks (one load case)
    model: FrameModel  # the model it was solved on (the foot held or not)

    @property
    def name(self) -> str:
        """The load case's name."""
        return self.case.name


def weight_on_leg_N(case: Case) -> tuple[float, str]:
    """The vertical foot force of standing [N, + up] and its basis."""
    loads = case.loads
    if loads.payload_t is not None:
        return -loads.payload_t * G_MM_PER_S2, (
            f"the weight of a {loads.payload_t * 1e3:g} kg payload hanging from the foot node")
    if loads.robot_mass_t is None:
        return 10.0, ("no robot mass in the case: a 10 N upward foot force is used to show the "
                      "actuator torques; give loads.robot_mass_kg")
    legs = loads.legs_in_stance or loads.legs
    return loads.robot_mass_t * G_MM_PER_S2 / legs, (
        f"robot weight {loads.robot_mass_t * 1e3:g} kg × g shared by {legs} legs in stance")


def _vertical_compliance(model: FrameModel, foot: int) -> float:
    return float(compliance(model, node_dofs(model, foot, "uy"))[0, 0])


def freed(built: Built, model: FrameModel, actuators: Collection[str]) -> FrameModel:
    """``model`` (``built``'s, or a batch of it) with the twist stiffness of the given
    actuators removed: they yield, or are the load."""
    k = np.array(model.connectors.stiffness, copy=True)
    for i, a in built.driven():
        if a in actuators:
            k[..., i, 5] = 0.0
    return replace(model, connectors=replace(model.connectors, stiffness=k))


def _torque_rates(model: FrameModel, built: Built, direction: float) -> dict[str, float]:
    """Actuator torque [N·mm] per newton of foot force along ``direction`` (±1) in y."""
    loads = np.zeros((1, model.n_nodes, 6))
    loads[0, built.foot, 1] = direction
    sol = solve_static(model, loads)
    return {a: float(sol.connector_forces[0, i, 5]) for i, a in built.driven()}


def yielded_response(built: Built, direction: float, yielded: frozenset[str]) -> Response:
    """The model's response with the ``yielded`` actuators' holding stiffness taken out (with
    none yielded a mechanism raises: the leg cannot stand)."""
    if not yielded:
        return (_vertical_compliance(built.model, built.foot),
                _torque_rates(built.model, built, direction))
    model = freed(built, built.model, yielded)
    try:
        return (_vertical_compliance(model, built.foot),
                _torque_rates(model, built, direction))
    except MechanismError:
        return None


def landing_curve(case: Case, built: Built, pose: Pose, jacobian: np.ndarray,
                  pad_N_per_mm: float | None, direction: float = 1.0) -> ForceCurve:
    """The leg's vertical force-stroke curve: elastic, then actuators yielding one by one.

    ``direction`` is +1 when the ground pushes the foot up (a leg landing), −1 when a mass
    hanging from the foot pulls it down (an arm's payload dropping onto it). ``jacobian`` is
    d(foot x, y)/d(actuator angles) [mm/rad] at the pose, used for how far a yielding joint
    turns per millimetre of stroke (to find where it reaches its limit).
    """
    update = yield_responses(built, stack([built.model]), direction)
    if update is None:  # an actuator held rigidly: solve each yielded set anew
        return curve_from_responses(
            case, pose, jacobian, pad_N_per_mm, direction,
            lambda yielded: yielded_response(built, direction, yielded))
    return curve_from_responses(case, pose, jacobian, pad_N_per_mm, direction,
                                lambda yielded: update.response(yielded)[0])


def curve_from_responses(case: Case, pose: Pose, jacobian: np.ndarray,
                         pad_N_per_mm: float | None, direction: float,
                         response: Callable[[frozenset[str]], Response]) -> ForceCurve:
    """:func:`landing_curve` from the leg's response with each set of actuators yielded
    (``response``, see :data:`Response`; the set of none must not be a mechanism)."""
    pad = 0.0 if pad_N_per_mm is None else 1.0 / pad_N_per_mm
    first = response(frozenset())
    if first is None:
        raise MechanismError("the leg is a mechanism before any actuator yields")
    compliance0, rates = first
    k0 = 1.0 / (compliance0 + pad)
    stages = [Stage(0.0, 0.0, k0, "elastic")]
    names = [a.name for a in case.actuators]
    yielded: set[str] = set()
    force, stroke = 0.0, 0.0
    torque = {a: 0.0 for a in names}
    while len(yielded) < len(names):
        slope = stages[-1].slope_N_per_mm
        best: tuple[float, str] | None = None
        for a in names:
            if a in yielded or rates.get(a, 0.0) == 0.0:
                continue
            stall = case.actuator(a).stall_torque_Nmm
            rate = rates[a]
            room = (stall - torque[a] * math.copysign(1.0, rate)) / abs(rate)
            if room >= 0 and (best is None or room < best[0]):
                best = (room, a)
        if best is None or slope <= 0.0:
            break
        extra, a = best
        for b in names:
            if b not in yielded:
                torque[b] += rates.get(b, 0.0) * extra
        force += extra
        stroke += extra / slope
        yielded.add(a)
        after = response(frozenset(yielded))
        slope_next, rates = (0.0, {}) if after is None else (1.0 / (after[0] + pad), after[1])
        stages.append(Stage(stroke, force, slope_next, f"{a} reaches its stall torque"))
        limit = _stroke_to_limit(case, a, pose, jacobian, direction)
        if limit is not None and slope_next < k0:
            stages.append(Stage(stroke + limit, force + slope_next * limit, k0,
                                f"{a} reaches its angle limit: the leg bottoms out"))
            break
    return ForceCurve(tuple(stages))


def _stroke_to_limit(case: Case, actuator: str, pose: Pose, jacobian: np.ndarray,
                     direction: float) -> float | None:
    """Foot stroke [mm] from the pose until a yielding actuator reaches its angle limit."""
    i = [a.name for a in case.actuators].index(actuator)
    a = case.actuators[i]
    dy = direction * float(jacobian[1, i])  # mm of foot travel along the force per rad
    if dy == 0.0:
        return None
    angle = float(pose.angles_rad[i])
    # the load pushes the foot along ``direction``: the joint turns the way that moves it so
    limit = a.angle_max_rad if dy > 0 else a.angle_min_rad
    if limit is None:
        return None
    return abs(limit - angle) * abs(dy)


def landing_mass(case: Case) -> tuple[float, float] | None:
    """(mass [t] landing on one leg, direction: +1 the ground pushes the foot up, −1 a hanging
    payload pulls it down), or None when the case gives no drop."""
    loads = case.loads
    if loads.drop_height_mm is None:
        return None
    if loads.payload_t is not None:
        return loads.payload_t, -1.0
    if loads.robot_mass_t is not None:
        legs = loads.legs_sharing_landing or loads.legs_in_stance or loads.legs
        return loads.robot_mass_t / legs, 1.0
    return None


def landing_damping(case: Case) -> float:
    """The landing's damping ratio ζ: the case's, else :data:`DEFAULT_DAMPING`."""
    ratio = case.loads.damping_ratio
    return ratio if ratio is not None else DEFAULT_DAMPING


def landing(case: Case, built: Built, pose: Pose, jacobian: np.ndarray) -> LandingResult | None:
    """The landing of the case's drop, or None when the case gives no drop height."""
    drop = landing_mass(case)
    if drop is None or case.loads.drop_height_mm is None:
        return None
    mass, direction = drop
    curve = landing_curve(case, built, pose, jacobian, case.loads.foot_pad_N_per_mm, direction)
    return simulate_landing(mass, case.loads.drop_height_mm, curve, landing_damping(case))


def load_case_names(case: Case) -> tuple[str, ...]:
    """The names of the case's load cases, in the order :func:`load_cases` makes them."""
    loads = case.loads
    out = ["payload" if loads.payload_t is not None else "stance"]
    if landing_mass(case) is not None:
        out.append("landing")
        if loads.payload_t is None:
            out += ["slip fore", "slip aft"]
    out.append("lateral push")
    for a in case.actuators:
        out += [f"stall {a.name} +", f"stall {a.name} −"]
    out += [s.name for s in loads.static]
    return tuple(out)


def impact_forces(case: Case, N: F) -> dict[str, tuple[F, F, F]]:
    """Foot force (x, y, z) [N] of the landing and slip cases for a landing peak N [N] (a float
    or an array of peaks, one per pose): the landing straight along the weight's line, the
    slips with μN fore or aft and a lateral fraction of N sideways."""
    loads = case.loads
    weight, _ = weight_on_leg_N(case)
    mu = loads.friction if loads.friction is not None else DEFAULT_FRICTION
    lam = (loads.lateral_fraction if loads.lateral_fraction is not None
           else DEFAULT_LATERAL_FRACTION)
    up = 1.0 if weight >= 0 else -1.0
    zero = N * 0.0
    out = {"landing": (zero, up * N, zero)}
    if loads.payload_t is None:
        for sign, label in ((1.0, "fore"), (-1.0, "aft")):
            out[f"slip {label}"] = (sign * mu * N, N, lam * N)
    return out


def load_cases(case: Case, built: Built, land: LandingResult | None) -> tuple[LoadCase, ...]:
    """Every load case of the case, with where its forces come from."""
    loads = case.loads
    weight, basis = weight_on_leg_N(case)
    name = "payload" if loads.payload_t is not None else "stance"
    way = "upward" if weight >= 0 else "downward"
    out = [LoadCase(name, f"{way} foot force {abs(weight):.3g} N ({basis}), with the springs' "
                          "preload", (0.0, weight, 0.0))]
    mu = loads.friction if loads.friction is not None else DEFAULT_FRICTION
    lam = (loads.lateral_fraction if loads.lateral_fraction is not None
           else DEFAULT_LATERAL_FRACTION)
    if land is not None:
        N = land.peak_N
        forces = impact_forces(case, N)
        out.append(LoadCase("landing", f"peak foot force {N:.3g} N of a {land.drop_height_mm:g}"
                                       f" mm drop of {land.mass_t * 1e3:.3g} kg "
                                       f"({land.peak_over_weight:.2f} × its weight)",
                            forces["landing"]))
        for label in ("fore", "aft") if loads.payload_t is None else ():
            out.append(LoadCase(f"slip {label}", f"landing force {N:.3g} N with friction "
                                                 f"{mu:g} × N {label} and {lam:g} × N "
                                                 "sideways", forces[f"slip {label}"]))
    side = abs(weight) * lam
    out.append(LoadCase("lateral push", f"sideways foot force {side:.3g} N ({lam:g} of the "
                                        f"{name} force), out of the linkage plane",
                        (0.0, 0.0, side), with_preload=False))
    for a in case.actuators:
        for sign, label in ((1.0, "+"), (-1.0, "−")):
            tau = sign * a.stall_torque_Nmm
            out.append(LoadCase(f"stall {a.name} {label}",
                                f"{a.name} at its stall torque {a.stall_torque_Nmm / 1e3:g} N·m"
                                f" ({label}), the foot held by the ground",
                                (0.0, 0.0, 0.0), _stall_moments(built, a.name, tau),
                                foot_held=True, stalled=(a.name, tau)))
    for s in loads.static:
        node = built.node_of[(s.part, s.node)]
        out.append(LoadCase(s.name, f"the case's static load at {s.node} on {s.part}",
                            (0.0, 0.0, 0.0),
                            (NodeLoad(node, s.force_N, s.moment_Nmm),), with_preload=False))
    return tuple(out)


def _stall_moments(built: Built, actuator: str, tau: float) -> tuple[NodeLoad, ...]:
    """The actuator's torque as equal and opposite moments on its two parts.

    The stalled actuator is a torque source: its holding stiffness is taken out of the model
    for this case (see ``solve_load_cases``), the foot held by the ground stops the motion.
    """
    i = next(i for i, a in built.driven() if a == actuator)
    a, b = (int(n) for n in built.model.connectors.nodes[i])
    return (NodeLoad(b, (0.0, 0.0, 0.0), (0.0, 0.0, tau)),
            NodeLoad(a, (0.0, 0.0, 0.0), (0.0, 0.0, -tau)))


def _load_array(model: FrameModel, built: Built, lc: LoadCase) -> np.ndarray:
    loads = np.zeros((model.n_nodes, 6))
    loads[built.foot, :3] = lc.foot_force_N
    for nl in lc.extra:
        loads[nl.node, :3] += nl.force_N
        loads[nl.node, 3:] += nl.moment_Nmm
    if lc.with_preload:
        loads += preload_loads(model)
    return loads


def held_foot(model: FrameModel, foot: int) -> FrameModel:
    """The model with the foot's translations held (the foot on the ground)."""
    fixed = model.fixed.copy()
    fixed[foot, :3] = True
    return replace(model, fixed=fixed)


def solve_load_cases(case: Case, built: Built, cases: tuple[LoadCase, ...]
                     ) -> tuple[LoadCaseResult, ...]:
    """Solve every load case: those with a free foot together, those with a held foot
    together."""
    results: dict[int, LoadCaseResult] = {}
    groups: dict[tuple[bool, str | None], list[int]] = {}
    for i, lc in enumerate(cases):
        groups.setdefault((lc.foot_held, lc.stalled[0] if lc.stalled else None), []).append(i)
    for (held, stalled), chosen in groups.items():
        model = freed(built, built.model, {stalled}) if stalled else built.model
        model = held_foot(model, built.foot) if held else model
        loads = np.stack([_load_array(model, built, cases[i]) for i in chosen])
        sol = solve_static(model, loads)
        for j, i in enumerate(chosen):
            results[i] = _result(case, built, model, cases[i], _one(sol, j))
    return tuple(results[i] for i in range(len(cases)))


def _one(sol: Solution, j: int) -> Solution:
    """Load case j of a solution, as a one-case solution."""
    return Solution(**{f: getattr(sol, f)[j:j + 1] for f in Solution.__dataclass_fields__})


def _result(case: Case, built: Built, model: FrameModel, lc: LoadCase, sol: Solution
            ) -> LoadCaseResult:
    foot_force = math.sqrt(sum(f * f for f in lc.foot_force_N))
    demand = []
    for i, a in built.driven():
        torque = float(sol.connector_forces[0, i, 5])
        if lc.stalled is not None and lc.stalled[0] == a:
            torque = lc.stalled[1]
        stall = case.actuator(a).stall_torque_Nmm
        sat = (stall * foot_force / abs(torque)
               if foot_force > 0 and abs(torque) > 1e-9 * stall else None)
        demand.append(ActuatorDemand(a, torque, stall, sat))
    springs = []
    for k, s in enumerate(case.springs):
        force = float(sol.spring_forces[0, k])
        stretch = (force - float(model.springs.tension[k])) / s.rate_N_per_mm
        springs.append(SpringState(s.name, force, built.spring_length_mm[k] + stretch,
                                   s.max_length_mm))
    d = sol.displacements[0, built.foot, :3]
    return LoadCaseResult(case=lc, foot_deflection_mm=(float(d[0]), float(d[1]), float(d[2])),
                          actuators=tuple(demand), springs=tuple(springs), solution=sol,
                          model=model)

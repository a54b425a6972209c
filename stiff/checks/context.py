"""What the checks read: the case, its model, the solved load cases, and the forces on each
part at each joint and at each member end.

Every load case is a :class:`LoadSet`: the same load case at B poses (or variants) of one
model, solved together. `stiff check` has B = 1; sweeps and maps stack many poses (or
variants) of the same linkage, so every check runs once over arrays whose first axis is B.
All forces below are arrays with that leading axis.

Forces at a joint come from the connectors: a connector from part a's node to part b's node
carries f = k·Δ (``stiff.fe.results``), which pushes part a by +f and part b by −f. A part at a
pin joined to two neighbours (the middle of a clevis) takes the sum from both connectors.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from stiff.build import Built
from stiff.case_model import BODY, Case, Joint, Part
from stiff.checks.allowables import Duty, FailureKind, duty
from stiff.fe import FrameModel, Solution, stack
from stiff.fe.solve import Reductions
from stiff.loads import LoadCaseResult

FloatArray = npt.NDArray[np.float64]


def _rows(a: npt.ArrayLike, *tail: int) -> FloatArray:
    """``a`` as (B, *tail) float64 (a batch axis in front; one pose when there is none)."""
    arr = np.asarray(a, np.float64)
    return arr.reshape(-1, *tail) if arr.size else arr.reshape(1, *tail)


#: Element forces below this fraction of the largest force (or moment) of their load case are
#: round-off of the solve, not load: they are set to zero, so that no check is made of noise
#: (a planar linkage pushed sideways has in-plane forces of ~1e-11 of the load) and the same
#: checks are made whether poses are solved one by one or together.
ROUND_OFF = 1e-9
FORCE_COLUMNS = {6: (0, 1, 2), 12: (0, 1, 2, 6, 7, 8)}  # the rest are moments [N·mm]


def _split(a: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(forces, moments) columns of connector (6) or member-end (12) force arrays."""
    cols = np.zeros(a.shape[-1], bool)
    cols[list(FORCE_COLUMNS[a.shape[-1]])] = True
    return a[..., cols], a[..., ~cols]


def quiet(connector: FloatArray, beam: FloatArray) -> tuple[FloatArray, FloatArray]:
    """Connector (B, nc, 6) and member-end (B, nb, 12) forces with round-off set to zero:
    entries below :data:`ROUND_OFF` of the largest force or moment of their pose."""
    parts = [_split(connector), _split(beam)]
    out = []
    for which in (0, 1):  # forces, moments
        scale = np.zeros(connector.shape[0])
        for p in parts:
            if p[which].size:
                scale = np.maximum(scale, np.abs(p[which]).reshape(len(scale), -1).max(axis=1))
        out.append(ROUND_OFF * scale)
    cleaned = []
    for a in (connector, beam):
        cols = np.zeros(a.shape[-1], bool)
        cols[list(FORCE_COLUMNS[a.shape[-1]])] = True
        floor = np.where(cols, out[0][:, None, None], out[1][:, None, None])
        cleaned.append(np.where(np.abs(a) < floor, 0.0, a))
    return cleaned[0], cleaned[1]


@dataclass(frozen=True)
class LoadSet:
    """One load case solved at B poses (or variants) of the same model layout.

    ``solution`` holds one load case per model: arrays (1, ...) for one model, (B, 1, ...) for
    a batch; the fields below are the same numbers with the batch axis first, shape (B, ...).
    Actuator torques are in the order of ``actuator_names`` (each driven connector's actuator,
    the stalled one at its stall torque), springs in the case's order.
    """

    name: str
    foot_held: bool
    model: FrameModel  # the model it was solved on (batch () or (B,)), foot held or not
    solution: Solution
    xyz_mm: FloatArray  # (B, n_nodes, 3) node positions
    connector_forces: FloatArray  # (B, n_connectors, 6)
    beam_forces: FloatArray  # (B, n_beams, 12)
    foot_deflection_mm: FloatArray  # (B, 3)
    actuator_names: tuple[str, ...]
    actuator_torque_Nmm: FloatArray  # (B, n_actuators)
    stall_torque_Nmm: FloatArray  # (n_actuators,)
    spring_names: tuple[str, ...]
    spring_force_N: FloatArray  # (B, n_springs)
    spring_length_mm: FloatArray  # (B, n_springs)
    spring_max_mm: tuple[float | None, ...]

    def __post_init__(self) -> None:
        connector, beam = quiet(self.connector_forces, self.beam_forces)
        object.__setattr__(self, "connector_forces", connector)
        object.__setattr__(self, "beam_forces", beam)

    @property
    def size(self) -> int:
        """B, the poses (or variants) solved."""
        return int(self.xyz_mm.shape[0])

    @classmethod
    def of(cls, result: LoadCaseResult) -> LoadSet:
        """The load set (B = 1) of one solved load case of `stiff check`."""
        model, sol = result.model, result.solution
        n_act, n_spr = len(result.actuators), len(result.springs)
        return cls(
            name=result.name, foot_held=result.case.foot_held, model=model, solution=sol,
            xyz_mm=_rows(model.xyz, model.n_nodes, 3),
            connector_forces=_rows(sol.connector_forces, model.connectors.count, 6),
            beam_forces=_rows(sol.beam_forces, model.beams.count, 12),
            foot_deflection_mm=_rows(result.foot_deflection_mm, 3),
            actuator_names=tuple(a.name for a in result.actuators),
            actuator_torque_Nmm=_rows([a.torque_Nmm for a in result.actuators], n_act),
            stall_torque_Nmm=np.array([a.stall_torque_Nmm for a in result.actuators], float),
            spring_names=tuple(s.name for s in result.springs),
            spring_force_N=_rows([s.force_N for s in result.springs], n_spr),
            spring_length_mm=_rows([s.length_mm for s in result.springs], n_spr),
            spring_max_mm=tuple(s.max_length_mm for s in result.springs))


@dataclass(frozen=True)
class CheckContext:
    """Everything a check module needs.

    ``results`` may be solved load cases of `stiff check` (each becomes a load set of one
    pose) or load sets; the checks read :attr:`loads`.
    """

    case: Case
    built: Built
    results: Sequence[LoadCaseResult | LoadSet]
    #: every load case of the case, when only some are solved (sweeps over chosen load cases):
    #: names the case refers to (deflection targets) are checked against these
    load_case_names: tuple[str, ...] | None = None
    #: the engine's reductions kept for this check (``stiff.fe.solve.Reductions``), if any
    memo: Reductions | None = None
    loads: tuple[LoadSet, ...] = field(init=False)

    def __post_init__(self) -> None:
        sets = tuple(r if isinstance(r, LoadSet) else LoadSet.of(r) for r in self.results)
        object.__setattr__(self, "loads", sets)

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
    """The force and moment the pin puts on one part at a joint, global axes, at B poses.

    ``force_N`` (B, 3) and ``moment_Nmm`` (B, 3); ``planes`` are the in-plane forces [N], (B,)
    each, across each shear plane of the pin that touches this part (one per neighbour).
    """

    joint: Joint
    part: str
    force_N: FloatArray
    moment_Nmm: FloatArray
    planes: tuple[FloatArray, ...]

    @property
    def bearing_N(self) -> FloatArray:
        """(B,) in-plane (bearing) force on the part [N]."""
        return np.hypot(self.force_N[:, 0], self.force_N[:, 1])

    @property
    def tilt_Nmm(self) -> FloatArray:
        """(B,) moment about the in-plane axes: the pin tilting in the part's bore [N·mm]."""
        return np.hypot(self.moment_Nmm[:, 0], self.moment_Nmm[:, 1])


def joint_connectors(built: Built, joint: Joint) -> list[tuple[int, str, str]]:
    """(connector index, part a, part b) of every connector of a joint, in its parts' order."""
    out: list[tuple[int, str, str]] = []
    for i, name in enumerate(built.connector_joint):
        if name == joint.name:
            k = len(out)
            out.append((i, joint.parts[k], joint.parts[k + 1]))
    return out


def joint_forces(ctx: CheckContext, loads: LoadSet, joint: Joint) -> list[JointForce]:
    """Force on every part (not the body) at a joint in one load set."""
    forces = loads.connector_forces
    totals: dict[str, FloatArray] = {}
    planes: dict[str, list[FloatArray]] = {}
    for i, a, b in joint_connectors(ctx.built, joint):
        f = forces[:, i]
        shear = np.hypot(f[:, 0], f[:, 1])
        for part, sign in ((a, 1.0), (b, -1.0)):
            totals[part] = totals.get(part, np.zeros_like(f)) + sign * f
            planes.setdefault(part, []).append(shear)
    return [JointForce(joint, p, totals[p][:, :3], totals[p][:, 3:], tuple(planes[p]))
            for p in joint.parts if p != BODY]


@dataclass(frozen=True)
class MemberForces:
    """A member's internal forces at its two ends in one load set, local axes, at B poses.

    axial [N] (tension +), shear_y, shear_z [N], torque [N·mm], and bending moments about
    local y (out of plane) and z (in plane) [N·mm]; each (B,), the end pairs (end 1, end 2).
    ``length_mm`` is (B,) too (the pose can change a member's chord only through round-off).
    """

    index: int
    part: Part
    segment: tuple[str, str]
    length_mm: FloatArray
    axial_N: FloatArray
    shear_y_N: tuple[FloatArray, FloatArray]
    shear_z_N: tuple[FloatArray, FloatArray]
    torque_Nmm: FloatArray
    moment_y_Nmm: tuple[FloatArray, FloatArray]
    moment_z_Nmm: tuple[FloatArray, FloatArray]


def member_lengths(ctx: CheckContext, loads: LoadSet) -> FloatArray:
    """(B, n_beams) length of every member [mm]."""
    nodes = ctx.built.model.beams.nodes
    xyz = loads.xyz_mm
    lengths: FloatArray = np.linalg.norm(xyz[:, nodes[:, 1]] - xyz[:, nodes[:, 0]], axis=-1)
    return lengths


def member_forces(ctx: CheckContext, loads: LoadSet) -> list[MemberForces]:
    """Internal forces of every member in one load set."""
    f = loads.beam_forces
    lengths = member_lengths(ctx, loads)
    out = []
    for i, part_name in enumerate(ctx.built.beam_part):
        e = f[:, i]
        out.append(MemberForces(
            index=i, part=ctx.case.part(part_name), segment=ctx.built.beam_segment[i],
            length_mm=lengths[:, i], axial_N=e[:, 6],
            shear_y_N=(e[:, 1], e[:, 7]), shear_z_N=(e[:, 2], e[:, 8]), torque_Nmm=e[:, 9],
            moment_y_Nmm=(e[:, 4], e[:, 10]), moment_z_Nmm=(e[:, 5], e[:, 11])))
    return out


def member_direction(ctx: CheckContext, loads: LoadSet, part: Part, node: str
                     ) -> FloatArray | None:
    """(B, 2) unit vector (x, y) along the part from ``node`` towards its next node, in each
    pose of the load set (None when the part has no member at the node; a zero row where the
    member has no length in the plane)."""
    for a, b in part.segments:
        if node in (a, b):
            other = b if node == a else a
            p = loads.xyz_mm[:, ctx.built.node_of[(part.name, node)], :2]
            q = loads.xyz_mm[:, ctx.built.node_of[(part.name, other)], :2]
            d = q - p
            n = np.linalg.norm(d, axis=-1, keepdims=True)
            out: FloatArray = np.divide(d, n, out=np.zeros_like(d), where=n > 0)
            return out
    return None


def stack_loads(sets: Sequence[LoadSet]) -> LoadSet:
    """One load set of B = Σ B_i from load sets of the same load case and model layout (for
    tests, and to check many poses at once); each set's model must be a single model."""
    first = sets[0]
    if any(s.name != first.name or s.foot_held != first.foot_held for s in sets):
        raise ValueError("load sets stacked together must be the same load case")

    def cat(get: str) -> FloatArray:
        return np.concatenate([getattr(s, get) for s in sets])

    solution = Solution(**{name: np.stack([getattr(s.solution, name) for s in sets])
                           for name in Solution.__dataclass_fields__})
    return LoadSet(
        name=first.name, foot_held=first.foot_held, model=stack([s.model for s in sets]),
        solution=solution, xyz_mm=cat("xyz_mm"), connector_forces=cat("connector_forces"),
        beam_forces=cat("beam_forces"), foot_deflection_mm=cat("foot_deflection_mm"),
        actuator_names=first.actuator_names, actuator_torque_Nmm=cat("actuator_torque_Nmm"),
        stall_torque_Nmm=first.stall_torque_Nmm, spring_names=first.spring_names,
        spring_force_N=cat("spring_force_N"), spring_length_mm=cat("spring_length_mm"),
        spring_max_mm=first.spring_max_mm)

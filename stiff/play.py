"""Joint play: how far the foot can move on the clearance in its pins, apart from any strain.

A pin of diameter d in a bore D = d + 2c (radial clearance c) over a bearing length L lets the
two parts it joins

* shift against each other in the linkage plane by up to c in any direction (the pin is taken
  as seated in one of the parts and loose in the other), and
* tilt against each other about any in-plane axis by up to θ = (D − d)/L = 2c/L
  (REFERENCES.md §4, common practice, derived),

with no force at all: this play adds to the elastic deflection and does not grow with the
load. L is the shorter of the two parts' bearings on the pin (the looser fit tilts most): a
part's lug thickness where the joint gives lugs, else the joint's ``bearing_length_mm``, else
the part's width at the joint (a printed section's width, a tube's outer diameter). A body
without ``bearing_length_mm`` does not limit L. Fixed joints have no play; actuator backlash
is not in the case and not counted.

**In-plane play at the foot.** Each pin's radial gap is a short free link of length c and
free direction between the two parts (the clearance-link model of Ting, Zhu & Watkins,
Mech. Mach. Theory 35(3):391–401, 2000). A gap δ (2-vector) at pin j moves the foot by
G_j δ; the 2×2 matrix G_j is found on the frame model by imposing a unit relative
displacement across the joint's connector in x and in y (the initial-strain load Gᵀk e of
its radial spring, every load solved on one factorisation) and reading the foot's x, y.
Where the linkage with its actuators held is statically determinate, an imposed
displacement strains nothing, so this is exactly the kinematics of the linkage with that pin
split (the tests check it against the loop-closure Jacobian); where springs or redundant
joints resist it, the gap is shared among them by stiffness. Pin j's play at the foot is
c_j ‖G_j‖₂ (its gap in the worst direction).

**Out-of-plane play at the foot.** A part's out-of-plane motion is w + θ × r; a tilt τ_j at
pin P_j moves everything beyond it by (τ_j × (X − P_j))_z, so following any chain of parts
from the body to the foot part, the foot's out-of-plane motion is Σ (τ_j × (F − P_j))_z over
the joints of that chain, at most Σ θ_j |F − P_j| (the tilt about the axis normal to the
lever arm F − P_j). Every chain gives an upper bound (a closed loop must close, so all chains
give the same motion); the chain with the smallest bound is taken (Dijkstra over the
joints), and only its joints count towards the totals: tightening a joint off that chain does
not lower the bound. Each joint's own θ_j |F − P_j| (its play at the foot were it in an open
chain) is shown as ``lever_play_mm`` for every joint on some chain from the body to the foot.
The in-plane shift that a tilt causes through the stack offsets (θ·Δz) is not counted.

**Totals.** Worst case: the sum of the joints' contributions (every gap at its limit in the
worst direction); root-sum-square: the square root of the sum of their squares (gaps
independent and random in direction). Shares are each joint's fraction of the totals'
contributions, in-plane and out-of-plane apart. Units: mm, rad.
"""

from __future__ import annotations

import heapq
import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.build import Built
from stiff.case_model import BODY, Case, Joint
from stiff.errors import ModelError
from stiff.fe import solve_static
from stiff.fe.assemble import connector_kinematics

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True)
class JointPlay:
    """The play of one pin between two parts, and what it does at the foot.

    Attributes
    ----------
    name : the joint's name, with its two parts where the joint joins more than two
    joint : the case's joint name
    parts : the two parts the pin joins here (a joint of n parts has n − 1 pins)
    kind : "pin" or "driven"
    clearance_mm : radial clearance c [mm]
    bearing_length_mm : bearing length L that the tilt is taken over [mm]
    tilt_play_rad : angular play 2c/L about the in-plane axes [rad]
    gain : foot in-plane motion per unit radial gap at this pin, worst direction [mm/mm]
    lever_arm_mm : in-plane distance from the pin to the foot [mm]
    in_plane_mm : c × gain, the foot's in-plane play from this pin [mm]
    lever_play_mm : tilt × lever arm, the foot's out-of-plane play from this pin in an open
        chain [mm]; 0 when no chain of parts from the body to the foot passes through it
    on_chain : True when the pin is on the chain the out-of-plane totals are taken along
    out_of_plane_mm : its contribution to the out-of-plane totals: ``lever_play_mm`` on the
        chain, else 0 [mm]
    share_in_plane, share_out_of_plane : fraction of the totals' contributions (0..1)
    """

    name: str
    joint: str
    parts: tuple[str, str]
    kind: str
    clearance_mm: float
    bearing_length_mm: float
    tilt_play_rad: float
    gain: float
    lever_arm_mm: float
    in_plane_mm: float
    lever_play_mm: float
    on_chain: bool
    out_of_plane_mm: float
    share_in_plane: float
    share_out_of_plane: float


@dataclass(frozen=True)
class FootPlay:
    """Play of the foot from the joints' clearances, apart from elastic deflection [mm].

    ``joints`` holds the pin and driven joints (a fixed joint has no play), ranked by their
    contribution to the totals (in-plane + out-of-plane), largest first; ``chain`` names the
    joints, body to foot, that the out-of-plane totals follow.
    """

    joints: tuple[JointPlay, ...]
    in_plane_worst_mm: float
    in_plane_rss_mm: float
    out_of_plane_worst_mm: float
    out_of_plane_rss_mm: float
    chain: tuple[str, ...]


@dataclass(frozen=True)
class PlayTarget:
    """A play target of the case against the worst-case play [mm]."""

    name: str
    demand_mm: float
    limit_mm: float

    @property
    def met(self) -> bool:
        """True when the play is within the limit."""
        return self.demand_mm <= self.limit_mm


def bearing_length_mm(case: Case, joint: Joint, part: str) -> float | None:
    """Length over which ``part`` bears on the joint's pin [mm].

    Its lug's thickness, else the joint's ``bearing_length_mm``, else the part's width at the
    joint (printed: the section's width along the pin; tube: the outer diameter). For the
    body: the joint's ``bearing_length_mm``, or None (unknown, a servo housing or a chassis
    plate).
    """
    lug = next((lg for lg in joint.lugs if lg.part == part), None)
    if lug is not None:
        return lug.thickness_mm
    if joint.bearing_length_mm is not None:
        return joint.bearing_length_mm
    if part == BODY:
        return None
    p = case.part(part)
    if p.kind == "tube":
        return p.od_mm
    seg = next((i for i, s in enumerate(p.segments) if joint.node in s), 0)
    return p.sections[seg].width_mm


def pins(case: Case) -> list[tuple[Joint, str, str]]:
    """Every connector of the frame model as (joint, part a, part b), in the model's order.

    ``stiff.build`` joins a joint's parts pairwise in the order given, one connector a pair.
    """
    return [(j, a, b) for j in case.joints for a, b in zip(j.parts[:-1], j.parts[1:], strict=True)]


def tilt_play_rad(case: Case, joint: Joint, a: str, b: str) -> tuple[float, float]:
    """(2c/L [rad], L [mm]) of the pin between parts a and b; (0, L) for a fixed joint."""
    lengths = [v for v in (bearing_length_mm(case, joint, a), bearing_length_mm(case, joint, b))
               if v is not None]
    L = min(lengths) if lengths else math.inf
    if joint.kind == "fixed" or joint.clearance_mm == 0.0:
        return 0.0, L
    return 2.0 * joint.clearance_mm / L, L


def gap_gains(built: Built) -> FloatArray:
    """(n_connectors, 2, 2) foot in-plane motion per unit in-plane gap at each connector.

    ``out[i, :, k]`` is the foot's (x, y) motion [mm] when connector i's node b is displaced
    by 1 mm along global axis k against its node a, with no load: the initial-strain load
    Gᵀ k e of the connector's radial spring, every case on one factorisation. Connectors whose
    radial components are rigid (fixed joints) give zero (they have no gap).
    """
    model = built.model
    c = model.connectors
    out = np.zeros((c.count, 2, 2))
    k = np.broadcast_to(c.stiffness, (c.count, 6))
    elastic = np.flatnonzero(np.isfinite(k[:, :2]).all(axis=1) & (k[:, :2] > 0).all(axis=1))
    if elastic.size == 0:
        return out
    G = np.broadcast_to(connector_kinematics(model), (c.count, 6, 12))
    loads = np.zeros((elastic.size, 2, model.n_nodes, 6))
    for axis in range(2):
        f = G[elastic, axis, :] * k[elastic, axis, None]  # (m, 12): Gᵀ k e_axis
        a, b = c.nodes[elastic, 0], c.nodes[elastic, 1]
        rows = np.arange(elastic.size)
        np.add.at(loads[:, axis], (rows, a), f[:, :6])
        np.add.at(loads[:, axis], (rows, b), f[:, 6:])
    sol = solve_static(model, loads.reshape(-1, model.n_nodes, 6))
    foot = sol.displacements[:, built.foot, :2].reshape(elastic.size, 2, 2)
    out[elastic] = np.swapaxes(foot, -1, -2)
    return out


def _foot_part(built: Built) -> str:
    return next(part for (part, _), i in built.node_of.items() if i == built.foot)


def _chains(weights: list[tuple[str, str, float]], start: str, goal: str
            ) -> tuple[list[int], set[int]]:
    """(edges of the lightest chain start -> goal, every edge on some simple chain).

    Edges are (part a, part b, weight ≥ 0). The lightest chain by Dijkstra; the edges on
    some simple chain by walking every simple chain from start to goal (a linkage has few).
    """
    adj: dict[str, list[tuple[str, int]]] = {}
    for i, (a, b, _) in enumerate(weights):
        adj.setdefault(a, []).append((b, i))
        adj.setdefault(b, []).append((a, i))
    best: dict[str, float] = {start: 0.0}
    via: dict[str, tuple[str, int]] = {}
    heap = [(0.0, start)]
    while heap:
        d, p = heapq.heappop(heap)
        if d > best.get(p, math.inf):
            continue
        for q, i in adj.get(p, []):
            nd = d + weights[i][2]
            if nd < best.get(q, math.inf):
                best[q], via[q] = nd, (p, i)
                heapq.heappush(heap, (nd, q))
    chain: list[int] = []
    node = goal
    while node != start and node in via:
        node, i = via[node]
        chain.append(i)
    on_some: set[int] = set()

    def walk(p: str, seen: set[str], used: list[int]) -> None:
        if p == goal:
            on_some.update(used)
            return
        for q, i in adj.get(p, []):
            if q not in seen:
                seen.add(q)
                used.append(i)
                walk(q, seen, used)
                used.pop()
                seen.remove(q)

    walk(start, {start}, [])
    return chain[::-1], on_some


def foot_play(case: Case, built: Built) -> FootPlay:
    """The foot's play from every pin's clearance (see the module docstring).

    Parameters
    ----------
    case : the case, for the joints' clearances and bearing lengths
    built : its frame model in the pose (``stiff.build.build``)
    """
    connectors = pins(case)
    if len(connectors) != built.model.connectors.count or any(
            j.name != name for (j, _, _), name in zip(connectors, built.connector_joint,
                                                     strict=False)):
        raise ModelError("the frame model was not built from this case: its connectors do not "
                         "match the case's joints")
    xyz = built.model.xyz.reshape(-1, built.model.n_nodes, 3)[0]
    foot_xy = xyz[built.foot, :2]
    gains = gap_gains(built)
    tilt = [tilt_play_rad(case, j, a, b) for j, a, b in connectors]
    lever = np.array([float(np.linalg.norm(foot_xy - xyz[built.node_of[(a, j.node)], :2]))
                      for j, a, _ in connectors])
    norms = np.linalg.norm(gains, ord=2, axis=(1, 2)) if gains.size else np.zeros(0)
    clearance = np.array([0.0 if j.kind == "fixed" else j.clearance_mm for j, _, _ in connectors])
    in_plane = clearance * norms
    theta = np.array([t for t, _ in tilt])
    weights = [(a, b, float(t * r)) for (_, a, b), t, r in zip(connectors, theta, lever,
                                                              strict=True)]
    chain, on_some = _chains(weights, BODY, _foot_part(built))
    lever_play = np.array([w if i in on_some else 0.0 for i, (_, _, w) in enumerate(weights)])
    out_of_plane = np.zeros(len(connectors))
    out_of_plane[chain] = lever_play[chain]
    sum_in, sum_out = float(in_plane.sum()), float(out_of_plane.sum())
    records = []
    for i, (j, a, b) in enumerate(connectors):
        records.append(JointPlay(
            name=j.name if len(j.parts) == 2 else f"{j.name} ({a}-{b})", joint=j.name,
            parts=(a, b),
            kind=j.kind, clearance_mm=float(clearance[i]), bearing_length_mm=tilt[i][1],
            tilt_play_rad=float(theta[i]), gain=float(norms[i]), lever_arm_mm=float(lever[i]),
            in_plane_mm=float(in_plane[i]), lever_play_mm=float(lever_play[i]),
            on_chain=i in chain, out_of_plane_mm=float(out_of_plane[i]),
            share_in_plane=float(in_plane[i] / sum_in) if sum_in > 0 else 0.0,
            share_out_of_plane=float(out_of_plane[i] / sum_out) if sum_out > 0 else 0.0))
    kept = [r for r in records if r.kind != "fixed"]
    ranked = sorted(kept, key=lambda r: -(r.in_plane_mm + r.out_of_plane_mm))
    return FootPlay(
        joints=tuple(ranked), in_plane_worst_mm=sum_in,
        in_plane_rss_mm=float(np.sqrt(np.sum(in_plane**2))),
        out_of_plane_worst_mm=sum_out,
        out_of_plane_rss_mm=float(np.sqrt(np.sum(out_of_plane**2))),
        chain=tuple(records[i].name for i in chain))


def play_targets(case: Case, play: FootPlay) -> tuple[PlayTarget, ...]:
    """The case's play targets (``max_play_mm``, ``max_lateral_play_mm``) against the
    worst-case play."""
    t = case.targets
    out = []
    if t.max_play_mm is not None:
        out.append(PlayTarget("foot play in the linkage plane", play.in_plane_worst_mm,
                              t.max_play_mm))
    if t.max_lateral_play_mm is not None:
        out.append(PlayTarget("lateral foot play", play.out_of_plane_worst_mm,
                              t.max_lateral_play_mm))
    return tuple(out)

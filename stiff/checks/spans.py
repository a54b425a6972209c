"""Spans of a tube for its buckling check: the tube between braced points, and how each end is
held (fixed, pinned or free), following fixed joints into the parts the tube is fixed to.

See :func:`span_end` for the rules. The result feeds the effective-length factor of
``stiff.checks.tubes.effective_length_factor`` (AISC 360 Commentary, Table C-A-7.1).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from stiff.case_model import BODY, Case, Joint, Part
from stiff.checks.context import CheckContext

EndKind = Literal["fixed", "pinned", "free"]
_STRENGTH: dict[EndKind, int] = {"free": 0, "pinned": 1, "fixed": 2}


@dataclass(frozen=True)
class End:
    """Where a span's buckling length ends, and how it is held there.

    ``part`` and ``node`` locate the end (it may lie on a part the tube is fixed into);
    ``why`` says how the restraint was found.
    """

    kind: EndKind
    part: str
    node: str
    why: str


@dataclass(frozen=True)
class Span:
    """A tube between braced points: its members (model indices) and its two ends."""

    part: Part
    nodes: tuple[str, str]
    members: tuple[int, ...]
    ends: tuple[End, End]


def _joints_at(case: Case, part: str, node: str) -> list[Joint]:
    return [j for j in case.joints if j.node == node and part in j.parts]


def node_xy(ctx: CheckContext, part: str, node: str,
            xyz: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    """Position (x, y) [mm] of a part's node among model nodes ``xyz`` (..., n_nodes, 3) [mm]:
    a load set's ``xyz_mm`` (B, n_nodes, 3) gives (B, 2), one pose's nodes (2,)."""
    return np.asarray(xyz[..., ctx.built.node_of[(part, node)], :2])


def _stronger(a: End | None, b: End) -> End:
    return b if a is None or _STRENGTH[b.kind] > _STRENGTH[a.kind] else a


def span_end(ctx: CheckContext, part: str, node: str,
             visited: frozenset[tuple[str, str]] = frozenset()) -> End:
    """How the end of a tube (or of a part fixed to it) at ``node`` is held.

    * no joint names the part at the node: ``free``;
    * a pin or driven joint: ``pinned`` (the actuator's holding stiffness is not credited);
    * a fixed joint to the body: ``fixed``;
    * a fixed joint (a socket) into a part: the tube and that part act as one member, so the
      restraint is the part's: pinned where the part has a pin at the same node; free, at its
      farthest node, where it has no other joint; through the part to its other joint when it
      has one (and so on along fixed joints); and pinned at the node when the part is held at
      two or more other joints (braced; its rotational restraint is not credited).

    A socket into a part that is itself pinned is therefore not a fixed end: a tube bonded
    into two printed caps, each pinned, buckles as a pinned-pinned member from pin to pin.
    """
    joints = _joints_at(ctx.case, part, node)
    here = f"{node} on {part}"
    if not joints:
        return End("free", part, node, f"{here}: no joint")
    hinge = next((j for j in joints if j.kind != "fixed"), None)
    if hinge is not None:
        return End("pinned", part, node, f"{here}: {hinge.kind} joint {hinge.name}")
    best: End | None = None
    seen = visited | {(part, node)}
    for j in joints:
        for other in j.parts:
            if other == part or (other, node) in seen:
                continue
            if other == BODY:
                return End("fixed", part, node, f"{here}: fixed joint {j.name} to the body")
            best = _stronger(best, _through(ctx, other, node, j, seen))
    return best or End("pinned", part, node, f"{here}: fixed joint, braced")


def _through(ctx: CheckContext, part: str, node: str, joint: Joint,
             seen: frozenset[tuple[str, str]]) -> End:
    """The restraint that a part fixed to the tube at ``node`` (by ``joint``) gives it."""
    case = ctx.case
    via = f"fixed joint {joint.name} into {part}"
    same = [j for j in _joints_at(case, part, node) if j is not joint]
    hinge = next((j for j in same if j.kind != "fixed"), None)
    if hinge is not None:
        return End("pinned", part, node, f"{via}, {hinge.kind} joint {hinge.name} at {node}")
    if any(BODY in j.parts for j in same):
        return End("fixed", part, node, f"{via}, fixed to the body at {node}")
    others = sorted({j.node for j in case.joints if part in j.parts and j.node != node})
    if not others:
        # the part moves rigidly from pose to pose: its farthest node is the same in every pose
        p, xyz = case.part(part), ctx.built.model.xyz
        origin = node_xy(ctx, part, node, xyz)
        far = max(p.nodes,
                  key=lambda n: float(np.linalg.norm(node_xy(ctx, part, n, xyz) - origin)))
        return End("free", part, far, f"{via}, which has no other joint (free at {far})")
    if len(others) == 1:
        end = span_end(ctx, part, others[0], seen | {(part, node)})
        return End(end.kind, end.part, end.node, f"{via}, then {end.why}")
    return End("pinned", part, node, f"{via}, held at {', '.join(others)}: braced, its "
                                     "rotational restraint not credited")


def spans(ctx: CheckContext, part: Part) -> list[Span]:
    """The tube's spans: its members between braced points (joints, ends, branch points)."""
    case = ctx.case
    index = {ctx.built.beam_segment[i]: i for i, name in enumerate(ctx.built.beam_part)
             if name == part.name}
    degree: dict[str, int] = {}
    for a, b in part.segments:
        degree[a] = degree.get(a, 0) + 1
        degree[b] = degree.get(b, 0) + 1
    braced = {n for n, k in degree.items() if k != 2 or _joints_at(case, part.name, n)}
    out: list[Span] = []
    used: set[tuple[str, str]] = set()
    for start in sorted(braced, key=part.nodes.index):
        for seg in part.segments:
            if seg in used or start not in seg:
                continue
            members, node = [], start
            current = seg
            while True:
                used.add(current)
                members.append(index[current])
                node = current[1] if current[0] == node else current[0]
                if node in braced:
                    break
                current = next(s for s in part.segments if node in s and s not in used)
            ends = tuple(_end_of(ctx, part, n, degree[n]) for n in (start, node))
            out.append(Span(part, (start, node), tuple(members), (ends[0], ends[1])))
    return out


def _end_of(ctx: CheckContext, part: Part, node: str, degree: int) -> End:
    if degree == 1:
        return span_end(ctx, part.name, node)
    joints = _joints_at(ctx.case, part.name, node)
    what = f"joint {joints[0].name}" if joints else "a branch"
    return End("pinned", part.name, node, f"{node} on {part.name}: braced by {what}, "
                                          "continuity over it not credited")

"""Printed segments: axial and bending stress, region by region, against the direction-aware
strength.

At each end of every printed member the internal axial force N and bending moments M_y, M_z
give the section's strain field by compatibility, ε(y, z) = N/EA + (M_y/EI_y) z − (M_z/EI_z) y
(``stiff.printed_sections.Region.stress_range``); each region (walls, skins, infill core) then
carries σ = E_region ε. Every sign of the two curvatures is tried, so the worst fibre of each
region is found whatever the moments' signs: over the signs, the greatest strain at a point
(y, z) is ε₀ + |κ_y||z| + |κ_z||y| and the least ε₀ − |κ_y||z| − |κ_z||y| (in floating point the
very values the sign combinations give), taken at once over every point of every region of
every printed member, and the worse of its two ends. Its capacity is the strength along the
member for its build direction (``stiff.strength.member_strength``: in a layer for flat and on-edge
builds, across the layers in tension when upright) times the region's strength ratio (1 for
walls and skins, the infill law's σ*/σ_s for the core), through the knock-down chain.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.checks.allowables import Duty, printed_allowable
from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext, FloatArray, LoadSet
from stiff.printed_sections import PrintedSection, Region
from stiff.strength import MemberMode, member_strength

_UPRIGHT_HINT = ("print it flat or on edge so the layers run along the member: tension across "
                 "the layers splits them")
#: Signs (s_y, s_z) of the two curvatures, every combination.
_SIGNS = np.array([(1.0, 1.0), (1.0, -1.0), (-1.0, 1.0), (-1.0, -1.0)])
_SENSES: tuple[MemberMode, ...] = ("tension", "compression")
#: Columns of a member's end forces (stiff.fe.results, read as context.member_forces does):
#: the axial force, and the moments about local y and z at end 1 and end 2.
_AXIAL = 6
_MOMENT_Y = [4, 10]
_MOMENT_Z = [5, 11]


def region_extremes(ps: PrintedSection, region: Region, N: FloatArray | float,
                    My: FloatArray | float, Mz: FloatArray | float
                    ) -> tuple[FloatArray, FloatArray]:
    """Least and greatest axial stress [MPa] on a region for N [N], M_y, M_z [N·mm], any sign
    of the moments; the loads are floats or arrays of one shape, the results of that shape."""
    beam = ps.beam
    e0 = np.asarray(N, np.float64) / beam.EA
    ky = np.abs(np.asarray(My, np.float64)) / beam.EIy
    kz = np.abs(np.asarray(Mz, np.float64)) / beam.EIz
    signs = _SIGNS.reshape(4, 2, *(1,) * e0.ndim)
    low, high = region.stress_range(np.broadcast_to(e0, (4, *e0.shape)), signs[:, 0] * ky,
                                    signs[:, 1] * kz)
    return low.min(axis=0), high.max(axis=0)


@dataclass(frozen=True)
class _Check:
    """One (region, sense) check of a printed section under one duty: fixed text and capacity."""

    sense: MemberMode
    mode: str
    capacity_MPa: float
    required: float
    basis: str
    suggestion: str


def _region_checks(ctx: CheckContext, ps: PrintedSection, region: Region, d: Duty
                   ) -> list[_Check]:
    """The tension and compression checks of one region of a section under one duty."""
    out = []
    for sense in _SENSES:
        across = region.across_layers and sense == "tension"
        mean = member_strength(ps.material, ps.settings.build, sense)
        allowable = printed_allowable(mean, ps.material, across, d, ctx.samples)
        basis = allowable.provenance
        if region.strength_ratio != 1.0:
            basis += f"; × {region.strength_ratio:.3g} for the infill core's strength"
        out.append(_Check(
            sense=sense,
            mode=(f"split along layers ({sense} across the layers, {region.name})"
                  if across else f"{sense} in the {region.name}"),
            capacity_MPa=allowable.value_MPa * region.strength_ratio,
            required=ctx.required("across_layers" if across else "in_layer"),
            basis=basis, suggestion=_UPRIGHT_HINT if across else ""))
    return out


@dataclass(frozen=True)
class _Fibres:
    """Every region of every printed member as one row of arrays, in member then region order.

    ``beam`` (R,) the member of each row; ``E_MPa`` (R,) the region's modulus; ``EA``, ``EIy``,
    ``EIz`` (R,) the member's section; ``abs_y``, ``abs_z`` (K, R) |y|, |z| [mm] of the region's
    points that no other point exceeds in both (only they can be extremes; padded with their
    last to K, which changes no extreme).
    """

    beam: npt.NDArray[np.intp]
    E_MPa: FloatArray
    EA: FloatArray
    EIy: FloatArray
    EIz: FloatArray
    abs_y: FloatArray
    abs_z: FloatArray
    regions: tuple[tuple[PrintedSection, Region], ...]


def outer_points(points_yz_mm: FloatArray) -> FloatArray:
    """(k, 2) distinct |y|, |z| [mm] of the points that no other point reaches or passes in both
    |y| and |z| with more in one: ε₀ ± (|κ_y||z| + |κ_z||y|) takes its extremes among them,
    in floating point too (sums and products of non-negative numbers keep their order)."""
    a = np.unique(np.abs(points_yz_mm), axis=0)
    reach = np.all(a[None] >= a[:, None], axis=-1) & np.any(a[None] > a[:, None], axis=-1)
    out: FloatArray = a[~reach.any(axis=1)]
    return out


def _fibres(ctx: CheckContext) -> _Fibres:
    rows = [(i, ps, r) for i, ps in enumerate(ctx.built.beam_printed) if ps is not None
            for r in ps.regions]
    found: dict[Region, FloatArray] = {}  # members may share a section
    for _, _, r in rows:
        if r not in found:
            found[r] = outer_points(r.points_yz_mm)
    outer = [found[r] for _, _, r in rows]
    k = max((p.shape[0] for p in outer), default=1)
    points = np.array([np.pad(p, ((0, k - p.shape[0]), (0, 0)), mode="edge") for p in outer]
                      ).reshape(len(rows), k, 2)

    def of(get: Callable[[PrintedSection, Region], float]) -> FloatArray:
        return np.array([get(ps, r) for _, ps, r in rows], np.float64)
    return _Fibres(
        beam=np.array([i for i, _, _ in rows], np.intp), E_MPa=of(lambda ps, r: r.E_MPa),
        EA=of(lambda ps, r: ps.beam.EA), EIy=of(lambda ps, r: ps.beam.EIy),
        EIz=of(lambda ps, r: ps.beam.EIz), abs_y=points[..., 0].T.copy(),
        abs_z=points[..., 1].T.copy(), regions=tuple((ps, r) for _, ps, r in rows))


def fibre_extremes(fibres: _Fibres, loads: LoadSet) -> tuple[FloatArray, FloatArray]:
    """(R, B) greatest tension and greatest compression [MPa] of each region row over both
    ends and every sign of the curvatures (≤ 0 where there is none)."""
    f = loads.beam_forces[:, fibres.beam].transpose(2, 1, 0)  # (12, R, B), as member_forces
    e0 = f[_AXIAL] / fibres.EA[:, None]
    ky = np.abs(f[_MOMENT_Y]) / fibres.EIy[:, None]  # (2 ends, R, B)
    kz = np.abs(f[_MOMENT_Z]) / fibres.EIz[:, None]
    by = ky * fibres.abs_z[:, None, :, None]  # (K, 2, R, B): bending strain at each point
    bz = kz * fibres.abs_y[:, None, :, None]
    E = fibres.E_MPa[:, None]
    high = (E * (e0 + by + bz)).max(axis=(0, 1))
    low = (E * (e0 - by - bz)).min(axis=(0, 1))
    return high, -low


def _item(ctx: CheckContext, beam: int) -> str:
    a, b = ctx.built.beam_segment[beam]
    return f"{ctx.built.beam_part[beam]} {a}-{b}"


def _rows(ctx: CheckContext, fibres: _Fibres, loads: LoadSet,
          found: dict[tuple[PrintedSection, Region, Duty], list[_Check]]) -> list[CheckRows]:
    """Every region and sense of every printed member in one load set."""
    d = ctx.duty(loads.name)
    worst = fibre_extremes(fibres, loads)
    demand = [np.maximum(w, 0.0) for w in worst]
    out = []
    for k, (ps, region) in enumerate(fibres.regions):
        if (ps, region, d) not in found:
            found[ps, region, d] = _region_checks(ctx, ps, region, d)
        item = _item(ctx, int(fibres.beam[k]))
        for s, c in enumerate(found[ps, region, d]):
            out.append(CheckRows(
                item=item, kind="segment", mode=c.mode, load_case=loads.name,
                demand=demand[s][k], capacity=c.capacity_MPa, unit="MPa",
                required_factor=c.required, basis=c.basis, suggestion=c.suggestion,
                applies=worst[s][k] > 0.0))
    return out


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Every printed segment in every load set: the worst fibre of each region and sense."""
    fibres = _fibres(ctx)
    found: dict[tuple[PrintedSection, Region, Duty], list[_Check]] = {}
    return [r for loads in ctx.loads for r in _rows(ctx, fibres, loads, found)]

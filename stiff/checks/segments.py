"""Printed segments: axial and bending stress, region by region, against the direction-aware
strength.

At each end of every printed member the internal axial force N and bending moments M_y, M_z
give the section's strain field by compatibility, ε(y, z) = N/EA + (M_y/EI_y) z − (M_z/EI_z) y
(``stiff.printed_sections.Region.stress_range``); each region (walls, skins, infill core) then
carries σ = E_region ε. Every sign of the two curvatures is tried, so the worst fibre of each
region is found whatever the moments' signs. Its capacity is the strength along the member for
its build direction (``stiff.strength.member_strength``: in a layer for flat and on-edge
builds, across the layers in tension when upright) times the region's strength ratio (1 for
walls and skins, the infill law's σ*/σ_s for the core), through the knock-down chain.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from stiff.checks.allowables import Duty, printed_allowable
from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext, FloatArray, MemberForces, member_forces
from stiff.printed_sections import PrintedSection, Region
from stiff.strength import MemberMode, member_strength

_UPRIGHT_HINT = ("print it flat or on edge so the layers run along the member: tension across "
                 "the layers splits them")
#: Signs (s_y, s_z) of the two curvatures, every combination.
_SIGNS = np.array([(1.0, 1.0), (1.0, -1.0), (-1.0, 1.0), (-1.0, -1.0)])
_SENSES: tuple[MemberMode, ...] = ("tension", "compression")


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

    region: Region
    sense: MemberMode
    mode: str
    capacity_MPa: float
    required: float
    basis: str
    suggestion: str


def _section_checks(ctx: CheckContext, ps: PrintedSection, d: Duty) -> list[_Check]:
    """Every (region, sense) check of a section, in the order of its regions."""
    out = []
    for region in ps.regions:
        for sense in _SENSES:
            across = region.across_layers and sense == "tension"
            mean = member_strength(ps.material, ps.settings.build, sense)
            allowable = printed_allowable(mean, ps.material, across, d, ctx.samples)
            basis = allowable.provenance
            if region.strength_ratio != 1.0:
                basis += f"; × {region.strength_ratio:.3g} for the infill core's strength"
            out.append(_Check(
                region=region, sense=sense,
                mode=(f"split along layers ({sense} across the layers, {region.name})"
                      if across else f"{sense} in the {region.name}"),
                capacity_MPa=allowable.value_MPa * region.strength_ratio,
                required=ctx.required("across_layers" if across else "in_layer"),
                basis=basis, suggestion=_UPRIGHT_HINT if across else ""))
    return out


def _rows(ps: PrintedSection, m: MemberForces, load_case: str, section_checks: list[_Check]
          ) -> list[CheckRows]:
    """The worst fibre of each region and sense over both ends of one member, per entry."""
    N = np.stack([m.axial_N, m.axial_N])
    My, Mz = np.stack(m.moment_y_Nmm), np.stack(m.moment_z_Nmm)
    item = f"{m.part.name} {m.segment[0]}-{m.segment[1]}"
    extremes = {r.name: region_extremes(ps, r, N, My, Mz) for r in ps.regions}
    out = []
    for c in section_checks:
        low, high = extremes[c.region.name]
        worst = (high if c.sense == "tension" else -low).max(axis=0)
        out.append(CheckRows(
            item=item, kind="segment", mode=c.mode, load_case=load_case,
            demand=np.maximum(worst, 0.0), capacity=c.capacity_MPa, unit="MPa",
            required_factor=c.required, basis=c.basis, suggestion=c.suggestion,
            applies=worst > 0.0))
    return out


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Every printed segment in every load set: the worst fibre of each region and sense."""
    found: dict[tuple[PrintedSection, Duty], list[_Check]] = {}
    out: list[CheckRows] = []
    for loads in ctx.loads:
        d = ctx.duty(loads.name)
        for m in member_forces(ctx, loads):
            ps = ctx.built.beam_printed[m.index]
            if ps is None:
                continue
            if (ps, d) not in found:
                found[ps, d] = _section_checks(ctx, ps, d)
            out.extend(_rows(ps, m, loads.name, found[ps, d]))
    return out

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

import itertools

from stiff.checks.allowables import printed_allowable
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext, MemberForces, member_forces
from stiff.printed_sections import PrintedSection, Region
from stiff.strength import member_strength

_UPRIGHT_HINT = ("print it flat or on edge so the layers run along the member: tension across "
                 "the layers splits them")


def region_extremes(ps: PrintedSection, region: Region, N: float, My: float, Mz: float
                    ) -> tuple[float, float]:
    """Least and greatest axial stress [MPa] on a region for N [N], M_y, M_z [N·mm], any sign
    of the moments."""
    beam = ps.beam
    e0 = N / beam.EA
    ky, kz = abs(My) / beam.EIy, abs(Mz) / beam.EIz
    lows, highs = [], []
    for sy, sz in itertools.product((1.0, -1.0), repeat=2):
        lo, hi = region.stress_range(e0, sy * ky, sz * kz)
        lows.append(lo)
        highs.append(hi)
    return min(lows), max(highs)


def _records(ctx: CheckContext, load_case: str, m: MemberForces, ps: PrintedSection
             ) -> list[CheckRecord]:
    material = ps.material
    build = ps.settings.build
    d = ctx.duty(load_case)
    item = f"{m.part.name} {m.segment[0]}-{m.segment[1]}"
    worst: dict[str, CheckRecord] = {}
    for end in (0, 1):
        for region in ps.regions:
            lo, hi = region_extremes(ps, region, m.axial_N, m.moment_y_Nmm[end],
                                     m.moment_z_Nmm[end])
            for sense, demand in (("tension", hi), ("compression", -lo)):
                if demand <= 0.0:
                    continue
                across = region.across_layers and sense == "tension"
                mean = member_strength(material, build, sense)  # type: ignore[arg-type]
                allowable = printed_allowable(mean, material, across, d, ctx.samples)
                capacity = allowable.value_MPa * region.strength_ratio
                mode = (f"split along layers ({sense} across the layers, {region.name})"
                        if across else f"{sense} in the {region.name}")
                basis = allowable.provenance
                if region.strength_ratio != 1.0:
                    basis += f"; × {region.strength_ratio:.3g} for the infill core's strength"
                rec = CheckRecord(
                    item=item, kind="segment", mode=mode, load_case=load_case, demand=demand,
                    capacity=capacity, unit="MPa",
                    required_factor=ctx.required("across_layers" if across else "in_layer"),
                    basis=basis, suggestion=_UPRIGHT_HINT if across else "")
                key = f"{region.name} {sense}"
                if key not in worst or rec.utilisation > worst[key].utilisation:
                    worst[key] = rec
    return list(worst.values())


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Every printed segment in every load case: the worst fibre of each region."""
    out: list[CheckRecord] = []
    for result in ctx.results:
        for m in member_forces(ctx, result):
            ps = ctx.built.beam_printed[m.index]
            if ps is not None:
                out.extend(_records(ctx, result.name, m, ps))
    return out

"""The terminal summary of a check: short, worst first, a unit on every number."""

from __future__ import annotations

import math

from stiff.cautions import CAUTIONS
from stiff.check import CheckResult
from stiff.play_modes import summary_lines as dynamics_lines
from stiff.units import rad_to_deg

#: Governing checks shown in the summary; results.json has them all.
MAX_ITEMS = 15


def _direction(v: object) -> str:
    x, y, z = (float(c) for c in v)  # type: ignore[attr-defined]
    return f"({x:+.2f}, {y:+.2f}, {z:+.2f})"


def summary_lines(result: CheckResult, *, cautions: bool = True) -> list[str]:
    """Lines of the summary."""
    case, st = result.case, result.stiffness
    out = [f"stiff check: {case.title}"]
    angles = ", ".join(f"{a.name} {rad_to_deg(float(result.pose.angles_rad[i])):.1f}°"
                       for i, a in enumerate(case.actuators))
    fx, fy = result.foot_xy_mm
    out.append(f"pose: {angles or 'as drawn'}; foot at ({fx:.1f}, {fy:.1f}) mm")
    out.append("")
    out.append("foot compliance (mm/N), principal directions (x, y in plane, z out of plane):")
    for v, d in zip(st.principal_mm_per_N, st.principal_directions, strict=True):
        out.append(f"  {v:.4g} mm/N along {_direction(d)}  = {1.0 / v:.4g} N/mm" if v > 0
                   else f"  0 mm/N along {_direction(d)}")
    twist = st.twist_rad_per_N
    out.append(f"lateral (out of plane): {st.lateral_mm_per_N:.4g} mm/N; the foot turns "
               f"{math.degrees(float(abs(twist[0]))):.3g}°/N about x and "
               f"{math.degrees(float(abs(twist[1]))):.3g}°/N about y under a sideways push")
    for label, shares in (("vertical", st.vertical), ("lateral", st.lateral)):
        top = [s for s in shares if s.share >= 0.01][:5]
        text = ", ".join(f"{s.name} ({s.kind}) {100 * s.share:.0f} %" for s in top)
        out.append(f"where the {label} give comes from: {text}")
    out.append("")
    out.extend(dynamics_lines(result.dynamics))
    out.append("")
    land = result.landing
    if land is not None:
        what = "; ".join(land.events) or "no actuator stalls"
        out.append(f"landing: {land.mass_t * 1e3:.3g} kg dropped {land.drop_height_mm:g} "
                   f"mm onto the foot: peak {land.peak_N:.3g} N = "
                   f"{land.peak_over_weight:.2f} × its weight "
                   f"(energy method {land.energy_peak_N:.3g} N), stroke {land.stroke_mm:.2f} mm"
                   f" in {land.time_to_peak_s * 1e3:.1f} ms; {what}")
    for lc in result.load_cases:
        dx, dy, dz = lc.foot_deflection_mm
        out.append(f"{lc.name}: {lc.case.description}")
        if not lc.case.foot_held:
            out.append(f"  foot moves ({dx:+.3f}, {dy:+.3f}, {dz:+.3f}) mm")
        for a in sorted(lc.actuators, key=lambda a: a.margin):
            margin = "∞" if math.isinf(a.margin) else f"{a.margin:.2f}"
            out.append(f"  {a.name}: {a.torque_Nmm / 1e3:+.3f} N·m of "
                       f"{a.stall_torque_Nmm / 1e3:.3g} N·m stall (margin {margin})")
        for sp in lc.springs:
            out.append(f"  spring {sp.name}: {sp.force_N:.2f} N at {sp.length_mm:.1f} mm")
    if result.checks:
        out.append("")
        out.append("governing check of each item, worst first (safety factor / required):")
        for c in result.governing[:MAX_ITEMS]:
            sf = "∞" if math.isinf(c.safety_factor) else f"{c.safety_factor:.2f}"
            out.append(f"  {c.status.upper() if c.status != 'met' else 'met':9s} {c.item}: "
                       f"{c.mode} in {c.load_case}: {c.demand:.3g} of {c.capacity:.3g} {c.unit}"
                       f" (factor {sf} / {c.required_factor:g})")
        hidden = len(result.governing) - MAX_ITEMS
        if hidden > 0:
            out.append(f"  ... and {hidden} more items, all in results.json")
    if result.warnings:
        out.append("")
        out.extend(f"warning: {w}" for w in result.warnings)
    if cautions:
        out.append("")
        out.append("cautions:")
        out.extend(f"  - {c}" for c in CAUTIONS)
    return out

"""`results.json`: the check's numbers under stable keys with units in their names.

The keys are documented in the README ("results.json"). Numbers are plain floats in the units
their keys name; directions are unit vectors in the case's axes (x, y in the linkage plane,
z out of it).
"""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

import numpy as np

from stiff import __version__
from stiff.cautions import CAUTIONS
from stiff.check import CheckResult
from stiff.checks.base import CheckRecord, worst_first
from stiff.errors import StiffError
from stiff.play_modes import results_section
from stiff.report.tables import write_tables
from stiff.stiffness import Share
from stiff.units import rad_to_deg

SCHEMA = "stiff.results/1"


def _num(x: float) -> float | None:
    """A JSON-safe number (infinity and NaN become null)."""
    return float(x) if math.isfinite(x) else None


def _vec(v: Any) -> list[float | None]:
    return [_num(float(x)) for x in np.asarray(v, dtype=float).reshape(-1)]


def _shares(shares: tuple[Share, ...]) -> list[dict[str, Any]]:
    return [{"name": s.name, "kind": s.kind, "share": _num(s.share)} for s in shares]


def _check(c: CheckRecord) -> dict[str, Any]:
    return {
        "item": c.item,
        "kind": c.kind,
        "mode": c.mode,
        "load_case": c.load_case,
        "demand": _num(c.demand),
        "capacity": _num(c.capacity),
        "unit": c.unit,
        "safety_factor": _num(c.safety_factor),
        "required_factor": _num(c.required_factor),
        "status": c.status,
        "basis": c.basis,
        "suggestion": c.suggestion,
    }


def _landing(result: CheckResult) -> dict[str, Any]:
    land = result.landing
    assert land is not None
    return {
        "mass_on_leg_kg": _num(land.mass_t * 1e3),
        "drop_height_mm": _num(land.drop_height_mm),
        "touchdown_speed_m_per_s": _num(land.touchdown_speed_mm_per_s / 1e3),
        "leg_stiffness_N_per_mm": _num(land.stiffness_N_per_mm),
        "damping_ratio": _num(land.damping_ratio),
        "energy_method_peak_N": _num(land.energy_peak_N),
        "peak_force_N": _num(land.peak_N),
        "peak_over_weight": _num(land.peak_over_weight),
        "stroke_mm": _num(land.stroke_mm),
        "time_to_peak_ms": _num(land.time_to_peak_s * 1e3),
        "actuator_saturated": any("stall" in e for e in land.events),
        "bottomed_out": any("bottoms out" in e for e in land.events),
        "events": list(land.events),
    }


def results_dict(result: CheckResult) -> dict[str, Any]:
    """The check as a JSON-ready dictionary."""
    case, pose, st = result.case, result.pose, result.stiffness
    angles = {a.name: _num(rad_to_deg(float(pose.angles_rad[i])))
              for i, a in enumerate(case.actuators)}
    return {
        "schema": SCHEMA,
        "stiff_version": __version__,
        "case": {"title": case.title, "file": None if case.file is None else str(case.file)},
        "pose": {
            "actuator_angles_deg": angles,
            "foot_position_mm": _vec(result.foot_xy_mm),
            "foot_jacobian_mm_per_deg": {
                a.name: _vec(result.foot_jacobian_mm_per_rad[:, i] * math.pi / 180.0)
                for i, a in enumerate(case.actuators)},
            "singularity_measure": _num(pose.singularity),
            "transmission_angles_deg": {name: _num(v) for name, v in pose.transmission_deg},
        },
        "foot_compliance_mm_per_N": [_vec(row) for row in st.compliance_mm_per_N],
        "foot_compliance_principal": [
            {"compliance_mm_per_N": _num(float(v)), "direction": _vec(d)}
            for v, d in zip(st.principal_mm_per_N, st.principal_directions, strict=True)],
        "lateral": {
            "compliance_mm_per_N": _num(st.lateral_mm_per_N),
            "twist_deg_per_N": _vec(np.degrees(st.twist_rad_per_N)),
        },
        "compliance_breakdown": {"vertical": _shares(st.vertical),
                                 "lateral": _shares(st.lateral)},
        "landing": None if result.landing is None else _landing(result),
        **results_section(result.dynamics),
        "load_cases": [{
            "name": lc.name,
            "description": lc.case.description,
            "foot_held": lc.case.foot_held,
            "foot_force_N": _vec(lc.case.foot_force_N),
            "foot_deflection_mm": _vec(lc.foot_deflection_mm),
            "actuators": [{"name": a.name, "torque_Nm": _num(a.torque_Nmm / 1e3),
                           "stall_torque_Nm": _num(a.stall_torque_Nmm / 1e3),
                           "margin": _num(a.margin),
                           "saturating_foot_force_N": None if a.saturating_foot_force_N is None
                           else _num(a.saturating_foot_force_N)} for a in lc.actuators],
            "springs": [{"name": sp.name, "force_N": _num(sp.force_N),
                         "length_mm": _num(sp.length_mm),
                         "max_length_mm": None if sp.max_length_mm is None
                         else _num(sp.max_length_mm)} for sp in lc.springs],
        } for lc in result.load_cases],
        "checks": [_check(c) for c in worst_first(result.checks)],
        "governing": {c.item: _check(c) for c in result.governing},
        "all_met": result.all_met,
        "joint_stiffness_basis": list(result.built.stiffness_basis),
        "actuator_stiffness_basis": {a.name: a.stiffness_basis for a in case.actuators},
        "warnings": list(result.warnings),
        "cautions": list(CAUTIONS),
    }


def write_results(result: CheckResult, out_dir: Path) -> Path:
    """Write ``out_dir/results.json`` (the folder is made if missing); returns its path."""
    if out_dir.exists() and not out_dir.is_dir():
        raise StiffError(f"{out_dir}: --out must be a folder, and this is a file")
    out_dir.mkdir(parents=True, exist_ok=True)
    path = out_dir / "results.json"
    text = json.dumps(results_dict(result), indent=2, ensure_ascii=False)
    tmp = path.with_suffix(".json.part")
    tmp.write_text(text + "\n", encoding="utf-8")
    tmp.replace(path)
    write_tables(result, out_dir)
    return path

"""CSV tables beside results.json: load cases, compliance shares, checks."""

from __future__ import annotations

import csv
from pathlib import Path

from stiff.check import CheckResult
from stiff.checks.base import worst_first


def load_case_rows(result: CheckResult) -> list[dict[str, object]]:
    """One row a load case, its inputs echoed, units in the column names."""
    rows = []
    for lc in result.load_cases:
        row: dict[str, object] = {
            "load_case": lc.name,
            "description": lc.case.description,
            "foot_held": lc.case.foot_held,
        }
        for axis, f, d in zip("xyz", lc.case.foot_force_N, lc.foot_deflection_mm, strict=True):
            row[f"foot_force_{axis}_N"] = f
            row[f"foot_deflection_{axis}_mm"] = d
        for a in lc.actuators:
            row[f"{a.name}_torque_Nm"] = a.torque_Nmm / 1e3
            row[f"{a.name}_stall_torque_Nm"] = a.stall_torque_Nmm / 1e3
        for s in lc.springs:
            row[f"{s.name}_force_N"] = s.force_N
            row[f"{s.name}_length_mm"] = s.length_mm
        rows.append(row)
    return rows


def compliance_rows(result: CheckResult) -> list[dict[str, object]]:
    """Shares of the foot's give by element, for the vertical and lateral unit loads."""
    st = result.stiffness
    return [{"load": load, "name": s.name, "kind": s.kind, "share": s.share}
            for load, shares in (("vertical", st.vertical), ("lateral", st.lateral))
            for s in shares]


def check_rows(result: CheckResult) -> list[dict[str, object]]:
    """Every check, worst first."""
    return [{"item": c.item, "kind": c.kind, "mode": c.mode, "load_case": c.load_case,
             "demand": c.demand, "capacity": c.capacity, "unit": c.unit,
             "safety_factor": c.safety_factor, "required_factor": c.required_factor,
             "status": c.status, "basis": c.basis} for c in worst_first(result.checks)]


def write_csv(path: Path, rows: list[dict[str, object]]) -> Path:
    """Write rows (dicts with possibly different keys) as one CSV with the union of columns."""
    columns: list[str] = []
    for row in rows:
        columns.extend(k for k in row if k not in columns)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=columns)
        writer.writeheader()
        writer.writerows(rows)
    return path


def write_tables(result: CheckResult, out_dir: Path) -> list[Path]:
    """load_cases.csv, compliance.csv and checks.csv in ``out_dir`` (which must exist)."""
    return [write_csv(out_dir / "load_cases.csv", load_case_rows(result)),
            write_csv(out_dir / "compliance.csv", compliance_rows(result)),
            write_csv(out_dir / "checks.csv", check_rows(result))]

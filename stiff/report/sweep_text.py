"""The text `stiff sweep` and `stiff map` print: short summaries with units in every label."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from stiff.case_model import Case
from stiff.check import CheckResult, run_check
from stiff.sweep import Prefer, Sensitivity, VariantRow, pareto_front, recommend, sensitivity
from stiff.sweep_spec import Variable, apply_values
from stiff.workspace import NEAR_SINGULAR, PoseRow, WorkspaceMap

#: Checks the closest variant misses that the summary lists; the CSV has all of them.
SHOW_MISSES = 8


@dataclass(frozen=True)
class SweepOutcome:
    """What a sweep reports: its rows, the recommended (or closest) variant with its full
    `stiff check` result, the sensitivities, and the files written (None when not written)."""

    case: Case
    variables: tuple[Variable, ...]
    rows: tuple[VariantRow, ...]
    prefer: Prefer
    best: VariantRow | None
    meets: bool
    check: CheckResult | None
    sensitivities: tuple[Sensitivity, ...]
    csv_path: Path | None = None
    png_path: Path | None = None


def sweep_outcome(case: Case, variables: tuple[Variable, ...], rows: Sequence[VariantRow],
                  prefer: Prefer) -> SweepOutcome:
    """The recommendation, its `stiff check` result and the sensitivities of a sweep's rows."""
    best, meets = recommend(rows, prefer)
    check = None if best is None else run_check(apply_values(case, variables, best.values))
    return SweepOutcome(case, variables, tuple(rows), prefer, best, meets, check,
                        sensitivity(variables, rows))


def outcome_lines(o: SweepOutcome) -> list[str]:
    """:func:`sweep_lines` of an outcome."""
    return sweep_lines(o.case, o.variables, o.rows, o.best, o.meets, o.prefer, o.check,
                       o.sensitivities)


def headline(variables: tuple[Variable, ...], rows: Sequence[VariantRow]) -> list[str]:
    """How many variants, how many meet everything and are on the Pareto front, and the first
    that could not be checked (if any): the sweep's opening lines."""
    met = sum(1 for r in rows if not r.error and r.all_met)
    failed = [r for r in rows if r.error]
    out = [f"{len(rows)} variants of {', '.join(v.name for v in variables)}; {met} meet every "
           f"check and target, {len(pareto_front(rows))} on the mass-compliance Pareto front"]
    if failed:
        out.append(f"{len(failed)} variants could not be checked, e.g. variant "
                   f"{failed[0].index}: {failed[0].error}")
    return out


def settings_text(variables: tuple[Variable, ...], row: VariantRow) -> str:
    """A variant's settings as ``name=value, ...``."""
    return ", ".join(f"{v.name}={x:g}" if isinstance(x, float) else f"{v.name}={x}"
                     for v, x in zip(variables, row.values, strict=True))


def row_text(row: VariantRow) -> str:
    """A variant's amounts and results on one line, with units."""
    return (f"mass {row.mass_g:.1f} g, printed volume {row.printed_volume_cm3:.1f} cm³, print "
            f"time {row.print_time_min:.0f} min, foot C_yy {row.vertical_mm_per_N:.4g} mm/N, "
            f"largest {row.principal_mm_per_N:.4g} mm/N, lateral {row.lateral_mm_per_N:.4g} "
            f"mm/N, min factor {row.min_factor:.3g} ({row.min_factor_check})")


def sweep_lines(case: Case, variables: tuple[Variable, ...], rows: Sequence[VariantRow],
                recommended: VariantRow | None, meets: bool, prefer: Prefer,
                check: CheckResult | None, sens: Sequence[Sensitivity]) -> list[str]:
    """The summary of a sweep: counts, the recommendation with its governing checks (from
    ``check``, the recommended variant's full `stiff check` result) and the sensitivities."""
    out = headline(variables, rows)
    out[0] = f"{case.title}: {out[0]}"
    if recommended is None:
        out.append("no variant could be checked")
        return out
    if meets:
        best = "lightest" if prefer == "mass" else "fastest to print"
        out.append(f"recommended ({best} meeting everything): variant {recommended.index}: "
                   f"{settings_text(variables, recommended)}")
    else:
        out.append("NO variant meets every check and target; the closest (lowest worst "
                   f"utilisation {recommended.worst_utilisation:.3g}) is variant "
                   f"{recommended.index}: {settings_text(variables, recommended)}")
        out.extend(f"  misses {m}" for m in recommended.not_met[:SHOW_MISSES])
        if len(recommended.not_met) > SHOW_MISSES:
            out.append(f"  ... and {len(recommended.not_met) - SHOW_MISSES} more (the "
                       "not_met column of sweep.csv)")
    out.append("  " + row_text(recommended))
    if check is not None:
        out.append("  governing check of every item (factor / required):")
        out.extend(f"    {r.item}: {r.mode} ({r.load_case}) {r.safety_factor:.3g} / "
                   f"{r.required_factor:g} {r.status}" for r in check.governing)
    out.append("sensitivity (one at a time about the first values; range across the values):")
    out.extend(f"  {s.variable}: C_yy {s.compliance_range_mm_per_N:.3g} mm/N, min factor "
               f"{s.min_factor_range:.3g}, mass {s.mass_range_g:.3g} g" for s in sens)
    return out


def map_lines(case: Case, result: WorkspaceMap) -> list[str]:
    """The summary of a workspace map: what was mapped, the extremes and the flagged poses."""
    reach = [r for r in result.rows if r.reachable]
    grid = " x ".join(str(n) for n in result.shape)
    if result.targets_mm:
        xs = [t[0] for t in result.targets_mm]
        ys = [t[1] for t in result.targets_mm]
        out = [f"{case.title}: {grid} foot targets over x {min(xs):.1f}..{max(xs):.1f} mm, "
               f"y {min(ys):.1f}..{max(ys):.1f} mm; {len(reach)} reachable, "
               f"{len(result.unreachable)} unreachable"]
    else:
        out = [f"{case.title}: {grid} poses over {', '.join(result.mapped)}"
               + (f" (held at the pose: {', '.join(result.held)})" if result.held else "")
               + f"; {len(reach)} reachable, {len(result.unreachable)} unreachable or jammed"]
    if reach:
        soft = max(reach, key=lambda r: r.vertical_mm_per_N)
        weak = min(reach, key=lambda r: r.min_factor)
        sing = min(reach, key=lambda r: r.singularity)

        def at(r: PoseRow) -> str:
            return ", ".join(f"{a.name} {math.degrees(x):.1f}°"
                             for a, x in zip(case.actuators, r.angles_rad, strict=True))
        out.append(f"softest: C_yy {soft.vertical_mm_per_N:.4g} mm/N at {at(soft)}; lateral "
                   f"{min(r.lateral_mm_per_N for r in reach):.4g}.."
                   f"{max(r.lateral_mm_per_N for r in reach):.4g} mm/N")
        out.append(f"weakest: min factor {weak.min_factor:.3g} ({weak.min_factor_check}) at "
                   f"{at(weak)}")
        out.append(f"lowest singularity measure {sing.singularity:.3g} at {at(sing)}; "
                   f"{len(result.near_singular)} poses below {NEAR_SINGULAR:g} (near singular)")
    for r in result.unreachable[:3]:
        where = (f" (target {result.targets_mm[r.index][0]:.1f}, "
                 f"{result.targets_mm[r.index][1]:.1f} mm)" if result.targets_mm else "")
        out.append(f"unreachable pose {r.index}{where}: {r.why}")
    if len(result.unreachable) > 3:
        out.append(f"... and {len(result.unreachable) - 3} more unreachable poses (see the CSV)")
    return out

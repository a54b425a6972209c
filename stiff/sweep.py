"""Design sweeps: every combination of the swept settings, checked as `stiff check` does, then
the trade between mass, print time, stiffness and strength, a recommendation and the
sensitivities.

Each variant is the case with the settings replaced (``stiff.sweep_spec.apply_values``),
checked with every load case and check of `stiff check` through the batched path
(``stiff.batched.check_variant``: its own pose, and the map's poses with ``poses``), so a
variant's numbers are what ``stiff check`` gives for a case file with those settings (to
round-off; tested). Per variant:

* ``mass_g``: Σ mass per length x length over every member (tubes and printed segments) [g];
  joints' pins, lugs, hardware and actuators are not counted.
* ``printed_volume_cm3``: Σ outline area x length over the printed members [cm³] (what the
  slicer fills, walls + skins + infill); it ignores holes, lugs and the ends beyond the nodes.
* ``extruded_volume_cm3``: the plastic actually laid down, Σ region area x region fill x length
  (the core counts at its infill density) [cm³].
* ``print_time_min``: extruded volume / volumetric rate [min]. The default rate,
  :data:`DEFAULT_RATE_MM3_PER_S` = 8 mm³/s, is common practice for a 0.4 mm nozzle printing
  PLA/PETG at ordinary speeds (practice); travel, heating and first layers are not counted.
* ``vertical_mm_per_N`` (C_yy), ``principal_mm_per_N`` (largest eigenvalue of the in-plane and
  lateral 3x3 compliance), ``lateral_mm_per_N`` (C_zz): foot compliance in the case's pose.
* ``min_factor`` and ``min_factor_check``: the smallest safety factor over every check in every
  load case, and which check it is; ``worst_utilisation``: the largest required/actual factor
  (above 1 some check or target misses); ``all_met``: every check and target met.

The sensitivity table (:func:`sensitivity`) is one-at-a-time about the base variant: for each
variable, the variants where every other variable is at its first (base) value, and the range
(max - min) of vertical compliance and of minimum factor across its values.
"""

from __future__ import annotations

import csv
import itertools
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import partial
from pathlib import Path
from typing import Literal

import numpy as np

from stiff.batched import (
    Checked,
    Geometry,
    all_met,
    case_geometry,
    check_variant,
    geometry_key,
    lowest_check,
    not_met,
    worst_utilisation,
)
from stiff.build import Built, Sections
from stiff.case_model import Case
from stiff.errors import StiffError
from stiff.pool import WORKERS, map_items
from stiff.sweep_spec import Value, Variable, apply_values

G_PER_T = 1.0e6
CM3_PER_MM3 = 1.0e-3
#: Volumetric print rate [mm³/s]: common practice for a 0.4 mm nozzle at ordinary speeds.
DEFAULT_RATE_MM3_PER_S = 8.0
Prefer = Literal["mass", "time"]


@dataclass(frozen=True)
class Amounts:
    """How much material a case takes: mass [g], outline and extruded volume [cm³]."""

    mass_g: float
    printed_volume_cm3: float
    extruded_volume_cm3: float


@dataclass(frozen=True)
class VariantRow:
    """One variant's settings and results (see the module docstring for every field's unit).

    ``error`` is the one-line reason when the variant could not be checked (its numbers NaN).
    """

    index: int
    values: tuple[Value, ...]
    mass_g: float
    printed_volume_cm3: float
    extruded_volume_cm3: float
    print_time_min: float
    vertical_mm_per_N: float
    principal_mm_per_N: float
    lateral_mm_per_N: float
    min_factor: float
    min_factor_check: str
    worst_utilisation: float
    all_met: bool
    not_met: tuple[str, ...]
    error: str = ""


def amounts(case: Case, built: Built) -> Amounts:
    """Mass and printed volumes of every member of ``built`` (see the module docstring)."""
    mass = outline = extruded = 0.0
    for (a, b), bs, ps in zip(built.beam_segment, built.beam_sections, built.beam_printed,
                              strict=True):
        length = math.dist(case.nodes[a], case.nodes[b])
        mass += bs.mass_per_length * length
        if ps is not None:
            outline += ps.outline_area_mm2 * length
            rho = ps.material.density_t_mm3
            extruded += sum(r.area_mm2 * r.density_t_mm3 / rho for r in ps.regions) * length
    return Amounts(mass * G_PER_T, outline * CM3_PER_MM3, extruded * CM3_PER_MM3)


def _failed_row(index: int, values: tuple[Value, ...], why: str) -> VariantRow:
    nan = math.nan
    return VariantRow(index, values, nan, nan, nan, nan, nan, nan, nan, nan, "", math.inf,
                      False, (), error=why)


def row_from_checked(index: int, values: tuple[Value, ...], checked: Checked,
                     rate_mm3_per_s: float) -> VariantRow:
    """A variant's row from its batched check (compliance in the case's own pose, factors over
    every pose checked); ``rate_mm3_per_s`` [mm³/s]."""
    pc = checked.checks
    amount = amounts(pc.case, checked.built)
    C = pc.compliance_mm_per_N[0]
    low, low_check = lowest_check(pc)
    worst = worst_utilisation(pc)
    met = checked.play_met and all_met(pc)
    missing = not_met(pc) + ([] if checked.play_met else ["a play target"])
    return VariantRow(
        index=index, values=values, mass_g=amount.mass_g,
        printed_volume_cm3=amount.printed_volume_cm3,
        extruded_volume_cm3=amount.extruded_volume_cm3,
        print_time_min=amount.extruded_volume_cm3 / CM3_PER_MM3 / rate_mm3_per_s / 60.0,
        vertical_mm_per_N=float(C[1, 1]),
        principal_mm_per_N=float(np.linalg.eigh(C)[0].max()),  # as foot_stiffness
        lateral_mm_per_N=float(C[2, 2]), min_factor=low, min_factor_check=low_check,
        worst_utilisation=worst, all_met=met, not_met=tuple(missing))


def evaluate(case: Case, variables: tuple[Variable, ...], index: int, values: tuple[Value, ...],
             rate_mm3_per_s: float, geometry: Geometry | None = None,
             only: Sequence[str] | None = None, sections: Sections | None = None
             ) -> VariantRow:
    """One variant checked through the batched path (``stiff.batched``), in the poses of
    ``geometry`` when its linkage is the base case's (else in its own pose); a StiffError
    becomes a row with its ``error``."""
    try:
        variant = apply_values(case, variables, values)
        same = geometry is not None and geometry_key(variant) == geometry_key(case)
        geo = geometry if same and geometry is not None else case_geometry(variant)
        checked = check_variant(variant, geo, only=only, sections=sections)
    except StiffError as err:
        return _failed_row(index, values, str(err).replace("\n", " "))
    return row_from_checked(index, values, checked, rate_mm3_per_s)


def variant_values(variables: tuple[Variable, ...]) -> list[tuple[Value, ...]]:
    """Every combination of the variables' values, the last variable fastest."""
    return list(itertools.product(*(v.values for v in variables)))


def run_sweep(case: Case, variables: tuple[Variable, ...],
              rate_mm3_per_s: float = DEFAULT_RATE_MM3_PER_S,
              progress: Callable[[int], None] | None = None,
              workers: int = WORKERS,
              poses: Sequence[Sequence[float]] = (),
              load_cases: Sequence[str] | None = None) -> tuple[VariantRow, ...]:
    """Every variant of the full factorial, in order.

    Parameters
    ----------
    case : the base case
    variables : from :func:`stiff.sweep_spec.parse_specs`
    rate_mm3_per_s : volumetric print rate for the print-time estimate [mm³/s]
    progress : called with the number of variants just finished (for a progress bar)
    workers : processes when there are more than :data:`stiff.pool.POOL_ABOVE` variants
    poses : more poses (actuator angles [rad], in the case's actuator order) every variant is
        checked in besides its own; its factors are then the lowest over all of them
    load_cases : the names of the load cases to check (all of the case's by default; from
        :func:`stiff.sweep_spec.parse_load_cases`)
    """
    combos = list(enumerate(variant_values(variables)))
    try:
        geometry: Geometry | None = case_geometry(case, poses)
    except StiffError:
        geometry = None  # each variant then says why in its row
    # each worker process keeps its own copy of the sections it meets
    job = partial(_evaluate_item, case, variables, rate_mm3_per_s, geometry, load_cases,
                  Sections())
    return tuple(map_items(job, combos, workers, progress))


def _evaluate_item(case: Case, variables: tuple[Variable, ...], rate_mm3_per_s: float,
                   geometry: Geometry | None, only: Sequence[str] | None, sections: Sections,
                   item: tuple[int, tuple[Value, ...]]) -> VariantRow:
    return evaluate(case, variables, item[0], item[1], rate_mm3_per_s, geometry, only,
                    sections)


def pareto_front(rows: Sequence[VariantRow]) -> tuple[int, ...]:
    """Indices of the variants no other variant beats in both mass and vertical compliance."""
    ok = [r for r in rows if not r.error]
    front = []
    for r in ok:
        dominated = any(o.mass_g <= r.mass_g and o.vertical_mm_per_N <= r.vertical_mm_per_N
                        and (o.mass_g < r.mass_g or o.vertical_mm_per_N < r.vertical_mm_per_N)
                        for o in ok)
        if not dominated:
            front.append(r.index)
    return tuple(front)


def recommend(rows: Sequence[VariantRow], prefer: Prefer = "mass"
              ) -> tuple[VariantRow | None, bool]:
    """The recommended variant and whether it meets everything.

    The lightest (``prefer="mass"``) or fastest to print (``"time"``) variant meeting every
    check and target, ties to the stiffer; when none does, the closest: the lowest worst
    utilisation (required over actual factor), returned with ``False``.
    """
    ok = [r for r in rows if not r.error]
    if not ok:
        return None, False
    met = [r for r in ok if r.all_met]
    if met:
        def key(r: VariantRow) -> tuple[float, float]:
            return (r.mass_g if prefer == "mass" else r.print_time_min, r.vertical_mm_per_N)
        return min(met, key=key), True
    return min(ok, key=lambda r: (r.worst_utilisation, r.mass_g)), False


@dataclass(frozen=True)
class Sensitivity:
    """How much one variable moves the results about the base variant.

    Ranges are max - min across its values with the others at their base values: vertical
    compliance [mm/N], minimum factor [-], mass [g].
    """

    variable: str
    compliance_range_mm_per_N: float
    min_factor_range: float
    mass_range_g: float


def sensitivity(variables: tuple[Variable, ...], rows: Sequence[VariantRow]
                ) -> tuple[Sensitivity, ...]:
    """One-at-a-time ranges per variable, largest compliance range first."""
    out = []
    for k, var in enumerate(variables):
        line = [r for r in rows if not r.error and all(
            r.values[j] == v.values[0] for j, v in enumerate(variables) if j != k)]

        def spread(xs: list[float]) -> float:
            finite = [x for x in xs if math.isfinite(x)]
            return max(finite) - min(finite) if finite else math.nan
        out.append(Sensitivity(var.name, spread([r.vertical_mm_per_N for r in line]),
                               spread([r.min_factor for r in line]),
                               spread([r.mass_g for r in line])))
    return tuple(sorted(out, key=lambda s: -np.nan_to_num(s.compliance_range_mm_per_N)))


CSV_COLUMNS = ("variant", "mass_g", "printed_volume_cm3", "extruded_volume_cm3",
               "print_time_min", "vertical_mm_per_N", "principal_mm_per_N", "lateral_mm_per_N",
               "min_factor", "min_factor_check", "worst_utilisation", "all_met", "pareto",
               "not_met", "error")


def write_csv(path: Path, variables: tuple[Variable, ...], rows: Sequence[VariantRow]) -> Path:
    """Write one line per variant: its settings (columns ``part.setting``, infill in %) and
    every result column of :data:`CSV_COLUMNS`."""
    front = set(pareto_front(rows))
    path.parent.mkdir(parents=True, exist_ok=True)
    with path.open("w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow([CSV_COLUMNS[0], *(v.name for v in variables), *CSV_COLUMNS[1:]])
        for r in rows:
            writer.writerow([
                r.index, *r.values, f"{r.mass_g:.6g}", f"{r.printed_volume_cm3:.6g}",
                f"{r.extruded_volume_cm3:.6g}", f"{r.print_time_min:.6g}",
                f"{r.vertical_mm_per_N:.6g}", f"{r.principal_mm_per_N:.6g}",
                f"{r.lateral_mm_per_N:.6g}", f"{r.min_factor:.6g}", r.min_factor_check,
                f"{r.worst_utilisation:.6g}", r.all_met, r.index in front,
                "; ".join(r.not_met), r.error])
    return path

"""Allowables and required factors: from a table's mean to the strength a check compares with.

For a printed part the chain is (each step recorded with its source, ``stiff.strength``):

1. the direction-aware mean strength (along the lines, Tsai–Hill off axis, or across layers);
2. the service temperature's retention, when the case is above room temperature;
3. a B-basis value from the coefficient of variation (along the lines or across layers);
4. the sustained-load fraction for loads held for a long time (stance or payload with the
   springs' preload), or the fatigue fraction at about 10⁶ cycles for repeated loads (landing,
   slip) when the case gives at least 10⁴ cycles.

Metals use their table basis (ISO 898-1 minimum for bolts). Required factors per kind of
failure have documented defaults (common practice, REFERENCES.md §10: with B-basis allowables
and environment, creep and fatigue knock-downs, 1.5 on ultimate load; more across the layers,
where printed parts are notch-sensitive and scatter most) and the case's ``[factors]`` table
overrides them; ``targets.min_safety_factor`` raises every one to at least its value.
"""

from __future__ import annotations

from dataclasses import dataclass

from stiff.errors import MaterialError
from stiff.factors import FACTORS, FailureKind, RequiredFactors, read_factors
from stiff.materials import PrintedMaterial
from stiff.strength import (
    ROOM_TEMPERATURE_C,
    Allowable,
    at_temperature,
    fatigue,
    printed_b_basis,
    sustained,
)

__all__ = ["FACTORS", "Duty", "FailureKind", "RequiredFactors", "duty", "printed_allowable",
           "read_factors"]

#: Load cases whose loads are held for a long time (creep), and those repeated every step or
#: hop (fatigue).
SUSTAINED_CASES = ("stance", "payload")
REPEATED_PREFIXES = ("landing", "slip")
#: Cycles from which the fatigue fraction applies (common practice: below about 10⁴ cycles a
#: static allowable with its factor covers low-cycle loading).
FATIGUE_FROM_CYCLES = 1e4


@dataclass(frozen=True)
class Duty:
    """What a load case asks of a material: temperature, sustained, repeated."""

    temperature_C: float | None
    sustained: bool
    repeated: bool


def duty(load_case: str, temperature_C: float | None, cycles: float | None) -> Duty:
    """The duty of a load case, from its name and the case's service conditions."""
    repeated = (cycles is not None and cycles >= FATIGUE_FROM_CYCLES
                and load_case.startswith(REPEATED_PREFIXES))
    return Duty(temperature_C=temperature_C, sustained=load_case in SUSTAINED_CASES,
                repeated=repeated)


def printed_allowable(mean: Allowable, material: PrintedMaterial, across_layers: bool,
                      d: Duty, samples: int | None) -> Allowable:
    """A printed part's allowable from its mean: temperature, B-basis, sustained or fatigue."""
    out = mean
    if d.temperature_C is not None and d.temperature_C > ROOM_TEMPERATURE_C:
        try:
            out = at_temperature(out, material, d.temperature_C)
        except MaterialError as err:
            if d.temperature_C >= material.T_glass_C:
                raise
            out = out.scaled(1.0, f"no strength retention at {d.temperature_C:g} °C in the "
                                  f"table ({err.why}): the room-temperature value is used; "
                                  "test the part at its service temperature")
    out = printed_b_basis(out, material, across_layers, samples)
    if d.sustained:
        out = sustained(out, material)
    elif d.repeated:
        out = fatigue(out, material, across_layers)
    return out

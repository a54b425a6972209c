"""Required safety factors per kind of failure: documented defaults and the case's overrides.

Defaults are common practice (REFERENCES.md §10): with B-basis allowables and environment,
creep and fatigue knock-downs, 1.5 on ultimate load; more across the layers, where printed
parts are notch-sensitive and scatter most; 2 against buckling, which gives no warning; 1 for
an actuator's holding torque (back-driving is not breaking) and a spring's maximum length.
The case's ``[factors]`` table overrides them; ``targets.min_safety_factor`` raises every
strength and buckling factor to at least its value (not the actuator's or the spring's, which
are limits of use rather than of strength).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Literal

from stiff.case_reader import Field, Reader, positive

FailureKind = Literal["in_layer", "across_layers", "tube", "buckling", "pin", "adhesive",
                      "actuator", "spring"]

FACTORS = {
    "in_layer": positive(),
    "across_layers": positive(),
    "tube": positive(),
    "buckling": positive(),
    "pin": positive(),
    "adhesive": positive(),
    "actuator": positive(),
    "spring": positive(),
    "samples": Field("int", low=2),
}



@dataclass(frozen=True)
class RequiredFactors:
    """Required safety factor per kind of failure (defaults: common practice, see module)."""

    in_layer: float = 1.5
    across_layers: float = 2.0
    tube: float = 1.5
    buckling: float = 2.0
    pin: float = 1.5
    adhesive: float = 2.0
    actuator: float = 1.0
    spring: float = 1.0
    samples: int | None = None  # tests behind the table's means (None: a known population)

    def of(self, kind: FailureKind) -> float:
        """The required factor of a kind of failure."""
        value: float = getattr(self, kind)
        return value


def read_factors(reader: Reader, data: object, floor: float | None) -> RequiredFactors:
    """The case's [factors] table (and the targets' minimum factor) over the defaults."""
    v: dict[str, Any] = reader.table("factors", data, FACTORS)
    out = RequiredFactors(**v)
    if floor is not None:
        strength = [k for k in FACTORS if k not in ("samples", "actuator", "spring")]
        out = replace(out, **{k: max(getattr(out, k), floor) for k in strength})
    return out

"""Infill scaling laws: modulus and strength of a printed cellular core against its infill fraction.

A law is ``c ρ̄ⁿ`` of the solid value, ρ̄ the infill fraction (REFERENCES.md §7, after Gibson &
Ashby, *Cellular Solids*, 2nd ed. 1997, Tables 3.2 and 3.3). Such laws describe cellular solids,
which Gibson & Ashby take to be those below a relative density of about 0.3 (from memory). Above
that a core is no longer cellular, and the law is joined linearly to the solid value at ρ̄ = 1::

    f(ρ̄) = c ρ̄ⁿ                                   for ρ̄ <= 0.3
    f(ρ̄) = f(0.3) + (1 - f(0.3)) (ρ̄ - 0.3) / 0.7   for ρ̄ > 0.3       [derived]

so that ρ̄ = 1 gives the solid and f never falls as ρ̄ rises. Prismatic patterns (grid, grid_45,
triangles, honeycomb: the same cell in every layer) loaded along the build axis, i.e. along their
prisms, follow ρ̄ exactly. The core's shear modulus is scaled with the modulus law (a stated
simplification; the walls and skins carry most of the torsion).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np
import numpy.typing as npt

from stiff.printing import InfillLoad, InfillPattern, SectionError

#: Relative density below which a cellular-solid law holds (Gibson & Ashby, from memory).
CELLULAR_LIMIT = 0.3


@dataclass(frozen=True)
class PatternLaw:
    """``E*/E_s = modulus_coeff ρ̄^modulus_exponent`` and the same for strength, with provenance."""

    pattern: InfillPattern
    load: InfillLoad
    modulus_coeff: float
    modulus_exponent: float
    strength_coeff: float
    strength_exponent: float
    source: str
    confidence: str

    def modulus_ratio(self, fraction: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """E*/E_s at infill fraction(s) ``fraction`` (0-1), joined to the solid above 0.3."""
        return _joined(np.asarray(fraction, np.float64), self.modulus_coeff, self.modulus_exponent)

    def strength_ratio(self, fraction: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """σ*/σ_s at infill fraction(s) ``fraction`` (0-1), joined to the solid above 0.3."""
        return _joined(
            np.asarray(fraction, np.float64), self.strength_coeff, self.strength_exponent
        )


def _joined(rho: npt.NDArray[np.float64], c: float, n: float) -> npt.NDArray[np.float64]:
    if np.any(~np.isfinite(rho)) or np.any(rho < 0.0) or np.any(rho > 1.0):
        raise SectionError("infill", "infill fraction must be between 0 and 1")
    at_limit = c * CELLULAR_LIMIT**n
    cellular = c * rho**n
    joined = at_limit + (1.0 - at_limit) * (rho - CELLULAR_LIMIT) / (1.0 - CELLULAR_LIMIT)
    return np.asarray(np.where(rho <= CELLULAR_LIMIT, cellular, joined), np.float64)


_GA = "Gibson & Ashby, Cellular Solids, 2nd ed. (1997)"
_PRISM = PatternLaw(
    "grid",
    "along_build",
    1.0,
    1.0,
    1.0,
    1.0,
    f"prismatic cells loaded along the prism axis: E*/E_s = σ*/σ_s = ρ̄ ({_GA}, Table 3.2)",
    "confirmed",
)

LAWS: Mapping[tuple[InfillPattern, InfillLoad], PatternLaw] = MappingProxyType(
    {
        ("grid", "in_layer"): PatternLaw(
            "grid",
            "in_layer",
            0.5,
            1.0,
            0.5,
            1.0,
            "lines along the load: half the material is aligned, ρ̄/2 (typical, from memory)",
            "memory",
        ),
        ("grid_45", "in_layer"): PatternLaw(
            "grid_45",
            "in_layer",
            0.25,
            3.0,
            0.25,
            2.0,
            f"square cells at 45° bend like a honeycomb with θ = 45°, h = 0: E*/E_s = 2(t/l)³ = "
            f"ρ̄³/4 and σ*/σ_s = (t/l)² = ρ̄²/4 with ρ̄ = 2t/l ({_GA}, ch. 4, formulas from memory)",
            "derived",
        ),
        ("triangles", "in_layer"): PatternLaw(
            "triangles",
            "in_layer",
            1.0 / 3.0,
            1.0,
            1.0 / 3.0,
            1.0,
            f"stretch-dominated triangular cells, isotropic in plane: ρ̄/3 ({_GA}; Wang & McDowell "
            "2004, from memory)",
            "memory",
        ),
        ("honeycomb", "in_layer"): PatternLaw(
            "honeycomb",
            "in_layer",
            1.5,
            3.0,
            0.5,
            2.0,
            f"regular hexagons in plane: E*/E_s = 1.5ρ̄³, σ*/σ_s = 0.5ρ̄² ({_GA}, Table 3.2)",
            "confirmed",
        ),
        ("gyroid", "in_layer"): PatternLaw(
            "gyroid",
            "in_layer",
            0.75,
            1.8,
            0.4,
            1.5,
            "gyroid: E*/E_s = Cρ̄ⁿ, mid-range of C 0.5-1 and n 1.6-2.0; σ*/σ_s mid-range of "
            "0.3-0.5 ρ̄^1.5 (typical, from memory)",
            "memory",
        ),
        ("grid", "along_build"): _PRISM,
        ("grid_45", "along_build"): PatternLaw(
            "grid_45", "along_build", 1.0, 1.0, 1.0, 1.0, _PRISM.source, _PRISM.confidence
        ),
        ("triangles", "along_build"): PatternLaw(
            "triangles", "along_build", 1.0, 1.0, 1.0, 1.0, _PRISM.source, _PRISM.confidence
        ),
        ("honeycomb", "along_build"): PatternLaw(
            "honeycomb", "along_build", 1.0, 1.0, 1.0, 1.0, _PRISM.source, _PRISM.confidence
        ),
        ("gyroid", "along_build"): PatternLaw(
            "gyroid",
            "along_build",
            0.75,
            1.8,
            0.4,
            1.5,
            "gyroid is not prismatic and about as stiff along the build axis as in plane: the "
            "in-layer law is used (typical, from memory)",
            "memory",
        ),
    }
)


def law(pattern: InfillPattern, load: InfillLoad) -> PatternLaw:
    """The law of ``pattern`` loaded ``in_layer`` or ``along_build``."""
    return LAWS[(pattern, load)]


def modulus_ratio(
    pattern: InfillPattern, fraction: npt.ArrayLike, load: InfillLoad
) -> npt.NDArray[np.float64]:
    """Core modulus over solid modulus, E*/E_s, at infill fraction(s) ``fraction`` (0-1).

    Raises
    ------
    SectionError
        A fraction outside [0, 1].
    """
    return law(pattern, load).modulus_ratio(fraction)


def strength_ratio(
    pattern: InfillPattern, fraction: npt.ArrayLike, load: InfillLoad
) -> npt.NDArray[np.float64]:
    """Core strength over solid strength, σ*/σ_s, at infill fraction(s) ``fraction`` (0-1).

    Raises
    ------
    SectionError
        A fraction outside [0, 1].
    """
    return law(pattern, load).strength_ratio(fraction)

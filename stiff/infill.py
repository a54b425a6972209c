"""Infill scaling laws: modulus, shear modulus and strength of a printed cellular core.

A law is ``c ρ̄ⁿ`` of the solid value, ρ̄ the infill fraction (REFERENCES.md §7, after Gibson &
Ashby, *Cellular Solids*, 2nd ed. 1997, Tables 3.2 and 3.3). Such laws describe cellular solids,
which Gibson & Ashby take to be those below a relative density of about 0.3 (from memory). Above
that a core is no longer cellular, and the law is joined linearly to the solid value at ρ̄ = 1::

    f(ρ̄) = c ρ̄ⁿ                                   for ρ̄ <= 0.3
    f(ρ̄) = f(0.3) + (s - f(0.3)) (ρ̄ - 0.3) / 0.7   for ρ̄ > 0.3       [derived]

with s the solid value (1 for E*/E_s and σ*/σ_s), so that ρ̄ = 1 gives the solid and f never
falls as ρ̄ rises. Each pattern has two laws:

* ``in_layer``: stress in the plane of the layers: Young's modulus along the member and the shear
  modulus for shear in the layer plane;
* ``along_build``: stress along the build axis, the axis of the prisms of a prismatic pattern
  (grid, grid_45, triangles, honeycomb: the same cell in every layer): Young's modulus along the
  prisms (ρ̄ exactly) and the shear modulus for shear on planes that contain the prism axis.

Shear laws of in-layer shear are stated against the solid's Young's modulus E_s where they come
from line stretching or bending (``shear_basis = "E"``), and are joined to the solid's G_s; the
others are stated against G_s.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from types import MappingProxyType
from typing import Literal

import numpy as np
import numpy.typing as npt

from stiff.printing import InfillLoad, InfillPattern, SectionError

#: Relative density below which a cellular-solid law holds (Gibson & Ashby, from memory).
CELLULAR_LIMIT = 0.3


@dataclass(frozen=True)
class PatternLaw:
    """One pattern under one kind of load, with the provenance of its constants.

    ``E*/E_s = modulus_coeff ρ̄^modulus_exponent``; ``σ*/σ_s = strength_coeff ρ̄^strength_exponent``;
    ``G* = shear_coeff ρ̄^shear_exponent x (E_s or G_s, by shear_basis)``.
    """

    pattern: InfillPattern
    load: InfillLoad
    modulus_coeff: float
    modulus_exponent: float
    strength_coeff: float
    strength_exponent: float
    shear_coeff: float
    shear_exponent: float
    shear_basis: Literal["E", "G"]
    source: str
    confidence: str

    def modulus_ratio(self, fraction: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """E*/E_s at infill fraction(s) ``fraction`` (0-1), joined to the solid above 0.3."""
        return _joined(_fraction(fraction), self.modulus_coeff, self.modulus_exponent, 1.0)

    def strength_ratio(self, fraction: npt.ArrayLike) -> npt.NDArray[np.float64]:
        """σ*/σ_s at infill fraction(s) ``fraction`` (0-1), joined to the solid above 0.3."""
        return _joined(_fraction(fraction), self.strength_coeff, self.strength_exponent, 1.0)

    def shear_modulus(
        self, fraction: npt.ArrayLike, E_solid_MPa: float, G_solid_MPa: float
    ) -> npt.NDArray[np.float64]:
        """Core shear modulus G* [MPa] from the solid's E_s and G_s [MPa], G_s at ρ̄ = 1."""
        rho = _fraction(fraction)
        base = E_solid_MPa if self.shear_basis == "E" else G_solid_MPa
        return base * _joined(rho, self.shear_coeff, self.shear_exponent, G_solid_MPa / base)


def _fraction(fraction: npt.ArrayLike) -> npt.NDArray[np.float64]:
    rho = np.asarray(fraction, np.float64)
    if np.any(~np.isfinite(rho)) or np.any(rho < 0.0) or np.any(rho > 1.0):
        raise SectionError("infill", "infill fraction must be between 0 and 1")
    return rho


def _joined(
    rho: npt.NDArray[np.float64], c: float, n: float, solid: float
) -> npt.NDArray[np.float64]:
    at_limit = c * CELLULAR_LIMIT**n
    cellular = c * rho**n
    joined = at_limit + (solid - at_limit) * (rho - CELLULAR_LIMIT) / (1.0 - CELLULAR_LIMIT)
    return np.asarray(np.where(rho <= CELLULAR_LIMIT, cellular, joined), np.float64)


_GA = "Gibson & Ashby, Cellular Solids, 2nd ed. (1997)"
_PRISM_SOURCE = (
    f"prismatic cells along their axis: E*/E_s = σ*/σ_s = ρ̄ ({_GA}, Table 3.2) [confirmed]; "
    "shear on planes containing the prism axis: the cell walls parallel to the shear carry it, "
    "G*/G_s = ρ̄ <cos²> = ρ̄/2 (derived; about 0.5ρ̄ for regular hexagons in Gibson & Ashby, "
    "from memory)"
)


def _prism(pattern: InfillPattern) -> PatternLaw:
    return PatternLaw(
        pattern, "along_build", 1.0, 1.0, 1.0, 1.0, 0.5, 1.0, "G", _PRISM_SOURCE, "derived"
    )


_GYROID_SOURCE = (
    "gyroid: E*/E_s = Cρ̄ⁿ with the mid-range of C 0.5-1 and n 1.6-2.0, σ*/σ_s the mid-range of "
    "0.3-0.5 ρ̄^1.5 (typical, from memory); G*/G_s taken to follow E*/E_s (a nearly isotropic "
    "cell); not prismatic, so the same law along the build axis"
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
            1.0 / 16.0,
            3.0,
            "E",
            "lines along and across the load: half the material is aligned, E*/E_s = σ*/σ_s = "
            "ρ̄/2 (typical, from memory); in-layer shear bends the lines: G*/E_s = ρ̄³/16, from "
            "1/E(45°) = 1/(4G) + 1/(2E) with E = ρ̄/2 and E(45°) = ρ̄³/4 (the grid_45 law) "
            "[derived]",
            "memory",
        ),
        ("grid_45", "in_layer"): PatternLaw(
            "grid_45",
            "in_layer",
            0.25,
            3.0,
            0.25,
            2.0,
            0.25,
            1.0,
            "E",
            f"square cells at 45° bend like a honeycomb with θ = 45°, h = 0: E*/E_s = 2(t/l)³ = "
            f"ρ̄³/4 and σ*/σ_s = (t/l)² = ρ̄²/4 with ρ̄ = 2t/l ({_GA}, ch. 4, formulas from "
            "memory); in-layer shear stretches both line families: G*/E_s = 2 (ρ̄/2) cos²45° "
            "sin²45° = ρ̄/4 [derived]",
            "derived",
        ),
        ("triangles", "in_layer"): PatternLaw(
            "triangles",
            "in_layer",
            1.0 / 3.0,
            1.0,
            1.0 / 3.0,
            1.0,
            1.0 / 8.0,
            1.0,
            "E",
            f"stretch-dominated triangular cells, isotropic in plane: E*/E_s = σ*/σ_s = ρ̄/3 "
            f"({_GA}; Wang & McDowell 2004, from memory); with ν* = 1/3, G* = E*/(2(1 + ν*)) = "
            "ρ̄/8 [derived]",
            "memory",
        ),
        ("honeycomb", "in_layer"): PatternLaw(
            "honeycomb",
            "in_layer",
            1.5,
            3.0,
            0.5,
            2.0,
            0.375,
            3.0,
            "E",
            f"regular hexagons in plane: E*/E_s = 1.5ρ̄³, σ*/σ_s = 0.5ρ̄² ({_GA}, Table 3.2) "
            "[confirmed]; isotropic in plane with ν* = 1, G* = E*/4 = 0.375ρ̄³ (ν* from memory) "
            "[derived]",
            "derived",
        ),
        ("gyroid", "in_layer"): PatternLaw(
            "gyroid", "in_layer", 0.75, 1.8, 0.4, 1.5, 0.75, 1.8, "G", _GYROID_SOURCE, "memory"
        ),
        ("grid", "along_build"): _prism("grid"),
        ("grid_45", "along_build"): _prism("grid_45"),
        ("triangles", "along_build"): _prism("triangles"),
        ("honeycomb", "along_build"): _prism("honeycomb"),
        ("gyroid", "along_build"): PatternLaw(
            "gyroid", "along_build", 0.75, 1.8, 0.4, 1.5, 0.75, 1.8, "G", _GYROID_SOURCE, "memory"
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

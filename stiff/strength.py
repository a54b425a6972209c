"""Direction-aware strength of printed parts, and knock-downs that turn a mean into an allowable.

Every value is an :class:`Allowable`: the stress [MPa], its basis (``mean``, ``B-basis``,
``minimum``, ``typical``) and the steps that produced it, each naming its source, so that a check
can say where its capacity came from.

Within a layer the strength at an angle θ to the printed lines follows Tsai–Hill (REFERENCES.md
§7; Jones, *Mechanics of Composite Materials*; Daniel & Ishai):

    1/σ(θ)² = cos⁴θ/X² + (1/S² - 1/X²) cos²θ sin²θ + sin⁴θ/Y²

with X the strength along the lines, Y across them within the layer and S the in-layer shear
strength. A stress across the layers meets the interlayer strength instead.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Literal

import numpy as np
import numpy.typing as npt
from scipy import stats

from stiff.errors import MaterialError
from stiff.materials import MetalMaterial, PrintedMaterial
from stiff.printing import BuildDirection, check_build_direction

#: Loading of a member: axial tension or compression, or a transverse shear force along y or z.
MemberMode = Literal["tension", "compression", "shear_y", "shear_z"]
#: Which strength of a metal.
MetalStrength = Literal["ultimate", "yield", "proof"]

#: Temperature at which the tables' values hold [°C].
ROOM_TEMPERATURE_C = 23.0
#: The 90 % quantile of the standard normal distribution, k_B for a known population.
Z90 = float(stats.norm.ppf(0.90))


@dataclass(frozen=True)
class Allowable:
    """A strength with its provenance.

    Parameters
    ----------
    value_MPa
        The stress [MPa].
    basis
        ``mean``, ``B-basis (n=...)``, ``minimum`` or ``typical``.
    steps
        How it was obtained, first the source, then each knock-down with its factor and source.
    """

    value_MPa: float
    basis: str
    steps: tuple[str, ...]

    def scaled(self, factor: float, step: str, basis: str | None = None) -> Allowable:
        """This allowable times ``factor``, with ``step`` (and a new ``basis``) recorded."""
        return replace(
            self,
            value_MPa=self.value_MPa * factor,
            basis=self.basis if basis is None else basis,
            steps=(*self.steps, step),
        )

    @property
    def provenance(self) -> str:
        """The steps as one line."""
        return "; ".join(self.steps)


def tsai_hill(
    X_MPa: float, Y_MPa: float, S_MPa: float, angle_rad: npt.ArrayLike
) -> npt.NDArray[np.float64]:
    """Uniaxial strength at ``angle_rad`` [rad] to the strong axis of an orthotropic layer [MPa].

    Parameters
    ----------
    X_MPa, Y_MPa, S_MPa
        Strength along and across the strong axis, and in-plane shear strength [MPa].
    angle_rad
        Angle(s) between the stress and the strong axis [rad].
    """
    theta = np.asarray(angle_rad, np.float64)
    c2, s2 = np.cos(theta) ** 2, np.sin(theta) ** 2
    inv2 = c2**2 / X_MPa**2 + (1.0 / S_MPa**2 - 1.0 / X_MPa**2) * c2 * s2 + s2**2 / Y_MPa**2
    return np.asarray(1.0 / np.sqrt(inv2), np.float64)


def _mean(material: PrintedMaterial, column: str, value: float) -> Allowable:
    return Allowable(
        value, "mean", (f"{column} = {value:.4g} MPa: {material.provenance_of(column)}",)
    )


def in_layer_strength(material: PrintedMaterial, angle_rad: float) -> Allowable:
    """Mean tensile strength in a layer at ``angle_rad`` [rad] to the printed lines (Tsai–Hill)."""
    X = material.tension_xy_MPa
    Y = material.tension_in_layer_across_lines_MPa
    S = material.shear_in_layer_MPa
    value = float(tsai_hill(X, Y, S, angle_rad))
    step = (
        f"Tsai-Hill at {math.degrees(angle_rad):.1f} deg to the lines with X = {X:.4g}, "
        f"Y = {Y:.4g}, S = {S:.4g} MPa (Jones, Mechanics of Composite Materials); "
        f"{material.provenance_of('tension_xy_MPa')}"
    )
    return Allowable(value, "mean", (step,))


def across_layers_strength(material: PrintedMaterial, shear: bool = False) -> Allowable:
    """Mean interlayer strength: tension across the layers, or interlayer shear [MPa]."""
    if shear:
        return _mean(material, "shear_z_MPa", material.shear_across_layers_MPa)
    return _mean(material, "tension_z_MPa", material.tension_z_MPa)


def member_strength(
    material: PrintedMaterial,
    build: BuildDirection,
    mode: MemberMode,
    angle_rad: float = 0.0,
) -> Allowable:
    """Mean strength of a printed member's walls for stress along or across the member [MPa].

    Parameters
    ----------
    material
        The printed polymer.
    build
        Build direction relative to the member (:mod:`stiff.printing`).
    mode
        ``tension`` or ``compression`` along the member; ``shear_y`` or ``shear_z``: the shear
        stress on the cross-section from a shear force along y or z.
    angle_rad
        In flat and on-edge builds, the angle between the member and the printed lines [rad]
        (0 for walls, which follow the outline). Ignored when upright.

    Notes
    -----
    Tension along the member crosses the layers when upright (interlayer strength); otherwise it
    lies in a layer (Tsai–Hill). Compression uses the compressive strength in every build (layers
    pressed together do not part). A shear stress on the cross-section acts on the layer plane
    when upright (both directions), for ``shear_z`` when flat and ``shear_y`` when on edge: then the
    interlayer shear strength applies, else the in-layer one.
    """
    build = check_build_direction(build)
    if mode == "compression":
        return _mean(material, "compression_MPa", material.compression_strength_MPa)
    if mode == "tension":
        if build == "upright":
            return across_layers_strength(material)
        return in_layer_strength(material, angle_rad)
    across = build == "upright" or (build, mode) in (("flat", "shear_z"), ("on_edge", "shear_y"))
    if across:
        return across_layers_strength(material, shear=True)
    return _mean(material, "shear_xy_MPa", material.shear_in_layer_MPa)


def metal_strength(metal: MetalMaterial, which: MetalStrength) -> Allowable:
    """A metal's ultimate, yield (0.2 % proof) or proof-load stress [MPa], on its table basis."""
    values = {"ultimate": metal.ultimate_MPa, "yield": metal.yield_MPa, "proof": metal.proof_MPa}
    value = values[which]
    column = f"{which}_MPa"
    if value is None:
        raise MaterialError(metal.origin or None, metal.name, column, "no value in the table")
    return Allowable(
        value, metal.strength_basis, (f"{column} = {value:.4g} MPa: {metal.provenance_of(column)}",)
    )


# ---------------------------------------------------------------------------------------------
# Knock-downs


def k_b(samples: int | None) -> float:
    """One-sided tolerance factor for a B-basis value (90 % coverage, 95 % confidence).

    k_B = t'_{0.95}(n-1, z_{0.90} √n) / √n from the noncentral t distribution; ``None`` (n -> ∞)
    gives z_{0.90} = 1.2816 (REFERENCES.md §10: 3.41 at n = 5, 2.36 at 10, 1.93 at 20).

    Raises
    ------
    MaterialError
        Fewer than two samples.
    """
    if samples is None:
        return Z90
    z90 = Z90
    if samples < 2:
        raise MaterialError(
            None, None, "samples", f"a B-basis needs at least 2 samples, got {samples}"
        )
    root = math.sqrt(samples)
    return float(stats.nct.ppf(0.95, samples - 1, z90 * root)) / root


def b_basis(allowable: Allowable, cov: float, samples: int | None = None) -> Allowable:
    """A B-basis value from a mean and its coefficient of variation: mean x (1 - k_B CoV).

    Parameters
    ----------
    allowable
        A mean value.
    cov
        Coefficient of variation (0-1).
    samples
        Number of tests behind the mean; ``None`` for a known population (k_B = 1.28).

    Raises
    ------
    MaterialError
        The factor would not be positive (CoV too large for the sample size).
    """
    k = k_b(samples)
    factor = 1.0 - k * cov
    n_text = "n -> inf" if samples is None else f"n = {samples}"
    if factor <= 0.0:
        raise MaterialError(None, None, "cov", f"CoV {cov:g} with {n_text} leaves no B-basis value")
    step = (
        f"B-basis: x {factor:.3f} = 1 - k_B CoV, k_B = {k:.3f} ({n_text}, 90 % coverage, "
        f"95 % confidence, noncentral t), CoV = {cov:g}"
    )
    return allowable.scaled(factor, step, basis=f"B-basis ({n_text})")


def printed_b_basis(
    allowable: Allowable, material: PrintedMaterial, across_layers: bool, samples: int | None = None
) -> Allowable:
    """:func:`b_basis` with the table's CoV along the lines or across the layers."""
    column = "cov_z_ratio" if across_layers else "cov_xy_ratio"
    cov = material.cov_z_ratio if across_layers else material.cov_xy_ratio
    out = b_basis(allowable, cov, samples)
    return replace(out, steps=(*out.steps[:-1], f"{out.steps[-1]} ({column}, {_row(material)})"))


def _row(material: PrintedMaterial) -> str:
    """A short pointer to the table row whose source names the value."""
    where = material.origin or "table"
    return f"{where}, row {material.name} [{material.confidence}]"


def _retention(material: PrintedMaterial, T_C: float, column: str) -> tuple[float, str]:
    if T_C <= ROOM_TEMPERATURE_C:
        return 1.0, f"temperature {T_C:g} C: at or below {ROOM_TEMPERATURE_C:g} C, x 1"
    ratio = getattr(material, column)
    if material.T_hot_C is None or ratio is None:
        missing = "T_hot_C" if material.T_hot_C is None else column
        raise MaterialError(
            material.origin or None,
            material.name,
            missing,
            f"no elevated-temperature data for {T_C:g} C",
        )
    if material.T_hot_C < T_C:
        raise MaterialError(
            material.origin or None,
            material.name,
            "T_hot_C",
            f"{T_C:g} C is above the {material.T_hot_C:g} C of the table's retention data "
            f"(glass transition {material.T_glass_C:g} C)",
        )
    span = material.T_hot_C - ROOM_TEMPERATURE_C
    factor = 1.0 - (1.0 - ratio) * (T_C - ROOM_TEMPERATURE_C) / span
    step = (
        f"temperature {T_C:g} C: x {factor:.3f}, linear between 1 at {ROOM_TEMPERATURE_C:g} C "
        f"and {column} = {ratio:g} at {material.T_hot_C:g} C (linear: practice; "
        f"{_row(material)})"
    )
    return factor, step


def at_temperature(allowable: Allowable, material: PrintedMaterial, T_C: float) -> Allowable:
    """Strength knocked down for a service temperature ``T_C`` [°C] by the table's retention.

    Raises
    ------
    MaterialError
        No retention data in the table, or ``T_C`` above the temperature of the data.
    """
    factor, step = _retention(material, T_C, "strength_hot_ratio")
    return allowable.scaled(factor, step)


def modulus_retention(material: PrintedMaterial, T_C: float) -> tuple[float, str]:
    """Factor on the moduli at a service temperature ``T_C`` [°C], and where it comes from."""
    return _retention(material, T_C, "E_hot_ratio")


def sustained(allowable: Allowable, material: PrintedMaterial) -> Allowable:
    """Strength under a load held for a long time: the table's sustained fraction of the mean."""
    ratio = material.sustained_ratio
    return allowable.scaled(
        ratio, f"sustained load: x {ratio:g} (sustained_ratio, {_row(material)})"
    )


def fatigue(allowable: Allowable, material: PrintedMaterial, across_layers: bool) -> Allowable:
    """Strength at about 10⁶ cycles: the table's fatigue fraction along lines or across layers."""
    column = "fatigue_z_ratio" if across_layers else "fatigue_xy_ratio"
    ratio = material.fatigue_z_ratio if across_layers else material.fatigue_xy_ratio
    return allowable.scaled(ratio, f"fatigue, 1e6 cycles: x {ratio:g} ({column}, {_row(material)})")

"""Printed lugs: the formulas, the lug's geometry and the strengths its planes meet.

The methods, their sources and the table of which planes lie along the layers are in
:mod:`stiff.checks.lugs`, which makes the checks from these.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal, TypeVar

import numpy as np

from stiff.case_model import BODY, Case, Joint, Part, Section
from stiff.checks.context import FloatArray
from stiff.infill import law
from stiff.materials import PrintedMaterial
from stiff.printed_sections import PrintSettings
from stiff.printing import BuildDirection
from stiff.strength import Allowable, across_layers_strength, in_layer_strength, member_strength

#: A float, or an array of them (say one per pose of a load set).
Num = TypeVar("Num", float, FloatArray)
#: Lug axes: x along the lug, y across it in the linkage plane, z along the pin.
Axis = Literal["x", "y", "z"]
#: The build axis (normal to the layers) of each build direction, in lug axes.
BUILD_AXIS: dict[BuildDirection, Axis] = {"flat": "z", "on_edge": "y", "upright": "x"}

SHEAR_OUT_ANGLE_RAD = math.radians(40.0)  # Bruhn §D1
KT_FIT_RANGE = (0.15, 0.75)  # d/w range of the K_t fit (Roark 7th ed. Table 17.1, from memory)
KT_FIT_COEFFS = (12.882, -52.714, 89.762, -51.667)
CLEARANCE_KT_FACTOR = 1.35  # Shigley Table A-15, Fig. A-15-12: +35-50 % with clearance
INTERACTION_EXPONENT = 1.6  # Air Force method, oblique lug loads
SKIN_LINE_ANGLE_RAD = math.radians(45.0)  # skins commonly laid at ±45° (practice)


def _like(ref: Num, value: FloatArray) -> Num:
    """``value`` as a float when ``ref`` is one, else as an array."""
    if isinstance(ref, np.ndarray):
        return value
    return float(value)


# ---------------------------------------------------------------------------------------------
# Formulas (pure; units in the names; the first argument a float or an array, e.g. over B)


def bearing_stress(P_N: Num, d_mm: float, t_mm: float) -> Num:
    """Bearing stress σ_br = P/(d t) [MPa] of a pin load P [N], pin d [mm], lug thickness t [mm]."""
    return P_N / (d_mm * t_mm)


def net_tension_kt(d_over_w: Num) -> Num:
    """Net-section K_t of a lug loaded by a close-fitting pin, at hole over width ``d_over_w``.

    K_t = 12.882 − 52.714x + 89.762x² − 51.667x³ on σ0 = P/((w − d)t), x = d/w clamped to the fit's
    0.15–0.75 (Roark's Formulas for Stress and Strain, 7th ed., Table 17.1, from memory).
    """
    lo, hi = KT_FIT_RANGE
    x = np.clip(d_over_w, lo, hi)
    c0, c1, c2, c3 = KT_FIT_COEFFS
    return _like(d_over_w, c0 + c1 * x + c2 * x**2 + c3 * x**3)


def kt_with_clearance(kt: Num, clearance_mm: float) -> Num:
    """K_t raised by 35 % when the pin has any radial clearance ``clearance_mm`` [mm] (Shigley)."""
    return _like(kt, np.where(np.asarray(clearance_mm) > 0.0, kt * CLEARANCE_KT_FACTOR, kt))


def net_tension_stress(P_N: Num, D_mm: float, W_mm: float, t_mm: float, kt: float) -> Num:
    """Peak net-section stress K_t P/((W − D) t) [MPa]; P [N], hole D, width W, thickness t [mm]."""
    return kt * P_N / ((W_mm - D_mm) * t_mm)


def shear_out_length(e_mm: Num, D_mm: float) -> Num:
    """Length of each shear-out plane a_s = e − (D/2) cos 40° [mm] (Bruhn §D1)."""
    return e_mm - 0.5 * D_mm * math.cos(SHEAR_OUT_ANGLE_RAD)


def shear_out_stress(P_N: Num, D_mm: float, t_mm: float, e_mm: float) -> Num:
    """Shear-out stress τ = P/(2 t a_s) [MPa] over two planes of length a_s (Bruhn §D1)."""
    return P_N / (2.0 * t_mm * shear_out_length(e_mm, D_mm))


def interaction_factor(R_a: Num, R_tr: Num) -> Num:
    """Safety factor of an oblique lug load, (R_a^1.6 + R_tr^1.6)^−0.625 (Air Force method);
    ∞ where both ratios are zero."""
    total = np.asarray(R_a, np.float64) ** INTERACTION_EXPONENT + np.asarray(
        R_tr, np.float64) ** INTERACTION_EXPONENT
    out = np.full(total.shape, np.inf)
    np.power(total, -1.0 / INTERACTION_EXPONENT, out=out, where=total > 0.0)
    return _like(R_a, out)


def bending_stress(M_Nmm: Num, W_mm: float, t_mm: float) -> Num:
    """Out-of-plane bending stress 6M/(W t²) [MPa] of a lug section W × t [mm] under M [N·mm]."""
    return 6.0 * M_Nmm / (W_mm * t_mm**2)


def solid_share(length_mm: Num, thickness_mm: float, band_length_mm: float,
                band_thickness_mm: float, core_ratio: float) -> Num:
    """Strength of a printed cut over a solid one: φ + (1 − φ) σ*/σ_s.

    Parameters
    ----------
    length_mm, thickness_mm
        The cut's length in the plane and its thickness along the pin [mm].
    band_length_mm
        Solid band (walls or skins) at each end of the length [mm].
    band_thickness_mm
        Solid band at each face of the thickness [mm].
    core_ratio
        The infill's strength over the solid's, σ*/σ_s.
    """
    core = (np.maximum(0.0, length_mm - 2.0 * band_length_mm)
            * np.maximum(0.0, thickness_mm - 2.0 * band_thickness_mm))
    phi = 1.0 - core / (length_mm * thickness_mm)
    return _like(length_mm, phi + (1.0 - phi) * core_ratio)


def split_load(force_xy: FloatArray, axis_xy: FloatArray | None
               ) -> tuple[FloatArray, FloatArray]:
    """(P_a, P_tr) [N]: the pin load on the lug towards its end and across it.

    ``force_xy`` (..., 2) is the in-plane force on the part [N]; ``axis_xy`` (..., 2) the unit
    vector from the hole into the part. Where it is unknown (``None`` or a zero row) the whole
    load is taken as pulling towards the end.
    """
    fx, fy = force_xy[..., 0], force_xy[..., 1]
    if axis_xy is None:
        return np.hypot(fx, fy), np.zeros_like(fx)
    ux, uy = axis_xy[..., 0], axis_xy[..., 1]
    unknown = (ux == 0.0) & (uy == 0.0)
    P_a = np.where(unknown, np.hypot(fx, fy), -(fx * ux + fy * uy))
    P_tr = np.where(unknown, 0.0, np.abs(fx * uy - fy * ux))
    return P_a, P_tr


# ---------------------------------------------------------------------------------------------
# Geometry and strengths


@dataclass(frozen=True)
class LugGeometry:
    """A printed part's lug at a pin or driven joint; sizes [mm].

    ``assumed`` is true when the joint has no lug entry for the part and the lug was taken from
    its section: thickness the section's width (or the joint's bearing length), width its depth,
    end distance half the width (a half-round end), hole the pin plus twice the clearance.
    """

    joint: Joint
    part: Part
    section: Section
    hole_mm: float
    thickness_mm: float
    width_mm: float
    edge_mm: float
    assumed: bool

    @property
    def item(self) -> str:
        """Name of the lug in the checks."""
        return f"lug {self.part.name} at {self.joint.name}"

    @property
    def pin_mm(self) -> float:
        """Pin diameter [mm] (the hole when the joint gives none)."""
        return self.joint.pin_diameter_mm or self.hole_mm

    @property
    def members_here(self) -> int:
        """How many of the part's members meet at the hole."""
        return sum(self.joint.node in s for s in self.part.segments)

    def describe(self) -> str:
        """The geometry as one phrase, saying where it came from."""
        text = (f"D = {self.hole_mm:.4g}, d = {self.pin_mm:.4g}, t = {self.thickness_mm:.4g}, "
                f"W = {self.width_mm:.4g}, e = {self.edge_mm:.4g} mm")
        if self.assumed:
            text += (" (geometry assumed from the section, no lug entry: t its width or the "
                     "joint's bearing length, W its depth, e = W/2, D = pin + 2 × clearance)")
        if self.members_here > 1:
            text += (f"; the hole is inside the part ({self.members_here} members meet): the "
                     "lug axis is taken along its first member")
        return text


def lugs(case: Case) -> tuple[tuple[LugGeometry, ...], tuple[str, ...]]:
    """Every printed part's lug at a pin or driven joint, and why any could not be checked."""
    out: list[LugGeometry] = []
    skipped: list[str] = []
    for joint in case.joints:
        if joint.kind == "fixed":
            continue
        for name in joint.parts:
            if name == BODY or case.part(name).kind != "printed":
                continue
            part = case.part(name)
            seg = next(i for i, s in enumerate(part.segments) if joint.node in s)
            sec = part.sections[seg]
            entry = next((lg for lg in joint.lugs if lg.part == name), None)
            if entry is not None:
                out.append(LugGeometry(joint, part, sec, entry.hole_mm, entry.thickness_mm,
                                       entry.width_mm, entry.edge_mm, assumed=False))
                continue
            pin = joint.pin_diameter_mm or 0.0
            hole = pin + 2.0 * joint.clearance_mm
            if hole >= sec.depth_mm:
                skipped.append(f"lug {name} at {joint.name}: not checked, the hole "
                               f"({hole:.3g} mm: pin + 2 × clearance) is not smaller than the "
                               f"part's depth {sec.depth_mm:g} mm; give lugs.{name} in "
                               f"joints.{joint.name}")
                continue
            t = joint.bearing_length_mm or sec.width_mm
            out.append(LugGeometry(joint, part, sec, hole, t, sec.depth_mm, sec.depth_mm / 2,
                                   assumed=True))
    return tuple(out), tuple(skipped)


@dataclass(frozen=True)
class PlaneStrength:
    """The mean strength a plane meets, and how it lies to the layers."""

    mean: Allowable
    across: bool  # the stress meets an interlayer strength
    along_layers: bool  # the plane itself lies along a layer interface


def tension_strength(material: PrintedMaterial, build: BuildDirection, axis: Axis,
                     angle_rad: float) -> PlaneStrength:
    """Mean tensile strength for a normal stress along ``axis`` (lug axes) [MPa].

    Across the layers when ``axis`` is the build axis (the plane normal to it then lies along a
    layer), else in a layer by Tsai–Hill at ``angle_rad`` [rad] to the lines.
    """
    if BUILD_AXIS[build] == axis:
        return PlaneStrength(across_layers_strength(material), True, True)
    return PlaneStrength(in_layer_strength(material, angle_rad), False, False)


def shear_strength(material: PrintedMaterial, build: BuildDirection,
                   plane_normal: Axis) -> PlaneStrength:
    """Mean shear strength for τ_xy on a plane normal to ``plane_normal`` (x or y) [MPa].

    τ_xy lies in the layer only for a flat print; otherwise it acts on the layer interfaces.
    """
    if build == "flat":
        return PlaneStrength(member_strength(material, "flat", "shear_y"), False, False)
    return PlaneStrength(across_layers_strength(material, shear=True), True,
                         BUILD_AXIS[build] == plane_normal)


def cut_share(settings: PrintSettings, along: Axis, stress_in_layer: bool, length_mm: float,
              thickness_mm: float) -> tuple[float, str]:
    """:func:`solid_share` of a cut whose length runs along ``along``, and its basis step (none
    for a solid cut)."""
    axis = BUILD_AXIS[settings.build]
    band_l = settings.skin_mm if along == axis else settings.wall_mm
    band_t = settings.skin_mm if axis == "z" else settings.wall_mm
    rule = law(settings.pattern, "in_layer" if stress_in_layer else "along_build")
    ratio = float(rule.strength_ratio(settings.infill))
    share = solid_share(length_mm, thickness_mm, band_l, band_t, ratio)
    if share >= 1.0:
        return 1.0, ""
    step = (f"× {share:.3f} for the printed cut ({length_mm:.3g} × {thickness_mm:.3g} mm solid "
            f"within {band_l:.3g} mm of its ends and {band_t:.3g} mm of its faces, the rest "
            f"{settings.pattern} infill at {settings.infill:.0%} with σ*/σ_s = {ratio:.3g}; rule "
            f"of mixtures, practice)")
    return share, step

"""Printed lugs at pins: bearing, net tension, shear-out, oblique loads and out-of-plane bending,
each against the strength that the build direction gives its plane.

Methods (REFERENCES.md §3). P is the in-plane pin load on the lug, D the hole, d the pin, t the
lug's thickness along the pin, W its width, e the distance from the hole's centre to its end.

* bearing σ_br = P/(d t) (Bruhn, *Analysis and Design of Flight Vehicle Structures*, §D1); its
  allowable is the printed compressive strength, taken as the bearing strength (common
  practice: ASTM D953 bearing tests of plastics usually give more);
* net tension σ = K_t P_a/((W − D) t) with the pin-loaded K_t of a close-fitting pin,
  K_t = 12.882 − 52.714x + 89.762x² − 51.667x³, x = D/W, fitted for 0.15 ≤ x ≤ 0.75 and an end
  at least W from the hole (Roark's *Formulas for Stress and Strain*, 7th ed., Table 17.1, from
  memory; 5.52 at x = 0.2, 2.51 at 0.5); outside the range x is clamped and the basis says so.
  With any radial clearance K_t is raised by 35 %, the low end of Shigley's 35–50 %
  (*Mechanical Engineering Design*, Table A-15, Fig. A-15-12). The full elastic K_t is used:
  printed polymers are taken as notch-sensitive (REFERENCES.md §3);
* shear-out τ = P_a/(2 t a_s), a_s = e − (D/2) cos 40° (Bruhn §D1);
* side tear-out under the transverse component, τ = P_tr/(2 t a_tr), a_tr = W/2 − (D/2) cos 40°:
  Bruhn's two 40° planes turned towards the side edge (derived by analogy, a first-principles
  stand-in for the transverse efficiency curves, which are fitted to ductile metals);
* oblique loads by the Air Force method (AFFDL *Stress Analysis Manual*, 1986, ch. 9; NASA
  TM X-73305 vol. I §B): R_a = P_a/P_au, R_tr = P_tr/P_tru with P_au the least axial capacity
  (net tension, shear-out, bearing) and P_tru the least transverse one (side tear-out, bearing),
  and R_a^1.6 + R_tr^1.6 ≤ 1. The interaction is homogeneous: scaling the load by λ scales
  (R_a^1.6 + R_tr^1.6)^0.625 by λ, so the load in the same direction that reaches the curve is
  P (R_a^1.6 + R_tr^1.6)^−0.625. The check reports demand P [N] and that load as its capacity,
  so its safety factor is (R_a^1.6 + R_tr^1.6)^−0.625 (the manual's MS + 1). It is reported only
  when it lowers the factor by more than 0.1 % below the worse component alone (otherwise it
  repeats that component's check);
* out-of-plane bending from the pin's tilt moment M (the moment about in-plane axes that the pin
  passes to the part, ``JointForce.moment_Nmm``): σ = 6M/(W t²) on the lug's full section beside
  the hole, where the lug meets the part and the bore's couple has been gathered (an assumption:
  the section through the hole centre is shorter, W − D, but it is unloaded by the part of the
  couple reacted behind the hole). The moment about the lug's cross axis (y) gives σ along the
  lug, the one about its axis (x) σ across it; the same section modulus is used for both.

Cleavage and hoop splitting have no first-principles closed form: the edge and width rules
e/D ≥ 3 and W/D ≥ 4 of composite practice (CMH-17 guidance, from memory) are
:func:`warnings`, not checks.

Axes of a lug
-------------
x runs along the lug, the member's axis at the hole (``member_direction``), pointing from the
hole into the part's body; y lies across it in the linkage plane; z runs along the pin. P_a =
−F·x̂ is the pin load pushing towards the lug's end (the lug in tension; negative: the pin pushes
into the part's body and only bearing resists it); P_tr = |F × x̂| the transverse component.
Where the hole is inside a part (several members meet at the node) x is taken along its first
member and the part is checked as a lug with the given end distance.

Which planes lie along the layers
---------------------------------
The build axis, normal to the layers, is z for a flat print, y on edge and x upright
(``stiff.printing``: the build direction is relative to the member). A normal stress σ_aa
crosses the layers when a is the build axis; a shear stress τ_ab acts on the layer interfaces
(τ_ab = τ_ba) when a or b is the build axis; a plane lies along a layer interface when its
normal is the build axis. So:

=============================  ==============  ====================  ====================
mode (plane; stress)           flat (⟂ z)      on edge (⟂ y)         upright (⟂ x)
=============================  ==============  ====================  ====================
net tension (⟂ x; σ_xx)        in a layer      in a layer            along a layer: split
shear-out (⟂ y; τ_xy)          in a layer      along layers          interlayer shear
side tear-out (⟂ x; τ_xy)      in a layer      interlayer shear      along layers
bending σ_xx (tilt about y)    in a layer      in a layer            across layers
bending σ_yy (tilt about x)    in a layer      across layers         in a layer
bearing (compression)          layers pressed together or along themselves: compressive
=============================  ==============  ====================  ====================

In-layer tension uses Tsai–Hill (``stiff.strength.in_layer_strength``) at the angle of the lines
that carry it: 0 for net tension (the walls round the hole run along the lug beside it), 0 for
bending on edge and upright (the walls on the faces z = ±t/2 run along the stress), 45° for
bending of a flat print (its faces are skins, commonly laid at ±45°; common practice). Bearing
presses layers together or along themselves and opens no interface: compressive strength with
the in-layer scatter and required factor. Across the layers the interlayer strengths apply, the
mode is named as a split or shear along the layers, the required factor is ``across_layers``,
and the suggestion is to print the part flat with 3–4 walls round the hole (REFERENCES.md §3,
practice). The cleavage plane (⟂ y through the hole, to the lug's end) lies along a layer
interface on edge: a warning.

Infill
------
A cut (net section, shear-out or tear-out plane) of length L through the thickness t is solid
within the walls (walls × line width) or skins (skins × layer height) of each of its boundaries
(skins where the boundary's normal is the build axis, walls otherwise) and infill elsewhere. Its
strength is the solid strength times φ + (1 − φ) σ*/σ_s, φ the solid share of the cut and σ*/σ_s
the infill law's strength ratio (``stiff.infill``), a rule of mixtures over the cut (common
practice; the infill law's ratio stands in for shear too). Bearing and bending act on the solid
walls and skins at the bore and the faces: no infill share.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from stiff.case_model import BODY, Case, Joint, Part, Section
from stiff.checks.allowables import printed_allowable
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext, FloatArray, joint_forces, member_direction
from stiff.infill import law
from stiff.loads import LoadCaseResult
from stiff.materials import PrintedMaterial
from stiff.printed_sections import PrintSettings
from stiff.printing import BuildDirection
from stiff.strength import Allowable, across_layers_strength, in_layer_strength, member_strength

#: Lug axes: x along the lug, y across it in the linkage plane, z along the pin.
Axis = Literal["x", "y", "z"]
#: The build axis (normal to the layers) of each build direction, in lug axes.
BUILD_AXIS: dict[BuildDirection, Axis] = {"flat": "z", "on_edge": "y", "upright": "x"}

SHEAR_OUT_ANGLE_RAD = math.radians(40.0)  # Bruhn §D1
KT_FIT_RANGE = (0.15, 0.75)  # d/w range of the K_t fit (Roark 7th ed. Table 17.1, from memory)
KT_FIT_COEFFS = (12.882, -52.714, 89.762, -51.667)
CLEARANCE_KT_FACTOR = 1.35  # Shigley Table A-15, Fig. A-15-12: +35-50 % with clearance
INTERACTION_EXPONENT = 1.6  # Air Force method, oblique lug loads
EDGE_RATIO_MIN = 3.0  # e/D, composite practice (CMH-17 guidance, from memory)
WIDTH_RATIO_MIN = 4.0  # W/D, low end of 4-5, same source
MIN_WALLS = 3  # walls round a printed hole, common practice 3-4
SKIN_LINE_ANGLE_RAD = math.radians(45.0)  # skins commonly laid at ±45° (practice)
#: The interaction is reported when it lowers the factor by more than this fraction.
INTERACTION_REPORT_FRACTION = 1e-3
#: Load components below this fraction of the resultant are taken as zero (round-off).
COMPONENT_TOLERANCE = 1e-9

REORIENT = "print this part flat (layers in the linkage plane) with 3–4 walls round the hole"
SUGGEST = {
    "bearing": "a larger pin, a thicker lug or a metal bushing in the bore",
    "net tension": "a wider lug (W/D ≥ 4), a thicker lug or more walls round the hole",
    "shear-out": "more edge distance (e/D ≥ 3) or a thicker lug",
    "side tear-out": "a wider lug or a thicker lug",
    "bending": "a thicker lug, or the part between two others (a clevis) so the pin cannot tilt",
}


# ---------------------------------------------------------------------------------------------
# Formulas (pure; units in the names)


def bearing_stress(P_N: float, d_mm: float, t_mm: float) -> float:
    """Bearing stress σ_br = P/(d t) [MPa] of a pin load P [N], pin d [mm], lug thickness t [mm]."""
    return P_N / (d_mm * t_mm)


def net_tension_kt(d_over_w: float) -> float:
    """Net-section K_t of a lug loaded by a close-fitting pin, at hole over width ``d_over_w``.

    K_t = 12.882 − 52.714x + 89.762x² − 51.667x³ on σ0 = P/((w − d)t), x = d/w clamped to the fit's
    0.15–0.75 (Roark's Formulas for Stress and Strain, 7th ed., Table 17.1, from memory).
    """
    lo, hi = KT_FIT_RANGE
    x = min(max(d_over_w, lo), hi)
    c0, c1, c2, c3 = KT_FIT_COEFFS
    return c0 + c1 * x + c2 * x**2 + c3 * x**3


def kt_with_clearance(kt: float, clearance_mm: float) -> float:
    """K_t raised by 35 % when the pin has any radial clearance ``clearance_mm`` [mm] (Shigley)."""
    return kt * CLEARANCE_KT_FACTOR if clearance_mm > 0.0 else kt


def net_tension_stress(P_N: float, D_mm: float, W_mm: float, t_mm: float, kt: float) -> float:
    """Peak net-section stress K_t P/((W − D) t) [MPa]; P [N], hole D, width W, thickness t [mm]."""
    return kt * P_N / ((W_mm - D_mm) * t_mm)


def shear_out_length(e_mm: float, D_mm: float) -> float:
    """Length of each shear-out plane a_s = e − (D/2) cos 40° [mm] (Bruhn §D1)."""
    return e_mm - 0.5 * D_mm * math.cos(SHEAR_OUT_ANGLE_RAD)


def shear_out_stress(P_N: float, D_mm: float, t_mm: float, e_mm: float) -> float:
    """Shear-out stress τ = P/(2 t a_s) [MPa] over two planes of length a_s (Bruhn §D1)."""
    return P_N / (2.0 * t_mm * shear_out_length(e_mm, D_mm))


def interaction_factor(R_a: float, R_tr: float) -> float:
    """Safety factor of an oblique lug load, (R_a^1.6 + R_tr^1.6)^−0.625 (Air Force method)."""
    total = R_a**INTERACTION_EXPONENT + R_tr**INTERACTION_EXPONENT
    return math.inf if total == 0.0 else total ** (-1.0 / INTERACTION_EXPONENT)


def bending_stress(M_Nmm: float, W_mm: float, t_mm: float) -> float:
    """Out-of-plane bending stress 6M/(W t²) [MPa] of a lug section W × t [mm] under M [N·mm]."""
    return 6.0 * M_Nmm / (W_mm * t_mm**2)


def solid_share(length_mm: float, thickness_mm: float, band_length_mm: float,
                band_thickness_mm: float, core_ratio: float) -> float:
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
    core = max(0.0, length_mm - 2.0 * band_length_mm) * max(0.0, thickness_mm
                                                             - 2.0 * band_thickness_mm)
    phi = 1.0 - core / (length_mm * thickness_mm)
    return phi + (1.0 - phi) * core_ratio


def split_load(force_xy: FloatArray, axis_xy: FloatArray | None) -> tuple[float, float]:
    """(P_a, P_tr) [N]: the pin load on the lug towards its end and across it.

    ``force_xy`` is the in-plane force on the part [N]; ``axis_xy`` the unit vector from the hole
    into the part (``None``: unknown, the whole load taken as pulling towards the end).
    """
    fx, fy = float(force_xy[0]), float(force_xy[1])
    if axis_xy is None:
        return math.hypot(fx, fy), 0.0
    ux, uy = float(axis_xy[0]), float(axis_xy[1])
    return -(fx * ux + fy * uy), abs(fx * uy - fy * ux)


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


# ---------------------------------------------------------------------------------------------
# Checks


@dataclass(frozen=True)
class _Mode:
    """One lug check before it becomes a record: its stress and what resists it."""

    name: str
    key: str  # the SUGGEST key
    demand_MPa: float
    strength: PlaneStrength
    share: float
    share_step: str
    area_mm2: float  # demand × area = the load component [N] (bending: section modulus)
    formula: str

    def record(self, ctx: CheckContext, lug: LugGeometry, material: PrintedMaterial,
               load_case: str) -> tuple[CheckRecord, float]:
        """The check record and the mode's capacity as a load [N]."""
        allowable = printed_allowable(self.strength.mean, material, self.strength.across,
                                      ctx.duty(load_case), ctx.samples)
        capacity = allowable.value_MPa * self.share
        steps = [self.formula, f"lug {lug.describe()}", allowable.provenance]
        if self.share_step:
            steps.append(self.share_step)
        rec = CheckRecord(
            item=lug.item, kind="lug", mode=self.name, load_case=load_case,
            demand=self.demand_MPa, capacity=capacity, unit="MPa",
            required_factor=ctx.required("across_layers" if self.strength.across else "in_layer"),
            basis="; ".join(steps),
            suggestion=REORIENT if self.strength.across else SUGGEST[self.key])
        return rec, capacity * self.area_mm2


def _named(base: str, s: PlaneStrength) -> str:
    if s.along_layers:
        return f"split along layers ({base})" if base == "net tension" else f"{base} along layers"
    return f"{base} (interlayer shear)" if s.across else base


def _modes(lug: LugGeometry, material: PrintedMaterial, P: float, P_a: float, P_tr: float
           ) -> tuple[_Mode, list[_Mode], list[_Mode]]:
    """Bearing, the axial modes (P_a > 0) and the transverse mode (P_tr > 0)."""
    s = lug.section.settings
    build = s.build
    D, d, t, W, e = lug.hole_mm, lug.pin_mm, lug.thickness_mm, lug.width_mm, lug.edge_mm
    bearing = _Mode(
        "bearing", "bearing", bearing_stress(P, d, t),
        PlaneStrength(member_strength(material, build, "compression"), False, False), 1.0, "",
        d * t, f"σ_br = P/(d t), P = {P:.4g} N (Bruhn §D1); bearing allowable: the printed "
               "compressive strength (practice)")
    axial: list[_Mode] = []
    if P_a > 0.0:
        x = D / W
        kt0 = net_tension_kt(x)
        kt = kt_with_clearance(kt0, lug.joint.clearance_mm)
        lo, hi = KT_FIT_RANGE
        notes = [f"K_t = {kt0:.3f} at D/W = {x:.3f} (Roark 7th ed. Table 17.1 fit, from memory)"]
        if not lo <= x <= hi:
            notes.append(f"D/W outside the fit's {lo:g}–{hi:g}: taken at {min(max(x, lo), hi):g}")
        if e < W:
            notes.append(f"the fit assumes an end at least W beyond the hole, here e/W = "
                         f"{e / W:.2f}: K_t may be higher (shear-out covers the short end)")
        if kt != kt0:
            notes.append(f"× {CLEARANCE_KT_FACTOR:g} for the {lug.joint.clearance_mm:g} mm "
                         "clearance (Shigley Table A-15, Fig. A-15-12: +35–50 %)")
        nt = tension_strength(material, build, "x", 0.0)
        share, step = cut_share(s, "y", not nt.across, (W - D) / 2, t)
        axial.append(_Mode(
            _named("net tension", nt), "net tension", net_tension_stress(P_a, D, W, t, kt), nt,
            share, step, (W - D) * t / kt,
            f"σ = K_t P_a/((W − D) t), P_a = {P_a:.4g} N along the lug towards its end, K_t = "
            f"{kt:.3f}: " + "; ".join(notes)))
        so = shear_strength(material, build, "y")
        a_s = shear_out_length(e, D)
        share, step = cut_share(s, "x", build == "flat", a_s, t)
        axial.append(_Mode(
            _named("shear-out", so), "shear-out", shear_out_stress(P_a, D, t, e), so, share,
            step, 2.0 * t * a_s,
            f"τ = P_a/(2 t a_s), a_s = e − (D/2) cos 40° = {a_s:.3g} mm, P_a = {P_a:.4g} N "
            "(Bruhn §D1)"))
    transverse: list[_Mode] = []
    if P_tr > 0.0:
        st = shear_strength(material, build, "x")
        a_tr = shear_out_length(W / 2, D)
        share, step = cut_share(s, "y", build == "flat", a_tr, t)
        transverse.append(_Mode(
            _named("side tear-out", st), "side tear-out", shear_out_stress(P_tr, D, t, W / 2),
            st, share, step, 2.0 * t * a_tr,
            f"τ = P_tr/(2 t a_tr), a_tr = W/2 − (D/2) cos 40° = {a_tr:.3g} mm, P_tr = "
            f"{P_tr:.4g} N across the lug (Bruhn's shear-out planes turned to the side edge, "
            "derived)"))
    return bearing, axial, transverse


def _bending(lug: LugGeometry, material: PrintedMaterial, moment_Nmm: FloatArray,
             axis_xy: FloatArray | None) -> list[_Mode]:
    """Out-of-plane bending from the pin's tilt, σ along and across the lug."""
    mx, my = float(moment_Nmm[0]), float(moment_Nmm[1])
    if axis_xy is None:
        tilt = math.hypot(mx, my)
        about_x = about_y = tilt
    else:
        ux, uy = float(axis_xy[0]), float(axis_xy[1])
        about_x, about_y = abs(mx * ux + my * uy), abs(-mx * uy + my * ux)
    build = lug.section.settings.build
    angle = SKIN_LINE_ANGLE_RAD if build == "flat" else 0.0
    W, t = lug.width_mm, lug.thickness_mm
    out = []
    cases: tuple[tuple[float, Axis, str], ...] = ((about_y, "x", "along"), (about_x, "y", "across"))
    for M, axis, where in cases:
        if M <= 0.0:
            continue
        ps = tension_strength(material, build, axis, angle)
        name = ("out-of-plane bending, split along layers" if ps.across
                else "out-of-plane bending")
        out.append(_Mode(
            name, "bending", bending_stress(M, W, t), ps, 1.0, "", W * t**2 / 6.0,
            f"σ = 6M/(W t²), M = {M:.4g} N·mm of the pin's tilt moment, stress {where} the lug, "
            "on the lug's full section beside the hole (assumed; see stiff.checks.lugs)"))
    return out


def lug_checks(ctx: CheckContext, lug: LugGeometry, result: LoadCaseResult) -> list[CheckRecord]:
    """Every check of one lug in one load case (see the module docstring)."""
    force = next(f for f in joint_forces(ctx, result, lug.joint) if f.part == lug.part.name)
    material = ctx.case.library.printed_material(lug.section.material)
    axis = member_direction(ctx, lug.part, lug.joint.node)
    P = force.bearing_N
    P_a, P_tr = split_load(force.force_N, axis)
    tol = COMPONENT_TOLERANCE * P
    P_a = 0.0 if abs(P_a) <= tol else P_a
    P_tr = 0.0 if P_tr <= tol else P_tr
    bearing, axial, transverse = _modes(lug, material, P, P_a, P_tr)
    name = result.name
    out = []
    br_rec, br_N = bearing.record(ctx, lug, material, name)
    out.append(br_rec)
    comps: list[tuple[float, float, CheckRecord]] = []  # (load, capacity N, governing record)
    for load, modes in ((abs(P_a), axial), (P_tr, transverse)):
        if load <= 0.0:
            continue
        best = (br_N, br_rec)
        for m in modes:
            rec, cap_N = m.record(ctx, lug, material, name)
            out.append(rec)
            if cap_N < best[0]:
                best = (cap_N, rec)
        comps.append((load, best[0], best[1]))
    if len(comps) == 2:
        (La, Ca, ra), (Lt, Ct, rt) = comps
        R_a, R_tr = La / Ca, Lt / Ct
        factor = interaction_factor(R_a, R_tr)
        if 1.0 / factor > max(R_a, R_tr) * (1.0 + INTERACTION_REPORT_FRACTION):
            worse = ra if R_a >= R_tr else rt
            out.append(CheckRecord(
                item=lug.item, kind="lug", mode="oblique load (1.6-power interaction)",
                load_case=name, demand=P, capacity=P * factor, unit="N",
                required_factor=max(ra.required_factor, rt.required_factor),
                basis=(f"R_a^1.6 + R_tr^1.6 ≤ 1 (Air Force method: AFFDL Stress Analysis Manual "
                       f"1986 ch. 9; NASA TM X-73305 vol. I §B); R_a = {La:.4g}/{Ca:.4g} N "
                       f"({ra.mode}{' pushing into the part' if P_a < 0 else ''}), R_tr = "
                       f"{Lt:.4g}/{Ct:.4g} N ({rt.mode}); capacity: the load in the same "
                       f"direction that reaches the curve, P (R_a^1.6 + R_tr^1.6)^-0.625; "
                       f"lug {lug.describe()}"),
                suggestion=worse.suggestion))
    for m in _bending(lug, material, force.moment_Nmm, axis):
        out.append(m.record(ctx, lug, material, name)[0])
    return out


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Every printed lug at every pin and driven joint in every load case."""
    found, _ = lugs(ctx.case)
    return [r for result in ctx.results for lug in found for r in lug_checks(ctx, lug, result)]


def warnings(ctx: CheckContext) -> list[str]:
    """One line per lug that breaks a rule no check covers, and per lug that was not checked.

    Edge distance e/D ≥ 3 and width W/D ≥ 4 (composite practice, CMH-17 guidance, from memory:
    below them the lug's end may cleave or split round the hole); at least 3 walls round the
    hole (practice); on-edge prints, whose cleavage plane lies along a layer interface; and
    lugs whose geometry was assumed from the section.
    """
    found, skipped = lugs(ctx.case)
    out = list(skipped)
    for lug in found:
        D = lug.hole_mm
        issues = []
        if lug.edge_mm / D < EDGE_RATIO_MIN:
            issues.append(f"edge distance e/D = {lug.edge_mm / D:.2f} below {EDGE_RATIO_MIN:g}")
        if lug.width_mm / D < WIDTH_RATIO_MIN:
            issues.append(f"width W/D = {lug.width_mm / D:.2f} below {WIDTH_RATIO_MIN:g}")
        if issues:
            issues[-1] += (" (composite practice, CMH-17 guidance, from memory: the end may "
                           "cleave or split, which no check covers)")
        settings = lug.section.settings
        if settings.walls < MIN_WALLS:
            issues.append(f"{settings.walls} walls round the hole, fewer than {MIN_WALLS} "
                          "(practice: 3–4)")
        if settings.build == "on_edge":
            issues.append("printed on edge, its cleavage plane (hole to end) lies along a layer "
                          "interface: print it flat")
        if lug.assumed:
            issues.append(f"geometry assumed from the section (t {lug.thickness_mm:g}, W "
                          f"{lug.width_mm:g}, e {lug.edge_mm:g} mm): give lugs.{lug.part.name} "
                          f"in joints.{lug.joint.name}")
        if issues:
            out.append(f"{lug.item}: " + "; ".join(issues))
    return out


__all__ = [
    "BUILD_AXIS",
    "LugGeometry",
    "PlaneStrength",
    "bearing_stress",
    "bending_stress",
    "checks",
    "cut_share",
    "interaction_factor",
    "kt_with_clearance",
    "lug_checks",
    "lugs",
    "net_tension_kt",
    "net_tension_stress",
    "shear_out_length",
    "shear_out_stress",
    "shear_strength",
    "solid_share",
    "split_load",
    "tension_strength",
    "warnings",
]

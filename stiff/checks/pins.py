"""Pins: shear across each shear plane and bending with the clevis moment arm, against the pin's
metal.

A pin joins the parts of its joint in the order given; between each pair of neighbours it has
one shear plane, carried by one connector of the model (``stiff.build``), so a three-part
clevis puts the middle part's load over two planes.

* Shear on each plane τ = V/(π d²/4), V the in-plane force across it; for a symmetric clevis
  V = P/2 and τ = 2P/(π d²) (REFERENCES.md §4). Capacity 0.6 × the ultimate strength: the shear
  resistance α_v f_ub of a bolt whose shear plane is on its plain shank, α_v = 0.6 (EN 1993-1-8
  Table 3.4, from memory; 0.5 where a 10.9 bolt's thread is in the plane). The partial factor
  γ_M2 is left to the required factor ``pin``; the same 0.6 is used for other metals (about the
  F_su/F_tu of aluminium alloys, from memory).
* Bending σ = 32M/(π d³) against the yield (0.2 % proof) strength: first yield at the outer
  fibre. The plastic shape factor of a round section, 16/(3π) = 1.70 (REFERENCES.md §4), is not
  used: a pin that yields in bending stays bent and loosens in its printed bores.

Bending moment
--------------
t_i is each part's thickness along the pin (its lug's, else the joint's bearing length, else
the section's width for a printed part, the tube's outer diameter for a tube, as the model's
bearing stiffness takes it; the body's is not in the case and is taken as 0: its load acts at
its plane, z = body.z_mm, which lengthens the arm); g the gap between neighbours,
|Δz| − (t_a + t_b)/2, from the parts' planes (z_mm), 0 when they overlap.

* A part between two neighbours (a clevis): M = (P/2)(t1/2 + g + t2/4), P the middle part's
  load, t1 the outer lug, t2 the inner (Bruhn, *Analysis and Design of Flight Vehicle
  Structures*, §D1, from memory): the outer lugs' halves of P at their mid-planes, the middle
  lug's load spread over its thickness, moment at the pin's centre. Unequal sides are taken
  conservatively: P/2 is the larger plane force and t1/2 + g the longer side.
* Two parts (single shear): M = (V/2)(t1/2 + g + t2/2). The bearing loads at the two lugs'
  mid-planes form a couple V(t1/2 + g + t2/2) that the bores (or a head and nut) react; shared
  by the two ends, the moment at the shear plane is half of it (common practice). It bounds the
  free pin of the linear-bearing model (rigid pin in elastic bores: the two bearing resultants
  meet mid-gap, M = V g/2 at the bores' faces and at most 0.148 V t inside a lug for g = 0),
  which a test checks.

The model's connector moment about the in-plane axes (the tilt it passes between two parts,
which carries the offset of their planes and any out-of-plane load, as in the lateral push) is
a second estimate; the larger of the two governs.

Driven joints are checked as pins too; an actuator's torque reaches the part through its horn
or spline, not through the pin, and is not checked here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from stiff.case_model import BODY, Case, Joint
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext, FloatArray
from stiff.loads import LoadCaseResult
from stiff.strength import metal_strength

#: Shear strength over ultimate of a pin's plain shank (EN 1993-1-8 Table 3.4, from memory).
SHEAR_FRACTION = 0.6
#: Plastic over elastic section modulus of a solid round section (noted, not used).
PLASTIC_SHAPE_FACTOR = 16.0 / (3.0 * math.pi)
#: Parts overlapping along the pin by more than this are reported [mm].
OVERLAP_TOLERANCE_MM = 0.01

SUGGEST_SHEAR = "a larger or stronger pin (shear capacity grows with d²), or a clevis (two planes)"
SUGGEST_BENDING = ("close the gaps between the parts, a larger pin (bending capacity grows with "
                   "d³) or a clevis so the pin works in double shear")


# ---------------------------------------------------------------------------------------------
# Formulas (pure; units in the names)


def pin_shear_stress(V_N: float, d_mm: float) -> float:
    """Average shear stress τ = V/(π d²/4) [MPa] on one plane of a pin d [mm] under V [N]."""
    return V_N / (math.pi * d_mm**2 / 4.0)


def pin_bending_stress(M_Nmm: float, d_mm: float) -> float:
    """Outer-fibre bending stress σ = 32M/(π d³) [MPa] of a round pin d [mm] under M [N·mm]."""
    return 32.0 * M_Nmm / (math.pi * d_mm**3)


def clevis_moment(P_N: float, t_outer_mm: float, gap_mm: float, t_inner_mm: float) -> float:
    """Clevis pin moment M = (P/2)(t1/2 + g + t2/4) [N·mm] (Bruhn §D1, from memory).

    P the middle lug's load [N], t1 each outer lug, t2 the middle lug, g the gap [mm].
    """
    return 0.5 * P_N * (0.5 * t_outer_mm + gap_mm + 0.25 * t_inner_mm)


def single_shear_moment(V_N: float, t1_mm: float, gap_mm: float, t2_mm: float) -> float:
    """Moment in a pin joining two parts, M = (V/2)(t1/2 + g + t2/2) [N·mm] (see the module)."""
    return 0.5 * V_N * (0.5 * t1_mm + gap_mm + 0.5 * t2_mm)


# ---------------------------------------------------------------------------------------------
# The pin's planes


@dataclass(frozen=True)
class PinPlane:
    """One shear plane of a pin: the connector between two neighbouring parts in a load case.

    ``force_N`` (x, y, z) is the connector's force on part ``a`` (part ``b`` takes its
    opposite) [N]; ``tilt_Nmm`` its moment about the in-plane axes [N·mm].
    """

    a: str
    b: str
    force_N: FloatArray
    tilt_Nmm: float

    @property
    def shear_N(self) -> float:
        """In-plane force across the plane [N]."""
        return float(math.hypot(self.force_N[0], self.force_N[1]))


def pin_planes(ctx: CheckContext, result: LoadCaseResult, joint: Joint) -> list[PinPlane]:
    """The shear planes of a joint's pin in one load case, in the order of its parts."""
    forces = result.solution.connector_forces[0]
    out: list[PinPlane] = []
    for i, name in enumerate(ctx.built.connector_joint):
        if name != joint.name:
            continue
        k = len(out)
        f = np.asarray(forces[i], np.float64)
        out.append(PinPlane(joint.parts[k], joint.parts[k + 1], f[:3],
                            float(math.hypot(f[3], f[4]))))
    return out


def part_thickness(case: Case, joint: Joint, name: str) -> float:
    """A part's thickness along a joint's pin [mm] (see the module docstring; body: 0)."""
    if name == BODY:
        return 0.0
    lug = next((lg for lg in joint.lugs if lg.part == name), None)
    if lug is not None:
        return lug.thickness_mm
    part = case.part(name)
    if part.kind == "tube":
        return part.od_mm or 0.0
    seg = next(i for i, s in enumerate(part.segments) if joint.node in s)
    return joint.bearing_length_mm or part.sections[seg].width_mm


def _z(case: Case, name: str) -> float:
    return case.body_z_mm if name == BODY else case.part(name).z_mm


def gaps(case: Case, joint: Joint) -> list[float]:
    """Signed gap between each pair of neighbouring parts along the pin [mm] (< 0: overlap)."""
    t = [part_thickness(case, joint, p) for p in joint.parts]
    z = [_z(case, p) for p in joint.parts]
    return [abs(z[i + 1] - z[i]) - 0.5 * (t[i] + t[i + 1]) for i in range(len(t) - 1)]


def arm_moment(case: Case, joint: Joint, planes: list[PinPlane]) -> tuple[float, str]:
    """The clevis-arm bending moment of a pin in one load case [N·mm], and how it was found."""
    t = [part_thickness(case, joint, p) for p in joint.parts]
    g = [max(0.0, v) for v in gaps(case, joint)]
    if len(planes) == 1:
        V = planes[0].shear_N
        M = single_shear_moment(V, t[0], g[0], t[1])
        return M, (f"two parts, single shear: M = (V/2)(t1/2 + g + t2/2) with V = {V:.4g} N, "
                   f"t1 = {t[0]:.3g}, g = {g[0]:.3g}, t2 = {t[1]:.3g} mm (practice)")
    best, text = 0.0, ""
    for k in range(1, len(planes)):
        left, right = planes[k - 1], planes[k]
        P = float(math.hypot(*(right.force_N[:2] - left.force_N[:2])))
        half = max(left.shear_N, right.shear_N, 0.5 * P)
        for t1, gap in ((t[k - 1], g[k - 1]), (t[k + 1], g[k])):
            M = clevis_moment(2.0 * half, t1, gap, t[k])
            if best <= M:
                best = M
                text = (f"clevis round {joint.parts[k]}: M = (P/2)(t1/2 + g + t2/4) with P/2 = "
                        f"{half:.4g} N (the larger plane), t1 = {t1:.3g}, g = {gap:.3g}, t2 = "
                        f"{t[k]:.3g} mm (Bruhn §D1, from memory; the longer side)")
    return best, text


# ---------------------------------------------------------------------------------------------
# Checks


def pin_checks(ctx: CheckContext, joint: Joint, result: LoadCaseResult) -> list[CheckRecord]:
    """Shear on each plane and bending of one joint's pin in one load case."""
    if joint.pin_diameter_mm is None or joint.pin_material is None:
        return []
    d = joint.pin_diameter_mm
    metal = ctx.case.library.metal(joint.pin_material)
    planes = pin_planes(ctx, result, joint)
    if not planes:
        return []
    item = f"pin {joint.name}"
    need = ctx.required("pin")
    shear = metal_strength(metal, "ultimate").scaled(
        SHEAR_FRACTION, f"shear strength × {SHEAR_FRACTION:g} of the ultimate (plain shank, "
                        "α_v = 0.6 of EN 1993-1-8 Table 3.4, from memory)")
    out = []
    for p in planes:
        out.append(CheckRecord(
            item=item, kind="pin", mode=f"shear, plane {p.a}–{p.b}", load_case=result.name,
            demand=pin_shear_stress(p.shear_N, d), capacity=shear.value_MPa, unit="MPa",
            required_factor=need,
            basis=(f"τ = V/(π d²/4), V = {p.shear_N:.4g} N across the plane, d = {d:g} mm "
                   f"({joint.pin_material}); {shear.provenance}"),
            suggestion=SUGGEST_SHEAR))
    M_arm, arm_text = arm_moment(ctx.case, joint, planes)
    M_model = max(p.tilt_Nmm for p in planes)
    M = max(M_arm, M_model)
    which = "the clevis arm" if M_arm >= M_model else "the model's connector moment"
    yield_ = metal_strength(metal, "yield")
    out.append(CheckRecord(
        item=item, kind="pin", mode="bending", load_case=result.name,
        demand=pin_bending_stress(M, d), capacity=yield_.value_MPa, unit="MPa",
        required_factor=need,
        basis=(f"σ = 32M/(π d³), M = {M:.4g} N·mm, the larger of {arm_text}: {M_arm:.4g} N·mm, "
               f"and the model's connector tilt moment {M_model:.4g} N·mm ({which} governs); "
               f"against first yield, {yield_.provenance}; the plastic shape factor "
               f"{PLASTIC_SHAPE_FACTOR:.2f} of a round section not used (a yielded pin stays "
               "bent)"),
        suggestion=SUGGEST_BENDING))
    return out


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Every pin of every pin and driven joint in every load case."""
    joints = [j for j in ctx.case.joints if j.kind in ("pin", "driven")]
    return [r for result in ctx.results for j in joints for r in pin_checks(ctx, j, result)]


def warnings(ctx: CheckContext) -> list[str]:
    """Neighbouring parts on a pin that overlap along it (the gap is then taken as 0).

    The body is left out: its thickness is not in the case.
    """
    out = []
    for j in ctx.case.joints:
        if j.kind == "fixed":
            continue
        for i, g in enumerate(gaps(ctx.case, j)):
            if BODY not in j.parts[i:i + 2] and g < -OVERLAP_TOLERANCE_MM:
                out.append(f"pin {j.name}: {j.parts[i]} and {j.parts[i + 1]} overlap by "
                           f"{-g:.3g} mm along the pin (their z_mm and thicknesses); the pin's "
                           "bending arm takes the gap as 0")
    return out

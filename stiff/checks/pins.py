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
from collections.abc import Callable
from dataclasses import dataclass
from typing import TypeVar

import numpy as np

from stiff.case_model import BODY, Case, Joint
from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext, FloatArray, LoadSet, joint_connectors
from stiff.strength import Allowable, metal_strength

#: Shear strength over ultimate of a pin's plain shank (EN 1993-1-8 Table 3.4, from memory).
SHEAR_FRACTION = 0.6
#: Plastic over elastic section modulus of a solid round section (noted, not used).
PLASTIC_SHAPE_FACTOR = 16.0 / (3.0 * math.pi)
#: Parts overlapping along the pin by more than this are reported [mm].
OVERLAP_TOLERANCE_MM = 0.01

SUGGEST_SHEAR = "a larger or stronger pin (shear capacity grows with d²), or a clevis (two planes)"
SUGGEST_BENDING = ("close the gaps between the parts, a larger pin (bending capacity grows with "
                   "d³) or a clevis so the pin works in double shear")

#: A force, moment or stress: one value, or an array of them (one per pose).
Num = TypeVar("Num", float, FloatArray)


# ---------------------------------------------------------------------------------------------
# Formulas (pure; units in the names; floats or arrays)


def pin_shear_stress(V_N: Num, d_mm: float) -> Num:
    """Average shear stress τ = V/(π d²/4) [MPa] on one plane of a pin d [mm] under V [N]."""
    return V_N / (math.pi * d_mm**2 / 4.0)


def pin_bending_stress(M_Nmm: Num, d_mm: float) -> Num:
    """Outer-fibre bending stress σ = 32M/(π d³) [MPa] of a round pin d [mm] under M [N·mm]."""
    return 32.0 * M_Nmm / (math.pi * d_mm**3)


def clevis_moment(P_N: Num, t_outer_mm: float, gap_mm: float, t_inner_mm: float) -> Num:
    """Clevis pin moment M = (P/2)(t1/2 + g + t2/4) [N·mm] (Bruhn §D1, from memory).

    P the middle lug's load [N], t1 each outer lug, t2 the middle lug, g the gap [mm].
    """
    return 0.5 * P_N * (0.5 * t_outer_mm + gap_mm + 0.25 * t_inner_mm)


def single_shear_moment(V_N: Num, t1_mm: float, gap_mm: float, t2_mm: float) -> Num:
    """Moment in a pin joining two parts, M = (V/2)(t1/2 + g + t2/2) [N·mm] (see the module)."""
    return 0.5 * V_N * (0.5 * t1_mm + gap_mm + 0.5 * t2_mm)


# ---------------------------------------------------------------------------------------------
# The pin's planes


@dataclass(frozen=True)
class PinPlane:
    """One shear plane of a pin: the connector between two neighbouring parts in a load set.

    ``force_N`` (B, 3) is the connector's force (x, y, z) on part ``a`` (part ``b`` takes its
    opposite) [N]; ``tilt_Nmm`` (B,) its moment about the in-plane axes [N·mm].
    """

    a: str
    b: str
    force_N: FloatArray
    tilt_Nmm: FloatArray

    @property
    def shear_N(self) -> FloatArray:
        """(B,) in-plane force across the plane [N]."""
        return np.hypot(self.force_N[:, 0], self.force_N[:, 1])


def pin_planes(ctx: CheckContext, loads: LoadSet, joint: Joint) -> list[PinPlane]:
    """The shear planes of a joint's pin in one load set, in the order of its parts."""
    forces = loads.connector_forces
    return [PinPlane(a, b, forces[:, i, :3], np.hypot(forces[:, i, 3], forces[:, i, 4]))
            for i, a, b in joint_connectors(ctx.built, joint)]


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


def _arm_geometry(case: Case, joint: Joint) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """Each part's thickness along the pin and each gap, 0 where parts overlap [mm]."""
    return (tuple(part_thickness(case, joint, p) for p in joint.parts),
            tuple(max(0.0, v) for v in gaps(case, joint)))


def _single_shear(t: tuple[float, ...], gaps_mm: tuple[float, ...], plane: PinPlane
                  ) -> tuple[FloatArray, Callable[[int], str]]:
    g = gaps_mm[0]
    V = plane.shear_N
    M = single_shear_moment(V, t[0], g, t[1])

    def text(i: int) -> str:
        return (f"two parts, single shear: M = (V/2)(t1/2 + g + t2/2) with V = {float(V[i]):.4g} "
                f"N, t1 = {t[0]:.3g}, g = {g:.3g}, t2 = {t[1]:.3g} mm (practice)")
    return M, text


def _clevis(joint: Joint, t: tuple[float, ...], g: tuple[float, ...], planes: list[PinPlane]
            ) -> tuple[FloatArray, Callable[[int], str]]:
    """The largest clevis moment over every middle part and both its sides, per entry."""
    moments, halves, sides = [], [], []
    for k in range(1, len(planes)):
        left, right = planes[k - 1], planes[k]
        d = right.force_N[:, :2] - left.force_N[:, :2]
        half = np.maximum(np.maximum(left.shear_N, right.shear_N), 0.5 * np.hypot(d[:, 0], d[:, 1]))
        for t1, gap in ((t[k - 1], g[k - 1]), (t[k + 1], g[k])):
            moments.append(clevis_moment(2.0 * half, t1, gap, t[k]))
            halves.append(half)
            sides.append((k, t1, gap))
    M_all = np.stack(moments)
    # the last of equal candidates governs (as a running "best <= M" would keep it)
    pick = len(moments) - 1 - np.argmax(M_all[::-1], axis=0)
    M: FloatArray = np.take_along_axis(M_all, pick[None], axis=0)[0]
    half_all = np.stack(halves)

    def text(i: int) -> str:
        c = int(pick[i])
        k, t1, gap = sides[c]
        return (f"clevis round {joint.parts[k]}: M = (P/2)(t1/2 + g + t2/4) with P/2 = "
                f"{float(half_all[c, i]):.4g} N (the larger plane), t1 = {t1:.3g}, g = "
                f"{gap:.3g}, t2 = {t[k]:.3g} mm (Bruhn §D1, from memory; the longer side)")
    return M, text


def arm_moment(case: Case, joint: Joint, planes: list[PinPlane]
               ) -> tuple[FloatArray, Callable[[int], str]]:
    """(B,) clevis-arm bending moment of a pin in one load set [N·mm], and, for entry i, how it
    was found."""
    return _arm(joint, *_arm_geometry(case, joint), planes)


def _arm(joint: Joint, t: tuple[float, ...], g: tuple[float, ...], planes: list[PinPlane]
         ) -> tuple[FloatArray, Callable[[int], str]]:
    if len(planes) == 1:
        return _single_shear(t, g, planes[0])
    return _clevis(joint, t, g, planes)


# ---------------------------------------------------------------------------------------------
# Checks


@dataclass(frozen=True)
class _Pin:
    """What a pin's checks need that no load changes: found once per joint."""

    joint: Joint
    d_mm: float
    shear: Allowable
    yield_: Allowable
    required: float
    thickness_mm: tuple[float, ...]  # each part's, along the pin
    gap_mm: tuple[float, ...]  # between neighbours, 0 where they overlap

    @property
    def item(self) -> str:
        return f"pin {self.joint.name}"


def _pin(ctx: CheckContext, joint: Joint) -> _Pin | None:
    if joint.pin_diameter_mm is None or joint.pin_material is None:
        return None
    metal = ctx.case.library.metal(joint.pin_material)
    shear = metal_strength(metal, "ultimate").scaled(
        SHEAR_FRACTION, f"shear strength × {SHEAR_FRACTION:g} of the ultimate (plain shank, "
                        "α_v = 0.6 of EN 1993-1-8 Table 3.4, from memory)")
    return _Pin(joint, joint.pin_diameter_mm, shear, metal_strength(metal, "yield"),
                ctx.required("pin"), *_arm_geometry(ctx.case, joint))


def _shear_row(pin: _Pin, loads: LoadSet, plane: PinPlane) -> CheckRows:
    V = plane.shear_N
    head = "τ = V/(π d²/4), V = "
    tail = (f" N across the plane, d = {pin.d_mm:g} mm ({pin.joint.pin_material}); "
            f"{pin.shear.provenance}")

    def basis(i: int) -> str:
        return f"{head}{float(V[i]):.4g}{tail}"
    return CheckRows(
        item=pin.item, kind="pin", mode=f"shear, plane {plane.a}–{plane.b}", load_case=loads.name,
        demand=pin_shear_stress(V, pin.d_mm), capacity=pin.shear.value_MPa, unit="MPa",
        required_factor=pin.required, basis=basis, suggestion=SUGGEST_SHEAR)


def _bending_row(pin: _Pin, loads: LoadSet, planes: list[PinPlane]) -> CheckRows:
    M_arm, arm_text = _arm(pin.joint, pin.thickness_mm, pin.gap_mm, planes)
    M_model = np.max(np.stack([p.tilt_Nmm for p in planes]), axis=0)
    M = np.maximum(M_arm, M_model)
    tail = (f"; against first yield, {pin.yield_.provenance}; the plastic shape factor "
            f"{PLASTIC_SHAPE_FACTOR:.2f} of a round section not used (a yielded pin stays bent)")

    def basis(i: int) -> str:
        which = "the clevis arm" if M_arm[i] >= M_model[i] else "the model's connector moment"
        return (f"σ = 32M/(π d³), M = {float(M[i]):.4g} N·mm, the larger of {arm_text(i)}: "
                f"{float(M_arm[i]):.4g} N·mm, and the model's connector tilt moment "
                f"{float(M_model[i]):.4g} N·mm ({which} governs){tail}")
    return CheckRows(
        item=pin.item, kind="pin", mode="bending", load_case=loads.name,
        demand=pin_bending_stress(M, pin.d_mm), capacity=pin.yield_.value_MPa, unit="MPa",
        required_factor=pin.required, basis=basis, suggestion=SUGGEST_BENDING)


def _pin_rows(ctx: CheckContext, pin: _Pin, loads: LoadSet) -> list[CheckRows]:
    planes = pin_planes(ctx, loads, pin.joint)
    if not planes:
        return []
    return ([_shear_row(pin, loads, p) for p in planes]
            + [_bending_row(pin, loads, planes)])


def pin_checks(ctx: CheckContext, joint: Joint, loads: LoadSet) -> list[CheckRows]:
    """Shear on each plane and bending of one joint's pin in one load set (B poses)."""
    pin = _pin(ctx, joint)
    return [] if pin is None else _pin_rows(ctx, pin, loads)


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Every pin of every pin and driven joint in every load set."""
    found = (_pin(ctx, j) for j in ctx.case.joints if j.kind in ("pin", "driven"))
    pins = [p for p in found if p is not None]
    return [r for loads in ctx.loads for p in pins for r in _pin_rows(ctx, p, loads)]


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

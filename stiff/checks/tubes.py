"""Tubes: combined axial and bending stress, Euler buckling, the frame's buckling factor, and
local shell buckling with the NASA SP-8007 knock-down.

For every tube member in every load case (internal forces from ``stiff.checks.context``):

* **Stress.** σ = N/A ± M/S with S = π(D⁴ − d⁴)/(32D) and M = hypot(M_y, M_z) at the worse end
  (the moment is linear along a member loaded only at its ends, so the ends bound it), against
  the tube's axial tension or compression strength. The tube table gives no coefficient of
  variation, so its value (mean or typical) is used as it stands: no B-basis.
* **Euler buckling** of each span (the tube between braced points) in compression,
  P_e = π²EI/(KL)², with the recommended design K of AISC 360 Commentary Table C-A-7.1
  (:func:`effective_length_factor`), corrected for shear deformation by Engesser's formula,
  which matters for carbon tubes whose G is low (:func:`engesser_load`). How the ends and the
  length are found is described in :func:`stiff.checks.spans.span_end`.
* **Linear buckling of the frame** (``stiff.fe.buckling_factors``), the second opinion: the load
  factor λ of the whole load case, which knows the real end restraints, the printed fittings'
  lower stiffness and sway. It is reported as a check with demand 1 and capacity λ on the tube
  whose Euler factor is lowest in that load case (the tube most likely in the mode; the mode
  may involve other parts, as the basis says).
* **Local shell buckling**: σ_cr = γ · 0.605 E t/R with mid-wall R and the SP-8007 knock-down γ
  for axial compression and for bending (:func:`sp8007_knockdown`), combined by the linear
  interaction R_c + R_b ≤ 1. The formula is for an isotropic shell; a carbon tube is
  orthotropic, and its axial modulus is used (see :func:`local_buckling_basis`).

Warnings: a pin through a pultruded tube (a cross-hole meets its low transverse strength,
REFERENCES.md §8), a clamped socket on one, a span with no Euler load of its own (pinned at one
end, free at the other), a tube outside SP-8007's range.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Literal

import numpy as np

from stiff.case_model import Case, Part
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext, MemberForces, member_forces
from stiff.checks.spans import End, EndKind, Span, node_xy, spans
from stiff.fe import buckling_factors
from stiff.loads import LoadCaseResult
from stiff.materials import MetalMaterial, TubeMaterial
from stiff.strength import ROOM_TEMPERATURE_C, Allowable, metal_strength

ShellMode = Literal["axial", "bending"]
Sense = Literal["tension", "compression"]

#: Classical buckling coefficient of an axially compressed isotropic cylinder,
#: 1/√(3(1 − ν²)) at ν = 0.3 (REFERENCES.md §6).
CLASSICAL_SHELL = 0.605
#: SP-8007's knock-down holds for R/t below this (REFERENCES.md §6).
SP8007_MAX_R_OVER_T = 1500.0
#: Below about this R/t a wall is thick for thin-shell theory [practice].
THIN_SHELL_FROM_R_OVER_T = 10.0
#: A hoop (transverse) strength below this fraction of the axial tension strength marks a
#: unidirectional (pultruded) tube: 40-57 MPa against 1400-2280 MPa (REFERENCES.md §8, derived).
UD_HOOP_RATIO = 0.1
#: An axial strain below this is rounding in the solve, not a load: no check is made of it.
NEGLIGIBLE_STRAIN = 1e-9

#: AISC 360 Commentary Table C-A-7.1, recommended design values of K for braced ends (sway
#: prevented) and for a cantilever [confirmed]; pinned-free and free-free have none.
_K_DESIGN: dict[frozenset[EndKind], float] = {
    frozenset({"fixed"}): 0.65,
    frozenset({"fixed", "pinned"}): 0.80,
    frozenset({"pinned"}): 1.0,
    frozenset({"fixed", "free"}): 2.1,
}


# ---------------------------------------------------------------------------------------------
# Formulas


def tube_area(od_mm: float, id_mm: float) -> float:
    """Cross-section area π(D² − d²)/4 [mm²] of a tube, outer and inner diameter [mm]."""
    return math.pi * (od_mm**2 - id_mm**2) / 4.0


def tube_second_moment(od_mm: float, id_mm: float) -> float:
    """Second moment of area π(D⁴ − d⁴)/64 [mm⁴] of a tube, diameters [mm]."""
    return math.pi * (od_mm**4 - id_mm**4) / 64.0


def tube_section_modulus(od_mm: float, id_mm: float) -> float:
    """Elastic section modulus π(D⁴ − d⁴)/(32D) [mm³] of a tube, diameters [mm]."""
    return math.pi * (od_mm**4 - id_mm**4) / (32.0 * od_mm)


def effective_length_factor(end_a: EndKind, end_b: EndKind) -> float:
    """Recommended design effective-length factor K for the end conditions of a column.

    AISC 360 Commentary, Table C-A-7.1 (recommended design values, sway prevented at braced
    ends): fixed-fixed 0.65, fixed-pinned 0.80, pinned-pinned 1.0, fixed-free 2.1. A column
    pinned at one end and free at the other, or free at both, has no stiffness of its own
    against sway: ``inf``.

    Parameters
    ----------
    end_a, end_b
        ``fixed`` (rotation and translation held), ``pinned`` (translation held) or ``free``.
    """
    return _K_DESIGN.get(frozenset({end_a, end_b}), math.inf)


def euler_load(E_MPa: float, I_mm4: float, length_mm: float, K: float) -> float:
    """Euler buckling load P_cr = π²EI/(KL)² [N].

    Parameters
    ----------
    E_MPa
        Axial modulus [MPa].
    I_mm4
        Second moment of area [mm⁴].
    length_mm
        Length between the column's ends [mm].
    K
        Effective-length factor (:func:`effective_length_factor`); ``inf`` gives 0.
    """
    if math.isinf(K):
        return 0.0
    return math.pi**2 * E_MPa * I_mm4 / (K * length_mm) ** 2


def engesser_load(euler_N: float, shear_stiffness_N: float) -> float:
    """Buckling load with shear deformation, P = P_e / (1 + P_e/(κGA)) [N].

    Engesser's formula (Timoshenko & Gere, *Theory of Elastic Stability*, 2nd ed., §2.16, from
    memory). ``shear_stiffness_N`` is κGA [N]; ``inf`` returns the Euler load ``euler_N`` [N].
    """
    if math.isinf(shear_stiffness_N):
        return euler_N
    return euler_N / (1.0 + euler_N / shear_stiffness_N)


def sp8007_knockdown(r_over_t: float, mode: ShellMode) -> float:
    """NASA SP-8007 knock-down γ on the classical buckling stress of a thin cylinder.

    Axial compression γ = 1 − 0.901(1 − e^−φ), bending γ = 1 − 0.731(1 − e^−φ), with
    φ = √(R/t)/16, for R/t < 1500 (NASA SP-8007, *Buckling of Thin-Walled Circular Cylinders*,
    1965, rev. 1968; REFERENCES.md §6, confirmed).

    Parameters
    ----------
    r_over_t
        Mid-wall radius over wall thickness [-].
    mode
        ``axial`` or ``bending``.

    Raises
    ------
    ValueError
        R/t not in (0, 1500).
    """
    if not 0.0 < r_over_t < SP8007_MAX_R_OVER_T:
        raise ValueError(f"SP-8007's knock-down holds for 0 < R/t < 1500, got {r_over_t:g}")
    phi = math.sqrt(r_over_t) / 16.0
    c = 0.901 if mode == "axial" else 0.731
    return 1.0 - c * (1.0 - math.exp(-phi))


def classical_shell_stress(E_MPa: float, t_mm: float, R_mm: float) -> float:
    """Classical buckling stress of an isotropic cylinder, 0.605 E t/R [MPa] (ν = 0.3).

    ``E_MPa`` modulus [MPa], ``t_mm`` wall thickness [mm], ``R_mm`` mid-wall radius [mm].
    """
    return CLASSICAL_SHELL * E_MPa * t_mm / R_mm


def shell_buckling_stress(E_MPa: float, od_mm: float, id_mm: float, mode: ShellMode) -> float:
    """Local buckling stress γ · 0.605 E t/R [MPa] of a tube, mid-wall R, diameters [mm]."""
    t = (od_mm - id_mm) / 2.0
    R = (od_mm + id_mm) / 4.0
    return sp8007_knockdown(R / t, mode) * classical_shell_stress(E_MPa, t, R)


# ---------------------------------------------------------------------------------------------
# Materials


TubeStock = TubeMaterial | MetalMaterial


def tube_material(case: Case, part: Part) -> TubeStock:
    """The tube's material record: a tube material or a metal."""
    assert part.tube_material is not None
    found = case.library.get(part.tube_material)
    assert isinstance(found, TubeMaterial | MetalMaterial)
    return found


def modulus(material: TubeStock) -> float:
    """Axial modulus [MPa]."""
    return material.E_axial_MPa if isinstance(material, TubeMaterial) else material.E_MPa


def is_unidirectional(material: TubeStock) -> bool:
    """True for a pultruded (unidirectional) carbon tube: low transverse (hoop) strength.

    Named so (``pultruded`` or ``unidirectional`` in its name or source), or with a hoop
    strength below :data:`UD_HOOP_RATIO` of its axial tension strength.
    """
    if not isinstance(material, TubeMaterial):
        return False
    words = f"{material.name} {material.source}".lower()
    if "pultruded" in words or "unidirectional" in words:
        return True
    return (material.hoop_MPa is not None
            and material.hoop_MPa < UD_HOOP_RATIO * material.tension_axial_MPa)


def axial_strength(material: TubeStock, sense: Sense,
                   temperature_C: float | None) -> Allowable:
    """The tube's axial strength in tension or compression [MPa], with its provenance.

    A tube material's value is taken as the table gives it (mean or typical): the table has no
    coefficient of variation, so no B-basis can be formed, and no retention data, so no
    temperature knock-down. A metal tube uses its yield strength on its table basis.
    """
    if isinstance(material, MetalMaterial):
        return metal_strength(material, "yield")
    column = f"{sense}_axial_MPa"
    value = material.tension_axial_MPa if sense == "tension" else material.compression_axial_MPa
    steps = [f"{column} = {value:.4g} MPa: {material.provenance_of(column)}",
             "the table's value as it stands (mean or typical): the tube table gives no "
             "coefficient of variation, so no B-basis"]
    if temperature_C is not None and temperature_C > ROOM_TEMPERATURE_C:
        steps.append(f"no knock-down for {temperature_C:g} C: the tube table has no retention "
                     "data (epoxy matrices soften towards their glass transition)")
    return Allowable(value, "typical", tuple(steps))


# ---------------------------------------------------------------------------------------------
# Checks


def _where(part: Part, nodes: tuple[str, str]) -> str:
    """Which member or span of a tube of several members a check is about (the item is the
    tube)."""
    return "" if len(part.segments) == 1 else f" ({nodes[0]}-{nodes[1]})"


def _stress_records(ctx: CheckContext, result: LoadCaseResult, m: MemberForces,
                    material: TubeStock) -> list[CheckRecord]:
    part = m.part
    assert part.od_mm is not None and part.id_mm is not None
    A = tube_area(part.od_mm, part.id_mm)
    S = tube_section_modulus(part.od_mm, part.id_mm)
    axial = m.axial_N / A
    bending = max(math.hypot(m.moment_y_Nmm[e], m.moment_z_Nmm[e]) for e in (0, 1))
    sigma_b = bending / S
    out = []
    senses: tuple[tuple[Sense, float], ...] = (("tension", axial + sigma_b),
                                               ("compression", sigma_b - axial))
    for sense, demand in senses:
        if demand <= NEGLIGIBLE_STRAIN * modulus(material):
            continue
        allowable = axial_strength(material, sense, ctx.case.loads.service_temperature_C)
        basis = (f"σ = N/A ± M/S, N = {m.axial_N:.4g} N, M = {bending:.4g} N·mm (worse end), "
                 f"A = {A:.4g} mm², S = π(D⁴−d⁴)/(32D) = {S:.4g} mm³; {allowable.provenance}")
        out.append(CheckRecord(
            item=part.name, kind="tube",
            mode=f"axial and bending, {sense}{_where(part, m.segment)}",
            load_case=result.name, demand=demand, capacity=allowable.value_MPa, unit="MPa",
            required_factor=ctx.required("tube"), basis=basis,
            suggestion="a larger or thicker-walled tube, or a shorter lever to the load"))
    return out


def local_buckling_basis(material: TubeStock, r_over_t: float) -> str:
    """What the local-buckling check assumes, for its basis."""
    text = ("σ_cr = γ · 0.605 E t/R, mid-wall R, SP-8007 knock-down γ = 1 − c(1 − e^−φ), "
            "φ = √(R/t)/16 (NASA SP-8007, REFERENCES.md §6); interaction R_c + R_b ≤ 1 "
            "(SP-8007 §4.1.3, from memory)")
    if isinstance(material, TubeMaterial):
        text += ("; isotropic-shell formula with the axial modulus: a carbon tube is "
                 "orthotropic and its classical value scales with √(E_axial E_hoop), lower "
                 "where the hoop modulus is lower (the table has no hoop modulus)")
    if r_over_t < THIN_SHELL_FROM_R_OVER_T:
        text += (f"; R/t = {r_over_t:.3g} is a thick wall for thin-shell theory: indicative "
                 "only, material strength governs such walls")
    return text


def _local_record(ctx: CheckContext, result: LoadCaseResult, m: MemberForces,
                  material: TubeStock) -> CheckRecord | None:
    part = m.part
    assert part.od_mm is not None and part.id_mm is not None
    D, d = part.od_mm, part.id_mm
    r_over_t = (D + d) / 4.0 / ((D - d) / 2.0)
    if r_over_t >= SP8007_MAX_R_OVER_T:
        return None
    E = modulus(material)
    cr_axial = shell_buckling_stress(E, D, d, "axial")
    cr_bending = shell_buckling_stress(E, D, d, "bending")
    compression = max(-m.axial_N / tube_area(D, d), 0.0)
    bending = max(math.hypot(m.moment_y_Nmm[e], m.moment_z_Nmm[e]) for e in (0, 1))
    sigma_b = bending / tube_section_modulus(D, d)
    ratio = compression / cr_axial + sigma_b / cr_bending
    if compression + sigma_b <= NEGLIGIBLE_STRAIN * E:
        return None
    basis = (f"R_c = {compression:.4g}/{cr_axial:.4g} MPa, R_b = {sigma_b:.4g}/{cr_bending:.4g} "
             f"MPa, E = {E:.4g} MPa, R/t = {r_over_t:.3g}; "
             f"{local_buckling_basis(material, r_over_t)}")
    return CheckRecord(
        item=part.name, kind="tube",
        mode=f"local shell buckling (SP-8007){_where(part, m.segment)}",
        load_case=result.name, demand=ratio, capacity=1.0, unit="-",
        required_factor=ctx.required("buckling"), basis=basis,
        suggestion="a thicker wall (lower R/t)")


def _end_text(end: End) -> str:
    return f"{end.kind} ({end.why})"


def _euler_record(ctx: CheckContext, result: LoadCaseResult, span: Span,
                  forces: Sequence[MemberForces], material: TubeStock
                  ) -> tuple[CheckRecord, float] | None:
    """The span's Euler check and its factor P_cr/|N|, when it is in compression."""
    compression = max(-forces[i].axial_N for i in span.members)
    part = span.part
    assert part.od_mm is not None and part.id_mm is not None
    if compression <= NEGLIGIBLE_STRAIN * modulus(material) * tube_area(part.od_mm, part.id_mm):
        return None
    a, b = span.ends
    K = effective_length_factor(a.kind, b.kind)
    member_length = sum(forces[i].length_mm for i in span.members)
    xyz = result.model.xyz
    chord = float(np.linalg.norm(node_xy(ctx, a.part, a.node, xyz)
                                 - node_xy(ctx, b.part, b.node, xyz)))
    L = max(member_length, chord)
    E, I = modulus(material), tube_second_moment(part.od_mm, part.id_mm)
    P_e = euler_load(E, I, L, K)
    sections = [ctx.built.beam_sections[i] for i in span.members]
    kGA = min(s.G_MPa * min(s.Asy_mm2, s.Asz_mm2) for s in sections)
    P_cr = engesser_load(P_e, kGA)
    basis = (f"P_cr = π²EI/(KL)² = {P_e:.4g} N, with shear P_e/(1 + P_e/κGA), κGA = "
             f"{kGA:.4g} N (Engesser; Timoshenko & Gere, Theory of Elastic Stability, 2nd ed. "
             f"§2.16, from memory); E = {E:.4g} MPa, I = {I:.4g} mm⁴, L = {L:.4g} mm from "
             f"{a.node} on {a.part} to {b.node} on {b.part}; ends {_end_text(a)} and "
             f"{_end_text(b)}: K = {K:g}, recommended design value (AISC 360 Commentary, Table "
             "C-A-7.1), braced against sway; the tube's EI over the whole length (printed "
             "fittings are softer: see the frame's buckling factor)")
    record = CheckRecord(
        item=part.name, kind="tube", mode=f"Euler buckling{_where(part, span.nodes)}",
        load_case=result.name,
        demand=compression, capacity=P_cr, unit="N", required_factor=ctx.required("buckling"),
        basis=basis, suggestion="a stiffer tube (larger diameter), a shorter span, or ends "
                                "held against rotation")
    return record, P_cr / compression


def frame_buckling_factor(result: LoadCaseResult) -> float:
    """The load factor λ at which a solved load case buckles the frame (``inf``: never)."""
    return float(np.ravel(buckling_factors(result.model, result.solution))[0])


def _frame_record(ctx: CheckContext, result: LoadCaseResult, item: str, euler: float
                  ) -> CheckRecord | None:
    lam = frame_buckling_factor(result)
    if math.isinf(lam):
        return None
    basis = (f"load factor λ = {lam:.4g} of the whole load case from the frame's linear "
             "buckling analysis (K + λ K_G) φ = 0 (stiff.fe), with the joints' and printed "
             "parts' real stiffness and sway; attached to the tube with the lowest Euler factor "
             f"in this load case ({euler:.3g}): the mode may involve other parts")
    if lam < 0.5 * euler:
        basis += ("; λ is well below the tube's own Euler factor, so the mode lies mostly in "
                  "other members (printed parts) or the joints")
    return CheckRecord(
        item=item, kind="tube", mode="linear buckling (frame)", load_case=result.name,
        demand=1.0, capacity=lam, unit="-", required_factor=ctx.required("buckling"),
        basis=basis, suggestion="stiffen the members in compression or their joints")


def _tubes(ctx: CheckContext) -> list[tuple[Part, TubeStock, list[Span]]]:
    return [(p, tube_material(ctx.case, p), spans(ctx, p))
            for p in ctx.case.parts if p.kind == "tube"]


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Every tube in every load case: stress, Euler, frame buckling, local buckling."""
    tubes = _tubes(ctx)
    out: list[CheckRecord] = []
    for result in ctx.results:
        forces = member_forces(ctx, result)
        lowest: tuple[float, str] | None = None
        for part, material, part_spans in tubes:
            for m in forces:
                if m.part.name != part.name:
                    continue
                out += _stress_records(ctx, result, m, material)
                local = _local_record(ctx, result, m, material)
                if local is not None:
                    out.append(local)
            for span in part_spans:
                found = _euler_record(ctx, result, span, forces, material)
                if found is None:
                    continue
                record, factor = found
                if not math.isinf(effective_length_factor(*(e.kind for e in span.ends))):
                    out.append(record)
                if lowest is None or factor < lowest[0]:
                    lowest = (factor, record.item)
        if lowest is not None:
            frame = _frame_record(ctx, result, lowest[1], lowest[0])
            if frame is not None:
                out.append(frame)
    return out


def warnings(ctx: CheckContext) -> list[str]:
    """Cross-holes and clamps on pultruded tubes, spans with no Euler load, R/t out of range."""
    out: list[str] = []
    for part, material, part_spans in _tubes(ctx):
        hoop = (f"{material.hoop_MPa:g} MPa" if isinstance(material, TubeMaterial)
                and material.hoop_MPa is not None else "low")
        if is_unidirectional(material):
            for j in ctx.case.joints:
                if part.name not in j.parts:
                    continue
                if j.kind in ("pin", "driven"):
                    out.append(f"joint {j.name}: a pin through the pultruded tube {part.name} "
                               f"needs a cross-hole, and its transverse strength is {hoop}: it "
                               "can split along the fibres; bond a printed or metal end "
                               "fitting on the tube and pin that instead")
                if j.socket is not None and j.socket.fixing == "clamped":
                    out.append(f"joint {j.name}: a clamp on the pultruded tube {part.name} "
                               f"presses across its fibres (transverse strength {hoop}): it "
                               "can crush or split; bond it, or use a roll-wrapped tube")
        for span in part_spans:
            a, b = span.ends
            if math.isinf(effective_length_factor(a.kind, b.kind)):
                out.append(f"tube {part.name}{_where(part, span.nodes)}: {_end_text(a)} and "
                           f"{_end_text(b)}: no Euler load of its own; the frame's buckling "
                           "factor is its buckling check")
        assert part.od_mm is not None and part.id_mm is not None
        r_over_t = (part.od_mm + part.id_mm) / 4.0 / ((part.od_mm - part.id_mm) / 2.0)
        if r_over_t >= SP8007_MAX_R_OVER_T:
            out.append(f"tube {part.name}: R/t = {r_over_t:.4g} is beyond SP-8007's range "
                       "(below 1500): its local buckling is not checked")
    return out

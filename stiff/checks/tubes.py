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
  may involve other parts, as the basis says). Over a batch that tube can change from entry to
  entry, so every tube has a frame row in each load set, applying only in the entries where it
  has the lowest factor (B = 1: the one record `stiff check` makes).
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
from dataclasses import dataclass, fields, is_dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from stiff.case_model import Case, Part
from stiff.checks.base import CheckRows, FloatArray, Text
from stiff.checks.context import CheckContext, LoadSet, MemberForces, member_forces
from stiff.checks.spans import End, EndKind, Span, node_xy, spans
from stiff.fe import Solution, buckling_factors
from stiff.fe.buckling_bound import screened_buckling_factors
from stiff.fe.solve import Reductions
from stiff.materials import MetalMaterial, TubeMaterial
from stiff.strength import ROOM_TEMPERATURE_C, Allowable, metal_strength

#: The mode of the frame's linear buckling rows.
FRAME_MODE = "linear buckling (frame)"
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
#: Euler factors of two spans closer than this (relative) are equal when the frame's buckling
#: row picks its tube: the difference is round-off of the solve.
TIED_FACTORS = 1e-9

#: AISC 360 Commentary Table C-A-7.1, recommended design values of K for braced ends (sway
#: prevented) and for a cantilever [confirmed]; pinned-free and free-free have none.
_K_DESIGN: dict[frozenset[EndKind], float] = {
    frozenset({"fixed"}): 0.65,
    frozenset({"fixed", "pinned"}): 0.80,
    frozenset({"pinned"}): 1.0,
    frozenset({"fixed", "free"}): 2.1,
}


# ---------------------------------------------------------------------------------------------
# Formulas: each takes floats or numpy arrays (broadcast together); floats give a float.

#: A float, or an array of them.
Real = float | FloatArray


def _real(x: npt.ArrayLike) -> Real:
    """A 0-d result as a float, an array as it is."""
    a = np.asarray(x, np.float64)
    return float(a) if a.ndim == 0 else a


def tube_area(od_mm: Real, id_mm: Real) -> Real:
    """Cross-section area π(D² − d²)/4 [mm²] of a tube, outer and inner diameter [mm]."""
    return _real(np.pi * (np.square(od_mm) - np.square(id_mm)) / 4.0)


def tube_second_moment(od_mm: Real, id_mm: Real) -> Real:
    """Second moment of area π(D⁴ − d⁴)/64 [mm⁴] of a tube, diameters [mm]."""
    return _real(np.pi * (np.power(od_mm, 4) - np.power(id_mm, 4)) / 64.0)


def tube_section_modulus(od_mm: Real, id_mm: Real) -> Real:
    """Elastic section modulus π(D⁴ − d⁴)/(32D) [mm³] of a tube, diameters [mm]."""
    return _real(np.pi * (np.power(od_mm, 4) - np.power(id_mm, 4)) / (32.0 * np.asarray(od_mm)))


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


def euler_load(E_MPa: Real, I_mm4: Real, length_mm: Real, K: Real) -> Real:
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
    K_arr = np.asarray(K, np.float64)
    finite = np.where(np.isinf(K_arr), 1.0, K_arr)
    load = np.pi**2 * np.asarray(E_MPa) * I_mm4 / np.square(finite * length_mm)
    return _real(np.where(np.isinf(K_arr), 0.0, load))


def engesser_load(euler_N: Real, shear_stiffness_N: Real) -> Real:
    """Buckling load with shear deformation, P = P_e / (1 + P_e/(κGA)) [N].

    Engesser's formula (Timoshenko & Gere, *Theory of Elastic Stability*, 2nd ed., §2.16, from
    memory). ``shear_stiffness_N`` is κGA [N]; ``inf`` returns the Euler load ``euler_N`` [N].
    """
    P_e = np.asarray(euler_N, np.float64)
    return _real(P_e / (1.0 + P_e / np.asarray(shear_stiffness_N, np.float64)))


def sp8007_knockdown(r_over_t: Real, mode: ShellMode) -> Real:
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
        R/t not in (0, 1500) (any entry of an array).
    """
    ratio = np.asarray(r_over_t, np.float64)
    outside = ~((ratio > 0.0) & (ratio < SP8007_MAX_R_OVER_T))
    if outside.any():
        raise ValueError("SP-8007's knock-down holds for 0 < R/t < 1500, got "
                         f"{float(ratio[outside].flat[0]):g}")
    phi = np.sqrt(ratio) / 16.0
    c = 0.901 if mode == "axial" else 0.731
    return _real(1.0 - c * (1.0 - np.exp(-phi)))


def classical_shell_stress(E_MPa: Real, t_mm: Real, R_mm: Real) -> Real:
    """Classical buckling stress of an isotropic cylinder, 0.605 E t/R [MPa] (ν = 0.3).

    ``E_MPa`` modulus [MPa], ``t_mm`` wall thickness [mm], ``R_mm`` mid-wall radius [mm].
    """
    return _real(CLASSICAL_SHELL * np.asarray(E_MPa) * t_mm / R_mm)


def shell_buckling_stress(E_MPa: Real, od_mm: Real, id_mm: Real, mode: ShellMode) -> Real:
    """Local buckling stress γ · 0.605 E t/R [MPa] of a tube, mid-wall R, diameters [mm]."""
    D, d = np.asarray(od_mm, np.float64), np.asarray(id_mm, np.float64)
    t = (D - d) / 2.0
    R = (D + d) / 4.0
    return _real(np.asarray(sp8007_knockdown(_real(R / t), mode))
                 * classical_shell_stress(E_MPa, _real(t), _real(R)))


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


@dataclass(frozen=True)
class _Tube:
    """What a tube's checks need that no load changes: its section, strengths and spans."""

    part: Part
    material: TubeStock
    spans: tuple[Span, ...]
    E: float  # axial modulus [MPa]
    A: float  # [mm²]
    S: float  # [mm³]
    I: float  # [mm⁴]
    allowable: tuple[tuple[Sense, Allowable], ...]  # tension, then compression
    r_over_t: float


def _tube(ctx: CheckContext, part: Part) -> _Tube:
    assert part.od_mm is not None and part.id_mm is not None
    D, d = part.od_mm, part.id_mm
    material = tube_material(ctx.case, part)
    temperature = ctx.case.loads.service_temperature_C
    return _Tube(
        part=part, material=material, spans=tuple(spans(ctx, part)), E=modulus(material),
        A=float(tube_area(D, d)), S=float(tube_section_modulus(D, d)),
        I=float(tube_second_moment(D, d)),
        allowable=tuple((sense, axial_strength(material, sense, temperature))
                        for sense in ("tension", "compression")),
        r_over_t=(D + d) / 4.0 / ((D - d) / 2.0))


def _where(part: Part, nodes: tuple[str, str]) -> str:
    """Which member or span of a tube of several members a check is about (the item is the
    tube)."""
    return "" if len(part.segments) == 1 else f" ({nodes[0]}-{nodes[1]})"


def _bending(m: MemberForces) -> FloatArray:
    """(B,) bending moment hypot(M_y, M_z) at the worse end [N·mm]."""
    ends = [np.hypot(m.moment_y_Nmm[e], m.moment_z_Nmm[e]) for e in (0, 1)]
    worse: FloatArray = np.maximum(ends[0], ends[1])
    return worse


def _stress_basis(N: FloatArray, M: FloatArray, tail: str) -> Text:
    def basis(i: int) -> str:
        return (f"σ = N/A ± M/S, N = {float(N[i]):.4g} N, M = {float(M[i]):.4g} N·mm (worse "
                f"end), {tail}")
    return basis


def _stress_rows(ctx: CheckContext, loads: LoadSet, m: MemberForces, tube: _Tube
                 ) -> list[CheckRows]:
    axial = m.axial_N / tube.A
    bending = _bending(m)
    sigma_b = bending / tube.S
    demands = {"tension": axial + sigma_b, "compression": sigma_b - axial}
    out = []
    for sense, allowable in tube.allowable:
        demand = demands[sense]
        tail = (f"A = {tube.A:.4g} mm², S = π(D⁴−d⁴)/(32D) = {tube.S:.4g} mm³; "
                f"{allowable.provenance}")
        out.append(CheckRows(
            item=tube.part.name, kind="tube",
            mode=f"axial and bending, {sense}{_where(tube.part, m.segment)}",
            load_case=loads.name, demand=demand, capacity=allowable.value_MPa, unit="MPa",
            required_factor=ctx.required("tube"), basis=_stress_basis(m.axial_N, bending, tail),
            suggestion="a larger or thicker-walled tube, or a shorter lever to the load",
            applies=demand > NEGLIGIBLE_STRAIN * tube.E))
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


def _local_basis(compression: FloatArray, sigma_b: FloatArray, cr_axial: float,
                 cr_bending: float, tail: str) -> Text:
    def basis(i: int) -> str:
        return (f"R_c = {float(compression[i]):.4g}/{cr_axial:.4g} MPa, R_b = "
                f"{float(sigma_b[i]):.4g}/{cr_bending:.4g} MPa, {tail}")
    return basis


def _local_row(ctx: CheckContext, loads: LoadSet, m: MemberForces, tube: _Tube
               ) -> CheckRows | None:
    if tube.r_over_t >= SP8007_MAX_R_OVER_T:
        return None
    part = tube.part
    assert part.od_mm is not None and part.id_mm is not None
    cr_axial = float(shell_buckling_stress(tube.E, part.od_mm, part.id_mm, "axial"))
    cr_bending = float(shell_buckling_stress(tube.E, part.od_mm, part.id_mm, "bending"))
    compression = np.maximum(-m.axial_N / tube.A, 0.0)
    sigma_b = _bending(m) / tube.S
    tail = (f"E = {tube.E:.4g} MPa, R/t = {tube.r_over_t:.3g}; "
            f"{local_buckling_basis(tube.material, tube.r_over_t)}")
    return CheckRows(
        item=part.name, kind="tube",
        mode=f"local shell buckling (SP-8007){_where(part, m.segment)}",
        load_case=loads.name, demand=compression / cr_axial + sigma_b / cr_bending,
        capacity=1.0, unit="-", required_factor=ctx.required("buckling"),
        basis=_local_basis(compression, sigma_b, cr_axial, cr_bending, tail),
        suggestion="a thicker wall (lower R/t)",
        applies=compression + sigma_b > NEGLIGIBLE_STRAIN * tube.E)


def _end_text(end: End) -> str:
    return f"{end.kind} ({end.why})"


def _euler_basis(P_e: FloatArray, L: FloatArray, kGA: float, tube: _Tube, span: Span,
                 K: float) -> Text:
    a, b = span.ends
    tail = (f"{a.node} on {a.part} to {b.node} on {b.part}; ends {_end_text(a)} and "
            f"{_end_text(b)}: K = {K:g}, recommended design value (AISC 360 Commentary, Table "
            "C-A-7.1), braced against sway; the tube's EI over the whole length (printed "
            "fittings are softer: see the frame's buckling factor)")

    def basis(i: int) -> str:
        return (f"P_cr = π²EI/(KL)² = {float(P_e[i]):.4g} N, with shear P_e/(1 + P_e/κGA), "
                f"κGA = {kGA:.4g} N (Engesser; Timoshenko & Gere, Theory of Elastic Stability, "
                f"2nd ed. §2.16, from memory); E = {tube.E:.4g} MPa, I = {tube.I:.4g} mm⁴, "
                f"L = {float(L[i]):.4g} mm from {tail}")
    return basis


def _euler_row(ctx: CheckContext, loads: LoadSet, span: Span, forces: Sequence[MemberForces],
               tube: _Tube) -> tuple[CheckRows, FloatArray]:
    """The span's Euler check and its factor P_cr/|N| ((B,), ``inf`` where the span is not in
    compression)."""
    compression = np.max([-forces[i].axial_N for i in span.members], axis=0)
    applies = compression > NEGLIGIBLE_STRAIN * tube.E * tube.A
    a, b = span.ends
    K = effective_length_factor(a.kind, b.kind)
    member_length = sum(forces[i].length_mm for i in span.members)
    xyz = loads.xyz_mm
    chord = np.linalg.norm(node_xy(ctx, a.part, a.node, xyz) - node_xy(ctx, b.part, b.node, xyz),
                           axis=-1)
    L = np.maximum(member_length, chord)
    P_e = np.asarray(euler_load(tube.E, tube.I, L, K))
    kGA = min(s.G_MPa * min(s.Asy_mm2, s.Asz_mm2)
              for s in (ctx.built.beam_sections[i] for i in span.members))
    P_cr = np.asarray(engesser_load(P_e, kGA))
    row = CheckRows(
        item=tube.part.name, kind="tube", mode=f"Euler buckling{_where(tube.part, span.nodes)}",
        load_case=loads.name, demand=compression, capacity=P_cr, unit="N",
        required_factor=ctx.required("buckling"), basis=_euler_basis(P_e, L, kGA, tube, span, K),
        suggestion="a stiffer tube (larger diameter), a shorter span, or ends held against "
                   "rotation",
        applies=applies)
    factor = np.divide(P_cr, compression, out=np.full(compression.shape, np.inf), where=applies)
    return row, factor


def _same(a: object, b: object) -> bool:
    """True when two models (or their parts) hold the same numbers."""
    if a is b:
        return True
    if isinstance(a, np.ndarray) and isinstance(b, np.ndarray):
        return a.shape == b.shape and bool(np.array_equal(a, b))
    if is_dataclass(a) and is_dataclass(b) and not isinstance(a, type) and type(a) is type(b):
        return all(_same(getattr(a, f.name), getattr(b, f.name)) for f in fields(a))
    return bool(a == b)


def frame_buckling_factors(loads: Sequence[LoadSet],
                           cutoffs: Sequence[FloatArray] | None = None,
                           memo: Reductions | None = None) -> list[FloatArray]:
    """(B,) load factor λ at which each load set buckles the frame (``inf``: never), per set.

    Load sets solved on the same model (the load cases `stiff check` solves together, or
    equal models of other sets) are analysed in one call, so the stiffness is assembled and
    factored once for all of them.

    With ``cutoffs`` ((B,) per set, sweeps and maps), λ is solved only in the poses where its
    lower bound (``stiff.fe.buckling_bound``) is below the cutoff; elsewhere the bound is
    returned, which is then known to be at or below λ and at or above the cutoff.
    """
    groups: list[list[int]] = []
    for k, s in enumerate(loads):
        group = next((g for g in groups if _same(loads[g[0]].model, s.model)), None)
        if group is None:
            groups.append([k])
        else:
            group.append(k)
    out: dict[int, FloatArray] = {}
    for members in groups:
        model = loads[members[0]].model
        axis = len(model.batch_shape)  # the load-case axis of the solutions
        solution = Solution(**{
            name: np.concatenate([getattr(loads[k].solution, name) for k in members], axis=axis)
            for name in Solution.__dataclass_fields__})
        if cutoffs is None or axis != 1:
            lam = buckling_factors(model, solution, memo).reshape(-1, len(members))
        else:
            lam = screened_buckling_factors(
                model, solution, np.stack([cutoffs[k] for k in members], axis=-1), memo)
        for j, k in enumerate(members):
            out[k] = lam[:, j]
    return [out[k] for k in range(len(loads))]


def _frame_basis(lam: FloatArray, lowest: FloatArray) -> Text:
    def basis(i: int) -> str:
        text = (f"load factor λ = {float(lam[i]):.4g} of the whole load case from the frame's "
                "linear buckling analysis (K + λ K_G) φ = 0 (stiff.fe), with the joints' and "
                "printed parts' real stiffness and sway; attached to the tube with the lowest "
                f"Euler factor in this load case ({float(lowest[i]):.3g}): the mode may involve "
                "other parts")
        if lam[i] < 0.5 * lowest[i]:
            text += ("; λ is well below the tube's own Euler factor, so the mode lies mostly "
                     "in other members (printed parts) or the joints")
        return text
    return basis


def _frame_rows(ctx: CheckContext, loads: LoadSet, lam: FloatArray, tubes: Sequence[_Tube],
                factors: Sequence[tuple[int, FloatArray]]) -> list[CheckRows]:
    """One frame-buckling row per tube, applying in the entries where that tube has the lowest
    Euler factor of the load set (of the spans in compression) and the frame can buckle.

    ``factors``: (tube index, (B,) Euler factor) of every span, in check order. Factors within
    :data:`TIED_FACTORS` of the lowest are a tie, which the first span in that order wins: the
    two links of a symmetric linkage tie, and round-off must not pick between them.
    """
    if not factors:
        return []
    owner = np.array([t for t, _ in factors])
    table = np.stack([f for _, f in factors])  # (n_spans, B)
    lowest = table.min(axis=0)
    best = np.argmax(table <= lowest * (1.0 + TIED_FACTORS), axis=0)
    live = np.isfinite(lowest) & np.isfinite(lam)
    basis = _frame_basis(lam, lowest)
    return [CheckRows(
        item=tube.part.name, kind="tube", mode=FRAME_MODE, load_case=loads.name,
        demand=np.ones(lam.shape), capacity=lam, unit="-",
        required_factor=ctx.required("buckling"), basis=basis,
        suggestion="stiffen the members in compression or their joints",
        applies=live & (owner[best] == t)) for t, tube in enumerate(tubes)]


def _load_set_rows(ctx: CheckContext, loads: LoadSet, lam: FloatArray, tubes: Sequence[_Tube]
                   ) -> list[CheckRows]:
    """Every tube's checks in one load set, the frame's buckling last."""
    forces = member_forces(ctx, loads)
    out: list[CheckRows] = []
    factors: list[tuple[int, FloatArray]] = []
    for t, tube in enumerate(tubes):
        for m in forces:
            if m.part.name != tube.part.name:
                continue
            out += _stress_rows(ctx, loads, m, tube)
            local = _local_row(ctx, loads, m, tube)
            if local is not None:
                out.append(local)
        for span in tube.spans:
            row, factor = _euler_row(ctx, loads, span, forces, tube)
            if not math.isinf(effective_length_factor(*(e.kind for e in span.ends))):
                out.append(row)
            factors.append((t, factor))
    return out + _frame_rows(ctx, loads, lam, tubes, factors)


def _tubes(ctx: CheckContext) -> list[_Tube]:
    return [_tube(ctx, p) for p in ctx.case.parts if p.kind == "tube"]


def checks(ctx: CheckContext, cutoffs: Sequence[FloatArray] | None = None) -> list[CheckRows]:
    """Every tube in every load set: stress, Euler, frame buckling, local buckling.

    ``cutoffs`` ((B,) per load set) screen the frame's buckling factor as
    :func:`frame_buckling_factors` says (sweeps and maps); by default it is solved everywhere.
    """
    tubes = _tubes(ctx)
    if not tubes:
        return []
    lams = frame_buckling_factors(ctx.loads, cutoffs, ctx.memo)
    return [row for loads, lam in zip(ctx.loads, lams, strict=True)
            for row in _load_set_rows(ctx, loads, lam, tubes)]


def without_frame(ctx: CheckContext) -> list[CheckRows]:
    """The tube checks of every load set except the frame's buckling (for its cutoffs)."""
    tubes = _tubes(ctx)
    none = [np.full(s.size, np.inf) for s in ctx.loads]
    return [row for loads, lam in zip(ctx.loads, none, strict=True)
            for row in _load_set_rows(ctx, loads, lam, tubes)
            if row.mode != FRAME_MODE]


def warnings(ctx: CheckContext) -> list[str]:
    """Cross-holes and clamps on pultruded tubes, spans with no Euler load, R/t out of range."""
    out: list[str] = []
    for tube in _tubes(ctx):
        part, material, part_spans = tube.part, tube.material, tube.spans
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
        r_over_t = tube.r_over_t
        if r_over_t >= SP8007_MAX_R_OVER_T:
            out.append(f"tube {part.name}: R/t = {r_over_t:.4g} is beyond SP-8007's range "
                       "(below 1500): its local buckling is not checked")
    return out

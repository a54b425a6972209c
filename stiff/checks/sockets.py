"""Sockets: a tube bonded or clamped into a printed part at a fixed joint.

The forces are the tube member's end forces at the socket's node, which is taken as the
socket's mouth: axial force N, shear V and moment M (about the two axes across the tube),
torque T. With d the tube's outer diameter and L the engagement:

* **Bonded**: the adhesive's average shear τ_avg = F/(π d L) (axial) and 2T/(π d² L)
  (torsion), combined as a vector (they act along and around the tube), against the
  adhesive's lap-shear strength; the Volkersen shear-lag peak (:func:`volkersen_peak_factor`)
  on each, against the same strength and against the printed wall's interlayer shear strength
  (the bond's shear always acts on the layer planes somewhere round the bore, directly or by
  complementary shear).
* **Clamped**: friction μ N_clamp against the slip force hypot(N, 2T/d).
* **Pry** (both): the bearing pressure on the printed socket wall from the shear and moment at
  the mouth, p_max = 4V/(dL) + 6M/(dL²) (:func:`pry_bearing_pressure`), in the linkage plane
  and out of it, against the printed compressive strength through the knock-down chain;
  across the layers when the pressure acts along the build axis (the out-of-plane pressure
  for a flat build, the in-plane one on edge; upright, the bore runs along the build axis and
  the pressure lies in the layers).

Adaptation of Volkersen's single-lap shear lag to a tube in a socket (a tubular lap with
thin-walled adherends, per unit circumference of the bond, π d): each adherend's membrane
stiffness is its axial stiffness over the bond's circumference, E t = E A/(π d). Adherend 1 is
the tube, E_axial and t₁ = π(D² − d_i²)/4/(π D) (close to the wall (D − d_i)/2 for a thin
wall); adherend 2 is the printed socket round the bore, with the printed section's smeared
modulus EA/A_outline (walls, skins and infill together: softer than the solid, which raises
the peak, so conservative) and t₂ = (A_outline − πD²/4)/(π D). A section too narrow for the
tube is refused (no checks, a warning); a wall thinner than :data:`MIN_WALL_MM` at its
thinnest is warned about. Torsion has the same shear lag with the shear moduli.
Defaults (common practice): bondline 0.1 mm where the case gives none
(:data:`DEFAULT_BONDLINE_MM`), friction 0.2 (:data:`DEFAULT_FRICTION`, low end of dry polymer
on carbon/epoxy). A clamped socket without ``clamp_force_N`` gets no friction check, and a
warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from stiff.case_model import Joint, Part, Socket
from stiff.checks.allowables import printed_allowable
from stiff.checks.base import CheckRecord
from stiff.checks.context import CheckContext, MemberForces, member_forces
from stiff.checks.tubes import modulus, tube_material
from stiff.loads import LoadCaseResult
from stiff.materials import AdhesiveMaterial, TubeMaterial
from stiff.printed_sections import PrintedSection
from stiff.strength import across_layers_strength, member_strength

#: Bondline thickness where the case gives none [mm] (common practice for a bonded tube joint:
#: 0.05-0.2 mm; a thin line gives the higher peak).
DEFAULT_BONDLINE_MM = 0.1
#: Friction coefficient where a clamped socket gives none (common practice, low end of dry
#: polymer on carbon/epoxy, 0.2-0.4).
DEFAULT_FRICTION = 0.2
#: Thinnest socket wall below which a warning is given [mm] (common practice: two or three
#: perimeters of a 0.4 mm nozzle).
MIN_WALL_MM = 1.0


# ---------------------------------------------------------------------------------------------
# Formulas


def average_bond_shear(force_N: float, diameter_mm: float, length_mm: float) -> float:
    """Average shear τ = F/(π d L) [MPa] on a bond of diameter d and length L [mm], F [N]."""
    return abs(force_N) / (math.pi * diameter_mm * length_mm)


def torsion_bond_shear(torque_Nmm: float, diameter_mm: float, length_mm: float) -> float:
    """Average shear τ = 2T/(π d² L) [MPa] of a torque T [N·mm] on a bond (d, L [mm])."""
    return 2.0 * abs(torque_Nmm) / (math.pi * diameter_mm**2 * length_mm)


def volkersen_omega(G_a_MPa: float, bondline_mm: float, stiffness_1_N_per_mm: float,
                    stiffness_2_N_per_mm: float) -> float:
    """Shear-lag parameter ω = √((G_a/η)(1/(E₁t₁) + 1/(E₂t₂))) [1/mm].

    Parameters
    ----------
    G_a_MPa
        Adhesive shear modulus [MPa].
    bondline_mm
        Bondline thickness η [mm].
    stiffness_1_N_per_mm, stiffness_2_N_per_mm
        Membrane stiffness E t of each adherend, per unit width of the bond [N/mm] (G t for
        torsion).
    """
    return math.sqrt(G_a_MPa / bondline_mm
                     * (1.0 / stiffness_1_N_per_mm + 1.0 / stiffness_2_N_per_mm))


def volkersen_peak_factor(G_a_MPa: float, bondline_mm: float, stiffness_1_N_per_mm: float,
                          stiffness_2_N_per_mm: float, overlap_mm: float) -> float:
    """Peak over average bond shear of a lap joint by Volkersen's shear lag.

    τ_max/τ_avg = (ωL/2)[coth(ωL/2) + ((ψ − 1)/(ψ + 1)) tanh(ωL/2)], ψ = E₁t₁/(E₂t₂) ≥ 1
    (Volkersen, Luftfahrtforschung 15, 1938; review: da Silva et al. 2009, Int. J. Adhes.
    Adhes. 29, from memory; REFERENCES.md §4). The peak is at the end of the overlap where
    the softer adherend carries the whole load, so ψ is taken as the stiffer over the softer
    (the formula for ψ < 1 gives the shear at the other end).

    Parameters
    ----------
    G_a_MPa, bondline_mm, stiffness_1_N_per_mm, stiffness_2_N_per_mm
        See :func:`volkersen_omega`.
    overlap_mm
        Overlap (engagement) length L [mm].
    """
    half = volkersen_omega(G_a_MPa, bondline_mm, stiffness_1_N_per_mm,
                           stiffness_2_N_per_mm) * overlap_mm / 2.0
    psi = max(stiffness_1_N_per_mm, stiffness_2_N_per_mm) / min(stiffness_1_N_per_mm,
                                                                 stiffness_2_N_per_mm)
    t = math.tanh(half)
    return half * (1.0 / t + (psi - 1.0) / (psi + 1.0) * t)


def pry_bearing_pressure(shear_N: float, moment_Nmm: float, diameter_mm: float,
                         length_mm: float) -> float:
    """Peak bearing pressure p_max = 4V/(dL) + 6M₀/(dL²) [MPa] of a rigid insert prying.

    A rigid insert of diameter d engaged over L [mm], loaded at the mouth by a shear V [N] and a
    moment M₀ [N·mm] in the same sense, bears on its socket with a pressure linear along the
    engagement, q(x) = d·p(x), x from the mouth. Force and moment equilibrium,
    ∫q dx = V and ∫q x dx = −M₀ (about the mouth), give q(0) = 4V/L + 6M₀/L² and
    q(L) = −2V/L − 6M₀/L² (REFERENCES.md §4, practice, derived). Magnitudes are added: the
    worse sense.
    """
    d, L = diameter_mm, length_mm
    return 4.0 * abs(shear_N) / (d * L) + 6.0 * abs(moment_Nmm) / (d * L**2)


def socket_wall_mm(width_mm: float, depth_mm: float, tube_od_mm: float) -> float:
    """Thinnest wall round a bore of ``tube_od_mm`` in a section ``width_mm`` × ``depth_mm``
    [mm] (may be ≤ 0: no wall)."""
    return (min(width_mm, depth_mm) - tube_od_mm) / 2.0


# ---------------------------------------------------------------------------------------------
# Geometry and forces of one socket


@dataclass(frozen=True)
class SocketSite:
    """A socket with what its checks need: the tube, the printed part's section there."""

    joint: Joint
    socket: Socket
    tube: Part
    printed: PrintedSection
    printed_member: int  # model index of the printed member at the socket's node
    printed_length_mm: float  # that member's length, to its next node

    @property
    def wall_mm(self) -> float:
        """Thinnest printed wall round the bore [mm] (may be ≤ 0)."""
        assert self.tube.od_mm is not None
        return socket_wall_mm(self.printed.width_mm, self.printed.depth_mm, self.tube.od_mm)

    @property
    def ring_mm(self) -> float:
        """Equivalent wall of the socket round the bore, (A_outline − πD²/4)/(πD) [mm]."""
        assert self.tube.od_mm is not None
        D = self.tube.od_mm
        return (self.printed.outline_area_mm2 - math.pi * D**2 / 4.0) / (math.pi * D)

    @property
    def name(self) -> str:
        """The socket's item name."""
        return f"socket {self.joint.name}"


def sites(ctx: CheckContext) -> list[SocketSite]:
    """Every fixed joint with a socket, with its printed section."""
    out = []
    xyz = ctx.built.model.xyz
    nodes = ctx.built.model.beams.nodes
    for joint in ctx.case.joints:
        s = joint.socket
        if joint.kind != "fixed" or s is None:
            continue
        found = [i for i, p in enumerate(ctx.built.beam_part)
                 if p == s.printed and joint.node in ctx.built.beam_segment[i]]
        if not found:
            continue
        i = found[0]
        ps = ctx.built.beam_printed[i]
        assert ps is not None
        length = float(((xyz[nodes[i, 1]] - xyz[nodes[i, 0]]) ** 2).sum() ** 0.5)
        out.append(SocketSite(joint, s, ctx.case.part(s.tube), ps, i, length))
    return out


@dataclass(frozen=True)
class SocketForces:
    """The tube's forces at the socket's mouth: magnitudes [N], [N·mm], local tube axes.

    ``shear_y_N`` and ``moment_z_Nmm`` act in the linkage plane, ``shear_z_N`` and
    ``moment_y_Nmm`` out of it.
    """

    axial_N: float
    shear_y_N: float
    shear_z_N: float
    moment_y_Nmm: float
    moment_z_Nmm: float
    torque_Nmm: float


def socket_forces(site: SocketSite, forces: list[MemberForces]) -> SocketForces | None:
    """The tube members' end forces at the socket's node (the largest of each, if several)."""
    node = site.joint.node
    ends = [(m, m.segment.index(node)) for m in forces
            if m.part.name == site.tube.name and node in m.segment]
    if not ends:
        return None
    return SocketForces(
        axial_N=max(abs(m.axial_N) for m, _ in ends),
        shear_y_N=max(abs(m.shear_y_N[e]) for m, e in ends),
        shear_z_N=max(abs(m.shear_z_N[e]) for m, e in ends),
        moment_y_Nmm=max(abs(m.moment_y_Nmm[e]) for m, e in ends),
        moment_z_Nmm=max(abs(m.moment_z_Nmm[e]) for m, e in ends),
        torque_Nmm=max(abs(m.torque_Nmm) for m, _ in ends))


# ---------------------------------------------------------------------------------------------
# Checks


def _record(ctx: CheckContext, site: SocketSite, result: LoadCaseResult, mode: str,
            demand: float, capacity: float, unit: str, factor: float, basis: str,
            suggestion: str) -> CheckRecord:
    return CheckRecord(item=site.name, kind="socket", mode=mode, load_case=result.name,
                       demand=demand, capacity=capacity, unit=unit, required_factor=factor,
                       basis=basis, suggestion=suggestion)


@dataclass(frozen=True)
class BondLag:
    """The shear-lag figures of a bonded socket: peak factors, ω [1/mm], the values used."""

    axial_factor: float
    torsion_factor: float
    omega_per_mm: float
    text: str


def bond_lag(ctx: CheckContext, site: SocketSite, adhesive: AdhesiveMaterial) -> BondLag:
    """Volkersen peak factors of a bonded socket, axial and in torsion, and their basis."""
    tube, s, ps = site.tube, site.socket, site.printed
    assert tube.od_mm is not None and tube.id_mm is not None
    material = tube_material(ctx.case, tube)
    D = tube.od_mm
    t1 = (D**2 - tube.id_mm**2) / (4.0 * D)
    E1 = modulus(material)
    G1 = material.G_MPa if isinstance(material, TubeMaterial) else material.shear_modulus_MPa
    t2 = site.ring_mm
    E2 = ps.beam.EA / ps.outline_area_mm2
    G2 = E2 / (2.0 * (1.0 + ps.material.poisson_ratio))
    eta = s.bondline_mm if s.bondline_mm is not None else DEFAULT_BONDLINE_MM
    Ga = adhesive.shear_modulus_MPa
    L = s.engagement_mm
    k_axial = volkersen_peak_factor(Ga, eta, E1 * t1, E2 * t2, L)
    k_torsion = volkersen_peak_factor(Ga, eta, G1 * t1, G2 * t2, L)
    omega = volkersen_omega(Ga, eta, E1 * t1, E2 * t2)
    bondline = (f"η = {eta:g} mm" if s.bondline_mm is not None
                else f"η = {eta:g} mm (default, common practice)")
    text = (f"Volkersen shear lag (Luftfahrtforschung 15, 1938; formula from memory, checked "
            f"numerically), tube in socket as a lap per unit circumference (E t = E A/(πD)): "
            f"tube E₁t₁ = {E1:.4g} × {t1:.3g}, socket E₂t₂ = {E2:.4g} × {t2:.3g} N/mm (smeared "
            f"modulus of the printed section, area round the bore), G_a = {Ga:.4g} MPa "
            f"({adhesive.provenance_of('G_MPa')}), {bondline}, L = {L:g} mm: ωL/2 = "
            f"{omega * L / 2:.3g}, peak factor {k_axial:.3g} axial, {k_torsion:.3g} in torsion "
            "(G₂ = E₂/(2(1+ν))), peaks combined as vectors")
    return BondLag(k_axial, k_torsion, omega, text)


def _bonded(ctx: CheckContext, site: SocketSite, result: LoadCaseResult, f: SocketForces
            ) -> list[CheckRecord]:
    s, tube = site.socket, site.tube
    assert s.adhesive is not None and tube.od_mm is not None
    adhesive = ctx.case.library.adhesive(s.adhesive)
    d, L = tube.od_mm, s.engagement_mm
    tau_axial = average_bond_shear(f.axial_N, d, L)
    tau_torsion = torsion_bond_shear(f.torque_Nmm, d, L)
    tau_avg = math.hypot(tau_axial, tau_torsion)
    if tau_avg <= 0.0:
        return []
    lag = bond_lag(ctx, site, adhesive)
    tau_peak = math.hypot(lag.axial_factor * tau_axial, lag.torsion_factor * tau_torsion)
    strength = adhesive.lap_shear_MPa
    average = (f"τ = hypot(F/(πdL), 2T/(πd²L)), F = {f.axial_N:.4g} N, T = {f.torque_Nmm:.4g} "
               f"N·mm, d = {d:g} mm, L = {L:g} mm")
    capacity = (f"lap_shear_MPa = {strength:g} MPa: {adhesive.provenance_of('lap_shear_MPa')}; "
                "the table's value as it stands (typical, no B-basis or knock-downs: no "
                "scatter or environment data for adhesives)")
    factor = ctx.required("adhesive")
    effective = 3.0 / lag.omega_per_mm
    lag_hint = (f"a thicker bondline or a stiffer, thicker socket wall lowers the peak; "
                f"engagement beyond about 3/ω = {effective:.3g} mm adds little")
    ps = site.printed
    wall_mean = across_layers_strength(ps.material, shear=True)
    wall = printed_allowable(wall_mean, ps.material, True, ctx.duty(result.name), ctx.samples)
    return [
        _record(ctx, site, result, "adhesive shear, average", tau_avg, strength, "MPa", factor,
                f"{average}; {capacity}", "a longer engagement or a larger tube"),
        _record(ctx, site, result, "adhesive shear, Volkersen peak", tau_peak, strength, "MPa",
                factor, f"{average}; {lag.text}; {capacity} (conservative: a lap-shear "
                "strength is itself an average at failure)", lag_hint),
        _record(ctx, site, result, "printed wall shear at the bond (across the layers)",
                tau_peak, wall.value_MPa, "MPa", ctx.required("across_layers"),
                f"the bond's peak shear ({lag.text}) on the printed bore, which meets the layer "
                f"planes; {wall.provenance}", lag_hint),
    ]


def _clamped(ctx: CheckContext, site: SocketSite, result: LoadCaseResult, f: SocketForces
             ) -> list[CheckRecord]:
    s, tube = site.socket, site.tube
    assert tube.od_mm is not None
    if s.clamp_force_N is None:
        return []
    mu = s.friction if s.friction is not None else DEFAULT_FRICTION
    slip = math.hypot(f.axial_N, 2.0 * f.torque_Nmm / tube.od_mm)
    if slip <= 0.0:
        return []
    friction = (f"μ = {mu:g} (case)" if s.friction is not None
                else f"μ = {mu:g} (default: common practice, low end of 0.2-0.4 for dry polymer "
                     "on carbon/epoxy)")
    basis = (f"slip force hypot(N, 2T/d), N = {f.axial_N:.4g} N, T = {f.torque_Nmm:.4g} N·mm, "
             f"d = {tube.od_mm:g} mm, against μ N_clamp, N_clamp = {s.clamp_force_N:g} N "
             f"(case, taken as the total normal force on the tube), {friction}; required "
             "factor of the socket's fixing (the adhesive's)")
    return [_record(ctx, site, result, "clamp slip (friction)", slip, mu * s.clamp_force_N,
                    "N", ctx.required("adhesive"), basis,
                    "a higher clamp force or a longer clamp, or bond the tube")]


def _pry(ctx: CheckContext, site: SocketSite, result: LoadCaseResult, f: SocketForces
         ) -> list[CheckRecord]:
    tube, ps = site.tube, site.printed
    assert tube.od_mm is not None
    d, L = tube.od_mm, site.socket.engagement_mm
    build = ps.settings.build
    mean = member_strength(ps.material, build, "compression")
    out = []
    planes = (("in the linkage plane", f.shear_y_N, f.moment_z_Nmm, build == "on_edge"),
              ("out of the plane", f.shear_z_N, f.moment_y_Nmm, build == "flat"))
    for where, V, M, across in planes:
        p = pry_bearing_pressure(V, M, d, L)
        if p <= 0.0:
            continue
        allowable = printed_allowable(mean, ps.material, across, ctx.duty(result.name),
                                      ctx.samples)
        layers = " (across the layers)" if across else ""
        basis = (f"p = 4V/(dL) + 6M/(dL²), rigid insert, linear bearing pressure (REFERENCES.md "
                 f"§4, practice, derived), V = {V:.4g} N, M = {M:.4g} N·mm at the mouth, "
                 f"d = {d:g} mm, L = {L:g} mm; {site.socket.printed} printed {build}, "
                 f"compressive strength as the bearing strength; {allowable.provenance}")
        out.append(_record(
            ctx, site, result, f"pry bearing on the socket wall, {where}{layers}", p,
            allowable.value_MPa, "MPa", ctx.required("across_layers" if across else "in_layer"),
            basis, "a longer engagement (the moment's share falls as 1/L²) or a larger tube"))
    return out


def checks(ctx: CheckContext) -> list[CheckRecord]:
    """Every socket in every load case: bond or clamp, and the pry on the printed wall."""
    out: list[CheckRecord] = []
    found = sites(ctx)
    for result in ctx.results:
        forces = member_forces(ctx, result)
        for site in found:
            f = socket_forces(site, forces)
            if f is None or site.wall_mm <= 0.0:
                continue
            if site.socket.fixing == "bonded":
                out += _bonded(ctx, site, result, f)
            else:
                out += _clamped(ctx, site, result, f)
            out += _pry(ctx, site, result, f)
    return out


def warnings(ctx: CheckContext) -> list[str]:
    """Sockets whose numbers make no sense: too short, too thin, too deep, clamp force missing."""
    out = []
    for site in sites(ctx):
        s, tube = site.socket, site.tube
        assert tube.od_mm is not None
        where = f"joint {site.joint.name}"
        if s.engagement_mm < tube.od_mm:
            out.append(f"{where}: the socket holds {tube.name} over {s.engagement_mm:g} mm, less "
                       f"than the tube's diameter {tube.od_mm:g} mm: it pries out easily (the "
                       "pressure grows as 1/L²); engage it at least one diameter")
        size = (f"{s.printed}'s section ({site.printed.width_mm:g} × "
                f"{site.printed.depth_mm:g} mm)")
        if site.wall_mm <= 0.0:
            out.append(f"{where}: {size} leaves no wall round the {tube.od_mm:g} mm tube (it "
                       "does not fit): the socket is not checked; widen it")
        elif site.wall_mm < MIN_WALL_MM:
            out.append(f"{where}: {size} leaves a wall of {max(site.wall_mm, 0.0):.3g} mm at "
                       f"its thinnest round the {tube.od_mm:g} mm tube, under {MIN_WALL_MM:g} mm: "
                       "widen the socket")
        if s.engagement_mm > site.printed_length_mm:
            out.append(f"{where}: the socket is {s.engagement_mm:g} mm deep, but {s.printed} "
                       f"reaches only {site.printed_length_mm:.3g} mm from the socket's mouth "
                       "(its node) to its next node: the bore runs into the next joint")
        if s.fixing == "clamped" and s.clamp_force_N is None:
            out.append(f"{where}: a clamped socket without clamp_force_N: its friction is not "
                       "checked; give the clamp's normal force")
    return out

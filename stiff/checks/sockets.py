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

Every check runs over a load set's B poses at once (``stiff.checks.base.CheckRows``): what does
not depend on the load (the sites, the shear-lag factors, the strengths and their knock-down
chains) is worked out once per socket and load case; a check whose demand is zero in a pose has
no record there (its ``applies`` mask).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.case_model import Joint, Part, Socket
from stiff.checks.allowables import Duty, printed_allowable
from stiff.checks.base import CheckRows
from stiff.checks.context import CheckContext, LoadSet, member_lengths
from stiff.checks.tubes import modulus, tube_material
from stiff.materials import AdhesiveMaterial, TubeMaterial
from stiff.printed_sections import PrintedSection
from stiff.strength import Allowable, across_layers_strength, member_strength

FloatArray = npt.NDArray[np.float64]

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
# Formulas (floats or arrays, element by element)


def _array(a: npt.ArrayLike) -> FloatArray:
    return np.asarray(a, np.float64)


def average_bond_shear(force_N: npt.ArrayLike, diameter_mm: npt.ArrayLike,
                       length_mm: npt.ArrayLike) -> FloatArray:
    """Average shear τ = F/(π d L) [MPa] on a bond of diameter d and length L [mm], F [N]."""
    out: FloatArray = np.abs(_array(force_N)) / (np.pi * _array(diameter_mm) * _array(length_mm))
    return out


def torsion_bond_shear(torque_Nmm: npt.ArrayLike, diameter_mm: npt.ArrayLike,
                       length_mm: npt.ArrayLike) -> FloatArray:
    """Average shear τ = 2T/(π d² L) [MPa] of a torque T [N·mm] on a bond (d, L [mm])."""
    d = _array(diameter_mm)
    out: FloatArray = 2.0 * np.abs(_array(torque_Nmm)) / (np.pi * d**2 * _array(length_mm))
    return out


def volkersen_omega(G_a_MPa: npt.ArrayLike, bondline_mm: npt.ArrayLike,
                    stiffness_1_N_per_mm: npt.ArrayLike, stiffness_2_N_per_mm: npt.ArrayLike
                    ) -> FloatArray:
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
    out: FloatArray = np.sqrt(_array(G_a_MPa) / _array(bondline_mm)
                              * (1.0 / _array(stiffness_1_N_per_mm)
                                 + 1.0 / _array(stiffness_2_N_per_mm)))
    return out


def volkersen_peak_factor(G_a_MPa: npt.ArrayLike, bondline_mm: npt.ArrayLike,
                          stiffness_1_N_per_mm: npt.ArrayLike,
                          stiffness_2_N_per_mm: npt.ArrayLike, overlap_mm: npt.ArrayLike
                          ) -> FloatArray:
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
    k1, k2 = _array(stiffness_1_N_per_mm), _array(stiffness_2_N_per_mm)
    half = volkersen_omega(G_a_MPa, bondline_mm, k1, k2) * _array(overlap_mm) / 2.0
    psi = np.maximum(k1, k2) / np.minimum(k1, k2)
    t = np.tanh(half)
    out: FloatArray = half * (1.0 / t + (psi - 1.0) / (psi + 1.0) * t)
    return out


def pry_bearing_pressure(shear_N: npt.ArrayLike, moment_Nmm: npt.ArrayLike,
                         diameter_mm: npt.ArrayLike, length_mm: npt.ArrayLike) -> FloatArray:
    """Peak bearing pressure p_max = 4V/(dL) + 6M₀/(dL²) [MPa] of a rigid insert prying.

    A rigid insert of diameter d engaged over L [mm], loaded at the mouth by a shear V [N] and a
    moment M₀ [N·mm] in the same sense, bears on its socket with a pressure linear along the
    engagement, q(x) = d·p(x), x from the mouth. Force and moment equilibrium,
    ∫q dx = V and ∫q x dx = −M₀ (about the mouth), give q(0) = 4V/L + 6M₀/L² and
    q(L) = −2V/L − 6M₀/L² (REFERENCES.md §4, practice, derived). Magnitudes are added: the
    worse sense.
    """
    d, L = _array(diameter_mm), _array(length_mm)
    out: FloatArray = (4.0 * np.abs(_array(shear_N)) / (d * L)
                       + 6.0 * np.abs(_array(moment_Nmm)) / (d * L**2))
    return out


def socket_wall_mm(width_mm: float, depth_mm: float, tube_od_mm: float) -> float:
    """Thinnest wall round a bore of ``tube_od_mm`` in a section ``width_mm`` × ``depth_mm``
    [mm] (may be ≤ 0: no wall)."""
    return (min(width_mm, depth_mm) - tube_od_mm) / 2.0


# ---------------------------------------------------------------------------------------------
# Geometry and forces of one socket


@dataclass(frozen=True)
class SocketSite:
    """A socket with what its checks need: the tube, the printed part's section there, and the
    tube members' ends at the socket's node."""

    joint: Joint
    socket: Socket
    tube: Part
    printed: PrintedSection
    printed_member: int  # model index of the printed member at the socket's node
    tube_ends: tuple[tuple[int, int], ...]  # (model member, end 0 or 1) of the tube at the node

    @property
    def od_mm(self) -> float:
        """The tube's outer diameter [mm]."""
        assert self.tube.od_mm is not None
        return self.tube.od_mm

    @property
    def wall_mm(self) -> float:
        """Thinnest printed wall round the bore [mm] (may be ≤ 0)."""
        return socket_wall_mm(self.printed.width_mm, self.printed.depth_mm, self.od_mm)

    @property
    def ring_mm(self) -> float:
        """Equivalent wall of the socket round the bore, (A_outline − πD²/4)/(πD) [mm]."""
        D = self.od_mm
        return float((self.printed.outline_area_mm2 - np.pi * D**2 / 4.0) / (np.pi * D))

    @property
    def name(self) -> str:
        """The socket's item name."""
        return f"socket {self.joint.name}"


def _tube_ends(ctx: CheckContext, tube: str, node: str) -> tuple[tuple[int, int], ...]:
    """(member, end) of every member of ``tube`` that ends at ``node``, in model order."""
    return tuple((i, seg.index(node)) for i, (part, seg)
                 in enumerate(zip(ctx.built.beam_part, ctx.built.beam_segment, strict=True))
                 if part == tube and node in seg)


def sites(ctx: CheckContext) -> list[SocketSite]:
    """Every fixed joint with a socket, with its printed section."""
    out = []
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
        out.append(SocketSite(joint, s, ctx.case.part(s.tube), ps, i,
                              _tube_ends(ctx, s.tube, joint.node)))
    return out


@dataclass(frozen=True)
class SocketForces:
    """The tube's forces at the socket's mouth at B poses: magnitudes [N], [N·mm], local tube
    axes; (B,) each for one socket, (B, n) for n sockets at once.

    ``shear_y_N`` and ``moment_z_Nmm`` act in the linkage plane, ``shear_z_N`` and
    ``moment_y_Nmm`` out of it.
    """

    axial_N: FloatArray
    shear_y_N: FloatArray
    shear_z_N: FloatArray
    moment_y_Nmm: FloatArray
    moment_z_Nmm: FloatArray
    torque_Nmm: FloatArray

    def of(self, k: int) -> SocketForces:
        """Socket k's forces, (B,) each, from the forces of n sockets."""
        return SocketForces(self.axial_N[:, k], self.shear_y_N[:, k], self.shear_z_N[:, k],
                            self.moment_y_Nmm[:, k], self.moment_z_Nmm[:, k],
                            self.torque_Nmm[:, k])


#: Columns of a member's end forces (``LoadSet.beam_forces``, 6 at end 1 then 6 at end 2) that
#: the socket reads, as ``stiff.checks.context.MemberForces`` reads them: the axial force and
#: the torque at end 2 for the whole member, shears and moments at the socket's end (+6 at end
#: 2). Order: axial, shear y, shear z, moment y, moment z, torque.
_COLUMNS = np.array([6, 1, 2, 4, 5, 9])
_AT_END = np.array([0, 1, 1, 1, 1, 0])


def forces_at(found: Sequence[SocketSite], loads: LoadSet) -> SocketForces:
    """The tube members' end forces at each socket's node in every pose of a load set, (B, n)
    (the largest of each, if several members end there; every site needs a tube member)."""
    ends = np.array([e for site in found for e in site.tube_ends], np.intp).reshape(-1, 2)
    starts = np.cumsum([0] + [len(site.tube_ends) for site in found[:-1]])
    columns = _COLUMNS[None, :] + 6 * _AT_END[None, :] * ends[:, 1:]  # (n_ends, 6)
    f = np.abs(loads.beam_forces[:, ends[:, :1], columns])  # (B, n_ends, 6)
    worst = np.maximum.reduceat(f, starts, axis=1) if len(found) else f  # (B, n, 6)
    return SocketForces(*(worst[:, :, c] for c in range(6)))


def socket_forces(site: SocketSite, loads: LoadSet) -> SocketForces | None:
    """The tube members' end forces at the socket's node in every pose of a load set, (B,)
    (the largest of each, if several members end there); None without a tube member there."""
    return forces_at([site], loads).of(0) if site.tube_ends else None


# ---------------------------------------------------------------------------------------------
# Checks


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
    assert tube.id_mm is not None
    material = tube_material(ctx.case, tube)
    D = site.od_mm
    t1 = (D**2 - tube.id_mm**2) / (4.0 * D)
    E1 = modulus(material)
    G1 = material.G_MPa if isinstance(material, TubeMaterial) else material.shear_modulus_MPa
    t2 = site.ring_mm
    E2 = ps.beam.EA / ps.outline_area_mm2
    G2 = E2 / (2.0 * (1.0 + ps.material.poisson_ratio))
    eta = s.bondline_mm if s.bondline_mm is not None else DEFAULT_BONDLINE_MM
    Ga = adhesive.shear_modulus_MPa
    L = s.engagement_mm
    k_axial = float(volkersen_peak_factor(Ga, eta, E1 * t1, E2 * t2, L))
    k_torsion = float(volkersen_peak_factor(Ga, eta, G1 * t1, G2 * t2, L))
    omega = float(volkersen_omega(Ga, eta, E1 * t1, E2 * t2))
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


@dataclass(frozen=True)
class Bond:
    """What a bonded socket's checks take from the case and its tables: the same in every load
    set and pose."""

    lag: BondLag
    strength_MPa: float  # the adhesive's lap-shear strength
    strength_text: str  # that strength and its source
    hint: str  # what lowers the peak
    wall_mean: Allowable  # the printed wall's mean interlayer shear strength


def bond(ctx: CheckContext, site: SocketSite) -> Bond:
    """The load-independent figures of a bonded socket."""
    assert site.socket.adhesive is not None
    adhesive = ctx.case.library.adhesive(site.socket.adhesive)
    lag = bond_lag(ctx, site, adhesive)
    strength = adhesive.lap_shear_MPa
    text = (f"lap_shear_MPa = {strength:g} MPa: {adhesive.provenance_of('lap_shear_MPa')}; "
            "the table's value as it stands (typical, no B-basis or knock-downs: no "
            "scatter or environment data for adhesives)")
    hint = (f"a thicker bondline or a stiffer, thicker socket wall lowers the peak; "
            f"engagement beyond about 3/ω = {3.0 / lag.omega_per_mm:.3g} mm adds little")
    wall = across_layers_strength(site.printed.material, shear=True)
    return Bond(lag, strength, text, hint, wall)


@dataclass(frozen=True)
class SocketPlan:
    """A socket with everything its checks need that does not depend on the load: its bond
    (bonded sockets), and each printed allowable for each duty of the context's load sets."""

    site: SocketSite
    bond: Bond | None
    wall: Mapping[Duty, Allowable]  # bonded: the printed wall's interlayer shear
    pry: tuple[Mapping[Duty, Allowable], Mapping[Duty, Allowable]]  # in and out of the plane

    @property
    def across(self) -> tuple[bool, bool]:
        """Whether the pry pressure in the plane, and out of it, acts across the layers."""
        build = self.site.printed.settings.build
        return build == "on_edge", build == "flat"


def plan(ctx: CheckContext, site: SocketSite, duties: Iterable[Duty]) -> SocketPlan:
    """The plan of one socket for the given duties."""
    material = site.printed.material
    held = set(duties)
    b = bond(ctx, site) if site.socket.fixing == "bonded" else None
    wall = ({} if b is None else
            {d: printed_allowable(b.wall_mean, material, True, d, ctx.samples) for d in held})
    mean = member_strength(material, site.printed.settings.build, "compression")
    in_plane, out_of_plane = (
        {d: printed_allowable(mean, material, across, d, ctx.samples) for d in held}
        for across in (site.printed.settings.build == "on_edge",
                       site.printed.settings.build == "flat"))
    return SocketPlan(site, b, wall, (in_plane, out_of_plane))


def _rows(site: SocketSite, loads: LoadSet, mode: str, demand: FloatArray,
          capacity: float, unit: str, factor: float, basis: str | Callable[[int], str],
          suggestion: str) -> CheckRows:
    """A socket's check in one load set; it applies where the demand is above zero."""
    return CheckRows(item=site.name, kind="socket", mode=mode, load_case=loads.name,
                     demand=demand, capacity=capacity, unit=unit, required_factor=factor,
                     basis=basis, suggestion=suggestion, applies=demand > 0.0)


def _average_text(f: SocketForces, d: float, L: float) -> Callable[[int], str]:
    """The average bond shear's formula with entry i's axial force and torque."""
    def text(i: int) -> str:
        return (f"τ = hypot(F/(πdL), 2T/(πd²L)), F = {f.axial_N[i]:.4g} N, "
                f"T = {f.torque_Nmm[i]:.4g} N·mm, d = {d:g} mm, L = {L:g} mm")
    return text


def _bonded(ctx: CheckContext, p: SocketPlan, b: Bond, loads: LoadSet, f: SocketForces
            ) -> list[CheckRows]:
    site = p.site
    d, L = site.od_mm, site.socket.engagement_mm
    tau_axial = average_bond_shear(f.axial_N, d, L)
    tau_torsion = torsion_bond_shear(f.torque_Nmm, d, L)
    tau_avg = np.hypot(tau_axial, tau_torsion)
    # the peak factors are ≥ 1: the peak is zero exactly where the average is
    tau_peak = np.hypot(b.lag.axial_factor * tau_axial, b.lag.torsion_factor * tau_torsion)
    average = _average_text(f, d, L)
    capacity = b.strength_text
    peak_tail = (f"; {b.lag.text}; {capacity} (conservative: a lap-shear strength is itself an "
                 "average at failure)")
    factor = ctx.required("adhesive")
    wall = p.wall[ctx.duty(loads.name)]
    wall_basis = (f"the bond's peak shear ({b.lag.text}) on the printed bore, which meets the "
                  f"layer planes; {wall.provenance}")
    return [
        _rows(site, loads, "adhesive shear, average", tau_avg, b.strength_MPa, "MPa", factor,
              lambda i: f"{average(i)}; {capacity}", "a longer engagement or a larger tube"),
        _rows(site, loads, "adhesive shear, Volkersen peak", tau_peak, b.strength_MPa, "MPa",
              factor, lambda i: average(i) + peak_tail, b.hint),
        _rows(site, loads, "printed wall shear at the bond (across the layers)", tau_peak,
              wall.value_MPa, "MPa", ctx.required("across_layers"), wall_basis, b.hint),
    ]


def _clamped(ctx: CheckContext, site: SocketSite, loads: LoadSet, f: SocketForces
             ) -> list[CheckRows]:
    s = site.socket
    if s.clamp_force_N is None:
        return []
    d = site.od_mm
    mu = s.friction if s.friction is not None else DEFAULT_FRICTION
    slip = np.hypot(f.axial_N, 2.0 * f.torque_Nmm / d)
    friction = (f"μ = {mu:g} (case)" if s.friction is not None
                else f"μ = {mu:g} (default: common practice, low end of 0.2-0.4 for dry polymer "
                     "on carbon/epoxy)")
    tail = (f"d = {d:g} mm, against μ N_clamp, N_clamp = {s.clamp_force_N:g} N (case, taken as "
            f"the total normal force on the tube), {friction}; required factor of the socket's "
            "fixing (the adhesive's)")

    def basis(i: int) -> str:
        return (f"slip force hypot(N, 2T/d), N = {f.axial_N[i]:.4g} N, "
                f"T = {f.torque_Nmm[i]:.4g} N·mm, {tail}")

    return [_rows(site, loads, "clamp slip (friction)", slip, mu * s.clamp_force_N, "N",
                  ctx.required("adhesive"), basis,
                  "a higher clamp force or a longer clamp, or bond the tube")]


def _pry_text(V: FloatArray, M: FloatArray, tail: str) -> Callable[[int], str]:
    """The pry pressure's formula with entry i's shear and moment at the mouth."""
    def text(i: int) -> str:
        return (f"p = 4V/(dL) + 6M/(dL²), rigid insert, linear bearing pressure (REFERENCES.md "
                f"§4, practice, derived), V = {V[i]:.4g} N, M = {M[i]:.4g} N·mm at the mouth, "
                f"{tail}")
    return text


def _pry(ctx: CheckContext, p: SocketPlan, loads: LoadSet, f: SocketForces
         ) -> list[CheckRows]:
    site = p.site
    d, L = site.od_mm, site.socket.engagement_mm
    build = site.printed.settings.build
    duty = ctx.duty(loads.name)
    out = []
    planes = (("in the linkage plane", f.shear_y_N, f.moment_z_Nmm),
              ("out of the plane", f.shear_z_N, f.moment_y_Nmm))
    for (where, V, M), across, allowables in zip(planes, p.across, p.pry, strict=True):
        allowable = allowables[duty]
        layers = " (across the layers)" if across else ""
        tail = (f"d = {d:g} mm, L = {L:g} mm; {site.socket.printed} printed {build}, "
                f"compressive strength as the bearing strength; {allowable.provenance}")
        out.append(_rows(
            site, loads, f"pry bearing on the socket wall, {where}{layers}",
            pry_bearing_pressure(V, M, d, L), allowable.value_MPa, "MPa",
            ctx.required("across_layers" if across else "in_layer"), _pry_text(V, M, tail),
            "a longer engagement (the moment's share falls as 1/L²) or a larger tube"))
    return out


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Every socket in every load set: bond or clamp, and the pry on the printed wall."""
    duties = {ctx.duty(s.name) for s in ctx.loads}
    plans = [plan(ctx, s, duties) for s in sites(ctx) if s.tube_ends and s.wall_mm > 0.0]
    out: list[CheckRows] = []
    for loads in ctx.loads:
        every = forces_at([p.site for p in plans], loads)
        for k, p in enumerate(plans):
            f = every.of(k)
            if p.bond is not None:
                out += _bonded(ctx, p, p.bond, loads, f)
            else:
                out += _clamped(ctx, p.site, loads, f)
            out += _pry(ctx, p, loads, f)
    return out


def _printed_length_mm(ctx: CheckContext, site: SocketSite) -> float:
    """Length of the printed member at the socket, node to next node, in the first pose of the
    first load set (the built model's when there is none) [mm]."""
    if ctx.loads:
        return float(member_lengths(ctx, ctx.loads[0])[0, site.printed_member])
    xyz = ctx.built.model.xyz
    a, b = ctx.built.model.beams.nodes[site.printed_member]
    return float(np.linalg.norm(xyz[b] - xyz[a]))


def warnings(ctx: CheckContext) -> list[str]:
    """Sockets whose numbers make no sense: too short, too thin, too deep, clamp force missing."""
    out = []
    for site in sites(ctx):
        s, tube = site.socket, site.tube
        od = site.od_mm
        where = f"joint {site.joint.name}"
        if s.engagement_mm < od:
            out.append(f"{where}: the socket holds {tube.name} over {s.engagement_mm:g} mm, less "
                       f"than the tube's diameter {od:g} mm: it pries out easily (the "
                       "pressure grows as 1/L²); engage it at least one diameter")
        size = (f"{s.printed}'s section ({site.printed.width_mm:g} × "
                f"{site.printed.depth_mm:g} mm)")
        if site.wall_mm <= 0.0:
            out.append(f"{where}: {size} leaves no wall round the {od:g} mm tube (it "
                       "does not fit): the socket is not checked; widen it")
        elif site.wall_mm < MIN_WALL_MM:
            out.append(f"{where}: {size} leaves a wall of {max(site.wall_mm, 0.0):.3g} mm at "
                       f"its thinnest round the {od:g} mm tube, under {MIN_WALL_MM:g} mm: "
                       "widen the socket")
        length = _printed_length_mm(ctx, site)
        if s.engagement_mm > length:
            out.append(f"{where}: the socket is {s.engagement_mm:g} mm deep, but {s.printed} "
                       f"reaches only {length:.3g} mm from the socket's mouth "
                       "(its node) to its next node: the bore runs into the next joint")
        if s.fixing == "clamped" and s.clamp_force_N is None:
            out.append(f"{where}: a clamped socket without clamp_force_N: its friction is not "
                       "checked; give the clamp's normal force")
    return out

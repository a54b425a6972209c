"""Printed lugs at pins: bearing, net tension, shear-out, oblique loads and out-of-plane bending,
each against the strength that the build direction gives its plane.

The formulas, the lug's geometry and the strengths of its planes are in
:mod:`stiff.checks.lug_geometry`; this module makes the checks from them (and re-exports them).

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

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from stiff.checks.allowables import Duty, printed_allowable
from stiff.checks.base import BoolArray, CheckRows
from stiff.checks.context import (
    CheckContext,
    FloatArray,
    LoadSet,
    joint_forces,
    member_direction,
)
from stiff.checks.lug_geometry import (
    BUILD_AXIS,
    CLEARANCE_KT_FACTOR,
    KT_FIT_RANGE,
    SKIN_LINE_ANGLE_RAD,
    Axis,
    LugGeometry,
    PlaneStrength,
    bearing_stress,
    bending_stress,
    cut_share,
    interaction_factor,
    kt_with_clearance,
    lugs,
    net_tension_kt,
    net_tension_stress,
    shear_out_length,
    shear_out_stress,
    shear_strength,
    solid_share,
    split_load,
    tension_strength,
)
from stiff.materials import PrintedMaterial
from stiff.strength import member_strength

EDGE_RATIO_MIN = 3.0  # e/D, composite practice (CMH-17 guidance, from memory)
WIDTH_RATIO_MIN = 4.0  # W/D, low end of 4-5, same source
MIN_WALLS = 3  # walls round a printed hole, common practice 3-4
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
# Checks: each mode once per lug (geometry, strengths, formula text), its allowable once per load
# case, its demand over the load set's B entries at once


@dataclass(frozen=True)
class _Quote:
    """Text quoting each entry's own values (4 figures) between fixed pieces of text:
    ``texts[0] values[0][i] texts[1] ... values[-1][i] texts[-1]``."""

    texts: tuple[str, ...]
    values: tuple[FloatArray, ...]

    def __call__(self, i: int) -> str:
        quoted = (f"{v[i]:.4g}{t}" for v, t in zip(self.values, self.texts[1:], strict=True))
        return self.texts[0] + "".join(quoted)


@dataclass(frozen=True)
class _Either:
    """``first`` for the entries where ``pick`` is true, ``second`` elsewhere."""

    pick: BoolArray
    first: str
    second: str

    def __call__(self, i: int) -> str:
        return self.first if self.pick[i] else self.second


@dataclass(frozen=True)
class _Mode:
    """One lug mode, independent of the load: what resists it and how its load stresses it."""

    name: str
    key: str  # the SUGGEST key
    strength: PlaneStrength
    share: float
    share_step: str
    area_mm2: float  # stress × area = the load component [N] (bending: section modulus)
    stress: Callable[[FloatArray], FloatArray]  # load component [N; bending N·mm] -> [MPa]
    formula: tuple[str, str]  # the formula's text before and after the quoted load

    def resisted(self, ctx: CheckContext, lug_text: str, material: PrintedMaterial, d: Duty
                 ) -> _Resisted:
        """The mode under one duty: its allowable chain."""
        across = self.strength.across
        allowable = printed_allowable(self.strength.mean, material, across, d, ctx.samples)
        steps = ["", lug_text, allowable.provenance]
        if self.share_step:
            steps.append(self.share_step)
        return _Resisted(
            self, allowable.value_MPa * self.share,
            ctx.required("across_layers" if across else "in_layer"), "; ".join(steps),
            REORIENT if across else SUGGEST[self.key])


@dataclass(frozen=True)
class _Resisted:
    """A lug mode in one load case: capacity, required factor, the basis after the formula."""

    mode: _Mode
    capacity_MPa: float
    required_factor: float
    tail: str  # "; " + the lug, the allowable's chain and the printed cut
    suggestion: str

    @property
    def capacity_N(self) -> float:
        """The capacity as a load [N]."""
        return self.capacity_MPa * self.mode.area_mm2

    def rows(self, item: str, load_case: str, load: FloatArray, applies: BoolArray | None
             ) -> CheckRows:
        """The check at each entry's load component ``load`` (B,) [N; bending N·mm]."""
        before, after = self.mode.formula
        return CheckRows(
            item=item, kind="lug", mode=self.mode.name, load_case=load_case,
            demand=self.mode.stress(load), capacity=self.capacity_MPa, unit="MPa",
            required_factor=self.required_factor,
            basis=_Quote((before, after + self.tail), (load,)), suggestion=self.suggestion,
            applies=applies)


@dataclass(frozen=True)
class _LugModes:
    """Every mode of one lug: bearing, the axial ones, side tear-out, bending along and across."""

    lug: LugGeometry
    material: PrintedMaterial
    bearing: _Mode
    axial: tuple[_Mode, _Mode]
    transverse: _Mode
    bending: tuple[_Mode, _Mode]

    def resisted(self, ctx: CheckContext, d: Duty) -> _LugResistance:
        """Every mode's allowable under one duty (the same for every load case of that duty)."""
        text = f"lug {self.lug.describe()}"

        def one(m: _Mode) -> _Resisted:
            return m.resisted(ctx, text, self.material, d)

        bearing = one(self.bearing)
        axial = (one(self.axial[0]), one(self.axial[1]))
        tear_out = one(self.transverse)
        return _LugResistance(bearing, axial, tear_out, (one(self.bending[0]),
                                                         one(self.bending[1])),
                              _weakest([bearing, *axial]), _weakest([bearing, tear_out]), text)


@dataclass(frozen=True)
class _LugResistance:
    """Every mode of one lug under one duty, and the least capacities [N] along and across it
    (the first of the least: bearing, then net tension, then shear-out or side tear-out)."""

    bearing: _Resisted
    axial: tuple[_Resisted, _Resisted]
    tear_out: _Resisted
    bending: tuple[_Resisted, _Resisted]
    pulling: _Resisted  # least of bearing, net tension, shear-out
    across: _Resisted  # least of bearing, side tear-out
    lug_text: str


def _named(base: str, s: PlaneStrength) -> str:
    if s.along_layers:
        return f"split along layers ({base})" if base == "net tension" else f"{base} along layers"
    return f"{base} (interlayer shear)" if s.across else base


def _kt_notes(lug: LugGeometry) -> tuple[float, str]:
    """The net section's K_t, and the basis text that says how it was found."""
    D, W, e = lug.hole_mm, lug.width_mm, lug.edge_mm
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
    return kt, "; ".join(notes)


def _modes(lug: LugGeometry, material: PrintedMaterial) -> tuple[_Mode, tuple[_Mode, _Mode],
                                                                   _Mode]:
    """Bearing (under P), the axial modes (under P_a > 0) and side tear-out (under P_tr > 0)."""
    s = lug.section.settings
    build = s.build
    D, d, t, W, e = lug.hole_mm, lug.pin_mm, lug.thickness_mm, lug.width_mm, lug.edge_mm
    bearing = _Mode(
        "bearing", "bearing",
        PlaneStrength(member_strength(material, build, "compression"), False, False), 1.0, "",
        d * t, lambda P: bearing_stress(P, d, t),
        ("σ_br = P/(d t), P = ", " N (Bruhn §D1); bearing allowable: the printed compressive "
                                 "strength (practice)"))
    kt, notes = _kt_notes(lug)
    nt = tension_strength(material, build, "x", 0.0)
    share, step = cut_share(s, "y", not nt.across, (W - D) / 2, t)
    net = _Mode(
        _named("net tension", nt), "net tension", nt, share, step, (W - D) * t / kt,
        lambda P: net_tension_stress(P, D, W, t, kt),
        ("σ = K_t P_a/((W − D) t), P_a = ",
         f" N along the lug towards its end, K_t = {kt:.3f}: {notes}"))
    so = shear_strength(material, build, "y")
    a_s = shear_out_length(e, D)
    share, step = cut_share(s, "x", build == "flat", a_s, t)
    shear_out = _Mode(
        _named("shear-out", so), "shear-out", so, share, step, 2.0 * t * a_s,
        lambda P: shear_out_stress(P, D, t, e),
        (f"τ = P_a/(2 t a_s), a_s = e − (D/2) cos 40° = {a_s:.3g} mm, P_a = ", " N (Bruhn §D1)"))
    st = shear_strength(material, build, "x")
    a_tr = shear_out_length(W / 2, D)
    share, step = cut_share(s, "y", build == "flat", a_tr, t)
    tear_out = _Mode(
        _named("side tear-out", st), "side tear-out", st, share, step, 2.0 * t * a_tr,
        lambda P: shear_out_stress(P, D, t, W / 2),
        (f"τ = P_tr/(2 t a_tr), a_tr = W/2 − (D/2) cos 40° = {a_tr:.3g} mm, P_tr = ",
         " N across the lug (Bruhn's shear-out planes turned to the side edge, derived)"))
    return bearing, (net, shear_out), tear_out


def _bending(lug: LugGeometry, material: PrintedMaterial) -> tuple[_Mode, _Mode]:
    """Out-of-plane bending from the pin's tilt: σ along the lug (the tilt about y), and across
    it (about x)."""
    build = lug.section.settings.build
    angle = SKIN_LINE_ANGLE_RAD if build == "flat" else 0.0
    W, t = lug.width_mm, lug.thickness_mm

    def mode(axis: Axis, where: str) -> _Mode:
        ps = tension_strength(material, build, axis, angle)
        name = ("out-of-plane bending, split along layers" if ps.across
                else "out-of-plane bending")
        return _Mode(
            name, "bending", ps, 1.0, "", W * t**2 / 6.0, lambda M: bending_stress(M, W, t),
            ("σ = 6M/(W t²), M = ", f" N·mm of the pin's tilt moment, stress {where} the lug, "
                                   "on the lug's full section beside the hole (assumed; see "
                                   "stiff.checks.lugs)"))

    return mode("x", "along"), mode("y", "across")


def lug_modes(lug: LugGeometry, material: PrintedMaterial) -> _LugModes:
    """Every mode of a lug, made once (they do not depend on the load)."""
    bearing, axial, transverse = _modes(lug, material)
    return _LugModes(lug, material, bearing, axial, transverse, _bending(lug, material))


def tilt_moments(moment_Nmm: FloatArray, axis_xy: FloatArray | None
                 ) -> tuple[FloatArray, FloatArray]:
    """(about x, about y) [N·mm]: the pin's tilt moment about the lug's axis and across it.

    ``moment_Nmm`` (..., 3) in global axes; ``axis_xy`` (..., 2) the lug's axis (``None`` or a
    zero row: unknown, the whole tilt taken about both).
    """
    mx, my = moment_Nmm[..., 0], moment_Nmm[..., 1]
    tilt = np.hypot(mx, my)
    if axis_xy is None:
        return tilt, tilt
    ux, uy = axis_xy[..., 0], axis_xy[..., 1]
    unknown = (ux == 0.0) & (uy == 0.0)
    return (np.where(unknown, tilt, np.abs(mx * ux + my * uy)),
            np.where(unknown, tilt, np.abs(-mx * uy + my * ux)))


def _weakest(candidates: Sequence[_Resisted]) -> _Resisted:
    """The first of the candidates with the least capacity as a load."""
    return min(candidates, key=lambda r: r.capacity_N)


def _oblique(item: str, load_case: str, r: _LugResistance, P: FloatArray, P_a: FloatArray,
             P_tr: FloatArray) -> list[CheckRows]:
    """The 1.6-power interaction where both components act and it lowers the factor by more than
    INTERACTION_REPORT_FRACTION: one row with the pin pulling towards the lug's end (the axial
    capacity the least of bearing, net tension and shear-out), one with it pushing into the part
    (bearing alone), as their modes and required factors may differ."""
    rt = r.across
    L_a = np.abs(P_a)
    out = []
    for ra, side, pushing in ((r.pulling, P_a > 0.0, ""),
                              (r.bearing, P_a < 0.0, " pushing into the part")):
        R_a, R_tr = L_a / ra.capacity_N, P_tr / rt.capacity_N
        factor = interaction_factor(R_a, R_tr)
        lowers = 1.0 / factor > np.maximum(R_a, R_tr) * (1.0 + INTERACTION_REPORT_FRACTION)
        capacity = np.multiply(P, factor, out=np.full_like(P, np.inf),
                               where=np.isfinite(factor))
        basis = _Quote((
            "R_a^1.6 + R_tr^1.6 ≤ 1 (Air Force method: AFFDL Stress Analysis Manual 1986 ch. 9; "
            "NASA TM X-73305 vol. I §B); R_a = ",
            f"/{ra.capacity_N:.4g} N ({ra.mode.name}{pushing}), R_tr = ",
            f"/{rt.capacity_N:.4g} N ({rt.mode.name}); capacity: the load in the same direction "
            f"that reaches the curve, P (R_a^1.6 + R_tr^1.6)^-0.625; {r.lug_text}"),
            (L_a, P_tr))
        out.append(CheckRows(
            item=item, kind="lug", mode="oblique load (1.6-power interaction)",
            load_case=load_case, demand=P, capacity=capacity, unit="N",
            required_factor=max(ra.required_factor, rt.required_factor), basis=basis,
            suggestion=_Either(R_a >= R_tr, ra.suggestion, rt.suggestion),
            applies=side & (P_tr > 0.0) & lowers))
    return out


def lug_checks(ctx: CheckContext, lug: LugGeometry, loads: LoadSet,
               resisted: _LugResistance | None = None) -> list[CheckRows]:
    """Every check of one lug in one load set (see the module docstring); ``resisted``: its
    modes under the load set's duty (made here when not given)."""
    r = resisted or lug_modes(lug, ctx.case.library.printed_material(
        lug.section.material)).resisted(ctx, ctx.duty(loads.name))
    force = next(f for f in joint_forces(ctx, loads, lug.joint) if f.part == lug.part.name)
    axis = member_direction(ctx, loads, lug.part, lug.joint.node)
    P = force.bearing_N
    P_a, P_tr = split_load(force.force_N[:, :2], axis)
    tol = COMPONENT_TOLERANCE * P
    P_a = np.where(np.abs(P_a) <= tol, 0.0, P_a)
    P_tr = np.where(P_tr <= tol, 0.0, P_tr)
    name, item = loads.name, lug.item
    pulls = P_a > 0.0
    out = [r.bearing.rows(item, name, P, None)]
    out += [a.rows(item, name, np.where(pulls, P_a, 0.0), pulls) for a in r.axial]
    out.append(r.tear_out.rows(item, name, P_tr, P_tr > 0.0))
    out += _oblique(item, name, r, P, P_a, P_tr)
    about_x, about_y = tilt_moments(force.moment_Nmm, axis)
    out += [b.rows(item, name, M, M > 0.0)
            for b, M in zip(r.bending, (about_y, about_x), strict=True)]
    return out


def checks(ctx: CheckContext) -> list[CheckRows]:
    """Every printed lug at every pin and driven joint in every load set; each lug's modes made
    once, their allowables once per duty."""
    found, _ = lugs(ctx.case)
    modes = [lug_modes(lug, ctx.case.library.printed_material(lug.section.material))
             for lug in found]
    duties = {d: [m.resisted(ctx, d) for m in modes]
              for d in {ctx.duty(loads.name) for loads in ctx.loads}}
    return [row for loads in ctx.loads
            for lug, r in zip(found, duties[ctx.duty(loads.name)], strict=True)
            for row in lug_checks(ctx, lug, loads, r)]


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
    "lug_modes",
    "lugs",
    "net_tension_kt",
    "net_tension_stress",
    "shear_out_length",
    "shear_out_stress",
    "shear_strength",
    "solid_share",
    "split_load",
    "tension_strength",
    "tilt_moments",
    "warnings",
]

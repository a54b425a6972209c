"""Verification of the printed-lug checks (stiff.checks.lugs): one test per formula with a worked
number, then the same formulas through a solved case, and the build-direction rules.

Sources (REFERENCES.md §3):
- Bearing σ_br = P/(D t) and shear-out τ = P/(2 t a_s), a_s = e − (D/2) cos 40°: Bruhn,
  *Analysis and Design of Flight Vehicle Structures*, §D1 [confirmed].
- Net tension σ = K_t P/((W − D) t) [confirmed, form]; the pin-loaded fit K_t = 12.882 − 52.714x
  + 89.762x² − 51.667x³, x = d/w, 0.15 ≤ x ≤ 0.75, 5.52 at 0.2 and 2.51 at 0.5: Roark's
  *Formulas for Stress and Strain*, 7th ed., Table 17.1 (from memory). Clearance raises K_t by
  35–50 %: Shigley, *Mechanical Engineering Design*, Table A-15, Fig. A-15-12 [confirmed]; the
  checks take +35 %.
- Oblique loads, R_a^1.6 + R_tr^1.6 ≤ 1, MS = (R_a^1.6 + R_tr^1.6)^−0.625 − 1: Air Force Flight
  Dynamics Laboratory *Stress Analysis Manual* (1986) ch. 9; NASA TM X-73305 vol. I §B
  [confirmed].
- Out-of-plane bending σ = 6M/(W t²): a rectangle's elastic section modulus W t²/6 (any
  strength-of-materials text); which section carries it is the module's stated assumption.
- Interlayer planes: where a net section or shear-out plane lies along layer interfaces the
  interlayer strength governs (REFERENCES.md §3, practice).
- Printed cut with infill: a rule of mixtures over the cut (practice, the module's docstring).

Tolerances: worked numbers are written to the digits shown (rel 1e-4 unless the published
value has three figures: abs 0.005). Through a solved case the pin load is the static reaction
of a linear solve, exact to round-off: rel 1e-9.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from stiff.checks import lugs
from stiff.checks.base import CheckRecord, expand, governing
from stiff.checks.context import joint_forces
from stiff.infill import law
from tests.verification.lug_cases import hanging_link, load_set, solved

ROOT = Path(__file__).resolve().parents[2]
COS40 = math.cos(math.radians(40.0))


def pull_records(text: str) -> dict[str, CheckRecord]:
    """The lug's records in the 'pull' case, by mode."""
    ctx = solved(text)
    return {r.mode: r for r in expand(lugs.checks(ctx)) if r.load_case == "pull"}


# ---------------------------------------------------------------------------------------------
# Formulas with worked numbers


def test_bearing_stress() -> None:
    # Bruhn §D1: σ_br = P/(D t); P = 500 N on a 5 mm pin in an 8 mm lug: 500/(5 × 8) = 12.5 MPa
    assert lugs.bearing_stress(500.0, 5.0, 8.0) == pytest.approx(12.5, rel=1e-12)


@pytest.mark.parametrize(("x", "published"), [(0.2, 5.52), (0.5, 2.51)])
def test_net_tension_kt_fit_points(x: float, published: float) -> None:
    # Roark 7th ed. Table 17.1 (from memory): 12.882 − 52.714(0.2) + 89.762(0.04) − 51.667(0.008)
    # = 5.516; at 0.5: 12.882 − 26.357 + 22.4405 − 6.4584 = 2.507. Published to 3 figures.
    assert lugs.net_tension_kt(x) == pytest.approx(published, abs=0.005)
    assert lugs.net_tension_kt(x) == pytest.approx(
        12.882 - 52.714 * x + 89.762 * x**2 - 51.667 * x**3, rel=1e-12)


def test_net_tension_kt_is_clamped_outside_the_fit() -> None:
    # the fit holds for 0.15 ≤ d/w ≤ 0.75; outside it is held at the end values
    assert lugs.net_tension_kt(0.05) == lugs.net_tension_kt(0.15)
    assert lugs.net_tension_kt(0.9) == lugs.net_tension_kt(0.75)
    assert lugs.net_tension_kt(0.15) == pytest.approx(6.8202, rel=1e-4)
    assert lugs.net_tension_kt(0.75) == pytest.approx(2.0406, rel=1e-4)


def test_clearance_raises_kt_by_35_percent() -> None:
    # Shigley Fig. A-15-12: +35-50 % with clearance; the check takes the low end, +35 %
    assert lugs.kt_with_clearance(2.507, 0.05) == pytest.approx(2.507 * 1.35, rel=1e-12)
    assert lugs.kt_with_clearance(2.507, 0.0) == 2.507


def test_net_tension_stress() -> None:
    # D = 5, W = 20, t = 8 mm, P = 500 N: d/w = 0.25, K_t = 12.882 − 13.1785 + 5.6101 − 0.8073
    # = 4.5063; σ = 4.5063 × 500/(15 × 8) = 18.776 MPa
    kt = lugs.net_tension_kt(0.25)
    assert kt == pytest.approx(4.5063, rel=1e-4)
    assert lugs.net_tension_stress(500.0, 5.0, 20.0, 8.0, kt) == pytest.approx(18.776, rel=1e-4)


def test_shear_out_stress() -> None:
    # Bruhn §D1: a_s = e − (D/2) cos 40° = 6 − 2.5 × 0.76604 = 4.0849 mm;
    # τ = P/(2 t a_s) = 500/(2 × 8 × 4.0849) = 7.6501 MPa
    assert lugs.shear_out_length(6.0, 5.0) == pytest.approx(4.0849, rel=1e-4)
    assert lugs.shear_out_stress(500.0, 5.0, 8.0, 6.0) == pytest.approx(7.6501, rel=1e-4)
    assert lugs.shear_out_stress(500.0, 5.0, 8.0, 6.0) == pytest.approx(
        500.0 / (2 * 8.0 * (6.0 - 2.5 * COS40)), rel=1e-12)


def test_interaction_rule() -> None:
    # Air Force method: R_a = 0.6, R_tr = 0.3: 0.6^1.6 = 0.44161, 0.3^1.6 = 0.14568, sum 0.58729,
    # factor 0.58729^-0.625 = 1.3947 (MS = 0.395)
    assert lugs.interaction_factor(0.6, 0.3) == pytest.approx(1.3947, rel=1e-4)
    # equal ratios 0.5: sum 0.65975, factor 1.2968
    assert lugs.interaction_factor(0.5, 0.5) == pytest.approx(1.2968, rel=1e-4)
    # one component alone: the factor is its reciprocal; the rule is homogeneous of degree -1
    assert lugs.interaction_factor(0.4, 0.0) == pytest.approx(2.5, rel=1e-12)
    assert lugs.interaction_factor(1.2, 0.6) == pytest.approx(
        lugs.interaction_factor(0.6, 0.3) / 2.0, rel=1e-12)
    assert math.isinf(lugs.interaction_factor(0.0, 0.0))


def test_bending_stress() -> None:
    # σ = 6M/(W t²): M = 2500 N·mm on W = 20, t = 8 mm: 15000/1280 = 11.719 MPa
    assert lugs.bending_stress(2500.0, 20.0, 8.0) == pytest.approx(11.71875, rel=1e-12)


def test_solid_share_of_a_printed_cut() -> None:
    # a 7.5 × 8 mm cut, 1.35 mm walls at its ends, 0.8 mm skins at its faces: core
    # (7.5 − 2.7)(8 − 1.6) = 30.72 of 60 mm², φ = 0.488; with an infill of no strength 0.488,
    # with σ*/σ_s = 0.1: 0.488 + 0.512 × 0.1 = 0.5392
    assert lugs.solid_share(7.5, 8.0, 1.35, 0.8, 0.0) == pytest.approx(0.488, rel=1e-12)
    assert lugs.solid_share(7.5, 8.0, 1.35, 0.8, 0.1) == pytest.approx(0.5392, rel=1e-12)
    assert lugs.solid_share(7.5, 8.0, 4.0, 0.8, 0.0) == 1.0  # walls fill the cut
    assert lugs.solid_share(7.5, 8.0, 1.35, 0.8, 1.0) == 1.0  # solid infill


def test_split_load_along_and_across_the_lug() -> None:
    # lug axis from the hole into the part along −y; a force on the part of (−300, +400) N
    # pushes the lug towards its end with 400 N and across it with 300 N
    axis = np.array([0.0, -1.0])
    assert lugs.split_load(np.array([-300.0, 400.0]), axis) == pytest.approx((400.0, 300.0))
    # the pin pushing into the part's body: negative axial component
    assert lugs.split_load(np.array([0.0, -200.0]), axis) == pytest.approx((-200.0, 0.0))


# ---------------------------------------------------------------------------------------------
# Through a solved case: a PLA link, lug D = 5, t = 8, W = 20, e = 6 mm, pulled with 500 N


def test_case_records_follow_the_formulas() -> None:
    rec = pull_records(hanging_link())
    P = 500.0  # the static reaction at the pin
    assert rec["bearing"].demand == pytest.approx(P / (5.0 * 8.0), rel=1e-9)
    kt = 12.882 - 52.714 * 0.25 + 89.762 * 0.25**2 - 51.667 * 0.25**3
    assert rec["net tension"].demand == pytest.approx(kt * P / ((20.0 - 5.0) * 8.0), rel=1e-9)
    assert rec["shear-out"].demand == pytest.approx(
        P / (2 * 8.0 * (6.0 - 2.5 * COS40)), rel=1e-9)
    assert "side tear-out" not in rec  # no transverse load
    assert "oblique load (1.6-power interaction)" not in rec
    # the bending stress is 6M/(W t²) from the pin's tilt moment on the link
    ctx = solved(hanging_link())
    joint = ctx.case.joints[0]
    force = next(f for f in joint_forces(ctx, load_set(ctx), joint) if f.part == "link")
    assert rec["out-of-plane bending"].demand == pytest.approx(
        6.0 * force.tilt_Nmm / (20.0 * 8.0**2), rel=1e-9)
    # flat PLA: bearing meets the compressive strength, net tension the strength along the
    # lines, shear-out the in-layer shear strength, all with the in-layer required factor
    assert "compressive strength (practice)" in rec["bearing"].basis
    assert "Tsai-Hill at 0.0 deg" in rec["net tension"].basis
    assert "shear_xy_MPa" in rec["shear-out"].basis
    assert {r.required_factor for r in rec.values()} == {1.5}


def test_clearance_raises_the_net_tension_demand() -> None:
    tight = pull_records(hanging_link())["net tension"]
    loose = pull_records(hanging_link(clearance_mm=0.05))["net tension"]
    assert loose.demand == pytest.approx(1.35 * tight.demand, rel=1e-9)
    assert "Shigley" in loose.basis


def test_kt_outside_the_fit_is_said() -> None:
    # W = 40 mm: D/W = 0.125 < 0.15, taken at 0.15
    rec = pull_records(hanging_link(width_mm=40.0))["net tension"]
    assert "outside the fit's 0.15–0.75: taken at 0.15" in rec.basis
    assert rec.demand == pytest.approx(lugs.net_tension_kt(0.15) * 500.0 / (35.0 * 8.0),
                                       rel=1e-9)


def test_oblique_load_interaction_through_a_case() -> None:
    # tip load (300, −400) N: the pin pushes the lug towards its end with 400 N, across 300 N
    rec = pull_records(hanging_link(force_N=(300.0, -400.0, 0.0)))
    D, d, t, W, e = 5.0, 5.0, 8.0, 20.0, 6.0
    a_tr = W / 2 - D / 2 * COS40
    assert rec["side tear-out"].demand == pytest.approx(300.0 / (2 * t * a_tr), rel=1e-9)
    kt = lugs.net_tension_kt(D / W)
    bearing_N = rec["bearing"].capacity * d * t
    axial_N = min(rec["net tension"].capacity * (W - D) * t / kt,
                  rec["shear-out"].capacity * 2 * t * (e - D / 2 * COS40), bearing_N)
    transverse_N = min(rec["side tear-out"].capacity * 2 * t * a_tr, bearing_N)
    combined = rec["oblique load (1.6-power interaction)"]
    expected = ((400.0 / axial_N) ** 1.6 + (300.0 / transverse_N) ** 1.6) ** -0.625
    assert combined.safety_factor == pytest.approx(expected, rel=1e-9)
    assert combined.demand == pytest.approx(500.0, rel=1e-9)
    assert combined.unit == "N"
    # the combined check is worse than either component alone
    assert expected < min(axial_N / 400.0, transverse_N / 300.0)


def test_infill_lowers_the_cut_strength_by_its_share() -> None:
    solid = pull_records(hanging_link())["net tension"]
    sparse = pull_records(hanging_link(infill_percent=20.0))["net tension"]
    # flat: the net-section ligament (20 − 5)/2 = 7.5 mm has 3 × 0.45 mm walls at each end and
    # 4 × 0.2 mm skins at each face; the rest is grid_45 infill at 20 %
    ratio = float(law("grid_45", "in_layer").strength_ratio(0.2))
    share = lugs.solid_share(7.5, 8.0, 1.35, 0.8, ratio)
    assert sparse.capacity == pytest.approx(share * solid.capacity, rel=1e-12)
    assert sparse.demand == pytest.approx(solid.demand, rel=1e-12)


# ---------------------------------------------------------------------------------------------
# Build direction


def test_upright_lug_is_weaker_and_names_the_interlayer_mode() -> None:
    flat = governing(pull_records(hanging_link("flat")).values())["lug link at root"]
    upright = governing(pull_records(hanging_link("upright")).values())["lug link at root"]
    assert upright.safety_factor < flat.safety_factor
    assert flat.mode == "net tension"
    assert upright.mode == "split along layers (net tension)"
    assert "tension_z_MPa" in upright.basis
    assert upright.required_factor == 2.0  # across_layers default
    assert "print this part flat" in upright.suggestion


def test_swapping_the_build_direction_swaps_the_governing_mode() -> None:
    # same lug and load: flat, net tension in the layers governs; on edge the shear-out planes
    # lie along layer interfaces and shear-out along layers governs
    flat = governing(pull_records(hanging_link("flat")).values())["lug link at root"]
    edge = governing(pull_records(hanging_link("on_edge")).values())["lug link at root"]
    assert flat.mode == "net tension"
    assert edge.mode == "shear-out along layers"
    assert "shear_z_MPa" in edge.basis


@pytest.mark.parametrize(("build", "net", "shear_out"), [
    ("flat", "net tension", "shear-out"),
    ("on_edge", "net tension", "shear-out along layers"),
    ("upright", "split along layers (net tension)", "shear-out (interlayer shear)"),
])
def test_mode_names_follow_the_planes(build: str, net: str, shear_out: str) -> None:
    rec = pull_records(hanging_link(build))
    assert net in rec
    assert shear_out in rec


def test_plane_rules() -> None:
    # the table of the module docstring: normal stress across the layers only along the build
    # axis; τ_xy on the interfaces unless flat; planes along layers where the normal is the axis
    lib_pla = solved(hanging_link()).case.library.printed_material("PLA")
    assert not lugs.tension_strength(lib_pla, "flat", "x", 0.0).across
    assert not lugs.tension_strength(lib_pla, "on_edge", "x", 0.0).across
    assert lugs.tension_strength(lib_pla, "upright", "x", 0.0).along_layers
    assert lugs.tension_strength(lib_pla, "on_edge", "y", 0.0).across
    assert not lugs.shear_strength(lib_pla, "flat", "y").across
    edge = lugs.shear_strength(lib_pla, "on_edge", "y")
    assert edge.across and edge.along_layers
    upright = lugs.shear_strength(lib_pla, "upright", "y")
    assert upright.across and not upright.along_layers
    assert lugs.shear_strength(lib_pla, "upright", "x").along_layers


# ---------------------------------------------------------------------------------------------
# Geometry from the section, warnings, the demo case


def test_lug_assumed_from_the_section() -> None:
    ctx = solved(hanging_link(lug=False))
    found, skipped = lugs.lugs(ctx.case)
    assert skipped == ()
    (lug,) = found
    assert lug.assumed
    # t = section width 8, W = depth 20, e = W/2, D = pin + 2 × clearance
    assert (lug.thickness_mm, lug.width_mm, lug.edge_mm, lug.hole_mm) == (8.0, 20.0, 10.0, 5.0)
    rec = {r.mode: r for r in expand(lugs.checks(ctx)) if r.load_case == "pull"}
    assert "geometry assumed from the section" in rec["bearing"].basis
    assert any("geometry assumed from the section" in w for w in lugs.warnings(ctx))


def test_a_pin_as_wide_as_the_part_is_refused_in_one_line() -> None:
    ctx = solved(hanging_link(lug=False, width_mm=5.0))
    found, skipped = lugs.lugs(ctx.case)
    assert found == ()
    (line,) = skipped
    assert "not checked" in line and "\n" not in line
    assert line in lugs.warnings(ctx)
    assert lugs.checks(ctx) == []


def test_edge_width_wall_and_cleavage_warnings() -> None:
    # e/D = 6/5 = 1.2 < 3; W/D = 4 meets the rule; 2 walls; on edge: cleavage along layers
    (line,) = lugs.warnings(solved(hanging_link("on_edge", walls=2)))
    assert line.startswith("lug link at root: ")
    assert "e/D = 1.20 below 3" in line
    assert "W/D" not in line
    assert "2 walls round the hole" in line
    assert "cleavage plane" in line
    assert lugs.warnings(solved(hanging_link(edge_mm=15.0))) == []


def test_demo_case_checks_every_printed_lug() -> None:
    text = (ROOT / "cases" / "hopping_leg.toml").read_text()
    ctx = solved(text)
    items = set(governing(expand(lugs.checks(ctx))))
    assert items == {"lug hip_block at hip", "lug knee_block at knee", "lug shin at knee",
                     "lug drive_crank at knee_drive", "lug drive_crank at crank_tip",
                     "lug shin at horn"}

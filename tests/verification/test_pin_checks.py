"""Verification of the pin checks (stiff.checks.pins): one test per formula with a worked number,
the clevis through a solved case, and the single-shear arm against an independent model.

Sources (REFERENCES.md §4, §9):
- Pin in double shear τ = 2P/(π d²), i.e. V/(π d²/4) on each plane with V = P/2; bending
  σ = 32M/(π d³); plastic shape factor of a round section 16/(3π) = 1.70 [confirmed, any
  strength-of-materials text].
- Clevis pin moment M = (P/2)(t1/2 + g + t2/4): Bruhn, *Analysis and Design of Flight Vehicle
  Structures*, §D1 (from memory).
- Single shear M = (V/2)(t1/2 + g + t2/2): the module's stated arm (practice), checked here to
  bound the free pin of a linear-bearing model (rigid pin in elastic bores), derived below.
- Shear capacity 0.6 f_ub on a plain shank: EN 1993-1-8 Table 3.4 (from memory); ISO 898-1
  class 8.8: R_m 800, R_p0.2 640 MPa [confirmed].

Tolerances: worked numbers to the digits shown (rel 1e-4); through a solved case the pin loads
are static reactions of a linear solve, exact to round-off (rel 1e-9); the linear-bearing
integral is evaluated on 20 001 points (trapezoid, error below 1e-6 of the moment).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from stiff.checks import pins
from stiff.checks.base import expand, governing
from stiff.checks.context import LoadSet
from tests.verification.lug_cases import CLEVIS, hanging_link, load_case, solved

ROOT = Path(__file__).resolve().parents[2]


def test_pin_shear_stress() -> None:
    # a 4 mm pin, 400 N over two planes (double shear): τ = 2P/(π d²) = 800/(π × 16) = 15.915 MPa
    assert pins.pin_shear_stress(200.0, 4.0) == pytest.approx(15.915, rel=1e-4)
    assert pins.pin_shear_stress(200.0, 4.0) == pytest.approx(2 * 400.0 / (math.pi * 4.0**2),
                                                              rel=1e-12)


def test_pin_bending_stress() -> None:
    # σ = 32M/(π d³): M = 1200 N·mm on a 4 mm pin: 38400/(64π) = 190.99 MPa
    assert pins.pin_bending_stress(1200.0, 4.0) == pytest.approx(190.99, rel=1e-4)


def test_clevis_moment_arm() -> None:
    # Bruhn §D1 (from memory): P = 400 N, outer lugs t1 = 4, gap g = 2, inner lug t2 = 8 mm:
    # M = (400/2)(2 + 2 + 2) = 1200 N·mm
    assert pins.clevis_moment(400.0, 4.0, 2.0, 8.0) == pytest.approx(1200.0, rel=1e-12)


def test_single_shear_moment_arm() -> None:
    # V = 500 N, t1 = 0 (the body), g = 6, t2 = 8 mm: M = 250 (0 + 6 + 4) = 2500 N·mm
    assert pins.single_shear_moment(500.0, 0.0, 6.0, 8.0) == pytest.approx(2500.0, rel=1e-12)


def test_plastic_shape_factor_is_noted() -> None:
    # Z/S of a solid circle: (d³/6)/(π d³/32) = 16/(3π) = 1.698
    factor = pins.PLASTIC_SHAPE_FACTOR
    assert factor == pytest.approx(1.698, rel=1e-3)


@pytest.mark.parametrize("gap_over_t", [0.0, 0.25, 1.0, 5.0])
def test_single_shear_arm_bounds_the_linear_bearing_free_pin(gap_over_t: float) -> None:
    # Derived: a rigid pin free in two equal elastic bores (t each, gap g) tilts until the
    # bearing resultants ±V meet mid-gap; each bore's pressure is then linear,
    # q = V/t + 12 V e (z − t/2)/t³ with e = t/2 + g/2 the resultant's offset from the lug's
    # centre. The moment M(z) = ∫∫q is largest in the lug (0.148 V t for g = 0) or at the bore's
    # face (V g/2); the module's arm (V/2)(t/2 + g + t/2) must not be below it.
    V, t = 1.0, 1.0
    g = gap_over_t * t
    z = np.linspace(0.0, t, 20001)
    q = V / t + 12.0 * V * (t / 2 + g / 2) * (z - t / 2) / t**3
    dz = z[1] - z[0]
    shear = np.concatenate([[0.0], np.cumsum(0.5 * (q[1:] + q[:-1]) * dz)])
    moment = np.concatenate([[0.0], np.cumsum(0.5 * (shear[1:] + shear[:-1]) * dz)])
    assert shear[-1] == pytest.approx(V, rel=1e-9)  # the bore carries V
    assert moment[-1] == pytest.approx(-V * g / 2, abs=1e-6)  # M = −V g/2 at the face
    worst = float(np.abs(moment).max())
    if g == 0.0:
        assert worst == pytest.approx(4.0 / 27.0 * V * t, rel=1e-6)
    assert pins.single_shear_moment(V, t, g, t) >= worst


def test_clevis_through_a_case() -> None:
    # two 4 mm plates at z = ±8 round an 8 mm link at z = 0 on a 4 mm steel-8.8 pin; the
    # link carries P = 400 N; gaps |Δz| − (4 + 8)/2 = 2 mm
    ctx = solved(CLEVIS)
    loads = LoadSet.of(load_case(ctx))
    joint = next(j for j in ctx.case.joints if j.name == "mid")
    planes = pins.pin_planes(ctx, loads, joint)
    assert [float(p.shear_N[0]) for p in planes] == pytest.approx([200.0, 200.0], rel=1e-9)
    assert pins.gaps(ctx.case, joint) == pytest.approx([2.0, 2.0], rel=1e-12)
    rec = {r.mode: r for r in expand(pins.pin_checks(ctx, joint, loads))}
    for plane in ("left–inner", "inner–right"):
        shear = rec[f"shear, plane {plane}"]
        assert shear.demand == pytest.approx(2 * 400.0 / (math.pi * 4.0**2), rel=1e-9)
        assert shear.capacity == pytest.approx(0.6 * 800.0, rel=1e-12)
    bending = rec["bending"]
    M = 400.0 / 2 * (4.0 / 2 + 2.0 + 8.0 / 4)  # Bruhn: 1200 N·mm
    assert bending.demand == pytest.approx(32 * M / (math.pi * 4.0**3), rel=1e-9)
    assert bending.capacity == pytest.approx(640.0, rel=1e-12)
    assert "clevis arm governs" in bending.basis
    assert bending.required_factor == ctx.required("pin")


def test_single_shear_through_a_case() -> None:
    # the hanging link: body at z = 0 (thickness not in the case: 0), an 8 mm lug at z = 10
    # on a 5 mm pin, V = 500 N: g = 10 − 4 = 6 mm, M = 250 (0 + 6 + 4) = 2500 N·mm
    ctx = solved(hanging_link())
    joint = ctx.case.joints[0]
    rec = {r.mode: r for r in expand(pins.pin_checks(ctx, joint, LoadSet.of(load_case(ctx))))}
    assert rec["shear, plane body–link"].demand == pytest.approx(
        500.0 / (math.pi * 5.0**2 / 4), rel=1e-9)
    assert rec["bending"].demand >= 32 * 2500.0 / (math.pi * 5.0**3) * (1 - 1e-9)


def test_overlapping_parts_are_warned() -> None:
    # two parts whose planes (z_mm) and thicknesses overlap along the pin
    text = CLEVIS.replace('z_mm = 8.0\nsection = { material = "PLA", width_mm = 4.0',
                          'z_mm = 4.0\nsection = { material = "PLA", width_mm = 4.0')
    ctx = solved(text)
    (line,) = pins.warnings(ctx)
    assert line.startswith("pin mid: inner and right overlap by 2 mm")
    joint = next(j for j in ctx.case.joints if j.name == "mid")
    assert pins.gaps(ctx.case, joint)[1] == pytest.approx(-2.0, rel=1e-12)


def test_demo_case_checks_every_pin() -> None:
    ctx = solved((ROOT / "cases" / "hopping_leg.toml").read_text())
    items = set(governing(expand(pins.checks(ctx))))
    assert items == {"pin hip", "pin knee", "pin knee_drive", "pin crank_tip", "pin horn"}

"""The lug checks over a batch of poses (stiff.checks.lugs): the rows of a stacked load set give,
entry by entry, the records of each load set alone, and scaling the pin loads scales the demands.

The formulas themselves are verified against their sources in
tests/verification/test_lug_checks.py. Here: every lug stress is a load component over a fixed
area or section modulus (bearing, net tension, shear-out: Bruhn, *Analysis and Design of Flight
Vehicle Structures*, §D1; bending 6M/(W t²)), so it scales with the load against a fixed
allowable; and (R_a^1.6 + R_tr^1.6)^0.625 is homogeneous of degree 1 in the load (Air Force
method, AFFDL *Stress Analysis Manual*, 1986, ch. 9), so the oblique check's demand P scales
and its capacity P (R_a^1.6 + R_tr^1.6)^−0.625, the load that reaches the curve, does not.

Tolerances: a stacked set runs the same elementwise operations as each set alone, and a scaled
one the same operations on scaled numbers; numpy's vector loops may round the last bit
differently from its scalar tail, so floats are compared to rel 1e-12 and texts exactly.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.checks import lugs
from stiff.checks.base import CheckRecord, CheckRows, expand
from stiff.checks.context import CheckContext, LoadSet, stack_loads
from tests.verification.lug_cases import hanging_link, load_set, solved

#: Tip loads of the hanging link [N]: straight pull, oblique pull, oblique push (the pin pushing
#: into the part), and one with an out-of-plane part that tilts the pin.
TIP_LOADS = ((0.0, -500.0, 0.0), (300.0, -400.0, 0.0), (300.0, 400.0, 0.0), (-200.0, 50.0, 30.0))


def same_record(a: CheckRecord, b: CheckRecord) -> None:
    """Equal texts and factors; demand and capacity to round-off."""
    assert (a.item, a.kind, a.mode, a.load_case, a.unit, a.required_factor, a.basis,
            a.suggestion) == (b.item, b.kind, b.mode, b.load_case, b.unit, b.required_factor,
                              b.basis, b.suggestion)
    assert a.demand == pytest.approx(b.demand, rel=1e-12, abs=0.0)
    assert a.capacity == pytest.approx(b.capacity, rel=1e-12, abs=0.0)


def entry_records(rows: list[CheckRows], i: int) -> list[CheckRecord]:
    """The records of entry i of every row, where the row applies."""
    return [row.record(i) for row in rows if row.mask[i]]


def assert_stack_matches(ctx: CheckContext, sets: list[LoadSet]) -> None:
    """Rows of the stacked sets, entry by entry, against each set checked alone."""
    stacked = stack_loads(sets)
    rows = lugs.checks(CheckContext(ctx.case, ctx.built, [stacked]))
    assert all(row.size == len(sets) for row in rows)
    for i, alone in enumerate(sets):
        expected = expand(lugs.checks(CheckContext(ctx.case, ctx.built, [alone])))
        got = entry_records(rows, i)
        assert [r.mode for r in got] == [r.mode for r in expected]
        for a, b in zip(got, expected, strict=True):
            same_record(a, b)


def test_stacked_tip_loads_give_each_load_alone() -> None:
    # four solves of the same link under different tip loads: one load case "pull" each
    contexts = [solved(hanging_link(force_N=f)) for f in TIP_LOADS]
    sets = [load_set(c) for c in contexts]
    assert_stack_matches(contexts[0], sets)
    # the loads reach every branch: pulling and pushing, with and without a transverse part
    rows = lugs.checks(CheckContext(contexts[0].case, contexts[0].built, [stack_loads(sets)]))
    oblique = [r for r in rows if r.mode.startswith("oblique")]
    assert [bool(r.mask.any()) for r in oblique] == [True, True]
    assert not any(r.mask.all() for r in oblique)


@pytest.mark.parametrize("name", ["hopping_leg", "five_bar_leg", "camera_arm"])
def test_stacked_demo_load_cases_give_each_alone(name: str) -> None:
    # every load case of a demo, renamed to one name (the duty then follows that name for all),
    # stacked by whether the foot is held
    ctx = solved((CASES_DIR / f"{name}.toml").read_text())
    for held in (False, True):
        sets = [replace(s, name="batch") for s in ctx.loads
                if s.foot_held == held]
        if sets:
            assert_stack_matches(ctx, sets)


def scaled(s: LoadSet, factor: float) -> LoadSet:
    """The load set with every connector force and moment scaled by ``factor``."""
    return replace(s, connector_forces=factor * s.connector_forces)


@settings(max_examples=20, deadline=None)
@given(factor=st.floats(min_value=1e-3, max_value=1e3))
def test_scaling_the_loads_scales_every_demand(factor: float) -> None:
    for ctx in (solved(hanging_link(force_N=TIP_LOADS[1])),
                solved((CASES_DIR / "hopping_leg.toml").read_text())):
        base = lugs.checks(ctx)
        more = lugs.checks(CheckContext(ctx.case, ctx.built,
                                        [scaled(s, factor) for s in ctx.loads]))
        for a, b in zip(base, more, strict=True):
            assert (a.item, a.mode, a.load_case) == (b.item, b.mode, b.load_case)
            np.testing.assert_array_equal(a.mask, b.mask)
            live = a.mask
            np.testing.assert_allclose(b.demand[live], factor * a.demand[live], rtol=1e-12)
            cap_a = np.broadcast_to(a.capacity, a.demand.shape)[live]
            cap_b = np.broadcast_to(b.capacity, b.demand.shape)[live]
            # stresses against a fixed allowable; the oblique load that reaches the curve
            np.testing.assert_allclose(cap_b, cap_a, rtol=1e-12)


@settings(max_examples=50, deadline=None)
@given(fx=st.floats(-1e4, 1e4), fy=st.floats(-1e4, 1e4), angle=st.floats(-np.pi, np.pi))
def test_split_load_keeps_the_resultant(fx: float, fy: float, angle: float) -> None:
    # P_a² + P_tr² = |F|² for a unit axis; a zero axis row (no direction) takes it all as P_a,
    # as None does; a batch (B, 2) gives each row's split
    force = np.array([[fx, fy], [fx, fy]])
    axis = np.array([[np.cos(angle), np.sin(angle)], [0.0, 0.0]])
    P_a, P_tr = lugs.split_load(force, axis)
    P = np.hypot(fx, fy)
    assert P_a[0] ** 2 + P_tr[0] ** 2 == pytest.approx(P**2, rel=1e-9, abs=1e-9)
    assert P_tr[0] >= 0.0
    assert (P_a[1], P_tr[1]) == (P, 0.0)
    assert lugs.split_load(force[0], None) == (P, 0.0)
    one_a, one_tr = lugs.split_load(force[0], axis[0])
    assert (float(one_a), float(one_tr)) == (P_a[0], P_tr[0])


def test_tilt_without_a_direction_acts_about_both_axes() -> None:
    moment = np.array([[30.0, 40.0, 7.0], [30.0, 40.0, 7.0]])
    about_x, about_y = lugs.tilt_moments(moment, np.array([[0.0, -1.0], [0.0, 0.0]]))
    # lug axis −y: about x = |M·x̂| = 40, about y = |−mx uy + my ux| = 30; no axis: |M| = 50
    assert about_x.tolist() == [40.0, 50.0]
    assert about_y.tolist() == [30.0, 50.0]


def test_formulas_take_arrays() -> None:
    P = np.array([0.0, 250.0, 500.0])
    assert lugs.bearing_stress(P, 5.0, 8.0).tolist() == [0.0, 6.25, 12.5]
    assert lugs.net_tension_kt(np.array([0.05, 0.2])).tolist() == [
        lugs.net_tension_kt(0.15), lugs.net_tension_kt(0.2)]
    factors = lugs.interaction_factor(np.array([0.6, 0.0]), np.array([0.3, 0.0]))
    assert factors[0] == pytest.approx(lugs.interaction_factor(0.6, 0.3), rel=1e-12)
    assert np.isinf(factors[1])
    assert isinstance(lugs.bearing_stress(500.0, 5.0, 8.0), float)

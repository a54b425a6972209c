"""Actuator, spring and target checks over a batch of poses: the rows of a stacked load set
give, entry by entry, the records of each set alone; the demands are the load set's own
numbers (|torque| in N·m, the spring's length, the foot's deflection in and out of the plane).

The demands are definitions, not published formulas: |T| against the stall torque, the
length against the maximum length, and the magnitude of the in-plane deflection,
√(dx² + dy²), which cannot change when the deflection turns about the pin axis z.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.checks import duty
from stiff.checks.base import expand
from stiff.checks.context import CheckContext, LoadSet, stack_loads
from stiff.errors import CaseError
from tests.demo_contexts import context_of


@pytest.fixture(scope="module", params=["camera_arm", "five_bar_leg", "hopping_leg"])
def ctx(request: pytest.FixtureRequest) -> CheckContext:
    return context_of((CASES_DIR / f"{request.param}.toml").read_text())


def _with(ctx: CheckContext, loads: LoadSet) -> CheckContext:
    return CheckContext(ctx.case, ctx.built, [loads])


def test_a_stack_gives_each_sets_records(ctx: CheckContext) -> None:
    """The free-foot load sets of a demo case named as its first static one (so the targets
    cover them all), stacked: entry j of every row is the record of set j checked alone."""
    group = [s for s in ctx.loads if not s.foot_held]
    name = group[0].name
    assert name in ("stance", "payload")
    sets = [dataclasses.replace(s, name=name) for s in group]
    rows = duty.checks(_with(ctx, stack_loads(sets)))
    kinds = {r.kind for r in rows}
    assert {"actuator", "foot"} <= kinds
    assert ("spring" in kinds) == any(m is not None for m in group[0].spring_max_mm)
    for j, s in enumerate(sets):
        alone = duty.checks(_with(ctx, s))
        assert [r.record(j) for r in rows] == expand(alone)


def test_records_are_the_load_sets_numbers(ctx: CheckContext) -> None:
    """B = 1, every load set: the actuators where the foot is free, |T|/1000 against the stall
    torque in N·m; springs with a maximum at their length; targets in the static cases."""
    records = expand(duty.checks(ctx))
    for s in ctx.loads:
        mine = [r for r in records if r.load_case == s.name]
        actuators = [r for r in mine if r.kind == "actuator"]
        if s.foot_held:
            assert not actuators
        else:
            assert [r.item for r in actuators] == list(s.actuator_names)
            assert [r.demand for r in actuators] == pytest.approx(
                np.abs(s.actuator_torque_Nmm[0]) / 1000.0, rel=1e-15)
            assert [r.capacity for r in actuators] == pytest.approx(
                s.stall_torque_Nmm / 1000.0, rel=1e-15)
        springs = {r.item: r for r in mine if r.kind == "spring"}
        for k, longest in enumerate(s.spring_max_mm):
            if longest is not None:
                r = springs[f"spring {s.spring_names[k]}"]
                assert (r.demand, r.capacity) == (s.spring_length_mm[0, k], longest)
        foot = {r.mode: r.demand for r in mine if r.kind == "foot"}
        if foot:
            dx, dy, dz = s.foot_deflection_mm[0]
            assert foot["deflection in the linkage plane"] == pytest.approx(math.hypot(dx, dy))
            assert foot["lateral deflection"] == pytest.approx(abs(dz))


@settings(max_examples=25, deadline=None)
@given(angle=st.floats(-math.pi, math.pi), scale=st.floats(-20.0, 20.0))
def test_demands_turn_and_scale_with_the_load(hopping: CheckContext, angle: float,
                                              scale: float) -> None:
    """The foot's deflection turned about z by any angle keeps its in-plane demand; deflection
    and torques times c give demands times |c|; the springs' lengths are left alone."""
    base = next(s for s in hopping.loads if not s.foot_held)
    c, s = math.cos(angle), math.sin(angle)
    turn = np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])
    moved = dataclasses.replace(
        base, foot_deflection_mm=scale * base.foot_deflection_mm @ turn.T,
        actuator_torque_Nmm=scale * base.actuator_torque_Nmm)
    before = duty.checks(_with(hopping, base))
    after = duty.checks(_with(hopping, moved))
    for a, b in zip(before, after, strict=True):
        assert (a.item, a.mode, a.capacity) == (b.item, b.mode, b.capacity)
        expected = a.demand if a.kind == "spring" else abs(scale) * a.demand
        assert b.demand == pytest.approx(expected, rel=1e-12, abs=1e-12 * np.abs(a.demand).max())


def test_an_unknown_deflection_case_is_a_case_error(hopping: CheckContext) -> None:
    targets = dataclasses.replace(hopping.case.targets, deflection_cases=("no such case",))
    case = dataclasses.replace(hopping.case, targets=targets)
    with pytest.raises(CaseError, match="no load case 'no such case'"):
        duty.checks(CheckContext(case, hopping.built, hopping.results))

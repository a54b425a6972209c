"""Pin checks over a batch (stiff.checks.pins.checks -> CheckRows): a stacked load set gives,
entry by entry, the records each of its sets gives alone; the demands scale with the loads.

Sources: τ = V/(π d²/4) and σ = 32M/(π d³) are linear in the forces and the clevis moment
M = (P/2)(t1/2 + g + t2/4) (Bruhn, *Analysis and Design of Flight Vehicle Structures*, §D1,
from memory) is linear in P, so every pin demand is homogeneous of degree 1 in the joint forces
and even in their sign. Comparisons of a stacked set with its parts are exact (the same
elementwise arithmetic); the scaling is to 1e-12 relative (one rounding per operation).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from functools import cache

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.case import parse_case
from stiff.check import run_check
from stiff.checks import pins
from stiff.checks.base import CheckRows, expand
from stiff.checks.context import CheckContext, LoadSet, stack_loads
from tests.verification.lug_cases import CLEVIS

CASES = ("hopping_leg", "five_bar_leg", "camera_arm", "clevis")


@cache
def context(name: str) -> CheckContext:
    """The solved check context of a demo case (or the clevis of the lug cases)."""
    text = CLEVIS if name == "clevis" else (CASES_DIR / f"{name}.toml").read_text()
    r = run_check(parse_case(text))
    return CheckContext(r.case, r.built, r.load_cases)


def variants(loads: LoadSet) -> list[LoadSet]:
    """A load set, its forces reversed, its connector moments ×50 and no load at all: entries
    in which other signs, other sides of a clevis and the model's moment govern."""
    moments = loads.connector_forces.copy()
    moments[..., 3:] *= 50.0
    return [loads,
            replace(loads, connector_forces=-loads.connector_forces,
                    beam_forces=-loads.beam_forces),
            replace(loads, connector_forces=moments),
            replace(loads, connector_forces=0.0 * loads.connector_forces,
                    beam_forces=0.0 * loads.beam_forces)]


def batches(ctx: CheckContext) -> list[list[LoadSet]]:
    """Groups of B = 1 load sets that stack: every load case of a context with the foot held
    alike, renamed to the group's first, each with its :func:`variants`."""
    groups: list[list[LoadSet]] = []
    for held in (False, True):
        sets = [s for s in ctx.loads if s.foot_held == held]
        if sets:
            groups.append([replace(v, name=sets[0].name) for s in sets for v in variants(s)])
    return groups


def assert_entrywise(check: Callable[[CheckContext], list[CheckRows]], ctx: CheckContext,
                     sets: list[LoadSet]) -> int:
    """Rows of the stacked sets equal, entry by entry, the records of each set alone; returns
    the records compared."""
    together = check(CheckContext(ctx.case, ctx.built, [stack_loads(sets)]))
    compared = 0
    for i, one in enumerate(sets):
        alone = check(CheckContext(ctx.case, ctx.built, [one]))
        assert [(r.item, r.mode) for r in alone] == [(r.item, r.mode) for r in together]
        for a, b in zip(alone, together, strict=True):
            assert a.size == 1 and b.size == len(sets)
            assert bool(a.mask[0]) == bool(b.mask[i])
            if a.mask[0]:
                assert b.record(i) == a.record(0)
                compared += 1
    return compared


@pytest.mark.parametrize("name", CASES)
def test_stacked_rows_are_each_set_alone(name: str) -> None:
    ctx = context(name)
    compared = sum(assert_entrywise(pins.checks, ctx, sets) for sets in batches(ctx))
    assert compared > 0


def test_clevis_entries_pick_their_own_governing_moment() -> None:
    # the ×50 connector moments make the model's tilt govern where the clevis arm did
    ctx = context("clevis")
    sets = [replace(v, name="pull") for v in variants(ctx.loads[-1])[:3]]
    joint = next(j for j in ctx.case.joints if j.name == "mid")
    (bending,) = [r for r in pins.pin_checks(ctx, joint, stack_loads(sets)) if r.mode == "bending"]
    assert "clevis arm governs" in bending.record(0).basis
    assert "clevis arm governs" in bending.record(1).basis
    assert "connector moment governs" in bending.record(2).basis


def test_b_one_gives_one_record_per_check() -> None:
    ctx = context("hopping_leg")
    rows = pins.checks(ctx)
    assert all(r.size == 1 and r.applies is None for r in rows)
    assert len(expand(rows)) == len(rows)
    assert all(isinstance(r.basis, str) or r.basis(0) for r in rows)


@settings(max_examples=25, deadline=None)
@given(scale=st.floats(1e-3, 1e3), flip=st.booleans(), case=st.sampled_from(CASES))
def test_demands_scale_with_the_loads(scale: float, flip: bool, case: str) -> None:
    ctx = context(case)
    loads = ctx.loads[0]
    factor = -scale if flip else scale
    scaled = replace(loads, connector_forces=factor * loads.connector_forces)
    base = pins.checks(CheckContext(ctx.case, ctx.built, [loads]))
    rows = pins.checks(CheckContext(ctx.case, ctx.built, [scaled]))
    for a, b in zip(base, rows, strict=True):
        np.testing.assert_allclose(b.demand, scale * a.demand, rtol=1e-12, atol=0.0)
        assert b.capacity == a.capacity


@settings(max_examples=25, deadline=None)
@given(V=st.floats(0.0, 1e5), d=st.floats(1.0, 20.0))
def test_formulas_take_arrays_as_floats(V: float, d: float) -> None:
    # each formula on an array gives, per entry, what it gives on the float
    vs = np.array([V, 2.0 * V, 0.0])
    for f in (pins.pin_shear_stress, pins.pin_bending_stress):
        assert f(vs, d).tolist() == [f(float(v), d) for v in vs]
    arm = pins.clevis_moment(vs, 4.0, 2.0, 8.0)
    assert arm.tolist() == [pins.clevis_moment(float(v), 4.0, 2.0, 8.0) for v in vs]
    one = pins.single_shear_moment(vs, 0.0, 6.0, 8.0)
    assert one.tolist() == [pins.single_shear_moment(float(v), 0.0, 6.0, 8.0) for v in vs]

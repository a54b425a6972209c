"""Tube check rows over a batch of poses: a stacked load set gives, entry by entry, the records
of each of its sets checked alone; the frame's buckling row follows the tube with the lowest
Euler factor in each entry; demands scale with the loads; the formulas take arrays.

Sources: the formulas are those of ``tests/verification/test_tube_checks.py`` (NASA SP-8007;
AISC 360 Commentary Table C-A-7.1; Engesser, Timoshenko & Gere 2nd ed. §2.16, from memory).
The scaling properties follow from the checks being linear in the forces: σ = N/A ± M/S and
|N| are of degree one, P_cr does not depend on the load, and the linear buckling factor λ of
(K + λ K_G(F)) φ = 0 scales as 1/s when F does (K_G is linear in the axial forces).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.checks import tubes
from stiff.checks.base import CheckRows, expand
from stiff.checks.context import CheckContext, LoadSet, stack_loads
from stiff.fe import Solution


def _free_foot_sets(ctx: CheckContext) -> list[LoadSet]:
    """Every load set with a free foot (the same model layout: stance, landing in its own
    pose, the pushes, the stalls), all named as the first, so that they stack."""
    sets = [s for s in ctx.loads if not s.foot_held]
    return [replace(s, name=sets[0].name) for s in sets]


def _rows(ctx: CheckContext, loads: LoadSet) -> list[CheckRows]:
    return tubes.checks(CheckContext(ctx.case, ctx.built, [loads]))


@pytest.mark.parametrize("name", ["five_bar", "hopping"])
def test_stacked_sets_give_each_sets_records(name: str, request: pytest.FixtureRequest) -> None:
    """Rows of B stacked sets equal, entry by entry, the rows of each set alone: the same
    rows apply, with the same records (exactly: the same arithmetic on the same numbers)."""
    ctx: CheckContext = request.getfixturevalue(name)
    sets = _free_foot_sets(ctx)
    assert len(sets) >= 4
    stacked = _rows(ctx, stack_loads(sets))
    alone = [_rows(ctx, s) for s in sets]
    for rows in alone:
        assert [(r.item, r.mode) for r in rows] == [(r.item, r.mode) for r in stacked]
    for k, row in enumerate(stacked):
        assert row.size == len(sets)
        for i, rows in enumerate(alone):
            assert bool(row.mask[i]) == bool(rows[k].mask[0])
            if row.mask[i]:
                assert row.record(i) == rows[k].record(0)
    assert sum(len(r.records()) for r in stacked) == sum(len(expand(r)) for r in alone)


@pytest.mark.parametrize("name", ["five_bar", "hopping"])
def test_one_frame_row_per_tube_and_one_record_per_entry(
        name: str, request: pytest.FixtureRequest) -> None:
    """Each tube has a frame-buckling row in each load set; in each entry at most one of them
    applies, on the tube with the lowest Euler factor (P_cr/|N| of its spans in compression),
    the first in the case's order when factors tie to round-off."""
    ctx: CheckContext = request.getfixturevalue(name)
    stacked = stack_loads(_free_foot_sets(ctx))
    rows = _rows(ctx, stacked)
    frame = [r for r in rows if r.mode == "linear buckling (frame)"]
    tube_names = [p.name for p in ctx.case.parts if p.kind == "tube"]
    assert [r.item for r in frame] == tube_names
    owners = np.sum([r.mask for r in frame], axis=0)
    assert (owners <= 1).all() and owners.any()
    # in both demos the lowest Euler factor moves between the two tubes from set to set
    assert sum(bool(r.mask.any()) for r in frame) == 2
    if any("no Euler load of its own" in w for w in tubes.warnings(ctx)):
        return  # such a span makes no Euler row, yet has the lowest factor (0) when pushed
    euler = [r for r in rows if r.mode.startswith("Euler buckling")]
    for i in np.flatnonzero(owners):
        owner = next(r.item for r in frame if r.mask[i])
        live = [(float(np.asarray(r.capacity)[i] / r.demand[i]), r.item) for r in euler
                if r.mask[i]]
        lowest = min(f for f, _ in live)
        tied = [item for f, item in live if f <= lowest * (1 + tubes.TIED_FACTORS)]
        assert owner == tied[0]  # the first of tied tubes (round-off must not pick)


def test_frame_row_at_b_equal_one_is_the_single_record(five_bar: CheckContext) -> None:
    """`stiff check` (B = 1): one frame-buckling record a load case at most, demand 1 and
    capacity the load set's own λ."""
    records = expand(tubes.checks(five_bar))
    lams = tubes.frame_buckling_factors(five_bar.loads)
    for loads, lam in zip(five_bar.loads, lams, strict=True):
        frame = [r for r in records if r.load_case == loads.name
                 and r.mode == "linear buckling (frame)"]
        assert len(frame) <= 1
        for r in frame:
            assert r.demand == 1.0 and r.capacity == float(lam[0])
            assert f"λ = {float(lam[0]):.4g}" in r.basis


def _scaled(loads: LoadSet, s: float) -> LoadSet:
    """The load set with every force scaled by s (no springs: their preload would not scale)."""
    assert not loads.spring_names
    sol = loads.solution
    solution = Solution(**{name: getattr(sol, name) * (s if "forces" in name else 1.0)
                           for name in Solution.__dataclass_fields__})
    return replace(loads, solution=solution, beam_forces=s * loads.beam_forces,
                   connector_forces=s * loads.connector_forces)


@settings(max_examples=15, deadline=None)
@given(s=st.floats(0.25, 4.0))
def test_demands_scale_with_the_loads(five_bar: CheckContext, s: float) -> None:
    """Stress and Euler demands scale by s, the frame's λ by 1/s, the local-buckling ratio by
    s; capacities of the stress and Euler rows stay; the same rows apply. Tolerance 1e-12 for
    the closed forms (round-off of a product), 1e-9 for λ (two eigen-solves)."""
    base = stack_loads(_free_foot_sets(five_bar))
    rows, scaled = _rows(five_bar, base), _rows(five_bar, _scaled(base, s))
    for a, b in zip(rows, scaled, strict=True):
        assert np.array_equal(a.mask, b.mask)
        live = a.mask
        if a.mode == "linear buckling (frame)":
            np.testing.assert_allclose(np.asarray(b.capacity)[live] * s,
                                       np.asarray(a.capacity)[live], rtol=1e-9)
        else:
            np.testing.assert_allclose(b.demand[live], s * a.demand[live], rtol=1e-12)
            np.testing.assert_allclose(np.broadcast_to(b.capacity, b.size)[live],
                                       np.broadcast_to(a.capacity, a.size)[live], rtol=1e-12)


diameters = st.tuples(st.floats(4.0, 40.0), st.floats(0.05, 0.95))


@settings(max_examples=30, deadline=None)
@given(tubes_=st.lists(diameters, min_size=1, max_size=6), L=st.floats(20.0, 800.0),
       K=st.sampled_from([0.65, 0.80, 1.0, 2.1, math.inf]), kGA=st.floats(1e3, 1e7))
def test_formulas_on_arrays_are_the_formulas_of_each_entry(
        tubes_: list[tuple[float, float]], L: float, K: float, kGA: float) -> None:
    """Every formula over arrays gives, entry by entry, its value for floats (to round-off)."""
    D = np.array([od for od, _ in tubes_])
    d = np.array([od * f for od, f in tubes_])
    E = 85_000.0
    I = tubes.tube_second_moment(D, d)
    P_e = tubes.euler_load(E, I, L, K)
    for k, (od, f) in enumerate(tubes_):
        one_I = tubes.tube_second_moment(od, od * f)
        assert isinstance(one_I, float)
        assert np.asarray(I)[k] == pytest.approx(one_I, rel=1e-14)
        assert np.asarray(tubes.tube_area(D, d))[k] == pytest.approx(
            tubes.tube_area(od, od * f), rel=1e-14)
        assert np.asarray(tubes.tube_section_modulus(D, d))[k] == pytest.approx(
            tubes.tube_section_modulus(od, od * f), rel=1e-14)
        one = tubes.euler_load(E, one_I, L, K)
        assert np.asarray(P_e)[k] == pytest.approx(one, rel=1e-14)
        assert np.asarray(tubes.engesser_load(P_e, kGA))[k] == pytest.approx(
            tubes.engesser_load(one, kGA), rel=1e-14)
        for mode in ("axial", "bending"):
            assert np.asarray(tubes.shell_buckling_stress(E, D, d, mode))[k] == pytest.approx(
                tubes.shell_buckling_stress(E, od, od * f, mode), rel=1e-14)

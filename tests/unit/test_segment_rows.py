"""Printed-segment checks over a batch (stiff.checks.segments.checks -> CheckRows): a stacked
load set gives, entry by entry, the records each of its sets gives alone; the region stresses
of an array of loads are those of each load; the demands scale with the loads.

Sources: by strain compatibility ε(y, z) = N/EA + (M_y/EI_y) z − (M_z/EI_z) y and σ = E_i ε in
each region (the composite-beam rule, REFERENCES.md §7), the stress is linear in (N, M_y, M_z):
scaling the loads by λ > 0 scales every extreme by λ, and reversing them swaps tension with
compression. The stacked and per-entry comparisons are exact (the same elementwise
arithmetic); the scaling is to 1e-12 relative (one rounding per operation).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.checks import segments
from stiff.checks.base import expand
from stiff.checks.context import CheckContext, member_forces
from stiff.printed_sections import PrintedSection
from tests.unit.test_pin_rows import CASES, assert_entrywise, batches, context

loads_ = st.floats(-1e4, 1e4, allow_nan=False)


def first_section(ctx: CheckContext) -> PrintedSection:
    """The first printed member's section."""
    return next(ps for ps in ctx.built.beam_printed if ps is not None)


@pytest.mark.parametrize("name", CASES)
def test_stacked_rows_are_each_set_alone(name: str) -> None:
    ctx = context(name)
    compared = sum(assert_entrywise(segments.checks, ctx, sets) for sets in batches(ctx))
    assert compared > 0


@pytest.mark.parametrize("name", CASES)
def test_rows_are_the_worse_end_of_region_extremes(name: str) -> None:
    # the rows take ε₀ ± (|κ_y||z| + |κ_z||y|) over the outer points of all regions at once;
    # region_extremes tries the four curvature signs on every point through stress_range
    ctx = context(name)
    for loads in ctx.loads:
        rows = segments.checks(CheckContext(ctx.case, ctx.built, [loads]))
        by_key = {(r.item, r.mode): r for r in rows}
        for m in member_forces(ctx, loads):
            ps = ctx.built.beam_printed[m.index]
            if ps is None:
                continue
            item = f"{m.part.name} {m.segment[0]}-{m.segment[1]}"
            for region in ps.regions:
                ends = [segments.region_extremes(ps, region, m.axial_N, m.moment_y_Nmm[e],
                                                 m.moment_z_Nmm[e]) for e in (0, 1)]
                high = max(float(hi[0]) for _, hi in ends)
                low = min(float(lo[0]) for lo, _ in ends)
                t, c = [r for (it, mode), r in by_key.items() if it == item
                        and mode.endswith((f" {region.name})", f"the {region.name}"))]
                assert (float(t.demand[0]), bool(t.mask[0])) == (max(high, 0.0), high > 0.0)
                assert (float(c.demand[0]), bool(c.mask[0])) == (max(-low, 0.0), -low > 0.0)


def test_outer_points_keep_the_extremes() -> None:
    # a rectangle's four corners and centre: one |y|, |z| corner remains
    pts = np.array([(-5.0, -4.0), (5.0, -4.0), (5.0, 4.0), (-5.0, 4.0), (0.0, 0.0)])
    assert segments.outer_points(pts).tolist() == [[5.0, 4.0]]
    # points on a circle of radius 5: the quadrants fold onto one, where no point reaches
    # another in both |y| and |z|
    ring = np.array([(3.0, 4.0), (-3.0, 4.0), (3.0, -4.0), (-3.0, -4.0), (5.0, 0.0), (-5.0, 0.0),
                     (0.0, 5.0), (0.0, -5.0)])
    assert segments.outer_points(ring).tolist() == [[0.0, 5.0], [3.0, 4.0], [5.0, 0.0]]


def test_unloaded_entries_have_no_records() -> None:
    # no force: no fibre is stressed, so no region has a tension or compression check
    ctx = context("hopping_leg")
    loads = ctx.loads[0]
    zero = replace(loads, beam_forces=0.0 * loads.beam_forces)
    assert expand(segments.checks(CheckContext(ctx.case, ctx.built, [zero]))) == []
    assert expand(segments.checks(CheckContext(ctx.case, ctx.built, [loads])))


@settings(max_examples=25, deadline=None)
@given(N=st.lists(loads_, min_size=1, max_size=4), My=loads_, Mz=loads_)
def test_region_extremes_of_arrays_are_each_entry(N: list[float], My: float, Mz: float) -> None:
    ps = first_section(context("hopping_leg"))
    n = np.array(N)
    for region in ps.regions:
        low, high = segments.region_extremes(ps, region, n, np.full_like(n, My),
                                             np.full_like(n, -Mz))
        for k, v in enumerate(N):
            lo, hi = segments.region_extremes(ps, region, v, My, Mz)  # a moment's sign: same
            assert (low[k], high[k]) == (lo, hi)
            assert lo <= hi


@settings(max_examples=25, deadline=None)
@given(e0=st.floats(-1e-2, 1e-2), ky=st.floats(-1e-3, 1e-3), kz=st.floats(-1e-3, 1e-3))
def test_stress_range_of_arrays_is_its_range_of_floats(e0: float, ky: float, kz: float) -> None:
    ps = first_section(context("hopping_leg"))
    for region in ps.regions:
        low, high = region.stress_range(np.array([e0, -e0]), np.array([ky, ky]),
                                        np.array([kz, 0.0]))
        assert (low[0], high[0]) == region.stress_range(e0, ky, kz)
        assert (low[1], high[1]) == region.stress_range(-e0, ky, 0.0)


@settings(max_examples=20, deadline=None)
@given(scale=st.floats(1e-3, 1e3), case=st.sampled_from(CASES))
def test_demands_scale_with_the_loads(scale: float, case: str) -> None:
    ctx = context(case)
    loads = ctx.loads[0]
    scaled = replace(loads, beam_forces=scale * loads.beam_forces)
    base = segments.checks(CheckContext(ctx.case, ctx.built, [loads]))
    rows = segments.checks(CheckContext(ctx.case, ctx.built, [scaled]))
    for a, b in zip(base, rows, strict=True):
        assert np.array_equal(a.mask, b.mask)
        np.testing.assert_allclose(b.demand, scale * a.demand, rtol=1e-12, atol=0.0)
        assert b.capacity == a.capacity


def test_reversed_loads_swap_tension_and_compression() -> None:
    ctx = context("five_bar_leg")
    loads = ctx.loads[0]
    back = replace(loads, beam_forces=-loads.beam_forces)
    rows = segments.checks(CheckContext(ctx.case, ctx.built, [loads]))
    flipped = segments.checks(CheckContext(ctx.case, ctx.built, [back]))
    # rows come as (tension, compression) per region: reversing the loads swaps each pair
    for k in range(0, len(rows), 2):
        t, c = rows[k], rows[k + 1]
        assert "tension" in t.mode and "compression" in c.mode
        np.testing.assert_allclose(flipped[k].demand, c.demand, rtol=1e-12, atol=1e-12)
        np.testing.assert_allclose(flipped[k + 1].demand, t.demand, rtol=1e-12, atol=1e-12)

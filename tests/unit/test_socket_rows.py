"""Socket checks over a batch of poses: the rows of a stacked load set give, entry by entry,
the records of each set alone; every demand is of degree one in the forces; the formula
functions take arrays element by element.

The closed forms (τ = F/(πdL), 2T/(πd²L), Volkersen's peak factor, p = 4V/(dL) + 6M/(dL²)) are
checked against their sources in tests/verification/test_socket_checks.py; here only their
batching is tested, so no further source is needed.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.checks import sockets
from stiff.checks.base import CheckRows, expand
from stiff.checks.context import CheckContext, LoadSet, stack_loads
from tests.demo_contexts import FIVE_BAR, HOPPING, context_of

BONDED_THIGH = ('socket = { tube = "thigh", engagement_mm = 20.0, fixing = "bonded", '
                'adhesive = "epoxy" }')


def _clamped_hopping() -> str:
    """The hopping leg with its thigh clamped (a pultruded tube) at 400 N, friction 0.3."""
    text = HOPPING.replace(BONDED_THIGH, 'socket = { tube = "thigh", engagement_mm = 20.0, '
                           'fixing = "clamped", clamp_force_N = 400.0, friction = 0.3 }', 1)
    assert text != HOPPING
    return text.replace('material = "CF-roll-wrapped"', 'material = "CF-pultruded"')


CASES = {"hopping": HOPPING, "five_bar": FIVE_BAR, "clamped": _clamped_hopping()}


@pytest.fixture(scope="module", params=sorted(CASES))
def ctx(request: pytest.FixtureRequest) -> CheckContext:
    return context_of(CASES[request.param])


def _with(ctx: CheckContext, loads: LoadSet) -> CheckContext:
    return CheckContext(ctx.case, ctx.built, [loads])


def _renamed(sets: list[LoadSet], name: str) -> list[LoadSet]:
    return [dataclasses.replace(s, name=name) for s in sets]


def _same_record_or_none(stacked: CheckRows, j: int, alone: CheckRows) -> None:
    assert stacked.mask[j] == alone.mask[0]
    if alone.mask[0]:
        assert stacked.record(j) == alone.record(0)


def test_a_stack_gives_each_sets_records(ctx: CheckContext) -> None:
    """Every load set with a free foot (and, apart, every one with the foot held), named as
    one load case, plus a copy of the first with no force at all: stacked, entry j of every
    row is the record of set j checked alone, or absent where it is absent alone."""
    for held in (False, True):
        group = [s for s in ctx.loads if s.foot_held == held]
        if not group:
            continue
        zero = dataclasses.replace(group[0], beam_forces=np.zeros_like(group[0].beam_forces))
        sets = _renamed([*group, zero], group[0].name)
        rows = sockets.checks(_with(ctx, stack_loads(sets)))
        assert rows and all(r.size == len(sets) for r in rows)
        for j, s in enumerate(sets):
            alone = sockets.checks(_with(ctx, s))
            assert len(alone) == len(rows)
            for stacked, one in zip(rows, alone, strict=True):
                _same_record_or_none(stacked, j, one)
        assert not any(r.mask[-1] for r in rows)  # no force: no socket record


def test_rows_of_one_pose_are_the_records(ctx: CheckContext) -> None:
    """B = 1: every row applies or not as its demand is above zero, and the records are the
    applying rows in order, each with a finite positive capacity."""
    rows = sockets.checks(ctx)
    records = expand(rows)
    assert records == [r.record(0) for r in rows if r.mask[0]]
    assert all(r.demand > 0.0 and math.isfinite(r.demand) and r.capacity > 0.0 for r in records)
    assert {r.load_case for r in records} <= {s.name for s in ctx.loads}


@settings(max_examples=25, deadline=None)
@given(scale=st.floats(-50.0, 50.0).filter(lambda c: abs(c) > 1e-3))
def test_every_demand_is_of_degree_one_in_the_forces(hopping: CheckContext,
                                                     scale: float) -> None:
    """Shear stresses, slip force and pry pressure are all linear in the member forces'
    magnitudes: forces times c give demands times |c|, the same capacities and masks."""
    base = hopping.loads[0]
    scaled = dataclasses.replace(base, beam_forces=scale * base.beam_forces)
    for a, b in zip(sockets.checks(_with(hopping, base)), sockets.checks(_with(hopping, scaled)),
                    strict=True):
        assert b.demand == pytest.approx(abs(scale) * a.demand, rel=1e-12)
        assert np.all(b.capacity == a.capacity) and np.array_equal(b.mask, a.mask)


positive = st.floats(1e-2, 1e4)


@settings(max_examples=50, deadline=None)
@given(st.lists(st.tuples(positive, positive, positive, positive, positive), min_size=1,
                max_size=8))
def test_formulas_on_arrays_are_the_formulas_of_each_entry(
        values: list[tuple[float, float, float, float, float]]) -> None:
    """Each formula over arrays equals its value at each entry, and Volkersen's peak factor is
    at least 1 and the same whichever adherend is called the first."""
    a, b, c, d, e = (np.array(v) for v in zip(*values, strict=True))
    G, eta = 900.0 * a / a.max(), 0.1 * b / b.max()  # adhesive and bondline of the order used
    lengths = 1.0 + 30.0 * e / e.max()
    arrays = {
        "average": sockets.average_bond_shear(a - b, c, lengths),
        "torsion": sockets.torsion_bond_shear(a - b, c, lengths),
        "omega": sockets.volkersen_omega(G, eta, c, d),
        "peak": sockets.volkersen_peak_factor(G, eta, c, d, lengths),
        "pry": sockets.pry_bearing_pressure(a - b, d - c, c, lengths),
    }
    for i in range(len(values)):
        one = {
            "average": sockets.average_bond_shear(a[i] - b[i], c[i], lengths[i]),
            "torsion": sockets.torsion_bond_shear(a[i] - b[i], c[i], lengths[i]),
            "omega": sockets.volkersen_omega(G[i], eta[i], c[i], d[i]),
            "peak": sockets.volkersen_peak_factor(G[i], eta[i], c[i], d[i], lengths[i]),
            "pry": sockets.pry_bearing_pressure(a[i] - b[i], d[i] - c[i], c[i], lengths[i]),
        }
        for name, value in one.items():
            assert arrays[name][i] == pytest.approx(float(value), rel=1e-14), name
    swapped = sockets.volkersen_peak_factor(G, eta, d, c, lengths)
    assert np.array_equal(swapped, arrays["peak"])
    assert np.all(arrays["peak"] >= 1.0 - 1e-12)

"""The closed-form landing over a batch of legs, against scipy's ``solve_ivp`` as an oracle.

The oracle integrates m ẍ = m g − F(x) − c ẋ stage by stage (DOP853, rtol 1e-12), stopping at
each stage's end so the kink in F(x) is never stepped over, with events where the velocity
turns negative, where the stroke reaches the next stage and where the foot force
F(x) + c ẋ turns (s ẋ + c ẍ = 0). Its peak is the largest force at those points.

Closed forms used inline:
- Critically damped oscillator under a suddenly applied constant force from rest (e.g.
  Meirovitch, *Fundamentals of Vibrations*, 2001, §3.1, from memory):
  x = δ (1 − (1 + ωt) e^{−ωt}), so F + c ẋ = m g (1 + (ωt − 1) e^{−ωt}), greatest at ωt = 2,
  m g (1 + e^{−2}); the mass settles on δ without stopping first.
- Drop onto a linear spring without damping: Gere & Goodno, *Mechanics of Materials*, 7th ed.,
  §2.8, Eq. 2-53.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from stiff.landing import (
    ForceCurve,
    Stage,
    curve_arrays,
    impact_deflection,
    simulate_landing,
    simulate_landings,
)
from stiff.units import G_MM_PER_S2

G = G_MM_PER_S2


@dataclass(frozen=True)
class Oracle:
    peak_N: float
    stroke_mm: float
    time_stop_s: float
    last_stage: int
    stopped: bool


def oracle(mass: float, height: float, curve: ForceCurve, zeta: float,
           horizon_s: float = 3.0) -> Oracle:
    """The landing by numerical integration, stage by stage (a stop not reached within the
    horizon counts as no stop)."""
    stages = curve.stages
    c = 2.0 * zeta * math.sqrt(stages[0].slope_N_per_mm * mass)
    t, x, v = 0.0, 0.0, math.sqrt(2.0 * G * height)
    peak = -math.inf
    for i, s in enumerate(stages):
        nxt = stages[i + 1].start_mm if i + 1 < len(stages) else math.inf
        f0, k, x0 = s.force_N, s.slope_N_per_mm, s.start_mm

        def rhs(_t: float, y: np.ndarray, f0: float = f0, k: float = k,
                x0: float = x0) -> list[float]:
            return [y[1], G - (f0 + k * (y[0] - x0) + c * y[1]) / mass]

        def stop(_t: float, y: np.ndarray) -> float:
            return float(y[1])

        def reach(_t: float, y: np.ndarray, nxt: float = nxt) -> float:
            return float(y[0] - nxt) if math.isfinite(nxt) else 1.0

        def turn(_t: float, y: np.ndarray, k: float = k, f0: float = f0,
                 x0: float = x0) -> float:
            acc = G - (f0 + k * (y[0] - x0) + c * y[1]) / mass
            return k * y[1] + c * acc

        stop.terminal, stop.direction = True, -1  # type: ignore[attr-defined]
        reach.terminal, reach.direction = True, 1  # type: ignore[attr-defined]

        def force(y: np.ndarray, f0: float = f0, k: float = k, x0: float = x0) -> float:
            return float(f0 + k * (y[0] - x0) + c * y[1])

        peak = max(peak, force(np.array([x, v])))
        # short steps, so that no rise past the next start and back is skipped
        max_step = 2.0 * math.pi * math.sqrt(mass / stages[0].slope_N_per_mm) / 100.0
        if math.isfinite(nxt) and x >= nxt:
            continue
        if v <= 0.0 and G - (f0 + k * (x - x0)) / mass <= 0.0:
            return Oracle(peak, x, t, i, True)
        sol = solve_ivp(rhs, (t, horizon_s), [x, v], method="DOP853", rtol=1e-12,
                        atol=[1e-12, 1e-9], events=[stop, reach, turn],
                        max_step=max_step)
        for ys in sol.y_events[2]:
            peak = max(peak, force(ys))
        y_end = sol.y[:, -1]
        peak = max(peak, force(y_end))
        if sol.t_events[0].size:
            return Oracle(peak, float(sol.y_events[0][0][0]), float(sol.t_events[0][0]), i,
                          True)
        if not sol.t_events[1].size:
            return Oracle(peak, float(y_end[0]), float(sol.t[-1]), i, False)
        t, x, v = float(sol.t_events[1][0]), nxt, float(sol.y_events[1][0][1])
    raise AssertionError("the last stage is endless")


def batch_of(mass: float, height: float, curve: ForceCurve, zeta: float):  # type: ignore[no-untyped-def]
    starts, forces, slopes = curve_arrays([curve])
    return simulate_landings(mass, height, starts, forces, slopes, zeta)


@st.composite
def legs(draw: st.DrawFn, damped: bool) -> tuple[float, float, ForceCurve, float]:
    """A mass, a drop and a continuous curve: elastic, then stages softer or stiffer."""
    mass = draw(st.floats(1e-4, 2e-3))
    height = draw(st.floats(0.0, 100.0))
    k = draw(st.floats(5.0, 100.0))
    weight = mass * G
    stages = [Stage(0.0, 0.0, k, "elastic")]
    for i in range(draw(st.integers(0, 3))):
        prev = stages[-1]
        length = draw(st.floats(0.1, 3.0)) * weight / k
        slope = draw(st.sampled_from([0.0, 1.0])) * draw(st.floats(0.01, 2.0)) * k
        start = prev.start_mm + length
        stages.append(Stage(start, prev.force_N + prev.slope_N_per_mm * length, slope,
                            f"stage {i + 1}"))
    last = stages[-1]
    if last.slope_N_per_mm == 0.0 and last.force_N < 1.5 * weight:
        # a flat last stage must hold the weight clearly (else the oracle's horizon decides
        # whether the mass stops): give it a slope instead
        stages[-1] = Stage(last.start_mm, last.force_N, 0.2 * k, last.event)
    for a, b in itertools.pairwise(stages):
        # no stage's rest position on the next stage's start: which stage the mass settles
        # in is then decided by rounding, in both solvers
        if a.slope_N_per_mm > 0:
            rest = a.start_mm + (weight - a.force_N) / a.slope_N_per_mm
            assume(abs(rest - b.start_mm) > 1e-6 * b.start_mm)
    zeta = draw(st.floats(0.0, 1.5)) if damped else 0.0
    return mass, height, ForceCurve(tuple(stages)), zeta


def compare(mass: float, height: float, curve: ForceCurve, zeta: float) -> None:
    ref = oracle(mass, height, curve, zeta)
    got = batch_of(mass, height, curve, zeta)
    # the oracle integrates to rtol 1e-12 per stage; its event location is the limit
    assert got.peak_N[0] == pytest.approx(ref.peak_N, rel=1e-8)
    if got.stopped[0] and not ref.stopped:
        # settling without stopping (or stopping after an overshoot too small for the
        # integrator's tolerance): the oracle still creeps towards the rest position
        assert ref.stroke_mm <= got.stroke_mm[0] * (1 + 1e-9)
        assert ref.last_stage == got.last_stage[0]
        return
    assert got.stopped[0] == ref.stopped
    if math.isfinite(got.time_stop_s[0]):
        assert got.stroke_mm[0] == pytest.approx(ref.stroke_mm, rel=1e-8)
        assert got.time_stop_s[0] == pytest.approx(ref.time_stop_s, rel=1e-7)
    starts = np.array([s.start_mm for s in curve.stages])
    if np.min(np.abs(starts - ref.stroke_mm)) > 1e-6 * ref.stroke_mm:  # clear of a boundary
        assert got.last_stage[0] == ref.last_stage


@settings(max_examples=40, deadline=None)
@given(legs(damped=False))
def test_undamped_matches_the_integrator(leg: tuple[float, float, ForceCurve, float]) -> None:
    compare(*leg)


@settings(max_examples=25, deadline=None)
@given(legs(damped=True))
def test_damped_matches_the_integrator(leg: tuple[float, float, ForceCurve, float]) -> None:
    compare(*leg)


def test_a_batch_gives_what_each_leg_gives_alone() -> None:
    rng = np.random.default_rng(7)  # demo curves
    curves, masses, heights, zetas = [], rng.uniform(2e-4, 2e-3, 40), rng.uniform(0, 80, 40), \
        rng.choice([0.0, 0.1, 0.7, 1.0, 2.0], 40)
    for b in range(40):
        k = rng.uniform(10.0, 60.0)
        x1 = rng.uniform(0.2, 1.5)
        stages = [Stage(0.0, 0.0, k, "elastic")]
        if b % 3:
            stages.append(Stage(x1, k * x1, rng.choice([0.0, 0.2 * k]), "stall"))
        if b % 3 == 2:
            stages.append(Stage(x1 + 2.0, stages[-1].force_N + 2.0 * stages[-1].slope_N_per_mm,
                                k, "bottoms out"))
        curves.append(ForceCurve(tuple(stages)))
    starts, forces, slopes = curve_arrays(curves)
    batch = simulate_landings(masses, heights, starts, forces, slopes, zetas)
    for b, curve in enumerate(curves):
        one = batch_of(float(masses[b]), float(heights[b]), curve, float(zetas[b]))
        land = simulate_landing(float(masses[b]), float(heights[b]), curve, float(zetas[b]))
        for name in ("peak_N", "stroke_mm", "time_to_peak_s", "time_stop_s"):
            assert getattr(batch, name)[b] == pytest.approx(getattr(one, name)[0], rel=1e-12)
        assert batch.last_stage[b] == one.last_stage[0]
        assert batch.stopped[b] == one.stopped[0]
        assert land.peak_N == batch.peak_N[b]
        assert max(land.force_N) <= land.peak_N * (1 + 1e-12)  # samples never beat the peak


@pytest.mark.parametrize("height", [5.0, 40.0, 200.0])
def test_elastic_drop_agrees_with_the_energy_method(height: float) -> None:
    mass, k = 0.5e-3, 30.0  # t, N/mm
    got = batch_of(mass, height, ForceCurve((Stage(0.0, 0.0, k, "elastic"),)), 0.0)
    d_max, _ = impact_deflection(mass * G, height, k)
    assert got.stroke_mm[0] == pytest.approx(d_max, rel=1e-12)
    assert got.peak_N[0] == pytest.approx(k * d_max, rel=1e-12)
    assert got.time_to_peak_s[0] == got.time_stop_s[0]


def test_a_leg_whose_last_stage_cannot_hold_the_weight_does_not_stop() -> None:
    mass, k = 1e-3, 30.0  # weight 9.81 N; the flat stage holds 6 N
    curve = ForceCurve((Stage(0.0, 0.0, k, "elastic"), Stage(0.2, 6.0, 0.0, "stall")))
    for zeta in (0.0, 0.3):
        got = batch_of(mass, 20.0, curve, zeta)
        assert not got.stopped[0] and got.last_stage[0] == 1
        assert math.isinf(got.stroke_mm[0]) and math.isinf(got.time_stop_s[0])
        ref = oracle(mass, 20.0, curve, zeta)
        assert not ref.stopped
        assert got.peak_N[0] == pytest.approx(ref.peak_N, rel=1e-8)
        land = simulate_landing(mass, 20.0, curve, zeta)
        assert any("does not stop the fall" in e for e in land.events)
        assert math.isfinite(land.stroke_mm)


def test_critically_damped_step_settles_with_peak_one_plus_e_minus_two() -> None:
    mass, k = 1e-3, 40.0
    curve = ForceCurve((Stage(0.0, 0.0, k, "elastic"),))
    got = batch_of(mass, 0.0, curve, 1.0)
    omega = math.sqrt(k / mass)
    assert got.stopped[0] and math.isinf(got.time_stop_s[0])
    assert got.stroke_mm[0] == pytest.approx(mass * G / k, rel=1e-12)
    assert got.peak_N[0] == pytest.approx(mass * G * (1 + math.exp(-2.0)), rel=1e-12)
    assert got.time_to_peak_s[0] == pytest.approx(2.0 / omega, rel=1e-6)


@pytest.mark.parametrize("zeta", [1.0, 1.0 + 1e-9, 1.0 - 1e-9, 1.6, 4.0])
@pytest.mark.parametrize("height", [0.5, 30.0])
def test_critical_and_overdamped_drops_match_the_integrator(zeta: float, height: float) -> None:
    mass, k = 1e-3, 40.0
    curve = ForceCurve((Stage(0.0, 0.0, k, "elastic"), Stage(0.5, 20.0, 4.0, "stall"),
                        Stage(3.0, 30.0, k, "bottoms out")))
    ref = oracle(mass, height, curve, zeta)
    got = batch_of(mass, height, curve, zeta)
    assert got.peak_N[0] == pytest.approx(ref.peak_N, rel=1e-8)
    assert got.last_stage[0] == ref.last_stage
    if math.isfinite(got.time_stop_s[0]):
        assert got.stroke_mm[0] == pytest.approx(ref.stroke_mm, rel=1e-8)


def test_padding_and_bad_curves() -> None:
    starts, _, _ = curve_arrays([
        ForceCurve((Stage(0.0, 0.0, 30.0, "elastic"),)),
        ForceCurve((Stage(0.0, 0.0, 30.0, "elastic"), Stage(1.0, 30.0, 0.0, "stall")))])
    assert math.isinf(starts[0, 1])
    with pytest.raises(ValueError, match="must not decrease"):
        simulate_landings(1e-3, 10.0, np.array([[0.0, 2.0, 1.0]]), np.array([[0.0, 60.0, 30.0]]),
                          np.array([[30.0, 0.0, 30.0]]))

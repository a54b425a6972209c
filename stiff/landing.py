"""Landing impact: how hard the ground hits the foot after a drop.

Energy method (Gere & Goodno, *Mechanics of Materials*, 7th ed., §2.8, Eqs 2-53, 2-55; §9.10):
a mass m dropped from h onto a linear spring k has static deflection δ_st = m g / k and
maximum deflection δ_max = δ_st (1 + √(1 + 2h/δ_st)), so the peak force is k δ_max and the
impact factor δ_max/δ_st (2 for a suddenly applied load, h = 0).

Time domain: the same mass, touching down at v0 = √(2 g h), on the leg's force-stroke curve
F(x), with viscous damping c = 2ζ√(k m): m ẍ = m g − F(x) − c ẋ. The curve is elastic
(slope k) until the first actuator reaches its stall torque; from there that joint yields at
constant torque and the leg carries further stroke only with what is left (the other
actuators, springs and structure: slope k₂, possibly 0), and so on for each actuator in turn;
when a yielding joint reaches its angle limit the leg bottoms out and stiffens to k again.
Solved with scipy's ``solve_ivp`` until the mass stops moving down.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp

from stiff.units import G_MM_PER_S2


def impact_deflection(weight: float, height: float, k: float) -> tuple[float, float]:
    """(δ_max, impact factor δ_max/δ_st) of a weight dropped from a height onto a spring k.

    Any consistent units (weight in force, height in length, k in force/length).
    """
    d_st = weight / k
    factor = 1.0 + math.sqrt(1.0 + 2.0 * height / d_st)
    return d_st * factor, factor


@dataclass(frozen=True)
class Stage:
    """A straight piece of the leg's force-stroke curve, from stroke ``start_mm`` on."""

    start_mm: float
    force_N: float  # force at the start of the stage
    slope_N_per_mm: float
    event: str  # what began this stage ("elastic", "hip_servo stalls", "bottoms out")


@dataclass(frozen=True)
class ForceCurve:
    """The leg's force at the foot as a function of its stroke: piecewise linear."""

    stages: tuple[Stage, ...]

    def force(self, x_mm: float) -> float:
        """Force [N] at stroke x [mm] (0 for x ≤ 0: the foot has left the ground)."""
        if x_mm <= 0.0:
            return 0.0
        stage = self.stages[0]
        for s in self.stages:
            if x_mm >= s.start_mm:
                stage = s
        return stage.force_N + stage.slope_N_per_mm * (x_mm - stage.start_mm)

    def stage_at(self, x_mm: float) -> Stage:
        """The stage the stroke x [mm] is in."""
        stage = self.stages[0]
        for s in self.stages:
            if x_mm >= s.start_mm:
                stage = s
        return stage


@dataclass(frozen=True)
class LandingResult:
    """What a landing does to one leg."""

    mass_t: float  # mass landing on this leg
    drop_height_mm: float
    touchdown_speed_mm_per_s: float
    stiffness_N_per_mm: float  # the leg's initial vertical stiffness (with any foot pad)
    energy_peak_N: float  # elastic energy-method peak force
    energy_stroke_mm: float
    peak_N: float  # time-domain peak force
    stroke_mm: float  # time-domain maximum stroke
    time_to_peak_s: float
    events: tuple[str, ...]  # stages entered during the landing (saturation, bottoming out)
    damping_ratio: float
    time_s: tuple[float, ...]  # the force and stroke histories, for plots
    force_N: tuple[float, ...]
    history_stroke_mm: tuple[float, ...]

    @property
    def weight_N(self) -> float:
        """Weight of the mass landing on this leg [N]."""
        return self.mass_t * G_MM_PER_S2

    @property
    def peak_over_weight(self) -> float:
        """Peak force as a multiple of the weight on this leg."""
        return self.peak_N / self.weight_N


def simulate_landing(mass_t: float, drop_height_mm: float, curve: ForceCurve,
                     damping_ratio: float = 0.0) -> LandingResult:
    """Drop a mass [t] from a height [mm] onto a leg with force-stroke curve ``curve``."""
    k = curve.stages[0].slope_N_per_mm
    g = G_MM_PER_S2
    v0 = math.sqrt(2.0 * g * drop_height_mm)
    c = 2.0 * damping_ratio * math.sqrt(k * mass_t)
    d_max, _ = impact_deflection(mass_t * g, drop_height_mm, k)

    def rhs(_t: float, y: np.ndarray) -> list[float]:
        x, v = y
        return [v, g - (curve.force(x) + c * v) / mass_t]

    def stopped(_t: float, y: np.ndarray) -> float:
        return float(y[1])

    stopped.terminal = True  # type: ignore[attr-defined]
    stopped.direction = -1  # type: ignore[attr-defined]
    period = 2 * math.pi * math.sqrt(mass_t / k)
    t_end = 50.0 * period + 10.0 * v0 / g + 1.0
    sol = solve_ivp(rhs, (0.0, t_end), [0.0, v0], events=stopped, max_step=period / 200.0,
                    rtol=1e-10, atol=1e-12 * max(d_max, 1e-9), dense_output=True)
    t_events = sol.t_events or [np.zeros(0)]
    y_events = sol.y_events or [np.zeros((0, 2))]
    if t_events[0].size:
        t_stop = float(t_events[0][0])
        x_stop = float(y_events[0][0][0])
    else:
        t_stop, x_stop = float(sol.t[-1]), float(sol.y[0, -1])
    times = np.linspace(0.0, t_stop, 200)
    dense = sol.sol
    if dense is None:  # solve_ivp returns it whenever dense_output=True
        raise RuntimeError("the landing integration returned no solution")
    xs, vs = dense(times)
    forces = np.array([curve.force(float(x)) for x in xs]) + c * vs
    i_peak = int(np.argmax(forces))
    peak = max(float(forces[i_peak]), curve.force(x_stop))
    events = []
    for s in curve.stages[1:]:
        if x_stop >= s.start_mm:
            events.append(s.event)
    last = curve.stage_at(x_stop)
    if not sol.t_events or not sol.t_events[0].size:
        events.append(f"the leg does not stop the fall: past {last.start_mm:.3g} mm of stroke "
                      f"it holds only {last.force_N:.3g} N against the "
                      f"{mass_t * g:.3g} N weight")
    return LandingResult(
        mass_t=mass_t, drop_height_mm=drop_height_mm, touchdown_speed_mm_per_s=v0,
        stiffness_N_per_mm=k, energy_peak_N=k * d_max, energy_stroke_mm=d_max,
        peak_N=peak, stroke_mm=x_stop,
        time_to_peak_s=float(times[i_peak]) if forces[i_peak] >= peak else t_stop,
        events=tuple(events), damping_ratio=damping_ratio,
        time_s=tuple(float(t) for t in times), force_N=tuple(float(f) for f in forces),
        history_stroke_mm=tuple(float(x) for x in xs))

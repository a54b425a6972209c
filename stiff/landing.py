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

Within one stage the force is F₀ + s (x − x₀), so the motion is a linear ODE with constant
coefficients, m ẍ + c ẋ + s x = m g − F₀ + s x₀, solved in closed form (e.g. Meirovitch,
*Fundamentals of Vibrations*, 2001, §2.1 and §3.1, from memory). With σ = c/2m, ω₀² = s/m,
q = ω₀² − σ², y = x − x_eq (x_eq = x₀ + (m g − F₀)/s the stage's equilibrium), the state
transition is, for every damping (Cayley–Hamilton on the 2 × 2 system matrix),

    y(τ) = Φ(τ) y(0) + Ψ(τ) (σ y(0) + ẏ(0)),   ẏ(τ) = Φ(τ) ẏ(0) − Ψ(τ) (ω₀² y(0) + σ ẏ(0)),

with Φ = e^{−στ} cos ωτ, Ψ = e^{−στ} sin(ωτ)/ω when underdamped (ω = √q), Φ = e^{−στ},
Ψ = τ e^{−στ} when critically damped and Φ = e^{−στ} cosh βτ, Ψ = e^{−στ} sinh(βτ)/β when
overdamped (β = √−q, evaluated without overflow as decaying exponentials). A flat stage
(s = 0) has the velocity relax exponentially to (m g − F₀)/c (uniform acceleration when
c = 0). A stage ends when ẋ = 0 (analytic) or when x reaches the next stage's start
(analytic without damping; with damping a bracketed Newton iteration, x rising while ẋ > 0).
The legs of a batch march through their stages together: arrays over the legs, a loop over
the stages; the motion within one stage is in :mod:`stiff.landing_stage`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.landing_stage import Piece, first_zero, reach_point, state_at, stop_point
from stiff.units import G_MM_PER_S2

FloatArray = npt.NDArray[np.float64]
ArrayLike = float | Sequence[float] | FloatArray



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

    def arrays(self) -> tuple[FloatArray, FloatArray, FloatArray]:
        """(starts [mm], forces [N], slopes [N/mm]) of the stages, each (S,)."""
        return (np.array([s.start_mm for s in self.stages]),
                np.array([s.force_N for s in self.stages]),
                np.array([s.slope_N_per_mm for s in self.stages]))

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


def curve_arrays(curves: Sequence[ForceCurve]) -> tuple[FloatArray, FloatArray, FloatArray]:
    """(starts [mm], forces [N], slopes [N/mm]) of many curves, each (B, S).

    Curves with fewer than S stages are padded with stages that start at infinity (never
    reached) with zero force and slope.
    """
    n = max(len(c.stages) for c in curves)
    starts = np.full((len(curves), n), np.inf)
    forces = np.zeros((len(curves), n))
    slopes = np.zeros((len(curves), n))
    for b, curve in enumerate(curves):
        s, f, k = curve.arrays()
        starts[b, :s.size], forces[b, :s.size], slopes[b, :s.size] = s, f, k
    return starts, forces, slopes


@dataclass(frozen=True)
class LandingBatch:
    """What a landing does to each of B legs: arrays (B,).

    ``peak_N`` is the exact supremum of the foot force F(x) + c ẋ over the whole landing,
    found per stage from its ends and the one turning point of the force inside it (where
    s ẋ + c ẍ = 0, analytic); ``time_to_peak_s`` is when it is first reached. A leg that
    settles onto an equilibrium without its velocity ever reaching zero (overdamped or
    critically damped approach) has ``stopped`` True, ``stroke_mm`` at that equilibrium and
    ``time_stop_s`` infinite. A leg that does not stop the fall (its last stage reached holds
    less than the weight and has no slope, or holds exactly the weight without damping) has
    ``stopped`` False and infinite stroke and stop time; its peak is then the larger of the
    force reached before and the force it tends to.
    """

    peak_N: FloatArray
    stroke_mm: FloatArray  # stroke where the mass stops moving down
    time_to_peak_s: FloatArray
    time_stop_s: FloatArray
    last_stage: npt.NDArray[np.int64]  # index of the last stage reached
    stopped: npt.NDArray[np.bool_]  # True when the leg stops the fall


#: Damping ratios below this are taken as zero (their effect is below round-off).
NEGLIGIBLE_DAMPING = 1e-12


def _march(mass_t: ArrayLike, drop_height_mm: ArrayLike, starts_mm: FloatArray,
           forces_N: FloatArray, slopes_N_per_mm: FloatArray,
           damping_ratio: ArrayLike) -> tuple[LandingBatch, _Entries]:
    """The landing of every leg, stage by stage, and where each stage was entered."""
    starts = np.atleast_2d(np.asarray(starts_mm, dtype=float))
    forces = np.atleast_2d(np.asarray(forces_N, dtype=float))
    slopes = np.atleast_2d(np.asarray(slopes_N_per_mm, dtype=float))
    n, n_stages = starts.shape
    m = np.broadcast_to(np.asarray(mass_t, dtype=float), (n,)).copy()
    h = np.broadcast_to(np.asarray(drop_height_mm, dtype=float), (n,))
    zeta = np.broadcast_to(np.asarray(damping_ratio, dtype=float), (n,))
    _check_inputs(m, h, zeta, starts, forces, slopes)
    # a damping ratio below NEGLIGIBLE_DAMPING changes nothing measurable and would only
    # overflow the damped closed forms (m v / c): taken as none
    zeta = np.where(zeta < NEGLIGIBLE_DAMPING, 0.0, zeta)
    c = 2.0 * zeta * np.sqrt(slopes[:, 0] * m)
    t, x, v = np.zeros(n), np.zeros(n), np.sqrt(2.0 * G_MM_PER_S2 * h)
    entries = _Entries(np.full((n, n_stages), np.nan), np.full((n, n_stages), np.nan),
                       np.full((n, n_stages), np.nan), c, starts, forces, slopes, m)
    peak, t_peak = np.full(n, -np.inf), np.zeros(n)
    stroke, t_stop = np.zeros(n), np.zeros(n)
    last = np.zeros(n, dtype=np.int64)
    live = np.arange(n)
    for i in range(n_stages):
        if live.size == 0:
            break
        entries.time_s[live, i], entries.stroke_mm[live, i] = t[live], x[live]
        entries.speed_mm_per_s[live, i] = v[live]
        last[live] = i
        p = Piece(m[live], c[live], slopes[live, i], forces[live, i], starts[live, i],
                   x[live], v[live])
        nxt = starts[live, i + 1] if i + 1 < n_stages else np.full(live.size, np.inf)
        end = _stage_end(p, nxt)
        for force, tau in _force_candidates(p, end):
            better = force > peak[live]
            peak[live] = np.where(better, force, peak[live])
            t_peak[live] = np.where(better, t[live] + tau, t_peak[live])
        done, moved = live[~end.reach], live[end.reach]
        stroke[done], t_stop[done] = end.x[~end.reach], t[done] + end.tau[~end.reach]
        t[moved] += end.tau[end.reach]
        x[moved], v[moved] = end.x[end.reach], end.v[end.reach]
        live = moved
    batch = LandingBatch(peak_N=peak, stroke_mm=stroke, time_to_peak_s=t_peak,
                         time_stop_s=t_stop, last_stage=last, stopped=np.isfinite(stroke))
    return batch, entries


@dataclass(frozen=True)
class _End:
    """Where each leg leaves a stage: after τ [s] at stroke x [mm] and speed v [mm/s],
    into the next stage (reach) or at rest (τ, x infinite when it never stops)."""

    tau: FloatArray
    x: FloatArray
    v: FloatArray
    reach: npt.NDArray[np.bool_]
    settles: npt.NDArray[np.bool_]  # stays in the stage for ever without stopping


def _stage_end(p: Piece, nxt: FloatArray) -> _End:
    """How each leg leaves its stage, the next one starting at ``nxt`` [mm] (∞ for none)."""
    tau_stop, x_stop = stop_point(p)
    endless = ~np.isfinite(tau_stop)
    reach = np.isfinite(nxt) & ((nxt <= p.x0) | np.where(endless, x_stop > nxt, x_stop >= nxt))
    go = reach & (nxt > p.x0)
    skip = reach & ~go
    tau, x, v = tau_stop.copy(), x_stop.copy(), np.zeros_like(x_stop)
    tau[skip], x[skip], v[skip] = 0.0, p.x0[skip], p.v0[skip]
    tau[go], v[go] = reach_point(p.take(go), nxt[go], tau_stop[go])
    x[go] = nxt[go]
    return _End(tau, x, v, reach, endless & ~reach)


def _force_candidates(p: Piece, end: _End) -> list[tuple[FloatArray, FloatArray]]:
    """(force [N], τ [s]) where the stage's foot force can be greatest, in time order: at its
    entry, at the force's turning point inside it, at its end (for a leg that stays in it for
    ever, the force it tends to: the weight with a spring or damping, else F₀)."""
    tau_turn = _turning_point(p)
    inside = tau_turn < end.tau
    f_turn = np.full(p.x0.shape, -np.inf)
    q = p.take(inside)
    f_turn[inside] = q.force(*state_at(q, tau_turn[inside]))
    settled = np.where((p.s > 0) | (p.c > 0), p.m * G_MM_PER_S2, p.f0)
    f_end = np.where(end.settles, settled,
                     p.force(np.where(end.settles, p.x0, end.x), end.v))
    return [(p.force(p.x0, p.v0), np.zeros_like(p.x0)), (f_turn, tau_turn), (f_end, end.tau)]


def _turning_point(p: Piece) -> FloatArray:
    """First τ [s] > 0 where the foot force F(x) + c ẋ turns (s ẋ + c ẍ = 0), or infinity.

    The force rate is itself a free vibration of the stage, so its zero is analytic; it can
    lie inside the stage only with both a spring and damping.
    """
    a0 = p.a0
    j0 = -p.w0sq * p.v0 - 2.0 * p.sigma * a0
    both = (p.s > 0) & (p.c > 0)
    out = np.full(p.x0.shape, np.inf)
    rate0 = p.s * p.v0 + p.c * a0
    out[both] = first_zero(p.sigma[both], p.w0sq[both], rate0[both],
                            (p.s * a0 + p.c * j0)[both])
    return out


@dataclass(frozen=True)
class _Entries:
    """Where each leg entered each stage (NaN where it never did), and its coefficients."""

    time_s: FloatArray  # (B, S)
    stroke_mm: FloatArray  # (B, S)
    speed_mm_per_s: FloatArray  # (B, S)
    damping: FloatArray  # (B,) c [N·s/mm]
    starts: FloatArray  # (B, S)
    forces: FloatArray  # (B, S)
    slopes: FloatArray  # (B, S)
    mass: FloatArray  # (B,)

    def sample(self, leg: int, last: int, times: FloatArray) -> tuple[FloatArray, FloatArray,
                                                                    FloatArray]:
        """(stroke [mm], speed [mm/s], foot force [N]) of one leg at finite times [s]."""
        entered = self.time_s[leg, :last + 1]
        k = np.maximum(np.searchsorted(entered, times, side="right") - 1, 0)
        n = times.size
        p = Piece(np.full(n, self.mass[leg]), np.full(n, self.damping[leg]),
                   self.slopes[leg, k], self.forces[leg, k], self.starts[leg, k],
                   self.stroke_mm[leg, k], self.speed_mm_per_s[leg, k])
        x, v = state_at(p, times - entered[k])
        return x, v, p.force(x, v)


def _check_inputs(m: FloatArray, h: FloatArray, zeta: FloatArray, starts: FloatArray,
                  forces: FloatArray, slopes: FloatArray) -> None:
    """Raise ValueError for arrays a landing cannot be computed from."""
    if not (starts.shape == forces.shape == slopes.shape and starts.shape[1] >= 1):
        raise ValueError(f"starts, forces and slopes must share one (B, S) shape, got "
                         f"{starts.shape}, {forces.shape}, {slopes.shape}")
    if np.any(~(m > 0)) or np.any(~(h >= 0)) or np.any(~(zeta >= 0)):
        raise ValueError("mass must be > 0, drop height and damping ratio >= 0")
    if np.any(~(slopes[:, 0] > 0)) or np.any(~np.isfinite(starts[:, 0])):
        raise ValueError("every leg's first stage needs a finite start and a slope > 0")
    used = np.isfinite(starts)
    if np.any(starts[:, 1:] < starts[:, :-1]) or np.any(used[:, 1:] & ~used[:, :-1]):
        raise ValueError("stage starts must not decrease, padding (inf) only at the end")
    if np.any(~(slopes[used] >= 0)) or np.any(~np.isfinite(forces[used])):
        raise ValueError("stage slopes must be >= 0 and forces finite")


def simulate_landings(mass_t: ArrayLike, drop_height_mm: ArrayLike, starts_mm: FloatArray,
                      forces_N: FloatArray, slopes_N_per_mm: FloatArray,
                      damping_ratio: ArrayLike = 0.0) -> LandingBatch:
    """Drop B masses onto B legs with piecewise-linear force-stroke curves, in closed form.

    Parameters
    ----------
    mass_t : mass landing on each leg [t], scalar or (B,)
    drop_height_mm : drop height [mm], scalar or (B,)
    starts_mm : (B, S) stroke where each stage starts [mm], non-decreasing along S; pad the
        unused stages of a leg with ``inf`` (see :func:`curve_arrays`)
    forces_N : (B, S) force at each stage's start [N]
    slopes_N_per_mm : (B, S) slope of each stage [N/mm], ≥ 0 (the first > 0)
    damping_ratio : ζ, scalar or (B,); the damping c = 2ζ√(k m) with k the first slope

    Returns
    -------
    LandingBatch of arrays (B,). The peak force is exact (the stage ends and the analytic
    turning point of F(x) + c ẋ in each stage), not a maximum over samples.
    """
    return _march(mass_t, drop_height_mm, starts_mm, forces_N, slopes_N_per_mm,
                  damping_ratio)[0]


def _horizon(mass_t: float, k: float, v0: float) -> float:
    """How long [s] to follow a leg that never stops: 50 elastic periods and more."""
    return 50.0 * 2.0 * math.pi * math.sqrt(mass_t / k) + 10.0 * v0 / G_MM_PER_S2 + 1.0


def simulate_landing(mass_t: float, drop_height_mm: float, curve: ForceCurve,
                     damping_ratio: float = 0.0) -> LandingResult:
    """Drop a mass [t] from a height [mm] onto a leg with force-stroke curve ``curve``.

    :func:`simulate_landings` for one leg, with the histories sampled from the closed form
    at 200 times up to the stop (for a leg that never stops, up to a horizon of 50 elastic
    periods plus ten times the fall's duration plus a second; its stroke is the one there).
    """
    starts, forces, slopes = (a[None, :] for a in curve.arrays())
    batch, entries = _march(mass_t, drop_height_mm, starts, forces, slopes, damping_ratio)
    k = curve.stages[0].slope_N_per_mm
    g = G_MM_PER_S2
    v0 = math.sqrt(2.0 * g * drop_height_mm)
    d_max, _ = impact_deflection(mass_t * g, drop_height_mm, k)
    t_stop = float(batch.time_stop_s[0])
    t_end = t_stop if math.isfinite(t_stop) else _horizon(mass_t, k, v0)
    last = int(batch.last_stage[0])
    times = np.linspace(0.0, t_end, 200)
    xs, _, forces_hist = entries.sample(0, last, times)
    stroke = float(batch.stroke_mm[0])
    events = [s.event for s in curve.stages[1:last + 1]]
    if not batch.stopped[0]:
        stage = curve.stages[last]
        events.append(f"the leg does not stop the fall: past {stage.start_mm:.3g} mm of "
                      f"stroke it holds only {stage.force_N:.3g} N against the "
                      f"{mass_t * g:.3g} N weight")
    return LandingResult(
        mass_t=mass_t, drop_height_mm=drop_height_mm, touchdown_speed_mm_per_s=v0,
        stiffness_N_per_mm=k, energy_peak_N=k * d_max, energy_stroke_mm=d_max,
        peak_N=float(batch.peak_N[0]),
        stroke_mm=stroke if math.isfinite(stroke) else float(xs[-1]),
        time_to_peak_s=min(float(batch.time_to_peak_s[0]), t_end),
        events=tuple(events), damping_ratio=damping_ratio,
        time_s=tuple(float(t) for t in times), force_N=tuple(float(f) for f in forces_hist),
        history_stroke_mm=tuple(float(x) for x in xs))

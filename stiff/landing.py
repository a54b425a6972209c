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
the stages.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, fields

import numpy as np
import numpy.typing as npt

from stiff.units import G_MM_PER_S2

FloatArray = npt.NDArray[np.float64]
ArrayLike = float | Sequence[float] | FloatArray

_NEWTON_ITERATIONS = 100  # a cap only: Newton with bisection converges in far fewer
_DOUBLINGS = 200  # cap on widening a search bracket (2^200 times its first guess)


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


@dataclass(frozen=True)
class _Piece:
    """One stage of n legs, as arrays (n,): coefficients and the state entering it."""

    m: FloatArray  # mass [t]
    c: FloatArray  # damping [N·s/mm]
    s: FloatArray  # slope [N/mm]
    f0: FloatArray  # force [N] at stroke x_ref
    x_ref: FloatArray  # start of the stage [mm]
    x0: FloatArray  # stroke entering it [mm]
    v0: FloatArray  # speed entering it [mm/s]

    def take(self, which: npt.NDArray[np.bool_] | npt.NDArray[np.intp]) -> _Piece:
        """The legs ``which`` (a mask or indices)."""
        return _Piece(*(getattr(self, f.name)[which] for f in fields(self)))

    @property
    def sigma(self) -> FloatArray:
        """σ = c / 2m [1/s]."""
        return self.c / (2.0 * self.m)

    @property
    def w0sq(self) -> FloatArray:
        """ω₀² = s / m [1/s²]."""
        return self.s / self.m

    @property
    def net(self) -> FloatArray:
        """m g − F₀ [N]: the net force at the stage's start without damping."""
        return self.m * G_MM_PER_S2 - self.f0

    @property
    def a0(self) -> FloatArray:
        """Acceleration [mm/s²] entering the stage."""
        return (self.net - self.s * (self.x0 - self.x_ref) - self.c * self.v0) / self.m

    def force(self, x: FloatArray, v: FloatArray) -> FloatArray:
        """Foot force F(x) + c ẋ [N] at stroke x [mm], speed v [mm/s]."""
        return self.f0 + self.s * (x - self.x_ref) + self.c * v


def _detuning(sigma: FloatArray, w0sq: FloatArray) -> FloatArray:
    """q = ω₀² − σ² [1/s²], 0 within 1e-10 ω₀² of critical damping.

    Treating such a stage as critically damped changes its motion over its own time scale
    by about 1e-10 relative; it keeps ζ = 1 computed with rounding from a "stop" after an
    astronomically long half period of ω = √q.
    """
    q = w0sq - sigma**2
    return np.where(np.abs(q) <= 1e-10 * w0sq, 0.0, q)


def _basis(sigma: FloatArray, w0sq: FloatArray, tau: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(Φ, Ψ) of ÿ + 2σẏ + ω₀²y = 0 at times τ ≥ 0 (finite), for any damping."""
    q = _detuning(sigma, w0sq)
    phi, psi = np.empty_like(tau), np.empty_like(tau)
    e = np.exp(-sigma * tau)
    under, crit, over = q > 0, q == 0, q < 0
    w = np.sqrt(q[under])
    phi[under] = e[under] * np.cos(w * tau[under])
    psi[under] = e[under] * np.sin(w * tau[under]) / w
    phi[crit], psi[crit] = e[crit], tau[crit] * e[crit]
    b, sg, t = np.sqrt(-q[over]), sigma[over], tau[over]
    slow = np.exp(-w0sq[over] / (sg + b) * t)  # e^{(β−σ)τ}, β − σ without cancellation
    phi[over] = 0.5 * (slow + np.exp(-(sg + b) * t))
    psi[over] = slow * -np.expm1(-2.0 * b * t) / (2.0 * b)
    return phi, psi


def _first_zero(sigma: FloatArray, w0sq: FloatArray, z0: FloatArray,
                dz0: FloatArray) -> FloatArray:
    """First τ > 0 [s] where z = 0, for z̈ + 2σż + ω₀²z = 0, z(0) = z0, ż(0) = dz0; else ∞.

    With z0 = 0 the zero at τ = 0 is skipped and the next one given.
    """
    flip = (z0 < 0) | ((z0 == 0) & (dz0 < 0))
    z0, dz0 = np.where(flip, -z0, z0), np.where(flip, -dz0, dz0)
    k = sigma * z0 + dz0  # z = Φ z0 + Ψ k
    q = _detuning(sigma, w0sq)
    out = np.full(z0.shape, np.inf)
    under = q > 0
    w = np.sqrt(q[under])
    out[under] = np.arctan2(z0[under], -k[under] / w) / w
    falling = k < 0
    crit = (q == 0) & falling
    out[crit] = z0[crit] / -k[crit]
    over = (q < 0) & falling
    arg = np.sqrt(-q[over]) * z0[over] / -k[over]
    ok = arg < 1.0
    zero = np.full(arg.shape, np.inf)
    zero[ok] = np.arctanh(arg[ok]) / np.sqrt(-q[over][ok])
    out[over] = zero
    return out


def _state(p: _Piece, tau: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(stroke [mm], speed [mm/s]) of each leg a finite time τ [s] into its stage."""
    x, v = np.empty_like(tau), np.empty_like(tau)
    spring = p.s > 0
    if spring.any():
        q, t = p.take(spring), tau[spring]
        x_eq = q.x_ref + q.net / q.s
        y0, sg, w0sq = q.x0 - x_eq, q.sigma, q.w0sq
        phi, psi = _basis(sg, w0sq, t)
        x[spring] = x_eq + phi * y0 + psi * (sg * y0 + q.v0)
        v[spring] = phi * q.v0 - psi * (w0sq * y0 + sg * q.v0)
    damped = (p.s == 0) & (p.c > 0)
    if damped.any():
        q, t = p.take(damped), tau[damped]
        rate, acc = q.c / q.m, q.net / q.m
        fade = _fade(rate, t)  # ∫₀^τ e^{−γu} du and ∫₀^τ ∫₀^u e^{−γw} dw du
        x[damped] = q.x0 + q.v0 * fade[0] + acc * fade[1]
        v[damped] = q.v0 * np.exp(-rate * t) + acc * fade[0]
    free = (p.s == 0) & (p.c == 0)
    acc = p.net[free] / p.m[free]
    x[free] = p.x0[free] + p.v0[free] * tau[free] + 0.5 * acc * tau[free] ** 2
    v[free] = p.v0[free] + acc * tau[free]
    return x, v


def _fade(rate: FloatArray, tau: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(E, P) = ((1 − e^{−γτ})/γ, (τ − E)/γ) for γ > 0, without cancellation for small γτ."""
    z = rate * tau
    e = -np.expm1(-z) / rate
    small = z < 1e-3  # Taylor series to z³: truncation error below 1e-14 relative
    zs = z[small]
    p = np.empty_like(z)
    p[small] = tau[small] ** 2 * (0.5 - zs / 6.0 + zs**2 / 24.0 - zs**3 / 120.0)
    big = ~small
    p[big] = (tau[big] - e[big]) / rate[big]
    return e, p


def _stop(p: _Piece) -> tuple[FloatArray, FloatArray]:
    """(τ [s], stroke [mm]) where each leg would stop in this stage were it endless.

    τ is infinite when the speed never reaches zero; the stroke is then the limit the leg
    tends to (an equilibrium, or infinity when it never stops).
    """
    a0 = p.a0
    moving = (p.v0 > 0) | (a0 > 0)
    tau = np.where(moving, np.inf, 0.0)
    spring = moving & (p.s > 0)
    tau[spring] = _first_zero(p.sigma[spring], p.w0sq[spring], p.v0[spring], a0[spring])
    damped = moving & (p.s == 0) & (p.c > 0) & (p.net < 0)
    u = p.v0[damped] * p.c[damped] / -p.net[damped]  # ẋ(0) / −(terminal speed)
    tau[damped] = np.where(u > 0, np.log1p(u) / np.where(u > 0, u, 1.0), 1.0) * (
        p.v0[damped] * p.m[damped] / -p.net[damped])
    free = moving & (p.s == 0) & (p.c == 0) & (p.net < 0)
    tau[free] = p.v0[free] * p.m[free] / -p.net[free]
    x = np.where(moving, np.inf, p.x0)
    ends = moving & np.isfinite(tau)
    x[ends] = _state(p.take(ends), tau[ends])[0]
    settles = moving & ~ends & ((p.s > 0) | ((p.net == 0) & (p.c > 0)))
    x_eq = p.x_ref + p.net / np.where(p.s > 0, p.s, 1.0)
    flat = p.x0 + p.v0 * p.m / np.where(p.c > 0, p.c, 1.0)
    x[settles] = np.where(p.s > 0, x_eq, flat)[settles]
    return tau, x


def _reach(p: _Piece, target: FloatArray, tau_stop: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(τ [s], speed [mm/s]) when each leg's stroke reaches ``target`` [mm] > x0 in this stage.

    Every leg must reach it (before ``tau_stop``, which may be infinite).
    """
    tau, v = np.empty_like(target), np.empty_like(target)
    spring = (p.c == 0) & (p.s > 0)  # energy conserved: a circle in (y, v/ω)
    q, xt = p.take(spring), target[spring]
    w = np.sqrt(q.w0sq)
    x_eq = q.x_ref + q.net / q.s
    y0, yt = q.x0 - x_eq, xt - x_eq
    vt = np.sqrt(np.maximum(q.v0**2 + q.w0sq * (q.x0 - xt) * (y0 + yt), 0.0))
    tau[spring] = np.maximum(np.arctan2(q.v0 / w, y0) - np.arctan2(vt / w, yt), 0.0) / w
    v[spring] = vt
    free = (p.c == 0) & (p.s == 0)  # uniform acceleration
    q, d = p.take(free), target[free] - p.x0[free]
    vt = np.sqrt(np.maximum(q.v0**2 + 2.0 * q.net / q.m * d, 0.0))
    tau[free], v[free] = 2.0 * d / (q.v0 + vt), vt
    damped = p.c > 0
    if damped.any():
        q = p.take(damped)
        tau[damped] = _bracketed_root(q, target[damped], tau_stop[damped])
        v[damped] = _state(q, tau[damped])[1]
    return tau, np.maximum(v, 0.0)


def _bracketed_root(p: _Piece, target: FloatArray, hi: FloatArray) -> FloatArray:
    """τ [s] where x(τ) = target, x rising on [0, hi]: Newton steps kept inside the bracket,
    bisection where a step would leave it. An infinite ``hi`` is first found by doubling."""
    hi = hi.copy()
    open_ = ~np.isfinite(hi)
    guess = np.where(p.v0 > 0, (target - p.x0) / np.where(p.v0 > 0, p.v0, 1.0), p.m / p.c)
    hi[open_] = guess[open_]
    for _ in range(_DOUBLINGS):
        open_ &= _state(p, hi)[0] < target
        if not open_.any():
            break
        hi[open_] *= 2.0
    lo = np.zeros_like(hi)
    t = np.clip(guess, lo, hi)
    scale = np.abs(target) + np.abs(p.x0) + np.abs(p.net) / np.where(p.s > 0, p.s, np.inf)
    todo = np.arange(t.size)
    for _ in range(_NEWTON_ITERATIONS):
        q, tt, lo_, hi_ = p.take(todo), t[todo], lo[todo], hi[todo]
        x, v = _state(q, tt)
        r = x - target[todo]
        below = r < 0
        lo_, hi_ = np.where(below, tt, lo_), np.where(below, hi_, tt)
        newton = tt - r / np.where(v > 0, v, 1.0)
        inside = (v > 0) & (newton >= lo_) & (newton <= hi_)
        # converged: the residual at rounding level (x carries errors of order ε times the
        # distance to the stage's equilibrium), or the bracket negligible
        done = (np.abs(r) <= 8e-16 * scale[todo]) | (hi_ - lo_ <= 1e-15 * hi_)
        t_next = np.where(inside, newton, np.where(done, tt, 0.5 * (lo_ + hi_)))
        done |= np.abs(t_next - tt) <= 1e-15 * hi_
        t[todo], lo[todo], hi[todo] = t_next, lo_, hi_
        todo = todo[~done]
        if todo.size == 0:
            break
    return t


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
        p = _Piece(m[live], c[live], slopes[live, i], forces[live, i], starts[live, i],
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


def _stage_end(p: _Piece, nxt: FloatArray) -> _End:
    """How each leg leaves its stage, the next one starting at ``nxt`` [mm] (∞ for none)."""
    tau_stop, x_stop = _stop(p)
    endless = ~np.isfinite(tau_stop)
    reach = np.isfinite(nxt) & ((nxt <= p.x0) | np.where(endless, x_stop > nxt, x_stop >= nxt))
    go = reach & (nxt > p.x0)
    skip = reach & ~go
    tau, x, v = tau_stop.copy(), x_stop.copy(), np.zeros_like(x_stop)
    tau[skip], x[skip], v[skip] = 0.0, p.x0[skip], p.v0[skip]
    tau[go], v[go] = _reach(p.take(go), nxt[go], tau_stop[go])
    x[go] = nxt[go]
    return _End(tau, x, v, reach, endless & ~reach)


def _force_candidates(p: _Piece, end: _End) -> list[tuple[FloatArray, FloatArray]]:
    """(force [N], τ [s]) where the stage's foot force can be greatest, in time order: at its
    entry, at the force's turning point inside it, at its end (for a leg that stays in it for
    ever, the force it tends to: the weight with a spring or damping, else F₀)."""
    tau_turn = _turning_point(p)
    inside = tau_turn < end.tau
    f_turn = np.full(p.x0.shape, -np.inf)
    q = p.take(inside)
    f_turn[inside] = q.force(*_state(q, tau_turn[inside]))
    settled = np.where((p.s > 0) | (p.c > 0), p.m * G_MM_PER_S2, p.f0)
    f_end = np.where(end.settles, settled,
                     p.force(np.where(end.settles, p.x0, end.x), end.v))
    return [(p.force(p.x0, p.v0), np.zeros_like(p.x0)), (f_turn, tau_turn), (f_end, end.tau)]


def _turning_point(p: _Piece) -> FloatArray:
    """First τ [s] > 0 where the foot force F(x) + c ẋ turns (s ẋ + c ẍ = 0), or infinity.

    The force rate is itself a free vibration of the stage, so its zero is analytic; it can
    lie inside the stage only with both a spring and damping.
    """
    a0 = p.a0
    j0 = -p.w0sq * p.v0 - 2.0 * p.sigma * a0
    both = (p.s > 0) & (p.c > 0)
    out = np.full(p.x0.shape, np.inf)
    rate0 = p.s * p.v0 + p.c * a0
    out[both] = _first_zero(p.sigma[both], p.w0sq[both], rate0[both],
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
        p = _Piece(np.full(n, self.mass[leg]), np.full(n, self.damping[leg]),
                   self.slopes[leg, k], self.forces[leg, k], self.starts[leg, k],
                   self.stroke_mm[leg, k], self.speed_mm_per_s[leg, k])
        x, v = _state(p, times - entered[k])
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

"""The motion of a falling mass within one straight stage of a leg's force-stroke curve.

Within a stage the force is F₀ + s (x − x₀), so m ẍ + c ẋ + s x = m g − F₀ + s x₀ has a
closed-form solution for every damping; :mod:`stiff.landing` states it, with its source, and
marches the legs of a batch through their stages with these functions. Arrays are over the
legs of a batch.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np
import numpy.typing as npt

from stiff.units import G_MM_PER_S2

FloatArray = npt.NDArray[np.float64]

_NEWTON_ITERATIONS = 100  # a cap only: Newton with bisection converges in far fewer
_DOUBLINGS = 200  # cap on widening a search bracket (2^200 times its first guess)


@dataclass(frozen=True)
class Piece:
    """One stage of n legs, as arrays (n,): coefficients and the state entering it."""

    m: FloatArray  # mass [t]
    c: FloatArray  # damping [N·s/mm]
    s: FloatArray  # slope [N/mm]
    f0: FloatArray  # force [N] at stroke x_ref
    x_ref: FloatArray  # start of the stage [mm]
    x0: FloatArray  # stroke entering it [mm]
    v0: FloatArray  # speed entering it [mm/s]

    def take(self, which: npt.NDArray[np.bool_] | npt.NDArray[np.intp]) -> Piece:
        """The legs ``which`` (a mask or indices)."""
        return Piece(*(getattr(self, f.name)[which] for f in fields(self)))

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


def detuning(sigma: FloatArray, w0sq: FloatArray) -> FloatArray:
    """q = ω₀² − σ² [1/s²], 0 within 1e-10 ω₀² of critical damping.

    Treating such a stage as critically damped changes its motion over its own time scale
    by about 1e-10 relative; it keeps ζ = 1 computed with rounding from a "stop" after an
    astronomically long half period of ω = √q.
    """
    q = w0sq - sigma**2
    return np.where(np.abs(q) <= 1e-10 * w0sq, 0.0, q)


def basis_functions(sigma: FloatArray, w0sq: FloatArray, tau: FloatArray
                    ) -> tuple[FloatArray, FloatArray]:
    """(Φ, Ψ) of ÿ + 2σẏ + ω₀²y = 0 at times τ ≥ 0 (finite), for any damping."""
    q = detuning(sigma, w0sq)
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


def first_zero(sigma: FloatArray, w0sq: FloatArray, z0: FloatArray,
                dz0: FloatArray) -> FloatArray:
    """First τ > 0 [s] where z = 0, for z̈ + 2σż + ω₀²z = 0, z(0) = z0, ż(0) = dz0; else ∞.

    With z0 = 0 the zero at τ = 0 is skipped and the next one given.
    """
    flip = (z0 < 0) | ((z0 == 0) & (dz0 < 0))
    z0, dz0 = np.where(flip, -z0, z0), np.where(flip, -dz0, dz0)
    k = sigma * z0 + dz0  # z = Φ z0 + Ψ k
    q = detuning(sigma, w0sq)
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


def state_at(p: Piece, tau: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(stroke [mm], speed [mm/s]) of each leg a finite time τ [s] into its stage."""
    x, v = np.empty_like(tau), np.empty_like(tau)
    spring = p.s > 0
    if spring.any():
        q, t = p.take(spring), tau[spring]
        x_eq = q.x_ref + q.net / q.s
        y0, sg, w0sq = q.x0 - x_eq, q.sigma, q.w0sq
        phi, psi = basis_functions(sg, w0sq, t)
        x[spring] = x_eq + phi * y0 + psi * (sg * y0 + q.v0)
        v[spring] = phi * q.v0 - psi * (w0sq * y0 + sg * q.v0)
    damped = (p.s == 0) & (p.c > 0)
    if damped.any():
        q, t = p.take(damped), tau[damped]
        rate, acc = q.c / q.m, q.net / q.m
        fade = fade_integrals(rate, t)  # ∫₀^τ e^{−γu} du and ∫₀^τ ∫₀^u e^{−γw} dw du
        x[damped] = q.x0 + q.v0 * fade[0] + acc * fade[1]
        v[damped] = q.v0 * np.exp(-rate * t) + acc * fade[0]
    free = (p.s == 0) & (p.c == 0)
    acc = p.net[free] / p.m[free]
    x[free] = p.x0[free] + p.v0[free] * tau[free] + 0.5 * acc * tau[free] ** 2
    v[free] = p.v0[free] + acc * tau[free]
    return x, v


def fade_integrals(rate: FloatArray, tau: FloatArray) -> tuple[FloatArray, FloatArray]:
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


def stop_point(p: Piece) -> tuple[FloatArray, FloatArray]:
    """(τ [s], stroke [mm]) where each leg would stop in this stage were it endless.

    τ is infinite when the speed never reaches zero; the stroke is then the limit the leg
    tends to (an equilibrium, or infinity when it never stops).
    """
    a0 = p.a0
    moving = (p.v0 > 0) | (a0 > 0)
    tau = np.where(moving, np.inf, 0.0)
    spring = moving & (p.s > 0)
    tau[spring] = first_zero(p.sigma[spring], p.w0sq[spring], p.v0[spring], a0[spring])
    damped = moving & (p.s == 0) & (p.c > 0) & (p.net < 0)
    u = p.v0[damped] * p.c[damped] / -p.net[damped]  # ẋ(0) / −(terminal speed)
    tau[damped] = np.where(u > 0, np.log1p(u) / np.where(u > 0, u, 1.0), 1.0) * (
        p.v0[damped] * p.m[damped] / -p.net[damped])
    free = moving & (p.s == 0) & (p.c == 0) & (p.net < 0)
    tau[free] = p.v0[free] * p.m[free] / -p.net[free]
    x = np.where(moving, np.inf, p.x0)
    ends = moving & np.isfinite(tau)
    x[ends] = state_at(p.take(ends), tau[ends])[0]
    settles = moving & ~ends & ((p.s > 0) | ((p.net == 0) & (p.c > 0)))
    x_eq = p.x_ref + p.net / np.where(p.s > 0, p.s, 1.0)
    flat = p.x0 + p.v0 * p.m / np.where(p.c > 0, p.c, 1.0)
    x[settles] = np.where(p.s > 0, x_eq, flat)[settles]
    return tau, x


def reach_point(p: Piece, target: FloatArray, tau_stop: FloatArray
                ) -> tuple[FloatArray, FloatArray]:
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
        tau[damped] = bracketed_root(q, target[damped], tau_stop[damped])
        v[damped] = state_at(q, tau[damped])[1]
    return tau, np.maximum(v, 0.0)


def bracketed_root(p: Piece, target: FloatArray, hi: FloatArray) -> FloatArray:
    """τ [s] where x(τ) = target, x rising on [0, hi]: Newton steps kept inside the bracket,
    bisection where a step would leave it. An infinite ``hi`` is first found by doubling."""
    hi = hi.copy()
    open_ = ~np.isfinite(hi)
    guess = np.where(p.v0 > 0, (target - p.x0) / np.where(p.v0 > 0, p.v0, 1.0), p.m / p.c)
    hi[open_] = guess[open_]
    for _ in range(_DOUBLINGS):
        open_ &= state_at(p, hi)[0] < target
        if not open_.any():
            break
        hi[open_] *= 2.0
    lo = np.zeros_like(hi)
    t = np.clip(guess, lo, hi)
    scale = np.abs(target) + np.abs(p.x0) + np.abs(p.net) / np.where(p.s > 0, p.s, np.inf)
    todo = np.arange(t.size)
    for _ in range(_NEWTON_ITERATIONS):
        q, tt, lo_, hi_ = p.take(todo), t[todo], lo[todo], hi[todo]
        x, v = state_at(q, tt)
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

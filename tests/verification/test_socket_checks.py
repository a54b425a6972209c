"""Socket formulas against their sources and an independent numerical solution.

Sources:
- Average bond shear of a tube in a socket, τ = F/(π d L), and in torsion 2T/(π d² L)
  (REFERENCES.md §4; equilibrium of a uniform shear on the cylinder of the bond).
- Volkersen, "Die Nietkraftverteilung in zugbeanspruchten Nietverbindungen mit konstanten
  Laschenquerschnitten", Luftfahrtforschung 15 (1938): shear lag in a lap joint,
  τ_max/τ_avg = (ωL/2)[coth(ωL/2) + ((ψ−1)/(ψ+1)) tanh(ωL/2)],
  ω² = (G_a/η)(1/(E₁t₁) + 1/(E₂t₂)), ψ = E₁t₁/(E₂t₂) (REFERENCES.md §4: the formula from memory,
  checked numerically — here). Review: da Silva et al. 2009, Int. J. Adhes. Adhes. 29, from
  memory.
- Pry of a rigid insert with a linear bearing pressure, p_max = 4V/(dL) + 6M₀/(dL²)
  (REFERENCES.md §4, practice, derived: equilibrium, checked here by quadrature).

The shear-lag ODE solved by finite differences (written here from first principles, not from
the closed form): over the overlap 0 ≤ x ≤ L, adherend 1 enters at x = 0 carrying the whole load
P (per unit width) and ends at x = L; adherend 2 starts at x = 0 and carries P out at x = L.
Equilibrium of adherend 1, dN₁/dx = −τ; the adhesive, τ = (G_a/η)(u₂ − u₁); each adherend,
du_i/dx = N_i/(E_i t_i); and N₁ + N₂ = P. Eliminating τ and the displacements:

    −N₁'' = (G_a/η) [ (P − N₁)/(E₂t₂) − N₁/(E₁t₁) ],   N₁(0) = P,  N₁(L) = 0,

and τ = −N₁'. It is discretised with central differences on a uniform grid (second order), the
end shears taken by second-order one-sided differences; the average shear is P/L.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.linalg import solve_banded

from stiff.checks.sockets import (
    average_bond_shear,
    pry_bearing_pressure,
    socket_wall_mm,
    torsion_bond_shear,
    volkersen_omega,
    volkersen_peak_factor,
)


def shear_lag_fd(G_a: float, eta: float, Et1: float, Et2: float, L: float, n: int
                 ) -> tuple[float, float]:
    """Bond shear at both ends over its average, by finite differences on n intervals."""
    P = 1.0
    h = L / n
    k = G_a / eta
    # unknowns N₁ at the interior nodes 1..n−1:
    # (N[i−1] − 2N[i] + N[i+1])/h² − k (1/Et1 + 1/Et2) N[i] = −k P/Et2
    m = n - 1
    diag = np.full(m, -2.0 / h**2 - k * (1.0 / Et1 + 1.0 / Et2))
    off = np.full(m, 1.0 / h**2)
    rhs = np.full(m, -k * P / Et2)
    rhs[0] -= P / h**2  # N₁(0) = P
    ab = np.vstack([off, diag, off])
    inner = solve_banded((1, 1), ab, rhs)
    N = np.concatenate([[P], inner, [0.0]])
    tau_0 = -(-3 * N[0] + 4 * N[1] - N[2]) / (2 * h)
    tau_L = -(3 * N[-1] - 4 * N[-2] + N[-3]) / (2 * h)
    avg = P / L
    return tau_0 / avg, tau_L / avg


# Adhesive and adherends of the order of a carbon tube bonded into a printed socket:
# G_a ≈ 900 MPa (epoxy), η = 0.1 mm; E t per unit width [N/mm].
G_A, ETA = 900.0, 0.1


@pytest.mark.parametrize(("Et1", "Et2", "L"), [
    (5_000.0, 5_000.0, 10.0),     # balanced, ψ = 1, ωL/2 ≈ 9.5
    (5_000.0, 5_000.0, 1.0),      # balanced, short overlap, ωL/2 ≈ 0.95
    (75_000.0, 15_000.0, 12.0),   # ψ = 5: tube much stiffer than the socket wall
    (15_000.0, 75_000.0, 12.0),   # ψ = 1/5: the same joint seen from the other adherend
    (80_000.0, 4_000.0, 3.0),     # ψ = 20, ωL/2 ≈ 3.6
])
def test_volkersen_peak_factor_against_finite_differences(Et1: float, Et2: float,
                                                          L: float) -> None:
    """The closed form's peak equals the larger end shear of the numerical solution.

    Tolerance: the scheme is second order, its relative error about (ωh)²/3 from the
    one-sided end difference; with n = 20 000 intervals ωh ≤ 1e-3, so ≲ 3e-7 (measured: at
    most 3.4e-7, and four times that at n = 10 000, the second-order rate): 1e-5 holds both
    grids with room for rounding.
    """
    n = 20_000
    end_0, end_L = shear_lag_fd(G_A, ETA, Et1, Et2, L, n)
    omega = math.sqrt(G_A / ETA * (1 / Et1 + 1 / Et2))
    assert omega * L / n < 1e-3
    expected = max(end_0, end_L)
    assert volkersen_peak_factor(G_A, ETA, Et1, Et2, L) == pytest.approx(expected, rel=1e-5)
    coarse = max(shear_lag_fd(G_A, ETA, Et1, Et2, L, n // 2))
    assert coarse == pytest.approx(expected, rel=1e-5)


def test_volkersen_peak_is_at_the_end_where_the_softer_adherend_carries_the_load() -> None:
    """With ψ = E₁t₁/(E₂t₂) > 1 the peak is at x = L, where adherend 2 carries P (the formula's
    ψ term is positive there); at x = 0 the shear is the same formula with (1 − ψ)/(1 + ψ)."""
    Et1, Et2, L = 75_000.0, 15_000.0, 12.0
    end_0, end_L = shear_lag_fd(G_A, ETA, Et1, Et2, L, 20_000)
    x = volkersen_omega(G_A, ETA, Et1, Et2) * L / 2
    psi = Et1 / Et2
    assert end_L > end_0
    assert end_L == pytest.approx(x * (1 / math.tanh(x) + (psi - 1) / (psi + 1) * math.tanh(x)),
                                  rel=1e-5)
    assert end_0 == pytest.approx(x * (1 / math.tanh(x) + (1 - psi) / (psi + 1) * math.tanh(x)),
                                  rel=1e-5)


def test_volkersen_worked_number() -> None:
    """A worked number (derived): G_a = 900 MPa, η = 0.1 mm, E₁t₁ = 75 000, E₂t₂ = 15 000 N/mm,
    L = 12 mm: ω² = 9000 (1/75 000 + 1/15 000) = 0.72 mm⁻², ωL/2 = 6 √0.72 = 5.0912;
    coth = 1.000075, tanh = 0.999925, (ψ−1)/(ψ+1) = 2/3:
    factor = 5.0912 (1.000075 + 0.666617) = 8.4855."""
    assert volkersen_omega(G_A, ETA, 75_000.0, 15_000.0) == pytest.approx(math.sqrt(0.72),
                                                                          rel=1e-12)
    assert volkersen_peak_factor(G_A, ETA, 75_000.0, 15_000.0, 12.0) == pytest.approx(
        8.4855, abs=1e-4)


def test_volkersen_short_overlap_is_uniform() -> None:
    """As ωL → 0 the shear becomes uniform: (ωL/2) coth(ωL/2) → 1 and the ψ term → 0."""
    assert volkersen_peak_factor(G_A, ETA, 5_000.0, 1_000.0, 1e-4) == pytest.approx(1.0,
                                                                                   abs=1e-6)


def test_average_bond_shear_worked_numbers() -> None:
    """F = 100 N on a 6 mm tube engaged 15 mm: τ = 100/(π·6·15) = 0.35368 MPa; T = 100 N·mm:
    τ = 2·100/(π·36·15) = 0.11789 MPa (equilibrium: T = τ (π d L) d/2)."""
    assert average_bond_shear(100.0, 6.0, 15.0) == pytest.approx(0.35368, rel=1e-4)
    assert average_bond_shear(-100.0, 6.0, 15.0) == pytest.approx(0.35368, rel=1e-4)
    tau = torsion_bond_shear(100.0, 6.0, 15.0)
    assert tau == pytest.approx(0.11789, rel=1e-4)
    assert tau * math.pi * 6.0 * 15.0 * 3.0 == pytest.approx(100.0, rel=1e-12)


def test_pry_pressure_worked_number() -> None:
    """V = 10 N, M₀ = 100 N·mm, d = 6 mm, L = 15 mm: 4·10/90 + 6·100/(6·225) = 0.8889 MPa."""
    assert pry_bearing_pressure(10.0, 100.0, 6.0, 15.0) == pytest.approx(0.888889, rel=1e-6)
    assert pry_bearing_pressure(-10.0, -100.0, 6.0, 15.0) == pytest.approx(0.888889, rel=1e-6)


@pytest.mark.parametrize(("V", "M"), [(10.0, 0.0), (0.0, 100.0), (10.0, 100.0)])
def test_pry_pressure_is_in_equilibrium(V: float, M: float) -> None:
    """The linear pressure q(x) = q₀ + (q_L − q₀)x/L with q₀ = 4V/L + 6M/L² and
    q_L = −2V/L − 6M/L² balances the shear and the moment at the mouth: ∫q dx = V and
    ∫q x dx = −M (trapezoid rule, exact for a linear q times x to 1e-9 at 10 001 points)."""
    d, L = 6.0, 15.0
    q0 = pry_bearing_pressure(V, M, d, L) * d
    qL = -2 * V / L - 6 * M / L**2
    x = np.linspace(0.0, L, 10_001)
    q = q0 + (qL - q0) * x / L
    assert np.trapezoid(q, x) == pytest.approx(V, abs=1e-9 * (abs(V) + abs(M) / L))
    assert np.trapezoid(q * x, x) == pytest.approx(-M, abs=1e-6 * (abs(V) * L + abs(M)))


def test_socket_wall() -> None:
    """The thinnest wall round a 6 mm bore in an 8 × 10 mm section is (8 − 6)/2 = 1 mm."""
    assert socket_wall_mm(8.0, 10.0, 6.0) == pytest.approx(1.0)
    assert socket_wall_mm(5.0, 10.0, 6.0) < 0.0

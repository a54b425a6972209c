"""Natural frequencies and effective mass against closed forms.

Sources:
- Cantilevered uniform Euler–Bernoulli beam: f_i = (λ_i²/(2π)) √(EI/(μ L⁴)), λ₁ = 1.875104,
  λ₂ = 4.694091 (Blevins, *Formulas for Natural Frequency and Mode Shape*, 1979, Table 8-1;
  from memory; λ are the roots of cos λ cosh λ = −1, checked here by scipy).
- A point mass m on a massless rigid bar of length L on a rotational spring k:
  f = √(k/(m L²))/(2π) (single degree of freedom, any vibrations text); with the bar's own
  mass μL added, the inertia about the pivot is m L² + μL³/3 (statics).
- Effective mass of a uniform cantilever at its tip by Rayleigh's method with the static
  deflection shape: 33/140 of its mass (Timoshenko, Young & Weaver, *Vibration Problems in
  Engineering*, Rayleigh's method; from memory; derived here in a comment).
- A tube arm on a servo with a payload at its tip: one degree of freedom with the tip
  compliance L²/k + L³/(3EI) + L/(κGA) + 1/k_radial (statics, Timoshenko cantilever; Cowper
  1966 κ = 0.5 for a thin orthotropic tube, common practice).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq

from stiff.build import build
from stiff.case import parse_case
from stiff.fe import Beams, Connectors, FrameModel
from stiff.linkage import case_pose
from stiff.materials import load_library
from stiff.modes import leg_modes, mass_matrix, natural_modes

E = 135_000.0  # MPa, pultruded carbon-like
RHO = 1.55e-9  # t/mm³ (1.55 g/cm³)
OD, ID = 10.0, 8.0
A = math.pi * (OD**2 - ID**2) / 4
I = math.pi * (OD**4 - ID**4) / 64
J = math.pi * (OD**4 - ID**4) / 32
L = 300.0
LAMBDA_1, LAMBDA_2 = 1.875104, 4.694091  # Blevins Table 8-1, from memory


def cantilever(n: int, Iy: float = I, Iz: float = I) -> FrameModel:
    """A cantilever along x in n Euler–Bernoulli members (shear off), held at x = 0."""
    x = np.linspace(0.0, L, n + 1)
    xyz = np.column_stack([x, np.zeros_like(x), np.zeros_like(x)])
    conn = np.column_stack([np.arange(n), np.arange(1, n + 1)])
    fixed = np.zeros((n + 1, 6), bool)
    fixed[0] = True
    return FrameModel.make(xyz, beams=Beams.make(conn, E=E, G=E / 2.6, A=A, Iy=Iy, Iz=Iz, J=J),
                           fixed=fixed)


def test_lambda_values_are_roots_of_the_frequency_equation() -> None:
    roots = [brentq(lambda lam: math.cos(lam) * math.cosh(lam) + 1.0, a, b)
             for a, b in ((1.0, 3.0), (4.0, 6.0))]
    # the tabulated constants are given to 7 significant figures
    assert roots == pytest.approx([LAMBDA_1, LAMBDA_2], abs=1e-6)


def test_cantilevered_tube_first_and_second_frequency() -> None:
    model = cantilever(20)
    mu = RHO * A
    M = mass_matrix(model, mu, (I + I) / A)
    eig = natural_modes(model, M, count=6)
    f1 = LAMBDA_1**2 / (2 * math.pi) * math.sqrt(E * I / (mu * L**4))
    f2 = LAMBDA_2**2 / (2 * math.pi) * math.sqrt(E * I / (mu * L**4))
    # a round tube: each bending frequency twice (in the plane and out of it)
    f = eig.frequency_Hz
    # consistent-mass cubic elements converge from above as h⁴: with 20 members the first
    # frequency is high by ~1e-8 and the second by ~1e-6 (Rayleigh–Ritz: never below)
    assert f[0] == pytest.approx(f1, rel=2e-7) and f[1] == pytest.approx(f1, rel=2e-7)
    assert f[2] == pytest.approx(f2, rel=5e-6) and f[3] == pytest.approx(f2, rel=5e-6)
    assert f[0] >= f1 * (1 - 1e-7)
    # the degenerate pair is split into one in-plane and one out-of-plane mode
    assert sorted(np.round(eig.in_plane_fraction[:2], 9)) == [0.0, 1.0]


def test_coarse_mesh_converges_from_above() -> None:
    mu = RHO * A
    f1 = LAMBDA_1**2 / (2 * math.pi) * math.sqrt(E * I / (mu * L**4))
    errors = []
    for n in (1, 2, 4):
        model = cantilever(n)
        f = natural_modes(model, mass_matrix(model, mu, 2 * I / A), 1).frequency_Hz[0]
        errors.append(f / f1 - 1.0)
    assert all(e > 0 for e in errors)
    # one consistent-mass element is 0.5 % high (a classic figure); h⁴ convergence after
    assert errors[0] == pytest.approx(0.0048, abs=0.0005)
    assert errors[1] / errors[2] == pytest.approx(16.0, rel=0.15)


def test_flat_bar_classes_its_modes_by_plane() -> None:
    # 6 deep in the plane, 12 wide out of it: in-plane bending (about z) is the soft one
    d, w = 6.0, 12.0
    Iz, Iy = w * d**3 / 12, d * w**3 / 12
    model = cantilever(16, Iy=Iy, Iz=Iz)
    area = d * w
    eig = natural_modes(model, mass_matrix(model, RHO * area, (Iy + Iz) / area), 2)
    f = eig.frequency_Hz
    assert f[0] == pytest.approx(
        LAMBDA_1**2 / (2 * math.pi) * math.sqrt(E * Iz / (RHO * area * L**4)), rel=1e-6)
    assert f[1] == pytest.approx(
        LAMBDA_1**2 / (2 * math.pi) * math.sqrt(E * Iy / (RHO * area * L**4)), rel=1e-6)
    assert eig.in_plane_fraction[0] == pytest.approx(1.0, abs=1e-12)
    assert eig.in_plane_fraction[1] == pytest.approx(0.0, abs=1e-12)


def spring_bar(k: float, m: float, mu: float, length: float) -> tuple[FrameModel, np.ndarray]:
    """A bar along x on a rotational spring k about z at the origin, a mass m at its tip."""
    xyz = [[0.0, 0.0, 0.0], [0.0, 0.0, 0.0], [length, 0.0, 0.0]]
    stiff_EI = 1e6 * k * length  # bending compliance L³/(3EI) is 3e-7 of L²/k: rigid
    beams = Beams.make([[1, 2]], E=stiff_EI / I, G=stiff_EI / I, A=A, Iy=I, Iz=I, J=J)
    inf = math.inf
    connectors = Connectors.make([[0, 1]], [[inf, inf, inf, inf, inf, k]])
    fixed = np.zeros((3, 6), bool)
    fixed[0] = True
    model = FrameModel.make(xyz, beams=beams, connectors=connectors, fixed=fixed)
    return model, mass_matrix(model, mu, 2 * I / A, [0.0, 0.0, m])


@pytest.mark.parametrize(("k", "m", "length"), [(2.0e5, 1e-4, 80.0), (5.0e4, 3e-3, 250.0)])
def test_mass_on_massless_bar_on_rotational_spring(k: float, m: float, length: float) -> None:
    model, M = spring_bar(k, m, 0.0, length)
    f = natural_modes(model, M, 1).frequency_Hz[0]
    # the bar's bending adds 1/3e6 to the compliance (f low by 1.7e-7); a stiffer bar would
    # trip the engine's mechanism check (pivot ratio 1e-10)
    assert f == pytest.approx(math.sqrt(k / (m * length**2)) / (2 * math.pi), rel=1e-6)
    # with that bending in series the one-degree-of-freedom answer is exact; 1e-8 leaves room
    # for rounding in an eigensolve whose stiffness spans ten orders (axial against the spring)
    compliance = length**2 / k + length**2 / (3e6 * k)
    assert f == pytest.approx(1 / math.sqrt(compliance * m) / (2 * math.pi), rel=1e-8)


def test_bar_with_its_own_mass_on_rotational_spring() -> None:
    k, m, mu, length = 1.0e5, 2e-4, 5e-8, 150.0
    model, M = spring_bar(k, m, mu, length)
    eig = natural_modes(model, M, 1)
    inertia = m * length**2 + mu * length**3 / 3
    # the cubic shape functions hold the rigid rotation v = θx exactly; the bar's bending
    # (3e-7 of the compliance) is all that is left
    assert eig.frequency_Hz[0] == pytest.approx(math.sqrt(k / inertia) / (2 * math.pi),
                                                rel=1e-6)
    assert eig.in_plane_fraction[0] == pytest.approx(1.0, abs=1e-12)


def test_cantilever_effective_mass_at_tip_is_33_140() -> None:
    # Rayleigh with the static shape v = (3ξ² − ξ³)/2, ξ = x/L, v(L) = 1:
    # ∫ μ v² dx = μL ∫₀¹ (3ξ² − ξ³)²/4 dξ = μL (9/5 − 1 + 1/7)/4 = 33/140 μL.
    from stiff.modes import foot_effective_mass

    model = cantilever(4)
    mu = RHO * A
    M = mass_matrix(model, mu, 2 * I / A)
    m_eff, k = foot_effective_mass(model, M, model.n_nodes - 1)
    # cubic elements hold the static shape exactly and integrate it exactly: rounding only
    assert m_eff == pytest.approx(33 / 140 * mu * L, rel=1e-9)
    assert k == pytest.approx(3 * E * I / L**3, rel=1e-9)


def test_servo_arm_with_payload_from_a_case() -> None:
    lib = load_library()
    cf = lib.tube_material("CF-pultruded")
    length, k_servo_Nm_deg, payload_kg = 150.0, 0.05, 0.5
    text = f"""
title = "servo arm"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
tip = {{ x_mm = {length}, y_mm = 0.0 }}
[parts.arm]
kind = "tube"
nodes = ["root", "tip"]
z_mm = 0.0
material = "CF-pultruded"
od_mm = {OD}
id_mm = {ID}
[joints.root]
kind = "driven"
node = "root"
parts = ["body", "arm"]
actuator = "servo"
pin_diameter_mm = 4.0
[actuators.servo]
stall_torque_Nm = 2.0
stiffness_Nm_per_deg = {k_servo_Nm_deg}
angle_deg = 0.0
[loads]
payload_kg = {payload_kg}
"""
    case = parse_case(text, Path("arm.toml"), lib)
    built = build(case, case_pose(case))
    result = leg_modes(case, built, count=2)
    k = k_servo_Nm_deg * 1e3 * 180 / math.pi  # N·mm/rad
    k_radial = built.model.connectors.stiffness[0, 1]
    compliance = (length**2 / k + length**3 / (3 * cf.E_axial_MPa * I)
                  + length / (0.5 * cf.G_MPa * A) + 1 / k_radial)
    tube_t = result.mass.members_t
    m = payload_kg * 1e-3 + tube_t / 3  # the tube turning about its root, as a rigid bar
    f = math.sqrt(1 / (compliance * m)) / (2 * math.pi)
    first = result.modes[0]
    # the servo gives ~99 % of the compliance, so the tube moves almost as a rigid bar: its
    # elastic shape changes its effective mass (3 % of the total) by about the bending share
    # of the compliance (under 1 %), a few 1e-4 of m at most (measured: 6e-6)
    assert first.kind == "in-plane"
    assert first.frequency_Hz == pytest.approx(f, rel=3e-4)
    assert result.foot_effective_mass_t == pytest.approx(m, rel=3e-4)

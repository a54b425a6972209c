"""The frame engine against closed-form beam results.

Sources:
- Roark's Formulas for Stress and Strain (Young & Budynas, 7th ed.), Table 8.1: cantilever
  with a tip load δ = PL³/(3EI), slope PL²/(2EI); simply supported with a centre load
  δ = PL³/(48EI); guided cantilever δ = PL³/(12EI). From memory.
- Timoshenko beam theory with Cowper's shear coefficient (Cowper 1966, J. Appl. Mech.
  33:335–340): cantilever δ = PL³/(3EI) + PL/(κGA); simply supported, centre load
  δ = PL³/(48EI) + PL/(4κGA). Confirmed.
- Right-angle frame loaded normal to its plane, by Castigliano's theorem:
  δ = Pb³/(3EI_b) + Pa³/(3EI_a) + Pb²a/(GJ_a) (derived; REFERENCES.md §1).
- Circular tube in torsion, J = π(D⁴ − d⁴)/32, twist TL/(GJ): any strength-of-materials text.
- Euler buckling of a cantilever P_cr = π²EI/(2L)² (AISC 360 Commentary Table C-A-7.1, K = 2).

The Timoshenko element is exact for end-loaded prismatic members (its shape functions solve the
beam equations), so one element must reproduce these to rounding: tolerances are 1e-12
relative unless a mesh is involved.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from stiff.fe import Beams, FrameModel, buckling_factors, solve_second_order, solve_static

E, G = 70_000.0, 26_000.0  # MPa, aluminium-like
D, d = 12.0, 10.0  # tube OD, ID [mm]
A = math.pi * (D**2 - d**2) / 4
I = math.pi * (D**4 - d**4) / 64
J = math.pi * (D**4 - d**4) / 32
KAPPA = 0.5  # thin-tube geometric limit; any value works as long as both sides use it
P = 25.0  # N
L = 240.0  # mm
FIXED = [True] * 6
FREE = [False] * 6


def tube(nodes: list[list[int]], shear: bool = True, **kw: object) -> Beams:
    """Tube members; shear deformation on or off."""
    area = KAPPA * A if shear else math.inf
    return Beams.make(nodes, E=E, G=G, A=A, Iy=I, Iz=I, J=J, Asy=area, Asz=area, **kw)  # type: ignore[arg-type]


def one_load(n_nodes: int, node: int, dof: int, value: float) -> np.ndarray:
    loads = np.zeros((1, n_nodes, 6))
    loads[0, node, dof] = value
    return loads


@pytest.mark.parametrize("dof", [1, 2])
@pytest.mark.parametrize("shear", [False, True])
def test_cantilever_tip_load_both_axes(dof: int, shear: bool) -> None:
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]], beams=tube([[0, 1]], shear),
                            fixed=[FIXED, FREE])
    sol = solve_static(model, one_load(2, 1, dof, P))
    shear_part = P * L / (KAPPA * G * A) if shear else 0.0
    assert sol.displacements[0, 1, dof] == pytest.approx(
        P * L**3 / (3 * E * I) + shear_part, rel=1e-12)
    # Slope PL²/(2EI): a load along +y turns the tip about +z, along +z about -y.
    rot = 5 if dof == 1 else 4
    sign = 1.0 if dof == 1 else -1.0
    assert sol.displacements[0, 1, rot] == pytest.approx(sign * P * L**2 / (2 * E * I), rel=1e-12)


def test_cantilever_with_unequal_axes() -> None:
    """Iy ≠ Iz: each axis bends with its own second moment."""
    Iy, Iz = 300.0, 1200.0
    beams = Beams.make([[0, 1]], E=E, G=G, A=A, Iy=Iy, Iz=Iz, J=J, ref=(0, 0, 1))
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]], beams=beams, fixed=[FIXED, FREE])
    loads = np.zeros((2, 2, 6))
    loads[0, 1, 1] = P  # along local y: bends about local z
    loads[1, 1, 2] = P  # along local z: bends about local y
    sol = solve_static(model, loads)
    assert sol.displacements[0, 1, 1] == pytest.approx(P * L**3 / (3 * E * Iz), rel=1e-12)
    assert sol.displacements[1, 1, 2] == pytest.approx(P * L**3 / (3 * E * Iy), rel=1e-12)


@pytest.mark.parametrize("shear", [False, True])
def test_simply_supported_centre_load(shear: bool) -> None:
    model = FrameModel.make(
        [[0, 0, 0], [L / 2, 0, 0], [L, 0, 0]], beams=tube([[0, 1], [1, 2]], shear),
        fixed=[[True, True, True, True, False, False], FREE, [False, True, True, False, False,
                                                             False]])
    sol = solve_static(model, one_load(3, 1, 1, -P))
    shear_part = P * L / (4 * KAPPA * G * A) if shear else 0.0
    assert -sol.displacements[0, 1, 1] == pytest.approx(
        P * L**3 / (48 * E * I) + shear_part, rel=1e-12)


def test_guided_cantilever() -> None:
    """Both ends rotation-fixed, one sliding: δ = PL³/(12EI) (Euler–Bernoulli)."""
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]], beams=tube([[0, 1]], shear=False),
                            fixed=[FIXED, [False, False, False, True, True, True]])
    sol = solve_static(model, one_load(2, 1, 1, P))
    assert sol.displacements[0, 1, 1] == pytest.approx(P * L**3 / (12 * E * I), rel=1e-12)


def test_pinned_tip_release_is_exact() -> None:
    """A single member released at its tip still gives PL³/(3EI) (condensed, not zeroed)."""
    releases = np.zeros((1, 12), bool)
    releases[0, [10, 11]] = True  # My, Mz at end 2
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]],
                            beams=tube([[0, 1]], shear=False, releases=releases),
                            fixed=[FIXED, [False, False, False, True, True, True]])
    sol = solve_static(model, one_load(2, 1, 1, P))
    assert sol.displacements[0, 1, 1] == pytest.approx(P * L**3 / (3 * E * I), rel=1e-12)
    assert sol.beam_forces[0, 0, 11] == pytest.approx(0.0, abs=1e-9)  # no moment at the pin


def test_right_angle_frame_out_of_plane() -> None:
    """Leg a along x fixed at the origin, leg b along y, load along z at b's tip."""
    a, b = 180.0, 120.0
    model = FrameModel.make([[0, 0, 0], [a, 0, 0], [a, b, 0]],
                            beams=tube([[0, 1], [1, 2]], shear=False),
                            fixed=[FIXED, FREE, FREE])
    sol = solve_static(model, one_load(3, 2, 2, P))
    expected = P * b**3 / (3 * E * I) + P * a**3 / (3 * E * I) + P * b**2 * a / (G * J)
    assert sol.displacements[0, 2, 2] == pytest.approx(expected, rel=1e-12)


def test_tube_torsion() -> None:
    T = 4_000.0  # N·mm
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]], beams=tube([[0, 1]]), fixed=[FIXED, FREE])
    sol = solve_static(model, one_load(2, 1, 3, T))
    assert sol.displacements[0, 1, 3] == pytest.approx(T * L / (G * J), rel=1e-12)
    assert sol.beam_forces[0, 0, 3] == pytest.approx(-T, rel=1e-12)


def test_axial_and_reactions_balance() -> None:
    model = FrameModel.make([[0, 0, 0], [L, 0, 0]], beams=tube([[0, 1]]), fixed=[FIXED, FREE])
    sol = solve_static(model, one_load(2, 1, 0, P))
    assert sol.displacements[0, 1, 0] == pytest.approx(P * L / (E * A), rel=1e-12)
    assert sol.beam_axial[0, 0] == pytest.approx(P, rel=1e-12)
    assert sol.reactions[0, 0, 0] == pytest.approx(-P, rel=1e-12)


def test_cantilever_buckling_factor_converges_to_euler() -> None:
    """Four cubic elements give the Euler load P_cr = π²EI/(2L)² within 1e-4 (the consistent
    geometric stiffness over-estimates by O(h⁴): 3.3e-5 at four elements)."""
    n = 5
    xyz = [[L * i / (n - 1), 0, 0] for i in range(n)]
    model = FrameModel.make(xyz, beams=tube([[i, i + 1] for i in range(n - 1)], shear=False),
                            fixed=[FIXED] + [FREE] * (n - 1))
    sol = solve_static(model, one_load(n, n - 1, 0, -1.0))
    factor = buckling_factors(model, sol)[0]
    assert factor == pytest.approx(math.pi**2 * E * I / (2 * L) ** 2, rel=1e-4)


def test_second_order_amplification() -> None:
    """A cantilever with a tip lateral load H and axial compression N: the second-order tip
    deflection is the first-order one amplified by about 1/(1 − N/P_cr) (Timoshenko & Gere,
    Theory of Elastic Stability, 2nd ed. §1.11, from memory; exact for a sine-shaped
    deflection, here within 2 % at N = 0.3 P_cr)."""
    n = 9
    xyz = [[L * i / (n - 1), 0, 0] for i in range(n)]
    model = FrameModel.make(xyz, beams=tube([[i, i + 1] for i in range(n - 1)], shear=False),
                            fixed=[FIXED] + [FREE] * (n - 1))
    p_cr = math.pi**2 * E * I / (2 * L) ** 2
    loads = np.zeros((1, n, 6))
    loads[0, -1, 0] = -0.3 * p_cr
    loads[0, -1, 1] = 1.0
    first = solve_static(model, loads).displacements[0, -1, 1]
    second = solve_second_order(model, loads).displacements[0, -1, 1]
    assert first == pytest.approx(L**3 / (3 * E * I), rel=1e-12)
    assert second / first == pytest.approx(1 / (1 - 0.3), rel=0.02)

"""The lower bound on the buckling factor (stiff.fe.buckling_bound) is below the factor.

References: the bound's derivation (trace of K⁻¹C over the compressed elements; Golub & Van
Loan, Matrix Computations, 4th ed., §8.1, from memory) and the engine's own linear buckling
factor, itself checked against SciPy's generalised eigh and Euler's column in
tests/unit/test_buckling_batch.py. For a column the bound is the factor over the sum of all its
modes' ratios, a closed form.
"""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.case import load_case
from stiff.check import run_check
from stiff.fe import Beams, FrameModel, buckling_factors, solve_static, stack
from stiff.fe.buckling_bound import buckling_lower_bounds
from tests.unit.test_buckling_batch import _frame, _loads


@settings(max_examples=30, deadline=None)
@given(height=st.floats(60.0, 200.0), reach=st.floats(40.0, 150.0),
       tension=st.floats(-5.0, 10.0), fx=st.floats(-80.0, 80.0), fy=st.floats(-500.0, 100.0),
       fz=st.floats(-30.0, 30.0))
def test_bound_is_below_the_factor(height: float, reach: float, tension: float, fx: float,
                                   fy: float, fz: float) -> None:
    """Random frames with members, a rigid knee and a preloaded spring, any load: the bound
    is at most λ (and ∞ only where λ is)."""
    model = stack([_frame(height, reach, tension), _frame(reach + 20.0, height, tension)])
    loads = np.broadcast_to(_loads([(fx, fy, fz), (-fx, fy, -fz)]), (2, 2, 6, 6))
    solution = solve_static(model, loads)
    lam = buckling_factors(model, solution)
    bound = buckling_lower_bounds(model, solution)
    assert np.all(bound <= lam * (1.0 + 1e-9))
    assert np.all(np.isinf(bound) <= np.isinf(lam))


def test_bound_of_a_cantilever_column_is_near_euler() -> None:
    """A fixed-free column under end compression P: λ P = π²EI/(4L²) (Euler), and the bound
    lies below it by the sum of all its modes: the cantilever's loads go as (2k − 1)², so
    Σ λ₁/λ_k = π²/8 per bending plane, 2.47 for the two, a bound of about 0.405 λ."""
    E, d, L, n = 70000.0, 10.0, 400.0, 8
    A, I = math.pi * d**2 / 4, math.pi * d**4 / 64
    xyz = [[0.0, i * L / n, 0.0] for i in range(n + 1)]
    beams = Beams.make([[i, i + 1] for i in range(n)], E=E, G=E / 2.6, A=A, Iy=I, Iz=I,
                       J=2 * I, Asy=0.9 * A, Asz=0.9 * A)
    model = FrameModel.make(xyz, beams=beams, fixed=[[True] * 6] + [[False] * 6] * n)
    P = 10.0
    loads = np.zeros((1, n + 1, 6))
    loads[0, n, 1] = -P
    solution = solve_static(model, loads)
    euler = math.pi**2 * E * I / (4 * L**2) / P
    lam = float(buckling_factors(model, solution)[0])
    bound = float(buckling_lower_bounds(model, solution)[0])
    assert math.isclose(lam, euler, rel_tol=2e-3)  # 8 elements, shear included
    assert bound <= lam
    assert math.isclose(bound, lam / (2 * math.pi**2 / 8), rel_tol=0.03)


def test_bound_is_below_the_factor_in_every_demo_load_case() -> None:
    """Every load case of every demo case: bound ≤ λ."""
    for path in sorted(CASES_DIR.glob("*.toml")):
        for lc in run_check(load_case(path)).load_cases:
            lam = float(np.ravel(buckling_factors(lc.model, lc.solution))[0])
            bound = float(np.ravel(buckling_lower_bounds(lc.model, lc.solution))[0])
            assert bound <= lam * (1.0 + 1e-9), (path.stem, lc.name)

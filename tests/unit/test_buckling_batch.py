"""Linear buckling factors over a batch of models with several load cases.

The batched solve (stacked Cholesky, L⁻¹(−K_G)L⁻ᵀ, ``eigvalsh``) must give, model by model and
case by case, what one model solved alone gives, and what the generalised symmetric
eigenproblem −K_G φ = μ K φ gives through SciPy's ``eigh`` (LAPACK ``dsygvd``), the way the
engine solved it before. Sources:
- Euler load of a cantilever P_cr = π²EI/(2L)² (AISC 360 Commentary Table C-A-7.1, K = 2,
  theoretical value); linear buckling is linear in the load, so λ(s F) = λ(F)/s (the load
  factor's definition, (K + λ K_G(F)) φ = 0 with K_G linear in F).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.linalg as sla
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff.errors import MechanismError
from stiff.fe import (
    Beams,
    Connectors,
    FrameModel,
    Solution,
    Springs,
    buckling_factors,
    solve_static,
    stack,
)
from stiff.fe.batch import take
from stiff.fe.reduce import case_reduction
from stiff.fe.solve import assemble_model, geometric_stiffness

E, G = 70_000.0, 26_000.0  # MPa, aluminium-like
D, d = 12.0, 10.0  # tube OD, ID [mm]
A = math.pi * (D**2 - d**2) / 4
I = math.pi * (D**4 - d**4) / 64
J = math.pi * (D**4 - d**4) / 32
FIXED, FREE = [True] * 6, [False] * 6
KNEE_Z = 2.0e5  # the knee's stiffness about z [N·mm/rad] (demo value)


def _tubes(pairs: list[list[int]]) -> Beams:
    return Beams.make(pairs, E=E, G=G, A=A, Iy=I, Iz=I, J=J, Asy=0.5 * A, Asz=0.5 * A)


def _frame(height: float, reach: float, spring_tension: float | None,
           knee: float = KNEE_Z) -> FrameModel:
    """A column fixed at its base, a knee joint (rigid but for a sprung turn about z, stiffness
    ``knee``) to an arm, and a preloaded spring from the base to the arm's tip (None: no
    spring): rigid constraints, members and a spring all enter the buckling problem."""
    xyz = [[0, 0, 0], [0, height / 2, 0], [0, height, 0], [0, height, 0],
           [reach / 2, height, 0], [reach, height, 0]]
    springs = None if spring_tension is None else Springs.make(
        [[0, 5]], rate=5.0, tension=spring_tension)
    return FrameModel.make(
        xyz, beams=_tubes([[0, 1], [1, 2], [3, 4], [4, 5]]),
        connectors=Connectors.make([[2, 3]], [math.inf] * 5 + [knee]), springs=springs,
        fixed=[FIXED] + [FREE] * 5)


def _loads(cases: list[tuple[float, float, float]], n_nodes: int = 6) -> np.ndarray:
    """Tip forces (N), one load case each."""
    out = np.zeros((len(cases), n_nodes, 6))
    for j, force in enumerate(cases):
        out[j, 5, :3] = force
    return out


CASES = [(0.0, -200.0, 0.0), (40.0, -150.0, 10.0), (-30.0, -400.0, -20.0)]


def _batch() -> tuple[FrameModel, Solution]:
    """Four frames of different proportions and preloads, each under the three cases."""
    models = [_frame(h, r, t) for h, r, t in
              [(120.0, 80.0, 0.0), (150.0, 60.0, 5.0), (100.0, 110.0, -3.0), (140.0, 90.0, 8.0)]]
    model = stack(models)
    loads = np.broadcast_to(_loads(CASES), (4, len(CASES), 6, 6))
    return model, solve_static(model, loads)


def _one(solution: Solution, i: int) -> Solution:
    return Solution(**{name: getattr(solution, name)[i]
                       for name in Solution.__dataclass_fields__})


def _eigh_reference(model: FrameModel, solution: Solution) -> np.ndarray:
    """(c,) λ of one model by SciPy's generalised ``eigh``, one load case at a time."""
    fac = assemble_model(model)
    change = solution.spring_forces - model.springs.tension[..., None, :]
    Kg = geometric_stiffness(model, fac.mats, solution.beam_axial, change)
    Kgr = case_reduction(fac.red, Kg.shape[-3]).project(Kg)
    out = []
    for g in Kgr:
        mu = sla.eigh(-g, fac.Kr, eigvals_only=True)
        out.append(1.0 / mu[-1] if mu[-1] > 1e-12 * max(abs(mu[0]), abs(mu[-1])) else math.inf)
    return np.array(out)


def test_batch_with_several_cases_matches_models_solved_alone() -> None:
    """B = 4 models × 3 cases: each entry equals the model solved alone (the same LAPACK calls
    on the same matrices, so to round-off: 1e-12) and SciPy's generalised eigh (1e-9: the two
    reductions of the generalised problem round differently)."""
    model, solution = _batch()
    lam = buckling_factors(model, solution)
    assert lam.shape == (4, len(CASES))
    assert np.isfinite(lam).all() and (lam > 0).all()
    for i in range(4):
        alone = buckling_factors(take(model, (i,)), _one(solution, i))
        assert alone.shape == (len(CASES),)
        np.testing.assert_allclose(lam[i], alone, rtol=1e-12)
        np.testing.assert_allclose(lam[i], _eigh_reference(take(model, (i,)), _one(solution, i)),
                                   rtol=1e-9)


def test_batch_of_one_case_keeps_the_batch_shape() -> None:
    """(B, 1) solutions, as a load set holds them, give (B, 1) factors."""
    model, solution = _batch()
    first = Solution(**{name: getattr(solution, name)[:, :1]
                        for name in Solution.__dataclass_fields__})
    lam = buckling_factors(model, first)
    assert lam.shape == (4, 1)
    np.testing.assert_allclose(lam[:, 0], buckling_factors(model, solution)[:, 0], rtol=1e-12)


def _cantilevers(lengths: list[float], n: int = 5) -> FrameModel:
    """Straight cantilevers along x of n - 1 members each, no shear deformation."""
    beams = Beams.make([[i, i + 1] for i in range(n - 1)], E=E, G=G, A=A, Iy=I, Iz=I, J=J)
    return stack([FrameModel.make([[L * i / (n - 1), 0, 0] for i in range(n)], beams=beams,
                                  fixed=[FIXED] + [FREE] * (n - 1)) for L in lengths])


def test_batched_cantilevers_reach_euler() -> None:
    """Cantilevers of three lengths, each of four cubic elements: π²EI/(2L)² within 1e-4 (the
    consistent geometric stiffness over-estimates by O(h⁴), 3.3e-5 at four elements); twice
    the load, half the factor (round-off: 1e-12)."""
    lengths = [180.0, 240.0, 320.0]
    model = _cantilevers(lengths)
    loads = np.zeros((len(lengths), 2, 5, 6))
    loads[:, 0, 4, 0] = -1.0  # 1 N of compression
    loads[:, 1, 4, 0] = -2.0
    lam = buckling_factors(model, solve_static(model, loads))
    for k, L in enumerate(lengths):
        assert lam[k, 0] == pytest.approx(math.pi**2 * E * I / (2 * L) ** 2, rel=1e-4)
        assert lam[k, 1] == pytest.approx(lam[k, 0] / 2, rel=1e-12)


def test_tension_never_buckles() -> None:
    """Cantilevers only pulled have no positive load factor: inf, beside a compressed one."""
    model = _cantilevers([180.0, 240.0])
    loads = np.zeros((2, 2, 5, 6))
    loads[:, 0, 4, 0] = 10.0  # pulled
    loads[:, 1, 4, 0] = -10.0  # pushed
    lam = buckling_factors(model, solve_static(model, loads))
    assert np.isinf(lam[:, 0]).all() and np.isfinite(lam[:, 1]).all()


def test_a_mechanism_in_the_batch_is_named() -> None:
    """A batch with one frame whose knee turns freely (no stiffness about z, no spring) is
    refused with the static solve's named error."""
    sound = _frame(120.0, 80.0, None)
    model = stack([sound, _frame(120.0, 80.0, None, knee=0.0)])
    solution = solve_static(sound, _loads(CASES))
    pair = Solution(**{name: np.stack([getattr(solution, name)] * 2)
                       for name in Solution.__dataclass_fields__})
    with pytest.raises(MechanismError, match="mechanism"):
        buckling_factors(model, pair)


@settings(max_examples=25, deadline=None)
@given(scale=st.floats(0.25, 8.0), fx=st.floats(-50.0, 50.0), fz=st.floats(-20.0, 20.0))
def test_load_factor_scales_inversely_with_the_load(scale: float, fx: float, fz: float) -> None:
    """λ(s F) = λ(F)/s, entry by entry, over a batch of two frames (no preload, so the
    spring's tension change scales with the load too). Tolerance 1e-9: round-off of two
    eigen-solves."""
    model = stack([_frame(120.0, 80.0, 0.0), _frame(150.0, 60.0, 0.0)])
    base = np.broadcast_to(_loads([(fx, -200.0, fz), (fx, -300.0, -fz)]), (2, 2, 6, 6))
    lam = buckling_factors(model, solve_static(model, base))
    scaled = buckling_factors(model, solve_static(model, scale * base))
    np.testing.assert_allclose(scaled * scale, lam, rtol=1e-9)

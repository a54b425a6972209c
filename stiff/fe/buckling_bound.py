"""A lower bound on a frame's linear buckling factor, cheap enough to screen many poses.

The buckling factor λ solves (K + λ K_G) φ = 0, λ = 1/μ_max with μ_max the largest eigenvalue
of −K_G φ = μ K φ (``stiff.fe.solve.buckling_factors``). The geometric stiffness is a sum over
members and springs, K_G = Σ_e N_e G_e with G_e the member's geometric stiffness under a unit
tension (positive semi-definite: the work of an axial force through the transverse
displacements) and, for a spring, its tension change over its length times (I − e eᵀ). Only the
compressed elements (N_e < 0) can lower the stiffness, so −K_G ≤ C = Σ_{N_e<0} |N_e| G_e in the
order of quadratic forms, and, C being positive semi-definite,

    μ_max(−K_G, K) ≤ μ_max(C, K) ≤ trace(K⁻¹ C) = Σ_{N_e<0} |N_e| trace(X_e G_e),

with X_e the block of K⁻¹ at the element's DOFs (the eigenvalues of K⁻¹C are real and not
negative, and the largest is at most their sum; Golub & Van Loan, *Matrix Computations*, 4th
ed., §8.1 and §8.7, from memory). So λ ≥ 1/trace(K⁻¹C): a lower bound from one inverse of K per
model and a 12x12 product per element and load case, against a full eigenvalue problem per
load case.
"""

from __future__ import annotations

import numpy as np

from stiff.fe import assemble, element
from stiff.fe.model import FloatArray, FrameModel
from stiff.fe.results import Solution
from stiff.fe.solve import (
    Reductions,
    _free_geometric,
    _Reduced,
    _reduced,
    _whitening,
    top_factors,
)


def _unpack_blocks(blocks: FloatArray) -> FloatArray:
    """(..., 16, 9) member matrices in the block layout of ``element.global_blocks`` ->
    (..., 12, 12)."""
    b = blocks.reshape(*blocks.shape[:-2], 4, 4, 3, 3)  # I, J, i, j
    return np.swapaxes(b, -3, -2).reshape(*blocks.shape[:-2], 12, 12)  # I, i, J, j


def _inverse_blocks(W: FloatArray, position: np.ndarray, n_free: int,
                    dofs: np.ndarray) -> FloatArray:
    """(..., n, k, k) blocks of K_ff⁻¹ = Wᵀ W at each element's DOFs (zero at supports)."""
    place = position[dofs]  # (n, k) place in the free-first order
    free = place < n_free
    cols = np.where(free, place, 0)
    We = W[..., :, cols] * free  # (..., n_q, n, k)
    out: FloatArray = np.einsum("...qna,...qnb->...nab", We, We)
    return out


def buckling_lower_bounds(model: FrameModel, solution: Solution) -> FloatArray:
    """(..., c) a lower bound on each load case's buckling factor λ (``inf`` when nothing is
    in compression); see the module docstring. The model must hold (MechanismError)."""
    fac = _reduced(model)
    return _bounds(model, fac, _whitening(fac), solution)


def screened_buckling_factors(model: FrameModel, solution: Solution, cutoff: FloatArray,
                              memo: Reductions | None = None) -> FloatArray:
    """(..., c) λ of every load case where its lower bound is below ``cutoff`` (..., c), and
    the bound elsewhere (then at or below λ and at or above the cutoff).

    The exact factors are those of ``stiff.fe.buckling_factors`` (the same whitening of the
    same batch, the same eigenvalue problem), solved only for the load cases that need them.
    """
    fac = _reduced(model, memo)  # memo: see stiff.fe.solve.Reductions
    W = _whitening(fac)
    out = _bounds(model, fac, W, solution)
    need = out < cutoff
    if need.any() and fac.Kr.shape[-1]:
        cases = [int(j) for j in np.flatnonzero(need.reshape(-1, need.shape[-1]).any(axis=0))]
        Kg = _free_geometric(model, fac, solution, cases)  # (..., c', n_free, n_free)
        where = np.nonzero(need[..., cases])
        Wp = W[where[:-1]] if W.ndim > 2 else W
        A = Wp @ -Kg[where] @ np.swapaxes(Wp, -1, -2)
        at = (*where[:-1], np.asarray(cases)[where[-1]])
        out[at] = top_factors(np.asarray(np.linalg.eigvalsh(A), np.float64))
    return out


def _bounds(model: FrameModel, fac: _Reduced, W: FloatArray, solution: Solution) -> FloatArray:
    red = fac.red
    n_free = red.free.size
    axial = solution.beam_axial  # (..., c, n_beams)
    total = np.zeros(axial.shape[:-1])
    if model.beams.count and fac.mats is not None:
        b = model.beams
        unit = element.local_geometric_stiffness(np.ones_like(fac.mats.L), b.A, b.Iy, b.Iz,
                                                 fac.mats.L)
        R = np.broadcast_to(fac.mats.R, (*unit.shape[:-2], 3, 3))
        G = _unpack_blocks(element.global_blocks(fac.mats.condense(unit), R))
        X = _inverse_blocks(W, red.position, n_free, assemble.beam_dofs(model))
        per_unit = np.einsum("...nab,...nab->...n", X, G)  # trace(X_e G_e), (..., n_beams)
        total = total + np.einsum("...cn,...n->...c", np.maximum(-axial, 0.0), per_unit)
    if model.springs.count:
        change = solution.spring_forces - model.springs.tension[..., None, :]
        S = assemble.spring_geometric(model, np.ones(model.springs.rate.shape))
        Xs = _inverse_blocks(W, red.position, n_free, assemble.spring_dofs(model))
        per_unit = np.einsum("...nab,...nab->...n", Xs, S)
        total = total + np.einsum("...cn,...n->...c", np.maximum(-change, 0.0), per_unit)
    out: FloatArray = np.full(total.shape, np.inf)
    with np.errstate(over="ignore"):  # a vanishing compression: no bound below ∞
        np.divide(1.0, total, out=out, where=total > 0)
    return out

"""Cholesky solves for stacks of small symmetric matrices, with the mechanism check.

numpy's batched ``cholesky`` and ``solve`` would factor each matrix twice (once to check it,
once to solve); here each reduced stiffness is factored once by LAPACK, its pivots checked for
a mechanism, and all right-hand sides solved in the same call. For the small matrices of a
linkage (tens of DOFs) the per-matrix call overhead is a few microseconds.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.linalg import lapack

from stiff.fe.model import BoolArray, FloatArray

#: A pivot of the reduced stiffness below this fraction of its diagonal marks a mechanism.
#: Exact null modes leave pivots near machine precision (1e-16 relative); the softest real
#: members of a linkage (an actuator against a carbon tube) stay above 1e-8.
PIVOT_TOLERANCE = 1e-10


def spd_solve(K: FloatArray, F: FloatArray) -> tuple[FloatArray, BoolArray]:
    """X with K X = F for stacks of symmetric matrices K (..., n, n) and F (..., n, m).

    Each matrix is factored once (LAPACK ``dposv``: Cholesky and solve in one call) and its
    factor checked: a matrix is sound when the factorisation succeeds and every squared pivot
    is at least ``PIVOT_TOLERANCE`` times its diagonal entry; otherwise the model is (nearly)
    a mechanism or not positive definite, and its X is garbage. The batch axes broadcast.

    Returns
    -------
    X : (..., n, m)
    ok : (...) True where the matrix is sound
    """
    batch = K.shape[:-2] if K.shape[:-2] == F.shape[:-2] else np.broadcast_shapes(
        K.shape[:-2], F.shape[:-2])
    size = math.prod(batch)
    n, m = K.shape[-1], F.shape[-1]
    mats = (K if K.shape[:-2] == batch else np.broadcast_to(K, (*batch, n, n))).reshape(
        size, n, n)
    rhs = (F if F.shape[:-2] == batch else np.broadcast_to(F, (*batch, n, m))).reshape(
        size, n, m)
    out = np.empty((size, n, m))
    if n == 0:
        return out.reshape(*batch, n, m), np.ones(batch, bool)
    pivots = np.empty((size, n))
    dposv = lapack.dposv
    for i in range(size):
        # K is symmetric, so K.T is the same matrix in the Fortran order LAPACK wants
        c, out[i], info = dposv(mats[i].T, rhs[i], lower=True)
        pivots[i] = c.diagonal() if info == 0 else np.nan  # a failed factor fails the test
    sound = pivots * pivots >= PIVOT_TOLERANCE * mats.diagonal(axis1=-2, axis2=-1)
    ok: BoolArray = np.asarray(sound.all(axis=-1))
    return out.reshape(*batch, n, m), ok.reshape(batch)


def first_bad(ok: BoolArray) -> tuple[int, ...] | None:
    """Batch index of the first unsound factor, or None."""
    if np.count_nonzero(ok) == np.size(ok):
        return None
    return tuple(int(i) for i in np.argwhere(~np.asarray(ok))[0])

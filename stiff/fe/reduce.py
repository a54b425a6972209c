"""Supports and rigid constraints out of the unknowns; mechanisms found and named.

Supports remove DOFs; rigid connector components are linear constraints C u = 0, removed
exactly by an orthonormal null-space basis T (u = T q), so no penalty stiffness is ever added.
A singular reduced stiffness is a mechanism: its null modes are found and the nodes and DOFs
that move in them are named in the error.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg as sla

from stiff.errors import MechanismError, ModelError
from stiff.fe import assemble
from stiff.fe.batch import take
from stiff.fe.linalg import PIVOT_TOLERANCE, first_bad, spd_solve
from stiff.fe.model import DOF_NAMES, DOFS_PER_NODE, FloatArray, FrameModel, IntArray


@dataclass(frozen=True)
class Reduction:
    """How full DOF vectors map to the unknowns: u[free] = T q, u[fixed] = 0."""

    free: IntArray  # (n_free,) global DOF indices not held by supports
    T: FloatArray | None  # (..., n_free, n_q) null-space basis of the constraints, None = I
    C_free: FloatArray  # (..., n_rigid, n_free) constraint rows on the free DOFs
    position: IntArray  # (n_dofs,) place of each DOF with the free ones first, then the fixed
    #: (n_free, n_q) the basis when every model of a batch has the same constraints (the
    #: poses of one linkage: pins along z do not turn with the pose), else None
    shared: FloatArray | None = None

    @property
    def n_q(self) -> int:
        """Number of independent unknowns."""
        return self.free.size if self.T is None else int(self.T.shape[-1])

    def expand(self, q: FloatArray, n_dofs: int) -> FloatArray:
        """Full DOF vectors (..., n_dofs, m) from reduced ones (..., n_q, m)."""
        u_free = q if self.T is None else self.T @ q
        u = np.zeros((*u_free.shape[:-2], n_dofs, u_free.shape[-1]))
        u[..., self.free, :] = u_free
        return u

    def project(self, A: FloatArray) -> FloatArray:
        """Tᵀ A_ff T for a full (..., n_dofs, n_dofs) matrix."""
        A_ff = np.take(np.take(A, self.free, axis=-2), self.free, axis=-1)
        if self.T is not None:
            A_ff = np.swapaxes(self.T, -1, -2) @ A_ff @ self.T
        # C order, so that LAPACK gets each matrix without a copy (see linalg.cholesky)
        return np.ascontiguousarray(A_ff)

    def project_free(self, A_ff: FloatArray) -> FloatArray:
        """Tᵀ A_ff T for a symmetric free-free block (..., n_free, n_free).

        With one basis for the whole batch this is two large products instead of two small
        ones per model: A T for all models stacked, then (A T)ᵀ T = Tᵀ A T (A symmetric).
        """
        if self.T is None:
            return A_ff
        T = self.shared
        if T is None or A_ff.ndim == 2:
            return np.ascontiguousarray(np.swapaxes(self.T, -1, -2) @ A_ff @ self.T)
        n, m = T.shape
        lead = A_ff.shape[:-2]
        AT = (np.ascontiguousarray(A_ff).reshape(-1, n) @ T).reshape(*lead, n, m)
        out: FloatArray = (np.ascontiguousarray(np.swapaxes(AT, -1, -2)).reshape(-1, n)
                           @ T).reshape(*lead, m, m)
        return out

    def project_rhs(self, F: FloatArray) -> FloatArray:
        """Tᵀ F_f for full right-hand sides (..., n_dofs, m)."""
        F_f = F.take(self.free, axis=-2)
        return F_f if self.T is None else np.swapaxes(self.T, -1, -2) @ F_f


#: Constraint rows of a batch that agree to this fraction of their largest entry are the same
#: constraints and share one basis: the poses of a linkage differ in them only by round-off of
#: the offsets between coincident nodes of two parts (~1e-11 mm on a 100 mm leg).
SAME_ROWS = 1e-9


def _null_space(C: FloatArray) -> tuple[FloatArray, FloatArray | None]:
    """Orthonormal basis (..., n, n - rank) of the null space of C (..., m, n), and the one
    basis (n, n - rank) when every matrix of the batch has the same rows (else None)."""
    batch = C.shape[:-2]
    flat = C.reshape(-1, *C.shape[-2:])
    if flat.shape[0] == 0:
        return np.zeros((*batch, C.shape[-1], C.shape[-1])), None
    scale = max(float(np.abs(flat[0]).max(initial=0.0)), 1e-300)
    if np.all(np.abs(flat - flat[0]) <= SAME_ROWS * scale):
        T0 = sla.null_space(flat[0])
        return np.broadcast_to(T0, (*batch, *T0.shape)), (T0 if batch else None)
    _, s, Vh = np.linalg.svd(flat, full_matrices=True)
    tol = s.max(axis=-1, keepdims=True) * max(flat.shape[-2:]) * np.finfo(float).eps
    rank = (s > tol).sum(axis=-1)
    if (rank != rank[0]).any():
        raise ModelError("rigid connectors: their constraints are independent in some models of "
                         "the batch and redundant in others; solve those models apart")
    T = np.swapaxes(Vh[:, int(rank[0]):, :], -1, -2)
    return T.reshape(*batch, *T.shape[-2:]), None


def reduce(model: FrameModel) -> Reduction:
    """Remove supported DOFs and rigid connector components from the unknowns."""
    fixed = model.fixed.reshape(-1)
    order = np.argsort(fixed, kind="stable")  # free DOFs first, each group in DOF order
    free = order[: fixed.size - int(np.count_nonzero(fixed))]
    position = np.empty_like(order)
    position[order] = np.arange(order.size)
    if not (model.connectors.count and model.connectors.rigid.any()):
        C = np.zeros((*model.batch_shape, 0, free.size))
        return Reduction(free=free, T=None, C_free=C, position=position)
    C = assemble.constraint_rows(model)[..., free]
    T, shared = _null_space(C)
    return Reduction(free=free, T=T, C_free=C, position=position, shared=shared)


def _mode_names(model: FrameModel, red: Reduction, mode: FloatArray) -> tuple[tuple[str, str], ...]:
    """(node, DOF) pairs that move in the null modes (columns of ``mode``), largest first.

    Rotations are weighed by the model's size so that they compare with translations, and
    each mode is scaled to its own largest motion before the modes are combined.
    """
    modes = mode.reshape(mode.shape[0], -1)
    u = red.expand(modes, model.n_dofs)
    size = max(float(np.ptp(model.xyz.reshape(-1, 3), axis=0).max()), 1.0)
    weight = np.tile(np.array([1.0, 1.0, 1.0, size, size, size]), model.n_nodes)
    weighted = np.abs(u) * weight[:, None]
    amp = (weighted / weighted.max(axis=0, keepdims=True)).max(axis=-1)
    order = np.argsort(-amp)
    picked = order[amp[order] > 0.25 * amp.max()]
    return tuple(
        (model.node_names[d // DOFS_PER_NODE], DOF_NAMES[d % DOFS_PER_NODE]) for d in picked
    )


def _describe(free: tuple[tuple[str, str], ...]) -> str:
    """'knee: ux, uy; foot: uy' with at most six nodes."""
    by_node: dict[str, list[str]] = {}
    for node, dof in free:
        by_node.setdefault(node, []).append(dof)
    parts = [f"{node} ({', '.join(sorted(dofs, key=DOF_NAMES.index))})"
             for node, dofs in list(by_node.items())[:6]]
    more = "" if len(by_node) <= 6 else f" and {len(by_node) - 6} more nodes"
    return "; ".join(parts) + more


def diagnose(model: FrameModel, red: Reduction, Kr: FloatArray) -> MechanismError:
    """The error for one model (no batch axes) whose reduced stiffness ``Kr`` is singular."""
    w, V = np.linalg.eigh(Kr)
    scale = max(float(np.abs(w).max()), 1e-300)
    if w[0] < -1e-9 * scale:
        free = _mode_names(model, red, V[:, 0])
        return MechanismError(
            "the stiffness is not positive definite (a compressed spring, or an axial load "
            f"beyond buckling): the unstable motion moves {_describe(free)}", free)
    null = V[:, w <= max(PIVOT_TOLERANCE * scale, w[0])]
    free = _mode_names(model, red, null)
    return MechanismError(
        f"the model is a mechanism: {_describe(free)} can move without straining anything; "
        "hold it with a support, an actuator, a spring or a fixed joint", free)


def _take(
    model: FrameModel, red: Reduction, index: tuple[int, ...]
) -> tuple[FrameModel, Reduction]:
    """Model and reduction of one member of a batch."""
    one = take(model, index[: len(model.batch_shape)])
    T = None if red.T is None else red.T[index[: red.T.ndim - 2]]
    C = red.C_free[index[: red.C_free.ndim - 2]]
    return one, Reduction(free=red.free, T=T, C_free=C, position=red.position)


def checked_solve(model: FrameModel, red: Reduction, Kr: FloatArray, Fr: FloatArray) -> FloatArray:
    """Reduced solution q of Kr q = Fr; MechanismError if any Kr of the batch is singular."""
    q, ok = spd_solve(Kr, Fr)
    bad = first_bad(ok)
    if bad is not None:
        one, red_one = _take(model, red, bad)
        raise diagnose(one, red_one, np.broadcast_to(Kr, (*ok.shape, *Kr.shape[-2:]))[bad])
    return q


def case_reduction(red: Reduction, cases: int) -> Reduction:
    """The reduction with a load-case axis of length ``cases`` in its batched arrays."""
    if red.T is None:
        return red
    T = np.broadcast_to(red.T[..., None, :, :], (*red.T.shape[:-2], cases, *red.T.shape[-2:]))
    C = np.broadcast_to(red.C_free[..., None, :, :],
                        (*red.C_free.shape[:-2], cases, *red.C_free.shape[-2:]))
    return Reduction(free=red.free, T=T, C_free=C, position=red.position)

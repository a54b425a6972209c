"""Reduce, check and solve: supports, rigid constraints, mechanisms, compliance, buckling.

The chain is ``global_stiffness -> reduce -> factor (mechanism check) -> solve -> recover``,
each step a function of arrays. Supports remove DOFs; rigid connector components are linear
constraints C u = 0, removed exactly by an orthonormal null-space basis T (u = T q), so no
penalty stiffness is ever added. A singular reduced stiffness is a mechanism: the null mode is
found and the nodes and DOFs that move in it are named in the error.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import scipy.linalg as sla

from stiff.errors import MechanismError, ModelError
from stiff.fe import assemble, element
from stiff.fe.batch import take
from stiff.fe.model import DOF_NAMES, DOFS_PER_NODE, FloatArray, FrameModel, IntArray
from stiff.fe.results import Solution, recover

#: A pivot of the reduced stiffness below this fraction of its diagonal marks a mechanism.
#: Exact null modes leave pivots near machine precision (1e-16 relative); the softest real
#: members of a linkage (an actuator against a carbon tube) stay above 1e-8.
PIVOT_TOLERANCE = 1e-10


@dataclass(frozen=True)
class Reduction:
    """How full DOF vectors map to the unknowns: u[free] = T q, u[fixed] = 0."""

    free: IntArray  # (n_free,) global DOF indices not held by supports
    T: FloatArray | None  # (..., n_free, n_q) null-space basis of the constraints, None = I
    C_free: FloatArray  # (..., n_rigid, n_free) constraint rows on the free DOFs

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
        A_ff = A[..., self.free[:, None], self.free[None, :]]
        if self.T is None:
            return A_ff
        return np.swapaxes(self.T, -1, -2) @ A_ff @ self.T

    def project_rhs(self, F: FloatArray) -> FloatArray:
        """Tᵀ F_f for full right-hand sides (..., n_dofs, m)."""
        F_f = F[..., self.free, :]
        return F_f if self.T is None else np.swapaxes(self.T, -1, -2) @ F_f


def _null_space(C: FloatArray) -> FloatArray:
    """Orthonormal basis (..., n, n - rank) of the null space of C (..., m, n)."""
    batch = C.shape[:-2]
    flat = C.reshape(-1, *C.shape[-2:])
    if flat.shape[0] == 0:
        return np.zeros((*batch, C.shape[-1], C.shape[-1]))
    if np.all(flat == flat[0]):
        T0 = sla.null_space(flat[0])
        return np.broadcast_to(T0, (*batch, *T0.shape)).copy()
    _, s, Vh = np.linalg.svd(flat, full_matrices=True)
    tol = s.max(axis=-1, keepdims=True) * max(flat.shape[-2:]) * np.finfo(float).eps
    rank = (s > tol).sum(axis=-1)
    if (rank != rank[0]).any():
        raise ModelError("rigid connectors: their constraints are independent in some models of "
                         "the batch and redundant in others; solve those models apart")
    T = np.swapaxes(Vh[:, int(rank[0]):, :], -1, -2)
    return T.reshape(*batch, *T.shape[-2:])


def reduce(model: FrameModel) -> Reduction:
    """Remove supported DOFs and rigid connector components from the unknowns."""
    free = np.flatnonzero(~model.fixed.reshape(-1))
    C = assemble.constraint_rows(model)[..., free]
    if C.shape[-2] == 0:
        return Reduction(free=free, T=None, C_free=C)
    return Reduction(free=free, T=_null_space(C), C_free=C)


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
    T = None if red.T is None else red.T[index]
    C = red.C_free[index] if red.C_free.ndim > 2 else red.C_free
    return one, Reduction(free=red.free, T=T, C_free=C)


def check_definite(model: FrameModel, red: Reduction, Kr: FloatArray) -> None:
    """Raise :class:`MechanismError` if any reduced stiffness in the batch is singular."""
    if Kr.shape[-1] == 0:
        return
    diag = np.diagonal(Kr, axis1=-2, axis2=-1)
    bad: npt.NDArray[np.bool_]
    try:
        L = np.linalg.cholesky(Kr)
        pivots = np.diagonal(L, axis1=-2, axis2=-1) ** 2
        bad = np.asarray((pivots < PIVOT_TOLERANCE * diag).any(axis=-1))
    except np.linalg.LinAlgError:
        flat = Kr.reshape(-1, *Kr.shape[-2:])
        ok = np.array([_is_definite(k) for k in flat])
        bad = ~ok.reshape(Kr.shape[:-2])
    if np.any(bad):
        index = tuple(int(i) for i in np.argwhere(bad)[0]) if np.ndim(bad) else ()
        one, red_one = _take(model, red, index) if index else (model, red)
        raise diagnose(one, red_one, Kr[index])


def _is_definite(k: FloatArray) -> bool:
    """True when one reduced stiffness matrix is clearly positive definite."""
    try:
        L = np.linalg.cholesky(k)
    except np.linalg.LinAlgError:
        return False
    return bool((np.diagonal(L) ** 2 >= PIVOT_TOLERANCE * np.diagonal(k)).all())


def solve_reduced(Kr: FloatArray, Fr: FloatArray) -> FloatArray:
    """q with Kr q = Fr for stacks of symmetric positive definite matrices."""
    if Kr.shape[-1] == 0:
        return np.zeros(np.broadcast_shapes(Kr.shape[:-2], Fr.shape[:-2]) + Fr.shape[-2:])
    return np.asarray(np.linalg.solve(Kr, Fr), dtype=np.float64)


def _loads_matrix(model: FrameModel, loads: FloatArray) -> FloatArray:
    """Loads (..., c, n_nodes, 6) -> (..., c, n_dofs), checked."""
    loads = np.asarray(loads, dtype=np.float64)
    if loads.ndim < 3 or loads.shape[-2:] != (model.n_nodes, 6):
        raise ModelError(f"loads must have shape (..., cases, {model.n_nodes}, 6), "
                         f"got {loads.shape}")
    if not np.isfinite(loads).all():
        raise ModelError("loads must be finite numbers")
    return loads.reshape(*loads.shape[:-2], model.n_dofs)


@dataclass(frozen=True)
class Factored:
    """A model's stiffness, reduced and checked: everything a solve with many loads needs."""

    model: FrameModel
    mats: assemble.BeamMatrices | None
    K: FloatArray  # (..., n_dofs, n_dofs)
    red: Reduction
    Kr: FloatArray  # (..., n_q, n_q)


def factor(model: FrameModel) -> Factored:
    """Assemble, reduce and check a model; raises MechanismError if it is singular."""
    mats = assemble.beam_matrices(model) if model.beams.count else None
    K = assemble.global_stiffness(model, mats)
    red = reduce(model)
    Kr = red.project(K)
    check_definite(model, red, Kr)
    return Factored(model=model, mats=mats, K=K, red=red, Kr=Kr)


def solve_static(model: FrameModel, loads: FloatArray) -> Solution:
    """Linear static solution of every load case.

    Parameters
    ----------
    model : the frame (optionally batched)
    loads : (..., c, n_nodes, 6) nodal forces [N] and moments [N·mm] in global axes; the
        batch axes broadcast against the model's
    """
    F = _loads_matrix(model, loads)
    fac = factor(model)
    return recover(model, *_displace(fac, F), fac.mats)


def _displace(fac: Factored, F: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
    """(U, F, K U) for loads F (..., c, n_dofs)."""
    Ft = np.swapaxes(F, -1, -2)
    q = solve_reduced(fac.Kr, fac.red.project_rhs(Ft))
    U = np.swapaxes(fac.red.expand(q, fac.model.n_dofs), -1, -2)
    F, U = np.broadcast_arrays(F, U)
    return U, F, np.einsum("...ij,...cj->...ci", fac.K, U)


def compliance(model: FrameModel, dofs: IntArray) -> FloatArray:
    """Compliance matrix (..., m, m) at global DOF indices ``dofs`` (see ``node_dofs``).

    Units follow the DOFs: mm/N between translations, rad/(N·mm) between rotations, and
    rad/N = mm/(N·mm) across. A supported DOF has zero compliance. All m unit loads are solved
    as one multi-right-hand-side solve.
    """
    fac = factor(model)
    dofs = np.asarray(dofs, dtype=np.intp).reshape(-1)
    E = np.zeros((model.n_dofs, dofs.size))
    E[dofs, np.arange(dofs.size)] = 1.0
    Er = fac.red.project_rhs(np.broadcast_to(E, (*fac.Kr.shape[:-2], *E.shape)))
    X = solve_reduced(fac.Kr, Er)
    out: FloatArray = np.swapaxes(Er, -1, -2) @ X
    return out


def node_dofs(model: FrameModel, node: str | int, which: str = "ux uy uz") -> IntArray:
    """Global DOF indices of a node's named DOFs, e.g. ``node_dofs(m, "foot", "ux uy")``."""
    i = model.node_names.index(node) if isinstance(node, str) else int(node)
    return np.array([DOFS_PER_NODE * i + DOF_NAMES.index(d) for d in which.split()], np.intp)


def geometric_stiffness(
    model: FrameModel, mats: assemble.BeamMatrices | None, axial: FloatArray,
    spring_change: FloatArray,
) -> FloatArray:
    """(..., n_dofs, n_dofs) geometric stiffness of member axial forces and spring tension changes.

    Parameters
    ----------
    axial : (..., n_beams) member axial forces [N], tension +
    spring_change : (..., n_springs) change of spring tension from the preload [N]
    """
    n = model.n_dofs
    shape = np.broadcast_shapes(model.batch_shape, axial.shape[:-1], spring_change.shape[:-1])
    Kg = np.zeros((*shape, n, n))
    if model.beams.count and mats is not None:
        Kg = assemble.add_elements(Kg, np.broadcast_to(
            assemble.beam_geometric(model, mats, axial), (*shape, model.beams.count, 12, 12)),
            assemble.beam_dofs(model))
    if model.springs.count:
        Kg = assemble.add_elements(Kg, np.broadcast_to(
            assemble.spring_geometric(model, spring_change),
            (*shape, model.springs.count, 6, 6)), assemble.spring_dofs(model))
    return Kg


def buckling_factors(model: FrameModel, solution: Solution) -> FloatArray:
    """(..., c) load factor λ at which each load case buckles the model (linear buckling).

    Solves (K + λ K_G) φ = 0 with K_G from the members' axial forces and the springs' tension
    changes of the case; ``inf`` when no compression can buckle it.
    """
    fac = factor(model)
    axial = solution.beam_axial
    change = solution.spring_forces - model.springs.tension[..., None, :]
    Kg = geometric_stiffness(model, fac.mats, axial, change)
    Kgr = fac.red.project(Kg)
    Kr = np.broadcast_to(fac.Kr[..., None, :, :], Kgr.shape)
    flat_k = Kr.reshape(-1, *Kr.shape[-2:])
    flat_g = Kgr.reshape(-1, *Kgr.shape[-2:])
    out = np.full(flat_k.shape[0], np.inf)
    for i, (k, g) in enumerate(zip(flat_k, flat_g, strict=True)):
        if k.shape[0] == 0:
            continue
        mu = sla.eigh(-g, k, eigvals_only=True)
        if mu[-1] > 1e-12 * max(abs(mu[0]), abs(mu[-1]), 1e-300):
            out[i] = 1.0 / mu[-1]
    return out.reshape(Kgr.shape[:-2])


def solve_second_order(
    model: FrameModel, loads: FloatArray, *, tolerance: float = 1e-10, max_iterations: int = 50
) -> Solution:
    """Second-order (P-Δ) static solution: equilibrium on the stiffness K + K_G(N).

    Iterates on the members' axial forces and the springs' tension changes until the
    displacements change by less than ``tolerance`` (relative). Raises MechanismError when a
    load case is at or beyond its buckling load.
    """
    F = _loads_matrix(model, loads)
    fac = factor(model)
    U, F, KU = _displace(fac, F)
    solution = recover(model, U, F, KU, fac.mats)
    case_red = _case_reduction(fac.red, F.shape[-2])
    for _ in range(max_iterations):
        change = solution.spring_forces - model.springs.tension[..., None, :]
        Kt = fac.K[..., None, :, :] + geometric_stiffness(
            model, fac.mats, solution.beam_axial, change)
        Ktr = case_red.project(Kt)
        check_definite(model, case_red, Ktr)
        q = solve_reduced(Ktr, case_red.project_rhs(F[..., :, None]))
        U_new = case_red.expand(q, model.n_dofs)[..., 0]
        beam_kg = None if fac.mats is None else _local_geometric(model, fac.mats, solution)
        step = float(np.abs(U_new - U).max())
        U = U_new
        KU = np.einsum("...cij,...cj->...ci", Kt, U)
        solution = recover(model, U, F, KU, fac.mats, beam_kg)
        if step <= tolerance * max(float(np.abs(U).max()), 1e-300):
            return solution
    raise MechanismError(f"the second-order solve did not converge in {max_iterations} "
                         "iterations: the load is close to the buckling load")


def _local_geometric(
    model: FrameModel, mats: assemble.BeamMatrices, solution: Solution
) -> FloatArray:
    """(..., c, n_beams, 12, 12) condensed local geometric stiffness at the members' forces."""
    b = model.beams
    kg = element.local_geometric_stiffness(
        solution.beam_axial, b.A, b.Iy, b.Iz, mats.L[..., None, :])
    S = mats.S[..., None, :, :, :]
    return np.swapaxes(S, -1, -2) @ kg @ S


def _case_reduction(red: Reduction, cases: int) -> Reduction:
    """The reduction with a load-case axis of length ``cases`` in its batched arrays."""
    if red.T is None:
        return red
    T = np.broadcast_to(red.T[..., None, :, :], (*red.T.shape[:-2], cases, *red.T.shape[-2:]))
    C = np.broadcast_to(red.C_free[..., None, :, :],
                        (*red.C_free.shape[:-2], cases, *red.C_free.shape[-2:]))
    return Reduction(free=red.free, T=T, C_free=C)

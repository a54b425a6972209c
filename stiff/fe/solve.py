"""The analyses: static (first and second order), compliance, linear buckling.

The chain is ``stiffness -> reduce -> checked solve (mechanism check) -> recover``, each step
a function of arrays. The linear analyses assemble only the columns of the free DOFs (the
free-free block to solve with and the supports' rows for the reactions); the second-order
solve works on the full matrix (``assemble_model``). A batch of models goes through the chain
in chunks, so memory stays bounded however many poses or variants are solved.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from stiff.errors import MechanismError, ModelError
from stiff.fe import assemble, element
from stiff.fe.batch import batch_size, flat_slice
from stiff.fe.linalg import PIVOT_TOLERANCE
from stiff.fe.model import DOF_NAMES, DOFS_PER_NODE, FloatArray, FrameModel, IntArray
from stiff.fe.reduce import Reduction, case_reduction, checked_solve, reduce
from stiff.fe.results import Solution, recover

#: Most models solved together in one chunk of a batch.
CHUNK = 1024
#: Matrix entries (float64) of one chunk's element and stiffness arrays: a chunk holds as many
#: models as fit, so that its arrays stay in cache (about 4 MB; on the benchmark's
#: 10-member leg, 64 to 256 models a chunk run alike and 1024 about half as fast).
CHUNK_ENTRIES = 1 << 19


def _chunk(model: FrameModel) -> int:
    """Models a chunk of a batch of ``model`` (see ``CHUNK_ENTRIES``)."""
    per_model = (144 * (model.beams.count + model.connectors.count) + 36 * model.springs.count
                 + model.n_dofs * model.n_dofs // 2)
    return max(1, min(CHUNK, CHUNK_ENTRIES // max(per_model, 1)))


def _loads_matrix(model: FrameModel, loads: FloatArray) -> FloatArray:
    """Loads (..., c, n_nodes, 6) -> (..., c, n_dofs), checked."""
    loads = np.asarray(loads, dtype=np.float64)
    if loads.ndim < 3 or loads.shape[-2:] != (model.n_nodes, 6):
        raise ModelError(f"loads must have shape (..., cases, {model.n_nodes}, 6), "
                         f"got {loads.shape}")
    if np.count_nonzero(np.isfinite(loads)) != loads.size:
        raise ModelError("loads must be finite numbers")
    return loads.reshape(*loads.shape[:-2], model.n_dofs)


@dataclass(frozen=True)
class Assembled:
    """A model's stiffness, full and reduced: what its solves need."""

    model: FrameModel
    mats: assemble.BeamMatrices | None
    K: FloatArray  # (..., n_dofs, n_dofs)
    red: Reduction
    Kr: FloatArray  # (..., n_q, n_q)

    def solve(self, Fr: FloatArray) -> FloatArray:
        """Reduced solution q (..., n_q, m) for reduced loads Fr; MechanismError if singular."""
        return checked_solve(self.model, self.red, self.Kr, Fr)


def assemble_model(model: FrameModel) -> Assembled:
    """Element matrices, global and reduced stiffness of a model (or a batch)."""
    mats = assemble.beam_matrices(model) if model.beams.count else None
    K = assemble.global_stiffness(model, mats)
    red = reduce(model)
    return Assembled(model=model, mats=mats, K=K, red=red, Kr=red.project(K))


@dataclass(frozen=True)
class _Reduced:
    """What a linear solve needs: the stiffness at the free DOFs' columns, reduced."""

    model: FrameModel
    mats: assemble.BeamMatrices | None
    K_cols: FloatArray  # (..., n_dofs, n_free): free rows, then support rows (red.position)
    red: Reduction
    Kr: FloatArray  # (..., n_q, n_q)

    def solve(self, Fr: FloatArray) -> FloatArray:
        """Reduced solution q (..., n_q, m) for reduced loads Fr; MechanismError if singular."""
        return checked_solve(self.model, self.red, self.Kr, Fr)


class Reductions:
    """The reductions of the models one piece of work solves several times, by identity.

    A batched map or sweep variant is solved, its compliance taken, its landing responses and
    buckling factors found on the same model in turn; the caller makes one of these for that
    work and passes it to each analysis (``memo=``), which then assembles and reduces each
    model once. Models are frozen, so a kept reduction cannot go stale, and each entry holds
    its model, so an id is not reused while it is kept. Let it go with the work.
    """

    def __init__(self) -> None:
        self._kept: dict[int, _Reduced] = {}

    def of(self, model: FrameModel) -> _Reduced:
        """The model's reduction, made the first time it is asked for."""
        hit = self._kept.get(id(model))
        if hit is None or hit.model is not model:
            hit = self._kept[id(model)] = _reduce_model(model)
        return hit


def _reduced(model: FrameModel, memo: Reductions | None = None) -> _Reduced:
    """The model's reduction, from ``memo`` when one is given."""
    return _reduce_model(model) if memo is None else memo.of(model)


def reduced_model(model: FrameModel, memo: Reductions | None = None) -> _Reduced:
    """The model's reduced stiffness and what its solves need."""
    return _reduced(model, memo)


def _reduce_model(model: FrameModel) -> _Reduced:
    """Only the columns of the free DOFs are assembled: the free-free block to solve with and
    the supports' rows for the reactions; the full matrix is never formed."""
    mats = assemble.beam_matrices(model) if model.beams.count else None
    red = reduce(model)
    n_free = red.free.size
    K_cols = assemble.free_columns(model, mats, red.position, red.free)
    return _Reduced(model=model, mats=mats, K_cols=K_cols, red=red,
                    Kr=red.project_free(K_cols[..., :n_free, :]))


def _static_chunk(model: FrameModel, F: FloatArray, memo: Reductions | None = None
                  ) -> Solution:
    fac = _reduced(model, memo)
    return recovered(fac, F, fac.solve(fac.red.project_rhs(np.swapaxes(F, -1, -2))))


def recovered(fac: _Reduced, F: FloatArray, q: FloatArray) -> Solution:
    """The solution of loads F (..., c, n_dofs) from the reduced displacements q (..., n_q, c)."""
    model, red = fac.model, fac.red
    u_free = q if red.T is None else red.T @ q  # (..., n_free, c)
    # displacements and K u with the free DOFs first, then in DOF order
    u_ordered = np.zeros((*u_free.shape[:-2], u_free.shape[-1], model.n_dofs))
    u_ordered[..., : red.free.size] = np.swapaxes(u_free, -1, -2)
    U = u_ordered.take(red.position, axis=-1)
    KU = np.swapaxes(fac.K_cols @ u_free, -1, -2).take(red.position, axis=-1)
    if F.shape != U.shape:
        F, U = np.broadcast_arrays(F, U)
    return recover(model, U, F, KU, fac.mats)


def solve_static(model: FrameModel, loads: FloatArray, memo: Reductions | None = None
                 ) -> Solution:
    """Linear static solution of every load case.

    Parameters
    ----------
    model : the frame (optionally batched)
    loads : (..., c, n_nodes, 6) nodal forces [N] and moments [N·mm] in global axes; the
        batch axes broadcast against the model's
    memo : reductions kept for this piece of work (:class:`Reductions`), if any
    """
    F = _loads_matrix(model, loads)
    model_batch = model.batch_shape
    batch = model_batch if model_batch == F.shape[:-2] or F.ndim == 2 else np.broadcast_shapes(
        model_batch, F.shape[:-2])
    if not batch:
        return _static_chunk(model, F, memo)
    chunk = _chunk(model)
    if batch_size(batch) <= chunk:
        return _static_chunk(model, F, memo)
    F = np.broadcast_to(F, (*batch, *F.shape[-2:])).reshape(-1, *F.shape[-2:])
    n = F.shape[0]
    # The chunks' results are joined at the end, not copied out one by one: kept alive, they
    # sit above each next chunk's temporaries, so the allocator reuses that memory instead of
    # returning it to the system and faulting it back in for every chunk.
    parts = [_static_chunk(flat_slice(model, batch, a, min(a + chunk, n)), F[a:a + chunk])
             for a in range(0, n, chunk)]
    return Solution(**{
        name: np.concatenate([getattr(p, name) for p in parts]).reshape(
            *batch, *getattr(parts[0], name).shape[1:])
        for name in Solution.__dataclass_fields__})


def _displace(fac: Assembled, F: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
    """(U, F, K U) for loads F (..., c, n_dofs)."""
    q = fac.solve(fac.red.project_rhs(np.swapaxes(F, -1, -2)))
    U_t = fac.red.expand(q, fac.model.n_dofs)
    KU = np.swapaxes(fac.K @ U_t, -1, -2)
    U = np.swapaxes(U_t, -1, -2)
    F, U = np.broadcast_arrays(F, U)
    return U, F, KU


def compliance(model: FrameModel, dofs: IntArray, memo: Reductions | None = None
               ) -> FloatArray:
    """Compliance matrix (..., m, m) at global DOF indices ``dofs`` (see ``node_dofs``).

    Units follow the DOFs: mm/N between translations, rad/(N·mm) between rotations, and
    rad/N = mm/(N·mm) across. A supported DOF has zero compliance. All m unit loads are solved
    as one multi-right-hand-side solve on one factorisation. ``memo``: see
    :class:`Reductions`.
    """
    fac = _reduced(model, memo)
    dofs = np.asarray(dofs, dtype=np.intp).reshape(-1)
    E = np.zeros((model.n_dofs, dofs.size))
    E[dofs, np.arange(dofs.size)] = 1.0
    Er = fac.red.project_rhs(np.broadcast_to(E, (*fac.Kr.shape[:-2], *E.shape)))
    out: FloatArray = np.swapaxes(Er, -1, -2) @ fac.solve(Er)
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
    shape = np.broadcast_shapes(model.batch_shape, axial.shape[:-1], spring_change.shape[:-1])
    parts: list[assemble.Part] = []
    if model.beams.count and mats is not None:
        parts.append((assemble.beam_geometric(model, mats, axial),
                      *assemble.block_entries(assemble.beam_dofs(model))))
    if model.springs.count:
        k = assemble.spring_geometric(model, spring_change)
        parts.append((k.reshape(*k.shape[:-2], 36), *assemble.square_entries(
            assemble.spring_dofs(model))))
    every = np.arange(model.n_dofs)
    return assemble.assemble_matrix(every, every, shape, parts)


def buckling_factors(model: FrameModel, solution: Solution, memo: Reductions | None = None
                     ) -> FloatArray:
    """(..., c) load factor λ at which each load case buckles the model (linear buckling).

    Solves (K + λ K_G) φ = 0 with K_G from the members' axial forces and the springs' tension
    changes of the case; ``inf`` when no compression can buckle it. Raises MechanismError when
    a model of the batch is a mechanism (the check of the static solve).

    The generalised problem −K_G φ = μ K φ, λ = 1/μ_max, is reduced to a standard one with the
    Cholesky factor K = L Lᵀ: L⁻¹(−K_G)L⁻ᵀ y = μ y, the reduction LAPACK's ``dsygst`` does
    (Golub & Van Loan, *Matrix Computations*, 4th ed., §8.7.2, from memory); here numpy's
    stacked Cholesky, inverse and ``eigvalsh`` do it for every model and load case at once.
    """
    fac = _reduced(model, memo)
    Kg = _free_geometric(model, fac, solution)  # (..., c, n_free, n_free)
    if fac.Kr.shape[-1] == 0:
        return np.full(Kg.shape[:-2], np.inf)
    W = _whitening(fac)[..., None, :, :]  # against the load-case axis
    # symmetric to round-off; eigvalsh reads its lower triangle only
    return top_factors(np.asarray(np.linalg.eigvalsh(W @ -Kg @ np.swapaxes(W, -1, -2)),
                                  np.float64))


def top_factors(mu: FloatArray) -> FloatArray:
    """(...) buckling factors 1/μ_max from the eigenvalues (..., n) of −K_G φ = μ K φ, in
    ascending order; ``inf`` where no eigenvalue is clearly positive (nothing buckles)."""
    top, low = mu[..., -1], mu[..., 0]
    scale = np.maximum(np.maximum(np.abs(low), np.abs(top)), 1e-300)
    buckles = top > 1e-12 * scale
    out: FloatArray = np.divide(1.0, top, out=np.full(top.shape, np.inf), where=buckles)
    return out


def _free_geometric(model: FrameModel, fac: _Reduced, solution: Solution,
                    cases: Sequence[int] | None = None) -> FloatArray:
    """(..., c, n_free, n_free) geometric stiffness at the free DOFs of every load case (or of
    the load cases ``cases``, in that order).

    One load case at a time: each case's forces then have the model's own batch shape, which
    the assembly broadcasts against (a batch of models with several cases would not).
    """
    axial = solution.beam_axial  # (..., c, n_beams)
    change = solution.spring_forces - model.springs.tension[..., None, :]
    free = fac.red.free
    chosen = range(axial.shape[-2]) if cases is None else cases
    return np.stack([
        geometric_stiffness(model, fac.mats, axial[..., j, :], change[..., j, :]).take(
            free, axis=-2).take(free, axis=-1)
        for j in chosen], axis=-3)


def _whitening(fac: _Reduced) -> FloatArray:
    """W = L⁻¹ Tᵀ (..., n_q, n_free), with K_r = Tᵀ K_ff T = L Lᵀ (T = I without rigid
    constraints): W K_ff Wᵀ = I, and W A Wᵀ is L⁻¹ Tᵀ A T L⁻ᵀ for any free-free block A."""
    L_inv = _inverse_cholesky(fac)
    if fac.red.T is None:
        return L_inv
    W: FloatArray = L_inv @ np.swapaxes(fac.red.T, -1, -2)
    return W


def _inverse_cholesky(fac: _Reduced) -> FloatArray:
    """L⁻¹ of the Cholesky factor K = L Lᵀ of every reduced stiffness (..., n_q, n_q).

    The factors are checked as the static solve checks them (``stiff.fe.linalg``): a failed
    factor, or a squared pivot below ``PIVOT_TOLERANCE`` of its diagonal, is a mechanism, and
    the static solve's check then names it.
    """
    Kr = fac.Kr
    try:
        L = np.linalg.cholesky(Kr)
        pivots = L.diagonal(axis1=-2, axis2=-1)
        sound = bool(np.all(pivots * pivots >= PIVOT_TOLERANCE * Kr.diagonal(axis1=-2,
                                                                             axis2=-1)))
    except np.linalg.LinAlgError:
        sound = False
    if not sound:
        fac.solve(np.zeros((*Kr.shape[:-1], 1)))  # raises the named MechanismError
        raise MechanismError("the stiffness is not positive definite: the model is a "
                             "mechanism or unstable")
    L_inv: FloatArray = np.linalg.inv(L)
    return L_inv


def solve_second_order(
    model: FrameModel, loads: FloatArray, *, tolerance: float = 1e-10, max_iterations: int = 50
) -> Solution:
    """Second-order (P-Δ) static solution: equilibrium on the stiffness K + K_G(N).

    Iterates on the members' axial forces and the springs' tension changes until the
    displacements change by less than ``tolerance`` (relative). Raises MechanismError when a
    load case is at or beyond its buckling load.
    """
    F = _loads_matrix(model, loads)
    fac = assemble_model(model)
    U, F, KU = _displace(fac, F)
    solution = recover(model, U, F, KU, fac.mats)
    case_red = case_reduction(fac.red, F.shape[-2])
    for _ in range(max_iterations):
        change = solution.spring_forces - model.springs.tension[..., None, :]
        Kt = fac.K[..., None, :, :] + geometric_stiffness(
            model, fac.mats, solution.beam_axial, change)
        q = checked_solve(model, case_red, case_red.project(Kt),
                          case_red.project_rhs(F[..., :, None]))
        U_new = case_red.expand(q, model.n_dofs)[..., 0]
        beam_kg = None if fac.mats is None else _local_geometric(model, fac.mats, solution)
        step = float(np.abs(U_new - U).max())
        U = U_new
        KU = (Kt @ U[..., None])[..., 0]
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
    return mats.condense(kg, cases=True)

"""Element matrices of a whole model, and their assembly into global arrays.

All element matrices of one kind are built as one (..., n, k, k) array (members in the block
layout of ``element.global_blocks``) and summed into the global matrix by a ``bincount`` over
every entry, rather than a Python loop over elements. Where each entry lands is given by a
position for every DOF: the identity for the full stiffness, or free DOFs first and supported
ones after for a solve, which keeps only the columns of free DOFs (see
:func:`assemble_matrix`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.fe import element
from stiff.fe.model import DOFS_PER_NODE, BoolArray, FloatArray, FrameModel, IntArray

_TRANSLATIONS = np.arange(3)
_ALL = np.arange(6)


def element_dofs(nodes: IntArray, per_node: IntArray) -> IntArray:
    """Global DOF indices (n, 2·len(per_node)) of two-node elements."""
    base = DOFS_PER_NODE * nodes[:, :, None] + per_node[None, None, :]
    return base.reshape(nodes.shape[0], -1)


def beam_dofs(model: FrameModel) -> IntArray:
    """(n_beams, 12) global DOFs of each member."""
    return element_dofs(model.beams.nodes, _ALL)


def connector_dofs(model: FrameModel) -> IntArray:
    """(n_connectors, 12) global DOFs of each connector."""
    return element_dofs(model.connectors.nodes, _ALL)


def spring_dofs(model: FrameModel) -> IntArray:
    """(n_springs, 6) global translation DOFs of each spring."""
    return element_dofs(model.springs.nodes, _TRANSLATIONS)


@dataclass(frozen=True)
class BeamMatrices:
    """Local element data of every member: rotations, lengths, condensed stiffness."""

    R: FloatArray  # (..., n, 3, 3)
    L: FloatArray  # (..., n)
    k_local: FloatArray  # (..., n, 12, 12), releases condensed out
    condensed: IntArray  # (m,) the members with releases
    released: BoolArray  # (m, 12) their releases
    k_uncondensed: FloatArray  # (..., m, 12, 12) their local stiffness before condensation

    @property
    def T(self) -> FloatArray:
        """(..., n, 12, 12) local-from-global transformation."""
        return element.block_rotation(self.R, 4)

    @property
    def S(self) -> FloatArray:
        """(..., m, 12, 12) condensation maps u = S u_kept of the members with releases."""
        return element.condensation_maps(self.k_uncondensed, self.released)

    def condense(self, k: FloatArray, cases: bool = False) -> FloatArray:
        """Sᵀ k S at the released members of local matrices k (..., [c,] n, 12, 12).

        ``cases``: k has a load-case axis before the member axis.
        """
        if not self.condensed.size:
            return k
        S = self.S[..., None, :, :, :] if cases else self.S
        out = k.copy()
        out[..., self.condensed, :, :] = (
            np.swapaxes(S, -1, -2) @ k[..., self.condensed, :, :] @ S)
        return out


def beam_matrices(model: FrameModel) -> BeamMatrices:
    """Rotation, length and condensed local stiffness of every member."""
    b = model.beams
    ends = model.xyz.take(b.nodes, axis=-2)
    R, L = element.member_axes(ends[..., 0, :], ends[..., 1, :], b.ref)
    k = element.local_stiffness(b.E, b.G, b.A, b.Iy, b.Iz, b.J, b.Asy, b.Asz, L)
    condensed = np.flatnonzero(np.count_nonzero(b.releases, axis=1))
    released = b.releases.take(condensed, axis=0)
    k_uncondensed = k.take(condensed, axis=-3)
    if condensed.size:
        k[..., condensed, :, :] = element.condensation(k_uncondensed, released)
    return BeamMatrices(R=R, L=L, k_local=k, condensed=condensed, released=released,
                        k_uncondensed=k_uncondensed)


def beam_global(mats: BeamMatrices) -> FloatArray:
    """(..., n, 144) global condensed member stiffness in the block layout of
    ``element.global_blocks`` (rows ``element.BLOCK_ROWS``, columns ``element.BLOCK_COLS`` of
    the member's DOFs)."""
    blocks = element.global_blocks(mats.k_local, mats.R)
    return blocks.reshape(*blocks.shape[:-2], 144)


def beam_geometric(model: FrameModel, mats: BeamMatrices, N: FloatArray) -> FloatArray:
    """(..., n, 144) global geometric stiffness of members under axial forces N [N], in the
    block layout of :func:`beam_global`."""
    b = model.beams
    kg = element.local_geometric_stiffness(N, b.A, b.Iy, b.Iz, mats.L)
    R = np.broadcast_to(mats.R, (*kg.shape[:-2], 3, 3))
    blocks = element.global_blocks(mats.condense(kg), R)
    return blocks.reshape(*blocks.shape[:-2], 144)


def connector_kinematics(model: FrameModel) -> FloatArray:
    """(..., n, 6, 12): local relative motion Δ = G [u_a θ_a u_b θ_b] of each connector.

    Δu = u_b − u_a + ½ [d]× (θ_a + θ_b) and Δθ = θ_b − θ_a in global axes, then rotated into
    the connector frame; rigid-body motion gives Δ = 0 for any offset d = x_b − x_a.
    """
    c = model.connectors
    d = model.xyz[..., c.nodes[:, 1], :] - model.xyz[..., c.nodes[:, 0], :]
    skew = np.zeros((*d.shape[:-1], 3, 3))
    skew[..., 0, 1], skew[..., 0, 2] = -d[..., 2], d[..., 1]
    skew[..., 1, 0], skew[..., 1, 2] = d[..., 2], -d[..., 0]
    skew[..., 2, 0], skew[..., 2, 1] = -d[..., 1], d[..., 0]
    eye = np.broadcast_to(np.eye(3), skew.shape)
    zero = np.zeros_like(skew)
    top = np.concatenate([-eye, 0.5 * skew, eye, 0.5 * skew], axis=-1)
    bottom = np.concatenate([zero, -eye, zero, eye], axis=-1)
    G = np.concatenate([top, bottom], axis=-2)
    frame = np.broadcast_to(c.frame, (*G.shape[:-2], 3, 3))
    out: FloatArray = element.block_rotation(frame, 2) @ G
    return out


def connector_stiffness(model: FrameModel, G: FloatArray) -> FloatArray:
    """(..., n, 12, 12) global stiffness of the elastic (finite) connector components."""
    k = np.where(np.isinf(model.connectors.stiffness), 0.0, model.connectors.stiffness)
    return np.swapaxes(G, -1, -2) @ (k[..., :, None] * G)


def spring_axes(model: FrameModel) -> tuple[FloatArray, FloatArray]:
    """Unit vectors a -> b (..., n, 3) and lengths (..., n) [mm] of the springs."""
    s = model.springs
    d = model.xyz[..., s.nodes[:, 1], :] - model.xyz[..., s.nodes[:, 0], :]
    L = np.linalg.norm(d, axis=-1)
    return d / L[..., None], L


def spring_stiffness(model: FrameModel, tension: FloatArray) -> FloatArray:
    """(..., n, 6, 6) spring matrices: k e eᵀ + (T/L)(I − e eᵀ), over (u_a, u_b)."""
    e, L = spring_axes(model)
    eeT = e[..., :, None] * e[..., None, :]
    rate = np.broadcast_to(model.springs.rate, L.shape)
    k3 = rate[..., None, None] * eeT + (tension / L)[..., None, None] * (np.eye(3) - eeT)
    return np.concatenate(
        [np.concatenate([k3, -k3], axis=-1), np.concatenate([-k3, k3], axis=-1)], axis=-2
    )


def spring_geometric(model: FrameModel, tension: FloatArray) -> FloatArray:
    """(..., n, 6, 6) geometric part (T/L)(I − e eᵀ) alone, for a change of tension T [N]."""
    e, L = spring_axes(model)
    eeT = e[..., :, None] * e[..., None, :]
    k3 = (tension / L)[..., None, None] * (np.eye(3) - eeT)
    return np.concatenate(
        [np.concatenate([k3, -k3], axis=-1), np.concatenate([-k3, k3], axis=-1)], axis=-2
    )


#: An element matrix to assemble: values (..., n, e) and the global DOFs of the row and of the
#: column of its e entries, as (n, ...) arrays that broadcast to the entries' layout.
Part = tuple[FloatArray, IntArray, IntArray]


def square_entries(dofs: IntArray) -> tuple[IntArray, IntArray]:
    """Row and column DOFs of (n, k, k) matrices in C order: (n, k, 1) and (n, 1, k)."""
    return dofs[:, :, None], dofs[:, None, :]


_REPEAT3 = np.repeat(np.arange(3), 3)  # i of entry 3 i + j
_TILE3 = np.tile(np.arange(3), 3)  # j of entry 3 i + j
_REPEAT3.flags.writeable = _TILE3.flags.writeable = False


def block_entries(dofs: IntArray) -> tuple[IntArray, IntArray]:
    """Row and column DOFs of member matrices in the block layout of ``element.global_blocks``
    (entry (4 I + J, 3 i + j) at local DOFs 3 I + i, 3 J + j): (n, 4, 1, 9) and (n, 1, 4, 9)."""
    blocks = dofs.reshape(dofs.shape[0], 4, 3)
    return (blocks.take(_REPEAT3, axis=-1)[:, :, None, :],
            blocks.take(_TILE3, axis=-1)[:, None, :, :])


def element_parts(model: FrameModel, mats: BeamMatrices | None) -> list[Part]:
    """The elastic element matrices of a model (members, elastic connectors, springs)."""
    parts: list[Part] = []
    if model.beams.count and mats is not None:
        parts.append((beam_global(mats), *block_entries(beam_dofs(model))))
    if model.connectors.count:
        k = connector_stiffness(model, connector_kinematics(model))
        parts.append((k.reshape(*k.shape[:-2], 144), *square_entries(connector_dofs(model))))
    if model.springs.count:
        k = spring_stiffness(model, model.springs.tension)
        parts.append((k.reshape(*k.shape[:-2], 36), *square_entries(spring_dofs(model))))
    return parts


def assemble_matrix(
    position: IntArray, kept: IntArray, batch: tuple[int, ...], parts: list[Part],
    diagonal: FloatArray | None = None,
) -> FloatArray:
    """Σ element matrices, plus a diagonal (..., n_dofs), as (..., n_dofs, n_cols) matrices.

    The entry at DOFs (r, c) lands at row ``position[r]`` and column ``position[c]``; only the
    columns of the DOFs ``kept`` are kept, and they must be the first: ``position[kept]`` is
    0 ... n_cols - 1. With ``position`` the identity and every DOF kept this is the full
    matrix; with the free DOFs placed first and kept, it is the columns of the free DOFs:
    its first n_cols rows are the free-free block, the others the rows of the supports.
    Dropped entries go to one spare column past the last (the result is a view without it),
    so the entries are summed by ``bincount`` without sorting any out.
    """
    n_rows, n_cols = position.size, kept.size
    width = n_cols if n_cols == n_rows else n_cols + 1  # with the spare column
    column = position if n_cols == n_rows else np.minimum(position, n_cols)
    size = math.prod(batch)
    bins = n_rows * width
    targets, weights = [], []
    for values, rows, cols in parts:
        if rows.size:
            targets.append((position.take(rows) * width + column.take(cols)).reshape(-1))
            w = values if values.shape[:-2] == batch else np.broadcast_to(
                values, (*batch, *values.shape[-2:]))
            weights.append(w.reshape(size, -1))
    out: FloatArray
    if not targets:
        out = np.zeros((size, bins))
    else:
        target = targets[0] if len(targets) == 1 else np.concatenate(targets)
        weight = weights[0] if len(weights) == 1 else np.concatenate(weights, axis=1)
        if size == 1:
            out = np.bincount(target, weights=weight[0], minlength=bins).astype(
                np.float64, copy=False)
        else:
            # One bincount a model: a single call over the batch would need a (models ×
            # entries) index array and a result of the whole chunk at once; per model, the
            # temporaries are small and reused, which keeps a large batch out of fresh
            # memory (page faults cost more than the loop).
            out = np.empty((size, bins))
            for i in range(size):
                out[i] = np.bincount(target, weights=weight[i], minlength=bins)
    matrices = out.reshape(*batch, n_rows, width)[..., :n_cols]
    if diagonal is not None:  # a writeable view of the diagonal of the kept block
        np.einsum("...ii->...i", matrices[..., :n_cols, :])[...] += diagonal.take(kept, axis=-1)
    return matrices


def ground_diagonal(model: FrameModel) -> FloatArray:
    """(..., n_dofs) springs to ground on the diagonal of the stiffness."""
    return model.ground.reshape(*model.ground.shape[:-2], model.n_dofs)


def global_stiffness(model: FrameModel, mats: BeamMatrices | None = None) -> FloatArray:
    """(..., n_dofs, n_dofs) elastic stiffness of every element, spring preload included.

    Rigid connector components are not in it: they are constraints (see ``reduce``).
    """
    if model.beams.count:
        mats = mats or beam_matrices(model)
    every = np.arange(model.n_dofs)
    return assemble_matrix(every, every, model.batch_shape, element_parts(model, mats),
                           ground_diagonal(model))


def free_columns(
    model: FrameModel, mats: BeamMatrices | None, position: IntArray, free: IntArray
) -> FloatArray:
    """(..., n_dofs, n_free) columns of the stiffness at the free DOFs, rows in the order of
    ``position`` (free DOFs first): the free-free block, then the rows of the supports."""
    return assemble_matrix(position, free, model.batch_shape, element_parts(model, mats),
                           ground_diagonal(model))


def preload_loads(model: FrameModel) -> FloatArray:
    """(..., n_nodes, 6) nodal forces [N] of the springs' tension pulling their ends together."""
    loads = np.zeros((*model.batch_shape, model.n_nodes, 6))
    if not model.springs.count:
        return loads
    e, _ = spring_axes(model)
    pull = model.springs.tension[..., None] * e
    a, b = model.springs.nodes[:, 0], model.springs.nodes[:, 1]
    np.add.at(np.moveaxis(loads, -2, 0)[..., :3], a, np.moveaxis(pull, -2, 0))
    np.add.at(np.moveaxis(loads, -2, 0)[..., :3], b, -np.moveaxis(pull, -2, 0))
    return loads


def constraint_rows(model: FrameModel) -> FloatArray:
    """(..., n_rigid, n_dofs) rows C with C u = 0 for every rigid connector component."""
    c = model.connectors
    rigid = c.rigid
    n_rows = int(rigid.sum())
    C = np.zeros((*model.batch_shape, n_rows, model.n_dofs))
    if n_rows == 0:
        return C
    G = np.broadcast_to(connector_kinematics(model), (*model.batch_shape, c.count, 6, 12))
    which, comp = np.nonzero(rigid)
    dofs = connector_dofs(model)[which]  # (n_rows, 12)
    rows = np.arange(n_rows)[:, None]
    np.add.at(np.moveaxis(C, (-2, -1), (0, 1)), (rows, dofs),
              np.moveaxis(G[..., which, comp, :], (-2, -1), (0, 1)))
    return C


def node_dof(node: int, dof: int) -> int:
    """Global index of DOF ``dof`` (0-5) of node ``node``."""
    return DOFS_PER_NODE * node + dof


def as_index(values: npt.ArrayLike) -> IntArray:
    """Integer index array."""
    return np.asarray(values, dtype=np.intp)

"""Element matrices of a whole model, and their assembly into global arrays.

All element matrices of one kind are built as one (..., n, k, k) array and summed into the
global matrix by one ``bincount`` over every entry of every model of a batch, rather than a
Python loop over elements.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.fe import element
from stiff.fe.model import DOFS_PER_NODE, FloatArray, FrameModel, IntArray

_TRANSLATIONS = np.arange(3)


def element_dofs(nodes: IntArray, per_node: IntArray) -> IntArray:
    """Global DOF indices (n, 2·len(per_node)) of two-node elements."""
    base = DOFS_PER_NODE * nodes[:, :, None] + per_node[None, None, :]
    return base.reshape(nodes.shape[0], -1)


def beam_dofs(model: FrameModel) -> IntArray:
    """(n_beams, 12) global DOFs of each member."""
    return element_dofs(model.beams.nodes, np.arange(6))


def connector_dofs(model: FrameModel) -> IntArray:
    """(n_connectors, 12) global DOFs of each connector."""
    return element_dofs(model.connectors.nodes, np.arange(6))


def spring_dofs(model: FrameModel) -> IntArray:
    """(n_springs, 6) global translation DOFs of each spring."""
    return element_dofs(model.springs.nodes, _TRANSLATIONS)


@dataclass(frozen=True)
class BeamMatrices:
    """Local element data of every member: rotations, lengths, condensed stiffness."""

    R: FloatArray  # (..., n, 3, 3)
    L: FloatArray  # (..., n)
    k_local: FloatArray  # (..., n, 12, 12), releases condensed out
    S: FloatArray  # (..., n, 12, 12), condensation maps

    @property
    def T(self) -> FloatArray:
        """(..., n, 12, 12) local-from-global transformation."""
        return element.block_rotation(self.R, 4)


def beam_matrices(model: FrameModel) -> BeamMatrices:
    """Rotation, length and condensed local stiffness of every member."""
    b = model.beams
    xyz = model.xyz
    R, L = element.member_axes(xyz[..., b.nodes[:, 0], :], xyz[..., b.nodes[:, 1], :], b.ref)
    k = element.local_stiffness(b.E, b.G, b.A, b.Iy, b.Iz, b.J, b.Asy, b.Asz, L)
    k_c, S = element.condense(k, b.releases)
    return BeamMatrices(R=R, L=L, k_local=k_c, S=S)


def beam_geometric(model: FrameModel, mats: BeamMatrices, N: FloatArray) -> FloatArray:
    """Global geometric stiffness (..., n, 12, 12) of members under axial forces N [N]."""
    b = model.beams
    kg = element.local_geometric_stiffness(N, b.A, b.Iy, b.Iz, mats.L)
    kg = np.swapaxes(mats.S, -1, -2) @ kg @ mats.S
    return element.to_global(kg, mats.R)


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


def _targets(n_dofs: int, dofs: IntArray) -> IntArray:
    """Flat global-matrix positions (n·k·k,) of the entries of element matrices."""
    k = dofs.shape[1]
    rows = np.repeat(dofs, k, axis=1).reshape(-1)
    cols = np.tile(dofs, (1, k)).reshape(-1)
    out: IntArray = rows * n_dofs + cols
    return out


def assemble_matrix(
    n_dofs: int, batch: tuple[int, ...], parts: list[tuple[FloatArray, IntArray]],
    diagonal: FloatArray | None = None,
) -> FloatArray:
    """Σ element matrices (..., n, k, k) at their DOFs (n, k), plus a diagonal (..., n_dofs).

    One ``bincount`` over every entry of every element of every model in the batch.
    """
    size = int(np.prod(batch, dtype=np.int64))
    targets = [_targets(n_dofs, dofs) for _, dofs in parts if dofs.shape[0]]
    weights = [np.broadcast_to(m, (*batch, *m.shape[-3:])).reshape(size, -1)
               for m, dofs in parts if dofs.shape[0]]
    if diagonal is not None:
        targets.append(np.arange(n_dofs) * (n_dofs + 1))
        weights.append(np.broadcast_to(diagonal, (*batch, n_dofs)).reshape(size, n_dofs))
    if not targets:
        return np.zeros((*batch, n_dofs, n_dofs))
    target = np.concatenate(targets)
    offsets = np.arange(size, dtype=np.intp)[:, None] * (n_dofs * n_dofs)
    flat = np.bincount((target[None, :] + offsets).reshape(-1),
                       weights=np.concatenate(weights, axis=1).reshape(-1),
                       minlength=size * n_dofs * n_dofs)
    return np.asarray(flat, dtype=np.float64).reshape(*batch, n_dofs, n_dofs)


def global_stiffness(model: FrameModel, mats: BeamMatrices | None = None) -> FloatArray:
    """(..., n_dofs, n_dofs) elastic stiffness of every element, spring preload included.

    Rigid connector components are not in it: they are constraints (see ``reduce``).
    """
    parts: list[tuple[FloatArray, IntArray]] = []
    if model.beams.count:
        mats = mats or beam_matrices(model)
        parts.append((element.to_global(mats.k_local, mats.R), beam_dofs(model)))
    if model.connectors.count:
        G = connector_kinematics(model)
        parts.append((connector_stiffness(model, G), connector_dofs(model)))
    if model.springs.count:
        parts.append((spring_stiffness(model, model.springs.tension), spring_dofs(model)))
    ground = model.ground.reshape(*model.ground.shape[:-2], model.n_dofs)
    return assemble_matrix(model.n_dofs, model.batch_shape, parts, ground)


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

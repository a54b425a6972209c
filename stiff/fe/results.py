"""What a solve returns, and how it is recovered from the displacements.

Shapes: ``...`` is the model's batch shape, ``c`` the load cases.

* ``displacements`` (..., c, n_nodes, 6): ux, uy, uz [mm], rx, ry, rz [rad], global axes
* ``reactions`` (..., c, n_nodes, 6): forces [N] and moments [N·mm] from supports and ground
  springs on the structure, global axes
* ``beam_forces`` (..., c, n_beams, 12): end forces that the nodes exert on each member, in the
  member's local axes (end 1: N1, Vy1, Vz1, T1, My1, Mz1; then end 2). Axial tension is
  ``beam_forces[..., 6]`` (= −``beam_forces[..., 0]``)
* ``connector_forces`` (..., c, n_conn, 6): force [N] and moment [N·mm] carried by each
  connector in its frame, k·Δ for elastic components (positive when node b moves in +axis
  relative to node a, so node b is pulled back); rigid components from the constraint forces
* ``spring_forces`` (..., c, n_springs): spring tension [N], preload included
* ``*_energy``: strain energy [N·mm] of each element or ground spring; the sum is ½ Fᵀu
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from stiff.fe import assemble
from stiff.fe.model import FloatArray, FrameModel


@dataclass(frozen=True)
class Solution:
    """Displacements, forces and energies of every load case (see the module docstring)."""

    displacements: FloatArray
    reactions: FloatArray
    beam_forces: FloatArray
    connector_forces: FloatArray
    spring_forces: FloatArray
    beam_energy: FloatArray
    connector_energy: FloatArray
    spring_energy: FloatArray
    ground_energy: FloatArray

    @property
    def total_energy(self) -> FloatArray:
        """(..., c) total strain energy [N·mm]."""
        total: FloatArray = (
            self.beam_energy.sum(-1)
            + self.connector_energy.sum(-1)
            + self.spring_energy.sum(-1)
            + self.ground_energy.sum(-1)
        )
        return total

    @property
    def beam_axial(self) -> FloatArray:
        """(..., c, n_beams) axial force in each member [N], tension +."""
        return self.beam_forces[..., 6]


def _apply(matrix: FloatArray, vectors: FloatArray) -> FloatArray:
    """(..., n, a, b) @ (..., c, n, b) -> (..., c, n, a), with the case axis inserted."""
    out: FloatArray = (matrix[..., None, :, :, :] @ vectors[..., None])[..., 0]
    return out


def _to_local(R: FloatArray, u: FloatArray) -> FloatArray:
    """T u for member rotations R (..., n, 3, 3) and global end vectors u (..., c, n, 12):
    each of the four 3-vectors (u1, θ1, u2, θ2) turned into local axes."""
    blocks = u.reshape(*u.shape[:-1], 4, 3) @ np.swapaxes(R, -1, -2)[..., None, :, :, :]
    return blocks.reshape(u.shape)


def _no_elements(batch_c: tuple[int, ...], *tail: int) -> FloatArray:
    return np.zeros((*batch_c, 0, *tail))


def recover(
    model: FrameModel,
    U: FloatArray,
    F: FloatArray,
    K_u: FloatArray,
    mats: assemble.BeamMatrices | None,
    beam_kg: FloatArray | None = None,
) -> Solution:
    """Element forces, reactions and energies from displacements.

    Parameters
    ----------
    U, F : (..., c, n_dofs) displacements and applied loads
    K_u : (..., c, n_dofs) the stiffness used in the solve times U (elastic, plus geometric
        terms in a second-order solve)
    mats : member matrices, or None when the model has no members
    beam_kg : (..., c, n_beams, 12, 12) local geometric stiffness of the members in a
        second-order solve, added to their end forces
    """
    batch_c = U.shape[:-1]
    n_nodes = model.n_nodes

    # Beams: local end forces and energies.
    if model.beams.count and mats is not None:
        u_loc = _to_local(mats.R, U.take(assemble.beam_dofs(model), axis=-1))
        f_el = _apply(mats.k_local, u_loc)
        beam_energy = 0.5 * (u_loc * f_el).sum(axis=-1)
        beam_forces = f_el if beam_kg is None else f_el + (beam_kg @ u_loc[..., None])[..., 0]
    else:
        beam_forces = _no_elements(batch_c, 12)
        beam_energy = _no_elements(batch_c)

    # Supports: K u = F + reactions at the fixed DOFs, with rigid constraint forces Cᵀ f
    # among the internal forces: K u + Cᵀ f = F at the free DOFs.
    fixed = model.fixed.reshape(-1)
    rigid = model.connectors.rigid
    support = K_u - F
    if np.count_nonzero(rigid):
        C = assemble.constraint_rows(model)
        Cf = C[..., ~fixed]
        f_rigid = np.linalg.solve(
            Cf @ np.swapaxes(Cf, -1, -2),
            -np.einsum("...rd,...cd->...rc", Cf, support[..., ~fixed]),
        )
        f_rigid = np.swapaxes(f_rigid, -1, -2)  # (..., c, n_rigid)
        support = support + np.einsum("...rd,...cr->...cd", C, f_rigid)
    else:
        f_rigid = np.zeros((*batch_c, 0))

    # Connectors: elastic k·Δ, rigid components from the constraint forces.
    if model.connectors.count:
        G = assemble.connector_kinematics(model)
        delta = _apply(G, U[..., assemble.connector_dofs(model)])
        k = model.connectors.stiffness
        k_el = np.where(np.isinf(k), 0.0, k)[..., None, :, :]
        conn = k_el * delta
        connector_energy = 0.5 * np.sum(conn * delta, axis=-1)
        which, comp = np.nonzero(rigid)
        conn[..., which, comp] = f_rigid
    else:
        conn = _no_elements(batch_c, 6)
        connector_energy = _no_elements(batch_c)

    # Springs: tension and energy.
    if model.springs.count:
        u_s = U[..., assemble.spring_dofs(model)]
        e, _ = assemble.spring_axes(model)
        stretch = np.einsum("...nk,...cnk->...cn", e, u_s[..., 3:] - u_s[..., :3])
        spring_forces = model.springs.tension[..., None, :] + model.springs.rate[
            ..., None, :] * stretch
        ks = assemble.spring_stiffness(model, model.springs.tension)
        spring_energy = 0.5 * np.sum(u_s * _apply(ks, u_s), axis=-1)
    else:
        spring_forces = np.zeros((*batch_c, 0))
        spring_energy = _no_elements(batch_c)

    # Reactions: supports, then ground springs (−g u on the structure).
    ground_u = model.ground.reshape(*model.ground.shape[:-2], 1, n_nodes * 6) * U
    reactions = np.where(fixed, support, 0.0) - ground_u
    ground_energy = 0.5 * np.einsum("...ij,...ij->...i", ground_u.reshape(*batch_c, n_nodes, 6),
                                    U.reshape(*batch_c, n_nodes, 6))
    return Solution(
        displacements=U.reshape(*batch_c, n_nodes, 6),
        reactions=reactions.reshape(*batch_c, n_nodes, 6),
        beam_forces=beam_forces,
        connector_forces=conn,
        spring_forces=spring_forces,
        beam_energy=beam_energy,
        connector_energy=connector_energy,
        spring_energy=spring_energy,
        ground_energy=ground_energy,
    )

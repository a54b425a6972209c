"""The leg's response with some of its actuators yielding, from one solve of the intact leg.

A landing's force-stroke curve (``stiff.loads.curve_from_responses``) asks, for each set of
actuators that has reached its stall torque, the leg's vertical compliance at the foot and each
actuator's torque per newton of foot force with those actuators turning freely. Taking an
actuator's holding stiffness k out of the model is a rank-one change of its stiffness,
K − k g gᵀ with g the connector's relative-rotation row, so every set follows from the intact
leg's solution and K⁻¹ g of each actuator (the Sherman–Morrison–Woodbury identity) instead of
a new factorisation per set; where the update's small matrix is singular the leg is then a
mechanism and holds nothing more (None).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from stiff.build import Built
from stiff.errors import MechanismError
from stiff.fe import FrameModel
from stiff.fe.assemble import connector_kinematics
from stiff.fe.linalg import spd_solve
from stiff.fe.model import FloatArray
from stiff.fe.solve import Reductions, reduced_model

#: The leg's response with some actuators yielding: its vertical compliance [mm/N] and each
#: actuator's torque per newton of foot force [N·mm/N]; None when it is then a mechanism.
Response = tuple[float, dict[str, float]] | None


#: A yielded leg whose matrix M = D⁻¹ − GᵀK⁻¹G of the low-rank update has an eigenvalue below
#: this fraction of its terms' size is a mechanism: the yielded twists then carry a motion
#: nothing else resists, and M is singular but for round-off. Measured on the demos' 5 x 5
#: maps: mechanisms at most 6e-12, legs that still hold (the hopping leg's knee yielded, held
#: by its assist spring) at least 7e-6.
YIELD_PIVOT = 1e-9


@dataclass(frozen=True)
class YieldResponses:
    """The leg's unit response and each actuator's twist direction, solved once on the intact
    model, from which the response with any set of actuators yielded follows by the
    Sherman–Morrison–Woodbury identity (Golub & Van Loan, *Matrix Computations*, 4th ed.,
    §2.1.4): (K − G D Gᵀ)⁻¹ = K⁻¹ + K⁻¹G (D⁻¹ − GᵀK⁻¹G)⁻¹ GᵀK⁻¹, D the yielded twist
    stiffnesses and G their relative-rotation rows."""

    names: tuple[str, ...]  # actuators, in driven-connector order
    k: FloatArray  # (m,) their twist stiffness [N·mm/rad]
    e: FloatArray  # (P, n_q) the foot's vertical DOF, reduced
    G: FloatArray  # (P, n_q, m) the twist rows, reduced
    u0: FloatArray  # (P, n_q) K⁻¹ e (unit upward foot force)
    Z: FloatArray  # (P, n_q, m) K⁻¹ G
    direction: float

    def response(self, yielded: frozenset[str]) -> list[Response]:
        """Each pose's response with ``yielded`` actuators taken out (None: a mechanism)."""
        out_of = np.array([n in yielded for n in self.names], bool)
        u = self.u0
        sound = np.ones(u.shape[0], bool)
        if out_of.any():
            Gs, Zs = self.G[..., out_of], self.Z[..., out_of]
            GZ = np.swapaxes(Gs, -1, -2) @ Zs
            M = np.diag(1.0 / self.k[out_of]) - 0.5 * (GZ + np.swapaxes(GZ, -1, -2))
            scale = np.maximum(np.abs(GZ).max(axis=(-1, -2)), (1.0 / self.k[out_of]).max())
            sound = np.abs(np.linalg.eigvalsh(M)).min(axis=-1) > YIELD_PIVOT * scale
            safe = np.where(sound[:, None, None], M, np.eye(M.shape[-1]))
            y = np.linalg.solve(safe, (np.swapaxes(Gs, -1, -2) @ u[..., None]))
            u = u + (Zs @ y)[..., 0]
        compliance = np.einsum("pq,pq->p", self.e, u)
        twist = np.einsum("pqm,pq->pm", self.G, u) * np.where(out_of, 0.0, self.k)
        sign = self.direction
        return [(float(compliance[p]), {a: float(sign * twist[p, j])
                                        for j, a in enumerate(self.names)})
                if sound[p] else None for p in range(u.shape[0])]


def yield_responses(built: Built, model: FrameModel, direction: float,
                    memo: Reductions | None = None) -> YieldResponses | None:
    """:class:`YieldResponses` of a batched model, or None when an actuator's twist is rigid (a
    measured infinite stiffness: taking it out changes the constraints, not a rank)."""
    driven = built.driven()
    k = np.broadcast_to(model.connectors.stiffness, (*model.batch_shape,
                                                     *model.connectors.stiffness.shape[-2:]))
    twist = k[..., [i for i, _ in driven], 5]  # (P, m)
    if not driven or not np.all(np.isfinite(twist)) or np.any(twist != twist[:1]):
        return None
    fac = reduced_model(model, memo)
    red = fac.red
    G_full = np.zeros((*model.batch_shape, model.n_dofs, len(driven)))
    rows = connector_kinematics(model)[..., [i for i, _ in driven], 5, :]  # (P, m, 12)
    for j, (i, _) in enumerate(driven):
        a, b = (int(n) for n in model.connectors.nodes[i])
        dofs = np.r_[6 * a:6 * a + 6, 6 * b:6 * b + 6]
        G_full[:, dofs, j] = rows[:, j]
    e_full = np.zeros((*model.batch_shape, model.n_dofs, 1))
    e_full[:, 6 * built.foot + 1, 0] = 1.0
    rhs = red.project_rhs(np.concatenate([e_full, G_full], axis=-1))
    X, ok = spd_solve(fac.Kr, rhs)
    if not ok.all():
        raise MechanismError("the leg is a mechanism before any actuator yields")
    return YieldResponses(tuple(a for _, a in driven), twist[0], rhs[..., 0], rhs[..., 1:],
                     X[..., 0], X[..., 1:], direction)

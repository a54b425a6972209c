"""The foot's stiffness in a pose: compliance, its principal directions, wobble, and where the
give comes from.

The compliance breakdown divides the strain energy of a unit foot load among the parts, the
joints, the actuators and the springs: a share of 0.4 for a joint means 40 % of the foot's
deflection under that load comes from that joint's give (for a single load the work ½F·δ
equals the total strain energy, so energy shares are deflection shares).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

from stiff.build import Built
from stiff.fe import Solution, compliance, node_dofs, solve_static

FloatArray = npt.NDArray[np.float64]
OwnerKind = Literal["part", "joint", "actuator", "spring"]


@dataclass(frozen=True)
class Share:
    """One element's share of the foot's deflection under a unit load."""

    name: str
    kind: OwnerKind
    share: float  # fraction of the total, 0..1


@dataclass(frozen=True)
class FootStiffness:
    """Compliance of the foot and what it is made of."""

    compliance_mm_per_N: FloatArray  # (3, 3) translations x, y, z
    principal_mm_per_N: FloatArray  # (3,) largest first
    principal_directions: FloatArray  # (3, 3) rows are unit directions, matching the values
    rotation_per_force_rad_per_N: FloatArray  # (3, 3): foot rotation (rows) per force (cols)
    vertical: tuple[Share, ...]  # breakdown for a vertical (y) unit load, largest first
    lateral: tuple[Share, ...]  # breakdown for a lateral (z) unit load, largest first

    @property
    def lateral_mm_per_N(self) -> float:
        """Out-of-plane (z) compliance [mm/N]."""
        return float(self.compliance_mm_per_N[2, 2])

    @property
    def twist_rad_per_N(self) -> FloatArray:
        """Foot rotation (rx, ry, rz) per newton of lateral force [rad/N]."""
        out: FloatArray = self.rotation_per_force_rad_per_N[:, 2]
        return out


def connector_component_energy(built: Built, sol: Solution) -> FloatArray:
    """(..., c, n_connectors, 6) strain energy of each connector component [N·mm]."""
    k = built.model.connectors.stiffness
    f = sol.connector_forces
    finite = np.isfinite(k) & (k > 0)
    out: FloatArray = np.where(finite, 0.5 * f * f / np.where(finite, k, 1.0), 0.0)
    return out


def breakdown(built: Built, sol: Solution, case: int) -> tuple[Share, ...]:
    """Energy shares of one load case, grouped by part, joint, actuator and spring."""
    owners: dict[tuple[str, OwnerKind], float] = {}

    def add(name: str, kind: OwnerKind, energy: float) -> None:
        owners[(name, kind)] = owners.get((name, kind), 0.0) + energy

    for part, e in zip(built.beam_part, sol.beam_energy[case], strict=True):
        add(part, "part", float(e))
    comp = connector_component_energy(built, sol)[case]
    for i, (joint, actuator) in enumerate(zip(built.connector_joint, built.connector_actuator,
                                              strict=True)):
        add(joint, "joint", float(comp[i, :5].sum()))
        if actuator is None:
            add(joint, "joint", float(comp[i, 5]))
        else:
            add(actuator, "actuator", float(comp[i, 5]))
    for name, e in zip(built.spring_names, sol.spring_energy[case], strict=True):
        add(name, "spring", float(e))
    total = sum(owners.values())
    shares = [Share(name, kind, e / total if total > 0 else 0.0)
              for (name, kind), e in owners.items()]
    return tuple(sorted(shares, key=lambda s: -s.share))


def foot_stiffness(built: Built) -> FootStiffness:
    """Compliance at the foot and its breakdown for vertical and lateral unit loads."""
    model = built.model
    dofs = node_dofs(model, built.foot, "ux uy uz rx ry rz")
    C6 = compliance(model, dofs)
    C = 0.5 * (C6[:3, :3] + C6[:3, :3].T)
    w, V = np.linalg.eigh(C)
    order = np.argsort(-w)
    directions = V[:, order].T
    # a sign convention for the directions: largest component positive
    directions *= np.sign(directions[np.arange(3), np.abs(directions).argmax(axis=1)])[:, None]
    loads = np.zeros((2, model.n_nodes, 6))
    loads[0, built.foot, 1] = 1.0
    loads[1, built.foot, 2] = 1.0
    sol = solve_static(model, loads)
    return FootStiffness(
        compliance_mm_per_N=C, principal_mm_per_N=w[order], principal_directions=directions,
        rotation_per_force_rad_per_N=C6[3:, :3], vertical=breakdown(built, sol, 0),
        lateral=breakdown(built, sol, 1))

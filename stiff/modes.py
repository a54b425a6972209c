"""Natural frequencies and mode shapes of a leg held at the body.

**Mass model.** Every member has the consistent mass matrix of a uniform Euler–Bernoulli beam
(Przemieniecki, *Theory of Matrix Structural Analysis*, 1968, §11.3, the matrix without the
rotary-inertia and shear terms; from memory): with m = μL (μ the mass per length),

* axial, over (u1, u2): m/6 · [[2, 1], [1, 2]];
* torsion, over (θx1, θx2): m r²/6 · [[2, 1], [1, 2]], r² the polar radius of gyration
  squared, taken as (Iy + Iz)/A of the member's section (exact for one material; for a
  printed section the stiffer walls weigh a little more than their mass share);
* bending in the x-y plane, over (v1, θz1, v2, θz2):
  m/420 · [[156, 22L, 54, −13L], [22L, 4L², 13L, −3L²], [54, 13L, 156, −22L],
  [−13L, −3L², −22L, 4L²]], and in the x-z plane the same with the L terms' signs flipped
  (θy = −dw/dx), as in the stiffness (``stiff.fe.element``).

The cubic shape functions are the exact static shapes of an Euler–Bernoulli member, so a
cantilever's first frequency converges from above as h⁴; the rotary inertia of bending, left
out, changes it by a fraction of order (r/L)² (slender members: negligible). The stiffness is
the engine's Timoshenko matrix. Members with end releases have their mass condensed with the
same map as their stiffness. Point masses (translations only) come on top: pins (steel,
π d²/4 × stack length, shared among the joint's nodes), actuators (``mass_t`` at the joint's
node on the housing side, the joint's first part; on the body it is held and does not move),
and the payload at the foot. Printed members take their mass per length from the section
(walls, skins and infill: ``BeamSection.mass_per_length``).

**Modes.** K φ = ω² M φ on the same reduction as the static solve (supports removed, rigid
connector components eliminated by the null-space basis T: Mr = Tᵀ M_ff T), solved as
Mr φ = (1/ω²) Kr φ so that massless DOFs (the rotations of point masses on massless bars)
give infinite frequencies rather than a singular mass matrix. Units: mm, N, t, s, so ω² is
in (rad/s)². Each mode is classed in-plane when most of its kinetic energy is in x, y and rz,
out-of-plane otherwise (z, rx, ry); modes of (nearly) equal frequency are rotated within
their pair so that each is as purely one class as it can be.

**Effective mass at the foot.** For a vertical (y) load the leg is a spring k = 1/C_yy at the
foot; the mass that moves with it, by Rayleigh's method with the static deflection shape u, is
m_eff = uᵀ M u / u_foot,y² (a uniform cantilever gives 33/140 of its mass; Rayleigh's method,
e.g. Timoshenko, Young & Weaver, *Vibration Problems in Engineering*, from memory). It is
the leg's own inertia at the foot in a landing. Each mode also gives the foot's modal mass
1/φ_foot,y² (mass-normalised φ).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

import numpy as np
import numpy.typing as npt
import scipy.linalg as sla

from stiff.build import Built
from stiff.case_model import BODY, Case
from stiff.errors import ModelError
from stiff.fe import FrameModel, assemble_model, node_dofs
from stiff.fe.assemble import beam_matrices
from stiff.fe.element import to_global
from stiff.fe.solve import Assembled
from stiff.play import bearing_length_mm

if TYPE_CHECKING:
    from matplotlib.axes import Axes

FloatArray = npt.NDArray[np.float64]
ModeKind = Literal["in-plane", "out-of-plane"]

#: DOFs of a node that move in the linkage plane (ux, uy, rz).
IN_PLANE_DOFS = (0, 1, 5)
#: Frequencies closer than this (relative) are one degenerate group for the classing.
DEGENERATE = 1e-6
#: A mode whose foot moves vertically less than this fraction of its largest translation has
#: no modal mass at the foot (reported as None).
FOOT_STILL = 1e-9

_AXIAL = np.array([[2.0, 1.0], [1.0, 2.0]]) / 6.0
_XY = np.array([1, 5, 7, 11])  # v1, θz1, v2, θz2
_XZ = np.array([2, 4, 8, 10])  # w1, θy1, w2, θy2
_FLIP = np.outer([1.0, -1.0, 1.0, -1.0], [1.0, -1.0, 1.0, -1.0])


def local_mass(mass_per_length: FloatArray, r2: FloatArray, L: FloatArray) -> FloatArray:
    """Consistent mass matrices of members in local axes, (..., n, 12, 12) [t, t·mm, t·mm²].

    Parameters
    ----------
    mass_per_length : (..., n) mass per length μ [t/mm]
    r2 : (..., n) polar radius of gyration squared of the section [mm²], for torsion
    L : (..., n) lengths [mm]

    See the module docstring for the matrix (Przemieniecki 1968, §11.3).
    """
    mu, r2, L = np.broadcast_arrays(mass_per_length, r2, L)
    m = (mu * L)[..., None, None]
    Lb = L[..., None, None]
    one = np.ones_like(Lb)
    bend = np.block([
        [156 * one, 22 * Lb, 54 * one, -13 * Lb],
        [22 * Lb, 4 * Lb**2, 13 * Lb, -3 * Lb**2],
        [54 * one, 13 * Lb, 156 * one, -22 * Lb],
        [-13 * Lb, -3 * Lb**2, -22 * Lb, 4 * Lb**2],
    ]) * (m / 420.0)
    out = np.zeros((*mu.shape, 12, 12))
    out[..., [[0], [6]], [0, 6]] = m * _AXIAL
    out[..., [[3], [9]], [3, 9]] = (m * r2[..., None, None]) * _AXIAL
    out[..., _XY[:, None], _XY] = bend
    out[..., _XZ[:, None], _XZ] = bend * _FLIP
    return out


def mass_matrix(model: FrameModel, mass_per_length: npt.ArrayLike, r2: npt.ArrayLike,
                point_mass: npt.ArrayLike | None = None) -> FloatArray:
    """(n_dofs, n_dofs) consistent mass matrix of a single (unbatched) model [t, t·mm, t·mm²].

    Parameters
    ----------
    model : the frame
    mass_per_length : (n_beams,) or scalar, mass per length of each member [t/mm]
    r2 : (n_beams,) or scalar, polar radius of gyration squared of each section [mm²]
    point_mass : (n_nodes,) translational point mass at each node [t], default none
    """
    if model.batch_shape:
        raise ModelError("mass_matrix takes one model, not a batch")
    n = model.n_dofs
    M = np.zeros((n, n))
    b = model.beams
    if b.count:
        mats = beam_matrices(model)
        mu = np.broadcast_to(np.asarray(mass_per_length, float), (b.count,))
        rr = np.broadcast_to(np.asarray(r2, float), (b.count,))
        if not (np.isfinite(mu).all() and (mu >= 0).all() and np.isfinite(rr).all()
                and (rr >= 0).all()):
            raise ModelError("members' mass per length and radius of gyration must be finite "
                             "and ≥ 0")
        m_global = to_global(mats.condense(local_mass(mu, rr, mats.L)), mats.R)
        dofs = 6 * b.nodes[:, :, None] + np.arange(6)
        dofs = dofs.reshape(b.count, 12)
        np.add.at(M, (dofs[:, :, None], dofs[:, None, :]), m_global)
    if point_mass is not None:
        pm = np.asarray(point_mass, float).reshape(-1)
        if pm.shape != (model.n_nodes,) or not (np.isfinite(pm).all() and (pm >= 0).all()):
            raise ModelError(f"point masses must be {model.n_nodes} finite numbers ≥ 0 [t]")
        idx = 6 * np.arange(model.n_nodes)[:, None] + np.arange(3)
        M[idx, idx] += pm[:, None]
    return M


@dataclass(frozen=True)
class Eigen:
    """Lowest natural modes of a frame: frequencies and full-DOF mass-normalised shapes."""

    frequency_Hz: FloatArray  # (m,) ascending
    shapes: FloatArray  # (m, n_dofs), φᵀ M φ = 1 [1/√t]
    in_plane_fraction: FloatArray  # (m,) kinetic energy share in ux, uy, rz


def natural_modes(model: FrameModel, M: FloatArray, count: int = 6,
                  fac: Assembled | None = None) -> Eigen:
    """The ``count`` lowest natural modes of a single model with mass matrix ``M``.

    ``fac``: the model's assembled stiffness, when the caller has it already. Raises
    :class:`MechanismError` when the model is a mechanism (its reduced stiffness is
    singular), as the static solve does.
    """
    if model.batch_shape:
        raise ModelError("natural_modes takes one model, not a batch")
    fac = fac or assemble_model(model)
    fac.solve(np.zeros((fac.red.n_q, 1)))  # raises if the model is a mechanism
    Mr = fac.red.project(M)
    n_q = fac.red.n_q
    if n_q == 0:
        return Eigen(np.zeros(0), np.zeros((0, model.n_dofs)), np.zeros(0))
    mu, V = sla.eigh(Mr, fac.Kr)  # Mr v = μ Kr v, μ = 1/ω², ascending
    keep = np.flatnonzero(mu > 1e-12 * max(float(mu[-1]), 1e-300))[::-1][:count]
    omega2 = 1.0 / mu[keep]
    q = V[:, keep] * np.sqrt(omega2)  # Kr-normalised to 1/ω² -> mass-normalised
    u = fac.red.expand(q, model.n_dofs)
    sel = np.zeros(model.n_dofs, bool)
    sel[(6 * np.arange(model.n_nodes)[:, None] + np.array(IN_PLANE_DOFS)).reshape(-1)] = True
    u = _separate(u, omega2, M, sel)
    e_in = np.einsum("ik,ij,jk->k", u[sel], M[np.ix_(sel, sel)], u[sel])
    e_out = np.einsum("ik,ij,jk->k", u[~sel], M[np.ix_(~sel, ~sel)], u[~sel])
    total = e_in + e_out
    fraction = np.divide(e_in, total, out=np.full_like(total, 0.5), where=total > 0)
    return Eigen(frequency_Hz=np.sqrt(omega2) / (2 * math.pi), shapes=u.T.copy(),
                 in_plane_fraction=fraction)


def _separate(u: FloatArray, omega2: FloatArray, M: FloatArray, sel: npt.NDArray[np.bool_]
              ) -> FloatArray:
    """Mass-normalised shapes (n_dofs, m) with each group of equal frequencies rotated to
    the combinations whose in-plane kinetic energy is extreme (pure in-plane or out-of-plane
    where the pair allows)."""
    out = u.copy()
    start = 0
    m = omega2.size
    while start < m:
        end = start + 1
        while end < m and abs(omega2[end] - omega2[start]) <= 2 * DEGENERATE * omega2[start]:
            end += 1
        if end - start > 1:
            block = u[:, start:end]
            P = block[sel].T @ M[np.ix_(sel, sel)] @ block[sel]
            _, R = np.linalg.eigh(0.5 * (P + P.T))
            out[:, start:end] = block @ R[:, ::-1]
        start = end
    return out


@dataclass(frozen=True)
class Mode:
    """One natural mode of the leg.

    Attributes
    ----------
    frequency_Hz : natural frequency [Hz]
    kind : "in-plane" or "out-of-plane", by where most of its kinetic energy is
    in_plane_fraction : kinetic energy share in ux, uy, rz (0..1)
    shape : (n_nodes, 6) node motions scaled so the largest translation is 1 (its sign
        positive): ux, uy, uz [mm/mm], rx, ry, rz [rad/mm]
    foot_modal_mass_t : 1/φ_foot,y² for the mass-normalised shape [t], None where the foot
        does not move vertically in this mode
    """

    frequency_Hz: float
    kind: ModeKind
    in_plane_fraction: float
    shape: FloatArray
    foot_modal_mass_t: float | None


@dataclass(frozen=True)
class LegMass:
    """The mass model of a case: point masses per node and a breakdown [t]."""

    mass_per_length_t_per_mm: FloatArray  # (n_beams,)
    r2_mm2: FloatArray  # (n_beams,) polar radius of gyration squared
    point_mass_t: FloatArray  # (n_nodes,)
    members_t: float  # tubes and printed segments
    pins_t: float
    actuators_t: float  # on moving parts only (a body-mounted actuator is held)
    payload_t: float

    @property
    def moving_t(self) -> float:
        """Mass that moves with the leg [t] (held point masses left out)."""
        return self.members_t + self.pins_t + self.actuators_t + self.payload_t


@dataclass(frozen=True)
class LegModes:
    """The lowest modes of a leg held at the body, and its effective mass at the foot."""

    modes: tuple[Mode, ...]
    mass: LegMass
    foot_effective_mass_t: float  # vertical, Rayleigh with the static deflection shape
    foot_stiffness_N_per_mm: float  # vertical, 1/C_yy


def _pin_stack_mm(case: Case, joint_index: int) -> float:
    """Length of a joint's pin through its stack [mm]: from the lowest part plane to the
    highest, plus half the bearing length of each of those two parts (common practice)."""
    j = case.joints[joint_index]
    z = {p: case.body_z_mm if p == BODY else case.part(p).z_mm for p in j.parts}
    low, high = min(z, key=lambda p: z[p]), max(z, key=lambda p: z[p])
    ends = [bearing_length_mm(case, j, p) or 0.0 for p in (low, high)]
    return z[high] - z[low] + 0.5 * (ends[0] + ends[1])


def leg_mass(case: Case, built: Built) -> LegMass:
    """Mass per length of every member and the point masses of pins, actuators and payload."""
    model = built.model
    sections = built.beam_sections
    mu = np.array([s.mass_per_length for s in sections])
    r2 = np.array([(s.Iy_mm4 + s.Iz_mm4) / s.A_mm2 for s in sections])
    ends = model.xyz[model.beams.nodes]
    lengths = np.linalg.norm(ends[:, 1] - ends[:, 0], axis=-1)
    held = {int(i) for i in np.flatnonzero(np.all(model.fixed, axis=1))}
    point = np.zeros(model.n_nodes)
    pins_t = actuators_t = 0.0
    for i, j in enumerate(case.joints):
        if j.kind == "fixed" or j.pin_diameter_mm is None or j.pin_material is None:
            continue
        rho = case.library.metal(j.pin_material).density_t_mm3
        mass = rho * math.pi * j.pin_diameter_mm**2 / 4 * _pin_stack_mm(case, i)
        nodes = [built.node_of[(p, j.node)] for p in j.parts]
        for n in nodes:
            point[n] += mass / len(nodes)
        pins_t += mass * sum(n not in held for n in nodes) / len(nodes)
    for a in case.actuators:
        j = next(jt for jt in case.joints if jt.name == a.joint)
        n = built.node_of[(j.parts[0], j.node)]
        point[n] += a.mass_t
        actuators_t += 0.0 if n in held else a.mass_t
    payload = case.loads.payload_t or 0.0
    point[built.foot] += payload
    return LegMass(mass_per_length_t_per_mm=mu, r2_mm2=r2, point_mass_t=point,
                   members_t=float(mu @ lengths), pins_t=pins_t, actuators_t=actuators_t,
                   payload_t=payload)


def foot_effective_mass(model: FrameModel, M: FloatArray, foot: int,
                        fac: Assembled | None = None) -> tuple[float, float]:
    """(m_eff [t], k [N/mm]) at a node for vertical (y) motion: Rayleigh's method with the
    static deflection shape under a vertical load there (see the module docstring)."""
    fac = fac or assemble_model(model)
    F = np.zeros((model.n_dofs, 1))
    dof = int(node_dofs(model, foot, "uy")[0])
    F[dof, 0] = 1.0
    q = fac.solve(fac.red.project_rhs(F))
    u = fac.red.expand(q, model.n_dofs)[:, 0]
    if u[dof] <= 0.0:
        return math.inf, math.inf
    return float(u @ M @ u) / u[dof] ** 2, 1.0 / u[dof]


def _scaled(shape: FloatArray) -> FloatArray:
    """(n_nodes, 6) with the largest translation 1 and positive."""
    t = shape[:, :3]
    i = np.unravel_index(int(np.argmax(np.abs(t))), t.shape)
    peak = t[i]
    out: FloatArray = shape / peak if peak != 0 else shape.copy()
    out.flags.writeable = False
    return out


def leg_modes(case: Case, built: Built, count: int = 6) -> LegModes:
    """The ``count`` lowest modes of the case's leg held at the body, actuators as springs.

    Parameters
    ----------
    case : the case, for the pins, actuators and payload
    built : its frame model in the pose (``stiff.build.build``)
    count : how many modes [-]
    """
    model = built.model
    mass = leg_mass(case, built)
    M = mass_matrix(model, mass.mass_per_length_t_per_mm, mass.r2_mm2, mass.point_mass_t)
    fac = assemble_model(model)
    eig = natural_modes(model, M, count, fac)
    dof = int(node_dofs(model, built.foot, "uy")[0])
    modes = []
    for f, phi, frac in zip(eig.frequency_Hz, eig.shapes, eig.in_plane_fraction, strict=True):
        shape = phi.reshape(model.n_nodes, 6)
        foot_y = float(phi[dof])
        still = abs(foot_y) <= FOOT_STILL * float(np.abs(shape[:, :3]).max())
        modes.append(Mode(
            frequency_Hz=float(f), kind="in-plane" if frac >= 0.5 else "out-of-plane",
            in_plane_fraction=float(frac), shape=_scaled(shape),
            foot_modal_mass_t=None if still else 1.0 / foot_y**2))
    m_eff, k = foot_effective_mass(model, M, built.foot, fac)
    return LegModes(modes=tuple(modes), mass=mass, foot_effective_mass_t=m_eff,
                    foot_stiffness_N_per_mm=k)


def plot_mode(built: Built, mode: Mode, ax: Axes | None = None, scale_mm: float | None = None
              ) -> Axes:
    """Draw a mode shape over the leg in the linkage plane and return the axes.

    In-plane modes are drawn displaced (grey: at rest); out-of-plane modes colour each member
    by its out-of-plane motion (red +z, blue −z). ``scale_mm``: the largest motion drawn
    [mm], a tenth of the leg's size by default. The caller shows or saves the figure.
    """
    from matplotlib.collections import LineCollection
    from matplotlib.figure import Figure

    if ax is None:
        ax = Figure(figsize=(5.0, 5.0)).add_subplot()
    model = built.model
    xyz = model.xyz.reshape(-1, model.n_nodes, 3)[0]
    size = max(float(np.ptp(xyz[:, :2], axis=0).max()), 1.0)
    s = 0.1 * size if scale_mm is None else scale_mm
    ends = model.beams.nodes
    rest = xyz[ends][:, :, :2]
    ax.add_collection(LineCollection(list(rest), colors="0.75", linewidths=2.0))
    if mode.kind == "in-plane":
        moved = (xyz[:, :2] + s * mode.shape[:, :2])[ends]
        ax.add_collection(LineCollection(list(moved), colors="C0", linewidths=2.0))
    else:
        w = mode.shape[ends, 2].mean(axis=1)
        lines = LineCollection(list(rest), cmap="coolwarm", linewidths=3.0)
        lines.set_array(w)
        lines.set_clim(-1.0, 1.0)
        ax.add_collection(lines)
        ax.text(0.02, 0.02, "colour: out-of-plane motion (red +z, blue -z)",
                transform=ax.transAxes, fontsize="small")
    ax.plot(xyz[built.foot, 0], xyz[built.foot, 1], "k^")
    ax.set_title(f"{mode.frequency_Hz:.3g} Hz, {mode.kind}")
    ax.set_xlabel("x [mm]")
    ax.set_ylabel("y [mm]")
    ax.set_aspect("equal")
    ax.autoscale_view()
    return ax

"""One neutral frame description, built in stiff, PyNite and anastruct.

Each adapter pins down its library's sign and axis conventions, so a test compares arrays of
the same meaning: displacements and reactions (cases, nodes, 6) in stiff's DOF order ux, uy,
uz, rx, ry, rz, global axes, right-handed, reactions as the force a support or ground spring
exerts on the structure; member end forces (cases, members, 12) as the forces the nodes exert
on each member, in its local axes.

Local member axes (stiff's convention, checked by ``member_axes`` against the engine): x from
end 1 to end 2, z the part of the member's reference vector normal to x, y = z × x.

Conventions found in the libraries (PyNiteFEA 3.2.0, anastruct 1.7.0):

* PyNite builds its own local axes from the member direction (local z horizontal, y "up" in
  its Y-up world) and turns them by ``rotation`` degrees about local x (Rodrigues:
  y = y₀ cos θ + z₀ sin θ). The adapter reads PyNite's axes back from ``Member3D.T()`` and
  sets θ so that they equal stiff's; ``pynite`` raises if they still differ. Its reactions
  include spring supports (−k·D), the same meaning as stiff's. Its ``add_member`` splits a
  member at any node on the member's line: the adapter refuses such a frame.
* anastruct (2D, x-y plane): ``point_load(Fy=+P)`` pushes towards +y (its constructor's
  ``invert_y_loads`` docs say a positive Fy acts downwards); ``get_node_displacements`` gives
  ux, uy in the global sense but ``phi_z`` clockwise-positive (= −rz); ``moment_load(Tz)`` is
  counter-clockwise positive (= +Mz); ``get_node_results_system`` gives Fx, Fy, Tz as the
  negatives of the reactions; element axial forces (``get_element_results``) are
  tension-positive. ``add_support_spring`` also fixes the other translation(s) of the node
  unless ``roll=True``. Truss elements are general elements with EI = 1e-14, so a node that
  only rods reach has no rotation of meaning. Coordinates are stored as float32. Its hinges
  and element end springs are wrong (REFERENCES.md §2), so the adapter builds pin-ended rods
  as truss elements and refuses any other member end release.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

from stiff.fe import Beams, FrameModel, Springs, solve_static

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]

DOFS = ("DX", "DY", "DZ", "RX", "RY", "RZ")
LOADS = ("FX", "FY", "FZ", "MX", "MY", "MZ")

#: Releases of a pin-ended rod: bending at both ends, torsion at end 2 only (so the rod cannot
#: spin about its own axis).
ROD_RELEASES = np.zeros(12, bool)
ROD_RELEASES[[4, 5, 9, 10, 11]] = True


@dataclass(frozen=True)
class Result:
    """What an oracle returns, in stiff's conventions (see the module docstring)."""

    displacements: FloatArray  # (c, n, 6)
    reactions: FloatArray  # (c, n, 6)
    member_forces: FloatArray | None = None  # (c, m, 12), local axes
    axial: FloatArray | None = None  # (c, m) member axial force [N], tension +


@dataclass(frozen=True)
class Frame:
    """A frame described once.

    Attributes
    ----------
    xyz : (n, 3) node coordinates [mm]
    members : (m, 2) node indices of end 1 and end 2
    E, G : (m,) moduli [MPa]
    A, Iy, Iz, J : (m,) section [mm², mm⁴]; Iy, Iz about local y, z
    ref : (m, 3) reference vectors: local z is their part normal to the member
    releases : (m, 12) True where a member end carries no force in that local DOF
    fixed : (n, 6) supported DOFs
    ground : (n, 6) spring supports [N/mm, N·mm/rad], 0 where there is none
    springs : (s, 2) node pairs of two-way axial springs without preload
    rates : (s,) spring rates [N/mm]
    loads : (c, n, 6) nodal forces [N] and moments [N·mm], global axes
    """

    xyz: FloatArray
    members: npt.NDArray[np.intp]
    E: FloatArray
    G: FloatArray
    A: FloatArray
    Iy: FloatArray
    Iz: FloatArray
    J: FloatArray
    ref: FloatArray
    releases: BoolArray
    fixed: BoolArray
    ground: FloatArray
    loads: FloatArray
    springs: npt.NDArray[np.intp] = field(
        default_factory=lambda: np.zeros((0, 2), np.intp))
    rates: FloatArray = field(default_factory=lambda: np.zeros(0))

    @property
    def n_nodes(self) -> int:
        return int(self.xyz.shape[0])

    @property
    def n_members(self) -> int:
        return int(self.members.shape[0])

    @property
    def is_rod(self) -> BoolArray:
        """(m,) members that are pin-ended rods (bending released at both ends)."""
        return np.asarray((self.releases == ROD_RELEASES).all(axis=1))


def member_axes(frame: Frame) -> FloatArray:
    """(m, 3, 3) local axes of each member, rows x, y, z in global coordinates."""
    d = frame.xyz[frame.members[:, 1]] - frame.xyz[frame.members[:, 0]]
    ex = d / np.linalg.norm(d, axis=1, keepdims=True)
    ez = frame.ref - np.sum(frame.ref * ex, axis=1, keepdims=True) * ex
    ez /= np.linalg.norm(ez, axis=1, keepdims=True)
    ey = np.cross(ez, ex)
    return np.stack([ex, ey, ez], axis=1)


# --- stiff ------------------------------------------------------------------------------------


def to_stiff(frame: Frame, *, rods_as_springs: bool = False) -> FrameModel:
    """The frame in stiff, shear deformation off (infinite shear areas).

    With ``rods_as_springs`` the pin-ended rods become axial springs of rate EA/L instead of
    released members.
    """
    keep = ~frame.is_rod if rods_as_springs else np.ones(frame.n_members, bool)
    rods = np.flatnonzero(~keep)
    L = np.linalg.norm(frame.xyz[frame.members[rods, 1]] - frame.xyz[frame.members[rods, 0]],
                       axis=1)
    spring_nodes = np.concatenate([frame.springs, frame.members[rods]]).reshape(-1, 2)
    rates = np.concatenate([frame.rates, frame.E[rods] * frame.A[rods] / L])
    beams = Beams.make(
        frame.members[keep], E=frame.E[keep], G=frame.G[keep], A=frame.A[keep],
        Iy=frame.Iy[keep], Iz=frame.Iz[keep], J=frame.J[keep], Asy=math.inf, Asz=math.inf,
        ref=frame.ref[keep], releases=frame.releases[keep])
    springs = Springs.make(spring_nodes, rates) if len(rates) else None
    return FrameModel.make(frame.xyz, beams=beams, springs=springs, fixed=frame.fixed,
                           ground=frame.ground)


def stiff_result(frame: Frame, **kwargs: bool) -> Result:
    """Solve the frame in stiff."""
    sol = solve_static(to_stiff(frame, **kwargs), frame.loads)
    if not kwargs.get("rods_as_springs"):
        return Result(sol.displacements, sol.reactions, sol.beam_forces, sol.beam_axial)
    axial = np.zeros((frame.loads.shape[0], frame.n_members))
    axial[:, ~frame.is_rod] = sol.beam_axial
    axial[:, frame.is_rod] = sol.spring_forces[:, frame.springs.shape[0]:]
    return Result(sol.displacements, sol.reactions, None, axial)


# --- PyNite -----------------------------------------------------------------------------------


def _pynite_model(frame: Frame):  # type: ignore[no-untyped-def]
    from Pynite import FEModel3D

    model = FEModel3D()
    names = [f"N{i}" for i in range(frame.n_nodes)]
    for name, (x, y, z) in zip(names, frame.xyz, strict=True):
        model.add_node(name, float(x), float(y), float(z))
    axes = member_axes(frame)
    for i, (a, b) in enumerate(frame.members):
        E, G = float(frame.E[i]), float(frame.G[i])
        # ν only labels the material; PyNite's frame members use G directly.
        model.add_material(f"mat{i}", E, G, E / (2 * G) - 1, 0.0)
        model.add_section(f"sec{i}", float(frame.A[i]), float(frame.Iy[i]), float(frame.Iz[i]),
                          float(frame.J[i]))
        name = f"M{i}"
        model.add_member(name, names[a], names[b], f"mat{i}", f"sec{i}")
        member = model.members[name]
        R0 = member.T()[:3, :3]
        theta = math.atan2(float(axes[i, 1] @ R0[2]), float(axes[i, 1] @ R0[1]))
        member.rotation = math.degrees(theta)
        if not np.allclose(member.T()[:3, :3], axes[i], atol=1e-12):
            raise ValueError(f"member {i}: PyNite's local axes do not match stiff's")
        if frame.releases[i].any():
            model.def_releases(name, *(bool(r) for r in frame.releases[i]))
    for k, (a, b) in enumerate(frame.springs):
        model.add_spring(f"S{k}", names[a], names[b], float(frame.rates[k]))
    for i, name in enumerate(names):
        if frame.fixed[i].any():
            model.def_support(name, *(bool(f) for f in frame.fixed[i]))
        for dof in np.flatnonzero(frame.ground[i]):
            if frame.fixed[i, dof]:
                raise ValueError(f"node {i}: a spring support on a fixed DOF")
            model.def_support_spring(name, DOFS[dof], float(frame.ground[i, dof]))
    for c in range(frame.loads.shape[0]):
        case = f"C{c}"
        for i, dof in zip(*np.nonzero(frame.loads[c]), strict=True):
            model.add_node_load(names[i], LOADS[dof], float(frame.loads[c, i, dof]), case=case)
        model.add_load_combo(case, {case: 1.0})
    return model, names


def pynite(frame: Frame) -> Result:
    """Solve the frame in PyNite (linear, Euler–Bernoulli); results in stiff's conventions."""
    model, names = _pynite_model(frame)
    model.analyze_linear(log=False, check_statics=False)
    cases = frame.loads.shape[0]
    disp = np.zeros((cases, frame.n_nodes, 6))
    reac = np.zeros((cases, frame.n_nodes, 6))
    forces = np.zeros((cases, frame.n_members, 12))
    for c in range(cases):
        combo = f"C{c}"
        for i, name in enumerate(names):
            node = model.nodes[name]
            disp[c, i] = [getattr(node, d)[combo] for d in DOFS]
            reac[c, i] = [getattr(node, "Rxn" + f)[combo] for f in LOADS]
        for j in range(frame.n_members):
            subs = model.members[f"M{j}"].sub_members
            if len(subs) != 1:
                raise ValueError(f"member {j}: PyNite split it at a node on its line")
            forces[c, j] = next(iter(subs.values())).f(combo)[:, 0]
    return Result(disp, reac, forces)


# --- anastruct --------------------------------------------------------------------------------

#: In-plane DOFs of a planar frame in the x-y plane: ux, uy, rz.
PLANE = np.array([0, 1, 5])


def _inplane_inertia(frame: Frame) -> FloatArray:
    """(m,) second moment for bending in the x-y plane (about the local axis along global z)."""
    axes = member_axes(frame)
    zy, zz = np.abs(axes[:, 1, 2]), np.abs(axes[:, 2, 2])
    if not (np.isclose(zy, 1.0) | np.isclose(zz, 1.0)).all():
        raise ValueError("a member's local y or z axis must be normal to the x-y plane")
    return np.where(np.isclose(zz, 1.0), frame.Iz, frame.Iy)


def rod_only_nodes(frame: Frame) -> BoolArray:
    """(n,) nodes that no member other than a pin-ended rod reaches."""
    general = np.zeros(frame.n_nodes, bool)
    general[frame.members[~frame.is_rod].reshape(-1)] = True
    return ~general


def anastruct(frame: Frame) -> Result:
    """Solve a planar frame (x-y plane) in anastruct, one system per load case.

    Only ux, uy, rz are meaningful in the result (the rest are zero); rz is meaningless at
    nodes that only rods reach (see :func:`rod_only_nodes`), and a fixed rz there (which stiff
    needs to hold the otherwise free rotation) is not passed on.
    """
    from anastruct import SystemElements

    if frame.springs.size:
        raise ValueError("anastruct adapter: model axial springs as pin-ended rods")
    if np.abs(frame.xyz[:, 2]).max() > 0.0:
        raise ValueError("anastruct adapter: the frame must lie in the x-y plane")
    other = frame.releases.any(axis=1) & ~frame.is_rod
    if other.any():
        raise ValueError("anastruct adapter: its hinges are wrong; only pin-ended rods allowed")
    if np.abs(frame.loads[..., [2, 3, 4]]).max() > 0.0:
        raise ValueError("anastruct adapter: loads must lie in the x-y plane")
    EI = frame.E * _inplane_inertia(frame)
    EA = frame.E * frame.A
    rod_nodes = rod_only_nodes(frame)
    cases = frame.loads.shape[0]
    disp = np.zeros((cases, frame.n_nodes, 6))
    reac = np.zeros((cases, frame.n_nodes, 6))
    axial = np.zeros((cases, frame.n_members))
    for c in range(cases):
        ss = SystemElements()
        elements = []
        for j, (a, b) in enumerate(frame.members):
            loc = [frame.xyz[a, :2].tolist(), frame.xyz[b, :2].tolist()]
            if frame.is_rod[j]:
                elements.append(ss.add_truss_element(loc, EA=float(EA[j])))
            else:
                elements.append(ss.add_element(loc, EA=float(EA[j]), EI=float(EI[j])))
        ids = [ss.find_node_id(frame.xyz[i, :2].tolist()) for i in range(frame.n_nodes)]
        for i, nid in enumerate(ids):
            ux, uy, rz = frame.fixed[i, PLANE]
            rz = rz and not rod_nodes[i]
            if ux and uy and rz:
                ss.add_support_fixed(nid)
            elif ux and uy:
                ss.add_support_hinged(nid)
            elif ux or uy:
                # direction names the free translation; rotate=False also holds rz.
                ss.add_support_roll(nid, direction="y" if ux else "x", rotate=not rz)
            elif rz:
                ss.add_support_rotational(nid)
            for axis, dof in enumerate(PLANE, start=1):
                k = float(frame.ground[i, dof])
                if k:
                    ss.add_support_spring(nid, axis, k, roll=True)
            fx, fy, mz = frame.loads[c, i, PLANE]
            if fx or fy:
                ss.point_load(nid, Fx=float(fx), Fy=float(fy))
            if mz:
                ss.moment_load(nid, Tz=float(mz))
        ss.solve()
        for i, nid in enumerate(ids):
            d = ss.get_node_displacements(nid)
            r = ss.get_node_results_system(nid)
            disp[c, i, PLANE] = [d["ux"], d["uy"], -d["phi_z"]]
            reac[c, i, PLANE] = [-r["Fx"], -r["Fy"], -r["Tz"]]
        # Nodal loads only: the axial force is constant along each element.
        axial[c] = [ss.get_element_results(e)["Nmax"] for e in elements]
    return Result(disp, reac, None, axial)

"""The frame model: nodes, members, connectors, springs and supports as arrays.

A model is frozen and holds only arrays and names. Topology (which nodes each element joins,
member end releases, which DOFs are fixed, which connector components are rigid) is shared by
every model of a batch; geometry and properties may carry leading batch axes ``...`` so that a
stack of poses or print variants is one model with ``xyz`` of shape (..., n_nodes, 3).

Units: mm, N, MPa, N·mm, rad.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TypeVar

import numpy as np
import numpy.typing as npt

from stiff.errors import ModelError

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.intp]
BoolArray = npt.NDArray[np.bool_]

DOF_NAMES: tuple[str, ...] = ("ux", "uy", "uz", "rx", "ry", "rz")
DOFS_PER_NODE = 6


def _float(a: npt.ArrayLike) -> FloatArray:
    return np.asarray(a, dtype=np.float64)


def _pairs(a: npt.ArrayLike) -> IntArray:
    out = np.asarray(a, dtype=np.intp).reshape(-1, 2)
    return out


_Array = TypeVar("_Array", bound=npt.NDArray[np.generic])


def _read_only(a: _Array) -> _Array:
    a.flags.writeable = False
    return a


# Empty arrays shared by every empty element set (read-only: they hold nothing).
_NO_PAIRS: IntArray = _read_only(np.zeros((0, 2), np.intp))
_NO_VALUES: FloatArray = _read_only(np.zeros(0))
_NO_REF: FloatArray = _read_only(np.zeros((0, 3)))
_NO_RELEASES: BoolArray = _read_only(np.zeros((0, 12), bool))
_NO_STIFFNESS: FloatArray = _read_only(np.zeros((0, 6)))
_NO_FRAMES: FloatArray = _read_only(np.zeros((0, 3, 3)))


def _filled(a: npt.ArrayLike, shape: tuple[int, ...]) -> FloatArray:
    """A new float array of ``shape`` holding ``a`` broadcast to it (ValueError if it can't)."""
    out = np.empty(shape)
    out[...] = a
    return out


def _per_item(a: npt.ArrayLike, n: int, tail: tuple[int, ...] = ()) -> FloatArray:
    """``a`` as a new (..., n, *tail) array: scalars and per-item rows broadcast to n items."""
    if type(a) is np.ndarray and a.dtype.type is np.float64 and a.shape == (n, *tail):
        return a.copy()
    v = np.asarray(a, dtype=np.float64)
    lead = v.shape[: v.ndim - len(tail) - 1] if v.ndim > len(tail) else ()
    shape = (*lead, n, *tail)
    return v.copy() if v.shape == shape else _filled(v, shape)


@dataclass(frozen=True)
class Beams:
    """Members as 3D Timoshenko beams.

    Attributes
    ----------
    nodes : (n, 2) node indices of end 1 and end 2
    E, G : (..., n) modulus along the axis and shear modulus [MPa]
    A : (..., n) area [mm²]
    Iy, Iz : (..., n) second moments of area about local y and z [mm⁴]
    J : (..., n) torsion constant [mm⁴]
    Asy, Asz : (..., n) shear areas κA [mm²]; ``inf`` means no shear deformation
    ref : (..., n, 3) reference vector: local z is its part normal to the member, local
        y = z × x (default (0, 0, 1): local z along the linkage's pin axes)
    releases : (n, 12) True where a member end carries no force in that local DOF
    names : member names, for messages and results
    """

    nodes: IntArray
    E: FloatArray
    G: FloatArray
    A: FloatArray
    Iy: FloatArray
    Iz: FloatArray
    J: FloatArray
    Asy: FloatArray
    Asz: FloatArray
    ref: FloatArray
    releases: BoolArray
    names: tuple[str, ...]

    @staticmethod
    def make(
        nodes: npt.ArrayLike,
        *,
        E: npt.ArrayLike,
        G: npt.ArrayLike,
        A: npt.ArrayLike,
        Iy: npt.ArrayLike,
        Iz: npt.ArrayLike,
        J: npt.ArrayLike,
        Asy: npt.ArrayLike = math.inf,
        Asz: npt.ArrayLike = math.inf,
        ref: npt.ArrayLike = (0.0, 0.0, 1.0),
        releases: npt.ArrayLike | None = None,
        names: tuple[str, ...] | None = None,
    ) -> Beams:
        """Members from array-likes; scalars broadcast to every member."""
        conn = _pairs(nodes)
        n = conn.shape[0]
        rel = np.zeros((n, 12), bool) if releases is None else np.asarray(releases, bool)
        return Beams(
            nodes=conn,
            E=_per_item(E, n),
            G=_per_item(G, n),
            A=_per_item(A, n),
            Iy=_per_item(Iy, n),
            Iz=_per_item(Iz, n),
            J=_per_item(J, n),
            Asy=_per_item(Asy, n),
            Asz=_per_item(Asz, n),
            ref=_per_item(ref, n, (3,)),
            releases=rel.reshape(n, 12),
            names=names if names is not None else tuple(f"member {i}" for i in range(n)),
        )

    @staticmethod
    def none() -> Beams:
        """No members."""
        return _NO_BEAMS

    @property
    def count(self) -> int:
        """Number of members."""
        return int(self.nodes.shape[0])


@dataclass(frozen=True)
class Connectors:
    """Six-component springs between two nodes, in a local frame.

    The relative motion of node b against node a is measured at the midpoint of the two, so a
    connector between nodes at different places (a pin through a stack of parts) takes no force
    under rigid-body motion:
    Δu = u_b − u_a + ½ [d]× (θ_a + θ_b), Δθ = θ_b − θ_a, d = x_b − x_a.

    Attributes
    ----------
    nodes : (n, 2) node indices a, b
    stiffness : (..., n, 6) along the local axes: translations [N/mm], rotations [N·mm/rad];
        0 is free, ``inf`` rigid (the rigid pattern must be the same for the whole batch)
    frame : (..., n, 3, 3) rows are the local axes in global coordinates
    names : connector names
    """

    nodes: IntArray
    stiffness: FloatArray
    frame: FloatArray
    names: tuple[str, ...]

    @staticmethod
    def make(
        nodes: npt.ArrayLike,
        stiffness: npt.ArrayLike,
        frame: npt.ArrayLike | None = None,
        names: tuple[str, ...] | None = None,
    ) -> Connectors:
        """Connectors; ``frame`` defaults to the global axes."""
        conn = _pairs(nodes)
        n = conn.shape[0]
        return Connectors(
            nodes=conn,
            stiffness=_per_item(stiffness, n, (6,)),
            frame=_per_item(np.eye(3) if frame is None else frame, n, (3, 3)),
            names=names if names is not None else tuple(f"connector {i}" for i in range(n)),
        )

    @staticmethod
    def none() -> Connectors:
        """No connectors."""
        return _NO_CONNECTORS

    @property
    def count(self) -> int:
        """Number of connectors."""
        return int(self.nodes.shape[0])

    @property
    def rigid(self) -> BoolArray:
        """(n, 6) rigid components (shared by the whole batch)."""
        inf = np.isinf(self.stiffness)
        return inf[(0,) * (inf.ndim - 2)] if inf.ndim > 2 else inf


@dataclass(frozen=True)
class Springs:
    """Axial springs (coil springs, rods that carry only axial force).

    Attributes
    ----------
    nodes : (n, 2) node indices
    rate : (..., n) spring rate [N/mm]
    tension : (..., n) force in the spring at the model's geometry [N], tension +: it adds
        the geometric stiffness (T/L)(I − e eᵀ) and, through :func:`preload_loads`, its pull
    names : spring names
    """

    nodes: IntArray
    rate: FloatArray
    tension: FloatArray
    names: tuple[str, ...]

    @staticmethod
    def make(
        nodes: npt.ArrayLike,
        rate: npt.ArrayLike,
        tension: npt.ArrayLike = 0.0,
        names: tuple[str, ...] | None = None,
    ) -> Springs:
        """Springs; scalars broadcast to every spring."""
        conn = _pairs(nodes)
        n = conn.shape[0]
        return Springs(
            nodes=conn,
            rate=_per_item(rate, n),
            tension=_per_item(tension, n),
            names=names if names is not None else tuple(f"spring {i}" for i in range(n)),
        )

    @staticmethod
    def none() -> Springs:
        """No springs."""
        return _NO_SPRINGS

    @property
    def count(self) -> int:
        """Number of springs."""
        return int(self.nodes.shape[0])


# The empty element sets: frozen, over read-only empty arrays, so one of each serves all.
_NO_BEAMS = Beams(nodes=_NO_PAIRS, E=_NO_VALUES, G=_NO_VALUES, A=_NO_VALUES, Iy=_NO_VALUES,
                  Iz=_NO_VALUES, J=_NO_VALUES, Asy=_NO_VALUES, Asz=_NO_VALUES, ref=_NO_REF,
                  releases=_NO_RELEASES, names=())
_NO_CONNECTORS = Connectors(nodes=_NO_PAIRS, stiffness=_NO_STIFFNESS, frame=_NO_FRAMES, names=())
_NO_SPRINGS = Springs(nodes=_NO_PAIRS, rate=_NO_VALUES, tension=_NO_VALUES, names=())


@dataclass(frozen=True)
class FrameModel:
    """A whole frame: nodes, elements and supports. See the module docstring for shapes.

    Attributes
    ----------
    xyz : (..., n_nodes, 3) node coordinates [mm]
    node_names : one name per node
    beams, connectors, springs : the elements
    fixed : (n_nodes, 6) True where a DOF is held by a support
    ground : (..., n_nodes, 6) springs to ground [N/mm or N·mm/rad], 0 where there is none
    """

    xyz: FloatArray
    node_names: tuple[str, ...]
    beams: Beams = field(default_factory=Beams.none)
    connectors: Connectors = field(default_factory=Connectors.none)
    springs: Springs = field(default_factory=Springs.none)
    fixed: BoolArray = field(default_factory=lambda: np.zeros((0, 6), bool))
    ground: FloatArray = field(default_factory=lambda: np.zeros((0, 6)))

    @staticmethod
    def make(
        xyz: npt.ArrayLike,
        *,
        node_names: tuple[str, ...] | None = None,
        beams: Beams | None = None,
        connectors: Connectors | None = None,
        springs: Springs | None = None,
        fixed: npt.ArrayLike | None = None,
        ground: npt.ArrayLike | None = None,
    ) -> FrameModel:
        """A validated model; raises :class:`ModelError` with a one-line reason."""
        x = _float(xyz)
        n = x.shape[-2]
        model = FrameModel(
            xyz=x,
            node_names=node_names or tuple(f"node {i}" for i in range(n)),
            beams=beams or Beams.none(),
            connectors=connectors or Connectors.none(),
            springs=springs or Springs.none(),
            fixed=np.zeros((n, 6), bool) if fixed is None else np.asarray(fixed, bool),
            ground=np.zeros((n, 6)) if ground is None else _float(ground),
        )
        validate(model)
        return model

    @property
    def n_nodes(self) -> int:
        """Number of nodes."""
        return int(self.xyz.shape[-2])

    @property
    def n_dofs(self) -> int:
        """Number of DOFs, six a node."""
        return DOFS_PER_NODE * self.n_nodes

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Leading batch shape shared by all batched arrays (() for one model)."""
        shapes = {self.xyz.shape[:-2], self.ground.shape[:-2]}
        if self.beams.count:
            shapes.add(self.beams.E.shape[:-1])
        if self.connectors.count:
            shapes.add(self.connectors.stiffness.shape[:-2])
        if self.springs.count:
            shapes.add(self.springs.rate.shape[:-1])
        if len(shapes) == 1:
            return shapes.pop()
        return tuple(np.broadcast_shapes(*shapes))

    def dof_label(self, dof: int) -> str:
        """'node name ux' for a global DOF index."""
        return f"{self.node_names[dof // DOFS_PER_NODE]} {DOF_NAMES[dof % DOFS_PER_NODE]}"


def _positive(what: str, values: FloatArray, labels: tuple[str, ...]) -> None:
    """Raise unless every value is a positive number (``inf`` allowed)."""
    bad = ~(values > 0.0)
    if bad.any():
        i = int(np.argwhere(bad)[0][-1])
        raise ModelError(f"{labels[i]}: {what} must be a positive number, got {values[bad][0]!r}")


def _check_nodes(kind: str, conn: IntArray, n_nodes: int, labels: tuple[str, ...]) -> None:
    # as unsigned numbers, negative indices are huge: one comparison catches both ends
    as_unsigned = conn.view(np.uintp) if conn.dtype == np.intp else conn.astype(np.uintp)
    if not np.count_nonzero(as_unsigned >= n_nodes):
        return
    bad = (conn < 0) | (conn >= n_nodes)
    if bad.any():
        i = int(np.argwhere(bad)[0][0])
        raise ModelError(f"{labels[i]}: {kind} names node index {conn[i].tolist()}, "
                         f"the model has {n_nodes} nodes")


#: Section values of a member, with how a message names them; the first six must be finite.
_SECTION = (("E", "E [MPa]"), ("G", "G [MPa]"), ("A", "area [mm²]"), ("Iy", "Iy [mm⁴]"),
            ("Iz", "Iz [mm⁴]"), ("J", "J [mm⁴]"), ("Asy", "shear area Asy [mm²]"),
            ("Asz", "shear area Asz [mm²]"))


def _check_sections(b: Beams) -> None:
    """Every section value a positive number, the first six finite too."""
    values = (b.E, b.G, b.A, b.Iy, b.Iz, b.J, b.Asy, b.Asz)  # the order of _SECTION
    if all(v.shape == b.E.shape for v in values):
        every, finite = np.concatenate(values), 6 * len(b.E)  # stacked along the first axis
    else:
        every = np.concatenate([v.reshape(-1) for v in values])
        finite = sum(v.size for v in values[:6])
    if every.min() > 0.0 and every[:finite].max() < math.inf:
        return
    for attr, what in _SECTION:
        v = getattr(b, attr)
        if attr in ("E", "G", "A", "Iy", "Iz", "J") and np.isinf(v).any():
            i = int(np.argwhere(np.isinf(v))[0][-1])
            raise ModelError(f"{b.names[i]}: {what} must be finite")
        _positive(what, v, b.names)


def _check_geometry(model: FrameModel) -> None:
    """No member of zero length, none along its reference vector.

    With d the member's vector and r its reference vector, their Gram matrix gives |d|² and
    |d × r|² = |d|²|r|² − (d·r)², so one small matmul serves both checks. Rounding in that
    difference is ~1e-16 of |d|²|r|², far below the 1e-12 (a sine of 1e-6) at which the
    reference vector counts as parallel.
    """
    b = model.beams
    ends = model.xyz[..., b.nodes, :]
    d = ends[..., 1, :] - ends[..., 0, :]
    ref = b.ref if b.ref.shape == d.shape else np.broadcast_to(b.ref, d.shape)
    pair = np.concatenate((d, ref), axis=-1).reshape(*d.shape[:-1], 2, 3)
    gram = pair @ np.swapaxes(pair, -1, -2)
    dd, dr, rr = gram[..., 0, 0], gram[..., 0, 1], gram[..., 1, 1]
    # the model's size: its largest extent along an axis, at most the spread of all coordinates
    spread = max(float(model.xyz.max() - model.xyz.min()), 1.0)
    if dd.min() > (1e-9 * spread) ** 2 and not np.count_nonzero(
            dr * dr >= (1.0 - 1e-12) * (dd * rr)):
        return
    scale = max(float(np.ptp(model.xyz.reshape(-1, 3), axis=0).max()), 1.0)
    short = ~(1e-9 * scale < np.sqrt(dd))
    if short.any():
        i = int(np.argwhere(short)[0][-1])
        raise ModelError(f"{b.names[i]}: zero-length member (both ends at the same point)")
    parallel = ~(dd * rr - dr * dr > 1e-12 * (dd * rr))
    if parallel.any():
        i = int(np.argwhere(parallel)[0][-1])
        raise ModelError(f"{b.names[i]}: reference vector is parallel to the member "
                         "(or zero), so its local z axis is undefined")


def _check_beams(model: FrameModel) -> None:
    b = model.beams
    if b.count == 0:
        return
    _check_nodes("member", b.nodes, model.n_nodes, b.names)
    _check_releases(b)
    _check_sections(b)
    _check_geometry(model)


_END_DOFS = ("ux1", "uy1", "uz1", "rx1", "ry1", "rz1", "ux2", "uy2", "uz2", "rx2", "ry2", "rz2")


def _release_sets() -> tuple[tuple[int, ...], ...]:
    """Release sets (member DOF indices) that leave a member free to move as a rigid body.

    The local stiffness splits into four independent blocks: axial (u1, u2), torsion
    (θx1, θx2), and bending in the x-y plane (v1, θz1, v2, θz2) and in the x-z plane
    (w1, θy1, w2, θy2). The released part of a block is singular, so it cannot be condensed,
    exactly when the block's rigid-body motions survive with the released DOFs free:

    * axial, torsion: released at both ends (the member slides or spins);
    * bending: the released set contains {v1, v2} (it shears across: a rigid translation),
      {θ1, v2, θ2} or {v1, θ1, θ2} (it turns as a rigid body about end 1 or end 2).

    Why exactly these: a block k is positive semi-definite, so its released part k_rr is
    singular if and only if some rigid-body motion of the block is zero at every kept DOF.
    A bending block's rigid motions are (a, b, a + bL, b) over (v1, θ1, v2, θ2) (translation
    a, rotation b about end 1); those that vanish outside a set have the supports {v1, v2}
    (b = 0), {θ1, v2, θ2} (a = 0) and {v1, θ1, θ2} (a = −bL), or all four DOFs.
    """
    sets: list[tuple[int, ...]] = [(0, 6), (3, 9)]
    for v1, t1, v2, t2 in ((1, 5, 7, 11), (2, 4, 8, 10)):
        sets += [(v1, v2), (t1, v2, t2), (v1, t1, t2)]
    return tuple(sets)


#: Bit masks (bit j is member DOF j) of the release sets that make a member a mechanism.
_SINGULAR_RELEASES = _read_only(
    np.array([sum(1 << j for j in s) for s in _release_sets()], np.int64))
_BITS = _read_only(1 << np.arange(12, dtype=np.int64))


def _check_releases(b: Beams) -> None:
    """A release pattern must leave the member able to carry a rigid-body motion's load.

    Releasing, say, torsion at both ends lets the member spin freely about its axis: the
    released block of its stiffness is singular and cannot be condensed. Whether it is
    depends only on which DOFs are released (see :func:`_release_sets`).
    """
    if not np.count_nonzero(b.releases):
        return
    code = b.releases @ _BITS
    singular = (code[:, None] & _SINGULAR_RELEASES) == _SINGULAR_RELEASES
    if np.count_nonzero(singular):
        i = int(np.argwhere(singular)[0][0])
        released = ", ".join(_END_DOFS[j] for j in np.flatnonzero(b.releases[i]))
        raise ModelError(f"{b.names[i]}: releases {released} leave it free to move as a "
                         "rigid body (e.g. torsion released at both ends); keep one end")


def _check_connectors(model: FrameModel) -> None:
    c = model.connectors
    if c.count == 0:
        return
    _check_nodes("connector", c.nodes, model.n_nodes, c.names)
    k = c.stiffness
    bad = np.isnan(k) | (k < 0.0)
    if bad.any():
        i = int(np.argwhere(bad)[0][-2])
        raise ModelError(f"{c.names[i]}: connector stiffness must be ≥ 0 or inf, got "
                         f"{k[bad][0]!r}")
    inf = np.isinf(k)
    if (inf != c.rigid).any():
        raise ModelError("connectors: which components are rigid must be the same in every "
                         "model of a batch")
    R = c.frame
    err = np.abs(R @ np.swapaxes(R, -1, -2) - np.eye(3)).max(axis=(-1, -2))
    if (~(err < 1e-9)).any():
        i = int(np.argwhere(~(err < 1e-9))[0][-1])
        raise ModelError(f"{c.names[i]}: connector frame is not a rotation (rows must be "
                         "orthonormal)")


def _check_springs(model: FrameModel) -> None:
    s = model.springs
    if s.count == 0:
        return
    _check_nodes("spring", s.nodes, model.n_nodes, s.names)
    _positive("rate [N/mm]", s.rate, s.names)
    if np.isinf(s.rate).any() or np.isnan(s.tension).any() or np.isinf(s.tension).any():
        raise ModelError("springs: rate and tension must be finite numbers")
    d = model.xyz[..., s.nodes[:, 1], :] - model.xyz[..., s.nodes[:, 0], :]
    short = ~(np.linalg.norm(d, axis=-1) > 0.0)
    if short.any():
        i = int(np.argwhere(short)[0][-1])
        raise ModelError(f"{s.names[i]}: zero-length spring (both ends at the same point)")


def validate(model: FrameModel) -> None:
    """Raise :class:`ModelError` with a one-line reason for the first malformed input."""
    if model.xyz.shape[-1:] != (3,) or model.xyz.ndim < 2:
        raise ModelError(f"node coordinates must have shape (..., n, 3), got {model.xyz.shape}")
    if np.count_nonzero(np.isfinite(model.xyz)) != model.xyz.size:
        i = int(np.argwhere(~np.isfinite(model.xyz))[0][-2])
        raise ModelError(f"{model.node_names[i]}: node coordinates must be finite numbers")
    n = model.n_nodes
    if len(model.node_names) != n:
        raise ModelError(f"{len(model.node_names)} node names for {n} nodes")
    if model.fixed.shape != (n, 6):
        raise ModelError(f"fixed DOFs must have shape ({n}, 6), got {model.fixed.shape}")
    if model.ground.shape[-2:] != (n, 6):
        raise ModelError(f"ground springs must have shape (..., {n}, 6)")
    g = model.ground
    if g.size and not (g.min() >= 0.0 and g.max() < math.inf):  # a NaN fails both
        raise ModelError("ground springs must be finite and ≥ 0 (use a fixed DOF for rigid)")
    _check_beams(model)
    _check_connectors(model)
    _check_springs(model)
    try:
        model.batch_shape  # noqa: B018 - raises if the batch axes don't broadcast
    except ValueError as err:
        raise ModelError(f"batched arrays do not share a batch shape: {err}") from None

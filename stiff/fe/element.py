"""Batched 3D frame elements in closed form.

Every function here takes arrays with any leading batch shape ``...`` and an element axis, and
returns arrays of the same leading shape: one call builds all the element matrices of a model,
or of a whole stack of models (poses, print variants).

Local axes of a member: x runs from its first node to its second; z is the part of the member's
reference vector perpendicular to x; y = z × x. With the default reference vector (0, 0, 1) a
member lying in the linkage plane (x-y) has local z along the pin axes, so in-plane bending is
about local z (E·Iz) and a pin in the plane releases rz. DOF order at each end: ux, uy, uz,
rx, ry, rz;
an element's 12 DOFs are end 1 then end 2.

Timoshenko beam (Przemieniecki, *Theory of Matrix Structural Analysis*, 1968, §5.6, Eq. 5.116;
the same matrix is in McGuire, Gallagher & Ziemian, *Matrix Structural Analysis*, 2nd ed. 2000,
§5.2 with shear terms). Bending in the local x-y plane (v, θz) uses E·Iz and the shear area Asy;
bending in the x-z plane (w, θy) uses E·Iy and Asz. With

    Φy = 12 E Iz / (G Asy L²),      Φz = 12 E Iy / (G Asz L²)

the x-y block over (v1, θz1, v2, θz2) is

    E Iz / ((1 + Φy) L³) · [[ 12,        6L,         -12,      6L        ],
                            [ 6L,  (4 + Φy) L²,      -6L, (2 - Φy) L²   ],
                            [-12,       -6L,          12,     -6L        ],
                            [ 6L,  (2 - Φy) L²,      -6L, (4 + Φy) L²   ]]

and the x-z block over (w1, θy1, w2, θy2) is the same with the signs of the 6L terms flipped
(because a positive θy turns +z towards -x). Axial E A / L, torsion G J / L. An infinite shear
area gives Φ = 0, the Euler–Bernoulli element. The tests check the tip deflection
P L³/(3 E I) + P L/(κ G A) and the element's six rigid-body modes.

Geometric stiffness of a member under axial force N (tension positive), consistent cubic shape
functions (McGuire, Gallagher & Ziemian 2nd ed., Eq. 9.19), x-y block over (v1, θz1, v2, θz2):

    N / L · [[ 6/5,   L/10,  -6/5,   L/10 ],
             [ L/10, 2L²/15, -L/10, -L²/30 ],
             [-6/5,  -L/10,   6/5,  -L/10 ],
             [ L/10, -L²/30, -L/10, 2L²/15 ]]

with the same sign flip for x-z, and torsion N (Iy + Iz) / (A L) · [[1, -1], [-1, 1]].

How the matrices are built: each is linear in a few coefficients per member, so a (..., n, m)
coefficient array times a constant (m, 144) basis (the matrices above with one coefficient set
to 1) gives every member of every model in one product. Rotation into global axes uses the
structure of these matrices (see :func:`global_blocks`).
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]
IntArray = npt.NDArray[np.intp]

# Positions of the bending DOFs inside the 12-vector.
_XY = np.array([1, 5, 7, 11])  # v1, θz1, v2, θz2
_XZ = np.array([2, 4, 8, 10])  # w1, θy1, w2, θy2
_AX = np.array([0, 6])  # u1, u2
_TO = np.array([3, 9])  # θx1, θx2
_XZ_SIGN = np.array([1.0, -1.0, 1.0, -1.0])
_PAIR = np.array([[1.0, -1.0], [-1.0, 1.0]])


def _frozen(a: npt.ArrayLike) -> FloatArray:
    """A read-only float constant."""
    out = np.array(a, dtype=np.float64)
    out.flags.writeable = False
    return out


def _index(a: npt.ArrayLike) -> IntArray:
    """A read-only index constant."""
    out = np.array(a, dtype=np.intp)
    out.flags.writeable = False
    return out


def _basis(blocks: list[list[tuple[npt.NDArray[np.intp], FloatArray]]]) -> FloatArray:
    """(m, 144) basis: row c is the 12x12 matrix of coefficient c, its (idx, block) pairs."""
    out = np.zeros((len(blocks), 12, 12))
    for c, parts in enumerate(blocks):
        for idx, block in parts:
            out[c][np.ix_(idx, idx)] += block
    return _frozen(out.reshape(len(blocks), 144))


def _bending(entries: list[list[float]]) -> FloatArray:
    return np.array(entries, dtype=np.float64)


_FLIP = np.outer(_XZ_SIGN, _XZ_SIGN)
# The x-y bending block over (v1, θz1, v2, θz2) is c·(12 P + 6L Q + L² (R4 + Φ R1)) with
# c = E Iz / ((1 + Φ) L³); as coefficients c, c L, c L², c Φ L² of these unit patterns:
_B12 = _bending([[12, 0, -12, 0], [0, 0, 0, 0], [-12, 0, 12, 0], [0, 0, 0, 0]])
_B6 = _bending([[0, 6, 0, 6], [6, 0, -6, 0], [0, -6, 0, -6], [6, 0, -6, 0]])
_B42 = _bending([[0, 0, 0, 0], [0, 4, 0, 2], [0, 0, 0, 0], [0, 2, 0, 4]])
_BPHI = _bending([[0, 0, 0, 0], [0, 1, 0, -1], [0, 0, 0, 0], [0, -1, 0, 1]])

#: Basis of :func:`local_stiffness` over the coefficients of :func:`stiffness_coefficients`:
#: axial, torsion, then each bending pattern for the x-y and the x-z plane.
STIFFNESS_BASIS = _basis(
    [[(_AX, _PAIR)], [(_TO, _PAIR)]]
    + [[(idx, b * sign)] for b in (_B6, _B12, _B42, _BPHI)
       for idx, sign in ((_XY, 1.0), (_XZ, _FLIP))]
)

# The geometric x-y block is N/L·(6/5 P) + N·(1/10 Q) + N L·(2/15, -1/30 pattern):
_G65 = _B12 / 10.0  # 6/5 = 12/10
_G10 = _B6 / 60.0  # 1/10 = 6/60
_G15 = _bending([[0, 0, 0, 0], [0, 2 / 15, 0, -1 / 30], [0, 0, 0, 0], [0, -1 / 30, 0, 2 / 15]])

#: Basis of :func:`local_geometric_stiffness` over N/L, N, N L and N (Iy + Iz) / (A L).
GEOMETRIC_BASIS = _basis(
    [[(_XY, b), (_XZ, b * _FLIP)] for b in (_G65, _G10, _G15)] + [[(_TO, _PAIR)]]
)


def stiffness_coefficients(
    E: FloatArray,
    G: FloatArray,
    A: FloatArray,
    Iy: FloatArray,
    Iz: FloatArray,
    J: FloatArray,
    Asy: FloatArray,
    Asz: FloatArray,
    L: FloatArray,
) -> FloatArray:
    """(..., 10) coefficients of :data:`STIFFNESS_BASIS`.

    E A / L, G J / L, then with c = E I / ((1 + Φ) L³), Φ = 12 E I / (G As L²) for the x-y
    plane (E Iz, Asy) and the x-z plane (E Iy, Asz): c L (y, z), c (y, z), c L² (y, z),
    c Φ L² (y, z). Units follow the arguments of :func:`local_stiffness`.
    """
    L2 = L * L
    EIy, EIz = E * Iy, E * Iz
    phi_y = 12.0 * EIz / (G * Asy * L2)  # Φ of the x-y plane (bending about z)
    phi_z = 12.0 * EIy / (G * Asz * L2)
    cL2_y = EIz / ((1.0 + phi_y) * L)  # c L² = E I / ((1 + Φ) L)
    cL2_z = EIy / ((1.0 + phi_z) * L)
    columns: tuple[FloatArray, ...] = (
        E * A / L, G * J / L, cL2_y / L, cL2_z / L, cL2_y / L2, cL2_z / L2, cL2_y, cL2_z,
        cL2_y * phi_y, cL2_z * phi_z)
    if any(c.shape != L2.shape for c in columns):
        columns = tuple(np.broadcast_arrays(*columns))
    coef = np.array(columns)  # (10, ...)
    return coef.transpose(*range(1, coef.ndim), 0)


def local_stiffness(
    E: FloatArray,
    G: FloatArray,
    A: FloatArray,
    Iy: FloatArray,
    Iz: FloatArray,
    J: FloatArray,
    Asy: FloatArray,
    Asz: FloatArray,
    L: FloatArray,
) -> FloatArray:
    """Timoshenko beam stiffness in local axes, shape (..., 12, 12).

    Parameters
    ----------
    E, G : Young's modulus along the axis and shear modulus [MPa]
    A : area [mm²]
    Iy, Iz : second moments about local y and z [mm⁴]
    J : torsion constant [mm⁴]
    Asy, Asz : shear areas κA for shear along local y and z [mm²]; ``inf`` turns shear
        deformation off (Euler–Bernoulli)
    L : length [mm]
    """
    coef = stiffness_coefficients(E, G, A, Iy, Iz, J, Asy, Asz, L)
    return (coef @ STIFFNESS_BASIS).reshape(*coef.shape[:-1], 12, 12)


def local_geometric_stiffness(
    N: FloatArray, A: FloatArray, Iy: FloatArray, Iz: FloatArray, L: FloatArray
) -> FloatArray:
    """Geometric stiffness of members under axial force ``N`` [N, tension +], (..., 12, 12).

    ``A`` [mm²], ``Iy``, ``Iz`` [mm⁴], ``L`` [mm] as in :func:`local_stiffness`.
    """
    N, A, Iy, Iz, L = np.broadcast_arrays(N, A, Iy, Iz, L)
    coef = np.stack([N / L, N, N * L, N * (Iy + Iz) / (A * L)], axis=-1)
    return (coef @ GEOMETRIC_BASIS).reshape(*coef.shape[:-1], 12, 12)


# cross(a, b)_i = ε_ijk a_j b_k as (a ⊗ b) flattened times this (9, 3) Levi-Civita table
_LEVI_CIVITA = _frozen(
    [[0, 0, 0], [0, 0, 1], [0, -1, 0], [0, 0, -1], [0, 0, 0], [1, 0, 0], [0, 1, 0],
     [-1, 0, 0], [0, 0, 0]]
)


def member_axes(
    xyz_1: FloatArray, xyz_2: FloatArray, ref: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Rotation matrices and lengths of members.

    Parameters
    ----------
    xyz_1, xyz_2 : end coordinates [mm], shape (..., n, 3)
    ref : reference vectors, shape (..., n, 3); local z is the part of ``ref`` normal to x

    Returns
    -------
    R : (..., n, 3, 3), rows are the local x, y, z axes in global coordinates
    L : (..., n) lengths [mm]
    """
    d = xyz_2 - xyz_1
    L = np.sqrt(np.einsum("...i,...i->...", d, d))
    shape = d.shape if ref.shape == d.shape else np.broadcast_shapes(d.shape, ref.shape)
    R = np.empty((*shape[:-1], 3, 3))
    ex, ey, ez = R[..., 0, :], R[..., 1, :], R[..., 2, :]
    np.divide(d, L[..., None], out=ex)
    # y = z × x is ref × x normalised (ref = a x + b z with b > 0), then z = x × y
    _cross(ref, ex, out=ey)
    ey /= np.sqrt(np.einsum("...i,...i->...", ey, ey))[..., None]
    _cross(ex, ey, out=ez)
    return R, L


def _cross(a: FloatArray, b: FloatArray, out: FloatArray) -> None:
    """a × b over the last axis into ``out``: the outer product times the Levi-Civita table."""
    outer = a[..., :, None] * b[..., None, :]
    np.matmul(outer.reshape(*outer.shape[:-2], 9), _LEVI_CIVITA, out=out)


def block_rotation(R: FloatArray, blocks: int) -> FloatArray:
    """Block-diagonal rotation (..., 3b, 3b) with ``blocks`` copies of R (..., 3, 3)."""
    T = np.zeros((*R.shape[:-2], 3 * blocks, 3 * blocks))
    for b in range(blocks):
        T[..., 3 * b : 3 * b + 3, 3 * b : 3 * b + 3] = R
    return T


def to_global(k_local: FloatArray, R: FloatArray) -> FloatArray:
    """Tᵀ k T for (..., 12, 12) local matrices and (..., 3, 3) member rotations."""
    T = block_rotation(R, 4)
    return np.swapaxes(T, -1, -2) @ k_local @ T


# --- global matrices block by block ---------------------------------------------------------
# The five (a, b) local-axis pairs that a 3x3 block of a member matrix can hold: x x (axial,
# torsion), y y, z z, y z, z y (bending); x y, y x, x z, z x are always zero.
_PAIRS = np.array([[0, 0], [1, 1], [2, 2], [1, 2], [2, 1]])
_I3 = np.arange(3)
# R.reshape(9) indices: O[p, 3i + j] = R[a_p, i] · R[b_p, j]
_OUTER_A = _index(3 * _PAIRS[:, 0, None] + np.repeat(_I3, 3)[None, :])
_OUTER_B = _index(3 * _PAIRS[:, 1, None] + np.tile(_I3, 3)[None, :])
_BLOCK = np.arange(16)
# k.reshape(144) indices: M[IJ, p] = k[3 I + a_p, 3 J + b_p], I = IJ // 4, J = IJ % 4
_BLOCK_ENTRIES = _index(12 * (3 * (_BLOCK[:, None] // 4) + _PAIRS[None, :, 0])
                        + 3 * (_BLOCK[:, None] % 4) + _PAIRS[None, :, 1])
_ENTRY = np.arange(144)
#: Local DOF (0-11) of the row and column of each of the 144 entries of :func:`global_blocks`.
BLOCK_ROWS = _index(3 * (_ENTRY // 9 // 4) + _ENTRY % 9 // 3)
BLOCK_COLS = _index(3 * (_ENTRY // 9 % 4) + _ENTRY % 3)


def global_blocks(k_local: FloatArray, R: FloatArray) -> FloatArray:
    """Tᵀ k T of member matrices, block by block: (..., 12, 12), (..., 3, 3) -> (..., 16, 9).

    With T = diag(R, R, R, R) the 3x3 block (I, J) of the global matrix is
    Rᵀ k_IJ R = Σ_ab k_IJ[a, b] e_a e_bᵀ, e_a the local axes (rows of R). In a frame member's
    stiffness, geometric stiffness and their condensed forms, axial and torsion terms only
    couple x with x and bending only y and z with y and z, so k_IJ[a, b] is zero for the
    pairs (x, y), (y, x), (x, z), (z, x) and the sum has five terms: per member, a
    (16 blocks × 5 pairs) by (5 pairs × 9) product instead of two 12x12 products.

    Returns ``out[..., 4 I + J, 3 i + j]``, the global entry at local DOFs
    (3 I + i, 3 J + j), i.e. rows :data:`BLOCK_ROWS` and columns :data:`BLOCK_COLS`.
    """
    Rf = R.reshape(*R.shape[:-2], 9)
    outer = Rf.take(_OUTER_A, axis=-1)
    outer *= Rf.take(_OUTER_B, axis=-1)
    pairs = k_local.reshape(*k_local.shape[:-2], 144).take(_BLOCK_ENTRIES, axis=-1)
    out: FloatArray = pairs @ outer
    return out


# --- static condensation ----------------------------------------------------------------------
_EYE12 = _frozen(np.eye(12))
# Which of the four independent blocks each member DOF belongs to: axial, bending x-y,
# bending x-z, torsion (u, v, w, θx, θy, θz at each end).
_BLOCK_OF = np.array([0, 1, 2, 3, 2, 1, 0, 1, 2, 3, 2, 1])
# _EARLIER[i, j]: DOF i comes before DOF j in the same block
_EARLIER = (_BLOCK_OF[:, None] == _BLOCK_OF[None, :]) & np.less.outer(np.arange(12),
                                                                      np.arange(12))
_EARLIER.flags.writeable = False


def elimination_rounds(released: BoolArray) -> tuple[BoolArray, BoolArray]:
    """Released DOFs (m, 12) split into two rounds: each block's first released DOF, then its
    second. A sound pattern releases at most two DOFs of a block (a third, or both ends of
    the axial or torsion block, leaves a rigid-body motion; see ``model._release_sets``)."""
    first = released > (released @ _EARLIER)  # released, and none earlier in its block
    return first, released ^ first


def _eliminate(
    k: FloatArray, released: BoolArray, maps: bool
) -> tuple[FloatArray, FloatArray | None]:
    """The elimination rounds of :func:`condensation` (and the maps S of each, if ``maps``)."""
    S: FloatArray | None = None
    for eliminate in elimination_rounds(released):
        if not np.count_nonzero(eliminate):
            continue
        w = np.divide(1.0, k.diagonal(axis1=-2, axis2=-1), out=np.zeros(k.shape[:-1]),
                      where=eliminate)
        Wk = w[..., :, None] * k
        k = k - k @ Wk
        if maps:
            S = _EYE12 - Wk if S is None else S @ (_EYE12 - Wk)
    return k, S


def condensation(k: FloatArray, released: BoolArray) -> FloatArray:
    """Condense released DOFs out of member matrices k (..., m, 12, 12), released (m, 12).

    The released end forces are zero, so u_r = -K_rr⁻¹ K_rk u_k, and the condensed matrix is
    the Schur complement k - k[:, r] K_rr⁻¹ k[r, :]. It is reached by Gaussian elimination
    one released DOF j at a time, k ← k - k[:, j] k[j, :] / k[j, j], which maps
    u = S_j u' with S_j = I - e_j k[j, :] / k[j, j] (u_j from the others, the column of j
    zero) and k ← S_jᵀ k S_j = k S_j. The four blocks (axial, torsion, two bending planes)
    never couple, so one DOF of every block is eliminated at once, W = diag(w_j = 1/k_jj)
    over them: k ← k - k W k. Two such rounds eliminate every sound pattern (see
    :func:`elimination_rounds`); the pivots k_jj are positive since each released block is
    regular (checked when the model is made).

    Returns the condensed matrices (..., m, 12, 12), with exact zeros in the released rows
    and columns.
    """
    k_condensed, _ = _eliminate(k, released, maps=False)
    kept = ~released
    return k_condensed * (kept[:, :, None] & kept[:, None, :])


def condensation_maps(k: FloatArray, released: BoolArray) -> FloatArray:
    """Maps S (..., m, 12, 12) with u = S u_kept of :func:`condensation` (S = S_1 S_2 over
    its rounds), so that Sᵀ k S is the condensed matrix; used for the geometric stiffness."""
    _, S = _eliminate(k, released, maps=True)
    return np.broadcast_to(_EYE12, k.shape).copy() if S is None else S

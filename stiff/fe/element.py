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
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]

# Positions of the bending DOFs inside the 12-vector.
_XY = np.array([1, 5, 7, 11])  # v1, θz1, v2, θz2
_XZ = np.array([2, 4, 8, 10])  # w1, θy1, w2, θy2
_AX = np.array([0, 6])  # u1, u2
_TO = np.array([3, 9])  # θx1, θx2
_XZ_SIGN = np.array([1.0, -1.0, 1.0, -1.0])


def _bending_block(EI: FloatArray, L: FloatArray, phi: FloatArray) -> FloatArray:
    """The 4x4 x-y bending block of the Timoshenko beam, shape (..., 4, 4)."""
    L2 = L * L
    c = EI / ((1.0 + phi) * L2 * L)
    one = np.ones_like(L)
    rows = [
        [12.0 * one, 6.0 * L, -12.0 * one, 6.0 * L],
        [6.0 * L, (4.0 + phi) * L2, -6.0 * L, (2.0 - phi) * L2],
        [-12.0 * one, -6.0 * L, 12.0 * one, -6.0 * L],
        [6.0 * L, (2.0 - phi) * L2, -6.0 * L, (4.0 + phi) * L2],
    ]
    return c[..., None, None] * np.stack([np.stack(r, axis=-1) for r in rows], axis=-2)


def _place(k: FloatArray, idx: npt.NDArray[np.intp], block: FloatArray) -> None:
    """Add a square block into the (..., 12, 12) array ``k`` at rows and columns ``idx``."""
    k[..., idx[:, None], idx[None, :]] += block


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
    E, G, A, Iy, Iz, J, Asy, Asz, L = np.broadcast_arrays(E, G, A, Iy, Iz, J, Asy, Asz, L)
    phi_y = 12.0 * E * Iz / (G * Asy * L * L)
    phi_z = 12.0 * E * Iy / (G * Asz * L * L)
    k = np.zeros((*L.shape, 12, 12))
    axial = (E * A / L)[..., None, None] * np.array([[1.0, -1.0], [-1.0, 1.0]])
    torsion = (G * J / L)[..., None, None] * np.array([[1.0, -1.0], [-1.0, 1.0]])
    _place(k, _AX, axial)
    _place(k, _TO, torsion)
    _place(k, _XY, _bending_block(E * Iz, L, phi_y))
    _place(k, _XZ, _bending_block(E * Iy, L, phi_z) * np.outer(_XZ_SIGN, _XZ_SIGN))
    return k


def local_geometric_stiffness(
    N: FloatArray, A: FloatArray, Iy: FloatArray, Iz: FloatArray, L: FloatArray
) -> FloatArray:
    """Geometric stiffness of members under axial force ``N`` [N, tension +], (..., 12, 12)."""
    N, A, Iy, Iz, L = np.broadcast_arrays(N, A, Iy, Iz, L)
    L2 = L * L
    one = np.ones_like(L)
    rows = [
        [1.2 * one, 0.1 * L, -1.2 * one, 0.1 * L],
        [0.1 * L, 2.0 * L2 / 15.0, -0.1 * L, -L2 / 30.0],
        [-1.2 * one, -0.1 * L, 1.2 * one, -0.1 * L],
        [0.1 * L, -L2 / 30.0, -0.1 * L, 2.0 * L2 / 15.0],
    ]
    bend = (N / L)[..., None, None] * np.stack([np.stack(r, axis=-1) for r in rows], axis=-2)
    kg = np.zeros((*L.shape, 12, 12))
    _place(kg, _XY, bend)
    _place(kg, _XZ, bend * np.outer(_XZ_SIGN, _XZ_SIGN))
    twist = (N * (Iy + Iz) / (A * L))[..., None, None] * np.array([[1.0, -1.0], [-1.0, 1.0]])
    _place(kg, _TO, twist)
    return kg


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
    L = np.linalg.norm(d, axis=-1)
    ex = d / L[..., None]
    ref = np.broadcast_to(ref, ex.shape)
    ez = ref - np.sum(ref * ex, axis=-1, keepdims=True) * ex
    ez = ez / np.linalg.norm(ez, axis=-1, keepdims=True)
    ey = np.cross(ez, ex)
    return np.stack([ex, ey, ez], axis=-2), L


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


def condensation_map(k: FloatArray, released: BoolArray) -> FloatArray:
    """Map S (..., 12, 12) with u = S u_kept for the released DOFs of one release pattern.

    Static condensation: the released end forces are zero, so
    u_r = -K_rr⁻¹ K_rk u_k. S is the identity on kept DOFs, that relation on released ones and
    zero in the released columns, so that Sᵀ k S is the condensed matrix, expanded to 12x12 with
    zero rows and columns at the releases.
    """
    r = np.flatnonzero(released)
    kept = np.flatnonzero(~released)
    S = np.zeros(k.shape)
    S[..., kept, kept] = 1.0
    if r.size:
        k_rr = k[..., r[:, None], r[None, :]]
        k_rk = k[..., r[:, None], kept[None, :]]
        S[..., r[:, None], kept[None, :]] = -np.linalg.solve(k_rr, k_rk)
    return S


def condense(
    k: FloatArray, releases: BoolArray
) -> tuple[FloatArray, FloatArray]:
    """Condense member end releases out of local stiffness matrices.

    Parameters
    ----------
    k : (..., n, 12, 12) local stiffness matrices
    releases : (n, 12) True where the member end does not carry that force component

    Returns
    -------
    k_condensed : (..., n, 12, 12) Sᵀ k S, zero at released DOFs
    S : (..., n, 12, 12) the condensation maps, also used for the geometric stiffness
    """
    if not releases.any():
        return k, np.broadcast_to(np.eye(12), k.shape)
    S = np.broadcast_to(np.eye(12), k.shape).copy()
    k_condensed = k.copy()
    patterns, which = np.unique(releases, axis=0, return_inverse=True)
    for p, pattern in enumerate(patterns):
        if not pattern.any():
            continue
        members = np.flatnonzero(which.reshape(-1) == p)
        S_p = condensation_map(k[..., members, :, :], pattern)
        S[..., members, :, :] = S_p
        k_condensed[..., members, :, :] = np.swapaxes(S_p, -1, -2) @ k[..., members, :, :] @ S_p
    return k_condensed, S

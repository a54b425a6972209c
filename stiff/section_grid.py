"""Cross-section stiffness of a composite section: finite volumes on a grid, or linear triangles.

The section lies in the y-z plane; each cell has its own modulus E (along the member) and shear
modulus G. Bonded regions, no slip. With unit twist θ' = 1, the Prandtl stress function φ solves

    -∇·((1/G) ∇φ) = 2,    φ = 0 on the outer boundary,    GJ = 2 ∫ φ dA,

which holds for bonded composite sections with a simply connected outline (Saint-Venant
torsion; e.g. Lekhnitskii, *Theory of Elasticity of an Anisotropic Body*, for inhomogeneous
sections). For a unit shear force V_y, with ν = 0 (so that the answer is the energy-consistent
shear stiffness, the same definition as Cowper's at ν = 0), the shear stress τ = G ∇ω solves

    -∇·(G ∇ω) = E (y - y_c) / EI_z,    G ∂ω/∂n = 0 on the boundary,

and the shear stiffness follows from the shear strain energy: 1/(κGA)_y = ∫ G |∇ω|² dA; the same
for V_z. Fluxes between cells use the series (harmonic) conductance of the two half cells, so a
material interface on a cell face is represented exactly. Error falls with the square of the cell
size on grids whose lines follow the region boundaries (rectangles); on a staircase outline
(round sections) it falls with the cell size.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import scipy.sparse as sp
import scipy.sparse.linalg as spla

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True)
class GridStiffness:
    """Stiffness of a section computed on a grid (about its modulus-weighted centroid).

    EA [N], EIy and EIz [N·mm²] (bending about y and z), GJ [N·mm²], GAsy and GAsz [N]
    (shear force along y and z), and the centroid (yc, zc) [mm] in the grid's coordinates.
    """

    EA: float
    EIy: float
    EIz: float
    GJ: float
    GAsy: float
    GAsz: float
    yc: float
    zc: float


def _operator(
    dy: FloatArray,
    dz: FloatArray,
    coeff_y: FloatArray,
    coeff_z: FloatArray,
    index: npt.NDArray[np.int64],
    dirichlet: bool,
) -> sp.csr_matrix:
    """Five-point finite-volume matrix of -∂y(c_y ∂y u) - ∂z(c_z ∂z u) over cells ``index >= 0``.

    ``dirichlet``: u = 0 on the faces of the outline (else no flux through them).
    """
    m = int(index.max()) + 1
    rows: list[npt.NDArray[np.int64]] = []
    cols: list[npt.NDArray[np.int64]] = []
    vals: list[FloatArray] = []
    diag = np.zeros(m)
    half_y = dy[:, None] / 2.0 / np.where(coeff_y > 0, coeff_y, 1.0)
    half_z = dz[None, :] / 2.0 / np.where(coeff_z > 0, coeff_z, 1.0)
    inside = index >= 0
    # faces normal to y (between rows i and i+1) and normal to z (columns j and j+1)
    for axis, half, length in (
        (0, half_y, np.broadcast_to(dz[None, :], index.shape)),
        (1, half_z, np.broadcast_to(dy[:, None], index.shape)),
    ):
        lo = (slice(None, -1), slice(None)) if axis == 0 else (slice(None), slice(None, -1))
        hi = (slice(1, None), slice(None)) if axis == 0 else (slice(None), slice(1, None))
        both = inside[lo] & inside[hi]
        c = length[lo][both] / (half[lo][both] + half[hi][both])
        a, b = index[lo][both], index[hi][both]
        rows += [a, b]
        cols += [b, a]
        vals += [-c, -c]
        np.add.at(diag, a, c)
        np.add.at(diag, b, c)
        if dirichlet:
            # a face of an inside cell on the outline: the neighbour is outside, or none
            pad = np.pad(inside, 1, constant_values=False)
            shifted = (
                (pad[:-2, 1:-1], pad[2:, 1:-1]) if axis == 0 else (pad[1:-1, :-2], pad[1:-1, 2:])
            )
            for neighbour in shifted:
                edge = inside & ~neighbour
                np.add.at(diag, index[edge], length[edge] / half[edge])
    rows.append(np.arange(m))
    cols.append(np.arange(m))
    vals.append(diag)
    return sp.csr_matrix(
        (np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(m, m)
    )


def _neumann_energy(K: sp.csr_matrix | sp.csc_matrix, rhs: FloatArray) -> float:
    """ωᵀKω for K ω = rhs with ω pinned at cell 0 (K singular with constants, Σ rhs = 0)."""
    sub = K[1:, 1:].tocsc()
    omega = spla.spsolve(sub, rhs[1:])
    return float(np.dot(omega, rhs[1:]))


def grid_stiffness(
    y_edges: FloatArray, z_edges: FloatArray, E: FloatArray, G_xy: FloatArray, G_xz: FloatArray
) -> GridStiffness:
    """Stiffness of the section whose cell (i, j) spans y_edges[i:i+2] x z_edges[j:j+2].

    Parameters
    ----------
    y_edges, z_edges
        Increasing cell edges [mm].
    E
        Modulus along the member of each cell, shape (ny, nz) [MPa]; a cell with E = 0 is
        outside the section. The inside cells must be connected and fill their outline.
    G_xy, G_xz
        Shear moduli of each cell for the shear stresses τ_xy and τ_xz [MPa], same shape, > 0
        inside (an orthotropic cell may have two values).
    """
    dy = np.diff(y_edges)
    dz = np.diff(z_edges)
    yc_cell = (y_edges[:-1] + y_edges[1:]) / 2.0
    zc_cell = (z_edges[:-1] + z_edges[1:]) / 2.0
    area = dy[:, None] * dz[None, :]
    inside = E > 0.0
    index = np.full(E.shape, -1, dtype=np.int64)
    index[inside] = np.arange(int(inside.sum()))
    EA = float(np.sum(E * area))
    yc = float(np.sum(E * area * yc_cell[:, None]) / EA)
    zc = float(np.sum(E * area * zc_cell[None, :]) / EA)
    y = np.broadcast_to(yc_cell[:, None] - yc, E.shape)
    z = np.broadcast_to(zc_cell[None, :] - zc, E.shape)
    EIz = float(np.sum(E * (area * y**2 + dz[None, :] * dy[:, None] ** 3 / 12.0)))
    EIy = float(np.sum(E * (area * z**2 + dy[:, None] * dz[None, :] ** 3 / 12.0)))

    # τ_xy = ∂φ/∂z and τ_xz = -∂φ/∂y: the flux along y meets 1/G_xz, the flux along z 1/G_xy
    inv_xz = np.where(inside, 1.0 / np.where(inside, G_xz, 1.0), 0.0)
    inv_xy = np.where(inside, 1.0 / np.where(inside, G_xy, 1.0), 0.0)
    Kt = _operator(dy, dz, inv_xz, inv_xy, index, True)
    phi = spla.spsolve(Kt.tocsc(), 2.0 * area[inside])
    GJ = float(2.0 * np.dot(phi, area[inside]))

    Ks = _operator(dy, dz, G_xy, G_xz, index, False)
    GAsy = 1.0 / _neumann_energy(Ks, (E * y * area)[inside] / EIz)
    GAsz = 1.0 / _neumann_energy(Ks, (E * z * area)[inside] / EIy)
    return GridStiffness(EA, EIy, EIz, GJ, GAsy, GAsz, yc, zc)


def graded_edges(
    breaks: npt.ArrayLike, cell_mm: float, min_cells: int = 2, refine: int = 1
) -> FloatArray:
    """Cell edges through every break point, each interval cut into equal cells.

    Parameters
    ----------
    breaks
        Break points [mm] (region boundaries); repeated points are dropped.
    cell_mm
        Largest cell size [mm] before refinement.
    min_cells
        Fewest cells in any interval before refinement.
    refine
        Every interval gets ``refine`` times as many cells (for Richardson extrapolation, the
        refined grid nests the coarse one).
    """
    b = np.unique(np.asarray(breaks, np.float64))
    counts = np.maximum(min_cells, np.ceil(np.diff(b) / cell_mm - 1e-9).astype(np.int64)) * refine
    pieces = [b[:1]] + [
        np.linspace(lo, hi, n + 1)[1:] for lo, hi, n in zip(b[:-1], b[1:], counts, strict=True)
    ]
    return np.concatenate(pieces)


def mesh_stiffness(
    points: FloatArray,
    triangles: npt.NDArray[np.int64],
    E: FloatArray,
    G_xy: FloatArray,
    G_xz: FloatArray,
) -> GridStiffness:
    """Stiffness of a section meshed with linear triangles (finite elements), same problems.

    Parameters
    ----------
    points
        Node coordinates (n, 2) as (y, z) [mm]; the outline is the mesh's boundary, which must
        be convex (a Delaunay mesh of points on and inside a circle).
    triangles
        Node indices (m, 3), any orientation.
    E, G_xy, G_xz
        Modulus along the member and shear moduli for τ_xy and τ_xz of each triangle [MPa].

    Notes
    -----
    Same equations as :func:`grid_stiffness`, weak form with linear elements: EA and EI are
    exact for the polygon, GJ and κGA converge with the square of the element size.
    """
    xy = points[triangles]  # (m, 3, 2)
    y, z = xy[..., 0], xy[..., 1]
    # gradients of the three shape functions: b = dN/dy, c = dN/dz
    b = np.stack([z[:, 1] - z[:, 2], z[:, 2] - z[:, 0], z[:, 0] - z[:, 1]], axis=1)
    c = np.stack([y[:, 2] - y[:, 1], y[:, 0] - y[:, 2], y[:, 1] - y[:, 0]], axis=1)
    twice = (y[:, 1] - y[:, 0]) * (z[:, 2] - z[:, 0]) - (y[:, 2] - y[:, 0]) * (z[:, 1] - z[:, 0])
    area = np.abs(twice) / 2.0
    b, c = b / twice[:, None], c / twice[:, None]
    EA = float(np.sum(E * area))
    # ∫ y dA and ∫ y² dA over a triangle, exact for linear y
    ym, zm = y.mean(axis=1), z.mean(axis=1)
    yc, zc = float(np.sum(E * area * ym) / EA), float(np.sum(E * area * zm) / EA)
    yl, zl = y - yc, z - zc

    def second(u: FloatArray, v: FloatArray) -> FloatArray:
        """∫ u v dA over each triangle for u, v linear (nodal values)."""
        return np.asarray(area / 12.0 * (u.sum(1) * v.sum(1) + (u * v).sum(1)), np.float64)

    EIz = float(np.sum(E * second(yl, yl)))
    EIy = float(np.sum(E * second(zl, zl)))
    n = points.shape[0]
    rows = np.repeat(triangles, 3, axis=1).ravel()
    cols = np.tile(triangles, (1, 3)).ravel()

    def stiffness(k_y: FloatArray, k_z: FloatArray) -> sp.csr_matrix:
        local = area[:, None, None] * (
            k_y[:, None, None] * b[:, :, None] * b[:, None, :]
            + k_z[:, None, None] * c[:, :, None] * c[:, None, :]
        )
        return sp.csr_matrix((local.ravel(), (rows, cols)), shape=(n, n))

    def load(weight: FloatArray) -> FloatArray:
        """Consistent nodal load of a field linear in each triangle with nodal values ``weight``."""
        per_node = area[:, None] / 12.0 * (weight.sum(1)[:, None] + weight)
        out = np.zeros(n)
        np.add.at(out, triangles, per_node)
        return np.asarray(out, np.float64)

    # torsion: flux along y meets 1/G_xz, along z 1/G_xy; φ = 0 on the boundary nodes
    Kt = stiffness(1.0 / G_xz, 1.0 / G_xy).tocsc()
    edges = np.sort(
        np.concatenate([triangles[:, [0, 1]], triangles[:, [1, 2]], triangles[:, [2, 0]]]), axis=1
    )
    unique, counts = np.unique(edges, axis=0, return_counts=True)
    boundary = np.unique(unique[counts == 1])
    free = np.setdiff1d(np.arange(n), boundary)
    f_t = load(np.full(y.shape, 2.0))
    phi = spla.spsolve(Kt[free][:, free], f_t[free])
    GJ = float(np.dot(phi, f_t[free]))

    Ks = stiffness(G_xy, G_xz).tocsc()
    GAsy = 1.0 / _neumann_energy(Ks, load(E[:, None] * yl / EIz))
    GAsz = 1.0 / _neumann_energy(Ks, load(E[:, None] * zl / EIy))
    return GridStiffness(EA, EIy, EIz, GJ, GAsy, GAsz, yc, zc)

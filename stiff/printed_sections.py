"""Printed sections: a solid shell of walls and skins around an infill core.

Axes and the transformed :class:`~stiff.sections.BeamSection` are as in :mod:`stiff.sections`.
The sections (:func:`printed_rectangle`, :func:`printed_round`) are a solid shell around an
infill core (REFERENCES.md §7). Which faces carry walls and which skins depends on the build
direction (see :mod:`stiff.printing`):

* ``flat`` (layers in the linkage plane): walls, ``walls x line_width``, on the faces normal to y
  (the edges of the link's outline, running along the member), the full width through; skins,
  ``skins x layer_height``, on the faces normal to z (bed side and top) between the walls.
* ``on_edge`` (layers on edge, containing the member): walls on the faces normal to z, skins on
  the faces normal to y.
* ``upright`` (layers across the member): the walls form a ring all round the section; the skins
  lie at the part's ends, not in the section.

Moduli along the member: walls and skins E_xy (the walls' lines run along the member; a solid
layer's modulus in its own plane is taken as E_xy), core E_xy x f(ρ̄) by the in-layer law, in flat
and on-edge builds; walls E_z and core E_z x f(ρ̄) by the along-build law when upright. Shear
moduli: a shear stress on the layer plane meets the interlayer shear modulus, one in a layer the
in-layer one. Stiffness of the composite is computed by :mod:`stiff.section_grid`.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Literal, overload

import numpy as np
import numpy.typing as npt
from scipy.spatial import Delaunay

from stiff.infill import law
from stiff.materials import PrintedMaterial
from stiff.printing import (
    BuildDirection,
    InfillPattern,
    RegionName,
    SectionError,
    check_build_direction,
    check_pattern,
)
from stiff.section_grid import graded_edges, grid_stiffness, mesh_stiffness
from stiff.sections import BeamSection, positive

FloatArray = npt.NDArray[np.float64]
Shape = Literal["rectangle", "round"]


@dataclass(frozen=True)
class PrintSettings:
    """How a part is printed. Defaults are common slicer settings for a 0.4 mm nozzle (practice).

    Parameters
    ----------
    walls
        Number of perimeter walls.
    line_width_mm
        Width of one extruded line [mm].
    skins
        Number of solid top and bottom layers.
    layer_height_mm
        Layer height [mm].
    infill
        Infill fraction ρ̄, in (0, 1]; 1 is solid.
    pattern
        Infill pattern (:data:`stiff.printing.InfillPattern`).
    build
        Build direction relative to the member (:data:`stiff.printing.BuildDirection`).
    """

    walls: int = 3
    line_width_mm: float = 0.45
    skins: int = 4
    layer_height_mm: float = 0.2
    infill: float = 0.2
    pattern: InfillPattern = "grid_45"
    build: BuildDirection = "flat"

    def checked(self) -> PrintSettings:
        """Itself, once every setting is in range; else :class:`SectionError`."""
        for name in ("walls", "skins"):
            count = getattr(self, name)
            if isinstance(count, bool) or not isinstance(count, int) or count < 0:
                raise SectionError(name, f"must be a whole number >= 0, got {count!r}")
        positive("line_width_mm", self.line_width_mm)
        positive("layer_height_mm", self.layer_height_mm)
        if not (math.isfinite(self.infill) and 0.0 < self.infill <= 1.0):
            raise SectionError(
                "infill",
                f"infill fraction must be in (0, 1], got {self.infill!r} "
                "(use e.g. 0.01 for a nearly hollow part)",
            )
        check_pattern(self.pattern)
        check_build_direction(self.build)
        return self

    @property
    def wall_mm(self) -> float:
        """Total wall thickness, walls x line width [mm]."""
        return self.walls * self.line_width_mm

    @property
    def skin_mm(self) -> float:
        """Total skin thickness, skins x layer height [mm]."""
        return self.skins * self.layer_height_mm


@dataclass(frozen=True, eq=False)
class Region:
    """One region of a printed section (walls, skins, core), for recovering its stresses.

    Parameters
    ----------
    name
        ``wall``, ``skin`` or ``core``.
    E_MPa
        Modulus along the member [MPa] (smeared over the region for the core).
    G_xy_MPa, G_xz_MPa
        Shear moduli for τ_xy and τ_xz [MPa].
    density_t_mm3
        Density [t/mm³] (solid density x ρ̄ for the core).
    area_mm2
        Area [mm²].
    strength_ratio
        Strength of the region over the solid strength in the same direction (σ*/σ_s for the
        core, 1 for walls and skins).
    across_layers
        True when stress along the member crosses the layers (upright build).
    points_yz_mm
        Points of the region, (k, 2) as (y, z) [mm] from the section's centroid, at which a
        linear strain field over the section takes its extremes on the region.
    """

    name: RegionName
    E_MPa: float
    G_xy_MPa: float
    G_xz_MPa: float
    density_t_mm3: float
    area_mm2: float
    strength_ratio: float
    across_layers: bool
    points_yz_mm: FloatArray

    @overload
    def stress_range(self, axial_strain: float, curvature_y_per_mm: float,
                     curvature_z_per_mm: float) -> tuple[float, float]: ...

    @overload
    def stress_range(self, axial_strain: FloatArray, curvature_y_per_mm: FloatArray,
                     curvature_z_per_mm: FloatArray) -> tuple[FloatArray, FloatArray]: ...

    def stress_range(
        self, axial_strain: FloatArray | float, curvature_y_per_mm: FloatArray | float,
        curvature_z_per_mm: FloatArray | float,
    ) -> tuple[float, float] | tuple[FloatArray, FloatArray]:
        """Least and greatest axial stress on the region [MPa], by strain compatibility.

        ε(y, z) = ε₀ + κ_y z - κ_z y (so that σ = N/A - M_z y/I_z + M_y z/I_y in one material);
        σ = E ε. Curvatures [1/mm], strain dimensionless: floats, or arrays that broadcast together
        (then both results are arrays of their broadcast shape, one range per entry).
        """
        y, z = self.points_yz_mm[:, 0], self.points_yz_mm[:, 1]
        e0, ky, kz = (np.asarray(v, np.float64)[..., None]
                      for v in (axial_strain, curvature_y_per_mm, curvature_z_per_mm))
        stress = self.E_MPa * (e0 + ky * z - kz * y)
        low, high = stress.min(axis=-1), stress.max(axis=-1)
        if low.ndim == 0:
            return float(low), float(high)
        return low, high


@dataclass(frozen=True, eq=False)
class PrintedSection:
    """A printed section: its beam properties, its regions, and how it was made.

    ``beam`` is the transformed :class:`BeamSection`; ``outline_area_mm2`` the area inside the
    outline [mm²]; ``width_mm`` (along z) and ``depth_mm`` (along y) [mm] are equal for a round.
    """

    shape: Shape
    width_mm: float
    depth_mm: float
    settings: PrintSettings
    material: PrintedMaterial
    beam: BeamSection
    regions: tuple[Region, ...]
    outline_area_mm2: float

    def region(self, name: RegionName) -> Region | None:
        """The region called ``name``, or ``None`` when the section has none."""
        return next((r for r in self.regions if r.name == name), None)


def _region_moduli(
    material: PrintedMaterial, settings: PrintSettings
) -> dict[RegionName, tuple[float, float, float, float, float]]:
    """(E, G_xy, G_xz, density, strength ratio) by region for the build direction.

    The core's shear moduli: shear in the layer plane follows the pattern's in-layer shear law,
    shear on a plane containing the build axis its along-build law (:mod:`stiff.infill`).
    """
    e_in, g_in, g_across = material.E_xy_MPa, material.G_in_layer_MPa, material.G_across_layers_MPa
    rho, infill = material.density_t_mm3, settings.infill
    in_layer, along_build = law(settings.pattern, "in_layer"), law(settings.pattern, "along_build")
    # the web of a prismatic cell is a stack of layers: its shear on planes containing the build
    # axis meets the interlayer shear modulus
    core_across = float(along_build.shear_modulus(infill, material.E_across_layers_MPa, g_across))
    core_in = float(in_layer.shear_modulus(infill, e_in, g_in))
    if settings.build == "upright":
        rule = along_build
        e_solid, g_xy, g_xz = material.E_across_layers_MPa, g_across, g_across
        core_xy, core_xz = core_across, core_across
    elif settings.build == "flat":
        # the layer is the x-y plane: τ_xy lies in it, τ_xz acts on it
        rule, e_solid, g_xy, g_xz = in_layer, e_in, g_in, g_across
        core_xy, core_xz = core_in, core_across
    else:
        # on edge the layer is the x-z plane
        rule, e_solid, g_xy, g_xz = in_layer, e_in, g_across, g_in
        core_xy, core_xz = core_across, core_in
    f_e = float(rule.modulus_ratio(infill))
    f_s = float(rule.strength_ratio(infill))
    solid = (e_solid, g_xy, g_xz, rho, 1.0)
    return {
        "wall": solid,
        "skin": solid,
        "core": (e_solid * f_e, core_xy, core_xz, rho * infill, f_s),
    }


def _support_points(y: FloatArray, z: FloatArray) -> FloatArray:
    """The points among (y, z) farthest along 72 directions: extremes of any linear field."""
    angles = np.linspace(0.0, 2.0 * np.pi, 72, endpoint=False)
    proj = np.outer(y, np.cos(angles)) + np.outer(z, np.sin(angles))
    pick = np.unique(np.argmax(proj, axis=0))
    return np.column_stack([y[pick], z[pick]])


#: Region codes used in label arrays: index into this tuple.
_LABELS: tuple[RegionName, ...] = ("core", "wall", "skin")


def _build(
    shape: Shape,
    width_mm: float,
    depth_mm: float,
    material: PrintedMaterial,
    settings: PrintSettings,
    moduli: dict[RegionName, tuple[float, float, float, float, float]],
    values: FloatArray,
    pieces: dict[RegionName, tuple[float, FloatArray, FloatArray]],
    outline_area: float,
) -> PrintedSection:
    """The section from its stiffness ``values`` (EA, EIy, EIz, GJ, GAsy, GAsz) and, by region,
    (area [mm²], y and z of points whose hull is the region's)."""
    EA, EIy, EIz, GJ, GAsy, GAsz = (float(v) for v in values)
    regions = []
    mass = 0.0
    for name, (region_area, ys, zs) in pieces.items():
        e, gxy, gxz, rho, f_s = moduli[name]
        mass += rho * region_area
        upright = settings.build == "upright"
        points = _support_points(ys, zs)
        regions.append(Region(name, e, gxy, gxz, rho, region_area, f_s, upright, points))
    e_ref, g_ref = moduli["wall"][0], (moduli["wall"][1] + moduli["wall"][2]) / 2.0
    size = f"{depth_mm:g}x{width_mm:g}" if shape == "rectangle" else f"D{width_mm:g}"
    beam = BeamSection.from_stiffness(
        EA=EA,
        EIy=EIy,
        EIz=EIz,
        GJ=GJ,
        GAsy=GAsy,
        GAsz=GAsz,
        mass_per_length=mass,
        E_ref_MPa=e_ref,
        G_ref_MPa=g_ref,
        label=f"printed {shape} {size} {material.name} {settings.build}",
    )
    return PrintedSection(
        shape, width_mm, depth_mm, settings, material, beam, tuple(regions), outline_area
    )


def _region_table(moduli: dict[RegionName, tuple[float, float, float, float, float]]) -> FloatArray:
    """Rows (E, G_xy, G_xz, density, strength ratio) by region code; the last row is empty."""
    return np.array([moduli[name] for name in _LABELS] + [(0.0, 0.0, 0.0, 0.0, 0.0)])


def printed_rectangle(
    material: PrintedMaterial,
    width_mm: float,
    depth_mm: float,
    settings: PrintSettings,
    cells_across: int = 24,
) -> PrintedSection:
    """A printed rectangular section: shell of walls and skins around an infill core.

    Parameters
    ----------
    material
        The printed polymer.
    width_mm, depth_mm
        Size along z (out of the linkage plane) and along y (in it) [mm].
    settings
        Walls, skins, infill, pattern and build direction.
    cells_across
        Cells across the smaller side on the coarse grid (a second grid has twice as many, and
        the two are extrapolated); 24 gives GJ and κGA within about 1e-4.

    Raises
    ------
    SectionError
        A size or setting out of range.
    """
    b = positive("width_mm", width_mm)
    h = positive("depth_mm", depth_mm)
    settings.checked()
    tw, ts = settings.wall_mm, settings.skin_mm
    if settings.build == "flat":
        ty, tz = tw, ts
    elif settings.build == "on_edge":
        ty, tz = ts, tw
    else:
        ty, tz = tw, tw
    ty, tz = min(ty, h / 2.0), min(tz, b / 2.0)
    y_breaks = [-h / 2.0, -h / 2.0 + ty, h / 2.0 - ty, h / 2.0]
    z_breaks = [-b / 2.0, -b / 2.0 + tz, b / 2.0 - tz, b / 2.0]
    cell = min(b, h) / cells_across
    moduli = _region_moduli(material, settings)
    table = _region_table(moduli)

    def labels_for(ye: FloatArray, ze: FloatArray) -> npt.NDArray[np.int64]:
        y = np.abs((ye[:-1] + ye[1:]) / 2.0)[:, None]
        z = np.abs((ze[:-1] + ze[1:]) / 2.0)[None, :]
        near_y = np.broadcast_to(y > h / 2.0 - ty, (y.size, z.size))
        near_z = np.broadcast_to(z > b / 2.0 - tz, (y.size, z.size))
        if settings.build == "flat":
            wall, skin = near_y, near_z & ~near_y
        elif settings.build == "on_edge":
            wall, skin = near_z, near_y & ~near_z
        else:
            wall, skin = near_y | near_z, np.zeros_like(near_y)
        return np.where(wall, 1, np.where(skin, 2, 0)).astype(np.int64)

    def solve(refine: int) -> tuple[FloatArray, FloatArray, npt.NDArray[np.int64], FloatArray]:
        ye = graded_edges(y_breaks, cell, refine=refine)
        ze = graded_edges(z_breaks, cell, refine=refine)
        labels = labels_for(ye, ze)
        cells = table[labels]
        res = grid_stiffness(ye, ze, cells[..., 0], cells[..., 1], cells[..., 2])
        values = np.array([res.EA, res.EIy, res.EIz, res.GJ, res.GAsy, res.GAsz])
        return ye, ze, labels, values

    ye, ze, labels, coarse = solve(1)
    # the fine grid nests the coarse one: Richardson extrapolation of a second-order error
    values = (4.0 * solve(2)[3] - coarse) / 3.0
    area = np.diff(ye)[:, None] * np.diff(ze)[None, :]
    pieces: dict[RegionName, tuple[float, FloatArray, FloatArray]] = {}
    for code, name in enumerate(_LABELS):
        iy, iz = np.nonzero(labels == code)
        if iy.size:
            # cell corners: a linear field is extreme at a corner of a rectangular cell
            ys = np.concatenate([ye[iy], ye[iy + 1], ye[iy], ye[iy + 1]])
            zs = np.concatenate([ze[iz], ze[iz], ze[iz + 1], ze[iz + 1]])
            pieces[name] = (float(area[iy, iz].sum()), ys, zs)
    return _build("rectangle", b, h, material, settings, moduli, values, pieces, b * h)


def disk_mesh(
    radius_mm: float, size_mm: float, rings_mm: tuple[float, ...] = ()
) -> tuple[FloatArray, npt.NDArray[np.int64]]:
    """Linear triangles filling a circle: nodes on concentric rings, Delaunay-connected.

    Parameters
    ----------
    radius_mm
        Radius [mm].
    size_mm
        Element size [mm].
    rings_mm
        Radii [mm] that must carry a ring of nodes (material interfaces).

    Returns
    -------
    points, triangles
        Node coordinates (n, 2) as (y, z) [mm] and node indices (m, 3).
    """
    breaks = np.unique(np.concatenate([[0.0, radius_mm], np.asarray(rings_mm, np.float64)]))
    breaks = breaks[(breaks >= 0.0) & (breaks <= radius_mm)]
    radii = np.unique(
        np.concatenate(
            [
                np.linspace(lo, hi, max(1, math.ceil((hi - lo) / size_mm - 1e-9)) + 1)
                for lo, hi in itertools.pairwise(breaks)
            ]
        )
    )[1:]
    counts = np.maximum(6, np.ceil(2.0 * np.pi * radii / size_mm - 1e-9)).astype(np.int64)
    ring = np.repeat(np.arange(radii.size), counts)
    position = np.arange(ring.size) - np.repeat(np.cumsum(counts) - counts, counts)
    # every other ring turned by half a step, so that neighbouring rings interlace
    angle = 2.0 * np.pi * (position + 0.5 * (ring % 2)) / counts[ring]
    points = np.vstack(
        [
            np.zeros((1, 2)),
            np.column_stack([radii[ring] * np.cos(angle), radii[ring] * np.sin(angle)]),
        ]
    )
    return points, Delaunay(points).simplices.astype(np.int64)


def printed_round(
    material: PrintedMaterial,
    diameter_mm: float,
    settings: PrintSettings,
    elements_across: int = 60,
) -> PrintedSection:
    """A printed round section (a rod along the member): shell around an infill core.

    Flat and on-edge builds: in each layer the walls follow the outline, so a point is wall when
    it lies within ``walls x line_width`` of the outline across the layer, and skin when within
    ``skins x layer_height`` of it along the build axis. Upright: the walls form a ring.

    Parameters
    ----------
    material
        The printed polymer.
    diameter_mm
        Diameter [mm].
    settings
        Walls, skins, infill, pattern and build direction.
    elements_across
        Elements across the diameter (more when needed for 2 across the walls and skins, at
        most 200). The outline is a polygon with nodes on the circle; each triangle takes the
        region of its centroid. GJ and κGA come within about 0.1 % at 60 (upright, where the
        ring of walls has nodes on its inner circle), EA and EI within about 0.05 %.

    Raises
    ------
    SectionError
        A size or setting out of range.
    """
    D = positive("diameter_mm", diameter_mm)
    settings.checked()
    R = D / 2.0
    tw, ts = min(settings.wall_mm, R), min(settings.skin_mm, R)
    thinnest = min([t for t in (tw, ts) if t > 0.0] + [D])
    across = min(200, max(elements_across, math.ceil(2.0 * D / thinnest)))
    rings = (R - tw,) if settings.build == "upright" and 0.0 < tw < R else ()
    points, triangles = disk_mesh(R, D / across, rings)
    centre = points[triangles].mean(axis=1)
    y, z = centre[:, 0], centre[:, 1]
    half_chord_y = np.sqrt(np.maximum(R**2 - z**2, 0.0))  # outline across y at this z
    half_chord_z = np.sqrt(np.maximum(R**2 - y**2, 0.0))
    if settings.build == "flat":
        wall = np.abs(y) > half_chord_y - tw
        skin = ~wall & (np.abs(z) > half_chord_z - ts)
    elif settings.build == "on_edge":
        wall = np.abs(z) > half_chord_z - tw
        skin = ~wall & (np.abs(y) > half_chord_y - ts)
    else:
        wall = np.hypot(y, z) > R - tw
        skin = np.zeros(wall.shape, dtype=bool)
    labels = np.where(wall, 1, np.where(skin, 2, 0)).astype(np.int64)
    moduli = _region_moduli(material, settings)
    elements = _region_table(moduli)[labels]
    res = mesh_stiffness(points, triangles, elements[:, 0], elements[:, 1], elements[:, 2])
    values = np.array([res.EA, res.EIy, res.EIz, res.GJ, res.GAsy, res.GAsz])
    xy = points[triangles]
    area = 0.5 * np.abs(
        (xy[:, 1, 0] - xy[:, 0, 0]) * (xy[:, 2, 1] - xy[:, 0, 1])
        - (xy[:, 2, 0] - xy[:, 0, 0]) * (xy[:, 1, 1] - xy[:, 0, 1])
    )
    pieces: dict[RegionName, tuple[float, FloatArray, FloatArray]] = {}
    for code, name in enumerate(_LABELS):
        mine = labels == code
        if mine.any():
            nodes = points[np.unique(triangles[mine])]
            pieces[name] = (float(area[mine].sum()), nodes[:, 0], nodes[:, 1])
    return _build("round", D, D, material, settings, moduli, values, pieces, float(area.sum()))

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

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt

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
from stiff.section_grid import graded_edges, grid_stiffness
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

    def stress_range(
        self, axial_strain: float, curvature_y_per_mm: float, curvature_z_per_mm: float
    ) -> tuple[float, float]:
        """Least and greatest axial stress on the region [MPa], by strain compatibility.

        ε(y, z) = ε₀ + κ_y z - κ_z y (so that σ = N/A - M_z y/I_z + M_y z/I_y in one material);
        σ = E ε. Curvatures [1/mm], strain dimensionless.
        """
        y, z = self.points_yz_mm[:, 0], self.points_yz_mm[:, 1]
        stress = self.E_MPa * (axial_strain + curvature_y_per_mm * z - curvature_z_per_mm * y)
        return float(stress.min()), float(stress.max())


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
    """(E, G_xy, G_xz, density, strength ratio) by region for the build direction."""
    g_in, g_across = material.G_in_layer_MPa, material.G_across_layers_MPa
    rho = material.density_t_mm3
    if settings.build == "upright":
        rule = law(settings.pattern, "along_build")
        e_solid, g_xy, g_xz = material.E_across_layers_MPa, g_across, g_across
    else:
        rule = law(settings.pattern, "in_layer")
        e_solid = material.E_xy_MPa
        # flat: the layer is the x-y plane, so τ_xz acts on it; on edge the layer is x-z
        g_xy, g_xz = (g_in, g_across) if settings.build == "flat" else (g_across, g_in)
    f_e = float(rule.modulus_ratio(settings.infill))
    f_s = float(rule.strength_ratio(settings.infill))
    solid = (e_solid, g_xy, g_xz, rho, 1.0)
    return {
        "wall": solid,
        "skin": solid,
        "core": (e_solid * f_e, g_xy * f_e, g_xz * f_e, rho * settings.infill, f_s),
    }


_LABELS: tuple[RegionName, ...] = ("core", "wall", "skin")


def _support_points(y: FloatArray, z: FloatArray) -> FloatArray:
    """The points among (y, z) farthest along 72 directions: extremes of any linear field."""
    angles = np.linspace(0.0, 2.0 * np.pi, 72, endpoint=False)
    proj = np.outer(y, np.cos(angles)) + np.outer(z, np.sin(angles))
    pick = np.unique(np.argmax(proj, axis=0))
    return np.column_stack([y[pick], z[pick]])


def _assemble(
    shape: Shape,
    width_mm: float,
    depth_mm: float,
    material: PrintedMaterial,
    settings: PrintSettings,
    y_edges: FloatArray,
    z_edges: FloatArray,
    labels: npt.NDArray[np.int64],
    outline_area: float,
    fine: tuple[FloatArray, FloatArray, npt.NDArray[np.int64]] | None,
) -> PrintedSection:
    moduli = _region_moduli(material, settings)
    table = np.array([moduli[name] for name in _LABELS] + [(0.0, 0.0, 0.0, 0.0, 0.0)])

    def solve(ye: FloatArray, ze: FloatArray, lab: npt.NDArray[np.int64]) -> FloatArray:
        cell = table[lab]
        res = grid_stiffness(ye, ze, cell[..., 0], cell[..., 1], cell[..., 2])
        return np.array([res.EA, res.EIy, res.EIz, res.GJ, res.GAsy, res.GAsz])

    values = solve(y_edges, z_edges, labels)
    if fine is not None:
        # the fine grid nests the coarse one: Richardson extrapolation of a second-order error
        values = (4.0 * solve(*fine) - values) / 3.0
    EA, EIy, EIz, GJ, GAsy, GAsz = (float(v) for v in values)
    area = np.diff(y_edges)[:, None] * np.diff(z_edges)[None, :]
    yc = (y_edges[:-1] + y_edges[1:]) / 2.0
    zc = (z_edges[:-1] + z_edges[1:]) / 2.0
    regions = []
    mass = 0.0
    for code, name in enumerate(_LABELS):
        mine = labels == code
        if not mine.any():
            continue
        e, gxy, gxz, rho, f_s = moduli[name]
        region_area = float(area[mine].sum())
        mass += rho * region_area
        if shape == "rectangle":
            # cell corners: a linear field is extreme at a corner of a rectangular cell
            iy, iz = np.nonzero(mine)
            ys = np.concatenate([y_edges[iy], y_edges[iy + 1], y_edges[iy], y_edges[iy + 1]])
            zs = np.concatenate([z_edges[iz], z_edges[iz], z_edges[iz + 1], z_edges[iz + 1]])
        else:
            ys = np.broadcast_to(yc[:, None], labels.shape)[mine]
            zs = np.broadcast_to(zc[None, :], labels.shape)[mine]
        regions.append(
            Region(
                name,
                e,
                gxy,
                gxz,
                rho,
                region_area,
                f_s,
                settings.build == "upright",
                _support_points(ys, zs),
            )
        )
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

    ye, ze = graded_edges(y_breaks, cell), graded_edges(z_breaks, cell)
    ye2, ze2 = graded_edges(y_breaks, cell, refine=2), graded_edges(z_breaks, cell, refine=2)
    return _assemble(
        "rectangle",
        b,
        h,
        material,
        settings,
        ye,
        ze,
        labels_for(ye, ze),
        b * h,
        (ye2, ze2, labels_for(ye2, ze2)),
    )


def printed_round(
    material: PrintedMaterial,
    diameter_mm: float,
    settings: PrintSettings,
    cells_across: int = 120,
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
    cells_across
        Cells across the diameter (at least 3 across the wall are used); the outline is stepped,
        so GJ and κGA are within about 0.5 % at 120 (EA and EI within about 0.2 %).

    Raises
    ------
    SectionError
        A size or setting out of range.
    """
    D = positive("diameter_mm", diameter_mm)
    settings.checked()
    R = D / 2.0
    tw, ts = settings.wall_mm, settings.skin_mm
    thinnest = min(t for t in (tw, ts, D) if t > 0.0)
    n = int(min(600, max(cells_across, math.ceil(3.0 * D / thinnest))))
    edges = np.linspace(-R, R, n + 1)
    c = (edges[:-1] + edges[1:]) / 2.0
    y, z = c[:, None], c[None, :]
    inside = y**2 + z**2 < R**2
    half_chord_y = np.sqrt(np.maximum(R**2 - z**2, 0.0))  # outline across y at this z
    half_chord_z = np.sqrt(np.maximum(R**2 - y**2, 0.0))
    if settings.build == "flat":
        wall = np.abs(y) > half_chord_y - tw
        skin = ~wall & (np.abs(z) > half_chord_z - ts)
    elif settings.build == "on_edge":
        wall = np.abs(z) > half_chord_z - tw
        skin = ~wall & (np.abs(y) > half_chord_y - ts)
    else:
        wall = np.broadcast_to(np.hypot(y, z) > R - tw, inside.shape)
        skin = np.zeros(inside.shape, dtype=bool)
    labels = np.where(~inside, 3, np.where(wall, 1, np.where(skin, 2, 0))).astype(np.int64)
    return _assemble("round", D, D, material, settings, edges, edges, labels, math.pi * R**2, None)

"""Section properties of tubes, solid bars and printed parts, as the frame engine consumes them.

Axes: the member runs along local x; local y lies in the linkage plane, local z out of it (along
the pins). ``Iz`` is for bending in the linkage plane (about z), ``Iy`` for bending out of it;
``Asy`` is the shear area for a shear force along y. A rectangle has ``width_mm`` along z (the
plate thickness, out of the linkage plane) and ``depth_mm`` along y (in the plane).

Every section comes out as a :class:`BeamSection`. For one material its fields are the plain
geometric values. For a printed (composite) section they are a *transformed section*: ``E_MPa``
is the solid material's modulus along the member and ``G_MPa`` the mean of its two shear moduli
(τ_xy and τ_xz; the references), and ``A_mm2``,
``Iy_mm4``, ``Iz_mm4``, ``J_mm4``, ``Asy_mm2``, ``Asz_mm2`` are modulus-weighted so that the
products EA, EI, GJ and κGA are right; ``density_t_mm3`` is chosen so that density x A is the mass
per length. Only the products are physical; use the properties ``EA``, ``EIy``, ...

Printed sections (walls and skins around an infill core) are built by
:mod:`stiff.printed_sections`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from stiff.materials import MetalMaterial, TubeMaterial
from stiff.printing import SectionError


@dataclass(frozen=True)
class BeamSection:
    """What a beam element needs: moduli, (transformed) geometry and density.

    Parameters
    ----------
    E_MPa, G_MPa
        (Reference) Young's and shear modulus [MPa].
    A_mm2, Iy_mm4, Iz_mm4, J_mm4
        Area [mm²], second moments about y and z [mm⁴], torsion constant [mm⁴].
    Asy_mm2, Asz_mm2
        Shear areas κA for shear along y and z [mm²].
    density_t_mm3
        Density [t/mm³].
    label
        A short description (``"tube 10x8 CF-pultruded"``).
    """

    E_MPa: float
    G_MPa: float
    A_mm2: float
    Iy_mm4: float
    Iz_mm4: float
    J_mm4: float
    Asy_mm2: float
    Asz_mm2: float
    density_t_mm3: float
    label: str = ""

    @property
    def EA(self) -> float:
        """Axial stiffness [N]."""
        return self.E_MPa * self.A_mm2

    @property
    def EIy(self) -> float:
        """Bending stiffness about y (out of the linkage plane) [N·mm²]."""
        return self.E_MPa * self.Iy_mm4

    @property
    def EIz(self) -> float:
        """Bending stiffness about z (in the linkage plane) [N·mm²]."""
        return self.E_MPa * self.Iz_mm4

    @property
    def GJ(self) -> float:
        """Torsional stiffness [N·mm²]."""
        return self.G_MPa * self.J_mm4

    @property
    def GAsy(self) -> float:
        """Shear stiffness for shear along y, κGA [N]."""
        return self.G_MPa * self.Asy_mm2

    @property
    def GAsz(self) -> float:
        """Shear stiffness for shear along z, κGA [N]."""
        return self.G_MPa * self.Asz_mm2

    @property
    def mass_per_length(self) -> float:
        """Mass per length [t/mm]."""
        return self.density_t_mm3 * self.A_mm2

    @classmethod
    def from_stiffness(
        cls,
        *,
        EA: float,
        EIy: float,
        EIz: float,
        GJ: float,
        GAsy: float,
        GAsz: float,
        mass_per_length: float,
        E_ref_MPa: float,
        G_ref_MPa: float,
        label: str = "",
    ) -> BeamSection:
        """A transformed section with the given stiffness products [N, N·mm², t/mm].

        ``E_ref_MPa``/``G_ref_MPa`` [MPa] divide the products to give equivalent geometry.
        """
        area = EA / E_ref_MPa
        return cls(
            E_MPa=E_ref_MPa,
            G_MPa=G_ref_MPa,
            A_mm2=area,
            Iy_mm4=EIy / E_ref_MPa,
            Iz_mm4=EIz / E_ref_MPa,
            J_mm4=GJ / G_ref_MPa,
            Asy_mm2=GAsy / G_ref_MPa,
            Asz_mm2=GAsz / G_ref_MPa,
            density_t_mm3=mass_per_length / area,
            label=label,
        )


# ---------------------------------------------------------------------------------------------
# Closed forms


def positive(name: str, value: float) -> float:
    """``value`` as a float when finite and > 0, else :class:`SectionError` naming ``name``."""
    if not (math.isfinite(value) and value > 0.0):
        raise SectionError(name, f"must be a positive number, got {value!r}")
    return float(value)


def cowper_rectangle(nu: float) -> float:
    """Cowper's shear coefficient of a rectangle, 10(1+ν)/(12+11ν) (Cowper 1966)."""
    return 10.0 * (1.0 + nu) / (12.0 + 11.0 * nu)


def cowper_solid_circle(nu: float) -> float:
    """Cowper's shear coefficient of a solid circle, 6(1+ν)/(7+6ν) (Cowper 1966)."""
    return 6.0 * (1.0 + nu) / (7.0 + 6.0 * nu)


def cowper_hollow_circle(ratio: float, nu: float) -> float:
    """Cowper's shear coefficient of a hollow circle, m = inner/outer radius (Cowper 1966).

    κ = 6(1+ν)(1+m²)² / [(7+6ν)(1+m²)² + (20+12ν)m²]; m = 0 gives the solid circle and m -> 1
    the thin-walled tube 2(1+ν)/(4+3ν).
    """
    m2 = ratio * ratio
    return (
        6.0
        * (1.0 + nu)
        * (1.0 + m2) ** 2
        / ((7.0 + 6.0 * nu) * (1.0 + m2) ** 2 + (20.0 + 12.0 * nu) * m2)
    )


#: Shear coefficient of an orthotropic thin tube: the geometric limit (REFERENCES.md §1, practice).
KAPPA_ORTHOTROPIC_TUBE = 0.5


def rectangle_torsion_constant(a_mm: float, b_mm: float) -> float:
    """Torsion constant of a solid rectangle a x b [mm⁴] (sides in any order).

    J = a b³ [1/3 - 0.21 (b/a)(1 - b⁴/(12 a⁴))], a >= b (Roark's Formulas for Stress and Strain,
    Table 10.7).
    """
    a, b = max(a_mm, b_mm), min(a_mm, b_mm)
    return a * b**3 * (1.0 / 3.0 - 0.21 * (b / a) * (1.0 - b**4 / (12.0 * a**4)))


def tube(
    od_mm: float,
    id_mm: float,
    E_MPa: float,
    G_MPa: float,
    density_t_mm3: float,
    nu: float | None,
    label: str = "",
) -> BeamSection:
    """A round tube.

    Parameters
    ----------
    od_mm, id_mm
        Outer and inner diameter [mm], 0 <= id < od.
    E_MPa, G_MPa
        Axial and shear modulus [MPa].
    density_t_mm3
        Density [t/mm³].
    nu
        Poisson ratio of an isotropic tube (Cowper's hollow-circle κ), or ``None`` for an
        orthotropic tube (κ = 0.5).
    """
    D = positive("od_mm", od_mm)
    if not (math.isfinite(id_mm) and 0.0 <= id_mm < D):
        raise SectionError("id_mm", f"inner diameter must be in [0, {D:g}) mm, got {id_mm!r}")
    d = float(id_mm)
    area = math.pi * (D**2 - d**2) / 4.0
    inertia = math.pi * (D**4 - d**4) / 64.0
    polar = math.pi * (D**4 - d**4) / 32.0
    kappa = KAPPA_ORTHOTROPIC_TUBE if nu is None else cowper_hollow_circle(d / D, nu)
    return BeamSection(
        E_MPa,
        G_MPa,
        area,
        inertia,
        inertia,
        polar,
        kappa * area,
        kappa * area,
        density_t_mm3,
        label,
    )


def tube_section(od_mm: float, id_mm: float, material: TubeMaterial | MetalMaterial) -> BeamSection:
    """A tube of a carbon-fibre tube material (orthotropic, κ = 0.5) or a metal (Cowper's κ).

    Parameters
    ----------
    od_mm, id_mm
        Outer and inner diameter [mm].
    material
        The tube's material record.
    """
    label = f"tube {od_mm:g}x{id_mm:g} {material.name}"
    if isinstance(material, TubeMaterial):
        return tube(
            od_mm, id_mm, material.E_axial_MPa, material.G_MPa, material.density_t_mm3, None, label
        )
    return tube(
        od_mm,
        id_mm,
        material.E_MPa,
        material.shear_modulus_MPa,
        material.density_t_mm3,
        material.poisson_ratio,
        label,
    )


def solid_rectangle(
    width_mm: float,
    depth_mm: float,
    E_MPa: float,
    G_MPa: float,
    density_t_mm3: float,
    nu: float,
    label: str = "",
) -> BeamSection:
    """A solid rectangle, ``width_mm`` along z and ``depth_mm`` along y [mm].

    E, G [MPa], density [t/mm³], Poisson ratio ν for Cowper's κ; J from Roark.
    """
    b = positive("width_mm", width_mm)
    h = positive("depth_mm", depth_mm)
    area = b * h
    kappa = cowper_rectangle(nu)
    return BeamSection(
        E_MPa,
        G_MPa,
        area,
        h * b**3 / 12.0,
        b * h**3 / 12.0,
        rectangle_torsion_constant(b, h),
        kappa * area,
        kappa * area,
        density_t_mm3,
        label,
    )


def solid_round(
    diameter_mm: float, E_MPa: float, G_MPa: float, density_t_mm3: float, nu: float, label: str = ""
) -> BeamSection:
    """A solid round bar of ``diameter_mm`` [mm]; E, G [MPa], density [t/mm³], ν for Cowper's κ."""
    D = positive("diameter_mm", diameter_mm)
    area = math.pi * D**2 / 4.0
    inertia = math.pi * D**4 / 64.0
    kappa = cowper_solid_circle(nu)
    return BeamSection(
        E_MPa,
        G_MPa,
        area,
        inertia,
        inertia,
        2.0 * inertia,
        kappa * area,
        kappa * area,
        density_t_mm3,
        label,
    )


def section_arrays(sections: Sequence[BeamSection]) -> dict[str, npt.NDArray[np.float64]]:
    """The fields of several sections as arrays, one entry a member, keyed as the engine's beams.

    Returns ``E``, ``G`` [MPa], ``A``, ``Asy``, ``Asz`` [mm²], ``Iy``, ``Iz``, ``J`` [mm⁴] and
    ``density`` [t/mm³], each of shape (n,).
    """
    columns = {
        "E": "E_MPa",
        "G": "G_MPa",
        "A": "A_mm2",
        "Iy": "Iy_mm4",
        "Iz": "Iz_mm4",
        "J": "J_mm4",
        "Asy": "Asy_mm2",
        "Asz": "Asz_mm2",
        "density": "density_t_mm3",
    }
    return {
        key: np.array([getattr(s, field) for s in sections], dtype=np.float64)
        for key, field in columns.items()
    }

"""Typed, frozen material records: one class a kind of material, values in internal units.

Moduli and strengths in MPa, temperatures in °C, ratios dimensionless, density through
``density_t_mm3`` in t/mm³. Each record carries its ``source``, ``confidence`` and ``origin``
(the file or case it came from); ``provenance_of(column)`` says where one value comes from, and
``value_of(column)`` gives the value used, filled by a stated rule where the table left it blank.
Records are built by :mod:`stiff.materials`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, fields
from types import MappingProxyType
from typing import Literal

from stiff.errors import MaterialError
from stiff.material_tables import MaterialKind
from stiff.printing import Confidence
from stiff.units import g_cm3_to_t_mm3


@dataclass(frozen=True)
class PrintedMaterial:
    """A printed polymer, dense, dry, 23 °C; ``xy`` along the printed lines, ``z`` across layers.

    Moduli and strengths in MPa, temperatures in °C, ratios dimensionless. Optional values left
    blank in the table are ``None`` here, and the properties fill them by these rules (each rule
    is returned by :meth:`provenance_of`):

    * ``E_z_MPa`` blank: taken equal to ``E_xy_MPa`` (no published ratio);
    * ``G_xy_MPa`` blank: E_xy / (2 (1 + ν)) (isotropic relation, REFERENCES.md §7, memory);
    * interlayer shear modulus: always E_z / (2 (1 + ν)) (same relation, across layers);
    * ``tension_across_lines_MPa`` blank: ``tension_z_MPa`` (a weld between lines taken as weak
      as one between layers: conservative);
    * ``compression_MPa`` blank: ``tension_xy_MPa`` (polymers yield higher in compression:
      conservative);
    * ``shear_xy_MPa`` blank: 0.5 tension_xy, low end of 0.5-0.7 (REFERENCES.md §7, memory);
    * ``shear_z_MPa`` blank: 0.6 tension_z, low end of 0.6-1.0 (REFERENCES.md §7, memory).
    """

    name: str
    E_xy_MPa: float
    E_z_MPa: float | None
    G_xy_MPa: float | None
    poisson_ratio: float
    tension_xy_MPa: float
    tension_z_MPa: float
    tension_across_lines_MPa: float | None
    compression_MPa: float | None
    shear_xy_MPa: float | None
    shear_z_MPa: float | None
    density_g_cm3: float
    T_glass_C: float
    T_hot_C: float | None
    E_hot_ratio: float | None
    strength_hot_ratio: float | None
    cov_xy_ratio: float
    cov_z_ratio: float
    sustained_ratio: float
    fatigue_xy_ratio: float
    fatigue_z_ratio: float
    source: str
    confidence: Confidence
    origin: str = ""

    kind: Literal["printed"] = "printed"

    @property
    def E_across_layers_MPa(self) -> float:
        """Modulus across the layers [MPa]."""
        return self.E_xy_MPa if self.E_z_MPa is None else self.E_z_MPa

    @property
    def G_in_layer_MPa(self) -> float:
        """Shear modulus in the plane of a layer [MPa]."""
        if self.G_xy_MPa is not None:
            return self.G_xy_MPa
        return self.E_xy_MPa / (2.0 * (1.0 + self.poisson_ratio))

    @property
    def G_across_layers_MPa(self) -> float:
        """Shear modulus for shear on the layer plane, E_z / (2 (1 + ν)) [MPa]."""
        return self.E_across_layers_MPa / (2.0 * (1.0 + self.poisson_ratio))

    @property
    def tension_in_layer_across_lines_MPa(self) -> float:
        """Tensile strength within a layer across its lines [MPa]."""
        if self.tension_across_lines_MPa is not None:
            return self.tension_across_lines_MPa
        return self.tension_z_MPa

    @property
    def compression_strength_MPa(self) -> float:
        """Compressive strength [MPa]."""
        return self.tension_xy_MPa if self.compression_MPa is None else self.compression_MPa

    @property
    def shear_in_layer_MPa(self) -> float:
        """Shear strength in the plane of a layer [MPa]."""
        return 0.5 * self.tension_xy_MPa if self.shear_xy_MPa is None else self.shear_xy_MPa

    @property
    def shear_across_layers_MPa(self) -> float:
        """Interlayer shear strength [MPa]."""
        return 0.6 * self.tension_z_MPa if self.shear_z_MPa is None else self.shear_z_MPa

    @property
    def density_t_mm3(self) -> float:
        """Solid density [t/mm³]."""
        return g_cm3_to_t_mm3(self.density_g_cm3)

    def provenance_of(self, column: str) -> str:
        """Where the value of ``column`` comes from: its row's source or the filling rule."""
        if column in _PRINTED_RULES and getattr(self, column) is None:
            rule = _PRINTED_RULES[column][1]
            return f"{self.name}: {column} blank in {self.origin or 'table'}: {rule}"
        return _provenance(self, column)

    def value_of(self, column: str) -> float | str | None:
        """The value used for ``column``: the table's, or the one its filling rule gives."""
        if column in _PRINTED_RULES and getattr(self, column) is None:
            value: float = getattr(self, _PRINTED_RULES[column][0])
            return value
        found: float | str | None = getattr(self, column)
        return found


#: Columns of the printed table that a rule fills when blank: (property, rule).
_PRINTED_RULES: Mapping[str, tuple[str, str]] = MappingProxyType(
    {
        "E_z_MPa": ("E_across_layers_MPa", "taken equal to E_xy_MPa (no published ratio)"),
        "G_xy_MPa": ("G_in_layer_MPa", "E_xy/(2(1+nu)), isotropic relation [memory]"),
        "tension_across_lines_MPa": (
            "tension_in_layer_across_lines_MPa",
            "taken equal to tension_z_MPa (conservative)",
        ),
        "compression_MPa": (
            "compression_strength_MPa",
            "taken equal to tension_xy_MPa (conservative)",
        ),
        "shear_xy_MPa": ("shear_in_layer_MPa", "0.5 x tension_xy_MPa, low end of 0.5-0.7 [memory]"),
        "shear_z_MPa": (
            "shear_across_layers_MPa",
            "0.6 x tension_z_MPa, low end of 0.6-1.0 [memory]",
        ),
    }
)


@dataclass(frozen=True)
class TubeMaterial:
    """A carbon-fibre tube material: orthotropic, axial modulus and shear modulus [MPa].

    Strengths along the tube axis and across it (``hoop_MPa``, ``None`` when unknown) [MPa].
    """

    name: str
    E_axial_MPa: float
    G_MPa: float
    tension_axial_MPa: float
    compression_axial_MPa: float
    hoop_MPa: float | None
    density_g_cm3: float
    source: str
    confidence: Confidence
    origin: str = ""

    kind: Literal["tube"] = "tube"

    @property
    def density_t_mm3(self) -> float:
        """Density [t/mm³]."""
        return g_cm3_to_t_mm3(self.density_g_cm3)

    def provenance_of(self, column: str) -> str:
        """Where the value of ``column`` comes from."""
        return _provenance(self, column)

    def value_of(self, column: str) -> float | str | None:
        """The value of ``column`` (``None`` when blank)."""
        found: float | str | None = getattr(self, column)
        return found


class _Isotropic:
    """Shared by the isotropic records (metals, adhesives): G from E and ν when blank."""

    name: str
    E_MPa: float
    G_MPa: float | None
    poisson_ratio: float
    density_g_cm3: float
    origin: str

    @property
    def shear_modulus_MPa(self) -> float:
        """Shear modulus [MPa]: the table's, or E / (2 (1 + ν))."""
        if self.G_MPa is not None:
            return self.G_MPa
        return self.E_MPa / (2.0 * (1.0 + self.poisson_ratio))

    @property
    def density_t_mm3(self) -> float:
        """Density [t/mm³]."""
        return g_cm3_to_t_mm3(self.density_g_cm3)

    def provenance_of(self, column: str) -> str:
        """Where the value of ``column`` comes from."""
        if column == "G_MPa" and self.G_MPa is None:
            return f"{self.name}: G_MPa blank in {self.origin or 'table'}: E/(2(1+nu)), isotropic"
        return _provenance(self, column)  # type: ignore[arg-type]

    def value_of(self, column: str) -> float | str | None:
        """The value used for ``column``: the table's, or E/(2(1+ν)) for a blank ``G_MPa``."""
        if column == "G_MPa":
            return self.shear_modulus_MPa
        found: float | str | None = getattr(self, column)
        return found


@dataclass(frozen=True)
class MetalMaterial(_Isotropic):
    """An isotropic metal for pins, bolts and inserts; moduli and strengths [MPa].

    ``strength_basis`` says whether ``ultimate_MPa``/``yield_MPa`` are specified minimums (bolt
    classes) or typical values. ``G_MPa`` blank: E / (2 (1 + ν)).
    """

    name: str
    E_MPa: float
    G_MPa: float | None
    poisson_ratio: float
    ultimate_MPa: float
    yield_MPa: float
    proof_MPa: float | None
    strength_basis: Literal["minimum", "typical"]
    density_g_cm3: float
    source: str
    confidence: Confidence
    origin: str = ""

    kind: Literal["metal"] = "metal"


@dataclass(frozen=True)
class AdhesiveMaterial(_Isotropic):
    """An adhesive for bonded sockets: moduli and lap-shear strength [MPa].

    ``G_MPa`` blank: E / (2 (1 + ν)).
    """

    name: str
    E_MPa: float
    G_MPa: float | None
    poisson_ratio: float
    lap_shear_MPa: float
    density_g_cm3: float
    source: str
    confidence: Confidence
    origin: str = ""

    kind: Literal["adhesive"] = "adhesive"


@dataclass(frozen=True)
class TubeSize:
    """A common tube size: outer and inner diameter [mm]."""

    name: str
    od_mm: float
    id_mm: float
    source: str
    confidence: Confidence
    origin: str = ""


Material = PrintedMaterial | TubeMaterial | MetalMaterial | AdhesiveMaterial

RECORD_TYPES: Mapping[MaterialKind, type[Material]] = MappingProxyType(
    {
        "printed": PrintedMaterial,
        "tube": TubeMaterial,
        "metal": MetalMaterial,
        "adhesive": AdhesiveMaterial,
    }
)


def _provenance(record: Material, column: str) -> str:
    known = {f.name for f in fields(record)} - {"kind", "origin", "source", "confidence"}
    if column not in known:
        raise MaterialError(record.origin or None, record.name, column, "no such column")
    where = f"{record.origin}, " if record.origin else ""
    if getattr(record, column) is None:
        return f"{record.name} ({where}{column}): blank, no value"
    return f"{record.name} ({where}{record.confidence}): {record.source}"

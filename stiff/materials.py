"""Material records, loaded from the tables in ``materials/`` or from a user's file or a case.

Each table has one row a material, the unit in every column name, a ``source`` column naming where
the values come from, and a ``confidence`` column with one of the tags of REFERENCES.md
(``confirmed``, ``memory``, ``derived``, ``practice``) or ``measured`` for a user's own tests. The
row's confidence is the weakest tag among its values; the source says which value has which tag.

Tables (``kind`` -> file):

* ``printed`` -> ``printed.csv``: printed polymers. ``xy`` is along the printed lines, ``z`` across
  the layers. Blank optional cells are filled by a stated rule (see :class:`PrintedMaterial`).
* ``tube`` -> ``tubes.csv``: carbon-fibre tube materials (orthotropic: axial E, shear G).
* ``metal`` -> ``metals.csv``: pins, bolts and inserts (isotropic).
* ``adhesive`` -> ``adhesives.csv``: adhesives for bonded sockets.
* ``tubes.csv``'s companion ``tube_sizes.csv``: common tube sizes, outer x inner diameter.

Records store internal units (MPa, t/mm³ through properties, °C for temperatures) and carry their
``source``, ``confidence`` and ``origin`` (the file or case they came from) into every result.
A bad table raises :class:`~stiff.errors.MaterialError` naming file, row (the line number in the
file, header = line 1) and column.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace
from pathlib import Path
from types import MappingProxyType
from typing import TypeVar

import pandas as pd

from stiff import MATERIALS_DIR
from stiff.errors import MaterialError
from stiff.material_records import (
    RECORD_TYPES,
    AdhesiveMaterial,
    Material,
    MetalMaterial,
    PrintedMaterial,
    TubeMaterial,
    TubeSize,
)
from stiff.material_tables import (
    COLUMNS,
    MATERIAL_KINDS,
    TABLE_FILES,
    TUBE_SIZE_COLUMNS,
    TUBE_SIZES_FILE,
    MaterialKind,
    check_frame,
    display,
    line_labels,
    read_csv,
    weakest,
)

__all__ = [
    "COLUMNS",
    "MATERIAL_KINDS",
    "TABLE_FILES",
    "AdhesiveMaterial",
    "Material",
    "MaterialKind",
    "MaterialLibrary",
    "MetalMaterial",
    "PrintedMaterial",
    "TubeMaterial",
    "TubeSize",
    "guess_kind",
    "load_library",
    "load_table",
    "load_tube_sizes",
    "weakest_confidence",
]


# ---------------------------------------------------------------------------------------------
# Reading tables


def _records(
    kind: MaterialKind, frame: pd.DataFrame, where: str, row_labels: list[str]
) -> dict[str, Material]:
    rows = check_frame(frame, COLUMNS[kind], where, row_labels)
    record_type = RECORD_TYPES[kind]
    out: dict[str, Material] = {}
    for row in rows:
        record = record_type(**row, origin=where)  # type: ignore[arg-type]
        out[record.name] = record
    return out


def load_table(path: Path, kind: MaterialKind) -> dict[str, Material]:
    """Read one material table.

    Parameters
    ----------
    path
        CSV file with the columns of ``COLUMNS[kind]``.
    kind
        Which kind of material the file holds.

    Returns
    -------
    dict
        Records by name, in file order.

    Raises
    ------
    MaterialError
        A missing or unknown column, a blank required cell, a value that is not a positive number
        (or not in range), an unknown confidence tag, or a duplicate name (names compare without
        case); the message names file, row (line number) and column.
    """
    frame = read_csv(path)
    return _records(kind, frame, display(path), line_labels(frame))


def load_tube_sizes(path: Path) -> tuple[TubeSize, ...]:
    """Read the table of tube sizes (outer and inner diameter [mm]); the inner must be smaller."""
    frame = read_csv(path)
    labels = line_labels(frame)
    where = display(path)
    rows = check_frame(frame, TUBE_SIZE_COLUMNS, where, labels)
    sizes = []
    for label, row in zip(labels, rows, strict=True):
        size = TubeSize(**row, origin=where)  # type: ignore[arg-type]
        if size.id_mm >= size.od_mm:
            raise MaterialError(where, label, "id_mm", "inner diameter not below outer diameter")
        sizes.append(size)
    return tuple(sizes)


def guess_kind(path: Path) -> MaterialKind:
    """Which kind of table a user's file is, from its header (the kind it shares most columns with).

    Raises
    ------
    MaterialError
        When no kind's distinctive columns appear, or two kinds match equally well.
    """
    header = set(read_csv(path).columns)
    shared = {"name", "source", "confidence", "density_g_cm3", "poisson_ratio", "E_MPa", "G_MPa"}
    scores = {
        kind: len(header & ({c.name for c in COLUMNS[kind]} - shared)) for kind in MATERIAL_KINDS
    }
    best = max(scores.values())
    winners = [kind for kind, score in scores.items() if score == best]
    if best == 0 or len(winners) > 1:
        raise MaterialError(
            display(path),
            None,
            None,
            "cannot tell which kind of material table this is; use the columns of one of "
            + ", ".join(TABLE_FILES[k] for k in MATERIAL_KINDS),
        )
    return winners[0]


# ---------------------------------------------------------------------------------------------
# The library


@dataclass(frozen=True)
class MaterialLibrary:
    """All known materials, by kind and name, and the common tube sizes.

    Names are unique across kinds and looked up without regard to case. Build it with
    :func:`load_library`; add or override materials with :meth:`with_file` or
    :meth:`with_records`, which return a new library.
    """

    printed: Mapping[str, PrintedMaterial]
    tubes: Mapping[str, TubeMaterial]
    metals: Mapping[str, MetalMaterial]
    adhesives: Mapping[str, AdhesiveMaterial]
    tube_sizes: tuple[TubeSize, ...]
    where: str = "materials"

    def _by_kind(self) -> Mapping[MaterialKind, Mapping[str, Material]]:
        return {
            "printed": self.printed,
            "tube": self.tubes,
            "metal": self.metals,
            "adhesive": self.adhesives,
        }

    def names(self, kind: MaterialKind | None = None) -> tuple[str, ...]:
        """Material names, all kinds (``kind=None``) or one kind, in table order."""
        tables = self._by_kind()
        kinds = MATERIAL_KINDS if kind is None else (kind,)
        return tuple(name for k in kinds for name in tables[k])

    def all(self) -> tuple[Material, ...]:
        """Every material record, printed first, then tubes, metals, adhesives."""
        tables = self._by_kind()
        return tuple(rec for k in MATERIAL_KINDS for rec in tables[k].values())

    def get(self, name: str, kind: MaterialKind | None = None) -> Material:
        """The material called ``name`` (any case), optionally of one ``kind``.

        Raises
        ------
        MaterialError
            Unknown name; the message lists the known names (of that kind).
        """
        tables = self._by_kind()
        kinds = MATERIAL_KINDS if kind is None else (kind,)
        for k in kinds:
            found = _find(tables[k], name)
            if found is not None:
                return found
        raise _unknown(self, name, kind)

    def printed_material(self, name: str) -> PrintedMaterial:
        """The printed polymer called ``name``; see :meth:`get`."""
        found = _find(self.printed, name)
        if found is None:
            raise _unknown(self, name, "printed")
        return found

    def tube_material(self, name: str) -> TubeMaterial:
        """The tube material called ``name``; see :meth:`get`."""
        found = _find(self.tubes, name)
        if found is None:
            raise _unknown(self, name, "tube")
        return found

    def metal(self, name: str) -> MetalMaterial:
        """The metal called ``name``; see :meth:`get`."""
        found = _find(self.metals, name)
        if found is None:
            raise _unknown(self, name, "metal")
        return found

    def adhesive(self, name: str) -> AdhesiveMaterial:
        """The adhesive called ``name``; see :meth:`get`."""
        found = _find(self.adhesives, name)
        if found is None:
            raise _unknown(self, name, "adhesive")
        return found

    def tube_size(self, name: str) -> TubeSize:
        """The tube size called ``name`` (e.g. ``"10x8"``)."""
        for size in self.tube_sizes:
            if size.name.lower() == name.strip().lower():
                return size
        known = ", ".join(s.name for s in self.tube_sizes)
        raise MaterialError(self.where, None, "name", f"unknown tube size {name!r}; known: {known}")

    def _with(
        self, kind: MaterialKind, records: Mapping[str, Material], where: str
    ) -> MaterialLibrary:
        tables = {k: dict(v) for k, v in self._by_kind().items()}
        for name, record in records.items():
            for other in MATERIAL_KINDS:
                clash = [n for n in tables[other] if n.lower() == name.lower()]
                if clash and other != kind:
                    raise MaterialError(
                        where, name, "name", f"{name!r} is already a {other} material"
                    )
                for n in clash:
                    del tables[other][n]
            tables[kind][name] = record
        return replace(
            self,
            printed=MappingProxyType(tables["printed"]),  # type: ignore[arg-type]
            tubes=MappingProxyType(tables["tube"]),  # type: ignore[arg-type]
            metals=MappingProxyType(tables["metal"]),  # type: ignore[arg-type]
            adhesives=MappingProxyType(tables["adhesive"]),  # type: ignore[arg-type]
            where=f"{self.where} + {where}",
        )

    def with_file(self, path: Path, kind: MaterialKind | None = None) -> MaterialLibrary:
        """A library with the materials of a user's CSV file added (same name: replaced).

        Parameters
        ----------
        path
            The user's table, with the columns of the built-in table of its kind; ``confidence``
            may be ``measured``.
        kind
            The kind of material; ``None`` guesses it from the header (:func:`guess_kind`).
        """
        kind = guess_kind(path) if kind is None else kind
        return self._with(kind, load_table(path, kind), display(path))

    def with_records(
        self, kind: MaterialKind, records: Mapping[str, Mapping[str, object]], origin: str
    ) -> MaterialLibrary:
        """A library with materials given as ``{name: {column: value}}`` added or replaced.

        Parameters
        ----------
        kind
            The kind of every record.
        records
            Each record has every required column of the kind's table but ``name`` (numbers or
            text; blanks as ``""`` or missing for optional columns), including ``source`` and
            ``confidence``.
        origin
            Where the records come from, e.g. ``"case.toml [materials.PLA-mine]"``; it names the
            "file" in errors and travels with the records.
        """
        columns = COLUMNS[kind]
        optional = {c.name for c in columns if not c.required}
        rows = []
        for name, values in records.items():
            known = {c.name for c in columns} - {"name"}
            missing = [c for c in known - optional if c not in values]
            if missing:
                raise MaterialError(origin, name, sorted(missing)[0], "missing")
            unknown = sorted(set(values) - known)
            if unknown:
                raise MaterialError(origin, name, unknown[0], "unknown key")
            row = {c.name: "" for c in columns if c.name in optional}
            row.update({key: "" if value is None else str(value) for key, value in values.items()})
            row["name"] = name
            rows.append(row)
        frame = pd.DataFrame(rows, dtype=str)
        if frame.empty:
            return self
        return self._with(kind, _records(kind, frame, origin, list(records)), origin)


_R = TypeVar("_R")


def _find(table: Mapping[str, _R], name: str) -> _R | None:
    wanted = name.strip().lower()
    for known, record in table.items():
        if known.lower() == wanted:
            return record
    return None


def _unknown(library: MaterialLibrary, name: str, kind: MaterialKind | None) -> MaterialError:
    what = "material" if kind is None else f"{kind} material"
    known = ", ".join(library.names(kind))
    return MaterialError(library.where, None, "name", f"unknown {what} {name!r}; known: {known}")


def load_library(directory: Path = MATERIALS_DIR) -> MaterialLibrary:
    """Load every built-in table from ``directory`` (default: the repository's ``materials/``).

    Raises
    ------
    MaterialError
        A bad table, or one name used in two tables.
    """
    tables = {kind: load_table(directory / TABLE_FILES[kind], kind) for kind in MATERIAL_KINDS}
    seen: dict[str, MaterialKind] = {}
    for kind, records in tables.items():
        for name in records:
            if name.lower() in seen:
                raise MaterialError(
                    display(directory / TABLE_FILES[kind]),
                    name,
                    "name",
                    f"duplicate name: already in {TABLE_FILES[seen[name.lower()]]}",
                )
            seen[name.lower()] = kind
    return MaterialLibrary(
        printed=MappingProxyType(tables["printed"]),  # type: ignore[arg-type]
        tubes=MappingProxyType(tables["tube"]),  # type: ignore[arg-type]
        metals=MappingProxyType(tables["metal"]),  # type: ignore[arg-type]
        adhesives=MappingProxyType(tables["adhesive"]),  # type: ignore[arg-type]
        tube_sizes=load_tube_sizes(directory / TUBE_SIZES_FILE),
        where=display(directory),
    )


def weakest_confidence(*tags: str) -> str:
    """The weakest of some confidence tags (confirmed > measured > derived > practice > memory)."""
    return weakest(*tags)

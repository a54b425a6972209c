"""Material tables and records: loading, provenance, user materials, and bad tables."""

from __future__ import annotations

import re
from pathlib import Path

import pandas as pd
import pytest

from stiff import MATERIALS_DIR
from stiff.errors import MaterialError
from stiff.material_tables import COLUMNS, TABLE_FILES
from stiff.materials import (
    MaterialLibrary,
    PrintedMaterial,
    guess_kind,
    load_library,
    load_table,
    weakest_confidence,
)
from stiff.printing import CONFIDENCE_TAGS

TAGS = set(CONFIDENCE_TAGS)
UNIT_SUFFIXES = ("_MPa", "_g_cm3", "_C", "_mm", "_ratio")
TEXT_COLUMNS = {"name", "source", "confidence", "strength_basis"}


@pytest.fixture(scope="module")
def library() -> MaterialLibrary:
    return load_library()


def _csv_files() -> list[Path]:
    return sorted(MATERIALS_DIR.glob("*.csv"))


@pytest.mark.parametrize("path", _csv_files(), ids=lambda p: p.name)
def test_every_row_has_a_source_and_a_confidence_tag(path: Path) -> None:
    table = pd.read_csv(path, dtype=str, keep_default_na=False)
    assert {"source", "confidence"} <= set(table.columns)
    assert (table["source"].str.strip().str.len() > 10).all(), (
        "a source names where values came from"
    )
    assert set(table["confidence"]) <= TAGS
    # no manufacturer datasheets: a source never calls itself one
    assert not table["source"].str.contains("datasheet", case=False).any()


@pytest.mark.parametrize("path", _csv_files(), ids=lambda p: p.name)
def test_every_number_column_states_its_unit(path: Path) -> None:
    header = pd.read_csv(path, nrows=0).columns
    for column in header:
        assert column in TEXT_COLUMNS or column.endswith(UNIT_SUFFIXES), column


def test_library_has_the_materials_the_issue_asks_for(library: MaterialLibrary) -> None:
    for name in ("PLA", "PETG", "ABS", "ASA", "PA12", "PA-CF", "PC", "TPU"):
        assert library.printed_material(name).kind == "printed"
    assert (
        library.tube_material("CF-pultruded").E_axial_MPa
        > library.tube_material("CF-roll-wrapped").E_axial_MPa
    )
    for name in ("steel-8.8", "steel-10.9", "steel-12.9", "Al-6061-T6", "Al-7075-T6"):
        assert library.metal(name).kind == "metal"
    assert library.adhesive("epoxy").lap_shear_MPa > 0.0
    assert library.tube_size("10x8").od_mm == 10.0
    assert all(size.id_mm < size.od_mm for size in library.tube_sizes)


def test_lookup_ignores_case_and_unknown_names_list_the_known(library: MaterialLibrary) -> None:
    assert library.get("pla").name == "PLA"
    with pytest.raises(MaterialError, match=r"unknown material 'PLX'; known: PLA, PETG"):
        library.get("PLX")
    with pytest.raises(MaterialError, match=r"unknown printed material 'steel-8.8'; known: PLA"):
        library.printed_material("steel-8.8")


def test_records_carry_source_confidence_and_origin(library: MaterialLibrary) -> None:
    pla = library.printed_material("PLA")
    assert pla.origin == "materials/printed.csv"
    assert "Letcher" in pla.provenance_of("tension_xy_MPa")
    assert pla.confidence in TAGS


def test_units_are_converted_once() -> None:
    pla = load_library().printed_material("PLA")
    # 1 g/cm³ = 1e-9 t/mm³ (stiff.units)
    assert pla.density_t_mm3 == pytest.approx(1.24e-9, rel=1e-12)


def test_blank_values_are_filled_by_stated_rules(library: MaterialLibrary) -> None:
    petg = library.printed_material("PETG")
    assert petg.G_xy_MPa is None
    assert petg.G_in_layer_MPa == pytest.approx(2000.0 / (2.0 * 1.38), rel=1e-12)
    assert petg.G_across_layers_MPa == pytest.approx(1800.0 / (2.0 * 1.38), rel=1e-12)
    assert petg.compression_strength_MPa == petg.tension_xy_MPa
    assert petg.shear_in_layer_MPa == pytest.approx(0.5 * 46.0)
    assert petg.shear_across_layers_MPa == pytest.approx(0.6 * 29.9)
    assert petg.tension_in_layer_across_lines_MPa == petg.tension_z_MPa
    assert "0.5 x tension_xy_MPa" in petg.provenance_of("shear_xy_MPa")
    assert petg.value_of("shear_xy_MPa") == pytest.approx(23.0)
    tpu = library.printed_material("TPU")
    assert tpu.E_z_MPa is None and tpu.E_across_layers_MPa == tpu.E_xy_MPa
    assert "blank, no value" in petg.provenance_of("strength_hot_ratio")
    al = library.metal("Al-7075-T6")
    assert al.shear_modulus_MPa == pytest.approx(71700.0 / 2.66, rel=1e-12)


def test_weakest_confidence() -> None:
    assert weakest_confidence("confirmed", "derived") == "derived"
    assert weakest_confidence("measured", "memory", "confirmed") == "memory"


# ---------------------------------------------------------------------------------------------
# Bad tables: each names file, row (line number) and column


def _write_printed(tmp_path: Path, edit: str = "", drop: str | None = None) -> Path:
    """The built-in printed table with one edit: ``"ROW_NAME:COLUMN=VALUE"``."""
    table = pd.read_csv(MATERIALS_DIR / "printed.csv", dtype=str, keep_default_na=False)
    if edit:
        target, value = edit.split("=", 1)
        row, column = target.split(":")
        table.loc[table["name"] == row, column] = value
    if drop:
        table = table.drop(columns=[drop])
    path = tmp_path / "printed.csv"
    table.to_csv(path, index=False)
    return path


def test_a_missing_column_is_named(tmp_path: Path) -> None:
    path = _write_printed(tmp_path, drop="tension_z_MPa")
    with pytest.raises(MaterialError, match=r"printed.csv, column tension_z_MPa: missing column"):
        load_table(path, "printed")


@pytest.mark.parametrize(
    ("edit", "column", "why"),
    [
        ("PETG:E_xy_MPa=-2000", "E_xy_MPa", "is not a positive number"),
        ("PETG:E_xy_MPa=0", "E_xy_MPa", "is not a positive number"),
        ("PETG:E_xy_MPa=stiff", "E_xy_MPa", "is not a positive number"),
        ("PETG:E_xy_MPa=", "E_xy_MPa", "blank cell"),
        ("PETG:poisson_ratio=0.5", "poisson_ratio", r"is not in \(0, 0.5\)"),
        ("PETG:cov_z_ratio=1.5", "cov_z_ratio", r"is not a ratio in \(0, 1\]"),
        ("PETG:confidence=sure", "confidence", "is not one of confirmed"),
        ("PETG:name=pla", "name", "duplicate name 'pla'"),
        ("PETG:source=", "source", "blank cell"),
    ],
)
def test_a_bad_cell_names_file_row_and_column(
    tmp_path: Path, edit: str, column: str, why: str
) -> None:
    path = _write_printed(tmp_path, edit)
    # PETG is the second data row: line 3 of the file
    with pytest.raises(
        MaterialError, match=rf"printed.csv, row 3, column {column}: .*{why}"
    ) as info:
        load_table(path, "printed")
    assert "\n" not in str(info.value)
    assert info.value.row == "3" and info.value.column == column


def test_an_unknown_column_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "t.csv"
    text = (MATERIALS_DIR / "adhesives.csv").read_text().replace("lap_shear_MPa", "lap_shear_psi")
    path.write_text(text)
    with pytest.raises(MaterialError, match="column"):
        load_table(path, "adhesive")


def test_a_missing_file_and_an_empty_file(tmp_path: Path) -> None:
    with pytest.raises(MaterialError, match="no such file"):
        load_table(tmp_path / "none.csv", "printed")
    empty = tmp_path / "empty.csv"
    empty.write_text("")
    with pytest.raises(MaterialError, match="not a readable CSV table"):
        load_table(empty, "printed")


def test_a_tube_size_must_have_its_bore_inside(tmp_path: Path) -> None:
    path = tmp_path / "tube_sizes.csv"
    path.write_text("name,od_mm,id_mm,source,confidence\n8x9,8,9,own,measured\n")
    for kind, file in TABLE_FILES.items():
        (tmp_path / file).write_text((MATERIALS_DIR / file).read_text())
        assert kind in COLUMNS
    with pytest.raises(MaterialError, match=r"tube_sizes.csv, row 2, column id_mm"):
        load_library(tmp_path)


# ---------------------------------------------------------------------------------------------
# User materials


def _user_pla(tmp_path: Path, name: str = "PLA") -> Path:
    table = pd.read_csv(MATERIALS_DIR / "printed.csv", dtype=str, keep_default_na=False)
    row = table[table["name"] == "PLA"].copy()
    row["name"] = name
    row["E_xy_MPa"] = "3100"
    row["source"] = "own three-point bending tests, 5 coupons, 2026"
    row["confidence"] = "measured"
    path = tmp_path / "mine.csv"
    row.to_csv(path, index=False)
    return path


def test_a_user_file_overrides_a_builtin_and_keeps_its_provenance(
    tmp_path: Path, library: MaterialLibrary
) -> None:
    path = _user_pla(tmp_path)
    assert guess_kind(path) == "printed"
    mine = library.with_file(path)
    pla = mine.printed_material("PLA")
    assert pla.E_xy_MPa == 3100.0
    assert pla.confidence == "measured"
    assert pla.origin == str(path)
    assert "own three-point bending" in pla.provenance_of("E_xy_MPa")
    assert mine.names().count("PLA") == 1
    # the built-in library is untouched
    assert library.printed_material("PLA").E_xy_MPa == 3550.0


def test_a_user_file_adds_a_material(tmp_path: Path, library: MaterialLibrary) -> None:
    mine = library.with_file(_user_pla(tmp_path, "PLA-grey"))
    assert "PLA-grey" in mine.names("printed")
    assert mine.printed_material("pla-grey").origin == str(tmp_path / "mine.csv")


def test_a_user_file_of_unknown_kind_is_refused(tmp_path: Path, library: MaterialLibrary) -> None:
    path = tmp_path / "odd.csv"
    path.write_text("name,colour,source,confidence\nx,red,own,measured\n")
    with pytest.raises(MaterialError, match="cannot tell which kind"):
        library.with_file(path)


def test_case_records_add_materials_with_provenance(library: MaterialLibrary) -> None:
    steel = library.metal("steel-8.8")
    values = {
        "E_MPa": 200000,
        "poisson_ratio": 0.29,
        "ultimate_MPa": 700,
        "yield_MPa": 500,
        "strength_basis": "typical",
        "density_g_cm3": 7.9,
        "source": "own tensile test of the dowel pins",
        "confidence": "measured",
    }
    mine = library.with_records("metal", {"dowel": values}, origin="leg.toml [materials.dowel]")
    dowel = mine.metal("dowel")
    assert dowel.origin == "leg.toml [materials.dowel]"
    assert dowel.confidence == "measured"
    assert dowel.G_MPa is None and dowel.proof_MPa is None
    assert mine.metal("steel-8.8") == steel


def test_case_records_are_checked_like_a_table(library: MaterialLibrary) -> None:
    bad = {
        "E_MPa": -1,
        "poisson_ratio": 0.3,
        "ultimate_MPa": 700,
        "yield_MPa": 500,
        "strength_basis": "typical",
        "density_g_cm3": 7.9,
        "source": "x",
        "confidence": "measured",
    }
    with pytest.raises(MaterialError, match=re.escape("leg.toml, row pin, column E_MPa")):
        library.with_records("metal", {"pin": bad}, origin="leg.toml")
    with pytest.raises(MaterialError, match=r"leg\.toml, row pin, column confidence: missing"):
        library.with_records("metal", {"pin": {"E_MPa": 1}}, origin="leg.toml")


def test_a_name_cannot_change_kind(library: MaterialLibrary) -> None:
    values = {
        "E_MPa": 2500,
        "poisson_ratio": 0.38,
        "lap_shear_MPa": 10,
        "density_g_cm3": 1.1,
        "source": "x",
        "confidence": "measured",
    }
    with pytest.raises(MaterialError, match="already a printed material"):
        library.with_records("adhesive", {"PLA": values}, origin="case.toml")


def test_printed_record_fields_match_the_table_columns() -> None:
    names = [c.name for c in COLUMNS["printed"]]
    fields = list(PrintedMaterial.__dataclass_fields__)
    assert [n for n in fields if n in names] == names

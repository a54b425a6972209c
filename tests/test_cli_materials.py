"""The ``materials`` and ``section`` commands, through click's test runner."""

from __future__ import annotations

import re
from pathlib import Path

import pandas as pd
from click.testing import CliRunner

from stiff import MATERIALS_DIR
from stiff.cli import cli

NUMBER = re.compile(r"(?<![\w.])-?\d+(?:\.\d+)?(?:e[+-]?\d+)?(?![\w.])")


def _run(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(cli, list(args))
    return result.exit_code, result.stdout, result.stderr


def test_materials_lists_every_material_with_its_source() -> None:
    code, out, _ = _run("materials")
    assert code == 0
    for name in ("PLA", "PA-CF", "TPU", "CF-pultruded", "steel-10.9", "Al-6061-T6", "epoxy"):
        assert re.search(rf"^{re.escape(name)}\s", out, re.M), name
    assert "Sources:" in out and "ISO 898-1" in out and "Letcher" in out
    assert "10x8" in out


def test_materials_name_shows_the_record_with_units_and_provenance() -> None:
    code, out, _ = _run("materials", "petg")
    assert code == 0
    assert re.search(r"E_xy_MPa\s+2000 MPa", out)
    assert re.search(r"density_g_cm3\s+1.27 g/cm³", out)
    assert re.search(r"shear_xy_MPa\s+23 MPa\s+\(filled by a rule", out)
    assert "0.5 x tension_xy_MPa" in out
    assert "confidence memory" in out and "materials/printed.csv" in out


def test_an_unknown_material_is_one_line_on_stderr_with_exit_code_2() -> None:
    code, out, err = _run("materials", "unobtainium")
    assert code == 2
    assert out == ""
    assert err.count("\n") == 1 and err.startswith("stiff: error: ")
    assert "known: PLA, PETG" in err and "Traceback" not in err


def test_a_user_file_is_listed_with_its_confidence(tmp_path: Path) -> None:
    table = pd.read_csv(MATERIALS_DIR / "printed.csv", dtype=str, keep_default_na=False)
    row = table[table["name"] == "PETG"].copy()
    row["name"], row["source"], row["confidence"] = "PETG-mine", "own tests 2026", "measured"
    path = tmp_path / "mine.csv"
    row.to_csv(path, index=False)
    code, out, _ = _run("materials", "PETG-mine", "--user", str(path))
    assert code == 0 and "confidence measured" in out and "own tests 2026" in out


def test_a_bad_user_file_names_file_row_and_column(tmp_path: Path) -> None:
    path = tmp_path / "bad.csv"
    text = (MATERIALS_DIR / "adhesives.csv").read_text().replace(",15,", ",-15,")
    path.write_text(text)
    code, _, err = _run("materials", "--user", str(path))
    assert code == 2
    assert "bad.csv, row 2, column lap_shear_MPa: '-15' is not a positive number" in err
    assert err.count("\n") == 1


def test_section_compares_printed_with_solid_with_units_on_every_number() -> None:
    code, out, _ = _run(
        "section",
        "PLA",
        "--depth-mm",
        "12",
        "--width-mm",
        "6",
        "--walls",
        "2",
        "--skins",
        "3",
        "--infill-percent",
        "25",
        "--pattern",
        "gyroid",
        "--build",
        "upright",
    )
    assert code == 0
    assert "printed" in out and "solid" in out and "build upright" in out
    for label in ("EA", "EIz", "EIy", "GJ", "GAsy", "GAsz", "mass per length"):
        assert label in out
    table = out.split("\n\n")[1]
    for line in table.splitlines()[1:]:
        # each table row: printed and solid values each followed by a unit, then a ratio
        assert re.search(r"\d\S* (N|N·mm²|g/m)\s+\S+ (N|N·mm²|g/m)\s+\d\.\d{3}$", line), line
    ratios = [float(line.split()[-1]) for line in table.splitlines()[1:]]
    assert all(0.0 < r < 1.0 for r in ratios)


def test_every_number_the_section_command_prints_has_a_unit() -> None:
    code, out, _ = _run("section", "PETG", "--shape", "round", "--diameter-mm", "8")
    assert code == 0
    allowed_unitless = ("printed/solid", "strength/solid")
    for line in out.splitlines():
        if any(word in line for word in allowed_unitless) or not NUMBER.search(line):
            continue
        for match in NUMBER.finditer(line):
            after = line[match.end() : match.end() + 6]
            before = line[max(0, match.start() - 2) : match.start()]
            has_unit = re.match(r" ?(mm²|mm|MPa|N·mm²|N|g/m|%)", after) is not None
            # a count (walls 3 x, skins 4 x) or a ratio column (three decimals, last in line)
            is_count = after.startswith(" x ")
            is_ratio = re.fullmatch(r"\d\.\d{3}", match.group()) is not None
            assert has_unit or is_count or is_ratio or before.endswith("x "), line


def test_section_refuses_out_of_range_options() -> None:
    code, _, err = _run("section", "PLA", "--infill-percent", "0")
    assert code == 2 and "infill-percent" in err
    code, _, err = _run("section", "PLA", "--build", "sideways")
    assert code == 2 and "build" in err
    code, _, err = _run("section", "steel-8.8")
    assert code == 2 and "unknown printed material 'steel-8.8'" in err

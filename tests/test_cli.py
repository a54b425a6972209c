"""``stiff check`` and ``stiff --help`` through click's test runner (and once as a process)."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner, Result

from stiff import CASES_DIR
from stiff.cli import cli

DEMO = CASES_DIR / "five_bar_leg.toml"
#: The top-level keys of results.json the README documents.
RESULT_KEYS = {"schema", "case", "pose", "foot_compliance_mm_per_N",
               "foot_compliance_principal", "lateral", "compliance_breakdown", "load_cases",
               "checks", "warnings", "cautions"}


def _run(*args: str) -> Result:
    return CliRunner().invoke(cli, list(args))


def test_check_without_a_case_runs_the_demo_and_writes_nothing(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    result = _run("check")
    assert os.listdir(tmp_path) == []
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert "Five-bar leg" in out
    assert "mm/N" in out and "N·m" in out
    assert "results:" not in out
    assert result.stderr == ""


def test_check_json_prints_the_documented_keys() -> None:
    result = _run("check", "--json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    assert set(data) >= RESULT_KEYS, RESULT_KEYS - set(data)
    assert data["schema"] == "stiff.results/1"
    assert data["case"]["file"] == str(DEMO)
    assert len(data["foot_compliance_mm_per_N"]) == 3
    assert all(len(row) == 3 for row in data["foot_compliance_mm_per_N"])
    assert {s["kind"] for s in data["compliance_breakdown"]["vertical"]} <= {
        "part", "joint", "actuator", "spring"}
    assert data["cautions"], "every result carries its cautions"


def test_check_quiet_prints_one_line() -> None:
    result = _run("check", "--quiet")
    assert result.exit_code == 0, result.output
    assert result.stdout.count("\n") == 1
    assert result.stdout.startswith("Five-bar leg, small walking robot (demo data): ")
    assert " met" in result.stdout and "not met" not in result.stdout


def test_check_out_writes_results_json_and_leaves_other_files_alone(tmp_path: Path) -> None:
    out = tmp_path / "results"
    out.mkdir()
    (out / "figures").mkdir()  # a folder the report also writes into
    keep = out / "figures" / "mine.png"
    keep.write_bytes(b"not a real picture")
    notes = out / "notes.txt"
    notes.write_text("my own notes\n", encoding="utf-8")
    before = notes.stat().st_mtime_ns
    result = _run("check", str(DEMO), "--out", str(out))
    assert result.exit_code == 0, result.output
    assert (out / "results.json").is_file()
    assert notes.read_text(encoding="utf-8") == "my own notes\n"
    assert notes.stat().st_mtime_ns == before
    assert keep.read_bytes() == b"not a real picture"
    written = json.loads((out / "results.json").read_text(encoding="utf-8"))
    assert written == json.loads(_run("check", str(DEMO), "--json").stdout)
    assert f"results: {out / 'results.json'}" in result.stdout


def test_a_missing_case_file_is_exit_2_in_one_line(tmp_path: Path) -> None:
    missing = tmp_path / "no_such_case.toml"
    result = _run("check", str(missing), "--out", str(tmp_path / "out"))
    assert result.exit_code == 2
    assert result.stdout == ""
    assert result.stderr == f"stiff: error: {missing}: (file): no such case file\n"
    assert not (tmp_path / "out").exists()


def test_a_target_not_met_is_exit_1(tmp_path: Path) -> None:
    text = DEMO.read_text(encoding="utf-8")
    assert "max_foot_deflection_mm = 1.5" in text
    case = tmp_path / "strict.toml"
    case.write_text(text.replace("max_foot_deflection_mm = 1.5",
                                 "max_foot_deflection_mm = 0.001"), encoding="utf-8")
    result = _run("check", str(case), "--json")
    assert result.exit_code == 1, result.output
    checks = json.loads(result.stdout)["checks"]
    assert any(c["status"] != "met" for c in checks), checks
    quiet = _run("check", str(case), "--quiet")
    assert quiet.exit_code == 1
    assert quiet.stdout.count("\n") == 1 and "not met" in quiet.stdout


def test_help_lists_the_commands() -> None:
    result = _run("--help")
    assert result.exit_code == 0
    commands = result.stdout.split("Commands:")[1].split()
    for name in ("check", "materials", "section"):
        assert name in commands, name
    assert "Exit codes" in result.stdout


def test_check_help_names_its_options() -> None:
    result = _run("check", "--help")
    assert result.exit_code == 0
    for option in ("--out", "--json", "--quiet"):
        assert option in result.stdout


def test_the_console_entry_point_gives_one_line_and_exit_2(tmp_path: Path) -> None:
    """The installed ``stiff`` goes through ``main()``, not click's standalone mode."""
    broken = tmp_path / "broken.toml"
    broken.write_text('title = "x"\nfoot = \n', encoding="utf-8")
    run = subprocess.run([sys.executable, "-c", "from stiff.cli import main; main()", "check",
                          str(broken), "--out", str(tmp_path / "out")],
                         capture_output=True, text=True, timeout=60, check=False)
    assert run.returncode == 2
    assert run.stdout == ""
    assert run.stderr.startswith(f"stiff: error: {broken}:2: foot: not valid TOML: ")
    assert run.stderr.count("\n") == 1
    assert not (tmp_path / "out").exists()

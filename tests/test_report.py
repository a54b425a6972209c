"""The report of every demo case: complete, self-contained, consistent with results.json, and
rendered by a real headless browser where one is installed."""

from __future__ import annotations

import base64
import json
import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import pandas as pd
import pytest
from click.testing import CliRunner

from stiff import CASES_DIR
from stiff.cli import cli

CASE_FILES = sorted(CASES_DIR.glob("*.toml"))


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.images: list[str] = []
        self.headings: list[str] = []
        self.scripts = 0
        self.links: list[str] = []
        self._in_h2 = False

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = dict(attrs)
        if tag == "img":
            self.images.append(a.get("src") or "")
        if tag == "script":
            self.scripts += 1
        if tag == "link":
            self.links.append(a.get("href") or "")
        self._in_h2 = tag == "h2"

    def handle_endtag(self, tag: str) -> None:
        if tag == "h2":
            self._in_h2 = False

    def handle_data(self, data: str) -> None:
        if self._in_h2:
            self.headings.append(data)


@pytest.fixture(scope="module", params=CASE_FILES, ids=[p.stem for p in CASE_FILES])
def report_dir(request: pytest.FixtureRequest, tmp_path_factory: pytest.TempPathFactory) -> Path:
    path: Path = request.param
    out = tmp_path_factory.mktemp(path.stem)
    result = CliRunner().invoke(cli, ["check", str(path), "--out", str(out)])
    assert result.exit_code in (0, 1), result.output
    assert f"report: {out / 'report.html'}" in result.output
    return out


def test_html_is_complete_and_self_contained(report_dir: Path) -> None:
    text = (report_dir / "report.html").read_text(encoding="utf-8")
    parser = _Collect()
    parser.feed(text)
    parser.close()
    assert parser.scripts == 0 and not parser.links  # nothing to run, nothing to fetch
    assert len(parser.images) >= 6
    for src in parser.images:
        assert src.startswith("data:image/png;base64,")
        png = base64.b64decode(src.split(",", 1)[1])
        assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 2000
    for heading in ("Cautions", "Materials used, with sources", "Governing checks, worst first",
                    "Required factors"):
        assert heading in parser.headings
    assert "qualified review" in text and "proof-test" in text
    assert "http://" not in text and "https://" not in text


def test_markdown_has_its_images_beside_it(report_dir: Path) -> None:
    text = (report_dir / "report.md").read_text(encoding="utf-8")
    images = [line.split("](", 1)[1].rstrip(")") for line in text.splitlines()
              if line.startswith("![")]
    assert len(images) >= 6
    for rel in images:
        assert (report_dir / rel).stat().st_size > 2000
    assert "## Cautions" in text


def test_csv_tables_agree_with_results_json(report_dir: Path) -> None:
    data = json.loads((report_dir / "results.json").read_text(encoding="utf-8"))
    cases = pd.read_csv(report_dir / "load_cases.csv")
    assert list(cases["load_case"]) == [lc["name"] for lc in data["load_cases"]]
    for row, lc in zip(cases.itertuples(), data["load_cases"], strict=True):
        assert row.foot_deflection_y_mm == pytest.approx(lc["foot_deflection_mm"][1], rel=1e-9)
    checks = pd.read_csv(report_dir / "checks.csv")
    assert len(checks) == len(data["checks"])
    assert list(checks["status"]) == [c["status"] for c in data["checks"]]
    materials = pd.read_csv(report_dir / "materials.csv")
    assert set(materials["confidence"]) <= {"confirmed", "derived", "memory", "practice",
                                            "measured"}
    assert materials["source"].str.len().min() > 0
    shares = pd.read_csv(report_dir / "compliance.csv")
    vertical = shares[shares["load"] == "vertical"]["share"].sum()
    assert vertical == pytest.approx(1.0, rel=1e-9)


def _chromium() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome"):
        found = shutil.which(name)
        if found:
            return found
    return None


@pytest.mark.skipif(_chromium() is None, reason="no headless browser installed")
def test_report_renders_in_a_headless_browser(report_dir: Path, tmp_path: Path) -> None:
    shot = tmp_path / "shot.png"
    browser = _chromium()
    assert browser is not None
    run = subprocess.run(
        [browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
         "--no-first-run", "--disable-background-networking", "--disable-component-update",
         "--disable-sync", f"--user-data-dir={tmp_path / 'profile'}",
         "--window-size=1200,900", f"--screenshot={shot}",
         (report_dir / "report.html").as_uri()],
        capture_output=True, text=True, timeout=120, check=False)
    assert run.returncode == 0, run.stderr[-2000:]
    png = shot.read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    width = int.from_bytes(png[16:20], "big")
    height = int.from_bytes(png[20:24], "big")
    assert (width, height) == (1200, 900)

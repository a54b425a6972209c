"""Printed segment checks: the region stresses are the strain field times each region's modulus
(strain compatibility, the composite-beam rule σ_i = E_i ε; REFERENCES.md §7), and an upright
build meets the interlayer strength in tension."""

from __future__ import annotations

from pathlib import Path

import pytest

from stiff.case import parse_case
from stiff.check import run_check


def bar(build: str) -> str:
    return f"""
title = "printed bar pulled along its axis"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
tip = {{ x_mm = 80.0, y_mm = 0.0 }}
[parts.bar]
kind = "printed"
nodes = ["root", "tip"]
z_mm = 0.0
[parts.bar.section]
material = "PLA"
width_mm = 8.0
depth_mm = 10.0
walls = 3
infill_percent = 30
build = "{build}"
[joints.root]
kind = "fixed"
node = "root"
parts = ["body", "bar"]
[loads]
lateral_fraction = 0.0

[[loads.static]]
name = "pull"
node = "tip"
force_N = [100.0, 0.0, 0.0]
"""


def _pull_checks(build: str) -> list[object]:
    result = run_check(parse_case(bar(build), Path("bar.toml")))
    return [c for c in result.checks if c.load_case == "pull"]


def test_axial_pull_gives_each_region_its_modulus_times_the_strain() -> None:
    result = run_check(parse_case(bar("flat"), Path("bar.toml")))
    ps = result.built.beam_printed[0]
    assert ps is not None
    strain = 100.0 / ps.beam.EA
    walls = next(c for c in result.checks if c.load_case == "pull" and "wall" in c.mode
                 and "tension" in c.mode)
    wall = ps.region("wall")
    assert wall is not None
    assert walls.demand == pytest.approx(wall.E_MPa * strain, rel=1e-9)


def test_upright_build_meets_the_interlayer_strength() -> None:
    flat = min(_pull_checks("flat"), key=lambda c: c.safety_factor)  # type: ignore[attr-defined]
    upright = min(_pull_checks("upright"), key=lambda c: c.safety_factor)  # type: ignore[attr-defined]
    assert "split along layers" in upright.mode  # type: ignore[attr-defined]
    assert upright.safety_factor < flat.safety_factor  # type: ignore[attr-defined]
    assert upright.required_factor > flat.required_factor  # type: ignore[attr-defined]

"""Small cases for the lug and pin checks: TOML text, solved once each and cached.

``hanging_link``: a printed PLA link hangs from a servo on the body (driven joint, pin 5 mm) and
a static load pulls its tip; the link's lug at the pin is 8 mm thick, 20 mm wide, with a 5 mm
hole. The body sits at z = 0, the link at z = 10 mm.

``clevis``: two printed plates, fixed to the body, hold a printed link between them on one pin
(a three-part clevis); a pinned carbon strut from the link's tip to the body, in its own plane
(z = 12 mm), makes it a frame.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

from stiff.case import parse_case
from stiff.check import run_check
from stiff.checks.context import CheckContext, LoadSet
from stiff.loads import LoadCaseResult
from stiff.materials import load_library

LIB = load_library()


def hanging_link(build: str = "flat", infill_percent: float = 100.0, clearance_mm: float = 0.0,
                 edge_mm: float = 6.0, force_N: tuple[float, float, float] = (0.0, -500.0, 0.0),
                 lug: bool = True, walls: int = 3, width_mm: float = 20.0) -> str:
    """TOML of the hanging link (see the module docstring)."""
    lug_line = (f"lugs.link = {{ hole_mm = 5.0, thickness_mm = 8.0, width_mm = {width_mm}, "
                f"edge_mm = {edge_mm} }}" if lug else "")
    fx, fy, fz = force_N
    return f"""
title = "hanging link"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
tip = {{ x_mm = 0.0, y_mm = -100.0 }}
[parts.link]
kind = "printed"
nodes = ["root", "tip"]
z_mm = 10.0
[parts.link.section]
material = "PLA"
width_mm = 8.0
depth_mm = {width_mm}
walls = {walls}
infill_percent = {infill_percent}
build = "{build}"
[joints.root]
kind = "driven"
node = "root"
parts = ["body", "link"]
actuator = "servo"
pin_diameter_mm = 5.0
clearance_mm = {clearance_mm}
{lug_line}
[actuators.servo]
stall_torque_Nm = 1.0
proportional_band_deg = 3.0
angle_deg = 0.0
[[loads.static]]
name = "pull"
node = "tip"
part = "link"
force_N = [{fx}, {fy}, {fz}]
"""


CLEVIS = """
title = "clevis"
foot = "tip"
[body]
nodes = ["root", "anchor"]
[nodes]
root = { x_mm = 0.0, y_mm = 0.0 }
mid = { x_mm = 0.0, y_mm = -60.0 }
tip = { x_mm = 0.0, y_mm = -120.0 }
anchor = { x_mm = 60.0, y_mm = -120.0 }
[parts.left]
kind = "printed"
nodes = ["root", "mid"]
z_mm = -8.0
section = { material = "PLA", width_mm = 4.0, depth_mm = 16.0, infill_percent = 100 }
[parts.right]
kind = "printed"
nodes = ["root", "mid"]
z_mm = 8.0
section = { material = "PLA", width_mm = 4.0, depth_mm = 16.0, infill_percent = 100 }
[parts.inner]
kind = "printed"
nodes = ["mid", "tip"]
z_mm = 0.0
section = { material = "PLA", width_mm = 8.0, depth_mm = 16.0, infill_percent = 100 }
[parts.strut]
kind = "tube"
nodes = ["tip", "anchor"]
z_mm = 12.0
material = "CF-pultruded"
size = "8x6"
[joints.root]
kind = "fixed"
node = "root"
parts = ["left", "body", "right"]
[joints.mid]
kind = "pin"
node = "mid"
parts = ["left", "inner", "right"]
pin_diameter_mm = 4.0
[joints.tip]
kind = "pin"
node = "tip"
parts = ["inner", "strut"]
pin_diameter_mm = 4.0
[joints.anchor]
kind = "pin"
node = "anchor"
parts = ["body", "strut"]
pin_diameter_mm = 4.0
[[loads.static]]
name = "pull"
node = "tip"
part = "inner"
force_N = [0.0, -400.0, 0.0]
"""


@cache
def solved(text: str) -> CheckContext:
    """The check context of a case given as TOML text (solved once per text)."""
    result = run_check(parse_case(text, Path("test.toml"), LIB))
    return CheckContext(result.case, result.built, result.load_cases)


def load_case(ctx: CheckContext, name: str = "pull") -> LoadCaseResult:
    """One solved load case of a context."""
    return next(r for r in ctx.results if isinstance(r, LoadCaseResult) and r.name == name)


def load_set(ctx: CheckContext, name: str = "pull") -> LoadSet:
    """One load set (B = 1) of a context."""
    return next(s for s in ctx.loads if s.name == name)

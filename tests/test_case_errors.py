"""Every mistake in a case file gives one line naming the file, key path, line and why.

A catalogue of broken case files, each one small edit of the valid demo
(``cases/five_bar_leg.toml``), run through ``stiff check``: exit code 2, one line starting
``stiff: error:`` with the file, the key path and (where the key can be found in the text) its
line, no traceback, and nothing written. Then hypothesis throws garbage at the same command: it
never gives a traceback, and every failure is one such line.

The demo is edited as a dict (``tomllib`` to read, a small writer below to write it back; the
writer records the line of every key it writes, which is what the reported line is checked
against) or as text, for mistakes TOML itself refuses.
"""

from __future__ import annotations

import os
import re
import traceback
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
from click.testing import CliRunner, Result
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.cli import cli
from tests.case_toml import (
    Edit,
    demo,
    drop,
    dump,
    edited,
    edits,
    put,
    rename,
)

DEMO_PATH = CASES_DIR / "five_bar_leg.toml"
DEMO_TEXT = DEMO_PATH.read_text(encoding="utf-8")
PREFIX = "stiff: error: "

SPRING = {"ends": {"body": "hip_a", "crank_b": "elbow_b"}, "rate_N_per_mm": [0.5],
          "free_length_mm": [60.0]}
SERVO = {"stall_torque_Nm": 1.0, "proportional_band_deg": 3.0, "angle_deg": 0.0}
SECTION = {"material": "PETG", "width_mm": 8.0, "depth_mm": 10.0}
SOCKET = {"tube": "link_a", "engagement_mm": 15.0, "fixing": "bonded"}

# ---------------------------------------------------------------------------------------------
# The catalogue


@dataclass(frozen=True)
class Mistake:
    """One broken case: how it is made, the key path it must name and what it must say.

    ``edit`` is a dict edit, or ``(pattern, replacement)``: a regular expression replaced once
    in the demo's text. ``line``: for a dict edit, True when the key path is written in the
    file (its line must be reported); for a text edit, a pattern whose last match in the edited
    text is on the reported line.
    """

    id: str
    edit: Edit | tuple[str, str]
    key: str
    why: str
    line: bool | str = True


#: The rest of a table's lines, up to the next header, in a text edit's pattern.
_IN_TABLE = r"(?:(?!\[).*\n)*?"
CRANK = "parts.crank_a"
CSEC = "parts.crank_a.section"
LUG = "joints.elbow_a.lugs.crank_a"
CATALOGUE = [
    # keys and types
    Mistake("unknown-key", rename("joints.hip_b.clearance_mm", "clearence_mm"),
            "joints.hip_b.clearence_mm", "did you mean 'clearance_mm'?"),
    Mistake("unknown-key-in-section", rename(f"{CSEC}.infill_percent", "infil_percent"),
            f"{CSEC}.infil_percent", "did you mean 'infill_percent'?"),
    Mistake("unknown-top-level-key", put("fot", "foot"), "fot", "did you mean 'foot'?"),
    Mistake("missing-required-key", drop(f"{CRANK}.z_mm"), CRANK,
            "missing required key 'z_mm'"),
    Mistake("missing-stall-torque", drop("actuators.servo_a.stall_torque_Nm"),
            "actuators.servo_a", "missing required key 'stall_torque_Nm'"),
    Mistake("missing-title", drop("title"), "title", "missing required key 'title'", False),
    Mistake("text-for-number", put("nodes.elbow_a.x_mm", "-65 mm"), "nodes.elbow_a.x_mm",
            "must be a number, got text"),
    Mistake("text-for-torque", put("actuators.servo_b.stall_torque_Nm", "2"),
            "actuators.servo_b.stall_torque_Nm", "must be a number, got text"),
    Mistake("number-for-list", put("body.nodes", 3), "body.nodes", "must be a non-empty list"),
    Mistake("number-for-part-nodes", put(f"{CRANK}.nodes", 2.5), f"{CRANK}.nodes",
            "must be a non-empty list"),
    Mistake("bool-for-number", put(f"{CSEC}.walls", True), f"{CSEC}.walls",
            "must be a number, got true/false"),
    Mistake("fraction-for-count", put(f"{CSEC}.walls", 3.5), f"{CSEC}.walls",
            "must be a whole number"),
    Mistake("table-for-text", put("foot", {"node": "foot"}), "foot", "must be text, got a table"),
    Mistake("infinite-number", put("nodes.foot.y_mm", float("inf")), "nodes.foot.y_mm",
            "must be a finite number"),
    # sizes
    Mistake("zero-width", put(f"{CSEC}.width_mm", 0.0), f"{CSEC}.width_mm",
            "must be greater than 0, got 0"),
    Mistake("negative-pin", put("joints.foot.pin_diameter_mm", -3.0),
            "joints.foot.pin_diameter_mm", "must be greater than 0, got -3"),
    Mistake("negative-clearance", put("joints.hip_b.clearance_mm", -0.05),
            "joints.hip_b.clearance_mm", "must be at least 0"),
    Mistake("inner-not-below-outer", edits(drop("parts.link_a.size"),
                                           put("parts.link_a.od_mm", 6.0),
                                           put("parts.link_a.id_mm", 6.0)),
            "parts.link_a.id_mm", "inner diameter 6 mm must be less than the outer diameter"),
    Mistake("tube-without-size", drop("parts.link_a.size"), "parts.link_a", "give the tube's"),
    Mistake("lug-hole-not-below-width", put(f"{LUG}.hole_mm", 40.0), f"{LUG}.hole_mm",
            "hole 40 mm must be smaller than the lug width"),
    Mistake("lug-hole-below-pin", edits(put(f"{LUG}.hole_mm", 2.9),
                                        put("joints.elbow_a.pin_diameter_mm", 3.0)),
            f"{LUG}.hole_mm", "hole 2.9 mm is smaller than the pin 3 mm"),
    Mistake("lug-edge-too-small", put(f"{LUG}.edge_mm", 0.001), f"{LUG}.edge_mm",
            "edge distance must exceed half the hole"),
    Mistake("lug-on-a-tube", put("joints.socket_a_top.lugs.link_a",
                                 {"hole_mm": 3.1, "thickness_mm": 6.0, "width_mm": 8.0,
                                  "edge_mm": 4.0}),
            "joints.socket_a_top.lugs.link_a", "not a printed part"),
    Mistake("lug-on-a-part-not-joined", put("joints.elbow_a.lugs.crank_b",
                                            {"hole_mm": 3.1, "thickness_mm": 6.0,
                                             "width_mm": 8.0, "edge_mm": 4.0}),
            "joints.elbow_a.lugs.crank_b", "does not join a part 'crank_b'"),
    Mistake("infill-over-100", put(f"{CSEC}.infill_percent", 120), f"{CSEC}.infill_percent",
            "must be at most 100, got 120"),
    Mistake("unknown-pattern", put(f"{CSEC}.pattern", "hexagons"), f"{CSEC}.pattern",
            "'hexagons' is not one of grid, grid_45, triangles, honeycomb, gyroid"),
    Mistake("unknown-build", put(f"{CSEC}.build", "sideways"), f"{CSEC}.build",
            "is not one of flat, on_edge, upright"),
    Mistake("round-without-diameter", put(f"{CSEC}.shape", "round"), CSEC,
            "a round section needs 'diameter_mm'"),
    Mistake("printed-without-section", drop(f"{CSEC}"), CRANK, "needs a [section]"),
    # materials and sizes from the library
    Mistake("unknown-printed-material", put(f"{CSEC}.material", "PTEG"), f"{CSEC}.material",
            "unknown printed material 'PTEG'; did you mean 'PETG'? (defined: PLA, PETG"),
    Mistake("unknown-tube-material", put("parts.link_a.material", "carbon"),
            "parts.link_a.material", "unknown tube material 'carbon'"),
    Mistake("material-in-lower-case", put(f"{CSEC}.material", "petg"), f"{CSEC}.material",
            "unknown printed material 'petg'; did you mean 'PETG'?"),
    Mistake("printed-material-on-a-tube", put("parts.link_a.material", "PETG"),
            "parts.link_a.material", "'PETG' is a printed material, not a tube material "
                                     "(tube materials: CF-pultruded, CF-roll-wrapped"),
    Mistake("tube-material-for-a-pin", put("joints.foot.pin_material", "CF-pultruded"),
            "joints.foot.pin_material", "'CF-pultruded' is a tube material, not a pin material"),
    Mistake("unknown-pin-material", put("joints.hip_a.pin_material", "brass"),
            "joints.hip_a.pin_material", "unknown pin material 'brass'"),
    Mistake("unknown-adhesive", put("joints.socket_a_top.socket.adhesive", "glue"),
            "joints.socket_a_top.socket.adhesive", "unknown adhesive 'glue'"),
    Mistake("unknown-tube-size", put("parts.link_b.size", "6x5"), "parts.link_b.size",
            "unknown tube size '6x5'"),
    Mistake("missing-materials-file", put("materials_file", "no_such_materials.csv"),
            "materials_file", "no such file"),
    # names
    Mistake("node-not-defined", put(f"{CRANK}.nodes", ["hip_a", "knee"]), f"{CRANK}.nodes[1]",
            "unknown node 'knee'"),
    Mistake("joint-node-not-defined", put("joints.foot.node", "toe"), "joints.foot.node",
            "unknown node 'toe'"),
    Mistake("node-named-body", put("nodes.body", {"x_mm": 0.0, "y_mm": 10.0}), "nodes.body",
            "reserved for the chassis"),
    Mistake("part-with-one-node", put(f"{CRANK}.nodes", ["hip_a"]), f"{CRANK}.nodes",
            "at least two different nodes"),
    Mistake("nodes-at-one-place", put("nodes.elbow_a", {"x_mm": -35.0, "y_mm": 0.0}),
            f"{CRANK}.nodes", "at the same place"),
    Mistake("joint-part-not-at-node", put("joints.elbow_a.parts", ["crank_a", "link_a"]),
            "joints.elbow_a.parts[1]", "part 'link_a' does not meet node 'elbow_a'"),
    Mistake("joint-unknown-part", put("joints.elbow_a.parts", ["crank_a", "crank_c"]),
            "joints.elbow_a.parts[1]", "unknown part 'crank_c'; did you mean"),
    Mistake("joint-one-part", put("joints.foot.parts", ["cap_a_bottom"]), "joints.foot.parts",
            "at least two different parts"),
    Mistake("body-joint-off-body", put("joints.foot.parts", ["body", "cap_a_bottom"]),
            "joints.foot.parts[0]", "the body does not reach node 'foot'"),
    Mistake("structure-in-pieces", edits(drop("joints.foot"), drop("joints.socket_a_bottom")),
            "parts.cap_a_bottom",
            "the structure is in pieces: cap_a_bottom is not joined to the body"),
    Mistake("part-never-joined", put("parts.spare", {"kind": "printed",
                                                     "nodes": ["elbow_a", "foot"],
                                                     "z_mm": 30.0, "section": SECTION}),
            "parts.spare", "not joined to the body"),
    Mistake("no-body", drop("body"), "body", "missing required key 'body'", False),
    Mistake("no-body-nodes", put("body.nodes", []), "body.nodes", "must be a non-empty list"),
    Mistake("body-node-not-defined", put("body.nodes", ["hip_a", "hip_c"]), "body.nodes[1]",
            "unknown node 'hip_c'"),
    Mistake("no-foot", drop("foot"), "foot", "missing required key 'foot'", False),
    Mistake("foot-not-defined", put("foot", "toe"), "foot", "unknown node 'toe'"),
    Mistake("foot-on-no-part", edits(put("nodes.toe", {"x_mm": 0.0, "y_mm": -170.0}),
                                     put("foot", "toe")),
            "foot", "no part carries the foot node 'toe'"),
    # actuators and joints
    Mistake("driven-without-actuator", drop("joints.hip_a.actuator"), "joints.hip_a",
            "a driven joint needs 'actuator'"),
    Mistake("driven-unknown-actuator", put("joints.hip_a.actuator", "servo_c"),
            "joints.hip_a.actuator", "unknown actuator 'servo_c'"),
    Mistake("actuator-drives-nothing", put("actuators.servo_c", SERVO), "actuators.servo_c",
            "must drive exactly one joint (it drives 0)"),
    Mistake("actuator-drives-two", put("joints.hip_b.actuator", "servo_a"), "actuators.servo_a",
            "must drive exactly one joint (it drives 2: hip_a, hip_b)"),
    Mistake("actuator-on-a-pin", put("joints.elbow_a.actuator", "servo_a"),
            "joints.elbow_a.actuator", "only a driven joint has an actuator"),
    Mistake("pin-without-diameter", drop("joints.foot.pin_diameter_mm"), "joints.foot",
            "needs 'pin_diameter_mm'"),
    Mistake("actuator-without-stiffness", drop("actuators.servo_a.proportional_band_deg"),
            "actuators.servo_a", "give 'stiffness_Nm_per_deg'"),
    Mistake("actuator-range-reversed", edits(put("actuators.servo_a.angle_min_deg", -10.0),
                                             put("actuators.servo_a.angle_max_deg", -20.0)),
            "actuators.servo_a.angle_max_deg", "must exceed angle_min_deg (-10°), got -20°"),
    Mistake("socket-on-a-pin", put("joints.elbow_a.socket", SOCKET), "joints.elbow_a.socket",
            "a socket belongs to a fixed joint"),
    Mistake("socket-tube-not-joined", put("joints.socket_b_top.socket.tube", "link_a"),
            "joints.socket_b_top.socket.tube", "unknown joined part 'link_a'"),
    Mistake("socket-unknown-fixing", put("joints.socket_a_top.socket.fixing", "glued"),
            "joints.socket_a_top.socket.fixing", "is not one of bonded, clamped"),
    # springs
    Mistake("spring-end-off-part", put("springs.assist", {**SPRING,
                                                          "ends": {"body": "hip_a",
                                                                   "crank_b": "foot"}}),
            "springs.assist.ends.crank_b", "part 'crank_b' has no node 'foot'"),
    Mistake("spring-end-off-body", put("springs.assist", {**SPRING,
                                                          "ends": {"body": "elbow_a",
                                                                   "crank_b": "elbow_b"}}),
            "springs.assist.ends.body", "node 'elbow_a' is not a body node"),
    Mistake("spring-counts-differ", put("springs.assist", {**SPRING,
                                                           "rate_N_per_mm": [0.5, 0.8]}),
            "springs.assist.free_length_mm", "one free length per spring rate"),
    Mistake("spring-one-end", put("springs.assist", {**SPRING, "ends": {"body": "hip_a"}}),
            "springs.assist.ends", "a spring has two ends"),
    Mistake("spring-zero-rate", put("springs.assist", {**SPRING, "rate_N_per_mm": [0.0]}),
            "springs.assist.rate_N_per_mm", "must be greater than 0"),
    # pose
    Mistake("pose-out-of-range", edits(put("actuators.servo_a.angle_min_deg", -30.0),
                                       put("actuators.servo_a.angle_max_deg", 30.0),
                                       put("pose.angles_deg.servo_a", 45.0)),
            "pose.angles_deg.servo_a", "45° is outside the actuator's range (-30° to 30°)"),
    Mistake("pose-unknown-actuator", put("pose.angles_deg.servo_c", 0.0),
            "pose.angles_deg.servo_c", "unknown actuator 'servo_c'"),
    Mistake("pose-angles-and-foot", put("pose.foot_mm", [0.0, -160.0]), "pose",
            "give either 'angles_deg' or 'foot_mm', not both"),
    Mistake("pose-foot-three-numbers", edits(drop("pose.angles_deg"),
                                             put("pose.foot_mm", [0.0, -160.0, 0.0])),
            "pose.foot_mm", "must be two numbers"),
    Mistake("pose-angle-as-text", put("pose.angles_deg.servo_b", "-5"),
            "pose.angles_deg.servo_b", "must be a number, got text"),
    # loads and targets
    Mistake("zero-legs", put("loads.legs", 0), "loads.legs", "must be at least 1"),
    Mistake("negative-target", put("targets.max_foot_deflection_mm", -1.0),
            "targets.max_foot_deflection_mm", "must be greater than 0"),
    # numbers no design means
    Mistake("number-too-large", put(f"{CRANK}.z_mm", 1e300), f"{CRANK}.z_mm",
            "is too large: numbers in a case stay within ±1e+09, got 1e+300"),
    Mistake("whole-number-too-large", put(f"{CSEC}.walls", 10**400), f"{CSEC}.walls",
            "is too large"),
    Mistake("size-too-small", put(f"{LUG}.thickness_mm", 1e-300), f"{LUG}.thickness_mm",
            "is too small to mean anything"),
    Mistake("not-a-number-in-a-point", edits(drop("pose.angles_deg"),
                                             put("pose.foot_mm", [float("nan"), -160.0])),
            "pose.foot_mm", "must be a finite number, got nan"),
    # more structure
    Mistake("segment-not-a-table", put(f"{CRANK}.segments", {"hip_a-elbow_a": 5}),
            f"{CRANK}.segments.hip_a-elbow_a", "must be a table, got a number"),
    Mistake("segment-off-the-part", put(f"{CRANK}.segments", {"hip_a-foot": {}}),
            f"{CRANK}.segments.hip_a-foot", "a segment is named 'a-b' after two of the part's"),
    Mistake("foot-on-a-body-node", put("foot", "hip_a"), "foot",
            "the foot node 'hip_a' is a body node"),
    Mistake("parts-joined-twice", put("joints.extra", {"kind": "pin", "node": "foot",
                                                       "parts": ["cap_b_bottom", "cap_a_bottom"],
                                                       "pin_diameter_mm": 3.0}),
            "joints.extra.parts", "cap_b_bottom and cap_a_bottom are already joined at node "
                                  "'foot' (joints.foot)"),
    Mistake("spring-ends-at-one-node", put("springs.assist", {**SPRING,
                                                              "ends": {"body": "hip_a",
                                                                       "crank_a": "hip_a"}}),
            "springs.assist.ends", "both ends are at node 'hip_a'"),
    Mistake("own-material-incomplete", put("materials.PETG-mine", {"kind": "printed",
                                                                   "E_xy_MPa": 2000.0}),
            "materials.PETG-mine", "missing required key '"),
    Mistake("own-material-kind-unknown", put("materials.PETG-mine", {"kind": "plastic"}),
            "materials.PETG-mine.kind", "'plastic' is not one of printed, tube"),
    Mistake("materials-file-name-too-long", put("materials_file", "m" * 5000), "materials_file",
            "cannot read"),
    # what TOML itself refuses
    Mistake("invalid-syntax", (rf"(\[parts\.crank_a\]\n{_IN_TABLE}z_mm = [^\n]*)", r"\1 mm"),
            "parts.crank_a.z_mm", "not valid TOML", r"z_mm = \S+ mm"),
    Mistake("unclosed-header", (r"\[parts\.link_a\]", "[parts.link_a"), "parts.link_a",
            "not valid TOML", r"\[parts\.link_a\n"),
    Mistake("unclosed-string", (r'(?m)^(title = "[^"\n]*)"', r"\1"), "title",
            "not valid TOML", "^title = "),
    Mistake("number-of-thousands-of-digits", (r"(?m)^legs = \d+$", "legs = " + "9" * 5000),
            "loads.legs", "a number with thousands of digits", r"^legs = 9"),
    Mistake("duplicate-part", (r"\[parts\.link_b\]", "[parts.link_a]"), "parts.link_a",
            "defined twice", r"\[parts\.link_a\]"),
    Mistake("duplicate-node", (r"(?m)^hip_b = \{", "hip_a = {"), "nodes.hip_a", "defined twice",
            r"hip_a = \{"),
    Mistake("duplicate-key", (rf"(\[joints\.hip_a\]\n{_IN_TABLE}clearance_mm = [^\n]*\n)",
                              r"\1clearance_mm = 0.123\n"),
            "joints.hip_a.clearance_mm", "defined twice", r"clearance_mm = 0\.123"),
    Mistake("duplicate-lug", (r"lugs\.cap_b_top =", "lugs.crank_b ="),
            "joints.elbow_b.lugs.crank_b", "defined twice", r"lugs\.crank_b ="),
    Mistake("duplicate-joint", (r"\[joints\.elbow_b\]", "[joints.elbow_a]"), "joints.elbow_a",
            "defined twice", r"\[joints\.elbow_a\]"),
]


def _line_of(text: str, pattern: str) -> int:
    """1-based line of the last match of ``pattern`` in ``text``."""
    found = list(re.finditer(pattern, text, re.M))
    assert found, pattern
    return text.count("\n", 0, found[-1].start()) + 1


def _broken(mistake: Mistake) -> tuple[str, int | None]:
    """The broken case's text and the line its error must report (None: not checked)."""
    if isinstance(mistake.edit, tuple):
        pattern, replacement = mistake.edit
        text, count = re.subn(pattern, replacement, DEMO_TEXT, count=1)
        assert count == 1, f"the demo no longer has {pattern!r}"
        assert isinstance(mistake.line, str)
        return text, _line_of(text, mistake.line)
    data = demo()
    mistake.edit(data)
    text, where = dump(data)
    if mistake.line is True:
        key = re.sub(r"\[\d+\]", "", mistake.key)
        assert key in where, f"{key} is not written in the file"
        return text, where[key]
    return text, None


def _check(path: Path, out: Path) -> Result:
    return CliRunner().invoke(cli, ["check", str(path), "--out", str(out)])


def _no_traceback(result: Result) -> None:
    """No exception escaped the command (the runner keeps it; a user would see a traceback)."""
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        assert result.exc_info is not None
        trace = "".join(traceback.format_exception(*result.exc_info))
        pytest.fail(f"stiff check raised {result.exception!r}:\n{trace}")
    assert "Traceback" not in result.output


def _one_error_line(result: Result) -> str:
    """The single line of a failed check, after checking it is one line and no traceback."""
    _no_traceback(result)
    assert result.stdout == "", result.stdout
    lines = result.stderr.splitlines()
    assert len(lines) == 1, result.stderr
    assert lines[0].startswith(PREFIX), lines[0]
    return lines[0]


def test_the_catalogue_is_long_and_its_names_are_unique() -> None:
    ids = [m.id for m in CATALOGUE]
    assert len(ids) >= 25
    assert len(set(ids)) == len(ids)


def test_the_demo_written_back_is_still_valid(tmp_path: Path) -> None:
    """The writer's copy of the demo checks like the demo: the catalogue's edits are the only
    mistakes in its files."""
    text, where = dump(demo())
    path = tmp_path / "demo.toml"
    path.write_text(text, encoding="utf-8")
    result = CliRunner().invoke(cli, ["check", str(path), "--quiet"])
    assert result.exit_code == 0, result.output
    assert where["parts.crank_a.section.material"] == text.splitlines().index(
        'material = "PETG"') + 1


@pytest.mark.parametrize("mistake", CATALOGUE, ids=[m.id for m in CATALOGUE])
def test_a_broken_case_gives_one_line_and_exit_code_2(mistake: Mistake, tmp_path: Path) -> None:
    text, line = _broken(mistake)
    path = tmp_path / "broken.toml"
    path.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    result = _check(path, out)
    message = _one_error_line(result)
    assert result.exit_code == 2, message
    assert str(path) in message
    assert f": {mistake.key}: " in message, message
    assert mistake.why in message, message
    if line is not None:
        assert message.startswith(f"{PREFIX}{path}:{line}: "), message
    assert not out.exists()


# ---------------------------------------------------------------------------------------------
# Files that cannot be read at all


def test_a_missing_case_file(tmp_path: Path) -> None:
    path = tmp_path / "nope.toml"
    result = _check(path, tmp_path / "out")
    message = _one_error_line(result)
    assert result.exit_code == 2
    assert str(path) in message and "no such case file" in message
    assert not (tmp_path / "out").exists()


def test_a_folder_given_as_the_case(tmp_path: Path) -> None:
    folder = tmp_path / "case.toml"
    folder.mkdir()
    result = _check(folder, tmp_path / "out")
    message = _one_error_line(result)
    assert result.exit_code == 2 and str(folder) in message


def test_a_file_that_is_not_utf8(tmp_path: Path) -> None:
    path = tmp_path / "latin1.toml"
    path.write_bytes(DEMO_TEXT.replace("demo data", "démo").encode("latin-1"))
    result = _check(path, tmp_path / "out")
    message = _one_error_line(result)
    assert result.exit_code == 2
    assert str(path) in message and "UTF-8" in message
    assert not (tmp_path / "out").exists()


def test_a_case_path_the_system_refuses(tmp_path: Path) -> None:
    path = tmp_path / ("x" * 5000 + ".toml")
    result = _check(path, tmp_path / "out")
    message = _one_error_line(result)
    assert result.exit_code == 2 and "cannot read: File name too long" in message


def test_an_empty_file(tmp_path: Path) -> None:
    path = tmp_path / "empty.toml"
    path.write_text("", encoding="utf-8")
    result = _check(path, tmp_path / "out")
    message = _one_error_line(result)
    assert result.exit_code == 2 and "missing required key 'title'" in message


def test_a_name_with_a_line_break_stays_on_one_line(tmp_path: Path) -> None:
    data = demo()
    data["parts"]["crank_a"]["section"]["material"] = "PE\nTG"
    data["joints"]["hip_b"]["clear\nance_mm"] = 0.05
    text, _ = dump(data)
    path = tmp_path / "newline.toml"
    path.write_text(text, encoding="utf-8")
    result = _check(path, tmp_path / "out")
    _one_error_line(result)
    assert result.exit_code == 2


# ---------------------------------------------------------------------------------------------
# Garbage never gives a traceback


def _garbage_verdict(text: str | bytes, folder: Path) -> int:
    """Run ``stiff check`` on ``text``: exit 0-3, and a failure is one ``stiff: error:`` line.

    No ``--out`` here: writing the report of every case that happens to be valid would cost
    more than all the rest.
    """
    path = folder / "garbage.toml"
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    result = CliRunner().invoke(cli, ["check", str(path), "--quiet"])
    _no_traceback(result)
    assert result.exit_code in (0, 1, 2, 3), result.exit_code
    if result.exit_code in (2, 3):
        _one_error_line(result)
    return result.exit_code


def _paths(data: Mapping[str, Any], head: tuple[str, ...] = ()) -> list[tuple[str, ...]]:
    """Every key path in ``data``, tables and values alike."""
    out = []
    for key, value in data.items():
        out.append((*head, key))
        if isinstance(value, dict):
            out.extend(_paths(value, (*head, key)))
    return out


#: Valid additions to the demo, so that random values also land in what it does not use.
EXTRAS: dict[str, Edit] = {
    "spring": put("springs.assist", SPRING),
    "segments": put(f"{CRANK}.segments", {"hip_a-elbow_a": {"walls": 2}}),
    "measured": put("joints.foot.measured", {"radial_N_per_mm": 2000.0, "tilt_Nm_per_deg": 0.5}),
    "tube by size": edits(drop("parts.link_b.size"), put("parts.link_b.od_mm", 6.0),
                          put("parts.link_b.id_mm", 4.0)),
    "round section": put("parts.cap_b_top.section",
                         {"material": "PLA", "shape": "round", "diameter_mm": 9.0}),
    "foot target": edits(drop("pose.angles_deg"), put("pose.foot_mm", [0.0, -158.0])),
    "clamped socket": put("joints.socket_b_top.socket",
                          {"tube": "link_b", "engagement_mm": 15.0, "fixing": "clamped",
                           "clamp_force_N": 200.0, "friction": 0.3}),
}
DEMO_PATHS = sorted({p for extra in EXTRAS.values() for p in _paths(edited(extra))})
#: Key names to add where they do not belong, or where the demo leaves them out.
KEYS = ("kind", "nodes", "z_mm", "material", "size", "od_mm", "id_mm", "section", "segments",
        "node", "parts", "pin_diameter_mm", "actuator", "lugs", "socket", "measured", "ends",
        "rate_N_per_mm", "free_length_mm", "max_length_mm", "angles_deg", "foot_mm", "shape",
        "diameter_mm", "infill_percent", "walls", "static", "payload_kg", "materials_file",
        "springs", "materials", "stiffness_Nm_per_deg", "angle_min_deg", "legs_in_stance")
NAMES = ("hip_a", "foot", "crank_a", "link_a", "body", "servo_a", "PETG", "6x4", "elbow_b",
         "epoxy", "clamped", "round", "gyroid", "upright")
_scalars = st.one_of(
    st.sampled_from(NAMES), st.text(max_size=8), st.integers(-10**20, 10**20),
    st.floats(allow_nan=True, allow_infinity=True), st.booleans(),
    st.sampled_from([0, 0.0, -1.0, 1e-9, 1e9, 100.0, 3.1, 2, 1e-300, 1e300]),
)


def _nested(inner: st.SearchStrategy[object]) -> st.SearchStrategy[object]:
    keys = st.sampled_from(("x_mm", "y_mm", "hole_mm", *KEYS, *NAMES)) | st.text(min_size=1,
                                                                                 max_size=6)
    return st.lists(inner, max_size=4) | st.dictionaries(keys, inner, max_size=3)


_values = st.recursive(_scalars, _nested, max_leaves=6)
#: STIFF_GARBAGE_EXAMPLES=N runs N fresh random examples a test (a hunt for new failures); by
#: default each test runs a fixed draw of a few dozen, so that CI is repeatable and quick.
_HUNT = int(os.environ.get("STIFF_GARBAGE_EXAMPLES", "0"))


def _settings(examples: int) -> settings:
    return settings(max_examples=_HUNT or examples, derandomize=not _HUNT, deadline=None,
                    database=None, suppress_health_check=[HealthCheck.too_slow])


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tmp_path_factory.mktemp("garbage")


@_settings(80)
@given(st.text(alphabet=st.sampled_from('[]{}=.,"\'#\n abc_xyz019-+e')
               | st.characters(codec="utf-8"), max_size=200))
def test_random_text_gives_one_line_not_a_traceback(folder: Path, text: str) -> None:
    _garbage_verdict(text, folder)


#: Where the demo's statements start (its opening comment is left alone: damage there is
#: harmless and would only run the whole check again).
_BODY = DEMO_TEXT.encode().index(b"\ntitle") + 1


@_settings(30)
@given(st.lists(st.tuples(st.sampled_from(("flip", "delete", "insert")),
                          st.integers(_BODY, len(DEMO_TEXT.encode()) - 1),
                          st.sampled_from(b'[]{}=.,"\'#\n 0-e\x00\xff') | st.integers(0, 255)),
                min_size=1, max_size=4))
def test_damaged_demo_text_gives_one_line_not_a_traceback(
        folder: Path, damage: list[tuple[str, int, int]]) -> None:
    raw = bytearray(DEMO_TEXT.encode())
    for what, at, byte in damage:
        at = min(at, len(raw) - 1)
        if what == "flip":
            raw[at] ^= 1 << (byte % 8)
        elif what == "delete":
            del raw[at]
        else:
            raw.insert(at, byte)
    _garbage_verdict(bytes(raw), folder)


@_settings(30)
@given(st.lists(st.sampled_from(sorted(EXTRAS)), max_size=2, unique=True),
       st.lists(st.tuples(st.sampled_from(DEMO_PATHS), st.none() | st.sampled_from(KEYS),
                          st.none() | _values), min_size=1, max_size=3))
def test_random_values_in_the_demo_give_one_line_not_a_traceback(
        folder: Path, extras: list[str], changes: list[tuple[tuple[str, ...], str | None,
                                                             object]]) -> None:
    data = demo()
    for name in extras:
        EXTRAS[name](data)
    for path, new_key, value in changes:
        table: Any = data
        for key in path[:-1]:
            table = table.get(key) if isinstance(table, dict) else None
        if not isinstance(table, dict):
            continue
        if new_key is not None and isinstance(table.get(path[-1]), dict):
            table, key = table[path[-1]], new_key  # a key added inside that table
        else:
            key = path[-1]
        if value is None:
            table.pop(key, None)
        else:
            table[key] = value
    text, _ = dump(data)
    _garbage_verdict(text, folder)

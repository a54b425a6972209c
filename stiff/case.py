"""Case files (TOML) -> Case: a validated, frozen description of a linkage and its duty.

Every key carries its unit; values are converted to mm, N, MPa, N·mm, t, s, rad once, here.
Every mistake a user can make raises :class:`CaseError` naming the file, the key path, the
line where it can be found, and why. The format is documented in ``cases/README.md``.
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from stiff import units
from stiff.case_joints import material_name, read_actuators, read_joints, read_springs
from stiff.case_loads import read_loads
from stiff.case_model import (
    BODY,
    Actuator,
    Case,
    Joint,
    Part,
    Section,
    Targets,
)
from stiff.case_reader import Field, Reader, at_least, choice, positive
from stiff.errors import CaseError, MaterialError, ModelError
from stiff.factors import read_factors
from stiff.material_tables import MATERIAL_KINDS
from stiff.materials import MaterialLibrary, load_library
from stiff.printed_sections import PrintSettings
from stiff.printing import BUILD_DIRECTIONS, INFILL_PATTERNS

TOP = {
    "title": Field("str", required=True),
    "description": Field("str"),
    "foot": Field("str", required=True, help="the node whose deflection is asked"),
    "body": Field("table", required=True, help="the nodes held by the chassis"),
    "nodes": Field("table", required=True),
    "parts": Field("table", required=True),
    "joints": Field("table", required=True),
    "actuators": Field("table"),
    "springs": Field("table"),
    "pose": Field("table"),
    "loads": Field("table"),
    "targets": Field("table"),
    "materials": Field("table"),
    "materials_file": Field("str"),
    "factors": Field("table"),
}
NODE = {"x_mm": Field("float", required=True), "y_mm": Field("float", required=True)}
BODY_TABLE = {"nodes": Field("names", required=True), "z_mm": Field("float")}
SECTION = {
    "material": Field("str", required=True),
    "shape": choice("rectangle", "round"),
    "width_mm": positive(help="size out of the linkage plane (along the pins)"),
    "depth_mm": positive(help="size in the linkage plane, across the member"),
    "diameter_mm": positive(),
    "walls": Field("int", low=0),
    "line_width_mm": positive(),
    "skins": Field("int", low=0),
    "layer_height_mm": positive(),
    "infill_percent": Field("float", low=0.0, low_open=True, high=100.0),
    "pattern": choice(*INFILL_PATTERNS),
    "build": choice(*BUILD_DIRECTIONS),
}
PART = {
    "kind": choice("tube", "printed", required=True),
    "nodes": Field("names", required=True),
    "z_mm": Field("float", required=True, help="offset of the part's plane in the stack"),
    "material": Field("str"),
    "size": Field("str"),
    "od_mm": positive(),
    "id_mm": at_least(0.0),
    "section": Field("table"),
    "segments": Field("table"),
}
POSE = {"angles_deg": Field("table"), "foot_mm": Field("point")}
TARGETS = {
    "max_foot_deflection_mm": positive(),
    "max_lateral_deflection_mm": positive(),
    "min_safety_factor": positive(),
    "deflection_cases": Field("names"),
    "max_play_mm": positive(help="worst-case foot play from the pins' clearance, in the plane"),
    "max_lateral_play_mm": positive(help="worst-case foot play out of the linkage plane"),
}
MATERIAL_ENTRY_KIND = {"kind": choice(*MATERIAL_KINDS, required=True)}

#: Print settings when the case does not say (common slicer defaults for a 0.4 mm nozzle;
#: common practice).
DEFAULT_SETTINGS = PrintSettings()


def load_case(path: Path, library: MaterialLibrary | None = None) -> Case:
    """Read and validate a case file."""
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as err:
        raise CaseError(path, "(file)", f"cannot read: {err.strerror or err}") from None
    except UnicodeDecodeError:
        raise CaseError(path, "(file)", "not a UTF-8 text file") from None
    return parse_case(text, path, library)


def parse_case(text: str, path: Path | None = None,
               library: MaterialLibrary | None = None) -> Case:
    """Validate a case given as TOML text."""
    reader, data = Reader.parse(path, text)
    return read_case(reader, data, library)


def read_case(reader: Reader, data: Mapping[str, Any],
              library: MaterialLibrary | None = None) -> Case:
    """Validate a parsed case document (``data`` as :func:`tomllib.loads` gives it).

    ``reader`` holds the file's name and text, for the errors' file and line; a caller may
    change values in ``data`` (a design sweep does) and read it again through here.
    """
    path = reader.file
    top = reader.table("", data, TOP)
    lib = _library(reader, top, library or load_library(), path)
    nodes = _nodes(reader, top["nodes"])
    body = reader.table("body", top["body"], BODY_TABLE)
    body_nodes = tuple(reader.known(f"body.nodes[{i}]", n, nodes, "node")
                       for i, n in enumerate(body["nodes"]))
    parts = _parts(reader, top["parts"], nodes, lib)
    actuator_tables = reader.named_tables("actuators", top.get("actuators", {}))
    joints = read_joints(reader, top["joints"], nodes, parts, body_nodes, lib, actuator_tables)
    actuators = read_actuators(reader, actuator_tables, joints)
    springs = read_springs(reader, top.get("springs", {}), parts, body_nodes)
    foot = reader.known("foot", top["foot"], nodes, "node")
    _check_foot(reader, foot, parts, body_nodes)
    _check_connected(reader, parts, joints)
    angles, foot_target = _pose(reader, top.get("pose"), actuators)
    targets = Targets(**reader.table("targets", top.get("targets", {}), TARGETS))
    return Case(
        file=path, title=top["title"], description=top.get("description", ""),
        nodes=nodes, body_nodes=body_nodes, body_z_mm=float(body.get("z_mm", 0.0)),
        foot=foot, parts=parts, joints=joints, actuators=actuators, springs=springs,
        pose_angles_rad=angles, pose_foot_mm=foot_target,
        loads=read_loads(reader, top.get("loads", {}), {p.name: p.nodes for p in parts},
                         tuple(a.name for a in actuators)),
        targets=targets,
        factors=read_factors(reader, top.get("factors", {}), targets.min_safety_factor),
        library=lib)


def _library(reader: Reader, top: Mapping[str, Any], lib: MaterialLibrary,
             path: Path | None) -> MaterialLibrary:
    """The built-in materials plus the user's file and the case's own [materials].

    A mistake in the user's file names that file, row and column under ``materials_file``; one
    in the case's own ``[materials.NAME]`` names its key there.
    """
    if "materials_file" in top:
        extra = Path(top["materials_file"])
        if not extra.is_absolute() and path is not None:
            extra = path.parent / extra
        try:
            found = extra.is_file()
        except (OSError, ValueError) as err:  # a name too long, a NUL in it
            why = getattr(err, "strerror", None) or err
            raise reader.error("materials_file", f"cannot read {extra}: {why}") from None
        if not found:
            raise reader.error("materials_file", f"no such file: {extra}")
        try:
            lib = lib.with_file(extra)
        except MaterialError as err:
            raise reader.error("materials_file", str(err)) from None
    for name, entry in reader.named_tables("materials", top.get("materials", {})).items():
        where = f"materials.{name}"
        kind = reader.table(where, {"kind": entry.get("kind")}
                            if "kind" in entry else {}, MATERIAL_ENTRY_KIND)["kind"]
        columns = {k: v for k, v in entry.items() if k != "kind"}
        origin = f"{path or '<case>'} [{where}]"
        try:
            lib = lib.with_records(kind, {name: columns}, origin)
        except MaterialError as err:
            if err.column is None:
                raise reader.error(where, err.why) from None
            if err.why == "missing":  # the library's words for a record, said as for a key
                raise reader.error(where, f"missing required key '{err.column}'") from None
            why = f"unknown key '{err.column}'" if err.why == "unknown key" else err.why
            raise reader.error(f"{where}.{err.column}", why) from None
    return lib


def _nodes(reader: Reader, data: object) -> dict[str, tuple[float, float]]:
    out: dict[str, tuple[float, float]] = {}
    for name, entry in reader.named_tables("nodes", data).items():
        if name == BODY:
            raise reader.error(f"nodes.{name}", f"'{BODY}' is reserved for the chassis")
        values = reader.table(f"nodes.{name}", entry, NODE)
        out[name] = (values["x_mm"], values["y_mm"])
    if not out:
        raise reader.error("nodes", "no nodes defined")
    return out


def _section(
    reader: Reader, where: str, values: Mapping[str, Any], lib: MaterialLibrary
) -> Section:
    """A printed section from checked values (material known, sizes consistent)."""
    name = material_name(reader, f"{where}.material", values["material"], lib, ("printed",),
                     "printed material")
    shape = values.get("shape", "round" if "diameter_mm" in values else "rectangle")
    if shape == "round":
        if "diameter_mm" not in values:
            raise reader.error(where, "a round section needs 'diameter_mm'")
        width = depth = values["diameter_mm"]
    else:
        for key in ("width_mm", "depth_mm"):
            if key not in values:
                raise reader.error(where, f"a rectangular section needs '{key}'")
        width, depth = values["width_mm"], values["depth_mm"]
    d = DEFAULT_SETTINGS
    settings = PrintSettings(
        walls=values.get("walls", d.walls),
        line_width_mm=values.get("line_width_mm", d.line_width_mm),
        skins=values.get("skins", d.skins),
        layer_height_mm=values.get("layer_height_mm", d.layer_height_mm),
        infill=values.get("infill_percent", d.infill * 100.0) / 100.0,
        pattern=values.get("pattern", d.pattern),
        build=values.get("build", d.build),
    )
    try:
        settings.checked()
    except ModelError as err:
        raise reader.error(where, str(err).removeprefix("section: ")) from None
    return Section(material=name, shape=shape, width_mm=width, depth_mm=depth, settings=settings)


def _segments(reader: Reader, where: str, nodes: tuple[str, ...],
              data: Mapping[str, Any] | None) -> tuple[tuple[tuple[str, str], ...], dict[str, Any]]:
    """Node pairs of a part's members: consecutive nodes, or the keys of [segments]."""
    if not data:
        return tuple(itertools.pairwise(nodes)), {}
    pairs = []
    for key in reader.named_tables(f"{where}.segments", data):
        ends = key.split("-")
        if len(ends) != 2 or not all(e in nodes for e in ends):
            raise reader.error(f"{where}.segments.{key}",
                               "a segment is named 'a-b' after two of the part's nodes")
        pairs.append((ends[0], ends[1]))
    return tuple(pairs), dict(data)


def _parts(reader: Reader, data: object, nodes: Mapping[str, tuple[float, float]],
           lib: MaterialLibrary) -> tuple[Part, ...]:
    out = []
    for name, entry in reader.named_tables("parts", data).items():
        where = f"parts.{name}"
        if name == BODY:
            raise reader.error(where, f"'{BODY}' is reserved for the chassis")
        v = reader.table(where, entry, PART)
        part_nodes = tuple(reader.known(f"{where}.nodes[{i}]", n, nodes, "node")
                           for i, n in enumerate(v["nodes"]))
        if len(part_nodes) < 2 or len(set(part_nodes)) != len(part_nodes):
            raise reader.error(f"{where}.nodes", "a part needs at least two different nodes")
        segs, seg_tables = _segments(reader, where, part_nodes, v.get("segments"))
        for a, b in segs:
            if nodes[a] == nodes[b]:
                raise reader.error(f"{where}.nodes", f"nodes {a} and {b} are at the same place")
        if v["kind"] == "tube":
            out.append(_tube_part(reader, where, name, v, part_nodes, segs, lib))
        else:
            if "section" not in v and not seg_tables:
                raise reader.error(where, "a printed part needs a [section]")
            base = v.get("section", {})
            sections = []
            for a, b in segs:
                key = f"{a}-{b}"
                over = seg_tables.get(key, {})
                merged = {**base, **over}
                spot = f"{where}.segments.{key}" if over else f"{where}.section"
                sections.append(_section(reader, spot, reader.table(spot, merged, SECTION), lib))
            out.append(Part(name=name, kind="printed", nodes=part_nodes, z_mm=v["z_mm"],
                            segments=segs, sections=tuple(sections)))
    if not out:
        raise reader.error("parts", "no parts defined")
    return tuple(out)


def _tube_part(reader: Reader, where: str, name: str, v: Mapping[str, Any],
               part_nodes: tuple[str, ...], segs: tuple[tuple[str, str], ...],
               lib: MaterialLibrary) -> Part:
    if "material" not in v:
        raise reader.error(where, "missing required key 'material' (the tube material)")
    material = material_name(reader, f"{where}.material", v["material"], lib, ("tube", "metal"),
                         "tube material")
    if "size" in v:
        size_name = reader.known(f"{where}.size", v["size"],
                                 tuple(s.name for s in lib.tube_sizes), "tube size")
        size = lib.tube_size(size_name)
        od, inner = size.od_mm, size.id_mm
    elif "od_mm" in v and "id_mm" in v:
        od, inner = v["od_mm"], v["id_mm"]
    else:
        raise reader.error(where, "give the tube's 'size' (from the tube-size table) or both "
                                  "'od_mm' and 'id_mm'")
    if not inner < od:
        raise reader.error(f"{where}.id_mm", f"inner diameter {inner:g} mm must be less than the "
                                             f"outer diameter {od:g} mm")
    return Part(name=name, kind="tube", nodes=part_nodes, z_mm=v["z_mm"], segments=segs,
                tube_material=material, od_mm=od, id_mm=inner)


def _check_foot(reader: Reader, foot: str, parts: tuple[Part, ...],
                body_nodes: tuple[str, ...]) -> None:
    if not any(foot in p.nodes for p in parts):
        raise reader.error("foot", f"no part carries the foot node '{foot}'")
    if foot in body_nodes:
        raise reader.error("foot", f"the foot node '{foot}' is a body node: the chassis holds "
                                   "it, so it cannot give under a load")


def _check_connected(reader: Reader, parts: tuple[Part, ...], joints: tuple[Joint, ...]) -> None:
    """Every part must be joined, through other parts, to the body."""
    reached = {BODY}
    changed = True
    while changed:
        changed = False
        for j in joints:
            if reached.intersection(j.parts) and not reached.issuperset(j.parts):
                reached.update(j.parts)
                changed = True
    loose = [p.name for p in parts if p.name not in reached]
    if loose:
        verb = "is" if len(loose) == 1 else "are"
        raise reader.error(f"parts.{loose[0]}", f"the structure is in pieces: "
                                                f"{', '.join(loose)} {verb} not joined to the "
                                                "body through any joint")


def _pose(reader: Reader, data: object, actuators: tuple[Actuator, ...]
          ) -> tuple[dict[str, float] | None, tuple[float, float] | None]:
    if data is None:
        return None, None
    v = reader.table("pose", data, POSE)
    if "angles_deg" in v and "foot_mm" in v:
        raise reader.error("pose", "give either 'angles_deg' or 'foot_mm', not both")
    if "foot_mm" in v:
        return None, v["foot_mm"]
    names = {a.name: a for a in actuators}
    angles: dict[str, float] = {}
    for name, value in v.get("angles_deg", {}).items():
        spot = f"pose.angles_deg.{name}"
        reader.known(spot, name, names, "actuator")
        deg = reader.value(spot, value, Field("float"))
        a = names[name]
        rad = units.deg_to_rad(deg)
        if (a.angle_min_rad is not None and rad < a.angle_min_rad - 1e-12) or (
                a.angle_max_rad is not None and rad > a.angle_max_rad + 1e-12):
            lo = "" if a.angle_min_rad is None else f"{units.rad_to_deg(a.angle_min_rad):g}°"
            hi = "" if a.angle_max_rad is None else f"{units.rad_to_deg(a.angle_max_rad):g}°"
            raise reader.error(spot, f"{deg:g}° is outside the actuator's range "
                                     f"({lo or 'no limit'} to {hi or 'no limit'})")
        angles[name] = rad
    return angles, None

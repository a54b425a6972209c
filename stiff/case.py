"""Case files (TOML) -> Case: a validated, frozen description of a linkage and its duty.

Every key carries its unit; values are converted to mm, N, MPa, N·mm, t, s, rad once, here.
Every mistake a user can make raises :class:`CaseError` naming the file, the key path, the
line where it can be found, and why. The format is documented in ``cases/README.md``.
"""

from __future__ import annotations

import itertools
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

from stiff import units
from stiff.case_reader import Field, Reader, at_least, choice, positive
from stiff.errors import CaseError, MaterialError, ModelError
from stiff.material_tables import MATERIAL_KINDS, MaterialKind
from stiff.materials import MaterialLibrary, load_library
from stiff.printed_sections import PrintSettings
from stiff.printing import BUILD_DIRECTIONS, INFILL_PATTERNS

PartKind = Literal["tube", "printed"]
JointKind = Literal["pin", "fixed", "driven"]
SpringKind = Literal["extension", "compression"]
BODY = "body"

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
LUG = {
    "hole_mm": positive(required=True),
    "thickness_mm": positive(required=True),
    "width_mm": positive(required=True),
    "edge_mm": positive(required=True, help="hole centre to the lug's end"),
}
SOCKET = {
    "tube": Field("str", required=True),
    "engagement_mm": positive(required=True),
    "fixing": choice("bonded", "clamped", required=True),
    "adhesive": Field("str"),
    "bondline_mm": positive(),
    "clamp_force_N": positive(),
    "friction": positive(),
}
MEASURED = {
    "radial_N_per_mm": positive(),
    "axial_N_per_mm": positive(),
    "tilt_Nm_per_deg": positive(),
    "twist_Nm_per_deg": positive(),
}
JOINT = {
    "kind": choice("pin", "fixed", "driven", required=True),
    "node": Field("str", required=True),
    "parts": Field("names", required=True),
    "pin_diameter_mm": positive(),
    "pin_material": Field("str"),
    "clearance_mm": at_least(0.0),
    "bearing_length_mm": positive(),
    "actuator": Field("str"),
    "lugs": Field("table"),
    "socket": Field("table"),
    "measured": Field("table"),
}
ACTUATOR = {
    "stall_torque_Nm": positive(required=True),
    "stiffness_Nm_per_deg": positive(),
    "proportional_band_deg": positive(),
    "angle_deg": Field("float", required=True, help="its angle in the drawn (reference) pose"),
    "angle_min_deg": Field("float"),
    "angle_max_deg": Field("float"),
    "mass_kg": at_least(0.0),
}
SPRING = {
    "ends": Field("table", required=True,
                  help='like { body = "anchor", thigh = "hook" }: part = node at each end'),
    "kind": choice("extension", "compression"),
    "rate_N_per_mm": Field("floats", required=True, low=0.0, low_open=True),
    "free_length_mm": Field("floats", required=True, low=0.0, low_open=True),
    "initial_tension_N": at_least(0.0),
    "max_length_mm": positive(),
}
POSE = {"angles_deg": Field("table"), "foot_mm": Field("point")}
LOADS = {
    "robot_mass_kg": positive(),
    "payload_kg": positive(),
    "legs": Field("int", low=1),
    "legs_in_stance": Field("int", low=1),
    "legs_sharing_landing": Field("int", low=1),
    "drop_height_mm": at_least(0.0),
    "friction": at_least(0.0),
    "lateral_fraction": at_least(0.0),
    "service_temperature_C": Field("float"),
    "cycles": at_least(1.0),
}
TARGETS = {
    "max_foot_deflection_mm": positive(),
    "max_lateral_deflection_mm": positive(),
    "min_safety_factor": positive(),
}
MATERIAL_ENTRY_KIND = {"kind": choice(*MATERIAL_KINDS, required=True)}

#: Print settings when the case does not say (common slicer defaults for a 0.4 mm nozzle;
#: common practice).
DEFAULT_SETTINGS = PrintSettings()


@dataclass(frozen=True)
class Section:
    """A printed part's cross-section and how it is printed. Sizes [mm]."""

    material: str
    shape: Literal["rectangle", "round"]
    width_mm: float  # along z, out of the linkage plane (diameter for a round)
    depth_mm: float  # in the plane, across the member (diameter for a round)
    settings: PrintSettings


@dataclass(frozen=True)
class Part:
    """A tube or a printed part: its nodes, its plane in the stack, its section(s)."""

    name: str
    kind: PartKind
    nodes: tuple[str, ...]
    z_mm: float
    segments: tuple[tuple[str, str], ...]  # node pairs joined by members
    tube_material: str | None = None
    od_mm: float | None = None
    id_mm: float | None = None
    sections: tuple[Section, ...] = ()  # one per segment, printed parts


@dataclass(frozen=True)
class Lug:
    """A printed part's lug at a pin [mm]."""

    part: str
    hole_mm: float
    thickness_mm: float
    width_mm: float
    edge_mm: float


@dataclass(frozen=True)
class Socket:
    """A tube bonded or clamped into a printed socket at a fixed joint."""

    tube: str
    printed: str
    engagement_mm: float
    fixing: Literal["bonded", "clamped"]
    adhesive: str | None
    bondline_mm: float | None
    clamp_force_N: float | None
    friction: float | None


@dataclass(frozen=True)
class Measured:
    """Joint stiffness the user measured, replacing the computed one where given.

    radial, axial [N/mm]; tilt, twist [N·mm/rad].
    """

    radial: float | None = None
    axial: float | None = None
    tilt: float | None = None
    twist: float | None = None


@dataclass(frozen=True)
class Joint:
    """A pin, fixed or driven joint between parts at one node."""

    name: str
    kind: JointKind
    node: str
    parts: tuple[str, ...]  # in the order given; for driven: housing side, then output
    pin_diameter_mm: float | None
    pin_material: str | None
    clearance_mm: float
    bearing_length_mm: float | None
    actuator: str | None
    lugs: tuple[Lug, ...]
    socket: Socket | None
    measured: Measured


@dataclass(frozen=True)
class Actuator:
    """A servo or actuator on a driven joint. Torques [N·mm], angles [rad], mass [t]."""

    name: str
    joint: str
    stall_torque_Nmm: float
    stiffness_Nmm_per_rad: float
    stiffness_basis: str  # "measured" or how it was estimated
    angle_rad: float
    angle_min_rad: float | None
    angle_max_rad: float | None
    mass_t: float


@dataclass(frozen=True)
class Spring:
    """A coil spring (or several in series) between nodes of two parts."""

    name: str
    ends: tuple[tuple[str, str], tuple[str, str]]  # (part, node) at each end
    kind: SpringKind
    rate_N_per_mm: float  # combined rate of the springs in series
    free_length_mm: float  # combined free length
    initial_tension_N: float
    max_length_mm: float | None
    count: int


@dataclass(frozen=True)
class Loads:
    """What the leg carries; None where the case does not say (later stages use defaults)."""

    robot_mass_t: float | None = None
    payload_t: float | None = None  # a mass hanging from the foot (an arm's camera) [t]
    legs: int = 1
    legs_in_stance: int | None = None
    legs_sharing_landing: int | None = None
    drop_height_mm: float | None = None
    friction: float | None = None
    lateral_fraction: float | None = None
    service_temperature_C: float | None = None
    cycles: float | None = None


@dataclass(frozen=True)
class Targets:
    """Limits the design must meet; None where the case sets none."""

    max_foot_deflection_mm: float | None = None
    max_lateral_deflection_mm: float | None = None
    min_safety_factor: float | None = None


@dataclass(frozen=True)
class Case:
    """A whole case, validated, in internal units."""

    file: Path | None
    title: str
    description: str
    nodes: Mapping[str, tuple[float, float]]
    body_nodes: tuple[str, ...]
    body_z_mm: float
    foot: str
    parts: tuple[Part, ...]
    joints: tuple[Joint, ...]
    actuators: tuple[Actuator, ...]
    springs: tuple[Spring, ...]
    pose_angles_rad: Mapping[str, float] | None
    pose_foot_mm: tuple[float, float] | None
    loads: Loads
    targets: Targets
    library: MaterialLibrary = field(repr=False)

    def part(self, name: str) -> Part:
        """The part called ``name``."""
        return next(p for p in self.parts if p.name == name)

    def actuator(self, name: str) -> Actuator:
        """The actuator called ``name``."""
        return next(a for a in self.actuators if a.name == name)


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
    top = reader.table("", data, TOP)
    lib = _library(reader, top, library or load_library(), path)
    nodes = _nodes(reader, top["nodes"])
    body = reader.table("body", top["body"], BODY_TABLE)
    body_nodes = tuple(reader.known(f"body.nodes[{i}]", n, nodes, "node")
                       for i, n in enumerate(body["nodes"]))
    parts = _parts(reader, top["parts"], nodes, lib)
    actuator_tables = reader.named_tables("actuators", top.get("actuators", {}))
    joints = _joints(reader, top["joints"], nodes, parts, body_nodes, lib, actuator_tables)
    actuators = _actuators(reader, actuator_tables, joints)
    springs = _springs(reader, top.get("springs", {}), parts, body_nodes)
    foot = reader.known("foot", top["foot"], nodes, "node")
    _check_foot(reader, foot, parts)
    _check_connected(reader, parts, joints)
    angles, foot_target = _pose(reader, top.get("pose"), actuators)
    return Case(
        file=path, title=top["title"], description=top.get("description", ""),
        nodes=nodes, body_nodes=body_nodes, body_z_mm=float(body.get("z_mm", 0.0)),
        foot=foot, parts=parts, joints=joints, actuators=actuators, springs=springs,
        pose_angles_rad=angles, pose_foot_mm=foot_target,
        loads=_loads(reader, top.get("loads", {})),
        targets=Targets(**reader.table("targets", top.get("targets", {}), TARGETS)),
        library=lib)


def _library(reader: Reader, top: Mapping[str, Any], lib: MaterialLibrary,
             path: Path | None) -> MaterialLibrary:
    """The built-in materials plus the user's file and the case's own [materials]."""
    try:
        if "materials_file" in top:
            extra = Path(top["materials_file"])
            if not extra.is_absolute() and path is not None:
                extra = path.parent / extra
            if not extra.is_file():
                raise reader.error("materials_file", f"no such file: {extra}")
            lib = lib.with_file(extra)
        for name, entry in reader.named_tables("materials", top.get("materials", {})).items():
            kind = reader.table(f"materials.{name}", {"kind": entry.get("kind")}
                                if "kind" in entry else {}, MATERIAL_ENTRY_KIND)["kind"]
            columns = {k: v for k, v in entry.items() if k != "kind"}
            origin = f"{path or '<case>'} [materials.{name}]"
            lib = lib.with_records(kind, {name: columns}, origin)
    except MaterialError as err:
        raise CaseError(path, "materials", str(err), reader.line_of("materials")) from None
    return lib


def _material(reader: Reader, where: str, name: str, lib: MaterialLibrary,
              kinds: tuple[MaterialKind, ...], what: str) -> str:
    """``name`` when it is a material of one of ``kinds``; a material of another kind is named
    as such, an unknown one gets the list of known ones."""
    known = tuple(n for k in kinds for n in lib.names(k))
    if name not in known:
        other = next((k for k in MATERIAL_KINDS if k not in kinds and name in lib.names(k)),
                     None)
        if other is not None:
            raise reader.error(where, f"'{name}' is {_a(other)} material, not {_a(what)} "
                                      f"({what}s: {', '.join(known)})")
    return reader.known(where, name, known, what)


def _a(word: str) -> str:
    return f"{'an' if word[0] in 'aeiou' else 'a'} {word}"


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
    name = _material(reader, f"{where}.material", values["material"], lib, ("printed",),
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
    for key in data:
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
    material = _material(reader, f"{where}.material", v["material"], lib, ("tube", "metal"),
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


def _lugs(reader: Reader, where: str, data: object, parts: tuple[str, ...],
          printed: set[str], pin_mm: float | None) -> tuple[Lug, ...]:
    out = []
    for part, entry in reader.named_tables(where, data).items():
        spot = f"{where}.{part}"
        if part not in parts:
            raise reader.error(spot, f"the joint does not join a part '{part}' "
                                     f"(it joins {', '.join(parts)})")
        if part not in printed:
            raise reader.error(spot, f"'{part}' is not a printed part: lugs are for printed parts")
        v = reader.table(spot, entry, LUG)
        if v["hole_mm"] >= v["width_mm"]:
            raise reader.error(f"{spot}.hole_mm", f"hole {v['hole_mm']:g} mm must be smaller "
                                                   f"than the lug width {v['width_mm']:g} mm")
        if v["edge_mm"] <= v["hole_mm"] / 2:
            raise reader.error(f"{spot}.edge_mm", "the hole breaks out of the lug's end: edge "
                                                   "distance must exceed half the hole")
        if pin_mm is not None and v["hole_mm"] < pin_mm:
            raise reader.error(f"{spot}.hole_mm", f"hole {v['hole_mm']:g} mm is smaller than the "
                                                   f"pin {pin_mm:g} mm")
        out.append(Lug(part=part, hole_mm=v["hole_mm"], thickness_mm=v["thickness_mm"],
                       width_mm=v["width_mm"], edge_mm=v["edge_mm"]))
    return tuple(out)


def _joints(reader: Reader, data: object, nodes: Mapping[str, tuple[float, float]],
            parts: tuple[Part, ...], body_nodes: tuple[str, ...], lib: MaterialLibrary,
            actuators: Mapping[str, Any]) -> tuple[Joint, ...]:
    by_name = {p.name: p for p in parts}
    printed = {p.name for p in parts if p.kind == "printed"}
    out = []
    for name, entry in reader.named_tables("joints", data).items():
        where = f"joints.{name}"
        v = reader.table(where, entry, JOINT)
        node = reader.known(f"{where}.node", v["node"], nodes, "node")
        joined = v["parts"]
        if len(joined) < 2 or len(set(joined)) != len(joined):
            raise reader.error(f"{where}.parts", "a joint joins at least two different parts")
        for i, p in enumerate(joined):
            if p == BODY:
                if node not in body_nodes:
                    raise reader.error(f"{where}.parts[{i}]", f"the body does not reach node "
                                                              f"'{node}' (not in body.nodes)")
                continue
            reader.known(f"{where}.parts[{i}]", p, by_name, "part")
            if node not in by_name[p].nodes:
                raise reader.error(f"{where}.parts[{i}]", f"part '{p}' does not meet node "
                                                          f"'{node}' (its nodes: "
                                                          f"{', '.join(by_name[p].nodes)})")
        kind = v["kind"]
        pin = v.get("pin_diameter_mm")
        if kind in ("pin", "driven") and pin is None:
            raise reader.error(where, f"a {kind} joint needs 'pin_diameter_mm'")
        pin_material = None
        if kind != "fixed":
            pin_material = _material(reader, f"{where}.pin_material",
                                     v.get("pin_material", "steel-8.8"), lib, ("metal",),
                                     "pin material")
        actuator = None
        if kind == "driven":
            if len(joined) != 2:
                raise reader.error(f"{where}.parts", "a driven joint joins exactly two parts: "
                                                     "the actuator's housing side, then its output")
            if "actuator" not in v:
                raise reader.error(where, "a driven joint needs 'actuator'")
            actuator = reader.known(f"{where}.actuator", v["actuator"], actuators, "actuator")
        elif "actuator" in v:
            raise reader.error(f"{where}.actuator", f"only a driven joint has an actuator "
                                                    f"(this one is {kind})")
        socket = _socket(reader, where, v.get("socket"), kind, joined, parts, lib)
        measured = reader.table(f"{where}.measured", v.get("measured", {}), MEASURED)
        out.append(Joint(
            name=name, kind=kind, node=node, parts=joined, pin_diameter_mm=pin,
            pin_material=pin_material, clearance_mm=v.get("clearance_mm", 0.0),
            bearing_length_mm=v.get("bearing_length_mm"), actuator=actuator,
            lugs=_lugs(reader, f"{where}.lugs", v.get("lugs", {}), joined, printed, pin),
            socket=socket, measured=_measured(measured)))
    for a in actuators:
        driven = [j.name for j in out if j.actuator == a]
        if len(driven) != 1:
            listing = f": {', '.join(driven)}" if driven else ""
            raise reader.error(f"actuators.{a}", f"actuator '{a}' must drive exactly one joint "
                                                 f"(it drives {len(driven)}{listing})")
    return tuple(out)


def _measured(v: Mapping[str, float]) -> Measured:
    rot = units.nm_per_deg_to_nmm_per_rad
    return Measured(
        radial=v.get("radial_N_per_mm"), axial=v.get("axial_N_per_mm"),
        tilt=rot(v["tilt_Nm_per_deg"]) if "tilt_Nm_per_deg" in v else None,
        twist=rot(v["twist_Nm_per_deg"]) if "twist_Nm_per_deg" in v else None)


def _socket(reader: Reader, where: str, data: object, kind: str, joined: tuple[str, ...],
            parts: tuple[Part, ...], lib: MaterialLibrary) -> Socket | None:
    if data is None:
        return None
    spot = f"{where}.socket"
    if kind != "fixed":
        raise reader.error(spot, "a socket belongs to a fixed joint (a tube held in a printed "
                                 "part)")
    v = reader.table(spot, data, SOCKET)
    kinds = {p.name: p.kind for p in parts}
    tube = reader.known(f"{spot}.tube", v["tube"], {p: 0 for p in joined if p in kinds},
                        "joined part")
    if kinds[tube] != "tube":
        raise reader.error(f"{spot}.tube", f"'{tube}' is not a tube")
    printed = [p for p in joined if kinds.get(p) == "printed"]
    if not printed:
        raise reader.error(spot, "a socket needs a printed part in the joint to hold the tube")
    adhesive = None
    if v["fixing"] == "bonded":
        adhesive = _material(reader, f"{spot}.adhesive", v.get("adhesive", "epoxy"), lib,
                             ("adhesive",), "adhesive")
    return Socket(tube=tube, printed=printed[0], engagement_mm=v["engagement_mm"],
                  fixing=v["fixing"], adhesive=adhesive, bondline_mm=v.get("bondline_mm"),
                  clamp_force_N=v.get("clamp_force_N"), friction=v.get("friction"))


def _actuators(reader: Reader, data: Mapping[str, Any], joints: tuple[Joint, ...]
               ) -> tuple[Actuator, ...]:
    out = []
    for name, entry in data.items():
        where = f"actuators.{name}"
        v = reader.table(where, entry, ACTUATOR)
        stall = units.nm_to_nmm(v["stall_torque_Nm"])
        if "stiffness_Nm_per_deg" in v:
            k = units.nm_per_deg_to_nmm_per_rad(v["stiffness_Nm_per_deg"])
            basis = "measured (case)"
        elif "proportional_band_deg" in v:
            k = stall / units.deg_to_rad(v["proportional_band_deg"])
            basis = (f"estimated as stall torque / proportional band "
                     f"({v['proportional_band_deg']:g}°), common practice: measure it")
        else:
            raise reader.error(where, "give 'stiffness_Nm_per_deg' (measured) or "
                                      "'proportional_band_deg' (to estimate it)")
        lo, hi = v.get("angle_min_deg"), v.get("angle_max_deg")
        if lo is not None and hi is not None and not lo < hi:
            raise reader.error(f"{where}.angle_max_deg", f"must exceed angle_min_deg ({lo:g}°), "
                                                         f"got {hi:g}°")
        joint = next(j.name for j in joints if j.actuator == name)
        out.append(Actuator(
            name=name, joint=joint, stall_torque_Nmm=stall, stiffness_Nmm_per_rad=k,
            stiffness_basis=basis, angle_rad=units.deg_to_rad(v["angle_deg"]),
            angle_min_rad=None if lo is None else units.deg_to_rad(lo),
            angle_max_rad=None if hi is None else units.deg_to_rad(hi),
            mass_t=units.kg_to_tonne(v.get("mass_kg", 0.0))))
    return tuple(out)


def _springs(reader: Reader, data: object, parts: tuple[Part, ...],
             body_nodes: tuple[str, ...]) -> tuple[Spring, ...]:
    by_name = {p.name: p for p in parts}
    out = []
    for name, entry in reader.named_tables("springs", data).items():
        where = f"springs.{name}"
        v = reader.table(where, entry, SPRING)
        ends_table = v["ends"]
        if len(ends_table) != 2:
            raise reader.error(f"{where}.ends", "a spring has two ends: { part = \"node\", "
                                                "other_part = \"node\" }")
        ends = []
        for part, node in ends_table.items():
            spot = f"{where}.ends.{part}"
            if not isinstance(node, str):
                raise reader.error(spot, "must name a node")
            if part == BODY:
                if node not in body_nodes:
                    raise reader.error(spot, f"node '{node}' is not a body node")
            else:
                reader.known(spot, part, by_name, "part")
                if node not in by_name[part].nodes:
                    raise reader.error(spot, f"part '{part}' has no node '{node}'")
            ends.append((part, node))
        rates, lengths = v["rate_N_per_mm"], v["free_length_mm"]
        if len(rates) != len(lengths):
            raise reader.error(f"{where}.free_length_mm", "give one free length per spring rate "
                                                          "(springs in series)")
        rate = 1.0 / sum(1.0 / r for r in rates)  # springs in series (common practice)
        out.append(Spring(name=name, ends=(ends[0], ends[1]), kind=v.get("kind", "extension"),
                          rate_N_per_mm=rate, free_length_mm=sum(lengths),
                          initial_tension_N=v.get("initial_tension_N", 0.0),
                          max_length_mm=v.get("max_length_mm"), count=len(rates)))
    return tuple(out)


def _check_foot(reader: Reader, foot: str, parts: tuple[Part, ...]) -> None:
    if not any(foot in p.nodes for p in parts):
        raise reader.error("foot", f"no part carries the foot node '{foot}'")


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


def _loads(reader: Reader, data: object) -> Loads:
    v = reader.table("loads", data, LOADS)
    mass = v.pop("robot_mass_kg", None)
    payload = v.pop("payload_kg", None)
    legs = int(v.pop("legs", 1))
    return Loads(robot_mass_t=None if mass is None else units.kg_to_tonne(mass),
                 payload_t=None if payload is None else units.kg_to_tonne(payload), legs=legs,
                 **v)


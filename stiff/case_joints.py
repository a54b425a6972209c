"""The joints, actuators and springs of a case: their tables, checked."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from stiff import units
from stiff.case_model import (
    BODY,
    Actuator,
    Joint,
    Lug,
    Measured,
    Part,
    Socket,
    Spring,
)
from stiff.case_reader import Field, Reader, at_least, choice, positive
from stiff.material_tables import MATERIAL_KINDS, MaterialKind
from stiff.materials import MaterialLibrary

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


def material_name(reader: Reader, where: str, name: str, lib: MaterialLibrary,
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


def read_joints(reader: Reader, data: object, nodes: Mapping[str, tuple[float, float]],
            parts: tuple[Part, ...], body_nodes: tuple[str, ...], lib: MaterialLibrary,
            actuators: Mapping[str, Any]) -> tuple[Joint, ...]:
    by_name = {p.name: p for p in parts}
    printed = {p.name for p in parts if p.kind == "printed"}
    out = []
    at_node: dict[str, list[tuple[set[str], str]]] = {}  # parts joined there, by which joint
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
        _check_not_joined_twice(reader, where, name, node, joined, at_node.setdefault(node, []))
        kind = v["kind"]
        pin = v.get("pin_diameter_mm")
        if kind in ("pin", "driven") and pin is None:
            raise reader.error(where, f"a {kind} joint needs 'pin_diameter_mm'")
        pin_material = None
        if kind != "fixed":
            pin_material = material_name(reader, f"{where}.pin_material",
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
        adhesive = material_name(reader, f"{spot}.adhesive", v.get("adhesive", "epoxy"), lib,
                             ("adhesive",), "adhesive")
    return Socket(tube=tube, printed=printed[0], engagement_mm=v["engagement_mm"],
                  fixing=v["fixing"], adhesive=adhesive, bondline_mm=v.get("bondline_mm"),
                  clamp_force_N=v.get("clamp_force_N"), friction=v.get("friction"))


def read_actuators(reader: Reader, data: Mapping[str, Any], joints: tuple[Joint, ...]
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


def _check_not_joined_twice(reader: Reader, where: str, name: str, node: str,
                           joined: tuple[str, ...], groups: list[tuple[set[str], str]]) -> None:
    """Refuse a joint that closes a loop among parts already joined at the same node.

    ``groups`` holds the sets of parts the earlier joints at ``node`` hold together (and the
    first of those joints); this joint's parts are merged in.
    """
    mine = set(joined)
    touching = [g for g in groups if g[0] & mine]
    for parts, first in touching:
        common = [p for p in joined if p in parts]
        if len(common) >= 2:
            raise reader.error(f"{where}.parts", f"{common[0]} and {common[1]} are already "
                                                 f"joined at node '{node}' (joints.{first})")
    merged = mine.union(*(g[0] for g in touching))
    for g in touching:
        groups.remove(g)
    groups.append((merged, touching[0][1] if touching else name))


def read_springs(reader: Reader, data: object, parts: tuple[Part, ...],
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
        if ends[0][1] == ends[1][1]:
            raise reader.error(f"{where}.ends", f"both ends are at node '{ends[0][1]}': a spring "
                                                "needs two different places")
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

"""The [loads] table of a case: the leg's duty, validated, in internal units."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from stiff import units
from stiff.case_reader import Field, Reader, at_least, positive

LOADS = {
    "robot_mass_kg": positive(),
    "payload_kg": positive(),
    "legs": Field("int", low=1),
    "legs_in_stance": Field("int", low=1),
    "legs_sharing_landing": Field("int", low=1),
    "drop_height_mm": at_least(0.0),
    "foot_pad_N_per_mm": positive(),
    "damping_ratio": at_least(0.0, high=1.0),
    "landing_angles_deg": Field("table"),
    "friction": at_least(0.0),
    "lateral_fraction": at_least(0.0, high=1.0),
    "service_temperature_C": Field("float"),
    "cycles": at_least(1.0),
    "static": Field("list"),
}
STATIC = {
    "name": Field("str", required=True),
    "node": Field("str", required=True),
    "part": Field("str"),
    "force_N": Field("floats"),
    "moment_Nm": Field("floats"),
}


@dataclass(frozen=True)
class StaticLoad:
    """A user's static load at a node of a part: force [N], moment [N·mm], global axes."""

    name: str
    node: str
    part: str
    force_N: tuple[float, float, float]
    moment_Nmm: tuple[float, float, float]


@dataclass(frozen=True)
class Loads:
    """What the leg carries; None where the case does not say (``stiff.loads`` has defaults)."""

    robot_mass_t: float | None = None
    payload_t: float | None = None  # a mass hanging from the foot (an arm's camera) [t]
    legs: int = 1
    legs_in_stance: int | None = None
    legs_sharing_landing: int | None = None
    drop_height_mm: float | None = None
    foot_pad_N_per_mm: float | None = None
    damping_ratio: float | None = None
    landing_angles_rad: tuple[tuple[str, float], ...] | None = None
    friction: float | None = None
    lateral_fraction: float | None = None
    service_temperature_C: float | None = None
    cycles: float | None = None
    static: tuple[StaticLoad, ...] = ()


def _triple(reader: Reader, where: str, values: tuple[float, ...] | None, scale: float
            ) -> tuple[float, float, float]:
    if values is None:
        return (0.0, 0.0, 0.0)
    if len(values) != 3:
        raise reader.error(where, "give three numbers: x, y, z")
    return (values[0] * scale, values[1] * scale, values[2] * scale)


def _static(reader: Reader, data: object, part_nodes: dict[str, tuple[str, ...]]
            ) -> tuple[StaticLoad, ...]:
    if not isinstance(data, list) or not all(isinstance(d, dict) for d in data):
        raise reader.error("loads.static", "must be a list of tables: [[loads.static]] entries")
    out = []
    for i, entry in enumerate(data):
        where = f"loads.static[{i}]"
        v = reader.table(where, entry, STATIC)
        node = v["node"]
        carriers = [p for p, nodes in part_nodes.items() if node in nodes]
        if not carriers:
            raise reader.error(f"{where}.node", f"no part carries a node '{node}'")
        part = v.get("part", carriers[0])
        if part not in carriers:
            raise reader.error(f"{where}.part", f"part '{part}' has no node '{node}' (it is on "
                                                f"{', '.join(carriers)})")
        out.append(StaticLoad(
            name=v["name"], node=node, part=part,
            force_N=_triple(reader, f"{where}.force_N", v.get("force_N"), 1.0),
            moment_Nmm=_triple(reader, f"{where}.moment_Nm", v.get("moment_Nm"),
                               units.NMM_PER_NM)))
    return tuple(out)


def read_loads(reader: Reader, data: object, part_nodes: dict[str, tuple[str, ...]],
               actuators: tuple[str, ...]) -> Loads:
    """The [loads] table, checked."""
    v: dict[str, Any] = reader.table("loads", data, LOADS)
    mass = v.pop("robot_mass_kg", None)
    payload = v.pop("payload_kg", None)
    legs = int(v.pop("legs", 1))
    static = _static(reader, v.pop("static"), part_nodes) if "static" in v else ()
    landing = None
    if "landing_angles_deg" in v:
        angles = []
        for name, value in v.pop("landing_angles_deg").items():
            spot = f"loads.landing_angles_deg.{name}"
            reader.known(spot, name, actuators, "actuator")
            angles.append((name, units.deg_to_rad(reader.value(spot, value, Field("float")))))
        landing = tuple(angles)
    for key in ("legs_in_stance", "legs_sharing_landing"):
        if key in v and v[key] > legs:
            raise reader.error(f"loads.{key}", f"{v[key]} is more than the robot's {legs} legs")
    return Loads(robot_mass_t=None if mass is None else units.kg_to_tonne(mass),
                 payload_t=None if payload is None else units.kg_to_tonne(payload), legs=legs,
                 landing_angles_rad=landing, static=static, **v)

"""What a validated case holds: frozen records in internal units (mm, N, N·mm, t, rad)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

from stiff.case_loads import Loads
from stiff.factors import RequiredFactors
from stiff.materials import MaterialLibrary
from stiff.printed_sections import PrintSettings

PartKind = Literal["tube", "printed"]
JointKind = Literal["pin", "fixed", "driven"]
SpringKind = Literal["extension", "compression"]
BODY = "body"


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
class Targets:
    """Limits the design must meet; None where the case sets none."""

    max_foot_deflection_mm: float | None = None
    max_lateral_deflection_mm: float | None = None
    min_safety_factor: float | None = None
    deflection_cases: tuple[str, ...] | None = None  # load cases the deflection targets apply to
    max_play_mm: float | None = None  # worst-case foot play in the linkage plane (stiff.play)
    max_lateral_play_mm: float | None = None  # worst-case foot play out of the plane


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
    factors: RequiredFactors
    library: MaterialLibrary = field(repr=False)

    def part(self, name: str) -> Part:
        """The part called ``name``."""
        return next(p for p in self.parts if p.name == name)

    def actuator(self, name: str) -> Actuator:
        """The actuator called ``name``."""
        return next(a for a in self.actuators if a.name == name)

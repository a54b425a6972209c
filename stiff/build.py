"""Case + Pose -> FrameModel: the linkage as a 3D frame in its pose.

Each part has its own node at each of its nodes, in its own plane z (the stack). Tubes and
printed segments are Timoshenko members. A joint joins the parts it names with connectors
between consecutive parts (frame = global axes, pins along z), whose six stiffnesses are
estimated from the joint's geometry (below) or taken from the user's measured values:

* radial (x, y): pin shear and bending between the two parts' mid-planes, a guided beam of
  length g (the plane gap), in series with the bearing of the pin in each part,
  1/k = g³/(12 E_p I_p) + g/(κ G_p A_p) + Σ 1/(E_i t_i) (common practice: a pin bearing in a
  plate of thickness t has a stiffness of order E t; override with a measured value);
* tilt (about x and y): each part's bearing as a bed of springs over its thickness,
  k_i t_i²/12, in series with the pin's bending over the gap, g/(E_p I_p) (derived);
* axial (z): rigid, the stack is clamped by the pin's head and nut (common practice);
* twist (about z): free for a pin, the actuator's holding stiffness for a driven joint, rigid
  for a fixed joint. A fixed joint is rigid in every component unless measured.

Springs are axial spring elements with their tension in this pose (preload, geometric
stiffness). Body nodes are fully held.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from stiff.case_model import BODY, Case, Joint, Part, Section
from stiff.errors import CaseError, ModelError
from stiff.fe import Beams, Connectors, FrameModel, Springs
from stiff.fe.model import FloatArray
from stiff.kinematics import Pose
from stiff.linkage import part_index
from stiff.materials import PrintedMaterial
from stiff.printed_sections import PrintedSection, printed_rectangle, printed_round
from stiff.sections import BeamSection, tube_section

RIGID = math.inf
#: Cowper's shear coefficient of a solid circle at ν = 0.3 (Cowper 1966), for the pin.
KAPPA_PIN = 6 * 1.3 / (7 + 6 * 0.3)


@dataclass(frozen=True)
class Built:
    """The frame model of a case in a pose, with the names behind every element."""

    model: FrameModel
    node_of: dict[tuple[str, str], int]  # (part or "body", node) -> model node
    foot: int  # model node of the foot
    beam_part: tuple[str, ...]  # the part each member belongs to
    beam_sections: tuple[BeamSection, ...]
    beam_printed: tuple[PrintedSection | None, ...]  # regions of printed members, for stresses
    beam_segment: tuple[tuple[str, str], ...]  # the nodes each member joins
    connector_joint: tuple[str, ...]  # the joint each connector belongs to
    connector_actuator: tuple[str | None, ...]  # the actuator holding its twist, if any
    spring_names: tuple[str, ...]
    spring_length_mm: tuple[float, ...]
    stiffness_basis: tuple[str, ...]  # how each connector's stiffness was obtained
    warnings: tuple[str, ...]

    def driven(self) -> list[tuple[int, str]]:
        """(connector index, actuator) of every connector whose twist an actuator holds."""
        return [(i, a) for i, a in enumerate(self.connector_actuator) if a is not None]


class Sections:
    """Printed sections kept between builds, by material and section (frozen values).

    A sweep's variants and a map's batches meet the same few sections many times (one takes
    ~50 ms to compute); the caller makes one of these for that work and passes it to each
    :func:`build`. Without one, a build computes each distinct section of its case once.
    """

    def __init__(self) -> None:
        self._kept: dict[tuple[PrintedMaterial, Section], PrintedSection] = {}

    def of(self, material: PrintedMaterial, s: Section) -> PrintedSection:
        """The printed section of ``s`` in ``material`` (ModelError for an impossible one)."""
        key = (material, s)
        if key not in self._kept:
            self._kept[key] = printed_section(material, s)
        return self._kept[key]


def printed_section(material: PrintedMaterial, s: Section) -> PrintedSection:
    """The printed section of ``s`` in ``material`` (ModelError for an impossible one)."""
    if s.shape == "round":
        return printed_round(material, s.width_mm, s.settings)
    return printed_rectangle(material, s.width_mm, s.depth_mm, s.settings)


def _section(case: Case, part: Part, s: Section, sections: Sections) -> PrintedSection:
    material = case.library.printed_material(s.material)
    try:
        return sections.of(material, s)
    except ModelError as err:
        raise CaseError(case.file, f"parts.{part.name}.section", str(err)) from None


Member = tuple[Part, tuple[str, str], BeamSection, "PrintedSection | None"]


def part_sections(case: Case, sections: Sections | None = None) -> list[Member]:
    """Every member of every part with its beam section (and printed section, if printed);
    printed sections from ``sections`` when given."""
    kept = Sections() if sections is None else sections
    out: list[Member] = []
    for part in case.parts:
        if part.kind == "tube":
            assert part.tube_material and part.od_mm is not None and part.id_mm is not None
            lib = case.library
            material = (lib.tube_material(part.tube_material)
                        if part.tube_material in lib.names("tube")
                        else lib.metal(part.tube_material))
            bs = tube_section(part.od_mm, part.id_mm, material)
            out.extend((part, seg, bs, None) for seg in part.segments)
        else:
            for seg, sec in zip(part.segments, part.sections, strict=True):
                ps = _section(case, part, sec, kept)
                out.append((part, seg, ps.beam, ps))
    return out


def _bearing(case: Case, joint: Joint, part_name: str,
             sections: dict[tuple[str, str], BeamSection]) -> tuple[float, float]:
    """Bearing stiffness E·t [N/mm] and thickness t [mm] of one part at a joint."""
    if part_name == BODY:
        return RIGID, 0.0
    part = case.part(part_name)
    lug = next((lg for lg in joint.lugs if lg.part == part_name), None)
    if part.kind == "tube":
        assert part.od_mm is not None and part.id_mm is not None
        t = lug.thickness_mm if lug else part.od_mm
        E = sections[(part_name, joint.node)].E_MPa
        return E * (part.od_mm - part.id_mm), t
    seg = next(i for i, s in enumerate(part.segments) if joint.node in s)
    sec = part.sections[seg]
    material: PrintedMaterial = case.library.printed_material(sec.material)
    E = material.E_xy_MPa if sec.settings.build == "flat" else material.E_across_layers_MPa
    t = lug.thickness_mm if lug else (joint.bearing_length_mm or sec.width_mm)
    return E * t, t


def _series(*k: float) -> float:
    inv = sum(0.0 if math.isinf(v) else 1.0 / v for v in k)
    return RIGID if inv == 0.0 else 1.0 / inv


def joint_stiffness(case: Case, joint: Joint, a: str, b: str,
                    sections: dict[tuple[str, str], BeamSection]) -> tuple[list[float], str]:
    """Six connector stiffnesses between parts a and b at a joint, and their basis.

    Order: x, y, z [N/mm], rx, ry, rz [N·mm/rad]; see the module docstring.
    """
    m = joint.measured
    if joint.kind == "fixed":
        k = [RIGID] * 6
        basis = "rigid (fixed joint)"
    else:
        assert joint.pin_diameter_mm is not None and joint.pin_material is not None
        pin = case.library.metal(joint.pin_material)
        d = joint.pin_diameter_mm
        I_p, A_p = math.pi * d**4 / 64, math.pi * d**2 / 4
        za = case.body_z_mm if a == BODY else case.part(a).z_mm
        zb = case.body_z_mm if b == BODY else case.part(b).z_mm
        g = abs(zb - za)
        (ka, ta), (kb, tb) = _bearing(case, joint, a, sections), _bearing(case, joint, b, sections)
        k_pin = RIGID if g == 0 else 1.0 / (g**3 / (12 * pin.E_MPa * I_p)
                                            + g / (KAPPA_PIN * pin.shear_modulus_MPa * A_p))
        radial = _series(k_pin, ka, kb)
        tilt = _series(ka * ta**2 / 12 if ta else RIGID, kb * tb**2 / 12 if tb else RIGID,
                       RIGID if g == 0 else pin.E_MPa * I_p / g)
        twist = 0.0
        if joint.kind == "driven" and joint.actuator:
            twist = case.actuator(joint.actuator).stiffness_Nmm_per_rad
        k = [radial, radial, RIGID, tilt, tilt, twist]
        basis = "estimated from the pin and bearing geometry (common practice)"
    if m.radial is not None:
        k[0] = k[1] = m.radial
    if m.axial is not None:
        k[2] = m.axial
    if m.tilt is not None:
        k[3] = k[4] = m.tilt
    if m.twist is not None:
        k[5] = m.twist
    if any(v is not None for v in (m.radial, m.axial, m.tilt, m.twist)):
        basis += "; measured values from the case where given"
    return k, basis


def spring_tensions(case: Case, length_mm: FloatArray) -> FloatArray:
    """(..., n_springs) each spring's tension [N] at its lengths [mm] (..., n_springs): an
    extension spring shorter than its free length is slack, a compression spring longer than
    its free length loose, and either carries nothing."""
    length = np.asarray(length_mm, np.float64)
    out = np.zeros_like(length)
    for k, s in enumerate(case.springs):
        L = length[..., k]
        if s.kind == "extension":
            out[..., k] = np.where(s.free_length_mm > L, 0.0, s.initial_tension_N
                                   + s.rate_N_per_mm * (L - s.free_length_mm))
        else:
            out[..., k] = np.where(s.free_length_mm < L, 0.0,
                                   -s.rate_N_per_mm * (s.free_length_mm - L))
    return out


def _spring_note(kind: str, free_mm: float, length_mm: float) -> str | None:
    """Why a spring carries nothing at a length, or None when it does."""
    if kind == "extension" and length_mm < free_mm:
        return "is shorter than its free length: slack, it carries nothing here"
    if kind != "extension" and length_mm > free_mm:
        return "is longer than its free length: loose, it carries nothing here"
    return None


def build(case: Case, pose: Pose, sections: Sections | None = None) -> Built:
    """The frame model of the case in the pose (printed sections from ``sections`` when
    given: see :class:`Sections`)."""
    index = part_index(case)
    names: list[str] = []
    xyz: list[list[float]] = []
    node_of: dict[tuple[str, str], int] = {}

    def node(part: str, n: str) -> int:
        if (part, n) not in node_of:
            node_of[(part, n)] = len(names)
            names.append(f"{n} on {part}")
            if part == BODY:
                x, y = case.nodes[n]
                xyz.append([x, y, case.body_z_mm])
            else:
                p = pose.point_on(index[part], case.nodes[n])
                xyz.append([float(p[0]), float(p[1]), case.part(part).z_mm])
        return node_of[(part, n)]

    members = part_sections(case, sections)
    conn = [[node(p.name, a), node(p.name, b)] for p, (a, b), _, _ in members]
    at_node = {(p.name, n): bs for p, seg, bs, _ in members for n in seg}

    c_nodes, c_k, c_joint, c_act, c_names, basis = [], [], [], [], [], []
    for j in case.joints:
        for a, b in zip(j.parts[:-1], j.parts[1:], strict=True):
            k, why = joint_stiffness(case, j, a, b, at_node)
            c_nodes.append([node(a, j.node), node(b, j.node)])
            c_k.append(k)
            c_joint.append(j.name)
            c_act.append(j.actuator if j.kind == "driven" else None)
            c_names.append(f"{j.name} ({a}-{b})")
            basis.append(f"{j.name} ({a}-{b}): {why}")

    s_nodes, s_rate, s_len, warnings = [], [], [], list(pose.warnings)
    for s in case.springs:
        ia, ib = node(*s.ends[0]), node(*s.ends[1])
        s_nodes.append([ia, ib])
        length = float(np.linalg.norm(np.subtract(xyz[ib], xyz[ia])))
        note = _spring_note(s.kind, s.free_length_mm, length)
        if note:
            warnings.append(f"spring {s.name} {note}")
        if s.max_length_mm is not None and length > s.max_length_mm:
            warnings.append(f"spring {s.name} is stretched to {length:.1f} mm, beyond its "
                            f"maximum length {s.max_length_mm:g} mm")
        s_rate.append(s.rate_N_per_mm)
        s_len.append(length)
    s_tension = spring_tensions(case, np.array(s_len))

    for n in case.body_nodes:
        node(BODY, n)
    foot_part = next(p.name for p in case.parts if case.foot in p.nodes)
    foot = node(foot_part, case.foot)
    fixed = np.zeros((len(names), 6), bool)
    for (part, _), i in node_of.items():
        fixed[i] = part == BODY

    sec = [bs for _, _, bs, _ in members]
    beams = Beams.make(conn, E=[s.E_MPa for s in sec], G=[s.G_MPa for s in sec],
                       A=[s.A_mm2 for s in sec], Iy=[s.Iy_mm4 for s in sec],
                       Iz=[s.Iz_mm4 for s in sec], J=[s.J_mm4 for s in sec],
                       Asy=[s.Asy_mm2 for s in sec], Asz=[s.Asz_mm2 for s in sec],
                       names=tuple(f"{p.name} {a}-{b}" for p, (a, b), _, _ in members))
    connectors = Connectors.make(np.reshape(c_nodes, (-1, 2)), np.reshape(c_k, (-1, 6)),
                                 names=tuple(c_names)) if c_nodes else None
    springs = Springs.make(np.reshape(s_nodes, (-1, 2)), s_rate, s_tension,
                           names=tuple(s.name for s in case.springs)) if s_nodes else None
    model = FrameModel.make(np.array(xyz), node_names=tuple(names), beams=beams,
                            connectors=connectors, springs=springs, fixed=fixed)
    return Built(model=model, node_of=node_of, foot=foot,
                 beam_part=tuple(p.name for p, _, _, _ in members), beam_sections=tuple(sec),
                 beam_printed=tuple(ps for _, _, _, ps in members),
                 beam_segment=tuple(seg for _, seg, _, _ in members),
                 connector_joint=tuple(c_joint), connector_actuator=tuple(c_act),
                 spring_names=tuple(s.name for s in case.springs),
                 spring_length_mm=tuple(s_len), stiffness_basis=tuple(basis),
                 warnings=tuple(warnings))

"""Joint play and natural frequencies of a case in its pose, as `stiff check` reports them.

``play_and_modes(case, built, pose)`` gathers :mod:`stiff.play` and :mod:`stiff.modes` into one
frozen record; ``results_section`` turns it into the JSON-ready dictionary (units in every
key) and ``summary_lines`` into short lines of text for the terminal summary.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from stiff.build import Built
from stiff.case_model import Case
from stiff.kinematics import Pose
from stiff.modes import LegModes, leg_modes
from stiff.play import FootPlay, PlayTarget, foot_play, play_targets

#: Modes reported by default.
MODES = 6
G_PER_T = 1.0e6


@dataclass(frozen=True)
class PlayAndModes:
    """Play of the foot, the lowest modes of the leg, and the case's play targets."""

    play: FootPlay
    modes: LegModes
    targets: tuple[PlayTarget, ...]

    @property
    def all_met(self) -> bool:
        """True when every play target is met."""
        return all(t.met for t in self.targets)


def play_and_modes(case: Case, built: Built, pose: Pose, count: int = MODES) -> PlayAndModes:
    """Play and natural modes of the case in the pose its model was built in.

    Parameters
    ----------
    case : the case
    built : ``stiff.build.build(case, pose)``
    pose : the pose (its warnings and angles are the caller's; the positions come from
        ``built``, which was made from it)
    count : number of modes [-]
    """
    del pose  # the model holds the pose's node positions
    play = foot_play(case, built)
    return PlayAndModes(play=play, modes=leg_modes(case, built, count),
                        targets=play_targets(case, play))


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else float(x)


def results_section(result: PlayAndModes) -> dict[str, Any]:
    """The ``play`` and ``modes`` entries of results.json (units in the keys)."""
    p, m = result.play, result.modes
    return {
        "play": {
            "in_plane_worst_mm": _num(p.in_plane_worst_mm),
            "in_plane_rss_mm": _num(p.in_plane_rss_mm),
            "out_of_plane_worst_mm": _num(p.out_of_plane_worst_mm),
            "out_of_plane_rss_mm": _num(p.out_of_plane_rss_mm),
            "out_of_plane_chain": list(p.chain),
            "joints": [{
                "name": j.name, "joint": j.joint, "parts": list(j.parts), "kind": j.kind,
                "clearance_mm": _num(j.clearance_mm),
                "bearing_length_mm": _num(j.bearing_length_mm),
                "tilt_play_deg": _num(math.degrees(j.tilt_play_rad)),
                "gain_mm_per_mm": _num(j.gain), "lever_arm_mm": _num(j.lever_arm_mm),
                "in_plane_mm": _num(j.in_plane_mm), "lever_play_mm": _num(j.lever_play_mm),
                "on_chain": j.on_chain, "out_of_plane_mm": _num(j.out_of_plane_mm),
                "share_in_plane": _num(j.share_in_plane),
                "share_out_of_plane": _num(j.share_out_of_plane),
            } for j in p.joints],
            "targets": [{"name": t.name, "demand_mm": _num(t.demand_mm),
                         "limit_mm": _num(t.limit_mm), "met": t.met} for t in result.targets],
        },
        "modes": {
            "moving_mass_g": _num(m.mass.moving_t * G_PER_T),
            "mass_g": {"members": _num(m.mass.members_t * G_PER_T),
                       "pins": _num(m.mass.pins_t * G_PER_T),
                       "actuators": _num(m.mass.actuators_t * G_PER_T),
                       "payload": _num(m.mass.payload_t * G_PER_T)},
            "foot_effective_mass_g": _num(m.foot_effective_mass_t * G_PER_T),
            "foot_vertical_stiffness_N_per_mm": _num(m.foot_stiffness_N_per_mm),
            "lowest": [{
                "frequency_Hz": _num(md.frequency_Hz), "kind": md.kind,
                "in_plane_fraction": _num(md.in_plane_fraction),
                "foot_modal_mass_g": None if md.foot_modal_mass_t is None
                else _num(md.foot_modal_mass_t * G_PER_T),
            } for md in m.modes],
        },
    }


def summary_lines(result: PlayAndModes) -> list[str]:
    """A few lines for the terminal summary: play totals, the worst joint, lowest modes."""
    p, m = result.play, result.modes
    lines = [f"foot play from pin clearance: {p.in_plane_worst_mm:.3g} mm in the plane "
             f"(RSS {p.in_plane_rss_mm:.3g}), {p.out_of_plane_worst_mm:.3g} mm out of it "
             f"(RSS {p.out_of_plane_rss_mm:.3g}), on top of the elastic deflection"]
    if p.joints and p.joints[0].in_plane_mm + p.joints[0].out_of_plane_mm > 0:
        j = p.joints[0]
        lines.append(f"loosest joint: {j.name} ({j.share_in_plane:.0%} of the in-plane play, "
                     f"{j.share_out_of_plane:.0%} of the out-of-plane play)")
    for kind in ("in-plane", "out-of-plane"):
        first = next((md for md in m.modes if md.kind == kind), None)
        if first is not None:
            lines.append(f"lowest {kind} natural frequency: {first.frequency_Hz:.3g} Hz")
    lines.append(f"effective mass of the leg at the foot (vertical): "
                 f"{m.foot_effective_mass_t * G_PER_T:.3g} g")
    lines.extend(f"target {t.name}: {t.demand_mm:.3g} mm against {t.limit_mm:g} mm "
                 f"({'met' if t.met else 'NOT met'})" for t in result.targets)
    return lines

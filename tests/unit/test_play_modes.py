"""Play and modes: the mass model, records for results.json, plots, targets and errors."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from matplotlib.figure import Figure

from stiff.build import Built, build
from stiff.case import load_case, parse_case
from stiff.case_model import Case
from stiff.errors import MechanismError, ModelError
from stiff.fe import Beams, Connectors, FrameModel, stack
from stiff.linkage import case_pose
from stiff.materials import load_library
from stiff.modes import leg_mass, leg_modes, mass_matrix, natural_modes, plot_mode
from stiff.play import foot_play
from stiff.play_modes import play_and_modes, results_section, summary_lines

LIB = load_library()
CASES = sorted((Path(__file__).resolve().parents[2] / "cases").glob("*.toml"))


@pytest.mark.parametrize("path", CASES, ids=[p.stem for p in CASES])
def test_every_demo_case_reports_play_and_modes(path: Path) -> None:
    case = load_case(path, LIB)
    pose = case_pose(case)
    built = build(case, pose)
    result = play_and_modes(case, built, pose)
    p, m = result.play, result.modes
    assert 0 < p.in_plane_rss_mm <= p.in_plane_worst_mm
    assert 0 < p.out_of_plane_rss_mm <= p.out_of_plane_worst_mm
    assert sum(j.share_in_plane for j in p.joints) == pytest.approx(1.0)
    assert sum(j.share_out_of_plane for j in p.joints) == pytest.approx(1.0)
    f = [md.frequency_Hz for md in m.modes]
    assert len(f) == 6 and f == sorted(f) and f[0] > 0
    assert {md.kind for md in m.modes} == {"in-plane", "out-of-plane"}
    assert 0 < m.foot_effective_mass_t < 2 * m.mass.moving_t
    json.dumps(results_section(result), allow_nan=False)
    assert all(isinstance(line, str) for line in summary_lines(result))


def test_five_bar_pins_share_the_in_plane_play_equally() -> None:
    case = load_case(next(p for p in CASES if p.stem == "five_bar_leg"), LIB)
    play = foot_play(case, build(case, case_pose(case)))
    # symmetric leg, equal clearances: every pin's gap moves the foot by the same amount
    shares = [j.share_in_plane for j in play.joints]
    assert shares == pytest.approx([0.2] * 5, rel=1e-6)
    assert {j.kind for j in play.joints} == {"pin", "driven"}  # fixed joints have no play


def arm_case(targets: str = "", payload: str = "") -> str:
    return f"""
title = "arm"
foot = "tip"
[body]
nodes = ["root"]
[nodes]
root = {{ x_mm = 0.0, y_mm = 0.0 }}
elbow = {{ x_mm = 100.0, y_mm = 0.0 }}
tip = {{ x_mm = 180.0, y_mm = 20.0 }}
[parts.upper]
kind = "tube"
nodes = ["root", "elbow"]
z_mm = 4.0
material = "CF-pultruded"
size = "8x6"
[parts.fore]
kind = "printed"
nodes = ["elbow", "tip"]
z_mm = 12.0
section = {{ material = "PETG", width_mm = 8.0, depth_mm = 10.0 }}
[joints.root]
kind = "driven"
node = "root"
parts = ["body", "upper"]
actuator = "shoulder"
pin_diameter_mm = 4.0
clearance_mm = 0.05
[joints.elbow]
kind = "driven"
node = "elbow"
parts = ["upper", "fore"]
actuator = "elbow"
pin_diameter_mm = 3.0
clearance_mm = 0.05
[actuators.shoulder]
stall_torque_Nm = 2.0
proportional_band_deg = 3.0
angle_deg = 0.0
mass_kg = 0.05
[actuators.elbow]
stall_torque_Nm = 1.0
proportional_band_deg = 3.0
angle_deg = 0.0
mass_kg = 0.03
[loads]
{payload}
[targets]
{targets}
"""


def built_arm(**kw: str) -> tuple[Case, Built]:
    case = parse_case(arm_case(**kw), Path("arm.toml"), LIB)
    return case, build(case, case_pose(case))


def test_mass_model_counts_what_moves() -> None:
    case = parse_case(arm_case(payload="payload_kg = 0.2"), Path("arm.toml"), LIB)
    built = build(case, case_pose(case))
    mass = leg_mass(case, built)
    xyz = built.model.xyz
    ends = xyz[built.model.beams.nodes]
    lengths = np.linalg.norm(ends[:, 1] - ends[:, 0], axis=-1)
    assert mass.members_t == pytest.approx(float(mass.mass_per_length_t_per_mm @ lengths))
    assert mass.actuators_t == pytest.approx(0.03e-3)  # the shoulder servo sits on the body
    assert mass.payload_t == pytest.approx(0.2e-3)
    # the elbow servo's housing is on the upper arm, at the elbow
    assert mass.point_mass_t[built.node_of[("upper", "elbow")]] >= 0.03e-3
    M = mass_matrix(built.model, mass.mass_per_length_t_per_mm, mass.r2_mm2, mass.point_mass_t)
    np.testing.assert_allclose(M, M.T, atol=1e-18)
    # a rigid translation along x carries every mass, held ones too
    r = np.zeros(built.model.n_dofs)
    r[0::6] = 1.0
    assert r @ M @ r == pytest.approx(mass.members_t + float(mass.point_mass_t.sum()))
    pins = float(mass.point_mass_t.sum()) - 0.08e-3 - 0.2e-3
    steel = LIB.metal("steel-8.8").density_t_mm3
    # each pin: π d²/4 over the stack from one part plane to the other plus half of each
    # bearing (the body's is unknown: 0); tube od 8 mm, printed width 8 mm
    hand = steel * math.pi / 4 * (4.0**2 * (4.0 + 0.5 * 8) + 3.0**2 * (8.0 + 0.5 * (8 + 8)))
    assert pins == pytest.approx(hand, rel=1e-9)


def test_rotation_about_a_bar_end_gives_its_moment_of_inertia() -> None:
    L, mu = 120.0, 3e-8
    model = FrameModel.make([[0.0, 0.0, 0.0], [L / 2, 0.0, 0.0], [L, 0.0, 0.0]],
                            beams=Beams.make([[0, 1], [1, 2]], E=1e5, G=4e4, A=20.0, Iy=50.0,
                                             Iz=50.0, J=100.0))
    M = mass_matrix(model, mu, 5.0)
    x = model.xyz[:, 0]
    r = np.zeros(model.n_dofs)
    r[1::6] = x  # rotation about z at the origin: v = θ x, θz = θ
    r[5::6] = 1.0
    # cubic shape functions hold the rigid rotation exactly: μ L³/3
    assert r @ M @ r == pytest.approx(mu * L**3 / 3, rel=1e-12)
    t = np.zeros(model.n_dofs)
    t[3::6] = 1.0  # twist about the bar's axis: μ r² L
    assert t @ M @ t == pytest.approx(mu * 5.0 * L, rel=1e-12)


def test_play_targets_met_and_not_met() -> None:
    case, built = built_arm(targets="max_play_mm = 0.08\nmax_lateral_play_mm = 1.0")
    result = play_and_modes(case, built, case_pose(case))
    by = {t.name: t for t in result.targets}
    assert by["foot play in the linkage plane"].demand_mm == pytest.approx(0.1, rel=1e-9)
    assert not by["foot play in the linkage plane"].met
    assert not result.all_met
    lateral = by["lateral foot play"]
    assert lateral.met == (lateral.demand_mm <= 1.0)
    lines = summary_lines(result)
    assert any("NOT met" in line for line in lines)


def test_play_needs_the_model_of_the_same_case() -> None:
    case, _ = built_arm()
    other = load_case(next(p for p in CASES if p.stem == "camera_arm"), LIB)
    with pytest.raises(ModelError, match="not built from this case"):
        foot_play(case, build(other, case_pose(other)))


def test_plot_mode_draws_on_given_axes_and_returns_them() -> None:
    case, built = built_arm()
    modes = leg_modes(case, built, count=4)
    ax = Figure().add_subplot()
    for md in modes.modes:
        assert plot_mode(built, md, ax) is ax
    fresh = plot_mode(built, modes.modes[0])
    assert fresh is not ax and fresh.get_title().endswith(modes.modes[0].kind)


def test_mode_shapes_are_scaled_to_unit_translation() -> None:
    case, built = built_arm()
    for md in leg_modes(case, built, count=3).modes:
        assert float(np.abs(md.shape[:, :3]).max()) == pytest.approx(1.0)
        assert float(md.shape[:, :3].max()) == pytest.approx(1.0)
        assert not md.shape.flags.writeable


def test_a_mechanism_has_no_modes() -> None:
    model = FrameModel.make([[0, 0, 0], [0, 0, 0], [50, 0, 0]],
                            beams=Beams.make([[1, 2]], E=1e5, G=4e4, A=20.0, Iy=50.0, Iz=50.0,
                                             J=100.0),
                            connectors=Connectors.make([[0, 1]], [[math.inf] * 5 + [0.0]]),
                            fixed=[[True] * 6, [False] * 6, [False] * 6])
    with pytest.raises(MechanismError):
        natural_modes(model, mass_matrix(model, 1e-8, 5.0), 2)


def test_mass_matrix_refuses_bad_input() -> None:
    model = FrameModel.make([[0, 0, 0], [50, 0, 0]],
                            beams=Beams.make([[0, 1]], E=1e5, G=4e4, A=20.0, Iy=50.0, Iz=50.0,
                                             J=100.0))
    with pytest.raises(ModelError, match="mass per length"):
        mass_matrix(model, -1.0, 5.0)
    with pytest.raises(ModelError, match="point masses"):
        mass_matrix(model, 1e-8, 5.0, [1.0])
    with pytest.raises(ModelError, match="batch"):
        mass_matrix(stack([model, model]), 1e-8, 5.0)

"""The frame engine against anastruct on planar frames and trusses.

Sources:
- anastruct 1.7.0 (PyPI), a 2D frame solver (REFERENCES.md §2): used only for rigid-jointed
  frames and pin-ended rods (its truss elements), never its hinges or element end springs,
  which are wrong in 1.7.0. Its element is Euler–Bernoulli with no shear deformation at all
  (constitutive matrix EA/l, 4EI/l, 2EI/l; there is no shear option), so stiff runs with
  infinite shear areas.
- Cantilever with a tip load, δ = PL³/(3EI), slope PL²/(2EI); with a tip moment, δ = ML²/(2EI),
  slope ML/(EI): Roark's Formulas for Stress and Strain, Table 8.1, from memory. Used to pin
  down the adapter's signs.

Tolerance. anastruct stores coordinates as float32. The frames here put every node on a
1/16 mm grid, which float32 holds exactly, so both libraries see the same geometry; what is left
is anastruct's float32 arithmetic on it: element lengths come from a float32 square root
(relative error up to 2⁻²⁴ ≈ 6e-8), and bending terms go with 1/L³, so single terms are off by
up to ~2e-7 and results by a few times that. rel 1e-6 of the largest value of each quantity
leaves room for that and would still catch any modelling difference (those are ≥ 1e-4 here);
the measured worst case is given beside each test.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from anastruct import SystemElements

from stiff.fe import Beams, FrameModel, solve_static
from tests.verification.oracles import (
    PLANE,
    ROD_RELEASES,
    Frame,
    anastruct,
    rod_only_nodes,
    stiff_result,
)

TOLERANCE = 1e-6  # float32 coordinates, see the module docstring

OUT_OF_PLANE = np.array([2, 3, 4])  # uz, rx, ry


def on_grid(x: np.ndarray) -> np.ndarray:
    """Round to 1/16 mm: exact in float32 for |x| < 2¹⁹ mm."""
    return np.round(np.asarray(x) * 16.0) / 16.0


def planar_frame(
    rng: np.random.Generator, xy: np.ndarray, members: list[tuple[int, int]],
    rods: list[bool], fixed: np.ndarray, ground: np.ndarray, loads: np.ndarray,
) -> Frame:
    """A frame in the x-y plane with random sections.

    Out-of-plane DOFs are fixed at every node, as is rz at nodes that only rods reach (nothing
    else holds it). ``fixed``, ``ground`` (n, 3) and ``loads`` (c, n, 3) are over ux, uy, rz.
    """
    n, m = len(xy), len(members)
    xyz = np.zeros((n, 3))
    xyz[:, :2] = on_grid(xy)
    assert (xyz.astype(np.float32) == xyz).all()
    releases = np.zeros((m, 12), bool)
    releases[np.asarray(rods)] = ROD_RELEASES
    E = rng.uniform(3e3, 1.5e5, m)
    fixed6 = np.zeros((n, 6), bool)
    fixed6[:, PLANE] = fixed
    fixed6[:, OUT_OF_PLANE] = True
    ground6 = np.zeros((n, 6))
    ground6[:, PLANE] = ground
    loads6 = np.zeros((loads.shape[0], n, 6))
    loads6[..., PLANE] = loads
    held = np.zeros(n, bool)  # nodes a rigid member end reaches
    held[np.array(members, np.intp)[~np.asarray(rods)].reshape(-1)] = True
    fixed6[~held, 5] = True
    Iz = rng.uniform(300.0, 2e4, m)
    return Frame(
        xyz=xyz, members=np.array(members, np.intp), E=E, G=E / 2.6,
        A=rng.uniform(20.0, 200.0, m),
        Iy=3.0 * Iz,  # out-of-plane: must not enter the in-plane result
        Iz=Iz, J=rng.uniform(500.0, 4e4, m),
        ref=np.tile([0.0, 0.0, 1.0], (m, 1)),  # local z normal to the plane: bending uses Iz
        releases=releases, fixed=fixed6, ground=ground6, loads=loads6)


def random_portal(seed: int) -> Frame:
    """A rigid-jointed multi-bay, multi-storey frame with jittered nodes, some panels braced
    by pin-ended rods, mixed base supports (fixed, pinned, roller, springs) and three load
    cases of nodal forces and moments."""
    rng = np.random.default_rng(seed)
    bays, storeys = int(rng.integers(1, 4)), int(rng.integers(1, 4))
    x = np.concatenate([[0.0], np.cumsum(rng.uniform(200.0, 500.0, bays))])
    y = np.concatenate([[0.0], np.cumsum(rng.uniform(200.0, 400.0, storeys))])
    X, Y = np.meshgrid(x, y)  # row k is level k
    xy = np.stack([X.ravel(), Y.ravel()], axis=1)
    xy[bays + 1:] += rng.uniform(-30.0, 30.0, xy[bays + 1:].shape)

    def node(level: int, col: int) -> int:
        return level * (bays + 1) + col

    members = [(node(k, c), node(k + 1, c)) for k in range(storeys) for c in range(bays + 1)]
    members += [(node(k, c), node(k, c + 1)) for k in range(1, storeys + 1) for c in range(bays)]
    rods = [False] * len(members)
    for k in range(storeys):
        for c in range(bays):
            if rng.random() < 0.5:
                flip = rng.random() < 0.5
                members.append((node(k, c + flip), node(k + 1, c + 1 - flip)))
                rods.append(True)

    n = len(xy)
    fixed = np.zeros((n, 3), bool)
    ground = np.zeros((n, 3))
    fixed[0] = True
    kinds = ["fixed", "pinned", "roller", "springs"]
    for c in range(1, bays + 1):
        kind = kinds[int(rng.integers(len(kinds)))]
        if kind == "fixed":
            fixed[c] = True
        elif kind == "pinned":
            fixed[c, :2] = True
        elif kind == "roller":
            fixed[c, 1] = True
        else:
            ground[c] = [rng.uniform(10.0, 1e3), rng.uniform(10.0, 1e3), rng.uniform(1e4, 1e7)]

    loads = np.zeros((3, n, 3))
    for case in range(3):
        for i in rng.choice(np.arange(bays + 1, n), min(3, n - bays - 1), replace=False):
            loads[case, i] = [rng.uniform(-100.0, 100.0), rng.uniform(-100.0, 100.0),
                              rng.uniform(-5e3, 5e3)]
    return planar_frame(rng, xy, members, rods, fixed, ground, loads)


def random_truss(seed: int) -> Frame:
    """A Pratt truss of pin-ended rods with jittered nodes, pinned at one end, on a roller at
    the other, with three load cases at the joints."""
    rng = np.random.default_rng(seed)
    panels = int(rng.integers(3, 7))
    width, height = rng.uniform(150.0, 300.0), rng.uniform(150.0, 400.0)
    x = width * np.arange(panels + 1)
    xy = np.concatenate([np.stack([x, np.zeros_like(x)], axis=1),
                         np.stack([x, np.full_like(x, height)], axis=1)])
    xy += rng.uniform(-20.0, 20.0, xy.shape)
    bottom, top = np.arange(panels + 1), panels + 1 + np.arange(panels + 1)
    members = [(int(bottom[i]), int(bottom[i + 1])) for i in range(panels)]
    members += [(int(top[i]), int(top[i + 1])) for i in range(panels)]
    members += [(int(bottom[i]), int(top[i])) for i in range(panels + 1)]
    members += [(int(bottom[i]), int(top[i + 1])) if i < panels // 2
                else (int(top[i]), int(bottom[i + 1])) for i in range(panels)]
    n = len(xy)
    fixed = np.zeros((n, 3), bool)
    fixed[bottom[0], :2] = True
    fixed[bottom[-1], 1] = True
    loads = np.zeros((3, n, 3))
    for case in range(3):
        for i in rng.choice(n, 3, replace=False):
            loads[case, i, :2] = rng.uniform(-100.0, 100.0, 2)
    return planar_frame(rng, xy, members, [True] * len(members), fixed,
                        np.zeros((n, 3)), loads)


def rel_error(got: np.ndarray, expected: np.ndarray) -> float:
    """Largest difference over the largest expected value."""
    return float(np.abs(got - expected).max() / np.abs(expected).max())


def errors(frame: Frame, **kwargs: bool) -> dict[str, float]:
    ours, theirs = stiff_result(frame, **kwargs), anastruct(frame)
    assert ours.axial is not None and theirs.axial is not None
    held = ~rod_only_nodes(frame)  # rz has a meaning only where a rigid member end is
    out = {
        "translations": rel_error(ours.displacements[..., :2], theirs.displacements[..., :2]),
        "reaction forces": rel_error(ours.reactions[..., :2], theirs.reactions[..., :2]),
        "axial forces": rel_error(ours.axial, theirs.axial),
    }
    if held.any():
        out["rotations"] = rel_error(ours.displacements[:, held, 5],
                                     theirs.displacements[:, held, 5])
        out["reaction moments"] = rel_error(ours.reactions[..., 5], theirs.reactions[..., 5])
    return out


# Measured worst case over these frames: 8.5e-8 (translations), 9.1e-8 (rotations),
# 9.5e-8 (reaction moments), 2.3e-8 (reaction and axial forces).
@pytest.mark.parametrize("seed", range(8))
def test_rigid_jointed_frame_matches_anastruct(seed: int) -> None:
    frame = random_portal(seed)
    errs = errors(frame)
    assert max(errs.values()) < TOLERANCE, errs


# Measured worst case over these trusses, either way of modelling the rods: 1.0e-8
# (translations); forces 3e-14 (statically determinate: they do not depend on the lengths).
@pytest.mark.parametrize("rods_as_springs", [False, True])
@pytest.mark.parametrize("seed", range(4))
def test_truss_matches_anastruct(seed: int, rods_as_springs: bool) -> None:
    """Rods as members released in bending at both ends and in torsion at one, or as axial
    springs of rate EA/L: both must match anastruct's truss elements."""
    frame = random_truss(seed)
    errs = errors(frame, rods_as_springs=rods_as_springs)
    assert max(errs.values()) < TOLERANCE, errs


E, I, A, L = 200_000.0, 1_000.0, 100.0, 500.0  # MPa, mm⁴, mm², mm: all exact in float32
P, M = 10.0, 2_000.0  # N, N·mm


def test_anastruct_sign_calibration() -> None:
    """Cantilever fixed at the origin, tip at (L, 0): anastruct's raw output against Roark
    Table 8.1 (from memory), which fixes every sign the adapter flips."""
    def tip(Fx: float = 0.0, Fy: float = 0.0, Tz: float = 0.0) -> tuple[dict, dict]:
        ss = SystemElements(EA=E * A, EI=E * I)
        ss.add_element([[0.0, 0.0], [L, 0.0]])
        ss.add_support_fixed(1)
        if Tz:
            ss.moment_load(2, Tz=Tz)
        else:
            ss.point_load(2, Fx=Fx, Fy=Fy)
        ss.solve()
        return ss.get_node_displacements(2), ss.get_node_results_system(1)

    # Fy = +P moves the tip towards +y, turning it counter-clockwise: phi_z is clockwise +.
    d, support = tip(Fy=P)
    assert d["uy"] == pytest.approx(P * L**3 / (3 * E * I), rel=1e-12)
    assert d["phi_z"] == pytest.approx(-P * L**2 / (2 * E * I), rel=1e-12)
    # Support results are the negatives of the reactions (reaction −P and −PL, clockwise).
    assert support["Fy"] == pytest.approx(P, rel=1e-12)
    assert support["Tz"] == pytest.approx(P * L, rel=1e-12)
    # Tz = +M is counter-clockwise: it lifts the tip.
    d, support = tip(Tz=M)
    assert d["uy"] == pytest.approx(M * L**2 / (2 * E * I), rel=1e-12)
    assert d["phi_z"] == pytest.approx(-M * L / (E * I), rel=1e-12)
    assert support["Tz"] == pytest.approx(M, rel=1e-12)
    # Fx = +P stretches the bar: ux is in the global sense; the support result is −reaction.
    d, support = tip(Fx=P)
    assert d["ux"] == pytest.approx(P * L / (E * A), rel=1e-12)
    assert support["Fx"] == pytest.approx(P, rel=1e-12)


@pytest.mark.parametrize("upright", [False, True])
def test_adapter_gives_stiff_conventions(upright: bool) -> None:
    """Through the adapter, anastruct and stiff give the closed form with stiff's signs, for a
    cantilever along +x loaded along +y and one along +y loaded along +x (which turns it
    clockwise, rz < 0)."""
    tip = [0.0, L] if upright else [L, 0.0]
    load = np.zeros((1, 2, 3))
    load[0, 1, 0 if upright else 1] = P
    frame = planar_frame(np.random.default_rng(0), np.array([[0.0, 0.0], tip]), [(0, 1)],
                         [False], np.array([[True] * 3, [False] * 3]), np.zeros((2, 3)), load)
    frame = replace(frame, E=np.array([E]), Iz=np.array([I]), A=np.array([A]))
    sign = -1.0 if upright else 1.0
    for result in (anastruct(frame), stiff_result(frame)):
        u = result.displacements[0, 1]
        assert u[0 if upright else 1] == pytest.approx(P * L**3 / (3 * E * I), rel=1e-12)
        assert u[5] == pytest.approx(sign * P * L**2 / (2 * E * I), rel=1e-12)
        assert result.reactions[0, 0, 5] == pytest.approx(-sign * P * L, rel=1e-12)


def test_stiff_planar_model_has_no_out_of_plane_reactions() -> None:
    """The out-of-plane supports of the planar models carry nothing, so comparing only the
    in-plane DOFs loses nothing."""
    frame = random_portal(1)
    model = FrameModel.make(frame.xyz, beams=Beams.make(
        frame.members, E=frame.E, G=frame.G, A=frame.A, Iy=frame.Iy, Iz=frame.Iz, J=frame.J,
        ref=frame.ref, releases=frame.releases), fixed=frame.fixed, ground=frame.ground)
    reactions = solve_static(model, frame.loads).reactions
    assert np.abs(reactions[..., OUT_OF_PLANE]).max() <= 1e-9 * np.abs(reactions).max()

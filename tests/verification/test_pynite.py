"""The frame engine against PyNite on random 3D frames.

Source: PyNite (PyPI package PyNiteFEA 3.2.0, import ``Pynite``), a general 3D Euler–Bernoulli
frame solver (REFERENCES.md §2). It has no shear deformation, so stiff runs with infinite shear
areas. Every frame is generated from a seeded numpy RNG: random node positions, members
(a spanning tree plus extra members), sections, member orientations, member end releases on
the extra members (bending at one end, one bending axis, bending and torsion at one end, and
pin-ended rods), spring supports, two-way axial springs without preload, and three load cases.

Both solvers assemble the same Euler–Bernoulli matrices and solve them directly, so they agree
to rounding amplified by the condition number of the stiffness (soft ground springs against
stiff members reach about 1e8): the agreement asked for is rel 1e-8 of the largest value of each
quantity (translations, rotations, reaction forces, reaction moments, member end forces and
moments); the measured worst case is 1.1e-11 (member end forces).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from stiff.fe import Beams, Connectors, FrameModel, Springs, element, solve_static, stack
from tests.verification.oracles import (
    ROD_RELEASES,
    Frame,
    member_axes,
    pynite,
    stiff_result,
    to_stiff,
)

TOLERANCE = 1e-8  # see the module docstring
N_FRAMES = 12

#: Release patterns for the extra members (end 1 DOFs 0-5, end 2 DOFs 6-11).
PATTERNS = {
    "none": [],
    "bending at end 2": [10, 11],
    "ry at end 1": [4],
    "rz at end 2": [11],
    "bending and torsion at end 1": [3, 4, 5],
    "rod": np.flatnonzero(ROD_RELEASES).tolist(),
}


def random_frame(seed: int) -> Frame:
    """A random stable 3D frame: a rigid spanning tree held at node 0, plus extras.

    The tree of unreleased members, held fully at node 0 (or pinned there with rotational
    spring supports), is stable on its own; the extra members, with random end releases, and
    the axial springs only add stiffness, so every frame is solvable.
    """
    rng = np.random.default_rng(seed)
    n = int(rng.integers(6, 11))
    xyz = [rng.uniform(-300.0, 300.0, 3)]
    while len(xyz) < n:  # nodes at least 60 mm apart
        p = rng.uniform(-300.0, 300.0, 3)
        if min(np.linalg.norm(p - q) for q in xyz) > 60.0:
            xyz.append(p)
    pairs = [(int(rng.integers(0, i)), i) for i in range(1, n)]
    n_tree = len(pairs)
    while len(pairs) < n_tree + int(rng.integers(2, 5)):
        a, b = (int(i) for i in rng.choice(n, 2, replace=False))
        if (a, b) not in pairs and (b, a) not in pairs:
            pairs.append((a, b))
    members = np.array([(b, a) if rng.random() < 0.5 else (a, b) for a, b in pairs], np.intp)
    m = len(members)

    releases = np.zeros((m, 12), bool)
    names = list(PATTERNS)
    for j in range(n_tree, m):
        releases[j, PATTERNS[names[int(rng.integers(len(names)))]]] = True
    releases[n_tree] = ROD_RELEASES  # every frame has at least one rod

    d = np.array(xyz)[members[:, 1]] - np.array(xyz)[members[:, 0]]
    ref = rng.normal(size=(m, 3))
    ref -= 0.8 * np.sum(ref * d, axis=1, keepdims=True) * d / np.sum(d * d, axis=1)[:, None]

    E = rng.uniform(3e3, 1.5e5, m)
    fixed = np.zeros((n, 6), bool)
    ground = np.zeros((n, 6))
    if rng.random() < 0.5:
        fixed[0] = True
    else:  # pinned, rotations on springs [N·mm/rad]
        fixed[0, :3] = True
        ground[0, 3:] = rng.uniform(1e4, 1e7, 3)
    if rng.random() < 0.5:
        fixed[n - 1, :3] = True
    for i in rng.choice(np.arange(1, n - 1), 2, replace=False):
        dofs = rng.choice(6, int(rng.integers(1, 4)), replace=False)
        ground[i, dofs] = np.where(dofs < 3, rng.uniform(1.0, 100.0, dofs.size),
                                   rng.uniform(1e3, 1e6, dofs.size))

    springs = []
    while len(springs) < int(rng.integers(1, 4)):
        a, b = (int(i) for i in rng.choice(n, 2, replace=False))
        if (a, b) not in pairs and (b, a) not in pairs and (a, b) not in springs:
            springs.append((a, b))

    loads = np.zeros((3, n, 6))
    for c in range(3):
        for i in rng.choice(np.arange(1, n), 3, replace=False):
            loads[c, i, :3] = rng.uniform(-100.0, 100.0, 3)
            loads[c, i, 3:] = rng.uniform(-5e3, 5e3, 3)

    return Frame(
        xyz=np.array(xyz), members=members, E=E, G=E / (2 * (1 + rng.uniform(0.2, 0.45, m))),
        A=rng.uniform(20.0, 200.0, m), Iy=rng.uniform(300.0, 2e4, m),
        Iz=rng.uniform(300.0, 2e4, m), J=rng.uniform(500.0, 4e4, m), ref=ref,
        releases=releases, fixed=fixed, ground=ground, loads=loads,
        springs=np.array(springs, np.intp), rates=rng.uniform(10.0, 1000.0, len(springs)))


def rel_error(got: np.ndarray, expected: np.ndarray) -> float:
    """Largest difference over the largest expected value."""
    return float(np.abs(got - expected).max() / np.abs(expected).max())


def errors(frame: Frame) -> dict[str, float]:
    ours, theirs = stiff_result(frame), pynite(frame)
    assert ours.member_forces is not None and theirs.member_forces is not None
    forces, moments = [0, 1, 2, 6, 7, 8], [3, 4, 5, 9, 10, 11]
    return {
        "translations": rel_error(ours.displacements[..., :3], theirs.displacements[..., :3]),
        "rotations": rel_error(ours.displacements[..., 3:], theirs.displacements[..., 3:]),
        "reaction forces": rel_error(ours.reactions[..., :3], theirs.reactions[..., :3]),
        "reaction moments": rel_error(ours.reactions[..., 3:], theirs.reactions[..., 3:]),
        "member end forces": rel_error(ours.member_forces[..., forces],
                                       theirs.member_forces[..., forces]),
        "member end moments": rel_error(ours.member_forces[..., moments],
                                        theirs.member_forces[..., moments]),
    }


@pytest.mark.parametrize("seed", range(N_FRAMES))
def test_random_frame_matches_pynite(seed: int) -> None:
    frame = random_frame(seed)
    assert frame.releases.any() and frame.springs.size and frame.ground.any()
    errs = errors(frame)
    assert max(errs.values()) < TOLERANCE, errs


def test_member_axes_match_the_adapter() -> None:
    """Pins the axis convention the adapter hands to PyNite: stiff's own member axes."""
    frame = random_frame(0)
    R, _ = element.member_axes(frame.xyz[frame.members[:, 0]], frame.xyz[frame.members[:, 1]],
                               frame.ref)
    np.testing.assert_allclose(R, member_axes(frame), atol=1e-14)


def test_connector_pin_matches_pynite_release() -> None:
    """A connector rigid in all but one rotation, between two nodes at one place, is the same
    joint as a member end release about that axis (PyNite has no connectors)."""
    frame = random_frame(3)
    j = frame.n_members - 1  # an extra member: the tree alone holds the frame
    for dof, end in ((4, 1), (5, 1), (4, 0)):  # ry and rz at end 2, ry at end 1
        releases = frame.releases.copy()
        releases[j] = False
        released = releases.copy()
        released[j, 6 * end + dof] = True
        oracle = pynite(replace(frame, releases=released))

        # stiff: member j ends on a new node, joined to the old one by the connector.
        node = int(frame.members[j, end])
        members = frame.members.copy()
        members[j, end] = frame.n_nodes
        xyz = np.vstack([frame.xyz, frame.xyz[node]])
        stiffness = np.full(6, np.inf)
        stiffness[dof] = 0.0
        model = FrameModel.make(
            xyz,
            beams=Beams.make(members, E=frame.E, G=frame.G, A=frame.A, Iy=frame.Iy,
                             Iz=frame.Iz, J=frame.J, ref=frame.ref, releases=releases),
            connectors=Connectors.make([[node, frame.n_nodes]], [stiffness],
                                       frame=member_axes(frame)[j][None]),
            springs=Springs.make(frame.springs, frame.rates),
            fixed=np.vstack([frame.fixed, np.zeros(6, bool)]),
            ground=np.vstack([frame.ground, np.zeros(6)]))
        loads = np.concatenate([frame.loads, np.zeros((3, 1, 6))], axis=1)
        sol = solve_static(model, loads)
        for got, expected in ((sol.displacements[:, :-1, :3], oracle.displacements[..., :3]),
                              (sol.displacements[:, :-1, 3:], oracle.displacements[..., 3:]),
                              (sol.reactions[:, :-1], oracle.reactions)):
            assert rel_error(got, expected) < TOLERANCE


def test_batched_poses_match_pynite() -> None:
    """Four perturbed poses and section variants of one frame, solved as one batch in stiff,
    each against its own PyNite model."""
    frame = random_frame(5)
    rng = np.random.default_rng(50)
    variants = [replace(frame, xyz=frame.xyz + rng.uniform(-20.0, 20.0, frame.xyz.shape),
                        Iz=frame.Iz * rng.uniform(0.5, 2.0, frame.n_members))
                for _ in range(4)]
    sol = solve_static(stack([to_stiff(v) for v in variants]), frame.loads)
    for b, variant in enumerate(variants):
        oracle = pynite(variant)
        assert rel_error(sol.displacements[b], oracle.displacements) < TOLERANCE
        assert rel_error(sol.reactions[b], oracle.reactions) < TOLERANCE
        assert rel_error(sol.beam_forces[b], oracle.member_forces) < TOLERANCE

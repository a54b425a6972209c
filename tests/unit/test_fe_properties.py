"""Invariants of the frame engine, checked on random frames (hypothesis).

- Maxwell–Betti reciprocity: the compliance matrix is symmetric.
- Linearity: twice the load gives twice the deflection.
- Rigid-body motion strains nothing: an element's forces vanish for any rigid motion, and a
  free element has exactly six zero eigenvalues.
- Objectivity: rotating the whole model rotates the answer and changes nothing else.
- Energy: the element energies add up to the external work ½ Fᵀu.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.spatial.transform import Rotation

from stiff.fe import Beams, Connectors, FrameModel, Springs, compliance, element, solve_static
from stiff.fe.assemble import (
    beam_matrices,
    connector_kinematics,
    connector_stiffness,
    global_stiffness,
    spring_stiffness,
)

seeds = st.integers(min_value=0, max_value=2**32 - 1)


def random_frame(seed: int, rotation: np.ndarray | None = None) -> FrameModel:
    """A random 3D frame: a chain of members from a fixed base, a connector, a spring."""
    rng = np.random.default_rng(seed)
    n = int(rng.integers(3, 7))
    steps = rng.uniform(-100, 100, (n - 1, 3))
    xyz = np.vstack([np.zeros(3), np.cumsum(steps, axis=0)])
    # a node stacked over the last one, joined by a connector, and a spring back to node 1
    xyz = np.vstack([xyz, xyz[-1] + [0.0, 0.0, 6.0]])
    R = np.eye(3) if rotation is None else rotation
    xyz = xyz @ R.T
    m = n - 1
    refs = np.cross(steps, rng.normal(size=(m, 3))) @ R.T
    releases = np.zeros((m, 12), bool)
    if m > 1:
        releases[m - 1, 11] = rng.random() < 0.5  # in-plane tip moment released sometimes
    beams = Beams.make(
        [[i, i + 1] for i in range(m)],
        E=rng.uniform(1e3, 2e5, m), G=rng.uniform(5e2, 8e4, m), A=rng.uniform(5, 200, m),
        Iy=rng.uniform(10, 5e3, m), Iz=rng.uniform(10, 5e3, m), J=rng.uniform(10, 5e3, m),
        Asy=rng.uniform(3, 150, m), Asz=rng.uniform(3, 150, m), ref=refs, releases=releases)
    frame = Rotation.random(random_state=rng).as_matrix() @ R.T
    k = rng.uniform(1e2, 1e5, 6)
    k[rng.integers(0, 6)] = np.inf
    conns = Connectors.make([[n - 1, n]], [k], frame=[frame])
    springs = Springs.make([[1, n]], rate=rng.uniform(1, 50), tension=rng.uniform(0, 20))
    fixed = np.zeros((n + 1, 6), bool)
    fixed[0] = True
    return FrameModel.make(xyz, beams=beams, connectors=conns, springs=springs, fixed=fixed)


def all_dofs(model: FrameModel) -> np.ndarray:
    return np.arange(6, model.n_dofs)


@settings(max_examples=25, deadline=None)
@given(seeds)
def test_compliance_is_symmetric_and_positive(seed: int) -> None:
    model = random_frame(seed)
    dofs = all_dofs(model)
    C = compliance(model, dofs)
    # reciprocity from independent solves: deflection at i under a unit load at j
    loads = np.zeros((dofs.size, model.n_dofs))
    loads[np.arange(dofs.size), dofs] = 1.0
    u = solve_static(model, loads.reshape(dofs.size, model.n_nodes, 6)).displacements
    by_solves = u.reshape(dofs.size, -1)[:, dofs]
    scale = np.abs(C).max()
    assert np.allclose(by_solves, by_solves.T, rtol=0, atol=1e-9 * scale)
    assert np.allclose(C, by_solves, rtol=0, atol=1e-9 * scale)
    assert np.linalg.eigvalsh(0.5 * (C + C.T)).min() > -1e-9 * scale


@settings(max_examples=25, deadline=None)
@given(seeds, st.floats(min_value=0.1, max_value=50.0))
def test_deflection_scales_with_load(seed: int, factor: float) -> None:
    model = random_frame(seed)
    rng = np.random.default_rng(seed + 1)
    loads = rng.normal(size=(1, model.n_nodes, 6)) * [1, 1, 1, 100, 100, 100]
    one = solve_static(model, loads)
    many = solve_static(model, factor * loads)
    assert np.allclose(many.displacements, factor * one.displacements, rtol=1e-9,
                       atol=1e-12 * np.abs(many.displacements).max())


@settings(max_examples=25, deadline=None)
@given(seeds)
def test_energy_equals_external_work(seed: int) -> None:
    model = random_frame(seed)
    rng = np.random.default_rng(seed + 2)
    loads = rng.normal(size=(2, model.n_nodes, 6))
    sol = solve_static(model, loads)
    work = 0.5 * np.sum(loads.reshape(2, -1) * sol.displacements.reshape(2, -1), axis=1)
    # random frames mix stiff connectors with soft members (condition numbers to ~1e8), so
    # rounding leaves ~1e-9 relative; 1e-7 still catches any missing or doubled energy term
    assert sol.total_energy == pytest.approx(work, rel=1e-7)
    # global equilibrium: reactions balance the applied forces
    assert np.abs(sol.reactions[..., :3].sum(1) + loads[..., :3].sum(1)).max() <= 1e-8 * max(
        np.abs(loads).max(), 1.0)


@settings(max_examples=25, deadline=None)
@given(seeds)
def test_rigid_body_motion_strains_nothing(seed: int) -> None:
    model = random_frame(seed)
    rng = np.random.default_rng(seed + 3)
    omega, shift = rng.normal(size=3) * 1e-2, rng.normal(size=3)
    u = np.hstack([shift + np.cross(omega, model.xyz), np.tile(omega, (model.n_nodes, 1))])
    # the springs' tension adds a geometric stiffness that rigid rotation does strain (it
    # turns the pull); check elements without it
    K = global_stiffness(FrameModel.make(model.xyz, beams=model.beams,
                                         connectors=model.connectors,
                                         springs=Springs.make(model.springs.nodes,
                                                              model.springs.rate)))
    f = K @ u.reshape(-1)
    assert np.abs(f).max() <= 1e-9 * np.abs(K).max() * np.abs(u).max()
    G = connector_kinematics(model)
    assert np.abs(connector_stiffness(model, G)).max() > 0


@settings(max_examples=25, deadline=None)
@given(seeds)
def test_free_element_has_six_zero_eigenvalues(seed: int) -> None:
    model = random_frame(seed)
    mats = beam_matrices(model)
    k = element.to_global(mats.k_local, mats.R)[0]  # first member never has releases
    w = np.linalg.eigvalsh(k)
    assert (np.abs(w) <= 1e-10 * w.max()).sum() == 6
    springs = spring_stiffness(model, np.zeros(1))
    assert (np.abs(np.linalg.eigvalsh(springs[0])) <= 1e-12 * springs.max()).sum() == 5


@settings(max_examples=25, deadline=None)
@given(seeds)
def test_rotating_the_model_rotates_the_answer(seed: int) -> None:
    R = Rotation.random(random_state=np.random.default_rng(seed + 4)).as_matrix()
    base, turned = random_frame(seed), random_frame(seed, rotation=R)
    rng = np.random.default_rng(seed + 5)
    loads = rng.normal(size=(1, base.n_nodes, 6))
    loads_turned = np.concatenate([loads[..., :3] @ R.T, loads[..., 3:] @ R.T], axis=-1)
    u0 = solve_static(base, loads).displacements
    u1 = solve_static(turned, loads_turned).displacements
    back = np.concatenate([u1[..., :3] @ R, u1[..., 3:] @ R], axis=-1)
    assert np.allclose(back, u0, rtol=1e-8, atol=1e-9 * np.abs(u0).max())
    # condition numbers reach ~3e9 (mm against rad), so energies agree to ~1e-9 relative
    assert solve_static(turned, loads_turned).total_energy == pytest.approx(
        solve_static(base, loads).total_energy, rel=1e-7)


def test_batched_solve_equals_one_by_one() -> None:
    from stiff.fe import stack, take

    models = [random_frame(s) for s in (1, 1, 1)]
    # same topology, perturbed coordinates
    models = [FrameModel.make(m.xyz * (1 + 0.05 * i), beams=m.beams, connectors=m.connectors,
                              springs=m.springs, fixed=m.fixed) for i, m in enumerate(models)]
    batch = stack(models)
    loads = np.random.default_rng(9).normal(size=(2, batch.n_nodes, 6))
    together = solve_static(batch, loads)
    for i, m in enumerate(models):
        alone = solve_static(m, loads)
        assert np.allclose(together.displacements[i], alone.displacements, rtol=1e-10,
                           atol=1e-14)
        assert np.allclose(together.connector_forces[i], alone.connector_forces, rtol=1e-8,
                           atol=1e-9)
        assert np.array_equal(take(batch, (i,)).xyz, m.xyz)

"""The block-wise rotation of member matrices and the assembly layout that goes with it.

``element.global_blocks`` forms Tᵀ k T from five outer products of the local axes per 3x3
block, which holds because a frame member's matrices couple local x only with x and y, z only
with y, z. Checked against the plain 12x12 product ``element.to_global`` for stiffness
(Timoshenko, with releases condensed), geometric stiffness, and a matrix with the forbidden
couplings (which the block form must not be used for, and indeed drops). The entries agree
to rounding (1e-13 of the largest), as do the DOFs that ``assemble.block_entries`` gives them.
"""

from __future__ import annotations

import numpy as np
from scipy.spatial.transform import Rotation

from stiff.fe import assemble, element


def members(n: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    E, G = rng.uniform(1e3, 2e5, n), rng.uniform(5e2, 8e4, n)
    A, Iy, Iz, J = (rng.uniform(5, 5e3, n) for _ in range(4))
    Asy, Asz, L = rng.uniform(3, 150, n), rng.uniform(3, 150, n), rng.uniform(10, 300, n)
    k = element.local_stiffness(E, G, A, Iy, Iz, J, Asy, Asz, L)
    R = Rotation.random(n, random_state=rng).as_matrix()
    return k, R


def test_blocks_equal_the_12x12_product() -> None:
    k, R = members(40, 1)
    released = np.zeros((40, 12), bool)
    released[::3, 11] = True  # pins
    released[1::3, [4, 5, 9, 10, 11]] = True  # pin-ended rods
    k = k.copy()
    k[np.flatnonzero(released.any(1))] = element.condensation(
        k[released.any(1)], released[released.any(1)])
    kg = element.local_geometric_stiffness(np.linspace(-50, 50, 40), np.full(40, 20.0),
                                           np.full(40, 300.0), np.full(40, 500.0),
                                           np.full(40, 120.0))
    for matrix in (k, kg):
        full = element.to_global(matrix, R)
        blocks = element.global_blocks(matrix, R).reshape(40, 144)
        scale = np.abs(full).max()
        assert np.abs(blocks - full[:, element.BLOCK_ROWS, element.BLOCK_COLS]).max() <= (
            1e-13 * scale)


def test_blocks_need_the_frame_structure() -> None:
    """A local x-y coupling is outside the five pairs: the block form leaves it out."""
    _, R = members(3, 2)
    k = np.zeros((3, 12, 12))
    k[:, 0, 1] = k[:, 1, 0] = 1.0
    assert np.abs(element.global_blocks(k, R)).max() == 0.0
    assert np.abs(element.to_global(k, R)).max() > 0.1


def test_block_entries_name_the_member_dofs() -> None:
    dofs = assemble.element_dofs(np.array([[0, 3], [2, 1], [4, 0]]), np.arange(6))
    rows, cols = assemble.block_entries(dofs)
    rows, cols = np.broadcast_arrays(rows, cols)
    assert np.array_equal(rows.reshape(3, 144), dofs[:, element.BLOCK_ROWS])
    assert np.array_equal(cols.reshape(3, 144), dofs[:, element.BLOCK_COLS])

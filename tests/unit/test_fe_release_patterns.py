"""Which end releases leave a member free to move: the set rule against the stiffness itself.

``FrameModel.make`` refuses a release pattern by set logic (axial or torsion released at both
ends; in a bending plane {v1, v2}, {θ1, v2, θ2} or {v1, θ1, θ2} released). Here every one of
the 4096 patterns is checked against the definition: the released block of the member's
stiffness is singular. Its smallest eigenvalue is then ~1e-16 of the largest; a sound pattern
keeps it above ~1e-6 for these well-scaled members, so 1e-10 separates the two sharply.

Every sound pattern is then condensed by ``element.condensation`` (elimination one block DOF
at a time) and compared with the Schur complement k_kk - k_kr k_rr⁻¹ k_rk written out.
"""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from stiff.errors import ModelError
from stiff.fe import Beams, FrameModel, element

SECTIONS = {
    "Euler-Bernoulli": dict(E=1.0, G=0.4, A=1.0, Iy=0.8, Iz=1.3, J=0.9, Asy=np.inf, Asz=np.inf),
    "Timoshenko": dict(E=1.0, G=0.4, A=1.0, Iy=0.8, Iz=1.3, J=0.9, Asy=0.5, Asz=0.7),
}


def singular_by_eigenvalues(k: np.ndarray, pattern: np.ndarray) -> bool:
    r = np.flatnonzero(pattern)
    w = np.linalg.eigvalsh(k[np.ix_(r, r)])
    return bool(w[0] <= 1e-10 * w[-1])


@pytest.mark.parametrize("kind", SECTIONS)
def test_every_release_pattern(kind: str) -> None:
    s = SECTIONS[kind]
    k = element.local_stiffness(*(np.array([s[key]]) for key in
                                  ("E", "G", "A", "Iy", "Iz", "J", "Asy", "Asz")),
                                np.array([1.0]))[0]
    refused = 0
    sound = []
    for bits in itertools.product([False, True], repeat=12):
        pattern = np.array(bits)
        if not pattern.any():
            continue
        releases = np.zeros((2, 12), bool)
        releases[1] = pattern
        beams = Beams.make([[0, 1], [1, 2]], releases=releases, **s)  # type: ignore[arg-type]
        try:
            FrameModel.make([[0, 0, 0], [1, 0, 0], [2, 0, 0]], beams=beams)
        except ModelError as err:
            refused += 1
            assert singular_by_eigenvalues(k, pattern), str(err)
            assert str(err).startswith("member 1: releases ")
        else:
            assert not singular_by_eigenvalues(k, pattern), pattern.nonzero()
            sound.append(pattern)
    # sound patterns: axial and torsion each released at one end at most (3 ways each);
    # each bending plane none, one of its 4 DOFs, or a pair other than {v1, v2} (10 ways)
    assert refused == 4095 - (3 * 3 * 10 * 10 - 1)

    patterns = np.array(sound)
    ks = np.broadcast_to(k, (len(sound), 12, 12))
    condensed = element.condensation(ks, patterns)
    S = element.condensation_maps(ks, patterns)
    for pattern, k_c, S_p in zip(patterns, condensed, S, strict=True):
        r, kept = np.flatnonzero(pattern), np.flatnonzero(~pattern)
        schur = k[np.ix_(kept, kept)] - k[np.ix_(kept, r)] @ np.linalg.solve(
            k[np.ix_(r, r)], k[np.ix_(r, kept)])
        # rounding: entries of k span ~1e2 relative, so 1e-13 of the largest is ample
        assert np.abs(k_c[np.ix_(kept, kept)] - schur).max() <= 1e-13 * np.abs(k).max()
        assert not k_c[r].any() and not k_c[:, r].any()  # exact zeros at the releases
        assert np.allclose(S_p.T @ k @ S_p, k_c, rtol=0, atol=1e-13 * np.abs(k).max())


def test_message_names_member_and_dofs() -> None:
    releases = np.zeros((3, 12), bool)
    releases[2, [3, 9]] = True
    beams = Beams.make([[0, 1], [1, 2], [2, 3]], E=1.0, G=1.0, A=1.0, Iy=1.0, Iz=1.0, J=1.0,
                       releases=releases, names=("a", "b", "c"))
    with pytest.raises(ModelError, match=r"^c: releases rx1, rx2 leave it free"):
        FrameModel.make([[0, 0, 0], [1, 0, 0], [2, 0, 0], [3, 0, 0]], beams=beams)

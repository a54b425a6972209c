"""A member whose releases leave it free to move on its own must give a named error.

Releasing the same force component at both ends of one member (torsion, axial, or shear)
leaves that member a mechanism by itself: it can spin, slide or shear without straining. The
engine should say so in a :class:`MechanismError` or :class:`ModelError` that names the member,
not fail inside the static condensation with numpy's ``LinAlgError: Singular matrix``.
"""

from __future__ import annotations

import numpy as np
import pytest

from stiff.errors import MechanismError, ModelError
from stiff.fe import Beams, FrameModel, solve_static


@pytest.mark.parametrize("pair", [(3, 9), (0, 6), (1, 7)], ids=["torsion", "axial", "shear"])
def test_same_release_at_both_ends_is_a_named_error(pair: tuple[int, int]) -> None:
    releases = np.zeros((2, 12), bool)
    releases[1, list(pair)] = True
    loads = np.zeros((1, 3, 6))
    loads[0, 2, 1] = 10.0
    with pytest.raises((MechanismError, ModelError), match="member 1"):
        model = FrameModel.make(
            [[0, 0, 0], [100, 0, 0], [200, 0, 0]],
            beams=Beams.make([[0, 1], [1, 2]], E=70_000.0, G=26_000.0, A=50.0, Iy=1_000.0,
                             Iz=1_000.0, J=2_000.0, releases=releases),
            fixed=[[True] * 6, [False] * 6, [False] * 6])
        solve_static(model, loads)

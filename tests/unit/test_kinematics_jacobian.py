"""The loop-closure Jacobians in closed form equal central differences of the residuals.

Reference: the residuals themselves (stiff.kinematics._equations, verified against
Freudenstein's four-bar solution in tests/verification/test_kinematics.py), differentiated
numerically with a central difference (error O(h²), h = 1e-6).
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from stiff import CASES_DIR
from stiff.case import load_case
from stiff.kinematics import _equations, _jacobians
from stiff.linkage import linkage

LINKS = [linkage(load_case(p)) for p in sorted(CASES_DIR.glob("*.toml"))]


def _central(f: object, x: np.ndarray, h: float = 1e-6) -> np.ndarray:
    assert callable(f)
    cols = []
    for k in range(x.size):
        d = np.zeros(x.size)
        d[k] = h
        cols.append((f(x + d) - f(x - d)) / (2 * h))
    return np.column_stack(cols)


@settings(max_examples=30, deadline=None)
@given(which=st.integers(0, len(LINKS) - 1), seed=st.integers(0, 2**31 - 1))
def test_closed_form_jacobians_equal_central_differences(which: int, seed: int) -> None:
    link = LINKS[which]
    rng = np.random.default_rng(seed)
    z = rng.normal(scale=[0.5, 20.0, 20.0] * len(link.moving))
    angles = np.asarray(link.reference_angles_rad) + rng.normal(scale=0.3,
                                                                size=len(link.actuator_names))
    Jz, Ja = _jacobians(link, z, angles)
    scale = link.size_mm
    assert np.allclose(Jz, _central(lambda x: _equations(link, x, angles), z),
                       rtol=0, atol=1e-6 * scale)
    assert np.allclose(Ja, _central(lambda a: _equations(link, z, a), angles),
                       rtol=0, atol=1e-6 * scale)

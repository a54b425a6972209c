"""The leg's response with actuators yielding, by the low-rank update, equals new solves.

Reference: the frame engine solving the model with those actuators' holding stiffness taken out
(stiff.loads.yielded_response, a fresh factorisation; the engine is checked against closed forms
and PyNite in tests/verification/). The update is the Sherman–Morrison–Woodbury identity
(Golub & Van Loan, Matrix Computations, 4th ed., §2.1.4).
"""

from __future__ import annotations

import itertools
import math

import pytest

from stiff import CASES_DIR
from stiff.build import build
from stiff.case import load_case
from stiff.fe import stack
from stiff.linkage import case_pose
from stiff.loads import yielded_response
from stiff.yielding import yield_responses

DEMOS = sorted(CASES_DIR.glob("*.toml"))


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
@pytest.mark.parametrize("direction", [1.0, -1.0])
def test_update_equals_a_new_solve_for_every_set_of_yielded_actuators(path: object,
                                                                       direction: float) -> None:
    """Every subset of actuators: the same compliance and torques to 1e-9, and where the update
    says the leg is a mechanism the new solve finds it nearly one too (it may pass its pivot
    test with a compliance of 10⁶ or more: the update's test is the stricter)."""
    case = load_case(path)  # type: ignore[arg-type]
    built = build(case, case_pose(case))
    update = yield_responses(built, stack([built.model]), direction)
    assert update is not None
    names = [a.name for a in case.actuators]
    intact = yielded_response(built, direction, frozenset())
    assert intact is not None
    for r in range(len(names) + 1):
        for chosen in itertools.combinations(names, r):
            yielded = frozenset(chosen)
            mine = update.response(yielded)[0]
            fresh = yielded_response(built, direction, yielded)
            if mine is None:
                assert fresh is None or fresh[0] > 1e4 * intact[0], sorted(yielded)
                continue
            assert fresh is not None, sorted(yielded)
            assert math.isclose(mine[0], fresh[0], rel_tol=1e-9)
            scale = max(abs(t) for t in fresh[1].values())
            for a, torque in fresh[1].items():
                assert math.isclose(mine[1][a], torque, rel_tol=1e-9, abs_tol=1e-9 * scale)

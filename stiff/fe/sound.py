"""Static solves of a batch in which some models may be mechanisms.

``solve_static`` raises MechanismError when any model of a batch is singular, naming its free
DOFs; that is right for a case, whose model must hold. A landing estimate asks instead how
each pose of a leg responds once its actuators yield, and with all of them yielded most legs are
mechanisms in every pose: there the answer is "no stiffness left", not an error. This solve
returns every model's solution with a flag per model, garbage (NaN) where the flag is False.
"""

from __future__ import annotations

import numpy as np

from stiff.fe.linalg import spd_solve
from stiff.fe.model import BoolArray, FloatArray, FrameModel
from stiff.fe.results import Solution
from stiff.fe.solve import Reductions, _loads_matrix, _reduced, recovered


def solve_static_sound(model: FrameModel, loads: FloatArray, memo: Reductions | None = None
                       ) -> tuple[Solution, BoolArray]:
    """(solution, sound) of every load case of a batch of models (see the module docstring).

    ``loads`` as for ``solve_static``; ``sound`` has the model's batch shape, True where the
    model holds (its solution is then the one ``solve_static`` gives).
    """
    F = _loads_matrix(model, loads)
    fac = _reduced(model, memo)
    q, ok = spd_solve(fac.Kr, fac.red.project_rhs(np.swapaxes(F, -1, -2)))
    return recovered(fac, F, np.where(ok[..., None, None], q, np.nan)), ok

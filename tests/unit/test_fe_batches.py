"""A batch solved in chunks gives every field of every model as if solved alone.

``solve_static`` splits large batches into chunks; here the chunk is forced down to a few
models so that a (3, 5) batch with per-model loads crosses several chunk boundaries.
Models of one topology differ in coordinates and stiffnesses. Solves are direct and the
matrices the same, so the results agree to rounding (rtol 1e-10).
"""

from __future__ import annotations

import numpy as np
import pytest

from stiff.fe import Beams, Connectors, FrameModel, Solution, Springs, solve_static, stack, take
from stiff.fe import solve as solve_module


def frame(scale: float, k_conn: float) -> FrameModel:
    """An L-shaped frame with a released member, a stiff/rigid connector and a spring."""
    xyz = np.array([[0, 0, 0], [100, 0, 0], [100, 80, 0], [100, 80, 5], [40, 80, 30]]) * scale
    releases = np.zeros((3, 12), bool)
    releases[1, 11] = True  # a pin about local z at the end of the second member
    beams = Beams.make([[0, 1], [1, 2], [3, 4]], E=70_000.0, G=26_000.0, A=50.0, Iy=900.0,
                       Iz=1_200.0, J=1_500.0, Asy=40.0, Asz=40.0, releases=releases)
    conns = Connectors.make([[2, 3]], [[np.inf, np.inf, np.inf, k_conn, k_conn, 2 * k_conn]])
    springs = Springs.make([[1, 4]], rate=20.0, tension=5.0)
    fixed = np.zeros((5, 6), bool)
    fixed[0] = True
    ground = np.zeros((5, 6))
    ground[4, 2] = 10.0
    return FrameModel.make(xyz, beams=beams, connectors=conns, springs=springs, fixed=fixed,
                           ground=ground)


def test_chunked_batch_equals_one_by_one(monkeypatch: pytest.MonkeyPatch) -> None:
    models = [frame(1 + 0.03 * i, 1e5 * (1 + i)) for i in range(15)]
    batch = stack(models)
    batch = FrameModel.make(batch.xyz.reshape(3, 5, -1, 3), beams=Beams(
        **{**batch.beams.__dict__, **{f: getattr(batch.beams, f).reshape(3, 5, -1)
                                      for f in ("E", "G", "A", "Iy", "Iz", "J", "Asy", "Asz")},
           "ref": batch.beams.ref.reshape(3, 5, -1, 3)}),
        connectors=Connectors(**{**batch.connectors.__dict__,
                                 "stiffness": batch.connectors.stiffness.reshape(3, 5, -1, 6),
                                 "frame": batch.connectors.frame.reshape(3, 5, -1, 3, 3)}),
        springs=Springs(**{**batch.springs.__dict__,
                           "rate": batch.springs.rate.reshape(3, 5, -1),
                           "tension": batch.springs.tension.reshape(3, 5, -1)}),
        fixed=batch.fixed, ground=batch.ground.reshape(3, 5, -1, 6))
    loads = np.random.default_rng(3).normal(size=(3, 5, 2, 5, 6))
    monkeypatch.setattr(solve_module, "CHUNK", 4)
    together = solve_static(batch, loads)
    for i in range(3):
        for j in range(5):
            alone = solve_static(take(batch, (i, j)), loads[i, j])
            for name in Solution.__dataclass_fields__:
                a, b = getattr(together, name)[i, j], getattr(alone, name)
                assert a.shape == b.shape, name
                assert np.allclose(a, b, rtol=1e-10, atol=1e-12 * max(np.abs(b).max(), 1.0)), name

"""Stacks of models with one topology: build one from many, take one out of a stack."""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import replace

import numpy as np

from stiff.errors import ModelError
from stiff.fe.model import Beams, FloatArray, FrameModel, Springs


def _pick(a: FloatArray, batch: tuple[int, ...], tail: int, index: tuple[int, ...]) -> FloatArray:
    """Element ``index`` of a batched array whose last ``tail`` axes are per-item."""
    full = np.broadcast_to(a, (*batch, *a.shape[a.ndim - tail:]))
    return np.array(full[index])


def take(model: FrameModel, index: tuple[int, ...]) -> FrameModel:
    """One model (no batch axes) out of a batch."""
    batch = model.batch_shape
    if len(index) != len(batch):
        raise ModelError(f"batch index {index} does not match batch shape {batch}")
    return _rebuilt(model, lambda a, tail: _pick(a, batch, tail, index))


def stack(models: Sequence[FrameModel]) -> FrameModel:
    """A batch of shape (len(models),) from models that share one topology."""
    first = models[0]
    for m in models[1:]:
        same = (
            m.node_names == first.node_names
            and np.array_equal(m.beams.nodes, first.beams.nodes)
            and np.array_equal(m.beams.releases, first.beams.releases)
            and np.array_equal(m.connectors.nodes, first.connectors.nodes)
            and np.array_equal(m.connectors.rigid, first.connectors.rigid)
            and np.array_equal(m.springs.nodes, first.springs.nodes)
            and np.array_equal(m.fixed, first.fixed)
        )
        if not same:
            raise ModelError("models in a batch must share nodes, elements and supports")

    def st(get: str, obj: str | None = None) -> FloatArray:
        def one(m: FrameModel) -> FloatArray:
            holder = m if obj is None else getattr(m, obj)
            return np.asarray(getattr(holder, get))
        return np.stack([one(m) for m in models])

    b = first.beams
    beams = Beams(nodes=b.nodes, E=st("E", "beams"), G=st("G", "beams"), A=st("A", "beams"),
                  Iy=st("Iy", "beams"), Iz=st("Iz", "beams"), J=st("J", "beams"),
                  Asy=st("Asy", "beams"), Asz=st("Asz", "beams"), ref=st("ref", "beams"),
                  releases=b.releases, names=b.names)
    conns = replace(first.connectors, stiffness=st("stiffness", "connectors"),
                    frame=st("frame", "connectors"))
    springs: Springs = replace(first.springs, rate=st("rate", "springs"),
                               tension=st("tension", "springs"))
    return replace(first, xyz=st("xyz"), beams=beams, connectors=conns, springs=springs,
                   ground=st("ground"))


def batch_size(batch: tuple[int, ...]) -> int:
    """Number of models in a batch shape."""
    return math.prod(batch)


def flat_slice(model: FrameModel, batch: tuple[int, ...], start: int, stop: int) -> FrameModel:
    """Models ``start:stop`` of the batch flattened to one axis (broadcast to ``batch``)."""

    def cut(a: FloatArray, tail: int) -> FloatArray:
        item = a.shape[a.ndim - tail:]
        full = np.broadcast_to(a, (*batch, *item))
        return full.reshape(batch_size(batch), *item)[start:stop]

    return _rebuilt(model, cut)


def _rebuilt(model: FrameModel, cut: Callable[[FloatArray, int], FloatArray]) -> FrameModel:
    """The model with every batched array ``a`` (its last ``tail`` axes per item) replaced by
    ``cut(a, tail)``."""
    b, c, s = model.beams, model.connectors, model.springs
    beams = Beams(nodes=b.nodes, E=cut(b.E, 1), G=cut(b.G, 1), A=cut(b.A, 1), Iy=cut(b.Iy, 1),
                  Iz=cut(b.Iz, 1), J=cut(b.J, 1), Asy=cut(b.Asy, 1), Asz=cut(b.Asz, 1),
                  ref=cut(b.ref, 2), releases=b.releases, names=b.names)
    conns = replace(c, stiffness=cut(c.stiffness, 2), frame=cut(c.frame, 3))
    springs = replace(s, rate=cut(s.rate, 1), tension=cut(s.tension, 1))
    return replace(model, xyz=cut(model.xyz, 2), beams=beams, connectors=conns,
                   springs=springs, ground=cut(model.ground, 2))

"""Bad input to the engine gives a named error with a one-line reason; mechanisms are named."""

from __future__ import annotations

import math

import numpy as np
import pytest

from stiff.errors import MechanismError, ModelError
from stiff.fe import Beams, Connectors, FrameModel, Springs, compliance, node_dofs, solve_static

SECTION = dict(E=3000.0, G=1100.0, A=40.0, Iy=130.0, Iz=530.0, J=400.0)
FIXED = [True] * 6
FREE = [False] * 6


def bar(xyz: list[list[float]], **section: object) -> FrameModel:
    props = {**SECTION, **section}
    return FrameModel.make(xyz, beams=Beams.make([[0, 1]], **props),  # type: ignore[arg-type]
                           fixed=[FIXED, FREE])


def one_line(err: pytest.ExceptionInfo[Exception]) -> str:
    text = str(err.value)
    assert "\n" not in text and text
    return text


def test_zero_length_member() -> None:
    with pytest.raises(ModelError) as err:
        bar([[5, 5, 0], [5, 5, 0]])
    assert "zero-length" in one_line(err)


@pytest.mark.parametrize("key", ["E", "G", "A", "Iy", "Iz", "J", "Asy"])
@pytest.mark.parametrize("value", [0.0, -1.0, math.nan])
def test_non_positive_section_values(key: str, value: float) -> None:
    with pytest.raises(ModelError) as err:
        bar([[0, 0, 0], [100, 0, 0]], **{key: value})
    assert "must be a positive number" in one_line(err)
    assert "member 0" in one_line(err)


def test_infinite_modulus_is_refused() -> None:
    with pytest.raises(ModelError) as err:
        bar([[0, 0, 0], [100, 0, 0]], E=math.inf)
    assert "finite" in one_line(err)


def test_nan_coordinates() -> None:
    with pytest.raises(ModelError) as err:
        bar([[0, 0, 0], [math.nan, 0, 0]])
    assert "node 1" in one_line(err) and "finite" in one_line(err)


def test_reference_vector_parallel_to_member() -> None:
    with pytest.raises(ModelError) as err:
        bar([[0, 0, 0], [0, 0, 80]], ref=(0, 0, 1))
    assert "parallel" in one_line(err)


def test_negative_connector_stiffness_and_bad_frame() -> None:
    xyz = [[0, 0, 0], [100, 0, 0], [100, 0, 5]]
    beams = Beams.make([[0, 1]], **SECTION)  # type: ignore[arg-type]
    with pytest.raises(ModelError) as err:
        FrameModel.make(xyz, beams=beams, connectors=Connectors.make([[1, 2]], [[-1.0] * 6]))
    assert "≥ 0" in one_line(err)
    with pytest.raises(ModelError) as err:
        FrameModel.make(xyz, beams=beams,
                        connectors=Connectors.make([[1, 2]], [[1.0] * 6], frame=[2 * np.eye(3)]))
    assert "rotation" in one_line(err)


def test_node_index_out_of_range_and_zero_length_spring() -> None:
    with pytest.raises(ModelError) as err:
        FrameModel.make([[0, 0, 0], [1, 0, 0]], beams=Beams.make([[0, 2]], **SECTION))  # type: ignore[arg-type]
    assert "node index" in one_line(err)
    with pytest.raises(ModelError) as err:
        FrameModel.make([[0, 0, 0], [0, 0, 0]], springs=Springs.make([[0, 1]], 5.0))
    assert "zero-length spring" in one_line(err)


def test_bad_load_shape() -> None:
    model = bar([[0, 0, 0], [100, 0, 0]])
    with pytest.raises(ModelError) as err:
        solve_static(model, np.zeros((1, 3, 6)))
    assert "loads must have shape" in one_line(err)


def four_bar(with_pins_as_connectors: bool) -> FrameModel:
    """A planar four-bar: ground pivots A and D, crank AB, coupler BC, rocker CD; all pins."""
    names = ("A", "B", "C", "D")
    xyz = [[0, 0, 0], [20, 60, 0], [110, 80, 0], [100, 0, 0]]
    pin_ground = [True] * 5 + [False]  # a pin about z at each ground pivot
    if not with_pins_as_connectors:
        releases = np.zeros((3, 12), bool)
        releases[0, 11] = True  # crank end at B: Mz released
        releases[2, 11] = True  # rocker (D -> C) end at C: Mz released
        beams = Beams.make([[0, 1], [1, 2], [3, 2]], **SECTION, releases=releases)  # type: ignore[arg-type]
        return FrameModel.make(xyz, node_names=names, beams=beams,
                               fixed=[pin_ground, FREE, FREE, pin_ground])
    # each link has its own node at B and C, joined by a connector rigid but for rz
    names = ("A", "B on crank", "B on coupler", "C on coupler", "C on rocker", "D")
    xyz = [xyz[0], xyz[1], xyz[1], xyz[2], xyz[2], xyz[3]]
    beams = Beams.make([[0, 1], [2, 3], [5, 4]], **SECTION)  # type: ignore[arg-type]
    pin = [math.inf] * 5 + [0.0]
    conns = Connectors.make([[1, 2], [3, 4]], [pin, pin], names=("pin B", "pin C"))
    return FrameModel.make(xyz, node_names=names, beams=beams, connectors=conns,
                           fixed=[pin_ground, FREE, FREE, FREE, FREE, pin_ground])


@pytest.mark.parametrize("connectors", [False, True])
def test_four_bar_without_actuator_is_a_mechanism(connectors: bool) -> None:
    model = four_bar(connectors)
    loads = np.zeros((1, model.n_nodes, 6))
    loads[0, 2, 0] = 1.0
    with pytest.raises(MechanismError) as err:
        solve_static(model, loads)
    text = one_line(err)
    assert "mechanism" in text
    moving = {node for node, _ in err.value.free}
    assert {"B", "C"} <= moving if not connectors else {"B on crank", "C on rocker"} <= moving
    assert ("A", "rz") in err.value.free  # the crank turns about its ground pin


@pytest.mark.parametrize("connectors", [False, True])
def test_four_bar_held_by_a_rotational_spring_solves(connectors: bool) -> None:
    """An actuator at A (a rotational spring to ground) stops the mechanism."""
    base = four_bar(connectors)
    ground = np.zeros((base.n_nodes, 6))
    ground[0, 5] = 2.0e5  # N·mm/rad
    model = FrameModel.make(base.xyz, node_names=base.node_names, beams=base.beams,
                            connectors=base.connectors, fixed=base.fixed, ground=ground)
    C = compliance(model, node_dofs(model, 2, "ux uy"))
    assert np.isfinite(C).all() and C[0, 0] > 0

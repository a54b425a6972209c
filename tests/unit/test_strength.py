"""Direction-aware strength and knock-downs, each with its provenance.

Tsai–Hill: Jones, *Mechanics of Composite Materials*, 2nd ed. (1999), §2.9; Daniel & Ishai,
*Engineering Mechanics of Composite Materials* (REFERENCES.md §7, confirmed). B-basis tolerance
factors k_B: REFERENCES.md §10 (derived from the noncentral t distribution).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from stiff.errors import MaterialError
from stiff.materials import load_library
from stiff.printing import BUILD_DIRECTIONS, SectionError
from stiff.strength import (
    Allowable,
    at_temperature,
    b_basis,
    fatigue,
    in_layer_strength,
    k_b,
    member_strength,
    modulus_retention,
    printed_b_basis,
    sustained,
    tsai_hill,
)

LIBRARY = load_library()
PLA = LIBRARY.printed_material("PLA")
PRINTED = [LIBRARY.printed_material(name) for name in LIBRARY.names("printed")]


def test_tsai_hill_returns_the_axis_strengths_at_0_and_90_degrees() -> None:
    X, Y, S = 58.0, 30.0, 29.0
    # at 0°, 1/σ² = 1/X²; at 90°, 1/σ² = 1/Y²: exact up to round-off
    assert float(tsai_hill(X, Y, S, 0.0)) == pytest.approx(X, rel=1e-12)
    assert float(tsai_hill(X, Y, S, math.pi / 2)) == pytest.approx(Y, rel=1e-12)
    # at 45°: 1/σ² = (1/4)/X² + (1/S² - 1/X²)/4 + (1/4)/Y², written out (Jones §2.9)
    expected = 1.0 / math.sqrt(0.25 / X**2 + 0.25 * (1 / S**2 - 1 / X**2) + 0.25 / Y**2)
    assert float(tsai_hill(X, Y, S, math.pi / 4)) == pytest.approx(expected, rel=1e-12)
    angles = np.linspace(0.0, math.pi / 2, 7)
    assert tsai_hill(X, Y, S, angles).shape == (7,)


def test_in_layer_strength_uses_the_tables_axis_strengths() -> None:
    along = in_layer_strength(PLA, 0.0)
    across = in_layer_strength(PLA, math.pi / 2)
    # Letcher & Waytashek 2014: 58 MPa at 0° raster, 54 MPa at 90°
    assert along.value_MPa == pytest.approx(58.0, rel=1e-12)
    assert across.value_MPa == pytest.approx(54.0, rel=1e-12)
    assert along.basis == "mean"
    assert "Tsai-Hill" in along.steps[0] and "Letcher" in along.steps[0]


def test_member_strength_by_build_direction() -> None:
    # upright: tension along the member pulls the layers apart
    assert member_strength(PLA, "upright", "tension").value_MPa == PLA.tension_z_MPa
    assert member_strength(PLA, "flat", "tension").value_MPa == pytest.approx(58.0)
    assert member_strength(PLA, "on_edge", "compression").value_MPa == 110.0
    # a flat part's τ_xz acts on its layer plane; on edge that is τ_xy
    assert member_strength(PLA, "flat", "shear_z").value_MPa == PLA.shear_across_layers_MPa
    assert member_strength(PLA, "flat", "shear_y").value_MPa == PLA.shear_in_layer_MPa
    assert member_strength(PLA, "on_edge", "shear_y").value_MPa == PLA.shear_across_layers_MPa
    with pytest.raises(SectionError, match="build"):
        member_strength(PLA, "diagonal", "tension")  # type: ignore[arg-type]


@given(
    index=st.integers(0, len(PRINTED) - 1),
    mode=st.sampled_from(["tension", "compression", "shear_y", "shear_z"]),
    build=st.sampled_from(BUILD_DIRECTIONS),
    angle=st.floats(0.0, math.pi / 2),
)
def test_upright_never_raises_strength_along_the_member_above_flat(
    index: int, mode: str, build: str, angle: float
) -> None:
    material = PRINTED[index]
    upright = member_strength(material, "upright", mode)  # type: ignore[arg-type]
    assert upright.value_MPa <= member_strength(material, "flat", mode).value_MPa  # type: ignore[arg-type]
    other = member_strength(material, build, mode, angle)  # type: ignore[arg-type]
    assert upright.value_MPa <= other.value_MPa * (1.0 + 1e-12)


def test_k_b_reproduces_the_table() -> None:
    # REFERENCES.md §10 [derived]: 3.41 (n=5), 2.36 (10), 1.93 (20), 1.28 (n -> inf), two
    # decimals; the noncentral t gives 3.407, 2.3546, 1.926, so 2.36 is 2.355 rounded up: allow
    # 0.006, a little over half the last decimal
    for n, k in ((5, 3.41), (10, 2.36), (20, 1.93)):
        assert k_b(n) == pytest.approx(k, abs=0.006)
    assert k_b(None) == pytest.approx(1.2816, abs=5e-5)
    with pytest.raises(MaterialError, match="at least 2 samples"):
        k_b(1)


def test_b_basis_of_cov_20_percent_from_10_tests() -> None:
    mean = Allowable(100.0, "mean", ("test mean",))
    b = b_basis(mean, 0.20, 10)
    # REFERENCES.md §10: CoV 20 %, n = 10 -> 0.53 x mean (two decimals)
    assert b.value_MPa == pytest.approx(53.0, abs=0.5)
    assert b.basis == "B-basis (n = 10)"
    assert b.steps[0] == "test mean" and "k_B = 2.355" in b.steps[1]
    with pytest.raises(MaterialError, match="leaves no B-basis"):
        b_basis(mean, 0.5, 5)


def test_knock_downs_chain_and_say_where_they_came_from() -> None:
    a = member_strength(PLA, "flat", "tension")
    a = printed_b_basis(a, PLA, across_layers=False)
    a = at_temperature(a, PLA, 40.0)
    a = sustained(a, PLA)
    # 58 x (1 - 1.2816 x 0.10) x (1 - (1 - 0.38)(40 - 23)/(50 - 23)) x 0.2, written out
    factor_t = 1.0 - (1.0 - 0.38) * 17.0 / 27.0
    assert a.value_MPa == pytest.approx(58.0 * (1 - 1.28155 * 0.10) * factor_t * 0.2, rel=1e-4)
    assert len(a.steps) == 4
    assert "cov_xy_ratio" in a.steps[1] and "strength_hot_ratio" in a.steps[2]
    assert "sustained_ratio" in a.steps[3]
    assert "materials/printed.csv" in a.provenance


def test_temperature_outside_the_data_is_refused() -> None:
    a = member_strength(PLA, "flat", "tension")
    assert at_temperature(a, PLA, 20.0).value_MPa == a.value_MPa
    with pytest.raises(MaterialError, match="above the 50 C of the table's retention data"):
        at_temperature(a, PLA, 60.0)
    petg = LIBRARY.printed_material("PETG")
    with pytest.raises(MaterialError, match="strength_hot_ratio: no elevated-temperature data"):
        at_temperature(member_strength(petg, "flat", "tension"), petg, 40.0)
    factor, step = modulus_retention(petg, 50.0)
    assert factor == pytest.approx(0.75) and "E_hot_ratio" in step


def test_fatigue_fraction_depends_on_the_direction() -> None:
    a = Allowable(50.0, "mean", ("x",))
    assert fatigue(a, PLA, across_layers=True).value_MPa == pytest.approx(50.0 * 0.15)
    assert fatigue(a, PLA, across_layers=False).value_MPa == pytest.approx(50.0 * 0.2)

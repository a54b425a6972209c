"""The metals table reproduces its published values.

Sources: ISO 898-1, *Mechanical properties of fasteners made of carbon steel and alloy steel,
Part 1: Bolts, screws and studs*, minimum tensile strength R_m, 0.2 % proof strength R_p0.2 and
proof stress for property classes 8.8 (d <= 16 mm), 10.9 and 12.9 (REFERENCES.md §9, confirmed);
Aluminum Design Manual, 6061-T6 and 7075-T6 (REFERENCES.md §9, confirmed).
"""

from __future__ import annotations

import pytest

from stiff.errors import MaterialError
from stiff.materials import load_library
from stiff.strength import metal_strength


@pytest.mark.parametrize(
    ("name", "R_m", "R_p02", "proof"),
    [
        ("steel-8.8", 800.0, 640.0, 580.0),  # ISO 898-1, class 8.8, d <= 16 mm
        ("steel-10.9", 1040.0, 940.0, 830.0),  # ISO 898-1, class 10.9
        ("steel-12.9", 1220.0, 1100.0, 970.0),  # ISO 898-1, class 12.9
    ],
)
def test_bolt_classes_give_the_iso_898_1_minimums(
    name: str, R_m: float, R_p02: float, proof: float
) -> None:
    steel = load_library().metal(name)
    # table values are the standard's own figures: exact
    assert steel.ultimate_MPa == R_m
    assert steel.yield_MPa == R_p02
    assert steel.proof_MPa == proof
    assert steel.strength_basis == "minimum"
    assert "ISO 898-1" in steel.source
    allowable = metal_strength(steel, "proof")
    assert allowable.value_MPa == proof and allowable.basis == "minimum"


def test_aluminium_alloys_match_the_aluminum_design_manual() -> None:
    library = load_library()
    a6061 = library.metal("Al-6061-T6")
    # Aluminum Design Manual, 6061-T6: E 68.9 GPa, G 26 GPa, 2.70 g/cm³, typical 310/276 MPa
    assert (a6061.E_MPa, a6061.G_MPa, a6061.density_g_cm3) == (68900.0, 26000.0, 2.70)
    assert (a6061.ultimate_MPa, a6061.yield_MPa, a6061.strength_basis) == (310.0, 276.0, "typical")
    a7075 = library.metal("Al-7075-T6")
    # 7075-T6: E 71-72 GPa, 2.81 g/cm³, typical 572/503 MPa
    assert 71000.0 <= a7075.E_MPa <= 72000.0
    assert (a7075.ultimate_MPa, a7075.yield_MPa, a7075.density_g_cm3) == (572.0, 503.0, 2.81)


def test_a_missing_metal_strength_is_named() -> None:
    with pytest.raises(MaterialError, match="proof_MPa: no value"):
        metal_strength(load_library().metal("Al-6061-T6"), "proof")

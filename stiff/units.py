"""The one internal unit system, and the conversions at the boundary.

Inside stiff every number is in mm, N, MPa (= N/mm²), N·mm, s, tonne and radians, so that
F = m·a holds without factors (1 t = 1 N·s²/mm). Files carry the unit in every key
(``length_mm``, ``stall_torque_Nm``, ``mass_kg``, ``angle_deg``); they are converted once, where
they are read or written, with the factors below.
"""

from __future__ import annotations

import math

# Multiply a value in the named unit by the factor to get the internal unit.
MM_PER_M = 1000.0
MPA_PER_GPA = 1000.0
NMM_PER_NM = 1000.0
TONNE_PER_KG = 1.0e-3
TONNE_PER_MM3_PER_G_PER_CM3 = 1.0e-9  # 1 g/cm³ = 1e-9 t/mm³
G_MM_PER_S2 = 9806.65  # standard gravity [mm/s²] (ISO 80000-3)
RAD_PER_DEG = math.pi / 180.0
KELVIN_OFFSET = 273.15


def gpa_to_mpa(value_gpa: float) -> float:
    """Modulus in GPa -> MPa."""
    return value_gpa * MPA_PER_GPA


def nm_to_nmm(value_nm: float) -> float:
    """Torque or moment in N·m -> N·mm."""
    return value_nm * NMM_PER_NM


def nmm_to_nm(value_nmm: float) -> float:
    """Torque or moment in N·mm -> N·m."""
    return value_nmm / NMM_PER_NM


def kg_to_tonne(value_kg: float) -> float:
    """Mass in kg -> t (the mass unit consistent with N and mm)."""
    return value_kg * TONNE_PER_KG


def g_cm3_to_t_mm3(value_g_cm3: float) -> float:
    """Density in g/cm³ -> t/mm³."""
    return value_g_cm3 * TONNE_PER_MM3_PER_G_PER_CM3


def deg_to_rad(value_deg: float) -> float:
    """Angle in degrees -> radians."""
    return value_deg * RAD_PER_DEG


def rad_to_deg(value_rad: float) -> float:
    """Angle in radians -> degrees."""
    return value_rad / RAD_PER_DEG


def nm_per_deg_to_nmm_per_rad(value: float) -> float:
    """Rotational stiffness in N·m/deg -> N·mm/rad."""
    return value * NMM_PER_NM / RAD_PER_DEG

"""Plain-text renderings of materials and sections for the terminal; every number with its unit.

The functions return strings; the command line prints them.
"""

from __future__ import annotations

import textwrap
from dataclasses import fields

from stiff.material_tables import COLUMNS
from stiff.materials import Material, MaterialLibrary, PrintedMaterial
from stiff.printed_sections import PrintedSection
from stiff.strength import member_strength

#: t/mm -> g/m: 1 t = 1e6 g and 1 mm = 1e-3 m.
G_PER_M_PER_T_PER_MM = 1.0e9

_WRAP = 96


def _unit(column: str) -> str:
    """The unit of a column from its name's suffix, as printed."""
    for suffix, unit in (("_MPa", "MPa"), ("_g_cm3", "g/cm³"), ("_C", "°C"), ("_mm", "mm")):
        if column.endswith(suffix):
            return unit
    return "-"


def _wrap(text: str, indent: str) -> str:
    return textwrap.fill(text, _WRAP, initial_indent=indent, subsequent_indent=indent)


def _headline(record: Material) -> tuple[str, str, str]:
    """(modulus, strength, density) cells of the list, with units."""
    if isinstance(record, PrintedMaterial):
        modulus = f"E_xy {record.E_xy_MPa:g} MPa"
        strength = f"tension_xy {record.tension_xy_MPa:g} MPa"
    elif record.kind == "tube":
        modulus = f"E_axial {record.E_axial_MPa:g} MPa"
        strength = f"tension_axial {record.tension_axial_MPa:g} MPa"
    elif record.kind == "metal":
        modulus = f"E {record.E_MPa:g} MPa"
        strength = f"ultimate {record.ultimate_MPa:g} MPa ({record.strength_basis})"
    else:
        modulus = f"E {record.E_MPa:g} MPa"
        strength = f"lap_shear {record.lap_shear_MPa:g} MPa"
    return modulus, strength, f"{record.density_g_cm3:g} g/cm³"


def materials_list(library: MaterialLibrary) -> str:
    """Every material, one line each with its headline values, then each one's source."""
    rows = [("name", "kind", "modulus", "strength", "density", "confidence")]
    rows += [(r.name, r.kind, *_headline(r), r.confidence) for r in library.all()]
    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    lines = [
        "  ".join(cell.ljust(w) for cell, w in zip(row, widths, strict=True)).rstrip()
        for row in rows
    ]
    sizes = ", ".join(f"{s.name}" for s in library.tube_sizes)
    lines += ["", f"Tube sizes, outer x inner diameter [mm]: {sizes}", "", "Sources:"]
    for record in library.all():
        lines.append(f"  {record.name} ({record.origin}, {record.confidence}):")
        lines.append(_wrap(record.source, "    "))
    return "\n".join(lines)


def material_detail(record: Material) -> str:
    """One material: every value with its unit, values filled by a rule marked with the rule."""
    lines = [
        f"{record.name}: {record.kind} material, from {record.origin}, "
        f"confidence {record.confidence}",
        "",
    ]
    names = {f.name for f in fields(record)}
    derived = []
    for column in COLUMNS[record.kind]:
        if column.name in ("name", "source", "confidence") or column.name not in names:
            continue
        given = getattr(record, column.name)
        value = record.value_of(column.name)
        unit = _unit(column.name)
        if value is None:
            shown = "blank (no value)"
        else:
            shown = f"{value:g}" if isinstance(value, float) else str(value)
            shown += "" if unit == "-" else f" {unit}"
            if given is None:
                shown += "  (filled by a rule, see below)"
                derived.append(record.provenance_of(column.name))
        lines.append(f"  {column.name:<26} {shown}")
    if derived:
        lines += ["", "Blank values are filled by these rules:"]
        lines += [_wrap(text, "  ") for text in derived]
    lines += ["", "Source:", _wrap(record.source, "  ")]
    return "\n".join(lines)


def section_comparison(printed: PrintedSection, solid: PrintedSection) -> str:
    """A printed section's stiffness and mass beside the same outline printed solid."""
    s = printed.settings
    if printed.shape == "rectangle":
        size = f"rectangle {printed.depth_mm:g} mm deep (y) x {printed.width_mm:g} mm wide (z)"
    else:
        size = f"round, {printed.width_mm:g} mm diameter"
    lines = [
        f"{printed.material.name} {size}, build {s.build}",
        f"walls {s.walls} x {s.line_width_mm:g} mm, skins {s.skins} x {s.layer_height_mm:g} mm, "
        f"infill {100.0 * s.infill:g} % {s.pattern}",
        "",
    ]
    p, q = printed.beam, solid.beam
    rows = [
        ("axial stiffness EA", "N", p.EA, q.EA),
        ("bending in plane EIz", "N·mm²", p.EIz, q.EIz),
        ("bending out of plane EIy", "N·mm²", p.EIy, q.EIy),
        ("torsion GJ", "N·mm²", p.GJ, q.GJ),
        ("shear along y GAsy", "N", p.GAsy, q.GAsy),
        ("shear along z GAsz", "N", p.GAsz, q.GAsz),
        (
            "mass per length",
            "g/m",
            p.mass_per_length * G_PER_M_PER_T_PER_MM,
            q.mass_per_length * G_PER_M_PER_T_PER_MM,
        ),
    ]
    lines.append(f"{'':26} {'printed':>16} {'solid':>16} {'printed/solid':>14}")
    for label, unit, a, b in rows:
        lines.append(f"{label:26} {a:>10.4g} {unit:<5} {b:>10.4g} {unit:<5} {a / b:>14.3f}")
    lines += ["", "Regions (stress along the member = E x strain):"]
    lines.append(f"  {'region':8} {'area':>12} {'E along member':>18} {'strength/solid':>15}")
    for r in printed.regions:
        lines.append(
            f"  {r.name:8} {r.area_mm2:>8.3g} mm² {r.E_MPa:>14.4g} MPa {r.strength_ratio:>15.3f}"
        )
    tension = member_strength(printed.material, s.build, "tension")
    across = "across the layers" if s.build == "upright" else "along the lines"
    lines += [
        "",
        f"Wall tension strength along the member: {tension.value_MPa:.3g} MPa (mean, {across})",
    ]
    return "\n".join(lines)

"""The cautions every report and summary carries, in plain words."""

from __future__ import annotations

CAUTIONS: tuple[str, ...] = (
    "These numbers are estimates from beam theory and simplified joint formulas, not "
    "measurements; treat them as a guide to a design, never as a guarantee.",
    "Printed strength and stiffness vary with the printer, the filament, moisture, temperature "
    "and age; the values used here are generic literature values unless you gave your own.",
    "Before relying on a printed part, proof-test a sample to the design load times the "
    "required safety factor.",
    "Wear eye protection and keep hands clear during drop and jump tests: printed parts and "
    "carbon tubes break into sharp pieces.",
    "Springs and preloaded linkages store energy and can snap or pinch when a part lets go or "
    "is taken apart.",
    "Cutting or sanding carbon tubes makes harmful dust: cut wet and wear a mask.",
    "Nothing here replaces proper testing, and anything that could hurt a person needs "
    "qualified review under the applicable local rules.",
)

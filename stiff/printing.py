"""Words of 3D printing used across stiff, in one place.

Build directions are stated relative to the member, whose axis is the local x axis; local y lies in
the linkage plane and local z is out of it, along the pins:

* ``"flat"``: layers parallel to the linkage plane (the part lies on the bed as it lies in the
  linkage); the build axis is the section's z axis.
* ``"on_edge"``: layers on edge, still containing the member axis (the part stands on its edge on
  the bed); the build axis is the section's y axis.
* ``"upright"``: layers across the member (the part stands on its end); the build axis is the
  member axis, so stress along the member pulls the layers apart.

Infill patterns are named by the shape of their cells; see :mod:`stiff.infill` for their laws.
"""

from __future__ import annotations

from typing import Literal, get_args

from stiff.errors import ModelError

BuildDirection = Literal["flat", "on_edge", "upright"]
BUILD_DIRECTIONS: tuple[BuildDirection, ...] = get_args(BuildDirection)

#: ``grid``: two sets of lines, along and across the member; ``grid_45``: two sets of lines at
#: ±45° to the member; ``triangles``: three sets of lines (triangular cells); ``honeycomb``:
#: hexagonal cells; ``gyroid``: a curved, three-dimensional cell.
InfillPattern = Literal["grid", "grid_45", "triangles", "honeycomb", "gyroid"]
INFILL_PATTERNS: tuple[InfillPattern, ...] = get_args(InfillPattern)

#: How the infill is loaded: ``in_layer`` (stress in the plane of the layers) or ``along_build``
#: (stress along the build axis, i.e. along the prisms of a prismatic pattern).
InfillLoad = Literal["in_layer", "along_build"]

#: Regions of a section: the perimeter walls, the top/bottom skins, the infill core, or solid.
RegionName = Literal["wall", "skin", "core", "solid"]

#: Tags of REFERENCES.md plus ``measured`` for a user's own test values.
Confidence = Literal["confirmed", "memory", "derived", "practice", "measured"]
CONFIDENCE_TAGS: tuple[Confidence, ...] = get_args(Confidence)


class SectionError(ModelError):
    """A section's parameters are wrong: names the parameter and why (exit code 2)."""

    def __init__(self, parameter: str, why: str) -> None:
        self.parameter = parameter
        self.why = why
        super().__init__(f"section: {parameter}: {why}")


def check_build_direction(build: str) -> BuildDirection:
    """Return ``build`` as a :data:`BuildDirection`, or raise :class:`SectionError`."""
    for known in BUILD_DIRECTIONS:
        if build == known:
            return known
    raise SectionError(
        "build", f"unknown build direction {build!r}; known: {', '.join(BUILD_DIRECTIONS)}"
    )


def check_pattern(pattern: str) -> InfillPattern:
    """Return ``pattern`` as an :data:`InfillPattern`, or raise :class:`SectionError`."""
    for known in INFILL_PATTERNS:
        if pattern == known:
            return known
    raise SectionError(
        "pattern", f"unknown infill pattern {pattern!r}; known: {', '.join(INFILL_PATTERNS)}"
    )

"""What a design sweep varies: specifications such as ``crank_a.walls=2,3,4``, and the variant
cases they make.

Syntax of one specification (``stiff sweep --vary SPEC``)::

    SPEC    = TARGET "." SETTING "=" VALUES
    TARGET  = a part's name, or "*" for every part the setting applies to, all set together
    SETTING = walls | infill | pattern | build | width_mm | depth_mm   (printed parts)
            | size                                                   (tube parts)
    VALUES  = v1,v2,...            a list, in the order the sweep takes them
            | start:stop:step      numbers from start to stop inclusive (walls, infill, sizes)

* ``walls``: whole number of perimeter walls (>= 0); ``infill``: infill density [%], in (0, 100];
  ``pattern``: an infill pattern (:data:`stiff.printing.INFILL_PATTERNS`); ``build``: a build
  direction (:data:`stiff.printing.BUILD_DIRECTIONS`); ``width_mm``/``depth_mm``: the section's
  outline sizes [mm] (> 0).
* ``size``: a name from the tube-size table (``case.library.tube_sizes``, e.g. ``6x4``); the tube
  keeps its material.
* A printed part's setting applies to every segment of the part.
* ``*`` makes one variable that sets every printed part (or every tube, for ``size``) to the same
  value, e.g. ``*.walls=3,4`` is two variants, not two per part.

The first value of each variable is its base value (used by the sensitivity table). A bad
specification raises :class:`SweepSpecError` with a one-line reason (exit code 2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Literal, get_args

from stiff.case_model import Case, Part
from stiff.errors import StiffError
from stiff.printing import BUILD_DIRECTIONS, INFILL_PATTERNS

Setting = Literal["walls", "infill", "pattern", "build", "width_mm", "depth_mm", "size"]
SETTINGS: tuple[Setting, ...] = get_args(Setting)
PRINTED_SETTINGS: tuple[Setting, ...] = ("walls", "infill", "pattern", "build", "width_mm",
                                         "depth_mm")
Value = int | float | str

#: Refuse full-factorial sweeps with more variants than this (a run of this size takes of order
#: half an hour at ~1 variant per second per core).
MAX_VARIANTS = 2000


class SweepSpecError(StiffError):
    """A sweep specification is wrong: quotes it and says why (exit code 2)."""

    def __init__(self, spec: str, why: str) -> None:
        self.spec = spec
        self.why = why
        super().__init__(f"--vary {spec!r}: {why}")


@dataclass(frozen=True)
class Variable:
    """One swept setting of one part (or of every part, for ``*``), with its values.

    ``values`` are in the file's units: walls [-], infill [%], sizes [mm], pattern, build and
    tube size as names.
    """

    spec: str
    target: str  # the part's name, or "*"
    setting: Setting
    parts: tuple[str, ...]  # the parts it sets
    values: tuple[Value, ...]

    @property
    def name(self) -> str:
        """``target.setting``, the CSV column of this variable."""
        return f"{self.target}.{self.setting}"


def _numbers(spec: str, text: str, whole: bool) -> list[float]:
    """The numbers a list or an inclusive ``start:stop:step`` range names."""
    def number(word: str) -> float:
        try:
            x = float(word)
        except ValueError:
            raise SweepSpecError(spec, f"{word!r} is not a number") from None
        if not math.isfinite(x):
            raise SweepSpecError(spec, f"{word!r} is not a finite number")
        if whole and x != int(x):
            raise SweepSpecError(spec, f"{word!r} is not a whole number")
        return x

    if ":" not in text:
        return [number(w) for w in _words(spec, text)]
    bits = text.split(":")
    if len(bits) != 3:
        raise SweepSpecError(spec, "a range is start:stop:step")
    start, stop, step = (number(b.strip()) for b in bits)
    if step <= 0:
        raise SweepSpecError(spec, "a range's step must be > 0")
    if stop < start:
        raise SweepSpecError(spec, f"the range {text} has no values (stop below start)")
    count = math.floor((stop - start) / step + 1e-9) + 1
    if count > MAX_VARIANTS:
        raise SweepSpecError(spec, f"the range {text} has more than {MAX_VARIANTS} values")
    return [start + i * step for i in range(count)]


def _words(spec: str, text: str) -> list[str]:
    words = [w.strip() for w in text.split(",")]
    if not text.strip() or any(not w for w in words):
        raise SweepSpecError(spec, "a list of values has an empty entry" if text.strip()
                             else "no values given")
    return words


def _values(case: Case, spec: str, setting: Setting, text: str) -> tuple[Value, ...]:
    values: list[Value]
    if setting == "walls":
        values = [int(x) for x in _numbers(spec, text, whole=True)]
        if any(int(v) < 0 for v in values):
            raise SweepSpecError(spec, "walls must be >= 0")
    elif setting == "infill":
        values = list(_numbers(spec, text, whole=False))
        if any(not 0.0 < float(v) <= 100.0 for v in values):
            raise SweepSpecError(spec, "infill is a percentage in (0, 100]")
    elif setting in ("width_mm", "depth_mm"):
        values = list(_numbers(spec, text, whole=False))
        if any(float(v) <= 0.0 for v in values):
            raise SweepSpecError(spec, f"{setting} must be > 0")
    else:
        known: tuple[str, ...] = {
            "pattern": INFILL_PATTERNS, "build": BUILD_DIRECTIONS,
            "size": tuple(s.name for s in case.library.tube_sizes)}[setting]
        values = list(_words(spec, text))
        for v in values:
            if v not in known:
                raise SweepSpecError(spec, f"unknown {setting} {v!r}; known: {', '.join(known)}")
    if len(set(values)) != len(values):
        raise SweepSpecError(spec, "a value is given twice")
    return tuple(values)


def parse_spec(case: Case, spec: str) -> Variable:
    """The :class:`Variable` that ``spec`` (``PART.SETTING=VALUES``) names in ``case``."""
    head, eq, text = spec.partition("=")
    if not eq:
        raise SweepSpecError(spec, "expected PART.SETTING=VALUES, e.g. crank_a.walls=2,3,4")
    target, dot, setting = head.strip().rpartition(".")
    if not dot or not target:
        raise SweepSpecError(spec, "expected PART.SETTING=VALUES, e.g. crank_a.walls=2,3,4")
    if setting not in SETTINGS:
        raise SweepSpecError(spec, f"unknown setting {setting!r}; known: {', '.join(SETTINGS)}")
    kind = "tube" if setting == "size" else "printed"
    if target == "*":
        parts = tuple(p.name for p in case.parts if p.kind == kind)
        if not parts:
            raise SweepSpecError(spec, f"the case has no {kind} parts")
    else:
        part = next((p for p in case.parts if p.name == target), None)
        if part is None:
            raise SweepSpecError(spec, f"unknown part {target!r}; parts: "
                                 f"{', '.join(p.name for p in case.parts)}")
        if part.kind != kind:
            raise SweepSpecError(spec, f"{target} is a {part.kind} part; {setting} applies to "
                                 f"{kind} parts")
        parts = (target,)
    chosen = next(s for s in SETTINGS if s == setting)
    return Variable(spec, target, chosen, parts, _values(case, spec, chosen, text))


def parse_specs(case: Case, specs: tuple[str, ...] | list[str]) -> tuple[Variable, ...]:
    """Every specification parsed; refuses none, a part's setting set twice, or too many
    variants (more than :data:`MAX_VARIANTS`)."""
    if not specs:
        raise SweepSpecError("", "give at least one --vary PART.SETTING=VALUES")
    variables = tuple(parse_spec(case, s) for s in specs)
    seen: dict[tuple[str, str], str] = {}
    for v in variables:
        for p in v.parts:
            if (p, v.setting) in seen:
                raise SweepSpecError(v.spec, f"{p}.{v.setting} is already varied by "
                                     f"{seen[(p, v.setting)]!r}")
            seen[(p, v.setting)] = v.spec
    count = math.prod(len(v.values) for v in variables)
    if count > MAX_VARIANTS:
        raise SweepSpecError(variables[-1].spec, f"{count} variants, more than the maximum "
                             f"{MAX_VARIANTS}; sweep fewer values")
    return variables


def _set_printed(part: Part, setting: Setting, value: Value) -> Part:
    sections = []
    for s in part.sections:
        if setting == "walls":
            sections.append(replace(s, settings=replace(s.settings, walls=int(value))))
        elif setting == "infill":
            sections.append(replace(s, settings=replace(s.settings,
                                                        infill=float(value) / 100.0)))
        elif setting == "pattern":
            pattern = next(p for p in INFILL_PATTERNS if p == value)
            sections.append(replace(s, settings=replace(s.settings, pattern=pattern)))
        elif setting == "build":
            build = next(b for b in BUILD_DIRECTIONS if b == value)
            sections.append(replace(s, settings=replace(s.settings, build=build)))
        elif setting == "width_mm":
            sections.append(replace(s, width_mm=float(value)))
        else:
            sections.append(replace(s, depth_mm=float(value)))
    return replace(part, sections=tuple(sections))


def apply_values(case: Case, variables: tuple[Variable, ...], values: tuple[Value, ...]
                 ) -> Case:
    """The case with each variable set to its value (``values`` in the variables' order)."""
    parts = {p.name: p for p in case.parts}
    sizes = {s.name: s for s in case.library.tube_sizes}
    for var, value in zip(variables, values, strict=True):
        for name in var.parts:
            if var.setting == "size":
                size = sizes[str(value)]
                parts[name] = replace(parts[name], od_mm=size.od_mm, id_mm=size.id_mm)
            else:
                parts[name] = _set_printed(parts[name], var.setting, value)
    return replace(case, parts=tuple(parts[p.name] for p in case.parts))


def variant_count(variables: tuple[Variable, ...]) -> int:
    """How many variants the full factorial of ``variables`` has."""
    return math.prod(len(v.values) for v in variables)

"""What a design sweep varies: specifications such as ``crank_a.walls=2,3,4``, and the variant
cases they make.

Syntax of one specification (``stiff sweep --vary SPEC``)::

    SPEC    = TARGET "." SETTING "=" VALUES      a part setting
            | KEY "=" VALUES                     any numeric value of the case file
    TARGET  = a part's name, or "*" for every part the setting applies to, all set together
    SETTING = walls | infill | pattern | build | width_mm | depth_mm   (printed parts)
            | size                                                   (tube parts)
    KEY     = the dotted path of a key in the case file, e.g. loads.drop_height_mm,
              joints.knee.pin_diameter_mm, parts.thigh.section.walls
    VALUES  = v1,v2,...            a list, in the order the sweep takes them
            | start:stop:step      numbers from start to stop inclusive (numbers only)

* ``walls``: whole number of perimeter walls (>= 0); ``infill``: infill density [%], in (0, 100];
  ``pattern``: an infill pattern (:data:`stiff.printing.INFILL_PATTERNS`); ``build``: a build
  direction (:data:`stiff.printing.BUILD_DIRECTIONS`); ``width_mm``/``depth_mm``: the section's
  outline sizes [mm] (> 0).
* ``size``: a name from the tube-size table (``case.library.tube_sizes``, e.g. ``6x4``); the tube
  keeps its material.
* A printed part's setting applies to every segment of the part.
* ``*`` makes one variable that sets every printed part (or every tube, for ``size``) to the same
  value, e.g. ``*.walls=3,4`` is two variants, not two per part.
* A case value (a spec whose first word is a top-level table of the case file, such as
  ``loads``, ``joints``, ``targets``, ``nodes``) is set in the parsed TOML document, which is
  then read again through the case reader (:func:`stiff.case.read_case`): a variant is exactly
  the case file with that value written in, and a value the reader refuses is refused here
  with the reader's own message. The key must hold a number (or be a key the reader takes a
  number for); whole values are written as integers, others as floats. Case values are set
  first, on the case file's text; part settings are applied to the case read from it.

The first value of each variable is its base value (used by the sensitivity table). A bad
specification raises :class:`SweepSpecError` with a one-line reason (exit code 2).
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Literal, get_args

from stiff.case import TOP, read_case
from stiff.case_model import Case, Part
from stiff.case_reader import Reader, type_name
from stiff.errors import StiffError
from stiff.loads import load_case_names
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
        super().__init__(f"sweep specification {spec!r}: {why}")


@dataclass(frozen=True)
class CaseSource:
    """The case file a case value is set in: its path (for the errors) and its text."""

    file: Path | None
    text: str


@dataclass(frozen=True)
class Variable:
    """One swept setting of one part (or of every part, for ``*``), or one numeric value of
    the case file, with its values.

    ``values`` are in the file's units: walls [-], infill [%], sizes [mm], pattern, build and
    tube size as names; a case value in its key's unit. A case value has ``setting`` None, its
    dotted key path in ``key`` and the file it is set in as ``source``.
    """

    spec: str
    target: str  # the part's name, "*", or a case value's dotted key
    setting: Setting | None
    parts: tuple[str, ...]  # the parts it sets
    values: tuple[Value, ...]
    key: tuple[str, ...] = ()
    source: CaseSource | None = None

    @property
    def name(self) -> str:
        """``target.setting`` (or a case value's key), the CSV column of this variable."""
        return self.target if self.setting is None else f"{self.target}.{self.setting}"


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
    # 12 significant digits drop the float noise of start + i * step (0.1:0.3:0.1 gives 0.3)
    return [float(f"{start + i * step:.12g}") for i in range(count)]


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
        raise SweepSpecError(spec, "expected PART.SETTING=VALUES or KEY=VALUES, e.g. "
                             "crank_a.walls=2,3,4 or loads.drop_height_mm=50:150:50")
    target, dot, setting = head.strip().rpartition(".")
    if not dot or not target:
        raise SweepSpecError(spec, "expected PART.SETTING=VALUES or KEY=VALUES, e.g. "
                             "crank_a.walls=2,3,4 or loads.drop_height_mm=50:150:50")
    if is_case_key(case, head.strip()):
        return case_value(case, spec, head.strip(), text)
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
                                 f"{', '.join(p.name for p in case.parts)} (a case value is "
                                 "named by its key, e.g. loads.drop_height_mm)")
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
    seen: dict[str, str] = {}
    for v in variables:
        for name in [f"{p}.{v.setting}" for p in v.parts] if v.setting else [v.name]:
            if name in seen:
                raise SweepSpecError(v.spec, f"{name} is already varied by {seen[name]!r}")
            seen[name] = v.spec
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
    """The case with each variable set to its value (``values`` in the variables' order).

    Case values first: the case file's document with them set, read through the case reader
    (a :class:`stiff.errors.CaseError` when the reader refuses the combination); then the
    part settings on that case.
    """
    keyed = [(v, x) for v, x in zip(variables, values, strict=True) if v.setting is None]
    if keyed:
        case = read_values(case, keyed)
    parts = {p.name: p for p in case.parts}
    sizes = {s.name: s for s in case.library.tube_sizes}
    for var, value in zip(variables, values, strict=True):
        for name in var.parts:
            if var.setting is None:
                continue
            if var.setting == "size":
                size = sizes[str(value)]
                parts[name] = replace(parts[name], od_mm=size.od_mm, id_mm=size.id_mm)
            else:
                parts[name] = _set_printed(parts[name], var.setting, value)
    return replace(case, parts=tuple(parts[p.name] for p in case.parts))


def variant_count(variables: tuple[Variable, ...]) -> int:
    """How many variants the full factorial of ``variables`` has."""
    return math.prod(len(v.values) for v in variables)


# ---------------------------------------------------------------------------------------------
# Case values: a number anywhere in the case file


def is_case_key(case: Case, head: str) -> bool:
    """True when ``head`` (the part before ``=``) names a case value, not a part setting: its
    first word is a top-level table of the case format and it is not ``PART.SETTING``."""
    target, _, setting = head.rpartition(".")
    part_setting = (target == "*" or any(p.name == target for p in case.parts)) \
        and setting in SETTINGS
    first = head.split(".")[0].strip()
    return not part_setting and first in TOP


def _case_text(spec: str, case: Case) -> CaseSource:
    if case.file is None:
        raise SweepSpecError(spec, "a case value is set in the case file, and this case was "
                             "not read from a file")
    try:
        return CaseSource(case.file, case.file.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError) as err:
        why = getattr(err, "strerror", None) or err
        raise SweepSpecError(spec, f"cannot read {case.file}: {why}") from None


def _find_key(spec: str, data: dict[str, Any], key: tuple[str, ...]) -> None:
    """Refuse a key path that does not lead to a number: a missing or non-table step on the
    way, or a key holding text, a list, a table or true/false. A last key not written in the
    file is left for the case reader to judge (it knows the defaults and unknown keys)."""
    table = data
    for depth, word in enumerate(key[:-1]):
        where = ".".join(key[:depth + 1])
        if word not in table:
            close = difflib.get_close_matches(word, [str(k) for k in table], n=1)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            raise SweepSpecError(spec, f"unknown key {where!r}: the case file has no such "
                                 f"table{hint}")
        if not isinstance(table[word], dict):
            raise SweepSpecError(spec, f"{where!r} is {type_name(table[word])}, not a table")
        table = table[word]
    if key[-1] in table:
        value = table[key[-1]]
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise SweepSpecError(spec, f"{'.'.join(key)!r} is {type_name(value)}, not a number: "
                                 "only numeric case values can be swept")


def _set_key(data: dict[str, Any], key: tuple[str, ...], value: Value) -> None:
    table = data
    for word in key[:-1]:
        table = table[word]
    table[key[-1]] = value


def _as_written(x: float) -> Value:
    """A number as a case file would hold it: whole numbers as integers (a key the reader
    takes as a whole number refuses a float), others as floats."""
    return int(x) if x == int(x) else x


def read_values(case: Case, keyed: Sequence[tuple[Variable, Value]]) -> Case:
    """The case file read again with every case value of ``keyed`` set in its document (the
    case's library as the base, so its own materials stay)."""
    source = next(v.source for v, _ in keyed if v.source is not None)
    reader, data = Reader.parse(source.file, source.text)
    for var, value in keyed:
        _set_key(data, var.key, value)
    return read_case(reader, data, case.library)


def case_value(case: Case, spec: str, head: str, text: str) -> Variable:
    """The :class:`Variable` of a case value ``KEY=VALUES``, every value read through the case
    reader on its own (the others at the file's values), so a value out of range is refused
    with the reader's message."""
    key = tuple(w.strip() for w in head.split("."))
    if any(not w for w in key):
        raise SweepSpecError(spec, f"{head!r} has an empty key between dots")
    source = _case_text(spec, case)
    _, data = Reader.parse(source.file, source.text)
    _find_key(spec, data, key)
    values = tuple(_as_written(x) for x in _numbers(spec, text, whole=False))
    if len(set(values)) != len(values):
        raise SweepSpecError(spec, "a value is given twice")
    var = Variable(spec, ".".join(key), None, (), values, key, source)
    for value in values:
        try:
            read_values(case, [(var, value)])
        except StiffError as err:
            raise SweepSpecError(spec, str(err)) from None
    return var


def parse_load_cases(case: Case, text: str) -> tuple[str, ...]:
    """The load cases a sweep checks, from a comma-separated list of the case's load-case
    names (``stiff.loads.load_case_names``); an unknown or repeated name is refused."""
    known = load_case_names(case)
    names = tuple(w.strip() for w in text.split(","))
    spec = f"--load-cases {text}"
    if not text.strip() or any(not n for n in names):
        raise SweepSpecError(spec, "give the load cases as a comma-separated list of names")
    for n in names:
        if n not in known:
            raise SweepSpecError(spec, f"no load case {n!r}; the case's load cases: "
                                 f"{', '.join(known)}")
    if len(set(names)) != len(names):
        raise SweepSpecError(spec, "a load case is named twice")
    return names

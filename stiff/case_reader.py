"""Reading TOML tables key by key, with one-line errors that name the file, key and line.

``Reader`` checks each table against a small schema: unknown keys (with a did-you-mean),
missing required keys, wrong types, values out of range. The TOML parser gives line numbers
only for syntax errors, so for the others the line is found by looking for the key in the
file's text under its table header; where that fails the error still names the key path.
"""

from __future__ import annotations

import difflib
import math
import re
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

from stiff.errors import CaseError

FieldKind = Literal["float", "int", "str", "names", "bool", "point", "floats", "table"]


@dataclass(frozen=True)
class Field:
    """What a key may hold.

    ``low``/``high`` bound numbers (``low_open`` makes the lower bound exclusive, the usual
    "must be positive"); ``choices`` limits strings.
    """

    kind: FieldKind
    required: bool = False
    low: float | None = None
    high: float | None = None
    low_open: bool = False
    choices: tuple[str, ...] = ()
    help: str = ""


def positive(required: bool = False, help: str = "") -> Field:
    """A number > 0."""
    return Field("float", required=required, low=0.0, low_open=True, help=help)


def at_least(low: float, required: bool = False, high: float | None = None) -> Field:
    """A number ≥ low (and ≤ high)."""
    return Field("float", required=required, low=low, high=high)


def choice(*options: str, required: bool = False) -> Field:
    """One of the given strings."""
    return Field("str", required=required, choices=options)


def _type_name(value: object) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, int | float):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return type(value).__name__


@dataclass(frozen=True)
class Reader:
    """Reads one case file's tables; every error names ``file``."""

    file: Path | None
    text: str

    @staticmethod
    def parse(file: Path | None, text: str) -> tuple[Reader, dict[str, Any]]:
        """The reader and the parsed document; a syntax error becomes a CaseError."""
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as err:
            line = getattr(err, "lineno", None)
            msg = getattr(err, "msg", str(err).split(" (at ")[0])
            raise CaseError(file, "(syntax)", f"not valid TOML: {msg}", line) from None
        return Reader(file, text), data

    # --- locating keys ------------------------------------------------------------------

    def line_of(self, path: str) -> int | None:
        """Best-effort line number of a dotted key path in the text."""
        parts = path.split(".")
        lines = self.text.splitlines()
        for cut in range(len(parts) - 1, -1, -1):
            header = ".".join(parts[:cut])
            key = parts[cut] if cut < len(parts) else None
            start = 0
            if header:
                pattern = re.compile(r"^\s*\[+\s*" + re.escape(header).replace(r"\.", r"\s*\.\s*")
                                     + r"\s*\]+")
                found = [i for i, ln in enumerate(lines) if pattern.match(ln)]
                if not found:
                    continue
                start = found[0]
            if key is None:
                return start + 1
            key_pattern = re.compile(r"^\s*\"?" + re.escape(key) + r"\"?\s*=")
            inline = re.compile(r"[{,]\s*\"?" + re.escape(key) + r"\"?\s*=")
            for i in range(start, len(lines)):
                if i > start and lines[i].lstrip().startswith("[") and header:
                    break
                if key_pattern.match(lines[i]) or inline.search(lines[i]):
                    return i + 1
            if header:
                return start + 1
        return None

    def error(self, path: str, why: str) -> CaseError:
        """A CaseError at ``path`` with the line where it can be found."""
        return CaseError(self.file, path, why, self.line_of(path))

    # --- tables -------------------------------------------------------------------------

    def table(self, path: str, data: object, schema: Mapping[str, Field]) -> dict[str, Any]:
        """Check a table against its schema; return its values (numbers as float)."""
        if not isinstance(data, dict):
            raise self.error(path, f"must be a table, got {_type_name(data)}")
        for key in data:
            if key not in schema:
                raise self.error(f"{path}.{key}" if path else key, self._unknown(key, schema))
        out: dict[str, Any] = {}
        for key, spec in schema.items():
            where = f"{path}.{key}" if path else key
            if key not in data:
                if spec.required:
                    hint = f" ({spec.help})" if spec.help else ""
                    raise self.error(path or key, f"missing required key '{key}'{hint}")
                continue
            out[key] = self.value(where, data[key], spec)
        return out

    def _unknown(self, key: str, schema: Mapping[str, Field]) -> str:
        close = difflib.get_close_matches(key, list(schema), n=1, cutoff=0.6)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        return f"unknown key '{key}'{hint} (known: {', '.join(sorted(schema))})"

    def value(self, where: str, value: object, spec: Field) -> Any:
        """One value checked against its field."""
        if spec.kind in ("float", "int"):
            return self._number(where, value, spec)
        if spec.kind == "str":
            if not isinstance(value, str) or not value.strip():
                raise self.error(where, f"must be text, got {_type_name(value)}")
            if spec.choices and value not in spec.choices:
                close = difflib.get_close_matches(value, spec.choices, n=1)
                hint = f"; did you mean '{close[0]}'?" if close else ""
                raise self.error(where, f"'{value}' is not one of {', '.join(spec.choices)}"
                                        + hint)
            return value
        if spec.kind == "bool":
            if not isinstance(value, bool):
                raise self.error(where, f"must be true or false, got {_type_name(value)}")
            return value
        if spec.kind == "names":
            if (not isinstance(value, list) or not value
                    or not all(isinstance(v, str) and v for v in value)):
                raise self.error(where, "must be a non-empty list of names, like [\"a\", \"b\"]")
            return tuple(value)
        if spec.kind in ("point", "floats"):
            items: list[object] = value if isinstance(value, list) else []
            ok = isinstance(value, list) and bool(items) and all(
                isinstance(v, int | float) and not isinstance(v, bool) for v in items)
            if not ok or (spec.kind == "point" and len(items) != 2):
                shape = "two numbers, like [10.0, -120.0]" if spec.kind == "point" else \
                    "a non-empty list of numbers"
                raise self.error(where, f"must be {shape}")
            nums = tuple(float(v) for v in items)  # type: ignore[arg-type]
            for v in nums:
                self._check_range(where, v, spec)
            return nums
        if spec.kind == "table":
            if not isinstance(value, dict):
                raise self.error(where, f"must be a table, got {_type_name(value)}")
            return value
        raise self.error(where, f"internal: unknown field kind {spec.kind}")

    def _number(self, where: str, value: object, spec: Field) -> float | int:
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(where, f"must be a number, got {_type_name(value)}")
        if spec.kind == "int" and not isinstance(value, int):
            raise self.error(where, f"must be a whole number, got {value!r}")
        if not math.isfinite(float(value)):
            raise self.error(where, f"must be a finite number, got {value!r}")
        self._check_range(where, float(value), spec)
        return int(value) if spec.kind == "int" else float(value)

    def _check_range(self, where: str, v: float, spec: Field) -> None:
        if spec.low is not None:
            if spec.low_open and not v > spec.low:
                raise self.error(where, f"must be greater than {spec.low:g}, got {v:g}")
            if not spec.low_open and not v >= spec.low:
                raise self.error(where, f"must be at least {spec.low:g}, got {v:g}")
        if spec.high is not None and not v <= spec.high:
            raise self.error(where, f"must be at most {spec.high:g}, got {v:g}")

    def named_tables(self, path: str, data: object) -> dict[str, Any]:
        """A table of named sub-tables (``[parts.thigh]``, ``[parts.shin]``...)."""
        if not isinstance(data, dict):
            raise self.error(path, f"must be a table of named entries, got {_type_name(data)}")
        for name, entry in data.items():
            if not isinstance(entry, dict):
                raise self.error(f"{path}.{name}", f"must be a table, got {_type_name(entry)}")
        return data

    def known(self, where: str, name: str, known: Mapping[str, object] | tuple[str, ...],
              what: str) -> str:
        """``name`` when it is one of ``known``; else an error listing them."""
        names = tuple(known)
        if name in names:
            return name
        close = difflib.get_close_matches(name, names, n=1)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        listing = ", ".join(names) if len(names) <= 12 else ", ".join(names[:12]) + ", ..."
        raise self.error(where, f"unknown {what} '{name}'{hint} (defined: {listing or 'none'})")

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

FieldKind = Literal[
    "float", "int", "str", "names", "bool", "point", "floats", "table", "list"
]


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


#: The largest size of any number in a case. Far beyond any linkage (1e9 mm is 1000 km, 1e9 N·m
#: no servo), it keeps the squares, cubes and fourth powers of the frame model finite; a larger
#: number is a slip of the keyboard, not a design.
MAX_MAGNITUDE = 1e9
#: The smallest value of a key that must be positive: below it a size, rate or stiffness means
#: nothing and would only be divided by.
MIN_POSITIVE = 1e-9


def positive(required: bool = False, help: str = "") -> Field:
    """A number > 0."""
    return Field("float", required=required, low=0.0, low_open=True, help=help)


def at_least(low: float, required: bool = False, high: float | None = None) -> Field:
    """A number ≥ low (and ≤ high)."""
    return Field("float", required=required, low=low, high=high)


def choice(*options: str, required: bool = False) -> Field:
    """One of the given strings."""
    return Field("str", required=required, choices=options)


_KEY_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*')"""
_DOTTED = rf"{_KEY_PART}(?:[ \t]*\.[ \t]*{_KEY_PART})*"
_HEADER = re.compile(rf"^\s*\[\[?\s*({_DOTTED})\s*\]\]?")
_OPEN_HEADER = re.compile(rf"^\s*\[\[?\s*({_DOTTED})")  # a header, closed or not
_ASSIGN = re.compile(rf"^\s*({_DOTTED})\s*=")
_KEY_START = re.compile(rf"^\s*({_DOTTED})")  # the key a statement starts with
#: tomllib's words for a key or table given twice.
_TWICE = ("Cannot declare", "Cannot overwrite a value", "Cannot redefine namespace",
          "Duplicate inline table key")
_AT = re.compile(r"^(.*) \(at (?:line (\d+), column \d+|end of document)\)$", re.S)


def _key_parts(dotted: str) -> tuple[str, ...]:
    """``a."b c".d`` -> ("a", "b c", "d") (quotes dropped, escapes kept as written)."""
    return tuple(p[1:-1] if p[0] in "\"'" else p for p in re.findall(_KEY_PART, dotted))


def _decode_error(err: tomllib.TOMLDecodeError, text: str) -> tuple[str, int | None]:
    """The parser's message without its position, and the line it stopped at."""
    msg: str | None = getattr(err, "msg", None)
    line: int | None = getattr(err, "lineno", None)
    if msg is None:  # before Python 3.14 the position is only in the text
        found = _AT.match(str(err))
        if not found:
            return str(err), None
        msg = found.group(1)
        at_end = text.rstrip("\n").count("\n") + 1  # "at end of document"
        line = int(found.group(2)) if found.group(2) else at_end
    return msg, line


def _did_you_mean(name: str, names: tuple[str, ...]) -> str:
    """``; did you mean 'x'?`` for the closest of ``names`` (ignoring case first), or ""."""
    same = [n for n in names if n.casefold() == name.casefold()]
    close = same or difflib.get_close_matches(name, names, n=1)
    if not close:
        folded = {n.casefold(): n for n in names}
        close = [folded[c] for c in difflib.get_close_matches(name.casefold(), list(folded), n=1)]
    return f"; did you mean '{close[0]}'?" if close else ""


def _listing(names: tuple[str, ...]) -> str:
    if not names:
        return "none"
    return ", ".join(names) if len(names) <= 12 else ", ".join(names[:12]) + ", ..."


def type_name(value: object) -> str:
    """What a TOML value is, in the words of the error messages (``a number``, ``text``...)."""
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
        """The reader and the parsed document; a syntax error becomes a CaseError.

        The error names the key (or table) written on the line the parser stopped at, and
        says a name given twice in plain words, the commonest way to break a case by hand.
        """
        reader = Reader(file, text)
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as err:
            msg, line = _decode_error(err, text)
            key = reader.key_at(line) if line is not None else None
            if msg.startswith(_TWICE):
                why = "defined twice (each key and table may be given once)"
            elif msg.startswith("Cannot mutate immutable namespace"):
                why = ("adds to an inline table { ... }, which is complete where it is "
                       "written")
            else:
                why = f"not valid TOML: {msg}"
            raise CaseError(file, key or "(syntax)", why, line) from None
        except ValueError:  # tomllib's int() refuses thousands of digits
            long = re.search(r"\d[\d_]{999,}", text)
            line = None if long is None else text.count("\n", 0, long.start()) + 1
            key = reader.key_at(line) if line is not None else None
            raise CaseError(file, key or "(syntax)", "a number with thousands of digits",
                            line) from None
        return reader, data

    # --- locating keys ------------------------------------------------------------------

    def _lines(self) -> list[str]:
        return self.text.split("\n")  # TOML counts lines by newlines only

    def line_of(self, path: str) -> int | None:
        """Best-effort line number of a dotted key path (``a.b[2].c`` too) in the text.

        The line of the longest part of the path written anywhere: under the deepest
        ``[header]`` that starts the path, a ``key =`` (or dotted ``a.b =``) continuing it,
        then keys of inline tables on that line; the header's own line when no key continues.
        """
        want = tuple(re.sub(r"(\[\d+\])+$", "", p) for p in path.split("."))
        lines = self._lines()
        best: tuple[int, int] | None = None  # (parts of the path matched, line index)
        head: tuple[str, ...] = ()
        for i, ln in enumerate(lines):
            header = _HEADER.match(ln)
            if header:
                head = _key_parts(header.group(1))
                if want[:len(head)] == head and (best is None or len(head) > best[0]):
                    best = (len(head), i)
                continue
            if want[:len(head)] != head:
                continue
            assign = _ASSIGN.match(ln)
            if not assign:
                continue
            key = _key_parts(assign.group(1))
            full = (*head, *key)
            if want[:len(full)] != full:
                continue
            score = len(full)
            rest = ln[assign.end():]
            for part in want[len(full):]:
                inline = re.search(r"[{,]\s*[\"']?" + re.escape(part) + r"[\"']?\s*=", rest)
                if not inline:
                    break
                score += 1
                rest = rest[inline.end():]
            if best is None or score > best[0]:
                best = (score, i)
        return None if best is None else best[1] + 1

    def key_at(self, line: int) -> str | None:
        """The key path written on ``line`` (1-based): its table's header and its own key."""
        lines = self._lines()
        if not 1 <= line <= len(lines):
            return None
        here = lines[line - 1]
        header = _OPEN_HEADER.match(here)
        if header:
            return ".".join(_key_parts(header.group(1)))
        head: tuple[str, ...] = ()
        for ln in reversed(lines[:line - 1]):
            found = _HEADER.match(ln)
            if found:
                head = _key_parts(found.group(1))
                break
        assign = _KEY_START.match(here)
        key = _key_parts(assign.group(1)) if assign else ()
        return ".".join((*head, *key)) or None

    def error(self, path: str, why: str) -> CaseError:
        """A CaseError at ``path`` with the line where it can be found."""
        return CaseError(self.file, path, why, self.line_of(path))

    # --- tables -------------------------------------------------------------------------

    def table(self, path: str, data: object, schema: Mapping[str, Field]) -> dict[str, Any]:
        """Check a table against its schema; return its values (numbers as float)."""
        if not isinstance(data, dict):
            raise self.error(path, f"must be a table, got {type_name(data)}")
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
                raise self.error(where, f"must be text, got {type_name(value)}")
            if spec.choices and value not in spec.choices:
                close = difflib.get_close_matches(value, spec.choices, n=1)
                hint = f"; did you mean '{close[0]}'?" if close else ""
                raise self.error(where, f"'{value}' is not one of {', '.join(spec.choices)}"
                                        + hint)
            return value
        if spec.kind == "bool":
            if not isinstance(value, bool):
                raise self.error(where, f"must be true or false, got {type_name(value)}")
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
            nums = tuple(self._real(where, v) for v in items)  # type: ignore[arg-type]
            for v in nums:
                self._check_range(where, v, spec)
            return nums
        if spec.kind == "list":
            if not isinstance(value, list):
                raise self.error(where, f"must be a list, got {type_name(value)}")
            return value
        if spec.kind == "table":
            if not isinstance(value, dict):
                raise self.error(where, f"must be a table, got {type_name(value)}")
            return value
        raise self.error(where, f"internal: unknown field kind {spec.kind}")

    def _number(self, where: str, value: object, spec: Field) -> float | int:
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise self.error(where, f"must be a number, got {type_name(value)}")
        if spec.kind == "int" and not isinstance(value, int):
            raise self.error(where, f"must be a whole number, got {value!r}")
        real = self._real(where, value)
        self._check_range(where, real, spec)
        return int(value) if spec.kind == "int" else real

    def _real(self, where: str, value: float) -> float:
        """A number as a float, once it is finite and no larger than MAX_MAGNITUDE."""
        if isinstance(value, int) and abs(value) > MAX_MAGNITUDE:  # may not fit a float
            raise self.error(where, f"is too large: numbers in a case stay within "
                                    f"±{MAX_MAGNITUDE:g}, got a whole number of "
                                    f"{value.bit_length()} bits")
        real = float(value)
        if not math.isfinite(real):
            raise self.error(where, f"must be a finite number, got {value!r}")
        if abs(real) > MAX_MAGNITUDE:
            raise self.error(where, f"is too large: numbers in a case stay within "
                                    f"±{MAX_MAGNITUDE:g}, got {real:g}")
        return real

    def _check_range(self, where: str, v: float, spec: Field) -> None:
        if spec.low == 0.0 and spec.low_open and 0.0 < v < MIN_POSITIVE:
            raise self.error(where, f"is too small to mean anything: give at least "
                                    f"{MIN_POSITIVE:g}, got {v:g}")
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
            raise self.error(path, f"must be a table of named entries, got {type_name(data)}")
        for name, entry in data.items():
            if not isinstance(entry, dict):
                raise self.error(f"{path}.{name}", f"must be a table, got {type_name(entry)}")
        return data

    def known(self, where: str, name: str, known: Mapping[str, object] | tuple[str, ...],
              what: str) -> str:
        """``name`` when it is one of ``known``; else an error listing them."""
        names = tuple(known)
        if name in names:
            return name
        raise self.error(where, f"unknown {what} '{name}'{_did_you_mean(name, names)} "
                                f"(defined: {_listing(names)})")

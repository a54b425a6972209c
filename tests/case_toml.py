"""Editing the demo case as data: a tiny TOML writer that records the line of every key it
writes, and small edits (put, drop, rename) of the parsed demo, for the case-error tests."""

from __future__ import annotations

import copy
import re
import tomllib
from collections.abc import Callable, Mapping
from typing import Any

from stiff import CASES_DIR

DEMO_PATH = CASES_DIR / "five_bar_leg.toml"
DEMO_TEXT = DEMO_PATH.read_text(encoding="utf-8")

# ---------------------------------------------------------------------------------------------
# A tiny TOML writer


_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def toml_string(text: str) -> str:
    """``text`` as a TOML basic string."""
    out = []
    for ch in text:
        if ch in '"\\':
            out.append("\\" + ch)
        elif ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def toml_key(key: str) -> str:
    """A key, bare where TOML allows it, else quoted."""
    return key if _BARE.match(key) else toml_string(key)


def toml_value(value: object) -> str:
    """One value, written inline."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        return repr(value)  # 'inf', 'nan', '1e+20' are TOML too
    if isinstance(value, str):
        return toml_string(value)
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{toml_key(k)} = {toml_value(v)}"
                                for k, v in value.items()) + " }"
    raise TypeError(f"cannot write {type(value).__name__} as TOML")


def dump(data: Mapping[str, Any]) -> tuple[str, dict[str, int]]:
    """TOML text for ``data`` and the 1-based line of every key path written.

    A table's plain values come first, then each nested table under its own ``[header]``; a
    table holding only tables gets no header of its own (like ``[parts]`` in the demo), an
    empty one does.
    """
    lines: list[str] = []
    where: dict[str, int] = {}

    def table(path: tuple[str, ...], body: Mapping[str, Any]) -> None:
        plain = {k: v for k, v in body.items() if not isinstance(v, dict)}
        if path and (plain or not body):
            if lines:
                lines.append("")
            lines.append("[" + ".".join(toml_key(k) for k in path) + "]")
            where[".".join(path)] = len(lines)
        for key, value in plain.items():
            lines.append(f"{toml_key(key)} = {toml_value(value)}")
            where[".".join((*path, key))] = len(lines)
        for key, value in body.items():
            if isinstance(value, dict):
                table((*path, key), value)

    table((), data)
    return "\n".join(lines) + "\n", where


# ---------------------------------------------------------------------------------------------
# Edits of the demo

Edit = Callable[[dict[str, Any]], None]


def demo() -> dict[str, Any]:
    """A fresh parsed copy of the demo case."""
    return tomllib.loads(DEMO_TEXT)


def _parent(data: dict[str, Any], path: str) -> tuple[dict[str, Any], str]:
    *head, last = path.split(".")
    for key in head:
        data = data.setdefault(key, {})
    return data, last


def put(path: str, value: object) -> Edit:
    """Set the key at dotted ``path`` (tables made as needed)."""
    def edit(data: dict[str, Any]) -> None:
        table, key = _parent(data, path)
        table[key] = copy.deepcopy(value)
    return edit


def drop(path: str) -> Edit:
    """Delete the key at dotted ``path``."""
    def edit(data: dict[str, Any]) -> None:
        table, key = _parent(data, path)
        del table[key]
    return edit


def rename(path: str, new: str) -> Edit:
    """Rename the key at dotted ``path`` to ``new``, keeping its place."""
    def edit(data: dict[str, Any]) -> None:
        table, key = _parent(data, path)
        items = [(new if k == key else k, v) for k, v in table.items()]
        table.clear()
        table.update(items)
    return edit


def edited(edit: Edit) -> dict[str, Any]:
    """The demo with ``edit`` made."""
    data = demo()
    edit(data)
    return data


def edits(*steps: Edit) -> Edit:
    """Several edits in turn."""
    def edit(data: dict[str, Any]) -> None:
        for step in steps:
            step(data)
    return edit

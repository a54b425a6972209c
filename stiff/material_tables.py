"""Columns of the material tables, and the checks a table must pass.

:mod:`stiff.materials` turns checked rows into records; this module knows only columns and cells.
A bad table raises :class:`~stiff.errors.MaterialError` naming file, row (the line number in the
file, header = line 1) and column.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Literal, get_args

import numpy as np
import pandas as pd

from stiff import PROJECT_ROOT
from stiff.errors import MaterialError
from stiff.printing import CONFIDENCE_TAGS

MaterialKind = Literal["printed", "tube", "metal", "adhesive"]
MATERIAL_KINDS: tuple[MaterialKind, ...] = get_args(MaterialKind)

#: How a column's cells are checked.
CellCheck = Literal["positive", "ratio", "poisson", "temperature", "text", "basis"]

CONFIDENCE_RANK: Mapping[str, int] = MappingProxyType(
    {"confirmed": 0, "measured": 1, "derived": 2, "practice": 3, "memory": 4}
)


@dataclass(frozen=True)
class Column:
    """One column of a material table.

    Parameters
    ----------
    name
        Column name, with its unit (``E_xy_MPa``, ``density_g_cm3``, ``cov_z_ratio``).
    check
        ``positive``: a number > 0; ``ratio``: a number in (0, 1]; ``poisson``: in (0, 0.5);
        ``temperature``: any number [°C]; ``text``: non-empty text; ``basis``: ``minimum`` or
        ``typical``.
    required
        A required cell must not be blank; an optional blank cell becomes ``None``.
    """

    name: str
    check: CellCheck
    required: bool = True


def _cols(spec: str) -> tuple[Column, ...]:
    """Columns from ``"name:check[?]"`` words; a trailing ``?`` marks an optional column."""
    out = []
    for word in spec.split():
        name, check = word.split(":")
        optional = check.endswith("?")
        out.append(Column(name, check.rstrip("?"), not optional))  # type: ignore[arg-type]
    return tuple(out)


_TAIL = _cols("source:text confidence:text")

COLUMNS: Mapping[MaterialKind, tuple[Column, ...]] = MappingProxyType(
    {
        "printed": _cols(
            "name:text E_xy_MPa:positive E_z_MPa:positive? G_xy_MPa:positive? "
            "poisson_ratio:poisson tension_xy_MPa:positive tension_z_MPa:positive "
            "tension_across_lines_MPa:positive? compression_MPa:positive? "
            "shear_xy_MPa:positive? shear_z_MPa:positive? density_g_cm3:positive "
            "T_glass_C:temperature T_hot_C:temperature? E_hot_ratio:ratio? "
            "strength_hot_ratio:ratio? cov_xy_ratio:ratio cov_z_ratio:ratio "
            "sustained_ratio:ratio fatigue_xy_ratio:ratio fatigue_z_ratio:ratio"
        )
        + _TAIL,
        "tube": _cols(
            "name:text E_axial_MPa:positive G_MPa:positive tension_axial_MPa:positive "
            "compression_axial_MPa:positive hoop_MPa:positive? density_g_cm3:positive"
        )
        + _TAIL,
        "metal": _cols(
            "name:text E_MPa:positive G_MPa:positive? poisson_ratio:poisson "
            "ultimate_MPa:positive yield_MPa:positive proof_MPa:positive? "
            "strength_basis:basis density_g_cm3:positive"
        )
        + _TAIL,
        "adhesive": _cols(
            "name:text E_MPa:positive G_MPa:positive? poisson_ratio:poisson "
            "lap_shear_MPa:positive density_g_cm3:positive"
        )
        + _TAIL,
    }
)
TUBE_SIZE_COLUMNS = _cols("name:text od_mm:positive id_mm:positive") + _TAIL

TABLE_FILES: Mapping[MaterialKind, str] = MappingProxyType(
    {
        "printed": "printed.csv",
        "tube": "tubes.csv",
        "metal": "metals.csv",
        "adhesive": "adhesives.csv",
    }
)
TUBE_SIZES_FILE = "tube_sizes.csv"


def weakest(*tags: str) -> str:
    return max(tags, key=lambda tag: CONFIDENCE_RANK[tag])


def check_frame(
    frame: pd.DataFrame,
    columns: tuple[Column, ...],
    where: str,
    row_labels: list[str],
) -> list[dict[str, object]]:
    """Check every cell of ``frame`` (all cells as text) and return one dict of values a row."""
    missing = [c.name for c in columns if c.name not in frame.columns]
    if missing:
        raise MaterialError(where, None, missing[0], "missing column")
    extra = [name for name in frame.columns if name not in {c.name for c in columns}]
    if extra:
        known = ", ".join(c.name for c in columns)
        raise MaterialError(where, None, str(extra[0]), f"unknown column (known: {known})")
    if frame.empty:
        raise MaterialError(where, None, None, "no rows")
    values: dict[str, list[object]] = {}
    for col in columns:
        text = frame[col.name].astype(str).str.strip()
        blank = (text == "").to_numpy()
        if col.required and blank.any():
            raise MaterialError(where, row_labels[int(np.argmax(blank))], col.name, "blank cell")
        if col.check in ("text", "basis"):
            if col.check == "basis":
                bad = ~text.isin(["minimum", "typical"]).to_numpy()
                if bad.any():
                    i = int(np.argmax(bad))
                    raise MaterialError(
                        where,
                        row_labels[i],
                        col.name,
                        f"{text.iloc[i]!r} is not minimum or typical",
                    )
            values[col.name] = [None if b else t for t, b in zip(text, blank, strict=True)]
            continue
        number = pd.to_numeric(text.where(~blank, "nan"), errors="coerce").to_numpy(np.float64)
        not_number = ~blank & ~np.isfinite(number)
        if col.check == "positive":
            bad, need = not_number | (~blank & (number <= 0.0)), "a positive number"
        elif col.check == "ratio":
            bad, need = (
                not_number | (~blank & ((number <= 0.0) | (number > 1.0))),
                "a ratio in (0, 1]",
            )
        elif col.check == "poisson":
            bad, need = not_number | (~blank & ((number <= 0.0) | (number >= 0.5))), "in (0, 0.5)"
        else:
            bad, need = not_number, "a number"
        if bad.any():
            i = int(np.argmax(bad))
            raise MaterialError(where, row_labels[i], col.name, f"{text.iloc[i]!r} is not {need}")
        values[col.name] = [None if b else float(v) for v, b in zip(number, blank, strict=True)]
    tags = values["confidence"]
    for i, tag in enumerate(tags):
        if tag not in CONFIDENCE_TAGS:
            raise MaterialError(
                where,
                row_labels[i],
                "confidence",
                f"{tag!r} is not one of {', '.join(CONFIDENCE_TAGS)}",
            )
    names = [str(n) for n in values["name"]]
    lowered = [n.lower() for n in names]
    for i, name in enumerate(lowered):
        if name in lowered[:i]:
            raise MaterialError(where, row_labels[i], "name", f"duplicate name {names[i]!r}")
    return [{c.name: values[c.name][i] for c in columns} for i in range(len(frame))]


def display(path: Path) -> str:
    """The path as shown in messages: relative to the repository for the built-in tables."""
    try:
        return str(path.resolve().relative_to(PROJECT_ROOT))
    except ValueError:
        return str(path)


def read_csv(path: Path) -> pd.DataFrame:
    if not path.is_file():
        raise MaterialError(display(path), None, None, "no such file")
    try:
        frame = pd.read_csv(path, dtype=str, keep_default_na=False, skipinitialspace=True)
    except (pd.errors.ParserError, pd.errors.EmptyDataError, UnicodeDecodeError) as err:
        first = str(err).strip().splitlines()[0] if str(err).strip() else type(err).__name__
        raise MaterialError(
            display(path), None, None, f"not a readable CSV table: {first}"
        ) from err
    frame.columns = [str(c).strip() for c in frame.columns]
    return frame


def line_labels(frame: pd.DataFrame) -> list[str]:
    return [str(i + 2) for i in range(len(frame))]

"""The errors stiff raises on purpose.

Every error a user can cause is a :class:`StiffError`. The command line maps each kind to a
one-line message and an exit code (see ``stiff.cli``); library code never prints.

Exit codes (documented in the README):

* 2: bad input (:class:`CaseError`, :class:`MaterialError`, :class:`ModelError`);
* 3: the model cannot be solved (:class:`MechanismError`, :class:`PoseError`).
"""

from __future__ import annotations

from pathlib import Path

EXIT_OK = 0
EXIT_CHECK_FAILED = 1
EXIT_BAD_INPUT = 2
EXIT_UNSOLVABLE = 3


class StiffError(Exception):
    """Base of every error stiff raises on purpose."""

    exit_code: int = EXIT_BAD_INPUT


class ModelError(StiffError):
    """A frame model handed to the engine is malformed (zero-length member, bad section...)."""


class CaseError(StiffError):
    """A case file is wrong: names the file, the key path, the line where known, and why."""

    def __init__(
        self, file: Path | str | None, key: str, why: str, line: int | None = None
    ) -> None:
        self.file = None if file is None else str(file)
        self.key = key
        self.why = why
        self.line = line
        where = self.file or "<case>"
        if line is not None:
            where += f":{line}"
        super().__init__(f"{where}: {key}: {why}")


class MaterialError(StiffError):
    """A material table or record is wrong: names the file, row and column, and why."""

    def __init__(
        self, file: Path | str | None, row: str | int | None, column: str | None, why: str
    ) -> None:
        self.file = None if file is None else str(file)
        self.row = row
        self.column = column
        self.why = why
        parts = [self.file or "<materials>"]
        if row is not None:
            parts.append(f"row {row}")
        if column is not None:
            parts.append(f"column {column}")
        super().__init__(f"{', '.join(parts)}: {why}")


class MechanismError(StiffError):
    """The stiffness is singular: some node can move without straining anything.

    ``free`` lists (node name, DOF name) pairs that take part in the null mode.
    """

    exit_code = EXIT_UNSOLVABLE

    def __init__(self, why: str, free: tuple[tuple[str, str], ...] = ()) -> None:
        self.free = free
        super().__init__(why)


class PoseError(StiffError):
    """The linkage cannot take the asked pose (a loop cannot close, or it jams)."""

    exit_code = EXIT_UNSOLVABLE

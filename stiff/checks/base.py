"""What every check returns, and how its status is decided.

A check compares a demand with a capacity in one load case for one item (a lug, a printed
segment, a tube, a socket, a pin, an actuator, a spring, the foot). Its safety factor is
capacity / demand; it is

* ``met`` when the factor reaches the required factor,
* ``marginal`` when the item holds (factor ≥ 1) but without the required margin,
* ``not met`` when the factor is below 1: the item is expected to fail or slip.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]
ItemKind = Literal["lug", "segment", "tube", "socket", "pin", "actuator", "spring", "foot"]
Status = Literal["met", "marginal", "not met"]


@dataclass(frozen=True)
class CheckRecord:
    """One check of one item in one load case.

    ``demand`` and ``capacity`` share ``unit``; ``basis`` is the chain of values and knock-downs
    behind the capacity, each with its source; ``suggestion`` says what would help, if anything.
    """

    item: str
    kind: ItemKind
    mode: str
    load_case: str
    demand: float
    capacity: float
    unit: str
    required_factor: float
    basis: str
    suggestion: str = ""

    @property
    def safety_factor(self) -> float:
        """Capacity over demand (∞ for no demand)."""
        if self.demand <= 0.0:
            return math.inf
        return self.capacity / self.demand

    @property
    def status(self) -> Status:
        """met, marginal or not met (see the module docstring)."""
        sf = self.safety_factor
        if sf >= self.required_factor:
            return "met"
        if sf >= 1.0:
            return "marginal"
        return "not met"

    @property
    def utilisation(self) -> float:
        """Required factor over safety factor: above 1 the check is not met with margin."""
        sf = self.safety_factor
        return 0.0 if math.isinf(sf) else self.required_factor / sf


def governing(records: Iterable[CheckRecord]) -> dict[str, CheckRecord]:
    """The governing (highest utilisation) check of each item."""
    out: dict[str, CheckRecord] = {}
    for r in records:
        if r.item not in out or r.utilisation > out[r.item].utilisation:
            out[r.item] = r
    return out


def worst_first(records: Iterable[CheckRecord]) -> list[CheckRecord]:
    """Records sorted by utilisation, worst first."""
    return sorted(records, key=lambda r: -r.utilisation)


#: Text of one entry of a :class:`CheckRows`: a fixed string, or made from the entry's index
#: (for text that quotes that entry's load, such as ``P = 123 N``).
Text = str | Callable[[int], str]


def _text(t: Text, i: int) -> str:
    return t if isinstance(t, str) else t(i)


@dataclass(frozen=True)
class CheckRows:
    """One check of one item in one load case at B poses (or variants) at once.

    ``demand`` and ``capacity`` are arrays of shape (B,) (capacity may be a scalar, broadcast);
    ``applies`` marks the entries where the check exists: elsewhere `stiff check` would make no
    record of it (say, net tension when the pin pushes into the part), and its safety factor is
    ∞. ``basis`` and ``suggestion`` are strings, or functions of the entry's index when they
    quote that entry's numbers; they are only made for the records asked for.
    """

    item: str
    kind: ItemKind
    mode: str
    load_case: str
    demand: FloatArray
    capacity: FloatArray | float
    unit: str
    required_factor: float
    basis: Text
    suggestion: Text = ""
    applies: BoolArray | None = None
    #: (B,) capacity / demand, ∞ where there is no demand or the check does not apply (made
    #: with the row, which is frozen)
    safety_factors: FloatArray = field(init=False, repr=False, compare=False)

    @property
    def size(self) -> int:
        """B, the entries."""
        return int(np.shape(self.demand)[0])

    @property
    def mask(self) -> BoolArray:
        """(B,) True where the check exists."""
        if self.applies is None:
            return np.ones(self.size, bool)
        return np.asarray(self.applies, bool)

    def __post_init__(self) -> None:
        demand = np.asarray(self.demand, np.float64)
        live = demand > 0.0
        if self.applies is not None:
            live &= np.asarray(self.applies, bool)
        factors = np.full(demand.shape, np.inf)
        with np.errstate(over="ignore"):  # a vanishing demand: an infinite factor
            np.divide(self.capacity, demand, out=factors, where=live)
        factors.flags.writeable = False
        object.__setattr__(self, "safety_factors", factors)

    @property
    def utilisations(self) -> FloatArray:
        """(B,) required factor over safety factor (0 where the factor is ∞)."""
        sf = self.safety_factors
        out = np.full(sf.shape, np.inf)  # a zero capacity: an infinite utilisation
        live = np.isfinite(sf) & (sf > 0.0)
        out[~np.isfinite(sf)] = 0.0
        with np.errstate(over="ignore"):
            np.divide(self.required_factor, sf, out=out, where=live)
        return out

    def record(self, i: int) -> CheckRecord:
        """Entry i as a :class:`CheckRecord`."""
        capacity = np.broadcast_to(np.asarray(self.capacity, np.float64), (self.size,))
        return CheckRecord(
            item=self.item, kind=self.kind, mode=self.mode, load_case=self.load_case,
            demand=float(self.demand[i]), capacity=float(capacity[i]), unit=self.unit,
            required_factor=self.required_factor, basis=_text(self.basis, i),
            suggestion=_text(self.suggestion, i))

    def records(self) -> list[CheckRecord]:
        """A record of every entry where the check applies, in entry order."""
        return [self.record(int(i)) for i in np.flatnonzero(self.mask)]


def expand(rows: Iterable[CheckRows]) -> list[CheckRecord]:
    """Every record of every row set, in order (B = 1: one record per applying check)."""
    return [r for row in rows for r in row.records()]

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
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Literal

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

"""Fixtures shared by the check tests: the five-bar and hopping demos, checked once a module."""

from __future__ import annotations

import pytest

from stiff.checks.context import CheckContext
from tests.demo_contexts import FIVE_BAR, HOPPING, context_of


@pytest.fixture(scope="module")
def five_bar() -> CheckContext:
    return context_of(FIVE_BAR)


@pytest.fixture(scope="module")
def hopping() -> CheckContext:
    return context_of(HOPPING)

"""Test settings shared by every test module.

Hypothesis runs with a fixed seed per test by default (the ``fixed`` profile), so that a test run
on a fresh machine sees the same examples every time and a failure can be reproduced; set
``HYPOTHESIS_PROFILE=explore`` to search with fresh random examples (do that when changing
numerics: it has found overflow at subnormal inputs before).
"""

from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("fixed", derandomize=True)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "fixed"))

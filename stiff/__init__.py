"""stiff: stiffness, wobble and strength of tube-and-printed-joint linkages before printing."""

from pathlib import Path

__version__ = "0.1.0"

#: The repository root, where the bundled ``materials/`` and ``cases/`` folders live.
PROJECT_ROOT = Path(__file__).resolve().parent.parent
MATERIALS_DIR = PROJECT_ROOT / "materials"
CASES_DIR = PROJECT_ROOT / "cases"

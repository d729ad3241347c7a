"""What every notebook's first cell needs: the scenario it works on.

A notebook names its own demo scenario; ``HEADLINE_SCENARIO`` (set by ``python -m kit run``)
overrides it. Paths are resolved against the repository's ``scenarios/`` folder.

Example
-------
>>> scenario_path("kestrel_ridge_booster.toml").name
'kestrel_ridge_booster.toml'
"""

from __future__ import annotations

import os
from pathlib import Path

__all__ = ["ROOT", "SCENARIOS", "scenario_path", "open_scenario"]

ROOT = Path(__file__).resolve().parent.parent
SCENARIOS = ROOT / "scenarios"


def scenario_path(default: str) -> Path:
    """``$HEADLINE_SCENARIO`` if set, else ``default`` inside ``scenarios/``."""
    chosen = os.environ.get("HEADLINE_SCENARIO") or default
    p = Path(chosen)
    if not p.is_absolute() and not p.exists():
        p = SCENARIOS / p
    return p


def open_scenario(default: str):
    """Load the notebook's scenario (see :func:`scenario_path`)."""
    from kit import scenario

    return scenario.load(scenario_path(default))

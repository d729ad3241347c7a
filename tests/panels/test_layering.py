"""kit.core stays pure: importing it loads neither pint, ipywidgets nor plotly.

Checked in a fresh interpreter (a subprocess), since this test session itself has them loaded.
Common practice, no source: the layering rule of DEVELOPERS.md.
"""

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
FORBIDDEN = ("pint", "ipywidgets", "plotly")
CORE_MODULES = sorted(p.stem for p in (ROOT / "kit" / "core").glob("*.py") if p.stem != "__init__")


def _loaded_after(imports: list[str]) -> list[str]:
    code = (
        "import importlib, json, sys\n"
        f"for name in {imports!r}:\n"
        "    importlib.import_module(name)\n"
        f"print(json.dumps([m for m in {FORBIDDEN!r} if m in sys.modules]))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True,
                         text=True, timeout=120, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def test_core_base_modules_load_no_ui_or_units():
    assert _loaded_after(["kit.core", "kit.core.line", "kit.core.system",
                          "kit.core.friction"]) == []


@pytest.mark.parametrize("module", CORE_MODULES)
def test_each_core_module_loads_no_ui_or_units(module):
    assert _loaded_after([f"kit.core.{module}"]) == []


def test_the_check_can_fail():
    # the probe itself must see a forbidden module when one is imported
    assert _loaded_after(["kit.units"]) == ["pint"]

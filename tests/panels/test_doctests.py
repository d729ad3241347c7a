"""The examples in the panel modules' docstrings run and give the numbers they show."""

import doctest
import importlib

import pytest

MODULES = ["base", "fields", "display", "charts", "tables", "findings_view", "pipe_picker",
           "fluid_picker", "workspace", "pump_editor", "pump_system"]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    module = importlib.import_module(f"kit.panels.{name}")
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0

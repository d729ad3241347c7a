"""Widget panels: small ipywidgets composites that translate between widgets and core objects.

Every panel is an :class:`ipywidgets.VBox` subclass (see :mod:`kit.panels.base`):

- ``panel.value`` — a core object in SI, or ``None`` while an input is invalid;
- the **one change event** is the traitlets change of ``value``:
  ``panel.observe(callback, names="value")``;
- assigning ``panel.value = obj`` (or ``panel.set_value(obj)``) shows ``obj``;
- ``panel.set_system("SI" | "US")`` re-renders displays without touching typed text;
- bad input shows the kit's message beside the field (CSS ``hl-error``) and keeps the text.

No panel computes hydraulics: each calls :mod:`kit.core`.

Charts are :class:`kit.panels.plot_view.PlotView` widgets (plotly figures as plain JSON, drawn
by ``Plotly.react``; plotly.js sent once per kernel); text boxes that feed the kernel are
:class:`kit.panels.entry.TextEntry` (one message per Enter).

nbformat is imported here on purpose, before plotly: plotly imports it lazily (figure display,
``FigureWidget``), which inside a kernel costs seconds (jsonschema format checkers); importing
it up front keeps that cost out of the first chart.
"""

import nbformat  # noqa: F401  (imported early on purpose: see the module docstring)

from kit.panels.base import Panel
from kit.panels.charts import Chart, Series
from kit.panels.display import DisplaySwitch, apply_system
from kit.panels.fields import QuantityField
from kit.panels.findings_view import FindingsView
from kit.panels.fluid_picker import FluidPicker, FluidSelection
from kit.panels.pipe_picker import PipePicker
from kit.panels.tables import Column, ResultsTable, reported_table_html, results_table_html

__all__ = [
    "Panel", "QuantityField", "DisplaySwitch", "apply_system", "PipePicker", "FluidPicker",
    "FluidSelection", "FindingsView", "ResultsTable", "Column", "results_table_html",
    "reported_table_html", "Chart", "Series", "FittingList",
]


def __getattr__(name):
    # FittingList needs kit.core.fittings; loaded on first use so that the other panels
    # import without it.
    if name == "FittingList":
        from kit.panels.fitting_list import FittingList

        return FittingList
    raise AttributeError(f"module 'kit.panels' has no attribute {name!r}")

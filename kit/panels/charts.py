"""Charts: one plotly ``FigureWidget`` per chart, updated in place.

Each ``FigureWidget`` carries a ~5 MB JavaScript bundle to the browser and into saved
widget state, so a chart is built once and its traces are updated with
``fig.batch_update()`` (one message per update). Data is held in SI; axes are shown in
the display system of :mod:`kit.units`, and :meth:`Chart.set_system` re-renders from the
stored SI data. plotly is imported inside the functions that need it.

Example
-------
>>> import numpy as np
>>> c = Chart("flow", "head", title="system curve")
>>> c.set_series([Series("system", np.array([0.0, 0.01]), np.array([20.0, 30.0]))])
>>> c.figure.data[0].y.tolist()
[20.0, 30.0]
>>> c.set_system("US")
>>> round(float(c.figure.data[0].y[1]), 2)
98.43
"""

from __future__ import annotations

from dataclasses import dataclass, field

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.panels.base import check_system

__all__ = ["Series", "Chart", "to_display", "axis_title"]


def to_display(values, kind: str, system: str = "SI", unit: str | None = None) -> np.ndarray:
    """SI values of ``kind`` as a float array in the display unit (affine conversion).

    >>> to_display([0.0, 1.0], "flow", "SI").tolist()
    [0.0, 3600.0]
    """
    unit = unit or units.display_unit(kind, system)
    a = units.convert(0.0, kind, unit)
    b = units.convert(1.0, kind, unit) - a
    return a + b * np.asarray(values, dtype=float)


_PRETTY_AXIS = {"m**3/h": "m³/h", "m**2": "m²", "m**3": "m³", "kg/m**3": "kg/m³",
                "degC": "°C", "degF": "°F", "mPa*s": "mPa·s", "mm**2/s": "mm²/s",
                "ft**2": "ft²", "lb/ft**3": "lb/ft³", "gallon": "US gal"}


def axis_title(name: str, kind: str, system: str = "SI") -> str:
    """'flow [m³/h]' for ``axis_title("flow", "flow")``.

    >>> axis_title("head", "head", "US")
    'head [ft]'
    """
    unit = units.display_unit(kind, system)
    unit = _PRETTY_AXIS.get(unit, unit)
    return f"{name} [{unit}]" if unit else name


@dataclass(frozen=True)
class Series:
    """One trace: a name and SI arrays.

    Attributes
    ----------
    name : str
    x, y : array-like
        Values in the SI unit of the chart's x and y kinds.
    mode : str
        plotly mode: 'lines', 'markers' or 'lines+markers'.
    dash : str or None
        Line dash ('dash', 'dot') or None for solid.
    color : str or None
        A CSS colour, or None for the default cycle.
    """

    name: str
    x: object
    y: object
    mode: str = "lines"
    dash: str | None = None
    color: str | None = None
    extra: dict = field(default_factory=dict)


class Chart(widgets.VBox):
    """A chart of SI series against x and y quantity kinds, in the display system.

    Parameters
    ----------
    x_kind, y_kind : str
        Keys of :data:`kit.units.KINDS` for the axes.
    title : str
    x_name, y_name : str, optional
        Axis names (default: the kinds with underscores as spaces).
    system : str
        'SI' or 'US'.
    height : int
        Figure height [px].

    Attributes
    ----------
    figure : plotly.graph_objects.FigureWidget
        The one figure, updated in place.
    series : tuple of Series
        What is shown (SI).

    CSS classes: ``hl-chart`` on the box.
    """

    def __init__(self, x_kind: str, y_kind: str, title: str = "", x_name: str | None = None,
                 y_name: str | None = None, system: str = "SI", height: int = 360):
        import plotly.graph_objects as go

        for k in (x_kind, y_kind):
            if k not in units.KINDS:
                raise KeyError(f"unknown quantity kind {k!r}; choose one of {', '.join(units.KINDS)}")
        self.x_kind, self.y_kind = x_kind, y_kind
        self.x_name = x_name or x_kind.replace("_", " ")
        self.y_name = y_name or y_kind.replace("_", " ")
        self.system = check_system(system)
        self.series: tuple[Series, ...] = ()
        self.figure = go.FigureWidget(layout=dict(
            title=dict(text=title), height=height, margin=dict(l=60, r=20, t=50, b=50),
            legend=dict(orientation="h", y=-0.2), template="plotly_white"))
        super().__init__(children=(self.figure,))
        self.add_class("hl-chart")
        self._axes()

    def _axes(self) -> None:
        with self.figure.batch_update():
            self.figure.layout.xaxis.title.text = axis_title(self.x_name, self.x_kind, self.system)
            self.figure.layout.yaxis.title.text = axis_title(self.y_name, self.y_kind, self.system)

    def set_title(self, title: str) -> None:
        """Change the chart title."""
        self.figure.layout.title.text = title

    def set_series(self, series) -> None:
        """Show ``series`` (SI), updating the existing traces in place where the count matches."""
        self.series = tuple(series)
        self._render()

    def _render(self) -> None:
        import plotly.graph_objects as go

        fig = self.figure
        data = [(s, to_display(s.x, self.x_kind, self.system),
                 to_display(s.y, self.y_kind, self.system)) for s in self.series]
        if len(fig.data) != len(data):
            with fig.batch_update():
                fig.data = ()
                fig.add_traces([go.Scatter(x=x, y=y, name=s.name, mode=s.mode,
                                           **_with_line(s))
                                for s, x, y in data])
            return
        with fig.batch_update():
            for trace, (s, x, y) in zip(fig.data, data, strict=True):
                trace.x = x
                trace.y = y
                trace.name = s.name
                trace.mode = s.mode
                trace.line.dash = s.dash
                trace.line.color = s.color
                if s.extra:
                    trace.update(s.extra)

    def set_system(self, system: str) -> None:
        """Re-render axes and traces in ``system`` from the stored SI series."""
        self.system = check_system(system)
        self._axes()
        self._render()


def _with_line(s) -> dict:
    """The series' extra trace options, with its dash and colour merged into ``line``."""
    extra = dict(s.extra)
    line = {"dash": s.dash, "color": s.color, **dict(extra.pop("line", {}) or {})}
    return {"line": line, **extra}

"""Charts: one :class:`kit.panels.plot_view.PlotView` per chart, updated in place.

A chart is built once; each change sends only the figure JSON that changed, in one message.
Data is held in SI; axes are shown in the display system of :mod:`kit.units`, and
:meth:`Chart.set_system` re-renders from the stored SI data. plotly's Python package is
imported only for :meth:`Chart.to_figure` (the record).

Example
-------
>>> import numpy as np
>>> c = Chart("flow", "head", title="system curve")
>>> c.set_series([Series("system", np.array([0.0, 0.01]), np.array([20.0, 30.0]))])
>>> c.view.data[0]["y"]
[20.0, 30.0]
>>> c.set_system("US")
>>> round(c.view.data[0]["y"][1], 2)
98.43
"""

from __future__ import annotations

from dataclasses import dataclass, field

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.panels.base import check_system

__all__ = ["Series", "Chart", "to_display", "axis_title", "trace_style"]


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

    Drawn by a :class:`kit.panels.plot_view.PlotView` (the figure as plain JSON; plotly's
    Python object model is not used on the way, so a change costs little in the kernel).

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
    view : kit.panels.plot_view.PlotView
        The one figure in the browser, updated in place.
    series : tuple of Series
        What is shown (SI).
    ranges : dict
        Fixed axis ranges in SI (``{"x": (lo, hi), "y": (lo, hi)}``); an axis not given
        ranges itself to its data.

    CSS classes: ``hl-chart`` on the box.
    """

    def __init__(self, x_kind: str, y_kind: str, title: str = "", x_name: str | None = None,
                 y_name: str | None = None, system: str = "SI", height: int = 360):
        from kit.panels.plot_view import PlotView

        for k in (x_kind, y_kind):
            if k not in units.KINDS:
                raise KeyError(f"unknown quantity kind {k!r}; choose one of {', '.join(units.KINDS)}")
        self.x_kind, self.y_kind = x_kind, y_kind
        self.x_name = x_name or x_kind.replace("_", " ")
        self.y_name = y_name or y_kind.replace("_", " ")
        self.system = check_system(system)
        self.series: tuple[Series, ...] = ()
        self.ranges: dict = {}
        self.title = title
        self.height = int(height)
        self.view = PlotView()
        super().__init__(children=(self.view,))
        self.add_class("hl-chart")
        self._render()

    def set_title(self, title: str) -> None:
        """Change the chart title."""
        self.title = title
        self._render()

    def set_series(self, series, *, title: str | None = None, x_range=None,
                   y_range=None) -> None:
        """Show ``series`` (SI); optionally a new title and fixed axis ranges (SI), all in
        one message to the browser."""
        self.series = tuple(series)
        if title is not None:
            self.title = title
        self._set_ranges(x_range, y_range)
        self._render()

    def set_ranges(self, x_range=None, y_range=None) -> None:
        """Fix the axis ranges (SI pairs; None lets that axis range itself)."""
        self._set_ranges(x_range, y_range)
        self._render()

    def _set_ranges(self, x_range, y_range) -> None:
        for key, r in (("x", x_range), ("y", y_range)):
            if r is not None:
                self.ranges[key] = (float(r[0]), float(r[1]))

    def figure_json(self) -> dict:
        """The figure as plotly JSON (data and layout, display units)."""
        sysm = self.system
        data = [dict(type="scatter", x=to_display(s.x, self.x_kind, sysm),
                     y=to_display(s.y, self.y_kind, sysm), name=s.name, mode=s.mode,
                     **trace_style(s)) for s in self.series]
        axes = {}
        for key, kind, name in (("x", self.x_kind, self.x_name), ("y", self.y_kind, self.y_name)):
            ax = {"title": {"text": axis_title(name, kind, sysm)}}
            if key in self.ranges:
                ax["range"] = [float(v) for v in to_display(self.ranges[key], kind, sysm)]
                ax["autorange"] = False
            axes[f"{key}axis"] = ax
        layout = dict(title=dict(text=self.title), height=self.height,
                      margin=dict(l=60, r=20, t=50, b=50), legend=dict(orientation="h", y=-0.2),
                      **axes)
        return {"data": data, "layout": layout}

    def _render(self) -> None:
        self.view.show(self.figure_json())

    def to_figure(self):
        """What is shown, as a static ``plotly.graph_objects.Figure`` (for the record)."""
        return self.view.to_figure()

    def set_system(self, system: str) -> None:
        """Re-render axes and traces in ``system`` from the stored SI series."""
        self.system = check_system(system)
        self._render()


def trace_style(s) -> dict:
    """The series' extra trace options (plotly names; ``line_width`` style allowed), with its
    dash and colour merged into ``line``; None values left out."""
    from kit.panels.plot_view import props

    extra = dict(s.extra)
    line = {"dash": s.dash, "color": s.color, **dict(extra.pop("line", {}) or {})}
    return props(line=line, **extra)

"""A lean plotly chart widget: the figure as plain JSON, drawn in the browser by ``Plotly.react``.

Why not plotly's ``FigureWidget``: each one carries its own ~5 MB JavaScript bundle to the
browser; every property set in Python goes through plotly's validators (most of a kernel's
time per change in the line-sizing app); and after each redraw the browser sends the whole
computed figure back to the kernel (tens of kB per chart). Here:

- :class:`PlotlyLibrary` holds plotly.js (``plotly.offline.get_plotlyjs()``, the copy that
  ships with the plotly package) and is created **once per kernel**; every
  :class:`PlotView` refers to it and the browser evaluates it once per page (a page that
  already has ``window.Plotly`` uses that);
- a :class:`PlotView` has ``data`` (a list of trace dicts), ``figure_layout``,
  ``figure_template`` and ``plot_config`` traits; assigning an equal value sends nothing,
  a change sends only that trait, and nothing comes back;
- in the browser, redraws are queued one figure per animation frame, so that when one input
  redraws several charts the first is painted before the next is drawn; a hidden chart is
  drawn once it has a size; a chart already drawn that is out of view (scrolled away, in a
  closed tab) is redrawn when it comes into view, so a figure shown in two places (the
  workspace and its narrative cell) costs one draw per change, not two (``plot_view.js``).

Values are converted to JSON here (numpy arrays to lists; NaN and infinities to ``null``,
which plotly draws as a gap). Axes get ``ticklabeloverflow='allow'`` unless the layout says
otherwise: plotly's default checks every tick label against every other on each redraw,
which measured 25-30 % of a redraw of the line-sizing charts in JupyterLab.

Example
-------
>>> v = PlotView()
>>> v.show({"data": [{"type": "scatter", "x": [0, 1], "y": [2.0, float("nan")]}],
...         "layout": {"title": {"text": "t"}}})
>>> v.data[0]["y"]
[2.0, None]
>>> v.figure_layout["xaxis"]["ticklabeloverflow"]
'allow'
>>> v.to_figure().data[0].x
(0, 1)
"""

from __future__ import annotations

import math
import re
from functools import lru_cache
from pathlib import Path

import anywidget
import ipywidgets as widgets
import numpy as np
import traitlets

__all__ = ["PlotView", "PlotlyLibrary", "plotly_library", "plain", "props"]

_AXIS = re.compile(r"^[xy]axis\d*$")


class PlotlyLibrary(anywidget.AnyWidget):
    """plotly.js for every :class:`PlotView` of the kernel: its source, sent once.

    Not displayed; use :func:`plotly_library` rather than making another.
    """

    _esm = "export default {};"
    source = traitlets.Unicode("").tag(sync=True)
    version = traitlets.Unicode("").tag(sync=True)


_LIBRARY: list = []


def plotly_library() -> PlotlyLibrary:
    """The kernel's one :class:`PlotlyLibrary` (made again if it was closed)."""
    if not _LIBRARY or _LIBRARY[0].comm is None:
        from plotly.offline import get_plotlyjs, get_plotlyjs_version

        _LIBRARY[:] = [PlotlyLibrary(source=get_plotlyjs(), version=get_plotlyjs_version())]
    return _LIBRARY[0]


def plain(obj):
    """``obj`` with numpy arrays and scalars as lists and floats, non-finite floats as None.

    >>> plain({"y": np.array([1.0, np.inf]), "n": np.int64(3), "t": (1, 2)})
    {'y': [1.0, None], 'n': 3, 't': [1, 2]}
    """
    if isinstance(obj, dict):
        return {k: plain(v) for k, v in obj.items()}
    if isinstance(obj, np.ndarray):
        if obj.dtype.kind == "f":
            return [x if math.isfinite(x) else None for x in obj.tolist()]
        return plain(obj.tolist())
    if isinstance(obj, list | tuple):
        return [plain(v) for v in obj]
    if isinstance(obj, np.generic):
        return plain(obj.item())
    if isinstance(obj, float) and not math.isfinite(obj):
        return None
    return obj


def props(**kw) -> dict:
    """plotly properties as nested dicts: ``line_width=0`` becomes ``{"line": {"width": 0}}``
    (plotly.js names have no underscores, so every underscore is a level), nested dicts are
    merged, and None values are dropped (plotly's default applies).

    >>> props(mode="lines", line_width=0, line={"color": "red", "dash": None}, name=None)
    {'mode': 'lines', 'line': {'width': 0, 'color': 'red'}}
    """
    out: dict = {}
    for key, value in kw.items():
        if value is None:
            continue
        *path, last = key.split("_")
        node = out
        for p in path:
            node = node.setdefault(p, {})
        if isinstance(value, dict):
            value = props(**value)
            if isinstance(node.get(last), dict):
                node[last].update(value)
                continue
            if not value:
                continue
        node[last] = value
    return out


@lru_cache(maxsize=8)
def _template(name: str) -> dict:
    import plotly.io as pio

    return plain(pio.templates[name].to_plotly_json())


def _fast_axes(layout: dict) -> dict:
    """``layout`` with ``ticklabeloverflow='allow'`` on each axis that does not set it."""
    out = dict(layout)
    keys = {k for k in out if _AXIS.match(k)} | {"xaxis", "yaxis"}
    for k in keys:
        ax = dict(out.get(k) or {})
        ax.setdefault("ticklabeloverflow", "allow")
        out[k] = ax
    return out


class PlotView(anywidget.AnyWidget):
    """One plotly figure in the browser, held as JSON; see the module docstring.

    Parameters
    ----------
    figure : dict or plotly Figure, optional
        Shown at once (see :meth:`show`).
    template : str
        A plotly template name, sent once (not with every layout change).

    Attributes
    ----------
    data : list of dict
        The traces.
    figure_layout : dict
        The figure's layout (``layout`` is the widget's own CSS layout, as on every widget).
    figure_template : dict
    plot_config : dict
        plotly.js config (``displaylogo`` off, ``responsive`` on).

    CSS classes: ``hl-plot-view``; in the browser the figure's div is ``.hl-plot`` and a
    message line ``.hl-plot-message`` says why a chart was not drawn.
    """

    _esm = Path(__file__).with_name("plot_view.js")
    data = traitlets.List([]).tag(sync=True)
    figure_layout = traitlets.Dict({}).tag(sync=True)
    figure_template = traitlets.Dict({}).tag(sync=True)
    plot_config = traitlets.Dict({}).tag(sync=True)
    library = traitlets.Instance(PlotlyLibrary, allow_none=True).tag(
        sync=True, **widgets.widget_serialization)

    def __init__(self, figure=None, template: str = "plotly_white", **kwargs):
        super().__init__(library=plotly_library(), figure_template=_template(template),
                         plot_config={"displaylogo": False, "responsive": True}, **kwargs)
        self.add_class("hl-plot-view")
        if figure is not None:
            self.show(figure)

    def show(self, figure=None, *, data=None, layout=None) -> None:
        """Show a figure: a plotly ``Figure`` (its JSON, template dropped: the view's own is
        used), a ``{"data": [...], "layout": {...}}`` dict, or ``data`` and/or ``layout``
        alone. Whatever is equal to what is shown is not sent; the rest goes in one message.
        """
        if figure is not None:
            if hasattr(figure, "to_plotly_json"):
                figure = figure.to_plotly_json()
            data = figure.get("data", []) if data is None else data
            layout = figure.get("layout", {}) if layout is None else layout
        with self.hold_sync():
            if data is not None:
                new = plain(list(data))
                if new != self.data:
                    self.data = new
            if layout is not None:
                lay = dict(layout)
                lay.pop("template", None)
                new = _fast_axes(plain(lay))
                if new != self.figure_layout:
                    self.figure_layout = new

    def __repr__(self) -> str:
        title = (self.figure_layout.get("title") or {}).get("text", "")
        return f"PlotView({len(self.data)} traces{', ' + repr(title) if title else ''})"

    def to_figure(self):
        """The figure shown, as a static ``plotly.graph_objects.Figure`` (template included)."""
        import plotly.graph_objects as go

        return go.Figure(data=self.data,
                         layout={**self.figure_layout, "template": self.figure_template})

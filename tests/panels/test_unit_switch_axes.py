"""Every chart of every app follows a display-system switch (issue 12): after SI → US and
back, each axis with a fixed range is in the new system's units and holds every point drawn
on it (the pump chart's NPSH row kept the last system's flow range once; its operating points
fell off the chart).

The check is independent of the apps' code: the range of each axis is compared with the
points of the traces drawn on it, read back from the figures; the unit in each axis title
with the display unit of the system (kit.units.DISPLAY).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from kit.notebook import open_scenario
from kit.panels.plot_view import PlotView

APPS = {
    "line_sizing": ("harlow_flats_diesel_transfer.toml", "kit.panels.line_sizing_app",
                    "LineSizingApp"),
    "pump_selection": ("kestrel_ridge_booster.toml", "kit.panels.pump_selection_app",
                       "PumpSelectionApp"),
    "tank_drainage": ("marlow_vale_cip_dump.toml", "kit.panels.drain_app", "DrainApp"),
    "network": ("fenwick_yard_chilled_water.toml", "kit.panels.network_app", "NetworkApp"),
}


def build(name):
    import importlib

    file, module, cls = APPS[name]
    klass = getattr(importlib.import_module(module), cls)
    sc = open_scenario(file)
    return klass.from_scenario(sc, "SI") if hasattr(klass, "from_scenario") else klass(sc, "SI")


def plot_views(widget, seen=None):
    """Every PlotView under ``widget`` (each once)."""
    seen = set() if seen is None else seen
    out = []
    if id(widget) in seen:
        return out
    seen.add(id(widget))
    if isinstance(widget, PlotView):
        return [widget]
    for child in getattr(widget, "children", ()) or ():
        out += plot_views(child, seen)
    return out


def values(a) -> np.ndarray:
    """Trace coordinates as floats (plain lists, arrays or plotly's typed-array dicts)."""
    if isinstance(a, dict) and "bdata" in a:
        import base64

        arr = np.frombuffer(base64.b64decode(a["bdata"]), dtype=np.dtype(a["dtype"]))
        return arr.reshape(a["shape"]) if "shape" in a else arr.astype(float)
    return np.asarray(a, dtype=float)


def axis_points(fig):
    """{axis name: list of coordinates of the points drawn on it} for scatter traces."""
    pts: dict[str, list] = {}
    for t in fig.data:
        if t.type != "scatter" or t.x is None or t.y is None:
            continue
        xa = "xaxis" + (t.xaxis[1:] if t.xaxis and t.xaxis != "x" else "")
        ya = "yaxis" + (t.yaxis[1:] if t.yaxis and t.yaxis != "y" else "")
        x = values(t.x)
        y = values(t.y)
        ok = np.isfinite(x) & np.isfinite(y)
        pts.setdefault(xa, []).extend(x[ok].tolist())
        pts.setdefault(ya, []).extend(y[ok].tolist())
    return pts


def inside_flags(fig) -> dict:
    """{axis: tuple of bools, one per point drawn on it: inside the axis's fixed range}."""
    layout = fig.layout
    out = {}
    for ax, vals in axis_points(fig).items():
        a = layout[ax]
        if a.range is None or a.autorange not in (False, None) or not vals:
            continue
        lo, hi = (float(a.range[0]), float(a.range[1]))
        v = np.asarray(vals)
        if a.type == "log":
            v = np.log10(np.where(v > 0, v, np.nan))
        tol = 1e-6 * abs(hi - lo)
        out[ax] = tuple(bool(x) for x in (v >= lo - tol) & (v <= hi + tol))
    return out


def snapshot(views) -> list:
    return [inside_flags(v.to_figure()) for v in views]


def titles(views) -> list:
    out = []
    for v in views:
        fig = v.to_figure()
        for ax in ("xaxis", "xaxis2", "yaxis", "yaxis2"):
            t = fig.layout[ax].title.text if ax in fig.layout else None
            if t:
                out.append(t)
    return out


@pytest.mark.parametrize("name", list(APPS))
def test_every_chart_follows_a_unit_switch(name):
    """The same points are on the chart (inside each fixed axis range) in SI and in US, and
    the axis titles name the system's units."""
    app = build(name)
    views = plot_views(app)
    assert views, "the app shows at least one chart"
    si = snapshot(views)
    assert sum(len(s) for s in si) >= 1, f"{name}: no axis with a fixed range"
    for system, flow_unit, other in (("US", "gpm", "m³/h"), ("SI", "m³/h", "gpm"),
                                     ("US", "gpm", "m³/h")):
        app.set_system(system)
        assert snapshot(views) == si, f"{name}: points leave or enter a chart in {system}"
        shown = titles(views)
        assert not any(other in t for t in shown), shown
        if name == "pump_selection":
            assert any(flow_unit in t for t in shown), shown


def test_pump_chart_rows_share_one_flow_range_after_a_switch():
    app = build("pump_selection")
    app.set_system("US")
    lay = app.plot.figure_layout
    assert lay["xaxis"]["range"] == lay["xaxis2"]["range"]
    # the US range holds the largest pump flow in gpm (1 gpm = 3.785411784e-3 m³/min,
    # NIST SP 811)
    q_top = max(p.q_end for p in app.study.pumps) * 60 / 3.785411784e-3
    assert lay["xaxis2"]["range"][1] >= q_top and math.isfinite(q_top)

"""Pressure along the suction and discharge lines, per band condition, as a chart.

:func:`profile_figure` draws the profiles the pump study computed for the recommended pump
at each band condition's operating point (:func:`kit.core.system.band_profiles`; the energy
equation with losses, station to station): on top the **gauge pressure** at each station
against the distance along the suction line and then the discharge line, with the
atmospheric line (0 gauge) and the vapour-pressure line of the warmest liquid, the
sub-atmospheric stations marked; below, the line's elevation and the hydraulic grade line
(HGL) and energy grade line (EGL) of each condition. Nothing is computed here but the
shift of the discharge distances by the suction line's length.

Example
-------
>>> from kit.notebook import open_scenario
>>> from kit.studies.pump_selection import study
>>> fig = profile_figure(study(open_scenario("kestrel_ridge_booster.toml")))
>>> any("below atmospheric" in (t.name or "") for t in fig.data)
True
"""

from __future__ import annotations

import base64
import html
import json
from functools import lru_cache

import numpy as np

from kit.panels.charts import axis_title, to_display
from kit.panels.plot_view import plain, props

__all__ = ["profile_figure", "profile_spec", "profile_series", "subplot_layout", "scatter",
           "as_figure", "packed", "unpacked", "CONDITION_COLOURS"]

#: Our own colours, one per band condition (8).
CONDITION_COLOURS = ("#1f4e9c", "#5b86c9", "#2f7d32", "#7fb27f", "#c0392b", "#e07b6f",
                     "#8e44ad", "#b68ccb")


def profile_series(bp) -> dict:
    """One band condition's stations joined: suction then discharge, the discharge's
    distances shifted by the suction line's length; a None gap at the pump (SI arrays:
    x, z [m], p_gauge [Pa], hgl, egl [m]; names)."""
    xs, zs, ps, hs, es, names = [], [], [], [], [], []
    offset = 0.0
    for prof in (bp.suction, bp.discharge):
        if prof is None:
            continue
        if xs:
            for a in (xs, zs, ps, hs, es):
                a.append(np.nan)
            names.append("")
        for st in prof.stations:
            xs.append(offset + st.x)
            zs.append(st.z)
            ps.append(st.p_gauge)
            hs.append(st.hgl)
            es.append(st.egl)
            names.append(f"{prof.line}: {st.name}")
        offset += prof.stations[-1].x
    return {"x": np.array(xs), "z": np.array(zs), "p_gauge": np.array(ps),
            "hgl": np.array(hs), "egl": np.array(es), "names": names}


def subplot_layout(row_heights: tuple, spacing: float, titles: tuple) -> dict:
    """The layout of a one-column grid of subplots on a shared x axis, as a plain dict
    (axis domains, anchors and the titles as annotations; no template): what plotly's
    ``make_subplots`` gives, built once per grid and copied.

    >>> lay = subplot_layout((0.6, 0.4), 0.08, ("top", "bottom"))
    >>> lay["yaxis2"]["anchor"], [a["text"] for a in lay["annotations"]]
    ('x2', ['top', 'bottom'])
    """
    return json.loads(_grid_json(tuple(row_heights), float(spacing), tuple(titles)))


@lru_cache(maxsize=16)
def _grid_json(row_heights: tuple, spacing: float, titles: tuple) -> str:
    from plotly.subplots import make_subplots

    lay = make_subplots(rows=len(row_heights), cols=1, shared_xaxes=True,
                        row_heights=list(row_heights), vertical_spacing=spacing,
                        subplot_titles=titles).to_plotly_json()["layout"]
    lay.pop("template", None)
    return json.dumps(plain(lay))


def packed(values):
    """A float array as plotly.js's typed-array form (little-endian float64, base64): about
    two-thirds the size of the same numbers as JSON text, read by plotly.js without parsing.
    An array with a NaN or infinity is left as a list (plain JSON then sends ``null``, a
    gap) and anything that is not a numeric array is returned as it is.

    >>> packed(np.array([0.0, 1.5]))
    {'dtype': 'f8', 'bdata': 'AAAAAAAAAAAAAAAAAAD4Pw=='}
    >>> packed(np.array([1.0, np.nan]))
    [1.0, None]
    """
    if not isinstance(values, np.ndarray) or values.dtype.kind not in "fiu":
        return values
    a = np.asarray(values, dtype="<f8").ravel()
    if not np.all(np.isfinite(a)):
        return plain(a)
    return {"dtype": "f8", "bdata": base64.b64encode(a.tobytes()).decode("ascii")}


def unpacked(obj):
    """``obj`` with every :func:`packed` array as a numpy array again (nested dicts and
    lists walked).

    >>> unpacked({"x": packed(np.array([2.0, 3.0]))})["x"].tolist()
    [2.0, 3.0]
    """
    if isinstance(obj, dict):
        if set(obj) == {"dtype", "bdata"} and obj["dtype"] == "f8":
            return np.frombuffer(base64.b64decode(obj["bdata"]), dtype="<f8").copy()
        return {k: unpacked(v) for k, v in obj.items()}
    if isinstance(obj, list):
        return [unpacked(v) for v in obj]
    return obj


def scatter(x, y, row: int = 1, **kw) -> dict:
    """A scatter trace as a plain dict on subplot ``row`` (``props`` names: ``line_width``).

    >>> scatter([0, 1], [2, 3], row=2, mode="lines", line={"color": "red"})["yaxis"]
    'y2'
    """
    tr = {"type": "scatter", "x": packed(x), "y": packed(y), **props(**kw)}
    if row > 1:
        tr["xaxis"], tr["yaxis"] = f"x{row}", f"y{row}"
    return tr


def as_figure(spec: dict):
    """A figure spec (``{"data": [...], "layout": {...}}``) as a static plotly ``Figure``
    with the kit's template (for the record and for tests)."""
    import plotly.graph_objects as go

    return go.Figure(data=unpacked(spec["data"]),
                     layout={**spec["layout"], "template": "plotly_white"})


def profile_figure(s, system: str = "SI", title: str = ""):
    """The line-pressure chart of a :class:`kit.studies.pump_selection.PumpStudy`
    (see the module docstring), a static plotly ``Figure`` (see :func:`profile_spec`)."""
    return as_figure(profile_spec(s, system, title))


def profile_spec(s, system: str = "SI", title: str = "") -> dict:
    """The line-pressure chart as a plain dict for :meth:`kit.panels.plot_view.PlotView.show`
    (the data of :func:`profile_figure`, with no plotly objects built)."""
    layout = subplot_layout((0.55, 0.45), 0.08, ("pressure along the lines (gauge)",
                                                 "elevation, HGL and EGL"))
    layout.update(height=720, margin=dict(l=70, r=20, t=70, b=140), hovermode="closest",
                  legend=dict(orientation="h", x=0.0, y=0.0, yanchor="bottom",
                              yref="container"),
                  title=dict(text=title or "pressure along the suction and discharge lines "
                             f"({html.escape(str(s.recommended or 'no pump recommended'))}"
                             " at each band condition)"))
    data: list = []
    spec = {"data": data, "layout": layout}
    runs = [b for b in s.profiles if b.suction is not None or b.discharge is not None]
    if not runs:
        layout["annotations"].append(dict(
            text="no profile: no pump is recommended, or no band condition has an operating "
            "point", showarrow=False, x=0.5, y=0.5, xref="paper", yref="paper"))
        return spec

    def fx(x):
        return to_display(x, "length", system)

    def fp(p):
        return to_display(p, "pressure_difference", system)

    def fz(z):
        return to_display(z, "elevation", system)

    x_all, low_x, low_p, low_t = [], [], [], []
    first = profile_series(runs[0])
    for i, b in enumerate(runs):
        ser = profile_series(b)
        col = CONDITION_COLOURS[i % len(CONDITION_COLOURS)]
        lab = b.condition.label
        x_all.append(ser["x"])
        hover = [f"{html.escape(n)}<br>{html.escape(lab)}" for n in ser["names"]]
        x = fx(ser["x"])
        data.append(scatter(x, fp(ser["p_gauge"]), mode="lines+markers",
                            line=dict(color=col, width=1.6), marker=dict(size=5),
                            name=lab, legendgroup=f"c{i}", text=hover,
                            hovertemplate="%{text}<br>%{y:.4g}<extra></extra>"))
        data.append(scatter(x, fz(ser["hgl"]), row=2, mode="lines",
                            line=dict(color=col, width=1.2), legendgroup=f"c{i}",
                            showlegend=False, name=f"HGL: {lab}", text=hover,
                            hovertemplate="HGL %{y:.4g}<br>%{text}<extra></extra>"))
        data.append(scatter(x, fz(ser["egl"]), row=2, mode="lines",
                            line=dict(color=col, width=1, dash="dot"),
                            legendgroup=f"c{i}", showlegend=False, name=f"EGL: {lab}",
                            hoverinfo="skip"))
        neg = np.isfinite(ser["p_gauge"]) & (ser["p_gauge"] < 0)
        low_x += list(ser["x"][neg])
        low_p += list(ser["p_gauge"][neg])
        low_t += [f"{ser['names'][j]}<br>{lab}: below atmospheric" for j in np.flatnonzero(neg)]
    xa = np.concatenate(x_all)
    xa = xa[np.isfinite(xa)]
    span = [float(xa.min()), float(xa.max())]
    data.append(scatter(fx(span), [0.0, 0.0], mode="lines",
                        line=dict(color="black", width=1.2, dash="dash"),
                        name="atmospheric (0 gauge)", hoverinfo="skip"))
    pv = getattr(s.system.state(s.system.T_max), "pv", None)
    if pv is not None:
        pvg = float(pv) - s.system.p_baro
        data.append(scatter(fx(span), fp([pvg, pvg]), mode="lines",
                            line=dict(color="#c0392b", width=1.5),
                            name="vapour pressure, warmest liquid (gauge)",
                            hovertemplate="vapour pressure %{y:.4g}<extra></extra>"))
    data.append(scatter(fx(low_x), fp(low_p), mode="markers",
                        marker=dict(color="#c0392b", size=13, symbol="x-thin-open",
                                    line=dict(width=2.5, color="#c0392b")),
                        name="below atmospheric: air valve / vacuum rating", text=low_t,
                        hovertemplate="%{text}<extra></extra>"))
    data.append(scatter(fx(first["x"]), fz(first["z"]), row=2, mode="lines",
                        line=dict(color="#555", width=3), name="pipe elevation",
                        hoverinfo="skip"))
    layout["yaxis"]["title"] = {"text": axis_title("pressure (gauge)", "pressure_difference",
                                                   system)}
    layout["yaxis2"]["title"] = {"text": axis_title("elevation, HGL, EGL", "elevation", system)}
    layout["xaxis2"]["title"] = {"text": axis_title("distance along suction, then discharge",
                                                    "length", system)}
    return spec

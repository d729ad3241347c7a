"""The line-sizing notebook's composite: inputs, candidates table, charts, findings, batch.

:class:`LineSizingApp` lays out the panels of :mod:`kit.panels` for one line:

- **flows**: design, minimum and maximum (:class:`~kit.panels.fields.QuantityField`);
- **duty class** (pump suction, pump discharge, gravity drain, general transfer) with its
  criteria — velocity range and pressure drop per length — as editable fields, labelled as
  common practice with no source; choosing a duty fills its values;
- **liquid** (:class:`~kit.panels.fluid_picker.FluidPicker`);
- **pipe**: standard, schedule or class, material, condition (the candidates are every
  size of the chosen schedule within reach of the velocity range);
- **route**: developed length, start elevation and name, the elevation profile as a table
  of named points (the last point is the end of the route and follows the length), the end
  pressure and the vapour-pressure margin, and the fittings
  (:class:`~kit.panels.fitting_list.FittingList`);
- **results**: the candidates table (recommended size marked, with the reason), velocity
  and pressure drop against bore with the criteria bands shaded (two panels of one chart,
  :class:`BoreChart`, so a change redraws one figure), the HGL/EGL profile of a
  chosen size (default: the recommended one) with the vapour-pressure line and the
  lowest-pressure station, and the findings of that size;
- **batch**: a line list pasted as CSV, sized on "Size the list" into a table with a
  verdict per row (a bad row shows its error; the others are sized).

The app computes nothing itself: it reads the widgets into
:class:`kit.studies.line_sizing.SizingInputs` and runs :func:`kit.studies.line_sizing.run`;
results are cached per input, so a change that does not alter the inputs (a size chosen for
the profile, the display system) only re-renders. A re-render writes only what changed (the
size list, the profile and the findings are left alone when their content is the same), so
the browser redraws as little as it can.

CSS classes: ``hl-line-sizing`` (the app), ``hl-flow-design``/``-min``/``-max``,
``hl-duty``, ``hl-criteria``, ``hl-standard``, ``hl-schedule``, ``hl-material``,
``hl-condition``, ``hl-route``, ``hl-route-length``, ``hl-points``, ``hl-candidates``,
``hl-reason``, ``hl-bore-chart`` (also ``hl-velocity-chart`` and ``hl-dp-chart``: both panels
are in it), ``hl-profile-size``,
``hl-profile-chart``, ``hl-size-findings``, ``hl-batch``, ``hl-batch-text``,
``hl-batch-run``, ``hl-batch-table``, ``hl-app-message``; the save row (``save_view``)
``hl-save``, ``hl-save-path``, ``hl-save-button``, ``hl-save-message``.

:meth:`LineSizingApp.to_scenario` writes the panels back into a copy of the scenario (strings
with units, as typed) for the record and for the "Save scenario" button.

Example
-------
>>> from kit.notebook import open_scenario
>>> app = LineSizingApp.from_scenario(open_scenario("harlow_flats_diesel_transfer.toml"))
>>> app.study.recommended.pipe.nominal
'5'
"""

from __future__ import annotations

import html
import math

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.core import pipes as core_pipes
from kit.core.criteria import DUTY_CLASSES, MARGINAL_FRACTION
from kit.core.line import G
from kit.core.roughness import CONDITIONS, materials
from kit.core.sizing import Route
from kit.inputs import line_sizing as ls_inputs
from kit.inputs.kinds import checked
from kit.panels.base import (
    KIT_ERRORS,
    Later,
    Refusal,
    Refusals,
    check_system,
    error_html,
    field_value,
    kernel_loop,
    panel_value,
    section_heading,
    shown_value,
)
from kit.panels.charts import Chart, Series, axis_title, to_display, trace_style
from kit.panels.display import DisplaySwitch
from kit.panels.fields import QuantityField
from kit.panels.findings_view import FindingsView
from kit.panels.fitting_list import FittingList
from kit.panels.fluid_picker import FluidPicker
from kit.panels.pipe_picker import fill_materials
from kit.panels.scenario_text import (
    SaveRow,
    default_save_path,
    exact_text,
    field_text,
    fitting_rows,
    liquid_doc,
    same_value,
)
from kit.panels.tables import Column, ResultsTable
from kit.panels.workspace import status_html
from kit.studies import line_sizing as ls
from kit.textout import display_words

__all__ = ["LineSizingApp", "BoreChart", "CANDIDATE_COLUMNS", "BATCH_COLUMNS", "CRITERIA_NOTE",
           "RENDER_DELAY"]

#: Seconds between an edit's bore chart and the rest of its render (tables, profile,
#: findings, status), in a kernel: the browser draws the chart before the tables arrive.
RENDER_DELAY = 0.08

#: The label beside the duty-class criteria.
CRITERIA_NOTE = "common practice, no source, editable"

CANDIDATE_COLUMNS = (
    Column("size", "NPS"), Column("bore", "bore", "diameter"),
    Column("velocity", "V design", "velocity"), Column("velocity_min", "V min", "velocity"),
    Column("velocity_max", "V max", "velocity"), Column("Re", "Re"), Column("friction", "f"),
    Column("dp_per_m", "Δp per length", "pressure_per_length"),
    Column("head_loss", "total loss", "head"),
    Column("p_start", "p needed at start", "pressure", gauge=True),
    Column("lowest", "lowest p", "pressure", gauge=True),
    Column("lowest_station", "at station"),
    Column("p_allow", "rated p", "pressure_difference"),
    Column("surge_rise", "surge rise", "pressure_difference"),
    Column("integrity", "rating / surge"), Column("verdict_text", "verdict"),
    Column("mark", "rec."), Column("why", "why"),
)

BATCH_COLUMNS = (
    Column("tag", "tag"), Column("size", "NPS"), Column("bore", "bore", "diameter"),
    Column("velocity", "velocity", "velocity"),
    Column("dp_per_m", "Δp per length", "pressure_per_length"),
    Column("head_loss", "loss", "head"), Column("rise", "rise", "elevation"),
    Column("verdict_text", "verdict"), Column("reason", "reason or error"),
)

_BAND = "rgba(60, 160, 90, 0.16)"
_NEAR = "rgba(230, 160, 30, 0.20)"
_STYLE = """<style>
.hl-line-sizing .hl-results td,.hl-line-sizing .hl-results th{padding:2px 4px;
  border-bottom:1px solid #ddd;text-align:right;font-size:0.85em}
.hl-line-sizing .hl-results-table{overflow-x:auto}
.hl-line-sizing .hl-results td:last-child,.hl-line-sizing .hl-results th:last-child{text-align:left;
  min-width:14em}
.hl-line-sizing .hl-section{font-weight:bold;font-size:1.08em;margin-top:10px;
  border-bottom:1px solid #888}
.hl-line-sizing .hl-note{color:#555;font-style:italic}
.hl-line-sizing .hl-reason-text{background:#eef4fb;padding:4px 8px;display:block}
</style>"""


class BoreChart(widgets.VBox):
    """Velocity and friction pressure drop against bore: two panels, side by side with a
    shared bore axis, in ONE figure (one redraw per change instead of two).

    The layout (two subplots, titles, legends) is made once with
    ``plotly.subplots.make_subplots`` and kept as JSON; :meth:`show` sends the traces and
    the axis ranges to a :class:`kit.panels.plot_view.PlotView` (only what changed, in one
    message). Each panel has its own legend below it. The pressure-drop axis is logarithmic.

    Parameters
    ----------
    n_velocity, n_dp : int
        The number of series of each panel (fixed for the chart's life).
    system : str
        'SI' or 'US'.
    height : int
        Figure height [px].

    Attributes
    ----------
    view : kit.panels.plot_view.PlotView
        Traces ``0 .. n_velocity-1`` on the velocity panel (axes x, y), the others on the
        pressure-drop panel (axes x2, y2).
    series : tuple
        (velocity series, pressure-drop series), SI.
    """

    #: (y kind, y-axis name, panel title) of each panel.
    PANELS = (("velocity", "velocity", "Velocity against bore"),
              ("pressure_per_length", "pressure drop", "Friction pressure drop against bore"))

    def __init__(self, n_velocity: int, n_dp: int, system: str = "SI", height: int = 480):
        from plotly.subplots import make_subplots

        from kit.panels.plot_view import PlotView

        self.system = check_system(system)
        self.counts = (int(n_velocity), int(n_dp))
        self.series: tuple = ((), ())
        self._ranges: dict = {}
        fig = make_subplots(rows=1, cols=2, subplot_titles=[p[2] for p in self.PANELS],
                            horizontal_spacing=0.1)
        fig.update_layout(
            height=height, margin=dict(l=60, r=20, t=50, b=150),
            legend=dict(orientation="v", x=0.0, xanchor="left", y=-0.2, yanchor="top",
                        xref="paper", yref="paper"),
            legend2=dict(orientation="v", x=0.56, xanchor="left", y=-0.2, yanchor="top",
                         xref="paper", yref="paper"),
            xaxis2=dict(matches="x"), yaxis2=dict(type="log"))
        self._base_layout = fig.to_plotly_json()["layout"]
        self._base_layout.pop("template", None)
        self.view = PlotView()
        super().__init__(children=(self.view,))
        for css in ("hl-chart", "hl-bore-chart", "hl-velocity-chart", "hl-dp-chart"):
            self.add_class(css)
        self._render()

    def panel_traces(self, panel: int) -> tuple:
        """The trace dicts (display units) of panel 0 (velocity) or 1 (pressure drop)."""
        n = self.counts[0]
        data = self.view.data
        return tuple(data[:n] if panel == 0 else data[n:])

    def show(self, v_series, dp_series, x_range, v_range, dp_range) -> None:
        """Show the series (SI) of each panel with the bore range ``x_range`` [m], the velocity
        range ``v_range`` [m/s] and the pressure-drop range ``dp_range`` [Pa/m] (log axis)."""
        v_series, dp_series = tuple(v_series), tuple(dp_series)
        if (len(v_series), len(dp_series)) != self.counts:
            raise ValueError(f"BoreChart holds {self.counts} series, got "
                             f"{(len(v_series), len(dp_series))}")
        self.series = (v_series, dp_series)
        self._ranges = dict(x=tuple(x_range), v=tuple(v_range), dp=tuple(dp_range))
        self._render()

    def set_system(self, system: str) -> None:
        """Re-render the axes and traces in ``system`` from the stored SI series."""
        self.system = check_system(system)
        self._render()

    def figure_json(self) -> dict:
        """The figure as plotly JSON (display units)."""
        sysm = self.system
        layout = {k: dict(v) if isinstance(v, dict) else v for k, v in self._base_layout.items()}
        titles = {"xaxis": axis_title("bore", "diameter", sysm),
                  "xaxis2": axis_title("bore", "diameter", sysm),
                  "yaxis": axis_title(self.PANELS[0][1], self.PANELS[0][0], sysm),
                  "yaxis2": axis_title(self.PANELS[1][1], self.PANELS[1][0], sysm)}
        for ax, text in titles.items():
            layout[ax] = {**layout.get(ax, {}), "title": {"text": text}}
        r = self._ranges
        data = []
        if r:
            x = [float(a) for a in to_display(r["x"], "diameter", sysm)]
            dpy = to_display(r["dp"], "pressure_per_length", sysm)
            for ax, rng in (("xaxis", x), ("xaxis2", x),
                            ("yaxis", [float(a) for a in to_display(r["v"], "velocity", sysm)]),
                            ("yaxis2", [math.log10(dpy[0]), math.log10(dpy[1])])):
                layout[ax].update(range=rng, autorange=False)
            for panel, series in enumerate(self.series):
                kind = self.PANELS[panel][0]
                axes = ({"xaxis": "x", "yaxis": "y", "legend": "legend"} if panel == 0 else
                        {"xaxis": "x2", "yaxis": "y2", "legend": "legend2"})
                for s in series:
                    data.append(dict(type="scatter", x=to_display(s.x, "diameter", sysm),
                                     y=to_display(s.y, kind, sysm), name=s.name, mode=s.mode,
                                     **axes, **trace_style(s)))
        return {"data": data, "layout": layout}

    def _render(self) -> None:
        self.view.show(self.figure_json())

    def to_figure(self):
        """What is shown, as a static ``plotly.graph_objects.Figure`` (for the record)."""
        return self.view.to_figure()


class _PointRow(widgets.HBox):
    """One point of the elevation profile: name, chainage, elevation, remove."""

    def __init__(self, name: str, x: float, z: float, system: str):
        self.name = widgets.Text(value=name, layout=widgets.Layout(width="12em"))
        self.name.add_class("hl-point-name")
        self.chainage = QuantityField("length", "chainage", value_si=x, system=system,
                                      field=f"chainage of '{name}'", width="8em")
        self.elevation = QuantityField("elevation", "elevation", value_si=z, system=system,
                                       field=f"elevation of '{name}'", width="8em")
        for f in (self.chainage, self.elevation):
            f.label.layout.min_width = "5em"
        self.remove = widgets.Button(description="remove", layout=widgets.Layout(width="6em"))
        super().__init__([self.name, self.chainage, self.elevation, self.remove])
        self.add_class("hl-point")

    def set_system(self, system: str) -> None:
        self.chainage.set_system(system)
        self.elevation.set_system(system)


class LineSizingApp(widgets.VBox):
    """Line sizing for one line, with a batch section for a line list.

    Parameters
    ----------
    inp : SizingInputs
        The starting inputs (SI), e.g. :func:`kit.studies.line_sizing.inputs` of a scenario.
    system : str
        'SI' or 'US'.
    batch_text : str, optional
        CSV line list to prefill the batch box with (sized once on start).
    sizes : tuple of str, optional
        Fixed nominal sizes to consider (default: every size within reach of the duty).

    Attributes
    ----------
    study : SizingStudy or None
        The last valid sizing (inputs and result).
    shown : int or None
        Index of the candidate shown in the profile chart and the findings.
    flow_design, flow_min, flow_max, v_min, v_max, dp_max, length, start_elevation,
    end_pressure, vapour_margin : QuantityField
    duty, standard, schedule, material, size : ipywidgets.Dropdown
    condition : ipywidgets.ToggleButtons
    fluid : FluidPicker
    fittings : FittingList
    table, batch_table : ResultsTable
    bore_chart : BoreChart
        Velocity and pressure drop against bore (two panels of one figure).
    profile_chart : Chart
    findings : FindingsView
    batch_text : ipywidgets.Textarea
    batch_run : ipywidgets.Button
    message, reason, batch_message : ipywidgets.HTML
    """

    def __init__(self, inp: ls.SizingInputs, system: str = "SI", batch_text: str | None = None,
                 sizes: tuple | None = None, scenario=None):
        self.system = check_system(system)
        #: The scenario the app was filled from (None: built from inputs); kept unchanged.
        self.source_scenario = scenario.copy() if scenario is not None else None
        self._batch_given = batch_text or ""
        self.p_baro = inp.p_baro
        self.fixed_sizes = tuple(sizes) if sizes else None
        self.erosional_C = inp.erosional_C
        self._scenario_duty = inp.duty   # the duty as the scenario set it (with its criteria)
        self.study: ls.SizingStudy | None = None
        self._rest = Later(self.settle)    # the render after the bore chart (kernel)
        self.shown: int | None = None
        self._pinned: str | None = None   # nominal size the user chose for the profile
        self._cache: dict = {}
        self._shown_key: tuple | None = None   # (result, index, system) the profile shows
        self._hold = 0
        self._bore_axis: tuple[float, float] | None = None
        self.recomputes = 0

        def qf(kind, label, value, css, **kw):
            f = QuantityField(kind, label, value_si=value, system=system, **kw)
            f.add_class(css)
            return f

        # -- flows
        self.flow_design = qf("flow", "design flow", inp.Q_design, "hl-flow-design")
        self.flow_min = qf("flow", "minimum flow", inp.Q_min, "hl-flow-min")
        self.flow_max = qf("flow", "maximum flow", inp.Q_max, "hl-flow-max")
        # -- duty and criteria
        self.duty = widgets.Dropdown(options=[(d.label, k) for k, d in DUTY_CLASSES.items()],
                                     value=inp.duty.key, description="duty class")
        self.duty.add_class("hl-duty")
        self.duty.style.description_width = "9em"
        self.v_min = qf("velocity", "velocity min", inp.duty.v_min, "hl-criteria")
        self.v_max = qf("velocity", "velocity max", inp.duty.v_max, "hl-criteria")
        self.dp_max = qf("pressure_per_length", "Δp max", inp.duty.dp_max, "hl-criteria")
        self.criteria_note = widgets.HTML(
            f'<span class="hl-note">criteria: {html.escape(CRITERIA_NOTE)}; a value within '
            f"{MARGINAL_FRACTION:.0%} of an upper limit is marked check</span>")
        # -- liquid
        self.fluid = FluidPicker(liquid=inp.liquid, T=inp.state.T, P=inp.p_baro, system=system,
                                 p_baro=inp.p_baro, title="Liquid")
        # -- pipe
        self.standard = widgets.Dropdown(options=[(lbl, k) for k, lbl in core_pipes.standards()],
                                         value=inp.standard, description="pipe standard")
        self.schedule = widgets.Dropdown(description="schedule / class")
        self.material = widgets.Dropdown(options=[(lbl, k) for k, lbl in materials()],
                                         value=inp.material, description="material")
        self.condition = widgets.ToggleButtons(options=[(c, c) for c in CONDITIONS],
                                               value=inp.condition, description="condition")
        for w, css in ((self.standard, "hl-standard"), (self.schedule, "hl-schedule"),
                       (self.material, "hl-material"), (self.condition, "hl-condition")):
            w.add_class(css)
            w.style.description_width = "9em"
        for w in (self.standard, self.schedule, self.material):
            w.layout.width = "30em"
        self._fill_schedules(inp.schedule)
        fill_materials(self.material, inp.standard, inp.material, show_given=True)
        # -- route
        r = inp.route
        self.length = qf("length", "developed length", r.length, "hl-route-length")
        self.start_elevation = qf("elevation", "start elevation", r.start_elevation,
                                  "hl-start-elevation")
        self.start_name = widgets.Text(value=r.start_name, description="start station")
        self.start_name.style.description_width = "9em"
        self.end_pressure = qf("pressure", "end pressure", inp.p_end, "hl-end-pressure",
                               gauge=True, p_baro=inp.p_baro)
        self.vapour_margin = qf("head", "vapour margin", inp.vapour_margin, "hl-vapour-margin")
        self.points: list[_PointRow] = []
        self.points_box = widgets.VBox([])
        self.points_box.add_class("hl-points")
        self.add_point = widgets.Button(description="add point", icon="plus")
        pts = r.points or (("end", r.length, r.start_elevation),)
        self._set_points([self._make_point(n, x, z) for n, x, z in pts])
        self.fittings = FittingList(r.fittings, system=system,
                                    title="Fittings along the route (lumped in the first leg)")
        # -- results
        self.table = ResultsTable(CANDIDATE_COLUMNS, system=system, p_baro=inp.p_baro)
        self.table.add_class("hl-candidates")
        self.reason = widgets.HTML("")
        self.reason.add_class("hl-reason")
        self.bore_chart = BoreChart(6, 4, system=system)
        self.size = widgets.Dropdown(description="size shown")
        self.size.add_class("hl-profile-size")
        self.size.style.description_width = "9em"
        self.size.layout.width = "30em"
        self.profile_chart = Chart("length", "elevation", title="Hydraulic grade along the route",
                                   x_name="chainage", y_name="elevation / grade line",
                                   system=system, height=400)
        self.profile_chart.add_class("hl-profile-chart")
        self.size_heading = widgets.HTML("")
        self.findings = FindingsView(topics=ls.caution_topics(inp), system=system)
        self.findings.add_class("hl-size-findings")
        # -- batch
        self.batch_text = widgets.Textarea(value=batch_text or "", rows=8,
                                           layout=widgets.Layout(width="100%"),
                                           placeholder=",".join(ls.LINE_LIST_COLUMNS))
        self.batch_text.add_class("hl-batch-text")
        self.batch_run = widgets.Button(description="Size the list", button_style="primary")
        self.batch_run.add_class("hl-batch-run")
        self.batch_message = widgets.HTML("")
        self.batch_table = ResultsTable(BATCH_COLUMNS, system=system)
        self.batch_table.add_class("hl-batch-table")
        #: The workspace's one-line status: the verdict, velocity and Δp per length of the
        #: size shown (CSS ``hl-workspace-status``, ``hl-ls-status``).
        self.status = widgets.HTML("")
        self.status.add_class("hl-ls-status")
        self._workspace = None
        self.refusals = Refusals(
            (self.table, self.reason, self.bore_chart, self.size, self.profile_chart,
             self.size_heading, self.findings, self.status), self._locate, lambda: self.system)
        #: The banner over the results (CSS ``hl-stale-banner``, ``hl-app-message``).
        self.message = self.refusals.banner
        self._last_edited = None
        self.switch = DisplaySwitch([], system=system)
        self._rest.refusals = self.refusals   # a bug in the deferred render is shown there
        self.save_row = SaveRow(self.to_scenario, default_save_path(
            self.source_scenario if self.source_scenario is not None else None))
        super().__init__(self._layout())
        self.add_class("hl-line-sizing")
        self.switch.targets.append(self)
        self._wire()
        self.recompute()
        if self.batch_text.value.strip():
            self.size_list()

    @classmethod
    def from_scenario(cls, sc, system: str | None = None) -> LineSizingApp:
        """The app filled from a line-sizing scenario (display system from the scenario)."""
        inp = ls.inputs(sc)
        sizes = tuple(str(x) for x in sc.get("sizing.sizes", ()) or ()) or None
        return cls(inp, system or sc.display_system, ls.batch_text(sc), sizes, scenario=sc)

    # ------------------------------------------------------------------ layout
    def _layout(self):
        """Build the sections (each displayable on its own) and return the app's children.

        Sections: ``inputs_view`` (flow, duty and criteria, pipe, liquid), ``route_view``
        (length, profile points, end pressure, fittings), ``candidates_view`` (table and
        reason), ``charts_view`` (velocity and pressure drop against bore), ``profile_view``
        (size dropdown, HGL/EGL chart, findings of that size), ``batch_view``.
        """
        style = widgets.HTML(_STYLE)
        flows = widgets.VBox([section_heading("Flow"), self.flow_design, self.flow_min, self.flow_max])
        duty = widgets.VBox([section_heading("Duty and criteria"), self.duty, self.v_min, self.v_max,
                             self.dp_max, self.criteria_note])
        pipe = widgets.VBox([section_heading("Pipe"), self.standard, self.schedule, self.material,
                             self.condition])
        left = widgets.VBox([flows, duty, pipe], layout=widgets.Layout(width="50%"))
        right = widgets.VBox([section_heading("Liquid"), self.fluid], layout=widgets.Layout(width="50%"))
        self.inputs_view = widgets.VBox([style, widgets.HBox([left, right])])
        self.inputs_view.add_class("hl-line-sizing")
        self.route_view = widgets.VBox([
            section_heading("Route"), self.length, self.start_elevation, self.start_name,
            widgets.HTML("<b>Elevation profile</b> (named points in order of chainage; the "
                         "last is the end of the route and follows the length)"),
            self.points_box, self.add_point, self.end_pressure, self.vapour_margin,
            self.fittings])
        self.route_view.add_class("hl-route")
        self.route_view.add_class("hl-line-sizing")
        self.candidates_view = widgets.VBox([style, section_heading("Candidate sizes"), self.message,
                                             self.table, self.reason])
        self.candidates_view.add_class("hl-line-sizing")
        self.charts_view = widgets.VBox([self.message, self.bore_chart])
        self.profile_view = widgets.VBox([section_heading("Profile of one size"), self.message,
                                          self.size,
                                          self.profile_chart, self.size_heading, self.findings])
        self.profile_view.add_class("hl-line-sizing")
        self.batch_view = widgets.VBox([
            style, section_heading("Line list (batch)"),
            widgets.HTML("CSV with a header row: " + html.escape(", ".join(ls.LINE_LIST_COLUMNS))
                         + ". Every quantity with its unit; <i>liquid</i> a catalogue key or "
                         "<i>scenario</i>; rows use the duty classes' values (the one chosen "
                         "above with its edited criteria)."),
            self.batch_text, self.batch_run, self.batch_message, self.batch_table])
        self.batch_view.add_class("hl-batch")
        self.batch_view.add_class("hl-line-sizing")
        self.save_view = widgets.VBox([
            section_heading("Save the inputs"),
            widgets.HTML('<span class="hl-note">writes every input above, as typed, into a '
                         "scenario file (keys the panels do not show are kept as they "
                         "were)</span>"), self.save_row])
        self.save_view.add_class("hl-line-sizing")
        return [self.switch, self.inputs_view, self.route_view, self.candidates_view,
                self.charts_view, self.profile_view, self.batch_view, self.save_view]

    # ------------------------------------------------------------------ wiring
    def _wire(self) -> None:
        for f in (self.flow_design, self.flow_min, self.flow_max, self.v_min, self.v_max,
                  self.dp_max, self.start_elevation, self.end_pressure, self.vapour_margin,
                  self.fluid, self.fittings):
            f.observe(self._on_change, names="value")
        self.length.observe(self._on_length, names="value")
        for w in (self.schedule, self.material, self.condition, self.start_name):
            w.observe(self._on_change, names="value")
        self.standard.observe(self._on_standard, names="value")
        self.duty.observe(self._on_duty, names="value")
        self.size.observe(self._on_size, names="value")
        self.add_point.on_click(self._on_add_point)
        self.batch_run.on_click(lambda _b: self.size_list())

    def _make_point(self, name, x, z) -> _PointRow:
        row = _PointRow(name, x, z, self.system)
        row.name.observe(self._on_change, names="value")
        row.chainage.observe(self._on_change, names="value")
        row.elevation.observe(self._on_change, names="value")
        row.remove.on_click(lambda _b, r=row: self._on_remove_point(r))
        return row

    def _set_points(self, rows) -> None:
        self.points = list(rows)
        for i, row in enumerate(self.points):
            last = i == len(self.points) - 1
            row.chainage.input.disabled = last   # the end follows the route length
            row.remove.disabled = last
        self.points_box.children = tuple(self.points)

    def _on_add_point(self, _b=None) -> None:
        end = self.points[-1]
        prev_x = self.points[-2].chainage.value if len(self.points) > 1 else 0.0
        L = self.length.value or end.chainage.value or 0.0
        z = end.elevation.value if end.elevation.value is not None else 0.0
        row = self._make_point(f"point {len(self.points)}", 0.5 * ((prev_x or 0.0) + L), z)
        self._set_points([*self.points[:-1], row, end])
        self.recompute()

    def _on_remove_point(self, row) -> None:
        self._set_points([r for r in self.points if r is not row])
        self.recompute()

    def _on_change(self, change=None) -> None:
        if change is not None and isinstance(change, dict):
            self._last_edited = change.get("owner")
        if not self._hold:
            self.recompute(defer=True)

    def _locate(self, exc):
        """The input a kit error is about (by the field it names), or None."""
        name = str(getattr(exc, "field", "") or getattr(exc, "key", ""))
        for f in (self.flow_design, self.flow_min, self.flow_max, self.v_min, self.v_max,
                  self.dp_max, self.length, self.start_elevation, self.end_pressure,
                  self.vapour_margin):
            if name and name in (f.field, f.label.value):
                return f
        for row in self.points:
            for f in (row.chainage, row.elevation):
                if name and name == f.field:
                    return f
        if name.startswith("chainage") or name.startswith("point"):
            return self.points_box
        return None

    def _on_length(self, change) -> None:
        if change["new"] is not None:
            self._hold += 1
            try:
                self.points[-1].chainage.value = change["new"]
            finally:
                self._hold -= 1
        self._on_change()

    def _on_standard(self, change) -> None:
        self._hold += 1
        try:
            self._fill_schedules(self.schedule.value)
            fill_materials(self.material, self.standard.value, self.material.value)
        finally:
            self._hold -= 1
        self._on_change()

    def _on_duty(self, change) -> None:
        d = DUTY_CLASSES[change["new"]]
        self._hold += 1
        try:
            self.v_min.value, self.v_max.value, self.dp_max.value = d.v_min, d.v_max, d.dp_max
        finally:
            self._hold -= 1
        self._on_change()

    def _on_size(self, change) -> None:
        if self._hold or change["new"] is None:
            return
        self._pinned = change["new"]
        self._show_size()

    def _fill_schedules(self, keep: str | None) -> None:
        std = core_pipes.STANDARDS[self.standard.value]
        seen = set()
        for nom in core_pipes.nominal_sizes(std.key):
            seen.update(core_pipes.schedules(std.key, nom))
        options = [(f"{std.schedule_word} {c}".strip(), c) for c, _ in std.classes if c in seen]
        keys = [k for _, k in options]
        self.schedule.options = options
        self.schedule.value = keep if keep in keys else ("40" if "40" in keys else keys[0])

    # ------------------------------------------------------------------ inputs
    def read_inputs(self) -> ls.SizingInputs:
        """The panels' values as :class:`~kit.studies.line_sizing.SizingInputs` (SI).

        Raises ``InvalidInput`` (an input shows its own message) or a kit error.
        """
        sel = panel_value(self.fluid, "the liquid state is not valid")
        fits = panel_value(self.fittings, "a fitting row is not valid")
        Qd, Qmin, Qmax = field_value(self.flow_design), field_value(self.flow_min), field_value(self.flow_max)
        self._check_flows(Qd, Qmin, Qmax)
        base = DUTY_CLASSES[self.duty.value]
        v_min, v_max, dp_max = field_value(self.v_min), field_value(self.v_max), field_value(self.dp_max)
        given = self._scenario_duty
        if given.key == base.key and (v_min, v_max, dp_max) == (given.v_min, given.v_max,
                                                                given.dp_max):
            duty = given
        else:
            duty = ls_inputs.edited_duty(base.key, "edited in the notebook", v_min=v_min, v_max=v_max,
                                         dp_max=dp_max)
        L = field_value(self.length)
        pts = []
        for i, row in enumerate(self.points):
            x = L if i == len(self.points) - 1 else field_value(row.chainage)
            pts.append((row.name.value.strip() or f"point {i + 1}", x, field_value(row.elevation)))
        route = Route(L, tuple(pts), fits, field_value(self.start_elevation),
                      self.start_name.value.strip() or "start")
        pipes = ls_inputs.candidates(self.standard.value, self.schedule.value,
                                     self.material.value, self.condition.value,
                                     self.fixed_sizes, Qd, duty)
        return ls.SizingInputs(route, sel.liquid, sel.state, duty, Qd, Qmin, Qmax,
                               self.standard.value, self.schedule.value, self.material.value,
                               self.condition.value, pipes, field_value(self.end_pressure),
                               self.p_baro, field_value(self.vapour_margin), self.erosional_C)

    def _check_flows(self, Qd: float, Qmin: float, Qmax: float) -> None:
        """Minimum ≤ design ≤ maximum, refused at the field the engineer edited last (the
        design flow unless the minimum or the maximum was the last edit)."""
        sysm = self.system

        def q(x):
            return shown_value(x, "flow", sysm)

        last = self._last_edited
        if Qd > Qmax:
            if last is self.flow_max:
                raise Refusal(self.flow_max, f"'maximum flow' must be at least the design "
                              f"flow {q(Qd)}, not {q(Qmax)}")
            raise Refusal(self.flow_design, f"'design flow' must be at most the maximum flow "
                          f"{q(Qmax)}, not {q(Qd)}")
        if Qmin > Qd:
            if last is self.flow_min:
                raise Refusal(self.flow_min, f"'minimum flow' must be at most the design "
                              f"flow {q(Qd)}, not {q(Qmin)}")
            raise Refusal(self.flow_design, f"'design flow' must be at least the minimum "
                          f"flow {q(Qmin)}, not {q(Qd)}")

    def to_scenario(self):
        """A copy of the scenario the app was filled from, with every input the panels hold
        written back as the engineer's text with its unit (:mod:`kit.panels.scenario_text`).

        Written: ``[sizing]`` flows, duty, pipe standard/schedule/material/condition, end
        pressure, vapour margin; ``[criteria]`` (only values that differ from the duty class);
        ``[liquid]`` key, concentration and temperature; ``[route]`` length, start, profile
        points and fittings; ``[batch] text`` when the line list was edited. Every other key
        stays as it was. The liquid pressure box is not a scenario input (the state is taken
        at the barometric pressure). Raises the kit's error while an input is invalid.
        """
        from kit import scenario as scn

        base = self.source_scenario
        sc = base.copy() if base is not None else scn.Scenario(
            {"schema": scn.SCHEMA, "kind": "line_sizing", "title": "line sizing",
             "site": {"barometric_pressure": exact_text(self.p_baro, "pressure_abs")}})
        doc = sc.doc
        doc["liquid"] = liquid_doc(self.fluid, doc.get("liquid"))
        s = dict(doc.get("sizing") or {})
        for key, f in (("flow_design", self.flow_design), ("flow_min", self.flow_min),
                       ("flow_max", self.flow_max), ("end_pressure", self.end_pressure),
                       ("vapour_margin", self.vapour_margin)):
            s[key] = field_text(f, s.get(key))
        s.update(duty=self.duty.value, standard=self.standard.value,
                 schedule=self.schedule.value, material=self.material.value,
                 condition=self.condition.value)
        doc["sizing"] = s
        crit = dict(doc.get("criteria") or {})
        scenario_duty = s.get("duty") == (base.get("sizing.duty") if base else None)
        duty = DUTY_CLASSES[self.duty.value]
        for key, f in (("v_min", self.v_min), ("v_max", self.v_max), ("dp_max", self.dp_max)):
            text = field_text(f, crit.get(key) if scenario_duty else None)
            if scenario_duty and key in crit and text == crit[key]:
                continue
            if same_value(text, getattr(duty, key), f.kind):
                crit.pop(key, None)
            else:
                crit[key] = text
        if crit:
            doc["criteria"] = crit
        else:
            doc.pop("criteria", None)
        r = dict(doc.get("route") or {})
        r["length"] = field_text(self.length, r.get("length"))
        r["start_elevation"] = field_text(self.start_elevation, r.get("start_elevation"))
        r["start_name"] = self.start_name.value.strip() or "start"
        old = [p for p in (r.get("points") or []) if isinstance(p, dict)]
        by_name = {str(p.get("name")): p for p in old}
        pts = []
        for i, row in enumerate(self.points):
            o = by_name.get(row.name.value.strip()) or (old[i] if i < len(old) else {})
            last = i == len(self.points) - 1
            name = row.name.value.strip() or f"point {i + 1}"
            if last:
                x = o.get("chainage") if same_value(o.get("chainage"), self.length.value,
                                                    "length") else r["length"]
            else:
                x = field_text(row.chainage, o.get("chainage"))
            pts.append({"name": name, "chainage": x,
                        "elevation": field_text(row.elevation, o.get("elevation"))})
        untouched_default = (not old and len(pts) == 1 and pts[0]["name"] == "end"
                             and self.points[0].elevation.value == self.start_elevation.value)
        if untouched_default:
            r.pop("points", None)
        else:
            r["points"] = pts
        r["fittings"] = fitting_rows(self.fittings, r.get("fittings"), "route.fittings",
                                     self.system)
        if not r["fittings"]:
            r.pop("fittings")
        doc["route"] = r
        if self.batch_text.value != self._batch_given:
            if self.batch_text.value.strip():
                doc["batch"] = {"text": self.batch_text.value}
            else:
                doc.pop("batch", None)
        return checked(sc)  # the schema's rules, as for a file

    @staticmethod
    def _key(inp: ls.SizingInputs) -> tuple:
        s = inp.state
        return (inp.route, s.name, s.T, s.P, s.rho, s.mu, s.pv, inp.duty, inp.Q_design,
                inp.Q_min, inp.Q_max, inp.sizes, inp.p_end, inp.p_baro, inp.vapour_margin,
                inp.erosional_C)

    # ------------------------------------------------------------------ compute and render
    def recompute(self, defer: bool = False) -> None:
        """Read the panels, size the line (cached per input) and re-render the results.

        ``defer`` (an edit): in a kernel, the bore chart is drawn at once and the tables,
        profile, findings and status follow from the kernel's event loop
        :data:`RENDER_DELAY` seconds later (:meth:`settle` does them at once)."""
        def run():
            inp = self.read_inputs()
            key = self._key(inp)
            res = self._cache.get(key)
            if res is None:
                res = ls.run(inp)
                self.recomputes += 1
                if len(self._cache) > 64:
                    self._cache.clear()
                self._cache[key] = res
            return inp, res

        out = self.refusals.attempt(run)
        if out is None:
            return
        inp, res = out
        self.study = ls.SizingStudy(inp, res)
        self.findings.topics = ls.caution_topics(inp)
        self._render(defer=defer)

    def _render(self, defer: bool = False) -> None:
        # the bore chart first: its update leaves for the browser before the table's
        self._render_criteria_charts()
        loop = kernel_loop() if defer else None
        if loop is None:
            self.settle()
            return
        self._rest.start(loop, RENDER_DELAY)

    @property
    def settled(self) -> bool:
        """False while the tables, profile, findings and status wait for the loop."""
        return not self._rest.waiting

    def settle(self) -> None:
        """Render what follows the bore chart (the candidate table, size choice, profile,
        findings and status) from the study now, if it is waiting."""
        self._rest.cancel()
        st = self.study
        rows = ls.candidate_rows(st)
        label = st.inputs.duty.label + ": "
        for r, c in zip(rows, st.result.candidates, strict=True):
            r["verdict_text"] = r["verdict"].upper()
            verdict = c.verdict   # a property that takes the worst of the findings: once
            r["why"] = c.error or "; ".join(dict.fromkeys(
                display_words(f.rule.removeprefix(label).split(";")[0], self.system)
                for f in c.findings if f.severity.value == verdict)) or "all criteria met"
        self.table.value = tuple(rows)
        reason = display_words(st.result.reason, self.system)
        self.reason.value = (f'<span class="hl-reason-text"><b>Recommended:</b> '
                             f"{html.escape(reason)}</span>")
        cands = st.result.candidates
        options = [(f"{c.pipe.label} — {c.verdict.upper()}"
                    + ("  (recommended)" if i == st.result.recommended else ""), c.pipe.nominal)
                   for i, c in enumerate(cands)]
        want = self._pinned if self._pinned in [c.pipe.nominal for c in cands] else None
        if want is None and st.result.recommended is not None:
            want = cands[st.result.recommended].pipe.nominal
        value = want if want is not None else cands[0].pipe.nominal
        self._hold += 1
        try:
            # only what changed, as one message: a new option list redraws the dropdown
            with self.size.hold_sync():
                if tuple(tuple(o) for o in self.size.options) != tuple(options):
                    self.size.options = options
                if self.size.value != value:
                    self.size.value = value
        finally:
            self._hold -= 1
        self._show_size()

    def _render_criteria_charts(self) -> None:
        st = self.study
        cands = st.result.candidates
        D = np.array([c.pipe.Di for c in cands])
        duty = st.inputs.duty
        lo, hi = self._bore_range(D)
        box_x = np.array([lo, hi, hi, lo, lo])
        V = np.array([c.velocity for c in cands])
        top = 1.0 - MARGINAL_FRACTION
        rec = st.result.recommended
        v_series = [
            Series("velocity range (criteria)", box_x,
                   np.array([duty.v_min, duty.v_min, duty.v_max * top, duty.v_max * top,
                             duty.v_min]), extra=dict(fill="toself", fillcolor=_BAND,
                                                      line_width=0, hoverinfo="skip")),
            Series(f"within {MARGINAL_FRACTION:.0%} of the limit", box_x,
                   np.array([duty.v_max * top, duty.v_max * top, duty.v_max, duty.v_max,
                             duty.v_max * top]), extra=dict(fill="toself", fillcolor=_NEAR,
                                                            line_width=0, hoverinfo="skip")),
            Series("at minimum flow", D, np.array([c.velocity_min for c in cands]),
                   mode="lines+markers", dash="dot", color="#7f8fa6"),
            Series("at maximum flow", D, np.array([c.velocity_max for c in cands]),
                   mode="lines+markers", dash="dot", color="#2f3640"),
            Series("at design flow", D, V, mode="lines+markers", color="#1f5fa8"),
            Series("recommended", D[[rec]] if rec is not None else D[:0],
                   V[[rec]] if rec is not None else V[:0], mode="markers", color="#c0392b",
                   extra=dict(marker=dict(size=14, symbol="star"))),
        ]
        dp = np.array([c.dp_per_m for c in cands])
        floor = duty.dp_max / 1000.0
        dp_series = [
            Series("pressure-drop limit (criteria)", box_x,
                   np.array([floor, floor, duty.dp_max * top, duty.dp_max * top, floor]),
                   extra=dict(fill="toself", fillcolor=_BAND, line_width=0,
                              hoverinfo="skip")),
            Series(f"within {MARGINAL_FRACTION:.0%} of the limit", box_x,
                   np.array([duty.dp_max * top, duty.dp_max * top, duty.dp_max, duty.dp_max,
                             duty.dp_max * top]),
                   extra=dict(fill="toself", fillcolor=_NEAR, line_width=0,
                              hoverinfo="skip")),
            Series("at design flow", D, dp, mode="lines+markers", color="#1f5fa8"),
            Series("recommended", D[[rec]] if rec is not None else D[:0],
                   dp[[rec]] if rec is not None else dp[:0], mode="markers", color="#c0392b",
                   extra=dict(marker=dict(size=14, symbol="star"))),
        ]
        self.bore_chart.show(v_series, dp_series, (lo, hi), (0.0, 2.0 * duty.v_max),
                             (floor, duty.dp_max * 30.0))

    def _bore_range(self, D) -> tuple[float, float]:
        """The bore axis range [m]: kept while it holds every candidate and they span at least
        half of it; otherwise one schedule size wider than the candidates at each end (8 %
        and 5 % margins). So a size entering or leaving the candidates at either end (the
        set follows the design flow) does not move the axis, and a flow change redraws the
        traces only."""
        d_lo, d_hi = float(D.min()), float(D.max())
        cur = self._bore_axis
        if cur is not None and cur[0] <= 0.92 * d_lo and 1.05 * d_hi <= cur[1] \
                and (d_hi - d_lo) >= 0.5 * (cur[1] - cur[0]):
            return cur
        inp = self.study.inputs
        every = sorted(p.Di for p in ls.candidate_pipes(inp.standard, inp.schedule, inp.material,
                                                        inp.condition, self.fixed_sizes))
        below = [d for d in every if d < d_lo]
        above = [d for d in every if d > d_hi]
        self._bore_axis = (0.92 * (below[-1] if below else d_lo),
                           1.05 * (above[0] if above else d_hi))
        return self._bore_axis

    def _show_size(self) -> None:
        st = self.study
        i = st.index_of(self.size.value)
        if i is None:
            return
        self.shown = i
        self._render_status()
        shown = (st.result, i, self.system)
        last = self._shown_key
        if last is not None and last[0] is shown[0] and last[1:] == shown[1:]:
            return   # the same sizing, size and units: the profile and findings are as shown
        self._shown_key = shown
        c = st.result.candidates[i]
        profs = st.result.range_profiles[i]
        if profs is None:
            self.profile_chart.set_series([])
            self.size_heading.value = error_html(c.error)
            self.findings.value = ()
            return
        pmin, pdes, _pmax = profs
        x = pdes.column("x")
        z = pdes.column("z")
        pv = st.inputs.state.pv
        series = [
            Series("pipe elevation", x, z, mode="lines+markers", color="#7f7f7f"),
            Series("EGL, design flow", x, pdes.column("egl"), dash="dash", color="#8e44ad"),
            Series("HGL, design flow", x, pdes.column("hgl"), mode="lines+markers",
                   color="#1f5fa8"),
            Series("HGL, minimum flow", x, pmin.column("hgl"), dash="dot", color="#5dade2"),
        ]
        if pv is not None:
            series.append(Series("vapour-pressure line", x,
                                 z + (pv - pdes.p_baro) / (pdes.rho * G), dash="dot",
                                 color="#c0392b"))
        low_prof = min(profs, key=lambda p: p.lowest.p)
        low = low_prof.lowest
        series.append(Series(f"lowest pressure: {low.name}", np.array([low.x]),
                             np.array([low.hgl]), mode="markers+text", color="#c0392b",
                             extra=dict(marker=dict(size=13, symbol="x"),
                                        text=[f"lowest p: {low.name}"],
                                        textposition="top center")))
        self.profile_chart.set_series(series,
                                      title=f"Hydraulic grade along the route: {c.pipe.label}")
        where = "design" if low_prof is pdes else ("minimum" if low_prof is pmin else "maximum")
        p_text = units.fmt_pressure(low.p, self.system, gauge=True, p_baro=self.p_baro)
        self.size_heading.value = (
            f"<b>Findings for {html.escape(c.pipe.label)}</b> — verdict "
            f"<b>{html.escape(c.verdict.upper())}</b>; lowest pressure {html.escape(p_text)} at "
            f"station '{html.escape(low.name)}' ({where} flow). HGL = elevation + gauge "
            "pressure head; where the HGL meets the vapour-pressure line the liquid boils.")
        self.findings.value = c.findings
        self.fittings.set_conditions(c.Re, c.pipe.Di, c.pipe.roughness)

    def _render_status(self) -> None:
        """The status line: verdict, velocity and Δp per length of the size shown."""
        st, i = self.study, self.shown
        if st is None or i is None:
            return
        c = st.result.candidates[i]
        sysm = self.system
        rec = " (recommended)" if i == st.result.recommended else ""
        parts = [f"{c.pipe.label.split(' (')[0].split(',')[0]}{rec}",
                 f"velocity {units.fmt(c.velocity, 'velocity', sysm)}",
                 f"Δp {units.fmt(c.dp_per_m, 'pressure_per_length', sysm)}",
                 f"at {units.fmt(st.inputs.Q_design, 'flow', sysm)}"]
        self.status.value = status_html(parts, c.verdict)

    # ------------------------------------------------------------------ workspace
    @property
    def workspace(self):
        """The workspace view (:class:`kit.panels.workspace.Workspace`): the inputs in
        collapsible sections beside the velocity/pressure-drop chart, the status line above
        it, the candidates, profile, line list and save row in tabs under it. Built once."""
        if self._workspace is None:
            from kit.panels.workspace import Section, Workspace

            sections = [
                Section("Flow and duty", [self.flow_design, self.flow_min, self.flow_max,
                                          self.duty, self.v_min, self.v_max, self.dp_max,
                                          self.criteria_note]),
                Section("Liquid", [self.fluid]),
                Section("Pipe and route", [self.standard, self.schedule, self.material,
                                           self.condition, self.length, self.start_elevation,
                                           self.start_name, self.points_box, self.add_point,
                                           self.end_pressure, self.vapour_margin]),
                Section("Fittings", [self.fittings], open=False),
            ]
            tabs = [("Candidates", widgets.VBox([self.table, self.reason])),
                    ("Profile and findings", widgets.VBox([self.size, self.profile_chart,
                                                           self.size_heading, self.findings])),
                    ("Line list", widgets.VBox([self.batch_text, self.batch_run,
                                                self.batch_message, self.batch_table])),
                    ("Save", self.save_row)]
            ws = Workspace(sections, self.bore_chart, self.status, tabs,
                           header=[widgets.HTML(_STYLE), self.switch, self.message])
            ws.add_class("hl-line-sizing")
            ws.add_class("hl-workspace-line-sizing")
            self._workspace = ws
        return self._workspace

    # ------------------------------------------------------------------ batch
    def size_list(self) -> None:
        """Size the line list in the text box and show one row per line."""
        self.batch_message.value = ""
        try:
            rows = ls.read_line_list(self.batch_text.value)
        except KIT_ERRORS as exc:
            self.batch_message.value = error_html(str(exc))
            return
        sel = self.fluid.value
        duties = dict(DUTY_CLASSES)
        if self.study is not None:
            duties[self.study.inputs.duty.key] = self.study.inputs.duty
        out = ls.size_batch(rows, sel.liquid if sel is not None else None, self.p_baro, duties)
        table = ls.batch_rows(out)
        for r in table:
            r["verdict_text"] = r["verdict"].upper()
        self.batch_table.value = tuple(table)
        n_err = sum(1 for x in out if x.verdict == "error")
        self.batch_message.value = html.escape(
            f"{len(out)} lines sized: "
            + ", ".join(f"{sum(1 for x in out if x.verdict == v)} {v}"
                        for v in ("pass", "check", "fail", "error"))
            + (" — rows in error show the reason; the others are sized." if n_err else ""))

    # ------------------------------------------------------------------ display system
    def set_system(self, system: str) -> None:
        """Show every quantity in ``system`` ('SI' or 'US'); typed text is kept."""
        self.system = check_system(system)
        if not self.settled:
            self.settle()
        for p in (self.flow_design, self.flow_min, self.flow_max, self.v_min, self.v_max,
                  self.dp_max, self.length, self.start_elevation, self.end_pressure,
                  self.vapour_margin, self.fluid, self.fittings, self.table, self.batch_table,
                  self.findings, self.bore_chart, self.profile_chart, *self.points):
            p.set_system(system)
        if self.study is not None:
            self._render_criteria_charts()
            self._show_size()

    @classmethod
    def record_figures(cls, sc) -> list:
        """The charts as drawn from the scenario itself (not from panel edits), as static
        ``go.Figure`` copies for the record — so the record's figures match its results."""
        return cls.from_scenario(sc).figures()

    def figures(self) -> list:
        """Static copies (plotly ``go.Figure``) of the charts, for the record: velocity and
        pressure drop against bore (one figure, two panels), then the HGL profile."""
        if not self.settled:
            self.settle()
        return [c.to_figure() for c in (self.bore_chart, self.profile_chart)]

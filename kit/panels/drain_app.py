"""The tank-drainage notebook's composite: tank, liquid, outlet, what-if, charts, table, findings.

:class:`DrainApp` lays out

- the tank (:class:`~kit.panels.tank_picker.TankPicker`: shape, heads, size, levels,
  surface, vent, with its sketch);
- the liquid and its temperature (:class:`~kit.panels.fluid_picker.FluidPicker`; its
  properties are taken at the tank's surface pressure, so its pressure box is hidden and
  follows the tank);
- the outlet (:class:`OutletPicker`): an orifice (bore, discharge coefficient with its named
  source from :data:`kit.core.drain.ORIFICE_CD`, elevation) or a line (a
  :class:`~kit.panels.pipe_picker.PipePicker`, a
  :class:`~kit.panels.fitting_list.FittingList`, developed length, fall, inlet elevation,
  and the discharge: a free jet or into a receiving vessel at a level);
- a what-if: a second outlet size (an orifice bore, or a nominal size of the line's pipe
  standard and schedule — a bore for a custom pipe), drained beside the first;
- results: a summary, the times to each level for both outlets, level and flow against
  time (one :class:`~kit.panels.charts.Chart` each, both outlets on each), and the findings
  of both drains with the cautions (:class:`~kit.panels.findings_view.FindingsView`).

The app computes nothing itself: it reads the panels into
:func:`kit.studies.tank_drainage.drain_inputs`, runs :func:`kit.studies.tank_drainage.study`
and reports through :func:`kit.studies.tank_drainage.results_of` — the same function
behind ``compute(scenario)`` and the checker's record. A line keeps the scenario's layout
(:class:`kit.studies.tank_drainage.LineRoute`): its segments and stations, scaled to the
length and fall typed here.

CSS classes: ``hl-drain-app`` (every view), ``hl-outlet-picker``, ``hl-outlet-type``,
``hl-orifice-diameter``, ``hl-orifice-cd-source``, ``hl-orifice-cd``, ``hl-line-length``,
``hl-line-fall``, ``hl-line-inlet``, ``hl-discharge``, ``hl-receiver-level``,
``hl-whatif-size``, ``hl-whatif-nominal``, ``hl-drain-summary``, ``hl-drain-times``,
``hl-level-chart``, ``hl-flow-chart``, ``hl-drain-findings``, ``hl-extra-cautions``,
``hl-app-message``; the save row (``save_view``) ``hl-save``, ``hl-save-path``,
``hl-save-button``, ``hl-save-message``. :meth:`DrainApp.to_scenario` writes the panels back
into a copy of the scenario (strings with units, as typed) for the record and the save button.

Example
-------
>>> from kit.notebook import open_scenario
>>> app = DrainApp.from_scenario(open_scenario("marlow_vale_cip_dump.toml"))
>>> round(app.study.result.total_time / 60, 1), round(app.study.compare.result.total_time / 60, 1)
(9.7, 3.9)
"""

from __future__ import annotations

import html
import math

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.core import pipes as core_pipes
from kit.core.drain import ORIFICE_CD, OrificeOutlet, PipedOutlet
from kit.core.findings import Severity, cautions_for
from kit.core.line import Segment
from kit.errors import InputError
from kit.inputs import tank_drainage as td_inputs
from kit.inputs.kinds import checked
from kit.panels.base import (
    KIT_ERRORS,
    InvalidInput,
    Panel,
    Refusals,
    check_system,
    error_html,
    error_widget,
    field_value,
    locate_field,
    panel_value,
    section_heading,
)
from kit.panels.charts import Chart, Series, to_display
from kit.panels.display import DisplaySwitch
from kit.panels.fields import QuantityField
from kit.panels.findings_view import FindingsView
from kit.panels.fluid_picker import FluidPicker
from kit.panels.pipe_picker import PipePicker, nominal_label
from kit.panels.scenario_text import (
    SaveRow,
    default_save_path,
    exact_text,
    field_text,
    fitting_doc,
    liquid_doc,
    pipe_doc,
    same_value,
)
from kit.panels.tables import Column, ResultsTable
from kit.panels.tank_picker import OutletMark, TankPicker, TankSetup
from kit.panels.workspace import status_html
from kit.scenario import build_fitting as scn_fitting
from kit.studies import tank_drainage as td

__all__ = ["DrainApp", "OutletPicker", "TIMES_COLUMNS", "USER_CD", "chart_parts", "drain_figures"]

#: The Cd-source choice for a value the user types.
USER_CD = "user"
_NONE = ""

TIMES_COLUMNS = (
    Column("label", "level"), Column("level", "elevation", "elevation"),
    Column("volume_remaining", "volume left", "volume"),
    Column("time", "time, as given", "time"), Column("compare_time", "time, what-if", "time"),
    Column("saved", "time saved", "time"),
)

_BASE_COLOUR, _CMP_COLOUR = "#1f5fa8", "#d35400"
_STYLE = """<style>
.hl-drain-app .hl-results td,.hl-drain-app .hl-results th{padding:2px 8px;
  border-bottom:1px solid #ddd;text-align:right}
.hl-drain-app .hl-results td:first-child,.hl-drain-app .hl-results th:first-child{text-align:left}
.hl-drain-app .hl-section{font-weight:bold;font-size:1.08em;margin-top:10px;
  border-bottom:1px solid #888}
.hl-drain-app .hl-note{color:#555;font-style:italic}
.hl-drain-app .hl-summary-table td{padding:1px 10px 1px 0}
</style>"""


def _default_route(pipe) -> td.LineRoute:
    return td.LineRoute("outlet line", "tank outlet",
                        (Segment("outlet line", pipe, 3.0, -1.0, ()),))


class OutletPicker(Panel):
    """The tank's outlet: an orifice or a line.

    Parameters
    ----------
    outlet : OrificeOutlet or PipedOutlet, optional
        What to show first (default: a 50 mm sharp-edged orifice in the bottom).
    system : str
        'SI' or 'US'.
    route : LineRoute, optional
        The layout a line keeps (default: the outlet's own line, or one straight segment).

    Attributes
    ----------
    value : OrificeOutlet or PipedOutlet or None
        None while an input is invalid.
    kind : ipywidgets.ToggleButtons
        'orifice' or 'line'.
    diameter, cd, elevation : QuantityField
        Orifice bore [m], discharge coefficient [-], centre above the level datum [m].
    cd_source : ipywidgets.Dropdown
        A key of :data:`kit.core.drain.ORIFICE_CD`, or :data:`USER_CD` for a typed value.
    cd_note : ipywidgets.HTML
        The source of the chosen Cd.
    pipe : PipePicker
    fittings : FittingList
    length, fall, inlet, receiver_level : QuantityField
        Developed length [m], drop from inlet to discharge [m], inlet elevation on the tank
        datum [m], receiving vessel's level on the tank datum [m].
    discharge : ipywidgets.ToggleButtons
        'free' (a jet into air) or 'vessel' (submerged into a receiving vessel).
    message : ipywidgets.HTML
    """

    css_class = "hl-outlet-picker"

    def __init__(self, outlet=None, system: str = "SI", route: td.LineRoute | None = None):
        from kit.panels.fitting_list import FittingList

        if route is None and isinstance(outlet, PipedOutlet):
            route = td.LineRoute.of(outlet.line)
        self.kind = widgets.ToggleButtons(options=[("orifice", "orifice"),
                                                   ("line", "line")], value="orifice")
        self.kind.add_class("hl-outlet-type")

        def qf(kind, label, css, **kw):
            f = QuantityField(kind, label, system=system, **kw)
            f.add_class(css)
            return f

        # orifice
        self.diameter = qf("diameter", "orifice bore", "hl-orifice-diameter", text="50 mm",
                           field="orifice diameter")
        self.cd_source = widgets.Dropdown(
            options=[(f"{e.label} (Cd {e.Cd:g})", k) for k, e in ORIFICE_CD.items()]
            + [("value typed below", USER_CD)], value="sharp", description="outlet kind")
        self.cd_source.style.description_width = "9em"
        self.cd_source.layout.width = "36em"
        self.cd_source.add_class("hl-orifice-cd-source")
        self.cd = qf("dimensionless", "Cd", "hl-orifice-cd", value_si=ORIFICE_CD["sharp"].Cd,
                     field="discharge coefficient Cd")
        self.cd_note = widgets.HTML("")
        self.cd_note.add_class("hl-cd-note")
        self.elevation = qf("elevation", "orifice elevation", "hl-orifice-elevation",
                            text="0 m", field="orifice elevation offset")
        self.orifice_box = widgets.VBox([self.diameter, self.cd_source, self.cd, self.cd_note,
                                         self.elevation])
        # line
        self.route = route
        self.pipe = PipePicker(route.pipe if route else None, system=system, title="Line pipe")
        if route is None:
            self.route = _default_route(self.pipe.value)
        self.fittings = FittingList(self.route.fittings, system=system,
                                    title="Fittings of the line")
        self.length = qf("length", "developed length", "hl-line-length",
                         value_si=self.route.length, field="outlet line length")
        self.fall = qf("length", "fall (inlet − end)", "hl-line-fall",
                       value_si=self.route.fall, field="outlet line fall")
        self.inlet = qf("elevation", "inlet elevation", "hl-line-inlet", text="0 m",
                        field="outlet line inlet elevation")
        self.discharge = widgets.ToggleButtons(
            options=[("free jet into air", "free"), ("into a receiving vessel", "vessel")],
            value="free")
        self.discharge.add_class("hl-discharge")
        self.discharge.style.button_width = "13em"
        self.receiver_level = qf("elevation", "vessel level", "hl-receiver-level",
                                 text="-1 m", field="receiver level")
        self.route_note = widgets.HTML("")
        self.line_box = widgets.VBox([self.pipe, self.length, self.fall, self.inlet,
                                      self.discharge, self.receiver_level, self.route_note,
                                      self.fittings])
        self.message = error_widget()
        super().__init__([self.kind, self.orifice_box, self.line_box, self.message],
                         system=system)
        self.quantity_fields = (self.diameter, self.cd, self.elevation, self.length,
                                self.fall, self.inlet, self.receiver_level)
        self._refused: list = []
        self._wire()
        if outlet is None:
            self._show_kind()
            self._recompute()
        else:
            self.value = outlet

    # -- wiring: every observer in one place
    def _wire(self) -> None:
        self.kind.observe(self._on_layout, names="value")
        self.discharge.observe(self._on_layout, names="value")
        self.cd_source.observe(self._on_cd_source, names="value")
        self.cd.observe(self._on_cd, names="value")
        for f in self.quantity_fields:
            f.observe(self._on_change, names=["value", "valid"])
        self.pipe.observe(self._on_change, names="value")
        self.fittings.observe(self._on_change, names="value")

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    def _on_layout(self, change) -> None:
        if self._busy:
            return
        self._show_kind()
        self._recompute()

    def _on_cd_source(self, change) -> None:
        if self._busy:
            return
        if change["new"] != USER_CD:
            with self._quiet():
                self.cd.value = ORIFICE_CD[change["new"]].Cd
        self._recompute()

    def _on_cd(self, change) -> None:
        if self._busy or change["new"] is None:
            return
        key = self.cd_source.value
        if key != USER_CD and abs(ORIFICE_CD[key].Cd - change["new"]) > 1e-12:
            with self._quiet():
                self.cd_source.value = USER_CD
        # the value change itself reaches _on_change

    def _show_kind(self) -> None:
        orifice = self.kind.value == "orifice"
        self.orifice_box.layout.display = "" if orifice else "none"
        self.line_box.layout.display = "none" if orifice else ""
        self.receiver_level.layout.display = "" if self.discharge.value == "vessel" else "none"

    # -- widgets -> outlet
    def build(self, size=None, label: str | None = None):
        """The outlet of the widgets, at another ``size`` if given: an orifice bore [m]; for a
        line a nominal size (str) of the pipe's standard and schedule or a bore [m]. A kit
        error or ``InvalidInput`` for bad input."""
        if self.kind.value == "orifice":
            d = field_value(self.diameter) if size is None else float(size)
            name = "orifice" if label is None else f"orifice ({label})"
            return OrificeOutlet(d, field_value(self.cd), field_value(self.elevation), name)
        pipe = panel_value(self.pipe, "the line's pipe is not valid")
        fits = panel_value(self.fittings, "a fitting row is not valid")
        if size is not None:
            pipe = td.resize_pipe(pipe, size)
        z_in, fall = field_value(self.inlet), field_value(self.fall)
        name = self.route.name if label is None else f"{self.route.name} ({label})"
        line = self.route.build(pipe, fits, field_value(self.length), fall, z_in, name)
        recv = field_value(self.receiver_level) if self.discharge.value == "vessel" else None
        return PipedOutlet(line, z_in - fall, recv)

    def _recompute(self) -> None:
        self.message.value = ""
        for f in self._refused:
            f.unrefuse()
        self._refused = []
        key = self.cd_source.value
        self.cd_note.value = ('<span class="hl-note">typed value; give its source in the '
                              "record</span>" if key == USER_CD else
                              f'<span class="hl-note">source: '
                              f"{html.escape(ORIFICE_CD[key].source)}</span>")
        if self.route is not None and len(self.route.segments) > 1:
            self.route_note.value = (
                f'<span class="hl-note">layout kept from the scenario: '
                f"{len(self.route.segments)} segments "
                f"({html.escape(', '.join(s.name for s in self.route.segments))}); their "
                "lengths and rises scale to the length and fall above; one pipe for the whole "
                "line</span>")
            if not self.route.one_pipe:
                self.route_note.value += (
                    '<div class="hl-caution">The scenario\'s segments have different pipes; '
                    "this panel puts the pipe above in every segment, so its results differ "
                    "from the record, which uses the scenario's pipes.</div>")
        try:
            out = self.build()
        except InvalidInput as exc:
            self._set_valid(False, str(exc))
            self._store(None)
            return
        except KIT_ERRORS as exc:
            field = locate_field(self.quantity_fields, exc)
            if field is not None:   # beside the field it names, in its display units
                field.refuse(field.explain_any(exc))
                self._refused.append(field)
            else:
                self.message.value = error_html(str(exc))
            self._set_valid(False, str(exc))
            self._store(None)
            return
        self._set_valid(True, "")
        self._store(out)

    # -- outlet -> widgets
    def _show(self, outlet) -> None:
        if outlet is None:
            return
        self.message.value = ""
        if isinstance(outlet, OrificeOutlet):
            self.kind.value = "orifice"
            self.diameter.value = outlet.diameter
            self.cd.value = outlet.Cd
            key = next((k for k, e in ORIFICE_CD.items() if abs(e.Cd - outlet.Cd) < 1e-12),
                       USER_CD)
            self.cd_source.value = key
            self.elevation.value = outlet.elevation_offset
        elif isinstance(outlet, PipedOutlet):
            self.kind.value = "line"
            if self.route is None or outlet.line.segments != self.route.segments:
                self.route = td.LineRoute.of(outlet.line)
            self.pipe.value = self.route.pipe
            self.fittings.value = self.route.fittings
            self.length.value = self.route.length
            self.fall.value = self.route.fall
            self.inlet.value = outlet.inlet_elevation
            self.discharge.value = "free" if outlet.free else "vessel"
            if not outlet.free:
                self.receiver_level.value = outlet.receiver_level
        else:
            raise TypeError(f"OutletPicker shows an OrificeOutlet or a PipedOutlet, not "
                            f"{type(outlet).__name__}")
        self._show_kind()

    def _after_show(self) -> None:
        self._recompute()

    def _render_system(self) -> None:
        for f in (*self.quantity_fields, self.pipe, self.fittings):
            f.set_system(self.system)


class DrainApp(widgets.VBox):
    """Drain-down of one tank through an orifice or a line, with a what-if outlet size.

    Parameters
    ----------
    inp : DrainInputs
        The starting inputs (SI), e.g. :func:`kit.studies.tank_drainage.inputs` of a scenario.
    system : str
        'SI' or 'US'.
    compare_size : str or float, optional
        The what-if size: an orifice bore [m], a nominal size (str) or a bore [m] for a
        line; default the size of ``inp.compare_outlet``.
    compare_label : str, optional
        The what-if's name while its size is ``compare_size`` (default: from the size).

    Attributes
    ----------
    study : DrainStudy or None
        The last valid drain (inputs, the outlet as given, the what-if or None).
    results : Results or None
        :func:`kit.studies.tank_drainage.results_of` of ``study``.
    tank : TankPicker
    fluid : FluidPicker
    outlet : OutletPicker
    whatif_size : QuantityField
        The what-if orifice bore or custom line bore (empty: no what-if).
    whatif_nominal : ipywidgets.Dropdown
        The what-if nominal size of a catalogue line pipe ('' : no what-if).
    summary : ipywidgets.HTML
    times : ResultsTable
    level_chart, flow_chart : Chart
    findings : FindingsView
    extra_cautions, message : ipywidgets.HTML
    switch : DisplaySwitch
    recomputes : int
        Number of drains run (for tests).

    Views for a notebook: ``tank_view``, ``liquid_view``, ``outlet_view``, ``whatif_view``,
    ``results_view`` (summary and times), ``charts_view``, ``findings_view``.
    """

    def __init__(self, inp: td.DrainInputs, system: str = "SI", compare_size=None,
                 compare_label: str | None = None, scenario=None):
        self.system = check_system(system)
        #: The scenario the app was filled from (None: built from inputs); kept unchanged.
        self.source_scenario = scenario.copy() if scenario is not None else None
        self.p_atm = inp.p_atm
        #: The outlet line's rating and surge-screen options (the scenario's ``[integrity]``
        #: table; no panel edits them): handed on with every computation.
        self.integrity = getattr(inp, "integrity", None)
        self.study: td.DrainStudy | None = None
        self.results = None
        self.recomputes = 0
        #: (inputs, (study, results)) of the last few computations, newest last: the study
        #: is a pure function of its inputs, so going back to inputs seen before (an outlet
        #: size tried and tried again) re-renders without draining the tank again.
        self._cache: list = []
        #: the axis ranges shown, per (chart, axis), SI (see ``_steady_range``)
        self._axis: dict = {}
        self._hold = 0
        if compare_size is None and inp.compare_outlet is not None:
            compare_size = _size_of(inp.compare_outlet)
        self._scenario_compare = (compare_size, compare_label or inp.compare_label)
        setup = TankSetup(inp.tank, inp.start, inp.target, inp.levels, inp.surface,
                          None if inp.surface == "vented" else inp.p_surface, inp.vent)
        self.tank = TankPicker(setup, system=system, p_baro=inp.p_atm, title="")
        self.fluid = FluidPicker(liquid=inp.liquid, T=inp.state.T, P=inp.p_surface,
                                 system=system, p_baro=inp.p_atm, title="")
        self.fluid.pressure.layout.display = "none"
        self.fluid_note = widgets.HTML('<span class="hl-note">properties at the tank\'s '
                                       "surface pressure and the temperature above</span>")
        self.outlet = OutletPicker(inp.outlet, system=system)
        self.whatif_size = QuantityField("diameter", "what-if bore", system=system,
                                         optional=True, field="what-if bore")
        self.whatif_size.add_class("hl-whatif-size")
        self.whatif_nominal = widgets.Dropdown(description="what-if size")
        self.whatif_nominal.style.description_width = "9em"
        self.whatif_nominal.layout.width = "30em"
        self.whatif_nominal.add_class("hl-whatif-nominal")
        self.whatif_note = widgets.HTML("")
        self._fill_whatif(compare_size)
        self.summary = widgets.HTML("")
        self.summary.add_class("hl-drain-summary")
        self.times = ResultsTable(TIMES_COLUMNS, system=system)
        self.times.add_class("hl-drain-times")
        (t1, xk1, yk1, yn1), (t2, xk2, yk2, yn2) = _CHARTS
        self.level_chart = Chart(xk1, yk1, title=t1, y_name=yn1, system=system, height=380)
        self.level_chart.add_class("hl-level-chart")
        self.flow_chart = Chart(xk2, yk2, title=t2, y_name=yn2, system=system, height=340)
        self.flow_chart.add_class("hl-flow-chart")
        self.findings = FindingsView(topics=td.caution_topics(inp), system=system)
        self.findings.add_class("hl-drain-findings")
        self.extra_cautions = widgets.HTML("")
        self.extra_cautions.add_class("hl-extra-cautions")
        #: The workspace's one-line status: the drain time to the target (and the
        #: what-if's), with the worst finding's verdict (CSS ``hl-td-status``).
        self.status = widgets.HTML("")
        self.status.add_class("hl-td-status")
        self._workspace = None
        self.refusals = Refusals((self.summary, self.times, self.level_chart, self.flow_chart,
                                  self.findings, self.extra_cautions, self.status),
                                 self._locate, lambda: self.system)
        #: The banner over the results (CSS ``hl-stale-banner``, ``hl-app-message``).
        self.message = self.refusals.banner
        self.switch = DisplaySwitch([], system=system)
        self.save_row = SaveRow(self.to_scenario, default_save_path(self.source_scenario))
        self._build_views()
        super().__init__([self.tank_view, self.liquid_view, self.outlet_view, self.whatif_view,
                          self.results_view, self.charts_view, self.findings_view,
                          self.save_view])
        self.add_class("hl-drain-app")
        self.switch.targets.append(self)
        self._wire()
        self._sync_fluid_pressure()
        self.recompute()

    @classmethod
    def from_scenario(cls, sc, system: str | None = None) -> DrainApp:
        """The app filled from a tank-drainage scenario (display system from the scenario)."""
        return cls(td.inputs(sc), system or sc.display_system, scenario=sc)

    # ------------------------------------------------------------------ layout
    def _build_views(self) -> None:
        style = widgets.HTML(_STYLE)

        def view(*children):
            v = widgets.VBox([style, *children])
            v.add_class("hl-drain-app")
            return v

        self.tank_view = view(section_heading("Tank, levels, surface and vent"), self.tank)
        self.liquid_view = view(section_heading("Liquid"), self.fluid, self.fluid_note)
        self.outlet_view = view(section_heading("Outlet"), self.outlet)
        self.whatif_view = view(section_heading("What-if: a second outlet size"), self.whatif_nominal,
                                self.whatif_size, self.whatif_note)
        self.results_view = view(section_heading("Drain-down"), self.message, self.summary,
                                 widgets.HTML("<b>Times to levels</b>"), self.times)
        self.charts_view = view(self.message, self.level_chart, self.flow_chart)
        self.findings_view = view(section_heading("Findings"), self.findings, self.extra_cautions)
        self.save_view = view(section_heading("Save the inputs"), widgets.HTML(
            '<span class="hl-note">writes the tank, levels, liquid, outlet and what-if as '
            "set above into a scenario file (keys the panels do not show are kept as they "
            "were)</span>"), self.save_row)

    def _wire(self) -> None:
        self.tank.observe(self._on_tank, names="value")
        self.fluid.observe(self._on_change, names="value")
        self.outlet.observe(self._on_outlet, names="value")
        self.whatif_size.observe(self._on_change, names=["value", "valid"])
        self.whatif_nominal.observe(self._on_change, names="value")

    def _on_change(self, change) -> None:
        if self._hold:
            return
        self.recompute()

    def _locate(self, exc):
        """The input a kit error of the study is about (by the field it names), or None."""
        return locate_field((*self.tank.quantity_fields, *self.outlet.quantity_fields,
                             self.whatif_size, self.fluid.temperature), exc)

    def _on_tank(self, change) -> None:
        if self._hold:
            return
        self._sync_fluid_pressure()
        self.recompute()

    def _on_outlet(self, change) -> None:
        if self._hold:
            return
        self._fill_whatif(self._whatif_value())
        self.recompute()

    def _sync_fluid_pressure(self) -> None:
        s = self.tank.value
        if s is None:
            return
        p = self.p_atm if s.surface == "vented" else s.p_surface
        if self.fluid.pressure.value != p:
            self._hold += 1
            try:
                self.fluid.pressure.value = p
            finally:
                self._hold -= 1

    # ------------------------------------------------------------------ the what-if size
    def _catalogue_pipe(self):
        o = self.outlet
        if o.kind.value != "line" or o.pipe.value is None:
            return None
        p = o.pipe.value
        return p if p.standard is not None else None

    def _whatif_value(self):
        if self._catalogue_pipe() is not None:
            return self.whatif_nominal.value or None
        return self.whatif_size.value

    def _fill_whatif(self, keep) -> None:
        """Show the nominal dropdown for a catalogue line pipe, else the bore field."""
        pipe = self._catalogue_pipe()
        self._hold += 1
        try:
            if pipe is not None:
                sizes = [n for n in core_pipes.nominal_sizes(pipe.standard)
                         if pipe.schedule in core_pipes.schedules(pipe.standard, n)]
                self.whatif_nominal.options = [("none", _NONE)] + [
                    (nominal_label(pipe.standard, n), n) for n in sizes]
                self.whatif_nominal.value = keep if isinstance(keep, str) and keep in sizes \
                    else _NONE
                self.whatif_nominal.layout.display = ""
                self.whatif_size.layout.display = "none"
                self.whatif_note.value = (
                    '<span class="hl-note">a nominal size of the same standard and schedule '
                    f"({html.escape(pipe.schedule)}); same material, fittings and route "
                    "('none': no what-if)</span>")
            else:
                if isinstance(keep, float):
                    self.whatif_size.value = keep
                elif keep is not None and isinstance(keep, str):
                    self.whatif_size.value = None
                self.whatif_nominal.layout.display = "none"
                self.whatif_size.layout.display = ""
                what = "orifice bore" if self.outlet.kind.value == "orifice" else \
                    "bore of the custom pipe"
                self.whatif_note.value = (f'<span class="hl-note">{what}, all else the same '
                                          "(empty: no what-if)</span>")
        finally:
            self._hold -= 1

    def _whatif_label(self, size) -> str:
        sc_size, sc_label = self._scenario_compare
        if sc_label and size == sc_size:
            return sc_label
        if isinstance(size, str):
            pipe = self._catalogue_pipe()
            return nominal_label(pipe.standard, size).split(" (")[0] + " line"
        kind = "orifice" if self.outlet.kind.value == "orifice" else "bore"
        return f"{kind} {units.fmt(size, 'diameter', self.system)}"

    # ------------------------------------------------------------------ compute
    def read_inputs(self) -> td.DrainInputs:
        """The panels' values as :class:`~kit.studies.tank_drainage.DrainInputs` (SI).

        Raises ``InvalidInput`` (an input shows its own message) or a kit error.
        """
        s = panel_value(self.tank, "the tank input is not valid")
        sel = panel_value(self.fluid, "the liquid state is not valid")
        outlet = panel_value(self.outlet, "the outlet input is not valid")
        if not self.whatif_size.valid:
            raise InvalidInput(self.whatif_size.error)
        size = self._whatif_value()
        cmp, label = None, None
        if size is not None:
            label = self._whatif_label(size).strip()
            cmp = self.outlet.build(size, label)
        extra = {"integrity": self.integrity} if self.integrity is not None else {}
        return td.drain_inputs(s.tank, sel.liquid, sel.T, outlet, start=s.start,
                               target=s.target, levels=s.levels, p_atm=self.p_atm,
                               surface=s.surface, p_surface=s.p_surface, vent=s.vent,
                               compare_outlet=cmp, compare_label=label, **extra)

    # ------------------------------------------------------------------ saving
    def to_scenario(self):
        """A copy of the scenario the app was filled from, with every input the panels hold
        written back as the engineer's text with its unit (:mod:`kit.panels.scenario_text`).

        Written: ``[liquid]`` key, concentration and temperature; ``[tank]`` name, shape,
        size, heads or strapping table; ``[drain]`` levels, levels of interest, surface and
        vent; ``[outlet]`` (an orifice, or a line with its segments as the panel scales them,
        the pipe in every segment, fittings in their segments); ``[compare]`` (the what-if
        size; absent when there is none). Every other key stays as it was. Raises the kit's
        error while an input is invalid, or for a what-if bore of a custom-bore line (the
        scenario's ``[compare]`` takes a nominal size only).
        """
        from kit import scenario as scn

        for p, what in ((self.tank, "the tank"), (self.fluid, "the liquid"),
                        (self.outlet, "the outlet")):
            if p.value is None:
                raise InputError(what, "", f"cannot be saved: {p.error or 'an input is not valid'}")
        base = self.source_scenario
        sc = base.copy() if base is not None else scn.Scenario(
            {"schema": scn.SCHEMA, "kind": "tank_drainage", "title": "tank drainage",
             "site": {"barometric_pressure": exact_text(self.p_atm, "pressure_abs")}})
        doc = sc.doc
        doc["liquid"] = liquid_doc(self.fluid, doc.get("liquid"))
        doc["tank"] = self._tank_doc(doc.get("tank") or {})
        doc["drain"] = self._drain_doc(doc.get("drain") or {})
        doc["outlet"] = self._outlet_doc(doc.get("outlet") or {})
        cmp = self._compare_doc(doc.get("compare"))
        if cmp is None:
            doc.pop("compare", None)
        else:
            doc["compare"] = cmp
        return checked(sc)  # the schema's rules, as for a file

    def _tank_doc(self, old: dict) -> dict:
        t = self.tank
        shape = t.shape.value
        out = {k: v for k, v in old.items() if k == "note"}
        out["name"] = t.name.value.strip() or "tank"
        out["shape"] = shape
        if shape == "strapping_table":
            same_shape = old.get("shape") == shape
            levels, volumes = [], []
            for raw in t.table.value.splitlines():
                if raw.strip():
                    lv, _, vol = (x.strip() for x in raw.partition(","))
                    levels.append(lv)
                    volumes.append(vol)
            built = t.value.tank
            if same_shape and len(old.get("levels", ())) == len(levels) and all(
                    same_value(a, b, "elevation") for a, b in zip(old["levels"], built.levels,
                                                                 strict=True)) and all(
                    same_value(a, b, "volume") for a, b in zip(old["volumes"], built.volumes,
                                                              strict=True)):
                levels, volumes = list(old["levels"]), list(old["volumes"])
            out.update(levels=levels, volumes=volumes)
            return out
        out["diameter"] = field_text(t.diameter, old.get("diameter"))
        if shape == "sphere":
            return out
        out["length"] = field_text(t.length, old.get("length"))
        if shape == "horizontal_cylinder":
            out["heads"] = self._head_doc(t.bottom, old.get("heads"))
            return out
        both = old.get("heads", "flat")
        out["bottom"] = self._head_doc(t.bottom, old.get("bottom", both))
        out["top"] = self._head_doc(t.top, old.get("top", both))
        return out

    @staticmethod
    def _head_doc(row, old):
        from kit.core.tank import Head

        head = row.read()
        try:
            was = td_inputs.head_of(old, "head") if old is not None else None
        except KIT_ERRORS:
            was = None
        if isinstance(was, str):
            was = Head(was)
        if was is not None and was == head:
            return old
        if head.kind == "flat":
            return "flat"
        if head.kind == "torispherical":
            std = row.standard.value
            return ({"kind": "torispherical", "standard": std} if std != "custom" else
                    {"kind": "torispherical", "f": float(head.f), "k": float(head.k)})
        out = {"kind": head.kind}
        if row.depth.value is not None:
            out["depth"] = field_text(row.depth)
        elif row.ratio.value is not None:
            out["ratio"] = float(row.ratio.value)
        return out

    def _drain_doc(self, old: dict) -> dict:
        t = self.tank
        s = t.value
        out = dict(old)
        out["start_level"] = field_text(t.start, old.get("start_level"))
        out["target_level"] = field_text(t.target, old.get("target_level"))
        old_levels = list(old.get("levels_of_interest") or [])

        def old_entry(label, z):
            for e in old_levels:
                lv, lb = (e.get("level"), str(e.get("label", e.get("level")))) \
                    if isinstance(e, dict) else (e, str(e).strip())
                if lb == label and same_value(lv, z, "elevation"):
                    return e
            return None

        texts = [ln.strip().partition(",")[0].strip() for ln in t.levels.value.splitlines()
                 if ln.strip()]
        levels = []
        for (label, z), typed in zip(s.levels, texts, strict=True):
            e = old_entry(label, z)
            if e is None:
                lv = typed if same_value(typed, z, "elevation") else exact_text(
                    z, "elevation", self.system)
                e = lv if label == typed else {"level": lv, "label": label}
            levels.append(e)
        if levels:
            out["levels_of_interest"] = levels
        else:
            out.pop("levels_of_interest", None)
        out["surface"] = s.surface
        if s.surface == "vented":
            out.pop("surface_pressure", None)
        else:
            out["surface_pressure"] = field_text(t.surface_pressure,
                                                 old.get("surface_pressure"))
        if s.vent is None:
            out.pop("vent", None)
        else:
            ov = old.get("vent") if isinstance(old.get("vent"), dict) else {}
            try:
                same = td_inputs.vent_of(ov) == s.vent if ov else False
            except KIT_ERRORS:
                same = False
            out["vent"] = dict(ov) if same else {
                "diameter": field_text(t.vent_diameter, ov.get("diameter")),
                "Cd": float(s.vent.Cd),
                "allowable_vacuum": field_text(t.allowable_vacuum, ov.get("allowable_vacuum"))}
        return out

    def _outlet_doc(self, old: dict) -> dict:
        o = self.outlet
        outlet = o.value
        keep = {k: v for k, v in old.items() if k == "note"}
        if isinstance(outlet, OrificeOutlet):
            if old.get("type") == "orifice":
                try:
                    was = td_inputs.orifice_of(old)
                except KIT_ERRORS:
                    was = None
                if was is not None and (was.diameter, was.Cd, was.elevation_offset) == (
                        outlet.diameter, outlet.Cd, outlet.elevation_offset):
                    return dict(old)
            out = {**keep, "type": "orifice",
                   "name": old.get("name", "orifice") if old.get("type") == "orifice"
                   else "orifice",
                   "diameter": field_text(o.diameter, old.get("diameter"))}
            if o.cd_source.value != USER_CD:
                out["cd_key"] = o.cd_source.value
            else:
                out["Cd"] = float(outlet.Cd)
            out["elevation"] = field_text(o.elevation, old.get("elevation"))
            return out
        line = outlet.line
        was_line = old.get("type") == "line"
        out = {**keep, "type": "line", "name": line.name,
               "start_station": line.start_station}
        out["inlet_elevation"] = field_text(o.inlet, old.get("inlet_elevation", "0 m")
                                            if was_line else None)
        z_out = outlet.discharge_elevation
        if was_line and same_value(old.get("discharge_elevation"), z_out, "elevation"):
            out["discharge_elevation"] = old["discharge_elevation"]
        elif was_line and "discharge_elevation" in old:
            out["discharge_elevation"] = exact_text(z_out, "elevation", self.system)
        if outlet.receiver_level is not None:
            out["receiver_level"] = field_text(o.receiver_level, old.get("receiver_level"))
            if was_line and "receiver_pressure" in old:
                out["receiver_pressure"] = old["receiver_pressure"]
        old_segs = list(old.get("segments") or []) if was_line else []
        rows = {}
        fits = o.fittings.value or ()
        for row, fit in zip(o.fittings.kept, fits, strict=True):
            rows[id(fit)] = row.fields
        segs = []
        for i, seg in enumerate(line.segments):
            s0 = old_segs[i] if i < len(old_segs) and isinstance(old_segs[i], dict) else {}
            d = {k: v for k, v in s0.items()
                 if k not in ("name", "station", "length", "rise", "pipe", "fittings")}
            d["name"] = seg.name
            if seg.end_station is not None:
                d["station"] = seg.end_station
            d["length"] = s0["length"] if same_value(s0.get("length"), seg.length, "length") \
                else exact_text(seg.length, "length", self.system)
            d["rise"] = s0["rise"] if same_value(s0.get("rise"), seg.rise, "length") \
                else exact_text(seg.rise, "length", self.system)
            d["pipe"] = pipe_doc(seg.pipe, s0.get("pipe"), self.system)
            pool = []
            for j, f in enumerate(s0.get("fittings") or ()):
                try:
                    pool.append((scn_fitting(f, f"outlet.segments[{i}].fittings[{j}]"), f))
                except KIT_ERRORS:
                    continue
            fl = [fitting_doc(f, pool, rows.get(id(f)), self.system) for f in seg.fittings]
            if fl:
                d["fittings"] = fl
            segs.append(d)
        out["segments"] = segs
        return out

    def _compare_doc(self, old):
        size = self._whatif_value()
        if size is None:
            return None
        sc_size, _ = self._scenario_compare
        old = old if isinstance(old, dict) else None
        if old is not None and size == sc_size:
            return dict(old)
        label = self._whatif_label(size).strip()
        if self.outlet.kind.value == "orifice":
            return {"label": label, "outlet_diameter": field_text(self.whatif_size)}
        if isinstance(size, str):
            return {"label": label, "nominal": size,
                    "schedule": str(self.outlet.pipe.value.schedule)}
        raise InputError("what-if bore", size, "cannot be saved for a line of custom bore "
                         "(a scenario's [compare] takes a nominal size); clear it to save",
                         "m")

    def recompute(self) -> None:
        """Read the panels, drain the tank through both outlets and re-render."""
        def run():
            inp = self.read_inputs()
            for k, (seen, out) in enumerate(self._cache):
                if _same_inputs(seen, inp):
                    self._cache.append(self._cache.pop(k))
                    return out
            st = td.study(None, inp)
            out = (st, td.results_of(st))
            self.recomputes += 1
            self._cache = [*self._cache[-(_CACHE_SIZE - 1):], (inp, out)]
            return out

        out = self.refusals.attempt(run)
        if out is None:
            return
        self.study, self.results = out
        self._render()

    # ------------------------------------------------------------------ render
    def _render(self) -> None:
        st, r = self.study, self.results
        # the charts first (the level chart, the workspace's main chart, leads): their
        # messages leave for the browser before the sketch's and the tables'
        self._render_charts()
        self._render_status()
        self.tank.set_outlet(_mark(st.outlet))
        rows = []
        for row in td.times_rows(st):
            row = dict(row)
            if "compare_time" in row:
                row["saved"] = row["time"] - row["compare_time"]
            rows.append(row)
        self.times.value = tuple(rows)
        self._render_summary()
        self.findings.show(r.findings, td.caution_topics(st.inputs))
        shown = set(cautions_for(*td.caution_topics(st.inputs)))
        extra = [c for c in r.cautions if c not in shown]
        self.extra_cautions.value = "".join(
            f'<div class="hl-caution"><b>Caution:</b> {html.escape(c)}</div>' for c in extra)
        if isinstance(st.outlet, PipedOutlet):
            res = st.result
            if res.Re.size and res.flow.size and res.flow[0] > 0:
                seg = st.outlet.line.segments[0]
                self.outlet.fittings.set_conditions(float(res.Re[0]), seg.pipe.Di,
                                                    seg.pipe.roughness)

    def _case_rows(self, case) -> list[tuple[str, str]]:
        res, sysm = case.result, self.system
        fmt = units.fmt
        out = [("outlet", case.outlet.name),
               ("time to target" if res.reached else "time to where outflow stops",
                fmt(res.total_time, "time", sysm)),
               ("peak outflow", fmt(res.peak_flow, "flow", sysm)),
               ("peak velocity in the bore", fmt(float(res.velocity.max()) if res.velocity.size
                                                 else 0.0, "velocity", sysm))]
        if isinstance(case.outlet, PipedOutlet) and math.isfinite(res.lowest_pressure):
            out.append(("lowest pressure in the line",
                        f"{units.fmt_pressure(res.lowest_pressure, sysm, True, self.p_atm)} at "
                        f"{res.lowest_station}"))
        if not res.reached:
            out.append(("DOES NOT REACH THE TARGET",
                        f"stops at {fmt(res.stop_level, 'elevation', sysm)}: {res.stop_reason}"))
        return out

    def _render_status(self) -> None:
        """The status line: drain time to the target (or to where the outflow stops), the
        what-if's time, the peak outflow; the worst finding's verdict."""
        st, sysm = self.study, self.system
        res = st.result
        what = "drain time" if res.reached else "outflow stops after"
        parts = [f"{what} {units.fmt(res.total_time, 'time', sysm)}"
                 + ("" if res.reached else
                    f" at {units.fmt(res.stop_level, 'elevation', sysm)} (target not reached)"),
                 f"peak outflow {units.fmt(res.peak_flow, 'flow', sysm)}",
                 f"outlet: {st.outlet.name}"]
        if st.compare:
            parts.append(f"what-if {st.compare.label}: "
                         f"{units.fmt(st.compare.result.total_time, 'time', sysm)}")
        worst = max((Severity(f.severity) for f in self.results.findings),
                    key=lambda v: v.rank, default=None)
        self.status.value = status_html(parts, worst.value if worst is not None else None)

    @property
    def workspace(self):
        """The workspace view (:class:`kit.panels.workspace.Workspace`): tank, liquid, outlet
        and what-if in collapsible sections beside the level chart, the status line above
        it, the times, outflow chart, findings and save row in tabs under it."""
        if self._workspace is None:
            from kit.panels.workspace import Section, Workspace

            # the outlet first: it is what a drain study steers
            sections = [
                Section("Tank outlet", [self.outlet]),
                Section("What-if outlet size", [self.whatif_nominal, self.whatif_size,
                                                self.whatif_note]),
                Section("Tank and levels", [self.tank]),
                Section("Liquid", [self.fluid, self.fluid_note], open=False),
            ]
            tabs = [("Times to levels", widgets.VBox([self.summary, self.times])),
                    ("Outflow", self.flow_chart),
                    ("Findings", widgets.VBox([self.findings, self.extra_cautions])),
                    ("Save", self.save_row)]
            ws = Workspace(sections, self.level_chart, self.status, tabs,
                           header=[widgets.HTML(_STYLE), self.switch, self.message])
            ws.add_class("hl-drain-app")
            ws.add_class("hl-workspace-tank-drainage")
            self._workspace = ws
        return self._workspace

    def _render_summary(self) -> None:
        st = self.study
        cases = [("as given", st.base)] + ([("what-if: " + st.compare.label, st.compare)]
                                           if st.compare else [])
        parts = []
        for title, case in cases:
            body = "".join(f"<tr><td>{html.escape(a)}</td><td><b>{html.escape(b)}</b></td></tr>"
                           for a, b in self._case_rows(case))
            parts.append(f'<div style="display:inline-block;vertical-align:top;'
                         f'margin-right:28px"><b>{html.escape(title)}</b>'
                         f'<table class="hl-summary-table">{body}</table></div>')
        saved = ""
        if st.compare:
            dt = st.result.total_time - st.compare.result.total_time
            word = "saves" if dt >= 0 else "adds"
            saved = (f'<div class="hl-drain-saved">The what-if {word} '
                     f"<b>{html.escape(units.fmt(abs(dt), 'time', self.system))}</b>.</div>")
        self.summary.value = "".join(parts) + saved

    def _render_charts(self) -> None:
        parts = chart_parts(self.study)
        for k, (chart, (series, x_range, y_range)) in enumerate(
                zip((self.level_chart, self.flow_chart), parts, strict=True)):
            # time axes and the outflow axis hold steady; the level axis is the tank's own
            x_range = self._steady_range((k, "x"), x_range)
            if k == 1:
                y_range = self._steady_range((k, "y"), y_range)
            chart.set_series(series, x_range=x_range, y_range=y_range)

    def _steady_range(self, key, new: tuple) -> tuple:
        """An axis range that holds while the data fit it: the range shown is kept while the
        new one lies inside it and spans at least half of it, so a change that moves the
        curves only (an outlet size tried and tried back) redraws the traces, not the axes
        (the browser's fast path). The record's figures use the tight ranges."""
        cur = self._axis.get(key)
        lo, hi = float(new[0]), float(new[1])
        if cur is not None and cur[0] == lo and lo < hi <= cur[1] \
                and (hi - lo) >= 0.5 * (cur[1] - cur[0]):
            return cur
        self._axis[key] = (lo, hi)
        return self._axis[key]

    # ------------------------------------------------------------------ display system
    def set_system(self, system: str) -> None:
        """Show every quantity in ``system`` ('SI' or 'US'); typed text is kept."""
        self.system = check_system(system)
        for p in (self.tank, self.fluid, self.outlet, self.whatif_size, self.times,
                  self.findings, self.level_chart, self.flow_chart):
            p.set_system(system)
        if self.study is not None:
            self._render()

    def figures(self) -> list:
        """Static copies (plotly ``go.Figure``) of the two charts, for the record."""
        return [c.to_figure() for c in (self.level_chart, self.flow_chart)]


def chart_parts(st: td.DrainStudy):
    """The series and fixed SI axis ranges of the level and flow charts of a drain study:
    ``[(level series, x range, y range), (flow series, x range, y range)]``."""
    inp = st.inputs
    cases = [(f"as given: {st.outlet.name}", st.result, _BASE_COLOUR, None)]
    if st.compare:
        cases.append((f"what-if: {st.compare.label}", st.compare.result, _CMP_COLOUR, "dash"))
    t_end = max(float(c[1].time[-1]) for c in cases)
    t_end = t_end if t_end > 0 else 1.0
    x = (0.0, 1.05 * t_end)
    level = [Series(name, r.time, r.level, color=colour, dash=dash)
             for name, r, colour, dash in cases]
    level.append(Series("target level", np.array(x), np.array([inp.target, inp.target]),
                        dash="dot", color="#c0392b"))
    flow = [Series(name, r.time, r.flow, color=colour, dash=dash)
            for name, r, colour, dash in cases]
    q_max = max(float(c[1].flow.max()) if c[1].flow.size else 0.0 for c in cases)
    return [(level, x, (inp.tank.h_min, inp.tank.h_max)),
            (flow, x, (0.0, 1.08 * q_max if q_max > 0 else 1e-3))]


#: Chart titles and axes: (title, x kind, y kind, y name).
_CHARTS = (("Level against time", "time", "elevation", "level"),
           ("Outflow against time", "time", "flow", "outflow"))


def drain_figures(st: td.DrainStudy, system: str = "SI") -> list:
    """Static plotly figures (``go.Figure``) of the level and flow charts of ``st``, for the
    record (no FigureWidget, so nothing is sent to the browser).

    >>> from kit.notebook import open_scenario
    >>> figs = drain_figures(td.study(open_scenario("marlow_vale_cip_dump.toml")))
    >>> [f.layout.title.text for f in figs], len(figs[0].data)
    (['Level against time', 'Outflow against time'], 3)
    """
    import plotly.graph_objects as go

    from kit.panels.charts import axis_title

    out = []
    for (title, xk, yk, yname), (series, xr, yr) in zip(_CHARTS, chart_parts(st), strict=True):
        fig = go.Figure(layout=dict(title=dict(text=title), template="plotly_white",
                                    height=380, legend=dict(orientation="h", y=-0.2)))
        for s in series:
            fig.add_trace(go.Scatter(x=to_display(s.x, xk, system), y=to_display(s.y, yk, system),
                                     name=s.name, mode=s.mode,
                                     line=dict(dash=s.dash, color=s.color)))
        fig.update_xaxes(title_text=axis_title("time", xk, system),
                         range=list(to_display(xr, xk, system)))
        fig.update_yaxes(title_text=axis_title(yname, yk, system),
                         range=list(to_display(yr, yk, system)))
        out.append(fig)
    return out


#: How many computations :class:`DrainApp` keeps (see ``DrainApp._cache``).
_CACHE_SIZE = 16


def _same_inputs(a, b) -> bool:
    """``a == b`` for two :class:`~kit.inputs.tank_drainage.DrainInputs`; False where the
    comparison cannot say (a field that does not compare as one truth value)."""
    try:
        return bool(a == b)
    except (ValueError, TypeError):
        return False


def _size_of(outlet):
    if isinstance(outlet, OrificeOutlet):
        return outlet.diameter
    pipe = outlet.line.segments[0].pipe
    return pipe.nominal if pipe.standard is not None else pipe.Di


def _mark(outlet) -> OutletMark:
    if isinstance(outlet, OrificeOutlet):
        return OutletMark("orifice", outlet.elevation_offset, outlet.diameter, "orifice")
    return OutletMark("line", outlet.inlet_elevation, outlet.inlet_diameter,
                      getattr(outlet.line, "name", "outlet line"))


"""The pump-selection notebook's composite: inputs, chart, comparison tables, findings.

:class:`PumpSelectionApp` holds a working copy of the scenario. Its inputs — the liquid
temperature range, a :class:`~kit.panels.pump_editor.PumpEditor` for one candidate at a
time, and the pumped system (:class:`~kit.panels.pump_system.PumpSystemInputs`: required
flow, source and destination levels and pressures, suction and discharge lines with their
pipes, lengths, rises and fittings, running hours, tariff and currency) — write back into that
copy (strings with units, as a scenario file holds them), and every change re-runs
:func:`kit.studies.pump_selection.study` (or takes it from the last
:data:`STUDY_CACHE_SIZE` runs: it is a pure function of the scenario document and the pumps)
and redraws, the main chart first. Charts go to their
:class:`~kit.panels.plot_view.PlotView` as plain dicts (float arrays as plotly.js typed
arrays); plotly ``Figure`` objects are built only for the record (:meth:`static_figures`).
Nothing here computes hydraulics: the study does. A refused input is marked at its field
and the results are marked stale (:class:`kit.panels.base.Refusals`); ``workspace`` is the
one-screen view.

Sections (each a widget the notebook shows in its own cell):

- ``inputs``: liquid temperatures, the candidate to edit, the editor (CSS ``hl-pump-inputs``);
- ``chart``: pump curves over the system band with operating points and each pump's preferred
  operating region, and NPSH available against required below (CSS ``hl-pump-chart``);
- ``comparison``: the candidates side by side, and every operating point (``hl-candidates``,
  ``hl-points``);
- ``control_view``: throttling against speed control for the recommended pump (``hl-control``);
- ``profile_view``: pressure along the suction and discharge lines at every band condition,
  with the atmospheric and vapour-pressure lines (``hl-line-profile``;
  :func:`kit.panels.pump_profiles.profile_figure`);
- ``duties``: a :class:`~kit.panels.pump_duties.PumpDutiesView` — set composition
  (``hl-pump-set``), staging chart (``hl-staging-chart``), staging steps, energy per strategy
  (``hl-energy-table``) — and ``load_profile``, a
  :class:`~kit.panels.load_profile.LoadProfileEditor` (``hl-load-profile``) whose edits are
  written into ``[load_profile]`` and re-run the study;
- ``findings``: a :class:`~kit.panels.findings_view.FindingsView` with the cautions;
- ``save_view``: a path and a "Save scenario" button writing :meth:`PumpSelectionApp.to_scenario`
  (CSS ``hl-save``, ``hl-save-path``, ``hl-save-button``, ``hl-save-message``).

Example
-------
>>> from kit.notebook import open_scenario
>>> app = PumpSelectionApp(open_scenario("kestrel_ridge_booster.toml"))
>>> app.study.recommended
'KR-A end-suction 1480 rpm'
"""

from __future__ import annotations

import html
import json
from dataclasses import dataclass
from functools import lru_cache

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.core.findings import Severity
from kit.core.operating import BEP_REGIONS
from kit.errors import InputError
from kit.inputs import pump_selection as pump_inputs
from kit.panels.base import (
    KIT_ERRORS,
    InvalidInput,
    Later,
    Refusal,
    Refusals,
    check_system,
    kernel_loop,
)
from kit.panels.charts import to_display
from kit.panels.display import DisplaySwitch
from kit.panels.fields import QuantityField
from kit.panels.findings_view import FindingsView
from kit.panels.load_profile import LoadProfileEditor
from kit.panels.plot_view import PlotView, plain
from kit.panels.pump_duties import (
    PumpDutiesView,
    set_figure,
    staging_figure,
    viscous_figure,
)
from kit.panels.pump_editor import PumpEditor
from kit.panels.pump_profiles import as_figure, packed, profile_figure, profile_spec
from kit.panels.pump_system import PumpSystemInputs, with_values
from kit.panels.scenario_text import SaveRow, default_save_path
from kit.panels.tables import Column, results_table_html, unit_label
from kit.panels.workspace import status_html
from kit.studies import pump_selection as ps

__all__ = ["PumpSelectionApp", "CANDIDATE_ROWS", "candidates_html", "POINT_COLUMNS", "CONTROL_COLUMNS",
           "PUMP_COLOURS", "CAUTION_TOPICS", "STUDY_DELAY"]

#: Our own plain colours, one per candidate.
PUMP_COLOURS = ("#1f4e9c", "#c0392b", "#2f7d32", "#8e44ad", "#d68910", "#17707a")
#: Caution topics the findings view shows.
CAUTION_TOPICS = ("pump", "cavitation", "pressure", "water_hammer", "vacuum")

#: Rows of the candidates table (one column per pump): key(s), label, quantity kind.
CANDIDATE_ROWS = (
    (("verdict_text",), "verdict", None),
    (("Q_min", "Q_max"), "flow delivered, least – most", "flow"),
    (("H_min", "H_max"), "head, least – most", "head"),
    (("eta_min", "eta_max"), "efficiency, least – most", "fraction"),
    (("bep_min", "bep_max"), "Q / Q_BEP, least – most", "ratio"),
    (("npsh_margin",), "NPSH margin (NPSHa − NPSHr), least", "head"),
    (("power_max",), "shaft power, most", "power"),
    (("motor",), "motor rating", "power"),
    (("energy",), "energy per year", "energy"),
    (("cost_text",), "cost per year", None),
    (("findings",), "findings not passing", None),
)
POINT_COLUMNS = (
    Column("pump", "pump"), Column("condition", "condition"), Column("Q", "flow", "flow"),
    Column("H", "head", "head"), Column("eta", "efficiency", "fraction"),
    Column("npsha", "NPSHa", "head"), Column("npshr", "NPSHr", "head"),
    Column("margin", "NPSH margin", "head"), Column("power", "shaft power", "power"),
    Column("bep", "Q/Q_BEP"), Column("note", "worst finding"),
)
CONTROL_COLUMNS = (
    Column("method", "control"), Column("speed", "speed", "speed", digits=4),
    Column("Q", "flow", "flow"), Column("H_pump", "pump head", "head"),
    Column("valve_head", "head burned in valve", "head"),
    Column("eta", "pump efficiency", "fraction"), Column("shaft_power", "shaft power", "power"),
    Column("input_power", "power drawn", "power"),
    Column("energy", "energy per year", "energy", digits=4),
)

_STYLE = """<style>
.hl-pump-app table.hl-results{border-collapse:collapse;font-size:0.9em;margin:4px 0}
.hl-pump-app table.hl-results td,.hl-pump-app table.hl-results th{border:1px solid #ccc;
 padding:2px 6px;text-align:left;vertical-align:top}
.hl-pump-app table.hl-results th{background:#f2f2f2}
.hl-pump-app .hl-error-text{color:#8a1111}
.hl-pump-app table.hl-candidates-table td{min-width:11em;max-width:22em}
.hl-pump-app table.hl-candidates-table td.hl-pass{background:#d7f0d7;color:#1d5e1d}
.hl-pump-app table.hl-candidates-table td.hl-check{background:#fbe8c0;color:#7a4d00}
.hl-pump-app table.hl-candidates-table td.hl-fail{background:#f6cccc;color:#8a1111;font-weight:bold}
.hl-pump-app table.hl-results caption{caption-side:top;text-align:left;font-size:0.9em}
</style>"""


@lru_cache(maxsize=64)
def _affine(kind: str, system: str) -> tuple[float, float]:
    """(offset, scale) from SI to the display unit of ``kind`` (pure; cached)."""
    a = float(to_display(0.0, kind, system))
    return a, float(to_display(1.0, kind, system)) - a


def _shown(values, kind: str, system: str) -> np.ndarray:
    a, b = _affine(kind, system)
    return a + b * np.asarray(values, dtype=float)


def _nice_top(x: float) -> float:
    """A round axis end at or above ``x`` (1, 2, 2.5, 5 × 10^n)."""
    if not np.isfinite(x) or x <= 0:
        return 1.0
    e = 10 ** np.floor(np.log10(x))
    for m in (1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0):
        if m * e >= x:
            return float(m * e)
    return float(10 * e)


def _value_text(v, kind, system: str) -> str:
    if v is None or (isinstance(v, float) and not np.isfinite(v)):
        return "—"
    if kind is None:
        return str(v)
    if kind == "ratio":
        return f"{v:.2f}"
    digits = 4 if kind == "energy" else 3
    return units.fmt(float(v), kind, system, digits=digits, with_unit=False)


def candidates_html(rows, system: str = "SI", caption: str = "") -> str:
    """The candidates side by side: one column per pump, one row per quantity (SI rows in).

    >>> "<th>P-1</th>" in candidates_html([{"pump": "P-1", "Q_min": 0.01, "Q_max": 0.02}])
    True
    """
    head = "".join(f"<th>{html.escape(str(r['pump']))}</th>" for r in rows)
    body = []
    for keys, label, kind in CANDIDATE_ROWS:
        unit = "" if kind in (None, "ratio") else unit_label(kind, system)
        name = html.escape(label) + (f" [{html.escape(unit)}]" if unit else "")
        cells = []
        for r in rows:
            vals = [_value_text(r.get(k), kind, system) for k in keys]
            text = " – ".join(vals) if len(vals) == 2 and vals[0] != vals[1] else vals[0]
            css = ""
            if keys == ("verdict_text",):
                css = f' class="hl-{html.escape(str(r.get("verdict", "")))}"'
            cells.append(f"<td{css}>{html.escape(text)}</td>")
        body.append(f"<tr><th>{name}</th>{''.join(cells)}</tr>")
    cap = f"<caption>{html.escape(caption)}</caption>" if caption else ""
    return (f'<table class="hl-results hl-candidates-table">{cap}<thead><tr><th>candidate</th>'
            f'{head}</tr></thead><tbody>{"".join(body)}</tbody></table>')


#: How many computations :class:`PumpSelectionApp` keeps (going back to inputs tried before
#: re-renders without running the study again).
STUDY_CACHE_SIZE = 16

#: Seconds between an edit's pump chart (drawn from the study's preview) and the rest of its
#: study, in a kernel: the browser draws the chart before the kernel sends the tables.
STUDY_DELAY = 0.1


@dataclass
class _Quick:
    """An accepted edit whose study is begun: its inputs and the study's preview
    (:func:`kit.studies.pump_selection.preview`), what the pump chart is drawn from."""

    scenario: object
    pumps: list
    preview: object


_pump_key = ps.pump_key


def _study_key(scenario, pumps):
    """The study's inputs as a key: the scenario's document (canonical JSON) and source,
    and each pump's defining data; None when a pump is of a kind not keyed here.

    >>> from kit.notebook import open_scenario
    >>> from kit.inputs import pump_selection as pi
    >>> sc = open_scenario("kestrel_ridge_booster.toml")
    >>> _study_key(sc, pi.read(sc).pumps) == _study_key(sc.copy(), pi.read(sc).pumps)
    True
    """
    keys = tuple(_pump_key(p) for p in pumps)
    if None in keys:
        return None
    doc = json.dumps(scenario.doc, sort_keys=True, default=repr)
    return (doc, str(scenario.source), keys)


class PumpSelectionApp(widgets.VBox):
    """Candidates against the system band; edit a pump or the liquid temperature and see it all.

    Parameters
    ----------
    scenario : kit.scenario.Scenario
        A ``pump_selection`` scenario (a working copy is kept; the original is not changed).
    system : str, optional
        Display system, 'SI' or 'US' (default the scenario's).

    Attributes
    ----------
    scenario : Scenario
        The working copy, with every accepted edit written back (save it with
        :func:`kit.scenario.save`).
    study : kit.studies.pump_selection.PumpStudy
        The last study run.
    results : kit.results.Results
        Its results (for the record and the text summary).
    t_min, t_max : QuantityField
        Liquid temperature range (CSS ``hl-temp-min``, ``hl-temp-max``).
    choice : ipywidgets.Dropdown
        The candidate the editor shows (CSS ``hl-pump-choice``).
    editor : PumpEditor
    figure : plotly.graph_objects.Figure
        Head and NPSH charts, one figure (two rows on a shared flow axis), as drawn by
        ``plot`` (a :class:`~kit.panels.plot_view.PlotView`); built on each read from the
        plain dict the view shows (a static copy).
    message : ipywidgets.HTML
        Study-level message (CSS ``hl-error``): what was refused, with the kit's words.
    """

    def __init__(self, scenario, system: str | None = None):
        import plotly.graph_objects as go
        from plotly.subplots import make_subplots

        self.scenario = scenario.copy()
        self.display = check_system(system or scenario.display_system)
        self.pumps = list(pump_inputs.read(self.scenario).pumps)
        #: the last computations: ((document, pumps) key, (study, results)), newest last
        self._cache: list = []
        #: how many times the study was run (not taken from the cache)
        self.recomputes = 0
        self._pending = None      # an edit's study to finish (a _Quick), in a kernel
        self._later = Later(self._finish)   # ... from the kernel's event loop (_schedule)
        _, _, self.study, self.results = self._run(self.scenario, self.pumps)
        self._accepted = (self.scenario, self.pumps)
        self._busy = False

        liq = self.scenario.doc.get("liquid", {})
        t_lo = liq.get("temperature_min", liq.get("temperature", ""))
        t_hi = liq.get("temperature_max", liq.get("temperature", ""))
        self.t_min = QuantityField("temperature", "Liquid temperature, lowest", text=t_lo,
                                   system=self.display, field="lowest liquid temperature")
        self.t_max = QuantityField("temperature", "Liquid temperature, highest", text=t_hi,
                                   system=self.display, field="highest liquid temperature")
        self.t_min.add_class("hl-temp-min")
        self.t_max.add_class("hl-temp-max")
        self.choice = widgets.Dropdown(options=[(p.name, i) for i, p in enumerate(self.pumps)],
                                       value=0, description="Edit pump",
                                       layout=widgets.Layout(width="36em"))
        self.choice.add_class("hl-pump-choice")
        self.editor = PumpEditor(self.scenario.doc["pumps"][0], system=self.display, title="")
        self.style = widgets.HTML(_STYLE)
        #: The system's inputs: duty flow, ends, lines, running hours and tariff.
        self.system_inputs = PumpSystemInputs(self.scenario, self.display,
                                              p_baro=self.study.system.p_baro)

        # The chart's frame (subplots, trace styles) is built once with plotly, then kept as
        # a plain dict; each change fills in the traces' data as plain dicts and shows them
        # with a PlotView (no plotly objects per change; see kit.panels.plot_view).
        fig = make_subplots(
            rows=2, cols=1, shared_xaxes=True, row_heights=[0.64, 0.36], vertical_spacing=0.07,
            subplot_titles=("pump curves on the system band", "NPSH available and required"))
        fig.update_layout(height=860,
                          margin=dict(l=70, r=20, t=50, b=150),
                          # the legend in the bottom margin (container coordinates): it
                          # never covers the flow axis title, whatever the chart's height
                          legend=dict(orientation="h", x=0.0, y=0.0, yanchor="bottom",
                                      yref="container"),
                          hovermode="closest")
        self._build_traces(go, fig)
        frame = plain(fig.to_plotly_json())
        frame["layout"].pop("template", None)
        self._frame = frame
        self._shown: dict = {}
        self.plot = PlotView()
        self._draw()
        self.candidates = widgets.HTML("")
        self.candidates.add_class("hl-candidates")
        self.points_table = widgets.HTML("")
        self.points_table.add_class("hl-points")
        self.control_table = widgets.HTML("")
        self.control_table.add_class("hl-control")
        #: pressure along the lines at each band condition (a PlotView)
        self.profile_plot = PlotView()
        #: the pump set, staging chart, steps and energy (kit.panels.pump_duties)
        self.duties = PumpDutiesView(None, self.display)
        lp = self.scenario.doc.get("load_profile") or {}
        #: the load profile, editable (written into [load_profile] on each accepted edit)
        self.load_profile = LoadProfileEditor(lp.get("flow", []), lp.get("hours", []),
                                              system=self.display)
        self.findings = FindingsView(topics=CAUTION_TOPICS, system=self.display)
        #: The workspace's one-line status: the recommended pump's verdict, operating flow,
        #: flow against the BEP flow and least NPSH margin (CSS ``hl-ps-status``).
        self.status = widgets.HTML("")
        self.status.add_class("hl-ps-status")
        self._workspace = None
        self.refusals = Refusals((self.plot, self.candidates, self.points_table,
                                  self.control_table, self.findings, self.status,
                                  self.profile_plot, self.duties),
                                 system=lambda: self.display)
        self._later.refusals = self.refusals    # a bug in the deferred study is shown there
        #: The banner over the results: what is refused and that the results are stale
        #: (CSS ``hl-stale-banner``, ``hl-app-message``).
        self.message = self.refusals.banner

        self.inputs = widgets.VBox([
            self.style,
            widgets.HTML("<b>Liquid</b>"), self.t_min, self.t_max,
            widgets.HTML("<b>Candidate pumps</b>"), self.choice, self.editor, self.message,
            widgets.HTML("<b>The pumped system</b>"), self.system_inputs.view])
        self.inputs.add_class("hl-pump-inputs")
        self.chart = widgets.VBox([self.message, self.plot])
        self.chart.add_class("hl-pump-chart")
        self.comparison = widgets.VBox([
            self.style, self.message, widgets.HTML("<b>Candidates over the band</b>"), self.candidates,
            widgets.HTML("<b>Every operating point</b>"), self.points_table])
        self.control_view = widgets.VBox([self.style, self.control_table])
        self.profile_view = widgets.VBox([self.message, self.profile_plot])
        self.profile_view.add_class("hl-line-profile")
        #: set composition and the load profile (the inputs of the staging study)
        self.set_view = widgets.VBox([self.style, self.message, self.duties.composition,
                                      self.duties.set_chart])
        #: the staging chart and steps, and the energy per strategy
        self.staging_view = widgets.VBox([self.style, self.message, self.duties.chart,
                                          self.duties.steps])
        self.energy_view = widgets.VBox([self.style, self.message, self.load_profile,
                                         self.duties.energy, self.duties.checks])
        self.switch = DisplaySwitch([], system=self.display)
        self.save_row = SaveRow(self.to_scenario, default_save_path(scenario))
        self.save_view = widgets.VBox([
            widgets.HTML("<b>Save the inputs</b> <span class='hl-note'>(the liquid "
                         "temperatures and every pump as edited, written into a scenario file; "
                         "other keys kept as they were)</span>"), self.save_row])
        super().__init__([self.switch, self.inputs, self.chart, self.comparison,
                          self.control_view, self.profile_view, self.set_view,
                          self.staging_view, self.energy_view, self.findings, self.save_view])
        for w in (self, self.inputs, self.comparison, self.control_view, self.save_view,
                  self.set_view, self.staging_view, self.energy_view):
            w.add_class("hl-pump-app")
        self.switch.targets.append(self)
        self._render()
        self._wire()

    # ------------------------------------------------------------------ wiring
    def _wire(self) -> None:
        self.t_min.observe(self._on_temperature, names="value")
        self.t_max.observe(self._on_temperature, names="value")
        self.editor.observe(self._on_pump, names="value")
        self.choice.observe(self._on_choice, names="value")
        self.system_inputs.observe(self._on_system)
        self.load_profile.observe(self._on_load_profile, names="value")

    def _on_load_profile(self, change) -> None:
        """A step of the load profile edited: written into ``[load_profile]``; the reader's
        refusal (a repeated flow, more than 8784 h a year) is shown beside the table."""
        if self._busy:
            return
        ed = self.load_profile

        def apply():
            if not ed.valid:
                raise InvalidInput("a load-profile box is refused (its message is beside it)")
            flows, hours = ed.texts
            try:
                scenario = pump_inputs.with_load_profile(self.scenario, flows, hours)
                return self._run(scenario, self.pumps, quick=True)
            except KIT_ERRORS as exc:
                raise Refusal(ed, str(exc)) from exc

        self._accept(self.refusals.attempt(apply))

    def _on_temperature(self, change) -> None:
        if self._busy:
            return
        edited = change["owner"] if change.get("owner") in (self.t_min, self.t_max) \
            else self.t_max

        def apply():
            for f in (self.t_min, self.t_max):
                if f.value is None:
                    raise InvalidInput(f.error or f"'{f.field}' is not a temperature yet")
            try:   # a refusal of the writer or of the study is the edited field's
                scenario = pump_inputs.with_temperatures(self.scenario, self.t_min.text,
                                                         self.t_max.text)
                return self._run(scenario, self.pumps, quick=True)
            except KIT_ERRORS as exc:
                raise Refusal(edited, edited.explain_any(exc)) from exc

        self._accept(self.refusals.attempt(apply))

    def _on_pump(self, change) -> None:
        if self._busy:
            return
        i = int(self.choice.value)

        def apply():
            if self.editor.value is None:
                raise InvalidInput(self.editor.error or "a datasheet point is refused")
            try:
                scenario = pump_inputs.with_pump(self.scenario, i, self.editor.doc)
            except KIT_ERRORS as exc:
                raise Refusal(self.editor, str(exc)) from exc
            pumps = list(self.pumps)
            pumps[i] = self.editor.value
            return self._run(scenario, pumps, quick=True)

        self._accept(self.refusals.attempt(apply))

    def _on_system(self, change) -> None:
        """An input of the pumped system (duty, ends, lines, operation) written back at its
        key; a refusal is shown at the field (a text box) or in the banner."""
        if self._busy:
            return
        w = change["owner"]
        inputs = self.system_inputs

        def apply():
            if isinstance(w, QuantityField) and not w.valid:
                raise InvalidInput(w.error)
            try:
                value = inputs.doc_value(w, self.scenario.doc)
            except KIT_ERRORS as exc:      # a picker or fitting row shows its own message
                raise InvalidInput(str(exc)) from exc
            try:
                scenario = with_values(self.scenario, {inputs.keys[w]: value})
                return self._run(scenario, self.pumps, quick=True)
            except KIT_ERRORS as exc:
                if isinstance(w, QuantityField):
                    raise Refusal(w, w.explain_any(exc)) from exc
                raise

        self._accept(self.refusals.attempt(apply))

    def _on_choice(self, change) -> None:
        self._busy = True
        try:
            self.editor.load(self.scenario.doc["pumps"][int(change["new"])])
        finally:
            self._busy = False

    # ------------------------------------------------------------------ computing
    def _run(self, scenario, pumps, quick: bool = False, preview=None):
        """(scenario, pumps, study, results): the study and its results taken from the last
        :data:`STUDY_CACHE_SIZE` computations when the scenario's document and the pumps
        are the same (both are pure functions of those), else computed and kept.

        ``quick`` (an edit, in a kernel): a study not in the cache is started with
        :func:`kit.studies.pump_selection.preview` only, returned as a :class:`_Quick`; the
        app draws the pump chart from it and finishes the study from the kernel's event
        loop (:meth:`_schedule`). ``preview``: the preview of these inputs, reused."""
        key = _study_key(scenario, pumps)
        if key is not None:
            for k, (seen, out) in enumerate(self._cache):
                if seen == key:
                    self._cache.append(self._cache.pop(k))
                    return (scenario, pumps, *out)
        if quick and kernel_loop() is not None:
            return _Quick(scenario, pumps, ps.preview(scenario, pumps))
        study = ps.study(scenario, pumps=pumps, preview=preview)
        out = (study, ps.results_of(scenario, study))
        self.recomputes += 1
        if key is not None:
            self._cache = [*self._cache[-(STUDY_CACHE_SIZE - 1):], (key, out)]
        return (scenario, pumps, *out)

    def _accept(self, out) -> None:
        """Keep an accepted (scenario, pumps, study, results) and redraw; a :class:`_Quick`:
        keep its inputs, draw the pump chart from its preview and finish the study from the
        event loop; None: refused."""
        if out is None:
            self._cancel()      # a study of an earlier edit must not clear this refusal
            return
        if isinstance(out, _Quick):
            self.scenario, self.pumps = out.scenario, out.pumps
            self._draw(out.preview)
            self._pending = out
            self._schedule()
            return
        self._cancel()
        self.scenario, self.pumps, self.study, self.results = out
        self._accepted = (self.scenario, self.pumps)
        self._render()

    # ------------------------------------------------------------- the deferred study
    def _schedule(self) -> None:
        """Finish the pending study from the kernel's event loop :data:`STUDY_DELAY`
        seconds from now (the kernel answers the edit and the browser draws the pump chart
        first); a newer edit in between replaces the one waiting."""
        loop = kernel_loop()
        if loop is None:
            self._finish()
            return
        self._later.start(loop, STUDY_DELAY)

    def _cancel(self) -> None:
        self._pending = None
        self._later.cancel()

    @property
    def pending(self) -> bool:
        """True while an edit's study waits to be finished (in a kernel, for a moment)."""
        return self._pending is not None

    def _finish(self) -> None:
        """Finish the pending study and redraw everything; a refusal of the study puts the
        last accepted inputs and results back (the chart drawn from the preview too)."""
        q = self._pending
        if q is None:
            return
        self._pending = None
        self._later.cancel()
        out = self.refusals.attempt(
            lambda: self._run(q.scenario, q.pumps, preview=q.preview))
        if out is None:
            self.scenario, self.pumps = self._accepted
            self._draw()
            return
        self._accept(out)

    @property
    def study(self):
        """The study of the accepted inputs (an edit's pending study is finished first)."""
        self._finish()
        return self._study

    @study.setter
    def study(self, value) -> None:
        self._study = value

    @property
    def results(self):
        """The :class:`kit.results.Results` of :attr:`study` (finished first, as there)."""
        self._finish()
        return self._results

    @results.setter
    def results(self, value) -> None:
        self._results = value

    # ------------------------------------------------------------------ drawing
    def _build_traces(self, go, fig) -> None:
        n_cond = len(self.study.band.conditions)
        grey = "rgba(90,90,90,0.55)"
        fig.add_trace(go.Scatter(name="system band, lowest", mode="lines", showlegend=False,
                                 line=dict(color=grey, width=1), hoverinfo="skip"), 1, 1)
        fig.add_trace(go.Scatter(name=f"system band ({n_cond} curves)", mode="lines",
                                 fill="tonexty", fillcolor="rgba(120,120,120,0.18)",
                                 line=dict(color=grey, width=1), hoverinfo="skip"), 1, 1)
        # every condition's curve in one trace, the curves apart by a gap (NaN): one trace
        # to draw instead of one per condition; the hover names the condition
        fig.add_trace(go.Scatter(name="system curves, each condition", mode="lines",
                                 showlegend=False, line=dict(color=grey, width=0.7, dash="dot"),
                                 hovertemplate="%{text}<extra></extra>"), 1, 1)
        fig.add_trace(go.Scatter(name="required flow", mode="lines",
                                 line=dict(color="black", width=1.2, dash="dash")), 1, 1)
        for k, pump in enumerate(self.pumps):
            c = PUMP_COLOURS[k % len(PUMP_COLOURS)]
            fig.add_trace(go.Scatter(name=f"{pump.name}: POR", mode="lines", legendgroup=f"p{k}",
                                     line=dict(color=c, width=9), opacity=0.3,
                                     hoverinfo="skip"), 1, 1)
            fig.add_trace(go.Scatter(name=pump.name, mode="lines", legendgroup=f"p{k}",
                                     line=dict(color=c, width=2)), 1, 1)
            fig.add_trace(go.Scatter(name=f"{pump.name}: operating points", mode="markers",
                                     legendgroup=f"p{k}", showlegend=False,
                                     marker=dict(color=c, size=9, symbol="circle",
                                                 line=dict(color="white", width=1)),
                                     hovertemplate="%{text}<extra></extra>"), 1, 1)
        fig.add_trace(go.Scatter(name="NPSHa, least", mode="lines", showlegend=False,
                                 line=dict(color="#555", width=1), hoverinfo="skip"), 2, 1)
        fig.add_trace(go.Scatter(name="NPSH available (band)", mode="lines", fill="tonexty",
                                 fillcolor="rgba(60,140,200,0.20)",
                                 line=dict(color="#555", width=1), hoverinfo="skip"), 2, 1)
        for k, pump in enumerate(self.pumps):
            c = PUMP_COLOURS[k % len(PUMP_COLOURS)]
            fig.add_trace(go.Scatter(name=f"{pump.name}: NPSHr", mode="lines",
                                     legendgroup=f"p{k}", showlegend=False,
                                     line=dict(color=c, width=2, dash="dash")), 2, 1)
            fig.add_trace(go.Scatter(name=f"{pump.name}: NPSHa at operating points",
                                     mode="markers", legendgroup=f"p{k}", showlegend=False,
                                     marker=dict(color=c, size=8, symbol="x"),
                                     hovertemplate="%{text}<extra></extra>"), 2, 1)

    def _render(self) -> None:
        self._draw()
        self._render_status()
        self._tables()
        s = self.study
        self.duties.show(s.duties, currency=s.currency, tariff=s.tariff)
        self.profile_plot.show(profile_spec(s, self.display))
        fs = sorted(self.results.findings, key=lambda f: -Severity(f.severity).rank)
        self.findings.show(fs)

    def _draw(self, s=None) -> None:
        """Show the pump chart of the study (or of ``s``, a preview of the edit's study)."""
        s = s if s is not None else self.study
        sysm = self.display
        band = s.band

        def fx(q):
            return _shown(q, "flow", sysm)

        def fh(h):
            return _shown(h, "head", sysm)

        Q = band.Q
        data = [(Q, band.lower), (Q, band.upper)]
        # each condition's dotted curve on every 4th grid flow and the last (61 of 241:
        # the curves are smooth; the band's edges keep every flow)
        pick = np.unique(np.r_[np.arange(0, len(Q), 4), len(Q) - 1])
        gap = np.array([np.nan])
        n_cond = len(band.conditions)
        data.append((np.concatenate([np.r_[Q[pick], gap] for _ in range(n_cond)]),
                     np.concatenate([np.r_[band.H[i][pick], gap] for i in range(n_cond)])))
        texts = {2: [t for c in band.conditions
                     for t in [html.escape(c.label)] * len(pick) + [""]]}
        h_top = max(float(np.max(band.upper)), max(p.shutoff_head for p in s.pumps))
        if s.required_flow is not None:
            data.append((np.array([s.required_flow, s.required_flow]),
                         np.array([0.0, 1.5 * h_top])))
        else:
            data.append((np.array([]), np.array([])))
        por = BEP_REGIONS["low_specific_speed"]["por"]
        for pump in s.pumps:
            Qp = np.linspace(0.0, pump.q_end, 121)
            if getattr(pump, "has_efficiency", False):
                qb = pump.bep[0]
                qs = np.linspace(max(por[0] * qb, 0.0), min(por[1] * qb, pump.q_end), 41)
                data.append((qs, pump.head(qs)))
            else:
                data.append((np.array([]), np.array([])))
            data.append((Qp, pump.head(Qp)))
            good = s.good(pump.name)
            data.append((np.array([p.Q for p in good]), np.array([p.H for p in good])))
            texts[len(data) - 1] = [self._hover(pump.name, p) for p in good]
        data.append((Q, s.npsha.min(axis=0)))
        data.append((Q, s.npsha.max(axis=0)))
        n_top = float(np.max(s.npsha))
        for pump in s.pumps:
            Qp = np.linspace(0.0, pump.q_end, 121)
            if getattr(pump, "has_npshr", False):
                r = pump.npshr(Qp)
                n_top = max(n_top, float(np.max(r)))
                data.append((Qp, r))
            else:
                data.append((np.array([]), np.array([])))
            good = s.good(pump.name)
            data.append((np.array([p.Q for p in good]), np.array([p.npsha for p in good])))
            texts[len(data) - 1] = [self._hover(pump.name, p) for p in good]
        frame = self._frame
        traces = []
        for i, (base, (x, y)) in enumerate(zip(frame["data"], data, strict=True)):
            tr = dict(base)
            tr["x"], tr["y"] = packed(fx(x)), packed(fh(y))
            if i in texts:
                tr["text"] = texts[i]
            traces.append(tr)
        q_top = max(float(Q[-1]), max(p.q_end for p in s.pumps))
        # one range for both rows, from this system's numbers
        x_range = [0, _nice_top(float(fx(q_top)) * 1.02)]
        base = frame["layout"]
        layout = dict(base)
        # every axis with a fixed range (autorange off): when only trace x and y change, the
        # browser can move the paths without a full redraw (kit/panels/plot_view.js)
        layout["xaxis"] = {**base["xaxis"], "autorange": False, "range": x_range}
        layout["xaxis2"] = {**base["xaxis2"], "autorange": False, "range": x_range,
                            "title": {"text": f"flow [{unit_label('flow', sysm)}]"}}
        y_top = _nice_top(float(fh(1.08 * h_top)))
        n_range = [0, _nice_top(float(fh(1.15 * n_top)))]
        layout["yaxis"] = {**base["yaxis"], "autorange": False, "range": [0, y_top],
                           "title": {"text": f"head [{unit_label('head', sysm)}]"}}
        layout["yaxis2"] = {**base["yaxis2"], "autorange": False, "range": n_range,
                            "title": {"text": f"NPSH [{unit_label('head', sysm)}]"}}
        self._shown = {"data": traces, "layout": layout}
        self.plot.show(self._shown)

    def _render_status(self) -> None:
        """The status line: the recommended pump (or the best-ranked one when none passes)
        with its operating flow over the band, Q/Q_BEP and least NPSH margin."""
        s, sysm = self.study, self.display
        rows = s.candidate_rows()
        if not rows:
            self.status.value = "no candidate pump"
            return
        row = next((r for r in rows if r["pump"] == s.recommended), None)
        lead = "recommended " if row is not None else "no candidate passes; "
        row = row or min(rows, key=lambda r: Severity(r["verdict"]).rank)

        def rng(a, b, kind):
            if a is None:
                return "—"
            lo, hi = row.get(a), row.get(b)
            if lo is None:
                return "—"
            one = units.fmt(lo, kind, sysm) if kind else f"{lo:.2f}"
            if hi is None or abs(hi - lo) <= 1e-9 * max(abs(hi), 1.0):
                return one
            two = units.fmt(hi, kind, sysm) if kind else f"{hi:.2f}"
            return f"{one.split(' ')[0]}–{two}" if kind else f"{one}–{two}"

        parts = [f"{lead}{row['pump']}", f"flow {rng('Q_min', 'Q_max', 'flow')}",
                 f"Q/Q_BEP {rng('bep_min', 'bep_max', None)}",
                 "NPSH margin " + (units.fmt(row["npsh_margin"], "head", sysm)
                                   if row.get("npsh_margin") is not None else "—")]
        self.status.value = status_html(parts, row["verdict"])

    @property
    def workspace(self):
        """The workspace view (:class:`kit.panels.workspace.Workspace`): the liquid and the
        pump datasheets in collapsible sections beside the pump chart, the status line above
        it, the tables, control comparison, findings and save row in tabs under it."""
        if self._workspace is None:
            from kit.panels.workspace import Section, Workspace

            sys_in = self.system_inputs.sections
            sections = [sys_in[0], Section("Liquid", [self.t_min, self.t_max]),
                        Section("Pump datasheets", [self.choice, self.editor]), *sys_in[1:]]
            tabs = [("Candidates", self.candidates), ("Operating points", self.points_table),
                    ("Throttling or speed", self.control_table),
                    ("Line pressure", self.profile_plot),
                    ("Pump set and staging", widgets.VBox([self.duties.composition,
                                                           self.duties.set_chart,
                                                           self.duties.chart,
                                                           self.duties.steps])),
                    ("Load and energy", widgets.VBox([self.load_profile, self.duties.energy,
                                                      self.duties.checks])),
                    ("Findings", self.findings), ("Save", self.save_row)]
            ws = Workspace(sections, self.plot, self.status, tabs,
                           header=[self.style, self.switch, self.message])
            ws.add_class("hl-pump-app")
            ws.add_class("hl-workspace-pump-selection")
            self._workspace = ws
        return self._workspace

    def _hover(self, name: str, p) -> str:
        sysm = self.display
        parts = [f"<b>{html.escape(name)}</b>", html.escape(p.label),
                 f"Q = {units.fmt(p.Q, 'flow', sysm)}, H = {units.fmt(p.H, 'head', sysm)}"]
        if np.isfinite(p.efficiency):
            parts.append(f"efficiency {p.efficiency * 100:.1f} %, Q/Q_BEP {p.bep_fraction:.2f}")
        if np.isfinite(p.npshr):
            parts.append(f"NPSHa {units.fmt(p.npsha, 'head', sysm)}, "
                         f"NPSHr {units.fmt(p.npshr, 'head', sysm)}")
        return "<br>".join(parts)

    def _tables(self) -> None:
        s, sysm = self.study, self.display
        rows = []
        for row in s.candidate_rows():
            r = dict(row)
            v = row["verdict"].upper()
            r["verdict_text"] = v + (" (recommended)" if row["pump"] == s.recommended else "")
            if row.get("energy_kWh") is not None:
                r["energy"] = row["energy_kWh"] * 3.6e6
            rows.append(r)
        cap = ("each pump over the 8 conditions of the band (static head × liquid temperature "
               "× pipe condition); energy and cost at the mean power drawn over the band, "
               f"{s.hours:g} h a year")
        rec = (f"<div class='hl-recommended'>Recommended: <b>{html.escape(s.recommended)}</b> "
               "(passes every check, least energy among those that pass)</div>"
               if s.recommended else
               "<div class='hl-recommended'><b>No candidate passes every check.</b></div>")
        self.candidates.value = candidates_html(rows, sysm, caption=cap) + rec
        self.points_table.value = results_table_html(s.point_rows(), POINT_COLUMNS, sysm)
        self.control_table.value = self._control_html()

    def _control_html(self) -> str:
        s, sysm = self.study, self.display
        if s.control is None:
            why = ("no candidate passes every check" if s.recommended is None else
                   "no required flow or running hours in the scenario, or the duty cannot be met")
            return (f"<b>Throttling against speed control</b><div>Not compared: "
                    f"{html.escape(why)}.</div>")
        c = s.control
        rows = [{"method": "throttling valve, full speed", "speed": c.throttle.speed_rpm,
                 "Q": c.throttle.Q, "H_pump": c.throttle.H_pump,
                 "valve_head": c.throttle.valve_head, "eta": c.throttle.efficiency,
                 "shaft_power": c.throttle.shaft_power, "input_power": c.throttle.input_power,
                 "energy": c.throttle.annual_energy},
                {"method": "variable speed drive", "speed": c.speed.speed_rpm, "Q": c.speed.Q,
                 "H_pump": c.speed.H_pump, "valve_head": c.speed.valve_head,
                 "eta": c.speed.efficiency, "shaft_power": c.speed.shaft_power,
                 "input_power": c.speed.input_power, "energy": c.speed.annual_energy}]
        saving = c.saving_kWh
        cost = saving * s.tariff
        head = (f"<b>Throttling against speed control</b> — {html.escape(s.recommended)} at the "
                f"required flow {html.escape(units.fmt(c.Q_req, 'flow', sysm))} on the system "
                f"curve '{html.escape(s.control_label or '')}' (the highest head at that flow)")
        tail = (f"<div>Speed control saves {saving:,.0f} kWh a year "
                f"({html.escape(s.currency)} {cost:,.0f} at {s.tariff:g} per kWh); drive "
                f"losses {100 * (1 - c.speed.drive_efficiency):.1f} % (fluids.VFD_efficiency, "
                "generic PWM drive table). Efficiency is moved along the affinity parabola, "
                "which flatters speed control at low speed ratios.</div>")
        return head + results_table_html(rows, CONTROL_COLUMNS, sysm) + tail

    # ------------------------------------------------------------------ public helpers
    def to_scenario(self):
        """A copy of the working scenario: the original with the liquid temperatures and
        every pump's datasheet points as accepted from the panels (strings with units, as
        typed). Raises the kit's error while a temperature or the pump being edited is
        invalid (the working copy then still holds the last accepted values). An edit whose
        study is pending is finished first (a refusal found by the study is not saved)."""
        self._finish()
        for f in (self.t_min, self.t_max, *self.system_inputs.fields):
            if not f.valid or (f.value is None and not f.optional):
                raise InputError(f.field, f.text, f"cannot be saved: {f.error or 'not valid'}")
        if self.load_profile.rows and not self.load_profile.valid:
            raise InputError("load profile", "", "has a step refused (see beside the table); "
                             "it cannot be saved")
        if self.editor.value is None:
            name = self.pumps[int(self.choice.value)].name
            raise InputError(f"pump '{name}'", "", "has an input refused (see beside the "
                             "table); it cannot be saved")
        return self.scenario.copy()

    def set_system(self, system: str) -> None:
        """Show every chart and table in 'SI' or 'US' (inputs keep their text)."""
        self.display = check_system(system)
        for w in (self.t_min, self.t_max, self.editor):
            w.set_system(system)
        self.system_inputs.set_system(system)
        self.load_profile.set_system(system)
        self.duties.system = system
        self.findings.set_system(system)
        self._render()

    @property
    def figure(self):
        """The head and NPSH chart as shown, a static plotly ``Figure`` (built on each read)."""
        return as_figure(self._shown)

    def static_figures(self) -> list:
        """The charts as static ``plotly.graph_objects.Figure`` objects (for the record): the
        pump curves on the band with NPSH, the pressure along the lines at each band
        condition, and — when the scenario has them — the staging chart, the unlike units'
        combined curve and the viscosity correction."""
        fig = self.figure
        fig.update_layout(title=dict(text=f"{self.scenario.title}: pump curves, system band "
                                          "and NPSH"))
        out = [fig, profile_figure(self.study, self.display, title=(
            f"{self.scenario.title}: pressure along the suction and discharge lines"))]
        d = self.study.duties
        if d is not None and d.staging is not None:
            out.append(staging_figure(d, self.display, title=(
                f"{self.scenario.title}: staging along the system curve")))
        if d is not None and not d.identical:
            out.append(set_figure(d, self.display, title=(
                f"{self.scenario.title}: unlike units and their combined curve")))
        if d is not None and d.viscous:
            out.append(viscous_figure(d, self.display, title=(
                f"{self.scenario.title}: pump curves corrected for viscosity (ANSI/HI 9.6.7, "
                "from memory)")))
        return out

    def summary_text(self) -> str:
        """The scenario's text summary (kit.textout.summary) for the current results."""
        from kit.textout import summary

        return summary(self.scenario, self.results, self.display)

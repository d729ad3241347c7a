"""The network notebook's composite: node and link tables, the schematic, the network curve
against the pump, result tables, findings and the record.

:class:`NetworkApp` holds a working copy of a ``network`` scenario. Its inputs — the liquid
temperature band, the fixed heads (levels and surface pressures), the node table and the link
table (:mod:`kit.panels.network_editor`) — are written back into a copy of the document
(strings with units, as typed), checked against the schema by
:func:`kit.inputs.network.with_doc`, and every change re-runs the study
(:func:`kit.studies.network.study`). Nothing here computes hydraulics.

A change is shown in two steps, so the schematic follows the edit at once (in a kernel the
second runs from its event loop just after the first, :data:`STUDY_DELAY`; a newer edit in
between replaces it; in plain Python both run at once):

1. **the design solution**: the network at the design condition, with the balancing valves
   set to their design flows exactly as the study sets them
   (:func:`kit.core.network.balance`, then :meth:`~kit.core.network.Network.solve`), drawn on
   the schematic (the index circuit of the last study kept until the next is known);
2. **the study**: the band, the valve sizing, the network curve, the index circuit, the
   integrity screen and the findings; every view is then redrawn from it.

A refused input is marked at its own field (a text box, or a row of a table with the message
beside it) and every result is marked stale until the next accepted edit
(:class:`kit.panels.base.Refusals`); a new row left blank stays out of the study.

Sections (each a widget the notebook shows in its own cell): ``inputs_view`` (liquid, fixed
heads, nodes, links; CSS ``hl-network-inputs``), ``schematic_view`` (``hl-network-schematic``),
``curve_view`` (``hl-network-curve``), ``tables`` (``hl-network-tables``), ``findings``
(``hl-network-findings``), ``save_view`` (``hl-save``); ``workspace`` shows them on one
screen.

Example
-------
>>> from kit.notebook import open_scenario
>>> app = NetworkApp(open_scenario("fenwick_yard_chilled_water.toml"))
>>> app.study.pump, len(app.study.index_circuit) > 0
('CHWP-1', True)
"""

from __future__ import annotations

import copy
import html

import ipywidgets as widgets
import numpy as np

from kit import units
from kit.core.findings import Severity
from kit.errors import InputError
from kit.inputs import network as network_inputs
from kit.panels.base import InvalidInput, Later, Refusals, check_system, kernel_loop
from kit.panels.charts import to_display
from kit.panels.display import DisplaySwitch
from kit.panels.fields import QuantityField
from kit.panels.findings_view import FindingsView
from kit.panels.network_editor import LinkTable, NodeTable, key_position
from kit.panels.network_schematic import NetworkSchematic
from kit.panels.network_tables import NetworkTables
from kit.panels.plot_view import PlotView
from kit.panels.scenario_text import SaveRow, default_save_path, field_text
from kit.panels.tables import unit_label
from kit.panels.workspace import status_html
from kit.studies import network as ns

__all__ = ["NetworkApp", "CAUTION_TOPICS", "STUDY_DELAY", "design_solution", "curve_figure",
           "pump_of"]

#: Seconds between an edit's schematic and the start of its study, in a kernel.
STUDY_DELAY = 0.1

#: Caution topics the findings view shows.
CAUTION_TOPICS = ("pressure", "water_hammer", "vacuum", "cavitation", "pump")

_STYLE = """<style>
.hl-network-app table.hl-results{border-collapse:collapse;font-size:0.88em;margin:4px 0}
.hl-network-app table.hl-results td,.hl-network-app table.hl-results th{border:1px solid #ccc;
 padding:2px 6px;text-align:left;vertical-align:top}
.hl-network-app table.hl-results th{background:#f2f2f2}
.hl-network-app .hl-node-row .hl-label,.hl-network-app .hl-link-row .hl-label{min-width:0 !important}
.hl-network-app .hl-link-row,.hl-network-app .hl-node-row{border-bottom:1px solid #eee;
 padding:1px 0}
</style>"""

_CURVE_COLOUR = "#1f4e9c"
_BAND = "rgba(90,90,90,0.55)"


def pump_of(inp) -> str | None:
    """The pump link the study balances against and draws the curve for: ``[curve] pump``,
    else the only pump link, else None."""
    from kit.core.network import PumpLink

    if inp.curve.pump:
        return inp.curve.pump
    pumps = [k.name for k in inp.links if isinstance(k, PumpLink)]
    return pumps[0] if len(pumps) == 1 else None


def design_solution(inp, balanced: bool = True):
    """(network, solution) at the design condition of typed network inputs, the balancing
    valves set as the study sets them (:func:`kit.core.network.balance` to their design
    flows, the index valve fully open; left fully open where balancing is not possible).

    The first part of :func:`kit.studies.network.study`, for a quick redraw of the schematic;
    a test checks that both give the same solution.
    """
    from kit.core.network import balance
    from kit.errors import NoSolutionError

    band = inp.band
    settings = {k: b.kv for k, b in inp.balancing_valves.items() if b.kv is not None}
    pump = pump_of(inp)
    if balanced and inp.balancing and pump is not None:
        base = inp.network(band.design_condition, inp.design_T)
        try:
            settings.update(balance(base, inp.balancing, pump, levels=band.design_level).kv)
        except (InputError, NoSolutionError):
            pass
    net = inp.network(band.design_condition, inp.design_T, settings)
    return net, net.solve(band.design_level)


def _nice_top(x: float) -> float:
    if not np.isfinite(x) or x <= 0:
        return 1.0
    e = 10 ** np.floor(np.log10(x))
    for m in (1.0, 1.2, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0):
        if m * e >= x:
            return float(m * e)
    return float(10 * e)


def curve_figure(study, system: str = "SI", title: str = "") -> dict:
    """The network curve over its band against the pump curve, with the design point, as
    plotly figure JSON (display units, fixed axis ranges)."""
    d = study.design
    c = study.curve
    pump = study.pump
    data = []

    def fx(q):
        return to_display(q, "flow", system)

    def fh(h):
        return to_display(h, "head", system)

    q_top, h_top = 0.0, 0.0
    if c is not None:
        data.append(dict(type="scatter", name="band, lowest", x=fx(c.Q), y=fh(c.lower),
                         mode="lines", line=dict(color=_BAND, width=1), showlegend=False,
                         hoverinfo="skip"))
        data.append(dict(type="scatter", name=f"network curve band ({len(c.labels)} cases)",
                         x=fx(c.Q), y=fh(c.upper), mode="lines", fill="tonexty",
                         fillcolor="rgba(120,120,120,0.18)", line=dict(color=_BAND, width=1),
                         hoverinfo="skip"))
        for m, lab in enumerate(c.labels):
            data.append(dict(type="scatter", name=f"network: {lab}", x=fx(c.Q), y=fh(c.H[m]),
                             mode="lines", showlegend=False,
                             line=dict(color=_BAND, width=0.7, dash="dot"),
                             hovertemplate=f"{html.escape(lab)}<extra></extra>"))
        q_top = float(c.Q[-1])
        h_top = float(np.nanmax(c.upper)) if np.isfinite(c.upper).any() else 0.0
    if pump is not None:
        k = d.net.link(pump)
        q_end = float(getattr(k.curve, "q_end", q_top or 0.01))
        q = np.linspace(0.0, q_end, 81)
        data.append(dict(type="scatter", name=f"pump {pump}", x=fx(q), y=fh(k.curve.head(q)),
                         mode="lines", line=dict(color=_CURVE_COLOUR, width=2.5)))
        q_top = max(q_top, q_end)
        h_top = max(h_top, float(k.curve.shutoff_head))
        i = d.link_names.index(pump)
        qd, hd = float(d.Q[i]), float(-d.head_loss[i])
        data.append(dict(type="scatter", name="design point", x=fx([qd]), y=fh([hd]),
                         mode="markers", marker=dict(color="#c0392b", size=11,
                                                     line=dict(color="white", width=1)),
                         hovertemplate=(f"design ({html.escape(study.design_label)})<br>"
                                        f"Q = {units.fmt(qd, 'flow', system)}, "
                                        f"H = {units.fmt(hd, 'head', system)}<extra></extra>")))
    note = study.curve_note if c is None else ""
    layout = dict(
        title=dict(text=html.escape(title or ("network curve against the pump" if not note
                                              else note))),
        height=420, margin=dict(l=70, r=20, t=50, b=90), hovermode="closest",
        legend=dict(orientation="h", x=0.0, y=-0.22),
        xaxis=dict(title=dict(text=f"flow [{unit_label('flow', system)}]"),
                   range=[0.0, _nice_top(float(fx(q_top)) * 1.02)], autorange=False),
        yaxis=dict(title=dict(text=f"head [{unit_label('head', system)}]"),
                   range=[0.0, _nice_top(float(fh(h_top)) * 1.08)], autorange=False))
    return {"data": data, "layout": layout}


class NetworkApp(widgets.VBox):
    """A network's inputs, schematic, curve, tables and findings (see the module docstring).

    Parameters
    ----------
    scenario : kit.scenario.Scenario
        A ``network`` scenario (a working copy is kept; the original is not changed).
    system : str, optional
        Display system, 'SI' or 'US' (default the scenario's).

    Attributes
    ----------
    scenario : Scenario
        The working copy, every accepted edit written back.
    study : kit.studies.network.NetworkStudy
        The last study run.
    results : kit.results.Results
        Its results (record and text summary).
    design : NetworkResult
        The design solution shown on the schematic (the study's, or a newer one while the
        study runs).
    nodes, links : NodeTable, LinkTable
    t_min, t_max : QuantityField
        The liquid temperature band (CSS ``hl-temp-min``, ``hl-temp-max``).
    boundary_fields : dict
        Scenario key (``"boundary.0.pressure"``) -> its QuantityField.
    schematic : NetworkSchematic
    curve_plot : PlotView
    tables : NetworkTables
    findings : FindingsView
    message : ipywidgets.HTML
        The banner over the results while an input is refused (``hl-app-message``).
    """

    def __init__(self, scenario, system: str | None = None):
        self.scenario = scenario.copy()
        self.original = scenario
        self.display = check_system(system or scenario.display_system)
        self.study = ns.study(self.scenario)
        self.results = ns.results_of(self.scenario, self.study)
        self.design = self.study.design
        self.net = self.study.network
        self._busy = False
        self._pending = None
        p_baro = float(self.study.inputs.p_baro)
        doc = self.scenario.doc

        liq = doc.get("liquid", {})
        self.t_min = QuantityField("temperature", "lowest", system=self.display,
                                   text=str(liq.get("temperature_min",
                                                    liq.get("temperature", ""))),
                                   field="lowest liquid temperature", width="8em")
        self.t_max = QuantityField("temperature", "highest", system=self.display,
                                   text=str(liq.get("temperature_max",
                                                    liq.get("temperature", ""))),
                                   field="highest liquid temperature", width="8em")
        self.t_min.add_class("hl-temp-min")
        self.t_max.add_class("hl-temp-max")
        self.boundary_fields: dict = {}
        bparts = []
        for i, b in enumerate(doc.get("boundary", [])):
            bparts.append(widgets.HTML(f"<b>{html.escape(str(b.get('name', '')))}</b>"))
            keys = ["level"] if "level" in b else ["level_low", "level_high"]
            for k in keys + ["pressure"]:
                kind = "pressure" if k == "pressure" else "elevation"
                label = {"level": "level", "level_low": "level, lowest",
                         "level_high": "level, highest", "pressure": "surface pressure"}[k]
                f = QuantityField(kind, label, text=None if k not in b else str(b[k]),
                                  system=self.display, p_baro=p_baro, gauge=k == "pressure",
                                  optional=k == "pressure",
                                  field=f"{label} of '{b.get('name', '')}'", width="8em")
                f.add_class(f"hl-boundary-{k.replace('_', '-')}")
                self.boundary_fields[f"boundary.{i}.{k}"] = f
                bparts.append(f)
        self.nodes = NodeTable(doc.get("node", []), self.display, p_baro)
        self.links = LinkTable(doc.get("link", []), self.display, p_baro)

        self.style = widgets.HTML(_STYLE)
        self.schematic = NetworkSchematic(self.display, title=self.scenario.title)
        self.curve_plot = PlotView()
        self.curve_plot.add_class("hl-network-curve-plot")
        self.tables = NetworkTables(self.display)
        self.findings = FindingsView(topics=CAUTION_TOPICS, system=self.display)
        self.findings.add_class("hl-network-findings")
        self.status = widgets.HTML("")
        self.status.add_class("hl-network-status")
        self.notes = widgets.HTML("")
        self.notes.add_class("hl-network-notes")
        self.curve_view = widgets.VBox([self.curve_plot, self.notes])
        self.curve_view.add_class("hl-network-curve")
        # every results container, as each view shows it (the workspace's tabs hold the
        # tables one by one)
        t = self.tables
        self.refusals = Refusals((self.schematic, self.curve_view, self.curve_plot, t,
                                  t.links, t.nodes, t.valves, t.balancing, self.findings,
                                  self.status), locate=self._locate,
                                 system=lambda: self.display)
        #: the study of the last edit, left to the kernel's event loop (see _schedule)
        self._later = Later(self._finish, self.refusals)
        self.message = self.refusals.banner
        self.switch = DisplaySwitch([], system=self.display)
        self.save_row = SaveRow(self.to_scenario, default_save_path(scenario))

        self.liquid_view = widgets.VBox([widgets.HTML("<b>Liquid temperature band</b>"),
                                         self.t_min, self.t_max])
        self.boundary_view = widgets.VBox([widgets.HTML("<b>Fixed heads</b>"), *bparts])
        self.inputs_view = widgets.VBox([
            self.style, self.liquid_view, self.boundary_view,
            widgets.HTML("<b>Nodes</b> <span class='hl-note'>(elevation, demand drawn off, "
                         "minimum pressure gauge)</span>"), self.nodes,
            widgets.HTML("<b>Links</b> <span class='hl-note'>(positive flow runs from → to; "
                         "'details' opens the pipe, fittings and valve data)</span>"),
            self.links, self.message])
        self.inputs_view.add_class("hl-network-inputs")
        self.schematic_view = widgets.VBox([self.message, self.status, self.schematic])
        self.save_view = widgets.VBox([
            widgets.HTML("<b>Save the inputs</b> <span class='hl-note'>(the liquid band, fixed "
                         "heads, nodes and links as edited, written into a scenario file; "
                         "other keys kept as they were)</span>"), self.save_row])
        self._workspace = None
        super().__init__([self.switch, self.inputs_view, self.schematic_view, self.curve_view,
                          self.tables, self.findings, self.save_view])
        for w in (self, self.inputs_view, self.schematic_view, self.curve_view, self.tables,
                  self.save_view):
            w.add_class("hl-network-app")
        self.switch.targets.append(self)
        self._render()
        self._wire()

    @classmethod
    def from_scenario(cls, scenario, system: str | None = None) -> NetworkApp:
        """The app for ``scenario`` (same as the constructor)."""
        return cls(scenario, system)

    # ------------------------------------------------------------------ wiring
    def _wire(self) -> None:
        for f in (self.t_min, self.t_max, *self.boundary_fields.values()):
            f.observe(self._on_input, names="value")
        self.nodes.observe(self._on_input, names="value")
        self.links.observe(self._on_input, names="value")

    def _on_input(self, change=None) -> None:
        if self._busy:
            return
        self.apply()

    # ------------------------------------------------------------------ computing
    def edited_scenario(self):
        """The working scenario with every input as it stands, checked against the schema;
        :class:`~kit.panels.base.InvalidInput` while an input shows its own error."""
        # the node and link rows come from their tables (copied there), the rest from here
        doc = {k: (v if k in ("node", "link") else copy.deepcopy(v))
               for k, v in self.scenario.doc.items()}
        for f in (self.t_min, self.t_max, *self.boundary_fields.values()):
            if not f.valid:
                raise InvalidInput(f.error)
            if f.value is None and not f.optional:
                raise InvalidInput(f"'{f.field}' is required")
        liq = doc.setdefault("liquid", {})
        lo = field_text(self.t_min, liq.get("temperature_min", liq.get("temperature")))
        hi = field_text(self.t_max, liq.get("temperature_max", liq.get("temperature")))
        if "temperature" in liq and lo == hi:
            liq["temperature"] = lo
        else:
            liq.pop("temperature", None)
            liq["temperature_min"], liq["temperature_max"] = lo, hi
        for key, f in self.boundary_fields.items():
            _, i, k = key.split(".")
            row = doc["boundary"][int(i)]
            text = field_text(f, row.get(k) if isinstance(row.get(k), str) else None)
            if text is None:
                row.pop(k, None)
            else:
                row[k] = text
        for table, name in ((self.nodes, "node"), (self.links, "link")):
            if table.value is None:
                raise InvalidInput(table.error or f"a {name} row is refused")
            doc[name] = [copy.deepcopy(r) for r in table.value]
        return network_inputs.with_doc(self.scenario, doc)

    def apply(self) -> None:
        """Read every input; draw the design solution on the schematic, then run the study
        and redraw everything. A refusal marks its field and the results stale."""
        def quick():
            sc = self.edited_scenario()
            inp = network_inputs.inputs(sc)
            net, design = design_solution(inp)
            return sc, inp, net, design

        out = self.refusals.attempt(quick)
        if out is None:
            self._cancel()      # a study of an earlier edit must not clear this refusal
            return
        sc, inp, net, design = out
        self.net, self.design = net, design
        names = set(net.link_names)
        self.schematic.show(net, design, [n for n in self.study.index_circuit if n in names],
                            self.study.index_node if self.study.index_node in
                            set(net.node_names) else None)
        self._pending = (sc, inp)
        self._schedule()

    def _schedule(self) -> None:
        """Run the study now (no event loop: plain Python, tests) or, in a kernel, from its
        event loop :data:`STUDY_DELAY` seconds after the edit, so that the kernel answers the
        edit (and the browser draws the schematic) before the study's seconds of work; a newer
        edit in between replaces the one waiting."""
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
        """True while a study waits to run (in a kernel, between an edit and its study)."""
        return self._pending is not None

    def _finish(self) -> None:
        if self._pending is None:
            return
        sc, inp = self._pending
        self._pending = None
        self._later.cancel()
        full = self.refusals.attempt(lambda: self._run(sc, inp))
        if full is None:
            return
        self.scenario, self.study, self.results = full
        self.net, self.design = self.study.network, self.study.design
        self._render()

    @staticmethod
    def _run(sc, inp):
        s = ns.study(sc, inp)
        return sc, s, ns.results_of(sc, s)

    def recompute(self) -> None:
        """Re-run the study on the working scenario and redraw."""
        self.apply()

    def _locate(self, exc):
        """The input a kit error is about: a table's field or row, a boundary's field, a
        temperature; None for the banner."""
        w = self.links.locate(exc) or self.nodes.locate(exc)
        if w is not None:
            return w
        pos = key_position(exc)
        if pos is not None and pos[0] == "boundary":
            for k in ((pos[2],) if pos[2] else ("level", "level_low", "pressure")):
                f = self.boundary_fields.get(f"boundary.{pos[1]}.{k}")
                if f is not None:
                    return f
        key = str(getattr(exc, "key", "") or getattr(exc, "field", "") or "")
        if "temperature" in key:
            return self.t_max if ("max" in key or "highest" in key) else self.t_min
        return None

    # ------------------------------------------------------------------ drawing
    def _render(self) -> None:
        s, sysm = self.study, self.display
        self.schematic.show(s.network, s.design, s.index_circuit, s.index_node)
        self.curve_plot.show(curve_figure(s, sysm))
        self.tables.show(s.design, s.valves, s.balance, s.inputs.balancing, s.index_circuit,
                         s.index_node, caption=f"design case: {s.design_label}")
        fs = sorted(self.results.findings, key=lambda f: -Severity(f.severity).rank)
        self.findings.show(fs)
        self._render_status()
        notes = [n for n in (s.curve_note, s.balance_note) if n]
        notes += [f"{k}: {v}" for k, v in (s.valve_notes or {}).items()]
        notes += [f"{k}: {v}" for k, v in s.failed.items()]
        self.notes.value = "".join(f"<div class='hl-note'>{html.escape(n)}</div>"
                                   for n in notes)

    def _render_status(self) -> None:
        s, sysm = self.study, self.display
        parts = []
        if s.pump is not None:
            i = s.design.link_names.index(s.pump)
            parts.append(f"pump {s.pump}: {units.fmt(float(s.design.Q[i]), 'flow', sysm)} at "
                         f"{units.fmt(float(-s.design.head_loss[i]), 'head', sysm)}")
        if s.balance is not None:
            parts.append(f"index valve {s.balance.index_valve}")
        if s.index_node:
            parts.append(f"index node {s.index_node}")
        nf = len(s.design.net.nodes)
        p = s.design.p_abs[:nf]
        if np.isfinite(p).any():
            j = int(np.nanargmin(p))
            parts.append(f"lowest pressure {units.fmt_pressure(float(p[j]), sysm, True, s.design.net.p_baro)}"
                         f" at {s.design.node_names[j]}")
        self.status.value = status_html(parts, self.results.verdict().word.lower())

    @property
    def workspace(self):
        """The one-screen view: inputs in collapsible sections beside the schematic, the
        status above it, the curve, tables, findings and save row in tabs under it."""
        if self._workspace is None:
            from kit.panels.workspace import Section, Workspace

            sections = [Section("Liquid and fixed heads", [self.liquid_view,
                                                           self.boundary_view]),
                        Section("Links", [self.links]), Section("Nodes", [self.nodes],
                                                                open=False)]
            tabs = [("Curve", self.curve_view), ("Links", self.tables.links),
                    ("Nodes", self.tables.nodes), ("Valves", widgets.VBox([
                        self.tables.valves, self.tables.balancing])),
                    ("Findings", self.findings), ("Save", self.save_row)]
            ws = Workspace(sections, self.schematic, self.status, tabs,
                           header=[self.style, self.switch, self.message])
            ws.add_class("hl-network-app")
            ws.add_class("hl-workspace-network")
            self._workspace = ws
        return self._workspace

    # ------------------------------------------------------------------ public helpers
    def to_scenario(self):
        """A copy of the working scenario with every input as it stands (strings with units,
        as typed), checked against the schema; the kit's error while an input is refused."""
        try:
            return self.edited_scenario().copy()
        except InvalidInput as exc:
            raise InputError("network inputs", "", f"cannot be saved: {exc}") from None

    def set_system(self, system: str) -> None:
        """Show every chart and table in 'SI' or 'US' (inputs keep their text)."""
        self.display = check_system(system)
        for f in (self.t_min, self.t_max, *self.boundary_fields.values()):
            f.set_system(system)
        self.nodes.set_system(system)
        self.links.set_system(system)
        self.schematic.set_system(system)
        self.tables.set_system(system)
        self.findings.set_system(system)
        self.curve_plot.show(curve_figure(self.study, system))
        self._render_status()

    def static_figures(self) -> list:
        """The schematic and the curve as static ``plotly.graph_objects.Figure`` (record)."""
        import plotly.graph_objects as go

        a = go.Figure(self.schematic.to_figure())
        a.update_layout(title=dict(text=f"{self.scenario.title}: schematic at the design case"))
        b = go.Figure(self.curve_plot.to_figure())
        b.update_layout(title=dict(text=f"{self.scenario.title}: network curve and pump"))
        return [a, b]

    def summary_text(self) -> str:
        """The scenario's text summary (kit.textout.summary) for the current results."""
        from kit.textout import summary

        return summary(self.scenario, self.results, self.display)

    def error_text(self) -> str:
        """The refusal shown now ('' for none)."""
        return self.refusals.error


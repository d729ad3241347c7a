"""PumpEditor: a pump's datasheet points in an editable table, and the curves fitted to them.

The engineer types (or pastes) the maker's points — flow, head, efficiency and NPSHr, in the
units picked above the table — with the speed and impeller diameter of the curve and how many
pumps run together (single, parallel or series). The points are read into a ``[[pumps]]``
table of the scenario (every value a string with its unit) and built by
:func:`kit.studies.pump_selection.build_pump`, so the panel refuses exactly what a scenario
file would, with the same message. The fitted curves (polynomial least squares, see
:mod:`kit.core.pump`) are drawn over the points and their residuals listed (``fit_report``).

Bad points keep the text as typed and show the kit's message beside the table; ``.value`` is
then None.

Example
-------
>>> doc = {"name": "P-1", "speed": "2900 rpm", "impeller": "200 mm",
...        "flow": ["0 m3/h", "36 m3/h", "72 m3/h", "108 m3/h"],
...        "head": ["40 m", "38 m", "32 m", "22 m"],
...        "efficiency": ["0 %", "55 %", "72 %", "68 %"]}
>>> ed = PumpEditor(doc)
>>> round(float(ed.value.head(0.02)), 2)
32.0
>>> ed.rows[2].head.value = "33"
>>> round(float(ed.value.head(0.02)), 2)
32.55
>>> ed.rows[2].head.value = "-4"
>>> ed.value is None, ed.rows[2].head.value, ed.error
(True, '-4', "'head, point 3' must be at least 0 m, not -4 m")
"""

from __future__ import annotations

import html
import re

import ipywidgets as widgets
import numpy as np
import traitlets

from kit import units
from kit.errors import InputError, ScenarioError
from kit.panels.base import KIT_ERRORS, Panel, error_html, error_widget
from kit.panels.charts import to_display
from kit.panels.entry import TextEntry
from kit.panels.fields import QuantityField
from kit.panels.plot_view import PlotView
from kit.panels.pump_profiles import as_figure, scatter

__all__ = ["PumpEditor", "PointRow", "FLOW_UNITS", "HEAD_UNITS", "COLUMNS", "parse_points",
           "pump_doc"]

#: Flow units offered for the table: (label, unit text kit.units reads).
FLOW_UNITS = (("m³/h", "m3/h"), ("L/s", "L/s"), ("US gpm", "gpm"))
#: Head units offered for head and NPSHr columns.
HEAD_UNITS = (("m", "m"), ("ft", "ft"))
#: The table's columns: key, header, required.
COLUMNS = (("flow", "flow", True), ("head", "head", True), ("efficiency", "efficiency [%]", False),
           ("npshr", "NPSHr", False))

_NUMBER = re.compile(r"^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$")


def _with_unit(text: str, unit: str) -> str:
    """'50' -> '50 m3/h'; text that already carries a unit is kept as typed."""
    t = text.strip()
    return f"{t} {unit}" if _NUMBER.match(t) else t


_PINT = {"m3/h": "m**3/h"}


def _convert(value_si: float, kind: str, unit: str) -> float:
    """SI -> the table unit (kit.units.convert wants pint's spelling of m³/h)."""
    return units.convert(value_si, kind, _PINT.get(unit, unit))


def _number_text(value: float, digits: int = 4) -> str:
    if value == 0:
        return "0"
    return f"{value:.{digits}g}"


def parse_points(text: str, columns: int = 4) -> list[list[str]]:
    """Rows of cell texts from pasted CSV (comma, semicolon or tab; a header line is skipped).

    Each line needs 2 to ``columns`` numbers: flow, head, then optionally efficiency and NPSHr.

    >>> parse_points("flow,head\\n0, 40\\n36;38\\n72\\t32")
    [['0', '40'], ['36', '38'], ['72', '32']]
    """
    rows = []
    for n, line in enumerate(text.splitlines(), start=1):
        if not line.strip():
            continue
        cells = [c.strip() for c in re.split(r"[,;\t]", line)]
        while cells and cells[-1] == "":
            cells.pop()
        if not rows and cells and not _NUMBER.match(cells[0]):
            continue  # a header line
        if not 2 <= len(cells) <= columns or not all(_NUMBER.match(c) or c == "" for c in cells):
            raise InputError(f"pasted points, line {n}", line.strip(),
                             f"must be 2 to {columns} numbers (flow, head, efficiency %, NPSHr) "
                             "separated by commas, semicolons or tabs")
        rows.append(cells)
    if not rows:
        raise InputError("pasted points", text.strip()[:40], "hold no rows of numbers")
    return rows


def pump_doc(pump, flow_unit: str = "m3/h", head_unit: str = "m") -> dict:
    """A ``[[pumps]]`` scenario table (strings with units) of a PumpCurve's datasheet points.

    >>> from kit.core.pump import PumpCurve
    >>> p = PumpCurve([0, 0.01, 0.02], [30.0, 28.0, 22.0], speed_rpm=1450, diameter=0.25,
    ...               name="P-2")
    >>> pump_doc(p)["flow"]
    ['0 m3/h', '36 m3/h', '72 m3/h']
    """
    members = getattr(pump, "pumps", None)
    base = members[0] if members else pump
    doc = {"name": base.name,
           "speed": f"{_number_text(base.speed_rpm, 6)} rpm",
           "impeller": f"{_number_text(base.diameter * 1e3, 6)} mm",
           "flow": [f"{_number_text(_convert(q, 'flow', flow_unit), 6)} {flow_unit}"
                    for q in base.flow],
           "head": [f"{_number_text(_convert(h, 'head', head_unit), 6)} {head_unit}"
                    for h in base.head_points]}
    if base.efficiency_points is not None:
        doc["efficiency"] = [f"{_number_text(e * 100, 6)} %" for e in base.efficiency_points]
    if base.npshr_points is not None:
        doc["npshr"] = [f"{_number_text(_convert(h, 'head', head_unit), 6)} {head_unit}"
                        for h in base.npshr_points]
    if members:
        doc["arrangement"] = pump.arrangement
        doc["count"] = len(members)
    return doc


class PointRow(widgets.HBox):
    """One datasheet point: four text cells (:class:`kit.panels.entry.TextEntry`, sent on
    Enter or blur) and a remove button (CSS ``hl-point-row``)."""

    def __init__(self, cells=("", "", "", ""), index: int = 0):
        self.index_label = widgets.Label(str(index + 1), layout=widgets.Layout(width="2.2em"))
        self.cells = []
        for (key, _h, _r), text in zip(COLUMNS, list(cells) + [""] * (4 - len(cells)),
                                       strict=False):
            # a TextEntry sends its text on Enter as one request (an ipywidgets Text sends a
            # "submit" request first: a second busy/idle round per edit; kit.panels.entry)
            w = TextEntry(value=str(text), layout=widgets.Layout(width="6.5em"))
            w.add_class(f"hl-point-{key}")
            self.cells.append(w)
        self.flow, self.head, self.efficiency, self.npshr = self.cells
        self.remove = widgets.Button(description="−", tooltip="remove this point",
                                     layout=widgets.Layout(width="2.6em"))
        self.remove.add_class("hl-point-remove")
        super().__init__([self.index_label, *self.cells, self.remove])
        self.add_class("hl-point-row")

    @property
    def texts(self) -> list[str]:
        return [c.value for c in self.cells]


class PumpEditor(Panel):
    """Edit one pump's datasheet points, speed, impeller and arrangement; see the fitted curves.

    Parameters
    ----------
    doc : dict, optional
        A ``[[pumps]]`` table of a scenario (strings with units); default a blank 4-point pump.
    system : str
        'SI' or 'US' (the fit chart and report).
    title : str
        Heading ('' for none).

    Attributes
    ----------
    value : PumpCurve or PumpSet or None
        The built pump; None while any input is refused (message in ``error`` and beside the
        table).
    doc : dict or None
        The ``[[pumps]]`` table the inputs make (strings with units), None while invalid.
    rows : list of PointRow
        The table's rows; each has ``flow``, ``head``, ``efficiency``, ``npshr`` text cells.
    flow_unit, head_unit : ipywidgets.Dropdown
        Units of the cells (a cell may also carry its own unit: ``"0.5 L/s"``).
    speed, impeller : QuantityField
    arrangement : ipywidgets.Dropdown
    count : ipywidgets.BoundedIntText
    csv : ipywidgets.Textarea
        Pasted points; ``read_csv`` (a button) replaces the table with them.
    figure : plotly.graph_objects.Figure
        Points and fitted curves, as drawn by ``plot`` (a
        :class:`~kit.panels.plot_view.PlotView`) (head and NPSHr on the left axis, efficiency
        on the right); a static copy built on each read.
    report : ipywidgets.HTML
        The fit report (CSS ``hl-fit-report``).

    CSS classes: ``hl-pump-editor`` on the panel, ``hl-point-table`` on the table, ``hl-error``
    and ``hl-point-error`` on the message beside it, ``hl-add-point``,
    ``hl-csv``, ``hl-read-csv``, ``hl-fit-chart``.
    """

    css_class = "hl-pump-editor"
    doc = traitlets.Any(None, allow_none=True)

    def __init__(self, doc: dict | None = None, system: str = "SI", title: str = "Pump curve"):
        #: Rows (0-based) read into the curve, and rows left out as incomplete.
        self.kept: list[int] = []
        self.incomplete: list[int] = []

        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.name = widgets.Text(description="Tag", continuous_update=False,
                                 layout=widgets.Layout(width="28em"))
        self.name.add_class("hl-pump-name")
        self.flow_unit = widgets.Dropdown(options=FLOW_UNITS, value="m3/h", description="Flow in",
                                          layout=widgets.Layout(width="14em"))
        self.head_unit = widgets.Dropdown(options=HEAD_UNITS, value="m",
                                          description="Head, NPSHr in",
                                          layout=widgets.Layout(width="14em"))
        self.head_unit.style.description_width = "initial"
        self.head_unit.layout.width = "16em"
        self.speed = QuantityField("speed", "Speed", text="1450 rpm", system=system,
                                   field="pump speed")
        self.impeller = QuantityField("diameter", "Impeller diameter", text="250 mm",
                                      system=system, field="impeller diameter")
        self.arrangement = widgets.Dropdown(options=[("single pump", "single"),
                                                     ("in parallel", "parallel"),
                                                     ("in series", "series")],
                                            value="single", description="Arrangement")
        self.arrangement.style.description_width = "initial"
        self.arrangement.add_class("hl-arrangement")
        self.count = widgets.BoundedIntText(value=1, min=1, max=8, description="Pumps",
                                            layout=widgets.Layout(width="10em"))
        self.count.add_class("hl-pump-count")
        head = widgets.HBox([widgets.Label("#", layout=widgets.Layout(width="2.2em"))]
                            + [widgets.HTML(f"<b>{html.escape(h)}</b>",
                                            layout=widgets.Layout(width="6.5em"))
                               for _k, h, _r in COLUMNS])
        self.header_row = head
        self.rows: list[PointRow] = []
        self.rows_box = widgets.VBox([])
        self.add_point = widgets.Button(description="+ point", tooltip="add a datasheet point")
        self.add_point.add_class("hl-add-point")
        self.table = widgets.VBox([head, self.rows_box, self.add_point])
        self.table.add_class("hl-point-table")
        self.message = error_widget()
        self.message.add_class("hl-point-error")
        self.message.layout.max_width = "34em"
        self.csv = widgets.Textarea(placeholder="paste points: flow, head, efficiency %, NPSHr "
                                    "(one point a line, in the units above)",
                                    layout=widgets.Layout(width="30em", height="7em"))
        self.csv.add_class("hl-csv")
        self.read_csv = widgets.Button(description="Read pasted points")
        self.read_csv.add_class("hl-read-csv")
        # the chart's layout as a plain dict; each draw sends the traces as plain dicts to a
        # PlotView (no plotly objects per change; see kit.panels.plot_view)
        self._layout = dict(
            height=300, width=520, margin=dict(l=60, r=60, t=40, b=40),
            title=dict(text="datasheet points and fitted curves"),
            legend=dict(orientation="h", y=-0.25),
            yaxis2=dict(overlaying="y", side="right", range=[0, 100], autorange=False,
                        tick0=0, dtick=20, title=dict(text="efficiency [%]"), showgrid=False))
        self._shown = {"data": [], "layout": self._layout}
        self.plot = PlotView()
        fig_box = widgets.VBox([self.plot])
        fig_box.add_class("hl-fit-chart")
        self.report = widgets.HTML("")
        self.report.add_class("hl-fit-report")
        top = widgets.VBox([self.heading, self.name,
                            widgets.HBox([self.speed, self.impeller]),
                            widgets.HBox([self.arrangement, self.count]),
                            widgets.HBox([self.flow_unit, self.head_unit])])
        left = widgets.VBox([self.table, self.csv, self.read_csv],
                            layout=widgets.Layout(min_width="33em"))
        body = widgets.HBox([left, widgets.VBox([self.message, fig_box, self.report])])
        super().__init__([top, body], system=system)
        self._units = ("m3/h", "m")
        self.load(doc or {"name": "new pump", "speed": "1450 rpm", "impeller": "250 mm",
                          "flow": ["0 m3/h", "", "", ""], "head": ["", "", "", ""]})
        self._wire()

    # ------------------------------------------------------------------ wiring
    def _wire(self) -> None:
        for w in (self.name, self.arrangement, self.count):
            w.observe(self._on_change, names="value")
        for f in (self.speed, self.impeller):
            f.input.observe(self._on_change, names="value")
        self.flow_unit.observe(self._on_units, names="value")
        self.head_unit.observe(self._on_units, names="value")
        self.add_point.on_click(lambda _b: self.add_row())
        self.read_csv.on_click(lambda _b: self.paste(self.csv.value))

    def _wire_row(self, row: PointRow) -> None:
        for c in row.cells:
            c.observe(self._on_change, names="value")
        row.remove.on_click(lambda _b, _r=row: self.remove_row(self.rows.index(_r)))

    def _on_change(self, change=None) -> None:
        if self._busy:
            return
        self._rebuild()

    # ------------------------------------------------------------------ table editing
    def _set_rows(self, cell_rows) -> None:
        self.rows = []
        for i, cells in enumerate(cell_rows):
            row = PointRow(cells, i)
            self._wire_row(row)
            self.rows.append(row)
        self.rows_box.children = tuple(self.rows)

    def add_row(self, cells=("", "", "", "")) -> None:
        """Add a point at the end of the table (blank by default)."""
        row = PointRow(cells, len(self.rows))
        self._wire_row(row)
        self.rows.append(row)
        self.rows_box.children = tuple(self.rows)
        self._rebuild()

    def remove_row(self, index: int) -> None:
        """Remove the point at ``index`` (0-based)."""
        del self.rows[index]
        for i, r in enumerate(self.rows):
            r.index_label.value = str(i + 1)
        self.rows_box.children = tuple(self.rows)
        self._rebuild()

    def set_point(self, index: int, **cells) -> None:
        """Type into row ``index``: ``set_point(2, head="77")`` (bare numbers in the table units)."""
        row = self.rows[index]
        with self._quiet():
            for key, text in cells.items():
                getattr(row, key).value = str(text)
        self._rebuild()

    def paste(self, text: str) -> None:
        """Replace the table with pasted CSV points (kept in the box if they are refused)."""
        self.csv.value = text
        try:
            cell_rows = parse_points(text)
        except KIT_ERRORS as exc:
            self._fail(str(exc))
            return
        with self._quiet():
            self._set_rows(cell_rows)
        self._rebuild()

    # ------------------------------------------------------------------ loading and reading
    def load(self, doc: dict) -> None:
        """Show a ``[[pumps]]`` scenario table; cells show numbers in the table units."""
        fu, hu = self.flow_unit.value, self.head_unit.value
        n = len(doc.get("flow", []))
        cols = {"flow": ("flow", fu), "head": ("head", hu), "efficiency": ("fraction", "%"),
                "npshr": ("head", hu)}
        cell_rows = [["", "", "", ""] for _ in range(n)]
        for j, (key, _h, _r) in enumerate(COLUMNS):
            vals = doc.get(key) or []
            kind, unit = cols[key]
            for i in range(n):
                if i >= len(vals):
                    continue
                text = str(vals[i])
                try:
                    si = units.parse(text, kind, key)
                    shown = (_number_text(si * 100.0) if key == "efficiency"
                             else _number_text(_convert(si, kind, unit)))
                except KIT_ERRORS:
                    shown = text  # keep what the file says; the build shows the message
                cell_rows[i][j] = "" if text == "" else shown
        with self._quiet():
            self.name.value = str(doc.get("name", ""))
            self.speed.set_text(str(doc.get("speed", "")))
            self.impeller.set_text(str(doc.get("impeller", "")))
            arr = doc.get("arrangement", "single")
            self.arrangement.value = arr if arr in ("single", "parallel", "series") else "single"
            cnt = doc.get("count", 1)
            self.count.value = int(cnt) if isinstance(cnt, int) and 1 <= cnt <= 8 else 1
            self._set_rows(cell_rows)
        self._rebuild()

    def _read_doc(self) -> dict:
        fu, hu = self.flow_unit.value, self.head_unit.value
        doc = {"name": self.name.value.strip() or "pump", "speed": self.speed.text,
               "impeller": self.impeller.text}
        if self.arrangement.value != "single":
            doc["arrangement"] = self.arrangement.value
            doc["count"] = int(self.count.value)
        texts = [[c.strip() for c in r.texts] for r in self.rows]
        # a point without flow or head (a row just added, or half typed) is incomplete:
        # marked and left out, so the curve fits the complete points meanwhile
        self.kept = [i for i, t in enumerate(texts) if t[0] and t[1]]
        self.incomplete = [i for i in range(len(texts)) if i not in self.kept]
        unit_of = {"flow": fu, "head": hu, "efficiency": "%", "npshr": hu}
        for j, (key, header, required) in enumerate(COLUMNS):
            col = [texts[i][j] for i in self.kept]
            filled = [c != "" for c in col]
            if not required and not any(filled):
                continue
            if not all(filled):
                row = self.kept[filled.index(False)]
                self._mark_row(row)
                raise InputError(f"{header}, point {row + 1}", "", "is empty; fill every point "
                                 "of this column" + ("" if required else " or none"))
            doc[key] = [_with_unit(c, unit_of[key]) for c in col]
        return doc

    def _mark_row(self, i: int) -> None:
        """Mark row ``i`` (0-based) as refused (CSS ``hl-field-error``)."""
        if 0 <= i < len(self.rows):
            self.rows[i].add_class("hl-field-error")

    def _mark_rows(self) -> None:
        """Clear the refused marks; mark the incomplete rows (CSS ``hl-row-incomplete``)."""
        for i, r in enumerate(self.rows):
            r.remove_class("hl-field-error")
            if i in self.incomplete:
                r.add_class("hl-row-incomplete")
            else:
                r.remove_class("hl-row-incomplete")

    def _explain(self, exc) -> str:
        """The kit's message with the point numbered as the table shows it (1-based, among
        every row), the column named as its header, and values in the table's units (an
        efficiency in %); the point's row is marked."""
        key = str(getattr(exc, "key", "") or "")
        text = exc.reason if isinstance(exc, ScenarioError) else str(exc)
        m = re.fullmatch(r"pump\.(\w+)\[(\d+)\]", key)
        if not m or m.group(1) not in dict((k, h) for k, h, _r in COLUMNS):
            return text if key.startswith("pump") else str(exc)
        col, i = m.group(1), int(m.group(2))
        row = self.kept[i] if i < len(self.kept) else i
        self._mark_row(row)
        label = f"{dict((k, h) for k, h, _r in COLUMNS)[col]}, point {row + 1}"
        text = text.replace(f"'{key}'", f"'{label}'")
        text = re.sub(r"^'(?:[^']|'[^']*')*? point \d+'", lambda _m: f"'{label}'", text)
        num = r"(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?)"
        if col == "efficiency":
            return re.sub(num + r" -(?=[,;\s]|$)",
                          lambda q: f"{_number_text(100.0 * float(q.group(1)))} %", text)
        kind, unit = (("flow", self.flow_unit.value) if col == "flow" else
                      ("head", self.head_unit.value))
        si = "m³/s" if kind == "flow" else "m"
        pretty = dict(FLOW_UNITS + HEAD_UNITS)
        shown = next((lbl for lbl, u in pretty.items() if u == unit), unit)
        return re.sub(num + " " + re.escape(si) + r"(?![\w³²/])",
                      lambda q: f"{_number_text(_convert(float(q.group(1)), kind, unit))} "
                                f"{shown}", text)

    def _rebuild(self) -> None:
        from kit.inputs.pump_selection import build_pump

        self.incomplete = []
        try:
            doc = None
            self._mark_rows()
            doc = self._read_doc()
            self._mark_rows()
            pump = build_pump(doc, "pump")
        except KIT_ERRORS as exc:
            self._fail(self._explain(exc) + self._left_out())
            return
        self.message.value = (f'<span class="hl-note">{html.escape(self._left_out()[2:])}'
                              "</span>" if self.incomplete else "")
        self._set_valid(True, "")
        self.doc = doc
        self._store(pump)
        self._draw()

    def refuse(self, message: str) -> None:
        """Mark the editor as refused by a check outside it (its message line, red)."""
        self.message.value = error_html(message)
        self.add_class("hl-field-error-box")

    def unrefuse(self) -> None:
        """Undo :meth:`refuse`."""
        if "hl-field-error-box" in self._dom_classes:
            self.remove_class("hl-field-error-box")
            self.message.value = error_html(self.error) if not self.valid else ""

    def _left_out(self) -> str:
        """'; point 6 is incomplete (no flow or head): left out' ('' for none)."""
        if not self.incomplete:
            return ""
        n = [str(i + 1) for i in self.incomplete]
        return (f"; point{'s' if len(n) > 1 else ''} {', '.join(n)} "
                f"{'are' if len(n) > 1 else 'is'} incomplete (no flow or head): left out")

    def _fail(self, message: str) -> None:
        self.message.value = error_html(message)
        self._set_valid(False, message)
        self.doc = None
        self._store(None)

    # ------------------------------------------------------------------ showing
    def _show(self, obj) -> None:
        if obj is None:
            return
        self.load(pump_doc(obj, self.flow_unit.value, self.head_unit.value))

    def _on_units(self, change) -> None:
        """Re-show the cells in the newly picked units (values kept)."""
        if self._busy:
            return
        old_fu, old_hu = self._units
        try:
            doc = self._read_doc_with(old_fu, old_hu)
        except KIT_ERRORS:
            doc = None
        self._units = (self.flow_unit.value, self.head_unit.value)
        if doc is not None:
            self.load(doc)
        else:
            self._rebuild()

    def _read_doc_with(self, fu: str, hu: str) -> dict:
        cur = (self.flow_unit.value, self.head_unit.value)
        with self._quiet():
            self.flow_unit.value, self.head_unit.value = fu, hu
        try:
            return self._read_doc()
        finally:
            with self._quiet():
                self.flow_unit.value, self.head_unit.value = cur

    def _pump_curve(self):
        pump = self.value
        return getattr(pump, "pumps", [pump])[0] if pump is not None else None

    @property
    def figure(self):
        """The chart as drawn, a static plotly ``Figure`` (built on each read)."""
        return as_figure(self._shown)

    def _draw(self) -> None:
        p = self._pump_curve()
        if p is None:
            return
        sysm = self.system
        Qf = np.linspace(0.0, p.q_end, 61)
        x_pts = to_display(p.flow, "flow", sysm)
        x_fit = to_display(Qf, "flow", sysm)
        traces = [
            scatter(x_pts, to_display(p.head_points, "head", sysm), mode="markers",
                    name="head, datasheet", marker=dict(color="#1f4e9c", size=8)),
            scatter(x_fit, to_display(p.head(Qf), "head", sysm), mode="lines",
                    name="head, fitted", line=dict(color="#1f4e9c")),
        ]
        if p.npshr_points is not None:
            traces += [
                scatter(x_pts, to_display(p.npshr_points, "head", sysm), mode="markers",
                        name="NPSHr, datasheet", marker=dict(color="#a33b20", size=7,
                                                            symbol="square")),
                scatter(x_fit, to_display(p.npshr(Qf), "head", sysm), mode="lines",
                        name="NPSHr, fitted", line=dict(color="#a33b20", dash="dash"))]
        if p.efficiency_points is not None:
            traces += [
                scatter(x_pts, p.efficiency_points * 100.0, mode="markers", yaxis="y2",
                        name="efficiency, datasheet", marker=dict(color="#2f7d32", size=7,
                                                                 symbol="diamond")),
                scatter(x_fit, p.efficiency(Qf) * 100.0, mode="lines", yaxis="y2",
                        name="efficiency, fitted", line=dict(color="#2f7d32", dash="dot"))]
        layout = dict(self._layout)
        layout["xaxis"] = {"title": {"text": f"flow [{units.display_unit('flow', sysm)}]"
                                     .replace("m**3/h", "m³/h")}}
        layout["yaxis"] = {"title": {"text": f"head, NPSHr [{units.display_unit('head', sysm)}]"}}
        self._shown = {"data": traces, "layout": layout}
        self.plot.show(self._shown)
        self.report.value = self._report_html(p)

    def _report_html(self, p) -> str:
        rows = []
        labels = {"head": ("head", "head"), "efficiency": ("efficiency", None),
                  "npshr": ("NPSHr", "head"), "power": ("power", "power")}
        for key, fit in p.fit_report().items():
            name, kind = labels.get(key, (key, None))
            if kind is None:
                mx, rms = f"{fit['max_residual'] * 100:.2g} %", f"{fit['rms_residual'] * 100:.2g} %"
            else:
                mx = units.fmt(fit["max_residual"], kind, self.system)
                rms = units.fmt(fit["rms_residual"], kind, self.system)
            rows.append(f"<tr><td>{html.escape(name)}</td><td>{fit['degree']}</td>"
                        f"<td>{html.escape(mx)}</td><td>{html.escape(rms)}</td>"
                        f"<td>{fit['points']}</td></tr>")
        bep = ""
        if p.efficiency_points is not None:
            q, h, e = p.bep
            bep = (f"<div class='hl-bep'>best efficiency point (fitted): "
                   f"{html.escape(units.fmt(q, 'flow', self.system))}, "
                   f"{html.escape(units.fmt(h, 'head', self.system))}, "
                   f"{e * 100:.1f} %</div>")
        return ("<table class='hl-results'><thead><tr><th>curve</th><th>degree</th>"
                "<th>largest residual</th><th>RMS residual</th><th>points</th></tr></thead>"
                f"<tbody>{''.join(rows)}</tbody></table>{bep}"
                "<div style='font-size:0.85em'>polynomial least squares "
                "(numpy.polynomial.Polynomial.fit); residual = fitted − datasheet</div>")

    def _render_system(self) -> None:
        for f in (self.speed, self.impeller):
            f.set_system(self.system)
        self._draw()

    @property
    def text_summary(self) -> str:
        """Name, arrangement and number of points (for logs and tests)."""
        return f"{self.name.value}: {len(self.rows)} points, {self.arrangement.value}"


"""Table editors of a network scenario: its ``[[node]]`` rows and its ``[[link]]`` rows.

:class:`NodeTable` shows one row per node — name, elevation, demand, minimum residual pressure
(gauge) — and :class:`LinkTable` one row per link — name, type, from, to and the value most
often changed for its type (a pipe's length, a control valve's opening, a balancing valve's
design flow or setting, a pump's running speed, a check valve's Kv) — with a "details" button
that opens the rest: for a pipe its pipe (:class:`~kit.panels.pipe_picker.PipePicker`), its
fittings (:class:`~kit.panels.fitting_list.FittingList`) and whether it holds a non-return
valve; for a control valve its rated flow coefficient, characteristic, rangeability, FL, Fd,
xFz, sizing flows and bore; for a balancing valve its fully open coefficient and bore; for a
pump its datasheet speed and impeller, its trim and the pumps running and on standby.

Each table's ``value`` is the tuple of its rows as scenario tables (text with units, as the
engineer typed them; a value nobody changed keeps the document's own text, see
:func:`kit.panels.scenario_text.field_text`), or None while a field cannot be read (its
message is beside it). Rows are added with "add node" / "add link"; a **new row stays
incomplete** — marked, and left out of ``value``, so the study runs on the other rows — until
its required fields are filled. A row read from the document shows as one line (its name
and main values, as written) with an "edit" button that builds its fields, so a table of
many rows stays light. A refusal by the schema or the study names a key path
(``link[3].length``, positions among the rows given); :meth:`LinkTable.locate` and
:meth:`NodeTable.locate` find the field it is about, so the app marks it there
(:class:`kit.panels.base.Refusals`).

CSS classes: ``hl-node-table``, ``hl-link-table``, rows ``hl-node-row`` / ``hl-link-row``,
an incomplete row ``hl-row-incomplete``, a refused field ``hl-field-error``; the buttons
``hl-node-add``, ``hl-link-add``, ``hl-link-details``, ``hl-row-remove``.

Example
-------
>>> t = NodeTable([{"name": "J1", "elevation": "12 m", "demand": "5 L/s"}])
>>> t.value[0]["demand"]
'5 L/s'
>>> t.add_row()
>>> len(t.value), t.rows[1].incomplete
(1, True)
>>> t.rows[0].expand()                     # rows from the document open on demand
>>> t.rows[0].fields["elevation"].set_text("12 kg")
>>> t.value is None
True
"""

from __future__ import annotations

import copy
import html
import re

import ipywidgets as widgets
import traitlets

from kit.panels.base import KIT_ERRORS, Panel, error_html, error_widget
from kit.panels.fields import QuantityField
from kit.panels.scenario_text import field_text

__all__ = ["NodeTable", "LinkTable", "NodeRow", "LinkRow", "FieldMark", "LINK_TYPE_LABELS", "MAIN_FIELD",
           "key_position"]

#: How the type dropdown names the link types it has fields for; a type the schema declares
#: beyond these is offered with its key's words and its row kept as the document has it.
LINK_TYPE_LABELS = {
    "pipe": "pipe", "pump": "pump", "control_valve": "control valve",
    "balancing_valve": "balancing valve", "check_valve": "check valve",
    "equipment": "equipment",
}

#: The field shown in a link's row for each type (the rest are under "details").
MAIN_FIELD = {"pipe": "length", "pump": "run_speed", "control_valve": "opening",
              "balancing_valve": "design_flow", "check_valve": "kv", "equipment": "rated_dp"}


def _type_options(current: str | None) -> list[tuple[str, str]]:
    """(label, type) of every link type of the schema (and ``current`` if it is another)."""
    from kit.inputs.network_schema import LINK_TYPES

    types = list(LINK_TYPES)
    if current and current not in types:
        types.append(current)
    return [(LINK_TYPE_LABELS.get(t, t.replace("_", " ")), t) for t in types]

_KEY = re.compile(r"^(node|link|boundary)\[(\d+)\](?:\.([A-Za-z_]+))?")


def key_position(exc) -> tuple[str, int, str | None] | None:
    """(table, position, key) of the scenario key a kit error names (``link[3].length`` ->
    ('link', 3, 'length')), or None.

    >>> from kit.errors import ScenarioError
    >>> key_position(ScenarioError("node[2].elevation", "is missing"))
    ('node', 2, 'elevation')
    """
    name = str(getattr(exc, "key", "") or getattr(exc, "field", "") or "")
    m = _KEY.match(name)
    if not m:
        return None
    return m.group(1), int(m.group(2)), m.group(3)


class FieldMark:
    """A refusal's place in a row: the widget marked (CSS ``hl-field-error``) and the row's
    message line, where the message shows. Has ``refuse``/``unrefuse`` as a
    :class:`~kit.panels.fields.QuantityField` does, so :class:`kit.panels.base.Refusals`
    marks it the same way."""

    def __init__(self, row, widget, label: str):
        self.row = row
        self.widget = widget
        self.label = widgets.Label(label)

    def refuse(self, message: str) -> None:
        # the widget alone is marked (a class on the row would turn every box of it red)
        self.widget.add_class("hl-field-error")
        self.row.message.value = error_html(message)

    def unrefuse(self) -> None:
        self.widget.remove_class("hl-field-error")
        self.row.message.value = ""


class _Incomplete(Exception):
    """Internal: a row not filled in yet (left out, marked; not an error)."""


class _Invalid(Exception):
    """Internal: a field of the row shows its own error."""


def _text_box(value: str, placeholder: str, width: str, css: str) -> widgets.Text:
    w = widgets.Text(value=value, placeholder=placeholder, continuous_update=False,
                     layout=widgets.Layout(width=width))
    w.add_class(css)
    return w


class _Row(widgets.VBox):
    """Common parts of a table row: the document row kept, its fields and its message.

    A row read from the document shows a one-line summary and an "edit" button; its fields
    are built when it is opened (a table of many rows would otherwise be thousands of
    widgets), and until then the row is the document's own. A new row opens at once."""

    SUMMARY: tuple = ()

    def __init__(self, doc: dict | None, system: str, p_baro: float, on_change=None):
        self.original = copy.deepcopy(doc or {})
        self.system = system
        self.p_baro = p_baro
        self._on_change = on_change or (lambda *_a: None)
        self.fields: dict = {}
        self.built = False
        self.message = error_widget()
        self.remove = widgets.Button(description="remove", layout=widgets.Layout(width="6em"))
        self.remove.add_class("hl-row-remove")
        self.summary = widgets.HTML(self._summary_html())
        self.summary.add_class("hl-row-summary")
        self.edit = widgets.Button(description="edit", layout=widgets.Layout(width="5em"))
        self.edit.add_class("hl-row-edit")
        self.header = widgets.HBox([self.summary, self.edit, self.remove])
        self.editor = widgets.VBox([])
        widgets.VBox.__init__(self, [self.header, self.editor, self.message])
        self.edit.on_click(lambda _b: self.expand())
        if not self.original:
            self.expand()     # a new row: its fields at once

    @property
    def title(self) -> str:
        """The row's name as it stands."""
        w = getattr(self, "name", None)
        return w.value.strip() if w is not None else str(self.original.get("name", ""))

    def _summary_html(self) -> str:
        parts = [f"<b>{html.escape(str(self.original.get('name', '')))}</b>"]
        for key, label in self.SUMMARY:
            v = self.original.get(key)
            if v is not None and not isinstance(v, (dict, list)):
                parts.append(f"{html.escape(label)} {html.escape(str(v))}")
        return " · ".join(parts)

    def expand(self) -> None:
        """Build the row's editor (the first time) and show it in place of its summary."""
        if self.built:
            return
        box, new = self._build_editor()
        self.editor.children = (box,)
        self.built = True
        self.summary.layout.display = "none"
        self.edit.layout.display = "none"
        self.header.children = (self.summary, self.edit)
        self._on_change("built", self, new)

    def widgets_to_watch(self):
        return []

    def qf(self, key: str, kind: str, label: str, optional: bool = True, gauge: bool = False,
           width: str = "7.5em", doc: dict | None = None) -> QuantityField:
        doc = self.original if doc is None else doc
        text = doc.get(key)
        f = QuantityField(kind, label, text=None if text is None else str(text),
                          system=self.system, field=label, p_baro=self.p_baro, gauge=gauge,
                          optional=optional, width=width)
        f.label.layout.min_width = "0"
        f.add_class(f"hl-{key.replace('_', '-')}")
        self.fields[key] = f
        return f

    def number(self, key: str, label: str, width: str = "6em",
               doc: dict | None = None) -> QuantityField:
        """A plain-number field (Kv, FL ...), written to the document as a float."""
        return self.qf(key, "dimensionless", label, width=width, doc=doc)

    @property
    def incomplete(self) -> bool:
        try:
            self.doc()
        except _Incomplete:
            return True
        except (_Invalid, *KIT_ERRORS):
            return False
        return False

    def _text(self, key: str):
        f = self.fields[key]
        if not f.valid:
            raise _Invalid(f.error)
        if f.value is None:
            return None
        if f.kind == "dimensionless":
            return float(f.value)
        old = self.original.get(key)
        return field_text(f, old if isinstance(old, str) else None)

    def set_system(self, system: str) -> None:
        self.system = system
        for f in self.fields.values():
            if hasattr(f, "set_system"):
                f.set_system(system)

    def mark_incomplete(self, why: str | None) -> None:
        if why is None:
            self.remove_class("hl-row-incomplete")
            self.message.value = ""
        else:
            self.add_class("hl-row-incomplete")
            self.message.value = (f'<span class="hl-note">incomplete ({html.escape(why)}): left '
                                  "out until it is filled</span>")


class NodeRow(_Row):
    """One ``[[node]]`` row: name, elevation, demand, minimum residual pressure (gauge)."""

    SUMMARY = (("elevation", "z"), ("demand", "demand"), ("min_pressure", "p min"))

    def __init__(self, doc: dict | None = None, system: str = "SI", p_baro: float = 101325.0,
                 on_change=None):
        super().__init__(doc, system, p_baro, on_change)
        self.add_class("hl-node-row")

    def _build_editor(self):
        self.name = _text_box(str(self.original.get("name", "")), "node name", "11em",
                              "hl-node-name")
        fields = [self.qf("elevation", "elevation", "z", optional=True),
                  self.qf("demand", "flow", "demand"),
                  self.qf("min_pressure", "pressure", "p min", gauge=True)]
        return widgets.HBox([self.name, *fields, self.remove]), [self.name, *fields]

    def doc(self) -> dict:
        """The row as a scenario table; :class:`_Incomplete` / :class:`_Invalid` otherwise."""
        out = copy.deepcopy(self.original)
        if not self.built:
            return out
        vals = {k: self._text(k) for k in self.fields}
        name = self.name.value.strip()
        if not name:
            raise _Incomplete("the name is empty")
        if vals["elevation"] is None:
            raise _Incomplete("the elevation is empty")
        out["name"] = name
        for k, v in vals.items():
            if v is None:
                out.pop(k, None)
            else:
                out[k] = v
        return out

    def widgets_to_watch(self):
        return [self.name, *self.fields.values()] if self.built else []


def _pipe_of(doc: dict):
    from kit.scenario import build_pipe

    spec = doc.get("pipe")
    if not isinstance(spec, dict):
        return None
    try:
        return build_pipe(spec, "pipe")
    except KIT_ERRORS:
        return None


class LinkRow(_Row):
    """One ``[[link]]`` row: name, type, from, to, its main value, and its details."""

    SUMMARY = (("type", "type"), ("from", "from"), ("to", "to"), ("length", "length"),
               ("opening", "opening"), ("design_flow", "design flow"),
               ("run_speed", "running speed"), ("rated_dp", "rated Δp"), ("kv", "Kv"),
               ("cv", "Cv"))

    def _summary_html(self) -> str:
        o = self.original
        t = str(o.get("type", ""))
        head = (f"<b>{html.escape(str(o.get('name', '')))}</b> "
                f"{html.escape(LINK_TYPE_LABELS.get(t, t.replace('_', ' ')))}: "
                f"{html.escape(str(o.get('from', '')))} → {html.escape(str(o.get('to', '')))}")
        parts = [head]
        for key, label in self.SUMMARY:
            v = o.get(key)
            if key not in ("type", "from", "to") and v is not None and \
                    not isinstance(v, (dict, list)):
                parts.append(f"{html.escape(label)} {html.escape(str(v))}")
        return " · ".join(parts)

    def __init__(self, doc: dict | None = None, system: str = "SI", p_baro: float = 101325.0,
                 on_change=None):
        self.pipe = None
        self.fittings = None
        self.checks: dict = {}
        self._doc_now: dict = {}
        self._details_built = False
        self.coef_key = "kv"
        self._built_type = None
        super().__init__(doc, system, p_baro, on_change)
        self.add_class("hl-link-row")

    def _build_editor(self):
        o = self.original
        self.name = _text_box(str(o.get("name", "")), "link name", "10em", "hl-link-name")
        typ = o.get("type") if isinstance(o.get("type"), str) and o.get("type") else "pipe"
        self.type = widgets.Dropdown(options=_type_options(typ), value=typ,
                                     layout=widgets.Layout(width="9.5em"))
        self.type.add_class("hl-link-type")
        self.from_ = _text_box(str(o.get("from", "")), "from", "10em", "hl-link-from")
        self.to = _text_box(str(o.get("to", "")), "to", "10em", "hl-link-to")
        self.details = widgets.ToggleButton(description="details", value=False,
                                            layout=widgets.Layout(width="6em"))
        self.details.add_class("hl-link-details")
        self.main_box = widgets.HBox([])
        self.detail_box = widgets.VBox([])
        self.detail_box.add_class("hl-link-detail")
        self.detail_box.layout.display = "none"
        self._build()
        top = widgets.HBox([self.name, self.type, self.from_, widgets.Label("→"), self.to,
                            self.main_box, self.details, self.remove])
        self.details.observe(self._toggle, names="value")
        return widgets.VBox([top, self.detail_box]), self.widgets_to_watch()

    # -- building the fields of the row's type
    def _build(self) -> None:
        """The row's fields for its type: the main ones now; the details now for a new type,
        else when first opened (until then the document's values stand)."""
        t = self.type.value
        same = t == self.original.get("type")
        doc = self.original if same else {}
        self.fields = {}
        self.checks = {}
        self.pipe = None
        self.fittings = None
        self._doc_now = doc
        c = "cv" if ("cv" in doc or "cv_max" in doc) else "kv"
        self.coef_key = c
        if t == "pipe":
            main = [self.qf("length", "length", "length", doc=doc)]
        elif t == "pump":
            main = [self.qf("run_speed", "speed", "running speed", doc=doc)]
        elif t == "control_valve":
            main = [self.qf("opening", "fraction", "opening", doc=doc)]
        elif t == "balancing_valve":
            main = [self.qf("design_flow", "flow", "design flow", doc=doc),
                    self.number(c, f"or {c.capitalize()} set", doc=doc)]
        elif t == "check_valve":
            main = [self.number(c, c.capitalize(), doc=doc)]
        elif t == "equipment":
            main = [self.qf("rated_flow", "flow", "rated flow", doc=doc),
                    self.qf("rated_dp", "pressure_difference", "rated Δp", doc=doc),
                    self.number(c, f"or {c.capitalize()}", doc=doc)]
        else:   # a type of the schema this editor has no fields for: kept as written
            main = [widgets.HTML("<span class='hl-note'>kept as the scenario file has it "
                                 "(edit it there)</span>")]
        self.main_box.children = tuple(main)
        self._details_built = False
        if same:
            # many widgets per row: built when the details are first opened
            self.detail_box.children = (widgets.HTML(
                "<span class='hl-note'>open the details to edit the rest of this link</span>"),)
        else:
            self._build_details()
        self._built_type = t

    def _build_details(self) -> list:
        """Build the detail widgets of the row's type; return the new input widgets."""
        t, doc, c = self.type.value, self._doc_now, self.coef_key
        before = set(self.fields)
        detail: list = []
        if t == "pipe":
            detail = self._pipe_widgets(doc)
        elif t == "pump":
            detail = [widgets.HBox([self.qf("speed", "speed", "datasheet speed", doc=doc),
                                    self.qf("impeller", "diameter", "impeller", doc=doc),
                                    self.qf("trim", "diameter", "trim", doc=doc)])]
            pts = doc.get("flow")
            detail.append(widgets.HTML(
                f"<span class='hl-note'>datasheet points: {len(pts)} as in the scenario "
                "(edit them in the file)</span>" if pts else
                "<span class='hl-note'>a pump needs its datasheet points (flow, head ...): "
                "give them in the scenario file</span>"))
        elif t == "control_valve":
            ch = widgets.Dropdown(options=[("equal percentage", "equal_percentage"),
                                           ("linear", "linear"),
                                           ("quick opening", "quick_opening")],
                                  value=doc.get("characteristic", "equal_percentage"),
                                  description="characteristic",
                                  style={"description_width": "initial"})
            ch.add_class("hl-link-characteristic")
            self.checks["characteristic"] = ch
            detail = [widgets.HBox([self.number(c, f"{c.capitalize()} rated", doc=doc), ch,
                                    self.number("rangeability", "R", doc=doc)]),
                      widgets.HBox([self.number("FL", "FL", doc=doc),
                                    self.number("Fd", "Fd", doc=doc),
                                    self.number("xFz", "xFz", doc=doc)]),
                      widgets.HBox([self.qf("flow_min", "flow", "flow min", doc=doc),
                                    self.qf("flow_max", "flow", "flow max", doc=doc),
                                    self.qf("diameter", "diameter", "bore", doc=doc)])]
        elif t == "balancing_valve":
            detail = [widgets.HBox([self.number(f"{c}_max", f"{c.capitalize()} fully open",
                                                doc=doc),
                                    self.qf("diameter", "diameter", "bore", doc=doc)])]
        elif t in ("check_valve", "equipment"):
            detail = [self.qf("diameter", "diameter", "bore", doc=doc)]
        self.detail_box.children = tuple(detail)
        self._details_built = True
        new = [self.fields[k] for k in self.fields if k not in before]
        new += list(self.checks.values())
        new += [w for w in (self.pipe, self.fittings) if w is not None]
        return new

    def _pipe_widgets(self, doc: dict) -> list:
        from kit.panels.fitting_list import FittingList
        from kit.panels.pipe_picker import PipePicker
        from kit.scenario import build_fitting

        self.pipe = PipePicker(_pipe_of(doc), system=self.system, title="")
        self.pipe.add_class("hl-link-pipe")
        fits = []
        for j, f in enumerate(doc.get("fittings") or []):
            try:
                fits.append(build_fitting(f, f"fittings[{j}]"))
            except KIT_ERRORS:
                continue
        self.fittings = FittingList(tuple(fits), system=self.system, title="fittings")
        self.fittings.add_class("hl-link-fittings")
        chk = widgets.Checkbox(value=bool(doc.get("check", False)),
                               description="non-return valve in the run", indent=False)
        chk.add_class("hl-link-check")
        self.checks["check"] = chk
        return [self.pipe, self.fittings, chk]

    def open_details(self) -> None:
        """Show the details (building them the first time)."""
        self.expand()
        if not self._details_built:
            self._on_change("built", self, self._build_details())
        self.details.value = True
        self.detail_box.layout.display = ""

    def _toggle(self, change) -> None:
        if change["new"]:
            self.open_details()
        else:
            self.detail_box.layout.display = "none"

    def retype(self) -> None:
        """Rebuild the type's fields after the type changed (a new type starts blank)."""
        self._build()

    def widgets_to_watch(self):
        if not self.built and not hasattr(self, "name"):
            return []
        out = [self.name, self.type, self.from_, self.to, *self.fields.values(),
               *self.checks.values()]
        if self.pipe is not None:
            out += [self.pipe, self.fittings]
        return out

    # -- reading
    def doc(self) -> dict:
        """The row as a scenario table; :class:`_Incomplete` / :class:`_Invalid` otherwise."""
        from kit.panels.scenario_text import fitting_rows, pipe_doc

        if not self.built:
            return copy.deepcopy(self.original)
        t = self.type.value
        same = t == self.original.get("type")
        out = copy.deepcopy(self.original) if same else {
            k: v for k, v in self.original.items() if k in ("name", "from", "to", "note")}
        vals = {k: self._text(k) for k in self.fields}
        if self.pipe is not None and self.pipe.value is None:
            raise _Invalid(self.pipe.error or "the pipe is not valid")
        if self.fittings is not None and self.fittings.value is None:
            raise _Invalid(self.fittings.error or "a fitting row is not valid")
        name, a, b = self.name.value.strip(), self.from_.value.strip(), self.to.value.strip()
        if not name:
            raise _Incomplete("the name is empty")
        if not a or not b:
            raise _Incomplete("from or to is empty")
        out.update({"name": name, "type": t, "from": a, "to": b})

        def have(key):   # a value given: in its field, or in the document while unbuilt
            return vals[key] is not None if key in vals else key in out

        for k, v in vals.items():
            if v is None:
                out.pop(k, None)
            else:
                out[k] = v
        if t == "pipe":
            if vals["length"] is None:
                raise _Incomplete("the length is empty")
            if self.pipe is not None:      # else the document's pipe and fittings stand
                out["pipe"] = pipe_doc(self.pipe.value, self.original.get("pipe") if same
                                       else None, self.system)
                rows = fitting_rows(self.fittings, self.original.get("fittings") or () if
                                    same else (), "fittings", self.system)
                if rows:
                    out["fittings"] = rows
                else:
                    out.pop("fittings", None)
                if self.checks["check"].value:
                    out["check"] = True
                else:
                    out.pop("check", None)
        elif t == "pump":
            for k in ("speed", "impeller"):
                if not have(k):
                    raise _Incomplete(f"the datasheet {k} is empty")
            if not out.get("flow"):
                raise _Incomplete("no datasheet points")
        elif t == "control_valve":
            if not have(self.coef_key):
                raise _Incomplete(f"the rated {self.coef_key.capitalize()} is empty")
            if "characteristic" in self.checks:
                ch = self.checks["characteristic"].value
                if "characteristic" in out or ch != "equal_percentage":   # schema default
                    out["characteristic"] = ch
        elif t == "balancing_valve":
            c = self.coef_key
            if not have(f"{c}_max"):
                raise _Incomplete(f"the fully open {c.capitalize()} is empty")
            if vals["design_flow"] is None and vals[c] is None:
                raise _Incomplete(f"give the design flow or the {c.capitalize()} set")
        elif t == "check_valve":
            if vals[self.coef_key] is None:
                raise _Incomplete(f"the {self.coef_key.capitalize()} is empty")
        elif t == "equipment":
            rated = vals["rated_flow"] is not None or vals["rated_dp"] is not None
            if vals[self.coef_key] is None and not rated:
                raise _Incomplete(f"give the rated flow and Δp, or the "
                                  f"{self.coef_key.capitalize()}")
        elif not same:
            raise _Incomplete(f"a {t.replace('_', ' ')} link is given in the scenario file")
        return out

    def set_system(self, system: str) -> None:
        super().set_system(system)
        for w in (self.pipe, self.fittings):
            if w is not None:
                w.set_system(system)

    def field_for(self, key: str | None):
        """The widget of a scenario key of this row (None: the row itself); the row's
        editor and details are built to show it."""
        self.expand()
        if key is not None and key not in self.fields and not self._details_built:
            self.open_details()
        if key in self.fields:
            return self.fields[key]
        return {"name": self.name, "from": self.from_, "to": self.to, "type": self.type,
                "pipe": self.pipe, "fittings": self.fittings,
                "check": self.checks.get("check"),
                "characteristic": self.checks.get("characteristic")}.get(key)


class _Table(Panel):
    """A table of rows with an "add" button; ``value`` the complete rows as documents."""

    row_class = NodeRow
    noun = "row"

    def __init__(self, rows=(), system: str = "SI", p_baro: float = 101325.0,
                 title: str = ""):
        self.p_baro = float(p_baro)
        self.rows: list = []
        self.kept: list = []
        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.rows_box = widgets.VBox([])
        self.add = widgets.Button(description=f"add {self.noun}", icon="plus")
        self.add.add_class(f"hl-{self.noun}-add")
        self.message = error_widget()
        super().__init__([self.heading, self.rows_box, self.add, self.message], system=system)
        self.add.on_click(lambda _b: self.add_row())
        self._set_rows([self._make(d) for d in rows])
        self._recompute()

    def _make(self, doc):
        # a new row opens in its constructor and its widgets are watched through _on_built
        row = self.row_class(doc, self.system, self.p_baro, on_change=self._on_built)
        row.remove.on_click(lambda _b, r=row: self.remove_row(r))
        return row

    def _on_built(self, _what, row, new=()) -> None:
        """A row built widgets of its own (its editor, its details): watch them too."""
        for w in new:
            self._watch(row, w)

    def _watch(self, row, w) -> None:
        if w is getattr(row, "type", None):
            w.observe(lambda _c, r=row: self._on_type(r), names="value")
        else:
            w.observe(self._on_change, names="value")

    def _on_type(self, row) -> None:  # pragma: no cover - link rows only
        self._recompute()

    def _set_rows(self, rows) -> None:
        self.rows = list(rows)
        self.rows_box.children = tuple(self.rows)

    def add_row(self, doc: dict | None = None) -> None:
        """Append a row (blank: incomplete, left out until filled)."""
        self._set_rows([*self.rows, self._make(doc)])
        self._recompute()

    def remove_row(self, row) -> None:
        self._set_rows([r for r in self.rows if r is not row])
        self._recompute()

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    def _recompute(self) -> None:
        out, first_error = [], None
        self.kept = []
        self.message.value = ""
        for row in self.rows:
            row.remove_class("hl-field-error-box")
            try:
                d = row.doc()
            except _Incomplete as exc:
                row.mark_incomplete(str(exc))
                continue
            except _Invalid as exc:      # the field shows its own message and mark
                row.mark_incomplete(None)
                first_error = first_error or str(exc)
                continue
            except KIT_ERRORS as exc:    # no field of its own: the row outlined
                row.mark_incomplete(None)
                row.add_class("hl-field-error-box")
                row.message.value = error_html(str(exc))
                first_error = first_error or str(exc)
                continue
            row.mark_incomplete(None)
            out.append(d)
            self.kept.append(row)
        if first_error is not None:
            self._set_valid(False, first_error)
            self._store(None)
        else:
            self._set_valid(True, "")
            self._store(tuple(out))

    @traitlets.validate("value")
    def _coerce(self, proposal):
        v = proposal["value"]
        return None if v is None else tuple(v)

    def _show(self, rows) -> None:
        if rows is None:
            return
        self._set_rows([self._make(d) for d in rows])
        self.kept = list(self.rows)

    def _render_system(self) -> None:
        for row in self.rows:
            row.set_system(self.system)

    def locate(self, exc, table: str):
        """The widget a kit error naming ``table[i].key`` is about (the i-th kept row's
        field, or the row), or None."""
        pos = key_position(exc)
        if pos is None or pos[0] != table or not (0 <= pos[1] < len(self.kept)):
            return None
        row = self.kept[pos[1]]
        row.expand()
        w = row.field_for(pos[2]) if hasattr(row, "field_for") else row.fields.get(pos[2])
        if w is None and pos[2] == "name":
            w = row.name
        if isinstance(w, QuantityField):
            return w
        name = row.title or f"{table} {pos[1] + 1}"
        what = f"{pos[2]} of {table} '{name}'" if pos[2] else f"{table} '{name}'"
        return FieldMark(row, w if w is not None else row, what)


class NodeTable(_Table):
    """The ``[[node]]`` rows (see the module docstring). CSS ``hl-node-table``."""

    css_class = "hl-node-table"
    row_class = NodeRow
    noun = "node"

    def locate(self, exc, table: str = "node"):
        return super().locate(exc, table)


class LinkTable(_Table):
    """The ``[[link]]`` rows (see the module docstring). CSS ``hl-link-table``."""

    css_class = "hl-link-table"
    row_class = LinkRow
    noun = "link"

    def _on_type(self, row) -> None:
        row.retype()
        for w in row.widgets_to_watch():
            if w not in (row.name, row.type, row.from_, row.to):
                w.observe(self._on_change, names="value")
        self._recompute()

    def locate(self, exc, table: str = "link"):
        return super().locate(exc, table)


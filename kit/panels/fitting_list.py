"""FittingList: an editable table of fitting rows, each with its K at the current conditions.

Each row has a kind (dropdown of :data:`kit.core.fittings.FITTING_KINDS`), a count, a label,
the parameter fields the kind's parameter specs call for, the method the kind applies, and
its K (count × K, referred to the bore of the pipe the list sits in) at the Reynolds number,
bore and roughness given by :meth:`FittingList.set_conditions`. The K column and the total
are computed by :func:`kit.core.fittings.fitting_K` and
:func:`kit.core.fittings.fittings_K_total`; the panel itself holds no formula.

Rows can be added, removed and duplicated. ``.value`` is a tuple of
:class:`kit.core.fittings.Fitting` (None while any row is invalid).
"""

from __future__ import annotations

import html

import ipywidgets as widgets
import numpy as np
import traitlets

from kit import units
from kit.core import fittings as core_fittings
from kit.panels.base import KIT_ERRORS, Panel, display_message, error_html, error_widget
from kit.panels.fields import QuantityField

__all__ = ["FittingList", "FittingRow", "PARAM_UNIT_KINDS"]

#: A parameter spec's SI unit -> the QuantityField kind that reads it.
PARAM_UNIT_KINDS = {
    "m": "length", "m/s": "velocity", "Pa": "pressure_difference", "m3/s": "flow",
    "m³/s": "flow", "m2": "area", "m²": "area", "-": "dimensionless", "": "dimensionless",
}


def _spec(kind: str):
    return core_fittings.FITTING_KINDS[kind]


def _kind_label(kind: str) -> str:
    return str(getattr(_spec(kind), "label", kind))


def _params(kind: str):
    return tuple(getattr(_spec(kind), "params", ()))


def _param_kind(p) -> str:
    return PARAM_UNIT_KINDS.get(str(getattr(p, "unit", "-")), "dimensionless")


def _param_label(p) -> str:
    label = str(getattr(p, "label", None) or p.name)
    unit = str(getattr(p, "unit", "-"))
    if _param_kind(p) == "dimensionless" and unit not in ("-", ""):
        label += f" [{unit}]"
    return label


def _param_default(p):
    for attr in ("default", "typical"):
        v = getattr(p, attr, None)
        if v is not None:
            return v
    return None


def _method_text(kind: str) -> str:
    spec = _spec(kind)
    method = getattr(spec, "method", "")
    source = getattr(spec, "source", "")
    return " — ".join(str(x) for x in (method, source) if x)


class FittingRow(widgets.VBox):
    """One row of a :class:`FittingList` (built and wired by the list).

    Attributes
    ----------
    kind : ipywidgets.Dropdown
        (label, key) options of the fitting kinds.
    count : ipywidgets.BoundedIntText
        Number of identical fittings, 1 to 999.
    label : ipywidgets.Text
        Free text naming the row ("strainer").
    fields : dict of str -> QuantityField
        One field per numeric parameter of the kind (rebuilt when the kind changes).
    choices : dict of str -> ipywidgets.Dropdown
        One dropdown per parameter with a list of choices (a Hooper or Darby name, a method,
        a valve style).
    method, k : ipywidgets.HTML
        The method applied (CSS ``hl-method``) and the row's K (``hl-k``).
    message : ipywidgets.HTML
        The row's error (CSS ``hl-error``).
    duplicate, remove : ipywidgets.Button
    """

    def __init__(self, kind: str, count: int = 1, params: dict | None = None, label: str = "",
                 system: str = "SI"):
        self.system = system
        self.kind = widgets.Dropdown(
            options=[(_kind_label(k), k) for k in core_fittings.FITTING_KINDS], value=kind,
            layout=widgets.Layout(width="18em"))
        self.kind.add_class("hl-fitting-kind")
        self.count = widgets.BoundedIntText(value=int(count), min=1, max=999,
                                            layout=widgets.Layout(width="5em"))
        self.count.add_class("hl-fitting-count")
        self.label = widgets.Text(value=label, placeholder="label",
                                  layout=widgets.Layout(width="10em"))
        self.k = widgets.HTML("")
        self.k.add_class("hl-k")
        self.duplicate = widgets.Button(description="duplicate", layout=widgets.Layout(width="7em"))
        self.remove = widgets.Button(description="remove", layout=widgets.Layout(width="6em"))
        self.param_box = widgets.HBox([])
        self.method = widgets.HTML("")
        self.method.add_class("hl-method")
        self.message = error_widget()
        self.fields: dict[str, QuantityField] = {}
        self.choices: dict[str, widgets.Dropdown] = {}
        #: What was typed or chosen for each kind this row has shown: kind -> {name: text}
        #: (changing the kind and back brings it back).
        self.typed: dict[str, dict[str, str]] = {}
        self._shown_kind: str | None = None
        top = widgets.HBox([self.kind, widgets.Label("×"), self.count, self.label, self.k,
                            self.duplicate, self.remove])
        super().__init__([top, self.param_box, self.method, self.message])
        self.add_class("hl-fitting-row")
        self.build_fields(params or {})

    def remember(self) -> None:
        """Keep what the fields of the kind shown hold (see :attr:`typed`)."""
        if self._shown_kind is None:
            return
        kept = {n: f.text for n, f in self.fields.items()}
        kept.update({n: dd.value for n, dd in self.choices.items() if dd.value is not None})
        self.typed[self._shown_kind] = kept

    def build_fields(self, params: dict) -> None:
        """(Re)build the parameter fields for the current kind, filled from ``params`` (SI);
        what was typed for this kind before (see :attr:`typed`) wins over ``params``."""
        kind = self.kind.value
        self.remember()
        before = self.typed.get(kind, {})
        self._shown_kind = kind
        self.fields = {}
        self.choices = {}
        shown = []
        for p in _params(kind):
            value = params.get(p.name, _param_default(p))
            if getattr(p, "choices", None) and p.name in before:
                value = before[p.name]
            if getattr(p, "choices", None):
                dd = widgets.Dropdown(options=[str(c) for c in p.choices],
                                      value=str(value) if value in p.choices else None,
                                      description=_param_label(p),
                                      layout=widgets.Layout(width="auto"),
                                      style={"description_width": "initial"})
                dd.add_class("hl-fitting-choice")
                self.choices[p.name] = dd
                shown.append(dd)
                continue
            # optional: an empty box is not an error of its own; the row is then incomplete
            # (left out of the list's value, marked) until it is filled
            f = QuantityField(
                _param_kind(p), _param_label(p), value_si=None if value is None else float(value),
                system=self.system, field=p.name, width="8em", optional=True)
            if p.name in before:
                f.set_text(before[p.name])
            self.fields[p.name] = f
            shown.append(f)
        self.param_box.children = tuple(shown)
        self.method.value = f'<span class="hl-method-text">{html.escape(_method_text(kind))}</span>'

    @property
    def incomplete(self) -> bool:
        """True while a parameter box is empty or a choice not made (and none is invalid)."""
        if any(not f.valid for f in self.fields.values()):
            return False
        return (any(f.value is None for f in self.fields.values())
                or any(dd.value is None for dd in self.choices.values()))

    def read(self):
        """The row's :class:`~kit.core.fittings.Fitting`; a kit error for bad input."""
        for f in self.fields.values():
            if not f.valid:
                raise _RowInvalid(f.error)
        for f in self.fields.values():
            if f.value is None:
                raise _RowIncomplete(f"'{f.field}' is empty")
        params = {name: f.value for name, f in self.fields.items()}
        for name, dd in self.choices.items():
            if dd.value is None:
                raise _RowIncomplete(f"'{name}' is not chosen")
            params[name] = dd.value
        return core_fittings.Fitting(self.kind.value, int(self.count.value), params,
                                     self.label.value)

    def show(self, fitting) -> None:
        """Show a :class:`~kit.core.fittings.Fitting`."""
        self.kind.value = fitting.kind
        self.count.value = int(fitting.count)
        self.label.value = fitting.label or ""
        self.build_fields(dict(fitting.params))

    def set_system(self, system: str) -> None:
        self.system = system
        for f in self.fields.values():
            f.set_system(system)


class _RowInvalid(Exception):
    """Internal: a parameter field shows its own error."""


class _RowIncomplete(Exception):
    """Internal: a row not filled in yet (left out, marked; not an error)."""


class FittingList(Panel):
    """An editable list of fittings with each row's K and the total.

    Parameters
    ----------
    fittings : iterable of Fitting
        The rows to show first.
    system : str
        'SI' or 'US'.
    Re, D, roughness : float, optional
        Conditions for the K column: Reynolds number [-], bore of the pipe the fittings sit
        in [m], its absolute roughness [m] (see :meth:`set_conditions`).
    title : str

    Attributes
    ----------
    value : tuple of Fitting or None
        None while any row is invalid.
    rows : list of FittingRow
    add : ipywidgets.Button
        Appends a row of the first kind.
    total : ipywidgets.HTML
        Sum of the rows' K at the conditions (CSS ``hl-k-total``).
    message : ipywidgets.HTML
        Panel-level error (CSS ``hl-error``).

    CSS class: ``hl-fitting-list``; rows ``hl-fitting-row``.
    """

    css_class = "hl-fitting-list"

    def __init__(self, fittings=(), system: str = "SI", Re: float | None = None,
                 D: float | None = None, roughness: float | None = None, title: str = "Fittings"):
        self.Re, self.D, self.roughness = Re, D, roughness
        self.heading = widgets.HTML(f"<b>{html.escape(title)}</b>" if title else "")
        self.rows: list[FittingRow] = []
        self.rows_box = widgets.VBox([])
        self.add = widgets.Button(description="add fitting", icon="plus")
        self.add.add_class("hl-fitting-add")
        self.total = widgets.HTML("")
        self.total.add_class("hl-k-total")
        self.message = error_widget()
        #: The rows read into ``value``, in order (incomplete rows are left out).
        self.kept: list[FittingRow] = []
        super().__init__([self.heading, self.rows_box, self.add, self.total, self.message],
                         system=system)
        self.add.on_click(self._on_add)
        self.value = tuple(fittings)

    # -- rows: the one place where row widgets are wired
    def _make_row(self, kind: str, count: int = 1, params=None, label: str = "") -> FittingRow:
        row = FittingRow(kind, count, params, label, self.system)
        self._wire_row(row)
        return row

    def _wire_row(self, row: FittingRow) -> None:
        row.kind.observe(lambda ch, r=row: self._on_kind(r), names="value")
        row.count.observe(self._on_change, names="value")
        row.label.observe(self._on_change, names="value")
        row.duplicate.on_click(lambda _b, r=row: self._on_duplicate(r))
        row.remove.on_click(lambda _b, r=row: self._on_remove(r))
        self._wire_fields(row)

    def _wire_fields(self, row: FittingRow) -> None:
        for f in row.fields.values():
            f.observe(self._on_change, names=["value", "valid"])
        for dd in row.choices.values():
            dd.observe(self._on_change, names="value")

    def _set_rows(self, rows) -> None:
        self.rows = list(rows)
        self.rows_box.children = tuple(self.rows)

    def _on_add(self, _button=None) -> None:
        # the new row's required fields start empty (a guessed K would enter the calculation
        # unseen): the row is marked incomplete and left out until they are filled
        first = next(iter(core_fittings.FITTING_KINDS))
        self._set_rows([*self.rows, self._make_row(first)])
        self._recompute()

    def _on_duplicate(self, row: FittingRow) -> None:
        params = {n: f.value for n, f in row.fields.items()}
        params.update({n: dd.value for n, dd in row.choices.items()})
        copy = self._make_row(row.kind.value, row.count.value, params, row.label.value)
        with self._quiet():
            for src, dst in zip(row.fields.values(), copy.fields.values(), strict=True):
                dst.set_text(src.text)
        i = self.rows.index(row)
        self._set_rows([*self.rows[:i + 1], copy, *self.rows[i + 1:]])
        self._recompute()

    def _on_remove(self, row: FittingRow) -> None:
        self._set_rows([r for r in self.rows if r is not row])
        self._recompute()

    def _on_kind(self, row: FittingRow) -> None:
        if self._busy:
            return
        row.build_fields({})
        self._wire_fields(row)
        self._recompute()

    def _on_change(self, change) -> None:
        if self._busy:
            return
        self._recompute()

    # -- widgets -> tuple of Fitting
    def _recompute(self) -> None:
        self.message.value = ""
        out, first_error = [], None
        self.kept = []
        for row in self.rows:
            row.message.value = ""
            row.remove_class("hl-row-incomplete")
            row.remove_class("hl-field-error")
            with self._quiet():
                # a refusal the core made at a box clears; a parse error stays
                for f in row.fields.values():
                    f.unrefuse()
            try:
                out.append(row.read())
                self.kept.append(row)
            except _RowIncomplete as exc:
                row.add_class("hl-row-incomplete")
                row.message.value = (f'<span class="hl-note">incomplete ({html.escape(str(exc))}'
                                     "): left out until it is filled</span>")
            except _RowInvalid as exc:
                row.add_class("hl-field-error")
                first_error = first_error or str(exc)
            except KIT_ERRORS as exc:
                # refused at the box it names (e.g. K = -1 on a given-K row), else on the row
                name = str(getattr(exc, "field", ""))
                target = row.fields.get(name) or next(
                    (f for n, f in row.fields.items() if name.startswith(n + " ")), None)
                text = display_message(exc, self.system, target.kind if target else None)
                row.add_class("hl-field-error")
                with self._quiet():
                    if target is not None:
                        target.refuse(text)
                    else:
                        row.message.value = error_html(text)
                first_error = first_error or text
        if first_error is not None:
            self._set_valid(False, first_error)
            self._store(None)
        else:
            self._set_valid(True, "")
            self._store(tuple(out))
        self._render_k()

    # -- tuple of Fitting -> widgets
    def _show(self, fittings) -> None:
        if fittings is None:
            return
        fittings = tuple(fittings)
        for f in fittings:
            if not isinstance(f, core_fittings.Fitting):
                raise TypeError(f"FittingList shows Fitting rows, not {type(f).__name__}")
        self._set_rows([self._make_row(f.kind, f.count, dict(f.params), f.label or "")
                        for f in fittings])
        self.kept = list(self.rows)

    @traitlets.validate("value")
    def _coerce(self, proposal):
        v = proposal["value"]
        return None if v is None else tuple(v)

    def _after_show(self) -> None:
        self._render_k()

    # -- conditions and the K column
    def set_conditions(self, Re: float, D: float, roughness: float) -> None:
        """Set the Reynolds number [-], bore [m] and roughness [m] for the K column."""
        self.Re, self.D, self.roughness = float(Re), float(D), float(roughness)
        self._render_k()

    def _render_system(self) -> None:
        for row in self.rows:
            row.set_system(self.system)
        self._render_k()

    def _render_k(self) -> None:
        ready = None not in (self.Re, self.D, self.roughness)
        fits = self.value
        of_row = dict(zip((id(r) for r in self.kept), fits or (), strict=False))
        for row in self.rows:
            if not ready or fits is None or id(row) not in of_row:
                row.k.value = '<span class="hl-k-text">K = —</span>'
                continue
            try:
                K = float(np.asarray(core_fittings.fitting_K(
                    of_row[id(row)], np.array([self.Re]), self.D, self.roughness))[0])
            except KIT_ERRORS as exc:
                row.k.value = '<span class="hl-k-text">K = —</span>'
                row.message.value = error_html(str(exc))
                continue
            row.k.value = f'<span class="hl-k-text">K = {K:.3g}</span>'
        if not ready:
            self.total.value = "total K: — (no flow conditions yet)"
            return
        if fits is None:
            self.total.value = "total K: — (correct the rows above)"
            return
        try:
            total = float(np.asarray(core_fittings.fittings_K_total(
                fits, np.array([self.Re]), self.D, self.roughness))[0]) if fits else 0.0
        except KIT_ERRORS as exc:
            self.message.value = error_html(str(exc))
            self.total.value = "total K: —"
            return
        bore = units.fmt(self.D, "diameter", self.system, digits=4)
        self.total.value = (f'<span class="hl-k-total-text">total K = {total:.4g}</span> '
                            f"(referred to bore {html.escape(bore)}, Re = {self.Re:.3g})")

"""The pumped system's inputs of a pump-selection scenario, as panels: duty, ends, lines, operation.

:class:`PumpSystemInputs` shows, for the scenario a
:class:`~kit.panels.pump_selection_app.PumpSelectionApp` holds:

- **duty**: the required flow;
- **source and destination**: the liquid levels (lowest and highest, or one level) and the
  surface pressure (gauge);
- **suction and discharge lines**: the start elevation, and for each segment its pipe
  (:class:`~kit.panels.pipe_picker.PipePicker`), developed length, rise and fittings
  (:class:`~kit.panels.fitting_list.FittingList`);
- **operation**: running hours a year, the tariff and its currency.

Every input knows the scenario key it writes (:attr:`PumpSystemInputs.keys`); the app writes
an edit with :func:`with_values` (a copy of the document with the keys set, checked by
:func:`kit.inputs.pump_selection.with_doc`) and re-runs the study. Values are written as
the engineer's text with its unit (:func:`kit.panels.scenario_text.field_text`).

Example
-------
>>> from kit.notebook import open_scenario
>>> sc = open_scenario("kestrel_ridge_booster.toml")
>>> new = with_values(sc, {"duty.flow": "150 m3/h", "operation.currency": "CHF"})
>>> new.doc["duty"]["flow"], new.doc["operation"]["currency"], sc.doc["duty"]["flow"]
('150 m3/h', 'CHF', '140 m3/h')
"""

from __future__ import annotations

import copy

import ipywidgets as widgets

from kit.inputs import pump_selection as pump_inputs
from kit.panels.fields import QuantityField
from kit.panels.workspace import Section

__all__ = ["PumpSystemInputs", "with_values", "value_at"]


def _path(key: str) -> list:
    return [int(p) if p.isdigit() else p for p in key.split(".")]


def value_at(doc: dict, key: str, default=None):
    """The value at a dotted key (``"discharge.segments.1.length"``), or ``default``."""
    cur = doc
    for p in _path(key):
        try:
            cur = cur[p]
        except (KeyError, IndexError, TypeError):
            return default
    return cur


def with_values(sc, values: dict):
    """A new scenario: a copy of ``sc``'s document with each dotted key of ``values`` set
    (numbers index list items: ``"suction.segments.0.pipe"``; None removes the key, an empty
    list of fittings too), checked against the schema by
    :func:`kit.inputs.pump_selection.with_doc` (a kit error names a refused key)."""
    doc = copy.deepcopy(sc.doc)
    for key, value in values.items():
        parts = _path(key)
        cur = doc
        for p in parts[:-1]:
            cur = cur[p] if isinstance(p, int) else cur.setdefault(p, {})
        if value is None or value == []:
            if isinstance(cur, dict):
                cur.pop(parts[-1], None)
        else:
            cur[parts[-1]] = copy.deepcopy(value)
    return pump_inputs.with_doc(sc, doc)


class PumpSystemInputs:
    """The system inputs of a pump-selection scenario (see the module docstring).

    Parameters
    ----------
    scenario : Scenario
    system : str
        'SI' or 'US'.
    p_baro : float
        Barometric pressure for gauge pressures [Pa].

    Attributes
    ----------
    keys : dict
        widget -> the scenario key it writes.
    fields : list of QuantityField
    pipes, fittings : dict
        Scenario key of a segment -> its PipePicker / FittingList.
    sections : list of kit.panels.workspace.Section
        Duty and ends, suction line, discharge line, operation.
    """

    def __init__(self, scenario, system: str = "SI", p_baro: float = 101325.0):
        from kit.panels.fitting_list import FittingList
        from kit.panels.pipe_picker import PipePicker
        from kit.scenario import build_fitting, build_pipe

        doc = scenario.doc
        self.system = system
        self.keys: dict = {}
        self.fields: list[QuantityField] = []
        self.pipes: dict = {}
        self.fittings: dict = {}

        def qf(key, kind, label, css, **kw):
            text = value_at(doc, key)
            f = QuantityField(kind, label, text=None if text is None else str(text),
                              system=system, field=label, p_baro=p_baro, width="9em", **kw)
            f.add_class(css)
            self.keys[f] = key
            self.fields.append(f)
            return f

        duty = [qf("duty.flow", "flow", "required flow", "hl-duty-flow")]
        ends = []
        for which in ("source", "destination"):
            sec = doc.get(which) or {}
            name = sec.get("name", which)
            ends.append(widgets.HTML(f"<b>{which}</b>: {name}"))
            if "level" in sec:
                ends.append(qf(f"{which}.level", "elevation", f"{which} level",
                               f"hl-{which}-level"))
            else:
                ends.append(qf(f"{which}.level_low", "elevation", f"{which} level, lowest",
                               f"hl-{which}-level-low"))
                ends.append(qf(f"{which}.level_high", "elevation", f"{which} level, highest",
                               f"hl-{which}-level-high"))
            if "pressure" in sec:
                ends.append(qf(f"{which}.pressure", "pressure", f"{which} pressure",
                               f"hl-{which}-pressure", gauge=True))
        lines = {}
        for which in ("suction", "discharge"):
            sec = doc.get(which) or {}
            parts = []
            if "start_elevation" in sec:
                parts.append(qf(f"{which}.start_elevation", "elevation",
                                f"{which} start elevation", f"hl-{which}-start"))
            for i, seg in enumerate(sec.get("segments") or []):
                base = f"{which}.segments.{i}"
                name = seg.get("name", f"segment {i + 1}")
                parts.append(widgets.HTML(f"<b>{name}</b>"))
                pipe = PipePicker(build_pipe(seg["pipe"], f"{base}.pipe"), system=system,
                                  title="")
                pipe.add_class(f"hl-{which}-pipe")
                self.keys[pipe] = f"{base}.pipe"
                self.pipes[f"{base}.pipe"] = pipe
                parts += [pipe,
                          qf(f"{base}.length", "length", f"length of {name}",
                             f"hl-{which}-length"),
                          qf(f"{base}.rise", "length", f"rise of {name}", f"hl-{which}-rise")]
                fits = tuple(build_fitting(f, f"{base}.fittings[{j}]")
                             for j, f in enumerate(seg.get("fittings") or []))
                fl = FittingList(fits, system=system, title=f"fittings of {name}")
                fl.add_class(f"hl-{which}-fittings")
                self.keys[fl] = f"{base}.fittings"
                self.fittings[f"{base}.fittings"] = fl
                parts.append(fl)
            lines[which] = parts
        op = doc.get("operation") or {}
        oper = []
        oper.append(qf("operation.hours_per_year", "time", "running hours a year",
                       "hl-hours", optional=True))
        self.tariff = qf("operation.tariff", "dimensionless", "tariff per kWh", "hl-tariff",
                         optional=True)
        oper.append(self.tariff)
        self.currency = widgets.Text(value=str(op.get("currency", "")), description="currency",
                                     continuous_update=False,
                                     layout=widgets.Layout(width="16em"))
        self.currency.add_class("hl-currency")
        self.keys[self.currency] = "operation.currency"
        oper.append(self.currency)
        self.sections = [
            Section("Duty, source and destination", duty + ends),
            Section("Suction line", lines["suction"], open=False),
            Section("Discharge line", lines["discharge"], open=False),
            Section("Running hours and tariff", oper, open=False),
        ]
        self.view = widgets.VBox(list(self.sections))
        self.view.add_class("hl-pump-system")

    def observe(self, callback) -> None:
        """Call ``callback(change)`` when any input's value changes (``change["owner"]`` is
        the input)."""
        for w in self.keys:
            w.observe(callback, names="value")

    def doc_value(self, w, doc: dict):
        """What input ``w`` writes at its key of ``doc``: the typed text with its unit (the
        document's own text kept when it says the same value), a number for the tariff, a
        ``pipe`` table, a fitting list. A kit error while the input is not valid."""
        from kit.panels.scenario_text import field_text, fitting_rows, pipe_doc

        key = self.keys[w]
        old = value_at(doc, key)
        if isinstance(w, QuantityField):
            if w is self.tariff:
                return None if w.value is None else float(w.value)
            return field_text(w, old if isinstance(old, str) else None)
        if key in self.pipes:
            from kit.panels.base import panel_value

            return pipe_doc(panel_value(w, "the pipe is not valid"), old, self.system)
        if key in self.fittings:
            return fitting_rows(w, old or (), key, self.system)
        return w.value.strip()

    def set_system(self, system: str) -> None:
        self.system = system
        for w in self.keys:
            if hasattr(w, "set_system"):
                w.set_system(system)

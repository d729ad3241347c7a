"""LoadProfileEditor: the hours a year a pump set runs at each flow, as an editable table.

Each row is one step of the load profile: a flow and the hours a year at that flow, each a
:class:`~kit.panels.fields.QuantityField` (text with its unit, ``"120 m3/h"``,
``"3000 h"``; a bare number takes the unit shown in the column head). Rows can be added and
removed. The editor holds text only: :attr:`LoadProfileEditor.texts` is what the app writes
into the scenario's ``[load_profile]`` (:func:`kit.inputs.pump_selection.with_load_profile`),
so the scenario's own reader refuses what a file would (repeated flows, more than 8784 h a
year), with the same message, shown beside the table by the app.

``value`` (a traitlet) is the tuple of (flow text, hours text) rows, set when every box
reads; it fires the one change event the app observes. A bad box keeps its text and shows
its message; ``value`` then keeps the last good rows.

Example
-------
>>> ed = LoadProfileEditor(["60 m3/h", "120 m3/h"], ["2000 h", "3000 h"])
>>> ed.value
(('60 m3/h', '2000 h'), ('120 m3/h', '3000 h'))
>>> ed.rows[1][1].input.value = "3500"
>>> ed.value[1], round(ed.total_hours(), 1)
(('120 m3/h', '3500 h'), 5500.0)
>>> ed.rows[0][0].input.value = "60 kg"
>>> ed.value[0], ed.valid
(('60 m3/h', '2000 h'), False)
"""

from __future__ import annotations

import ipywidgets as widgets
import traitlets

from kit.panels.base import error_html, error_widget
from kit.panels.fields import QuantityField

__all__ = ["LoadProfileEditor", "MAX_STEPS"]

#: Most steps a profile may hold in the editor.
MAX_STEPS = 24


class LoadProfileEditor(widgets.VBox):
    """An editable table of (flow, hours a year) steps; see the module docstring.

    Parameters
    ----------
    flows, hours : sequence of str
        The steps' texts with units (one flow and one hours text per step).
    system : str
        'SI' or 'US': the unit a bare number takes and the echo beside each box.

    Attributes
    ----------
    rows : list of (QuantityField, QuantityField)
    value : tuple of (str, str)
        The last rows whose every box read (texts as typed, a unit added to a bare number).
    message : ipywidgets.HTML
        The app's refusal of the profile as a whole (CSS ``hl-error``).
    """

    value = traitlets.Tuple(())

    def __init__(self, flows=(), hours=(), system: str = "SI"):
        super().__init__()
        self.system = system
        self.rows: list = []
        self.table = widgets.VBox([])
        self.table.add_class("hl-load-profile-rows")
        self.add_button = widgets.Button(description="add a step",
                                         layout=widgets.Layout(width="9em"))
        self.add_button.add_class("hl-load-profile-add")
        self.add_button.on_click(lambda _b: self.add_row())
        self.total = widgets.HTML("")
        self.total.add_class("hl-load-profile-total")
        self.message = error_widget()
        self._quiet = True
        for q, t in zip(flows, hours, strict=True):
            self.add_row(q, t)
        self._quiet = False
        self.children = [widgets.HTML("<b>Load profile</b> <span class='hl-note'>(flow and "
                                      "hours a year at that flow; press Enter after a "
                                      "change)</span>"),
                         self.table, widgets.HBox([self.add_button, self.total]),
                         self.message]
        self.add_class("hl-load-profile")
        self._update()

    # ------------------------------------------------------------------ rows
    def add_row(self, flow: str = "", hours: str = "") -> None:
        """Append a step (empty boxes by default: the value waits until both read)."""
        if len(self.rows) >= MAX_STEPS:
            self.show_error(f"a load profile holds at most {MAX_STEPS} steps")
            return
        i = len(self.rows)
        unit = "gpm" if self.system == "US" else "m3/h"
        fq = QuantityField("flow", f"step {i + 1}: flow", text=flow or "", system=self.system,
                           field=f"load profile step {i + 1} flow", default_unit=unit,
                           width="8em")
        ft = QuantityField("time", "hours a year", text=hours or "", system=self.system,
                           field=f"load profile step {i + 1} hours", default_unit="h",
                           width="7em")
        ft.echo.layout.display = "none"   # hours are read as typed; no minutes echo
        fq.add_class("hl-load-flow")
        ft.add_class("hl-load-hours")
        drop = widgets.Button(description="remove", layout=widgets.Layout(width="6em"))
        drop.add_class("hl-load-profile-remove")
        row = (fq, ft)
        drop.on_click(lambda _b, _r=row: self.remove_row(self.rows.index(_r)))
        self.rows.append(row)
        box = widgets.HBox([fq, ft, drop])
        box.add_class("hl-load-profile-row")
        self.table.children = [*self.table.children, box]
        for f in row:
            f.observe(self._on_change, names="value")
            f.input.observe(self._on_change, names="value")
        if not self._quiet:
            self._update()

    def remove_row(self, index: int) -> None:
        """Remove step ``index`` (the last step stays: a profile needs one)."""
        if len(self.rows) <= 1:
            self.show_error("a load profile needs at least one step")
            return
        del self.rows[index]
        kids = list(self.table.children)
        del kids[index]
        self.table.children = kids
        self._update()

    # ------------------------------------------------------------------ state
    @property
    def valid(self) -> bool:
        """Every box reads (a flow and an hours value on every row)."""
        return bool(self.rows) and all(f.value is not None for row in self.rows for f in row)

    @property
    def texts(self) -> tuple:
        """(flow texts, hours texts) of the rows as typed, a unit added to a bare number."""
        return (tuple(_text(r[0]) for r in self.rows), tuple(_text(r[1]) for r in self.rows))

    def total_hours(self) -> float:
        """Sum of the hours boxes that read [h]."""
        return sum(r[1].value for r in self.rows if r[1].value is not None) / 3600.0

    def _on_change(self, change=None) -> None:
        self._update()

    def _update(self) -> None:
        self.total.value = (f"<span class='hl-note'>{len(self.rows)} steps, "
                            f"{self.total_hours():,.0f} h a year</span>")
        if self.valid:
            flows, hours = self.texts
            self.value = tuple(zip(flows, hours, strict=True))

    def show_error(self, message: str) -> None:
        """Show the app's refusal of the profile beside the table."""
        self.message.value = error_html(message)

    def clear_error(self) -> None:
        self.message.value = ""

    # mark_field / unmark_field (kit.panels.base) call these
    def refuse(self, message: str) -> None:
        self.add_class("hl-field-error")
        self.show_error(message)

    def unrefuse(self) -> None:
        self.remove_class("hl-field-error")
        self.clear_error()

    def set_system(self, system: str) -> None:
        self.system = system
        for row in self.rows:
            for f in row:
                f.set_system(system)

    def __repr__(self) -> str:
        return f"LoadProfileEditor({len(self.rows)} steps)"


def _text(f: QuantityField) -> str:
    """The box's text, with the default unit added to a bare number."""
    t = f.text.strip()
    try:
        float(t)
    except ValueError:
        return t
    return f"{t} {f.default_unit}" if f.default_unit else t

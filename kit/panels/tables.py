"""Results tables: rows of SI values rendered to HTML with units formatted through kit.units.

A :class:`Column` names a row key, its header and the quantity kind of its values (a key
of :data:`kit.units.KINDS`, or None for text). Every text is escaped with
:func:`html.escape`. :func:`results_table_html` returns the HTML; :class:`ResultsTable`
is a widget that holds the rows and re-renders on :meth:`ResultsTable.set_system`.

Example
-------
>>> cols = [Column("name", "segment"), Column("V", "velocity", "velocity")]
>>> html_text = results_table_html([{"name": "riser <A>", "V": 1.5}], cols, "US")
>>> "riser &lt;A&gt;" in html_text, "4.92" in html_text, "[ft/s]" in html_text
(True, True, True)
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass

from kit import units
from kit.panels.base import HtmlView

__all__ = ["Column", "results_table_html", "reported_table_html", "ResultsTable", "unit_label"]

_PRETTY = {"m**3/h": "m³/h", "m**3/s": "m³/s", "m**2": "m²", "m**3": "m³", "ft**2": "ft²",
           "kg/m**3": "kg/m³", "lb/ft**3": "lb/ft³", "mPa*s": "mPa·s", "mm**2/s": "mm²/s",
           "degC": "°C", "degF": "°F", "delta_degC": "K", "delta_degF": "°F (difference)",
           "kPa/(100 m)": "kPa/100 m", "psi/(100 ft)": "psi/100 ft", "gallon": "US gal",
           "Pa*s": "Pa·s", "m**2/s": "m²/s"}


def unit_label(kind: str, system: str = "SI", gauge: bool = False) -> str:
    """The display unit of ``kind`` as people write it ('m³/h', 'kPa(g)', 'psig').

    >>> unit_label("pressure", "US", gauge=True)
    'psig'
    """
    unit = units.display_unit(kind, system)
    if kind == "pressure":
        if unit == "psi":
            return "psig" if gauge else "psia"
        return f"{unit}(g)" if gauge else f"{unit}(a)"
    return _PRETTY.get(unit, unit)


@dataclass(frozen=True)
class Column:
    """One column of a results table.

    Attributes
    ----------
    key : str
        The row-dict key.
    header : str
        Header text (the unit is appended in brackets for a quantity column).
    kind : str or None
        A key of :data:`kit.units.KINDS`, or None for text / plain numbers.
    digits : int
        Significant figures.
    gauge : bool
        For pressures: show gauge (against the table's barometric pressure).
    """

    key: str
    header: str
    kind: str | None = None
    digits: int = 3
    gauge: bool = False


def _cell(value, col: Column, system: str, p_baro: float) -> str:
    if value is None:
        return "—"
    if col.kind is None or isinstance(value, str):
        if isinstance(value, float):
            return f"{value:.{col.digits}g}"
        return html.escape(str(value))
    x = float(value)
    if not math.isfinite(x):
        return html.escape(f"{x}")
    if col.kind == "pressure" and col.gauge:
        x -= p_baro
        return html.escape(units.fmt(x, "pressure_difference", system, digits=col.digits,
                                     with_unit=False))
    return html.escape(units.fmt(x, col.kind, system, digits=col.digits, with_unit=False))


def results_table_html(rows, columns, system: str = "SI", p_baro: float = 101325.0,
                       css_class: str = "hl-results", caption: str | None = None) -> str:
    """An HTML table of ``rows`` (dicts of SI values) in the display ``system``.

    Parameters
    ----------
    rows : iterable of dict
        One dict per row; missing keys show '—'.
    columns : sequence of Column
    system : str
        'SI' or 'US'.
    p_baro : float
        Barometric pressure for gauge columns [Pa].
    css_class : str
        CSS class of the table.
    caption : str, optional

    Returns
    -------
    html : str
    """
    head = []
    for c in columns:
        label = html.escape(c.header)
        if c.kind is not None:
            u = unit_label(c.kind, system, c.gauge)
            if u:
                label += f" [{html.escape(u)}]"
        head.append(f"<th>{label}</th>")
    body = []
    for row in rows:
        cells = "".join(f"<td>{_cell(row.get(c.key), c, system, p_baro)}</td>" for c in columns)
        body.append(f"<tr>{cells}</tr>")
    cap = f"<caption>{html.escape(caption)}</caption>" if caption else ""
    return (f'<table class="{html.escape(css_class)}">{cap}<thead><tr>{"".join(head)}</tr>'
            f'</thead><tbody>{"".join(body)}</tbody></table>')


def reported_table_html(values, system: str = "SI", css_class: str = "hl-results") -> str:
    """A two-column table (quantity, value with unit) of :class:`kit.results.Reported` values.

    >>> from kit.results import Reported
    >>> "150 gpm" in reported_table_html([Reported("q", "design flow", 0.00946353, "flow")], "US")
    True
    """
    body = []
    for v in values:
        shown = units.fmt(v.value, v.kind, system) if v.kind in units.KINDS else f"{v.value:.4g}"
        body.append(f"<tr><td>{html.escape(v.label)}</td><td>{html.escape(shown)}</td></tr>")
    return (f'<table class="{html.escape(css_class)}"><thead><tr><th>quantity</th><th>value</th>'
            f'</tr></thead><tbody>{"".join(body)}</tbody></table>')


class ResultsTable(HtmlView):
    """A widget showing rows of SI values; ``.value`` is the tuple of row dicts.

    Parameters
    ----------
    columns : sequence of Column
    rows : iterable of dict, optional
    system : str
    p_baro : float
        Barometric pressure for gauge columns [Pa].
    caption : str, optional

    CSS classes: ``hl-results-table`` on the box, ``hl-results`` on the table.
    """

    css_class = "hl-results-table"

    def __init__(self, columns, rows=(), system: str = "SI", p_baro: float = 101325.0,
                 caption: str | None = None):
        self.columns = tuple(columns)
        self.p_baro = p_baro
        self.caption = caption
        super().__init__(rows, system=system)

    def _render_system(self) -> None:
        self.html.value = results_table_html(self.value or (), self.columns, self.system,
                                             self.p_baro, caption=self.caption)

"""QuantityField: one text box for a number with its unit, checked against its dimension.

The user types ``"150 gpm"``, ``"4 in"``, ``"2.5 bar(g)"``; the field reads it through
:func:`kit.units.parse` for its *kind* (a key of :data:`kit.units.KINDS`), shows the value
again in the display system beside the box (``= 34.07 m³/h``), and holds the SI float in
``.value``. Bad text shows the kit's message beside the box and is kept as typed; ``.value``
is then ``None`` and ``.valid`` is ``False``.

Example
-------
>>> q = QuantityField("flow", "design flow", text="150 gpm")
>>> round(q.value, 6), q.valid
(0.009464, True)
>>> q.input.value = "150 kg"
>>> q.value is None, q.input.value
(True, '150 kg')
>>> "needs a volumetric flow" in q.error
True
"""

from __future__ import annotations

import html
from collections.abc import Callable

import ipywidgets as widgets
import traitlets

from kit import units
from kit.errors import LiquidStateError, OutOfRangeError
from kit.panels.base import KIT_ERRORS, Panel, display_message, error_html, error_widget
from kit.panels.entry import TextEntry

__all__ = ["QuantityField", "text_for"]


def text_for(value_si: float, kind: str, system: str = "SI", digits: int = 4,
             gauge: bool = False, p_baro: float = 101325.0) -> str:
    """Text that shows ``value_si`` in ``system`` and that :func:`kit.units.parse` reads back.

    >>> text_for(0.1023, "diameter", "US")
    '4.028 in'
    >>> text_for(351325.0, "pressure", "SI", gauge=True)
    '250.0 kPa(g)'
    """
    if kind == "pressure":
        return units.fmt_pressure(value_si, system, gauge=gauge, p_baro=p_baro, digits=digits)
    pretty = units.fmt(value_si, kind, system, digits=digits)
    try:
        units.parse(pretty, kind, "display text", p_baro=p_baro)
        return pretty
    except KIT_ERRORS:
        unit = units.display_unit(kind, system)
        number = units.fmt(value_si, kind, system, digits=digits, with_unit=False)
        return f"{number} {unit}".strip()


class QuantityField(Panel):
    """A labelled text box for one quantity, with its SI value and an error line.

    Parameters
    ----------
    kind : str
        A key of :data:`kit.units.KINDS` ("flow", "diameter", "temperature", ...).
    label : str
        The label shown before the box.
    value_si : float, optional
        Initial value in the kind's SI unit; shown as text in ``system``.
    text : str, optional
        Initial text (wins over ``value_si``).
    system : str
        Display system of the echo beside the box: 'SI' or 'US'.
    field : str, optional
        The name used in error messages (defaults to ``label``).
    p_baro : float
        Barometric pressure for gauge pressures [Pa].
    gauge : bool
        For pressures: show (and write from ``value_si``) gauge rather than absolute.
    optional : bool
        An empty box is valid and gives ``value`` None.
    validator : callable, optional
        ``validator(value_si)`` raising a kit error for a value outside its range; its
        message is shown like a parse error.
    digits : int
        Significant figures of the echo and of text written from a value.
    default_unit : str, optional
        Unit assumed for a bare number (otherwise a unit is required).

    Attributes
    ----------
    value : float or None
        SI magnitude [SI unit of ``kind``]; None while the text is invalid or empty.
    input : kit.panels.entry.TextEntry
        The text box: read on Enter or on leaving the box (one message to the kernel).
    echo, message : ipywidgets.HTML
        The value in the display system (CSS ``hl-echo``) and the error line (``hl-error``).
    """

    css_class = "hl-quantity"

    def __init__(self, kind: str, label: str, value_si: float | None = None,
                 text: str | None = None, system: str = "SI", field: str | None = None,
                 p_baro: float = 101325.0, gauge: bool = False, optional: bool = False,
                 validator: Callable[[float], object] | None = None, digits: int = 4,
                 default_unit: str | None = None, width: str = "11em"):
        if kind not in units.KINDS:
            raise KeyError(f"unknown quantity kind {kind!r}; choose one of {', '.join(units.KINDS)}")
        self.kind = kind
        self.field = field or label
        self.p_baro = float(p_baro)
        self.gauge = gauge
        self.optional = optional
        self.validator = validator
        self.digits = digits
        self.default_unit = default_unit
        #: The message of a refusal across inputs shown beside the box ('' for none).
        self.refused = ""
        self.label = widgets.Label(label)
        self.label.add_class("hl-label")
        self.input = TextEntry(value="", layout=widgets.Layout(width=width))
        self.input.add_class("hl-input")
        self.echo = widgets.HTML("")
        self.echo.add_class("hl-echo")
        self.message = error_widget()
        row = widgets.HBox([self.label, self.input, self.echo, self.message])
        row.add_class("hl-field-row")
        super().__init__([row], system=system)
        self.label.layout.min_width = "9em"
        #: (text, exact SI value) of text this field wrote from a value: reading that same
        #: text back gives the exact value, not its rounded display.
        self._exact: tuple[str, float] | None = None
        if text is None and value_si is not None:
            text = text_for(value_si, kind, system, digits, gauge, self.p_baro)
            self._exact = (text, float(value_si))
        self.input.value = text or ""
        self._parse()
        self._wire()

    def _wire(self) -> None:
        self.input.observe(self._on_text, names="value")

    # -- reading
    def _on_text(self, change) -> None:
        if self._busy:
            return
        self._parse()

    def _parse(self) -> None:
        text = self.input.value
        if self.optional and not text.strip():
            self._set_valid(True, "")
            self._store(None)
            self._render_echo()
            return
        try:
            if self._exact is not None and self._exact[0] == text:
                x = self._exact[1]
            else:
                x = units.parse(text, self.kind, self.field, p_baro=self.p_baro,
                                default_unit=self.default_unit)
            if self.validator is not None:
                self.validator(x)
        except KIT_ERRORS as exc:
            self.show_error(self.explain(exc))
            return
        self.message.value = ""
        self.refused = ""
        self._set_valid(True, "")
        self._store(x)
        self._render_echo()

    def explain(self, exc) -> str:
        """A kit error about this field in the display system's units and words: a range
        or a liquid state in this field's unit (°F for a °F field, % for an efficiency,
        kPa(g)/psig for a gauge pressure); other messages as the kit wrote them."""
        if isinstance(exc, (OutOfRangeError, LiquidStateError)):
            return display_message(exc, self.system, self.kind, self.field, self.gauge,
                                   self.p_baro)
        return str(exc)

    def explain_any(self, exc) -> str:
        """Any kit error about this field (e.g. a scenario writer's refusal of its text),
        named by this field and in its display units (see
        :func:`kit.panels.base.display_message`)."""
        name = getattr(exc, "field", None)
        name = name if isinstance(name, str) and self.field in name else self.field
        return display_message(exc, self.system, self.kind, name, self.gauge, self.p_baro)

    def _set_valid(self, ok: bool, message: str) -> None:
        super()._set_valid(ok, message)
        self._mark()

    def _mark(self) -> None:
        if not self.valid or self.refused:
            self.add_class("hl-field-error")
        else:
            self.remove_class("hl-field-error")

    # -- showing
    def _show(self, obj) -> None:
        self.message.value = ""
        self.refused = ""
        if obj is None:
            self._exact = None
            self.input.value = ""
        else:
            text = text_for(float(obj), self.kind, self.system, self.digits, self.gauge,
                            self.p_baro)
            self._exact = (text, float(obj))
            self.input.value = text

    @traitlets.validate("value")
    def _coerce(self, proposal):
        v = proposal["value"]
        return None if v is None else float(v)

    def _after_show(self) -> None:
        self._render_echo()

    def _render_echo(self) -> None:
        if self.value is None or self.refused:
            self.echo.value = ""
            return
        if self.kind == "pressure":
            g = units.fmt_pressure(self.value, self.system, True, self.p_baro, self.digits)
            a = units.fmt_pressure(self.value, self.system, False, self.p_baro, self.digits)
            shown = f"{g} = {a}"
        else:
            shown = units.fmt(self.value, self.kind, self.system, digits=self.digits)
        self.echo.value = f'<span class="hl-echo-text">= {html.escape(shown)}</span>'

    def _render_system(self) -> None:
        self._render_echo()

    # -- public helpers
    @property
    def text(self) -> str:
        """The text in the box, as typed."""
        return self.input.value

    def set_text(self, text: str) -> None:
        """Put ``text`` in the box and read it (as if typed)."""
        if self.input.value != text:
            self.input.value = text
        else:
            self._parse()

    def refuse(self, message: str) -> None:
        """Mark the field as refused by a check across inputs (e.g. a design flow above the
        maximum): red border (CSS ``hl-field-error``) and ``message`` beside the box; the
        echo is hidden. The value stays (the field itself reads); :meth:`unrefuse` undoes."""
        self.refused = str(message)
        self.message.value = error_html(message)
        self.echo.value = ""
        self._mark()

    def unrefuse(self) -> None:
        """Undo :meth:`refuse` (the field's own parse message, if any, stays)."""
        if not self.refused:
            return
        self.refused = ""
        if self.valid:
            self.message.value = ""
            self._render_echo()
        else:
            self.message.value = error_html(self.error)
        self._mark()

    def show_error(self, message: str) -> None:
        """Show ``message`` beside the box (text kept); ``value`` becomes None."""
        self.message.value = error_html(message)
        self.echo.value = ""
        self._set_valid(False, message)
        self._store(None)

    def clear_error(self) -> None:
        """Re-read the box if it shows a message (clears one set by :meth:`show_error`)."""
        if not self.valid or self.message.value:
            self._parse()

"""The panel base: one ``value`` trait, one change event, errors shown beside the field.

Every panel in :mod:`kit.panels` is an :class:`ipywidgets.VBox` subclass built on
:class:`Panel`:

- ``panel.value`` is a core object in SI (a float, a ``Pipe``, a tuple of ``Fitting`` ...),
  or ``None`` while any of the panel's inputs is invalid.
- ``panel.valid`` is ``False`` while an input is invalid (the message is in ``panel.error``
  and beside the field).
- **The change event** is the traitlets change of ``value``, the same one every ipywidget
  fires: ``panel.observe(callback, names="value")``. It fires once per change of the
  value, whether the user edited a widget or code assigned ``panel.value = obj``.
- Assigning ``panel.value = obj`` (or ``panel.set_value(obj)``) shows ``obj`` in the widgets.
- ``panel.set_system("SI" | "US")`` re-renders displayed quantities in a display system and
  never touches what the user typed.

The ``value`` trait is kernel-side only (not synced to the browser): a panel can hold real
core objects.

Example
-------
>>> from kit.panels.fields import QuantityField
>>> q = QuantityField("flow", "design flow", text="150 gpm")
>>> seen = []
>>> q.observe(lambda change: seen.append(change["new"]), names="value")
>>> q.input.value = "36 m3/h"
>>> round(seen[-1], 5)
0.01
"""

from __future__ import annotations

import html
from contextlib import contextmanager

import ipywidgets as widgets
import traitlets

from kit.errors import HeadlineError

__all__ = ["Panel", "HtmlView", "SYSTEMS", "error_html", "check_system", "KIT_ERRORS",
           "InvalidInput", "field_value", "panel_value", "stale_html", "section_heading"]

#: Display systems a panel can show: value -> label.
SYSTEMS = {"SI": "SI", "US": "US customary"}

#: The errors a panel catches and shows; anything else is a bug and surfaces.
KIT_ERRORS = (HeadlineError,)


def check_system(system: str) -> str:
    """Return ``system`` if it is a display system, else raise ``KeyError`` listing them."""
    if system not in SYSTEMS:
        raise KeyError(f"unknown display system {system!r}; choose one of {', '.join(SYSTEMS)}")
    return system


def error_html(message: str | None) -> str:
    """The escaped HTML of an error message ('' for none)."""
    if not message:
        return ""
    return f'<span class="hl-error-text">{html.escape(str(message))}</span>'


def error_widget() -> widgets.HTML:
    """An empty error line with the CSS class ``hl-error``."""
    w = widgets.HTML("")
    w.add_class("hl-error")
    return w


def stale_html(message: str) -> str:
    """An app's message while an input is bad: the error, and that the results shown are for
    the last valid input."""
    return (error_html(message) + '<div class="hl-note">Results below are '
            "for the last valid input.</div>")


def section_heading(text: str) -> widgets.HTML:
    """A section heading of an app (CSS class ``hl-section``)."""
    return widgets.HTML(f'<div class="hl-section">{html.escape(text)}</div>')


class InvalidInput(Exception):
    """Internal to the panels: an input shows its own message; the app keeps its last results.

    Not a kit error (:mod:`kit.errors`): a panel raises and catches it; it never leaves one.
    """


def field_value(f, required: bool = True):
    """The SI value of a :class:`~kit.panels.fields.QuantityField`.

    Raises :class:`InvalidInput` with the field's own message while it is invalid, and
    "'<field>' is required" while it is empty and ``required``; an empty optional field
    gives None.
    """
    if not f.valid:
        raise InvalidInput(f.error or f"'{f.field}' is required")
    if required and f.value is None:
        raise InvalidInput(f"'{f.field}' is required")
    return f.value


def panel_value(panel, message: str):
    """``panel.value``; :class:`InvalidInput` with the panel's own error (else ``message``)
    while it is None (an input of the panel is invalid)."""
    value = panel.value
    if value is None:
        raise InvalidInput(panel.error or message)
    return value


class Panel(widgets.VBox):
    """Base of the kit's panels: a ``value`` trait, ``valid``, ``error`` and ``set_system``.

    Subclasses build their children in ``__init__`` (assigned once), wire observers in
    ``_wire()``, and implement ``_read()`` (widgets → core object; raise a kit error for
    bad input) and ``_show(obj)`` (core object → widgets).
    """

    value = traitlets.Any(None, allow_none=True)
    valid = traitlets.Bool(True)
    error = traitlets.Unicode("")

    css_class = "hl-panel"

    def __init__(self, children=(), system: str = "SI", **kwargs):
        super().__init__(children=tuple(children), **kwargs)
        self.add_class("hl-panel")
        self.add_class(self.css_class)
        self.system = check_system(system)
        self._busy = False
        self.observe(self._value_assigned, names="value")

    # -- the single place where programmatic assignment reaches the widgets
    def _value_assigned(self, change) -> None:
        if self._busy:
            return
        with self._quiet():
            self._show(change["new"])
            self._set_valid(True, "")
        self._after_show()

    def _after_show(self) -> None:
        """Hook: refresh read-only displays after a programmatic value."""

    @contextmanager
    def _quiet(self):
        """Widget changes inside this block do not recompute the value."""
        old = self._busy
        self._busy = True
        try:
            yield
        finally:
            self._busy = old

    def _set_valid(self, ok: bool, message: str) -> None:
        self.error = "" if ok else str(message)
        self.valid = ok

    def _store(self, obj) -> None:
        """Set ``value`` from a widget change (no push back to the widgets)."""
        with self._quiet():
            self.value = obj

    def set_value(self, obj) -> None:
        """Show ``obj`` (same as assigning ``.value``)."""
        self.value = obj

    def set_system(self, system: str) -> None:
        """Re-render displayed quantities in ``system`` ('SI' or 'US'); input is kept."""
        self.system = check_system(system)
        self._render_system()

    def _render_system(self) -> None:
        """Hook: re-render for ``self.system``."""

    def _show(self, obj) -> None:  # pragma: no cover - abstract
        raise NotImplementedError


class HtmlView(Panel):
    """A read-only panel: its ``value`` a tuple of items (None gives ()), shown as one
    :class:`ipywidgets.HTML` (``self.html``).

    Subclasses set what they need before calling ``super().__init__`` and write
    ``self.html.value`` in ``_render_system`` (called on every new value and system).
    """

    def __init__(self, items=(), system: str = "SI", **kwargs):
        self.html = widgets.HTML("")
        super().__init__([self.html], system=system, **kwargs)
        self.value = tuple(items)

    @traitlets.validate("value")
    def _coerce(self, proposal):
        v = proposal["value"]
        return () if v is None else tuple(v)

    def _show(self, obj) -> None:
        self._render_system()

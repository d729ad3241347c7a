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
import re
from contextlib import contextmanager

import ipywidgets as widgets
import traitlets

from kit.errors import HeadlineError, OutOfRangeError, ScenarioError

__all__ = ["Panel", "HtmlView", "SYSTEMS", "error_html", "check_system", "KIT_ERRORS",
           "InvalidInput", "Refusal", "Refusals", "field_value", "panel_value", "stale_html",
           "section_heading", "display_message", "locate_field", "mark_field", "unmark_field",
           "shown_value", "BASE_CSS", "STALE_TEXT", "style_widget", "kernel_loop", "Later"]

#: What the banner over stale results says.
STALE_TEXT = "results are for the last accepted inputs"

#: The kit's own CSS for refusals and stale results (also shipped with every text box, see
#: :mod:`kit.panels.entry`, so a field shows it wherever it is displayed):
#:
#: - ``hl-error-text``: an error message, red;
#: - ``hl-field-error``: a field (or row) whose input is refused: red border on its box,
#:   its message beside it (``hl-field-error-box``: a whole editor outlined);
#: - ``hl-row-incomplete``: a table row not filled yet, left out of the study (dashed);
#: - ``hl-stale``: a results container (chart, table, findings) that no longer matches the
#:   inputs: faded and outlined until the input is fixed;
#: - ``hl-stale-banner``: the line above the results saying so.
BASE_CSS = """
.hl-error-text { color: #b3261e; font-weight: 500; }
.hl-error { color: #b3261e; }
.hl-field-error .hl-entry-input, .hl-field-error input, .hl-field-error textarea,
.hl-field-error select { border: 2px solid #b3261e !important; background: #fff6f5 !important; }
.hl-field-error .hl-label, .hl-field-error label { color: #b3261e !important; }
.hl-field-error-box { outline: 2px solid #b3261e; outline-offset: 2px; }
.hl-row-incomplete input, .hl-row-incomplete select { border: 1px dashed #b26a00 !important;
  background: #fff8e6 !important; }
.hl-note { color: #555; font-style: italic; }
.hl-stale { opacity: 0.45; filter: grayscale(0.7); outline: 2px dashed #b3261e;
  outline-offset: 2px; }
.hl-stale-banner .hl-stale-text { display: block; background: #fdecea; color: #8a1c14;
  border-left: 4px solid #b3261e; padding: 3px 8px; margin: 2px 0; }
"""

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
    """An app's message while an input is bad: the error (red), and that the results shown
    are for the last accepted inputs."""
    return (f'<div class="hl-stale-text">{error_html(message)} — {STALE_TEXT}</div>'
            if message else f'<div class="hl-stale-text">{STALE_TEXT}</div>')


def style_widget() -> widgets.HTML:
    """An HTML widget carrying :data:`BASE_CSS` (for views that hold no text box)."""
    return widgets.HTML(f"<style>{BASE_CSS}</style>")


# ---------------------------------------------------------------- messages in display units

#: SI unit texts in the kit's messages -> the quantity kind they are shown as.
_SI_UNIT_KIND = {"K": "temperature", "Pa": "pressure_abs", "m³/s": "flow", "m3/s": "flow",
                 "m**3/s": "flow",
                 "m/s": "velocity", "Pa/m": "pressure_per_length", "m": "length",
                 "W": "power"}
_SI_VALUE = re.compile(r"(?<![\w.])(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?) "
                       r"(K|Pa/m|Pa|m³/s|m3/s|m\*\*3/s|m/s|m|W)"
                       r"(?![\w³²/(])")


def _number(text: str) -> str:
    if "." in text and "e" not in text:
        text = text.rstrip("0").rstrip(".")
    return text


def shown_value(value_si: float, kind: str | None, system: str = "SI", gauge: bool = False,
                p_baro: float = 101325.0) -> str:
    """``value_si`` [SI] as the engineer reads it in ``system``: four significant figures
    without trailing zeros, with the display unit; a pressure says gauge or absolute; a
    fraction is shown in %.

    >>> shown_value(266.483, "temperature", "US")
    '20 °F'
    >>> shown_value(1.5, "fraction")
    '150 %'
    >>> shown_value(200000.0, "pressure", "US", gauge=True)
    '14.31 psig'
    """
    from kit import units

    if kind is None or kind == "dimensionless":
        return _number(f"{float(value_si):.6g}")
    if kind == "fraction":
        return f"{_number(f'{100.0 * float(value_si):.4g}')} %"
    if kind == "pressure":
        text = units.fmt_pressure(float(value_si), system, gauge=gauge, p_baro=p_baro, digits=4)
    else:
        text = units.fmt(float(value_si), kind, system, digits=4)
    number, _, unit = text.partition(" ")
    return f"{_number(number)} {unit}".strip()


def _range_words(exc: OutOfRangeError, show) -> str:
    low, high = exc.low, exc.high
    lo_inc = getattr(exc, "low_inclusive", None)
    hi_inc = getattr(exc, "high_inclusive", None)
    text = str(exc)
    if low is not None and high is not None:
        lo, hi = show(low), show(high)
        lo_n, _, lo_u = lo.partition(" ")
        if lo_u and hi.endswith(" " + lo_u) and lo_u not in ("kPa(g)", "psig"):
            lo = lo_n   # one unit for both ends: "between 20.03 and 99.95 °F"
        if lo_inc is None or hi_inc is None:
            return f"must be between {lo} and {hi}"
        return (f"must be {'at least' if lo_inc else 'more than'} {show(low)} and "
                f"{'at most' if hi_inc else 'less than'} {hi}")
    if low is not None:
        inc = lo_inc if lo_inc is not None else "at least" in text
        return f"must be {'at least' if inc else 'more than'} {show(low)}"
    if high is not None:
        inc = hi_inc if hi_inc is not None else "at most" in text
        return f"must be {'at most' if inc else 'less than'} {show(high)}"
    return "must be a finite number"


def display_message(exc, system: str = "SI", kind: str | None = None,
                    field: str | None = None, gauge: bool = False,
                    p_baro: float = 101325.0) -> str:
    """The message of a kit error in the engineer's display units and words.

    - An :class:`~kit.errors.OutOfRangeError` of a quantity of ``kind`` is rewritten with its
      limits and value in ``system``'s unit ("at least", "more than", "at most", "less than"
      where the error says which end is allowed; "between" otherwise); an efficiency in %, a
      pressure with gauge or absolute said.
    - Any other message has its SI values ("372.3 K", "97184.6 Pa", "0.03 m³/s") shown in
      ``system``'s units; a scenario key prefix is dropped when ``field`` names the field.
    - ``field`` (the field's label) replaces the name the error gives.

    >>> from kit.errors import OutOfRangeError
    >>> e = OutOfRangeError("liquid.temperature_max", 320.0, "K", low=266.5, high=310.9)
    >>> display_message(e, "US", "temperature", field="highest temperature")
    "'highest temperature' must be more than 20.03 °F and at most 99.95 °F, not 116.3 °F"
    >>> display_message(OutOfRangeError("efficiency", 1.5, "-", low=0.0, high=1.0),
    ...                 kind="fraction")
    "'efficiency' must be more than 0 % and at most 100 %, not 150 %"
    """
    if not isinstance(exc, HeadlineError):
        return str(exc)
    name = field or getattr(exc, "field", None)
    unit = getattr(exc, "unit", None)
    if isinstance(exc, OutOfRangeError) and isinstance(exc.value, (int, float)) and \
            not isinstance(exc.value, bool):
        k = kind if kind is not None else _SI_UNIT_KIND.get(unit or "")
        if k is None and unit not in (None, "", "-"):
            return _translate(str(exc), system)

        def show(v):
            return shown_value(v, k, system, gauge, p_baro)

        return f"'{name}' {_range_words(exc, show)}, not {show(exc.value)}"
    text = exc.reason if isinstance(exc, ScenarioError) else str(exc)
    if field:
        # the name the error gives, up to the quote before the first space after it (a
        # name may quote a tag inside: 'start level in 'T-1'' must ...)
        text = re.sub(r"^'.*?'(?= )", lambda _m: f"'{field}'", text, count=1)
        if not text.startswith("'"):
            text = f"'{field}': {text}"
    return _translate(text, system)


def _translate(text: str, system: str) -> str:
    """SI values in a message (``"372.3 K"``, ``"97184.6 Pa"``) shown in ``system``'s units."""
    def one(m):
        kind = _SI_UNIT_KIND[m.group(2)]
        if kind == "temperature" and text[m.end():].startswith(" difference"):
            v = float(m.group(1))
            return m.group(0) if system == "SI" else f"{_number(f'{1.8 * v:.4g}')} °F"
        if system == "SI" and kind in ("length",):
            return m.group(0)
        return shown_value(float(m.group(1)), kind, system)

    def both(m):   # "between 153 and 10000 m": both ends in the display unit
        lo = one(re.match(r"(\S+) (.+)", f"{m.group(1)} {m.group(3)}"))
        hi = one(re.match(r"(\S+) (.+)", f"{m.group(2)} {m.group(3)}"))
        lo_n, _, lo_u = lo.partition(" ")
        return f"between {lo_n if hi.endswith(' ' + lo_u) else lo} and {hi}"

    num = r"(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?)"
    text = re.sub(rf"between {num} and {num} (K|Pa/m|Pa|m³/s|m3/s|m\*\*3/s|m/s|m|W)"
                  r"(?![\w³²/(])", both, text)
    return _SI_VALUE.sub(one, text)


def section_heading(text: str) -> widgets.HTML:
    """A section heading of an app (CSS class ``hl-section``)."""
    return widgets.HTML(f'<div class="hl-section">{html.escape(text)}</div>')


class InvalidInput(Exception):
    """Internal to the panels: an input shows its own message; the app keeps its last results.

    Not a kit error (:mod:`kit.errors`): a panel raises and catches it; it never leaves one.
    """


class Refusal(InvalidInput):
    """Internal to the panels: a check across inputs refused; ``field`` is the input to mark
    (a :class:`~kit.panels.fields.QuantityField` or any widget), ``message`` what to show
    beside it.
    """

    def __init__(self, field, message: str):
        super().__init__(message)
        self.field = field
        self.message = message


def mark_field(w, message: str) -> None:
    """Mark ``w`` as refused: its ``refuse(message)`` when it has one (a
    :class:`~kit.panels.fields.QuantityField` shows the message beside its box), else the
    CSS class ``hl-field-error``."""
    if hasattr(w, "refuse"):
        w.refuse(message)
    else:
        w.add_class("hl-field-error")


def unmark_field(w) -> None:
    """Undo :func:`mark_field`."""
    if hasattr(w, "unrefuse"):
        w.unrefuse()
    else:
        w.remove_class("hl-field-error")


def locate_field(fields, exc):
    """The field of ``fields`` a kit error is about: the one whose ``field`` name (or label)
    the error's field names, starts or ends with (``"start level in 'T-1'"`` is the start
    level field's, ``"padded surface pressure"`` the surface pressure field's); None if none
    is."""
    name = str(getattr(exc, "field", "") or getattr(exc, "key", "") or "")
    if not name:
        return None
    best = None
    for f in fields:
        names = [getattr(f, "field", None), getattr(getattr(f, "label", None), "value", None)]
        for n in names:
            if not isinstance(n, str) or not n:
                continue
            if name == n:
                return f
            if (name.startswith(n + " ") or name.endswith(" " + n)) and (
                    best is None or len(n) > len(best[1])):
                best = (f, n)
    return best[0] if best else None


class Refusals:
    """One pattern for every app: a refused input marked at its own field, the results that
    no longer match the inputs marked stale until the input is fixed.

    An app builds one with the containers of its results (charts, tables, findings) and
    runs each recompute through :meth:`attempt`:

    - a :class:`Refusal` (a check across inputs) marks its field in red with the message
      beside it;
    - an :class:`InvalidInput` needs nothing more: the field shows its own message;
    - a kit error is located by ``locate(exc)`` (the app's map of error fields to its
      inputs; ``None``: no field) and shown beside that field in the display units of
      ``system()``, or in the banner when no field is found;

    and in each case every results container gets the CSS class ``hl-stale`` and the banner
    (``banner``, CSS ``hl-stale-banner`` and ``hl-app-message``) says
    ":data:`STALE_TEXT`". The next accepted recompute clears the marks it set, the class and
    the banner: the message of an earlier bad input does not outlive the next good edit.

    Parameters
    ----------
    results : sequence of ipywidgets.Widget
        The containers marked stale.
    locate : callable, optional
        ``locate(exc) -> widget or None``.
    system : callable, optional
        The app's display system now ('SI' or 'US').
    """

    def __init__(self, results=(), locate=None, system=None):
        self.results = list(results)
        self.locate = locate or (lambda exc: None)
        self.system = system or (lambda: "SI")
        self.banner = widgets.HTML("")
        self.banner.add_class("hl-stale-banner")
        self.banner.add_class("hl-app-message")
        self.marked: list = []
        self.stale = False
        self.error = ""

    def attempt(self, fn):
        """``fn()``; on a refusal mark the field and the results and return None, else clear
        every mark and return what ``fn`` returned."""
        self.clear_marks()
        try:
            out = fn()
        except Refusal as exc:
            self.refuse(exc.message, exc.field)
            return None
        except InvalidInput as exc:
            self.refuse(str(exc), None, beside=True)
            return None
        except KIT_ERRORS as exc:
            self.refuse_error(exc)
            return None
        self.accept()
        return out

    def refuse_error(self, exc, field=None) -> None:
        """Show a kit error at ``field`` (default ``locate(exc)``), in display units."""
        w = field if field is not None else self.locate(exc)
        if hasattr(w, "explain_any"):
            self.refuse(w.explain_any(exc), w)
            return
        label = getattr(getattr(w, "label", None), "value", None) if w is not None else None
        kind = getattr(w, "kind", None) if w is not None else None
        gauge = getattr(w, "gauge", False) if w is not None else False
        p_baro = getattr(w, "p_baro", 101325.0) if w is not None else 101325.0
        message = display_message(exc, self.system(), kind if isinstance(kind, str) else None,
                                  label if isinstance(label, str) else None, gauge, p_baro)
        self.refuse(message, w)

    def refuse(self, message: str, field=None, beside: bool = False) -> None:
        """Mark ``field`` with ``message`` (or, with no field, show the message in the banner
        unless ``beside``: it is already beside its field) and the results stale."""
        self.error = message
        if field is not None:
            mark_field(field, message)
            self.marked.append(field)
            name = getattr(getattr(field, "label", None), "value", None)
            where = (f"'{html.escape(name)}' is refused (marked in red)"
                     if isinstance(name, str) and name else "an input is refused (marked in red)")
            text = f'<div class="hl-stale-text">{where} — {STALE_TEXT}</div>'
        elif beside:
            text = (f'<div class="hl-stale-text">an input is refused (its message is beside '
                    f"it) — {STALE_TEXT}</div>")
        else:
            text = stale_html(message)
        self.banner.value = text
        self._set_stale(True)

    def accept(self) -> None:
        """The inputs are accepted: no marks, no banner, nothing stale."""
        self.clear_marks()
        self.error = ""
        self.banner.value = ""
        self._set_stale(False)

    def clear_marks(self) -> None:
        for w in self.marked:
            unmark_field(w)
        self.marked = []

    def _set_stale(self, stale: bool) -> None:
        self.stale = stale
        for w in self.results:
            if stale:
                w.add_class("hl-stale")
            else:
                w.remove_class("hl-stale")


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


def kernel_loop():
    """The running event loop of an IPython kernel, or None outside one (plain Python,
    tests: a loop some other library runs in this thread — a browser driver's — is not a
    kernel's and must not defer work).

    The apps answer an edit with the main chart first and finish the rest of the study from
    this loop a moment later (:data:`kit.panels.network_app.STUDY_DELAY`,
    :data:`kit.panels.pump_selection_app.STUDY_DELAY`).

    >>> kernel_loop() is None     # plain Python
    True
    """
    import asyncio

    try:
        from IPython import get_ipython
    except ImportError:
        return None
    shell = get_ipython()
    if shell is None or getattr(shell, "kernel", None) is None:
        return None
    try:
        return asyncio.get_running_loop()
    except RuntimeError:
        return None


class Later:
    """One piece of an app's work left to the kernel's event loop (:func:`kernel_loop`):
    :meth:`start` runs ``fn`` ``delay`` seconds from now, replacing any run still waiting;
    :meth:`cancel` drops it. An exception in ``fn`` (a bug) is shown in ``refusals``' banner
    before it propagates to the kernel's log.

    >>> class Loop:                      # a stand-in that keeps what it is given
    ...     def call_later(self, delay, fn):
    ...         self.fn = fn
    ...         return type("Handle", (), {"cancel": lambda self: None})()
    >>> loop, seen = Loop(), []
    >>> later = Later(lambda: seen.append(1))
    >>> later.start(loop, 0.1)
    >>> later.waiting, seen
    (True, [])
    >>> loop.fn(); later.waiting, seen
    (False, [1])
    """

    def __init__(self, fn, refusals=None):
        self.fn, self.refusals, self.handle = fn, refusals, None

    @property
    def waiting(self) -> bool:
        return self.handle is not None

    def start(self, loop, delay: float) -> None:
        self.cancel()
        self.handle = loop.call_later(delay, self._run)

    def cancel(self) -> None:
        if self.handle is not None:
            self.handle.cancel()
            self.handle = None

    def _run(self) -> None:
        self.handle = None
        try:
            self.fn()
        except Exception as exc:
            if self.refusals is not None:
                self.refusals.refuse(f"internal error, please report it: "
                                     f"{type(exc).__name__}: {exc}")
            raise

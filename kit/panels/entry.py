"""A one-line text box that sends its text on Enter or when it loses focus, and nothing more.

ipywidgets' ``Text`` (with ``continuous_update=False``) sends the same value on Enter, but
also a separate "submit" message first; each message is a request the kernel answers with a
busy and an idle status, and JupyterLab redraws its kernel indicators for each. Measured in
the line-sizing notebook (headless Chromium, 2 cores), the extra request added about 50 ms
to an Enter → redrawn chart round trip. :class:`TextEntry` sends the value only.

The Python side is what a ``Text`` offers the kit: ``value``, ``disabled``, ``placeholder``,
``observe`` and ``add_class``; the widget's ``layout`` sizes the box.

Example
-------
>>> e = TextEntry(value="150 gpm")
>>> seen = []
>>> e.observe(lambda ch: seen.append(ch["new"]), names="value")
>>> e.value = "160 gpm"
>>> seen
['160 gpm']
"""

from __future__ import annotations

from pathlib import Path

import anywidget
import traitlets

from kit.panels.base import BASE_CSS

__all__ = ["TextEntry"]

_CSS = """
.hl-entry { display: flex; }
.hl-entry .hl-entry-input {
  width: 100%; box-sizing: border-box; height: var(--jp-widgets-inline-height, 28px);
  padding: 0 6px; font-family: inherit; font-size: var(--jp-widgets-font-size, 13px);
  color: var(--jp-widgets-input-color, inherit);
  background: var(--jp-widgets-input-background-color, white);
  border: var(--jp-widgets-input-border-width, 1px) solid
    var(--jp-widgets-input-border-color, #9e9e9e);
}
.hl-entry .hl-entry-input:focus { border-color: var(--jp-widgets-input-focus-border-color, #64b5f6);
  outline: none; }
.hl-entry .hl-entry-input:disabled { opacity: 0.6; }
"""


class TextEntry(anywidget.AnyWidget):
    """One line of text, sent to the kernel on Enter or blur (see the module docstring).

    CSS classes: ``hl-entry`` on the widget, ``hl-entry-input`` on the ``<input>``.
    """

    _esm = Path(__file__).with_name("entry.js")
    _css = _CSS + BASE_CSS
    value = traitlets.Unicode("").tag(sync=True)
    placeholder = traitlets.Unicode("").tag(sync=True)
    disabled = traitlets.Bool(False).tag(sync=True)

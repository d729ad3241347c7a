"""``sent_messages()``: every message widgets send to the browser inside a ``with`` block."""

from __future__ import annotations

from contextlib import contextmanager


@contextmanager
def sent_messages():
    """Yield a list that fills with ``(widget, message)`` for each message sent in the block.

    >>> import ipywidgets as widgets
    >>> w = widgets.Text()
    >>> with sent_messages() as sent:
    ...     w.value = "x"
    >>> [m["state"] for who, m in sent if who is w]
    [{'value': 'x'}]
    """
    import ipywidgets as widgets

    sent: list = []
    orig = widgets.Widget._send

    def spy(self, msg, buffers=None):
        sent.append((self, msg))
        return orig(self, msg, buffers)

    widgets.Widget._send = spy
    try:
        yield sent
    finally:
        widgets.Widget._send = orig

"""A stand-in for an IPython kernel's event loop, for the apps' deferred work.

The apps answer an edit with the main chart and leave the rest to the kernel's event loop
(``kit.panels.base.kernel_loop``). Outside a kernel they do everything at once; a test that
wants the kernel's way patches the app module's ``kernel_loop`` to return a
:class:`FakeLoop` and runs what is waiting with :meth:`FakeLoop.run`.
"""

from __future__ import annotations


class FakeLoop:
    """Keeps the callbacks scheduled with ``call_later``; :meth:`run` runs them."""

    def __init__(self):
        self.waiting: list = []     # (handle, callback)

    def call_later(self, delay, fn):
        loop = self

        class Handle:
            def cancel(self):
                loop.waiting = [(h, f) for h, f in loop.waiting if h is not self]

        h = Handle()
        self.waiting.append((h, fn))
        return h

    def run(self) -> None:
        """Run every callback waiting (not those they schedule)."""
        now, self.waiting = self.waiting, []
        for _, fn in now:
            fn()

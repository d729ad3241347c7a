"""``raises_exactly``: :func:`pytest.raises` that also pins the exact class, shared by the tests.

The kit's errors form a hierarchy (:mod:`kit.errors`); ``pytest.raises`` accepts a subclass,
so a test that means "this exact class" uses this instead.
"""

from __future__ import annotations

import pytest

__all__ = ["raises_exactly"]


def raises_exactly(cls, match):
    """pytest.raises that also pins the exact class (not a subclass)."""

    class _Ctx:
        def __enter__(self):
            self._cm = pytest.raises(cls, match=match)
            self.info = self._cm.__enter__()
            return self.info

        def __exit__(self, *exc):
            out = self._cm.__exit__(*exc)
            assert type(self.info.value) is cls, type(self.info.value)
            return out

    return _Ctx()

"""Docstring checks shared by the tests: the documented Parameters of a callable, read from
its numpydoc-style docstring (the skeleton fluids uses), against its signature.

Written for the tests (common practice, no source); nothing here calls the code under test
except through :mod:`inspect`.
"""

from __future__ import annotations

import inspect
import re

__all__ = ["parameter_entries", "documented_params", "signature_params", "unit_missing"]

#: The body of the Parameters section: up to the next section heading or the end.
_SECTION = re.compile(r"Parameters\n-+\n(.*?)(?:\n\n[A-Z][a-z]+\n-+\n|\Z)", re.S)
#: An entry's first line: ``name : type`` or ``a, b : type``.
_HEAD = re.compile(r"^(\w+(?:, \w+)*) :")
#: A unit in brackets at the end of an entry's description: ``[m]``, ``[-]``.
_UNIT = re.compile(r"\[[^\]]*\]$")


def parameter_entries(obj) -> dict[str, str] | None:
    """Documented parameter name -> its description (indented lines joined), in the order
    written; None when the docstring has no Parameters section."""
    m = _SECTION.search(inspect.getdoc(obj) or "")
    if m is None:
        return None
    entries: dict[str, list[str]] = {}
    lines = None
    for line in m.group(1).splitlines():
        head = _HEAD.match(line)
        if head:
            lines = []
            for name in head.group(1).split(", "):
                entries[name] = lines
        elif lines is not None and line.startswith("    "):
            lines.append(line.strip())
    return {name: " ".join(text) for name, text in entries.items()}


def documented_params(obj) -> list[str] | None:
    """The names of the Parameters section, in order (None without one)."""
    entries = parameter_entries(obj)
    return None if entries is None else list(entries)


def signature_params(obj, skip=("self",)) -> list[str]:
    """The public parameters of ``obj``'s signature (a class: its ``__init__``), in order,
    without those in ``skip`` and those starting with ``_``."""
    target = obj.__init__ if inspect.isclass(obj) else obj
    return [p for p in inspect.signature(target).parameters
            if p not in skip and not p.startswith("_")]


def unit_missing(obj) -> list[str]:
    """Documented parameters whose description does not end in a unit in brackets."""
    return [name for name, text in (parameter_entries(obj) or {}).items()
            if not _UNIT.search(text)]

"""DisplaySwitch: SI / US customary toggle that re-renders panels and charts, keeping input.

Anything with a ``set_system(system)`` method can be a target (every panel and chart of
:mod:`kit.panels` has one), or a plain callable ``f(system)``. Switching never rewrites
what the user typed: only echoes, result tables and chart axes change.

Example
-------
>>> from kit.panels.fields import QuantityField
>>> q = QuantityField("flow", "design flow", text="150 gpm")
>>> sw = DisplaySwitch([q])
>>> sw.value = "US"
>>> q.input.value, q.echo.value.endswith("= 150.0 gpm</span>")
('150 gpm', True)
"""

from __future__ import annotations

import ipywidgets as widgets

from kit.panels.base import SYSTEMS, Panel, check_system

__all__ = ["DisplaySwitch", "apply_system"]


def apply_system(targets, system: str) -> None:
    """Call ``set_system(system)`` on each target (or the target itself if it is a callable)."""
    check_system(system)
    for t in targets:
        if hasattr(t, "set_system"):
            t.set_system(system)
        elif callable(t):
            t(system)
        else:
            raise TypeError(f"{t!r} has no set_system(system) method and is not callable")


class DisplaySwitch(Panel):
    """A toggle between the SI and US customary display systems.

    Parameters
    ----------
    targets : iterable
        Panels, charts (anything with ``set_system``) or callables ``f(system)``.
    system : str
        Initial system, 'SI' or 'US'.
    label : str
        The label before the toggle.

    Attributes
    ----------
    value : str
        'SI' or 'US'. Changing it (by the toggle or from code) re-renders every target.
    """

    css_class = "hl-display-switch"

    def __init__(self, targets=(), system: str = "SI", label: str = "Units shown"):
        check_system(system)
        self.targets = list(targets)
        self.toggle = widgets.ToggleButtons(
            options=[(text, key) for key, text in SYSTEMS.items()], value=system)
        self.toggle.add_class("hl-display-toggle")
        row = widgets.HBox([widgets.Label(label), self.toggle])
        super().__init__([row], system=system)
        self.value = system
        self._wire()

    def _wire(self) -> None:
        self.toggle.observe(self._on_toggle, names="value")

    def _on_toggle(self, change) -> None:
        if self._busy:
            return
        self._store(change["new"])
        self._apply()

    def _show(self, obj) -> None:
        check_system(obj)
        self.toggle.value = obj

    def _after_show(self) -> None:
        self._apply()

    def _apply(self) -> None:
        self.system = self.value
        apply_system(self.targets, self.value)

    def add(self, *targets) -> None:
        """Add targets and bring them to the current system."""
        self.targets.extend(targets)
        apply_system(targets, self.value)

    def set_system(self, system: str) -> None:
        """Same as assigning ``.value``."""
        self.value = check_system(system)

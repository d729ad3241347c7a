"""Results of a study: the reported values, findings, methods and cautions of one scenario.

Each scenario kind has a *study* module under ``kit/studies`` with a
``compute(scenario) -> Results`` function. Notebooks show a ``Results``; the record writes it;
``python -m kit check`` recomputes it and compares value by value (by ``key``).

Example
-------
>>> r = Results("line_sizing")
>>> r.add("design.flow", "design flow", 0.0125, "flow")
>>> r.value("design.flow")
0.0125
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass, field

from kit.core.findings import Finding

__all__ = ["Reported", "Method", "Results", "STUDIES", "compute"]

#: scenario kind -> module with ``compute(scenario) -> Results``
STUDIES = {
    "line_sizing": "kit.studies.line_sizing",
    "pump_selection": "kit.studies.pump_selection",
    "tank_drainage": "kit.studies.tank_drainage",
}


@dataclass(frozen=True)
class Reported:
    """One reported number: a stable key, a label, its SI value and its unit kind.

    ``kind`` is a key of :data:`kit.units.KINDS` (``"flow"``, ``"head"``, ...) so that the
    record and the panels can show the value in any display system.
    """

    key: str
    label: str
    value: float
    kind: str

    def as_dict(self) -> dict:
        from kit.units import KINDS

        return {"key": self.key, "label": self.label, "value": self.value, "kind": self.kind,
                "si_unit": KINDS[self.kind][0] if self.kind in KINDS else ""}


@dataclass(frozen=True)
class Method:
    """A method applied, with its published reference."""

    name: str
    reference: str


@dataclass
class Results:
    """Everything a study reports: values, findings, methods, cautions, and display tables.

    ``tables`` holds named tables (list of row dicts of already-SI values) for notebooks and
    the record; ``values`` is what ``kit check`` compares.
    """

    kind: str
    values: list[Reported] = field(default_factory=list)
    findings: list[Finding] = field(default_factory=list)
    methods: list[Method] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)
    tables: dict = field(default_factory=dict)

    def add(self, key: str, label: str, value: float, kind: str) -> None:
        if any(v.key == key for v in self.values):
            raise KeyError(f"reported key {key!r} is already used")
        self.values.append(Reported(key, label, float(value), kind))

    def value(self, key: str) -> float:
        for v in self.values:
            if v.key == key:
                return v.value
        raise KeyError(f"no reported value {key!r}")

    def method(self, name: str, reference: str) -> None:
        if all(m.name != name for m in self.methods):
            self.methods.append(Method(name, reference))


def compute(scenario) -> Results:
    """Run the study that matches ``scenario.kind`` and return its results."""
    module = importlib.import_module(STUDIES[scenario.kind])
    return module.compute(scenario)

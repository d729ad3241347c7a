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

The overall verdict belongs to the *selected* design. A study that weighs candidates (pumps,
line sizes, what-if outlets) names the chosen one in ``selected`` and lists the others in
``alternatives`` with the reason each was not chosen; findings about an alternative (their
subject contains one of its ``subjects`` texts) are shown with it and do not set the verdict:

>>> from kit.core.findings import Finding, Severity
>>> r = Results("pump_selection", selected="pump 'A'")
>>> r.findings.append(Finding(Severity.PASS, "pump 'A' at low level", "NPSH margin", 2.0, "m",
...                           ">= 1 m", "rule", "src"))
>>> r.findings.append(Finding(Severity.FAIL, "pump 'B' at low level", "NPSH margin", -1.0, "m",
...                           ">= 1 m", "rule", "src"))
>>> r.alternatives.append(Alternative("pump 'B'", "NPSH margin below the guideline", "fail"))
>>> r.verdict().word
'PASS'
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass, field

from kit.core.findings import Finding

__all__ = ["Reported", "Method", "Alternative", "Verdict", "Results", "STUDIES", "compute",
           "VERDICT_KIND", "VERDICT_WORDS", "verdict_word", "is_verdict", "FindingGroup",
           "group_findings"]

#: The unit kind of a reported verdict (0 pass, 1 check, 2 fail); shown as a word, never a number.
VERDICT_KIND = "verdict"
#: severity rank -> word
VERDICT_WORDS = {0: "PASS", 1: "CHECK", 2: "FAIL"}


def is_verdict(key: str, kind: str) -> bool:
    """Whether a reported value is a verdict (kind ``"verdict"``, or a key ending ``.verdict``)."""
    return kind == VERDICT_KIND or str(key).endswith(".verdict")


def verdict_word(value) -> str:
    """The word of a verdict value: 0 -> PASS, 1 -> CHECK, 2 -> FAIL (a word passes through).

    >>> verdict_word(2.0), verdict_word("check")
    ('FAIL', 'CHECK')
    """
    if isinstance(value, str):
        return value.upper()
    try:
        return VERDICT_WORDS[int(round(float(value)))]
    except (KeyError, TypeError, ValueError, OverflowError):
        return str(value)

#: scenario kind -> module with ``compute(scenario) -> Results``
STUDIES = {
    "line_sizing": "kit.studies.line_sizing",
    "pump_selection": "kit.studies.pump_selection",
    "tank_drainage": "kit.studies.tank_drainage",
    "network": "kit.studies.network",
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


@dataclass(frozen=True)
class Alternative:
    """A candidate design that was considered and not selected.

    ``name`` is how the record names it ("pump 'KR-B'", "NPS 4 Sch 40"); ``reason`` says why
    it was not selected; ``verdict`` is its own worst severity word (``"pass"``, ``"check"``,
    ``"fail"``) or None. A finding belongs to it when its subject contains one of
    ``subjects`` (default: the name itself).
    """

    name: str
    reason: str
    verdict: str | None = None
    subjects: tuple[str, ...] = ()

    def owns(self, finding) -> bool:
        texts = self.subjects or (self.name,)
        subject = str(getattr(finding, "subject", finding))
        return any(t and t in subject for t in texts)

    def as_dict(self) -> dict:
        return {"name": self.name, "reason": self.reason, "verdict": self.verdict,
                "subjects": list(self.subjects or (self.name,))}


@dataclass(frozen=True)
class Verdict:
    """The overall verdict of a study and the design it belongs to."""

    severity: str  # "pass" | "check" | "fail"
    selected: str | None
    reason: str
    governing: int  # findings that set the verdict
    counts: dict  # {"pass": n, "check": n, "fail": n} over the governing findings

    @property
    def word(self) -> str:
        return self.severity.upper()


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
    #: the design the overall verdict belongs to (None: the study weighs no candidates)
    selected: str | None = None
    #: candidates considered and not selected, each with its reason
    alternatives: list[Alternative] = field(default_factory=list)

    def add_verdict(self, key: str, label: str, severity) -> None:
        """Report a verdict (``"pass"``/``"check"``/``"fail"`` or a Severity) as a value that
        ``kit check`` compares and every display shows as a word."""
        rank = {"pass": 0, "check": 1, "fail": 2}[str(getattr(severity, "value", severity))]
        self.add(key, label, float(rank), VERDICT_KIND)

    def alternative_of(self, finding) -> Alternative | None:
        """The alternative a finding belongs to, or None (it belongs to the selected design)."""
        for a in self.alternatives:
            if a.owns(finding):
                return a
        return None

    def governing_findings(self) -> list[Finding]:
        """The findings that set the verdict: all but those of the alternatives."""
        return [f for f in self.findings if self.alternative_of(f) is None]

    def verdict(self) -> Verdict:
        """The overall verdict: the worst governing finding; FAIL when candidates were weighed
        and none was selected."""
        gov = self.governing_findings()
        counts = {s: sum(1 for f in gov if f.severity.value == s) for s in ("pass", "check", "fail")}
        sev = "fail" if counts["fail"] else ("check" if counts["check"] else "pass")
        if self.selected:
            reason = f"the selected design, {self.selected}"
        elif self.alternatives:
            sev, reason = "fail", "no candidate qualifies: none was selected"
        else:
            reason = "all findings"
        return Verdict(sev, self.selected, reason, len(gov), counts)

    def _index(self) -> dict:
        """Key -> position in ``values`` (rebuilt when ``values`` was edited directly), so
        adding and looking up stay constant-time on long line lists."""
        idx = self.__dict__.get("_keys")
        if idx is None or len(idx) != len(self.values):
            idx = {v.key: i for i, v in enumerate(self.values)}
            self.__dict__["_keys"] = idx
        return idx

    def add(self, key: str, label: str, value: float, kind: str) -> None:
        idx = self._index()
        if key in idx:
            raise KeyError(f"reported key {key!r} is already used")
        idx[key] = len(self.values)
        self.values.append(Reported(key, label, float(value), kind))

    def value(self, key: str) -> float:
        i = self._index().get(key)
        if i is None or self.values[i].key != key:
            for v in self.values:
                if v.key == key:
                    return v.value
            raise KeyError(f"no reported value {key!r}")
        return self.values[i].value

    def method(self, name: str, reference: str) -> None:
        if all(m.name != name for m in self.methods):
            self.methods.append(Method(name, reference))


@dataclass(frozen=True)
class FindingGroup:
    """Findings about one design (or subject) and one quantity, shown as one line.

    ``worst`` is the governing finding (the most severe; the first of equals); ``n`` how many
    conditions were checked; ``counts`` the severities over them.
    """

    owner: str
    quantity: str
    worst: Finding
    n: int
    counts: dict

    @property
    def severity(self) -> str:
        return self.worst.severity.value


def _owner_of(subject: str) -> str:
    """A subject without its condition: the text before the first " at " (a trailing comma
    dropped), so "pump 'A' at low level / 4 °C" groups under "pump 'A'"."""
    head = subject.split(" at ", 1)[0].rstrip(" ,")
    return head or subject


def group_findings(results: Results) -> list[tuple[str, str, list[FindingGroup]]]:
    """Findings grouped per design: ``[(owner, role, groups)]`` with role ``"selected"``,
    ``"alternative"`` or ``"other"``; the selected design first, alternatives last.

    A finding belongs to an alternative (:meth:`Results.alternative_of`), else to the selected
    design when its subject contains the selected name, else to its subject without its
    condition (the text before " at "). Within an owner, one group per quantity, in
    first-seen order.
    """
    owners: dict[str, dict[str, list[Finding]]] = {}
    roles: dict[str, str] = {}
    if results.selected:
        owners[results.selected] = {}
        roles[results.selected] = "selected"
    for f in results.findings:
        alt = results.alternative_of(f)
        if alt is not None:
            owner, role = alt.name, "alternative"
        elif results.selected and results.selected in f.subject:
            owner, role = results.selected, "selected"
        else:
            owner, role = _owner_of(f.subject), "other"
        roles.setdefault(owner, role)
        owners.setdefault(owner, {}).setdefault(f.quantity, []).append(f)
    order = {"selected": 0, "other": 1, "alternative": 2}
    out = []
    for owner in sorted(owners, key=lambda o: order[roles[o]]):
        groups = []
        for quantity, fs in owners[owner].items():
            worst_f = max(fs, key=lambda f: f.severity.rank)  # max keeps the first of equals
            counts = {s: sum(1 for f in fs if f.severity.value == s)
                      for s in ("pass", "check", "fail")}
            groups.append(FindingGroup(owner, quantity, worst_f, len(fs), counts))
        if groups or roles[owner] == "selected":
            out.append((owner, roles[owner], groups))
    return out


def compute(scenario) -> Results:
    """Run the study that matches ``scenario.kind`` and return its results."""
    module = importlib.import_module(STUDIES[scenario.kind])
    return module.compute(scenario)

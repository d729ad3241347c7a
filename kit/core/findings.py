"""Findings: the result of every check the kit makes, and the standing cautions.

A :class:`Finding` carries a severity (pass / check / fail), the subject it is
about, the quantity and its value in SI, the limit applied, the rule in words
and the source of that rule. Checks return lists of findings; panels and the
record show them; nothing in the kit prints them on its own.

Example
-------
>>> f = Finding(Severity.CHECK, "segment S1", "velocity", 3.2, "m/s",
...             "<= 3.0 m/s", "pump discharge velocity range",
...             "common practice, no source")
>>> f.severity.value
'check'
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

__all__ = ["Severity", "Finding", "CAUTIONS", "cautions_for", "worst"]


class Severity(StrEnum):
    """How a result stands against its limit."""

    PASS = "pass"
    CHECK = "check"
    FAIL = "fail"

    @property
    def rank(self) -> int:
        """0 pass, 1 check, 2 fail (the order :func:`worst` takes)."""
        return _RANK[self]


#: Severity -> rank (a str-keyed dict: a StrEnum member hashes and compares as its value).
_RANK = {"pass": 0, "check": 1, "fail": 2}


@dataclass(frozen=True)
class Finding:
    """One checked result.

    Attributes
    ----------
    severity : Severity
    subject : str
        What the finding is about ("station 'crest'", "pump P-2 at high level, 40 degC").
    quantity : str
        The checked quantity's name ("velocity", "NPSH margin").
    value : float
        The quantity's value in SI (NaN where not numeric).
    unit : str
        The SI unit of ``value`` ("m/s", "Pa", "m", "-").
    limit : str
        The limit applied, in words with its unit ("<= 3.0 m/s").
    rule : str
        The rule in words.
    source : str
        Where the rule comes from; "common practice, no source" where that is so.
    low, high : float or None
        The limit's bounds in the same SI unit as ``value`` where it has numeric bounds, so a
        display can show the limit in its own units; ``limit`` stays the words of record.
    """

    severity: Severity
    subject: str
    quantity: str
    value: float
    unit: str
    limit: str
    rule: str
    source: str
    low: float | None = None
    high: float | None = None

    def as_dict(self) -> dict:
        out = {
            "severity": self.severity.value, "subject": self.subject,
            "quantity": self.quantity, "value": self.value, "unit": self.unit,
            "limit": self.limit, "rule": self.rule, "source": self.source,
        }
        if self.low is not None or self.high is not None:
            out["low"], out["high"] = self.low, self.high
        return out


def worst(findings) -> Severity:
    """The most severe of a list of findings (PASS for an empty list)."""
    out, top = Severity.PASS, 0
    for f in findings:
        r = _RANK[f.severity]
        if r > top:
            out, top = f.severity, r
    return out


#: Standing cautions, keyed by topic. Shown by every notebook and record that
#: touches the topic. Plain statements of common practice, no source.
CAUTIONS: dict[str, str] = {
    "general": (
        "This is a design aid. Local codes, the owner's standards and licensed professional "
        "practice govern; a competent engineer must check every result before it is used."),
    "pressure": (
        "Pressures shown are steady-state. Confirm that pipe, fittings, flanges and vessels are "
        "rated for the maximum pressure including shut-off head, relief settings and surge."),
    "water_hammer": (
        "Water hammer (surge on valve closure or pump trip) is screened by closed-form bounds "
        "(Korteweg wave speed, Joukowsky and Michaud rises, instantaneous pump stop), not "
        "analysed. Fast-closing valves and pump trips can raise pressure far above steady "
        "values, and real surges can exceed the screen; a qualified engineer must do a "
        "transient analysis where the screen shows risk, the line is long, the velocity high "
        "or the consequence serious."),
    "cavitation": (
        "Cavitation damages pumps and valves and can stop flow. NPSH margins here use the stated "
        "guideline; the pump maker's NPSHr and its test basis govern."),
    "vacuum": (
        "Where pressure falls below atmospheric (siphons, high points, suction lifts), air and "
        "vapour can come out of the liquid and break the flow; thin-walled pipe and tanks can "
        "collapse under vacuum. Vent and vacuum-break provisions must be engineered."),
    "flammable": (
        "Flammable or toxic liquids need hazardous-area classification, static-electricity "
        "control (bonding, grounding, velocity limits while filling), and the fire codes that "
        "apply to the site. None of that is checked here."),
    "drain": (
        "A tank drained faster than its vent admits air goes under vacuum and can collapse; "
        "a padded tank loses its blanket. Check vent capacity against the maximum drain rate."),
    "pump": (
        "Do not run a pump dead-headed or below its minimum continuous flow; provide protection "
        "where the system can close in. Check motor rating at the end of the curve (run-out)."),
}


def cautions_for(*topics: str) -> list[str]:
    """The general caution followed by those for the named topics, in order.

    >>> len(cautions_for("vacuum")) == 2
    True
    """
    keys = ["general", *[t for t in topics if t != "general"]]
    return [CAUTIONS[k] for k in keys]

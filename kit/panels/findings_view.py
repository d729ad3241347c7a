"""FindingsView: pass / check / fail rows with their rule and source, and the standing cautions.

Rows carry the CSS classes ``hl-pass``, ``hl-check`` and ``hl-fail`` (our own plain colours:
green, amber, red) and spell the status out in words, so it does not rest on colour alone.
The cautions come from :func:`kit.core.findings.cautions_for` for the view's topics.

Example
-------
>>> from kit.core.findings import Finding, Severity
>>> f = Finding(Severity.FAIL, "segment riser", "velocity", 3.4, "m/s", "<= 3.0 m/s",
...             "pump discharge: velocity above range", "common practice, no source")
>>> v = FindingsView([f], topics=("pressure",))
>>> 'class="hl-fail"' in v.html.value, "11.2 ft/s" in findings_html([f], "US")
(True, True)
"""

from __future__ import annotations

import html
import math

from kit import units
from kit.core.findings import Severity, cautions_for, worst
from kit.panels.base import HtmlView
from kit.textout import UNIT_KINDS, display_words, finding_value, limit_text

__all__ = ["FindingsView", "findings_html", "cautions_html", "finding_value_text", "UNIT_KINDS"]

#: A finding's SI unit -> the quantity kind used to show it (kept here for callers).
UNIT_KINDS = UNIT_KINDS

_STYLE = """<style>
.hl-findings table{border-collapse:collapse;font-size:0.92em}
.hl-findings td,.hl-findings th{border:1px solid #ccc;padding:2px 6px;text-align:left;vertical-align:top}
.hl-findings tr.hl-pass td.hl-status{background:#d7f0d7;color:#1d5e1d}
.hl-findings tr.hl-check td.hl-status{background:#fbe8c0;color:#7a4d00}
.hl-findings tr.hl-fail td.hl-status{background:#f6cccc;color:#8a1111;font-weight:bold}
.hl-cautions li{margin-bottom:3px}
</style>"""


def finding_value_text(value: float, unit: str, system: str = "SI") -> str:
    """A finding's value in the display system ('11.2 ft/s'); '—' when not numeric.

    >>> finding_value_text(2.0, "m", "US")
    '6.56 ft'
    """
    try:
        x = float(value)
    except (TypeError, ValueError):
        return "—"
    if not math.isfinite(x):
        return "—"
    kind = UNIT_KINDS.get(unit)
    if kind is None:
        return f"{x:.3g} {unit}".strip() if unit not in ("-", "") else f"{x:.3g}"
    return units.fmt(x, kind, system)


def _value_cell(f, system: str) -> str:
    """A finding's value in the display system, pressures gauge or absolute; '—' if none."""
    try:
        text = finding_value(f, system).removeprefix("= ")
    except (TypeError, ValueError):
        text = ""
    return text or "—"


def findings_html(findings, system: str = "SI") -> str:
    """The findings as an HTML table, one row per finding with class hl-pass/hl-check/hl-fail."""
    rows = []
    for f in findings:
        sev = Severity(f.severity)
        cells = [
            f'<td class="hl-status">{html.escape(sev.value.upper())}</td>',
            f"<td>{html.escape(display_words(f.subject, system))}</td>",
            f"<td>{html.escape(f.quantity)}</td>",
            f"<td>{html.escape(_value_cell(f, system))}</td>",
            f"<td>{html.escape(limit_text(f, system))}</td>",
            f"<td>{html.escape(display_words(f.rule, system))}</td>",
            f'<td class="hl-source">{html.escape(f.source)}</td>',
        ]
        rows.append(f'<tr class="hl-{sev.value}">{"".join(cells)}</tr>')
    head = "".join(f"<th>{h}</th>" for h in
                   ("status", "subject", "quantity", "value", "limit", "rule", "source"))
    return (f'<table class="hl-findings-table"><thead><tr>{head}</tr></thead>'
            f'<tbody>{"".join(rows)}</tbody></table>')


def cautions_html(topics=()) -> str:
    """The general caution and those for ``topics``, as an HTML list."""
    items = "".join(f"<li>{html.escape(c)}</li>" for c in cautions_for(*topics))
    return f'<div class="hl-cautions"><b>Cautions</b><ul>{items}</ul></div>'


class FindingsView(HtmlView):
    """A table of findings and the standing cautions for the given topics.

    Parameters
    ----------
    findings : iterable of Finding
    topics : iterable of str
        Keys of :data:`kit.core.findings.CAUTIONS` (the general caution is always shown).
    system : str
        'SI' or 'US' for the values.

    Attributes
    ----------
    value : tuple of Finding
        What is shown; assign it (or call :meth:`show`) to change the rows.
    html : ipywidgets.HTML
        The rendered view.

    CSS classes: ``hl-findings`` on the box; rows ``hl-pass`` / ``hl-check`` / ``hl-fail``;
    the summary line ``hl-findings-summary``; the cautions ``hl-cautions``.
    """

    css_class = "hl-findings"

    def __init__(self, findings=(), topics=(), system: str = "SI"):
        self.topics = tuple(topics)
        cautions_for(*self.topics)  # unknown topic -> KeyError now, not at render time
        super().__init__(findings, system=system)

    def show(self, findings, topics=None) -> None:
        """Show ``findings`` and, if given, a new list of caution topics."""
        if topics is not None:
            cautions_for(*topics)
            self.topics = tuple(topics)
            if tuple(findings) == self.value:
                self._render_system()
        self.value = tuple(findings)

    def _render_system(self) -> None:
        fs = tuple(self.value or ())
        counts = {s: sum(1 for f in fs if Severity(f.severity) is s) for s in Severity}
        overall = worst(fs).value.upper() if fs else "no checks"
        summary = (f'<div class="hl-findings-summary">overall: <b>{html.escape(overall)}</b> — '
                   f"{counts[Severity.PASS]} pass, {counts[Severity.CHECK]} check, "
                   f"{counts[Severity.FAIL]} fail</div>")
        self.html.value = (_STYLE + summary + findings_html(fs, self.system)
                           + cautions_html(self.topics))

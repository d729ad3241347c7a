"""Plain-text summaries of results: stable, rounded, fixed-width.

The same text ends every notebook (nbval compares it, so tolerance lives in the rounding)
and is what ``python -m kit demo`` prints.

Example
-------
>>> from kit.results import Results
>>> r = Results("line_sizing"); r.add("q", "design flow", 0.0125, "flow")
>>> print(summary(None, r, "SI").splitlines()[-1])
findings: 0 pass, 0 check, 0 fail
"""

from __future__ import annotations

import textwrap

from kit import units

__all__ = ["summary", "findings_text", "grouped_findings_text", "verdict_lines", "value_text",
           "limit_text"]


def limit_text(f, system: str = "SI") -> str:
    """A finding's limit in the display system when it has numeric bounds, else its words.

    >>> from kit.core.findings import Finding, Severity
    >>> f = Finding(Severity.PASS, "s", "velocity", 2.0, "m/s", "1–3 m/s", "r", "src",
    ...             low=1.0, high=3.0)
    >>> limit_text(f, "US")
    '3.28–9.84 ft/s'
    """
    kind = _SI_TO_KIND.get(f.unit)
    low, high = getattr(f, "low", None), getattr(f, "high", None)
    if kind is None or (low is None and high is None):
        return f.limit
    if low is not None and high is not None:
        a = units.fmt(low, kind, system, with_unit=False)
        return f"{a}–{units.fmt(high, kind, system)}"
    if high is not None:
        return f"<= {units.fmt(high, kind, system)}"
    return f">= {units.fmt(low, kind, system)}"


def findings_text(findings, system: str = "SI", width: int = 100) -> list[str]:
    """One line per finding: severity, subject, quantity = value (limit), rule [source]."""
    out = []
    for f in findings:
        value = finding_value(f, system)
        line = (f"{f.severity.value.upper():5s} {f.subject}: {f.quantity} {value} "
                f"(limit {limit_text(f, system)}); {f.rule} [{f.source}]")
        out += textwrap.wrap(line, width, subsequent_indent="      ")
    return out


_SI_TO_KIND = {"m/s": "velocity", "m": "head", "Pa": "pressure_difference",
               "Pa/m": "pressure_per_length", "m³/s": "flow", "W": "power", "s": "time"}


def value_text(v, system: str = "SI") -> str:
    """A reported value in the display system; a verdict as its word (PASS, CHECK, FAIL).

    >>> from kit.results import Reported
    >>> value_text(Reported("pumps[0].verdict", "P-1: verdict", 2.0, "dimensionless"))
    'FAIL'
    """
    from kit.results import is_verdict, verdict_word

    if is_verdict(v.key, v.kind):
        return verdict_word(v.value)
    return units.fmt(v.value, v.kind, system)


def verdict_lines(results, width: int = 100) -> list[str]:
    """The overall verdict, the design it belongs to, and the candidates not selected."""
    from kit.results import verdict_word

    v = results.verdict()
    c = v.counts
    lines = [f"VERDICT: {v.word} — {v.reason} ({c['pass']} pass, {c['check']} check, "
             f"{c['fail']} fail)"]
    for a in results.alternatives:
        word = verdict_word(a.verdict) if a.verdict else "—"
        lines += textwrap.wrap(f"not selected: {a.name} ({word}): {a.reason}", width,
                               subsequent_indent="  ")
    return lines


def grouped_findings_text(results, system: str = "SI", width: int = 100) -> list[str]:
    """Findings per design, one line per quantity with its worst condition; passes folded."""
    from kit.results import group_findings

    out = []
    for owner, role, groups in group_findings(results):
        tag = {"selected": " (selected)", "alternative": " (not selected)"}.get(role, "")
        out.append(f"{owner}{tag}")
        passed = [g for g in groups if g.severity == "pass"]
        shown = sorted((g for g in groups if g.severity != "pass"),
                       key=lambda g: -g.worst.severity.rank)
        for g in shown:
            f = g.worst
            cond = f" — worst of {g.n}: {f.subject}" if g.n > 1 else ""
            value = finding_value(f, system)
            line = (f"  {g.severity.upper():5s} {g.quantity}{' ' + value if value else ''} "
                    f"(limit {limit_text(f, system)}){cond}")
            out += textwrap.wrap(line, width, subsequent_indent="        ")
        if passed:
            names = ", ".join(g.quantity for g in passed)
            n = sum(g.n for g in passed)
            out += textwrap.wrap(f"  PASS  {names} ({n} conditions)", width,
                                 subsequent_indent="        ")
    return out


def finding_value(f, system: str) -> str:
    import math

    if f.value is None or (isinstance(f.value, float) and math.isnan(f.value)):
        return ""
    kind = _SI_TO_KIND.get(f.unit)
    if kind:
        return "= " + units.fmt(f.value, kind, system)
    unit = "" if f.unit in ("-", "") else f" {f.unit}"
    return f"= {f.value:.3g}{unit}"


def summary(scenario, results, system: str = "SI", full: bool = False) -> str:
    """A fixed-width text summary of ``results`` in a display system.

    ``full`` adds the verdict, findings grouped per design, methods and cautions (for the
    terminal); notebooks print the short form, which carries the verdict line when the study
    selected a design among candidates. Verdict values print as words, never numbers.
    """
    lines = []
    if scenario is not None:
        lines.append(f"{scenario.title}  [{scenario.kind}]")
        lines.append("-" * min(100, max(20, len(lines[0]))))
    w = max([len(v.label) for v in results.values] + [10])
    for v in results.values:
        lines.append(f"{v.label:<{w}}  {value_text(v, system)}")
    weighs = bool(getattr(results, "selected", None) or getattr(results, "alternatives", None))
    if weighs or full:
        lines.append("")
        lines += verdict_lines(results)
    if full:
        if results.findings:
            lines.append("")
            lines.append("Findings")
            lines += grouped_findings_text(results, system)
        if results.methods:
            lines.append("")
            lines.append("Methods")
            for m in results.methods:
                lines += textwrap.wrap(f"- {m.name}: {m.reference}", 100,
                                       subsequent_indent="  ")
        if results.cautions:
            lines.append("")
            lines.append("Cautions")
            for c in results.cautions:
                lines += textwrap.wrap(f"! {c}", 100, subsequent_indent="  ")
    counts = {s: sum(1 for f in results.findings if f.severity.value == s)
              for s in ("pass", "check", "fail")}
    lines.append(f"findings: {counts['pass']} pass, {counts['check']} check, "
                 f"{counts['fail']} fail")
    return "\n".join(lines)

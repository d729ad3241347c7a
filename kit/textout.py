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

import re
import textwrap

from kit import units

__all__ = ["summary", "findings_text", "grouped_findings_text", "verdict_lines", "value_text",
           "limit_text", "finding_value", "pressure_basis", "display_words", "UNIT_KINDS"]


def limit_text(f, system: str = "SI") -> str:
    """A finding's limit in the display system: every SI quantity in its words rewritten.

    Each number-with-unit in the limit words ("0.025 m³/s", "1.05e+07 Pa gauge", "1–3 m/s",
    "250 Pa vacuum") is shown in the display system's unit with three significant figures
    (trailing zeros dropped); a pressure says gauge or absolute ("(g)"/"(a)", "psig"/"psia"),
    taken from its own tag or the finding's words (see :func:`pressure_basis`). In SI, words
    already in a display unit (kPa, mm, m/s ...) keep their digits. A limit with numeric
    bounds (``low``/``high``) and no quantity in its words is written from the bounds.

    >>> from kit.core.findings import Finding, Severity
    >>> f = Finding(Severity.PASS, "s", "velocity", 2.0, "m/s", "1–3 m/s", "r", "src",
    ...             low=1.0, high=3.0)
    >>> limit_text(f, "US")
    '3.28–9.84 ft/s'
    >>> g = Finding(Severity.PASS, "P-1", "flow", 0.03, "m³/s", ">= 0.025 m³/s", "r", "src")
    >>> limit_text(g, "US"), limit_text(g, "SI")
    ('>= 396 gpm', '>= 90 m³/h')
    >>> h = Finding(Severity.PASS, "line", "pipe pressure (gauge)", 5e5, "Pa",
    ...             "<= 1.96e+06 Pa gauge (flange class rating)", "r", "src")
    >>> limit_text(h, "US")
    '<= 284 psig (flange class rating)'
    """
    words = str(f.limit)
    basis = pressure_basis(f)
    out, n = _rewrite(words, system, basis)
    if n:
        return out
    kind = _kind_of(f.unit)
    low, high = getattr(f, "low", None), getattr(f, "high", None)
    if kind is None or (low is None and high is None):
        return words
    if low is not None and high is not None:
        a = _plain_number(low, kind, system, basis)
        return f"{a}–{_quantity(high, kind, system, basis)}"
    if high is not None:
        return f"<= {_quantity(high, kind, system, basis)}"
    return f">= {_quantity(low, kind, system, basis)}"


def display_words(text: str, system: str = "SI", basis: str | None = None) -> str:
    """Words with every SI quantity in them ("at max static / 4 °C", "d = 0.05 m") shown in
    the display system, as :func:`limit_text` does; names in single quotes are kept as typed.

    >>> display_words("pump 'P 365 mm' at max static / 4 °C / new", "US")
    "pump 'P 365 mm' at max static / 39.2 °F / new"
    """
    return _rewrite(str(text), system, basis)[0]


#: A name in single quotes: an opening quote not after a letter (so "maker's" is no quote).
_QUOTED = re.compile(r"((?<!\w)'[^']*'(?!\w))")


def _rewrite(text: str, system: str, basis: str | None) -> tuple[str, int]:
    """(text rewritten outside single-quoted names, number of quantities rewritten)."""
    parts = _QUOTED.split(text)
    count = 0
    for i in range(0, len(parts), 2):   # even parts are outside quotes
        parts[i], n = _LIMIT_TOKEN.subn(lambda m: _token_text(m, system, basis), parts[i])
        count += n
    return "".join(parts), count


#: A finding's SI unit -> the quantity kind used to show it in a display system.
UNIT_KINDS = {
    "m/s": "velocity", "m": "head", "Pa": "pressure_difference", "Pa/m": "pressure_per_length",
    "m3/s": "flow", "m³/s": "flow", "K": "temperature", "s": "time", "W": "power",
    "kg/m3": "density", "kg/m³": "density", "Pa*s": "viscosity", "Pa·s": "viscosity",
    "m2/s": "kinematic_viscosity", "m²/s": "kinematic_viscosity",
}

#: Unit spellings that limit words use -> (kind, factor to the SI base unit, pressure).
_WORD_UNITS = {
    "kPa/100 m": ("pressure_per_length", 10.0), "Pa/m": ("pressure_per_length", 1.0),
    "m³/s": ("flow", 1.0), "m3/s": ("flow", 1.0), "m³/h": ("flow", 1.0 / 3600.0),
    "m/s": ("velocity", 1.0), "MPa": ("pressure", 1e6), "kPa": ("pressure", 1e3),
    "Pa": ("pressure", 1.0), "kW": ("power", 1e3), "W": ("power", 1.0),
    "mm": ("diameter", 1e-3), "m": ("length", 1.0), "kg/m³": ("density", 1.0),
    "mPa·s": ("viscosity", 1e-3), "Pa·s": ("viscosity", 1.0), "°C": ("temperature", 1.0),
}
#: Units that SI display keeps as written (already the display unit, or a stress in MPa).
_SI_KEEP = frozenset(("kPa/100 m", "m³/h", "m/s", "MPa", "kPa", "kW", "mm", "m", "kg/m³",
                      "mPa·s", "°C"))
_NUMBER = r"[-+−]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?"
_LIMIT_TOKEN = re.compile(
    r"(?<![\w.])(?P<a>" + _NUMBER + r")(?:\s*[–-]\s*(?P<b>" + _NUMBER + r"))?\s?"
    r"(?P<unit>" + "|".join(re.escape(u) for u in sorted(_WORD_UNITS, key=len, reverse=True))
    + r")(?P<tag>\s?\(g\)|\s?\(a\)|\s?\(abs\)|\s+gauge\b|\s+absolute\b|\s+abs\b|\s+vacuum\b)?"
    r"(?![\w/²³·])")

_DIFFERENCE_WORDS = ("drop", "difference", "loss", "rise", "margin")
_GAUGE_WORDS = ("gauge", "(g)", "vacuum", "below atmospheric")
_ABSOLUTE_WORDS = ("absolute", "(a)", "vapour pressure", "vapor pressure", "barometric")


def pressure_basis(f) -> str | None:
    """'gauge', 'absolute' or None (a difference) for a finding's pressures, from its words:
    the quantity first ("pipe pressure (gauge)", "... (absolute)"), then the limit.

    >>> from kit.core.findings import Finding, Severity
    >>> pressure_basis(Finding(Severity.PASS, "s", "lowest pressure (absolute)", 5e4, "Pa",
    ...                        "> 3000 Pa (vapour pressure)", "r", "src"))
    'absolute'
    """
    quantity = str(f.quantity).lower()
    if any(w in quantity for w in _DIFFERENCE_WORDS) and "gauge" not in quantity \
            and "absolute" not in quantity:
        return None
    for text in (quantity, str(f.limit).lower()):
        if any(w in text for w in _GAUGE_WORDS):
            return "gauge"
        if any(w in text for w in _ABSOLUTE_WORDS):
            return "absolute"
    return None


def _kind_of(unit: str) -> str | None:
    return UNIT_KINDS.get(str(unit))


def _digits(text: str) -> str:
    """'1.00' -> '1', '2.50' -> '2.5' (a limit is written as a number, not a measurement)."""
    if "." in text and "e" not in text:
        text = text.rstrip("0").rstrip(".")
    return text


def _pressure_unit(system: str, basis: str | None) -> tuple[str, str]:
    """(unit to convert to, text to write) of a pressure on a basis."""
    unit = units.display_unit("pressure_difference", system)
    if basis is None:
        return unit, unit
    if unit == "psi":
        return unit, "psig" if basis == "gauge" else "psia"
    return unit, f"{unit}({'g' if basis == 'gauge' else 'a'})"


def _plain_number(x: float, kind: str, system: str, basis: str | None, unit=None) -> str:
    if kind in ("pressure", "pressure_difference"):
        unit = unit or _pressure_unit(system, basis)[0]
        kind = "pressure_difference"
    return _digits(units.fmt(x, kind, system, unit=unit, with_unit=False))


def _quantity(x: float, kind: str, system: str, basis: str | None) -> str:
    if kind in ("pressure", "pressure_difference"):
        unit, text = _pressure_unit(system, basis)
        return f"{_plain_number(x, kind, system, basis, unit)} {text}"
    number, _, unit = units.fmt(x, kind, system).partition(" ")
    return f"{_digits(number)} {unit}".strip()


def _token_text(m, system: str, basis: str | None) -> str:
    """One number-with-unit of a limit's words, in the display system."""
    word = m["unit"]
    kind, factor = _WORD_UNITS[word]
    tag = (m["tag"] or "").strip().lower()
    after = ""
    if kind == "pressure":
        if tag == "vacuum":   # below atmospheric, said in words: no gauge tag besides
            basis, after = None, " vacuum"
        elif tag:
            basis = "gauge" if tag in ("(g)", "gauge") else "absolute"   # (a), (abs), abs
    if system == "SI" and word in _SI_KEEP:
        if kind == "pressure" and basis is not None:
            word += "(g)" if basis == "gauge" else "(a)"
        b = f"–{m['b']}" if m["b"] else ""
        return f"{m['a']}{b} {word}{after}"
    nums = [float(x.replace("−", "-")) * factor for x in (m["a"], m["b"]) if x]
    if kind == "temperature":
        nums = [x + 273.15 for x in nums]
    head = "–".join(_plain_number(x, kind, system, basis) for x in nums[:-1])
    last = _quantity(nums[-1], kind, system, basis) + after
    return f"{head}–{last}" if head else last


def findings_text(findings, system: str = "SI", width: int = 100) -> list[str]:
    """One line per finding: severity, subject, quantity = value (limit), rule [source]."""
    out = []
    for f in findings:
        value = finding_value(f, system)
        line = (f"{f.severity.value.upper():5s} {display_words(f.subject, system)}: "
                f"{f.quantity} {value} "
                f"(limit {limit_text(f, system)}); {display_words(f.rule, system)} [{f.source}]")
        out += textwrap.wrap(line, width, subsequent_indent="      ")
    return out


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
        out.append(f"{display_words(owner, system)}{tag}")
        passed = [g for g in groups if g.severity == "pass"]
        shown = sorted((g for g in groups if g.severity != "pass"),
                       key=lambda g: -g.worst.severity.rank)
        for g in shown:
            f = g.worst
            cond = f" — worst of {g.n}: {display_words(f.subject, system)}" if g.n > 1 else ""
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
    """A finding's value as '= 6.56 ft' in the display system (pressures with gauge or
    absolute, :func:`pressure_basis`); '' when it has none.

    >>> from kit.core.findings import Finding, Severity
    >>> finding_value(Finding(Severity.PASS, "crest", "gauge pressure", -9.2e4, "Pa",
    ...                       ">= 0 Pa(g)", "r", "src"), "US")
    '= -13.3 psig'
    """
    import math

    if f.value is None or (isinstance(f.value, float) and math.isnan(f.value)):
        return ""
    kind = _kind_of(f.unit)
    if kind == "pressure_difference":
        unit, text = _pressure_unit(system, pressure_basis(f))
        return f"= {units.fmt(f.value, kind, system, unit=unit, with_unit=False)} {text}"
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

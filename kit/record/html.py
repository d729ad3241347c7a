"""The record as one self-contained HTML sheet that opens offline and prints on A4 or Letter.

Rules the page keeps:

- Every piece of text that came from a user or a file goes through :func:`html.escape`
  (an input named ``<script>`` shows as text).
- No network reference at all: styles are inline, plotly.js is inlined once (with the first
  figure), no ``src``/``href`` points outside the file, and a Content-Security-Policy meta tag
  forbids the browser from fetching anything (``default-src 'none'``).
- Print: ``@page`` margins of 15 mm on whatever paper the printer uses (A4 or Letter), table
  header rows repeat, rows are not split across pages, figures and findings keep together,
  nothing wider than the page: tables have fixed column widths and wrap between words
  (key paths break after their dots), wide data tables are split into parts of a few
  columns, figures are drawn :data:`FIGURE_WIDTH_PX` wide.
- A summary page first (design basis, selected design, verdict, key numbers); findings are
  grouped per design, one line per quantity with its worst condition, passes folded, and
  each rule is cited once in a numbered list.
- Severity is shown as a word and a symbol (PASS ✓, CHECK !, FAIL ✗), colour only as an aid.

Example
-------
>>> "&lt;b&gt;" in _esc("<b>")
True
"""

from __future__ import annotations

import html
import textwrap

__all__ = ["render_html", "SEVERITY_LABELS", "CSS", "FIGURE_WIDTH_PX"]

#: severity -> (text label, symbol)
SEVERITY_LABELS = {"pass": ("PASS", "✓"), "check": ("CHECK", "!"), "fail": ("FAIL", "✗")}

CSS = """
:root { color-scheme: light; }
* { box-sizing: border-box; }
html { background: #fff; }
body { margin: 0 auto; padding: 1.5rem; max-width: 50rem; background: #fff; color: #111;
       font: 10.5pt/1.4 "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif;
       overflow-wrap: break-word; hyphens: manual; }
h1 { font-size: 16pt; margin: 0 0 .4rem; }
h2 { font-size: 12.5pt; margin: 1.4rem 0 .4rem; border-bottom: 1.5px solid #333;
     break-after: avoid; page-break-after: avoid; }
h3 { font-size: 11pt; margin: 1rem 0 .3rem; break-after: avoid; page-break-after: avoid; }
p { margin: .3rem 0; }
table { border-collapse: collapse; width: 100%; max-width: 100%; margin: .3rem 0 .8rem;
        table-layout: fixed; }
th, td { border: 1px solid #888; padding: .2rem .35rem; text-align: left; vertical-align: top;
         overflow-wrap: break-word; word-break: normal; hyphens: manual; }
th { background: #eee; font-weight: 600; }
thead { display: table-header-group; }
tr, li, .figure, .finding, .verdict-box { break-inside: avoid; page-break-inside: avoid; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
code, .mono { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace;
              font-size: 8.5pt; }
.hash { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace;
        font-size: 8pt; word-break: break-all; }
pre.text { white-space: pre-wrap; overflow-wrap: break-word; margin: 0;
           font: 8pt/1.3 "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace; }
table.header-table th { width: 30%; }
.blank { min-width: 8rem; height: 1.6rem; }
.sev { font-weight: 700; white-space: nowrap; }
.sev-pass { color: #155724; }
.sev-check { color: #7a4d00; }
.sev-fail { color: #8b0000; }
.overall, .verdict-box { border: 2px solid #333; padding: .4rem .6rem; margin: .6rem 0; }
.verdict-box .big { font-size: 13pt; }
.caution { border-left: 4px solid #555; padding: .2rem .6rem; margin: .3rem 0; }
.edited { border-left: 4px solid #7a4d00; padding: .2rem .6rem; margin: .3rem 0; }
.figure { margin: .6rem 0 1rem; max-width: 100%; overflow: hidden; }
.js-plotly-plot, .plot-container, .svg-container { max-width: 100% !important; }
.small { font-size: 9pt; color: #333; }
.summary-page { break-after: page; page-break-after: always; }
ol.refs { padding-left: 1.6rem; }
ol.refs li { margin: .15rem 0; }
details.all-findings > summary { cursor: pointer; }
@page { size: auto; margin: 15mm; }
@media print {
  body { padding: 0; max-width: none; font-size: 9.5pt; }
  h2 { margin-top: 1rem; }
  .noprint, .modebar-container, details.all-findings { display: none !important; }
  a { color: #111; text-decoration: none; }
}
"""

#: Width of every figure in the record [CSS px]: fits the printable width of A4 (180 mm =
#: 680 px at 96 px/in) and Letter (186 mm = 703 px) with 15 mm margins.
FIGURE_WIDTH_PX = 660
#: Characters of a figure title per line at that width (plotly's 17 px title font).
_TITLE_CHARS = 64
FIGURE_HEIGHT_PX = 400

_RESIZE_JS = """
(function () {
  function fit() {
    if (!window.Plotly) { return; }
    document.querySelectorAll('.figure .js-plotly-plot').forEach(function (el) {
      try { window.Plotly.Plots.resize(el); } catch (e) { /* keep the page usable */ }
    });
  }
  window.addEventListener('beforeprint', fit);
  window.addEventListener('afterprint', fit);
})();
"""

_CSP = ("default-src 'none'; script-src 'unsafe-inline' 'unsafe-eval'; "
        "style-src 'unsafe-inline'; img-src data: blob:; font-src data:; "
        "connect-src 'none'; worker-src blob:; base-uri 'none'; form-action 'none'")


def _esc(value) -> str:
    return html.escape("" if value is None else str(value), quote=True)


def _key(value) -> str:
    """A key path escaped, with break opportunities after dots, brackets and underscores so
    a long path wraps between its parts, never inside a word."""
    text = _esc(value)
    for ch in (".", "]", "_", "/"):
        text = text.replace(ch, ch + "<wbr>")
    return text


def _cols(widths) -> str:
    return "<colgroup>" + "".join(f'<col style="width:{w}%">' for w in widths) + "</colgroup>"


def _table(headers, rows, cls: str = "", num_cols=(), widths=None, key_cols=()) -> str:
    head = "".join(f"<th scope=\"col\">{_key(h) if widths is None else _esc(h)}</th>"
                   for h in headers)
    body = []
    for row in rows:
        cells = []
        for i, cell in enumerate(row):
            klass = ' class="num"' if i in num_cols else ""
            text = _key(cell) if i in key_cols else _esc(cell)
            cells.append(f"<td{klass}>{text}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    c = f' class="{_esc(cls)}"' if cls else ""
    cols = _cols(widths) if widths else ""
    return (f"<table{c}>{cols}<thead><tr>{head}</tr></thead><tbody>" + "".join(body)
            + "</tbody></table>")


def _sev(severity: str) -> str:
    word, sym = SEVERITY_LABELS.get(severity, (str(severity).upper(), "?"))
    return (f'<span class="sev sev-{_esc(severity)}">{_esc(sym)} {_esc(word)}</span>')


def _pretty(unit: str) -> str:
    """``m**3/s`` -> ``m³/s``, ``Pa*s`` -> ``Pa·s``."""
    return str(unit or "").replace("**3", "³").replace("**2", "²").replace("*", "·")


def _value_text(value, unit) -> str:
    unit = _pretty(unit)
    if unit == "-":
        unit = ""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return f"{value:.4g} {unit}".strip()
    if value is None or value == "NaN":
        return ""
    return f"{value} {unit}".strip()


def _result_display(r: dict) -> str:
    from kit.results import is_verdict, verdict_word

    if is_verdict(r.get("key", ""), r.get("kind", "")):
        return verdict_word(r.get("value"))
    return str(r.get("display", ""))


def _header(h: dict) -> str:
    rows = [
        ("Project", h.get("project", "")), ("Calculation number", h.get("calc_number", "")),
        ("Title", h.get("title", "")), ("Revision", h.get("revision", "")),
        ("Prepared by", h.get("prepared_by", "")), ("Date prepared", h.get("date", "")),
    ]
    out = ['<table class="header-table"><tbody>']
    for k, v in rows:
        out.append(f'<tr><th scope="row">{_esc(k)}</th><td>{_esc(v)}</td></tr>')
    for k in ("Checked by", "Date checked"):
        out.append(f'<tr><th scope="row">{_esc(k)}</th><td class="blank"></td></tr>')
    out.append("</tbody></table>")
    return "".join(out)


# ------------------------------------------------------------------ the selected design


def _results_of(data: dict):
    """A :class:`kit.results.Results` rebuilt from a record document (findings, selection),
    so the sheet groups findings with the same rules as the text summary."""
    import math

    from kit.core.findings import Finding, Severity
    from kit.results import Alternative, Results

    def num(x):
        try:
            return float(x)
        except (TypeError, ValueError):
            return math.nan

    res = Results(str(data.get("kind", "")))
    for f in data.get("findings", []):
        try:
            sev = Severity(f.get("severity"))
        except ValueError:
            continue
        res.findings.append(Finding(sev, str(f.get("subject", "")), str(f.get("quantity", "")),
                                    num(f.get("value")), str(f.get("unit", "")),
                                    str(f.get("limit", "")), str(f.get("rule", "")),
                                    str(f.get("source", "")), f.get("low"), f.get("high")))
    sel = data.get("selection") or {}
    res.selected = sel.get("selected")
    for a in sel.get("alternatives", []) or []:
        if isinstance(a, dict):
            res.alternatives.append(Alternative(str(a.get("name", "")), str(a.get("reason", "")),
                                                a.get("verdict"), tuple(a.get("subjects") or ())))
    return res


def _token(name: str) -> str:
    """The quoted part of a design name ("pump 'KR-B'" -> "KR-B"), else the name."""
    if name.count("'") >= 2:
        return name.split("'")[1]
    return name


def _verdict_box(data: dict, res) -> str:
    v = res.verdict()
    c = v.counts
    sel = data.get("selection") or {}
    verdict = sel.get("verdict", v.severity)
    design = (f"Selected design: <b>{_esc(v.selected)}</b>." if v.selected
              else f"{_esc(str(sel.get('reason', v.reason)).capitalize())}.")
    out = [f'<div class="verdict-box"><p class="big">Verdict: {_sev(verdict)}</p>',
           f"<p>{design} The verdict is the worst of the {v.governing} findings about it "
           f"({c['pass']} pass, {c['check']} check, {c['fail']} fail).</p>"]
    if res.alternatives:
        out.append("<p>Candidates not selected (they do not set the verdict):</p><ul>")
        for a in res.alternatives:
            word = _sev(a.verdict) if a.verdict else "—"
            out.append(f"<li><b>{_esc(a.name)}</b> {word}: {_esc(a.reason)}</li>")
        out.append("</ul>")
    edits = data.get("edits")
    if edits and edits.get("rows"):
        out.append(f'<p class="edited">{len(edits["rows"])} input(s) were edited in the notebook '
                   f"and differ from the scenario file {_esc(edits.get('file', ''))}; see "
                   "“Inputs edited in the notebook”.</p>")
    out.append("</div>")
    return "".join(out)


_BASIS_SKIP = ("schema", "kind", "title", "project", "display", "batch")


def _design_basis(data: dict, limit: int = 14) -> str:
    rows = []
    for r in data.get("inputs", []):
        key, text = str(r.get("key", "")), str(r.get("text", ""))
        if "[" in key or key.split(".")[0] in _BASIS_SKIP or key.endswith("note"):
            continue
        if len(text) > 60:
            continue
        rows.append((key, text))
        if len(rows) >= limit:
            break
    if not rows:
        return ""
    return ("<h3>Design basis</h3>"
            + _table(["Input", "Value as written"], rows, cls="basis-table", widths=(55, 45),
                     key_cols=(0,))
            + '<p class="small">Every input is listed in “Inputs”.</p>')


#: Per kind, the result keys shown first among the key numbers (a network reports every link
#: and node: the pump's duty, the curve and the lowest pressures are what a checker looks for).
_KEY_FIRST = {"network": ("pump.", "balance.pump", "curve.", "nodes.lowest", "band.lowest",
                          "network.verdict")}


def _key_numbers(data: dict, res, limit: int = 16) -> str:
    """Up to ``limit`` results, those keyed ``selected.``/``recommended.`` (and the kind's
    :data:`_KEY_FIRST`) first; results whose label names a candidate not selected are left
    out."""
    tokens = [_token(a.name) for a in res.alternatives]
    rows = []
    results = list(data.get("results", []))
    lead = ("selected.", "recommended.") + _KEY_FIRST.get(str(data.get("kind", "")), ())
    first = [r for r in results if str(r.get("key", "")).startswith(lead)]
    for r in first + [r for r in results if r not in first]:
        label = str(r.get("label", ""))
        if any(t and t in label for t in tokens):
            continue
        rows.append((label, _result_display(r)))
        if len(rows) >= limit:
            break
    if not rows:
        return ""
    return ("<h3>Key numbers</h3>"
            + _table(["Result", "Value"], rows, cls="key-table", widths=(62, 38), num_cols=(1,))
            + '<p class="small">Every result, with its SI value, is listed in “Results”.</p>')


# ------------------------------------------------------------------ findings and references


def _references(findings) -> dict:
    """(rule, source) -> number, in order of first citation."""
    refs: dict = {}
    for f in findings:
        k = (f.rule, f.source)
        if k not in refs:
            refs[k] = len(refs) + 1
    return refs


def _findings(data: dict, res, refs: dict) -> str:
    from kit.results import group_findings
    from kit.textout import display_words

    system = str(data.get("header", {}).get("display_system", "SI"))
    if not res.findings:
        return "<p>No findings were reported.</p>"
    v = res.verdict()
    c = v.counts
    head = (f'<p class="overall">Overall: {_sev(v.severity)} — {c["pass"]} pass, '
            f'{c["check"]} check, {c["fail"]} fail'
            + (f" for the selected design, {_esc(v.selected)}" if v.selected else "") + ".</p>")
    out = [head]
    heads = ["Result", "Quantity", "Value", "Limit", "Worst condition", "Rule"]
    th = "".join(f'<th scope="col">{_esc(h)}</th>' for h in heads)
    for owner, role, groups in group_findings(res):
        tag = {"selected": " — selected design", "alternative": " — not selected"}.get(role, "")
        out.append(f"<h3>{_esc(display_words(owner, system))}{_esc(tag)}</h3>")
        if not groups:
            out.append("<p>No findings.</p>")
            continue
        rows = []
        shown = sorted((g for g in groups if g.severity != "pass"),
                       key=lambda g: -g.worst.severity.rank)
        for g in shown:
            f = g.worst
            subject = display_words(f.subject, system)
            cond = subject if g.n == 1 else f"{subject} (worst of {g.n})"
            rows.append(f'<tr class="finding"><td>{_sev(g.severity)}</td><td>{_esc(g.quantity)}'
                        f"</td><td>{_esc(_finding_display(f, system))}</td>"
                        f"<td>{_esc(_limit_display(f, system))}</td><td>{_esc(cond)}</td>"
                        f"<td>[{refs[(f.rule, f.source)]}]</td></tr>")
        passed = [g for g in groups if g.severity == "pass"]
        if passed:
            n = sum(g.n for g in passed)
            names = "; ".join(g.quantity for g in passed)
            nums = sorted({refs[(g.worst.rule, g.worst.source)] for g in passed})
            rows.append(f'<tr class="finding folded"><td>{_sev("pass")}</td>'
                        f'<td colspan="4">{_esc(names)} — {n} condition(s), all within their '
                        f"limits</td><td>{_esc(', '.join(f'[{k}]' for k in nums))}</td></tr>")
        out.append(f"<table class=\"findings-table\">{_cols((11, 19, 14, 17, 30, 9))}"
                   f"<thead><tr>{th}</tr></thead><tbody>" + "".join(rows) + "</tbody></table>")
    # every condition, for the screen only (folded; the JSON file holds them all)
    rows = [(f.severity.value.upper(), display_words(f.subject, system), f.quantity,
             _finding_display(f, system),
             _limit_display(f, system), f"[{refs[(f.rule, f.source)]}]") for f in res.findings]
    out.append(f'<details class="all-findings noprint"><summary>All {len(rows)} findings, '
               "one per condition</summary>"
               + _table(["Result", "Subject", "Quantity", "Value", "Limit", "Rule"], rows,
                        widths=(10, 30, 16, 14, 20, 10)) + "</details>")
    return "".join(out)


def _num(x):
    import math

    return None if isinstance(x, float) and math.isnan(x) else x


def _finding_display(f, system: str) -> str:
    """A finding's value in the record's display system with three significant figures
    (the SI value with all its digits is in the JSON file)."""
    from kit.textout import finding_value

    try:
        return finding_value(f, system).removeprefix("= ")
    except (KeyError, ValueError, TypeError, ArithmeticError):
        return _value_text(_num(f.value), f.unit)


def _limit_display(f, system: str) -> str:
    """A finding's limit in the record's display system (its words, with every quantity in
    them converted; the words as computed are in the JSON file)."""
    from kit.textout import limit_text

    try:
        return limit_text(f, system)
    except (KeyError, ValueError, TypeError, ArithmeticError):
        return f.limit


def _refs_list(refs: dict, system: str = "SI") -> str:
    from kit.textout import display_words

    if not refs:
        return ""
    items = "".join(f'<li value="{n}">{_esc(display_words(rule, system))} — <i>{_esc(src)}</i>'
                    "</li>" for (rule, src), n in refs.items())
    return f'<h3>Rules cited by the findings</h3><ol class="refs">{items}</ol>'


def _edits(data: dict) -> str:
    edits = data.get("edits")
    if not edits or not edits.get("rows"):
        return ""
    rows = [(r.get("key"), "(not in the file)" if r.get("file") is None else r.get("file"),
             "(removed)" if r.get("notebook") is None else r.get("notebook"))
            for r in edits["rows"]]
    return ('<h2 id="edits">Inputs edited in the notebook</h2>'
            f'<p class="edited">These inputs differ from the scenario file '
            f'{_esc(edits.get("file", ""))}; the record was computed with the notebook\'s '
            "values.</p>"
            + _table(["Key", "In the file", "In the notebook"], rows, cls="edits-table",
                     widths=(36, 32, 32), key_cols=(0,)))


def _inputs(data: dict) -> str:
    head = ('<table class="inputs-table">' + _cols((38, 62))
            + '<thead><tr><th scope="col">Key</th><th scope="col">Value as written</th></tr>'
              "</thead><tbody>")
    body = []
    for r in data.get("inputs", []):
        text = str(r.get("text", ""))
        cell = (f'<pre class="text">{_esc(text)}</pre>' if "\n" in text or len(text) > 200
                else _esc(text))
        body.append(f"<tr><td>{_key(r.get('key'))}</td><td>{cell}</td></tr>")
    return head + "".join(body) + "</tbody></table>"


# ------------------------------------------------------------------ tables and figures


def _tables(tables: dict, per_part: int = 6) -> str:
    """Each table in parts of at most ``per_part`` columns (the first column repeated), so no
    table is wider than the page."""
    out = []
    for name, rows in (tables or {}).items():
        out.append(f"<h3>{_key(name)}</h3>")
        if not isinstance(rows, list) or not rows or not isinstance(rows[0], dict):
            out.append(f"<p class=\"mono\">{_esc(rows)}</p>")
            continue
        cols = list(dict.fromkeys(k for r in rows if isinstance(r, dict) for k in r))
        first, rest = cols[:1], cols[1:]
        parts = [first + rest[i:i + per_part - 1] for i in range(0, max(len(rest), 1),
                                                                per_part - 1)]
        for part in parts:
            body = []
            for r in rows:
                cells = []
                for c in part:
                    v = r.get(c, "") if isinstance(r, dict) else ""
                    cells.append(f"{v:.6g}" if isinstance(v, float) else v)
                body.append(cells)
            num = {i for i, c in enumerate(part)
                   if all(isinstance(r.get(c), (int, float)) for r in rows if isinstance(r, dict))}
            heads = [_key(c) for c in part]
            th = "".join(f'<th scope="col">{h}</th>' for h in heads)
            trs = "".join("<tr>" + "".join(
                f'<td{" class=num" if i in num else ""}>{_key(cell)}</td>'
                for i, cell in enumerate(row)) + "</tr>" for row in body)
            out.append(f'<table class="data-table"><thead><tr>{th}</tr></thead>'
                       f"<tbody>{trs}</tbody></table>")
    return "".join(out)


def _figures(figures) -> str:
    if not figures:
        return ""
    import plotly.graph_objects as go

    out = ['<h2 id="figures">Figures</h2>']
    for i, fig in enumerate(figures):
        f = go.Figure(fig)
        legend_right = f.layout.legend.x is not None and f.layout.legend.x > 1
        f.update_layout(width=FIGURE_WIDTH_PX, height=FIGURE_HEIGHT_PX, autosize=False)
        title = f.layout.title.text
        if title and len(title) > _TITLE_CHARS and "<br>" not in title:
            lines = textwrap.wrap(title, _TITLE_CHARS)  # a long title would run off the figure
            f.update_layout(title={"text": "<br>".join(lines)},
                            margin={"t": 40 + 22 * len(lines)})
        if legend_right:  # a legend beside the plot would leave it no room on paper
            f.update_layout(legend={"orientation": "h", "x": 0, "y": -0.2})
        frag = f.to_html(full_html=False, include_plotlyjs=(i == 0), include_mathjax=False,
                         config={"displaylogo": False, "responsive": False,
                                 "showSendToCloud": False, "staticPlot": False})
        out.append(f'<div class="figure">{frag}</div>')
    return "".join(out)


def render_html(data: dict, figures=()) -> str:
    """One self-contained HTML page of a record document (see :mod:`kit.record.build`).

    Order: a summary page (header, verdict of the selected design and the candidates not
    selected, design basis, key numbers), then findings grouped per design with passes
    folded, inputs edited in the notebook, results, inputs, methods and references, tables,
    figures, cautions and the stamp.
    """
    h = data.get("header", {})
    stamp = data.get("stamp", {})
    hashes = data.get("hashes", {})
    res = _results_of(data)
    refs = _references(res.findings)
    title = f"{h.get('calc_number', '')} {h.get('title', '')}".strip() or "Calculation record"
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{_esc(_CSP)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_esc(title)}</title>",
        f"<style>{CSS}</style></head><body>",
        '<section class="summary-page" id="summary">',
        f"<h1>Calculation record — {_esc(h.get('title', ''))}</h1>",
        f'<p class="small">Study: {_esc(h.get("kind", ""))}; display units: '
        f'{_esc(h.get("display_system", ""))}; scenario file: {_esc(h.get("source", ""))}.</p>',
        _header(h),
        _verdict_box(data, res),
        _design_basis(data),
        _key_numbers(data, res),
        "</section>",
        '<h2 id="findings">Findings</h2>', _findings(data, res, refs),
        _edits(data),
        '<h2 id="results">Results</h2>',
        _table(["Result", "Value", "SI value", "Key"],
               [(r.get("label"), _result_display(r),
                 _value_text(r.get("value"), r.get("si_unit", "")), r.get("key"))
                for r in data.get("results", [])],
               cls="results-table", num_cols=(1, 2), widths=(36, 19, 20, 25), key_cols=(3,)),
        '<h2 id="inputs">Inputs (scenario as written)</h2>', _inputs(data),
        '<h2 id="methods">Methods and references</h2>',
        _table(["Method", "Published reference"],
               [(m.get("name"), m.get("reference")) for m in data.get("methods", [])],
               widths=(30, 70)),
        _refs_list(refs, str(h.get("display_system", "SI"))),
    ]
    if data.get("tables"):
        parts += ['<h2 id="tables">Tables (SI units)</h2>', _tables(data["tables"])]
    parts.append(_figures(figures))
    parts.append('<h2 id="cautions">Cautions</h2>')
    parts += [f'<p class="caution">{_esc(c)}</p>' for c in data.get("cautions", [])]
    libs = stamp.get("libraries", {})
    stamp_rows = [("kit", stamp.get("kit", ""))] + [(k, v) for k, v in libs.items()] + [
        ("Python", f"{stamp.get('python', '')} ({stamp.get('implementation', '')})"),
        ("Platform", stamp.get("platform", "")), ("Built (UTC)", stamp.get("built_utc", "")),
    ]
    hash_rows = "".join(
        f'<tr><td>{_esc(k)}</td><td class="hash">{_esc(v)}</td></tr>'
        for k, v in (("Input hash (SHA-256)", hashes.get("inputs", "")),
                     ("Result hash (SHA-256)", hashes.get("results", ""))))
    stamp_table = _table(["Item", "Value"], stamp_rows, cls="stamp-table", widths=(30, 70))
    stamp_table = stamp_table.replace("</tbody></table>", hash_rows + "</tbody></table>")
    parts += [
        '<h2 id="stamp">Stamp</h2>', stamp_table,
        '<p class="small">To check: run the installed entry point <code>headline check '
        "RECORD.json</code> from a folder of your own, with the JSON file written beside this "
        "sheet; it recomputes every result with the installed kit from the record alone and "
        "compares it value by value.</p>",
        f"<script>{_RESIZE_JS}</script>",
        "</body></html>",
    ]
    return "\n".join(parts)

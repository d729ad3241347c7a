"""The record as one self-contained HTML sheet that opens offline and prints on A4 or Letter.

Rules the page keeps:

- Every piece of text that came from a user or a file goes through :func:`html.escape`
  (an input named ``<script>`` shows as text).
- No network reference at all: styles are inline, plotly.js is inlined once (with the first
  figure), no ``src``/``href`` points outside the file, and a Content-Security-Policy meta tag
  forbids the browser from fetching anything (``default-src 'none'``).
- Print: ``@page`` margins of 15 mm on whatever paper the printer uses (A4 or Letter), table
  header rows repeat, rows are not split across pages, figures and findings keep together,
  nothing wider than the page.
- Severity is shown as a word and a symbol (PASS ✓, CHECK !, FAIL ✗), colour only as an aid.

Example
-------
>>> "&lt;b&gt;" in _esc("<b>")
True
"""

from __future__ import annotations

import html

__all__ = ["render_html", "SEVERITY_LABELS", "CSS"]

#: severity -> (text label, symbol)
SEVERITY_LABELS = {"pass": ("PASS", "✓"), "check": ("CHECK", "!"), "fail": ("FAIL", "✗")}

CSS = """
:root { color-scheme: light; }
* { box-sizing: border-box; }
html { background: #fff; }
body { margin: 0 auto; padding: 1.5rem; max-width: 62rem; background: #fff; color: #111;
       font: 10.5pt/1.4 "DejaVu Sans", "Liberation Sans", Arial, Helvetica, sans-serif; }
h1 { font-size: 16pt; margin: 0 0 .4rem; }
h2 { font-size: 12.5pt; margin: 1.4rem 0 .4rem; border-bottom: 1.5px solid #333;
     break-after: avoid; page-break-after: avoid; }
h3 { font-size: 11pt; margin: 1rem 0 .3rem; break-after: avoid; page-break-after: avoid; }
p { margin: .3rem 0; }
table { border-collapse: collapse; width: 100%; max-width: 100%; margin: .3rem 0 .8rem; }
th, td { border: 1px solid #888; padding: .2rem .4rem; text-align: left; vertical-align: top;
         overflow-wrap: anywhere; word-break: break-word; }
th { background: #eee; font-weight: 600; }
thead { display: table-header-group; }
tr, li, .figure, .finding { break-inside: avoid; page-break-inside: avoid; }
td.num { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
code, .mono { font-family: "DejaVu Sans Mono", "Liberation Mono", Consolas, monospace;
              font-size: 9pt; overflow-wrap: anywhere; }
table.header-table th { width: 22%; }
.blank { min-width: 8rem; height: 1.6rem; }
.sev { font-weight: 700; white-space: nowrap; }
.sev-pass { color: #155724; }
.sev-check { color: #7a4d00; }
.sev-fail { color: #8b0000; }
.overall { border: 2px solid #333; padding: .4rem .6rem; margin: .6rem 0; }
.caution { border-left: 4px solid #555; padding: .2rem .6rem; margin: .3rem 0; }
.figure { margin: .6rem 0 1rem; max-width: 100%; overflow: hidden; }
.js-plotly-plot, .plot-container, .svg-container { max-width: 100% !important; }
.small { font-size: 9pt; color: #333; }
@page { margin: 15mm; }
@media print {
  body { padding: 0; max-width: none; font-size: 9.5pt; }
  h2 { margin-top: 1rem; }
  .noprint, .modebar-container { display: none !important; }
  a { color: #111; text-decoration: none; }
}
"""

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


def _table(headers, rows, cls: str = "", num_cols=()) -> str:
    head = "".join(f"<th scope=\"col\">{_esc(h)}</th>" for h in headers)
    body = []
    for row in rows:
        cells = []
        for i, cell in enumerate(row):
            klass = ' class="num"' if i in num_cols else ""
            cells.append(f"<td{klass}>{_esc(cell)}</td>")
        body.append("<tr>" + "".join(cells) + "</tr>")
    c = f' class="{_esc(cls)}"' if cls else ""
    return (f"<table{c}><thead><tr>{head}</tr></thead><tbody>" + "".join(body)
            + "</tbody></table>")


def _sev(severity: str) -> str:
    word, sym = SEVERITY_LABELS.get(severity, (str(severity).upper(), "?"))
    return (f'<span class="sev sev-{_esc(severity)}">{_esc(sym)} {_esc(word)}</span>')


def _pretty(unit: str) -> str:
    """``m**3/s`` -> ``m³/s``, ``Pa*s`` -> ``Pa·s``."""
    return str(unit or "").replace("**3", "³").replace("**2", "²").replace("*", "·")


def _value_text(value, unit) -> str:
    unit = _pretty(unit)
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return f"{value:.6g} {unit}".strip()
    if value is None or value == "NaN":
        return ""
    return f"{value} {unit}".strip()


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


def _findings(findings: list) -> str:
    if not findings:
        return "<p>No findings were reported.</p>"
    counts = {s: sum(1 for f in findings if f.get("severity") == s) for s in SEVERITY_LABELS}
    worst = "fail" if counts["fail"] else ("check" if counts["check"] else "pass")
    head = (f'<p class="overall">Overall: {_sev(worst)} — {counts["pass"]} pass, '
            f'{counts["check"]} check, {counts["fail"]} fail.</p>')
    heads = ["Severity", "Subject", "Quantity", "Value (SI)", "Limit", "Rule", "Source"]
    rows = []
    for f in findings:
        cells = [f.get("subject"), f.get("quantity"), _value_text(f.get("value"), f.get("unit", "")),
                 f.get("limit"), f.get("rule"), f.get("source")]
        rows.append(f"<tr class=\"finding\"><td>{_sev(f.get('severity', ''))}</td>"
                    + "".join(f"<td>{_esc(c)}</td>" for c in cells) + "</tr>")
    th = "".join(f'<th scope="col">{_esc(h)}</th>' for h in heads)
    return (head + f"<table><thead><tr>{th}</tr></thead><tbody>" + "".join(rows)
            + "</tbody></table>")


def _tables(tables: dict) -> str:
    out = []
    for name, rows in (tables or {}).items():
        out.append(f"<h3>{_esc(name)}</h3>")
        if not isinstance(rows, list) or not rows or not isinstance(rows[0], dict):
            out.append(f"<p class=\"mono\">{_esc(rows)}</p>")
            continue
        cols = list(dict.fromkeys(k for r in rows if isinstance(r, dict) for k in r))
        body = []
        for r in rows:
            cells = []
            for c in cols:
                v = r.get(c, "") if isinstance(r, dict) else ""
                cells.append(f"{v:.6g}" if isinstance(v, float) else v)
            body.append(cells)
        num = {i for i, c in enumerate(cols)
               if all(isinstance(r.get(c), (int, float)) for r in rows if isinstance(r, dict))}
        out.append(_table(cols, body, num_cols=num))
    return "".join(out)


def _figures(figures) -> str:
    if not figures:
        return ""
    import plotly.graph_objects as go

    out = ["<h2>Figures</h2>"]
    for i, fig in enumerate(figures):
        f = go.Figure(fig)
        f.update_layout(autosize=True)
        frag = f.to_html(full_html=False, include_plotlyjs=(i == 0), include_mathjax=False,
                         default_width="100%", default_height="420px",
                         config={"displaylogo": False, "responsive": True,
                                 "showSendToCloud": False})
        out.append(f'<div class="figure">{frag}</div>')
    return "".join(out)


def render_html(data: dict, figures=()) -> str:
    """One self-contained HTML page of a record document (see :mod:`kit.record.build`)."""
    h = data.get("header", {})
    stamp = data.get("stamp", {})
    hashes = data.get("hashes", {})
    title = f"{h.get('calc_number', '')} {h.get('title', '')}".strip() or "Calculation record"
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{_esc(_CSP)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{_esc(title)}</title>",
        f"<style>{CSS}</style></head><body>",
        f"<h1>Calculation record — {_esc(h.get('title', ''))}</h1>",
        f'<p class="small">Study: {_esc(h.get("kind", ""))}; display units: '
        f'{_esc(h.get("display_system", ""))}; scenario file: {_esc(h.get("source", ""))}.</p>',
        _header(h),
        '<h2 id="findings">Findings</h2>', _findings(data.get("findings", [])),
        '<h2 id="results">Results</h2>',
        _table(["Result", "Value", "SI value", "Key"],
               [(r.get("label"), r.get("display"), _value_text(r.get("value"), r.get("si_unit", "")),
                 r.get("key")) for r in data.get("results", [])],
               cls="results-table", num_cols=(1, 2)),
        '<h2 id="inputs">Inputs (scenario as written)</h2>',
        _table(["Key", "Value as written"],
               [(r.get("key"), r.get("text")) for r in data.get("inputs", [])],
               cls="inputs-table"),
        '<h2 id="methods">Methods and references</h2>',
        _table(["Method", "Published reference"],
               [(m.get("name"), m.get("reference")) for m in data.get("methods", [])]),
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
        ("Input hash (SHA-256)", hashes.get("inputs", "")),
        ("Result hash (SHA-256)", hashes.get("results", "")),
    ]
    parts += [
        '<h2 id="stamp">Stamp</h2>',
        _table(["Item", "Value"], stamp_rows, cls="stamp-table"),
        '<p class="small">To check: <code>python -m kit check RECORD.json</code>, with the '
        "JSON file written beside this sheet, recomputes every result with the installed kit "
        "and compares it value by value.</p>",
        f"<script>{_RESIZE_JS}</script>",
        "</body></html>",
    ]
    return "\n".join(parts)

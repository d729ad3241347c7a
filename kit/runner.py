"""Run a study's notebook headless: ``python -m kit run SCENARIO.toml --out DIR``.

The notebook that matches the scenario's ``kind`` (:data:`NOTEBOOKS`) is executed with
nbclient (kernel ``python3``, widget state stored) with the scenario's path in
``HEADLINE_SCENARIO`` and the output folder in ``HEADLINE_RECORD_DIR`` (contract in
:mod:`kit.record`). Into ``DIR`` go:

- ``<notebook>.ipynb``  the executed notebook (with its widget state),
- ``<notebook>.html``   its HTML export, readable offline (:func:`offline_html`): each widget
  is drawn from its stored state as static HTML (values as shown, charts by plotly.js inlined
  once), and no script comes from a network (no widget renderer, require.js, MathJax or
  mermaid from a CDN),
- ``<stem>.html`` and ``<stem>.json``  the record, written by the notebook's last section
  (``<stem>`` is the scenario file's stem, passed as ``HEADLINE_RECORD_STEM``).

The notebooks folder is ``$HEADLINE_NOTEBOOKS`` when set, else ``notebooks/`` beside the
``kit`` package (the repository root). ``--notebook PATH`` runs a given notebook instead.

Progress goes to the terminal (stderr): ``cell i/n``, the cell's first line, the elapsed
time. An error in a cell stops the run with a message naming the cell (its number, id and
first line) and the error; the partly executed notebook is still written for inspection.

Exit codes: 0 done; 1 a cell failed, the kernel died or timed out, or no record was written;
2 bad arguments (scenario unreadable, notebook not found).
"""

from __future__ import annotations

import os
import sys
import time
from dataclasses import dataclass
from pathlib import Path

__all__ = ["NOTEBOOKS", "RunOutcome", "notebooks_dir", "notebook_for", "run_notebook",
           "run_main", "offline_html", "static_widgets"]

#: scenario kind -> notebook file name in the notebooks folder
NOTEBOOKS = {
    "line_sizing": "line_sizing.ipynb",
    "pump_selection": "pump_selection.ipynb",
    "tank_drainage": "tank_drainage.ipynb",
    "network": "network_systems.ipynb",
}


@dataclass
class RunOutcome:
    """What a run produced. ``code`` is the exit code; ``message`` says what went wrong."""

    code: int = 0
    message: str = ""
    notebook: Path | None = None
    notebook_html: Path | None = None
    record_html: Path | None = None
    record_json: Path | None = None
    elapsed: float = 0.0

    @property
    def ok(self) -> bool:
        return self.code == 0


def notebooks_dir() -> Path:
    """``$HEADLINE_NOTEBOOKS``, else ``notebooks/`` next to the ``kit`` package."""
    env = os.environ.get("HEADLINE_NOTEBOOKS")
    if env:
        return Path(env).expanduser().resolve()
    return Path(__file__).resolve().parent.parent / "notebooks"


def notebook_for(kind: str) -> Path:
    """The notebook that studies ``kind`` (it may not exist; :func:`run_notebook` says so)."""
    from kit.errors import check_choice

    return notebooks_dir() / NOTEBOOKS[check_choice("scenario kind", kind, tuple(NOTEBOOKS))]


def _first_line(source: str) -> str:
    for line in source.splitlines():
        if line.strip():
            return line.strip()[:70]
    return "(empty)"


class _Progress:
    """Prints ``cell i/n`` lines with elapsed time."""

    def __init__(self, nb, stream, quiet: bool = False):
        self.stream = stream
        self.quiet = quiet
        self.t0 = time.perf_counter()
        code = [i for i, c in enumerate(nb.cells) if c.cell_type == "code"]
        self.ordinal = {idx: k + 1 for k, idx in enumerate(code)}
        self.n = len(code)
        self.current = None

    def start(self, cell=None, cell_index=None, **_):
        self.current = cell_index
        if self.quiet or cell is None or cell.cell_type != "code":
            return
        k = self.ordinal.get(cell_index, "?")
        el = time.perf_counter() - self.t0
        print(f"  cell {k:>2}/{self.n}  {el:6.1f} s  {_first_line(cell.source)}",
              file=self.stream, flush=True)

    def describe(self, nb, cell_index) -> str:
        if cell_index is None or cell_index >= len(nb.cells):
            return "a cell"
        cell = nb.cells[cell_index]
        cid = getattr(cell, "id", None) or cell.get("id", "")
        k = self.ordinal.get(cell_index, "?")
        idt = f", id {cid}" if cid else ""
        return f"code cell {k} of {self.n} (cell {cell_index + 1} in the notebook{idt}: " \
               f"{_first_line(cell.source)!r})"


def run_notebook(notebook, scenario_path, out_dir, *, timeout: float = 600.0,
                 stem: str | None = None, stream=None, quiet: bool = False,
                 export_html: bool = True) -> RunOutcome:
    """Execute ``notebook`` for ``scenario_path`` and write the outputs into ``out_dir``.

    Parameters
    ----------
    notebook : path
        The ``.ipynb`` to execute.
    scenario_path : path
        The scenario file, passed as ``HEADLINE_SCENARIO``.
    out_dir : path
        Output folder, passed as ``HEADLINE_RECORD_DIR`` (created if needed).
    timeout : float
        Per-cell timeout [s].
    stem : str, optional
        Record file stem, passed as ``HEADLINE_RECORD_STEM`` (default: the scenario's stem).

    Returns
    -------
    outcome : RunOutcome
        Paths written and, on failure, a non-zero ``code`` and a ``message`` naming the cell.
    """
    stream = stream or sys.stderr
    t0 = time.perf_counter()
    nb_path = Path(notebook).resolve()
    if not nb_path.is_file():
        return RunOutcome(2, f"notebook {nb_path} not found (set HEADLINE_NOTEBOOKS to the "
                          "notebooks folder, or pass --notebook)")
    import nbformat
    from nbclient import NotebookClient
    from nbclient.exceptions import CellExecutionError, CellTimeoutError, DeadKernelError

    out = Path(out_dir).resolve()
    out.mkdir(parents=True, exist_ok=True)
    stem = stem or Path(scenario_path).stem
    try:
        nb = nbformat.read(nb_path, as_version=4)
    except (OSError, ValueError) as exc:
        return RunOutcome(2, f"notebook {nb_path} cannot be read: {exc}")
    rec_html, rec_json = out / f"{stem}.html", out / f"{stem}.json"
    before = {p: p.stat().st_mtime_ns for p in (rec_html, rec_json) if p.exists()}
    env = dict(os.environ)
    env.update({"HEADLINE_SCENARIO": str(Path(scenario_path).resolve()),
                "HEADLINE_RECORD_DIR": str(out), "HEADLINE_RECORD_STEM": stem})
    progress = _Progress(nb, stream, quiet)
    client = NotebookClient(nb, kernel_name="python3", timeout=timeout, store_widget_state=True,
                            record_timing=False, on_cell_start=progress.start,
                            resources={"metadata": {"path": str(nb_path.parent)}})
    if not quiet:
        print(f"running {nb_path.name} for {Path(scenario_path).name} "
              f"({progress.n} code cells)", file=stream, flush=True)
    failure = None
    try:
        client.execute(env=env)
    except CellTimeoutError:
        failure = (f"{progress.describe(nb, progress.current)} did not finish within "
                   f"{timeout:g} s")
    except CellExecutionError as exc:
        failure = (f"{progress.describe(nb, progress.current)} raised "
                   f"{exc.ename}: {exc.evalue}")
    except DeadKernelError as exc:
        failure = f"the kernel died while running {progress.describe(nb, progress.current)}: {exc}"
    except Exception as exc:  # kernel start problems (NoSuchKernel, ...): say so plainly
        failure = f"the notebook could not be executed: {type(exc).__name__}: {exc}"
    out_nb = out / nb_path.name
    nbformat.write(nb, out_nb)
    outcome = RunOutcome(notebook=out_nb)
    if failure:
        outcome.code, outcome.elapsed = 1, time.perf_counter() - t0
        outcome.message = f"{failure}\n(partly executed notebook written to {out_nb})"
        return outcome
    if export_html:
        body = offline_html(nb)
        out_html = out / f"{nb_path.stem}.html"
        if out_html == rec_html:
            out_html = out / f"{nb_path.stem}.notebook.html"
        out_html.write_text(body, encoding="utf-8")
        outcome.notebook_html = out_html
    outcome.elapsed = time.perf_counter() - t0
    if all(p.exists() and before.get(p) != p.stat().st_mtime_ns for p in (rec_html, rec_json)):
        outcome.record_html, outcome.record_json = rec_html, rec_json
    else:
        outcome.code = 1
        outcome.message = (f"{nb_path.name} ran but wrote no record {rec_json.name} into {out} "
                           "(its last section must call kit.record.save_record, which "
                           "writes into HEADLINE_RECORD_DIR when it is set)")
    return outcome


#: The widget-view output of a cell and the notebook's stored widget state.
_VIEW = "application/vnd.jupyter.widget-view+json"
_STATE = "application/vnd.jupyter.widget-state+json"

#: An nbconvert template (the JupyterLab one) with every script that a network would serve
#: left out: require.js, MathJax, mermaid and the widget renderer.
_OFFLINE_TEMPLATE = """{%- extends 'index.html.j2' -%}
{%- block html_head_js_requirejs -%}{%- endblock html_head_js_requirejs -%}
{%- block jupyter_widgets -%}{%- endblock jupyter_widgets -%}
{%- block html_head_js_mathjax -%}{%- endblock html_head_js_mathjax -%}
{%- block html_head_js_mermaidjs -%}{%- endblock html_head_js_mermaidjs -%}
"""

_STATIC_CSS = """<style>
.hl-static-box{display:flex;flex-direction:column;gap:2px}
.hl-static-box.hl-static-row{flex-direction:row;flex-wrap:wrap;gap:8px;align-items:flex-start}
.hl-static-field{display:inline-flex;gap:6px;margin:1px 0}
.hl-static-field .hl-static-label{min-width:8em;color:#333}
.hl-static-field .hl-static-value{font-family:monospace;background:#f4f4f4;padding:0 4px}
.hl-static-tab>h4{margin:8px 0 2px 0}
</style>"""


def _ref(value) -> str | None:
    if isinstance(value, str) and value.startswith("IPY_MODEL_"):
        return value[len("IPY_MODEL_"):]
    return None


class _StaticWidgets:
    """The stored widget state of a notebook drawn as static HTML (see :func:`static_widgets`)."""

    BOXES = {"VBoxModel", "BoxModel", "GridBoxModel"}
    SELECTS = {"DropdownModel", "SelectModel", "RadioButtonsModel", "ToggleButtonsModel",
               "SelectionSliderModel"}

    def __init__(self, state: dict):
        self.state = state
        self.plots = 0

    def _hidden(self, st: dict) -> bool:
        lay = self.state.get(_ref(st.get("layout")) or "", {}).get("state", {})
        return lay.get("display") == "none" or lay.get("visibility") == "hidden"

    def field(self, label: str, value: str) -> str:
        import html

        lab = f'<span class="hl-static-label">{html.escape(label)}</span>' if label else ""
        return (f'<span class="hl-static-field">{lab}<span class="hl-static-value">'
                f"{html.escape(value)}</span></span>")

    def render(self, model_id: str, depth: int = 0) -> str:
        import html

        entry = self.state.get(model_id)
        if entry is None or depth > 60:
            return ""
        name = entry.get("model_name", "")
        st = entry.get("state", {})
        if self._hidden(st):
            return ""
        classes = " ".join(html.escape(str(c)) for c in st.get("_dom_classes", ()))
        desc = str(st.get("description", "") or "")
        kids = [_ref(c) for c in st.get("children", ()) or ()]
        if name in self.BOXES or name == "HBoxModel":
            row = " hl-static-row" if name == "HBoxModel" else ""
            inner = "".join(self.render(k, depth + 1) for k in kids if k)
            return f'<div class="hl-static-box{row} {classes}">{inner}</div>'
        if name in ("TabModel", "AccordionModel", "StackModel"):
            titles = list(st.get("titles", ()) or ())
            out = []
            for i, k in enumerate(kids):
                title = titles[i] if i < len(titles) and titles[i] else ""
                body = self.render(k, depth + 1) if k else ""
                out.append(f'<div class="hl-static-tab"><h4>{html.escape(str(title))}</h4>'
                           f"{body}</div>")
            return f'<div class="{classes}">{"".join(out)}</div>'
        if name in ("HTMLModel", "HTMLMathModel"):
            return f'<div class="{classes}">{st.get("value", "")}</div>'
        if name == "LabelModel":
            return f'<span class="{classes}">{html.escape(str(st.get("value", "")))}</span>'
        if name in self.SELECTS:
            labels = list(st.get("_options_labels", ()) or ())
            i = st.get("index")
            value = labels[i] if isinstance(i, int) and 0 <= i < len(labels) else ""
            return f'<div class="{classes}">{self.field(desc, str(value))}</div>'
        if name in ("CheckboxModel", "ToggleButtonModel"):
            return f'<div class="{classes}">{"☑" if st.get("value") else "☐"} {html.escape(desc)}</div>'
        if name == "OutputModel":
            return f'<div class="{classes}">{self.outputs(st.get("outputs", ()), depth)}</div>'
        if name == "AnyModel" and "figure_layout" in st and "data" in st:
            return self.plot(st, classes)
        if name == "ButtonModel" or "source" in st:   # actions and the plotly.js carrier
            return ""
        if "value" in st and not isinstance(st.get("value"), dict | list):
            return f'<div class="{classes}">{self.field(desc, str(st.get("value", "")))}</div>'
        return ""

    def plot(self, st: dict, classes: str) -> str:
        import json

        layout = dict(st.get("figure_layout") or {})
        if st.get("figure_template"):
            layout["template"] = st["figure_template"]
        self.plots += 1
        div = f"hl-static-plot-{self.plots}"
        args = json.dumps([div, st.get("data") or [], layout,
                           {**(st.get("plot_config") or {}), "responsive": True}])
        args = args.replace("</", "<\\/")
        lib = ""
        if self.plots == 1:
            from plotly.offline import get_plotlyjs

            lib = f"<script>{get_plotlyjs()}</script>"
        return (f'<div class="{classes}">{lib}<div id="{div}" class="hl-plot"></div>'
                f"<script>Plotly.newPlot.apply(null, {args});</script></div>")

    def outputs(self, outputs, depth: int) -> str:
        import html

        out = []
        for o in outputs or ():
            data = o.get("data", {}) if isinstance(o, dict) else {}
            if _VIEW in data:
                out.append(self.render(str(data[_VIEW].get("model_id", "")), depth + 1))
            elif "text/html" in data:
                v = data["text/html"]
                out.append("".join(v) if isinstance(v, list) else str(v))
            elif "image/png" in data:
                out.append(f'<img src="data:image/png;base64,{data["image/png"]}">')
            elif isinstance(o, dict) and o.get("output_type") == "stream":
                text = o.get("text", "")
                out.append(f"<pre>{html.escape(''.join(text) if isinstance(text, list) else text)}"
                           "</pre>")
            elif "text/plain" in data:
                v = data["text/plain"]
                out.append(f"<pre>{html.escape(''.join(v) if isinstance(v, list) else v)}</pre>")
        return "".join(out)


def static_widgets(nb):
    """A copy of the notebook ``nb`` with each widget output replaced by static HTML drawn
    from the stored widget state, and the widget state removed.

    Values show as typed (a field as its label and value, a choice as its label), HTML
    widgets as their HTML, hidden widgets and buttons not at all, charts (PlotView) as
    plotly figures drawn by plotly.js carried once in the first chart's output.
    """
    import copy

    nb = copy.deepcopy(nb)
    widgets_meta = nb.metadata.pop("widgets", None) or {}
    state = (widgets_meta.get(_STATE) or {}).get("state") or {}
    drawer = _StaticWidgets(state)
    first = True
    for cell in nb.cells:
        for o in cell.get("outputs", ()):
            data = o.get("data") if isinstance(o, dict) else None
            if not data or _VIEW not in data:
                continue
            body = drawer.render(str(data[_VIEW].get("model_id", "")))
            if first and body:
                body, first = _STATIC_CSS + body, False
            o["data"] = {"text/html": body or "<i>(an interactive widget: open the notebook "
                         "in JupyterLab to use it)</i>"}
    return nb


def offline_html(nb) -> str:
    """The notebook ``nb`` as one HTML page that needs no network: widgets drawn statically
    from their stored state (:func:`static_widgets`), JupyterLab's nbconvert template with
    its network scripts left out.

    Example
    -------
    >>> import nbformat
    >>> page = offline_html(nbformat.v4.new_notebook(cells=[nbformat.v4.new_markdown_cell("x")]))
    >>> "<html" in page and "https://" not in page.split("<body", 1)[0].split("<style")[0]
    True
    """
    from jinja2 import DictLoader
    from nbconvert import HTMLExporter

    exporter = HTMLExporter(template_name="lab", template_file="headline_offline.html.j2",
                            extra_loaders=[DictLoader({"headline_offline.html.j2":
                                                       _OFFLINE_TEMPLATE})])
    body, _ = exporter.from_notebook_node(static_widgets(nb))
    return body


def run_main(argv=None) -> int:
    """``headline run SCENARIO.toml --out DIR [--notebook NB]``; returns the exit code.

    Bad arguments (unreadable scenario, unusable ``--out``, missing notebook) are one line
    ``headline: run ... — why`` on stderr and exit code 2.
    """
    from kit.cli import CliError, say_error

    try:
        return _run(argv)
    except CliError as exc:
        say_error(exc.what, exc.why)
        return exc.code


def _run(argv) -> int:
    from kit.__main__ import load_scenario
    from kit.cli import CliError, Parser, output_folder, say_error
    from kit.errors import HeadlineError

    ap = Parser(
        prog="headline run",
        description="Execute the scenario's notebook headless and write the executed notebook, "
                    "its HTML and the record (HTML + JSON) into a folder.",
        epilog="exit codes: 0 done; 1 a cell failed or no record was written; 2 bad arguments")
    ap.add_argument("scenario", help="scenario TOML file")
    ap.add_argument("--out", required=True, help="output folder (created if needed)")
    ap.add_argument("--notebook", default=None,
                    help="run this notebook instead of the one for the scenario's kind")
    ap.add_argument("--timeout", type=float, default=600.0, help="per-cell timeout [s]")
    ap.add_argument("--quiet", action="store_true", help="no progress lines")
    a = ap.parse_args(argv)
    if not (a.timeout > 0 and a.timeout < float("inf")):
        raise CliError("run --timeout", f"must be a finite number of seconds above 0, not {a.timeout}")
    sc = load_scenario(a.scenario, "run")
    try:
        nb = Path(a.notebook) if a.notebook else notebook_for(sc.kind)
    except HeadlineError as exc:
        raise CliError(f"run {a.scenario!r}", str(exc)) from None
    if not nb.is_file():
        raise CliError("run", f"notebook {nb} not found (set HEADLINE_NOTEBOOKS to the "
                       "notebooks folder, or pass --notebook)")
    out = output_folder(a.out)
    outcome = run_notebook(nb, a.scenario, out, timeout=a.timeout, quiet=a.quiet)
    if not outcome.ok:
        first, *more = outcome.message.splitlines() or [""]
        say_error(f"run {Path(a.scenario).name!r}", first)
        for line in more:
            print(f"  {line}", file=sys.stderr)
        return outcome.code
    print(f"done in {outcome.elapsed:.1f} s; wrote:", file=sys.stderr)
    for p in (outcome.notebook, outcome.notebook_html, outcome.record_html, outcome.record_json):
        if p is not None:
            print(f"  {p}", file=sys.stderr)
    return 0

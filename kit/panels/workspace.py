"""The workspace: one screen for the loop — the inputs beside the chart they drive.

:class:`Workspace` lays out an app's existing widgets (the same widget objects the narrative
cells show, so both stay in step):

- a compact **inputs column** on the left: grouped, collapsible sections (:class:`Section`:
  a header button that opens and closes its body; Enter or Space on the header toggles it);
  the column scrolls inside its own box;
- on the right, a one-line **status** (the verdict of the selected design and the number the
  engineer steers), the refusal banner, the **main chart** (always in view: the column keeps
  its place while the inputs scroll; its height fits the screen, CSS ``hl-fit-height``), and
  under it **tabs** for the tables, profile and findings (each scrolls in its own box).

The view fits 1366×768 and 1920×1080 in JupyterLab's default theme without a horizontal
page scroll: the columns share the width (``min-width: 0``), wide rows inside the inputs wrap,
tables scroll inside their tab. Tab moves through the inputs in reading order (document
order: the inputs column first, top to bottom); a text box applies its value on Enter.

CSS classes: ``hl-workspace``, ``hl-workspace-inputs``, ``hl-workspace-results``,
``hl-workspace-status``, ``hl-workspace-chart`` (also ``hl-fit-height``),
``hl-workspace-tabs``, ``hl-ws-section``/``hl-ws-section-head``/``hl-ws-section-body``.

Example
-------
>>> import ipywidgets as widgets
>>> ws = Workspace([Section("Flow", [widgets.Label("design flow")])], widgets.Label("chart"),
...                widgets.HTML("status"), [("Table", widgets.Label("rows"))])
>>> [s.title for s in ws.sections], ws.tabs.titles
(['Flow'], ('Table',))
>>> ws.sections[0].toggle(); ws.sections[0].open
False
"""

from __future__ import annotations

import html

import ipywidgets as widgets

from kit.panels.base import BASE_CSS

__all__ = ["Workspace", "Section", "WORKSPACE_CSS", "status_html"]

#: The workspace's own CSS (sizes in viewport units: one screen, no page scroll sideways).
WORKSPACE_CSS = """
.hl-workspace { width: 100%; max-width: 100%; box-sizing: border-box; align-items: flex-start;
  gap: 10px; overflow: hidden; }
.hl-workspace .hl-workspace-inputs { flex: 0 0 clamp(360px, 36%, 600px); min-width: 0;
  max-height: calc(100vh - 170px); overflow-y: auto; overflow-x: hidden; padding-right: 4px;
  box-sizing: border-box; }
.hl-workspace .hl-workspace-results { flex: 1 1 auto; min-width: 0; overflow: hidden; }
.hl-workspace .hl-workspace-inputs .widget-hbox { flex-wrap: wrap; }
.hl-workspace .hl-workspace-inputs .widget-vbox > *, .hl-workspace .hl-workspace-results > *,
.hl-workspace .hl-workspace-inputs > * { flex-shrink: 0; }
.hl-workspace .hl-workspace-inputs .jupyter-widgets { max-width: 100%; }
.hl-workspace .hl-workspace-inputs .widget-dropdown { width: auto !important; }
.hl-workspace .hl-workspace-inputs .hl-field-row .hl-error { flex: 1 1 100%; }
.hl-workspace .hl-workspace-inputs .hl-label { min-width: 7.5em !important; }
.hl-workspace .hl-workspace-inputs .hl-quantity .hl-entry { width: 9em !important; }
.hl-workspace .hl-ws-section { margin: 0 0 4px 0; border: 1px solid #d6d6d6; border-radius: 3px; }
.hl-workspace button.hl-ws-section-head {
  width: 100%; text-align: left; font-weight: bold; background: #eef2f6; }
.hl-workspace .hl-ws-section-body { padding: 2px 4px 4px 4px; }
.hl-workspace .hl-workspace-status { font-size: 1.05em; padding: 3px 8px; margin-bottom: 2px;
  background: #f3f6f9; border-left: 4px solid #1f5fa8; line-height: 1.35; }
.hl-workspace .hl-status-pass { color: #1d5e1d; font-weight: bold; }
.hl-workspace .hl-status-check { color: #7a4d00; font-weight: bold; }
.hl-workspace .hl-status-fail { color: #8a1111; font-weight: bold; }
.hl-workspace .hl-workspace-chart .hl-plot { height: clamp(320px, calc(100vh - 300px), 640px);
  }
.hl-workspace .hl-workspace-tabs .widget-tab-contents, .hl-workspace .hl-workspace-tabs
  .lm-TabPanel-stackedPanel, .hl-workspace .hl-tab-body { max-height: 60vh; overflow: auto; }
.hl-workspace .hl-workspace-tabs table { max-width: none; }
"""


def status_html(parts, verdict: str | None = None) -> str:
    """One status line: the verdict (coloured, CSS ``hl-status-<verdict>``) then the parts.

    >>> status_html(["velocity 1.9 m/s"], "pass")
    '<span class="hl-status-pass">PASS</span> — velocity 1.9 m/s'
    """
    text = " · ".join(html.escape(str(p)) for p in parts if p)
    if verdict:
        v = html.escape(str(verdict))
        head = f'<span class="hl-status-{v.lower().split()[0]}">{v.upper()}</span>'
        return f"{head} — {text}" if text else head
    return text


class Section(widgets.VBox):
    """A collapsible group of inputs: a header button (▾ open, ▸ closed) over its body.

    Parameters
    ----------
    title : str
    children : sequence of widgets
    open : bool
        Start open (default) or closed.
    """

    def __init__(self, title: str, children, open: bool = True):
        self.title = title
        self.head = widgets.Button(description="", layout=widgets.Layout(width="100%"))
        self.head.add_class("hl-ws-section-head")
        self.body = widgets.VBox(list(children))
        self.body.add_class("hl-ws-section-body")
        super().__init__([self.head, self.body])
        self.add_class("hl-ws-section")
        self.open = bool(open)
        self._show()
        self.head.on_click(lambda _b: self.toggle())

    def toggle(self) -> None:
        """Open a closed section, close an open one."""
        self.open = not self.open
        self._show()

    def _show(self) -> None:
        self.head.description = ("▾ " if self.open else "▸ ") + self.title
        self.body.layout.display = "" if self.open else "none"


class Workspace(widgets.HBox):
    """Inputs beside the main chart, a status line above it, tabs under it.

    Parameters
    ----------
    sections : sequence of Section
        The inputs column, top to bottom.
    chart : widget
        The main chart (a :class:`~kit.panels.plot_view.PlotView` or a box holding one).
    status : ipywidgets.HTML
        The one-line status (updated by the app on every change).
    tabs : sequence of (title, widget)
        Tables, profile, findings ... under the chart.
    header : sequence of widgets, optional
        Shown above the status (the unit switch, the refusal banner).

    Attributes
    ----------
    inputs, results : ipywidgets.VBox
    tabs : ipywidgets.Tab
    """

    def __init__(self, sections, chart, status, tabs=(), header=()):
        self.sections = list(sections)
        self.status = status
        self.status.add_class("hl-workspace-status")
        style = widgets.HTML(f"<style>{BASE_CSS}{WORKSPACE_CSS}</style>")
        self.inputs = widgets.VBox([style, *self.sections])
        self.inputs.add_class("hl-workspace-inputs")
        self.chart = widgets.VBox([chart])
        self.chart.add_class("hl-workspace-chart")
        self.chart.add_class("hl-fit-height")
        bodies = []
        for _title, w in tabs:
            box = widgets.VBox([w])
            box.add_class("hl-tab-body")
            bodies.append(box)
        self.tabs = widgets.Tab(children=bodies, titles=tuple(t for t, _w in tabs))
        self.tabs.add_class("hl-workspace-tabs")
        self.results = widgets.VBox([*header, self.status, self.chart, self.tabs])
        self.results.add_class("hl-workspace-results")
        super().__init__([self.inputs, self.results])
        self.add_class("hl-workspace")

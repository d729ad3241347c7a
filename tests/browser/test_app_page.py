"""App mode: ``headline app`` serves each notebook as a page with no code; on each page the
workspace chart draws in Chromium and redraws when one input changes (the kernel behind the
page runs).

Adding a page is one line in :data:`PAGES`: the notebook, the input to change (a CSS selector,
which match, and the text to type or the option label to choose)."""

from __future__ import annotations

import os
import shutil
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from dataclasses import dataclass
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
ARTIFACTS = ROOT / "artifacts"
CHROMIUM = Path("/usr/bin/chromium")
NO_CHROMIUM = f"{CHROMIUM} is missing (install it with: apt-get install -y chromium)"

pytestmark = [pytest.mark.browser]
pytest.importorskip("voila")


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.fixture(scope="module")
def app(tmp_path_factory):
    """``python -m kit app`` on a free port, serving a temp copy of notebooks/."""
    if not CHROMIUM.exists():
        pytest.skip(NO_CHROMIUM)
    base = tmp_path_factory.mktemp("app")
    nbs = base / "notebooks"
    shutil.copytree(ROOT / "notebooks", nbs, ignore=shutil.ignore_patterns(".ipynb_checkpoints",
                                                                          "records"))
    env = dict(os.environ)
    for var, sub in {"JUPYTER_CONFIG_DIR": "config", "JUPYTER_DATA_DIR": "data",
                     "JUPYTER_RUNTIME_DIR": "runtime", "IPYTHONDIR": "ipython",
                     "TMPDIR": "tmp"}.items():
        (base / sub).mkdir()
        env[var] = str(base / sub)
    env["HEADLINE_NOTEBOOKS"] = str(nbs)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT), env.get("PYTHONPATH")) if p)
    port = _free_port()
    log = base / "app.log"
    with open(log, "wb") as fh:
        proc = subprocess.Popen([sys.executable, "-m", "kit", "app", "--port", str(port)],
                                env=env, stdout=fh, stderr=subprocess.STDOUT, cwd=base)
    url = f"http://127.0.0.1:{port}"
    t0 = time.monotonic()
    while True:
        if proc.poll() is not None:
            pytest.fail(f"kit app exited with {proc.returncode}:\n{log.read_text()[-3000:]}")
        try:
            with urllib.request.urlopen(url + "/", timeout=5) as r:
                if r.status == 200:
                    break
        except (urllib.error.URLError, ConnectionError, TimeoutError):
            pass
        if time.monotonic() - t0 > 60:
            proc.send_signal(signal.SIGTERM)
            pytest.fail(f"kit app not ready after 60 s:\n{log.read_text()[-3000:]}")
        time.sleep(0.2)
    yield url, log, nbs
    proc.send_signal(signal.SIGTERM)
    try:
        proc.wait(timeout=20)
    except subprocess.TimeoutExpired:
        proc.kill()
        proc.wait(timeout=10)


@dataclass(frozen=True)
class Page:
    """One app page and the input the test changes on it.

    ``field`` is a CSS selector; ``nth`` picks among its matches; ``typed`` is entered (then
    Enter) into a text box, ``option`` chooses the first option of a select whose label
    starts so. ``chart`` holds the chart that must redraw (the workspace's main chart)."""

    notebook: str
    field: str
    nth: int = 0
    typed: str | None = None
    option: str | None = None
    chart: str = ".hl-workspace .hl-workspace-chart"


#: The pages: one line each.
PAGES = [
    Page("line_sizing.ipynb", ".hl-workspace .hl-flow-design input", typed="300 gpm"),
    Page("pump_selection.ipynb",
         ".hl-workspace .hl-pump-editor .hl-point-row .hl-point-head input", nth=3, typed="72"),
    Page("tank_drainage.ipynb", ".hl-workspace .hl-outlet-picker .hl-pipe-picker select",
         nth=1, option="NPS 1-1/2 "),
    Page("network_systems.ipynb", ".hl-workspace .hl-temp-min input", typed="10 degC",
         chart=".hl-workspace .hl-network-curve"),
]


def _change(page, dom, p: Page) -> None:
    box = page.locator(p.field).nth(p.nth)
    box.scroll_into_view_if_needed()
    if p.option is not None:
        dom.select_by_label(box, p.option)
    else:
        box.fill(p.typed)
        box.press("Enter")


@pytest.mark.parametrize("p", PAGES, ids=[p.notebook.removesuffix(".ipynb") for p in PAGES])
def test_app_page_draws_and_redraws_without_code(p, app, page, dom):
    url, log, _ = app
    printed = log.read_text()
    address = f"{url}/voila/render/{p.notebook}"
    assert address in printed   # the URLs are printed
    t0 = time.monotonic()
    page.set_viewport_size({"width": 1366, "height": 900})
    page.goto(address, timeout=300_000)
    page.wait_for_selector(f"{p.chart} .js-plotly-plot .main-svg", state="attached",
                           timeout=300_000)
    seconds = time.monotonic() - t0
    # code cells are hidden: no editor and no source text of the first cell on the page
    assert page.locator(".jp-InputArea-editor, .CodeMirror, .cm-editor").count() == 0
    assert "open_scenario(" not in page.content()
    # the workspace in view; its chart drawn; then one input changed redraws it
    page.locator(p.chart).first.scroll_into_view_if_needed()
    dom.wait_charts_drawn(page, p.chart)
    old = dom.paths(page, p.chart)
    _change(page, dom, p)
    page.locator(p.chart).first.scroll_into_view_if_needed()
    dom.wait_paths_changed(page, p.chart, old, timeout=60_000)
    assert dom.paths(page, p.chart) != old
    assert dom.text(page, ".hl-workspace .hl-app-message") == ""
    ARTIFACTS.mkdir(exist_ok=True)
    name = p.notebook.removesuffix(".ipynb")
    page.screenshot(path=str(ARTIFACTS / f"app-{name}.png"), full_page=False)
    print(f"\n{name} app page: first chart after {seconds:.1f} s")

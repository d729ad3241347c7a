"""App mode: ``headline app`` serves the line-sizing notebook as a page with no code; its chart
draws in Chromium and redraws when an input changes."""

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


# the line-sizing app's own selectors (as in test_line_sizing.py)
V_CHART = ".hl-velocity-chart"
FLOW = ".hl-flow-design input"


def test_line_sizing_page_draws_its_chart_without_code(app, page, dom):
    url, log, _ = app
    printed = log.read_text()
    assert f"{url}/voila/render/line_sizing.ipynb" in printed   # the URLs are printed
    t0 = time.monotonic()
    page.goto(f"{url}/voila/render/line_sizing.ipynb", timeout=300_000)
    page.wait_for_selector(".js-plotly-plot .main-svg", state="visible", timeout=300_000)
    seconds = time.monotonic() - t0
    assert page.locator(".js-plotly-plot").count() >= 1
    # code cells are hidden: no editor and no source text of the first cell on the page
    assert page.locator(".jp-InputArea-editor, .CodeMirror, .cm-editor").count() == 0
    assert "open_scenario(" not in page.content()
    # an input changed on the app page redraws the chart (the kernel behind the page runs)
    dom.wait_charts_drawn(page, V_CHART)
    old = dom.paths(page, V_CHART)
    box = page.locator(FLOW).first
    box.fill("300 gpm")
    box.press("Enter")
    dom.wait_paths_changed(page, V_CHART, old, timeout=60_000)
    assert dom.paths(page, V_CHART) != old
    ARTIFACTS.mkdir(exist_ok=True)
    page.screenshot(path=str(ARTIFACTS / "app-line-sizing.png"), full_page=True)
    print(f"line-sizing app page: first chart after {seconds:.1f} s")

"""Browser harness: JupyterLab on 127.0.0.1 in a hermetic temp root, driven by headless Chromium.

Fixtures
--------
- ``lab`` (session): a JupyterLab server with a random token, its own config, data, runtime,
  settings, workspaces, IPython and temp folders, serving a temp copy of ``notebooks/`` and
  ``scenarios/``. Ready when ``GET /api/status`` answers 200. Teardown deletes the kernels
  through ``/api/kernels`` and sends SIGTERM to the server by its PID.
- ``browser`` (session): Playwright (sync API) launching ``/usr/bin/chromium`` headless with a
  fresh profile.
- ``page`` (function): a new browser context and page.

Helpers
-------
- :func:`open_and_run` opens a notebook with ``?reset``, waits until its kernel is connected
  and idle, runs all cells from the Run menu, waits until every code cell of the notebook's
  model has an execution count and the kernel is not busy (the model, through
  ``window.jupyterapp``: JupyterLab renders only the cells near the view, so the DOM cannot
  say), and asserts that no cell has an error or stderr output; on a timeout it says which
  cells have no count.
- :func:`screenshot` saves a PNG into ``artifacts/`` at the repo root.
- :class:`Dom` (fixture ``dom``): reading and waiting on the page's DOM: an element's text,
  a chart's trace paths, waits until they change, a dropdown choice by its label, the time
  of one change, and the latency summary the tests write to ``artifacts/``.

Browser tests carry ``@pytest.mark.browser`` and are skipped, with the reason, when
``/usr/bin/chromium`` is missing. See ``/work/shared/JUPYTER-NOTES.md`` for why each step is
there (the readiness trap above all).
"""

from __future__ import annotations

import json
import os
import secrets
import shutil
import signal
import socket
import statistics
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
CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                 "--no-first-run", "--disable-background-networking",
                 "--disable-component-update", "--disable-sync"]
NO_CHROMIUM = f"{CHROMIUM} is missing (install it with: apt-get install -y chromium)"

__all__ = ["Lab", "Dom", "open_and_run", "screenshot", "write_notebook",
           "kernel_idle_and_connected"]


def pytest_collection_modifyitems(config, items):
    if CHROMIUM.exists():
        return
    skip = pytest.mark.skip(reason=NO_CHROMIUM)
    for item in items:
        if "browser" in item.keywords:
            item.add_marker(skip)


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@dataclass
class Lab:
    """A running JupyterLab server."""

    url: str
    token: str
    root: Path
    proc: subprocess.Popen
    log: Path

    def api(self, path: str, method: str = "GET"):
        """JSON from the server's REST API (token in the header)."""
        req = urllib.request.Request(f"{self.url}{path}", method=method,
                                     headers={"Authorization": f"token {self.token}"})
        with urllib.request.urlopen(req, timeout=10) as r:
            body = r.read()
        return json.loads(body) if body else None

    def notebook_url(self, relpath: str) -> str:
        return f"{self.url}/lab/tree/{relpath}?reset&token={self.token}"


def _write_settings(settings_dir: Path) -> None:
    target = settings_dir / "@jupyterlab" / "apputils-extension"
    target.mkdir(parents=True, exist_ok=True)
    (target / "notification.jupyterlab-settings").write_text(
        json.dumps({"fetchNews": "false", "checkForUpdates": False}), encoding="utf-8")


@pytest.fixture(scope="session")
def lab(tmp_path_factory):
    """A JupyterLab server on 127.0.0.1 serving a temp copy of notebooks/ and scenarios/."""
    if not CHROMIUM.exists():
        pytest.skip(NO_CHROMIUM)
    base = tmp_path_factory.mktemp("jupyterlab")
    root = base / "root"
    root.mkdir()
    for name in ("notebooks", "scenarios"):
        src = ROOT / name
        if src.is_dir():
            shutil.copytree(src, root / name, ignore=shutil.ignore_patterns(".ipynb_checkpoints"))
        else:
            (root / name).mkdir()
    env = dict(os.environ)
    dirs = {"JUPYTER_CONFIG_DIR": "config", "JUPYTER_DATA_DIR": "data",
            "JUPYTER_RUNTIME_DIR": "runtime", "JUPYTERLAB_SETTINGS_DIR": "settings",
            "JUPYTERLAB_WORKSPACES_DIR": "workspaces", "IPYTHONDIR": "ipython", "TMPDIR": "tmp"}
    for var, sub in dirs.items():
        d = base / sub
        d.mkdir()
        env[var] = str(d)
    _write_settings(base / "settings")
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT), env.get("PYTHONPATH")) if p)
    env.pop("JUPYTER_TOKEN", None)
    token = secrets.token_hex(24)
    port = _free_port()
    cmd = [sys.executable, "-m", "jupyterlab", "--no-browser", "--ServerApp.ip=127.0.0.1",
           f"--ServerApp.port={port}", "--ServerApp.port_retries=0",
           f"--IdentityProvider.token={token}", f"--ServerApp.root_dir={root}",
           "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
           # window.jupyterapp: the notebook's model (every cell's execution count and
           # outputs, whether or not JupyterLab has rendered the cell) for open_and_run
           "--LabApp.expose_app_in_browser=True"]
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        cmd.append("--allow-root")
    log = base / "jupyterlab.log"
    with open(log, "wb") as fh:
        proc = subprocess.Popen(cmd, env=env, stdout=fh, stderr=subprocess.STDOUT, cwd=root)
    server = Lab(f"http://127.0.0.1:{port}", token, root, proc, log)
    t0 = time.monotonic()
    while True:
        if proc.poll() is not None:
            pytest.fail(f"JupyterLab exited with {proc.returncode}:\n{log.read_text()[-3000:]}")
        try:
            server.api("/api/status")
            break
        except (urllib.error.URLError, ConnectionError, TimeoutError):
            if time.monotonic() - t0 > 60:
                proc.send_signal(signal.SIGTERM)
                pytest.fail(f"JupyterLab not ready after 60 s:\n{log.read_text()[-3000:]}")
            time.sleep(0.1)
    server.start_seconds = time.monotonic() - t0
    yield server
    try:
        for k in server.api("/api/kernels") or []:
            server.api(f"/api/kernels/{k['id']}", method="DELETE")
    except (urllib.error.URLError, ConnectionError, TimeoutError):
        pass
    proc.send_signal(signal.SIGTERM)
    try:
        proc.wait(timeout=20)
    except subprocess.TimeoutExpired:
        proc.kill()
        proc.wait(timeout=10)


@pytest.fixture(scope="session")
def browser(tmp_path_factory, playwright_driver):
    """Headless Chromium (/usr/bin/chromium) through Playwright's sync API, fresh profile."""
    if not CHROMIUM.exists():
        pytest.skip(NO_CHROMIUM)
    profile = tmp_path_factory.mktemp("chromium-profile")
    context = playwright_driver.chromium.launch_persistent_context(
        str(profile), executable_path=str(CHROMIUM), headless=True, args=CHROMIUM_ARGS,
        viewport={"width": 1400, "height": 1000})
    yield context
    context.close()


@pytest.fixture
def page(browser):
    """A new page in the fresh-profile browser; closed after the test."""
    pg = browser.new_page()
    pg.set_default_timeout(60_000)
    yield pg
    pg.close()


def write_notebook(lab: Lab, relpath: str, sources: list[str]) -> Path:
    """Write a notebook of code cells (kernel ``python3``) into the server's root."""
    import nbformat

    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3",
                                 "language": "python"}
    nb.cells = [nbformat.v4.new_code_cell(s) for s in sources]
    path = lab.root / relpath
    path.parent.mkdir(parents=True, exist_ok=True)
    nbformat.write(nb, str(path))
    return path


def kernel_idle_and_connected(lab: Lab, relpath: str) -> bool:
    """True when the notebook's kernel has a websocket connection and is idle.

    The server answers 500 to the kernel list while a kernel is still starting: that is
    "not yet", and the caller polls again."""
    try:
        sessions = lab.api("/api/sessions") or []
        kernels = lab.api("/api/kernels") or []
    except urllib.error.HTTPError as exc:
        if exc.code >= 500:
            return False
        raise
    ids = {s["kernel"]["id"] for s in sessions if s.get("path", "").endswith(relpath)}
    for k in kernels:
        if k["id"] in ids and k.get("connections", 0) > 0 and k.get("execution_state") == "idle":
            return True
    return False


#: The open notebook's code cells from its model (``window.jupyterapp``, exposed by the
#: server's ``expose_app_in_browser``): JupyterLab renders only the cells near the view, so
#: the model, not the DOM, says whether every cell ran and what each one printed. None when
#: the model is not reachable (the DOM prompts are read then).
_MODEL_CELLS = """() => {
  const app = window.jupyterapp;
  const w = app && app.shell && app.shell.currentWidget;
  const cells = w && w.content && w.content.model && w.content.model.cells;
  if (!cells) return null;
  const out = [];
  for (let i = 0; i < cells.length; i++) {
    const c = cells.get(i);
    if (c.type !== 'code') continue;
    const bad = [];
    for (let j = 0; j < c.outputs.length; j++) {
      const o = c.outputs.get(j).toJSON();
      if (o.output_type === 'error') bad.push((o.ename + ': ' + o.evalue).slice(0, 2000));
      if (o.output_type === 'stream' && o.name === 'stderr') bad.push(String(o.text).slice(0, 2000));
    }
    out.push({n: c.executionCount, bad: bad});
  }
  return out;
}"""

_ALL_DONE = """() => {
  const app = window.jupyterapp;
  const w = app && app.shell && app.shell.currentWidget;
  const cells = w && w.content && w.content.model && w.content.model.cells;
  const busy = w && w.sessionContext && w.sessionContext.session &&
    w.sessionContext.session.kernel && w.sessionContext.session.kernel.status === 'busy';
  if (cells) {
    let code = 0;
    for (let i = 0; i < cells.length; i++) {
      const c = cells.get(i);
      if (c.type !== 'code') continue;
      code++;
      if (!c.executionCount) return false;
    }
    return code > 0 && !busy;
  }
  const prompts = [...document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) '
                                              + '.jp-CodeCell .jp-InputArea-prompt')];
  if (prompts.length === 0) return false;
  return prompts.every(p => /\\[\\d+\\]/.test(p.textContent));
}"""

_STARTED = """() => [...document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) '
                                              + '.jp-CodeCell .jp-InputArea-prompt')]
  .some(p => /\\[(\\*|\\d+)\\]/.test(p.textContent))"""

_BAD_OUTPUTS = """() => {
  const panel = '.jp-NotebookPanel:not(.lm-mod-hidden) .jp-OutputArea-output';
  const sel = ['application/vnd.jupyter.stderr', 'application/vnd.jupyter.error']
    .map(m => `${panel}[data-mime-type="${m}"]`).join(', ');
  return [...document.querySelectorAll(sel)].map(e => e.textContent.slice(0, 2000));
}"""


def open_and_run(page, lab: Lab, relpath: str, timeout: float = 180.0) -> dict:
    """Open ``relpath`` (relative to the server root), Run All, wait for every cell, check outputs.

    Returns timings in seconds: ``open`` (page load → kernel connected) and ``run``
    (Run All → last cell finished).
    """
    t0 = time.monotonic()
    page.goto(lab.notebook_url(relpath))
    page.wait_for_selector(".jp-NotebookPanel .jp-Notebook .jp-Cell", timeout=timeout * 1000)
    while not kernel_idle_and_connected(lab, relpath):
        if time.monotonic() - t0 > timeout:
            raise AssertionError(f"kernel for {relpath} never connected and idle")
        page.wait_for_timeout(100)
    t_open = time.monotonic() - t0
    t1 = time.monotonic()
    page.locator(".lm-MenuBar-itemLabel", has_text="Run").first.click()
    page.locator("li.lm-Menu-item[data-command='runmenu:run-all']").click()
    page.wait_for_function(_STARTED, timeout=30_000)
    try:
        page.wait_for_function(_ALL_DONE, timeout=timeout * 1000, polling=100)
    except Exception as exc:     # say which cells have no count and what they printed
        cells = page.evaluate(_MODEL_CELLS)
        todo = [i for i, c in enumerate(cells or []) if not c["n"]]
        raise AssertionError(f"{relpath}: Run All not finished in {timeout:.0f} s; code cells "
                             f"with no execution count (0-based): {todo}; errors: "
                             f"{[c['bad'] for c in cells or [] if c['bad']]}") from exc
    t_run = time.monotonic() - t1
    cells = page.evaluate(_MODEL_CELLS)
    assert cells is not None, "the notebook's model is not reachable (expose_app_in_browser)"
    bad = [b for c in cells for b in c["bad"]] + page.evaluate(_BAD_OUTPUTS)
    assert not bad, f"{relpath}: stderr or error output:\n" + "\n---\n".join(bad)
    return {"open": t_open, "run": t_run}


def screenshot(page, name: str) -> Path:
    """Save a full-page PNG as ``artifacts/<name>.png`` (repo root) and return its path."""
    ARTIFACTS.mkdir(exist_ok=True)
    path = ARTIFACTS / f"{name}.png"
    page.screenshot(path=str(path), full_page=True)
    return path


class Dom:
    """Reading and waiting on the DOM of a page (every method takes the Playwright page)."""

    #: Every trace path of the charts under a selector, joined: changes when a drawn line does.
    PATHS = """(sel) => [...document.querySelectorAll(sel + ' .js-plotly-plot .scatterlayer path.js-line')]
  .map(p => p.getAttribute('d')).join('|')"""
    #: ``[sel, old]`` -> the browser clock once the joined paths differ from ``old``.
    PATHS_CHANGED = """([sel, old]) => {
  const now = [...document.querySelectorAll(sel + ' .js-plotly-plot .scatterlayer path.js-line')]
    .map(p => p.getAttribute('d')).join('|');
  if (now && now !== old) return performance.now();
  return false;
}"""
    #: ``[sel, old]`` -> true once the element's textContent differs from ``old``.
    TEXT_CHANGED = """([sel, old]) => {
  const el = document.querySelector(sel);
  return el && el.textContent !== old;
}"""

    @staticmethod
    def text(page, sel: str) -> str:
        """textContent (JupyterLab skips rendering off-screen cells, so innerText may be '')."""
        return page.evaluate("(sel) => { const e = document.querySelector(sel); "
                             "return e ? e.textContent : ''; }", sel)

    @classmethod
    def paths(cls, page, sel: str) -> str:
        """The joined trace paths of the charts under ``sel``."""
        return page.evaluate(cls.PATHS, sel)

    @staticmethod
    def wait_charts_drawn(page, *sels: str) -> None:
        """Wait until each chart under ``sels`` has its plot and a drawn trace."""
        for sel in sels:
            page.wait_for_selector(f"{sel} .js-plotly-plot .main-svg")
            page.wait_for_selector(f"{sel} .scatterlayer path.js-line")

    @classmethod
    def wait_paths_changed(cls, page, sel: str, old: str, **kw):
        """Wait (each animation frame) until the trace paths under ``sel`` differ from ``old``."""
        return page.wait_for_function(cls.PATHS_CHANGED, arg=[sel, old], polling="raf", **kw)

    @classmethod
    def wait_text_changed(cls, page, sel: str, old: str):
        """Wait (each animation frame) until the text of ``sel`` differs from ``old``."""
        return page.wait_for_function(cls.TEXT_CHANGED, arg=[sel, old], polling="raf")

    @staticmethod
    def select_by_label(select, label_start: str) -> None:
        """Choose the first option of the ``select`` locator whose label starts so
        (non-breaking spaces read as spaces)."""
        labels = select.evaluate(
            "(s) => [...s.options].map(o => o.textContent.replace(/\\u00a0/g, ' '))")
        select.select_option(index=[i for i, lbl in enumerate(labels)
                                    if lbl.startswith(label_start)][0])

    @staticmethod
    def timed_change(page, act, changed: str, arg) -> float:
        """Milliseconds on the browser clock from just before ``act()`` to the animation frame
        in which the function ``changed`` (given ``arg``) returns the clock."""
        t0 = page.evaluate("performance.now()")
        act()
        t1 = page.wait_for_function(changed, arg=arg, polling="raf", timeout=30_000).json_value()
        return t1 - t0

    #: Arms a one-shot listener on the element ``sel``: the ``timeStamp`` of its next Enter
    #: keydown (when the browser received the key) goes to ``window.__hlKeyT``.
    ARM_ENTER = """(sel) => {
  window.__hlKeyT = null;
  document.querySelector(sel).addEventListener('keydown', (e) => {
    if (e.key === 'Enter') window.__hlKeyT = e.timeStamp;
  }, {once: true, capture: true});
}"""

    @classmethod
    def timed_enter(cls, page, sel: str, changed: str, arg) -> tuple[float, float]:
        """Press Enter in the input ``sel`` and wait for ``changed`` (given ``arg``, polled
        each animation frame) to return the browser clock. Returns milliseconds
        ``(from the key event, from the driver's call)``: the first is the page's own
        latency, from the moment the browser received the key (``KeyboardEvent.timeStamp``)
        to the frame with the change; the second adds the test driver's time to deliver
        the key (Playwright's protocol round trips, 10-40 ms here)."""
        page.evaluate(cls.ARM_ENTER, sel)
        t0 = page.evaluate("performance.now()")
        page.locator(sel).first.press("Enter")
        t1 = page.wait_for_function(changed, arg=arg, polling="raf", timeout=30_000).json_value()
        t_key = page.evaluate("window.__hlKeyT")
        assert t_key is not None and t0 <= t_key <= t1, (t0, t_key, t1)
        return t1 - t_key, t1 - t0

    @staticmethod
    def latency_summary(samples, **extra) -> dict:
        """Median, min, max and the samples [ms], rounded to 0.1 ms, then ``extra``."""
        return {"median_ms": round(statistics.median(samples), 1),
                "min_ms": round(min(samples), 1), "max_ms": round(max(samples), 1),
                "samples_ms": [round(s, 1) for s in samples], **extra}


@pytest.fixture
def dom() -> type[Dom]:
    """:class:`Dom`: text, trace paths, waits and timings on a page's DOM."""
    return Dom


@pytest.fixture(name="open_and_run")
def open_and_run_fixture(lab):
    """``open_and_run(page, notebook_relpath) -> timings``, bound to the session's server."""
    def run(page, relpath: str, timeout: float = 180.0) -> dict:
        return open_and_run(page, lab, relpath, timeout)
    return run


@pytest.fixture(name="screenshot")
def screenshot_fixture():
    """``screenshot(page, name) -> Path`` into ``artifacts/``."""
    return screenshot


@pytest.fixture(name="write_notebook")
def write_notebook_fixture(lab):
    """``write_notebook(relpath, sources) -> Path`` into the server's temp root."""
    def write(relpath: str, sources: list[str]) -> Path:
        return write_notebook(lab, relpath, sources)
    return write


@pytest.fixture
def artifacts() -> Path:
    """The ``artifacts/`` folder at the repo root (created)."""
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS

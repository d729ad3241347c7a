"""App mode: ``headline app [--port P]`` serves the notebooks as standalone pages with Voilà.

Each notebook in the notebooks folder (:func:`kit.runner.notebooks_dir`: ``notebooks/`` beside
the kit, or ``$HEADLINE_NOTEBOOKS``) becomes a page with its inputs, charts, findings and record
button and no code cells, at ``http://127.0.0.1:P/voila/render/<name>.ipynb``. The server
listens on 127.0.0.1 only (this machine). Each page runs its notebook in a kernel of its own
when it is opened; records are written into ``records/`` beside the notebooks and can be opened
at ``http://127.0.0.1:P/voila/files/records/<stem>.html``.

Needs Voilà (``pip install "voila>=0.5.13"``, or the kit's ``app`` extra). Stop with Ctrl-C.

Example
-------
>>> page_urls(["line_sizing.ipynb"], 8866)
['http://127.0.0.1:8866/voila/render/line_sizing.ipynb']
"""

from __future__ import annotations

import importlib.util
import signal
import socket
import subprocess
import sys
from pathlib import Path

__all__ = ["HOST", "DEFAULT_PORT", "VOILA_REQUIREMENT", "notebook_pages", "page_urls",
           "voila_command", "app_main"]

#: Where the app listens: this machine only.
HOST = "127.0.0.1"
#: Default port (Voilà's own default).
DEFAULT_PORT = 8866
#: The dependency line for the app mode.
VOILA_REQUIREMENT = "voila>=0.5.13"
#: Files besides notebooks the app may serve: records and images.
FILE_ALLOWLIST = [r".*\.(png|jpg|gif|svg)", r"records/.*\.(html|json)"]


def notebook_pages(folder: Path) -> list[str]:
    """The notebooks of ``folder`` served as pages (sorted file names; checkpoints left out)."""
    return sorted(p.name for p in Path(folder).glob("*.ipynb") if not p.name.startswith("."))


def page_urls(names, port: int, host: str = HOST) -> list[str]:
    """The page address of each notebook name."""
    return [f"http://{host}:{port}/voila/render/{n}" for n in names]


def voila_command(folder: Path, port: int, *, open_browser: bool = False) -> list[str]:
    """The command that serves ``folder`` with Voilà on :data:`HOST` at ``port``: code cells
    stripped, no tracebacks shown on the page, records and images downloadable."""
    cmd = [sys.executable, "-m", "voila", str(folder), f"--Voila.ip={HOST}", f"--port={port}",
           "--Voila.port_retries=0", "--VoilaConfiguration.strip_sources=True",
           "--VoilaConfiguration.show_tracebacks=False"]
    cmd += [f"--VoilaConfiguration.file_allowlist={x}" for x in FILE_ALLOWLIST]
    if not open_browser:
        cmd.append("--no-browser")
    return cmd


def _port_free(port: int) -> bool:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        try:
            s.bind((HOST, port))
        except OSError:
            return False
    return True


def app_main(argv=None) -> int:
    """``headline app [--port P] [--browser]``; serves until stopped; returns the exit code.

    Refusals (Voilà missing, port in use or out of range, no notebooks) raise
    :class:`kit.cli.CliError`, printed as one line with exit code 2.
    """
    from kit.cli import CliError, Parser
    from kit.runner import notebooks_dir

    ap = Parser(prog="headline app",
                description="Serve the notebooks as app pages (inputs, charts, findings, record "
                            "button; no code) with Voilà on 127.0.0.1.")
    ap.add_argument("--port", type=int, default=DEFAULT_PORT, help=f"port (default {DEFAULT_PORT})")
    ap.add_argument("--browser", action="store_true", help="open the first page in a browser")
    a = ap.parse_args(argv)
    if not 1024 <= a.port <= 65535:
        raise CliError("app --port", f"must be between 1024 and 65535, not {a.port}")
    if importlib.util.find_spec("voila") is None:
        raise CliError("app", f"Voilà is not installed; install it with: pip install "
                       f"\"{VOILA_REQUIREMENT}\"")
    folder = notebooks_dir()
    names = notebook_pages(folder) if folder.is_dir() else []
    if not names:
        raise CliError("app", f"no notebooks in {folder} (set HEADLINE_NOTEBOOKS to the "
                       "notebooks folder)")
    if not _port_free(a.port):
        raise CliError(f"app --port {a.port}", "is in use on 127.0.0.1; pass another --port")
    print(f"Serving {len(names)} app page(s) from {folder} on this machine only:")
    for url in page_urls(names, a.port):
        print(f"  {url}")
    print(f"Records are written into {folder / 'records'}. Stop with Ctrl-C.", flush=True)
    proc = subprocess.Popen(voila_command(folder, a.port, open_browser=a.browser), cwd=folder)

    def _stop(signum, frame):  # SIGTERM to this process stops the server too
        raise KeyboardInterrupt

    previous = signal.signal(signal.SIGTERM, _stop)
    try:
        return proc.wait()
    except KeyboardInterrupt:
        proc.terminate()
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()
        return 0
    finally:
        signal.signal(signal.SIGTERM, previous)

"""Re-execute the committed notebooks and strip their widget state: ``python -m kit refresh``.

nbval compares the committed outputs with a fresh run, so after a change that alters a
result the notebooks are refreshed with this command and committed. Widget state
(``metadata.widgets``, ~5 MB per figure) is removed; cell outputs stay.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

__all__ = ["refresh", "strip_widget_state", "refresh_main"]

ROOT = Path(__file__).resolve().parent.parent


def strip_widget_state(nb) -> None:
    """Remove saved widget state and per-run metadata from a notebook, in place."""
    nb.metadata.pop("widgets", None)
    for cell in nb.cells:
        cell.metadata.pop("execution", None)


def refresh(path: Path, timeout: float = 600.0) -> float:
    """Execute one notebook in place (kernel python3, run from its folder); return seconds."""
    import time

    import nbformat
    from nbclient import NotebookClient

    nb = nbformat.read(path, as_version=4)
    t0 = time.perf_counter()
    NotebookClient(nb, kernel_name="python3", timeout=timeout, record_timing=False,
                   resources={"metadata": {"path": str(path.parent)}}).execute()
    strip_widget_state(nb)
    nbformat.write(nb, path)
    return time.perf_counter() - t0


def refresh_main(argv=None) -> int:
    ap = argparse.ArgumentParser(prog="python -m kit refresh", description=__doc__.splitlines()[0])
    ap.add_argument("notebooks", nargs="*", help="notebooks (default: all in notebooks/)")
    a = ap.parse_args(argv)
    paths = [Path(p) for p in a.notebooks] or sorted((ROOT / "notebooks").glob("*.ipynb"))
    for p in paths:
        print(f"refreshing {p.name} ...", file=sys.stderr, flush=True)
        print(f"  done in {refresh(p):.1f} s", file=sys.stderr)
    return 0

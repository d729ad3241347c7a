"""Benchmarks of the checker's record: `kit run` per demo scenario, and `kit check`.

`kit check` is timed in-process (the target excludes interpreter start) both warm and with
the one-time imports (CoolProp, scipy, fluids) in a fresh process, beside the naive check:
a fresh `kit run` of the notebook and a by-eye comparison of its printed summary.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _seconds(cmd) -> float:
    t0 = time.perf_counter()
    subprocess.run(cmd, cwd=ROOT, check=True, capture_output=True, text=True)
    return time.perf_counter() - t0


def run(report, timeit, repeat):
    from kit.record.check import check_record

    with tempfile.TemporaryDirectory() as tmp:
        for sc in sorted((ROOT / "scenarios").glob("*.toml")):
            out = Path(tmp) / sc.stem
            t_run = _seconds([sys.executable, "-m", "kit", "run", str(sc), "--out", str(out),
                              "--quiet"])
            rec = out / f"{sc.stem}.json"
            code = ("import time, sys; t = time.perf_counter(); "
                    "from kit.record.check import check_record; "
                    f"check_record({str(rec)!r}); print(time.perf_counter() - t)")
            cold = float(subprocess.run([sys.executable, "-c", code], cwd=ROOT, check=True,
                                        capture_output=True, text=True).stdout.split()[-1])
            check_record(rec)  # warm the caches and imports in this process
            warm = timeit(lambda rec=rec: check_record(rec), max(3, repeat // 2), number=1)
            report(f"kit check {sc.stem}: warm / cold (with imports)", warm, "≤ 2 s", cold,
                   "naive column: the same check in a fresh process, imports included")
            report(f"kit run {sc.stem} (kernel start, notebook, exports)", t_run, None)

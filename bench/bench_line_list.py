"""Line-list benchmarks: a 100,000-row list read strictly and sized, and the quadratic cost of
reporting a big list through a scenario.

Run on its own: ``.venv/bin/python bench/bench_line_list.py [--quick]``; or from
``bench/run.py`` through :func:`run`. Each figure beside a naive approach measured in the same
run on a smaller list and scaled linearly to the big one:

- the kit: :func:`kit.inputs.line_list.read_line_list` (strict columns and values, cached unit
  conversions) and :func:`kit.studies.line_list.size_batch` (rows of a pipe family over all
  its bores in one numpy pass);
- naive: the row-by-row approach (``csv.DictReader`` and, per row, the liquid state, the
  family's bores and :func:`kit.core.sizing.batch_friction`), as
  ``kit.studies.line_sizing.size_batch`` does it, when that module is present; and a
  row-by-row loop calling :func:`kit.units.parse` for every cell.
- through a scenario: ``kit.scenario.loads`` of a scenario carrying the list inline (linear),
  and ``kit.results.Results.add`` for one reported value per row (what the line-sizing
  results do per sized row) at 2.5k, 5k and 10k rows: its time per row grows with the row
  count, which makes a big list quadratic through a scenario.
"""

from __future__ import annotations

import argparse
import csv
import io
import random
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DUTIES = ("pump_suction", "pump_discharge", "gravity_drain", "general_transfer")
BIG = 100_000


def line_list_text(n: int, seed: int = 7, bad_every: int = 50) -> str:
    """CSV text of an invented line list of ``n`` rows (1 in ``bad_every`` with a bad flow)."""
    rnd = random.Random(seed)
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(("tag", "flow", "liquid", "temperature", "length", "rise", "duty", "standard",
                "schedule", "material", "condition", "k_total"))
    for i in range(n):
        L = rnd.uniform(10, 2000)
        flow = "lots" if bad_every and i % bad_every == 7 else f"{rnd.uniform(5, 2500):.4g} gpm"
        w.writerow((f"B-{i:06d}", flow, rnd.choice(["scenario", "water"]),
                    f"{rnd.uniform(40, 90):.3g} degF", f"{L:.1f} ft",
                    f"{rnd.uniform(-0.2, 0.2) * L:.1f} ft", rnd.choice(DUTIES), "asme_b36_10m",
                    rnd.choice(["40", "80"]), "carbon_steel", rnd.choice(["new", "aged"]),
                    f"{rnd.uniform(0, 20):.2f}"))
    return buf.getvalue()


def naive_parse_every_cell(text: str) -> list:
    """Row by row: csv.DictReader and kit.units.parse for every quantity cell."""
    from kit import units

    out = []
    for row in csv.DictReader(io.StringIO(text)):
        try:
            out.append((units.parse(row["flow"], "flow", "flow"),
                        units.parse(row["length"], "length", "length"),
                        units.parse(row["rise"], "length", "rise"),
                        units.parse(row["temperature"], "temperature", "temperature")))
        except Exception as exc:  # noqa: BLE001 - naive: any error marks the row
            out.append(str(exc))
    return out


def _cpu(fn) -> float:
    """Processor seconds of one call (less disturbed than wall time on a shared machine)."""
    c = time.process_time()
    fn()
    return time.process_time() - c


def run(report, timeit, repeat):
    from kit import scenario as scn
    from kit.inputs.line_list import read_line_list
    from kit.studies.line_list import size_batch

    sc = scn.load(ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml")
    p_baro = 101325.0
    try:
        from kit.inputs.common import build_liquid
        liquid = build_liquid(sc.doc)
    except (ImportError, AttributeError):  # the reader moves during the rewrite
        liquid = scn.build_liquid(sc.doc)

    big = line_list_text(BIG)
    small_n = 5_000
    small = line_list_text(small_n)
    size_batch(read_line_list(small), liquid, p_baro)  # warm: property libraries loaded

    def kit_big():
        return size_batch(read_line_list(big), liquid, p_baro)

    reps = max(3, repeat // 2)
    t_read = timeit(lambda: read_line_list(big), reps, number=1)
    ll = read_line_list(big)
    t_size = timeit(lambda: size_batch(ll, liquid, p_baro), reps, number=1)
    t_kit = timeit(kit_big, reps, number=1)
    cpu = min(_cpu(kit_big) for _ in range(reps))
    out = kit_big()
    counts = {v: sum(1 for b in out if b.verdict == v) for v in ("pass", "check", "fail",
                                                                 "error")}
    t_rows = _cpu(lambda: read_line_list(big).rows)
    scale = BIG / small_n
    naive, agree = None, ""
    try:
        from kit.studies import line_sizing as ls
        if hasattr(ls, "read_line_list") and hasattr(ls, "size_batch"):
            naive = timeit(lambda: ls.size_batch(ls.read_line_list(small), liquid, p_baro), 1,
                           number=1) * scale
            old = ls.size_batch(ls.read_line_list(small), liquid, p_baro)
            new = size_batch(read_line_list(small), liquid, p_baro)
            same = sum(a.tag == b.tag and a.size == b.size and a.verdict == b.verdict
                       for a, b in zip(old, new, strict=True))
            agree = f"; {same:,}/{small_n:,} rows agree with it on size and verdict"
    except ImportError:
        pass
    report(f"line list: {BIG:,} rows read strictly", t_read, None, None,
           "kit.inputs.line_list, column by column")
    report(f"line list: {BIG:,} rows sized", t_size, None, None,
           "kit.studies.line_list, a numpy pass per pipe family")
    report(f"line list: {BIG:,} rows read + sized", t_kit, "≤ 2 s", naive,
           f"processor time {cpu:.2f} s; naive: the row-by-row size_batch on {small_n:,} "
           f"rows ×{scale:g}{agree}; " + ", ".join(f"{k} {v}" for k, v in counts.items()))
    report(f"line list: {BIG:,} rows read, then all as LineRow objects", t_rows, None, None,
           "processor time; the sizing reads the columns and never builds them")
    parse_small = 1_000
    parse_text = line_list_text(parse_small)
    t_naive_parse = timeit(lambda: naive_parse_every_cell(parse_text), 1,
                           number=1) * (BIG / parse_small)
    report(f"line list: {BIG:,} rows read", t_read, None, t_naive_parse,
           f"naive: csv.DictReader + units.parse of the 4 quantity cells only (no structure, "
           f"key or range checks) on {parse_small:,} rows ×{BIG / parse_small:g}")

    base = (ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml").read_text(
        encoding="utf-8").replace('file = "harlow_flats_line_list.csv"', "text = '''\n@@'''")
    for n in (10_000, 25_000):
        text = base.replace("@@", line_list_text(n))
        t = timeit(lambda text=text: scn.loads(text), 1, number=1)
        report(f"scenario: loads with a {n:,}-row inline [batch] text", t, None, None,
               f"{len(text) / 1e6:.1f} MB; linear in the text")

    from kit.results import Results

    for n in (2_500, 5_000, 10_000):
        def add_all(n=n):
            r = Results("line_sizing")
            for i in range(n):
                r.add(f"batch.B-{i:06d}.bore", "bore", 0.1, "diameter")
        t = timeit(add_all, 1, number=1)
        report(f"Results.add, one value per row, {n:,} rows", t, None, None,
               f"{t / n * 1e6:.1f} µs per row, growing with n: a linear key scan per add")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true")
    a = ap.parse_args(argv)
    sys.path.insert(0, str(ROOT))
    sys.path.insert(0, str(Path(__file__).resolve().parent))
    from run import report, timeit

    t0 = time.perf_counter()
    run(report, timeit, 3 if a.quick else 7)
    print(f"({time.perf_counter() - t0:.1f} s in all)")


if __name__ == "__main__":
    main()

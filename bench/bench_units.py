"""Unit text benchmarks: :func:`kit.units.parse` on 1,000 varied cells of a line list.

Beside a naive approach measured in the same run: pint reading each whole text
(``ureg.Quantity(text).m_as(si_unit)``, gauge handled by hand), which is what a parser without a
per-unit cache pays on every cell. The kit checks the text's shape, its unit (cached per unit
text and kind) and its range, then multiplies.

Run alone: ``.venv/bin/python bench/bench_units.py``.
"""

from __future__ import annotations

import random

CELLS = (
    ("{:.4g} gpm", "flow", "m**3/s"), ("{:.4g} m3/h", "flow", "m**3/s"),
    ("{:.4g} ft", "length", "m"), ("{:.4g} in", "diameter", "m"),
    ("{:.3g} degF", "temperature", "K"), ("{:.4g} kPa(g)", "pressure", "Pa"),
    ("{:.4g} psi/100 ft", "pressure_per_length", "Pa/m"), ("{:.3g} cP", "viscosity", "Pa*s"),
)


def cells(n: int = 1000, seed: int = 5) -> list[tuple[str, str, str]]:
    """``n`` invented (text, kind, SI unit) cells."""
    rnd = random.Random(seed)
    out = []
    for _ in range(n):
        pattern, kind, si = rnd.choice(CELLS)
        out.append((pattern.format(rnd.uniform(1.0, 500.0)), kind, si))
    return out


def naive(rows, p_baro=101325.0):
    """pint reads every text whole (no cache, no shape checks)."""
    from kit.units import ureg

    total = 0.0
    for text, kind, si in rows:
        gauge = text.endswith("(g)")
        t = text[:-3] if gauge else text
        if "/100 ft" in t:
            t = t.replace("/100 ft", "/ft")
            x = ureg.Quantity(t).m_as(si) / 100.0
        elif kind == "temperature":
            number, unit = t.split()
            x = ureg.Quantity(float(number), unit).m_as(si)
        else:
            x = ureg.Quantity(t.replace("m3", "m**3")).m_as(si)
        total += x + (p_baro if gauge else 0.0)
    return total


def kit(rows, p_baro=101325.0):
    from kit.units import parse

    total = 0.0
    for text, kind, _si in rows:
        total += parse(text, kind, "cell", p_baro)
    return total


def run(report, timeit, repeat):
    rows = cells(1000)
    a, b = kit(rows), naive(rows)
    agree = abs(a - b) <= 1e-9 * abs(b)
    report("units: parse 1,000 varied cells (8 kinds)", timeit(lambda: kit(rows), repeat),
           "≤ 10 ms", timeit(lambda: naive(rows), max(3, repeat // 2), number=1),
           f"naive: pint reads each text whole; sums agree: {agree}")


if __name__ == "__main__":
    import sys
    from pathlib import Path

    sys.path.insert(0, str(Path(__file__).resolve().parent))
    from run import report, timeit  # noqa: E402 — the shared bench helpers

    run(report, timeit, 5)

"""Benchmark: the network notebook's edit path — the quick redraw of the design solution on
the schematic against the full study it runs after (the naive path: the full study on every
edit), and the schematic of a 1,000-link grid (layout and figure JSON).

Run through ``bench/run.py``.
"""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def run(report, timeit, repeat):
    from bench_network import grid_network

    from kit import scenario as scn
    from kit.inputs.network import inputs
    from kit.panels.network_app import design_solution
    from kit.panels.network_schematic import (
        layered_positions,
        schematic_figure,
        stress_positions,
    )
    from kit.studies.network import study

    sc = scn.load(ROOT / "scenarios" / "fenwick_yard_chilled_water.toml")
    inp = inputs(sc)
    net, res = design_solution(inp)

    def quick():
        n, r = design_solution(inp)
        return schematic_figure(n, r)

    quick()
    study(sc)
    report("network app: edit -> design solution + schematic (chilled water)",
           timeit(quick, repeat), "≤ 100 ms", timeit(lambda: study(sc), 3, number=1),
           "naive: the full study (band, valves, network curve) before any redraw")
    grid = grid_network(22, 23)
    gres = grid.solve()
    n_links = len(grid.links)
    report(f"schematic: {n_links:,}-link grid, layered layout",
           timeit(lambda: layered_positions(grid), 3, number=1), None)
    pos = layered_positions(grid)
    report(f"schematic: {n_links:,}-link grid, figure JSON",
           timeit(lambda: schematic_figure(grid, gres, positions=pos), 3, number=1), None)
    report("schematic: chilled water (41 links), stress layout",
           timeit(lambda: stress_positions(net), repeat), None)

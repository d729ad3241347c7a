"""Network benchmarks: looped grids solved by the gradient method, and a network curve.

Run standalone (``.venv/bin/python bench/bench_network.py [--quick]``) or through
``bench/run.py`` (imported by name, ``run(report, timeit, repeat)``).

- A 1,000-link and a 10,000-link looped grid of pipes fed from tanks at two corners: the
  kit's solve (sparse matrix, SuperLU) beside the same iteration with a dense
  ``numpy.linalg.solve`` in the same run (for 10,000 links, ~5,000 unknowns, one dense
  iteration is timed and multiplied by the iteration count: the full dense solve takes about
  a minute). Targets ≤ 50 ms and ≤ 1 s.
- The network curve of 200 flows for a 50-link branched network (the tree method: flows
  proportional to the load, heads affine in the pump head) beside the naive way (one full
  solve and a brentq search on the discharge head per flow). Target ≤ 100 ms.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent


def _water():
    from kit.core.liquids import make_liquid

    return make_liquid("water").state(293.15)


def grid_network(nx: int, ny: int, state=None, spacing: float = 50.0):
    """A looped grid of nx × ny junctions fed from two tanks at opposite corners (invented).

    Pipes are one of three bores at random; every junction draws the same demand (0.12 m³/s
    in all); elevations undulate by a few metres.
    """
    from kit.core.line import Segment
    from kit.core.network_model import Boundary, Network, Node, PipeLink
    from kit.core.pipes import custom_pipe

    state = state or _water()
    pipes = [custom_pipe(d, "ductile_iron_lined") for d in (0.1, 0.15, 0.2)]
    rng = np.random.default_rng(7)
    nodes, links = [], []
    name = lambda i, j: f"J{i}_{j}"  # noqa: E731
    z = {}
    for i in range(nx):
        for j in range(ny):
            z[(i, j)] = 2.0 * np.sin(i / 5.0) + 1.5 * np.cos(j / 7.0)
            nodes.append(Node(name(i, j), float(z[(i, j)]), demand=0.12 / (nx * ny)))
    segs = {}
    for i in range(nx):
        for j in range(ny):
            for di, dj in ((1, 0), (0, 1)):
                a, b = (i, j), (i + di, j + dj)
                if b[0] >= nx or b[1] >= ny:
                    continue
                k = len(links)
                p = pipes[int(rng.integers(0, 3))]
                key = (id(p), spacing)
                seg = segs.setdefault(key, Segment(f"s{k}", p, spacing))
                links.append(PipeLink(f"P{k}", name(*a), name(*b), seg))
    tanks = [Boundary("T_north", 45.0, 48.0), Boundary("T_south", 42.0, 46.0)]
    big = custom_pipe(0.4, "carbon_steel")
    links.append(PipeLink("F_north", "T_north", name(0, 0), Segment("f1", big, 200.0)))
    links.append(PipeLink("F_south", "T_south", name(nx - 1, ny - 1), Segment("f2", big, 200.0)))
    return Network(f"grid {nx}x{ny}", nodes, tanks, links, state)


def branched_network(n_links: int = 50, state=None):
    """A pumped branched network of ``n_links`` links (invented): a tank, a pump, a main with
    laterals, each lateral ending at a demand node with a minimum residual pressure."""
    from kit.core.fittings import Fitting
    from kit.core.line import Segment
    from kit.core.network_model import Boundary, Network, Node, PipeLink, PumpLink
    from kit.core.pipes import custom_pipe
    from kit.core.pump import PumpCurve

    state = state or _water()
    pump = PumpCurve([0.0, 0.02, 0.04, 0.06], [60.0, 57.0, 49.0, 36.0], speed_rpm=2900.0,
                     diameter=0.25, name="BP-1")
    main, lat = custom_pipe(0.2, "carbon_steel"), custom_pipe(0.08, "carbon_steel")
    nodes = [Node("S", 0.0), Node("D", 0.0)]
    links = [PipeLink("suction", "sump", "S", Segment("suction", main, 10.0,
                                                      fittings=(Fitting("fixed_k", 1,
                                                                        {"K": 0.5}),))),
             PumpLink("pump", "S", "D", pump)]
    prev = "D"
    n_main = (n_links - 2) // 2
    for i in range(n_main):
        m = f"M{i}"
        nodes.append(Node(m, 0.5 * i))
        links.append(PipeLink(f"main{i}", prev, m, Segment(f"main{i}", main, 40.0)))
        e = f"E{i}"
        nodes.append(Node(e, 0.5 * i + 3.0, demand=0.0008 + 0.0001 * (i % 5),
                          min_pressure=101325.0 + 1.5e5))
        links.append(PipeLink(f"lat{i}", m, e, Segment(f"lat{i}", lat, 30.0 + 5 * (i % 4),
                                                       fittings=(Fitting("bend", 2, {
                                                           "angle": 90.0, "R_D": 1.5}),))))
        prev = m
    return Network("branched", nodes, [Boundary("sump", 1.0, 2.5)], links, state)


def run(report, timeit, repeat):
    import time

    from kit.core.network_curve import network_curve
    from kit.errors import NoSolutionError

    def one_dense_iteration(n):
        try:
            n.solve(dense=True, max_iter=1)
        except NoSolutionError:  # one Newton step is not converged, as expected
            pass

    for nx, ny, target in ((23, 23, "≤ 50 ms"), (71, 71, "≤ 1 s")):
        net = grid_network(nx, ny)
        res = net.solve()
        if nx < 50:
            dense = net.solve(dense=True)
            diff = float(np.max(np.abs(res.Q - dense.Q)) / np.max(np.abs(res.Q)))
            t_dense = timeit(lambda n=net: n.solve(dense=True), repeat, number=1)
            note = f"naive: same iteration, dense numpy.linalg.solve; max rel. flow diff {diff:.1e}"
        else:  # a full dense solve takes ~1 min on 2 cores: one iteration × the iterations
            t0 = time.perf_counter()
            one_dense_iteration(net)
            t_dense = (time.perf_counter() - t0) * res.iterations
            note = (f"naive: one dense numpy.linalg.solve iteration timed × {res.iterations} "
                    "iterations")
        report(f"network solve: {len(net.links):,}-link looped grid ({res.iterations} it.)",
               timeit(lambda n=net: n.solve(), repeat, number=1), target, t_dense, note)

    net = branched_network(50)
    Q = np.linspace(0.0, 0.04, 200)
    curve = network_curve(net, Q, pump="pump")
    naive = network_curve(net, Q, pump="pump", method="solve")
    err = float(np.max(np.abs(curve.H - naive.H)))
    report(f"network curve: {len(net.links)}-link branched network, 200 flows",
           timeit(lambda: network_curve(net, Q, pump="pump"), repeat), "≤ 100 ms",
           timeit(lambda: network_curve(net, Q, pump="pump", method="solve"),
                  max(3, repeat // 2), number=1),
           f"naive: one full solve per flow; max diff {err:.1e} m")
    report("network curve band: 200 flows × 2 levels × 2 ages",
           timeit(lambda: network_curve(net, Q, pump="pump", levels=("low", "high"),
                                        conditions=("new", "aged")), repeat), "≤ 100 ms")


if __name__ == "__main__":
    sys.path.insert(0, str(ROOT))
    sys.path.insert(0, str(Path(__file__).resolve().parent))
    from run import report, timeit

    run(report, timeit, 3 if "--quick" in sys.argv else 7)

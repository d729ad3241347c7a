"""Random trees and looped networks (hypothesis): mass is conserved at every node, heads fall
along the flow in every pipe (no pumps), tree flows equal the demand downstream, and
non-return pipes never pass reverse flow nor stay shut against a forward head.

Sources: continuity and the energy equation (definitions); in a tree the flow in each pipe is
the sum of the demands beyond it (continuity alone, computed here by accumulation).
"""

import math
from types import SimpleNamespace as NS

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from kit.core.line import Segment
from kit.core.network import Boundary, Network, Node, PipeLink

WATER20 = NS(rho=998.21, mu=1.0016e-3, pv=2339.0, T=293.15)  # 20 °C, from memory
BORES = (0.0525, 0.0779, 0.1023, 0.1541)


def pipe(Di):
    p = NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=4.5e-5)
    p.with_condition = lambda c: p
    return p


@st.composite
def trees(draw, loops=False):
    n = draw(st.integers(2, 14))
    parents = [draw(st.integers(-1, i - 1)) for i in range(n)]  # −1: the tank
    z = [draw(st.floats(-5.0, 5.0)) for _ in range(n)]
    dem = [draw(st.sampled_from([0.0, 0.0005, 0.001, 0.003, 0.006])) for _ in range(n)]
    spec = []
    for i, p in enumerate(parents):
        spec.append((("T" if p < 0 else f"J{p}"), f"J{i}", draw(st.sampled_from(BORES)),
                     draw(st.floats(20.0, 400.0)), draw(st.booleans())))
    chords = []
    checks = set()
    if loops:
        for _ in range(draw(st.integers(1, 6))):
            a, b = draw(st.integers(0, n - 1)), draw(st.integers(0, n - 1))
            if a != b:
                if draw(st.booleans()):
                    checks.add(n + len(chords))  # a non-return chord
                chords.append((f"J{a}", f"J{b}", draw(st.sampled_from(BORES)),
                               draw(st.floats(20.0, 400.0)), draw(st.booleans())))
    second = loops and draw(st.booleans())
    return n, z, dem, spec + chords, second, frozenset(checks)


def build(case):
    n, z, dem, spec, second, checks = case
    nodes = [Node(f"J{i}", z[i], demand=dem[i]) for i in range(n)]
    links = []
    for k, (a, b, D, L, flip) in enumerate(spec):
        a, b = (b, a) if flip else (a, b)  # drawn direction random: flows may be negative
        links.append(PipeLink(f"L{k}", a, b, Segment(f"L{k}", pipe(D), L), check=k in checks))
    bnds = [Boundary("T", 40.0)]
    if second:
        bnds.append(Boundary("U", 35.0))
        links.append(PipeLink("feedU", "U", f"J{n - 1}", Segment("feedU", pipe(0.1023), 100.0)))
    return Network("random", nodes, bnds, links, WATER20)


def check_common(res):
    assert np.abs(res.continuity_residual).max() < 1e-10  # continuity at every node
    h, q = res.head_loss, res.Q
    moving = np.abs(q) > 1e-12
    assert np.all(np.sign(h[moving]) == np.sign(q[moving]))  # heads fall along the flow
    assert np.abs(res.energy_residual).max() < 1e-8


@settings(max_examples=40, deadline=None)
@given(trees())
def test_random_trees_conserve_mass_and_match_downstream_demand(case):
    net = build(case)
    res = net.solve(physical=False)
    check_common(res)
    n, _, dem, spec, _, _ = case
    beyond = np.array(dem, dtype=float)
    children = {}
    for a, b, *_ in spec:
        children.setdefault(a, []).append(b)
    def total(node):  # noqa: E306 — demand of a node and everything beyond it
        i = int(node[1:])
        return beyond[i] + sum(total(c) for c in children.get(node, []))
    for k, (_a, b, _D, _L, flip) in enumerate(spec):
        expected = total(b) * (-1.0 if flip else 1.0)
        assert abs(res.flow(f"L{k}") - expected) <= 1e-12 * max(1.0, abs(expected))


@settings(max_examples=40, deadline=None)
@given(trees(loops=True))
def test_random_looped_networks_conserve_mass_and_heads_fall(case):
    res = build(case).solve(physical=False)
    check_common(res)
    assert res.iterations < 60
    # non-return chords: never a reverse flow; a closed one has no head driving it forward
    for k in case[-1]:
        assert res.Q[k] >= -1e-12  # closed: zero to round-off
        if not res.is_open[k]:
            assert res.Q[k] == 0.0 and not res.head_loss[k] > 1e-9

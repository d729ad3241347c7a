"""Branched and looped pipe networks: the public surface.

The model lives in :mod:`kit.core.network_model` (nodes, boundaries, links, checks), the
solver in :mod:`kit.core.network_solve` (the gradient method of Todini & Pilati 1988 on the
node–link incidence matrix, scipy.sparse), the network curve, index circuit and balancing in
:mod:`kit.core.network_curve`; control-valve sizing is :mod:`kit.core.valves`.

References
----------
Todini, E., and Pilati, S. (1988). A gradient algorithm for the analysis of pipe networks. In
B. Coulbeck and C.-H. Orr (eds.), Computer Applications in Water Supply, Vol. 1: Systems
Analysis and Simulation, pp. 1–20. Research Studies Press, Letchworth, UK.

Example
-------
>>> from types import SimpleNamespace as NS
>>> from kit.core.line import Segment
>>> pipe = NS(Di=0.1023, area=0.0082196, roughness=4.5e-5, with_condition=lambda c: pipe)
>>> water = NS(rho=998.2, mu=1.002e-3, pv=2339.0, T=293.15)
>>> net = Network("demo", [Node("J1", 0.0, demand=0.01)], [Boundary("T1", 20.0)],
...               [PipeLink("P1", "T1", "J1", Segment("P1", pipe, 100.0))], water)
>>> round(net.solve().flow("P1"), 6)
0.01
"""

from kit.core.network_curve import CURVE_METHODS, Balance, NetworkCurve, balance, network_curve
from kit.core.network_model import (
    CHARACTERISTICS,
    BalancingValveLink,
    Boundary,
    CheckValveLink,
    ControlValveLink,
    EquipmentLink,
    Network,
    Node,
    PipeLink,
    PumpLink,
)
from kit.core.network_solve import (
    FINDING_LIMITS,
    MAX_FLIPS,
    METHOD,
    NetworkResult,
    network_findings,
    solve,
)

__all__ = [
    "Node", "Boundary", "PipeLink", "PumpLink", "CheckValveLink", "ControlValveLink",
    "BalancingValveLink", "EquipmentLink", "Network", "NetworkResult", "solve", "network_findings",
    "network_curve", "NetworkCurve", "balance", "Balance", "CURVE_METHODS", "CHARACTERISTICS",
    "METHOD", "MAX_FLIPS", "FINDING_LIMITS",
]

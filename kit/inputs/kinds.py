"""The root schema of each scenario kind, composed from :mod:`kit.inputs.common` and the
kind's own tables (:mod:`kit.inputs.pump_selection`, :mod:`kit.inputs.line_sizing`,
:mod:`kit.inputs.tank_drainage`, :mod:`kit.inputs.network`).

>>> sorted(ROOTS)
['line_sizing', 'network', 'pump_selection', 'tank_drainage']
"""

from __future__ import annotations

from kit.inputs.line_sizing_schema import ROOT as LINE_SIZING
from kit.inputs.network_schema import ROOT as NETWORK
from kit.inputs.pump_selection_schema import ROOT as PUMP_SELECTION
from kit.inputs.tank_drainage_schema import ROOT as TANK_DRAINAGE

__all__ = ["ROOTS"]

ROOTS = {"line_sizing": LINE_SIZING, "pump_selection": PUMP_SELECTION,
         "tank_drainage": TANK_DRAINAGE, "network": NETWORK}


def checked(sc):
    """A new scenario holding ``sc``'s document, checked against its kind's schema (strict):
    what an app hands back for saving or for the record has passed the same rules as a file.

    >>> from kit.notebook import scenario_path
    >>> from kit import scenario as scn
    >>> checked(scn.load(scenario_path("marlow_vale_cip_dump.toml"))).kind
    'tank_drainage'
    """
    from kit.inputs.common import build_site
    from kit.inputs.schema import check
    from kit.scenario import Scenario

    check(sc.doc, ROOTS[sc.kind], sc.source, build_site(sc.doc))
    return Scenario(sc.doc, sc.source, text=sc.text)

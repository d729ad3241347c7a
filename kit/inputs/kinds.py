"""The root schema of each scenario kind, composed from :mod:`kit.inputs.common` and the
kind's own tables (:mod:`kit.inputs.pump_selection`, :mod:`kit.inputs.line_sizing`,
:mod:`kit.inputs.tank_drainage`).

>>> sorted(ROOTS)
['line_sizing', 'pump_selection', 'tank_drainage']
"""

from __future__ import annotations

from kit.inputs.line_sizing_schema import ROOT as LINE_SIZING
from kit.inputs.pump_selection_schema import ROOT as PUMP_SELECTION
from kit.inputs.tank_drainage_schema import ROOT as TANK_DRAINAGE

__all__ = ["ROOTS"]

ROOTS = {"line_sizing": LINE_SIZING, "pump_selection": PUMP_SELECTION,
         "tank_drainage": TANK_DRAINAGE}

"""The surge screen's down-surge findings: the event named in words, and never an impossible
absolute pressure shown (a liquid column parts at its vapour pressure)."""

from __future__ import annotations

import pytest
from raising import raises_exactly

from kit.core.findings import Severity
from kit.core.surge import TRANSIENT_ANALYSIS_REQUIRED, surge_screen
from kit.errors import InputError


def test_column_separation_shows_the_vapour_pressure_and_the_unbounded_figure_in_words():
    # Joukowsky drop by hand: 1000 x 1200 x 2 = 2.4 MPa; 2e5 - 2.4e6 = -2.2 MPa abs, which no
    # liquid can reach: the column parts at pv (definition of vapour pressure)
    s = surge_screen("line", 1000.0, 1200.0, 900.0, 2.0, 6e5, trip_stations=[("crest", 2e5)],
                     pv=2339.0)
    (f,) = s.findings
    assert f.severity is Severity.CHECK  # a pump trip: the instantaneous stop only bounds it
    assert f.value == pytest.approx(2339.0)
    assert "-2.2e+06 Pa abs" in f.rule and "2.4e+06 Pa" in f.rule
    assert TRANSIENT_ANALYSIS_REQUIRED in f.rule
    assert s.p_min["crest"] == pytest.approx(2e5 - 2.4e6)  # the raw figure stays available
    assert f.quantity == "pump-trip lowest pressure at 'crest' (absolute)"


def test_event_words_name_the_sudden_stop():
    # drop by hand: 1000 x 600 x 0.5 = 0.3 MPa; 3.5e5 - 3e5 = 5e4 Pa abs: below atmospheric
    s = surge_screen("drain line", 1000.0, 600.0, 300.0, 0.5, 4e5,
                     trip_stations=[("crest", 3.5e5)], pv=2339.0,
                     event="outlet valve closure upstream of the crest")
    (f,) = s.findings
    assert f.severity is Severity.CHECK and f.value == pytest.approx(5e4)
    assert f.quantity == ("lowest pressure at 'crest' after the outlet valve closure upstream "
                          "of the crest (absolute)")
    assert f.rule.startswith("outlet valve closure upstream of the crest:")
    assert "pump" not in f.rule


@pytest.mark.parametrize("event", ["", "   ", None, 3])
def test_event_must_be_words(event):
    with raises_exactly(InputError, "surge event"):
        surge_screen("x", 1000.0, 600.0, 300.0, 0.5, 4e5, trip_stations=[("c", 3e5)],
                     pv=2339.0, event=event)

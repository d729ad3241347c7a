"""The pump-selection composite driven from Python: edits reach the study, the chart and tables.

This tests the wiring; the numbers themselves are checked against independent computations in
tests/studies/test_pump_selection.py. One reference here: NPSHa falls as the liquid warms,
by the vapour-pressure head from IAPWS-IF97 via iapws.
"""

import numpy as np
import pytest
from iapws import IAPWS97

from kit import scenario as scn
from kit.notebook import scenario_path
from kit.panels.pump_selection_app import PumpSelectionApp
from kit.studies import pump_selection as ps

g = 9.80665


@pytest.fixture(scope="module")
def scenario():
    return scn.load(scenario_path("kestrel_ridge_booster.toml"))


@pytest.fixture
def app(scenario):
    return PumpSelectionApp(scenario)


def trace(app, suffix):
    return [t for t in app.figure.data if t.name.endswith(suffix)]


def test_builds_with_the_study_of_the_scenario(app, scenario):
    ref = ps.compute(scenario)
    assert [(v.key, v.value) for v in app.results.values] == [(v.key, v.value)
                                                              for v in ref.values]
    ops = trace(app, ": operating points")
    assert len(ops) == 3 and all(len(t.x) == 8 for t in ops)
    assert "KR-A end-suction 1480 rpm" in app.candidates.value
    assert "(recommended)" in app.candidates.value
    assert "variable speed drive" in app.control_table.value
    assert "FAIL" in app.findings.html.value
    assert app.figure.layout.xaxis2.title.text == "flow [m³/h]"


def test_editing_a_point_moves_the_operating_points_and_the_tables(app, scenario):
    op = trace(app, "KR-A end-suction 1480 rpm: operating points")[0]
    x0 = np.array(op.x)
    table0 = app.candidates.value
    app.editor.set_point(3, head="75")
    assert app.message.value == ""
    x1 = np.array(op.x)
    assert np.all(x1 > x0)  # more head at 150 m³/h: every point moves right
    assert app.candidates.value != table0
    assert app.scenario.doc["pumps"][0]["head"][3] == "75 m"
    assert scenario.doc["pumps"][0]["head"][3] == "70 m"  # the original is untouched
    # the record's results are those of the working scenario
    ref = ps.compute(app.scenario)
    assert [(v.key, v.value) for v in app.results.values] == [(v.key, v.value)
                                                              for v in ref.values]


def test_bad_point_keeps_last_results_and_says_so(app):
    before = [v.value for v in app.results.values]
    app.editor.rows[2].head.value = "-1"
    assert "input refused" in app.message.value
    assert [v.value for v in app.results.values] == before
    app.editor.rows[2].head.value = "78"
    assert app.message.value == ""


def test_warmer_liquid_lowers_npsh_available(app):
    """NPSHa falls by the vapour-pressure head Δp_v/(ρg) (IAPWS-IF97 via iapws), ± the change
    in density and suction loss (< 0.1 m here)."""
    crosses = trace(app, "KR-A end-suction 1480 rpm: NPSHa at operating points")[0]
    y0 = min(crosses.y)
    app.t_max.set_text("60 degC")
    assert app.message.value == ""
    y1 = min(crosses.y)
    p_baro = app.study.system.p_baro
    w28, w60 = IAPWS97(T=301.15, P=p_baro / 1e6), IAPWS97(T=333.15, P=p_baro / 1e6)
    drop = ((p_baro - IAPWS97(T=301.15, x=0).P * 1e6) / (w28.rho * g)
            - (p_baro - IAPWS97(T=333.15, x=0).P * 1e6) / (w60.rho * g))
    assert y0 - y1 == pytest.approx(drop, abs=0.1)
    assert app.scenario.doc["liquid"]["temperature_max"] == "60 degC"
    assert any("60 °C" in row["condition"] for row in app.study.point_rows())


def test_refused_temperature_shows_the_kit_message(app):
    before = [v.value for v in app.results.values]
    app.t_max.set_text("150 degC")
    assert "saturation temperature" in app.message.value
    assert [v.value for v in app.results.values] == before
    app.t_max.set_text("hot")
    assert "not a temperature" in app.message.value
    assert app.t_max.text == "hot"
    app.t_max.set_text("28 degC")
    assert app.message.value == ""


def test_choosing_another_candidate_loads_it_in_the_editor(app):
    app.choice.value = 2
    assert app.editor.name.value == "KR-C end-suction 1480 rpm, 365 mm"
    assert app.editor.rows[-1].flow.value == "300"
    app.editor.set_point(5, head="62")
    assert app.scenario.doc["pumps"][2]["head"][5] == "62 m"
    assert app.scenario.doc["pumps"][0]["head"][3] == "70 m"


def test_us_display_and_static_figure(app):
    app.switch.value = "US"
    assert app.figure.layout.xaxis2.title.text == "flow [gpm]"
    assert "[gpm]" in app.candidates.value and "[ft]" in app.points_table.value
    figs = app.static_figures()
    assert type(figs[0]).__name__ == "Figure" and len(figs[0].data) == len(app.figure.data)
    assert "[pump_selection]" in app.summary_text()


def test_docstring_examples():
    import doctest

    import kit.panels.pump_selection_app as mod

    result = doctest.testmod(mod, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0

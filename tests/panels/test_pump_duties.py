"""The pump set, staging, load profile and line-pressure panels driven from Python.

This tests the wiring (an edit reaches the scenario, the study and the tables; a refusal is
shown beside the table and keeps the last results); the numbers are checked against
independent computations in tests/studies/test_pump_duties.py. One reference here: the
energy of one load-profile step scales with its hours (E = P t, by hand).
"""

import numpy as np
import pytest

from kit import scenario as scn
from kit.notebook import SCENARIOS
from kit.panels.load_profile import LoadProfileEditor
from kit.panels.pump_duties import PumpDutiesView, staging_figure
from kit.panels.pump_profiles import profile_figure, profile_series
from kit.panels.pump_selection_app import PumpSelectionApp
from kit.results import compute
from kit.studies import pump_selection as ps


@pytest.fixture(scope="module")
def duty_scenario():
    return scn.load(SCENARIOS / "wrenfield_duty_standby.toml")


@pytest.fixture
def app(duty_scenario):
    return PumpSelectionApp(duty_scenario)


# ------------------------------------------------------------------ the load-profile editor
def test_editor_rows_texts_and_bare_numbers():
    ed = LoadProfileEditor(["60 m3/h", "120 m3/h"], ["2000 h", "3000 h"])
    assert ed.valid and ed.total_hours() == pytest.approx(5000.0)
    ed.rows[0][0].input.value = "75"                 # a bare number takes m³/h
    assert ed.value[0] == ("75 m3/h", "2000 h")
    ed.add_row("150 m3/h", "500 h")
    assert len(ed.value) == 3 and ed.value[2] == ("150 m3/h", "500 h")
    ed.remove_row(0)
    assert [r[0] for r in ed.value] == ["120 m3/h", "150 m3/h"]


def test_editor_keeps_bad_text_and_the_last_good_value():
    ed = LoadProfileEditor(["60 m3/h"], ["2000 h"])
    ed.rows[0][1].input.value = "2000 kg"
    assert not ed.valid and ed.value == (("60 m3/h", "2000 h"),)
    assert ed.rows[0][1].input.value == "2000 kg" and ed.rows[0][1].error
    ed.add_row()                                     # an empty step waits for its text
    assert len(ed.rows) == 2 and ed.value == (("60 m3/h", "2000 h"),)


def test_editor_keeps_one_step_and_us_units():
    ed = LoadProfileEditor(["60 m3/h"], ["2000 h"], system="US")
    ed.remove_row(0)
    assert len(ed.rows) == 1 and "at least one step" in ed.message.value
    ed.add_row("300", "100")
    assert ed.value[1] == ("300 gpm", "100 h")


# ------------------------------------------------------------------ the app
def test_app_shows_the_set_staging_and_energy(app, duty_scenario):
    ref = compute(duty_scenario)
    assert [(v.key, v.value) for v in app.results.values] == [(v.key, v.value)
                                                              for v in ref.values]
    assert "2 duty + 1 standby" in app.duties.composition.value
    assert "every running pump on a drive" in app.duties.energy.value
    assert "stage up at" in app.duties.steps.value
    assert "Recirculation orifice" in app.duties.checks.value
    names = [t["name"] for t in app.duties.plot.data]
    assert "stage up" in names and any("2 running at 100% speed" in n for n in names)
    assert len(app.load_profile.rows) == 4


def test_editing_hours_moves_the_energy_table_and_the_scenario(app):
    d0 = app.study.duties
    e0 = d0.energy.row("all_vfd")
    html0 = app.duties.energy.value
    step0 = float(e0.energy_kWh[0])
    app.load_profile.rows[0][1].input.value = "3200 h"    # 2600 h -> 3200 h
    assert app.scenario.doc["load_profile"]["hours"][0] == "3200 h"
    e1 = app.study.duties.energy.row("all_vfd")
    # E = P t for the same step at the same power: scales with the hours (by hand)
    assert float(e1.energy_kWh[0]) == pytest.approx(step0 * 3200 / 2600, rel=1e-12)
    assert e1.total_kWh == pytest.approx(e0.total_kWh + step0 * 600 / 2600, rel=1e-12)
    assert app.duties.energy.value != html0
    assert app.to_scenario().doc["load_profile"]["hours"][0] == "3200 h"


def test_a_refused_profile_is_shown_beside_the_table_and_keeps_the_results(app):
    before = app.study
    app.load_profile.rows[1][0].input.value = "60 m3/h"   # repeats step 1's flow
    assert app.study is before
    assert "must not repeat a flow" in app.load_profile.message.value
    assert "hl-field-error" in app.load_profile._dom_classes
    assert "hl-stale" in app.duties._dom_classes
    app.load_profile.rows[1][0].input.value = "130 m3/h"  # fixed: accepted, marks cleared
    assert app.study is not before and app.load_profile.message.value == ""
    assert app.scenario.doc["load_profile"]["flow"][1] == "130 m3/h"


def test_static_figures_carry_the_profile_and_the_staging(app):
    figs = app.static_figures()
    titles = [f.layout.title.text for f in figs]
    assert len(figs) == 3
    assert "pressure along the suction and discharge lines" in titles[1]
    assert "staging" in titles[2]
    app.set_system("US")
    assert "gpm" in app.duties.steps.value
    assert app.profile_plot.data and "psi" in str(app.profile_plot.figure_layout)


def test_kestrel_has_a_profile_and_says_it_has_no_set():
    app = PumpSelectionApp(scn.load(SCENARIOS / "kestrel_ridge_booster.toml"))
    assert "gives no pump set" in app.duties.composition.value
    assert len(app.static_figures()) == 2
    marks = [t for t in app.profile_plot.data if t["name"].startswith("below atmospheric")]
    assert marks and len(marks[0]["x"]) > 0   # the ridge crest goes below atmospheric


# ------------------------------------------------------------------ figures on their own
def test_profile_series_joins_suction_then_discharge(duty_scenario):
    s = ps.study(duty_scenario)
    b = s.profiles[0]
    ser = profile_series(b)
    n_s = len(b.suction.stations)
    assert np.isnan(ser["x"][n_s])                  # the gap at the pump
    L_s = b.suction.stations[-1].x
    assert ser["x"][n_s + 1] == pytest.approx(L_s)  # discharge distances start after it
    assert ser["x"][-1] == pytest.approx(L_s + b.discharge.stations[-1].x)
    fig = profile_figure(s)
    assert any(t.name == "atmospheric (0 gauge)" for t in fig.data)
    assert any(t.name.startswith("vapour pressure") for t in fig.data)


def test_staging_figure_without_a_study_says_why():
    fig = staging_figure(None)
    assert "no staging study" in fig.layout.annotations[0].text
    v = PumpDutiesView(None)
    assert "gives no pump set" in v.composition.value and v.energy.value == ""


def test_viscous_demo_shows_water_against_corrected_curves():
    app = PumpSelectionApp(scn.load(SCENARIOS / "corran_moss_fuel_oil.toml"))
    d = app.study.duties
    assert app.duties.viscous_chart.layout.display is None
    names = [t.get("name", "") for t in app.duties.viscous_plot.data]
    assert any(n.endswith(": water") for n in names) and any("cSt" in n for n in names)
    # the corrected curve drawn is the study's, below the water curve at the water BEP flow
    (vc,), (w,) = d.viscous, d.viscous_water
    q = w.bep[0]
    assert float(vc.curve.head(q)) < float(w.head(q))
    assert "B = " in app.duties.checks.value and "C_η" in app.duties.checks.value
    assert len(app.static_figures()) == 3   # pump chart, line profile, viscosity correction
    assert "viscosity" in app.static_figures()[2].layout.title.text


UNLIKE_TEXT = """
schema = "headline-scenario/1"
kind = "pump_selection"
title = "test: unlike units"

[liquid]
key = "water"
temperature = "20 degC"

[source]
level = "0 m"

[destination]
level_low = "20 m"
level_high = "36 m"

[discharge]
name = "main"

[[discharge.segments]]
name = "main"
length = "600 m"
rise = "20 m"
pipe = { bore = "150 mm", roughness = "0.045 mm", material = "carbon_steel" }

[[pumps]]
name = "A"
speed = "1450 rpm"
impeller = "250 mm"
flow = ["0 L/s", "10 L/s", "20 L/s", "25 L/s"]
head = ["40 m", "38 m", "32 m", "27.5 m"]

[[pumps]]
name = "B"
speed = "1450 rpm"
impeller = "220 mm"
flow = ["0 L/s", "10 L/s", "20 L/s"]
head = ["34 m", "31 m", "22 m"]

[pump_set]
units = ["A", "B"]
duty_count = 2
unlike = true
"""


def test_unlike_set_figure_marks_the_closed_unit():
    app = PumpSelectionApp(scn.loads(UNLIKE_TEXT, "<test>"))
    figs = app.static_figures()
    assert "unlike units" in figs[-1].layout.title.text
    members = next(t for t in figs[-1].data if t.name.startswith("each unit"))
    # at the 36 m static head B (shut-off 34 m) is held shut: a red × at zero flow
    shut = [i for i, t in enumerate(members.text) if "check valve closed" in t]
    assert shut and all(members.x[i] == 0.0 for i in shut)
    assert all(members.marker.symbol[i] == "x" for i in shut)
    assert "unlike units" in app.duties.composition.value

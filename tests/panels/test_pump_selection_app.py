"""The pump-selection composite driven from Python: edits reach the study, the chart and tables.

This tests the wiring; the numbers themselves are checked against independent computations in
tests/studies/test_pump_selection.py. One reference here: NPSHa falls as the liquid warms,
by the vapour-pressure head from IAPWS-IF97 via iapws.
"""

import html

import numpy as np
import pytest
from iapws import IAPWS97
from sameresults import assert_same_results

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
    # app.figure is a static copy of the chart as shown: read it again after the edit
    x1 = np.array(trace(app, "KR-A end-suction 1480 rpm: operating points")[0].x)
    assert np.all(x1 > x0)  # more head at 150 m³/h: every point moves right
    assert np.array_equal(np.array(op.x), x0)  # the copy taken before is not changed
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
    assert "refused" in app.message.value and "hl-stale" in app.plot._dom_classes
    assert "must be at least 0 m" in app.editor.message.value
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
    y1 = min(trace(app, "KR-A end-suction 1480 rpm: NPSHa at operating points")[0].y)
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
    # beside the highest-temperature field, in °C (not K), the charts and tables stale
    shown = html.unescape(app.t_max.message.value)
    assert "'highest liquid temperature' must be below the saturation temperature" in shown
    assert "not 150 °C" in shown and " K" not in shown
    assert "hl-field-error" in app.t_max._dom_classes and app.t_min.message.value == ""
    assert all("hl-stale" in w._dom_classes for w in (app.plot, app.candidates,
                                                        app.points_table, app.findings))
    assert "results are for the last accepted inputs" in app.message.value
    assert [v.value for v in app.results.values] == before
    app.t_max.set_text("hot")
    assert "must be a number with a unit of temperature" in app.t_max.message.value
    assert app.t_max.text == "hot"
    app.t_max.set_text("28 degC")
    assert app.message.value == "" and app.t_max.message.value == ""
    assert not any("hl-stale" in w._dom_classes for w in (app.plot, app.candidates))


def test_refused_temperature_in_us_units_says_degf(app):
    app.set_system("US")
    app.t_min.set_text("-40 degF")            # below the triple point of water
    shown = html.unescape(app.t_min.message.value)
    assert "'lowest liquid temperature' must be at or above the triple point 32.02 °F" in shown
    assert "not -40 °F" in shown and " K " not in shown


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


# ------------------------------------------------------------------ saving the state

def test_unedited_round_trip_gives_the_same_document_and_results(app, scenario):
    from kit.results import compute

    out = app.to_scenario()
    assert out is not app.scenario  # a copy: saving does not tie the file to the app
    back = scn.loads(scn.dumps(out))
    assert back.doc == scenario.doc
    assert_same_results(compute(back), compute(scenario))


def test_edited_head_point_is_saved_and_moves_the_operating_flow(app, scenario):
    from kit.results import compute

    app.editor.set_point(3, head="74")  # 150 m3/h: 70 m -> 74 m on the first pump
    back = scn.loads(scn.dumps(app.to_scenario()))
    assert back.doc["pumps"][0]["head"][3] == "74 m"
    assert back.doc["pumps"][0]["head"][:3] == scenario.doc["pumps"][0]["head"][:3]
    assert back.doc["pumps"][1] == scenario.doc["pumps"][1]
    r0, r1 = compute(scenario), compute(back)
    # a higher pump curve meets the same rising system curve at a higher flow (common
    # practice, no source: the operating point is where the curves cross)
    assert r1.value("pumps[0].Q_min") > r0.value("pumps[0].Q_min")
    assert r1.value("pumps[0].Q_max") > r0.value("pumps[0].Q_max")
    assert_same_results(r1, app.results)  # the record is what the app shows


def test_edited_temperature_is_saved_as_typed(app):
    app.t_max.input.value = "35 degC"
    back = scn.loads(scn.dumps(app.to_scenario()))
    assert back.doc["liquid"]["temperature_max"] == "35 degC"
    assert back.doc["liquid"]["temperature_min"] == "4 degC"


def test_invalid_temperature_raises_the_kit_error(app):
    from kit.errors import InputError

    app.t_max.input.value = "35 kg"
    with pytest.raises(InputError, match="highest liquid temperature"):
        app.to_scenario()


def test_save_button_writes_refuses_silent_overwrite_and_reports_errors(app, tmp_path):
    row = app.save_row
    assert row.path.value.endswith("kestrel_ridge_booster_edited.toml")
    assert "hl-save" in row._dom_classes and "hl-save-button" in row.button._dom_classes
    target = tmp_path / "booster.toml"
    target.write_text("# a file already there\n", encoding="utf-8")
    row.path.value = str(target)
    app.editor.set_point(3, head="74")
    row.button.click()
    assert "press again to overwrite" in row.message.value
    assert target.read_text(encoding="utf-8") == "# a file already there\n"
    row.button.click()
    assert "saved to" in row.message.value
    assert scn.load(target).doc["pumps"][0]["head"][3] == "74 m"
    row.path.value = str(tmp_path)
    row.button.click()
    assert "hl-error-text" in row.message.value
    row.path.value = str(tmp_path / "missing_folder" / "x.toml")
    row.button.click()
    assert "cannot save" in row.message.value


def test_system_inputs_write_back_and_move_the_results(app, scenario):
    """Issue 12: the pump notebook edits the required flow, the ends, the lines (pipe picker,
    fittings, lengths, elevations), running hours, tariff and currency; each edit is written
    at its key of the working scenario (as typed) and the study re-runs."""
    si = app.system_inputs
    field = {si.keys[f]: f for f in si.fields}
    assert set(field) >= {"duty.flow", "source.level_low", "destination.level_high",
                          "destination.pressure", "suction.segments.0.length",
                          "discharge.segments.1.rise", "discharge.start_elevation",
                          "operation.hours_per_year", "operation.tariff"}
    field["duty.flow"].set_text("160 m3/h")
    assert app.scenario.doc["duty"]["flow"] == "160 m3/h" and app.message.value == ""
    assert app.study.required_flow == pytest.approx(160 / 3600)    # the study reads it
    assert scenario.doc["duty"]["flow"] == "140 m3/h"               # the original untouched
    ref = ps.compute(app.scenario)
    assert [(v.key, v.value) for v in app.results.values] == [(v.key, v.value)
                                                              for v in ref.values]
    # a longer rising main: more friction, so every candidate delivers less
    q0 = {r["pump"]: r["Q_max"] for r in app.study.candidate_rows()}
    field["discharge.segments.1.length"].set_text("1200 m")
    assert app.scenario.doc["discharge"]["segments"][1]["length"] == "1200 m"
    q1 = {r["pump"]: r["Q_max"] for r in app.study.candidate_rows()}
    assert all(q1[n] < q0[n] for n in q0)
    # the pipe picker of a segment writes its pipe table
    si.pipes["discharge.segments.1.pipe"].nominal.value = "10"
    assert app.scenario.doc["discharge"]["segments"][1]["pipe"]["nominal"] == "10"
    # a fitting row added blank is left out; the document keeps its three rows
    si.fittings["discharge.segments.0.fittings"].add.click()
    assert len(app.scenario.doc["discharge"]["segments"][0]["fittings"]) == 3
    assert app.message.value == ""
    # operation: hours, tariff and currency reach the energy cost
    si.currency.value = "CHF"
    field["operation.tariff"].set_text("0.2")
    assert app.scenario.doc["operation"] == {**scenario.doc["operation"], "currency": "CHF",
                                             "tariff": 0.2}
    assert "CHF" in app.candidates.value and app.study.tariff == pytest.approx(0.2)
    saved = scn.loads(scn.dumps(app.to_scenario()))
    assert saved.doc["duty"]["flow"] == "160 m3/h"


def test_a_refused_system_input_is_marked_at_its_field(app):
    si = app.system_inputs
    field = {si.keys[f]: f for f in si.fields}
    before = [v.value for v in app.results.values]
    high = field["destination.level_high"]
    high.set_text("150 m")                 # below the lowest level, 153 m
    shown = html.unescape(high.message.value)
    assert "'destination level, highest'" in shown and "not 150 m" in shown
    assert "hl-field-error" in high._dom_classes and "hl-stale" in app.plot._dom_classes
    assert [v.value for v in app.results.values] == before
    assert app.scenario.doc["destination"]["level_high"] == "156.5 m"
    high.set_text("157 m")
    assert high.message.value == "" and app.message.value == ""
    assert app.scenario.doc["destination"]["level_high"] == "157 m"


# ------------------------------------------------------------------ the study cache and the chart's data
def test_going_back_to_a_datasheet_point_takes_the_study_from_the_cache(app, scenario):
    """The study is a pure function of the scenario document and the pumps: a value tried
    before is not computed again, and what is shown equals a fresh study of the same inputs."""
    from widgetspy import sent_messages

    n0 = app.recomputes
    app.editor.set_point(3, head="75")
    assert app.recomputes == n0 + 1
    shown_75 = app.plot.data
    app.editor.set_point(3, head="70")          # the scenario's own value: cached at build
    assert app.recomputes == n0 + 1
    with sent_messages() as sent:
        app.editor.set_point(3, head="75")
    assert app.recomputes == n0 + 1 and app.plot.data == shown_75
    assert any(w is app.plot for w, _ in sent)  # the chart still follows the edit
    fresh = ps.study(app.scenario, pumps=app.pumps)
    assert_same_results(app.results, ps.results_of(app.scenario, fresh))
    # a different value is computed, and the cache stays bounded
    for k in range(20):
        app.editor.set_point(3, head=f"{71 + 0.2 * k:g}")
    assert app.recomputes == n0 + 21
    assert len(app._cache) == 16


def test_study_key_tells_pumps_and_documents_apart(scenario):
    from kit.inputs import pump_selection as pi
    from kit.panels.pump_selection_app import _study_key

    pumps = list(pi.read(scenario).pumps)
    k0 = _study_key(scenario, pumps)
    assert k0 == _study_key(scenario.copy(), list(pi.read(scenario).pumps))
    other = pi.with_pump(scenario, 0, {**scenario.doc["pumps"][0],
                                       "head": [*scenario.doc["pumps"][0]["head"][:3], "72 m",
                                                *scenario.doc["pumps"][0]["head"][4:]]})
    assert _study_key(other, pumps) != k0                       # the document differs
    assert _study_key(scenario, list(pi.read(other).pumps)) != k0   # a pump differs
    assert _study_key(scenario, [object()]) is None             # unknown kind: not cached


def test_the_chart_is_sent_packed_and_the_static_figure_has_the_same_numbers(app):
    """Float arrays go to the browser as plotly.js typed arrays (base64 float64); the static
    figure decodes them to the same numbers."""
    from kit.panels.pump_profiles import unpacked

    band = app.plot.data[0]
    assert set(band["x"]) == {"dtype", "bdata"}
    x = unpacked(band["x"])
    assert x[-1] == pytest.approx(app.study.band.Q[-1] * 3600.0, rel=1e-12)   # m³/h
    assert list(app.figure.data[0].x) == list(x)


@pytest.fixture
def kernel(monkeypatch):
    """The app as in a kernel: an edit's study is finished from the (stand-in) loop."""
    from fakeloop import FakeLoop

    import kit.panels.pump_selection_app as mod

    loop = FakeLoop()
    monkeypatch.setattr(mod, "kernel_loop", lambda: loop)
    return loop


def _chart(app):
    return [dict(t) for t in app.plot.data]


def test_in_a_kernel_an_edit_draws_the_chart_first_and_the_study_follows(app, scenario,
                                                                          kernel):
    """The chart drawn from the preview is the chart of the finished study; until the loop
    runs the study, the tables are the last ones and the study is pending; reading
    ``app.study`` finishes it (a notebook cell never sees a half-done study)."""
    table0, status0 = app.candidates.value, app.status.value
    chart0 = json_of(app.plot.data)
    app.editor.set_point(3, head="75")
    assert app.pending and len(kernel.waiting) == 1
    chart_quick = json_of(app.plot.data)
    assert chart_quick != chart0                       # the chart moved at once
    assert app.candidates.value == table0 and app.status.value == status0
    kernel.run()
    assert not app.pending
    assert json_of(app.plot.data) == chart_quick       # the finished study draws the same
    assert app.candidates.value != table0
    # the same edit made on a fresh app outside a kernel gives the same results
    ref = PumpSelectionApp(scenario)
    ref_recomputes = ref.recomputes
    import kit.panels.pump_selection_app as mod
    mod_loop = mod.kernel_loop
    mod.kernel_loop = lambda: None
    try:
        ref.editor.set_point(3, head="75")
    finally:
        mod.kernel_loop = mod_loop
    assert ref.recomputes == ref_recomputes + 1
    assert_same_results(app.results, ref.results)
    assert json_of(ref.plot.data) == chart_quick


def json_of(data):
    import json

    return json.dumps(data, sort_keys=True, default=repr)


def test_reading_the_study_finishes_a_pending_edit(app, kernel):
    app.editor.set_point(3, head="74")
    assert app.pending
    rec = app.study.recommended                       # finishes it
    assert not app.pending and kernel.waiting == [] and rec
    assert "74" in json_of(app.scenario.doc["pumps"][0]["head"])


def test_a_newer_edit_replaces_the_one_waiting(app, kernel):
    app.editor.set_point(3, head="74")
    app.editor.set_point(3, head="73")
    assert len(kernel.waiting) == 1
    kernel.run()
    assert "73" in json_of(app.scenario.doc["pumps"][0]["head"])
    assert app.recomputes == 2                        # the first and the last edit only


def test_a_value_seen_before_needs_no_deferred_study(app, kernel):
    app.editor.set_point(3, head="74")
    kernel.run()
    app.editor.set_point(3, head="70")                # the scenario's own value
    assert not app.pending and kernel.waiting == []


def test_a_study_refused_after_the_preview_puts_the_last_inputs_back(app, kernel,
                                                                     monkeypatch):
    """A refusal found only by the full study (after the chart was drawn from the preview)
    marks the results stale and restores the last accepted inputs and chart."""
    from kit.errors import InputError

    chart0 = json_of(app.plot.data)
    head0 = json_of(app.scenario.doc["pumps"][0]["head"])
    app.editor.set_point(3, head="74")
    assert json_of(app.plot.data) != chart0

    def refuse(*a, **k):
        raise InputError("test field", 1.0, "must be refused here")

    monkeypatch.setattr(ps, "study", refuse)
    kernel.run()
    assert "must be refused here" in app.message.value
    assert json_of(app.plot.data) == chart0
    assert json_of(app.scenario.doc["pumps"][0]["head"]) == head0


def test_saving_finishes_a_pending_edit_first(app, kernel, monkeypatch):
    """The save row writes what the study accepted: a pending edit is finished first, and
    one its study refuses is not saved."""
    from kit.errors import InputError

    head0 = json_of(app.scenario.doc["pumps"][0]["head"])
    app.editor.set_point(3, head="74")
    assert app.pending

    def refuse(*a, **k):
        raise InputError("test field", 1.0, "must be refused here")

    monkeypatch.setattr(ps, "study", refuse)
    saved = app.to_scenario()
    assert not app.pending
    assert json_of(saved.doc["pumps"][0]["head"]) == head0

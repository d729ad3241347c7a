"""LineSizingApp driven from Python (no browser): change inputs, read back the table, the
chart data, the findings and the batch table.

Reference checks: velocity Q/A (definition) in the chart; the duty values shown are those of
kit.core.criteria (common practice, no source); unit conversions gpm and ft by NIST SP 811.
"""

from __future__ import annotations

import html
import math
from pathlib import Path

import numpy as np
import pytest
from sameresults import assert_same_results

from kit import scenario as scn
from kit.core.criteria import DUTY_CLASSES
from kit.panels.line_sizing_app import CRITERIA_NOTE, LineSizingApp

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml"
GPM = 3.785411784e-3 / 60.0  # NIST SP 811


@pytest.fixture(scope="module")
def sc():
    return scn.load(DEMO)


@pytest.fixture
def app(sc):
    return LineSizingApp.from_scenario(sc)


def trace(chart, name):
    for t in chart.to_figure().data:
        if t.name == name:
            return t
    raise KeyError(name)


def v_trace(app, name):
    """A trace of the velocity panel (axes x, y) of the bore chart."""
    return _panel_trace(app, name, "x")


def dp_trace(app, name):
    """A trace of the pressure-drop panel (axes x2, y2) of the bore chart."""
    return _panel_trace(app, name, "x2")


def _panel_trace(app, name, xaxis):
    for t in app.bore_chart.to_figure().data:
        if t.name == name and (t.xaxis or "x") == xaxis:
            return t
    raise KeyError(name)


def test_starts_from_the_scenario(app):
    assert app.flow_design.text == "350 gpm" or app.flow_design.value == pytest.approx(350 * GPM)
    assert app.study.recommended.pipe.nominal == "5"
    assert app.size.value == "5"                                   # profile default
    assert "◀ recommended" in app.table.html.value
    assert "Recommended:" in app.reason.value and "NPS 5" in app.reason.value
    assert CRITERIA_NOTE in app.criteria_note.value
    assert "[gpm]" not in app.table.html.value and "[ft/s]" in app.table.html.value  # US shown
    assert app.findings.value == app.study.recommended.findings
    assert app.study.inputs.duty.source.startswith("user-set in [criteria]")  # not "edited"


def test_design_flow_change_updates_table_and_chart(app):
    html_before = app.table.html.value
    y_before = np.array(v_trace(app, "at design flow").y)
    app.flow_design.set_text("400 gpm")
    assert app.message.value == ""
    assert app.table.html.value != html_before
    y = np.array(v_trace(app, "at design flow").y)        # ft/s on the US display
    assert not np.allclose(y, y_before)
    bores = np.array([c.pipe.Di for c in app.study.result.candidates])
    V = 400 * GPM / (math.pi / 4 * bores ** 2)                   # Q/A (definition)
    assert y == pytest.approx(V / 0.3048, rel=1e-9)
    assert app.study.inputs.Q_design == pytest.approx(400 * GPM)


def test_pipe_standard_change_refills_schedules_and_recomputes(app):
    before = app.table.html.value
    app.standard.value = "astm_d1785"
    assert [k for _, k in app.schedule.options] == ["40", "80", "120"]
    assert app.study.inputs.standard == "astm_d1785"
    assert "ASTM D1785" in app.study.result.candidates[0].pipe.label
    assert app.table.html.value != before
    # the material follows the standard: a PVC standard offers PVC only (common practice,
    # no source), and the roughness follows the material
    assert [k for _, k in app.material.options] == ["pvc"] and app.material.value == "pvc"
    assert app.study.result.candidates[0].pipe.material == "pvc"
    app.standard.value = "asme_b36_19m"
    assert [k for _, k in app.material.options] == ["stainless_steel"]
    assert app.study.result.candidates[0].pipe.material == "stainless_steel"


def test_duty_change_fills_its_criteria_and_changes_verdicts_and_bands(app):
    band_before = list(v_trace(app, "velocity range (criteria)").y)
    verdicts_before = [c.verdict for c in app.study.result.candidates]
    app.duty.value = "gravity_drain"
    d = DUTY_CLASSES["gravity_drain"]                           # common practice, no source
    assert app.v_min.value == pytest.approx(d.v_min)
    assert app.v_max.value == pytest.approx(d.v_max)
    assert app.dp_max.value == pytest.approx(d.dp_max)
    assert app.study.inputs.duty.key == "gravity_drain"
    assert [c.verdict for c in app.study.result.candidates] != verdicts_before
    assert list(v_trace(app, "velocity range (criteria)").y) != band_before
    # an edited criterion is used and labelled as edited
    app.v_max.set_text("1 ft/s")
    assert app.study.inputs.duty.v_max == pytest.approx(0.3048)
    assert "edited" in app.study.inputs.duty.source


def test_bad_text_keeps_the_text_shows_a_message_and_keeps_results(app):
    before = app.table.html.value
    n = app.recomputes
    app.flow_design.set_text("350 kg")
    assert app.flow_design.text == "350 kg"
    assert "needs a volumetric flow" in app.flow_design.error
    # the message beside the field (red), the results marked stale under a banner
    assert "needs a volumetric flow" in app.flow_design.message.value
    assert "hl-error-text" in app.flow_design.message.value
    assert "hl-field-error" in app.flow_design._dom_classes
    assert "results are for the last accepted inputs" in app.message.value
    assert all("hl-stale" in w._dom_classes for w in (app.table, app.bore_chart,
                                                        app.profile_chart, app.findings))
    assert app.table.html.value == before and app.recomputes == n
    app.flow_design.set_text("360 gpm")
    assert app.message.value == "" and app.table.html.value != before
    assert not any("hl-stale" in w._dom_classes for w in (app.table, app.bore_chart))
    assert "hl-field-error" not in app.flow_design._dom_classes


def test_a_refused_route_shows_the_kit_message_at_the_point(app):
    chainage = app.points[0].chainage
    chainage.set_text("9000 ft")                   # beyond the route length
    assert "chainage of &#x27;pipe bridge&#x27;" in chainage.message.value  # escaped HTML
    assert "hl-field-error" in chainage._dom_classes
    assert "hl-stale" in app.bore_chart._dom_classes
    chainage.set_text("610 ft")
    assert app.message.value == "" and chainage.message.value == ""


def test_design_flow_above_the_maximum_is_refused_at_the_design_flow(app):
    """Issue 12: refused at the design-flow field (the maximum is not blamed), in gpm; the
    next good edit clears the message and the stale marks."""
    t0 = app.table.html.value
    app.flow_design.set_text("500 gpm")            # the maximum is 420 gpm
    fd, fmax = app.flow_design, app.flow_max
    assert html.unescape(fd.message.value).count("'design flow' must be at most the maximum "
                                                 "flow 420 gpm, not 500 gpm") == 1
    assert "hl-field-error" in fd._dom_classes and fd.echo.value == ""
    assert fmax.message.value == "" and "hl-field-error" not in fmax._dom_classes
    assert "'design flow' is refused" in html.unescape(app.message.value)
    assert "hl-stale" in app.bore_chart._dom_classes and app.table.html.value == t0
    # the maximum edited below the design flow: the maximum is the one refused
    app.flow_design.set_text("350 gpm")
    assert fd.message.value == "" and app.message.value == ""
    app.flow_max.set_text("300 gpm")
    assert "'maximum flow' must be at least the design flow 350 gpm, not 300 gpm" in \
        html.unescape(fmax.message.value)
    assert fd.message.value == ""
    app.flow_max.set_text("420 gpm")
    assert fmax.message.value == "" and app.message.value == ""
    assert "hl-stale" not in app.bore_chart._dom_classes
    # below the minimum: refused at the design flow
    app.flow_design.set_text("10 gpm")
    assert "'design flow' must be at least the minimum flow" in html.unescape(fd.message.value)


def test_profile_size_dropdown_changes_profile_and_findings_without_recomputing(app):
    hgl5 = list(trace(app.profile_chart, "HGL, design flow").y)
    n = app.recomputes
    app.size.value = "8"
    assert app.recomputes == n                                  # cached: only re-rendered
    assert list(trace(app.profile_chart, "HGL, design flow").y) != hgl5
    assert all("NPS 8" in f.subject for f in app.findings.value)
    assert "NPS 8" in app.size_heading.value
    marker = [t for t in app.profile_chart.to_figure().data if t.name.startswith("lowest pressure")]
    assert marker and "pipe bridge" in marker[0].name            # the bridge runs under vacuum
    assert any(t.name == "vapour-pressure line" for t in app.profile_chart.to_figure().data)
    # the chosen size is kept across a flow change while it is still a candidate
    app.flow_design.set_text("340 gpm")
    assert app.size.value == "8"


def test_route_length_moves_the_end_point(app):
    app.length.set_text("1500 ft")
    assert app.points[-1].chainage.value == pytest.approx(1500 * 0.3048)
    assert app.study.inputs.route.length == pytest.approx(1500 * 0.3048)
    assert app.points[-1].chainage.input.disabled


def test_add_and_remove_profile_point(app):
    n = len(app.points)
    app.add_point.click()
    assert len(app.points) == n + 1 and len(app.study.inputs.route.points) == n + 1
    app.points[-2].remove.click()
    assert len(app.points) == n and len(app.study.inputs.route.points) == n


def test_display_switch_shows_si_and_keeps_typed_text(app):
    app.flow_design.set_text("350 gpm")
    app.switch.value = "SI"
    assert "[m/s]" in app.table.html.value and "[kPa/100 m]" in app.table.html.value
    assert app.flow_design.text == "350 gpm"
    y = np.array(v_trace(app, "at design flow").y)
    bores = np.array([c.pipe.Di for c in app.study.result.candidates])
    assert y == pytest.approx(350 * GPM / (math.pi / 4 * bores ** 2), rel=1e-9)  # m/s now
    lay = app.bore_chart.to_figure().layout
    assert lay.xaxis.title.text == "bore [mm]" and lay.xaxis2.title.text == "bore [mm]"
    assert lay.yaxis.title.text == "velocity [m/s]"


def test_batch_sizes_the_pasted_list_with_errors_per_row(app):
    assert len(app.batch_table.value) == 8                     # prefilled list, sized on start
    app.batch_text.value = ("tag,flow,liquid,length,duty\n"
                            "A-1,100 gpm,water,300 ft,pump_discharge\n"
                            "A-2,lots,water,300 ft,pump_discharge\n"
                            "A-3,50 gpm,scenario,100 ft,general_transfer\n")
    app.batch_run.click()
    rows = app.batch_table.value
    assert [r["tag"] for r in rows] == ["A-1", "A-2", "A-3"]
    assert [r["verdict"] for r in rows] == ["pass", "error", "pass"]
    assert "tag A-2): flow" in rows[1]["reason"]
    assert "1 error" in app.batch_message.value
    app.batch_text.value = "no header here"
    app.batch_run.click()
    assert "batch header (row 1)" in app.batch_message.value


def test_figures_are_static_copies(app):
    import plotly.graph_objects as go

    figs = app.figures()
    assert len(figs) == 2 and all(type(f) is go.Figure for f in figs)
    assert [t.name for t in figs[0].data] == [t.name for t in app.bore_chart.to_figure().data]
    assert len(figs[1].data) == len(app.profile_chart.to_figure().data)


def test_bore_chart_holds_velocity_and_pressure_drop_panels(app):
    """One figure, two panels with a shared bore axis: the same series the two charts had."""
    fig = app.bore_chart.to_figure()
    v = [t.name for t in fig.data if (t.xaxis or "x") == "x"]
    dp = [t.name for t in fig.data if t.xaxis == "x2"]
    assert v == ["velocity range (criteria)", "within 10% of the limit", "at minimum flow",
                 "at maximum flow", "at design flow", "recommended"]
    assert dp == ["pressure-drop limit (criteria)", "within 10% of the limit",
                  "at design flow", "recommended"]
    assert all(t.yaxis == "y2" for t in fig.data if t.xaxis == "x2")
    assert fig.layout.yaxis2.type == "log" and fig.layout.xaxis2.matches == "x"
    assert [a.text for a in fig.layout.annotations] == ["Velocity against bore",
                                                        "Friction pressure drop against bore"]
    assert fig.layout.yaxis2.title.text == "pressure drop [psi/(100 ft)]"
    # pressure drop per length at design flow: the sizing's own values, in psi/100 ft
    # (psi 6894.757 Pa and ft 0.3048 m, NIST SP 811)
    dp_si = np.array([c.dp_per_m for c in app.study.result.candidates])
    got = np.array(dp_trace(app, "at design flow").y)
    assert got == pytest.approx(dp_si / 6894.757293168 * 30.48, rel=1e-9)
    rec = app.study.result.recommended
    bore_in = app.study.result.candidates[rec].pipe.Di / 0.0254            # NIST SP 811
    assert list(dp_trace(app, "recommended").x) == pytest.approx([bore_in], rel=1e-12)
    assert list(v_trace(app, "recommended").x) == pytest.approx([bore_in], rel=1e-12)
    assert list(fig.layout.xaxis.range) == list(fig.layout.xaxis2.range)


def test_a_rerender_sends_only_what_changed(app):
    """The same inputs again (from the cache) send no chart or dropdown update; a new design
    flow sends one update to the bore chart, not one per panel."""
    from widgetspy import sent_messages

    app.flow_design.set_text("352 gpm")
    verdicts = [c.verdict for c in app.study.result.candidates]
    with sent_messages() as sent:
        app.recompute()                                          # same inputs: cached
        assert app.recomputes == 2 and sent == []
        app.flow_design.set_text("353 gpm")                      # the same verdicts
    assert [c.verdict for c in app.study.result.candidates] == verdicts
    updates = [m for w, m in sent if w is app.bore_chart.view]
    assert len(updates) == 1 and set(updates[0]["state"]) == {"data"}   # ranges unchanged
    assert not any(w is app.size for w, _ in sent)          # same options and value
    assert any(w is app.profile_chart.view for w, _ in sent)  # the profile moved


# ------------------------------------------------------------------ saving the state

def _reloaded(app, sc):
    # the source is kept so the line list named by [batch] file is found beside the scenario
    return scn.loads(scn.dumps(app.to_scenario()), sc.source)


def test_unedited_round_trip_gives_the_same_document_and_results(app, sc):
    from kit.results import compute

    back = _reloaded(app, sc)
    assert back.doc == sc.doc  # nothing changed: every string kept as written
    assert_same_results(compute(back), compute(sc))
    assert app.to_scenario() is not app.source_scenario


def test_edited_design_flow_is_saved_as_typed_and_raises_the_velocity(app, sc):
    from kit.results import compute

    app.flow_design.input.value = "400 gpm"
    back = _reloaded(app, sc)
    assert back.doc["sizing"]["flow_design"] == "400 gpm"
    assert back.doc["sizing"]["flow_min"] == sc.doc["sizing"]["flow_min"]
    r0, r1 = compute(sc), compute(back)
    # velocity = Q / A (definition): the same bore at 400 instead of 350 gpm
    v0, v1 = r0.value("size.3.velocity"), r1.value("size.3.velocity")
    assert v1 == pytest.approx(v0 * 400 / 350, rel=1e-9)
    assert r1.value("design.flow") == pytest.approx(400 * GPM, rel=1e-12)
    # the record of the saved scenario is what the app shows
    shown = app.study.result.candidates[app.study.index_of("3")].velocity
    assert v1 == pytest.approx(shown, rel=1e-9)


def test_edited_route_point_fitting_and_duty_are_written_in_the_loader_layout(app, sc):
    from kit.core.fittings import Fitting
    from kit.studies import line_sizing as ls

    app._on_add_point()
    app.points[-2].elevation.input.value = "30 ft"
    app.fittings.value = (*app.fittings.value,
                          Fitting("bend", 2, {"angle": 45.0, "R_D": 3.0}, "field bends"))
    app.duty.value = "general_transfer"
    back = _reloaded(app, sc)
    r = back.doc["route"]
    assert [p["name"] for p in r["points"]][-1] == "T-12 roof inlet"
    assert r["points"][-2]["elevation"] == "30 ft"
    assert r["points"][-1] == sc.doc["route"]["points"][-1]  # matched by name, kept as written
    assert r["fittings"][:5] == sc.doc["route"]["fittings"]
    assert r["fittings"][5] == {"kind": "bend", "count": 2, "label": "field bends",
                                "angle": 45, "R_D": 3}
    assert back.doc["sizing"]["duty"] == "general_transfer"
    assert "criteria" not in back.doc  # the duty class's own values: no override
    inp = ls.inputs(back)
    got, shown = inp.route, app.study.inputs.route
    assert got.fittings == shown.fittings and got.length == shown.length
    assert [p[0] for p in got.points] == [p[0] for p in shown.points]
    assert np.allclose([p[1:] for p in got.points], [p[1:] for p in shown.points], rtol=1e-12)
    assert inp.duty == DUTY_CLASSES["general_transfer"]


def test_edited_criterion_goes_to_criteria_with_its_unit(app, sc):
    app.v_max.input.value = "8 ft/s"
    back = _reloaded(app, sc)
    assert back.doc["criteria"] == {"v_max": "8 ft/s"}


def test_scenario_text_examples():
    import doctest

    from kit.panels import scenario_text

    result = doctest.testmod(scenario_text, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


def test_invalid_panel_raises_the_kit_error(app):
    from kit.errors import InputError

    app.flow_design.input.value = "400 kg"
    with pytest.raises(InputError, match="design flow"):
        app.to_scenario()


def test_save_button_writes_refuses_silent_overwrite_and_reports_errors(app, sc, tmp_path):
    from kit.results import compute

    row = app.save_row
    assert row.path.value.endswith("harlow_flats_diesel_transfer_edited.toml")
    assert Path(row.path.value).parent == DEMO.parent
    for css, w in (("hl-save", row), ("hl-save-path", row.path),
                   ("hl-save-button", row.button), ("hl-save-message", row.message)):
        assert css in w._dom_classes
    target = tmp_path / "edited.toml"
    row.path.value = str(target)
    app.flow_design.input.value = "380 gpm"
    row.button.click()
    assert "saved to" in row.message.value and target.exists()
    saved = scn.load(target)
    assert saved.doc["sizing"]["flow_design"] == "380 gpm"
    # saved into another folder: the line list goes inline, so the file stands on its own
    assert saved.doc["batch"]["text"] == (DEMO.parent / sc.doc["batch"]["file"]).read_text()
    assert compute(saved).value("design.flow") == pytest.approx(380 * GPM, rel=1e-12)
    # an existing file: the first press asks, the second overwrites
    app.flow_design.input.value = "390 gpm"
    row.button.click()
    assert "press again to overwrite" in row.message.value
    assert scn.load(target).doc["sizing"]["flow_design"] == "380 gpm"
    row.button.click()
    assert scn.load(target).doc["sizing"]["flow_design"] == "390 gpm"
    # a folder is not a file: an error, nothing written
    row.path.value = str(tmp_path)
    row.button.click()
    assert "hl-error-text" in row.message.value and "folder" in row.message.value
    # an invalid panel: the kit's error beside the button
    row.path.value = str(tmp_path / "other.toml")
    app.flow_design.input.value = "oops"
    row.button.click()
    assert "not saved" in row.message.value and not (tmp_path / "other.toml").exists()


def test_a_liquid_temperature_out_of_range_is_refused_in_degf_at_its_field(app):
    """Issue 12: a °F field's range message says °F, not K (the demo diesel's property
    table holds 266.483-310.928 K = 20-100 °F; °F = K × 9/5 − 459.67, NIST SP 811)."""
    t = app.fluid.temperature
    t.set_text("300 degF")
    shown = html.unescape(t.message.value)
    assert "'temperature' must be at least 20 °F and at most 100 °F, not 300 °F" in shown
    assert " K" not in shown and "hl-field-error" in t._dom_classes
    assert "hl-stale" in app.bore_chart._dom_classes
    t.set_text("60 degF")
    assert t.message.value == "" and "hl-stale" not in app.bore_chart._dom_classes


def test_in_a_kernel_an_edit_draws_the_bore_chart_first_and_the_rest_follows(sc, monkeypatch):
    """In a kernel, a design-flow edit sends the bore chart at once; the table, profile,
    findings and status follow from the loop, and are then what the same edit gives outside
    a kernel (everything at once)."""
    import json

    from fakeloop import FakeLoop

    import kit.panels.line_sizing_app as mod

    def state(a):
        return json.dumps([a.bore_chart.view.data, [dict(r) for r in a.table.value],
                           a.status.value, a.profile_chart.view.data,
                           [f.rule for f in a.findings.value]], sort_keys=True, default=repr)

    ref = LineSizingApp.from_scenario(sc)
    ref.flow_design.set_text("360 gpm")
    loop = FakeLoop()
    monkeypatch.setattr(mod, "kernel_loop", lambda: loop)
    app = LineSizingApp.from_scenario(sc)
    assert app.settled                               # the first render is whole
    table0, status0 = app.table.value, app.status.value
    app.flow_design.set_text("360 gpm")
    assert not app.settled and len(loop.waiting) == 1
    assert app.bore_chart.view.data == ref.bore_chart.view.data   # the chart at once
    assert app.table.value == table0 and app.status.value == status0
    app.flow_design.set_text("361 gpm")
    assert len(loop.waiting) == 1                    # a newer edit replaces the one waiting
    app.flow_design.set_text("360 gpm")
    loop.run()
    assert app.settled and loop.waiting == []
    assert state(app) == state(ref)
    # a refused edit leaves the waiting render of the last accepted study to run
    app.flow_design.set_text("361 gpm")
    app.flow_design.set_text("9000 gpm")             # above the maximum flow: refused
    assert "hl-field-error" in app.flow_design._dom_classes
    loop.run()
    ref.flow_design.set_text("361 gpm")
    ref.settle()                                     # the loop is patched for ref too
    assert json.dumps(app.table.value, default=repr) == json.dumps(ref.table.value, default=repr)
    # the record's figures settle a waiting render first
    app.flow_design.set_text("360 gpm")
    assert not app.settled
    figs = app.figures()
    assert app.settled and len(figs) == 2

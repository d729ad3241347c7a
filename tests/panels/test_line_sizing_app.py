"""LineSizingApp driven from Python (no browser): change inputs, read back the table, the
chart data, the findings and the batch table.

Reference checks: velocity Q/A (definition) in the chart; the duty values shown are those of
kit.core.criteria (common practice, no source); unit conversions gpm and ft by NIST SP 811.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

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
    for t in chart.figure.data:
        if t.name == name:
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
    y_before = np.array(trace(app.v_chart, "at design flow").y)
    app.flow_design.set_text("400 gpm")
    assert app.message.value == ""
    assert app.table.html.value != html_before
    y = np.array(trace(app.v_chart, "at design flow").y)        # ft/s on the US display
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
    assert app.material.value == "carbon_steel"  # the roughness follows the material chosen
    app.material.value = "pvc"
    assert app.study.result.candidates[0].pipe.material == "pvc"


def test_duty_change_fills_its_criteria_and_changes_verdicts_and_bands(app):
    band_before = list(trace(app.v_chart, "velocity range (criteria)").y)
    verdicts_before = [c.verdict for c in app.study.result.candidates]
    app.duty.value = "gravity_drain"
    d = DUTY_CLASSES["gravity_drain"]                           # common practice, no source
    assert app.v_min.value == pytest.approx(d.v_min)
    assert app.v_max.value == pytest.approx(d.v_max)
    assert app.dp_max.value == pytest.approx(d.dp_max)
    assert app.study.inputs.duty.key == "gravity_drain"
    assert [c.verdict for c in app.study.result.candidates] != verdicts_before
    assert list(trace(app.v_chart, "velocity range (criteria)").y) != band_before
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
    assert "needs a volumetric flow" in app.message.value
    assert app.table.html.value == before and app.recomputes == n
    app.flow_design.set_text("360 gpm")
    assert app.message.value == "" and app.table.html.value != before


def test_a_refused_route_shows_the_kit_message(app):
    app.points[0].chainage.set_text("9000 ft")                   # beyond the route length
    assert "chainage of &#x27;pipe bridge&#x27;" in app.message.value  # escaped HTML
    app.points[0].chainage.set_text("610 ft")
    assert app.message.value == ""


def test_profile_size_dropdown_changes_profile_and_findings_without_recomputing(app):
    hgl5 = list(trace(app.profile_chart, "HGL, design flow").y)
    n = app.recomputes
    app.size.value = "8"
    assert app.recomputes == n                                  # cached: only re-rendered
    assert list(trace(app.profile_chart, "HGL, design flow").y) != hgl5
    assert all("NPS 8" in f.subject for f in app.findings.value)
    assert "NPS 8" in app.size_heading.value
    marker = [t for t in app.profile_chart.figure.data if t.name.startswith("lowest pressure")]
    assert marker and "pipe bridge" in marker[0].name            # the bridge runs under vacuum
    assert any(t.name == "vapour-pressure line" for t in app.profile_chart.figure.data)
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
    y = np.array(trace(app.v_chart, "at design flow").y)
    bores = np.array([c.pipe.Di for c in app.study.result.candidates])
    assert y == pytest.approx(350 * GPM / (math.pi / 4 * bores ** 2), rel=1e-9)  # m/s now
    assert app.v_chart.figure.layout.xaxis.title.text == "bore [mm]"


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
    assert "A-2: flow" in rows[1]["reason"]
    assert "1 error" in app.batch_message.value
    app.batch_text.value = "no header here"
    app.batch_run.click()
    assert "header row" in app.batch_message.value


def test_figures_are_static_copies(app):
    import plotly.graph_objects as go

    figs = app.figures()
    assert len(figs) == 3 and all(type(f) is go.Figure for f in figs)

"""The workspace view of each app, driven from Python (issue 16): the inputs column, the main
chart, the tabs, and the status line that follows every change.

The numbers in the status line are the study's own (this tests the wiring): each is compared
with the value the study holds, formatted by kit.units.
"""

from __future__ import annotations

import html

import pytest

from kit import units
from kit.notebook import open_scenario
from kit.panels.drain_app import DrainApp
from kit.panels.line_sizing_app import LineSizingApp
from kit.panels.pump_selection_app import PumpSelectionApp
from kit.panels.workspace import Section, Workspace


def text(w) -> str:
    import re

    return html.unescape(re.sub(r"<[^>]+>", "", w.value))


def test_line_sizing_workspace_sections_chart_tabs_and_status():
    app = LineSizingApp.from_scenario(open_scenario("harlow_flats_diesel_transfer.toml"))
    ws = app.workspace
    assert isinstance(ws, Workspace) and app.workspace is ws            # built once
    assert [s.title for s in ws.sections] == ["Flow and duty", "Liquid", "Pipe and route",
                                              "Fittings"]
    assert ws.chart.children == (app.bore_chart,) and "hl-fit-height" in ws.chart._dom_classes
    assert ws.tabs.titles == ("Candidates", "Profile and findings", "Line list", "Save")
    # reading order: the design flow is the first input of the first section
    assert ws.sections[0].body.children[0] is app.flow_design
    c = app.study.result.candidates[app.shown]
    s = text(app.status)
    assert s.startswith("PASS — NPS 5 Sch 40 (recommended)")
    assert f"velocity {units.fmt(c.velocity, 'velocity', 'US')}" in s
    assert f"Δp {units.fmt(c.dp_per_m, 'pressure_per_length', 'US')}" in s
    app.flow_design.set_text("400 gpm")
    c = app.study.result.candidates[app.shown]
    s = text(app.status)
    assert "at 400 gpm" in s and f"velocity {units.fmt(c.velocity, 'velocity', 'US')}" in s
    app.set_system("SI")
    assert "m/s" in text(app.status) and "ft/s" not in text(app.status)
    # a refusal marks the status stale with the results
    app.flow_design.set_text("1 m3/s")
    assert "hl-stale" in app.status._dom_classes


def test_pump_workspace_status_is_the_recommended_pumps():
    app = PumpSelectionApp(open_scenario("kestrel_ridge_booster.toml"))
    ws = app.workspace
    assert [s.title for s in ws.sections] == [
        "Duty, source and destination", "Liquid", "Pump datasheets", "Suction line",
        "Discharge line", "Running hours and tariff"]
    assert ws.chart.children == (app.plot,)
    row = next(r for r in app.study.candidate_rows() if r["pump"] == app.study.recommended)
    s = text(app.status)
    assert f"recommended {app.study.recommended}" in s
    assert f"NPSH margin {units.fmt(row['npsh_margin'], 'head', 'SI')}" in s
    assert f"Q/Q_BEP {row['bep_min']:.2f}–{row['bep_max']:.2f}" in s
    before = s
    app.editor.set_point(3, head="75")
    assert text(app.status) != before


def test_tank_workspace_status_says_the_drain_time():
    app = DrainApp.from_scenario(open_scenario("marlow_vale_cip_dump.toml"))
    ws = app.workspace
    assert [s.title for s in ws.sections][0] == "Tank outlet"
    assert ws.chart.children == (app.level_chart,)
    t = app.study.result.total_time
    assert f"drain time {units.fmt(t, 'time', 'SI')}" in text(app.status)
    app.outlet.pipe.nominal.value = "1-1/2"
    t2 = app.study.result.total_time
    assert t2 > t and f"drain time {units.fmt(t2, 'time', 'SI')}" in text(app.status)


def test_section_opens_and_closes():
    import ipywidgets as widgets

    s = Section("Fittings", [widgets.Label("x")], open=False)
    assert s.body.layout.display == "none" and s.head.description == "▸ Fittings"
    s.head.click()
    assert s.open and s.body.layout.display == "" and s.head.description == "▾ Fittings"


@pytest.mark.parametrize("factory", [
    lambda: LineSizingApp.from_scenario(open_scenario("harlow_flats_diesel_transfer.toml")),
    lambda: PumpSelectionApp(open_scenario("kestrel_ridge_booster.toml")),
    lambda: DrainApp.from_scenario(open_scenario("marlow_vale_cip_dump.toml")),
], ids=["line_sizing", "pump_selection", "tank_drainage"])
def test_every_app_uses_the_one_refusal_pattern(factory):
    from kit.panels.base import Refusals

    app = factory()
    assert isinstance(app.refusals, Refusals) and app.message is app.refusals.banner
    assert app.status in app.refusals.results

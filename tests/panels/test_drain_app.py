"""The tank-drainage app driven from Python: panels in, drain study, table, charts, findings out.

Reference checks: Torricelli (1644) closed forms for a flat-bottomed vertical cylinder
drained through an orifice (written in the test); the scenario's own ``compute`` for the app's
consistency with the record; head balance between two vented surfaces for a stop level
(hydrostatics, standard result); NIST SP 811 exact conversions.
"""

import doctest
import html
import math
import re

import numpy as np
import pytest
from sameresults import assert_same_results

from kit import scenario as scn
from kit.core.drain import OrificeOutlet, PipedOutlet
from kit.core.findings import CAUTIONS, Severity
from kit.core.fittings import Fitting
from kit.core.liquids import make_liquid
from kit.core.pipes import catalogue_pipe, custom_pipe
from kit.core.tank import vertical_cylinder
from kit.errors import InputError, OutOfRangeError
from kit.notebook import SCENARIOS
from kit.panels.drain_app import USER_CD, DrainApp, OutletPicker, drain_figures
from kit.panels.tank_picker import TankSetup
from kit.studies import tank_drainage as td

G = 9.80665
DEMO = SCENARIOS / "marlow_vale_cip_dump.toml"


def torricelli_time(A_tank, Cd, a, h1, h2):
    """Torricelli 1644, standard result: t = A/(Cd a) sqrt(2/g) (sqrt(h1) - sqrt(h2))."""
    return A_tank / (Cd * a) * math.sqrt(2 / G) * (math.sqrt(h1) - math.sqrt(h2))


@pytest.fixture(scope="module")
def demo_sc():
    return scn.load(DEMO)


@pytest.fixture
def app(demo_sc):
    return DrainApp.from_scenario(demo_sc)


def orifice_app(d=0.04, compare=None):
    inp = td.drain_inputs(vertical_cylinder(1.8, 3.0, name="T-1"), make_liquid("water"), 293.15,
                          OrificeOutlet(d, 0.61), start=2.8, target=0.2,
                          levels=(("mid", 1.0),))
    return DrainApp(inp, compare_size=compare)


def text(w) -> str:
    return html.unescape(w.value)


# ------------------------------------------------------------------ consistency with the record

def test_app_reports_exactly_what_compute_reports(app, demo_sc):
    r = td.compute(demo_sc)
    assert [(v.key, v.value) for v in app.results.values] == [(v.key, v.value) for v in r.values]
    assert [f.as_dict()["severity"] for f in app.results.findings] == \
        [f.as_dict()["severity"] for f in r.findings]
    assert app.study.compare.label == "NPS 3 dump line"
    assert app.whatif_nominal.value == "3" and app.whatif_size.layout.display == "none"
    assert app.recomputes == 1


def test_times_table_and_charts_show_both_outlets(app):
    rows = app.times.value
    assert [r["label"] for r in rows][0] == "start" and rows[-1]["label"] == "target"
    assert rows[-1]["time"] == pytest.approx(app.study.result.total_time)
    assert rows[-1]["saved"] == pytest.approx(rows[-1]["time"] - rows[-1]["compare_time"])
    assert "time, what-if [min]" in app.times.html.value
    names = [t.name for t in app.level_chart.to_figure().data]
    assert names == ["as given: line 'dump line'", "what-if: NPS 3 dump line", "target level"]
    assert len(app.flow_chart.to_figure().data) == 2
    # fixed axes: time to 1.05 × the longer drain [min], level over the tank's height [m]
    x = app.level_chart.to_figure().layout.xaxis.range
    assert x[1] == pytest.approx(1.05 * app.study.result.total_time / 60)
    assert app.level_chart.to_figure().layout.yaxis.range[1] == pytest.approx(app.study.tank.h_max)
    assert "The what-if saves" in app.summary.value


def test_smaller_pipe_drains_slower_and_redraws(app):
    old_x = np.array(app.level_chart.to_figure().data[0].x)
    old_html = app.times.html.value
    t_old = app.study.result.total_time
    app.outlet.pipe.nominal.value = "1-1/2"
    assert app.study.outlet.line.segments[0].pipe.nominal == "1-1/2"
    assert app.study.result.total_time > 1.5 * t_old
    assert app.times.html.value != old_html
    assert not np.array_equal(np.array(app.level_chart.to_figure().data[0].x), old_x)
    # the what-if stays NPS 3 and keeps its label
    assert app.study.compare.label == "NPS 3 dump line"
    # the line keeps the scenario's three segments, stations and fittings' places
    segs = app.study.outlet.line.segments
    assert [s.name for s in segs] == ["bottom nozzle and dump valve", "run along the plinth",
                                      "drop to gully"]
    assert [len(s.fittings) for s in segs] == [3, 1, 0]


def test_whatif_nominal_change_and_none(app):
    app.whatif_nominal.value = "4"
    assert app.study.compare.label == "NPS 4 line"
    assert app.study.compare.outlet.line.segments[0].pipe.nominal == "4"
    app.whatif_nominal.value = ""
    assert app.study.compare is None
    assert "compare_time" not in app.times.value[0]
    assert len(app.level_chart.to_figure().data) == 2      # one drain and the target line


def test_orifice_app_equals_torricelli_and_whatif_scales_with_area():
    a = orifice_app(0.04, compare=0.06)
    A, area = math.pi * 1.8**2 / 4, math.pi * 0.04**2 / 4
    assert a.study.result.total_time == pytest.approx(torricelli_time(A, 0.61, area, 2.8, 0.2),
                                                      rel=1e-6)   # Torricelli 1644
    # time ∝ 1/a (Torricelli): 40 mm against 60 mm
    ratio = a.study.compare.result.total_time / a.study.result.total_time
    assert ratio == pytest.approx((40 / 60) ** 2, rel=1e-9)
    assert a.study.compare.label == "orifice 60.0 mm"
    assert a.whatif_nominal.layout.display == "none" and a.whatif_size.layout.display == ""
    a.whatif_size.set_text("2 in")
    assert a.study.compare.outlet.diameter == pytest.approx(0.0508)   # NIST SP 811
    a.whatif_size.set_text("")
    assert a.study.compare is None


def test_cd_source_named_and_typed_value():
    a = orifice_app()
    o = a.outlet
    assert o.cd_source.value == "sharp" and "Weisbach" in o.cd_note.value
    o.cd_source.value = "rounded"
    assert o.cd.value == pytest.approx(0.97) and a.study.outlet.Cd == pytest.approx(0.97)
    t_rounded = a.study.result.total_time
    o.cd.set_text("0.7")
    assert o.cd_source.value == USER_CD and "typed value" in o.cd_note.value
    # time ∝ 1/Cd (Torricelli 1644)
    assert a.study.result.total_time == pytest.approx(t_rounded * 0.97 / 0.7, rel=1e-9)


def test_bad_input_keeps_last_results_and_says_so(app):
    t = app.study.result.total_time
    app.outlet.fall.set_text("9 m")        # more fall than the 4.85 m developed length
    # the message is beside the fall field, which is marked; the results are marked stale
    fall = app.outlet.fall
    assert "'outlet line fall' must be at least -4.85 m and at most 4.85 m, not 9 m" in text(fall.message)
    assert "hl-field-error" in fall._dom_classes and "hl-error-text" in fall.message.value
    assert fall.echo.value == ""               # no "= 9 m" echo that looks accepted
    assert "results are for the last accepted inputs" in app.message.value
    assert "hl-stale-banner" in app.message._dom_classes
    assert all("hl-stale" in w._dom_classes for w in (app.level_chart, app.flow_chart,
                                                        app.times, app.summary))
    assert app.study.result.total_time == t
    app.outlet.fall.set_text("1.25 m")
    assert app.message.value == "" and fall.message.value == ""
    assert "hl-field-error" not in fall._dom_classes
    assert not any("hl-stale" in w._dom_classes for w in (app.level_chart, app.flow_chart))


def test_start_level_above_the_top_is_marked_at_the_start_field_in_display_units(app):
    """Issue 12: the start level above the top is refused at its own field, in the
    display unit; the next good edit clears the message and the stale marks."""
    t = app.study.result.total_time
    app.set_system("US")
    start = app.tank.start
    start.set_text("40 ft")
    msg = re.sub(r"<[^>]+>", "", text(start.message))
    assert msg.startswith("'start level in 'T-CIP-03 final-rinse tank'' must be at least 0 ft and at most "
                          ) and msg.endswith(
        " ft, not 40 ft"), msg
    assert "hl-field-error" in start._dom_classes and app.tank.message.value == ""
    assert "hl-stale" in app.level_chart._dom_classes and app.study.result.total_time == t
    start.set_text("6 ft")
    assert start.message.value == "" and "hl-field-error" not in start._dom_classes
    assert app.message.value == "" and "hl-stale" not in app.level_chart._dom_classes
    assert app.study.inputs.start == pytest.approx(6 * 0.3048)   # NIST SP 811: 1 ft = 0.3048 m


def test_length_and_fall_scale_the_route(app):
    app.outlet.length.set_text("9.7 m")
    segs = app.study.outlet.line.segments
    assert sum(s.length for s in segs) == pytest.approx(9.7)
    assert [s.length for s in segs] == pytest.approx([0.9, 7.2, 1.6])      # ×2
    app.outlet.fall.set_text("2.5 m")
    assert [s.rise for s in app.study.outlet.line.segments] == pytest.approx([-0.9, 0.0, -1.6])
    assert app.study.outlet.discharge_elevation == pytest.approx(-2.5)


def test_receiving_vessel_above_the_target_stops_the_drain(app):
    # two vented surfaces: flow stops when the levels are equal (hydrostatics)
    app.outlet.discharge.value = "vessel"
    assert app.outlet.receiver_level.layout.display == ""
    app.outlet.receiver_level.set_text("0.8 m")
    res = app.study.result
    assert not res.reached and res.stop_level == pytest.approx(0.8, abs=1e-9)
    assert "DOES NOT REACH THE TARGET" in app.summary.value
    assert any(f.quantity == "level reached" and f.severity is Severity.FAIL
               for f in app.results.findings)
    assert "FAIL" in app.findings.html.value


def test_liquid_temperature_changes_the_state(app):
    rho60 = app.study.state.rho
    app.fluid.temperature.set_text("20 degC")
    assert app.study.state.rho > rho60
    assert app.study.state.T == pytest.approx(293.15)
    assert not any("scald" in c for c in app.results.cautions)
    assert app.extra_cautions.value == ""


def test_vacuum_surface_follows_into_the_liquid_state_and_findings(app):
    app.tank.surface.value = "vacuum"
    app.tank.surface_pressure.set_text("80 kPa(a)")
    assert app.fluid.pressure.value == pytest.approx(80000.0)
    assert app.study.inputs.p_surface == pytest.approx(80000.0)
    assert any(f.quantity == "surface gauge pressure" for f in app.results.findings)
    assert html.escape(CAUTIONS["vacuum"]) in app.findings.html.value


def test_hot_liquid_caution_shown(app):
    assert "scald" in app.extra_cautions.value


def test_switch_to_orifice_and_back_to_line():
    a = orifice_app()
    a.outlet.kind.value = "line"
    assert isinstance(a.study.outlet, PipedOutlet)
    assert a.whatif_nominal.layout.display == ""
    assert a.study.outlet.line.segments[0].pipe.nominal == "4"     # the picker's default pipe
    a.whatif_nominal.value = "6"
    assert a.study.compare.result.total_time < a.study.result.total_time
    a.outlet.kind.value = "orifice"
    assert isinstance(a.study.outlet, OrificeOutlet) and a.study.compare is None


def test_display_system_us(app):
    app.switch.value = "US"
    assert "[ft]" in app.times.html.value
    assert "gpm" in app.summary.value
    assert app.level_chart.to_figure().layout.yaxis.title.text == "level [ft]"
    assert app.level_chart.to_figure().layout.yaxis.range[1] == pytest.approx(
        app.study.tank.h_max / 0.3048)     # NIST SP 811


def test_figures_for_the_record(app, demo_sc):
    figs = drain_figures(td.study(demo_sc), "SI")
    assert [f.layout.title.text for f in figs] == ["Level against time", "Outflow against time"]
    live = app.figures()
    assert np.allclose(np.array(figs[0].data[0].y), np.array(live[0].data[0].y))


def test_outlet_picker_shows_an_orifice_with_a_typed_cd():
    o = OutletPicker(OrificeOutlet(0.03, 0.66, 0.2))
    assert o.value == OrificeOutlet(0.03, 0.66, 0.2)
    assert o.cd_source.value == USER_CD and o.line_box.layout.display == "none"


# ------------------------------------------------------------------ the study helpers

def test_line_route_rebuilds_the_line_exactly_and_places_new_fittings_first(demo_sc):
    inp = td.inputs(demo_sc)
    route = td.LineRoute.of(inp.outlet.line)
    assert route.one_pipe and route.length == pytest.approx(4.85) and \
        route.fall == pytest.approx(1.25)
    same = route.build(route.pipe, route.fittings, route.length, route.fall, 0.0)
    assert same == inp.outlet.line
    extra = Fitting("fixed_k", 1, {"K": 2.0}, "strainer")
    line = route.build(route.pipe, (*route.fittings, extra), route.length, route.fall, 0.0)
    assert line.segments[0].fittings[-1] == extra
    # the extra K = 2 adds 2·V²/2g to the line's loss (Darcy–Weisbach K form)
    Q = np.array([0.008])
    V = 0.008 / route.pipe.area
    extra_loss = line.head_loss(Q, inp.state) - inp.outlet.line.head_loss(Q, inp.state)
    assert float(extra_loss[0]) == pytest.approx(2.0 * V * V / (2 * G), rel=1e-9)
    flat = td.LineRoute("l", "s", (inp.outlet.line.segments[1],))
    assert [s.rise for s in flat.build(route.pipe, (), 3.6, 0.5, 0.0).segments] == [-0.5]


def test_resize_pipe():
    p = catalogue_pipe("asme_b36_19m", "2", "10S", "stainless_steel")
    big = td.resize_pipe(p, "3")
    assert (big.nominal, big.schedule, big.material) == ("3", "10S", "stainless_steel")
    c = custom_pipe(0.05, "pvc")
    assert td.resize_pipe(c, 0.08).Di == pytest.approx(0.08)
    with pytest.raises(InputError, match="'what-if size' is a nominal size; a custom-bore"):
        td.resize_pipe(c, "3")


@pytest.mark.parametrize("kw, cls, match", [
    (dict(start=1.0, target=1.5), OutOfRangeError, r"'target level' must be between 0 and 1 m"),
    (dict(surface="padded", p_surface=90000.0), OutOfRangeError,
     r"'padded surface pressure' must be between 101325 and 1e\+08 Pa, not 90000 Pa"),
    (dict(surface="vacuum"), InputError, r"'surface pressure' is needed for a vacuum surface"),
    (dict(levels=(("a", 1.0), ("a", 0.5))), InputError,
     r"'level of interest label' must be given once each"),
    (dict(levels=(("high", 2.5),)), OutOfRangeError,
     r"'level of interest 'high'' must be between 0.1 and 1.8 m"),
], ids=["target above start", "pad below atmosphere", "vacuum without pressure",
        "label twice", "level above start"])
def test_drain_inputs_refuses_bad_input(kw, cls, match):
    args = dict(start=1.8, target=0.1)
    args.update(kw)
    with pytest.raises(cls, match=match) as info:
        td.drain_inputs(vertical_cylinder(1.0, 2.0), make_liquid("water"), 293.15,
                        OrificeOutlet(0.03), **args)
    assert type(info.value) is cls


def test_tank_setup_from_app_is_the_scenario_tank(app, demo_sc):
    s = app.tank.value
    assert isinstance(s, TankSetup) and s.tank == td.inputs(demo_sc).tank


@pytest.mark.parametrize("module", ["kit.panels.drain_app", "kit.studies.tank_drainage"])
def test_docstring_examples_run(module):
    import importlib

    result = doctest.testmod(importlib.import_module(module), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


# ------------------------------------------------------------------ saving the state

def reloaded(app):
    return scn.loads(scn.dumps(app.to_scenario()))


def test_unedited_round_trip_gives_the_same_document_and_results(app, demo_sc):
    from kit.results import compute

    back = reloaded(app)
    assert back.doc == demo_sc.doc
    assert_same_results(compute(back), compute(demo_sc))


def test_edited_outlet_size_is_saved_in_every_segment_and_drains_faster(app, demo_sc):
    from kit.results import compute

    app.outlet.pipe.nominal.value = "3"
    back = reloaded(app)
    segs = back.doc["outlet"]["segments"]
    assert [s["pipe"]["nominal"] for s in segs] == ["3", "3", "3"]
    assert [s["length"] for s in segs] == [s["length"] for s in demo_sc.doc["outlet"]["segments"]]
    assert [s.get("fittings") for s in segs] == [s.get("fittings") for s in
                                                 demo_sc.doc["outlet"]["segments"]]
    r0, r1 = compute(demo_sc), compute(back)
    # a larger bore passes more flow at the same head (Torricelli 1644 / Bernoulli, standard
    # result): the drain is quicker
    assert r1.value("drain.total_time") < r0.value("drain.total_time")
    assert r1.value("drain.total_time") == pytest.approx(app.study.result.total_time, rel=1e-9)


def test_edited_length_whatif_and_level_follow_the_loader_layout(app, demo_sc):
    app.outlet.length.input.value = "6 m"
    app.whatif_nominal.value = "4"
    app.tank.levels.value += "\n200 mm, test level"
    back = reloaded(app)
    segs = back.doc["outlet"]["segments"]
    from kit import units

    lengths = [units.parse(s["length"], "length", "l") for s in segs]
    assert sum(lengths) == pytest.approx(6.0, rel=1e-12)
    assert [s["rise"] for s in segs] == [s["rise"] for s in demo_sc.doc["outlet"]["segments"]]
    assert back.doc["compare"] == {"label": "NPS 4 line", "nominal": "4", "schedule": "10S"}
    assert back.doc["drain"]["levels_of_interest"][-1] == {"level": "200 mm",
                                                           "label": "test level"}
    assert back.doc["drain"]["levels_of_interest"][:3] == \
        demo_sc.doc["drain"]["levels_of_interest"]
    st = td.study(back)
    assert st.result.total_time == pytest.approx(app.study.result.total_time, rel=1e-9)
    assert st.compare.result.total_time == pytest.approx(app.study.compare.result.total_time,
                                                         rel=1e-9)


def test_orifice_outlet_is_saved_with_its_cd_key(app):
    app.outlet.kind.value = "orifice"
    app.outlet.diameter.input.value = "40 mm"
    back = reloaded(app)
    o = back.doc["outlet"]
    assert o["type"] == "orifice" and o["diameter"] == "40 mm" and o["cd_key"] == "sharp"
    assert td.study(back).result.total_time == pytest.approx(app.study.result.total_time,
                                                             rel=1e-9)


def test_invalid_panel_raises_the_kit_error(app):
    app.tank.start.input.value = "2.35 kg"
    with pytest.raises(InputError, match="tank"):
        app.to_scenario()


def test_save_button_writes_refuses_silent_overwrite_and_reports_errors(app, tmp_path):
    row = app.save_row
    assert row.path.value.endswith("marlow_vale_cip_dump_edited.toml")
    target = tmp_path / "dump.toml"
    row.path.value = str(target)
    row.button.click()
    assert "saved to" in row.message.value and scn.load(target).doc["outlet"]["type"] == "line"
    app.outlet.pipe.nominal.value = "3"
    row.button.click()
    assert "press again to overwrite" in row.message.value
    assert scn.load(target).doc["outlet"]["segments"][0]["pipe"]["nominal"] == "2"
    row.button.click()
    assert scn.load(target).doc["outlet"]["segments"][0]["pipe"]["nominal"] == "3"
    row.path.value = str(tmp_path)
    row.button.click()
    assert "hl-error-text" in row.message.value and "folder" in row.message.value


# ------------------------------------------------------------------ latency: steady axes, cache

def test_time_axis_holds_while_the_curves_fit_it_and_a_size_tried_before_is_not_drained_again(
        app):
    """An outlet size tried and tried back keeps the time axis (the browser then moves the
    traces only) and reuses the computation; the record's figures keep tight ranges; a
    drain much shorter than the axis re-tightens it."""
    nominal = app.outlet.pipe.nominal
    first = nominal.value
    values = [v for _label, v in nominal.options]
    smaller = values[values.index(first) - 1]
    x0 = app.level_chart.ranges["x"]
    nominal.value = smaller                      # longer drain: the axis grows
    x1 = app.level_chart.ranges["x"]
    assert x1[1] > x0[1]
    n = app.recomputes
    nominal.value = first                        # back: shorter drain inside the axis
    assert app.level_chart.ranges["x"] == x1 and app.flow_chart.ranges["x"] == x1
    assert app.recomputes == n                   # the first size was computed before
    t_end = float(app.study.result.time[-1])
    assert t_end < x1[1]
    record_x = drain_figures(app.study, "SI")[0].layout.xaxis.range
    assert record_x[1] == pytest.approx(x0[1] / 60.0, rel=1e-9)   # minutes, tight
    # a much bigger outlet: the drain is far shorter than half the axis -> tight again
    nominal.value = values[-1]
    from kit.panels.drain_app import chart_parts

    tight = chart_parts(app.study)[0][1]
    assert tight[1] < 0.5 * x1[1]
    assert app.level_chart.ranges["x"] == pytest.approx(tight, rel=1e-12)
    # the level axis is always the tank's own
    assert app.level_chart.ranges["y"] == (app.study.inputs.tank.h_min,
                                           app.study.inputs.tank.h_max)

"""Panels driven from Python: widget values in, core objects and displayed results out.

Reference values beside each check name their source; conversions are the exact NIST SP 811
definitions; pipe dimensions are ASME B36.10M table values (from memory); water properties
are IAPWS-95 through the iapws library.
"""

import html
import math

import numpy as np
import pytest

from kit.core.findings import CAUTIONS, Finding, Severity
from kit.core.liquids import Liquid, UserLiquid
from kit.core.pipes import catalogue_pipe, custom_pipe
from kit.errors import OutOfRangeError
from kit.panels import (
    Chart,
    Column,
    DisplaySwitch,
    FindingsView,
    FluidPicker,
    FluidSelection,
    PipePicker,
    QuantityField,
    ResultsTable,
    Series,
    results_table_html,
)

GPM = 3.785411784e-3 / 60.0  # US gallon = 3.785411784 L exactly (NIST SP 811)
INCH = 0.0254                # exact (NIST SP 811)
FOOT = 0.3048                # exact (NIST SP 811)
PSI = 6894.757293168361      # lbf/in² (NIST SP 811)


def events(panel):
    seen = []
    panel.observe(lambda change: seen.append(change["new"]), names="value")
    return seen


# ------------------------------------------------------------------ QuantityField

def test_quantity_field_reads_text_with_unit():
    q = QuantityField("flow", "design flow", text="150 gpm")
    assert q.value == pytest.approx(150 * GPM, rel=1e-12)  # NIST SP 811
    assert q.valid and q.error == ""
    assert "34.07 m³/h" in q.echo.value  # 150 gpm = 34.0687 m³/h (NIST SP 811)


def test_quantity_field_from_si_value_keeps_the_exact_value():
    q = QuantityField("pressure", "discharge pressure", value_si=351325.0, gauge=True)
    assert q.input.value == "250.0 kPa(g)"
    assert q.value == 351325.0


def test_quantity_field_set_value_shows_text_in_display_system():
    q = QuantityField("diameter", "bore", system="US", text="100 mm")
    seen = events(q)
    q.value = 4 * INCH
    assert q.input.value == "4.000 in"
    assert q.value == 4 * INCH
    assert seen == [4 * INCH]  # one change event


def test_quantity_field_one_event_per_edit_and_none_when_invalid():
    q = QuantityField("length", "pipe length", text="10 m")
    seen = events(q)
    q.input.value = "100 ft"
    q.input.value = "100 ft/s"
    q.input.value = "100 lb"  # still invalid: no second event for None -> None
    assert seen == [pytest.approx(100 * FOOT), None]
    assert q.valid is False and q.input.value == "100 lb"


def test_quantity_field_validator_message_shown():
    def positive(x):
        if x <= 0:
            raise OutOfRangeError("pipe length", x, "m", low=0.0)

    q = QuantityField("length", "pipe length", text="5 m", validator=positive)
    q.set_text("-3 m")
    assert q.value is None
    assert "must be more than 0 m, not -3 m" in html.unescape(q.message.value)
    assert "hl-field-error" in q._dom_classes
    assert q.input.value == "-3 m"


def test_quantity_field_non_kit_error_surfaces():
    def broken(x):
        raise RuntimeError("a bug, not bad input")

    with pytest.raises(RuntimeError, match="a bug"):
        QuantityField("length", "pipe length", text="5 m", validator=broken)


def test_quantity_field_optional_empty_is_valid_none():
    q = QuantityField("roughness", "roughness", optional=True)
    assert q.value is None and q.valid
    q.set_text("0.05 mm")
    assert q.value == pytest.approx(5e-5)


def test_quantity_field_set_system_keeps_text():
    q = QuantityField("flow", "design flow", text="36 m3/h")
    q.set_system("US")
    assert q.input.value == "36 m3/h"
    assert "158.5 gpm" in q.echo.value  # 36 m³/h / (3.785411784 L/min) = 158.50 gpm


def test_unknown_kind_refused():
    with pytest.raises(KeyError, match="unknown quantity kind 'speed_of_light'"):
        QuantityField("speed_of_light", "c")


# ------------------------------------------------------------------ PipePicker

def test_pipe_picker_default_is_nps4_sch40():
    p = PipePicker()
    assert p.value.Di == pytest.approx(4.026 * INCH, abs=1e-6)  # ASME B36.10M: 4.026 in (from memory)
    assert p.value.wall == pytest.approx(0.237 * INCH, abs=1e-6)  # ASME B36.10M: 0.237 in (from memory)
    assert "102.3 mm" in p.info.value
    assert "ASME B36.10M" in p.info.value


def test_pipe_picker_cascade_fires_one_event():
    p = PipePicker()
    seen = events(p)
    p.standard.value = "astm_d1785"
    assert len(seen) == 1
    assert seen[0].standard == "astm_d1785"
    assert p.schedule.value == "40"
    assert [v for _, v in p.schedule.options] == ["40", "80", "120"]


def test_pipe_picker_size_and_schedule_pick_table_values():
    p = PipePicker()
    p.nominal.value = "2"
    p.schedule.value = "80"
    # ASME B36.10M NPS 2 Sch 80: OD 60.3 mm, wall 5.54 mm -> bore 49.22 mm (from memory)
    assert p.value.Di == pytest.approx(60.3e-3 - 2 * 5.54e-3, abs=1e-7)
    assert dict(p.nominal.options)["NPS 2 (DN 50)"] == "2"  # ISO 6708 / common practice


def test_pipe_picker_material_and_condition_roughness():
    p = PipePicker()
    assert p.value.roughness == pytest.approx(4.5e-5)  # commercial steel 0.045 mm (Moody 1944, from memory)
    p.condition.value = "aged"
    assert p.value.condition == "aged"
    assert p.value.roughness > 4.5e-5
    assert "aged" in p.info.value
    p.material.value = "galvanised_steel"
    assert p.value.material == "galvanised_steel"
    # the material follows the standard (common practice, no source): no stainless PVC pipe
    p.standard.value = "astm_d1785"
    assert [k for _, k in p.material.options] == ["pvc"] and p.value.material == "pvc"
    p.mode.value = "custom"                     # a custom bore: any material
    assert "stainless_steel" in [k for _, k in p.material.options]


def test_pipe_picker_custom_bore_and_override():
    p = PipePicker()
    p.mode.value = "custom"
    p.bore.set_text("8 in")
    assert p.value.Di == pytest.approx(8 * INCH)
    assert p.value.standard is None
    p.roughness_override.set_text("0.1 mm")
    assert p.value.roughness == pytest.approx(1e-4)
    assert "user-given roughness" in p.info.value


def test_pipe_picker_shows_a_pipe():
    pipe = catalogue_pipe("bs_1387", "25", "Medium", "galvanised_steel", "aged")
    p = PipePicker()
    seen = events(p)
    p.value = pipe
    assert (p.standard.value, p.nominal.value, p.schedule.value) == ("bs_1387", "25", "Medium")
    assert (p.material.value, p.condition.value) == ("galvanised_steel", "aged")
    assert seen == [pipe]
    # what the widgets now say rebuilds the same pipe
    p.mode.value = "custom"
    p.mode.value = "catalogue"
    assert p.value == pipe


def test_pipe_picker_shows_a_custom_pipe():
    pipe = custom_pipe(0.2, "hdpe", roughness=2e-5)
    p = PipePicker(pipe)
    assert p.mode.value == "custom"
    assert p.bore.value == 0.2 and p.roughness_override.value == 2e-5
    assert p.value == pipe


def test_pipe_picker_bad_bore_range():
    p = PipePicker()
    p.mode.value = "custom"
    p.bore.set_text("0 mm")
    assert p.value is None and not p.valid
    assert "pipe inside diameter" in p.bore.message.value
    assert p.bore.input.value == "0 mm"


def test_pipe_picker_refuses_wrong_type():
    p = PipePicker()
    with pytest.raises(TypeError, match="Pipe"):
        p.value = "NPS 4"


# ------------------------------------------------------------------ FluidPicker

def test_fluid_picker_water_matches_iapws():
    iapws = pytest.importorskip("iapws")
    f = FluidPicker(T=323.15)
    ref = iapws.IAPWS95(T=323.15, P=0.101325)  # IAPWS-95 via iapws
    assert isinstance(f.value, FluidSelection)
    assert f.value.state.rho == pytest.approx(ref.rho, rel=1e-5)
    assert f.value.state.mu == pytest.approx(ref.mu, rel=1e-3)
    assert "IAPWS-95" in f.info.value
    assert "988.0" in f.info.value  # 988.0 kg/m³ at 50 °C, 1 atm (IAPWS-95 via iapws)


def test_fluid_picker_family_and_concentration_with_basis():
    f = FluidPicker()
    seen = events(f)
    f.family.value = "glycol solution"
    assert len(seen) == 1
    assert f.liquid.value == "ethylene_glycol_aq"
    assert f.value.liquid.concentration == pytest.approx(0.30)
    assert "mass fraction" in f.basis.value
    assert f.conc_box.layout.display == ""
    f.family.value = "water"
    assert f.conc_box.layout.display == "none"


def test_fluid_picker_refuses_boiling_beside_temperature_and_recovers():
    f = FluidPicker()
    f.temperature.set_text("120 degC")
    assert f.value is None
    assert "saturation temperature" in f.temperature.message.value
    assert f.temperature.input.value == "120 degC"
    f.pressure.set_text("3 bar(g)")  # water boils at 143.6 °C at 4.01 bar(a) (IAPWS-95 via iapws)
    assert f.value is not None and f.temperature.message.value == ""
    assert f.value.T == pytest.approx(393.15)


def test_fluid_picker_refuses_frozen_glycol_and_bad_concentration():
    f = FluidPicker()
    f.family.value = "glycol solution"
    f.concentration.set_text("80 %")
    assert f.value is None
    assert "'concentration' must be at least 0 % and at most 60 %, not 80 %" in f.concentration.error
    f.concentration.set_text("30 %")
    f.temperature.set_text("-40 degC")
    assert f.value is None and "freezing point" in f.temperature.error


def test_fluid_picker_no_vapour_pressure_model_shown():
    f = FluidPicker(liquid=Liquid("ethanol_aq", 0.2))
    assert f.value.state.pv is None
    assert "no vapour-pressure model" in f.info.value
    assert "Flammable" in f.info.value


def test_fluid_picker_shows_selection_and_user_liquid():
    oil = UserLiquid("light oil", T=(280.0, 320.0), rho=850.0, mu=0.01, pv=500.0)
    f = FluidPicker()
    f.set_liquid(oil, T=300.0)
    assert f.value.liquid is oil and f.value.state.rho == 850.0
    sel = FluidSelection(Liquid("seawater", 0.035), Liquid("seawater", 0.035).state(288.15))
    f.value = sel
    assert f.family.value == "brine" and f.liquid.value == "seawater"
    assert f.concentration.value == pytest.approx(0.035)
    assert f.value == sel


# ------------------------------------------------------------------ bad text everywhere

def _pipe_custom():
    p = PipePicker()
    p.mode.value = "custom"
    return p


def _fluid_glycol():
    f = FluidPicker()
    f.family.value = "glycol solution"
    return f


FIELD_CASES = [
    pytest.param(lambda: QuantityField("flow", "design flow", text="10 gpm"), None, id="QuantityField"),
    pytest.param(_pipe_custom, "bore", id="PipePicker.bore"),
    pytest.param(_pipe_custom, "roughness", id="PipePicker.roughness"),
    pytest.param(_fluid_glycol, "concentration", id="FluidPicker.concentration"),
    pytest.param(FluidPicker, "temperature", id="FluidPicker.temperature"),
    pytest.param(FluidPicker, "pressure", id="FluidPicker.pressure"),
]
BAD_TEXTS = ["abc", "12 parsecs", "150 kg", "1e999 m", "nan m", "--3 m", "3 m/", "40 psi/s"]


@pytest.mark.parametrize("text", BAD_TEXTS)
@pytest.mark.parametrize(("make", "name"), FIELD_CASES)
def test_bad_text_shows_message_and_keeps_text(make, name, text):
    panel = make()
    field = panel if name is None else panel.fields[name]
    field.set_text(text)
    assert field.input.value == text
    assert field.valid is False and field.value is None
    assert field.field in field.error
    assert 'class="hl-error-text"' in field.message.value
    assert panel.value is None and panel.valid is False
    assert "Traceback" not in field.message.value


@pytest.mark.parametrize(("make", "name"), FIELD_CASES)
def test_empty_text_required_unless_optional(make, name):
    panel = make()
    field = panel if name is None else panel.fields[name]
    field.set_text("")
    if field.optional:
        assert field.valid and panel.value is not None
    else:
        assert field.valid is False and panel.value is None and field.message.value


@pytest.mark.parametrize("text", ["1 (m", "1 m)", "1 m/0"])
def test_bracket_text_shows_message(text):
    q = QuantityField("length", "pipe length", text="1 m")
    q.set_text(text)
    assert q.valid is False and q.input.value == text


# ------------------------------------------------------------------ display switch

def test_display_switch_re_renders_without_losing_input():
    q = QuantityField("flow", "design flow", text="150 gpm")
    p = PipePicker()
    p.mode.value = "custom"
    p.bore.set_text("250 mm")
    f = FluidPicker()
    f.temperature.set_text("68 degF")
    chart = Chart("flow", "head")
    chart.set_series([Series("s", np.array([0.0, 0.01]), np.array([10.0, 20.0]))])
    table = ResultsTable([Column("V", "velocity", "velocity")], [{"V": 1.0}])
    seen_values = (q.value, p.value, f.value)
    sw = DisplaySwitch([q, p, f, chart, table])
    sw.toggle.value = "US"
    assert (q.input.value, p.bore.input.value, f.temperature.input.value) == \
        ("150 gpm", "250 mm", "68 degF")
    assert (q.value, p.value, f.value) == seen_values
    assert "150.0 gpm" in q.echo.value
    assert "9.843 in" in p.info.value  # 250 mm / 25.4 mm (NIST SP 811)
    assert "°F" in f.info.value
    assert chart.to_figure().layout.yaxis.title.text == "head [ft]"
    assert float(chart.to_figure().data[0].y[1]) == pytest.approx(20.0 / FOOT)
    assert "3.28" in table.html.value  # 1 m/s = 3.281 ft/s (NIST SP 811)
    sw.value = "SI"
    assert "34.07 m³/h" in q.echo.value
    assert chart.to_figure().layout.yaxis.title.text == "head [m]"


def test_display_switch_refuses_unknown_system():
    with pytest.raises(KeyError, match="unknown display system 'imperial'"):
        DisplaySwitch([], system="imperial")


# ------------------------------------------------------------------ charts

def test_chart_updates_one_view_in_place():
    c = Chart("flow", "head", title="system")
    view = c.view
    c.set_series([Series("a", [0.0, 0.01], [1.0, 2.0]), Series("b", [0.0], [3.0], mode="markers")])
    c.set_series([Series("a", [0.0, 0.02], [1.0, 5.0]), Series("b", [0.01], [4.0], mode="markers")])
    assert c.view is view and c.children == (view,)
    fig = c.to_figure()
    assert list(fig.data[0].x) == pytest.approx([0.0, 72.0])  # 0.02 m³/s = 72 m³/h (definition)
    assert fig.layout.xaxis.title.text == "flow [m³/h]"
    assert fig.data[1].mode == "markers" and fig.layout.title.text == "system"
    c.set_series([Series("a", [0.0], [1.0])])
    assert len(c.to_figure().data) == 1


def test_chart_sends_only_what_changed():
    """The same series again send nothing; new data send the traces only, not the layout."""
    from widgetspy import sent_messages

    c = Chart("flow", "head", title="system")
    c.set_series([Series("a", [0.0, 0.01], [1.0, 2.0])], x_range=(0.0, 0.02))
    with sent_messages() as sent:
        c.set_series([Series("a", [0.0, 0.01], [1.0, 2.0])])
        assert sent == []
        c.set_series([Series("a", [0.0, 0.01], [1.0, 2.5])])
    states = [m["state"] for w, m in sent if w is c.view]
    assert len(states) == 1 and set(states[0]) == {"data"}
    assert c.to_figure().layout.xaxis.range == pytest.approx((0.0, 72.0))


def test_plot_view_json_is_plain_and_finite():
    """numpy arrays become lists, NaN and infinities null (plotly draws a gap), and the
    plotly.js library is one widget for every view."""
    from kit.panels.plot_view import PlotView, plotly_library

    v = PlotView()
    v.show(data=[{"type": "scatter", "x": np.array([0.0, 1.0, 2.0]),
                  "y": np.array([1.0, np.nan, np.inf])}])
    assert v.data[0]["x"] == [0.0, 1.0, 2.0] and v.data[0]["y"] == [1.0, None, None]
    assert v.library is plotly_library() is PlotView().library
    assert "Plotly" in v.library.source[-2000:] and v.library.version
    assert v.figure_template["layout"]["plot_bgcolor"] == "white"   # plotly_white
    import json

    json.dumps(v.data, allow_nan=False)    # raises if anything non-finite remained


def test_chart_temperature_axis_is_affine():
    c = Chart("temperature", "density", system="US")
    c.set_series([Series("rho", [273.15, 373.15], [999.8, 958.4])])
    assert list(c.to_figure().data[0].x) == pytest.approx([32.0, 212.0])  # NIST SP 811


# ------------------------------------------------------------------ findings and tables

def _findings():
    return [
        Finding(Severity.PASS, "segment <suction>", "velocity", 1.2, "m/s", "0.5–1.5 m/s",
                "pump suction: velocity within range", "common practice, no source"),
        Finding(Severity.CHECK, "station crest", "pressure", 30000.0, "Pa", ">= 20 kPa(a)",
                "margin to vapour pressure", "common practice, no source"),
        Finding(Severity.FAIL, "pump P-1", "NPSH margin", -0.4, "m", ">= 1 m",
                "NPSH available against required", "common practice, no source"),
    ]


def test_findings_view_rows_classes_and_cautions():
    v = FindingsView(_findings(), topics=("cavitation", "vacuum"))
    text = v.html.value
    for cls in ("hl-pass", "hl-check", "hl-fail"):
        assert f'<tr class="{cls}">' in text
    assert "segment &lt;suction&gt;" in text
    assert "overall: <b>FAIL</b> — 1 pass, 1 check, 1 fail" in text
    assert "licensed professional" in text
    assert CAUTIONS["vacuum"].split(",")[0] in text
    v.set_system("US")
    assert "-1.31 ft" in v.html.value  # 0.4 m / 0.3048 (NIST SP 811)
    v.show([], topics=())
    assert "no checks" in v.html.value and "hl-fail" not in v.html.value.split("</style>")[1]


def test_findings_view_unknown_topic():
    with pytest.raises(KeyError):
        FindingsView([], topics=("meteor strike",))


def test_results_table_html_escapes_and_formats():
    cols = [Column("name", "segment"), Column("Q", "flow", "flow"),
            Column("p", "pressure", "pressure", gauge=True), Column("n", "count")]
    rows = [{"name": "<b>riser</b>", "Q": 150 * GPM, "p": 101325.0 + 10 * PSI, "n": 3},
            {"name": "spare"}]
    text = results_table_html(rows, cols, "US")
    assert "&lt;b&gt;riser&lt;/b&gt;" in text and "<b>riser" not in text
    assert "flow [gpm]" in text and "<td>150</td>" in text
    assert "pressure [psig]" in text and "<td>10.0</td>" in text
    assert text.count("—") == 3
    assert not math.isnan(len(text))

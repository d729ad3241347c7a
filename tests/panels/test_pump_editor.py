"""PumpEditor driven from Python: points in, a fitted pump out, errors beside the table.

Reference: the head curve is a least-squares quadratic, recomputed here with numpy.polyfit on
the points as typed (ordinary least squares, Legendre 1805 / Gauss 1809).
"""

import numpy as np
import pytest

from kit.core.pump import PumpCurve, PumpSet
from kit.panels.pump_editor import PumpEditor, parse_points, pump_doc
from kit.studies.pump_selection import build_pump

DOC = {"name": "P-7", "speed": "1480 rpm", "impeller": "315 mm",
       "flow": ["0 m3/h", "50 m3/h", "100 m3/h", "150 m3/h", "200 m3/h"],
       "head": ["84 m", "82.5 m", "78 m", "70 m", "58.5 m"],
       "efficiency": ["0 %", "48 %", "68 %", "78 %", "76.5 %"],
       "npshr": ["1.5 m", "1.7 m", "2.1 m", "2.9 m", "4.3 m"]}


def events(panel):
    seen = []
    panel.observe(lambda change: seen.append(change["new"]), names="value")
    return seen


def polyfit_head(q_m3h, h_m, Q):
    """Least-squares quadratic through the typed points (numpy.polyfit), at Q [m³/s]."""
    return float(np.polyval(np.polyfit(np.array(q_m3h) / 3600.0, h_m, 2), Q))


def test_loads_a_scenario_table_and_builds_the_same_pump_as_the_scenario():
    ed = PumpEditor(DOC)
    assert ed.valid and isinstance(ed.value, PumpCurve)
    ref = build_pump(DOC, "pumps[0]")
    Q = np.linspace(0, 200 / 3600, 9)
    np.testing.assert_allclose(ed.value.head(Q), ref.head(Q), rtol=1e-12)
    assert [r.flow.value for r in ed.rows] == ["0", "50", "100", "150", "200"]
    assert ed.rows[3].efficiency.value == "78"
    assert ed.doc["flow"][1] == "50 m3/h" and ed.doc["efficiency"][3] == "78 %"


def test_edit_a_point_changes_the_fit_and_fires_one_event():
    ed = PumpEditor(DOC)
    seen = events(ed)
    before = float(ed.value.head(0.04))
    ed.rows[3].head.value = "74"
    assert len(seen) == 1
    heads = [84, 82.5, 78, 74, 58.5]
    assert float(ed.value.head(0.04)) == pytest.approx(
        polyfit_head([0, 50, 100, 150, 200], heads, 0.04), rel=1e-10)
    assert float(ed.value.head(0.04)) != pytest.approx(before, rel=1e-6)
    fig_fit = [t for t in ed.figure.data if t.name == "head, fitted"][0]
    assert max(fig_fit.y) == pytest.approx(float(np.max(ed.value.head(np.linspace(
        0, 200 / 3600, 61)))), rel=1e-12)
    # the residuals shown are those of this fit
    res = ed.value.fit_report()["head"]["max_residual"]
    ref = np.polyval(np.polyfit(np.array([0, 50, 100, 150, 200]) / 3600, heads, 2),
                     np.array([0, 50, 100, 150, 200]) / 3600) - np.array(heads)
    assert res == pytest.approx(float(np.max(np.abs(ref))), rel=1e-8)
    assert "largest residual" in ed.report.value and "hl-bep" in ed.report.value


def test_bad_point_keeps_the_text_and_shows_the_kit_message():
    ed = PumpEditor(DOC)
    ed.rows[1].head.value = "-3"
    assert ed.value is None and not ed.valid and ed.doc is None
    assert ed.rows[1].head.value == "-3"
    # one-based point numbers as the table shows them, no zero-based key path; row marked
    assert "'head, point 2' must be at least 0 m, not -3 m" in ed.error
    assert "pump.head" not in ed.message.value and "hl-error-text" in ed.message.value
    assert "hl-field-error" in ed.rows[1]._dom_classes
    ed.rows[1].head.value = "82.5 m"  # a cell may carry its own unit
    assert ed.valid and ed.message.value == ""
    assert "hl-field-error" not in ed.rows[1]._dom_classes
    ed.rows[2].flow.value = "50"
    assert "duplicates point 2" in ed.error and ed.rows[2].flow.value == "50"
    ed.rows[2].flow.value = "100"
    ed.rows[4].efficiency.value = "130"
    # an efficiency in %, not a fraction with "-"
    assert "'efficiency [%], point 5' must be between 0 and 100 %, not 130 %" in ed.error
    ed.rows[4].efficiency.value = ""
    assert "efficiency [%], point 5" in ed.error and "fill every point" in ed.error
    ed.rows[4].efficiency.value = "abc"
    assert ed.value is None and ed.rows[4].efficiency.value == "abc"


def test_add_and_remove_rows():
    ed = PumpEditor(DOC)
    fitted = ed.value
    ed.add_point.click()
    # a blank row does not break the curve: marked incomplete and left out
    assert len(ed.rows) == 6 and ed.valid and ed.value is not None
    assert np.array_equal(ed.value.flow, fitted.flow) and len(ed.doc["flow"]) == 5
    assert "hl-row-incomplete" in ed.rows[5]._dom_classes
    assert "point 6 is incomplete (no flow or head): left out" in ed.message.value
    ed.set_point(5, flow="230")          # half typed: still left out
    assert ed.valid and len(ed.doc["flow"]) == 5
    ed.set_point(5, flow="230", head="50", efficiency="71", npshr="5.5")
    assert "hl-row-incomplete" not in ed.rows[5]._dom_classes and ed.message.value == ""
    assert ed.valid and ed.value.q_end == pytest.approx(230 / 3600)
    ed.rows[0].remove.click()
    assert len(ed.rows) == 5 and [r.index_label.value for r in ed.rows] == list("12345")
    assert ed.value.flow[0] == pytest.approx(50 / 3600)
    ed.remove_row(0)
    ed.remove_row(0)
    ed.remove_row(0)
    assert len(ed.rows) == 2 and "needs at least 3 datasheet points" in ed.error


def test_paste_csv_replaces_the_table():
    ed = PumpEditor(DOC)
    text = "flow,head,eff,npshr\n0,40,0,1\n36,38,55,1.2\n72;32;72;1.6\n108\t22\t68\t2.4\n"
    ed.paste(text)
    assert len(ed.rows) == 4 and ed.valid
    assert float(ed.value.head(0.02)) == pytest.approx(
        polyfit_head([0, 36, 72, 108], [40, 38, 32, 22], 0.02), rel=1e-10)
    # bad CSV: the text stays in the box, the table is untouched, the message says why
    ed.paste("0,40\n36,thirty-eight\n")
    assert ed.csv.value == "0,40\n36,thirty-eight\n"
    assert "pasted points, line 2" in ed.error and ed.value is None
    assert len(ed.rows) == 4
    ed.read_csv.click()  # the button reads the box
    assert "pasted points, line 2" in ed.error


def test_parse_points():
    assert parse_points("1,2,3\n4,5,6") == [["1", "2", "3"], ["4", "5", "6"]]
    with pytest.raises(Exception, match=r"'pasted points, line 1' must be 2 to 4 numbers"):
        parse_points("1,2,3,4,5")
    with pytest.raises(Exception, match=r"hold no rows of numbers"):
        parse_points("flow,head\n")


def test_units_switch_re_shows_cells_and_keeps_the_pump():
    ed = PumpEditor(DOC)
    q = ed.value.flow.copy()
    ed.flow_unit.value = "L/s"
    assert ed.rows[1].flow.value == "13.89"  # 50 m³/h = 13.888… L/s (definition)
    np.testing.assert_allclose(ed.value.flow, q, rtol=1e-3)
    ed.head_unit.value = "ft"
    assert ed.rows[0].head.value == "275.6"  # 84 m / 0.3048 (definition of the foot)
    assert float(ed.value.head_points[0]) == pytest.approx(84.0, rel=1e-3)


def test_speed_impeller_and_arrangement():
    ed = PumpEditor(DOC)
    ed.speed.set_text("1400 rpm")
    assert ed.value.speed_rpm == pytest.approx(1400.0)
    ed.speed.set_text("fast")
    assert ed.value is None and "pump speed" in ed.speed.error
    ed.speed.set_text("1480 rpm")
    ed.arrangement.value = "parallel"
    assert ed.value is None and "at least 2 pumps" in ed.error
    ed.count.value = 2
    assert isinstance(ed.value, PumpSet) and ed.value.arrangement == "parallel"
    assert ed.doc["count"] == 2
    # flows add at equal head (Karassik et al. 2008, from memory)
    single = build_pump(DOC, "p")
    qh = float(single.flow_at_head(np.array([70.0]))[0])
    assert float(ed.value.head(2 * qh)) == pytest.approx(70.0, rel=1e-9)


def test_assigning_a_pump_shows_its_points():
    ed = PumpEditor()
    assert ed.value is None  # a blank table is refused, not guessed
    p = build_pump(DOC, "p")
    ed.value = p
    assert [r.head.value for r in ed.rows] == ["84", "82.5", "78", "70", "58.5"]
    assert ed.valid
    assert pump_doc(p)["npshr"][0] == "1.5 m"


def test_docstring_examples():
    import doctest

    import kit.panels.pump_editor as mod

    result = doctest.testmod(mod, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0

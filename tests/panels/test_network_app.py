"""The network app built and driven in plain pytest (no kernel): an input changes the results,
a bad value is refused at its own field and the results marked stale, a blank row is left
out, the display-system switch keeps every axis right, and an unedited app hands back its
scenario unchanged.

Independent checks, each named: the quick design solution the schematic shows first against
the study's own design solution (the same network solved twice); axis ranges against the
points drawn on them (read back from the figure); the unit in each axis title against
kit.units.DISPLAY.
"""

from __future__ import annotations

import tomllib

import numpy as np
import pytest

from kit import units
from kit.inputs import network as network_inputs
from kit.inputs.kinds import checked
from kit.notebook import scenario_path
from kit.panels.network_app import NetworkApp, curve_figure, design_solution
from kit.scenario import Scenario

CHW = "fenwick_yard_chilled_water.toml"
RING = "hollin_reach_ring_main.toml"


def demo(name: str):
    """A demo scenario read and checked against the network schema."""
    path = scenario_path(name)
    text = path.read_text(encoding="utf-8")
    return checked(Scenario(tomllib.loads(text), str(path), text=text))


@pytest.fixture(scope="module")
def scenario():
    return demo(CHW)


@pytest.fixture
def app(scenario):
    return NetworkApp(scenario, "SI")


def _row(table, name):
    row = next(r for r in table.rows if r.title == name)
    row.expand()
    return row


def _link_index(doc, name):
    return [x["name"] for x in doc["link"]].index(name)


def test_quick_design_solution_is_the_studys(app, scenario):
    inp = network_inputs.inputs(scenario)
    net, d = design_solution(inp)
    s = app.study.design
    assert net.link_names == s.net.link_names
    np.testing.assert_allclose(d.Q, s.Q, rtol=0, atol=1e-12)
    np.testing.assert_allclose(d.H, s.H, rtol=0, atol=1e-9)


def test_builds_every_view_from_the_study(app):
    names = [t["name"] for t in app.schematic.view.data]
    assert "index circuit" in names and "pump" in names and "control valve" in names
    band = next(t for t in app.schematic.view.data if t["name"] == "index circuit")
    assert len(band["x"]) == 3 * len(app.study.index_circuit) > 0
    assert "CHWP-1" in app.status.value
    assert "TV-1" in app.tables.valves.value and "BV-1" in app.tables.balancing.value
    assert app.findings.value and not app.refusals.stale
    curve = [t["name"] for t in app.curve_plot.data]
    assert "pump CHWP-1" in curve and "design point" in curve


def test_changing_a_branch_changes_its_flow_and_the_scenario(app):
    before = app.study.design.flow("AHU-4 branch")
    row = _row(app.links, "AHU-4 branch")
    row.fields["length"].set_text("120 m")
    assert not app.refusals.stale and app.refusals.error == ""
    doc = app.scenario.doc
    assert doc["link"][_link_index(doc, "AHU-4 branch")]["length"] == "120 m"
    # the branch's loss rises: its flow moves, and the balancing valves are set again
    assert app.study.design.flow("AHU-4 branch") != pytest.approx(before, rel=1e-4)
    assert app.study.settings["BV-4"] != pytest.approx(
        NetworkApp(demo(CHW)).study.settings["BV-4"], rel=1e-3)
    # a control valve's opening is not balanced away: its branch's flow falls
    q_tv = app.study.design.flow("TV-2")
    hover = [t.get("text") for t in app.schematic.view.data if t["name"] == "control valve"]
    _row(app.links, "TV-2").fields["opening"].set_text("40 %")
    assert app.study.design.flow("TV-2") < 0.9 * q_tv
    assert [t.get("text") for t in app.schematic.view.data
            if t["name"] == "control valve"] != hover


def test_a_bad_value_is_refused_at_its_field_and_the_results_marked_stale(app):
    q = app.study.design.flow("TV-2")
    f = _row(app.links, "AHU-2 branch").fields["length"]
    f.set_text("-3 m")
    assert "hl-field-error" in f._dom_classes and f.text == "-3 m"
    assert "more than 0 m" in f.message.value
    assert app.refusals.stale
    for w in (app.schematic, app.tables, app.tables.links, app.tables.valves, app.findings,
              app.curve_view, app.status):
        assert "hl-stale" in w._dom_classes
    assert "last accepted" in app.message.value
    assert app.study.design.flow("TV-2") == q                # the last accepted results stay
    f.set_text("18 m")
    assert not app.refusals.stale and "hl-stale" not in app.schematic._dom_classes


def test_an_unknown_node_is_refused_at_its_row_with_the_nearest_name(app):
    row = _row(app.links, "AHU-1 branch")
    row.from_.value = "supply flor 1"
    assert app.refusals.stale
    assert "hl-field-error" in row.from_._dom_classes
    for other in (row, row.name, row.to):            # marked at its own box only
        assert "hl-field-error" not in other._dom_classes
    assert "did you mean" in row.message.value and "supply floor 1" in row.message.value
    row.from_.value = "supply floor 1"
    assert not app.refusals.stale and row.message.value == ""
    assert "hl-field-error" not in row.from_._dom_classes


def test_a_blank_new_row_is_left_out_and_the_study_still_runs(app):
    n = len(app.scenario.doc["link"])
    app.links.add_row()
    assert not app.refusals.stale
    assert len(app.scenario.doc["link"]) == n
    assert "incomplete" in app.links.rows[-1].message.value
    app.nodes.add_row()
    assert not app.refusals.stale and len(app.scenario.doc["node"]) == len(app.nodes.rows) - 1


def test_a_refused_boundary_pressure_is_shown_at_its_field(app):
    f = app.boundary_fields["boundary.0.pressure"]
    f.set_text("150 kg")
    assert not f.valid and app.refusals.stale
    f.set_text("250 kPa(g)")
    assert not app.refusals.stale
    assert app.scenario.doc["boundary"][0]["pressure"] == "250 kPa(g)"


def _axis_check(fig, system):
    lay = fig["layout"]
    for ax, kind in (("xaxis", "flow"), ("yaxis", "head")):
        unit = units.display_unit(kind, system).replace("**3", "³")
        assert unit in lay[ax]["title"]["text"], (ax, lay[ax]["title"]["text"])
        lo, hi = lay[ax]["range"]
        key = ax[0]
        pts = np.concatenate([np.asarray(t[key], dtype=float) for t in fig["data"]
                              if t.get(key) is not None and len(t[key])])
        pts = pts[np.isfinite(pts)]
        assert lo <= pts.min() + 1e-9 and pts.max() <= hi + 1e-9, (ax, lo, hi, pts.max())


def test_unit_switch_keeps_axes_right(app):
    _axis_check(curve_figure(app.study, "SI"), "SI")
    app.set_system("US")
    fig = {"data": app.curve_plot.data, "layout": app.curve_plot.figure_layout}
    _axis_check(fig, "US")
    assert "gpm" in app.status.value and "psig" in app.status.value
    hover = next(t for t in app.schematic.view.data if t["name"] == "junction")["hovertext"]
    assert "psig" in hover[0] and "[psig]" in app.tables.nodes.value
    assert "Cv" in app.tables.valves.value
    app.set_system("SI")
    fig = {"data": app.curve_plot.data, "layout": app.curve_plot.figure_layout}
    _axis_check(fig, "SI")
    assert "kPa(g)" in app.status.value


def test_unedited_app_gives_its_scenario_back_and_saves_it(app, scenario, tmp_path):
    from kit import scenario as scn

    out = app.to_scenario()
    assert out.doc == scenario.doc
    path = tmp_path / "net.toml"
    app.save_row.path.value = str(path)
    assert app.save_row.save() == path
    again = tomllib.loads(path.read_text(encoding="utf-8"))
    assert again == scenario.doc
    assert scn.dumps(out).startswith("# Invented demo case")     # the comments kept


def test_to_scenario_refuses_while_an_input_is_bad(app):
    from kit.errors import InputError

    _row(app.links, "AHU-3 branch").fields["length"].set_text("lots")
    with pytest.raises(InputError, match="cannot be saved"):
        app.to_scenario()


def test_static_figures_and_summary(app):
    figs = app.static_figures()
    assert len(figs) == 2 and "schematic" in figs[0].layout.title.text
    assert app.summary_text().startswith(app.scenario.title)


def test_the_looped_demo_draws_its_index_node():
    ring = NetworkApp(demo(RING))
    assert ring.study.index_node is not None
    node = next(t for t in ring.schematic.view.data if t["name"] == "index node")
    assert len(node["x"]) == 1

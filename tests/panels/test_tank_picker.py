"""TankPicker driven from Python: widget text in, core Tank and level data out, and its sketch.

Volumes are checked against closed-form solid geometry written in the tests (standard
results: prism, cylinder, ellipsoid of revolution, sphere); the sketch's outline against the
same geometry (chord half-widths of a circle, an ellipse's equation). Unit conversions are
NIST SP 811 exact definitions.
"""

import doctest
import html
import math
import re

import numpy as np
import pytest

from kit import scenario as scn
from kit.core import tank as core_tank
from kit.core.drain import Vent
from kit.core.tank import Head
from kit.errors import InputError, UnitParseError
from kit.notebook import SCENARIOS
from kit.panels import tank_picker as tp
from kit.panels.tank_picker import OutletMark, TankPicker, TankSetup, tank_sketch_svg
from kit.studies import tank_drainage as td

INCH = 0.0254   # exact (NIST SP 811)
FOOT = 0.3048   # exact (NIST SP 811)


def events(panel):
    seen = []
    panel.observe(lambda change: seen.append(change["new"]), names="value")
    return seen


def msg(panel) -> str:
    """Every message the picker shows: its own line, the levels' line and each field's
    (a range refused across inputs is shown beside the field it names)."""
    parts = [panel.message.value, getattr(panel, "levels_message", panel.message).value]
    parts += [f.message.value for f in getattr(panel, "quantity_fields", ())]
    return html.unescape(" ".join(p for p in parts if p))


def demo_setup():
    inp = td.inputs(scn.load(SCENARIOS / "marlow_vale_cip_dump.toml"))
    return TankSetup(inp.tank, inp.start, inp.target, inp.levels, inp.surface, None, inp.vent)


# ------------------------------------------------------------------ value from widgets

def test_default_is_a_flat_vertical_cylinder():
    s = TankPicker().value
    # cylinder V = π D²/4 · L (standard geometry): D 2 m, L 2 m
    assert s.tank.V_total == pytest.approx(math.pi * 2.0**2 / 4 * 2.0, rel=1e-9)
    assert (s.start, s.target, s.levels, s.surface, s.vent) == (1.8, 0.1, (), "vented", None)


def test_diameter_change_fires_one_event_and_rebuilds_the_tank():
    p = TankPicker()
    seen = events(p)
    p.diameter.set_text("1500 mm")
    assert len(seen) == 1
    assert seen[0].tank.V_total == pytest.approx(math.pi * 1.5**2 / 4 * 2.0, rel=1e-9)


def test_horizontal_cylinder_with_ellipsoidal_heads_closed_form():
    p = TankPicker()
    p.shape.value = "horizontal_cylinder"
    p.diameter.set_text("2 m")
    p.length.set_text("5 m")
    p.bottom.kind.value = "ellipsoidal"          # default 2:1, depth D/4
    p.start.set_text("1.9 m")
    t = p.value.tank
    assert t.orientation == "horizontal" and t.head2.kind == "ellipsoidal"
    # shell πR²L plus two half-ellipsoids of revolution, each (2/3)πR²a, a = D/4 (standard)
    R, a = 1.0, 0.5
    assert t.V_total == pytest.approx(math.pi * R * R * 5 + 2 * (2 / 3) * math.pi * R * R * a,
                                      rel=1e-9)
    assert p.top.layout.display == "none" and p.bottom.title.value == "heads (both ends)"


def test_sphere_closed_form_and_hidden_fields():
    p = TankPicker()
    p.shape.value = "sphere"
    p.diameter.set_text("3 m")
    assert p.value.tank.V_total == pytest.approx(4 / 3 * math.pi * 1.5**3, rel=1e-9)  # sphere
    assert p.length.layout.display == "none" and p.bottom.layout.display == "none"


def test_conical_bottom_by_ratio_and_torispherical_top_by_standard():
    p = TankPicker()
    p.bottom.kind.value = "conical"
    assert p.value is None                        # a conical head needs its depth
    assert "depth of conical head" in p.error
    p.bottom.ratio.set_text("0.5")
    p.top.kind.value = "torispherical"
    p.top.standard.value = "DIN 28011"
    t = p.value.tank
    assert t.head1 == Head("conical", ratio=0.5)
    assert (t.head2.f, t.head2.k) == core_tank.TORISPHERICAL_STANDARDS["DIN 28011"]
    # cone of depth a = D/2 = 1 m below the 2 m shell: V = πR²L + πR²a/3 (standard geometry)
    shell_and_cone = math.pi * 1.0 * 2.0 + math.pi * 1.0 * 1.0 / 3
    assert t.volume(1.0 + 2.0) == pytest.approx(shell_and_cone, rel=1e-9)


def test_head_depth_and_ratio_both_given_is_refused_with_the_kits_message():
    p = TankPicker()
    p.bottom.kind.value = "ellipsoidal"
    p.bottom.depth.set_text("400 mm")
    p.bottom.ratio.set_text("0.25")
    assert p.value is None and not p.valid
    assert "is given twice: give depth or ratio, not both" in msg(p)
    p.bottom.ratio.set_text("")
    assert p.value.tank.head1 == Head("ellipsoidal", depth=0.4)


def test_strapping_table_text():
    p = TankPicker()
    p.shape.value = "strapping_table"
    p.table.value = "0 m, 0 m3\n1 m, 2 m3\n3 m, 10 m3"
    p.start.set_text("2.5 m")
    t = p.value.tank
    assert t.shape == "table" and t.levels == (0.0, 1.0, 3.0) and t.volumes == (0.0, 2.0, 10.0)
    assert p.geometry_box.layout.display == "none"
    p.table.value = "0 m, 0 m3\n1 m"
    assert p.value is None and "must be 'level, volume'" in msg(p)


def test_bad_text_keeps_the_text_and_shows_the_message_beside_the_field():
    p = TankPicker()
    p.diameter.set_text("2 kg")
    assert p.value is None
    assert p.diameter.input.value == "2 kg" and "needs a length" in p.diameter.error
    assert "no sketch" in p.sketch.value


def test_levels_of_interest_parse_and_range():
    p = TankPicker()
    p.levels.value = "1.5 m\n500 mm, low-level switch"
    assert [(lbl, round(z, 12)) for lbl, z in p.value.levels] == [("1.5 m", 1.5),
                                                                  ("low-level switch", 0.5)]
    p.levels.value = "1.9 m, above the start"
    assert p.value is None
    assert "'level of interest 'above the start'' must be at least 0.1 m and at most 1.8 m" in msg(p)
    with pytest.raises(UnitParseError, match="levels of interest, line 1"):
        tp.parse_levels("high, switch")


def test_target_above_start_refused():
    p = TankPicker()
    p.target.set_text("1.9 m")
    assert p.value is None and "'target level' must be at least 0 m and less than 1.8 m" in msg(p)


def test_surface_pressure_padded_and_vacuum():
    p = TankPicker(p_baro=100000.0)
    assert p.surface_pressure.layout.display == "none"
    p.surface.value = "padded"
    assert p.surface_pressure.layout.display == ""
    assert p.value is None                   # 0 kPa(g) is not above atmospheric
    # in the field's gauge unit (p_baro 100 kPa here), beside the field
    assert ("'padded surface pressure' must be more than 0 kPa(g) and at most 99900 kPa(g), "
            "not 0 kPa(g)") in msg(p)
    assert "hl-field-error" in p.surface_pressure._dom_classes
    p.surface_pressure.set_text("20 kPa(g)")
    assert p.value.p_surface == pytest.approx(120000.0)       # gauge + barometric
    p.surface.value = "vacuum"
    p.surface_pressure.set_text("60 kPa(a)")
    assert (p.value.surface, p.value.p_surface) == ("vacuum", pytest.approx(60000.0))


def test_vent_empty_is_not_checked_and_a_bore_builds_a_vent():
    p = TankPicker()
    assert p.value.vent is None
    p.vent_diameter.set_text("3 in")
    v = p.value.vent
    assert v.diameter == pytest.approx(3 * INCH) and v.Cd == pytest.approx(0.61)   # NIST SP 811
    assert v.allowable_vacuum == pytest.approx(250.0)
    p.vent_cd.set_text("1.4")
    assert p.value is None and "'vent discharge coefficient Cd' must be more than 0 and at most 1" in msg(p)


# ------------------------------------------------------------------ value to widgets

def test_demo_setup_round_trips_exactly():
    s = demo_setup()
    p = TankPicker(s)
    assert p.value == s
    assert p.bottom.standard.value == "ASME F&D" and p.shape.value == "vertical_cylinder"
    assert p.levels.value.splitlines()[1] == "0.900 m, CIP return nozzle uncovered"
    p2 = TankPicker()
    p2.value = s
    assert p2.value == s


def test_strapping_table_and_custom_torispherical_round_trip():
    t = core_tank.strapping_table([0.2, 1.0, 2.5], [0.1, 1.7, 6.25], name="T-9")
    s = TankSetup(t, 2.0, 0.3, (("mid", 1.2),), "padded", 130000.0, Vent(0.05, 0.7, 500.0))
    p = TankPicker(s)
    assert p.value == s
    t2 = core_tank.vertical_cylinder(1.2, 2.0, Head("torispherical", f=0.9, k=0.12))
    s2 = TankSetup(t2, 1.5, 0.1)
    p.value = s2
    assert p.value == s2 and p.bottom.standard.value == "custom"


def test_set_system_us_keeps_text_and_changes_sketch_units():
    p = TankPicker(demo_setup())
    text = p.start.input.value
    p.set_system("US")
    assert p.start.input.value == text
    assert "7.71 ft" in p.sketch.value        # 2.35 m / 0.3048 (NIST SP 811) = 7.710 ft


# ------------------------------------------------------------------ the sketch

def _points(svg: str) -> np.ndarray:
    m = re.search(r'<polygon points="([^"]+)" fill="none"', svg)
    return np.array([[float(v) for v in p.split(",")] for p in m.group(1).split()])


def test_sketch_of_flat_vertical_cylinder_has_its_proportions():
    svg = tank_sketch_svg(core_tank.vertical_cylinder(1.0, 3.0), 2.4, 0.3)
    pts = _points(svg)
    w, h = np.ptp(pts[:, 0]), np.ptp(pts[:, 1])
    assert w / h == pytest.approx(1.0 / 3.0, rel=1e-3)       # D / L
    rect = re.search(r'class="hl-liquid" x="[^"]+" y="([^"]+)"', svg)
    y_bottom, y_top = pts[:, 1].max(), pts[:, 1].min()
    assert (y_bottom - float(rect.group(1))) / (y_bottom - y_top) == pytest.approx(0.8, abs=2e-3)
    assert svg.count('stroke-dasharray="7,4"') == 1           # the target, dashed


def test_sketch_outline_of_sphere_is_a_circle():
    # a sphere's section at level h has half-width sqrt(h (D - h)) (chord of a circle)
    x, y = tp._outline(core_tank.sphere(2.0))
    half = np.sqrt(np.clip(y * (2.0 - y), 0, None))
    assert np.max(np.abs(np.abs(x) - half)) < 2e-3


def test_sketch_head_profile_of_ellipsoidal_head_is_an_ellipse():
    # a 2:1 ellipsoidal head's meridian: (p/a)² + (r/R)² = 1 (standard geometry)
    p, r = tp._head_profile(2.0, Head("ellipsoidal"))
    assert np.max(np.abs((p / 0.5) ** 2 + (r / 1.0) ** 2 - 1.0)) < 2e-3


def test_outlet_mark_and_levels_on_the_sketch():
    p = TankPicker(demo_setup())
    assert 'class="hl-outlet"' not in p.sketch.value
    p.set_outlet(OutletMark("line", 0.0, 0.0548, "dump line"))
    svg = p.sketch.value
    assert 'class="hl-outlet"' in svg and "dump line" in svg
    assert "low-level switch LS…" in svg and "target 0.0600 m" in svg
    # a side orifice is drawn on the wall; one outside the tank is not drawn
    p.set_outlet(OutletMark("orifice", 1.0, 0.05, "side orifice"))
    assert "side orifice" in p.sketch.value
    p.set_outlet(OutletMark("orifice", 9.0, 0.05, "far away"))
    assert "far away" not in p.sketch.value


@pytest.mark.parametrize("tank", [
    core_tank.horizontal_cylinder(2.0, 5.0, "torispherical"),
    core_tank.horizontal_cylinder(2.0, 5.0, Head("conical", ratio=0.3)),
    core_tank.vertical_cylinder(1.5, 2.0, "spherical", "ellipsoidal"),
    core_tank.strapping_table([0, 1, 2], [0, 1, 5]),
], ids=["horizontal torispherical", "horizontal conical", "vertical hemispherical",
        "strapping table"])
def test_sketch_draws_every_shape(tank):
    svg = tank_sketch_svg(tank, tank.h_max * 0.7, tank.h_max * 0.1, [("mid", tank.h_max / 2)],
                          OutletMark("orifice", tank.h_min, 0.05, "orifice"))
    assert svg.startswith("<svg") and svg.endswith("</svg>")
    pts = _points(svg)
    assert np.all(np.isfinite(pts)) and len(pts) > 20


def test_parse_table_refuses_a_row_without_volume():
    with pytest.raises(InputError, match=r"'strapping table, line 2' must be 'level, volume'"):
        tp.parse_table("0 m, 0 m3\n2 m")
    levels, volumes = tp.parse_table("0 ft, 0 gallon\n1 ft, 100 gallon")
    assert levels[1] == pytest.approx(FOOT) and volumes[1] == pytest.approx(0.3785411784)


def test_docstring_examples_run():
    result = doctest.testmod(tp, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0


def test_vent_note_says_the_vent_bore_when_one_is_given():
    p = TankPicker()
    assert "empty vent bore" in p.vent_note.value
    p.vent_diameter.set_text("3 in")
    note = html.unescape(p.vent_note.value)
    assert "empty vent bore" not in note and "vent bore 76.2 mm," in note   # NIST SP 811
    assert "allowable vacuum 0.25 kPa" in note
    p.set_system("US")
    assert "vent bore 3.00 in," in html.unescape(p.vent_note.value)
    p.vent_diameter.set_text("")
    assert "empty vent bore" in p.vent_note.value

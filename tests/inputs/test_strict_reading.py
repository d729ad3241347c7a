"""Strict reading: every refusal is a typed kit error naming the key path, the value and what
is allowed. Each case below is a bad input a user could write; ids say what it is."""

from __future__ import annotations

import copy
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from raising import raises_exactly

from kit import results
from kit import scenario as scn
from kit.errors import KeyTypeError, ScenarioError, ScenarioFileError, UnknownKeyError

ROOT = Path(__file__).resolve().parents[2]
PUMP = ROOT / "scenarios" / "kestrel_ridge_booster.toml"
LINE = ROOT / "scenarios" / "harlow_flats_diesel_transfer.toml"
TANK = ROOT / "scenarios" / "marlow_vale_cip_dump.toml"
PUMP_TEXT = PUMP.read_text(encoding="utf-8")
LINE_TEXT = LINE.read_text(encoding="utf-8")
TANK_TEXT = TANK.read_text(encoding="utf-8")


def _edit(text: str, old: str, new: str) -> str:
    assert old in text, old
    return text.replace(old, new, 1)


# (id, text, error class, match) — text edits of the demo files as a user would make them
BAD_TEXT = [
    ("pump_elevation filed into [destination] by TOML",
     _edit(PUMP_TEXT, 'pump_elevation = "100.2 m"\n', "").replace(
         '[duty]', 'pump_elevation = "103.5 m"\n\n[duty]'),
     UnknownKeyError, r"'destination.pump_elevation'.*top-level key.*above the first \[table\] header"),
    ("misspelt table [sucton]", _edit(PUMP_TEXT, "[suction]", "[sucton]").replace(
        "[[suction.segments]]", "[[sucton.segments]]"),
     UnknownKeyError, r"'sucton' .*is not a key of the top level; did you mean 'suction'\?"),
    ("misspelt key presure", _edit(PUMP_TEXT, 'pressure = "0 kPa(g)"', 'presure = "0 kPa(g)"'),
     UnknownKeyError, r"'source.presure'.*did you mean 'pressure'\?"),
    ("vapor_margin in a pump scenario", _edit(PUMP_TEXT, "[duty]", '[duty]\nvapor_margin = "2 m"'),
     UnknownKeyError, r"'duty.vapor_margin'.*is not a key of \[duty\] \(keys of \[duty\]: flow"),
    ("unknown top-level key", _edit(PUMP_TEXT, "kind = ", 'colour = "blue"\nkind = '),
     UnknownKeyError, r"'colour'.*is not a key of the top level"),
    ("unknown key in an endpoint", _edit(PUMP_TEXT, 'name = "ridge reservoir"',
                                         'name = "ridge reservoir"\nvolume = "5000 m3"'),
     UnknownKeyError, r"'destination.volume'.*keys of \[destination\]"),
    ("unknown key in a segment", _edit(PUMP_TEXT, 'name = "hillside rise"',
                                       'name = "hillside rise"\nlining = "cement"'),
     UnknownKeyError, r"'discharge.segments\[1\].lining'"),
    ("unknown key in a fitting", _edit(PUMP_TEXT, '{ kind = "valve_gate", label = "isolating valve" }',
                                       '{ kind = "valve_gate", opening = 0.5, label = "x" }'),
     UnknownKeyError, r"'discharge.segments\[0\].fittings\[1\].opening'.*is not a parameter of 'valve_gate'"),
    ("count as text",
     _edit(PUMP_TEXT, 'count = 2, label = "elbows" },\n]\n\n[[discharge.segments]]\nname = "hillside',
           'count = "two", label = "elbows" },\n]\n\n[[discharge.segments]]\nname = "hillside'),
     KeyTypeError, r"'discharge.segments\[0\].fittings\[2\].count'.*must be a whole number, not 'two'"),
    ("count as a fraction", _edit(PUMP_TEXT, "R_D = 3, count = 4", "R_D = 3, count = 2.7"),
     KeyTypeError, r"fittings\[0\].count'.*must be a whole number, not 2.7"),
    ("flammable as text", _edit(LINE_TEXT, "flammable = true", 'flammable = "false"'),
     KeyTypeError, r"'liquid.user.flammable'.*must be true or false \(without quotes\), not 'false'"),
    ("erosional_C as a boolean", _edit(LINE_TEXT, 'vapour_margin = "6 ft"',
                                       'vapour_margin = "6 ft"\nerosional_C = true'),
     KeyTypeError, r"'sizing.erosional_C'.*must be a plain number, not True"),
    ("segments as text", _edit(PUMP_TEXT, "[[suction.segments]]", 'segments = "riser"\n[[x.segments]]'),
     KeyTypeError, r"'suction.segments'.*must be a list of tables"),
    ("a text where a table is expected",
     _edit(_edit(PUMP_TEXT, '[duty]\nflow = "140 m3/h"\nnpsh_application = "water_wastewater"\n', ""),
           "kind = ", 'duty = "140 m3/h"\nkind = '),
     KeyTypeError, r"'duty'.*must be a table of keys"),
    ("bare kPa for a vessel pressure", _edit(PUMP_TEXT, 'pressure = "0 kPa(g)"', 'pressure = "150 kPa"'),
     ScenarioError, r"'source.pressure'.*(g)"),
    ("a number without its unit", _edit(PUMP_TEXT, 'length = "9 m"', "length = 9"),
     KeyTypeError, r"'suction.segments\[0\].length'.*a number with its unit in quotes, e.g. \"9 m\""),
    ("negative length", _edit(PUMP_TEXT, 'length = "9 m"', 'length = "-9 m"'),
     ScenarioError, r"'suction.segments\[0\].length'.*must be more than 0 m, not -9 m"),
    ("temperature difference for a temperature", _edit(PUMP_TEXT, '"4 degC"', '"4 delta_degC"'),
     ScenarioError, r"'liquid.temperature_min'"),
    ("wrong dimension", _edit(PUMP_TEXT, 'flow = "140 m3/h"', 'flow = "140 m"'),
     ScenarioError, r"'duty.flow'.*volumetric flow"),
    ("unknown npsh application", _edit(PUMP_TEXT, '"water_wastewater"', '"sewage"'),
     ScenarioError, r"'duty.npsh_application'.*must be one of 'general'"),
    ("unknown pipe standard", _edit(PUMP_TEXT, 'standard = "asme_b36_10m", nominal = "10"',
                                    'standard = "asme", nominal = "10"'),
     ScenarioError, r"'suction.segments\[0\].pipe.standard'.*must be one of"),
    ("custom bore and catalogue pipe together",
     _edit(PUMP_TEXT, 'pipe = { standard = "asme_b36_10m", nominal = "10"',
           'pipe = { bore = "250 mm", standard = "asme_b36_10m", nominal = "10"'),
     ScenarioError, r"'suction.segments\[0\].pipe.standard'.*cannot be given with bore"),
    ("a catalogue pipe without a schedule",
     _edit(PUMP_TEXT, 'nominal = "10", schedule = "40", ', 'nominal = "10", '),
     ScenarioError, r"'suction.segments\[0\].pipe.schedule'.*is missing"),
    ("nominal as a fraction", _edit(PUMP_TEXT, 'nominal = "10"', "nominal = 2.5"),
     KeyTypeError, r"'suction.segments\[0\].pipe.nominal'.*a nominal size in quotes"),
    ("level and level_low together", _edit(PUMP_TEXT, 'level_low = "98.0 m"',
                                          'level = "98.5 m"\nlevel_low = "98.0 m"'),
     ScenarioError, r"'source.level_low'.*cannot be given together with level"),
    ("temperature and its band together", _edit(PUMP_TEXT, 'temperature_min = "4 degC"',
                                               'temperature = "10 degC"\ntemperature_min = "4 degC"'),
     ScenarioError, r"'liquid.temperature_min'.*cannot be given together with temperature"),
    ("no pumps", PUMP_TEXT.split("[[pumps]]")[0],
     ScenarioError, r"'pumps'.*is missing"),
    ("head list shorter than flows", _edit(PUMP_TEXT, 'head = ["84 m", "82.5 m", ',
                                           'head = ["82.5 m", '),
     ScenarioError, r"'pumps\[0\].head'.*one value per flow point \(6 flows\), not 5"),
    ("pump count above 8", _edit(PUMP_TEXT, 'impeller = "315 mm"',
                                 'impeller = "315 mm"\narrangement = "parallel"\ncount = 9'),
     ScenarioError, r"'pumps\[0\].count'.*must be from 1 to 8, not 9"),
    ("tariff as text", _edit(PUMP_TEXT, "tariff = 0.16", 'tariff = "0.16 EUR"'),
     KeyTypeError, r"'operation.tariff'.*must be a plain number"),
    ("hours beyond a year", _edit(PUMP_TEXT, '"3200 h"', '"9000 h"'),
     ScenarioError, r"'operation.hours_per_year'.*must be from 0 s to 3.16224e\+07 s, not 9000 h"),
    ("flow_min above flow_design", _edit(LINE_TEXT, 'flow_min = "250 gpm"', 'flow_min = "380 gpm"'),
     ScenarioError, r"'sizing.flow_min'.*must not exceed flow_design \(350 gpm\), not 380 gpm"),
    ("sizes as text", _edit(LINE_TEXT, 'schedule = "40"\n', 'schedule = "40"\nsizes = "4"\n'),
     KeyTypeError, r"'sizing.sizes'.*a list of nominal sizes"),
    ("batch file and text together", _edit(LINE_TEXT, 'file = "harlow_flats_line_list.csv"',
                                           'file = "a.csv"\ntext = "tag\\n"'),
     ScenarioError, r"'batch.text'.*cannot be given together with file"),
    ("route points as a table", _edit(LINE_TEXT, "points = [", "pointz = ["),
     UnknownKeyError, r"'route.pointz'.*did you mean 'points'\?"),
    ("tank key for another shape", _edit(TANK_TEXT, 'length = "2.2 m"', 'length = "2.2 m"\nlevels = ["0 m"]'),
     UnknownKeyError, r"'tank.levels'.*does not apply when shape = 'vertical_cylinder'"),
    ("orifice key on a line outlet", _edit(TANK_TEXT, 'type = "line"', 'type = "line"\ncd_key = "sharp"'),
     UnknownKeyError, r"'outlet.cd_key'.*does not apply when type = 'line'"),
    ("vent Cd above 1", _edit(TANK_TEXT, "Cd = 0.61, allowable", "Cd = 1.5, allowable"),
     ScenarioError, r"'drain.vent.Cd'.*must be more than 0 and at most 1, not 1.5"),
    ("a temperature band for a drain-down", _edit(TANK_TEXT, 'temperature = "60 degC"',
                                                  'temperature_min = "50 degC"'),
     UnknownKeyError, r"'liquid.temperature_min'.*computed at one temperature; give 'temperature'"),
    ("head kind misspelt", _edit(TANK_TEXT, 'bottom = { kind = "torispherical"',
                                 'bottom = { kind = "torisperical"'),
     ScenarioError, r"'tank.bottom.kind'.*did you mean 'torispherical'\?"),
    ("level of interest as a number", _edit(TANK_TEXT, '  "1.5 m",', "  1.5,"),
     KeyTypeError, r"'drain.levels_of_interest\[0\]'.*a number with its unit"),
    ("display system unknown", _edit(TANK_TEXT, 'system = "SI"', 'system = "metric"'),
     ScenarioError, r"'display.system'.*must be one of 'SI', 'US', not 'metric'"),
    ("site elevation and barometric pressure together",
     _edit(TANK_TEXT, 'elevation = "85 m"', 'elevation = "85 m"\nbarometric_pressure = "100 kPa"'),
     ScenarioError, r"'site.barometric_pressure'.*cannot be given together with elevation"),
    ("liquid key and user liquid together",
     _edit(LINE_TEXT, 'temperature = "60 degF"', 'temperature = "60 degF"\nkey = "water"'),
     ScenarioError, r"'liquid.user'.*cannot be given together with key"),
    ("unknown schema", _edit(TANK_TEXT, 'schema = "headline-scenario/1"', 'schema = "other/2"'),
     ScenarioError, r"'schema'.*must be 'headline-scenario/1', not 'other/2'"),
    ("unknown kind", _edit(TANK_TEXT, 'kind = "tank_drainage"', 'kind = "surge"'),
     ScenarioError, r"'kind'.*must be one of line_sizing, pump_selection, tank_drainage"),
    ("not TOML", "schema = \n", ScenarioError, r"'\(file\)'.*is not valid TOML"),
    ("nested far too deep", "a = " + "[" * 5000 + "]" * 5000 + "\n",
     ScenarioFileError, r"nested deeper than any scenario"),
    ("nested deeper than the schema", "a = " + "[" * 12 + "]" * 12 + "\n",
     ScenarioFileError, r"nested deeper than any scenario \(at most 8 levels\)"),
]


@pytest.mark.parametrize("text,cls,match", [b[1:] for b in BAD_TEXT], ids=[b[0] for b in BAD_TEXT])
def test_bad_scenario_text_is_refused_naming_the_key(text, cls, match):
    with raises_exactly(cls, match):
        scn.loads(text)


BAD_BYTES = [
    ("UTF-16 file", PUMP_TEXT.encode("utf-16"), r"is UTF-16 text; save it as UTF-8"),
    ("binary file", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", r"holds NUL bytes: it is not a text file"),
    ("Latin-1 file", "title = \"caf\xe9\"\n".encode("latin-1"), r"is not UTF-8 text \(byte 12"),
    ("file over 5 MB", b"# " + b"x" * 5_000_001, r"a scenario file may hold at most 5,000,000 bytes"),
]


@pytest.mark.parametrize("data,match", [b[1:] for b in BAD_BYTES], ids=[b[0] for b in BAD_BYTES])
def test_bad_files_are_refused(tmp_path, data, match):
    p = tmp_path / "bad.toml"
    p.write_bytes(data)
    with raises_exactly(ScenarioFileError, match):
        scn.load(p)


def test_a_utf8_byte_order_mark_is_dropped(tmp_path):
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbf" + PUMP_TEXT.encode("utf-8"))
    assert scn.load(p).doc == scn.loads(PUMP_TEXT).doc


def test_moving_pump_elevation_moves_npsh_available():
    # the demo's trap, fixed: at the top level the key is read (NPSHa falls as the pump rises)
    low = results.compute(scn.loads(PUMP_TEXT))
    high = results.compute(scn.loads(_edit(PUMP_TEXT, 'pump_elevation = "100.2 m"',
                                           'pump_elevation = "103.5 m"')))
    key = "pumps[0].npsh_margin"
    assert high.value(key) == pytest.approx(low.value(key) - 3.3, abs=0.05)


def test_an_edited_document_is_checked_when_read():
    sc = scn.loads(PUMP_TEXT)
    sc.doc["source"]["presure"] = "1 bar(g)"
    with raises_exactly(UnknownKeyError, r"'source.presure'.*did you mean 'pressure'"):
        results.compute(sc)


# ---------------------------------------------------------------- round trips

_EDITS = st.sampled_from([
    ("liquid.temperature_max", ["24 degC", "30 degC", "75 degF", "300 K"]),
    ("duty.flow", ["120 m3/h", "150 m3/h", "600 gpm", "40 l/s"]),
    ("destination.level_high", ["155 m", "157.0 m", "520 ft"]),
    ("operation.tariff", [0.1, 0.25, 0]),
    ("project.revision", ["B", "C", "2"]),
])


@settings(max_examples=25, deadline=None)
@given(_EDITS, st.integers(0, 3))
def test_valid_edits_round_trip_with_identical_results(edit, i):
    path, options = edit
    value = options[i % len(options)]
    sc = scn.loads(PUMP_TEXT, "demo")
    doc = copy.deepcopy(sc.doc)
    node = doc
    *head, last = path.split(".")
    for k in head:
        node = node[k]
    node[last] = value
    edited = scn.Scenario(doc, "demo", text=sc.text)
    text = scn.dumps(edited)                      # written back into the commented text
    again = scn.loads(text, "demo")
    assert again.doc == doc
    assert "# Invented demo case" in text         # the user's comments are kept
    a, b = results.compute(edited), results.compute(again)
    assert [(r.key, r.value) for r in a.values] == [(r.key, r.value) for r in b.values]

"""Scenario files: load, build, round trip, and malformed files naming the key."""

import copy
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from kit import scenario as scn
from kit.errors import ScenarioError, UnknownKeyError

ROOT = Path(__file__).resolve().parent.parent
DEMOS = sorted((ROOT / "scenarios").glob("*.toml"))


def test_three_demo_scenarios_of_each_kind():
    kinds = {scn.load(p).kind for p in DEMOS}
    assert kinds == set(scn.KINDS)
    systems = {scn.load(p).display_system for p in DEMOS}
    assert systems == {"SI", "US"}


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_demo_round_trips_unchanged(path):
    sc = scn.load(path)
    again = scn.loads(scn.dumps(sc))
    assert again.doc == sc.doc
    assert scn.dumps(again) == scn.dumps(sc)


def test_pump_scenario_builds_system():
    sc = scn.load(ROOT / "scenarios" / "kestrel_ridge_booster.toml")
    system = scn.build_system(sc)
    assert system.suction.segments[0].station == "pump suction flange"
    assert [s.station for s in system.discharge.segments][-1] == "reservoir inlet"
    # US Standard Atmosphere 1976 at 240 m: 98.5 kPa (from memory of the table, ±0.2 kPa)
    assert system.p_baro == pytest.approx(98.5e3, abs=200)
    assert system.T_min == pytest.approx(277.15)


values = st.one_of(
    st.text(st.characters(codec="utf-8", exclude_categories=("Cs", "Cc")), max_size=20),
    st.integers(-10**6, 10**6), st.booleans(),
    st.floats(allow_nan=False, allow_infinity=False, width=64))


_PROJECT_KEYS = ("name", "calc_number", "revision", "prepared_by", "date", "checked_by",
                 "client", "note")


@settings(max_examples=60, deadline=None)
@given(st.dictionaries(st.sampled_from(_PROJECT_KEYS), st.text(max_size=40), max_size=6))
def test_any_project_text_round_trips(extra):
    # property: whatever text a user writes in the [project] keys survives load → save → load
    sc = scn.load(DEMOS[0])
    doc = copy.deepcopy(sc.doc)
    doc.setdefault("project", {}).update(extra)
    text = scn.dumps(scn.Scenario(doc))
    assert scn.loads(text).doc == doc
    # and through the comment-keeping writer too
    sc.doc = doc
    assert scn.loads(scn.dumps(sc)).doc == doc


@settings(max_examples=30, deadline=None)
@given(st.from_regex(r"[a-z][a-z_]{0,10}", fullmatch=True), values)
def test_an_unknown_project_key_is_refused(key, value):
    # strict schema: a key the schema does not declare is never accepted silently
    if key in _PROJECT_KEYS:
        return
    sc = scn.load(DEMOS[0])
    doc = copy.deepcopy(sc.doc)
    doc.setdefault("project", {})[key] = value
    with pytest.raises(UnknownKeyError, match=f"project.{key}"):
        scn.loads(scn.dumps(scn.Scenario(doc)))


def _with(path, mutate):
    sc = scn.load(ROOT / "scenarios" / "kestrel_ridge_booster.toml").copy()
    mutate(sc.doc)
    return sc


def _set(path, value):
    def f(doc):
        node = doc
        keys = path.split(".")
        for k in keys[:-1]:
            node = node[int(k)] if k.isdigit() else node[k]
        last = keys[-1]
        if value is KeyError:
            del node[last]
        else:
            node[last] = value
    return f


@pytest.mark.parametrize("path,value,match", [
    ("source.level_low", "98 kg", r"scenario key 'source.level_low'.*needs a length"),
    ("source.level_high", "90 m", r"'high level of 'intake sump'' must be between 98"),
    ("site.elevation", "9000 m", r"scenario key 'site.elevation'.*must be between -500 and 6000"),
    ("liquid.key", "lemonade", r"scenario key 'liquid'.*must be one of 'water'"),
    ("liquid.temperature_max", "150 degC", r"scenario key 'liquid'"),
    ("liquid.temperature_min", KeyError, r"scenario key 'liquid.temperature_min': is missing"),
    ("destination.pressure", "two bar", r"scenario key 'destination.pressure'"),
    ("discharge.segments.0.length", "-5 m", r"'length of segment 'pump header''"),
    ("discharge.segments.0.pipe.nominal", "7", r"scenario key 'discharge.segments\[0\].pipe'"),
    ("discharge.segments.0.name", KeyError, r"'discharge.segments\[0\].name': is missing"),
    ("suction.segments", [], r"'suction.segments': must list at least one segment"),
    ("destination.discharge", "spray", r"'discharge of 'ridge reservoir''"),
])
def test_malformed_scenario_names_the_key(path, value, match):
    sc = _with(path, _set(path, value))
    with pytest.raises(ScenarioError, match=match):
        scn.build_system(sc)


@pytest.mark.parametrize("text,match", [
    ("schema = 'other/2'\nkind = 'line_sizing'\n", r"'schema' in <string>: must be 'headline-scenario/1'"),
    ("schema = 'headline-scenario/1'\nkind = 'boiler'\n", r"'kind' in <string>: must be one of line_sizing"),
    ("schema = 'headline-scenario/1'\nkind = 'line_sizing'\n[display]\nsystem = 'imperial'\n",
     r"'display.system' in <string>: must be one of 'SI', 'US', not 'imperial'"),
    ("kind = = 3", r"is not valid TOML"),
])
def test_malformed_file(text, match):
    with pytest.raises(ScenarioError, match=match):
        scn.loads(text)


def test_missing_file_names_the_path(tmp_path):
    with pytest.raises(ScenarioError, match=r"cannot be read"):
        scn.load(tmp_path / "nope.toml")


def test_user_liquid_constants_and_tables():
    # one value is a constant over the stated temperature range; a list is a table
    doc = {"liquid": {"temperature": "20 degC", "user": {
        "name": "light oil", "temperature": ["0 degC", "50 degC"], "density": "870 kg/m**3",
        "viscosity": ["12 cP", "4 cP"]}}}
    liquid = scn.build_liquid(doc)
    st = liquid.state(293.15)
    assert st.rho == pytest.approx(870.0)
    # log-linear viscosity between the two points, by hand: exp(ln12 + 0.4 (ln4 - ln12))
    import math
    assert st.mu == pytest.approx(math.exp(math.log(12e-3) + 0.4 * math.log(4 / 12)), rel=1e-9)
    assert st.pv is None
    with pytest.raises(ScenarioError, match=r"'liquid.user.density': is missing"):
        scn.build_liquid({"liquid": {"user": {"temperature": ["0 degC", "5 degC"],
                                              "viscosity": "1 cP"}}})

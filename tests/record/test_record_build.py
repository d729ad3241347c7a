"""The record document: header, inputs, results, findings, cautions, stamp and hashes."""

from __future__ import annotations

import hashlib
import json
import math
from importlib import metadata

import pytest
import record_fake_study as fake

from kit import units
from kit.core.findings import CAUTIONS
from kit.record import FORMAT, build_record, write_if_requested, write_record
from kit.record.build import flatten_inputs, result_hash
from kit.record.stamp import canonical_json, jsonable, sha256_of


@pytest.fixture
def record():
    sc = fake.scenario()
    return build_record(sc, fake.compute(sc))


def _independent_sha256(obj) -> str:
    # canonical JSON written out here, not by the code under test: sorted keys, compact
    # separators, UTF-8 (RFC 8785-like; SHA-256 per NIST FIPS 180-4 via hashlib)
    text = json.dumps(obj, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def test_format_and_header(record):
    d = record.data
    assert d["format"] == FORMAT == "headline-record/1"
    h = d["header"]
    assert h["project"] == "Marlow Creek test rig <b>bold</b>"
    assert (h["calc_number"], h["revision"], h["prepared_by"], h["date"]) == (
        "HL-0042", "B", "A. Engineer", "2025-03-14")
    assert h["title"].startswith("Cooling water header")
    assert h["checked_by"] == "" and h["checked_date"] == ""
    assert h["display_system"] == "SI" and h["kind"] == "line_sizing"


def test_inputs_are_the_document_as_written(record):
    rows = {r["key"]: r["text"] for r in record.data["inputs"]}
    assert rows["route.length"] == "120 m"
    assert rows["sizing.flow_design"] == "54 m3/h"
    assert rows["project.calc_number"] == "HL-0042"
    assert record.data["scenario"] == fake.scenario().doc


def test_flatten_arrays_of_tables_and_values():
    doc = {"discharge": {"segments": [{"length": "24 m", "pipe": {"nominal": "4"}},
                                      {"length": "3 m", "fittings": [{"K": 0.5, "count": 2}]}]},
           "liquid": {"user": {"temperature": ["10 degC", "40 degC"]}}, "flag": True, "x": 1.5}
    rows = [(r["key"], r["text"]) for r in flatten_inputs(doc)]
    assert rows == [
        ("discharge.segments[0].length", "24 m"),
        ("discharge.segments[0].pipe.nominal", "4"),
        ("discharge.segments[1].length", "3 m"),
        ("discharge.segments[1].fittings[0].K", "0.5"),
        ("discharge.segments[1].fittings[0].count", "2"),
        ("liquid.user.temperature", "[10 degC, 40 degC]"),
        ("flag", "true"),
        ("x", "1.5"),
    ]


def test_results_carry_si_kind_and_display(record):
    rows = {r["key"]: r for r in record.data["results"]}
    q = rows["design.flow"]
    # 54 m³/h = 0.015 m³/s exactly (arithmetic)
    assert q["value"] == pytest.approx(0.015, rel=1e-12)
    assert (q["kind"], q["si_unit"]) == ("flow", "m**3/s")
    assert q["display"] == units.fmt(0.015, "flow", "SI") == "54.0 m³/h"
    assert rows["pipe.head_loss"]["si_unit"] == "m"


def test_us_display_system():
    text = fake.SCENARIO_TOML.replace('system = "SI"', 'system = "US"')
    sc = fake.scenario(text)
    d = build_record(sc, fake.compute(sc)).data
    q = next(r for r in d["results"] if r["key"] == "design.flow")
    # 0.015 m³/s = 237.75 US gpm (1 US gal = 3.785411784 L, NIST SP 811)
    assert q["display"] == "238 gpm"
    assert d["header"]["display_system"] == "US"


def test_methods_findings_cautions(record):
    d = record.data
    assert [m["name"] for m in d["methods"]] == ["Darcy–Weisbach head loss",
                                                 "Swamee–Jain friction factor"]
    assert all(m["reference"] for m in d["methods"])
    assert [f["severity"] for f in d["findings"]] == ["pass", "check"]
    assert d["findings"][1]["value"] == "NaN"
    assert d["cautions"][0] == CAUTIONS["general"]
    assert CAUTIONS["pump"] in d["cautions"]


def test_general_caution_added_when_study_forgot():
    sc = fake.scenario()
    res = fake.compute(sc)
    res.cautions.clear()
    assert build_record(sc, res).data["cautions"] == [CAUTIONS["general"]]


def test_stamp_versions(record):
    st = record.data["stamp"]
    import kit

    assert st["kit"] == kit.__version__
    for name in ("numpy", "scipy", "fluids", "CoolProp", "pint"):
        assert st["libraries"][name] == metadata.version(name)
    assert st["python"].count(".") == 2
    assert st["built_utc"].endswith("Z") and st["platform"]


def test_hashes_match_an_independent_computation(record):
    d = record.data
    assert d["hashes"]["algorithm"] == "sha256"
    assert d["hashes"]["inputs"] == _independent_sha256(fake.scenario().doc)
    parts = {k: d[k] for k in ("kind", "results", "findings", "methods", "cautions", "tables",
                               "stamp", "selection")}
    assert "edits" not in d  # built from the file as it is
    assert d["hashes"]["results"] == _independent_sha256(parts)


def test_hash_changes_with_any_input_or_result(record):
    d = json.loads(record.to_json())
    before = sha256_of(d["scenario"])
    d["scenario"]["route"]["length"] = "121 m"
    assert sha256_of(d["scenario"]) != before
    r0 = result_hash(d)
    d["results"][0]["value"] *= 1 + 1e-12
    assert result_hash(d) != r0


def test_json_is_strict_and_round_trips(tmp_path, record):
    html_path, json_path = write_record(record, tmp_path / "out", "marlow")
    assert html_path.name == "marlow.html" and json_path.name == "marlow.json"

    def no_constants(name):
        raise AssertionError(f"bare {name} in JSON")

    d = json.loads(json_path.read_text(encoding="utf-8"), parse_constant=no_constants)
    assert d == json.loads(record.to_json())
    for r in d["results"]:
        assert set(r) >= {"key", "label", "value", "kind", "si_unit", "display"}
        assert float(r["value"]) == next(v.value for v in fake.compute(fake.scenario()).values
                                         if v.key == r["key"])


def test_jsonable_handles_numpy_dates_and_nonfinite():
    import datetime as dt

    import numpy as np

    out = jsonable({"a": np.float64(1.25), "b": np.arange(3), "c": dt.date(2025, 3, 14),
                    "d": (float("inf"), -math.inf), 5: None})
    assert out == {"a": 1.25, "b": [0, 1, 2], "c": "2025-03-14", "d": ["Infinity", "-Infinity"],
                   "5": None}
    assert canonical_json({"z": 1, "a": [2]}) == '{"a":[2],"z":1}'


def test_toml_dates_become_iso_text():
    # the strict reader refuses a TOML date where text is asked; a document built in code
    # (or an older file) can still hold one, and the record writes it as ISO 8601 text
    import tomllib

    from kit.scenario import Scenario

    text = fake.SCENARIO_TOML.replace('date = "2025-03-14"', "date = 2025-03-14")
    sc = Scenario(tomllib.loads(text), "marlow_creek.toml")
    d = build_record(sc, fake.compute(sc)).data
    assert d["header"]["date"] == "2025-03-14"
    assert d["scenario"]["project"]["date"] == "2025-03-14"


def test_write_if_requested(tmp_path, monkeypatch):
    sc = fake.scenario()
    res = fake.compute(sc)
    monkeypatch.delenv("HEADLINE_RECORD_DIR", raising=False)
    assert write_if_requested(sc, res) is None
    monkeypatch.setenv("HEADLINE_RECORD_DIR", str(tmp_path))
    monkeypatch.delenv("HEADLINE_RECORD_STEM", raising=False)
    html_path, json_path = write_if_requested(sc, res)
    assert json_path == tmp_path / "marlow_creek.json" and html_path.exists()
    monkeypatch.setenv("HEADLINE_RECORD_STEM", "given")
    assert write_if_requested(sc, res)[1].name == "given.json"


def test_import_is_light():
    """Building and checking a record must not pull in plotly, ipywidgets or CoolProp."""
    import subprocess
    import sys

    code = ("import sys, kit.record, kit.record.check, kit.runner; "
            "print(sorted(m for m in ('plotly', 'ipywidgets', 'CoolProp', 'nbclient') "
            "if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"

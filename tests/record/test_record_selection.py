"""The verdict belongs to the selected design; edited inputs are listed; the record is written
into ``records/`` without an environment variable; verdicts print as words."""

from __future__ import annotations

import json
import math

import pytest
import record_fake_study as fake

from kit.core.findings import Finding, Severity
from kit.errors import RecordError
from kit.record import build_record, input_edits, save_record
from kit.record.check import check_main
from kit.results import Alternative, Results, group_findings, verdict_word
from kit.textout import summary


def _f(sev, subject, quantity="NPSH margin", value=1.0, rule="NPSH margin guideline",
       source="guideline A (from memory)"):
    return Finding(Severity(sev), subject, quantity, value, "m", ">= 1 m", rule, source)


def _pumps() -> Results:
    """Three pumps: A selected and passing, B and C rejected and failing."""
    r = Results("pump_selection", selected="pump 'A'")
    for cond in ("low level", "high level"):
        r.findings.append(_f("pass", f"pump 'A' at {cond}", value=2.5))
        r.findings.append(_f("pass", f"pump 'A' at {cond}", "flow / BEP flow", 1.0,
                             "operating region", "guideline B (from memory)"))
        r.findings.append(_f("fail", f"pump 'B' at {cond}", value=-0.4))
        r.findings.append(_f("fail", f"pump 'C' at {cond}", "flow / BEP flow", 1.45,
                             "operating region", "guideline B (from memory)"))
    r.alternatives += [Alternative("pump 'B'", "NPSH margin below the guideline", "fail"),
                       Alternative("pump 'C'", "runs beyond its allowable region", "fail")]
    r.add("duty.flow", "required flow", 140 / 3600, "flow")
    r.add_verdict("pumps[0].verdict", "A: verdict", "pass")
    r.add_verdict("pumps[1].verdict", "B: verdict", Severity.FAIL)
    return r


def test_verdict_belongs_to_the_selected_design():
    v = _pumps().verdict()
    assert (v.severity, v.word, v.selected, v.governing) == ("pass", "PASS", "pump 'A'", 4)
    assert v.counts == {"pass": 4, "check": 0, "fail": 0}


def test_without_a_selection_every_finding_counts():
    r = _pumps()
    r.selected, r.alternatives = None, []
    assert r.verdict().severity == "fail" and r.verdict().reason == "all findings"


def test_candidates_weighed_but_none_selected_fails():
    r = _pumps()
    r.selected = None
    v = r.verdict()
    assert v.severity == "fail" and "none was selected" in v.reason


def test_alternative_owns_findings_by_subject_text():
    a = Alternative("line 'L2' (what-if)", "slower drain", "check", subjects=("(NPS 3 outlet)",))
    assert a.owns(_f("check", "vent (NPS 3 outlet)"))
    assert not a.owns(_f("check", "vent"))
    assert Alternative("pump 'B'", "x").owns(_f("fail", "pump 'B' at low level"))


def test_group_findings_per_design_worst_condition_first_seen():
    groups = group_findings(_pumps())
    assert [(o, role) for o, role, _ in groups] == [
        ("pump 'A'", "selected"), ("pump 'B'", "alternative"), ("pump 'C'", "alternative")]
    b = groups[1][2]
    assert [(g.quantity, g.n, g.severity) for g in b] == [("NPSH margin", 2, "fail")]
    assert b[0].worst.subject == "pump 'B' at low level"   # first of equals


def test_verdict_words_never_numbers():
    r = _pumps()
    text = summary(None, r, "SI")
    lines = {ln.split("  ")[0]: ln.split()[-1] for ln in text.splitlines() if "verdict" in ln}
    assert lines["A: verdict"] == "PASS" and lines["B: verdict"] == "FAIL"
    assert "VERDICT: PASS — the selected design, pump 'A' (4 pass, 0 check, 0 fail)" in text
    assert "not selected: pump 'B' (FAIL): NPSH margin below the guideline" in text
    assert "2.00" not in text and " 0\n" not in text
    # a study that still reports a verdict as a plain number under a '.verdict' key
    r2 = Results("pump_selection")
    r2.add("pumps[0].verdict", "P-1: verdict (0 pass, 1 check, 2 fail)", 2.0, "dimensionless")
    assert summary(None, r2, "SI").splitlines()[0].endswith("FAIL")
    assert verdict_word(1) == "CHECK" and verdict_word("pass") == "PASS"


def test_full_summary_folds_passes_and_shows_worst():
    text = summary(None, _pumps(), "SI", full=True)
    assert "pump 'A' (selected)" in text and "pump 'B' (not selected)" in text
    assert "PASS  NPSH margin, flow / BEP flow (4 conditions)" in text
    line = next(ln for ln in text.splitlines() if ln.startswith("  FAIL  NPSH margin = -0.4"))
    assert line.endswith(" m (limit >= 1 m) — worst of 2: pump 'B' at low level")


def test_add_verdict_refuses_unknown_words():
    with pytest.raises(KeyError):
        Results("x").add_verdict("v", "v", "maybe")


# ------------------------------------------------------------------ the record


@pytest.fixture
def pump_record():
    sc = fake.scenario()
    return build_record(sc, _pumps())


def test_record_selection_part(pump_record):
    sel = pump_record.data["selection"]
    assert sel["selected"] == "pump 'A'" and sel["verdict"] == "pass"
    assert [a["name"] for a in sel["alternatives"]] == ["pump 'B'", "pump 'C'"]
    assert sel["alternatives"][0]["reason"] == "NPSH margin below the guideline"


def test_record_sheet_summary_page_and_references(pump_record):
    page = pump_record.to_html()
    summary_page = page.split('<section class="summary-page"', 1)[1].split("</section>", 1)[0]
    assert "Verdict: " in summary_page and "✓ PASS" in summary_page
    assert "Selected design: <b>pump &#x27;A&#x27;</b>" in summary_page
    assert "pump &#x27;B&#x27;</b> <span class=\"sev sev-fail\">✗ FAIL</span>: NPSH margin" \
        in summary_page
    assert "Design basis" in summary_page and "Key numbers" in summary_page
    # each rule once in the references list, cited by number in the findings
    refs = page.split('<ol class="refs">', 1)[1].split("</ol>", 1)[0]
    assert refs.count("NPSH margin guideline") == 1 and refs.count("operating region") == 1
    findings = page.split('id="findings"', 1)[1].split('id="results"', 1)[0]
    assert "[1]" in findings and "[2]" in findings
    assert "worst of 2" in findings and "all within their limits" in findings
    # order: summary, findings, inputs, methods and references, cautions
    order = [page.index(x) for x in ('id="summary"', 'id="findings"', 'id="inputs"',
                                     'id="methods"', 'id="cautions"')]
    assert order == sorted(order)
    assert ">FAIL<" not in summary_page.replace("✗ FAIL", "")  # words with their symbol


def test_record_result_verdicts_show_words(pump_record):
    page = pump_record.to_html()
    results = page.split('id="results"', 1)[1].split('id="inputs"', 1)[0]
    assert "<td class=\"num\">PASS</td>" in results and "<td class=\"num\">FAIL</td>" in results


def test_input_edits_lists_changed_added_and_removed():
    file_doc = {"sizing": {"flow_design": "50 m3/h", "duty": "pump_discharge", "note": "a"},
                "route": {"length": "120 m"}}
    nb_doc = {"sizing": {"flow_design": "54 m3/h", "duty": "pump_discharge"},
              "route": {"length": "120  m", "start_elevation": "3 m"}}
    assert input_edits(file_doc, nb_doc) == [
        {"key": "sizing.flow_design", "file": "50 m3/h", "notebook": "54 m3/h"},
        {"key": "route.start_elevation", "file": None, "notebook": "3 m"},
        {"key": "sizing.note", "file": "a", "notebook": None},
    ]
    assert input_edits(file_doc, file_doc) == []


def test_record_from_an_edited_notebook_says_so(tmp_path, monkeypatch):
    src = tmp_path / "marlow_creek.toml"
    src.write_text(fake.SCENARIO_TOML, encoding="utf-8")
    from kit.scenario import load

    sc = load(src)
    edited = sc.copy()
    edited.set("route.length", "60 m")
    rec = build_record(edited, fake.compute(edited))
    assert rec.data["edits"] == {"file": "marlow_creek.toml", "rows": [
        {"key": "route.length", "file": "120 m", "notebook": "60 m"}]}
    page = rec.to_html()
    assert "Inputs edited in the notebook" in page and "1 input(s) were edited" in page
    # the comparison can also be given explicitly, and an unedited scenario has none
    assert "edits" not in build_record(sc, fake.compute(sc)).data
    rec2 = build_record(edited.copy(), fake.compute(edited), base=sc.doc)
    assert rec2.data["edits"]["rows"][0]["key"] == "route.length"
    # the edits are covered by the result hash and the record still checks out
    fake.use_fake_study(monkeypatch)
    from kit.record import write_record

    _, js = write_record(rec, tmp_path / "out", "edited")
    assert check_main([str(js)]) == 0
    d = json.loads(js.read_text(encoding="utf-8"))
    d["edits"]["rows"][0]["file"] = "61 m"
    js.write_text(json.dumps(d), encoding="utf-8")
    assert check_main([str(js)]) == 2


def test_save_record_writes_into_records_beside_the_working_folder(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    monkeypatch.delenv("HEADLINE_RECORD_DIR", raising=False)
    monkeypatch.delenv("HEADLINE_RECORD_STEM", raising=False)
    sc = fake.scenario()
    files = save_record(sc, fake.compute(sc))
    assert files.html == tmp_path.joinpath("records", "marlow_creek.html").relative_to(tmp_path)
    assert (tmp_path / "records" / "marlow_creek.json").is_file()
    assert files.verdict == "check"
    assert str(files).startswith("record written (verdict CHECK): records/marlow_creek.html")
    assert "<code>records/marlow_creek.json</code>" in files._repr_html_()
    html_path, json_path = files  # unpacks like write_record's tuple
    assert json_path.suffix == ".json"
    monkeypatch.setenv("HEADLINE_RECORD_DIR", str(tmp_path / "run"))
    assert save_record(sc, fake.compute(sc)).json == tmp_path / "run" / "marlow_creek.json"


def test_save_record_refuses_an_unwritable_folder(tmp_path, monkeypatch):
    monkeypatch.delenv("HEADLINE_RECORD_DIR", raising=False)
    (tmp_path / "file").write_text("x")
    sc = fake.scenario()
    with pytest.raises(RecordError, match="cannot be written"):
        save_record(sc, fake.compute(sc), folder=tmp_path / "file")
    with pytest.raises(RecordError, match="records folder name is empty"):
        save_record(sc, fake.compute(sc), folder=" ")


def test_finding_without_number_and_dash_unit():
    r = Results("x")
    r.findings.append(Finding(Severity.CHECK, "s", "note", math.nan, "-", "-", "r", "src"))
    assert "CHECK note (limit -)" in summary(None, r, "SI", full=True)


def test_record_carries_a_referenced_line_list_inline(tmp_path, monkeypatch):
    from kit.record import write_record
    from kit.record.check import outside_files
    from kit.scenario import load

    (tmp_path / "lines.csv").write_text("tag,flow\nL-1,10 m3/h\n", encoding="utf-8")
    src = tmp_path / "marlow_creek.toml"
    src.write_text(fake.SCENARIO_TOML + '\n[batch]\nfile = "lines.csv"\n', encoding="utf-8")
    sc = load(src)
    rec = build_record(sc, fake.compute(sc))
    batch = rec.data["scenario"]["batch"]
    assert "file" not in batch and batch["text"].startswith("tag,flow")
    assert outside_files(rec.data["scenario"]) == []
    assert "edits" not in rec.data          # carrying the list inline is not an edit
    _, js = write_record(rec, tmp_path / "out", "with_list")
    (tmp_path / "lines.csv").unlink()       # the check needs nothing beside the record
    fake.use_fake_study(monkeypatch)
    assert check_main([str(js)]) == 0


def test_record_findings_in_the_display_system_with_three_figures():
    text = fake.SCENARIO_TOML.replace('system = "SI"', 'system = "US"')
    sc = fake.scenario(text)
    page = build_record(sc, fake.compute(sc)).to_html()
    findings = page.split('id="findings"', 1)[1].split('id="results"', 1)[0]
    # 54 m³/h in a 4 in Sch 40 bore (102.26 mm, ASME B36.10M, from memory):
    # V = 0.015 m³/s / (π/4 · 0.10226² m²) = 1.826 m/s = 5.99 ft/s (independent arithmetic)
    assert "<td>5.99 ft/s</td>" in findings
    assert "<td>1.826 m/s</td>" not in findings and "1.8264" not in findings

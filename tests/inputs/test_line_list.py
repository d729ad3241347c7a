"""Strict reading of line lists (CSV): structure refused whole, values refused per row.

Independent references used below:
- US gallon = 231 in³ = 3.785411784 L and foot = 0.3048 m, exact by definition (NIST
  Handbook 44, Appendix C); degF → K: (t + 459.67) × 5/9, exact by definition;
- everything else is the kit's own rule for line lists (the module docstring), checked by
  the message each refusal gives.
"""

from __future__ import annotations

import doctest
import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from kit.core.criteria import DUTY_CLASSES
from kit.errors import (
    DimensionError,
    InputError,
    OutOfRangeError,
    ScenarioError,
    ScenarioFileError,
    UnitParseError,
    UnknownChoiceError,
    UnknownKeyError,
)
from kit.inputs import line_list as ll_mod
from kit.inputs.line_list import (
    LINE_LIST_COLUMNS,
    MAX_BYTES,
    MAX_FIELD,
    MAX_ROWS,
    LineList,
    LineRow,
    RowError,
    read_line_list,
    read_line_list_file,
    write_line_list,
)
from tests.raising import raises_exactly

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "scenarios" / "harlow_flats_line_list.csv"
GAL = 3.785411784e-3  # m³, exact (NIST HB 44)
FT = 0.3048           # m, exact (NIST HB 44)
HEAD = "tag,flow,length\n"


def degF(t):
    return (t + 459.67) * 5 / 9


# ------------------------------------------------------------------ the demo list

def test_demo_list_reads_to_si_rows_with_spreadsheet_row_numbers():
    ll = read_line_list(DEMO.read_text(encoding="utf-8"))
    assert [r.tag for r in ll.rows] == [f"HF-10{i}" for i in range(1, 7)]
    assert [r.row for r in ll.rows] == [2, 3, 4, 5, 6, 7]  # header is row 1
    r = ll.rows[0]
    assert r.Q == pytest.approx(350 * GAL / 60, rel=1e-12)
    assert r.L == pytest.approx(1450 * FT, rel=1e-12)
    assert r.rise == pytest.approx(32 * FT, rel=1e-12)
    assert r.T == pytest.approx(degF(60), rel=1e-12)
    assert (r.K, r.duty, r.standard, r.schedule, r.material, r.condition, r.liquid) == (
        9.5, "pump_discharge", "asme_b36_10m", "40", "carbon_steel", "aged", None)
    glycol = ll.rows[5]
    assert (glycol.liquid, glycol.concentration) == ("propylene_glycol_aq", 0.35)
    assert [(e.tag, e.row) for e in ll.errors] == [("HF-107", 8), ("HF-108", 9)]
    assert "batch row 8 (tag HF-107): flow" in ll.errors[0].message
    assert isinstance(ll.errors[0].error, UnitParseError)
    assert "batch row 9 (tag HF-108): duty" in ll.errors[1].message
    assert isinstance(ll.errors[1].error, UnknownChoiceError)
    assert len(ll) == 8
    assert [x.row for x in ll.items()] == list(range(2, 10))


def test_read_from_file_and_bytes_agree_with_text(tmp_path):
    text = DEMO.read_text(encoding="utf-8")
    a = read_line_list(text)
    b = read_line_list_file(DEMO)
    c = read_line_list(text.encode("utf-8"))
    assert a.rows == b.rows == c.rows
    assert [e.message for e in a.errors] == [e.message for e in c.errors]


def test_strict_mode_raises_the_first_bad_row():
    with raises_exactly(UnitParseError, match=r"batch row 8 \(tag HF-107\): flow"):
        read_line_list(DEMO.read_text(encoding="utf-8"), strict=True)


def test_key_path_is_the_callers():
    ll = read_line_list(HEAD + "A,lots,1 m\n", key="lines")
    assert ll.errors[0].message.startswith("'lines row 2 (tag A): flow'")


# ------------------------------------------------------------------ tolerated forms

def test_bom_blank_lines_crlf_spaces_and_quotes_are_read():
    text = ("\ufefftag , flow,length\r\n\r\n"
            " A , 10 gpm , 100 ft \r\n"
            ",,\r\n"
            '"B,2",5 L/s,3 m\r\n')
    ll = read_line_list(text)
    assert [(r.tag, r.row) for r in ll.rows] == [("A", 3), ("B,2", 5)]
    assert ll.rows[0].Q == pytest.approx(10 * GAL / 60)
    assert ll.rows[1].Q == pytest.approx(5e-3)
    assert read_line_list(b"\xef\xbb\xbf" + text[1:].encode()).rows == ll.rows


def test_rows_count_from_the_top_of_the_file_blank_lines_included():
    text = "\n,,\ntag,flow,length\nA,1 gpm,1 m\n\nB,x,1 m\n"
    ll = read_line_list(text)
    assert [(r.tag, r.row) for r in ll.rows] == [("A", 4)]
    assert ll.errors[0].row == 6 and "batch row 6 (tag B): flow" in ll.errors[0].message
    with raises_exactly(UnknownKeyError, match=r"header \(row 3\).*'flwo'"):
        read_line_list("\n\ntag,flwo,length\n")


def test_old_mac_line_ends_read_as_lines():
    ll = read_line_list("tag,flow,length\rA,1 gpm,1 m\rB,2 gpm,1 m")
    assert [(r.tag, r.row) for r in ll.rows] == [("A", 2), ("B", 3)]


def test_absent_and_empty_optional_cells_take_the_defaults():
    a = read_line_list(HEAD + "A,1 L/s,10 m\n").rows[0]
    b = read_line_list("tag,flow,length,rise,temperature,duty,k_total,liquid\n"
                       "A,1 L/s,10 m,,,,,\n").rows[0]
    assert a == b
    assert (a.rise, a.T, a.K, a.duty, a.liquid, a.schedule) == (
        0.0, 293.15, 0.0, "general_transfer", None, "40")


def test_the_caller_may_replace_defaults():
    ll = read_line_list(HEAD + "A,1 L/s,10 m\n", defaults={"temperature": "60 degF",
                                                           "duty": "pump_suction"})
    assert ll.rows[0].T == pytest.approx(degF(60)) and ll.rows[0].duty == "pump_suction"
    bad = read_line_list(HEAD + "A,1 L/s,10 m\n", defaults={"temperature": "hot"})
    assert "batch row 2 (tag A): temperature" in bad.errors[0].message
    with raises_exactly(ScenarioError, match=r"'flow': '1 gpm' is not a default"):
        read_line_list(HEAD, defaults={"flow": "1 gpm"})


def test_columns_in_any_order():
    a = read_line_list("length,tag,flow\n10 m,A,1 L/s\n").rows[0]
    b = read_line_list(HEAD + "A,1 L/s,10 m\n").rows[0]
    assert a == b


def test_bad_rows_are_collected_and_the_rest_read():
    ll = read_line_list(HEAD + "A,1 L/s,10 m\nB,-1 L/s,10 m\nC,2 L/s,ten m\nD,3 L/s,1 m\n")
    assert [r.tag for r in ll.rows] == ["A", "D"]
    assert [(e.tag, e.row) for e in ll.errors] == [("B", 3), ("C", 4)]
    assert all(isinstance(e, RowError) for e in ll.errors)


# ------------------------------------------------------------------ refusals

def _many_rows(n):
    return HEAD + "".join(f"T{i},1 L/s,1 m\n" for i in range(n))


STRUCTURAL = [
    ("misspelt_column", "tag,flwo,length\nA,1 gpm,1 m\n", UnknownKeyError,
     r"column 'flwo' is not a line-list column; did you mean 'flow'\?"),
    ("misspelt_k_total", "tag,flow,length,ktotal\nA,1 gpm,1 m,3\n", UnknownKeyError,
     r"did you mean 'k_total'.*valid columns: tag, flow, liquid"),
    ("unknown_column", "tag,flow,length,colour\nA,1 gpm,1 m,red\n", UnknownKeyError,
     r"'colour' is not a line-list column; valid columns: tag, flow"),
    ("duplicate_column", "tag,flow,length,flow\nA,1 gpm,1 m,2 gpm\n", ScenarioError,
     r"column 'flow' appears twice \(columns 2 and 4\)"),
    ("unnamed_column", "tag,flow,length,\nA,1 gpm,1 m,\n", ScenarioError,
     r"header \(row 1\).*column 4 has no name"),
    ("missing_required_column", "tag,flow\nA,1 gpm\n", ScenarioError,
     r"required column\(s\) length missing"),
    ("no_tag_column", "flow,length\n1 gpm,1 m\n", ScenarioError, r"required column\(s\) tag"),
    ("extra_value", HEAD + "A,1 gpm,1 m\nB,1,200 gpm,1 m\n", ScenarioError,
     r"batch row 3'.*has 4 values; the header \(row 1\) has 3 columns: an extra value"),
    ("missing_value", HEAD + "A,1 gpm\n", ScenarioError,
     r"batch row 2'.*has 2 values.*a value is missing"),
    ("unbalanced_quote_swallows_rows", HEAD + 'A,"1 gpm,1 m\nB,2 gpm,2 m\nC,"3 gpm",3 m\n',
     ScenarioError, r"batch row 2'.*quote"),
    ("unbalanced_quote_at_end", HEAD + 'A,1 gpm,1 m\nB,"2 gpm,2 m\n', ScenarioError,
     r"batch row 3'.*quote that is not closed"),
    ("quoted_field_spanning_rows", HEAD + 'A,"1\ngpm",1 m\nB,2 gpm,2 m\n', ScenarioError,
     r"batch row 2'.*runs on to row 3"),
    ("text_after_closing_quote", HEAD + 'A,"1 gpm"x,1 m\n', ScenarioError,
     r"batch row 2'.*text after a closing quote"),
    ("duplicate_tag", HEAD + "A,1 gpm,1 m\nB,1 gpm,1 m\nA,2 gpm,1 m\n", ScenarioError,
     r"batch row 4'.*repeats tag 'A' of row 2"),
    ("empty_tag", HEAD + "A,1 gpm,1 m\n ,1 gpm,1 m\n", ScenarioError,
     r"batch row 3'.*empty tag"),
    ("control_character_in_tag", HEAD + "A\x07,1 gpm,1 m\n", ScenarioError,
     r"batch row 2'.*control character"),
    ("huge_field", HEAD + "A," + "1" * (MAX_FIELD + 1) + " gpm,1 m\n", ScenarioError,
     r"batch row 2'.*field 2 is 1,005 characters long; at most 1,000"),
    ("field_beyond_csv_limit", HEAD + 'A,"' + "x" * 200_000 + '",1 m\n', ScenarioError,
     r"batch row 2'.*longer than 1,000 characters"),
    ("empty_text", "\n\n", ScenarioError, r"line list is empty"),
    ("nul_in_text", HEAD + "A,1 gpm,1\x00 m\n", ScenarioFileError, r"row 2 holds a NUL byte"),
    ("too_many_rows", _many_rows(MAX_ROWS + 1), ScenarioFileError,
     r"200,001 rows; at most 200,000"),
    ("not_text", 12, ScenarioError, r"must be CSV text, not int"),
]


@pytest.mark.parametrize("text,cls,match", [s[1:] for s in STRUCTURAL],
                         ids=[s[0] for s in STRUCTURAL])
def test_structural_faults_refuse_the_whole_list(text, cls, match):
    with raises_exactly(cls, match=match):
        read_line_list(text)


BYTES = [
    ("binary_nul", b"tag,flow,length\n\x00\x01\x02", r"NUL bytes: it is not a text file"),
    ("utf16", "tag,flow,length\n".encode("utf-16"), r"UTF-16 text; save it as UTF-8"),
    ("latin1", "tag,flow,length\nA°,1 gpm,1 m\n".encode("latin-1"), r"not UTF-8 text"),
    ("too_large", b"x" * (MAX_BYTES + 1), r"20,000,001 bytes; at most 20,000,000"),
]


@pytest.mark.parametrize("data,match", [s[1:] for s in BYTES], ids=[s[0] for s in BYTES])
def test_files_that_are_not_utf8_text_of_a_sane_size_are_refused(data, match):
    with raises_exactly(ScenarioFileError, match=match):
        read_line_list(data)


def test_a_too_large_file_is_refused_before_it_is_read(tmp_path):
    p = tmp_path / "big.csv"
    with p.open("wb") as f:
        f.truncate(MAX_BYTES + 10)
    with raises_exactly(ScenarioFileError, match=r"big.csv is 20,000,010 bytes"):
        read_line_list_file(p)


def test_a_missing_file_is_refused_naming_it(tmp_path):
    with raises_exactly(ScenarioError, match=r"line list nope.csv cannot be read"):
        read_line_list_file(tmp_path / "nope.csv")


VALUES = [
    ("bad_unit", "A,350 gallons per fortnight,1 m", UnitParseError, r"\(tag A\): flow'"),
    ("no_unit", "A,350,1 m", UnitParseError, r"\(tag A\): flow'"),
    ("empty_flow", "A,,1 m", UnitParseError, r"\(tag A\): flow'"),
    ("word_for_flow", "A,lots,1 m", UnitParseError, r"\(tag A\): flow'.*not 'lots'"),
    ("negative_flow", "A,-5 gpm,1 m", OutOfRangeError,
     r"'batch row 2 \(tag A\): flow' must be between 0 and 100 m\*\*3/s"),
    ("zero_length", "A,5 gpm,0 m", OutOfRangeError, r"\(tag A\): length' must be between 0"),
    ("flow_in_a_length_unit", "A,5 m,1 m", DimensionError, r"\(tag A\): flow'"),
    ("rise_above_length", "A,5 gpm,10 m,11 m", OutOfRangeError,
     r"\(tag A\): rise' must be between -10 and 10 m"),
    ("temperature_below_absolute_zero", "A,5 gpm,10 m,,-500 degF", OutOfRangeError,
     r"\(tag A\): temperature'"),
    ("k_total_word", "A,5 gpm,10 m,,,,two", InputError,
     r"\(tag A\): k_total' must be a plain number"),
    ("k_total_with_unit", "A,5 gpm,10 m,,,,3 m", InputError, r"k_total' must be a plain number"),
    ("k_total_negative", "A,5 gpm,10 m,,,,-1", OutOfRangeError,
     r"k_total' must be between 0 and 10000"),
    ("unknown_duty", "A,5 gpm,10 m,,,boiling_duty", UnknownChoiceError,
     r"\(tag A\): duty' must be one of 'pump_suction'"),
    ("unknown_schedule", "A,5 gpm,10 m,,,,,,asme_b36_10m,41", UnknownChoiceError,
     r"\(tag A\): schedule' must be one of .*'40'.*not '41'"),
    ("schedule_of_another_standard", "A,5 gpm,10 m,,,,,,astm_d1785,STD", UnknownChoiceError,
     r"\(tag A\): schedule' must be one of '40', '80', '120'"),
    ("unknown_standard", "A,5 gpm,10 m,,,,,,asme_b99,40", UnknownChoiceError,
     r"\(tag A\): standard' must be one of 'asme_b36_10m'"),
    ("unknown_material", "A,5 gpm,10 m,,,,,,,,unobtainium", UnknownChoiceError,
     r"\(tag A\): material' must be one of 'carbon_steel'"),
    ("unknown_condition", "A,5 gpm,10 m,,,,,,,,,rusty", UnknownChoiceError,
     r"\(tag A\): condition' must be one of 'new', 'aged'"),
    ("unknown_liquid", "A,5 gpm,10 m,,,,,diesel", UnknownChoiceError,
     r"\(tag A\): liquid' must be one of 'scenario', 'water'"),
    ("concentration_out_of_range", "A,5 gpm,10 m,,,,,propylene_glycol_aq:0.95", InputError,
     r"\(tag A\): liquid' is not a catalogue liquid as written.*concentration"),
    ("concentration_missing", "A,5 gpm,10 m,,,,,propylene_glycol_aq", InputError,
     r"\(tag A\): liquid' is not a catalogue liquid as written.*required"),
    ("scenario_with_concentration", "A,5 gpm,10 m,,,,,scenario:0.3", InputError,
     r"\(tag A\): liquid' takes no concentration"),
]
VALUE_HEAD = ("tag,flow,length,rise,temperature,duty,k_total,liquid,standard,schedule,"
              "material,condition\n")


@pytest.mark.parametrize("line,cls,match", [s[1:] for s in VALUES], ids=[s[0] for s in VALUES])
def test_bad_values_are_refused_per_row_with_row_and_tag(line, cls, match):
    cols = VALUE_HEAD.strip().split(",")
    cells = line.split(",")
    text = ",".join(cols[:len(cells)]) + "\n" + line + "\n" + "Z,1 L/s,1 m" + "," * (
        len(cells) - 3) + "\n"
    ll = read_line_list(text)
    assert [r.tag for r in ll.rows] == ["Z"]  # the other rows go on
    with raises_exactly(cls, match=match):
        ll.raise_first()
    assert "batch row 2 (tag A)" in ll.errors[0].message
    with raises_exactly(cls, match=match):
        read_line_list(text, strict=True)


def test_the_schedule_is_checked_against_its_own_standard():
    ok = read_line_list("tag,flow,length,standard,schedule\nA,1 gpm,1 m,astm_d1785,80\n")
    assert ok.rows[0].schedule == "80" and not ok.errors


def test_every_choice_of_the_registries_is_accepted():
    rows = [f"D{i},1 L/s,1 m,{d}" for i, d in enumerate(DUTY_CLASSES)]
    ll = read_line_list("tag,flow,length,duty\n" + "\n".join(rows))
    assert [r.duty for r in ll.rows] == list(DUTY_CLASSES) and not ll.errors


# ------------------------------------------------------------------ fast path = one by one

def test_a_whole_list_reads_as_its_rows_read_one_by_one():
    """The column-wise reading of a list and each row read alone agree exactly (values,
    errors and their messages), on a list mixing good and bad cells of every kind."""
    import random

    rnd = random.Random(11)
    good = {
        "flow": ["350 gpm", "12 L/s", "40 m**3/h", "1e-3 m**3/s", ".5 gpm", "+3 gpm"],
        "length": ["1450 ft", "10 m", "2e3 ft"],
        "rise": ["", "5 ft", "-2 m"],
        "temperature": ["", "60 degF", "15 degC", "300 K"],
        "k_total": ["", "1.5", "0"],
        "liquid": ["scenario", "water", "", "propylene_glycol_aq:0.3"],
        "duty": ["", "pump_suction", "gravity_drain"],
        "schedule": ["", "40", "80", "STD"],
        "condition": ["", "new", "aged"],
    }
    bad = {
        "flow": ["-4 gpm", "abc", "5 m", "1e999 gpm", ""],
        "length": ["0 m", "x", "5"],
        "rise": ["3000 m", "1 gpm"],
        "temperature": ["-500 degF", "10 delta_degC", "hot"],
        "k_total": ["-1", "2 m", "1e5", "nan"],
        "liquid": ["propylene_glycol_aq", "brine_x", "water:0.2"],
        "duty": ["nope"],
        "schedule": ["41", "sch 40"],
        "condition": ["old"],
    }
    cols = ["tag"] + list(good)
    lines = [",".join(cols)]
    for i in range(400):
        lines.append(",".join([f"R{i}"] + [rnd.choice(bad[c] if rnd.random() < 0.04
                                                      else good[c]) for c in good]))
    whole = read_line_list("\n".join(lines))
    by_row = {r.row: r for r in whole.rows}
    errs = {e.row: e for e in whole.errors}
    assert len(by_row) > 30 and len(errs) > 30
    from kit import units
    from kit.errors import HeadlineError

    reader = ll_mod._Reader()  # the cell-by-cell reading (units.parse per cell), the reference
    for n, line in enumerate(lines[1:], start=2):
        cells = dict(zip(cols, [c.strip() for c in line.split(",")], strict=True))
        try:
            ref = ll_mod._row(reader, cells, n, "batch")
        except HeadlineError as exc:
            assert type(errs[n].error) is type(exc) and errs[n].message == str(exc)
            continue
        assert by_row[n] == ref
        assert ref.Q == pytest.approx(units.parse(cells["flow"], "flow"), rel=1e-12)
        assert ref.L == pytest.approx(units.parse(cells["length"], "length"), rel=1e-12)
        one = read_line_list(lines[0] + "\n" + line)
        assert one.rows[0] == LineRow(*[getattr(ref, f) if f != "row" else 2
                                        for f in ref.__slots__])


# ------------------------------------------------------------------ round trip

_tags = st.text(alphabet=st.characters(whitelist_categories=("L", "N"),
                                       whitelist_characters="-_ ,\"'/."),
                min_size=1, max_size=12).map(str.strip).filter(bool)


@st.composite
def _rows(draw):
    n = draw(st.integers(1, 12))
    tags = draw(st.lists(_tags, min_size=n, max_size=n, unique=True))
    out = []
    for i, tag in enumerate(tags):
        L = draw(st.floats(1e-3, 1e5))
        std, sched, mat = draw(st.sampled_from([
            ("asme_b36_10m", "40", "carbon_steel"), ("asme_b36_10m", "80", "carbon_steel"),
            ("astm_d1785", "80", "pvc")]))
        liquid = draw(st.sampled_from([(None, None), ("water", None),
                                       ("propylene_glycol_aq", 0.3)]))
        out.append(LineRow(tag, i + 2, draw(st.floats(1e-6, 100.0)), L,
                           draw(st.floats(-1.0, 1.0)) * L, draw(st.floats(250.0, 400.0)),
                           draw(st.floats(0.0, 1e4)), draw(st.sampled_from(list(DUTY_CLASSES))),
                           std, sched, mat, draw(st.sampled_from(["new", "aged"])), *liquid))
    return out


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_rows())
def test_random_valid_lists_round_trip_through_csv(rows):
    text = write_line_list(rows)
    back = read_line_list(text)
    assert not back.errors
    assert back.rows == tuple(rows)
    assert back.columns == LINE_LIST_COLUMNS
    assert LineList.from_rows(rows).rows == tuple(rows)


def test_write_refuses_an_unknown_column():
    with raises_exactly(ScenarioError, match=r"cannot write column 'colour'"):
        write_line_list([], ("tag", "colour"))


def test_columns_are_numpy_arrays_in_si():
    ll = read_line_list(HEAD + "A,60 gpm,1 ft\nB,1 L/s,2 m\n")
    assert isinstance(ll.Q, np.ndarray) and ll.Q.dtype == float
    np.testing.assert_allclose(ll.Q, [60 * GAL / 60, 1e-3], rtol=1e-12)
    np.testing.assert_allclose(ll.L, [FT, 2.0], rtol=1e-12)
    assert ll.row.tolist() == [2, 3]
    assert not math.isnan(ll.T[0])


def test_docstring_examples():
    result = doctest.testmod(ll_mod, optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0 and result.failed == 0

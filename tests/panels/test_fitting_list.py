"""FittingList driven from Python: rows in, Fitting tuples and the K column out.

Skipped until ``kit.core.fittings`` exists. The K column is the core's own number (this tests
the wiring); the one reference check is the definition of a fixed-K row: count × K.
"""

import numpy as np
import pytest

fittings = pytest.importorskip("kit.core.fittings")

from kit.panels.fitting_list import FittingList  # noqa: E402

KINDS = list(fittings.FITTING_KINDS)
PARAMS = [(k, p.name) for k in KINDS for p in fittings.FITTING_KINDS[k].params if not p.choices]
CHOICES = [(k, p.name) for k in KINDS for p in fittings.FITTING_KINDS[k].params if p.choices]
COND = {"Re": 1.0e5, "D": 0.1023, "roughness": 4.5e-5}


def events(panel):
    seen = []
    panel.observe(lambda change: seen.append(change["new"]), names="value")
    return seen


def _fixed(K=0.5, count=2, label="strainer"):
    return fittings.Fitting("fixed_k", count, {"K": K}, label)


def test_fixed_k_row_shows_count_times_k():
    fl = FittingList([_fixed()], **COND)
    assert fl.value == (_fixed(),)
    assert "K = 1<" in fl.rows[0].k.value  # 2 × 0.5: definition of a fixed K per fitting
    assert "total K = 1<" in fl.total.value


def test_add_duplicate_remove_and_count_fire_one_event_each():
    fl = FittingList([_fixed()], **COND)
    seen = events(fl)
    fl.add.click()
    # empty K: not guessed; the row is marked incomplete and left out, the list stays valid
    assert len(fl.rows) == 2 and fl.value == (_fixed(),) and fl.valid
    assert "hl-row-incomplete" in fl.rows[1]._dom_classes and "left out" in \
        fl.rows[1].message.value
    assert seen == []                      # the value did not change: no event
    fl.rows[1].fields["K"].set_text("0.3")
    assert fl.value[1] == fittings.Fitting("fixed_k", 1, {"K": 0.3}) and len(seen) == 1
    fl.rows[0].duplicate.click()
    assert len(fl.rows) == 3 and fl.value[1] == fl.value[0] and len(seen) == 2
    fl.rows[1].remove.click()
    assert len(fl.rows) == 2 and len(seen) == 3
    fl.rows[0].count.value = 5
    assert fl.value[0].count == 5 and len(seen) == 4


@pytest.mark.parametrize("kind", KINDS)
def test_each_kind_builds_its_parameter_fields_and_method(kind):
    fl = FittingList([_fixed()], **COND)
    row = fl.rows[0]
    row.kind.value = kind
    specs = fittings.FITTING_KINDS[kind].params
    assert list(row.fields) == [p.name for p in specs if not p.choices]
    assert list(row.choices) == [p.name for p in specs if p.choices]
    assert row.method.value  # the method applied is shown
    if fl.value:
        K = fittings.fitting_K(fl.value[0], np.array([COND["Re"]]), COND["D"], COND["roughness"])
        assert f"K = {float(K[0]):.3g}<" in row.k.value


@pytest.mark.parametrize("text", ["abc", "12 kg/s", "1e999", "--2"])
@pytest.mark.parametrize(("kind", "name"), PARAMS)
def test_bad_parameter_text_shows_message_and_keeps_text(kind, name, text):
    fl = FittingList([_fixed()], **COND)
    row = fl.rows[0]
    row.kind.value = kind
    field = row.fields[name]
    field.set_text(text)
    assert field.input.value == text
    assert fl.value is None and fl.valid is False
    assert field.message.value and field.field in field.error


@pytest.mark.parametrize(("kind", "name"), CHOICES)
def test_choice_parameters_are_dropdowns_of_the_kinds_choices(kind, name):
    fl = FittingList([_fixed()], **COND)
    row = fl.rows[0]
    row.kind.value = kind
    spec = next(p for p in fittings.FITTING_KINDS[kind].params if p.name == name)
    assert tuple(row.choices[name].options) == tuple(str(c) for c in spec.choices)
    row.choices[name].value = str(spec.choices[-1])
    if fl.value:
        assert fl.value[0].params[name] == spec.choices[-1]


def test_set_value_and_conditions():
    fl = FittingList()
    assert fl.value == ()
    seen = events(fl)
    fl.value = [_fixed(1.5, 1, "")]
    assert fl.value == (_fixed(1.5, 1, ""),) and len(seen) == 1
    assert "no flow conditions" in fl.total.value
    fl.set_conditions(**COND)
    assert "total K = 1.5<" in fl.total.value
    fl.set_system("US")
    assert "4.028 in" in fl.total.value  # 102.3 mm / 25.4 (NIST SP 811)


def test_refuses_wrong_type():
    with pytest.raises(TypeError, match="Fitting"):
        FittingList(["a gate valve"])


def test_k_below_zero_is_refused_at_the_row_and_cleared_by_the_next_edit():
    fl = FittingList([_fixed()], **COND)
    row = fl.rows[0]
    row.fields["K"].set_text("-1")
    assert fl.value is None and not fl.valid
    k = row.fields["K"]
    assert "must be at least 0 and at most 10000, not -1" in k.message.value   # beside the K box
    assert "hl-field-error" in row._dom_classes and "hl-field-error" in k._dom_classes
    k.set_text("0.4")
    assert fl.value == (_fixed(0.4),) and k.message.value == ""
    assert "hl-field-error" not in row._dom_classes


def test_changing_a_rows_kind_and_back_keeps_what_was_typed():
    fl = FittingList([_fixed(0.7)], **COND)
    row = fl.rows[0]
    row.fields["K"].set_text("0.75")
    other = next(k for k in KINDS if k != "fixed_k")
    row.kind.value = other
    row.kind.value = "fixed_k"
    assert row.fields["K"].text == "0.75" and fl.value[0].params["K"] == 0.75


def test_a_blank_row_added_does_not_break_the_list():
    fl = FittingList([_fixed()], **COND)
    fl.add.click()
    assert fl.valid and fl.value == (_fixed(),)
    assert "total K = 1<" in fl.total.value and "K = —" in fl.rows[1].k.value

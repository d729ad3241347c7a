"""Pipes catalogue and roughness table: dimensions against the standards, traps refused."""

from __future__ import annotations

import dataclasses
import math

import pytest
from raising import raises_exactly

from kit.core.pipes import (
    NPS_TO_DN,
    STANDARDS,
    Pipe,
    catalogue_pipe,
    custom_pipe,
    dn_label,
    nominal_sizes,
    nps_text,
    schedules,
    standards,
)
from kit.core.roughness import ROUGHNESS, materials, roughness
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

INCH = 0.0254
FOOT = 0.3048


# ------------------------------------------------------------------ dimensions

@pytest.mark.parametrize("nps, sched, id_in", [
    pytest.param("2", "40", 2.067, id="NPS 2 Sch 40 ID 2.067 in (ASME B36.10M, from memory)"),
    pytest.param("4", "40", 4.026, id="NPS 4 Sch 40 ID 4.026 in (ASME B36.10M, from memory)"),
    pytest.param("6", "40", 6.065, id="NPS 6 Sch 40 ID 6.065 in (ASME B36.10M, from memory)"),
    pytest.param("8", "80", 7.625, id="NPS 8 Sch 80 ID 7.625 in (ASME B36.10M, from memory)"),
    pytest.param("1", "40", 1.049, id="NPS 1 Sch 40 ID 1.049 in (ASME B36.10M, from memory)"),
])
def test_steel_bores_match_b36_10m(nps, sched, id_in):
    p = catalogue_pipe("asme_b36_10m", nps, sched, "carbon_steel")
    # fluids tabulates the metric edition; rounding differences are below 0.002 in.
    assert p.Di / INCH == pytest.approx(id_in, abs=0.002)


def test_b36_10m_outside_diameter_and_wall():
    p = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
    # ASME B36.10M NPS 4: OD 4.500 in, Sch 40 wall 0.237 in (from memory).
    assert p.Do / INCH == pytest.approx(4.500, abs=0.001)
    assert p.wall / INCH == pytest.approx(0.237, abs=0.001)
    # Independent check: Di = Do - 2 t.
    assert p.Di == pytest.approx(p.Do - 2 * p.wall, abs=1e-5)


def test_pvc_schedules_exist_and_share_ips_od():
    assert schedules("astm_d1785", "2") == ["40", "80", "120"]
    p = catalogue_pipe("astm_d1785", "2", "40", "pvc")
    # ASTM D1785 uses IPS outside diameters: NPS 2 OD 2.375 in (from memory).
    assert p.Do / INCH == pytest.approx(2.375, abs=0.001)
    assert "SDR 21" in schedules("astm_d2241", "4")


def test_awwa_c900_uses_cast_iron_od():
    p = catalogue_pipe("awwa_c900", "4", "DR 18", "pvc")
    # AWWA C900 CI-OD 4 in: OD 4.80 in (from memory); DR 18 → wall = OD/18.
    assert p.Do / INCH == pytest.approx(4.80, abs=0.01)
    assert p.wall == pytest.approx(p.Do / 18, rel=0.01)


def test_bs_1387_is_browsed_by_dn():
    assert nominal_sizes("bs_1387")[:3] == ["8", "10", "15"]
    p = catalogue_pipe("bs_1387", "DN 15", "Medium", "galvanised_steel")
    # BS 1387 medium DN 15: wall 2.6 mm (from memory).
    assert p.wall * 1e3 == pytest.approx(2.6, abs=0.01)
    assert p.label == "DN 15 Medium (NPS 1/2), BS 1387"


def test_cpvc_f441_is_browsed_by_nps_not_dn():
    p = catalogue_pipe("astm_f441", "1/2", "40", "pvc")
    # IPS OD of NPS 1/2 is 0.840 in (ASTM F441 / ASME B36.10M, from memory).
    assert p.Do / INCH == pytest.approx(0.840, abs=0.001)


def test_hdpe_dr_class():
    p = catalogue_pipe("astm_f2619", "4", "DR 11", "hdpe")
    # DR = OD / minimum wall: DR 11 (definition of DR, common practice, no source).
    assert p.Do / p.wall == pytest.approx(11.0, rel=0.02)


def test_every_standard_browses_to_a_pipe():
    for key, label in standards():
        assert key in STANDARDS and label
        sizes = nominal_sizes(key)
        assert sizes
        for nominal in (sizes[0], sizes[-1]):
            for sched in schedules(key, nominal):
                p = catalogue_pipe(key, nominal, sched, "pvc")
                assert 0 < p.Di < p.Do
                assert p.label.endswith(STANDARDS[key].short)


def test_nominal_sizes_sorted():
    values = nominal_sizes("asme_b36_10m")
    assert values[:6] == ["1/8", "1/4", "3/8", "1/2", "3/4", "1"]
    assert "2-1/2" in values and "1-1/4" in values


# ------------------------------------------------------------------ DN labels

@pytest.mark.parametrize("nps, dn", [
    (0.5, 15), (0.75, 20), (1.0, 25), (1.25, 32), (1.5, 40), (2.0, 50), (2.5, 65), (3.0, 80),
    (4.0, 100), (6.0, 150), (8.0, 200), (10.0, 250), (12.0, 300), (14.0, 350), (24.0, 600),
    (48.0, 1200),
], ids=lambda v: str(v))
def test_dn_labels(nps, dn):
    # ISO 6708 / common practice NPS ↔ DN correspondence (from memory).
    assert dn_label(nps) == f"DN {dn}"


def test_every_nps_in_the_catalogue_has_a_dn():
    for s in STANDARDS.values():
        if s.sizing != "NPS":
            continue
        for nominal in nominal_sizes(s.key):
            sched = schedules(s.key, nominal)[0]
            assert "(DN " in catalogue_pipe(s.key, nominal, sched, "pvc").label
    assert NPS_TO_DN[4.0] == 100


def test_label_and_nps_text():
    assert catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel").label == \
        "NPS 4 Sch 40 (DN 100), ASME B36.10M"
    assert catalogue_pipe("asme_b36_19m", "2", "10S", "stainless_steel").label == \
        "NPS 2 Sch 10S (DN 50), ASME B36.19M"
    assert catalogue_pipe("astm_d2241", "4", "SDR 21", "pvc").label == \
        "NPS 4 SDR 21 (DN 100), ASTM D2241"
    assert nps_text(1.25) == "1-1/4" and nps_text(0.125) == "1/8" and nps_text(36.0) == "36"


# ------------------------------------------------------------------ fluids traps refused

def test_trap_no_size_refused():
    # fluids.nearest_pipe() with no size raises UnboundLocalError.
    with raises_exactly(UnknownChoiceError, r"'nominal size \(ASME B36.10M\)' must be one of "):
        catalogue_pipe("asme_b36_10m", None, "40", "carbon_steel")


@pytest.mark.parametrize("Di", [-1.0, 0.0, 5.5, float("nan")])
def test_trap_bad_bore_refused(Di):
    # fluids.nearest_pipe(Di=-1) silently returns the smallest pipe.
    with raises_exactly(OutOfRangeError, r"'pipe inside diameter' must be between 0 and 5 m"):
        custom_pipe(Di, "carbon_steel")


def test_trap_fractional_schedule_refused():
    # fluids truncates schedule 40.5 to '40'.
    with raises_exactly(UnknownChoiceError, r"'schedule/class \(ASME B36.10M NPS 4\)'.*'40'"):
        catalogue_pipe("asme_b36_10m", "4", 40.5, "carbon_steel")
    assert catalogue_pipe("asme_b36_10m", "4", 40, "carbon_steel").schedule == "40"
    assert catalogue_pipe("asme_b36_10m", "4", "Sch 40", "carbon_steel").schedule == "40"


def test_trap_bs_1387_takes_dn_not_nps():
    # fluids' BS 1387 table has DN in the NPS slot; an NPS given there is refused by name.
    with raises_exactly(UnknownChoiceError, r"'nominal size \(BS 1387\)'.*'15'"):
        catalogue_pipe("bs_1387", "1/2", "Medium", "galvanised_steel")
    with raises_exactly(UnknownChoiceError, r"'nominal size \(ASTM F441\)'"):
        catalogue_pipe("astm_f441", "15", "40", "pvc")


def test_numeric_nominal_must_match_exactly():
    assert catalogue_pipe("asme_b36_10m", 4.0, "40", "carbon_steel").nominal == "4"
    with raises_exactly(UnknownChoiceError, r"'nominal size \(ASME B36.10M\)'.*'4'"):
        catalogue_pipe("asme_b36_10m", 4.2, "40", "carbon_steel")


def test_schedule_not_at_that_size_refused():
    with raises_exactly(UnknownChoiceError, r"schedule/class \(ASME B36.10M NPS 1\)"):
        catalogue_pipe("asme_b36_10m", "1", "60", "carbon_steel")


def test_unknown_standard_material_condition():
    with raises_exactly(UnknownChoiceError, r"'pipe standard'.*'asme_b36_10m'"):
        catalogue_pipe("api_5l", "4", "40", "carbon_steel")
    with raises_exactly(UnknownChoiceError, r"'pipe material'.*'carbon_steel'"):
        catalogue_pipe("asme_b36_10m", "4", "40", "Steel")
    with raises_exactly(UnknownChoiceError, r"'pipe condition'.*'aged'"):
        catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel", condition="old")


def test_custom_pipe_checks():
    with raises_exactly(OutOfRangeError, r"'pipe roughness' must be between 0 and 0.01 m"):
        custom_pipe(0.1, "pvc", roughness=-1e-6)
    with raises_exactly(OutOfRangeError, r"'pipe outside diameter'"):
        custom_pipe(0.1, "pvc", Do=0.09)
    with raises_exactly(InputError, r"'pipe roughness' must be a number"):
        custom_pipe(0.1, "pvc", roughness="rough")


# ------------------------------------------------------------------ the Pipe object

def test_pipe_properties_and_copy():
    p = catalogue_pipe("asme_b36_10m", "4", "40", "carbon_steel")
    assert p.area == pytest.approx(math.pi / 4 * p.Di ** 2)
    assert p.roughness == ROUGHNESS["carbon_steel"].new
    aged = p.with_condition("aged")
    assert aged.roughness == ROUGHNESS["carbon_steel"].aged > p.roughness
    assert aged.Di == p.Di and p.condition == "new"
    assert set(p.sources) == {"dimensions", "roughness"}
    assert "B36.10M" in p.sources["dimensions"] and "ISO 6708" in p.sources["dimensions"]
    assert Pipe.from_dict(p.as_dict()) == p
    assert p.as_dict()["label"] == p.label
    with pytest.raises(dataclasses.FrozenInstanceError):
        p.Di = 0.2  # type: ignore[misc]


def test_custom_pipe_roughness_override():
    p = custom_pipe(0.1, "concrete", roughness=1e-3, Do=0.12)
    assert p.roughness == 1e-3 and p.with_condition("aged").roughness == 1e-3
    assert p.wall == pytest.approx(0.01)
    assert p.label == "custom bore 100 mm" and p.standard is None and p.schedule is None
    assert "user-given" in p.sources["roughness"]


# ------------------------------------------------------------------ roughness

def test_carbon_steel_is_commercial_steel_not_drawn_tubing():
    import fluids.friction

    value, source = roughness("carbon_steel", "new")
    # Moody (1944) commercial steel 0.00015 ft = 0.046 mm; 0.045 mm usual (from memory).
    assert value == pytest.approx(0.00015 * FOOT, rel=0.03)
    assert value == pytest.approx(4.5e-5)
    # fluids' _roughness['Steel'] is drawn tubing (0.0015 mm): 30x smaller, not ours.
    assert value > 20 * fluids.friction._roughness["Steel"]
    assert "Moody" in source


def test_pvc_is_smooth_not_fuzzy_matched():
    value, _ = roughness("pvc", "new")
    # Smooth plastic ~0.0015 mm (from memory); fluids' material_roughness('PVC') gives 0.8 mm.
    assert value < 1e-5
    assert value != pytest.approx(0.8e-3)


def test_roughness_table_is_complete():
    keys = {"carbon_steel", "stainless_steel", "cast_iron", "ductile_iron_lined",
            "galvanised_steel", "pvc", "hdpe", "copper", "concrete", "drawn_tubing"}
    assert keys <= set(ROUGHNESS)
    for key, entry in ROUGHNESS.items():
        assert 0 < entry.new <= entry.aged < 0.01, key
        assert entry.source_new and entry.source_aged and entry.display
    assert ("pvc", "PVC / CPVC") in materials()
    # Cast iron: Moody (1944) 0.00085 ft = 0.26 mm (from memory).
    assert roughness("cast_iron")[0] == pytest.approx(0.00085 * FOOT, rel=0.01)


def test_roughness_unknown_key():
    with raises_exactly(UnknownChoiceError, r"'pipe material' must be one of 'carbon_steel'"):
        roughness("PVC", "new")
    with raises_exactly(UnknownChoiceError, r"'pipe condition' must be one of 'new', 'aged'"):
        roughness("pvc", "rusty")

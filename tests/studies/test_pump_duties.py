"""Pump sets, staging, load-profile energy, minimum flow and viscosity through the scenario.

Every expected number here is computed in this file, independently of the kit, from closed
forms of a pump whose datasheet points lie exactly on H = 40 − 20000 Q² [m, m³/s] and
η = 80 Q − 2000 Q² (the kit's least-squares fits of degree 2 reproduce them to round-off):

- the combined curve of two unlike pumps: the common head of a set flow by scipy's brentq on
  the members' closed-form flows (flows add at equal head; Karassik et al., Pump Handbook,
  4th ed., 2008, ch. 2, from memory);
- the stage-up flow for a header set point, by hand (one pump at full speed holds the head
  up to its closed-form flow at that head);
- the energy over a three-step load profile, by hand: P = ρ g Q H / η per running pump, the
  affinity laws for the drive speed (r² H(Q/r) = H_set, P ∝ r³), fluids.VFD_efficiency for
  the drive, the study's stated motor efficiency; water density from IAPWS-IF97 via iapws;
- the viscosity correction by an independent implementation of the ANSI/HI 9.6.7 equations
  (equations and the unit constants from memory; constants differ from the kit's exact ones).
"""

from __future__ import annotations

import math

import fluids
import numpy as np
import pytest
from iapws import IAPWS97
from scipy.optimize import brentq

from kit import scenario as scn
from kit.core.findings import Severity
from kit.errors import ScenarioError
from kit.notebook import SCENARIOS
from kit.results import compute
from kit.studies import pump_selection as ps

g = 9.80665                 # standard gravity (CGPM 1901)
B_A, H_A = 20000.0, 40.0    # pump A: H = 40 − 20000 Q²
B_B, H_B = 30000.0, 34.0    # pump B: H = 34 − 30000 Q²
GPM_PER_M3S = 15850.3231    # from memory
FT_PER_M = 3.28084          # from memory


def eta_A(q):
    return 80.0 * q - 2000.0 * q * q


def pump_toml(name, H0, B, q_top=25, eta=True):
    flows = list(range(0, q_top + 1, 5))
    heads = [H0 - B * (q / 1000) ** 2 for q in flows]
    rows = [f'name = "{name}"', 'speed = "1450 rpm"', 'impeller = "250 mm"',
            "flow = [" + ", ".join(f'"{q} L/s"' for q in flows) + "]",
            "head = [" + ", ".join(f'"{h:.6f} m"' for h in heads) + "]"]
    if eta:
        rows.append("efficiency = [" + ", ".join(f'"{100 * eta_A(q / 1000):.6f} %"'
                                                  for q in flows) + "]")
    return "[[pumps]]\n" + "\n".join(rows) + "\n"


BASE = """
schema = "headline-scenario/1"
kind = "pump_selection"
title = "test: duties"

[liquid]
key = "water"
temperature = "20 degC"

[source]
name = "sump"
level = "0 m"

[destination]
name = "tank"
level_low = "{lo} m"
level_high = "{hi} m"

[discharge]
name = "main"
start_elevation = "0 m"

[[discharge.segments]]
name = "main"
length = "{length} m"
rise = "{lo} m"
pipe = {{ bore = "150 mm", roughness = "0.045 mm", material = "carbon_steel" }}

[operation]
hours_per_year = "6000 h"
"""


def scenario(extra, pumps, lo=20, hi=20, length=50):
    text = BASE.format(lo=lo, hi=hi, length=length) + "".join(pumps) + extra
    return scn.loads(text, "<test>")


HEADER = """
[pump_set]
pump = "A"
duty_count = 2
standby_count = 1

[drive]
min_speed = "435 rpm"
max_speed = "1450 rpm"

[staging]
strategy = "{strategy}"
control = "header"
set_head = "30 m"
hysteresis = "10 %"

[load_profile]
flow = ["8 L/s", "16 L/s", "30 L/s"]
hours = ["3000 h", "2000 h", "1000 h"]
"""


@pytest.fixture(scope="module")
def header_study():
    return ps.study(scenario(HEADER.format(strategy="all_vfd"), [pump_toml("A", H_A, B_A)]))


# ------------------------------------------------------------------ staging switch points
def test_stage_up_on_a_header_set_point_by_hand(header_study):
    s = header_study.duties.staging
    q_up = math.sqrt((H_A - 30.0) / B_A)   # one pump at full speed holds 30 m: by hand
    assert np.allclose(s.stage_up[:, 0], q_up, rtol=1e-9)
    assert np.allclose(s.stage_down[:, 0], 0.9 * q_up, rtol=1e-9)
    assert np.all(s.count[0] == np.where(s.Q > q_up, 2, 1))
    rows = header_study.duties.step_rows()
    assert [r["pumps"] for r in rows[:2]] == [1, 2]
    assert rows[1]["from_flow"] == pytest.approx(q_up, rel=1e-9)


# ------------------------------------------------------------------ energy by hand
def _rho():
    return IAPWS97(T=293.15, P=0.101325).rho   # IAPWS-IF97 via iapws


def _shaft(q):
    """Shaft power of one pump at flow q on its own curve [W], ρ g Q H / η."""
    return _rho() * g * q * (H_A - B_A * q * q) / eta_A(q)


def test_energy_over_a_three_step_profile_by_hand_fixed_speed():
    s = ps.study(scenario(HEADER.format(strategy="fixed"), [pump_toml("A", H_A, B_A)]))
    d = s.duties
    em = d.staging.motor_efficiency
    q_up = math.sqrt(10.0 / B_A)
    steps = [(0.008, 3000.0), (0.016, 2000.0), (0.030, 1000.0)]
    by_hand = 0.0
    for q, t in steps:
        k = 1 if q <= q_up else 2
        by_hand += k * _shaft(q / k) / em * t / 1000.0     # fixed speed on the curve, kWh
    fixed = d.energy.row("fixed")
    assert fixed.count.tolist() == [1, 1, 2]
    assert fixed.total_kWh == pytest.approx(by_hand, rel=2e-5)   # iapws vs CoolProp density


def test_energy_over_a_three_step_profile_by_hand_every_pump_on_a_drive(header_study):
    d = header_study.duties
    em, rating = d.staging.motor_efficiency, d.staging.drive_rating
    q_up = math.sqrt(10.0 / B_A)
    by_hand = 0.0
    for q, t in [(0.008, 3000.0), (0.016, 2000.0), (0.030, 1000.0)]:
        k = 1 if q <= q_up else 2
        qe = q / k
        r = math.sqrt((30.0 + B_A * qe * qe) / H_A)     # r² H(q/r) = 30 m, by hand
        P = r ** 3 * _shaft(qe / r)                       # affinity laws, P ∝ r³
        eta_d = fluids.VFD_efficiency(rating, load=P / rating)
        by_hand += k * P / (em * eta_d) * t / 1000.0
    row = d.energy.row("all_vfd")
    assert row.total_kWh == pytest.approx(by_hand, rel=2e-5)
    assert d.energy.saving_kWh["all_vfd"] > 0
    r = compute(scenario(HEADER.format(strategy="all_vfd"), [pump_toml("A", H_A, B_A)]))
    assert r.value("energy.all_vfd") == pytest.approx(by_hand * 3.6e6, rel=2e-5)
    assert {row["strategy"] for row in r.tables["energy_strategies"]} == {
        "fixed", "one_vfd", "all_vfd"}


# ------------------------------------------------------------------ unlike pumps
UNLIKE = """
[pump_set]
units = ["A", "B"]
duty_count = 2
unlike = true
"""


def hand_flow(H0, B, H):
    return math.sqrt((H0 - H) / B) if H < H0 else 0.0


def test_unlike_set_members_by_brentq_on_each_head():
    s = ps.study(scenario(UNLIKE, [pump_toml("A", H_A, B_A), pump_toml("B", H_B, B_B, 20)],
                          lo=20, hi=36, length=600))
    d = s.duties
    assert not d.identical and d.staging is None
    for lab, sd in zip(d.labels, d.set_points, strict=True):
        assert sd is not None, lab
        # the common head of the set flow, by brentq on the members' closed forms
        H = brentq(lambda h, _q=sd.Q: hand_flow(H_A, B_A, h) + hand_flow(H_B, B_B, h) - _q,
                   0.0, H_A, xtol=1e-13)
        assert sd.H == pytest.approx(H, abs=1e-7)
        a, b = sd.members
        assert a.Q == pytest.approx(hand_flow(H_A, B_A, H), abs=1e-8)
        assert b.Q == pytest.approx(hand_flow(H_B, B_B, H), abs=1e-8)
        assert b.status == ("check valve closed" if H >= H_B else "running")
    dead = [f for f in d.findings if f.severity == Severity.FAIL and "'B'" in f.subject]
    assert dead and all("dead-headed" in f.rule for f in dead)   # at the 36 m static head
    assert any(f.quantity == "standby units" for f in d.findings)  # no standby: no N+1


def test_unlike_units_need_the_flag():
    with pytest.raises(ScenarioError, match="pump_set.unlike.*must be true"):
        ps.study(scenario(UNLIKE.replace("unlike = true", ""),
                          [pump_toml("A", H_A, B_A), pump_toml("B", H_B, B_B, 20)]))


# ------------------------------------------------------------------ viscosity
VISCOUS_LIQUID = """
[viscous]
correct = true
"""


def test_viscous_correction_against_an_independent_implementation():
    text = (BASE.format(lo=20, hi=20, length=50).replace(
        'key = "water"\ntemperature = "20 degC"',
        'temperature = "40 degC"\n\n[liquid.user]\nname = "oil"\n'
        'temperature = ["30 degC", "50 degC"]\ndensity = ["900 kg/m3", "900 kg/m3"]\n'
        'viscosity = ["180 mPa*s", "180 mPa*s"]\nvapour_pressure = ["1 kPa", "1 kPa"]')
        + pump_toml("A", H_A, B_A) + VISCOUS_LIQUID)
    s = ps.study(scn.loads(text, "<test>"))
    (vc,) = s.duties.viscous
    nu = 0.180 / 900.0                     # kinematic viscosity [m²/s]
    q_bep, h_bep = 0.02, H_A - B_A * 0.02 ** 2   # η = 80Q − 2000Q² peaks at 0.02 m³/s
    B = (16.5 * math.sqrt(nu * 1e6) * (h_bep * FT_PER_M) ** (1 / 16)
         / ((q_bep * GPM_PER_M3S) ** (3 / 8) * 1450.0 ** 0.25))   # HI 9.6.7, from memory
    cq = math.e ** (-0.165 * math.log10(B) ** 3.15)
    ceta = B ** (-0.0547 * B ** 0.69)
    assert vc.B == pytest.approx(B, rel=1e-5)
    assert vc.C_Q == pytest.approx(cq, rel=1e-5)
    assert vc.C_eta == pytest.approx(ceta, rel=1e-5)
    curve = s.pumps[0]
    assert curve.name == "A"              # the candidate keeps its name
    # C_H = C_Q at the water BEP flow, so the corrected curve passes (C_Q Q_bep, C_Q H_bep)
    assert float(curve.head(cq * q_bep)) == pytest.approx(cq * h_bep, rel=1e-3)
    assert 1.0 < vc.B < 40.0
    assert any(f.quantity == "parameter B" and f.severity == Severity.CHECK
               for f in s.duties.findings)


def test_viscous_demo_reports_the_factors():
    r = compute(scn.load(SCENARIOS / "corran_moss_fuel_oil.toml"))
    B = r.value("viscous[0].B")
    assert 1.0 < B < 40.0
    assert 0.0 < r.value("viscous[0].C_eta") < r.value("viscous[0].C_Q") < 1.0
    assert any(m.name == "Viscosity correction" for m in r.methods)
    assert any("flammable" in c.lower() or "fire" in c.lower() for c in r.cautions)


# ------------------------------------------------------------------ min flow, recirculation
def test_duty_demo_min_flow_recirculation_and_n_plus_1():
    r = compute(scn.load(SCENARIOS / "wrenfield_duty_standby.toml"))
    assert r.value("min_flow.Q_min") == pytest.approx(28.0 / 3600.0)   # the maker's value
    d = r.value("recirculation.orifice_bore")
    assert 0.1 * 0.0525 < d < 0.75 * 0.0525                      # a plate in the 2" line
    assert 0.0 < r.value("recirculation.bypass_at_duty") < 28.0 / 3600.0
    assert r.value("pump_set.installed") == 3 and r.value("pump_set.duty") == 2
    n1 = [f for f in r.findings if "out" in f.subject and f.quantity == "flow at duty head"]
    assert n1 and all(f.severity == Severity.PASS for f in n1)
    assert r.value("drive.min_speed_ratio") == pytest.approx(0.4)   # 20 Hz of 50 Hz
    assert {"staging_steps", "energy_steps", "energy_strategies", "pump_set",
            "set_points"} <= set(r.tables)
    e = [r.value(f"energy.{k}") for k in ("fixed", "one_vfd", "all_vfd")]
    assert e[0] > e[1] > e[2] > 0


def test_scenario_without_duties_is_unchanged():
    sc = scn.load(SCENARIOS / "kestrel_ridge_booster.toml")
    s = ps.study(sc)
    assert s.duties is None
    r = ps.results_of(sc, s)
    assert not [v for v in r.values if v.key.startswith(("pump_set", "energy.", "staging"))]


# ------------------------------------------------------------------ refusals
@pytest.mark.parametrize("extra, key, match", [
    ('[pump_set]\npump = "Z"\n', "pump_set.pump", "names no candidate pump: 'Z'"),
    ('[pump_set]\nunits = ["A", 3]\n', r"pump_set.units\[1\]", "candidate pump's name"),
    ('[pump_set]\npump = "A"\nunits = ["A"]\n', "pump_set.units", "cannot be given together"),
    ('[pump_set]\nunits = ["A"]\nduty_count = 2\n', "pump_set.duty_count",
     "must not exceed the 1 units"),
    ('[drive]\nmin_speed = "20 rpm"\n', "drive.min_speed", "0.05 to below 1"),
    ('[drive]\nmax_speed = "2000 rpm"\n', "drive.max_speed", "at most 1.2"),
    ('[drive]\nmin_speed = "900 rpm"\nmax_speed = "800 rpm"\n', "drive.max_speed",
     "must be above min_speed"),
    ('[drive]\nmin_frequency = "10 Hz"\n', "drive.rated_frequency", "is missing"),
    ('[staging]\ncontrol = "remote_dp"\nset_head = "30 m"\n', "staging.design_flow",
     "is missing"),
    ('[staging]\nset_head = "30 m"\n', "staging.set_head", "does not apply"),
    ('[staging]\nbasis = "flow"\n', "staging.stage_up_flows", "is missing"),
    ('[staging]\nstage_up_flows = ["5 L/s"]\n', "staging.stage_up_flows", "only to staging"),
    ('[pump_set]\npump = "A"\nduty_count = 2\n[staging]\nbasis = "flow"\n'
     'stage_up_flows = ["5 L/s", "9 L/s"]\n', "staging.stage_up_flows", "one flow per added"),
    ('[staging]\nstrategy = "all"\n', "staging.strategy", "must be one of"),
    ('[staging]\nhysteresis = "70 %"\n', "staging.hysteresis", "from 0 to 0.5"),
    ('[load_profile]\nflow = ["5 L/s", "5 L/s"]\nhours = ["1 h", "2 h"]\n',
     "load_profile.flow", "must not repeat a flow"),
    ('[load_profile]\nflow = ["5 L/s", "6 L/s"]\nhours = ["5000 h", "5000 h"]\n',
     "load_profile.hours", "at most 8784 h"),
    ('[load_profile]\nflow = ["5 L/s"]\nhours = ["1 h", "2 h"]\n', "load_profile.hours",
     "one value per flow"),
    ('[load_profile]\nflow = ["0 L/s"]\nhours = ["1 h"]\n', r"load_profile.flow\[0\]",
     "more than 0"),
    ('[viscous]\ncorrect = "yes"\n', "viscous.correct", "true or false"),
    ('[min_flow]\nmaker = "1 m3/s"\n', "min_flow.maker", "must not exceed the BEP flow"),
    ('[recirculation]\nbore = "300 mm"\n[min_flow]\nmaker = "5 L/s"\n', "recirculation.bore",
     "enlarge|β"),
])
def test_bad_duty_keys_are_refused_naming_the_key(extra, key, match):
    with pytest.raises(ScenarioError, match=rf"'{key}'.*({match})"):
        ps.study(scenario("\n" + extra, [pump_toml("A", H_A, B_A)]))

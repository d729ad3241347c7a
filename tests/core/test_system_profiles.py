"""Line pressure profiles over the band, the exit-loss double count, and no-operating-point
corners.

Invented scenarios (our own numbers):

- "Corrie Hill rising main": a sump pumped 1.2 km to a hill tank, the main cresting 5 m above
  the tank's inlet level (crest goes sub-atmospheric at low flow);
- "Corrie Hill, worn pump": the same system with a pump whose shut-off head does not reach
  the static head at the maximum-static band corners.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from types import SimpleNamespace as NS

import numpy as np
import pytest
from raising import raises_exactly

from kit.core.findings import Severity
from kit.core.fittings import Fitting
from kit.core.line import Line, Segment
from kit.core.operating import energy_at_duty, operating_points
from kit.core.pump import PumpCurve
from kit.core.system import Condition, Endpoint, System, band_profiles
from kit.errors import InputError

g = 9.80665                                             # standard gravity (CGPM 1901)
P_ATM = 101325.0                                        # ISO 2533 standard atmosphere
ST = NS(rho=998.2, mu=1.002e-3, pv=2339.0)              # water at 20 °C (from memory)
WATER = NS(state=lambda T, P=101325.0: ST, name="water")


@dataclass(frozen=True)
class BarePipe:
    """A bore and a roughness per condition, independent of the catalogue."""

    Di: float
    new: float = 4.5e-5
    aged: float = 5e-4
    condition: str = "new"

    @property
    def area(self):
        return math.pi / 4 * self.Di**2

    @property
    def roughness(self):
        return self.new if self.condition == "new" else self.aged

    def with_condition(self, c):
        return replace(self, condition=c)


def colebrook(Re, eD):
    """Colebrook (1939) by fixed-point iteration from Swamee–Jain (1976) — written here."""
    f = 0.25 / math.log10(eD / 3.7 + 5.74 / Re**0.9) ** 2
    for _ in range(40):
        f = (-2 * math.log10(eD / 3.7 + 2.51 / (Re * math.sqrt(f)))) ** -2
    return f


# ---------- fixture: Corrie Hill rising main ------------------------------------------------

D_MAIN = 0.2
L1, Z_CREST = 800.0, 42.0      # pump (z 0) to the crest
L2, Z_OUT = 400.0, 36.0        # crest to the tank inlet
TANK_LOW, TANK_HIGH = 37.0, 39.0


def corrie_hill(free=False, exit_row=True, tank_high=TANK_HIGH):
    suction = Line("suction", (Segment("intake", BarePipe(0.25), 6.0, rise=-0.5,
                                       fittings=(Fitting("entrance_sharp", params={"method": "Crane"}),)),),
                   "sump", 0.5)
    last = (Fitting("exit", label="tank inlet"),) if exit_row else ()
    main = Line("main", (Segment("to crest", BarePipe(D_MAIN), L1, rise=Z_CREST,
                                 end_station="crest"),
                         Segment("to tank", BarePipe(D_MAIN), L2, rise=Z_OUT - Z_CREST,
                                 fittings=last, end_station="tank inlet")), "pump", 0.0)
    dest = (Endpoint("hill tank", Z_OUT, Z_OUT, P_ATM, "free") if free else
            Endpoint("hill tank", TANK_LOW, tank_high, P_ATM))
    return System("Corrie Hill", Endpoint("sump", 2.0, 3.5, P_ATM), dest, suction, main, WATER,
                  293.15, 293.15)


def test_rising_main_crest_pressure_by_hand_energy_balance():
    sysm = corrie_hill()
    cond = Condition("min", 293.15, "new")           # tank at its low level: lowest crest
    Q = 0.03
    bp = band_profiles(sysm, {cond: Q})[0]
    crest = next(s for s in bp.discharge.stations if s.name == "crest")
    # hand: energy from the crest to the tank surface (V same bore; exit K = 1 loses V²/2g):
    # p_c/ρg + z_c + V²/2g = p_atm/ρg + z_tank + f (L2/D) V²/2g + 1·V²/2g
    A = math.pi / 4 * D_MAIN**2
    V = Q / A
    f = colebrook(ST.rho * V * D_MAIN / ST.mu, 4.5e-5 / D_MAIN)
    p_c = P_ATM + ST.rho * g * (TANK_LOW - Z_CREST) + ST.rho * f * L2 / D_MAIN * V * V / 2
    assert crest.p == pytest.approx(p_c, rel=1e-9)
    assert crest.p_gauge == pytest.approx(p_c - P_ATM, rel=1e-9)
    assert crest.p_gauge < 0                                  # sub-atmospheric crest
    assert bp.lowest.name == "crest"
    # sub-atmospheric station flagged (air valve / vacuum), pressures marked gauge/absolute
    gauge = [x for x in bp.findings if x.quantity == "gauge pressure"]
    assert gauge and gauge[0].severity is Severity.CHECK and "air valve" in gauge[0].rule
    vap = [x for x in bp.findings if x.quantity == "pressure above vapour pressure"
           and "discharge" in x.subject]
    assert vap and "kPa(abs)" in vap[0].rule and "kPa(g)" in vap[0].rule
    assert vap[0].value == pytest.approx((p_c - ST.pv) / (ST.rho * g), rel=1e-9)


def test_suction_profile_from_the_sump_surface_by_hand():
    sysm = corrie_hill()
    cond = Condition("max", 293.15, "new")           # sump at its low level 2.0 m
    Q = 0.03
    bp = band_profiles(sysm, [(cond, Q)])[0]
    end = bp.suction.stations[-1]
    # hand: p_pump = p_atm + ρg(z_s − z_pump) − ρV²/2 − ρg h_L (friction + sharp entrance
    # K = 0.5, Crane TP-410, from memory)
    A = math.pi / 4 * 0.25**2
    V = Q / A
    f = colebrook(ST.rho * V * 0.25 / ST.mu, 4.5e-5 / 0.25)
    hl = (f * 6.0 / 0.25 + 0.5) * V * V / (2 * g)
    p = P_ATM + ST.rho * g * (2.0 - 0.0) - 0.5 * ST.rho * V * V - ST.rho * g * hl
    assert end.p == pytest.approx(p, rel=1e-6)


def test_free_discharge_with_exit_row_is_refused():
    with raises_exactly(InputError, r"'fittings of discharge line 'main'' must not hold an exit "
                                    r"fitting \(K = 1\) when 'hill tank' discharges free"):
        corrie_hill(free=True, exit_row=True)
    # free without the exit row: the exit velocity head is counted once, in the curve
    sysm = corrie_hill(free=True, exit_row=False)
    cond = sysm.conditions()[0]
    Q = np.array([0.03])
    V = 0.03 / (math.pi / 4 * D_MAIN**2)
    H = sysm.curve(Q, cond)[0]
    H_sub = corrie_hill(free=False, exit_row=False).curve(Q, cond)[0]
    # same losses; the free curve has its static head to the outlet plus V²/2g once
    static_free, static_sub = Z_OUT - 3.5, TANK_LOW - 3.5
    assert H - static_free == pytest.approx(H_sub - static_sub + V * V / (2 * g), rel=1e-12)


# ---------- fixture: Corrie Hill with a worn pump (no point at the max-static corners) -----

def worn_pump():
    # invented curve: shut-off 38.2 m, below the max static head 40.5 − 2.0 = 38.5 m
    return PumpCurve([0.0, 0.02, 0.04, 0.06], [38.2, 37.4, 35.0, 31.0], speed_rpm=1480,
                     diameter=0.3, efficiency=[0.0, 0.62, 0.74, 0.70], name="worn")


def test_band_corner_without_operating_point_is_reported_not_dropped():
    sysm = corrie_hill(tank_high=40.5)     # max static 40.5 − 2.0 = 38.5 m; min 37 − 3.5 = 33.5
    pump = worn_pump()
    conds = sysm.conditions()
    curves = {c: (lambda Q, c=c: sysm.curve(Q, c)) for c in conds}
    ops = operating_points(pump, {c.label: curves[c] for c in conds}, rho=ST.rho,
                           errors="report")
    assert len(ops) == len(conds)                       # never dropped
    missing = [o for o in ops if not np.isfinite(o.Q)]
    assert missing and all(o.label.startswith("max") for o in missing)
    assert all(o.findings[0].severity is Severity.FAIL for o in missing)
    # by hand: a point exists where pump head reaches the system curve somewhere on the grid
    q = np.linspace(0, 0.06, 601)
    for o, c in zip(ops, conds, strict=True):
        found = np.any(pump.head(q) - sysm.curve(q, c) >= 0) and np.isfinite(o.Q)
        assert found == np.isfinite(o.Q)
    # profiles: the missing corners say so
    bps = band_profiles(sysm, [(c, o.Q if np.isfinite(o.Q) else None)
                               for c, o in zip(conds, ops, strict=True)])
    assert len(bps) == len(conds)
    for bp, o in zip(bps, ops, strict=True):
        if np.isfinite(o.Q):
            assert bp.discharge is not None and bp.note == ""
        else:
            assert bp.discharge is None and bp.note == "no operating point"
            assert bp.findings[0].quantity == "operating flow"
    # energy at a required duty: the corners the pump cannot meet are rows, marked infeasible
    cmp = energy_at_duty([pump], {c.label: curves[c] for c in conds}, 0.02, control="throttle",
                         rho=ST.rho, hours=1000, motor_efficiency=0.9)
    rows = cmp.pumps[0].rows
    assert len(rows) == len(conds)
    for r, c in zip(rows, conds, strict=True):
        meets = float(pump.head(0.02)) >= float(sysm.curve(np.array([0.02]), c)[0])
        assert r.feasible == meets
        if not meets:
            assert "below the system head" in r.note and math.isnan(r.kWh_per_m3)
    assert cmp.findings and cmp.findings[0].severity is Severity.FAIL


def test_band_profiles_refuses_a_non_condition():
    with raises_exactly(InputError, r"'band condition' must be a Condition, not 'str'"):
        band_profiles(corrie_hill(), [("max", 0.01)])


def test_profile_findings_never_show_negative_absolute_pressure_without_a_fail():
    from kit.core.line import Profile, Station, profile_findings

    a = Station("pump", 0.0, 0.0, 3e5, 3e5 - P_ATM, 1.0, 0.0, 0.0)
    b = Station("crest", 100.0, 30.0, -5.5e3, -5.5e3 - P_ATM, 1.0, 0.0, 0.0)
    prof = Profile("main", 0.01, (a, b), P_ATM, ST.rho)
    for pv in (None, ST.pv):
        fs = profile_findings(prof, pv)
        fails = [f for f in fs if f.severity is Severity.FAIL]
        assert fails and any("impossible" in f.rule for f in fails)
        assert all(("kPa(abs)" in f.rule or "kPa(g)" in f.rule) for f in fs)

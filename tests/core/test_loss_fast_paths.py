"""The fast paths of the pipe-loss core against independent references.

The kit answers a head loss three ways: one flow or a few flows worked in plain floats
(:data:`kit.core.line.SMALL_N`), many flows with numpy arrays, and the fittings' K from a
plan cached on the rows' values. Each is checked here against a reference that does not use
it, over random pipes, flows and fitting lists, including hostile cases (laminar and
transitional flow, zero flow, very rough pipe, rows whose K depends on Re), to a relative
1e-12 (floating-point reordering only). Refusals must be the same typed error with the same
message on every path.

References: friction by fluids' own ``Clamond`` (Clamond 2009, Colebrook 1939) above Re 4000,
64/Re below 2000 (Hagen–Poiseuille) and the kit's stated linear blend between; fitting K by
:func:`kit.core.fittings.fitting_K` row by row (the checked path, no plan) and, where fluids
has the function, by fluids itself (Hooper 1981 ``Hooper2K``, Darby 2001 ``Darby3K``,
Rennels & Hudson 2012 ``bend_rounded``, ``contraction_conical``).
"""

from __future__ import annotations

import math
from types import SimpleNamespace as NS

import fluids.fittings as ff
import numpy as np
import pytest
from fluids.friction import Clamond

from kit.core import fittings as fit_mod
from kit.core.fittings import Fitting, FrozenParams, fitting_K, total_K_unchecked
from kit.core.friction import RE_LAMINAR, RE_TURBULENT, darcy_friction
from kit.core.line import SMALL_N, G, Line, Segment
from kit.core.sizing import Route, route_profiles
from kit.errors import HeadlineError, NoSolutionError, OutOfRangeError

RTOL = 1e-12


def pipe(Di, eps):
    return NS(Di=Di, area=math.pi / 4 * Di * Di, roughness=eps)


def ref_darcy(Re: float, eD: float) -> float:
    """64/Re below 2000; fluids' Clamond (Colebrook 1939, Clamond 2009) above 4000; the
    kit's stated linear blend in Re between (kit policy, kit.core.friction docstring)."""
    if Re < RE_LAMINAR:
        return 64.0 / Re
    if Re > RE_TURBULENT:
        return Clamond(Re, eD)
    w = (Re - RE_LAMINAR) / (RE_TURBULENT - RE_LAMINAR)
    return (1.0 - w) * 64.0 / RE_LAMINAR + w * Clamond(RE_TURBULENT, eD)


def close(a, b, rtol=RTOL):
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    assert a.shape == b.shape
    np.testing.assert_allclose(a, b, rtol=rtol, atol=0.0)


#: Rows of every kind of K: Re-independent, Re-dependent (2-K, 3-K, Rennels bend, conical
#: reducers), rows fluids evaluates per Re (Ito bend, Blevins mitre), a negative tee K.
POOL = (
    Fitting("fixed_k", 1, {"K": 0.8}, label="strainer"),
    Fitting("tee_k", 1, {"K": -0.4}, label="tee run, converging"),
    Fitting("exit"),
    Fitting("entrance_sharp"),
    Fitting("valve_gate", 2),
    Fitting("valve_check_swing"),
    Fitting("valve_globe", 1, {"method": "Darby 3-K"}),
    Fitting("valve_cv", 1, {"Cv": 400.0}),
    Fitting("bend", 3, {"angle": 90.0, "R_D": 1.5}, label="elbows"),
    Fitting("bend", 1, {"angle": 30.0, "R_D": 5.0, "method": "Crane"}),
    Fitting("bend", 1, {"angle": 45.0, "R_D": 3.0, "method": "Ito"}),
    Fitting("mitre", 1, {"angle": 30.0, "method": "Blevins"}),
    Fitting("hooper_2k", 2, {"name": "Elbow, 90°, Long-radius (R/D = 1.5), All types"}),
    Fitting("darby_3k", 1, {"name": "Elbow, 90°, threaded, standard, (r/D = 1)"}),
)


def reducers(D, rng):
    out = []
    if rng.random() < 0.4:
        out.append(Fitting("contraction", 1, {"D2": D * rng.uniform(0.5, 0.9), "style": "conical",
                                              "angle": float(rng.uniform(10, 120))}))
    if rng.random() < 0.4:
        out.append(Fitting("enlargement", 1, {"D2": D * rng.uniform(1.1, 2.0), "style": "conical",
                                              "angle": float(rng.uniform(5, 60))}))
    return out


def random_line(rng):
    segs = []
    for j in range(int(rng.integers(1, 4))):
        D = float(rng.uniform(0.012, 0.8))
        eps = float(10 ** rng.uniform(-6.5, math.log10(min(0.04 * D, 0.009))))
        picks = rng.choice(len(POOL), int(rng.integers(0, 6)), replace=False)
        fits = tuple(POOL[i] for i in picks) + tuple(reducers(D, rng))
        segs.append(Segment(f"s{j}", pipe(D, eps), float(rng.uniform(0.5, 800)),
                            float(rng.uniform(-0.4, 0.4)), fits))
    return Line("L", tuple(segs))


def random_state(rng):
    return NS(rho=float(rng.uniform(650, 1300)), mu=float(10 ** rng.uniform(-3.7, 0.3)))


def ref_head_loss(line, q: float, state) -> float:
    """Darcy–Weisbach term by term with ref_darcy and fitting_K row by row (no plan)."""
    total = 0.0
    for s in line.segments:
        D, A, eps = s.pipe.Di, s.pipe.area, s.pipe.roughness
        V = q / A
        Re = max(state.rho * V * D / state.mu, 1e-9)
        f = ref_darcy(Re, eps / D)
        K = sum(float(fitting_K(r, [Re], D, eps)[0]) for r in s.fittings)
        total += (f * s.length / D + K) * V * V / (2 * G)
    return total


def flows_for(line, state, rng, n):
    """Flows spanning laminar, transitional and turbulent Re in the first segment, and 0."""
    s = line.segments[0]
    q_at = s.pipe.area * state.mu / (state.rho * s.pipe.Di)   # flow at Re = 1
    Re = np.concatenate([[0.0, 1e-3, 5.0, 1999.0, 2000.0, 3000.0, 4000.0, 4001.0],
                         10 ** rng.uniform(0, 7.5, max(0, n - 8))])[:n]
    return Re * q_at


# ---------------------------------------------------------------- friction


@pytest.mark.parametrize("eD", [0.0, 1e-6, 1e-4, 5e-3, 0.05, 0.1], ids=lambda e: f"eD={e:g}")
def test_darcy_scalar_small_and_array_paths_agree_with_fluids(eD):
    rng = np.random.default_rng(11)
    Re = np.concatenate([[1e-9, 1.0, 1999.999, 2000.0, 2500.0, 3999.99, 4000.0, 4000.01, 1e10],
                         10 ** rng.uniform(-3, 10, 400)])
    ref = np.array([ref_darcy(float(r), eD) for r in Re])
    close(darcy_friction(Re, eD), ref)                               # numpy path
    close([darcy_friction(float(r), eD) for r in Re], ref)            # one float
    for i in range(0, Re.size, SMALL_N):                              # a few at a time
        close(darcy_friction(Re[i:i + SMALL_N], eD), ref[i:i + SMALL_N])


def test_darcy_types_unchanged():
    assert type(darcy_friction(1e5, 1e-4)) is np.float64
    assert type(darcy_friction(np.float64(3000.0), 0.0)) is np.float64
    assert darcy_friction(np.array([1e5]), 1e-4).shape == (1,)
    assert darcy_friction(np.array([[1e5, 10.0]]), np.array([[1e-4], ])).shape == (1, 2)
    assert darcy_friction(0.0, 1e-4) == np.inf     # the laminar limit, as documented


@pytest.mark.parametrize("Re, eD", [
    (-5.0, 0.0), (float("nan"), 1e-4), (float("inf"), 1e-4), (2e10, 1e-4),
    (1e5, 0.2), (1e5, -1e-3), (1e5, float("nan")),
], ids=["negative Re", "NaN Re", "infinite Re", "Re above 1e10", "eD above 0.1",
        "negative eD", "NaN eD"])
def test_darcy_refusals_same_on_every_path(Re, eD):
    msgs = set()
    for arg in (Re, np.array([1e5, Re]), np.full(40, Re)):
        with pytest.raises(OutOfRangeError) as exc:
            darcy_friction(arg, eD)
        msgs.add(str(exc.value))
    assert len(msgs) == 1


# ---------------------------------------------------------------- fittings plan


def test_plan_K_equals_row_by_row_and_fluids():
    rng = np.random.default_rng(5)
    Re = np.concatenate([[1e-9, 3.0, 10.0, 500.0, 2000.0, 3500.0, 4000.0],
                         10 ** rng.uniform(0, 8, 60)])
    for _ in range(40):
        D = float(rng.uniform(0.012, 0.8))
        eps = float(10 ** rng.uniform(-6.5, math.log10(min(0.04 * D, 0.009))))
        rows = tuple(POOL[i] for i in rng.choice(len(POOL), 4, replace=False))
        rows += tuple(reducers(D, rng))
        ref = sum(fitting_K(r, Re, D, eps) for r in rows)
        close(total_K_unchecked(rows, Re, D, eps), ref)
        fd = darcy_friction(Re, eps / D)
        close(total_K_unchecked(rows, Re, D, eps, fd), ref)


@pytest.mark.parametrize("Re", [50.0, 2500.0, 1e5])
def test_re_dependent_rows_against_fluids(Re):
    """Each Re-dependent row of the plan against fluids' own function."""
    D, eps = 0.1023, 4.5e-5
    fd = ref_darcy(max(Re, 10.0), eps / D)
    hooper = Fitting("hooper_2k", 1, {"name": "Elbow, 90°, Long-radius (R/D = 1.5), All types"})
    want = ff.Hooper2K(Di=D / 0.0254, Re=Re, name=hooper.params["name"])   # Hooper (1981)
    close(total_K_unchecked((hooper,), np.array([Re]), D, eps), [want])
    darby = Fitting("darby_3k", 1, {"name": "Elbow, 90°, threaded, standard, (r/D = 1)"})
    want = ff.Darby3K(Re=Re, name=darby.params["name"], Di=D)               # Darby (2001)
    close(total_K_unchecked((darby,), np.array([Re]), D, eps), [want])
    bend = Fitting("bend", 2, {"angle": 90.0, "R_D": 1.5})
    want = 2 * ff.bend_rounded(Di=D, angle=90.0, fd=fd, bend_diameters=1.5,
                               method="Rennels")                            # Rennels (2012)
    close(total_K_unchecked((bend,), np.array([Re]), D, eps), [want])
    D2 = 0.08
    red = Fitting("contraction", 1, {"D2": D2, "style": "conical", "angle": 40.0})
    fd2 = ref_darcy(max(Re * D / D2, 10.0), eps / D2)
    want = ff.change_K_basis(ff.contraction_conical(Di1=D, Di2=D2, fd=fd2, angle=40.0,
                                                    method="Rennels"), D2, D)
    close(total_K_unchecked((red,), np.array([Re]), D, eps), [want])


def test_plan_cache_is_keyed_on_values():
    """Equal rows built apart share a K; a changed parameter, bore or roughness never
    reuses a stale one (the plan is a pure function of immutable values)."""
    Re = np.array([1e3, 1e5])
    a = (Fitting("bend", 2, {"angle": 90, "R_D": 1.5}), Fitting("fixed_k", 1, {"K": 1.0}))
    b = (Fitting("bend", 2, {"angle": 90.0, "R_D": 1.5}), Fitting("fixed_k", 1, {"K": 1.0}))
    close(total_K_unchecked(a, Re, 0.1, 4.5e-5), total_K_unchecked(b, Re, 0.1, 4.5e-5))
    for rows, D, eps in [
        ((Fitting("bend", 2, {"angle": 45.0, "R_D": 1.5}), a[1]), 0.1, 4.5e-5),
        ((a[0], Fitting("fixed_k", 1, {"K": 2.0})), 0.1, 4.5e-5),
        ((Fitting("bend", 3, {"angle": 90.0, "R_D": 1.5}), a[1]), 0.1, 4.5e-5),
        (a, 0.2, 4.5e-5), (a, 0.1, 1e-3),
    ]:
        got = total_K_unchecked(rows, Re, D, eps)
        close(got, sum(fitting_K(r, Re, D, eps) for r in rows))


def test_frozen_params_equality_and_lookup():
    p = FrozenParams({"angle": 90, "R_D": 1.5})
    assert p == FrozenParams({"R_D": 1.5, "angle": 90.0})
    assert hash(p) == hash(FrozenParams({"R_D": 1.5, "angle": 90.0}))
    assert p == {"angle": 90, "R_D": 1.5} and p != {"angle": 45, "R_D": 1.5}
    assert p != FrozenParams({"angle": 90})
    assert p["angle"] == 90 and p.get("method") is None and "R_D" in p
    with pytest.raises(KeyError):
        p["method"]
    with pytest.raises(AttributeError):
        p._items = ()


def test_refused_rows_still_name_the_row():
    """A plan is never built for a row that refuses the bore: the row's own error."""
    row = Fitting("contraction", 1, {"D2": 0.15, "style": "conical", "angle": 30.0},
                  label="reducer R-1")
    seg = Segment("s", pipe(0.1, 4.5e-5), 10.0, 0.0, (row,))
    line = Line("L", (seg,))
    st = NS(rho=1000.0, mu=1e-3)
    for Q in (0.01, np.array([0.01, 0.02]), np.linspace(0.001, 0.02, 30)):
        with pytest.raises(OutOfRangeError, match="reducer R-1"):
            line.head_loss(Q, st)


# ---------------------------------------------------------------- lines


def test_head_loss_paths_agree_with_reference_over_random_lines():
    rng = np.random.default_rng(2026)
    for _ in range(60):
        line, st = random_line(rng), random_state(rng)
        Q = flows_for(line, st, rng, 24)
        try:
            ref = np.array([ref_head_loss(line, float(q), st) for q in Q])
        except HeadlineError as exc:        # e.g. ε/D of a reducer's small bore refused
            for arg in (float(Q[-1]), Q[:3], Q):
                with pytest.raises(type(exc)):
                    line.head_loss(arg, st)
            continue
        close(line.head_loss(Q, st), ref, 1e-11)                       # numpy path
        close([line.head_loss(float(q), st) for q in Q], ref, 1e-11)   # one float at a time
        close(line.head_loss(Q[:SMALL_N], st), ref[:SMALL_N], 1e-11)   # a few at a time
        close(line.segment_losses(Q[:3], st).sum(axis=0), ref[:3], 1e-11)
        close(line.segment_losses(Q, st).sum(axis=0), ref, 1e-11)
        for s, row in zip(line.segments, line.segment_losses(Q, st), strict=True):
            hf, hk, _ = s.loss_terms(Q, st)
            close(hf + hk, row)


def test_head_loss_shapes_and_types_unchanged():
    line = Route(100.0, fittings=(POOL[8],)).line(pipe(0.1, 4.5e-5))
    st = NS(rho=998.2, mu=1.002e-3)
    assert line.head_loss(0.01, st).shape == ()
    assert isinstance(line.head_loss(0.01, st), np.ndarray)
    assert line.head_loss(np.array([0.01]), st).shape == (1,)
    assert line.head_loss(np.zeros((2, 3)), st).shape == (2, 3)
    assert line.head_loss(np.array([]), st).shape == (0,)
    assert float(line.head_loss(0.0, st)) == 0.0
    assert line.segment_losses(0.01, st).shape == (1, 1)


@pytest.mark.parametrize("bad, field", [
    (-0.01, "flow"), (float("nan"), "flow"), (float("inf"), "flow"),
], ids=["negative flow", "NaN flow", "infinite flow"])
def test_bad_flows_refused_on_every_path(bad, field):
    line = Line("L", (Segment("s", pipe(0.1, 4.5e-5), 10.0, 0.0, (POOL[8],)),))
    st = NS(rho=1000.0, mu=1e-3)
    msgs = set()
    for Q in (bad, np.array([0.01, bad]), np.r_[np.linspace(0, 0.02, 20), bad]):
        with pytest.raises(OutOfRangeError, match=f"'{field}'") as exc:
            line.head_loss(Q, st)
        msgs.add(str(exc.value))
    assert len(msgs) == 1


@pytest.mark.parametrize("state", [NS(rho=1000.0, mu=1e-7), NS(rho=float("nan"), mu=1e-3)],
                         ids=["Re above 1e10 (a unit error)", "NaN density"])
def test_refused_reynolds_same_on_every_path(state):
    line = Line("L", (Segment("s", pipe(0.5, 4.5e-5), 10.0, 0.0, (POOL[8], POOL[12])),))
    msgs = set()
    for Q in (5.0, np.array([0.001, 5.0]), np.r_[np.linspace(0.001, 0.002, 29), 5.0]):
        with pytest.raises(OutOfRangeError, match="'Reynolds number'") as exc:
            line.head_loss(Q, state)
        msgs.add(str(exc.value))
    assert len(msgs) == 1


def test_very_rough_pipe_and_zero_flow():
    """ε/D at the refusal limit 0.1, laminar-to-turbulent flows and zero flow."""
    line = Line("L", (Segment("s", pipe(0.05, 0.005), 30.0, 0.0, POOL[8:14]),))
    st = NS(rho=900.0, mu=0.05)
    Q = np.linspace(0.0, 0.05, 40)
    ref = np.array([ref_head_loss(line, float(q), st) for q in Q])
    close(line.head_loss(Q, st), ref, 1e-11)
    close([line.head_loss(float(q), st) for q in Q], ref, 1e-11)
    assert line.head_loss(0.0, st) == 0.0


def test_non_finite_K_refused_on_every_path(monkeypatch):
    """A row whose method gives a non-finite K is refused by name on every path."""
    row = Fitting("hooper_2k", 1, {"name": "Elbow, 90°, Long-radius (R/D = 1.5), All types"},
                  label="odd elbow")
    monkeypatch.setitem(ff.Hooper, row.params["name"], (math.inf, 0.2))
    fit_mod._plan.cache_clear()
    line = Line("L", (Segment("s", pipe(0.1, 4.5e-5), 10.0, 0.0, (row,)),))
    st = NS(rho=1000.0, mu=1e-3)
    try:
        for Q in (0.01, np.array([0.01, 0.02]), np.linspace(0.001, 0.02, 30)):
            with pytest.raises(NoSolutionError, match="odd elbow"):
                line.head_loss(Q, st)
    finally:
        fit_mod._plan.cache_clear()


# ---------------------------------------------------------------- sizing profiles


def test_route_profiles_against_station_by_station_profile():
    """route_profiles (worked back from the end, all flows at once) against
    Line.profile (Bernoulli station to station, forward) from the same start pressure."""
    rng = np.random.default_rng(7)
    for _ in range(20):
        L = float(rng.uniform(50, 3000))
        pts = (("crest", 0.4 * L, float(rng.uniform(-20, 40))),
               ("end", L, float(rng.uniform(-20, 40))))
        route = Route(L, pts, fittings=tuple(POOL[i] for i in rng.choice(len(POOL), 4,
                                                                       replace=False)))
        line = route.line(pipe(float(rng.uniform(0.03, 0.5)), 4.5e-5))
        st = random_state(rng)
        Q = flows_for(line, st, rng, 8)[[1, 5, 2]]
        profs, hl = route_profiles(line, st, Q, 2e5)
        close(hl, line.head_loss(np.r_[Q, np.zeros(SMALL_N)], st)[:3])
        for prof, q in zip(profs, Q, strict=True):
            fwd = line.profile(float(q), st, prof.stations[0].p)
            close(prof.column("p"), fwd.column("p"), 1e-9)
            close(prof.column("hgl"), fwd.column("hgl"), 1e-9)

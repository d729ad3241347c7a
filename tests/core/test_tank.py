"""Tank geometry against standard geometry formulas and independent integrations."""

from __future__ import annotations

import math

import numpy as np
import pytest
from raising import raises_exactly
from scipy.integrate import quad

from kit.core.tank import (
    Head,
    Tank,
    horizontal_cylinder,
    sphere,
    strapping_table,
    vertical_cylinder,
)
from kit.errors import InputError, OutOfRangeError, UnknownChoiceError

pi = math.pi


# ---------- independent geometry written here --------------------------------------------

def segment_area(R, h):
    """Circular segment of depth h in a circle of radius R (standard geometry)."""
    return R * R * math.acos((R - h) / R) - (R - h) * math.sqrt(2 * R * h - h * h)


def torispherical_profile(D, f, k):
    """Radius r(z) of a torispherical head, z from the tangent line outward, and its depth.

    Crown radius fD tangent to a knuckle of radius kD tangent to the shell (standard
    geometry of a dished head, derived here).
    """
    R, Rc, rk = D / 2, f * D, k * D
    zc = -math.sqrt((Rc - rk) ** 2 - (R - rk) ** 2)   # crown centre, below the tangent line
    a = Rc + zc
    zt = -zc * rk / (Rc - rk)                          # knuckle-crown junction

    def r(z):
        if z <= zt:
            return (R - rk) + math.sqrt(max(rk * rk - z * z, 0.0))
        return math.sqrt(max(Rc * Rc - (z - zc) ** 2, 0.0))

    return r, a, zt


def torispherical_volume(D, f, k, fill=None):
    """Volume of a torispherical bottom head filled to ``fill`` above its apex (quad)."""
    r, a, zt = torispherical_profile(D, f, k)
    fill = a if fill is None else fill
    lo = a - fill
    pts = [zt] if lo < zt < a else None
    return quad(lambda z: pi * r(z) ** 2, lo, a, points=pts, epsabs=1e-13, epsrel=1e-12)[0]


# ---------- full volumes ------------------------------------------------------------------

D, L = 2.0, 3.0
R = D / 2
CYL = pi * R * R * L


@pytest.mark.parametrize("tank, expected", [
    pytest.param(vertical_cylinder(D, L), CYL, id="flat cylinder pi D^2 L/4 (standard geometry)"),
    pytest.param(vertical_cylinder(D, L, "ellipsoidal", "ellipsoidal"), CYL + 2 * pi * D**3 / 24,
                 id="2:1 ellipsoidal head pi D^3/24 (standard geometry), vertical"),
    pytest.param(horizontal_cylinder(D, L, "ellipsoidal"), CYL + 2 * pi * D**3 / 24,
                 id="2:1 ellipsoidal head pi D^3/24 (standard geometry), horizontal"),
    pytest.param(vertical_cylinder(D, L, "spherical", "spherical"), CYL + 2 * pi * D**3 / 12,
                 id="hemispherical head pi D^3/12 (standard geometry), vertical"),
    pytest.param(horizontal_cylinder(D, L, "spherical"), CYL + 2 * pi * D**3 / 12,
                 id="hemispherical head pi D^3/12 (standard geometry), horizontal"),
    pytest.param(vertical_cylinder(D, L, Head("conical", depth=0.8)), CYL + pi * D**2 * 0.8 / 12,
                 id="cone pi D^2 h/12 (standard geometry), vertical bottom"),
    pytest.param(horizontal_cylinder(D, L, Head("conical", depth=0.5), Head("conical", ratio=0.5)),
                 CYL + pi * D**2 * (0.5 + 1.0) / 12,
                 id="cones of unequal depth pi D^2 h/12 (standard geometry), horizontal"),
    pytest.param(vertical_cylinder(D, L, Head("spherical", depth=0.3)),
                 CYL + pi * 0.3 * (3 * R * R + 0.09) / 6,
                 id="spherical cap pi a (3R^2 + a^2)/6 (standard geometry)"),
    pytest.param(vertical_cylinder(D, L, Head("ellipsoidal", depth=1.5)),
                 CYL + 2 / 3 * pi * R * R * 1.5, id="semi-ellipsoid 2/3 pi R^2 a (standard geometry)"),
    pytest.param(sphere(D), pi * D**3 / 6, id="sphere pi D^3/6 (standard geometry)"),
])
def test_full_volume_standard_geometry(tank, expected):
    assert tank.V_total == pytest.approx(expected, rel=1e-12)
    assert tank.volume(tank.h_max) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("f, k", [(1.0, 0.06), (0.9, 0.17), (0.8, 0.1)],
                         ids=["ASME F&D", "2:1 torispherical", "ASME 80/10"])
def test_torispherical_head_against_profile_integral(f, k):
    # independent: solid of revolution of crown + knuckle profile, by scipy quad (this test)
    _, a, _ = torispherical_profile(D, f, k)
    V_head = torispherical_volume(D, f, k)
    t = vertical_cylinder(D, L, Head("torispherical", f=f, k=k), Head("torispherical", f=f, k=k))
    assert t.h_max == pytest.approx(L + 2 * a, rel=1e-10)
    assert t.V_total == pytest.approx(CYL + 2 * V_head, rel=1e-8)
    for fill in (0.1 * a, 0.5 * a, 0.9 * a):
        assert t.volume(fill) == pytest.approx(torispherical_volume(D, f, k, fill), rel=1e-7)
    # ASME F&D head volume ≈ 0.0809 D³ (handbook figure, from memory)
    if (f, k) == (1.0, 0.06):
        assert V_head / D**3 == pytest.approx(0.0809, rel=5e-3)


# ---------- partial fills -----------------------------------------------------------------

def test_vertical_conical_bottom_partial():
    a = 0.8
    t = vertical_cylinder(D, L, Head("conical", depth=a))
    for h in (0.1, 0.4, 0.8):   # cone of apex down: pi R^2 h^3/(3 a^2) (standard geometry)
        assert t.volume(h) == pytest.approx(pi * R * R * h**3 / (3 * a * a), rel=1e-12)
    h = a + 1.0                 # plus the straight shell above it
    assert t.volume(h) == pytest.approx(pi * R * R * a / 3 + pi * R * R * 1.0, rel=1e-12)


def test_vertical_top_head_sits_on_top():
    # head placement: head1 = bottom, head2 = top; empty space in a conical top head of depth
    # a at distance x below its apex is pi R^2 x^3/(3 a^2) (standard geometry)
    a = 0.6
    t = vertical_cylinder(D, L, "flat", Head("conical", depth=a))
    assert t.h_max == pytest.approx(L + a)
    assert t.volume(1.0) == pytest.approx(pi * R * R * 1.0, rel=1e-12)   # flat bottom
    for x in (0.1, 0.3, 0.6):
        h = t.h_max - x
        assert t.V_total - t.volume(h) == pytest.approx(pi * R * R * x**3 / (3 * a * a), rel=1e-9)


def test_vertical_ellipsoidal_and_spherical_cap_partial():
    a = 0.5   # 2:1 ellipsoidal: pi R^2 (h^2/a - h^3/(3 a^2)) (standard geometry)
    t = vertical_cylinder(D, L, "ellipsoidal")
    for h in (0.1, 0.3, 0.5):
        assert t.volume(h) == pytest.approx(pi * R * R * (h * h / a - h**3 / (3 * a * a)), rel=1e-12)
    a = 0.3   # spherical cap of sphere radius Rs = (R^2 + a^2)/2a: pi h^2 (Rs - h/3)
    Rs = (R * R + a * a) / (2 * a)
    t = vertical_cylinder(D, L, Head("spherical", depth=a))
    for h in (0.05, 0.2, 0.3):
        assert t.volume(h) == pytest.approx(pi * h * h * (Rs - h / 3), rel=1e-12)


@pytest.mark.parametrize("h", [0.0, 1e-4, 0.2, 1.0, 1.7, 2.0])
def test_horizontal_partial_fills(h):
    # flat ends: L x circular segment (standard geometry)
    assert horizontal_cylinder(D, L).volume(h) == pytest.approx(L * segment_area(R, h), rel=1e-10,
                                                                abs=1e-15)
    # two 2:1 ellipsoidal ends make an ellipsoid (a, R, R): (a/R) pi h^2 (3R - h)/3
    a = D / 4
    expected = L * segment_area(R, h) + (a / R) * pi * h * h * (3 * R - h) / 3
    assert horizontal_cylinder(D, L, "ellipsoidal").volume(h) == pytest.approx(expected, rel=1e-10,
                                                                               abs=1e-15)


def test_sphere_partial():
    t = sphere(D)
    for h in (0.01, 0.5, 1.0, 1.5, 1.99):   # spherical cap pi h^2 (3R - h)/3 (standard geometry)
        assert t.volume(h) == pytest.approx(pi * h * h * (3 * R - h) / 3, rel=1e-12)


def test_horizontal_torispherical_allowed_and_symmetric():
    # slow in fluids (numeric integral) but allowed; half full is half the volume (symmetry)
    t = horizontal_cylinder(D, L, "torispherical")
    assert t.volume(R) == pytest.approx(t.V_total / 2, rel=1e-9)
    assert t.V_total == pytest.approx(CYL + 2 * torispherical_volume(D, 1.0, 0.06), rel=1e-7)


# ---------- level from volume, area ---------------------------------------------------------

@pytest.mark.parametrize("tank", [
    horizontal_cylinder(D, L), vertical_cylinder(D, L, "ellipsoidal", "torispherical"), sphere(D),
    strapping_table([0.0, 0.5, 1.0, 2.0], [0.0, 0.2, 1.0, 3.0]),
], ids=["horizontal", "vertical ellipsoidal/torispherical", "sphere", "table"])
def test_level_inverts_volume(tank):
    for h in (1e-3, 0.01, 0.3, 0.9 * tank.h_max, tank.h_max):
        assert tank.level(tank.volume(h)) == pytest.approx(h, abs=1e-9)
    hs = np.array([0.02, 0.5])
    np.testing.assert_allclose(tank.level(tank.volume(hs)), hs, atol=1e-9)


def test_level_is_exact_where_fluids_spline_is_not():
    # the trap: fluids' default h_from_V (100-point spline) is mm-wrong near the bottom
    from fluids.geometry import TANK

    h = 0.0146
    V = L * segment_area(R, h)
    spline = TANK(D=D, L=L, horizontal=True).h_from_V(V)
    assert abs(spline - h) > 5e-4                 # fluids' default is off by ~1 mm
    assert horizontal_cylinder(D, L).level(V) == pytest.approx(h, abs=1e-10)


def test_area_against_geometry():
    t = vertical_cylinder(D, L)
    # fluids' A_cross_sectional gives 0 at the bottom; ours gives pi D^2/4 there
    assert t._fluids.A_cross_sectional(0.0) == 0.0
    for h in (0.0, 1.0, L):
        assert t.area(h) == pytest.approx(pi * R * R, rel=1e-9)
    th = horizontal_cylinder(D, L)
    for h in (0.01, 0.5, 1.0, 1.9):          # 2 L sqrt(h (D - h)) (standard geometry)
        assert th.area(h) == pytest.approx(2 * L * math.sqrt(h * (D - h)), rel=1e-6)
    assert th.area(0.0) < 0.05                # → 0 at the bottom, and finite
    ts = sphere(D)
    for h in (0.01, 0.7, 1.0, 1.6):          # pi (2 R h - h^2) (standard geometry)
        assert ts.area(h) == pytest.approx(pi * (2 * R * h - h * h), rel=1e-6)


# ---------- strapping tables ------------------------------------------------------------------

def test_table_of_vertical_cylinder_equals_cylinder():
    cyl = vertical_cylinder(D, L)
    hs = np.linspace(0.0, L, 7)
    tab = strapping_table(hs, cyl.volume(hs))
    for h in (0.0, 0.37, 1.5, 2.99):
        assert tab.volume(h) == pytest.approx(cyl.volume(h), rel=1e-12, abs=1e-14)
        assert tab.area(h) == pytest.approx(pi * R * R, rel=1e-10)
        assert tab.level(cyl.volume(h)) == pytest.approx(h, abs=1e-10)
    assert tab.h_max == L and tab.V_total == pytest.approx(cyl.V_total)


def test_table_of_horizontal_cylinder_close_to_cylinder():
    cyl = horizontal_cylinder(D, L)
    hs = np.linspace(0.0, D, 201)
    tab = strapping_table(hs, cyl.volume(hs))
    probe = np.linspace(0.003, 1.997, 57)
    # PCHIP is least accurate in the first and last rows, where V ~ h^1.5 (3.4e-5 of V_total)
    np.testing.assert_allclose(tab.volume(probe), cyl.volume(probe), rtol=0, atol=5e-5 * cyl.V_total)
    np.testing.assert_allclose(tab.volume(probe[3:-3]), cyl.volume(probe[3:-3]), rtol=2e-5)


# ---------- refusals --------------------------------------------------------------------------

def test_level_above_tank_is_refused():
    t = vertical_cylinder(D, L, "ellipsoidal")
    with raises_exactly(OutOfRangeError, r"'level in 'tank'' must be between 0 and 3\.5 m, not 3\.6 m"):
        t.volume(3.6)
    with raises_exactly(OutOfRangeError, r"'level in 'tank''.*-0\.1 m"):
        t.area(-0.1)
    with raises_exactly(OutOfRangeError, r"'volume in 'tank'' must be between 0 and"):
        t.level(t.V_total * 1.01)


def test_bad_dimensions_are_refused():
    with raises_exactly(OutOfRangeError, r"'tank diameter D' must be between 0 and 1000 m, not -2 m"):
        vertical_cylinder(-2.0, 3.0)
    with raises_exactly(OutOfRangeError, r"'straight length L' must be between 0 and 10000 m, not 0 m"):
        horizontal_cylinder(2.0, 0.0)
    with raises_exactly(OutOfRangeError, r"'depth of conical head' must be between 0 and 10000 m, "
                                         r"not -0\.5 m"):
        Head("conical", depth=-0.5)
    with raises_exactly(OutOfRangeError, r"'depth of spherical bottom head' must be between 0 and 1 m"):
        vertical_cylinder(2.0, 3.0, Head("spherical", depth=1.3))


def test_guppy_head_refused_on_vertical_tank():
    # fluids accepts a vertical 'guppy' head and ignores its volume
    with raises_exactly(InputError, r"'bottom head' is not offered: fluids ignores a guppy head"):
        vertical_cylinder(2.0, 3.0, "guppy")
    with raises_exactly(InputError, r"'head kind' is not offered"):
        Head("guppy")


def test_unknown_shape_and_head_refused():
    with raises_exactly(UnknownChoiceError, r"'tank shape' must be one of 'cylinder', 'sphere', 'table'"):
        Tank("cone")
    with raises_exactly(UnknownChoiceError, r"'top head' must be one of 'flat', 'conical'"):
        vertical_cylinder(2.0, 3.0, "flat", "dome")
    with raises_exactly(UnknownChoiceError, r"'tank orientation' must be one of 'vertical', 'horizontal'"):
        Tank("cylinder", "slanted", 2.0, 3.0)


def test_inconsistent_heads_refused():
    with raises_exactly(InputError, r"'depth of torispherical head' takes its depth from f and k"):
        Head("torispherical", depth=0.3)
    with raises_exactly(InputError, r"'depth of conical head' must be given"):
        Head("conical")
    with raises_exactly(InputError, r"'heads of a sphere'.*must be left unset"):
        Tank("sphere", D=2.0, head1="ellipsoidal")
    with raises_exactly(OutOfRangeError, r"'knuckle radius ratio k of torispherical head'"):
        Head("torispherical", k=0.0)


def test_bad_strapping_tables_refused():
    with raises_exactly(InputError, r"'strapping table levels' must increase strictly \(row 2 after 1 m\)"):
        strapping_table([0.0, 1.0, 1.0], [0.0, 1.0, 2.0])
    with raises_exactly(InputError, r"'strapping table volumes' must not decrease \(row 2 after 2 m³\)"):
        strapping_table([0.0, 1.0, 2.0], [0.0, 2.0, 1.5])
    with raises_exactly(InputError, r"'strapping table volumes' must have one volume per level"):
        strapping_table([0.0, 1.0, 2.0], [0.0, 2.0])
    with raises_exactly(OutOfRangeError, r"'strapping table volume' must be at least 0 m³"):
        strapping_table([0.0, 1.0], [-1.0, 2.0])
    t = strapping_table([0.5, 1.0, 2.0], [0.0, 1.0, 3.0])
    with raises_exactly(OutOfRangeError, r"'level in 'tank'' must be between 0\.5 and 2 m, not 0\.2 m"):
        t.volume(0.2)

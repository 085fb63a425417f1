"""Section-based estimates (Simpson's rules, offsets, lofting) against closed forms and the exact mesh."""
from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from meshhydro import InputError, load_hull
from meshhydro.forms import box, wigley, wigley_exact
from meshhydro.sections import (
    Offsets,
    bonjean,
    integrate,
    loft_offsets,
    offsets_from_mesh,
    parse_offsets,
    section_hydrostatics,
    sectional_areas,
)

from conftest import tm


@settings(max_examples=50, deadline=None)
@given(c=st.lists(st.floats(-5, 5), min_size=4, max_size=4), n=st.integers(2, 21), a=st.floats(-3, 0),
       w=st.floats(0.5, 4))
def test_simpson_is_exact_for_cubics(c, n, a, w):
    # Simpson's first rule (even n) and first + second rule (odd n) integrate cubics exactly
    # (any numerical-analysis text)
    x = np.linspace(a, a + w, n + 1)
    y = c[0] + c[1] * x + c[2] * x ** 2 + c[3] * x ** 3
    exact = sum(c[k] * ((a + w) ** (k + 1) - a ** (k + 1)) / (k + 1) for k in range(4))
    val, note = integrate(y, x, "simpson")
    assert val == pytest.approx(exact, rel=1e-11, abs=1e-11)
    assert ("second rule" in note) == (n % 2 == 1 and n >= 3)


def test_box_exact_under_every_rule():
    # a box is exact under Simpson and trapezoid: its ordinates are constant (KB = T/2, BMt = B²/12T,
    # BMl = L²/12T, textbook); only the longitudinal inertia has a non-linear integrand (x² y)
    hull = load_hull(tm(*box(20.0, 6.0, 4.0)))
    for rule in ("simpson", "trapezoid"):
        for ns, nw in ((4, 4), (5, 3), (7, 8)):
            off = offsets_from_mesh(hull, ns, nw)
            rows = section_hydrostatics(off, rule=rule).rows
            for r in rows:
                T = r["draft"]
                assert r["volume"] == pytest.approx(120 * T, rel=1e-12)
                assert r["vcb"] == pytest.approx(T / 2, rel=1e-12)
                assert r["bmt"] == pytest.approx(36 / (12 * T), rel=1e-12)
                if rule == "simpson":  # ∫x²y dx has a quadratic integrand: exact under Simpson only
                    assert r["bml"] == pytest.approx(400 / (12 * T), rel=1e-12)
                assert r["lcb"] == pytest.approx(10.0, abs=1e-12)


def _wigley_offsets(n: int, m: int, L=10.0, B=1.0, T=0.625) -> Offsets:
    # half-breadths from the closed-form Wigley formula (not from a mesh)
    xs = np.linspace(-L / 2, L / 2, n + 1)
    zs = np.linspace(0.0, T, m + 1)
    xi = 2 * xs / L
    y = 0.5 * B * (1 - xi[:, None] ** 2) * (1 - ((T - zs[None, :]) / T) ** 2)
    return Offsets(xs, zs, y)


def test_wigley_coefficients_approached_simpson_faster():
    ex = wigley_exact(10.0, 1.0, 0.625)
    err = {"simpson": [], "trapezoid": []}
    for n in (4, 8, 16, 32):
        off = _wigley_offsets(n, n)
        for rule in err:
            r = section_hydrostatics(off, rule=rule).rows[-1]
            err[rule].append({k: abs(r[k] - ex[k]) / ex[k] for k in ("volume", "awp", "vcb", "bmt", "bml")})
    # the Wigley ordinates are quadratic in x and z, so the integrands of V, Awp and the
    # vertical moment (y z) are at most cubic: Simpson is exact for them
    for k in ("volume", "awp", "vcb"):
        assert err["simpson"][0][k] < 1e-12
    # y³ (BMt) and x² y (BMl) are of degree 6 and 4: Simpson converges as h⁴, the trapezoid as h²
    for k in ("bmt", "bml"):
        s = [e[k] for e in err["simpson"]]
        t = [e[k] for e in err["trapezoid"]]
        assert all(a > b for a, b in zip(s, s[1:], strict=False)) and all(a > b for a, b in zip(t, t[1:], strict=False))
        assert all(si < ti for si, ti in zip(s, t, strict=False))
        assert np.log2(s[-2] / s[-1]) == pytest.approx(4.0, abs=0.3)
        assert np.log2(t[-2] / t[-1]) == pytest.approx(2.0, abs=0.3)
    for k in ("volume", "awp"):
        assert all(a > b for a, b in zip([e[k] for e in err["trapezoid"]][:-1], [e[k] for e in err["trapezoid"]][1:], strict=False))


def test_mesh_to_offsets_to_loft_converges_to_the_original():
    T = 0.625
    orig = load_hull(tm(*wigley(10.0, 1.0, T, stations=160, waterlines=64)), x_ref=0.0)
    ex = orig.hydrostatics(T)
    errs = []
    for n in (8, 16, 32, 64):
        off = offsets_from_mesh(orig, n, n // 2)
        lofted = load_hull(tm(*loft_offsets(off)), x_ref=0.0)
        assert lofted.report.closed and not lofted.report.problems
        h = lofted.hydrostatics(T)
        errs.append(max(abs(h.volume / ex.volume - 1), abs(h.bmt / ex.bmt - 1), abs(h.vcb / ex.vcb - 1)))
    assert all(a > b for a, b in zip(errs, errs[1:], strict=False))
    assert errs[-1] < 2e-3


def test_bonjean_and_sectional_areas_agree_and_sum_to_volume():
    # Bonjean areas at the design draft equal the sectional area curve; its integral is the volume
    hull = load_hull(tm(*box(20.0, 6.0, 4.0)))
    xs = np.linspace(0.5, 19.5, 20)
    bj = bonjean(hull, xs, [1.0, 2.0])
    assert np.allclose(bj.area[:, 1], sectional_areas(hull, xs, 2.0))
    assert np.allclose(bj.area[:, 0], 6.0) and np.allclose(bj.moment[:, 0], 6.0 * 0.5)
    assert np.allclose(bj.area[:, 1], 12.0) and np.allclose(bj.moment[:, 1], 12.0)


GOOD = "station_x,waterline_z,half_breadth\n0,0,1\n0,1,1\n10,0,1\n10,1,1\n"


@pytest.mark.parametrize("text,needle", [
    ("station_x,waterline_z\n0,0\n", "lacks column 'half_breadth'"),
    ("station_x,waterline_z,half_breadth\n0,0,1\n0,1,\n10,0,1\n10,1,1\n", "row 3, column half_breadth: missing"),
    ("station_x,waterline_z,half_breadth\n0,0,1\n0,1,x\n10,0,1\n10,1,1\n", "row 3, column half_breadth: 'x'"),
    ("station_x,waterline_z,half_breadth\n0,0,1\n0,1,-2\n10,0,1\n10,1,1\n", "row 3, column half_breadth: negative"),
    ("station_x,waterline_z,half_breadth\n0,0,1\n0,1,1\n10,0,1\n", "station_x 10.0 has no half_breadth on waterline_z 1.0"),
    ("station_x,waterline_z,half_breadth\n0,0,1\n0,0,1\n10,0,1\n10,1,1\n0,1,1\n", "row 3, columns station_x/waterline_z"),
    ("station_x,waterline_z,half_breadth,kind\n0,0,1,offset\n0,1,1,deck\n10,0,1,\n10,1,1,\n", "row 3, column kind"),
    ("station_x,waterline_z,half_breadth\n0,nan,1\n", "row 2, column waterline_z"),
    ("", "empty"),
])
def test_bad_tables_name_their_cell(text, needle):
    with pytest.raises(InputError) as e:
        parse_offsets(text, source="t.csv")
    assert needle in str(e.value) and "t.csv" in str(e.value)


def test_good_table_with_keel_and_sheer_rows_lofts_closed():
    text = ("station_x,waterline_z,half_breadth,kind\n"
            "0,0.2,0.5,keel\n0,0,0,offset\n0,1,1,offset\n0,2,1,offset\n0,1.8,1,sheer\n"
            "10,0.2,0.5,keel\n10,0,0,offset\n10,1,1,offset\n10,2,1,offset\n10,1.8,1,sheer\n")
    off = parse_offsets(text)
    assert np.allclose(off.keel, 0.2) and np.allclose(off.sheer, 1.8)
    hull = load_hull(tm(*loft_offsets(off)))
    assert hull.report.closed and not hull.report.problems
    # prism: section from z=0.2 (half-breadth 0.5) to 1 (1.0) to 1.8 (1.0), 10 m long
    area = 2 * (0.8 * 0.75 + 0.8 * 1.0)
    assert hull.total_volume == pytest.approx(10 * area, rel=1e-12)
    assert parse_offsets(GOOD).half_breadth.shape == (2, 2)

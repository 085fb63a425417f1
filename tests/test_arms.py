"""Heeling arms against closed forms on analytic GZ curves (invented curves, exact integrals)."""
from __future__ import annotations

import math

import numpy as np
import pytest

from meshhydro import InputError
from meshhydro.arms import ArmCriterion, GZCurve, arm_analysis, evaluate_arm, make_arm

G0 = 0.8
H = np.arange(0.0, 181.0, 0.5)
SINE = GZCurve(H, G0 * np.sin(np.radians(H)))  # GZ = G0 sin φ
DEG = math.pi / 180


def test_constant_arm_on_sine():
    # closed form: intercepts asin(h/G0) and 180° minus it; residual ∫(G0 sin φ - h) dφ
    h = 0.3
    an = arm_analysis(SINE, make_arm("towing", "constant", a=h))
    e = math.degrees(math.asin(h / G0))
    assert an.equilibrium == pytest.approx(e, abs=1e-6)
    assert an.second_intercept == pytest.approx(180.0 - e, abs=1e-6)
    assert an.end == an.second_intercept and an.end_reason == "second intercept"
    re, rc = math.radians(e), math.radians(180 - e)
    assert an.residual_area == pytest.approx(G0 * (math.cos(re) - math.cos(rc)) - h * (rc - re), abs=1e-7)
    assert an.area_before == pytest.approx(h * re - G0 * (1 - math.cos(re)), abs=1e-7)
    assert an.ratio == pytest.approx(an.residual_area / an.area_before)


def test_cosine_arm_equilibrium_is_arctangent():
    # closed form: G0 sin φ = a cos φ at tan φ = a / G0; ∫ a cos φ = a sin φ
    a = 0.25
    arm = make_arm("wind", "cosine", a=a, n=1)
    an = arm_analysis(SINE, arm, limit=40.0)
    e = math.degrees(math.atan(a / G0))
    assert an.equilibrium == pytest.approx(e, abs=1e-6)
    assert an.end == 40.0 and an.end_reason == "limit angle"
    re, r40 = math.radians(e), math.radians(40)
    exact = G0 * (math.cos(re) - math.cos(r40)) - a * (math.sin(r40) - math.sin(re))
    assert an.residual_area == pytest.approx(exact, abs=1e-7)


@pytest.mark.parametrize("n", [0, 1, 2, 3, 1.5])
def test_cosine_arm_integral(n):
    # ∫ cos^n by scipy quad as the outside reference (closed forms used inside for n = 0, 1, 2)
    from scipy.integrate import quad

    arm = make_arm("turning", "cosine", a=0.2, n=n)
    ref = quad(lambda p: 0.2 * math.cos(p) ** n, math.radians(5), math.radians(70))[0]
    assert arm.integral(5.0, 70.0) == pytest.approx(ref, rel=1e-10)


def test_table_arm_integral_and_range():
    # trapezoid of a piecewise-linear function is exact
    arm = make_arm("crowding", "table", table=[[0, 0.1], [20, 0.1], [60, 0.0]])
    assert arm.integral(10, 40) == pytest.approx((10 * 0.1 + 20 * (0.1 + 0.05) / 2) * DEG, rel=1e-13)
    assert arm(np.array([20.0, 40.0])) == pytest.approx([0.1, 0.05])
    with pytest.raises(InputError, match="covers 0..60"):
        arm(70.0)
    an = arm_analysis(SINE, arm)  # searched only over the table's angles
    assert an.end == 60.0 and an.end_reason == "end of the arm's table"


def test_flooding_caps_residual_area_and_shading_data():
    arm = make_arm("lifting", "constant", a=0.3)
    an = arm_analysis(SINE, arm, limit=60.0, flooding=45.0, samples=11)
    assert an.end == 45.0 and an.end_reason == "downflooding angle"
    x, g, h = an.shade["residual"]
    assert len(x) == 11 and x[0] == pytest.approx(an.equilibrium) and x[-1] == 45.0
    assert g == pytest.approx(G0 * np.sin(np.radians(x)), abs=1e-6) and np.all(h == 0.3)
    assert set(an.to_dict()["shade"]) == {"before", "residual"}


def test_criteria_as_minima_and_maxima():
    arm = make_arm("crowding", "constant", a=0.2)
    e = math.degrees(math.asin(0.2 / G0))  # 14.48°
    res = evaluate_arm(SINE, arm, [
        ArmCriterion("heel max 10", "equilibrium_angle", maximum=10.0),
        ArmCriterion("heel max 16", "equilibrium_angle", maximum=16.0),
        ArmCriterion("residual", "residual_area", minimum=0.05, limit=40.0),
        ArmCriterion("ratio", "area_ratio", minimum=1.4, maximum=1e9, limit=40.0),
    ])
    by = {r.id: r for r in res}
    assert not by["heel max 10"].passed and by["heel max 10"].margin == pytest.approx(10 - e, abs=1e-6)
    assert by["heel max 16"].passed and by["heel max 16"].margin == pytest.approx(16 - e, abs=1e-6)
    re, r40 = math.radians(e), math.radians(40)
    resid = G0 * (math.cos(re) - math.cos(r40)) - 0.2 * (r40 - re)
    assert by["residual"].value == pytest.approx(resid, abs=1e-7) and by["residual"].passed
    assert by["ratio"].value == pytest.approx(resid / (0.2 * re - G0 * (1 - math.cos(re))), rel=1e-6)


def test_arm_larger_than_gz_fails_with_note():
    res = evaluate_arm(SINE, make_arm("tow", "constant", a=1.0),
                       [ArmCriterion("t", "residual_area", minimum=0.0)])
    assert not res[0].passed and res[0].value is None and "never reaches" in res[0].note


@pytest.mark.parametrize("kwargs,msg", [
    (dict(kind="linear", a=1.0), "kind must be"),
    (dict(kind="constant"), "needs a"),
    (dict(kind="constant", a=1.0, n=2), "n is not used"),
    (dict(kind="cosine", a=1.0, n=-1), "n must not be negative"),
    (dict(kind="table", table=[[0, 0.1], [0, 0.2]]), "row 2"),
    (dict(kind="table", table=[[0, 0.1]]), "at least two"),
    (dict(kind="constant", a="x"), "a must be a number"),
])
def test_bad_arms_refused(kwargs, msg):
    with pytest.raises(InputError, match=f"arm 'A1'.*{msg}"):
        make_arm("A1", **kwargs)


def test_bad_gz_and_criteria_refused():
    with pytest.raises(InputError, match="equal-length"):
        GZCurve([0, 1, 2], [0, 1])
    with pytest.raises(InputError, match="distinct"):
        GZCurve([0, 1, 1], [0, 1, 2])
    with pytest.raises(InputError, match="minimum or a maximum"):
        ArmCriterion("x", "residual_area")
    with pytest.raises(InputError, match="kind must be"):
        ArmCriterion("x", "energy", minimum=1.0)


def test_fractional_cosine_arm_stops_at_90():
    # cos^1.5 has no real value beyond 90°; the search stops there and says so
    arm = make_arm("wind", "cosine", a=0.1, n=1.5)
    an = arm_analysis(SINE, arm)
    assert an.end == 90.0 and "90°" in an.end_reason
    with pytest.raises(InputError, match="undefined beyond 90"):
        arm(120.0)

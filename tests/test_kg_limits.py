"""KG limit curves: closed forms for boxes, the KN-versus-KG claim, and the bracketing itself."""
from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from meshhydro import InputError, load_hull
from meshhydro.criteria import IMO_2008_GENERAL, CriteriaSet, Criterion
from meshhydro.forms import box, wigley
from meshhydro.kg_limits import KNCurve, kg_limit, kg_limits, kg_limits_for_hull

RHO = 1.025
GM_ONLY = CriteriaSet("GM only", "IMO 2008 IS Code, Part A, 2.2 (GM0 >= 0.15 m)",
                      (Criterion("2.2.4", "gm", 0.15, "initial metacentric height GM0"),))


def _hull(v, f, **kw):
    return load_hull(trimesh.Trimesh(v, f, process=False), **kw)


def test_gm_criterion_gives_km_minus_limit_on_a_box():
    # box closed forms (Barrass & Derrett): KM = T/2 + B²/(12 T); with GM0 >= 0.15 m (IS Code 2.2)
    # KG_max = KM - 0.15; KM is least at T = B/√6, so KG_max falls, then rises, through that draught
    L, B, D = 20.0, 6.0, 6.0
    hull = _hull(*box(L, B, D))
    drafts = np.array([1.0, 1.5, 2.0, B / math.sqrt(6), 3.0, 3.5])
    ticks = []
    rows = kg_limits_for_hull(hull, RHO * L * B * drafts, GM_ONLY, heels=range(0, 31, 5), xtol=1e-9,
                              progress=lambda: ticks.append(1))
    assert len(ticks) == len(drafts)  # one progress step per displacement
    km = drafts / 2 + B * B / (12 * drafts)
    kg = np.array([r.kg_max for r in rows])
    assert kg == pytest.approx(km - 0.15, abs=1e-8)
    assert all(r.governing == "2.2.4" and r.method == "kn" for r in rows)
    assert [r.gm_required for r in rows] == pytest.approx([0.15] * len(rows), abs=1e-8)
    d = np.diff(kg)
    assert np.all(d[:2] < 0) and np.all(d[-2:] > 0)  # monotone on each side of T = B/√6


def test_wall_sided_box_where_gm_governs_the_imo_set():
    # a wide, deep box (wall-sided past 40°: bilge emerges at atan(7.6/9) = 40.2°) whose areas and GZ
    # clear 2.2.1 and 2.2.2 at GM = 0.15 m, so 2.2.4 governs and KG_max = KM - 0.15 exactly
    L, B, D, T = 40.0, 18.0, 16.0, 7.6
    hull = _hull(*box(L, B, D))
    row = kg_limits_for_hull(hull, [RHO * L * B * T], IMO_2008_GENERAL, heels=range(0, 61), xtol=1e-9)[0]
    assert row.governing == "2.2.4"
    assert row.kg_max == pytest.approx(T / 2 + B * B / (12 * T) - 0.15, abs=1e-8)
    assert all(m >= 0 for m in row.margins.values())


def test_kn_depends_on_kg_only_through_trim():
    # GZ = KN - KG sin φ exactly at a given attitude (textbook cross-curve relation); the free-trim
    # balance uses G's height when the hull trims, so KN then changes with KG (see kg_limits docstring)
    box_hull = _hull(*box(20.0, 6.0, 4.0))
    c0 = box_hull.righting_curve(150.0, (10.0, 0.0, 0.0), heels=range(0, 61, 10))
    c1 = box_hull.righting_curve(150.0, (10.0, 0.0, 2.0), heels=range(0, 61, 10))
    assert np.all(c0.trim == 0) and np.abs(c0.kn - c1.kn).max() < 1e-12
    w = _hull(*wigley(10.0, 1.0, 0.625, stations=24, waterlines=10), x_ref=0.0)
    t0 = w.righting_curve(3.0, (0.3, 0.0, 0.0), heels=range(0, 61, 10))
    t1 = w.righting_curve(3.0, (0.3, 0.0, 0.5), heels=range(0, 61, 10))
    assert np.abs(t0.trim).min() > 0.5
    assert np.abs(t0.kn - t1.kn).max() > 1e-5


def test_trimming_hull_is_refined_with_full_curves():
    w = _hull(*wigley(10.0, 1.0, 0.625, stations=24, waterlines=10), x_ref=0.0)
    heels = range(0, 61, 2)
    row = kg_limits_for_hull(w, [3.0], IMO_2008_GENERAL, lcg=0.3, heels=heels, xtol=1e-7)[0]
    assert row.method == "refined" and row.kg_max is not None
    from meshhydro.criteria import evaluate

    # just below the limit every criterion passes on a curve solved at that KG; just above, one fails
    below = evaluate(w.righting_curve(3.0, (0.3, 0.0, row.kg_max), heels=heels), IMO_2008_GENERAL)
    above = evaluate(w.righting_curve(3.0, (0.3, 0.0, row.kg_max + 1e-5), heels=heels), IMO_2008_GENERAL)
    assert below.passed and not above.passed
    assert [r.id for r in above.results if not r.passed] == [row.governing]


def test_bracketing_on_known_margins():
    # synthetic margins with known roots: a fails above 2.0, b above 1.5 (b governs), c never fails
    m = lambda kg: {"a": 2.0 - kg, "b": (1.5 - kg) * 3.0, "c": 1.0}  # noqa: E731
    kg, gov, note = kg_limit(m, 0.0, 5.0, steps=7, xtol=1e-12)
    assert gov == "b" and kg == pytest.approx(1.5, abs=1e-11) and note == ""
    kg, gov, note = kg_limit(lambda k: {"a": -1.0}, 0.0, 5.0)
    assert kg is None and gov == "a" and "fails already" in note
    kg, gov, note = kg_limit(lambda k: {"a": 1.0}, 0.0, 5.0)
    assert kg == 5.0 and gov is None and "search limit" in note
    # a margin that is missing (None) counts as a failure, and the limit sits on the passing side
    kg, gov, _ = kg_limit(lambda k: {"a": 1.0 if k <= 1.0 else None}, 0.0, 4.0, steps=4, xtol=1e-9)
    assert gov == "a" and 1.0 - 2e-9 <= kg <= 1.0


def test_trimming_kn_without_exact_path_is_refused():
    kn = KNCurve(1.0, np.array([0.0, 10.0]), np.array([0.0, 0.1]), np.array([0.0, 0.5]), km=1.0)
    with pytest.raises(InputError, match="trims as it heels"):
        kg_limits(lambda d: kn, [1.0], lambda k, kg: {"x": 1.0 - kg}, kg_range=(0.0, 2.0))
    with pytest.raises(InputError, match="kg_min < kg_max"):
        kg_limit(lambda k: {"x": 1.0}, 2.0, 1.0)


def test_weather_heel_limit_governs_with_closed_form():
    # wall-sided box barge (GZ = sin φ (GM + BM tan² φ / 2), Barrass & Derrett) under a strong wind
    # (P = 3000 N/m², a user pressure): the steady heel θ0 reaches 16° (IS Code 2.3; limit from memory,
    # REFERENCES.md) at KG = KM + BM tan² 16° / 2 - lw1 / sin 16°, with lw1 = P A Z / (1000 g Δ),
    # A = L x freeboard and Z from the centre of A to the centre of the underwater lateral area
    L, B, D, T, P = 20.0, 4.0, 5.2, 2.5, 3000.0
    hull = _hull(*box(L, B, D))
    disp = RHO * L * B * T
    row = kg_limits_for_hull(hull, [disp], IMO_2008_GENERAL, heels=range(0, 91),
                             weather=dict(pressure=P), xtol=1e-9)[0]
    bm = B * B / (12 * T)
    lw1 = P * L * (D - T) * ((D - T) / 2 + T / 2) / (1000 * 9.81 * disp)
    p16 = math.radians(16.0)
    assert row.governing == "2.3 heel"
    assert row.kg_max == pytest.approx(T / 2 + bm + 0.5 * bm * math.tan(p16) ** 2 - lw1 / math.sin(p16), abs=1e-5)


def test_limit_where_the_angle_of_max_governs_matches_full_curves():
    # The KN shortcut must judge the peak of the trial KG's own curve: just below the limit the full free-trim
    # curve meets IMO 2008 IS Code 2.2.3 (maximum GZ at 25° or more), just above it fails (limit as printed).
    import os

    from conftest import ROOT
    from meshhydro.criteria import evaluate

    hull = load_hull(os.path.join(ROOT, "meshes", "brindle_barge.stl"))
    (row,) = kg_limits_for_hull(hull, [45.0], IMO_2008_GENERAL, heels=range(0, 91))
    assert row.governing == "2.2.3" and row.method == "kn"
    lcb = hull.hydrostatics(hull.draft_for_volume(45.0 / 1.025)).lcb
    for dz, ok in ((-2e-3, True), (2e-3, False)):
        c = hull.righting_curve(45.0, (lcb, 0.0, row.kg_max + dz), heels=np.arange(0.0, 91.0))
        res = [r for r in evaluate(c, IMO_2008_GENERAL).results if r.id == "2.2.3"][0]
        assert res.passed is ok

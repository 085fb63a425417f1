"""Equilibrium, righting-lever curves and criteria against textbook results."""
from __future__ import annotations

import math

import numpy as np
import pytest

from meshhydro import CannotFloatError, InputError, load_hull
from meshhydro.criteria import IMO_2008_GENERAL, evaluate, read_criteria
from meshhydro.forms import box
from meshhydro.frames import longitudinal_direction
from meshhydro.loading import condition_from_items, MassItem, rectangular_tank_fsm
from meshhydro.loft import loft

from conftest import tm

RHO = 1.025


def wall_sided_gz(phi_deg: float, gm: float, bm: float) -> float:
    # Wall-sided formula GZ = sin φ (GM + ½ BM tan² φ) (Barrass & Derrett; Rawson & Tupper)
    p = math.radians(phi_deg)
    return math.sin(p) * (gm + 0.5 * bm * math.tan(p) ** 2)


def test_wall_sided_formula_box(box_hull):
    # box 20 x 6 x 4 at T = 1.5: bilge emerges at tan φ = 2T/B (26.57°), deck edge at tan φ = 2(D-T)/B
    L, B, T, KG = 20.0, 6.0, 1.5, 2.0
    bm = B * B / (12 * T)
    gm = T / 2 + bm - KG
    limit = math.degrees(math.atan(min(2 * T / B, 2 * (4.0 - T) / B)))
    heels = np.arange(0.0, math.floor(limit) + 1.0, 1.0)
    for free in (True, False):
        c = box_hull.righting_curve(RHO * L * B * T, (10.0, 0.0, KG), heels=heels, free_trim=free)
        expect = np.array([wall_sided_gz(h, gm, bm) for h in heels])
        assert np.allclose(c.gz, expect, atol=1e-10)
        # KN = GZ + KG sin φ (cross-curve relation, textbook)
        assert np.allclose(c.kn, c.gz + KG * np.sin(np.radians(heels)), atol=1e-12)


def test_textbook_box_worked_example():
    # Box-shaped vessel 65 m x 12 m x 8 m, KG 4 m, upright at 4 m draft in salt water (1.025 t/m³):
    # the classic wall-sided worked example (Barrass & Derrett, Ship Stability for Masters and Mates;
    # data and printed answers quoted from memory, not checked against the page): Δ = 3198 t,
    # KB = 2.00 m, BM = 3.00 m, GM = 1.00 m, GZ at 5° = 0.088 m.
    hull = load_hull(tm(*box(65.0, 12.0, 8.0)))
    eq = hull.equilibrium(3198.0, (32.5, 0.0, 4.0))
    assert round(eq.draft, 2) == 4.00
    h = hull.hydrostatics(4.0)
    assert round(h.displacement) == 3198
    assert round(h.vcb, 2) == 2.00 and round(h.bmt, 2) == 3.00
    assert round(eq.gmt, 2) == 1.00
    c = hull.righting_curve(3198.0, (32.5, 0.0, 4.0), heels=[0, 5])
    assert round(c.gz[1], 3) == 0.088


def test_angle_of_loll_wall_sided():
    # tan φ = √(2|GM| / BM) for a wall-sided form with negative GM (textbook)
    hull = load_hull(tm(*box(20.0, 6.0, 10.0)))
    T, B = 5.0, 6.0
    bm = B * B / (12 * T)
    kg = T / 2 + bm + 0.1  # GM = -0.1 m
    eq = hull.equilibrium(RHO * 20 * B * T, (10.0, 0.0, kg))
    assert eq.loll and "loll" in eq.note
    expect = math.degrees(math.atan(math.sqrt(2 * 0.1 / bm)))
    assert eq.heel == pytest.approx(expect, abs=1e-6)  # ties go to starboard (positive heel)
    assert eq.gmt > 0  # stable at the angle of loll
    assert f"lolls to {eq.heel:.2f}° to starboard (either side: hull and load are symmetric)" in eq.note
    # the same box off the centreline is not port-starboard symmetric: the note names one side only
    v, f = box(20.0, 6.0, 10.0)
    shifted = load_hull(tm(v + np.array([0.0, 0.5, 0.0]), f))
    eq2 = shifted.equilibrium(RHO * 20 * B * T, (10.0, 0.5, kg))
    assert eq2.loll and eq2.heel == pytest.approx(expect, abs=1e-6)
    assert "to starboard;" in eq2.note and "either side" not in eq2.note


def test_list_from_off_centre_weight_wall_sided():
    # GZ(φ) = TCG cos φ at equilibrium; wall-sided: tan φ (GM + ½ BM tan² φ) = TCG (textbook)
    hull = load_hull(tm(*box(20.0, 6.0, 10.0)))
    T, B, kg, tcg = 5.0, 6.0, 2.0, -0.3
    bm = B * B / (12 * T)
    gm = T / 2 + bm - kg
    eq = hull.equilibrium(RHO * 20 * B * T, (10.0, tcg, kg))
    t = math.tan(math.radians(eq.heel))
    assert t * (gm + 0.5 * bm * t * t) == pytest.approx(-tcg, abs=1e-9)
    assert eq.heel > 0  # weight to starboard: heels to starboard (positive)
    assert eq.residual_volume <= 1e-10 and eq.residual_lever <= 1e-8 * 20


def test_trim_from_lcg_shift_and_end_drafts():
    hull = load_hull(tm(*box(20.0, 6.0, 4.0)))
    T = 1.5
    disp = RHO * 20 * 6 * T
    eq = hull.equilibrium(disp, (10.5, 0.0, 1.0))
    # box: tan θ = (LCG - LCB0) / GMl for small trim (textbook trim by moment); bow down when G forward
    assert eq.trim > 0
    gml = T / 2 + 400 / (12 * T) - 1.0
    assert math.tan(math.radians(eq.trim)) == pytest.approx(0.5 / gml, rel=2e-3)
    assert eq.draft_fore - eq.draft_aft == pytest.approx((eq.x_fore - eq.x_aft) * math.tan(math.radians(eq.trim)),
                                                         rel=1e-9)
    assert eq.stable and eq.residual_volume <= 1e-10


def test_symmetric_hull_odd_curve_and_slope_is_gm(wigley_hull):
    disp = wigley_hull.hydrostatics(0.5).displacement
    heels = np.arange(-60.0, 61.0, 1.0)
    c = wigley_hull.righting_curve(disp, (0.0, 0.0, 0.45), heels=heels)
    # GZ(-φ) = -GZ(φ) for a port-starboard symmetric hull (common practice; geometry)
    assert np.allclose(c.gz, -c.gz[::-1], atol=1e-9)
    # slope of GZ at 0 = GMt from the upright hydrostatics: GM = KB + BMt - KG
    h = wigley_hull.hydrostatics(c.draft[60])
    gm = h.kmt - 0.45
    assert c.gm_upright == pytest.approx(gm, rel=1e-9)
    assert c.gm_from_slope() == pytest.approx(gm, rel=2e-3)


def test_area_integration_converges(wigley_hull, box_hull):
    # the spline area on a 1° curve agrees with a 0.125° curve to 1e-6 m·rad
    for hull, disp, g in ((wigley_hull, wigley_hull.hydrostatics(0.5).displacement, (0.0, 0.0, 0.45)),
                          (box_hull, RHO * 20 * 6 * 1.5, (10.0, 0.0, 2.0))):
        coarse = hull.righting_curve(disp, g, heels=np.arange(0, 41.0, 1.0))
        fine = hull.righting_curve(disp, g, heels=np.arange(0, 40.0001, 0.125))
        for a, b in ((0, 30), (0, 40), (30, 40)):
            assert abs(coarse.area(a, b) - fine.area(a, b)) < 1e-6


def test_wall_sided_area_closed_form(box_hull):
    # ∫0^φ sin x (GM + ½BM tan² x) dx = GM(1 - cos φ) + ½BM (sec φ + cos φ - 2): from the wall-sided formula
    T, KG = 1.5, 2.0
    bm = 36 / (12 * T)
    gm = T / 2 + bm - KG
    c = box_hull.righting_curve(RHO * 120 * T, (10.0, 0.0, KG), heels=np.arange(0, 26.0, 1.0))
    p = math.radians(25.0)
    exact = gm * (1 - math.cos(p)) + 0.5 * bm * (1 / math.cos(p) + math.cos(p) - 2)
    assert c.area(0, 25) == pytest.approx(exact, abs=1e-7)


def _raked_barge():
    # a barge with a long bow rake and a square stern: asymmetric ends
    xs = np.linspace(0.0, 12.0, 25)
    halves = []
    for x in xs:
        zb = max(0.0, (x - 6.0) / 6.0) * 1.2
        ys = np.linspace(0, 2.0, 5)
        zs = np.linspace(zb, 1.6, 5)[1:]
        halves.append(np.concatenate([np.stack([ys, np.full(5, zb)], 1), np.stack([np.full(4, 2.0), zs], 1),
                                      np.stack([ys[::-1][1:], np.full(4, 1.6)], 1)]))
    return load_hull(tm(*loft(xs, np.array(halves))))


def test_free_trim_differs_from_fixed_trim_on_asymmetric_ends():
    hull = _raked_barge()
    disp = 25.0
    eq = hull.equilibrium(disp, (5.0, 0.0, 1.0))
    g = (5.0, 0.0, 1.0)
    heels = np.arange(0, 61.0, 5.0)
    free = hull.righting_curve(disp, g, heels=heels, free_trim=True)
    fixed = hull.righting_curve(disp, g, heels=heels, free_trim=False)
    assert np.allclose(fixed.trim, eq.trim, atol=1e-9)
    assert np.ptp(free.trim) > 0.5  # the hull trims as it heels
    assert np.max(np.abs(free.gz - fixed.gz)) > 5e-3
    # each free-trim state is a true balance: B under G longitudinally (recomputed from the kernel)
    for k in range(len(heels)):
        c = hull.cut(np.array([hull.x_ref, 0, 0]) + free.keel_depth[k] * free.up[k], free.up[k])
        assert c.volume * RHO == pytest.approx(disp, rel=1e-9)
        lever = (c.centroid - np.array(g)) @ longitudinal_direction(free.heel[k], free.trim[k])
        assert abs(lever) < 1e-7


def _outrigger():
    main = box(8.0, 0.8, 0.8)
    ama = box(4.0, 0.4, 0.5, x0=2.0)
    v = np.concatenate([main[0], ama[0] + np.array([0.0, 3.0, 0.15])])
    f = np.concatenate([main[1], ama[1] + 8])
    return load_hull(tm(v, f))


def test_outrigger_two_directions_differ():
    hull = _outrigger()
    assert not hull.is_symmetric
    c = hull.righting_curve(1.4, (4.0, 0.3, 0.5), heels=np.arange(-40, 41.0, 2.0))
    i10, im10 = list(c.heel).index(10.0), list(c.heel).index(-10.0)
    # heeling towards the float (port, negative) immerses it: a much larger righting lever
    assert -c.gz[im10] > 2 * abs(c.gz[i10])
    assert not np.allclose(c.gz, -c.gz[::-1], atol=1e-3)


def test_catamaran_peaks_near_windward_hull_lifting_clear():
    demi = box(10.0, 1.0, 1.2)
    v = np.concatenate([demi[0] + [0, -2.0, 0], demi[0] + [0, 2.0, 0]])
    f = np.concatenate([demi[1], demi[1] + 8])
    hull = load_hull(tm(v, f))
    disp = RHO * 2 * 10 * 1.0 * 0.5  # T = 0.5 m
    c = hull.righting_curve(disp, (5.0, 0.0, 1.5), heels=np.arange(0, 40.5, 0.5))
    port = v[8:]  # windward (lifting) hull when heeling to starboard
    K = np.array([hull.x_ref, 0, 0])
    clear = [float(np.min((port - K) @ c.up[k]) - c.keel_depth[k]) for k in range(len(c.heel))]
    lift = next(c.heel[k] for k in range(len(clear)) if clear[k] >= 0)
    _, amax = c.max_gz(1)
    assert abs(amax - lift) <= 2.0


def test_cannot_float_message(box_hull):
    with pytest.raises(CannotFloatError, match="at most"):
        box_hull.equilibrium(RHO * 480 * 1.01, (10, 0, 2))


def test_free_surface_virtual_rise():
    # GGv = i ρ_tank / Δ with i = l b³/12; n equal compartments divide it by n² (textbook)
    fsm1 = rectangular_tank_fsm(4.0, 3.0, 1.0)
    assert fsm1 == pytest.approx(4 * 27 / 12)
    assert rectangular_tank_fsm(4.0, 3.0, 1.0, compartments=2) == pytest.approx(fsm1 / 4)
    hull = load_hull(tm(*box(20.0, 6.0, 4.0)))
    items = [MassItem("ship", 180.0, (10.0, 0.0, 2.0)), MassItem("tank", 4.5, (10.0, 0.0, 0.5), fsm=fsm1)]
    cond = condition_from_items("slack", items)
    solid = hull.equilibrium(cond.displacement, cond.cog)
    fluid = hull.equilibrium(cond.displacement, cond.cog, fsm=cond.fsm)
    assert solid.gmt - fluid.gmt == pytest.approx(fsm1 / cond.displacement, rel=1e-9)
    # box closed forms: T = Δ / (ρ L B) = 1.5 m, KB = T/2, BM = B²/(12 T) = 2 m, GM = KB + BM - KG
    kg = (180.0 * 2.0 + 4.5 * 0.5) / 184.5
    assert solid.gmt == pytest.approx(0.75 + 2.0 - kg, rel=1e-9)
    assert fluid.gmt == pytest.approx(0.75 + 2.0 - kg - fsm1 / 184.5, rel=1e-9)
    assert cond.kg_fluid - cond.kg == pytest.approx(fsm1 / cond.displacement)


def test_criteria_limits_are_the_codes():
    # IMO 2008 IS Code (MSC.267(85)), Part A, 2.2: 0.055, 0.090, 0.030 m·rad; 0.20 m; 25°; 0.15 m
    # clause 2.2.1 holds all three area limits (no sub-numbers of our own)
    assert [(c.id, c.kind, c.minimum) for c in IMO_2008_GENERAL.items[:3]] == [
        ("2.2.1", "area", 0.055), ("2.2.1", "area", 0.090), ("2.2.1", "area", 0.030)]
    lims = {c.id: (c.kind, c.minimum) for c in IMO_2008_GENERAL.items[3:]}
    assert lims["2.2.2"] == ("gz_max_beyond", 0.20)
    assert lims["2.2.3"] == ("angle_of_max", 25.0)
    assert lims["2.2.4"] == ("gm", 0.15)
    a, b, c3 = (c.params for c in IMO_2008_GENERAL.items[:3])
    assert (a.start, a.end) == (0, 30) and (b.start, b.end, b.to_flooding) == (0, 40, True)
    assert (c3.start, c3.end, c3.to_flooding) == (30, 40, True)
    assert IMO_2008_GENERAL.items[3].params.angle == 30.0


def test_criteria_evaluation_and_downflooding(box_hull):
    from meshhydro.loading import Opening

    disp = RHO * 120 * 1.5
    c = box_hull.righting_curve(disp, (10.0, 0.0, 2.0), heels=np.arange(0, 91.0, 1.0))
    rep = evaluate(c)
    by = {r.id: r for r in rep.results[3:]}
    assert rep.results[0].id == "2.2.1" and rep.results[0].attained == pytest.approx(c.area(0, 30))
    assert by["2.2.4"].attained == pytest.approx(0.75) and by["2.2.4"].passed
    assert "not an approval" in rep.caution
    # an opening 1.2 m above the waterline at the side immerses early and caps the areas
    op = Opening("vent", (10.0, -3.0, 2.7))
    c2 = box_hull.righting_curve(disp, (10.0, 0.0, 2.0), heels=np.arange(0, 91.0, 1.0), openings=[op])
    flood, name = c2.downflooding_angle(1)
    # wall-sided up to bilge emergence: the side point at height 1.2 immerses when (B/2) tan φ = 1.2
    assert name == "vent" and flood == pytest.approx(math.degrees(math.atan(1.2 / 3.0)), abs=0.05)
    rep2 = evaluate(c2)
    r2 = rep2.results  # the three areas of 2.2.1, in the Code's order
    assert r2[2].attained == 0.0 and not r2[2].passed  # flooding before 30°
    assert r2[1].attained == pytest.approx(c2.area(0, flood))


def test_criteria_upper_limit_is_honoured(tmp_path, box_hull):
    # a criterion with `maximum` is met at or below it (the file format's upper limit)
    p = tmp_path / "set.toml"
    p.write_text('[[criterion]]\nid = "low"\nkind = "gm"\nmaximum = 0.5\n'
                 '[[criterion]]\nid = "high"\nkind = "gm"\nmaximum = 1.0\n')
    cs = read_criteria(str(p))
    # box 20 x 6 at T = 1.5, KG 2: GM = T/2 + B²/12T - KG = 0.75 (textbook closed form)
    c = box_hull.righting_curve(RHO * 180, (10.0, 0.0, 2.0), heels=np.arange(0, 31.0, 5.0))
    r = {x.id: x for x in evaluate(c, cs).results}
    assert r["low"].attained == pytest.approx(0.75, abs=1e-9) and not r["low"].passed
    assert r["low"].margin == pytest.approx(-0.25, abs=1e-9)
    assert r["high"].passed and r["high"].margin == pytest.approx(0.25, abs=1e-9)


def test_user_criteria_file(tmp_path, box_hull):
    p = tmp_path / "set.toml"
    p.write_text('name = "ours"\n[[criterion]]\nid = "R"\nkind = "range"\nminimum = 50\n'
                 '[[criterion]]\nkind = "gz_at"\nangle = 20\nminimum = 0.1\n')
    cs = read_criteria(str(p))
    c = box_hull.righting_curve(RHO * 180, (10.0, 0.0, 2.0), heels=np.arange(0, 181.0, 2.0))
    rep = evaluate(c, cs)
    assert [r.id for r in rep.results] == ["R", "2"]
    # wall-sided box (bilge emerges at atan(T / (B/2)) = 26.6°): T = 1.5, BM = 2, GM = 0.75 + 2 - 2 (textbook)
    phi = math.radians(20.0)
    assert rep.results[1].attained == pytest.approx(math.sin(phi) * (0.75 + 0.5 * 2.0 * math.tan(phi) ** 2), rel=1e-9)
    assert rep.results[1].passed
    bad = tmp_path / "bad.toml"
    bad.write_text('[[criterion]]\nkind = "bogus"\nminimum = 1\n')
    with pytest.raises(InputError, match=r"\[criterion 1\] kind: must be one of"):
        read_criteria(str(bad))
    unknown = tmp_path / "unknown.toml"
    unknown.write_text('[[criterion]]\nkind = "gz_at"\nangle = 20\nminimum = 0.1\nangel = 3\n')
    with pytest.raises(InputError, match=r"\[criterion 1\] angel: unknown key; did you mean angle\?"):
        read_criteria(str(unknown))
    missing = tmp_path / "missing.toml"
    missing.write_text('[[criterion]]\nkind = "area"\nfrom = 0\nminimum = 0.1\n')
    with pytest.raises(InputError, match=r"\[criterion 1\] to: missing"):
        read_criteria(str(missing))


def test_open_hull_floats_below_its_rim_and_says_when_it_cannot():
    from meshhydro import OpenRimError

    v, f = box(10.0, 4.0, 2.0)
    top = np.all(v[f][:, :, 2] == 2.0, axis=1)
    hull = load_hull(tm(v, f[~top]))  # an open-topped box (a scan with no deck)
    eq = hull.equilibrium(RHO * 40.0, (5.0, 0.0, 0.8))
    assert eq.draft == pytest.approx(1.0, rel=1e-10)
    with pytest.raises(OpenRimError, match="open rim"):
        hull.equilibrium(RHO * 90.0, (5.0, 0.0, 0.8))  # needs more than the 80 m³ below the rim


def test_gm0_note_where_the_curve_leaves_it_at_once():
    # GM0 is the slope of GZ at 0° where the waterplane varies smoothly (common practice; a wall-sided box
    # keeps it to second order); the demo outrigger's float touches the water upright, so the upright
    # waterplane's GM0 and the curve's slope differ and the criteria output must say so; the barge not
    import os

    from meshhydro import analysis

    root = os.path.join(os.path.dirname(__file__), "..", "meshes", "cases")
    heels = np.arange(0.0, 61.0, 1.0)
    for name, expected in (("kestrel_outrigger.toml", True), ("brindle_barge.toml", False)):
        inp = analysis.from_case(os.path.join(root, name))
        rep, doc = analysis.criteria_analysis(inp, IMO_2008_GENERAL, heels)
        notes = " ".join(doc.section("results").notes)
        assert ("is the upright waterplane's" in notes) == expected, name

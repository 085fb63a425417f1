"""True peaks and angles of GZ curves, one meaning of draft, extreme attitudes, loll and capsize named.

References: brute-force curves solved every 0.001° on the true geometry (the reference for peaks and
angles, independent of any spline); closed forms of a box (trapezoid volume, plane geometry); the
definition of T in the README (along hull z at (x_ref, 0)).
"""
from __future__ import annotations

import math
import os
import subprocess
import sys

import numpy as np
import pytest
import trimesh

from meshhydro import load_hull
from meshhydro.errors import CapsizeError, InputError
from meshhydro.loading import Opening

from conftest import ROOT, tm
from meshhydro.forms import box

RHO = 1.025


def _boxes(specs):
    """Closed boxes (extents, centre) as one mesh (bodies touch nothing)."""
    ms = [trimesh.creation.box(extents=e, transform=trimesh.transformations.translation_matrix(c)) for e, c in specs]
    m = trimesh.util.concatenate(ms)
    return load_hull(trimesh.Trimesh(m.vertices, m.faces, process=False))


@pytest.fixture(scope="module")
def cat():
    """Twin boxes 10 x 1 x 1.2 m, 4 m apart: the windward hull lifts out near 15°."""
    return _boxes([((10, 1, 1.2), (5, 2, 0.6)), ((10, 1, 1.2), (5, -2, 0.6))])


@pytest.fixture(scope="module")
def outrigger():
    """Main box 8 x 0.7 x 0.9 m and a float 4.5 x 0.36 x 0.48 m 3 m to port."""
    return _boxes([((8, 0.7, 0.9), (4, 0, 0.45)), ((4.5, 0.36, 0.48), (4.15, 3.0, 0.44))])


def _brute_peak(hull, disp, g, sign, around, half=1.0, step=0.001):
    """Largest GZ and its angle on a curve solved every ``step`` degrees (brute-force reference)."""
    lo = max(0.0, around - half)
    hs = np.arange(lo, around + half + step / 2, step)
    c = hull.righting_curve(disp, g, heels=sign * hs)
    x, y = c.side(sign)
    m = x > 0 if lo == 0.0 else x >= lo - 1e-12
    x, y = x[m], y[m]
    k = int(np.argmax(y))
    return float(y[k]), float(x[k])


@pytest.mark.parametrize("which,disp,g,sign", [
    ("cat", 10.25, (5.0, 0.0, 1.5), 1),
    ("outrigger", 1.2, (4.0, 0.3, 0.5), -1),
    ("outrigger", 1.2, (4.0, 0.3, 0.5), 1),
])
def test_max_gz_matches_brute_force(request, which, disp, g, sign):
    hull = request.getfixturevalue(which)
    c = hull.righting_curve(disp, g, heels=np.arange(-30.0, 31.0, 1.0))
    gmax, amax = c.max_gz(sign)
    x, y = c.side(sign)
    # a computed point never lies above the reported maximum
    assert gmax >= y.max() - 1e-12
    # reference: 0.001°-step brute-force curve around the peak
    bmax, bang = _brute_peak(hull, disp, g, sign, amax)
    assert gmax >= bmax - 1e-9, "brute force found a higher GZ than the reported maximum"
    assert gmax - bmax < 5e-6
    assert abs(amax - bang) <= 2e-3
    # the reported maximum is a solved position: GZ there equals the value
    check = hull.righting_curve(disp, g, heels=[0.0, sign * amax])
    assert sign * check.gz[np.argmax(np.abs(check.heel))] == pytest.approx(gmax, abs=1e-9)


def test_outrigger_demo_peak_not_above_brute_force():
    # the demo outrigger's float lifts out just off upright on the starboard side: the spline through 1°
    # points overshoots there (0.4537 m at 0.42°); reference: 0.001°-step brute force
    hull = load_hull(os.path.join(ROOT, "meshes", "kestrel_outrigger.stl"))
    d, g = 0.42, (3.9, 0.45, 0.62)
    c = hull.righting_curve(d, g, heels=np.arange(-20.0, 21.0, 1.0))
    gmax, amax = c.max_gz(1)
    bmax, bang = _brute_peak(hull, d, g, 1, amax)
    assert gmax >= bmax - 1e-9 and gmax - bmax < 5e-6 and abs(amax - bang) <= 2e-3
    assert c.interpolant().__call__(np.linspace(0, 1, 101)).max() > gmax + 1e-3  # the spline overshoots


def test_vanishing_and_deck_edge_angles_bracket_true_sign_changes(cat):
    d, g = 10.25, (5.0, 0.0, 1.5)
    op = Opening("vent", (5.0, -2.0, 1.3))
    c = cat.righting_curve(d, g, heels=np.arange(0.0, 91.0, 1.0), openings=[op])
    eps = 1e-6
    v = c.vanishing_angle(1)
    a = c.deck_edge_angle(1)
    f, name = c.downflooding_angle(1)
    assert v is not None and a is not None and f is not None and name == "vent"
    # reference: the true geometry solved just before and after each angle
    chk = cat.righting_curve(d, g, heels=[0.0, v - eps, v + eps, a - eps, a + eps, f - eps, f + eps],
                             openings=[op])
    k = {round(h, 9): i for i, h in enumerate(chk.heel)}
    assert chk.gz[k[round(v - eps, 9)]] > 0 > chk.gz[k[round(v + eps, 9)]]
    assert chk.deck_freeboard[k[round(a - eps, 9)]] > 0 > chk.deck_freeboard[k[round(a + eps, 9)]]
    fb = chk.openings["vent"]
    assert fb[k[round(f - eps, 9)]] > 0 > fb[k[round(f + eps, 9)]]


def test_max_beyond_range_is_said(cat):
    # GZ still rises at 10° (the peak is near 15°): the maximum lies beyond the computed range
    c = cat.righting_curve(10.25, (5.0, 0.0, 1.5), heels=np.arange(0.0, 11.0, 1.0))
    assert c.max_beyond_range(1)
    s = c.summary(1)
    assert s["max_gz_beyond_range"] is True and s["max_gz"] is None and s["angle_of_max_gz"] is None
    from meshhydro.criteria import Context, REGISTRY
    out = REGISTRY["angle_of_max"].check(Context(c, 1), REGISTRY["angle_of_max"].params())
    assert out.attained is None and out.at_least == pytest.approx(10.0)


# ---------------------------------------------------------------------------- one meaning of draft


def test_curve_draft_reproduces_displacement(box_hull):
    # README: T along hull z at (x_ref, 0); a curve point fed back into hydrostatics gives its displacement
    d, g = 180.0 * RHO, (9.0, 0.0, 2.5)
    hs = [h for h in np.arange(0.0, 181.0, 7.0)]
    c = box_hull.righting_curve(d, g, heels=hs)
    assert np.ptp(c.trim) > 0.5  # G off the middle of the length: the box trims
    for k in range(len(c.heel)):
        h = box_hull.hydrostatics(c.draft[k], heel=c.heel[k], trim=c.trim[k], density=RHO)
        assert h.displacement == pytest.approx(d, rel=1e-9)


def test_draft_undefined_at_90_degrees(box_hull):
    c = box_hull.righting_curve(150.0, (10.0, 0.0, 2.0), heels=[0.0, 45.0, 90.0])
    assert math.isnan(c.draft[2]) and np.isfinite(c.keel_depth).all()
    assert c.rows()[2]["draft"] is None
    with pytest.raises(InputError, match="does not fix the waterplane"):
        box_hull.hydrostatics(1.0, heel=90.0)
    with pytest.raises(InputError, match="does not fix the waterplane"):
        box_hull.hydrostatics(1.0, trim=90.0)


def test_drafts_fore_aft_at_hull_ends_closed_form():
    # box 20 x 6 x 4 m (x 0..20): with both ends immersed the mean of the end drafts is V/(L B)
    # (trapezoid, closed form), and their difference is L tan(trim) (plane geometry)
    hull = load_hull(tm(*box(20.0, 6.0, 4.0)))
    d = 240.0 * RHO
    eq = hull.equilibrium(d, (8.5, 0.0, 2.0))
    assert (eq.x_aft, eq.x_fore) == (0.0, 20.0)
    assert 0.5 * (eq.draft_aft + eq.draft_fore) == pytest.approx(240.0 / 120.0, rel=1e-9)
    assert eq.trim_m == pytest.approx(20.0 * math.tan(math.radians(eq.trim)), rel=1e-9)
    assert eq.trim < 0 and eq.trim_m < 0  # by the stern
    # trimmed hard by the stern: the bow lifts out, its draft is negative (not 0 at the waterline end)
    eq2 = hull.equilibrium(60.0 * RHO, (3.0, 0.0, 1.0))
    assert eq2.draft_fore < 0
    assert eq2.draft_fore == pytest.approx(eq2.draft + 10.0 * math.tan(math.radians(eq2.trim)), rel=1e-9)
    # marks given by the user
    h3 = load_hull(tm(*box(20.0, 6.0, 4.0)), x_aft=1.0, x_fore=19.0)
    eq3 = h3.equilibrium(d, (8.5, 0.0, 2.0))
    assert eq3.draft_fore - eq3.draft_aft == pytest.approx(18.0 * math.tan(math.radians(eq3.trim)), rel=1e-9)
    with pytest.raises(InputError, match="forward of x_aft"):
        load_hull(tm(*box(20.0, 6.0, 4.0)), x_aft=5.0, x_fore=2.0)


# ---------------------------------------------------------------------------- extreme attitudes


def test_centre_of_gravity_outside_the_hull_is_refused(box_hull):
    for g in ((1000.0, 0.0, 1.0), (10.0, 30.0, 1.0)):
        with pytest.raises(InputError, match="outside the hull"):
            box_hull.equilibrium(100.0, g)
        with pytest.raises(InputError, match="outside the hull"):
            box_hull.righting_curve(100.0, g, heels=[0.0, 10.0])


@pytest.mark.parametrize("argv,code,text", [
    (["table", "M", "--drafts", "0.5", "--trim", "90"], 2, "takes heel and trim between -90 and 90"),
    (["table", "M", "--drafts", "0.5", "--heel=-90"], 2, "takes heel and trim between -90 and 90"),
    (["float", "M", "--displacement", "40", "--cog", "1000,0,1"], 2, "outside the hull"),
])
def test_extreme_attitudes_cli(argv, code, text):
    mesh = os.path.join(ROOT, "meshes", "brindle_barge.stl")
    p = subprocess.run([sys.executable, "-m", "meshhydro"] + [mesh if a == "M" else a for a in argv],
                       capture_output=True, text=True, cwd=ROOT)
    assert p.returncode == code and text in p.stderr and "Traceback" not in p.stderr


# ---------------------------------------------------------------------------- loll and capsize named


def test_outrigger_on_centreline_lolls_or_capsizes_by_name(outrigger):
    # reference: the 1° GZ curve of the same load, computed separately
    named = 0
    for disp in (0.8, 1.2, 1.6):
        for kg in (0.4, 0.7, 1.0):
            g = (4.0, 0.0, kg)
            try:
                eq = outrigger.equilibrium(disp, g)
            except CapsizeError as exc:
                msg = str(exc)
                side = 1 if "to starboard" in msg else -1
                c = outrigger.righting_curve(disp, g, heels=side * np.arange(0.0, 91.0, 1.0))
                x, y = c.side(side)
                assert np.all(y[x > 0] < 0)  # GZ heels the vessel all the way past 90°
                named += 1
                continue
            if abs(eq.heel) > 1.0:
                assert "heels to" in eq.note or "lolls to" in eq.note
                side = "starboard" if eq.heel > 0 else "port"
                assert side in eq.note
                c = outrigger.righting_curve(disp, g, heels=np.sign(eq.heel) * np.array([0, abs(eq.heel) - 0.5,
                                                                                         abs(eq.heel) + 0.5]))
                x, y = c.side(int(np.sign(eq.heel)))
                assert y[1] < 0 < y[2]  # GZ turns righting at the reported angle
                named += 1
    assert named >= 3


def test_loll_side_named_on_asymmetric_hull(outrigger):
    # negative upright GM on an asymmetric hull: the note names the side, never "either side"
    # (reference for the angle: the GZ curve of the same load changes sign there)
    g = (4.0, 0.0, 1.2)
    eq = outrigger.equilibrium(0.4, g)
    if abs(eq.heel) < 0.1:
        pytest.skip("this load floats upright")
    side = "starboard" if eq.heel > 0 else "port"
    assert side in eq.note and "either side" not in eq.note


def test_cli_marks_and_trim_in_metres(tmp_path):
    import json
    mesh = os.path.join(ROOT, "meshes", "brindle_barge.stl")
    out = tmp_path / "f.json"
    p = subprocess.run([sys.executable, "-m", "meshhydro", "float", mesh, "--displacement", "40", "--cog", "5.5,0,1",
                        "--x-aft", "0.5", "--x-fore", "11.5", "--format", "json", "--out", str(out)],
                       capture_output=True, text=True, cwd=ROOT)
    assert p.returncode == 0, p.stderr
    eq = json.loads(out.read_text())["equilibrium"]
    assert (eq["x_aft"], eq["x_fore"]) == (0.5, 11.5)
    # plane geometry: the drafts at the marks differ by (x_fore - x_aft) tan(trim)
    assert eq["trim_m"] == pytest.approx(11.0 * math.tan(math.radians(eq["trim"])), rel=1e-9)
    assert eq["draft_fore"] - eq["draft_aft"] == pytest.approx(eq["trim_m"], abs=1e-12)


def test_max_gz_and_gz_beyond_30_stay_in_the_first_range_of_stability():
    # Common practice: the maximum GZ and "GZ at 30° or more" belong to the range of positive stability, not to
    # a second lobe such as the stable inverted position near 180° that an off-centre load gives a catamaran.
    import os

    from conftest import ROOT
    from meshhydro.criteria import IMO_2008_GENERAL, evaluate

    hull = load_hull(os.path.join(ROOT, "meshes", "twinfin_cat.stl"))
    c = hull.righting_curve(3.6, (4.7, 1.2, 1.6), heels=np.arange(-180.0, 181.0, 5.0))
    x, y = c.side(-1)
    assert y[-1] > 0.5 and y[(x > 50) & (x < 170)].max() < 0  # the inverted lobe exists on the port side
    v = c.vanishing_angle(-1)
    assert 40.0 < v < 45.0 and y[x == 40.0][0] > 0 > y[x == 45.0][0]
    gmax, amax = c.max_gz(-1)
    assert 0.0 < amax < v and gmax >= y[(x > 0) & (x < v)].max()
    r = [r for r in evaluate(c, IMO_2008_GENERAL, sides=(-1,)).results if r.id == "2.2.2"][0]
    assert r.attained == pytest.approx(y[(x >= 30.0) & (x <= v)].max())  # 0.324 m at 30°, not 1.2 m at 180°
    a = [r for r in evaluate(c, IMO_2008_GENERAL, sides=(-1,)).results if r.id == "2.2.3"][0]
    assert a.attained == pytest.approx(amax) and not a.passed

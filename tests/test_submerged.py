"""Fully submerged bodies and the passage through submergence, against closed forms and trimesh.

References: a submerged body has no waterplane, so BM = 0, B is the centroid of the whole body and
does not move with heel, and GZ = BG sin φ (textbook, e.g. Rawson & Tupper, *Basic Ship Theory*,
on submarines); the box's KB = T/2, BMt = B²/(12T) (REFERENCES.md, closed forms); a horizontal
cylinder's waterplane at draft T is a rectangle of length L and chord 2√(R² - (R - T)²) and its
section a circular segment (plane geometry). Exact values of the tessellated bodies come from
trimesh (mass_properties) and shapely (polygon clipping).
"""
from __future__ import annotations

import json
import math
import re

import numpy as np
import pytest
import shapely.geometry as sg
import trimesh

from meshhydro import CannotFloatError, load_hull
from meshhydro.analysis import float_analysis, from_mesh, righting_analysis
from meshhydro.forms import cylinder
from meshhydro.renderers import render
from meshhydro.submerged import NOTE
from meshhydro.submergence import sequence_by_displacements, sequence_by_drafts, submergence_analysis
from meshhydro.sweep import heel_trace
from meshhydro.tolerances import NEUTRAL_BUOYANCY

from conftest import tm

RHO = 1.025


@pytest.fixture(scope="module")
def sphere():
    m = trimesh.creation.icosphere(subdivisions=4, radius=1.0)
    m.apply_translation((0.0, 0.0, 1.0))
    return m, load_hull(m)


@pytest.fixture(scope="module")
def tube():
    v, f = cylinder(6.0, 1.0, segments=512)
    return tm(v, f), load_hull(tm(v, f)), v


def test_sphere_submerged_equilibrium_b_at_centroid_bm_zero(sphere):
    m, hull = sphere
    delta = m.volume * RHO  # the whole buoyancy (trimesh volume of the same polyhedron)
    eq = hull.equilibrium(delta, (0.0, 0.0, 0.7), density=RHO, submerged_depth=0.5)
    assert eq.submerged and eq.hydrostatics is None
    np.testing.assert_allclose(eq.cob, m.center_mass, atol=1e-12)  # B at the centroid (trimesh)
    kb = m.center_mass[2]
    assert eq.gmt == pytest.approx(kb - 0.7, abs=1e-12)  # BM = 0: GM = KB - KG
    assert abs(eq.heel) < 1e-9 and abs(eq.trim) < 1e-9
    assert eq.draft == pytest.approx(m.vertices[:, 2].max() + 0.5, abs=1e-12)  # top 0.5 m under the surface
    assert NOTE in eq.note and "fully submerged" in eq.note


def test_sphere_submerged_gz_is_bg_sin_phi(sphere):
    m, hull = sphere
    kg = 0.6
    c = hull.righting_curve(m.volume * RHO, (0.0, 0.0, kg), heels=np.arange(0, 181, 5.0), density=RHO)
    bg = m.center_mass[2] - kg
    # GZ = BG sin φ for a submerged body (closed form)
    np.testing.assert_allclose(c.gz, bg * np.sin(np.radians(c.heel)), atol=1e-12)
    assert c.submerged and np.all(c.bm == 0.0) and np.all(c.waterplane_area == 0.0)
    np.testing.assert_allclose(c.cob, np.tile(m.center_mass, (len(c.heel), 1)), atol=1e-12)  # B fixed
    assert c.gm_upright == pytest.approx(bg, abs=1e-12)
    s = c.summary(1)
    assert s["vanishing_angle"] == 180.0 and s["note"] == NOTE
    gmax, amax = c.max_gz(1)
    assert gmax == pytest.approx(bg, rel=1e-6) and amax == pytest.approx(90.0, abs=0.05)
    # area 0..30 of BG sin φ: BG (1 - cos 30°) m·rad (calculus)
    assert c.area(0, 30) == pytest.approx(bg * (1 - math.cos(math.radians(30))), rel=1e-5)


def test_horizontal_cylinder_submerged_with_trim_and_heel(tube):
    m, hull, _ = tube
    b = m.center_mass
    g = np.array([b[0] + 0.2, 0.0, 0.5])
    eq = hull.equilibrium(m.volume * RHO, g, density=RHO)
    # G straight below B: the body trims until B - G is vertical, trim = asin((LCG - LCB) / |BG|) (geometry)
    d = b - g
    assert eq.trim == pytest.approx(math.degrees(math.asin(0.2 / np.linalg.norm(d))), abs=1e-9)
    assert eq.gmt == pytest.approx(np.linalg.norm(d), abs=1e-12)
    c = hull.righting_curve(m.volume * RHO, (b[0], 0.0, 0.5), heels=[-60, -30, 0, 30, 60, 90], density=RHO)
    np.testing.assert_allclose(c.gz, (b[2] - 0.5) * np.sin(np.radians(c.heel)), atol=1e-12)
    np.testing.assert_allclose(c.trim, 0.0, atol=1e-12)


def test_g_above_b_turns_over(sphere):
    m, hull = sphere
    eq = hull.equilibrium(m.volume * RHO, (0.0, 0.0, 1.3), density=RHO)
    assert abs(eq.heel) == pytest.approx(180.0, abs=1e-6) and eq.gmt == pytest.approx(0.3, abs=1e-9)
    assert "turns over" in eq.note


def test_heavier_sinks_with_missing_buoyancy(sphere):
    m, hull = sphere
    with pytest.raises(CannotFloatError) as e:
        hull.equilibrium(m.volume * RHO + 0.25, (0.0, 0.0, 0.7), density=RHO)
    missing = float(re.search(r"([0-9.]+) t of buoyancy missing", str(e.value)).group(1))
    assert missing == pytest.approx(0.25, rel=1e-5)


def test_neutral_band_and_just_lighter_floats(box_hull):
    vt = box_hull.total_volume  # 20 x 6 x 4 box
    eq = box_hull.equilibrium(vt * RHO * (1 - 0.5 * NEUTRAL_BUOYANCY), (10.0, 0.0, 1.0), density=RHO)
    assert eq.submerged
    eq = box_hull.equilibrium(vt * RHO * 0.999, (10.0, 0.0, 1.0), density=RHO)
    assert not eq.submerged and eq.draft == pytest.approx(0.999 * 4.0, abs=1e-9)  # box: T = V / (L B)


def _shapely_bm(length: float, t: float) -> tuple[float, float]:
    """(BMt, KB) of the tessellated cylinder (a prism) at draft t, from shapely clipping of its section."""
    k = 256  # the section polygon of forms.cylinder(segments=512): 512 sides, vertices at keel and top
    th = np.linspace(0.0, 2 * np.pi, 2 * k, endpoint=False)
    poly = sg.Polygon(np.stack([np.sin(th), 1.0 - np.cos(th)], axis=1))
    wet = poly.intersection(sg.box(-5, -1, 5, t))
    chord = poly.intersection(sg.LineString([(-5, t), (5, t)])).length
    return length * chord ** 3 / 12.0 / (length * wet.area), wet.centroid.y


def test_cylinder_through_submergence_bm_closed_form(tube):
    m, hull, _ = tube
    R, L = 1.0, 6.0
    ts = np.array([0.2, 0.6, 1.0, 1.4, 1.8, 1.95, 1.99, 2.5])
    steps = sequence_by_drafts(hull, ts, density=RHO)
    for s, t in zip(steps, ts, strict=True):
        if t < 2 * R:
            bm_poly, kb_poly = _shapely_bm(L, t)
            assert s.bmt == pytest.approx(bm_poly, rel=1e-9)  # exact for the polyhedron (shapely)
            assert s.kb == pytest.approx(kb_poly, rel=1e-9)
            # smooth body: BM = (2b)³ / (12 A_seg), b = √(R² - (R-T)²), A_seg the circular segment (geometry);
            # the 512-gon differs by O(h²)
            h = R - t
            b = math.sqrt(R * R - h * h)
            a_seg = R * R * math.acos(h / R) - h * b
            assert s.bmt == pytest.approx((2 * b) ** 3 / (12 * a_seg), rel=2e-3, abs=1e-4)
            assert not s.submerged
        else:
            assert s.submerged and s.bmt == 0.0 and s.kmt == pytest.approx(m.center_mass[2], abs=1e-12)
    assert np.all(np.diff([s.bmt for s in steps][3:]) < 0)  # BM falls to zero as the waterplane closes


def test_box_ballasted_down_km(box_hull):
    B, D = 6.0, 4.0
    ts = np.array([0.5, 1.0, 2.0, 3.0, 3.9, 4.1, 5.0])
    for s, t in zip(sequence_by_drafts(box_hull, ts, density=RHO, kg=1.9), ts, strict=True):
        km = t / 2 + B * B / (12 * t) if t < D else D / 2  # box closed form; KM = KB = D/2 submerged
        assert s.kmt == pytest.approx(km, rel=1e-12)
        assert s.gmt == pytest.approx(km - 1.9, rel=1e-12, abs=1e-12)
        assert s.kg_limit == s.kmt and s.submerged == (t > D)


def test_sequence_by_displacements(box_hull):
    full = box_hull.total_volume * RHO
    steps = sequence_by_displacements(box_hull, [0.25 * full, full], density=RHO)
    assert steps[0].draft == pytest.approx(1.0, abs=1e-9)  # box: T = V / (L B)
    assert steps[1].submerged and steps[1].draft == pytest.approx(4.0)
    with pytest.raises(CannotFloatError, match="buoyancy missing"):
        sequence_by_displacements(box_hull, [full * 1.01], density=RHO)


def test_submergence_document_bands_and_figure(tube, box_hull):
    from meshhydro.figures import draw

    _, hull, _ = tube
    ts = [0.2, 0.6, 1.0, 1.4, 1.8, 1.97, 1.997, 1.999, 2.1]
    _, doc = submergence_analysis(hull, drafts=ts, density=RHO)
    rows = doc.table("submergence").rows
    # a horizontal cylinder's metacentre stays on its axis at every draft: KM = R (geometry); O(h²) mesh error
    np.testing.assert_allclose([r["kmt"] for r in rows], 1.0, atol=2e-3)
    # chord 2√(R² - (R - T)²) under 10 % of its largest (2R) only for T > 1.99499 m (geometry)
    assert doc.data["small_waterplane_drafts"] == [1.997, 1.999]
    assert rows[-1]["submerged"] and not rows[-2]["submerged"]
    svg = draw(doc.sections[0].figures[0])
    assert svg.lstrip().startswith("<?xml") and "KMt" in svg
    # box 20 x 6 x 4, KG 2.3: KM = T/2 + 3/T afloat, D/2 = 2 submerged (closed form): GM < 0 only submerged
    _, doc = submergence_analysis(box_hull, drafts=[0.5, 1.5, 2.5, 3.5, 4.5], density=RHO, kg=2.3)
    assert doc.data["negative_gm_drafts"] == [4.5]
    assert doc.data["least_kmt"] == pytest.approx(2.0) and doc.data["least_kmt_draft"] == 4.5
    js = json.loads(render(doc, "json"))
    assert js["rows"][0]["gmt"] == pytest.approx(0.25 + 6.0 - 2.3)


def test_reports_say_weight_stability_only(sphere):
    m, hull = sphere
    inp = from_mesh(hull, "sphere", m.volume * RHO, (0.0, 0.0, 0.7))
    _, doc = float_analysis(inp)
    assert NOTE in render(doc, "text")
    assert json.loads(render(doc, "json"))["equilibrium"]["submerged"] is True
    _, doc = righting_analysis(inp, np.arange(0, 181, 10.0))
    assert NOTE in render(doc, "text")
    assert json.loads(render(doc, "json"))["note"] == NOTE


def test_sweep_of_submerged_body_m_on_b(sphere):
    m, hull = sphere
    tr = heel_trace(hull, m.volume * RHO, (0.0, 0.0, 0.7), np.arange(0, 91, 15.0), density=RHO)
    np.testing.assert_array_equal(tr.metacentre, tr.cob)  # BM = 0: M on B
    np.testing.assert_allclose(tr.cob, np.tile(m.center_mass, (len(tr.heel), 1)), atol=1e-12)
    assert NOTE in tr.to_dict()["note"] and tr.to_dict()["submerged"] is True

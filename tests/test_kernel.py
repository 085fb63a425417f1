"""The exact plane kernel against closed forms and a general-purpose reference library."""
from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from meshhydro import OpenRimError, load_hull
from meshhydro.forms import box, wigley, wigley_exact
from meshhydro.frames import up_vector

from conftest import tm


# Box-shaped vessel, closed forms (Barrass & Derrett, Ship Stability for Masters and Mates;
# Rawson & Tupper, Basic Ship Theory): KB = T/2, BMt = B²/12T, BMl = L²/12T.
@pytest.mark.parametrize("T", [0.4, 1.0, 2.5, 3.9])
def test_box_closed_forms(box_hull, T):
    L, B = 20.0, 6.0
    h = box_hull.hydrostatics(T, density=1.025)
    assert h.volume == pytest.approx(L * B * T, rel=1e-12)
    assert h.displacement == pytest.approx(1.025 * L * B * T, rel=1e-12)
    assert h.vcb == pytest.approx(T / 2, rel=1e-12)
    assert h.bmt == pytest.approx(B * B / (12 * T), rel=1e-12)
    assert h.bml == pytest.approx(L * L / (12 * T), rel=1e-12)
    assert h.awp == pytest.approx(L * B, rel=1e-12)
    # TPC = Awp ρ / 100 (textbook)
    assert h.tpc == pytest.approx(L * B * 1.025 / 100, rel=1e-12)
    for c in (h.cb, h.cp, h.cm, h.cwp):
        assert c == pytest.approx(1.0, rel=1e-12)
    assert h.wsa == pytest.approx(L * B + 2 * (L + B) * T, rel=1e-12)
    assert h.lcb == pytest.approx(10.0, abs=1e-12) and h.lcf == pytest.approx(10.0, abs=1e-12)


def test_box_km_least_at_b_over_root6(box_hull):
    # KM of a box is least at T = B/√6 (textbook closed form, from d/dT (T/2 + B²/12T) = 0)
    B = 6.0
    Ts = np.linspace(1.0, 3.8, 57)
    km = [box_hull.hydrostatics(T).kmt for T in Ts]
    assert Ts[int(np.argmin(km))] == pytest.approx(B / math.sqrt(6), abs=0.05)


def test_plane_through_vertices_and_coplanar_faces(box_hull):
    # draft exactly at the flat bottom: nothing submerged, the waterplane is the closed
    # section (the bottom, 20 x 6); exactly at the deck: whole box, waterplane = deck.
    c0 = box_hull.cut((10, 0, 0.0), (0, 0, 1))
    assert c0.volume == 0.0 and c0.waterplane_area == pytest.approx(120.0, rel=1e-14)
    cd = box_hull.cut((10, 0, 4.0), (0, 0, 1))
    assert cd.volume == pytest.approx(480.0, rel=1e-14)
    assert cd.waterplane_area == pytest.approx(120.0, rel=1e-14)
    # a plane through a diagonal edge of the mesh (box corner to corner)
    n = np.array([0.0, -4.0, 6.0]) / math.hypot(4, 6)
    c = box_hull.cut((0, 0, 2.0), n)  # contains the edges at (y=-3,z=0) and (y=3,z=4)
    assert c.volume == pytest.approx(240.0, rel=1e-12)


# trimesh (general-purpose geometry library): slice_plane with cap, then volume and centre of mass
def test_against_trimesh_random_planes(blob):
    hull = load_hull(blob)
    rng = np.random.default_rng(7)
    lo, hi = blob.bounds
    checked = 0
    for _ in range(60):
        n = rng.normal(size=3)
        n /= np.linalg.norm(n)
        p = rng.uniform(lo + 0.2 * (hi - lo), hi - 0.2 * (hi - lo))
        ref = blob.slice_plane(p, -n, cap=True)
        c = hull.cut(p, n)
        if ref.is_empty or ref.volume < 1e-6:
            continue
        assert c.volume == pytest.approx(ref.volume, rel=1e-9)
        assert np.allclose(c.centroid, ref.center_mass, atol=1e-9 * blob.scale)
        checked += 1
    assert checked > 40


def test_waterplane_against_trimesh_section(blob):
    # waterplane area and centroid: polygon of trimesh's planar section (shapely area)
    hull = load_hull(blob)
    p = np.array([3.1, -0.3, 1.1])
    sec = blob.section(plane_origin=p, plane_normal=[0, 0, 1])
    planar, to3d = sec.to_2D()
    c = hull.cut(p, (0, 0, 1))
    assert c.waterplane_area == pytest.approx(planar.area, rel=1e-9)
    cen2 = np.array(planar.polygons_full[0].centroid.coords[0]) if len(planar.polygons_full) == 1 else None
    if cen2 is not None:
        cen3 = (to3d @ np.array([cen2[0], cen2[1], 0, 1]))[:3]
        assert np.allclose(c.waterplane_centroid, cen3, atol=1e-9)


def test_wigley_closed_form_and_second_order_convergence():
    # Closed forms derived in meshhydro.forms.wigley_exact (integrals of the parabolic form).
    L, B, T = 10.0, 1.0, 0.625
    ex = wigley_exact(L, B, T)
    errs = {k: [] for k in ("volume", "awp", "vcb", "bmt", "bml", "cb", "cwp")}
    ns = (16, 32, 64)
    for n in ns:
        h = load_hull(tm(*wigley(L, B, T, stations=n, waterlines=n // 2)), x_ref=0.0).hydrostatics(T)
        for k in errs:
            errs[k].append(abs(getattr(h, k) - ex[k]) / ex[k])
    for k, e in errs.items():
        assert e[-1] < 2e-3, (k, e)
        # O(h²): halving the spacing quarters the error (observed order between 1.8 and 2.2)
        for a, b in zip(e[:-1], e[1:], strict=False):
            order = math.log2(a / b)
            assert 1.8 < order < 2.2, (k, e)


def test_open_rim_raises_only_when_reached():
    v, f = box(10.0, 4.0, 2.0)
    top = np.all(v[f][:, :, 2] == 2.0, axis=1)
    hull = load_hull(tm(v, f[~top]))
    assert not hull.report.closed and len(hull.report.rims) == 1
    assert hull.report.rims[0].z_min == pytest.approx(2.0)
    c = hull.cut((5, 0, 1.0), (0, 0, 1))
    assert c.volume == pytest.approx(40.0, rel=1e-12)
    with pytest.raises(OpenRimError, match="open rim"):
        hull.cut((5, 0, 2.5), (0, 0, 1))
    with pytest.raises(OpenRimError):
        hull.cut((5, 0, 1.5), up_vector(40, 0))  # heeled: the rim dips under


def test_far_from_origin_in_mm():
    # CAD coordinates in the tens of thousands of mm: results must keep their digits
    v, f = box(20.0, 6.0, 4.0)
    far = v * 1000.0 + np.array([45000.0, 23000.0, 17000.0])
    hull = load_hull(tm(far, f), units="mm", offset=(-45.0, -23.0, -17.0))
    h = hull.hydrostatics(1.5)
    assert h.volume == pytest.approx(180.0, rel=1e-12)
    assert h.bmt == pytest.approx(36 / 18.0, rel=1e-12)


def test_two_bodies_two_loops():
    a = box(10.0, 2.0, 2.0)
    b = box(10.0, 2.0, 2.0)
    v = np.concatenate([a[0] + [0, -3, 0], b[0] + [0, 3, 0]])
    f = np.concatenate([a[1], b[1] + len(a[0])])
    hull = load_hull(tm(v, f))
    assert len(hull.report.bodies) == 2
    h = hull.hydrostatics(1.0)
    assert h.volume == pytest.approx(40.0, rel=1e-12)
    # parallel-axis theorem: I_T = 2 (L b³/12 + L b · 3²)
    assert h.bmt * h.volume == pytest.approx(2 * (10 * 8 / 12 + 20 * 9), rel=1e-12)
    assert h.bwl == pytest.approx(8.0)


# ------------------------------------------------------------------ property tests (hypothesis)

_unit = st.tuples(st.floats(-1, 1), st.floats(-1, 1), st.floats(0.2, 1)).filter(
    lambda t: math.sqrt(sum(x * x for x in t)) > 0.3)


@settings(max_examples=40, deadline=None)
@given(n=_unit, h=st.floats(0.2, 2.2))
def test_below_plus_above_is_total(blob_hull, n, h):
    hull = blob_hull
    p = np.array([3.0, -0.4, h])
    nn = np.array(n) / np.linalg.norm(n)
    below = hull.cut(p, nn)
    above = hull.cut(p, -nn)
    assert below.volume + above.volume == pytest.approx(hull.total_volume, rel=1e-11)
    m = below.volume * below.centroid + above.volume * above.centroid
    assert np.allclose(m / hull.total_volume, hull.total_centroid, atol=1e-10)
    # both parts share the same waterplane
    assert below.waterplane_area == pytest.approx(above.waterplane_area, rel=1e-10, abs=1e-12)


@settings(max_examples=25, deadline=None)
@given(t=st.floats(0.05, 0.55), heel=st.floats(-30, 30), trim=st.floats(-3, 3))
def test_volume_monotone_and_derivative_is_waterplane_area(wigley_hull, t, heel, trim):
    n = up_vector(heel, trim)
    dt = 1e-5
    v = [wigley_hull.cut((0, 0, t + k * dt), n).volume for k in (-1, 0, 1)]
    assert v[0] <= v[1] <= v[2]
    # dV/dT = Awp n_z (the plane moves n_z dT along its normal per unit draft)
    a = wigley_hull.cut((0, 0, t), n).waterplane_area
    assert (v[2] - v[0]) / (2 * dt) == pytest.approx(a * n[2], rel=1e-5)


@settings(max_examples=25, deadline=None)
@given(shift=st.tuples(st.floats(-500, 500), st.floats(-500, 500), st.floats(-500, 500)),
       heel=st.floats(-60, 60))
def test_translation_invariance(blob, shift, heel):
    base = load_hull(blob)
    moved = load_hull(tm(blob.vertices + np.array(shift), blob.faces))
    n = up_vector(heel, 2.0)
    p = np.array([3.0, -0.4, 1.3])
    a = base.cut(p, n)
    b = moved.cut(p + np.array(shift), n)
    assert b.volume == pytest.approx(a.volume, rel=1e-9)
    assert np.allclose(b.centroid - np.array(shift), a.centroid, atol=1e-8)
    assert b.inertia_t == pytest.approx(a.inertia_t, rel=1e-8)


def test_mm_and_m_agree(wigley_hull):
    v, f = wigley(10.0, 1.0, 0.625, stations=64, waterlines=24)
    in_mm = load_hull(tm(v * 1000.0, f), units="mm", x_ref=0.0)
    a, b = wigley_hull.hydrostatics(0.5, heel=5), in_mm.hydrostatics(0.5, heel=5)
    for k in ("volume", "vcb", "tcb", "bmt", "bml", "wsa", "awp"):
        assert getattr(b, k) == pytest.approx(getattr(a, k), rel=1e-12, abs=1e-14)

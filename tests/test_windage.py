"""Windage from the mesh: closed-form boxes and trimesh's own projected silhouette."""
from __future__ import annotations

import math

import numpy as np
import pytest

from meshhydro import InputError
from meshhydro.forms import box
from meshhydro.windage import windage, windage_item

L, B, D = 20.0, 6.0, 4.0


def test_upright_box_is_length_times_freeboard():
    # closed form: A = L (D - T), centroid at T + (D - T)/2; underwater L T at T/2
    v, f = box(L, B, D)
    T = 1.3
    w = windage(v, f, draft=T, x_ref=L / 2)
    assert w.area == pytest.approx(L * (D - T), rel=1e-13)
    assert w.centroid == pytest.approx([L / 2, T + (D - T) / 2], rel=1e-13)
    assert w.underwater_area == pytest.approx(L * T, rel=1e-13)
    assert w.underwater_centroid == pytest.approx([L / 2, T / 2], rel=1e-13)
    assert w.z == pytest.approx((D - T) / 2 + T / 2, rel=1e-13)
    half = windage(v, f, draft=T, x_ref=L / 2, lever_to="half_draft")
    assert half.z == pytest.approx((D - T) / 2 + T / 2, rel=1e-13)  # same for a box: flat bottom at 0


def test_trimmed_box_trapezoids():
    # closed form: the waterline z = T + (x - x_ref) tan θ cuts the side rectangle into two trapezoids;
    # with x_ref at mid-length the underwater part is L T; its centroid height is the trapezoid's
    v, f = box(L, B, D)
    T, th = 1.5, 3.0
    t = math.tan(math.radians(th))
    w = windage(v, f, draft=T, trim=th, x_ref=L / 2)
    assert w.underwater_area == pytest.approx(L * T, rel=1e-12)
    assert w.area == pytest.approx(L * D - L * T, rel=1e-12)
    # below: depth h(x) = T + (x - L/2) t; centroid x̄ = ∫x h / ∫h, z̄ = ∫h²/2 / ∫h
    xs = np.linspace(0, L, 200001)
    h = T + (xs - L / 2) * t
    ua = np.trapezoid(h, xs)
    assert w.underwater_centroid[0] == pytest.approx(np.trapezoid(xs * h, xs) / ua, rel=1e-9)
    assert w.underwater_centroid[1] == pytest.approx(np.trapezoid(h * h / 2, xs) / ua, rel=1e-9)
    # Z is measured along the earth vertical n = (-sin θ, cos θ)
    n = np.array([-math.sin(math.radians(th)), math.cos(math.radians(th))])
    assert w.z == pytest.approx((w.centroid - w.underwater_centroid) @ n, rel=1e-13)


def test_irregular_hull_matches_trimesh_projection(blob):
    # general-purpose library: trimesh slice_plane(cap=True) + trimesh.path.polygons.projected
    from trimesh.path.polygons import projected

    z0 = 1.1
    v, f = np.asarray(blob.vertices), np.asarray(blob.faces)
    w = windage(v, f, draft=z0, x_ref=3.0)
    up = blob.slice_plane([0, 0, z0], [0, 0, 1], cap=True)
    dn = blob.slice_plane([0, 0, z0], [0, 0, -1], cap=True)
    a_up = projected(up, normal=[0, 1, 0], precise=True, rpad=0.0, apad=0.0).area
    a_dn = projected(dn, normal=[0, 1, 0], precise=True, rpad=0.0, apad=0.0).area
    assert w.hull_area == pytest.approx(a_up, rel=1e-7)
    assert w.underwater_area == pytest.approx(a_dn, rel=1e-7)
    assert w.centroid[1] > z0 > w.underwater_centroid[1]
    # a closed mesh: the faces facing +y alone give the same silhouette
    c = windage(v, f, draft=z0, x_ref=3.0, closed=True)
    assert c.area == pytest.approx(w.area, rel=1e-12) and c.underwater_area == pytest.approx(w.underwater_area,
                                                                                              rel=1e-12)
    assert c.centroid == pytest.approx(w.centroid, rel=1e-12)
    assert c.underwater_centroid == pytest.approx(w.underwater_centroid, rel=1e-12)


def test_items_add_and_meshes_unite():
    v, f = box(L, B, D)
    T = 2.0
    house_v, house_f = box(4.0, 3.0, 2.0, x0=8.0)
    house_v = house_v + np.array([0.0, 0.0, D])  # deckhouse 4 m x 2 m on the deck, x 8..12
    items = [windage_item("house", mesh=(house_v, house_f)),
             windage_item("mast", area=3.0, centroid=[5.0, 8.0])]
    w = windage(v, f, draft=T, x_ref=L / 2, items=items)
    a = L * (D - T) + 8.0 + 3.0
    zc = (L * (D - T) * (T + (D - T) / 2) + 8.0 * (D + 1.0) + 3.0 * 8.0) / a
    xc = (L * (D - T) * 10.0 + 8.0 * 10.0 + 3.0 * 5.0) / a
    assert w.area == pytest.approx(a, rel=1e-13)
    assert w.centroid == pytest.approx([xc, zc], rel=1e-13)
    assert w.items["house"][0] == pytest.approx(8.0) and w.items["mast"] == (3.0, (5.0, 8.0))
    # an item overlapping the hull's silhouette counts once (union)
    sunk = windage(v, f, draft=T, x_ref=L / 2, items=[windage_item("hull copy", mesh=(v, f))])
    assert sunk.area == pytest.approx(L * (D - T), rel=1e-13)


@pytest.mark.parametrize("kwargs,msg", [
    (dict(area=1.0), "centroid"),
    (dict(area=-1.0, centroid=[0, 0]), "area"),
    (dict(area=1.0, centroid=[0, 0, 0]), "centroid"),
    (dict(area=1.0, centroid=[0, 0], mesh=box(1, 1, 1)), "not both"),
])
def test_bad_items_refused(kwargs, msg):
    with pytest.raises(InputError, match=msg):
        windage_item("deck cargo", **kwargs)


def test_bad_lever_and_sunk_hull_refused():
    v, f = box(L, B, D)
    with pytest.raises(InputError, match="lever_to"):
        windage(v, f, draft=1.0, lever_to="keel")
    with pytest.raises(InputError, match="above the waterline"):
        windage(v, f, draft=D + 1.0, x_ref=L / 2)

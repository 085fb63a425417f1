"""Flooded compartments by the lost-buoyancy method.

References: the bilged box barge of the textbook lost-buoyancy method (Barrass & Derrett,
Ship Stability for Masters and Mates; Rawson & Tupper, Basic Ship Theory; formula as in
/work/shared/REFERENCES.md), closed-form plane geometry (parallel-axis theorem), and
manifold3d / trimesh (general-purpose geometry libraries) for random heeled planes.
"""
from __future__ import annotations

import numpy as np
import pytest
import trimesh
from scipy.optimize import brentq

from closed_forms import bilged_side_list
from meshhydro import kernel
from meshhydro.damage import (
    compartment_from_box,
    compartment_from_mesh,
    flooded_cut,
    lost_buoyancy,
)
from meshhydro.errors import InputError
from meshhydro.frames import up_vector
from meshhydro.tanks import check_inside

L, B, D = 20.0, 6.0, 4.0  # the box_hull fixture: x 0..20, |y| <= 3, z 0..4


def _flooded_draft(hull, comps, volume):
    """Upright draft at which the net (intact minus lost) volume equals ``volume`` (bracketed, scipy brentq)."""
    def net(t):
        return flooded_cut(hull.cut((10.0, 0.0, t), (0, 0, 1)), comps).volume - volume
    return brentq(net, 1e-6, D - 1e-6, xtol=1e-14, rtol=1e-15)


# textbook lost buoyancy: a midship compartment of length l bilged in a box L x B at draught T
# sinks it by μ l B T / ((L - μ l) B); the new BMt uses the intact waterplane about its centroid,
# I = (L - μ l) B³ / 12, over the unchanged volume L B T (μ < 1: same method, common practice)
@pytest.mark.parametrize("mu", [1.0, 0.85, 0.6])
def test_bilged_midship_compartment_sinkage_and_bmt(box_hull, mu):
    T0, ell = 1.5, 4.0
    comp = compartment_from_box("midship", [[8.0, -3.0, 0.0], [12.0, 3.0, 4.0]], permeability=mu)
    check_inside(comp.name, comp.vertices, comp.faces, box_hull, kind="compartment")
    v0 = L * B * T0
    t1 = _flooded_draft(box_hull, [comp], v0)
    assert t1 - T0 == pytest.approx(mu * ell * B * T0 / ((L - mu * ell) * B), rel=1e-10)
    c = flooded_cut(box_hull.cut((10.0, 0.0, t1), (0, 0, 1)), [comp])
    assert c.volume == pytest.approx(v0, rel=1e-12)
    assert c.inertia_t / c.volume == pytest.approx((L - mu * ell) * B**3 / 12 / v0, rel=1e-12)
    assert c.centroid[2] == pytest.approx(t1 / 2, rel=1e-12)  # KB of the remaining box body
    assert c.centroid[0] == pytest.approx(L / 2, abs=1e-12)  # symmetric: LCB unchanged
    assert c.waterplane_area == pytest.approx((L - mu * ell) * B, rel=1e-12)
    lost = lost_buoyancy(box_hull.cut((10.0, 0.0, t1), (0, 0, 1)), [comp])[0]
    assert lost["lost_volume"] == pytest.approx(mu * ell * B * t1, rel=1e-12)


# closed-form plane geometry (parallel-axis theorem): a side compartment shifts the waterplane
# centroid to -μ a y_c / A and its inertia about the new centroid is the difference of parts
def test_side_compartment_waterplane(box_hull):
    mu, T = 0.9, 2.0
    ell, b, yc, xc = 5.0, 2.0, -2.0, 13.5
    comp = compartment_from_box("starboard wing", [[11.0, -3.0, 0.5], [16.0, -1.0, 3.5]], permeability=mu)
    c = flooded_cut(box_hull.cut((10.0, 0.0, T), (0, 0, 1)), [comp])
    a_c = ell * b
    area = L * B - mu * a_c
    ybar = -mu * a_c * yc / area
    xbar = (L * B * L / 2 - mu * a_c * xc) / area
    assert c.waterplane_area == pytest.approx(area, rel=1e-12)
    assert c.waterplane_centroid[1] == pytest.approx(ybar, rel=1e-12)
    assert c.waterplane_centroid[0] == pytest.approx(xbar, rel=1e-12)
    i_t = L * B**3 / 12 + L * B * ybar**2 - mu * (ell * b**3 / 12 + a_c * (yc - ybar) ** 2)
    i_l = B * L**3 / 12 + L * B * (L / 2 - xbar) ** 2 - mu * (b * ell**3 / 12 + a_c * (xc - xbar) ** 2)
    i_uv = L * B * (L / 2 - xbar) * (0 - ybar) - mu * a_c * (xc - xbar) * (yc - ybar)
    assert c.inertia_t == pytest.approx(i_t, rel=1e-12)
    assert c.inertia_l == pytest.approx(i_l, rel=1e-12)
    assert c.inertia_uv == pytest.approx(i_uv, rel=1e-10)
    # volume: the compartment is flooded from z = 0.5 to the waterline
    lost = mu * a_c * (T - 0.5)
    assert c.volume == pytest.approx(L * B * T - lost, rel=1e-12)
    assert c.centroid[1] == pytest.approx(-lost * yc / (L * B * T - lost), rel=1e-12)


# closed form: a compartment wholly under water loses μ V and no waterplane
def test_submerged_compartment_loses_no_waterplane(box_hull):
    comp = compartment_from_box("tank top void", [[2.0, -1.0, 0.2], [4.0, 1.0, 1.0]], permeability=0.95)
    hc = box_hull.cut((10.0, 0.0, 2.5), (0, 0, 1))
    c = flooded_cut(hc, [comp])
    assert c.volume == pytest.approx(hc.volume - 0.95 * 2 * 2 * 0.8, rel=1e-12)
    assert c.waterplane_area == hc.waterplane_area and c.inertia_t == pytest.approx(hc.inertia_t, rel=1e-12)


# manifold3d boolean difference and trim by plane, trimesh centre of mass: with μ = 1 the net body is
# the hull with the compartments carved out; at random heeled planes the volumes and centroids agree,
# and the waterplane (with its holes) agrees with the kernel's cut of the carved mesh
def test_random_planes_against_carved_hull(box_hull):
    import manifold3d as m3d

    comps = [compartment_from_box("a", [[3.0, -2.0, 0.3], [7.0, 1.0, 3.7]], permeability=1.0),
             compartment_from_box("b", [[12.0, 0.5, 0.0], [17.0, 2.5, 3.0]], permeability=1.0)]

    def man(v, f):
        return m3d.Manifold(m3d.Mesh64(vert_properties=np.array(v, np.float64),
                                       tri_verts=np.array(f, np.uint32)))

    carved = man(box_hull.vertices, box_hull.faces)
    for c in comps:
        carved = carved - man(c.vertices, c.faces)
    out = carved.to_mesh64()
    cv, cf = np.asarray(out.vert_properties)[:, :3], np.asarray(out.tri_verts, np.int64)
    prep = kernel.prepare(cv, cf)
    rng = np.random.default_rng(3)
    for _ in range(12):
        up = up_vector(rng.uniform(-50, 50), rng.uniform(-6, 6))
        p = np.array([rng.uniform(6, 14), rng.uniform(-0.5, 0.5), rng.uniform(1.0, 3.0)])
        net = flooded_cut(box_hull.cut(p, up), comps)
        below = carved.trim_by_plane(tuple(-up), float(-up @ p)).to_mesh64()
        ref = trimesh.Trimesh(np.asarray(below.vert_properties)[:, :3], np.asarray(below.tri_verts), process=False)
        assert net.volume == pytest.approx(ref.volume, rel=1e-9)
        assert np.allclose(net.centroid, ref.center_mass, atol=1e-9 * L)
        k = kernel.cut(prep, p, up)
        assert net.waterplane_area == pytest.approx(k.waterplane_area, rel=1e-9)
        assert np.allclose(net.waterplane_centroid, k.waterplane_centroid, atol=1e-9 * L)
        assert net.inertia_t == pytest.approx(k.inertia_t, rel=1e-9)
        assert net.inertia_l == pytest.approx(k.inertia_l, rel=1e-9)


def test_bad_compartments(box_hull):
    with pytest.raises(InputError, match=r"permeability 1.5 is outside 0 < μ <= 1"):
        compartment_from_box("x", [[1, -1, 0], [2, 1, 1]], permeability=1.5)
    with pytest.raises(InputError, match="permeability 0 is outside"):
        compartment_from_box("x", [[1, -1, 0], [2, 1, 1]], permeability=0)
    outside = compartment_from_box("engine room", [[-1.0, -1.0, 0.0], [2.0, 1.0, 1.0]], permeability=0.85)
    with pytest.raises(InputError, match=r"compartment 'engine room' does not lie inside the hull: 2 m³"):
        check_inside(outside.name, outside.vertices, outside.faces, box_hull, kind="compartment")
    assert compartment_from_mesh("m", trimesh.creation.box(extents=(1, 1, 1)), permeability=0.5).volume == \
        pytest.approx(1.0, rel=1e-12)


# textbook lost buoyancy with the wall-sided formula (REFERENCES.md: Barrass & Derrett; Rawson & Tupper):
# a bilged full-depth side compartment leaves a wall-sided net body whose waterplane is the intact one;
# B moves off the centreline by y_B1, and heeling about the intact waterplane's centroid moves B by
# BM tan φ across and ½ BM tan² φ up, so the list solves tan φ (GM + ½ BM tan² φ) = y_B1 exactly,
# with GM = KB1 + I_F / V - KG. The upright box and the equilibrium are found here by bracketed solves
# (scipy brentq) on flooded_cut, not by the project's solver.
def test_bilged_side_compartment_list(box_hull):
    T0, kg = 1.5, 1.2
    ell, b, yc = 4.0, 1.0, -2.5
    comp = compartment_from_box("starboard wing", [[8.0, -3.0, 0.0], [12.0, -2.0, 4.0]], permeability=1.0)
    v0 = L * B * T0

    def net(t, heel):
        return flooded_cut(box_hull.cut((10.0, 0.0, t), up_vector(heel, 0.0)), [comp])

    def gz(heel):
        t = brentq(lambda z: net(z, heel).volume - v0, 0.5, 3.5, xtol=1e-14, rtol=1e-15)
        c = net(t, heel)
        return float((np.array([10.0, 0.0, kg]) - c.centroid) @ np.array([0.0, np.cos(np.radians(heel)),
                                                                          -np.sin(np.radians(heel))]))

    heel = brentq(gz, 0.01, 15.0, xtol=1e-12, rtol=1e-15)
    # closed form
    tan_phi, y_b1, gm, bm = bilged_side_list(L, B, v0, kg, ell, b, yc)
    assert heel > 0  # lists to the damaged (starboard) side
    assert np.tan(np.radians(heel)) == pytest.approx(tan_phi, rel=1e-9)
    # the small-angle textbook list tan φ = y_B1 / GM is within its own approximation (½ BM tan² φ / GM)
    assert np.tan(np.radians(heel)) == pytest.approx(y_b1 / gm, rel=0.5 * bm * tan_phi**2 / gm * 1.5)

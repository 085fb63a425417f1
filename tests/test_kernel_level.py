"""The lean plane family of the level solve against the full kernel cut: the same numbers, bit for
bit, on random and degenerate planes (through vertices, along edges, in faces, at the extremes)."""
from __future__ import annotations

import numpy as np
import pytest

from meshhydro import kernel, kernel_compiled, load_hull
from meshhydro.kernel_level import PlaneFamily
from meshhydro.tanks import solve_level, tank_from_box, tank_state

from conftest import ROOT, tm
from planes import plane_set, reference_meshes

LEVEL_FIELDS = ("volume", "waterplane_area", "inertia_t", "inertia_l", "inertia_uv")
LEVEL_ARRAYS = ("centroid", "waterplane_centroid", "axis_u", "axis_v")


def _meshes():
    box = tank_from_box("box", [[2.0, -2.5, 0.3], [4.5, -0.5, 2.3]], density=1.0)
    yield "box tank", box.prepared, box.vertices, box.faces
    meshes = reference_meshes(ROOT)
    for name in ("grid_box", "torus"):
        hull = load_hull(tm(*meshes[name][0]()))
        yield name, hull.prepared, hull.vertices, hull.faces


def _same(a, b, where):
    for f in LEVEL_FIELDS:
        assert getattr(a, f) == getattr(b, f), (f, where)
    for f in LEVEL_ARRAYS:
        np.testing.assert_array_equal(getattr(a, f), getattr(b, f), err_msg=f"{f} {where}")


@pytest.mark.parametrize("backend", ["compiled", "numpy"])
@pytest.mark.parametrize("name,prep,v,f", list(_meshes()))
def test_lean_probe_equals_full_cut(name, prep, v, f, backend):
    # equivalence with kernel.cut (the reference path, itself checked against closed forms and trimesh)
    if backend == "compiled" and not kernel_compiled.AVAILABLE:
        pytest.skip("numba is not importable")
    rng = np.random.default_rng(11)
    P, N, K = plane_set(v, f, 120, rng, degenerate_share=0.5)
    assert {"vertex", "edge", "face"} <= set(K)
    for p, n, kind in zip(P, N, K, strict=True):
        normal = n * rng.choice([1.0, 3.7, 1e-3])  # not unit: normalised alike on both paths
        full = kernel.cut(prep, p, normal, backend=backend)
        planes = PlaneFamily(prep, normal, backend=backend)
        probe = planes.probe(p)
        where = (name, kind, p.tolist(), n.tolist())
        assert probe.volume == full.volume and probe.waterplane_area == full.waterplane_area, where
        _same(planes.level(probe), full, where)
        whole = planes.cut(probe)
        _same(whole, full, where)
        assert whole.wetted_area == full.wetted_area and whole.n_segments == full.n_segments, where
        np.testing.assert_array_equal(whole.waterline_x, full.waterline_x)
        assert (whole.waterline_length, whole.waterline_breadth) == (full.waterline_length,
                                                                     full.waterline_breadth), where


def test_tank_state_equals_full_cut_at_its_level():
    # the state's fields are those of kernel.cut at the plane the solve found
    t = tank_from_box("box", [[0.0, 0.0, 0.0], [3.0, 2.0, 1.5]], density=1.025)
    rng = np.random.default_rng(3)
    for _ in range(40):
        up = rng.normal(size=3)
        up[2] = abs(up[2]) + 0.1
        up /= np.linalg.norm(up)
        vol = float(rng.uniform(0.05, 0.95)) * t.capacity
        st = tank_state(t, up, vol)
        c, k = solve_level(t.prepared, st.normal, vol, capacity=t.capacity)
        assert k == st.cuts
        np.testing.assert_array_equal(st.centroid, c.centroid)
        np.testing.assert_array_equal(st.level_point, c.waterplane_centroid)
        assert (st.free_surface_area, st.i_t, st.i_l) == (c.waterplane_area, c.inertia_t, c.inertia_l)


def test_unit_normal_scales_then_normalises():
    # the textbook normalisation n / |n| after scaling by the largest component (no overflow)
    rng = np.random.default_rng(7)
    for _ in range(200):
        n = rng.normal(size=3) * 10.0 ** rng.integers(-200, 200)
        m = n / np.abs(n).max()
        ref = m / np.sqrt(m[0] * m[0] + m[1] * m[1] + m[2] * m[2])
        np.testing.assert_array_equal(kernel.unit_normal(n), ref)


def _l_tank():
    """An L-shaped tank (profile in x-z extruded 1 m along y): a shelf face at z = 1 for 1 < x < 2."""
    import trimesh
    from shapely.geometry import Polygon

    from meshhydro.tanks import make_tank

    m = trimesh.creation.extrude_polygon(Polygon([(0, 0), (2, 0), (2, 1), (1, 1), (1, 2), (0, 2)]), 1.0)
    return make_tank("L", m.vertices[:, [0, 2, 1]].copy(), m.faces[:, ::-1].copy(), density=1.0, source="test")


@pytest.mark.skipif(kernel.DEFAULT_BACKEND != "compiled", reason="the joint level search is the compiled path")
def test_level_set_flags_a_plane_on_faces():
    # levelling several tanks in one compiled call must hand back, not settle, a plane lying on faces
    # (the shelf of an L-shaped tank at z = 1, centred 0): the plane-by-plane search handles those
    from meshhydro.kernel_level import LevelSet, family_axes
    from meshhydro.tanks import LEVEL_VOLUME_RTOL, UP_UPRIGHT

    t = _l_tank()
    assert t.capacity == pytest.approx(3.0, abs=1e-12)  # 2 x 1 + 1 x 1 in profile, 1 m deep (geometry)
    ls = LevelSet([t.prepared])
    n = np.array(UP_UPRIGHT, float)
    lo, hi = ls.extents(n)
    caps = np.array([t.capacity])
    out = ls.levels(family_axes(n), n, np.array([2.0]), caps, np.array([0.0]), lo, hi, LEVEL_VOLUME_RTOL * caps, 60)
    assert out["cuts"][0] < 0
    out = ls.levels(family_axes(n), n, np.array([2.5]), caps, lo + 0.25 * (hi - lo), lo, hi,
                    LEVEL_VOLUME_RTOL * caps, 60)
    assert out["cuts"][0] > 0 and out["volume"][0] == pytest.approx(2.5, abs=1e-9)
    # above the shelf the surface is the 1 x 1 upper leg: level z = 1.5, centroid z = (2 * 0.5 + 0.5 * 1.25) / 2.5
    assert out["waterplane_area"][0] == pytest.approx(1.0, abs=1e-12)
    assert out["centroid"][0][2] == pytest.approx((2.0 * 0.5 + 0.5 * 1.25) / 2.5, abs=1e-9)


@pytest.mark.parametrize("cap_cuts", [None, 1])
def test_tanks_levelled_together_equal_tank_by_tank(monkeypatch, cap_cuts):
    # the load's fluid moment and Σ ρ J from one compiled call against the same sums of per-tank states
    # (each state checked against kernel.cut above); cap_cuts = 1 makes every joint search give up, so
    # the per-tank fallback is what is compared
    from meshhydro import fluid as fluid_module
    from meshhydro.fluid import FluidLoad
    from meshhydro.frames import up_vector

    if cap_cuts is not None:
        monkeypatch.setattr(fluid_module, "LEVEL_MAX_CUTS", cap_cuts)
    tanks = [tank_from_box("a", [[0.0, 0.0, 0.0], [3.0, 2.0, 1.5]], density=1.025),
             tank_from_box("b", [[4.0, -2.0, 0.2], [5.0, 2.0, 2.2]], density=0.85),
             tank_from_box("full", [[6.0, -1.0, 0.0], [7.0, 1.0, 1.0]], density=1.0), _l_tank()]
    fills = {"a": 0.4, "b": 0.73, "full": 1.0, "L": 2.0 / 3.0}
    joint, single = FluidLoad.from_fills(tanks, fills), FluidLoad.from_fills(tanks, fills)
    rng = np.random.default_rng(5)
    for heel, trim in [(0.0, 0.0)] + [(float(h), float(t)) for h, t in zip(rng.uniform(-170, 170, 25),
                                                                            rng.uniform(-20, 20, 25))]:
        up = up_vector(heel, trim)
        mom, rho_j = joint.levelled(up)
        ref_m, ref_j = np.zeros(3), np.zeros((3, 3))
        for t, st in zip(tanks, single.states(up)):
            ref_m += st.mass * st.centroid
            ref_j += t.density * st.inertia_tensor
        np.testing.assert_allclose(mom, ref_m, rtol=0, atol=1e-9 * np.abs(ref_m).max())
        np.testing.assert_allclose(rho_j, ref_j, rtol=0, atol=1e-9 * max(np.abs(ref_j).max(), 1e-12))

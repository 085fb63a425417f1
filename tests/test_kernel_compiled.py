"""The compiled passes against the numpy reference passes: same results on the same planes
(degenerate and random), same block tables, same welding and topology."""
from __future__ import annotations

import numpy as np
import pytest

from meshhydro import kernel, kernel_build, kernel_compiled, mesh_compiled, load_hull
from meshhydro.kernel_prep import prepare
from meshhydro.mesh_stl import weld
from meshhydro.mesh_topology import bodies_by_edges, edge_table

from conftest import ROOT, tm
from planes import plane_set, reference_meshes

pytestmark = pytest.mark.skipif(not kernel_compiled.AVAILABLE, reason="numba is not importable")

FIELDS = ("volume", "wetted_area", "waterplane_area", "inertia_t", "inertia_l", "inertia_uv",
          "waterline_length", "waterline_breadth")


def _hulls():
    meshes = reference_meshes(ROOT)
    for name in ("grid_box", "torus", "twinfin_cat", "far_barge"):
        yield name, load_hull(tm(*meshes[name][0]()))


@pytest.mark.parametrize("name,hull", list(_hulls()))
def test_compiled_cut_equals_numpy_cut(name, hull):
    rng = np.random.default_rng(5)
    P, N, K = plane_set(hull.vertices, hull.faces, 150, rng, degenerate_share=0.5)
    size, vol = hull.size, hull.total_volume
    for p, n in zip(P, N, strict=True):
        a = kernel.cut(hull.prepared, p, n, backend="compiled", segments=True)
        b = kernel.cut(hull.prepared, p, n, backend="numpy", segments=True)
        for f in FIELDS:
            scale = {"volume": vol, "inertia_t": size ** 4, "inertia_l": size ** 4, "inertia_uv": size ** 4,
                     "waterline_length": size, "waterline_breadth": size}.get(f, size ** 2)
            assert abs(getattr(a, f) - getattr(b, f)) <= 1e-12 * scale, (f, p, n)
        o = hull.prepared.origin  # first moments about the mesh centre
        assert np.allclose(a.volume * (a.centroid - o), b.volume * (b.centroid - o), rtol=0, atol=1e-12 * vol * size)
        assert np.allclose(a.waterline_x, b.waterline_x, rtol=0, atol=1e-12 * size)
        assert a.n_segments == b.n_segments
        # the same segments, in any order (bit for bit: same arithmetic on the same corners)
        sa = a.segments.reshape(len(a.segments), 6)
        sb = b.segments.reshape(len(b.segments), 6)
        assert np.array_equal(sa[np.lexsort(sa.T)], sb[np.lexsort(sb.T)])


def test_compiled_clip_equals_numpy_clip():
    hull = load_hull(f"{ROOT}/meshes/kestrel_outrigger.stl")
    prep = hull.prepared
    for n, d in (((0.0, 0.0, 1.0), 0.0), ((0.0, 0.3, 0.95), 0.1), ((1.0, 0.0, 0.0), 0.0)):
        n = np.asarray(n) / np.linalg.norm(n)
        a = kernel.clip(prep, n, d, backend="compiled")
        b = kernel.clip(prep, n, d, backend="numpy")
        assert a.det == pytest.approx(b.det, rel=1e-12, abs=1e-12) and a.area == pytest.approx(b.area, rel=1e-12)
        assert np.allclose(a.mom, b.mom, rtol=1e-12, atol=1e-12)
        assert sorted(a.faces.tolist()) == sorted(b.faces.tolist())
        assert len(a.flat) == len(b.flat)


def test_compiled_block_tables_equal_numpy_tables():
    hull = load_hull(f"{ROOT}/meshes/tern_sloop.stl")
    a = prepare(hull.vertices, hull.faces, compiled=True)
    b = prepare(hull.vertices, hull.faces, compiled=False)
    assert kernel_build.AVAILABLE
    assert np.array_equal(a.face_index, b.face_index)
    assert np.array_equal(a.data, b.data)  # same per-face formulas: bit for bit
    assert np.allclose(a.leaf_sums, b.leaf_sums, rtol=1e-13, atol=1e-13)
    assert np.array_equal(a.leaf_center, b.leaf_center) and np.array_equal(a.group_half, b.group_half)


def test_compiled_weld_and_topology_equal_numpy():
    v0, f0 = reference_meshes(ROOT)["twinfin_cat"][0]()
    corners = v0[f0].astype(np.float32)
    corners[0, 0, 0] = -0.0 if corners[0, 0, 0] == 0.0 else corners[0, 0, 0]
    va, fa = weld(corners, "a", compiled=True)
    vb, fb = weld(corners, "b", compiled=False)
    assert len(va) == len(vb) == len(np.unique(v0[np.unique(f0)], axis=0))
    assert np.array_equal(va[fa], vb[fb])  # every corner lands on the same point
    ea, eb = edge_table(fa, len(va), compiled=True), edge_table(fa, len(va), compiled=False)
    ka = np.stack([ea.lo, ea.hi, ea.n_fwd, ea.n_tot, ea.first_face, ea.second_face], 1)
    kb = np.stack([eb.lo, eb.hi, eb.n_fwd, eb.n_tot, eb.first_face, eb.second_face], 1)
    assert np.array_equal(ka[np.lexsort(ka.T[::-1])], kb[np.lexsort(kb.T[::-1])])
    assert np.array_equal(ea.lo[ea.edge_of], eb.lo[eb.edge_of]) and np.array_equal(ea.fwd, eb.fwd)
    assert np.array_equal(bodies_by_edges(len(fa), ea, compiled=True), bodies_by_edges(len(fa), eb, compiled=False))
    assert mesh_compiled.AVAILABLE


def test_backend_switch():
    hull = load_hull(f"{ROOT}/meshes/brindle_barge.stl")
    assert kernel.DEFAULT_BACKEND in ("compiled", "numpy")
    with pytest.raises(Exception, match="backend"):
        kernel.cut(hull.prepared, (6, 0, 1), (0, 0, 1), backend="fortran")

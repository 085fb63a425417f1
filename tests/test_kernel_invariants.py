"""Invariants of the plane kernel against outside libraries on 2,100 planes per run, a third of
them degenerate (through vertices, containing edges, coplanar with faces, axis-aligned through
vertex rows of non-dyadic float64 meshes, at the exact bottom and top).

References: manifold3d (``trim_by_plane`` volume, the moment of its trimmed mesh, ``slice``
area after a rotation), trimesh (``slice_plane`` with cap: volume and centre of mass; its
``section`` polygons measured by shapely). The kernel with block culling off must agree with
itself to 1e-12 of the total.
"""
from __future__ import annotations

import zlib

import numpy as np
import pytest

from meshhydro import load_hull

from conftest import ROOT, tm
from planes import compare_planes, plane_set, reference_meshes, section_polygon_area


MESHES = reference_meshes(ROOT)


@pytest.mark.parametrize("name", list(MESHES))
def test_planes_against_manifold3d(name):
    make, count = MESHES[name]
    hull = load_hull(tm(*make()))
    worst = compare_planes(hull, count, zlib.crc32(name.encode()))
    errors = {k: v[0] for k, v in worst.items()}
    assert errors["volume"] < 1e-12, worst
    assert errors["moment"] < 1e-12, worst
    assert errors["cull"] < 1e-12, worst
    assert errors["area"] < 1e-9, worst  # manifold3d's cross-sections carry ~1e-10 relative rounding


# (one-body meshes: trimesh caps several loops only with the optional rtree package)
@pytest.mark.parametrize("name", ["grid_box", "brindle_barge", "tern_sloop", "far_barge"])
def test_planes_against_trimesh_capped_slice_and_section(name):
    make, _ = MESHES[name]
    v, f = make()
    hull = load_hull(tm(v, f))
    mesh = tm(hull.vertices, hull.faces)
    rng = np.random.default_rng(11)
    P, N, K = plane_set(hull.vertices, hull.faces, 12, rng, degenerate_share=0.0)
    for p, n in zip(P, N, strict=True):
        c = hull.cut(p, n)
        sl = mesh.slice_plane(p, -n, cap=True)
        assert c.volume == pytest.approx(sl.volume, rel=1e-9, abs=1e-12 * hull.total_volume)
        if sl.volume > 1e-6 * hull.total_volume:
            assert np.allclose(c.centroid, sl.center_mass, atol=1e-9 * hull.size)
        area = section_polygon_area(mesh, p, n)
        assert c.waterplane_area == pytest.approx(area, rel=1e-9, abs=1e-12 * hull.size ** 2)

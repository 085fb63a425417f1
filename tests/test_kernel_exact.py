"""The plane kernel is exact in degenerate positions: planes through vertices, containing
edges, coplanar with faces, at the exact bottom and deck; block culling never changes a result."""
from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from meshhydro import kernel, load_hull
from meshhydro.frames import up_vector

from conftest import ROOT, tm
from grids import grid_box


def _subdivided_box():
    b = trimesh.creation.box(extents=(10.0, 4.0, 2.0))
    b.apply_translation((5.0, 0.0, 1.0))
    for _ in range(3):
        b = b.subdivide()
    return load_hull(tm(b.vertices, b.faces))


def _same_with_and_without_culling(hull, point, normal):
    a = kernel.cut(hull.prepared, point, normal)
    b = kernel.cut(hull.prepared, point, normal, cull=False)
    scale = hull.total_volume
    assert abs(a.volume - b.volume) <= 1e-12 * scale
    assert np.max(np.abs(a.volume * a.centroid - b.volume * b.centroid)) <= 1e-12 * scale * hull.size
    assert abs(a.waterplane_area - b.waterplane_area) <= 1e-12 * hull.size ** 2
    return a


def test_subdivided_box_heeled_through_deck_vertices():
    # Box 10 x 4 x 2 m heeled 23° with the waterline through the deck centreline (a row of
    # vertices): section area 8 - 2 tan φ (plane geometry of a rectangle less a triangle).
    hull = _subdivided_box()
    h = hull.hydrostatics(2.0, heel=23.0)
    exact = 10.0 * (8.0 - 2.0 * math.tan(math.radians(23.0)))
    assert h.volume == pytest.approx(exact, rel=1e-13)
    assert h.lcb == pytest.approx(5.0, abs=1e-12)
    p, n = hull.plane(2.0, heel=23.0)
    c = _same_with_and_without_culling(hull, p, n)
    # waterplane: 10 m long, from y = -2/cos... only the part inside the deck edge at y = +2:
    # the waterline runs from the deck centreline (y = 0) down the port side; its width in the
    # plane is 2 / cos φ (it spans y from 0 to 2)
    assert c.waterplane_area == pytest.approx(10.0 * 2.0 / math.cos(math.radians(23.0)), rel=1e-13)


@pytest.mark.parametrize("draft", [0.1, 0.2, 0.3])
def test_float64_obj_box_with_vertex_rows_at_the_waterline(tmp_path, draft):
    # Box 10 x 4 x 1.2 m with vertex rows every 0.1 m written with all float64 digits: the
    # waterline lies on a row of vertices; V = 40 T, Awp = 40, TCB = 0 (box closed forms).
    zs = np.linspace(0.0, 1.2, 13)
    v, f = grid_box(np.linspace(0.0, 10.0, 6), np.linspace(-2.0, 2.0, 5), zs)
    path = tmp_path / "box.obj"
    lines = [f"v {x!r} {y!r} {z!r}" for x, y, z in v.tolist()]
    lines += [f"f {a + 1} {b + 1} {c + 1}" for a, b, c in f.tolist()]
    path.write_text("\n".join(lines) + "\n")
    hull = load_hull(str(path))
    h = hull.hydrostatics(draft)
    assert h.volume == pytest.approx(40.0 * draft, rel=1e-13)
    assert h.awp == pytest.approx(40.0, rel=1e-13)
    assert abs(h.tcb) <= 1e-13
    assert h.bmt == pytest.approx(4.0 ** 2 / (12 * draft), rel=1e-12)  # BMt = B²/12T (textbook)


def test_brindle_barge_heel_one_degree_at_the_deck():
    # Shipped barge: waterline at the deck edge height heeled 1°. References: trimesh's capped
    # slice (volume) and the area of trimesh's section polygon (shapely).
    hull = load_hull(f"{ROOT}/meshes/brindle_barge.stl")
    mesh = tm(hull.vertices, hull.faces)
    for draft in (float(hull.bounds[1][2]), 0.8):
        p, n = hull.plane(draft, heel=1.0)
        c = _same_with_and_without_culling(hull, p, n)
        ref = mesh.slice_plane(p, -n, cap=True)
        assert c.volume == pytest.approx(ref.volume, rel=1e-10)
        assert np.allclose(c.centroid, ref.center_mass, atol=1e-10 * hull.size)
        planar, _ = mesh.section(plane_origin=p, plane_normal=n).to_2D()
        assert c.waterplane_area == pytest.approx(planar.area, rel=1e-10)


def test_plane_at_bottom_and_deck_of_a_grid_box():
    # Coplanar with whole faces: at the bottom the submerged solid is flat (V = 0) and the
    # waterplane is the bottom (10 x 4); at the deck V is the whole box and Awp the deck.
    v, f = grid_box(np.linspace(0, 10, 11), np.linspace(-2, 2, 9), np.linspace(0, 1.2, 13))
    hull = load_hull(tm(v, f))
    up = np.array([0.0, 0.0, 1.0])
    bottom = _same_with_and_without_culling(hull, (5.0, 0.0, 0.0), up)
    assert bottom.volume == 0.0 and bottom.waterplane_area == pytest.approx(40.0, rel=1e-14)
    assert np.allclose(bottom.waterplane_centroid, [5.0, 0.0, 0.0], atol=1e-14)
    assert bottom.inertia_t == pytest.approx(10 * 4 ** 3 / 12, rel=1e-13)  # I = L B³/12 (textbook)
    deck = _same_with_and_without_culling(hull, (5.0, 0.0, 1.2), up)
    assert deck.volume == pytest.approx(48.0, rel=1e-14) and deck.waterplane_area == pytest.approx(40.0, rel=1e-14)
    assert deck.centroid[2] == pytest.approx(0.6, rel=1e-14)
    # the water side seen from the other way: below a downward normal at the deck lies nothing
    top = _same_with_and_without_culling(hull, (5.0, 0.0, 1.2), -up)
    assert top.volume == 0.0 and top.waterplane_area == pytest.approx(40.0, rel=1e-14)
    # a transverse plane coplanar with the transom (x = 0): the section is the transom, 4 x 1.2
    assert kernel.section_area(hull.prepared, 0.0, (5.0, 0.0, 1.2), up)[0] == pytest.approx(4.8, rel=1e-14)


def test_deckhouse_touching_the_deck_at_deck_height():
    # A deckhouse standing on the deck, its corners on deck vertices (two bodies touching).
    # At the deck height the closed section is the deck (the footprint is counted once).
    v, f = grid_box(np.linspace(0, 10, 11), np.linspace(-2, 2, 5), [0.0, 1.0, 2.0])
    dv, df = grid_box([3.0, 5.0], [-1.0, 1.0], [2.0, 3.0])
    hull = load_hull(tm(np.concatenate([v, dv]), np.concatenate([f, df + len(v)])))
    assert len(hull.report.bodies) == 2 and hull.report.usable
    c = _same_with_and_without_culling(hull, (5.0, 0.0, 2.0), (0, 0, 1))
    assert c.volume == pytest.approx(80.0, rel=1e-14)
    assert c.waterplane_area == pytest.approx(40.0, rel=1e-13)
    c = _same_with_and_without_culling(hull, (5.0, 0.0, 2.5), (0, 0, 1))
    assert c.volume == pytest.approx(82.0, rel=1e-14) and c.waterplane_area == pytest.approx(4.0, rel=1e-13)


def test_planes_containing_edges_and_through_vertices():
    # A box 20 x 6 x 4 cut by planes through its corner edges: diagonal halves are exact
    # (prism volume L B D / 2), and a ridge touching the plane adds no waterplane.
    v, f = grid_box([0.0, 10.0, 20.0], [-3.0, 0.0, 3.0], [0.0, 2.0, 4.0])
    hull = load_hull(tm(v, f))
    n = np.array([0.0, -4.0, 6.0]) / math.hypot(4.0, 6.0)
    c = _same_with_and_without_culling(hull, (0.0, 0.0, 2.0), n)
    assert c.volume == pytest.approx(240.0, rel=1e-13)
    assert c.waterplane_area == pytest.approx(20.0 * math.hypot(6.0, 4.0), rel=1e-13)
    # a plane touching only the bottom edge at y = -3 from outside: nothing below it
    n2 = np.array([0.0, 1.0, 1.0]) / math.sqrt(2.0)
    c2 = _same_with_and_without_culling(hull, (0.0, -3.0, 0.0), n2)
    assert c2.volume == 0.0 and c2.waterplane_area == 0.0


def test_huge_and_tiny_normals_are_scaled_before_normalising():
    hull = load_hull(tm(*grid_box([0.0, 10.0], [-2.0, 2.0], [0.0, 2.0])))
    ref = hull.cut((5.0, 0.0, 1.0), (0.0, 1.0, 1.0))
    for n in ((0.0, 1e300, 1e300), (0.0, 1e-300, 1e-300), (0.0, 5e-324, 5e-324)):
        with np.errstate(over="ignore", under="ignore"):
            c = hull.cut((5.0, 0.0, 1.0), n)
        assert c.volume == pytest.approx(ref.volume, rel=1e-15)
        assert np.allclose(c.normal, ref.normal, atol=1e-16)


def test_extent_along_brackets_the_vertices():
    # vertical extent from the blocks against a direct scan of the vertices (numpy)
    hull = load_hull(f"{ROOT}/meshes/tern_sloop.stl")
    for heel in (0.0, 17.0, 90.0, 143.0):
        n = up_vector(heel, 2.0)
        lo, hi = kernel.extent_along(hull.prepared, n)
        s = hull.vertices @ n
        assert lo <= s.min() <= lo + 1e-12 * hull.size
        assert hi - 1e-12 * hull.size <= s.max() <= hi


@pytest.mark.parametrize("name", ["grid_box", "tern_sloop", "twinfin_cat", "torus"])
def test_cut_segments_close_exactly_in_degenerate_planes(name):
    # the waterline is a set of closed loops: every segment end is the start of another,
    # bit for bit, for planes through vertices, along edges and coplanar with faces
    from planes import plane_set, reference_meshes

    hull = load_hull(tm(*reference_meshes(ROOT)[name][0]()))
    rng = np.random.default_rng(3)
    P, N, K = plane_set(hull.vertices, hull.faces, 120, rng, degenerate_share=1.0)
    closed = 0
    for p, n in zip(P, N, strict=True):
        seg = hull.cut(p, n, segments=True).segments
        keep = np.any(seg[:, 0] != seg[:, 1], axis=1)  # zero-length pieces at vertices on the plane
        a, b = seg[keep, 0], seg[keep, 1]
        assert np.array_equal(a[np.lexsort(a.T)], b[np.lexsort(b.T)]), (p, n)
        closed += len(a) > 0
    assert closed > 60

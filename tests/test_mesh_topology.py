"""Bodies are split by shared edges (a shared vertex does not join them) and checked one by one;
degenerate facets are named and left out; non-manifold edges are named."""
from __future__ import annotations

import numpy as np
import pytest

from meshhydro import InvalidMeshError, check_mesh, load_hull

from conftest import tm
from grids import grid_box


def _join(*parts):
    """Concatenate (v, f) parts and weld bit-identical vertices (as an STL export would be read)."""
    v = np.concatenate([p[0] for p in parts])
    offs = np.cumsum([0] + [len(p[0]) for p in parts[:-1]])
    f = np.concatenate([p[1] + o for p, o in zip(parts, offs, strict=True)])
    uniq, inv = np.unique(v, axis=0, return_inverse=True)
    return uniq, inv.reshape(-1)[f]


def test_box_inside_a_box_sharing_a_corner_is_an_overlap():
    # the inner 4 x 2 x 1 box shares the corner (0, -2, 0) with the outer 10 x 4 x 2 box
    outer = grid_box([0, 10], [-2, 2], [0, 2])
    inner = grid_box([0, 4], [-2, 0], [0, 1])
    md, rep = check_mesh(tm(*_join(outer, inner)))
    assert [b.volume for b in rep.bodies] == pytest.approx([80.0, 8.0])  # box volumes L B D
    assert not rep.usable and "inside the other" in rep.problems[0]
    assert rep.overlaps[0][2] == pytest.approx(8.0, rel=1e-9)
    with pytest.raises(InvalidMeshError, match="share volume"):
        load_hull(tm(*_join(outer, inner)))


def test_deckhouse_on_deck_vertices_is_two_touching_bodies():
    hull_part = grid_box(np.linspace(0, 10, 11), np.linspace(-2, 2, 5), [0, 1, 2])
    house = grid_box([3, 5], [-1, 1], [2, 3.5])  # its bottom corners are deck vertices
    hull = load_hull(tm(*_join(hull_part, house)))
    rep = hull.report
    assert rep.usable and rep.closed and rep.consistent_winding and not rep.overlaps
    assert [b.volume for b in rep.bodies] == pytest.approx([80.0, 6.0])
    assert hull.total_volume == pytest.approx(86.0, rel=1e-14)
    assert hull.cut((5, 0, 3.0), (0, 0, 1)).volume == pytest.approx(84.0, rel=1e-14)


def test_inverted_box_touching_along_an_edge_is_inside_out():
    a = grid_box([0, 10], [-2, 2], [0, 2])
    b = grid_box([0, 10], [2, 6], [2, 4])  # shares the edge y = 2, z = 2 (x from 0 to 10)
    b = (b[0], b[1][:, ::-1])
    md, rep = check_mesh(tm(*_join(a, b)))
    assert [x.volume for x in rep.bodies] == pytest.approx([80.0, -80.0])
    assert rep.inside_out_bodies == [1] and "inside out" in rep.problems[0]
    assert rep.non_manifold_edges == 1
    assert any("non-manifold" in w and "(0, 2, 2)" in w and "(10, 2, 2)" in w for w in rep.warnings)
    hull = load_hull(tm(*_join(a, b)), flip_inside_out=True)
    assert hull.total_volume == pytest.approx(160.0, rel=1e-14)


def test_three_faces_on_an_edge_are_named():
    v, f = grid_box([0, 10], [-2, 2], [0, 2])
    extra = np.array([[*v.mean(axis=0)], [5.0, 9.0, 9.0]])
    e = f[0, :2]
    f2 = np.concatenate([f, [[e[0], e[1], len(v)]]])
    md, rep = check_mesh(tm(np.concatenate([v, extra]), f2))
    # the fin is a body of its own, open along all its edges (the shared edge included)
    assert rep.non_manifold_edges == 1 and not rep.closed and len(rep.bodies) == 2
    assert rep.bodies[0].closed and not rep.bodies[1].closed
    assert any("used by 3 faces" in w for w in rep.warnings)
    assert rep.rims[0].z_min == 0.0


@pytest.mark.parametrize("bad", [[[0, 0, 1]], [[2, 2, 2]], [[0, 0, 1], [3, 3, 3], [5, 1, 5]]])
def test_degenerate_facets_warn_and_are_left_out(bad):
    v, f = grid_box([0, 10], [-2, 2], [0, 2])
    f2 = np.concatenate([f, bad])
    hull = load_hull(tm(v, f2))
    rep = hull.report
    assert rep.closed and rep.consistent_winding and rep.usable
    names = list(range(len(f), len(f2)))
    assert rep.degenerate_faces == names
    assert any("degenerate" in w and ", ".join(map(str, names)) in w for w in rep.warnings)
    assert hull.total_volume == pytest.approx(80.0, rel=1e-15)
    assert hull.cut((5, 0, 1), (0, 0, 1)).waterplane_area == pytest.approx(40.0, rel=1e-15)


def test_duplicate_faces_found_in_either_winding():
    v, f = grid_box([0, 10], [-2, 2], [0, 2])
    for extra in (f[3:4], f[3:4, ::-1]):
        md, rep = check_mesh(tm(v, np.concatenate([f, extra])))
        assert rep.duplicate_faces == [len(f)] and not rep.usable


def test_open_rim_counts_edges():
    v, f = grid_box(np.linspace(0, 10, 3), np.linspace(-2, 2, 3), [0, 1, 2])
    top = np.all(v[f][:, :, 2] == 2.0, axis=1)
    md, rep = check_mesh(tm(v, f[~top]))
    assert len(rep.rims) == 1 and rep.rims[0].n_edges == 8  # 2 + 2 + 2 + 2 deck-edge segments
    assert rep.rims[0].z_min == rep.rims[0].z_max == 2.0

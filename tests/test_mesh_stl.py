"""Binary STL read with numpy against trimesh's reader; welding; errors name the file and face."""
from __future__ import annotations

import numpy as np
import pytest
import trimesh

from meshhydro import InvalidMeshError, check_mesh, load_hull
from meshhydro.mesh_stl import binary_stl_count
from meshhydro.mesh_topology import body_sums

from conftest import ROOT
from grids import grid_box


def _write(path, corners):
    rec = np.zeros(len(corners), dtype=[("n", "<f4", (3,)), ("c", "<f4", (3, 3)), ("a", "<u2")])
    rec["c"] = corners
    with open(path, "wb") as fh:
        fh.write(b"solid but binary".ljust(80, b" "))  # a binary header may start with "solid"
        fh.write(np.uint32(len(corners)).tobytes())
        rec.tofile(fh)


def test_binary_stl_matches_trimesh_reader():
    path = f"{ROOT}/meshes/twinfin_cat.stl"
    assert binary_stl_count(path) is not None
    md, rep = check_mesh(path)
    ref = trimesh.load(path, process=False)  # trimesh's reader: one vertex per corner
    assert np.array_equal(md.vertices[md.faces], np.asarray(ref.vertices)[np.asarray(ref.faces)])
    assert md.welded == len(ref.vertices) - len(md.vertices)
    assert len(np.unique(md.vertices, axis=0)) == len(md.vertices)  # welded: no two alike
    assert rep.volume == pytest.approx(ref.volume, rel=1e-12)


def test_negative_zero_is_welded_and_bad_files_are_named(tmp_path):
    v, f = grid_box([0.0, 10.0], [-2.0, 2.0], [0.0, 2.0])
    corners = v[f].astype(np.float32)
    corners[corners == 0.0] = -0.0  # some exporters write -0.0
    corners[:6][corners[:6] == -0.0] = 0.0
    p = tmp_path / "box.stl"
    _write(p, corners)
    hull = load_hull(str(p))
    assert hull.report.closed and len(hull.vertices) == 8
    assert hull.total_volume == pytest.approx(80.0, rel=1e-12)
    corners[5, 1, 2] = np.nan
    _write(p, corners)
    with pytest.raises(InvalidMeshError, match=r"box.stl: face 5 has a non-finite corner"):
        load_hull(str(p))
    data = p.read_bytes()
    (tmp_path / "cut.stl").write_bytes(data[:-50])  # one triangle short: not a binary STL
    with pytest.raises(InvalidMeshError, match="cut.stl"):
        load_hull(str(tmp_path / "cut.stl"))


def test_body_sums_compiled_equals_numpy():
    v, f = grid_box(np.linspace(0, 10, 6), [-2.0, 0.0, 2.0], [0.0, 1.0, 2.0])
    w, g = grid_box([3.0, 5.0], [-1.0, 1.0], [2.0, 3.0])
    vv, ff = np.concatenate([v, w]), np.concatenate([f, g + len(v)])
    lab = np.r_[np.zeros(len(f), np.int64), np.ones(len(g), np.int64)]
    lab[3] = -1
    a = body_sums(vv, ff, lab, 2, compiled=True)
    b = body_sums(vv, ff, lab, 2, compiled=False)
    for x, y in zip(a, b, strict=True):
        assert np.allclose(x, y, rtol=1e-14, atol=1e-14)
    # the second body is a 2 x 2 x 1 box: volume L B D = 4 (closed form)
    assert a[0][1] == pytest.approx(4.0, rel=1e-14)

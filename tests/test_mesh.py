"""Mesh input and the health report: every bad input gets its diagnosis, nothing is repaired silently."""
from __future__ import annotations

import numpy as np
import pytest
import trimesh

from meshhydro import InvalidMeshError, InputError, check_mesh, load_hull
from meshhydro.forms import box

from conftest import tm


def _write(tmp_path, name, v, f):
    p = tmp_path / name
    trimesh.Trimesh(v, f, process=False).export(p)
    return str(p)


def test_stl_roundtrip_welds_only_identical_points(tmp_path):
    v, f = box(10, 4, 2)
    path = _write(tmp_path, "b.stl", v, f)
    md, rep = check_mesh(path)
    assert rep.closed and rep.usable and rep.welded_vertices == 36 - 8
    assert rep.volume == pytest.approx(80.0)


def test_axis_mapping_y_up_and_units(tmp_path):
    v, f = box(10, 4, 2)
    # a Y-up export: file y is up, file z points to starboard (x forward stays)
    vf = np.stack([v[:, 0], v[:, 2], -v[:, 1]], axis=1) * 100.0  # in cm
    hull = load_hull(tm(vf, f), units="cm", forward="+x", up="+y")
    assert np.allclose(hull.bounds[0], [0, -2, 0]) and np.allclose(hull.bounds[1], [10, 2, 2])
    assert hull.hydrostatics(1.0).volume == pytest.approx(40.0)


def test_inside_out_reported_and_flipped_only_on_request():
    v, f = box(10, 4, 2)
    md, rep = check_mesh(tm(v, f[:, ::-1]))
    assert not rep.usable and rep.inside_out_bodies == [0]
    assert "inside out" in rep.problems[0]
    with pytest.raises(InvalidMeshError, match="inside out"):
        load_hull(tm(v, f[:, ::-1]))
    hull = load_hull(tm(v, f[:, ::-1]), flip_inside_out=True)
    assert hull.report.flipped_bodies == [0]
    assert hull.total_volume == pytest.approx(80.0)


def test_inconsistent_winding_names_a_face():
    v, f = box(10, 4, 2)
    f = f.copy()
    f[5] = f[5][::-1]
    md, rep = check_mesh(tm(v, f))
    assert not rep.consistent_winding and not rep.usable
    assert "face" in rep.problems[0]


def test_duplicate_and_degenerate_faces():
    v, f = box(10, 4, 2)
    md, rep = check_mesh(tm(v, np.concatenate([f, f[:1]])))
    assert rep.duplicate_faces == [12] and not rep.usable
    f2 = np.concatenate([f, [[0, 0, 1]]])
    md, rep = check_mesh(tm(v, f2))
    assert 12 in rep.degenerate_faces


def test_overlapping_bodies_refused_then_merged():
    a = box(10, 4, 2)
    b = box(10, 4, 2, x0=5.0)
    v = np.concatenate([a[0], b[0]])
    f = np.concatenate([a[1], b[1] + 8])
    md, rep = check_mesh(tm(v, f))
    assert rep.overlaps and rep.overlaps[0][2] == pytest.approx(40.0, rel=1e-6)
    with pytest.raises(InvalidMeshError, match="overlap"):
        load_hull(tm(v, f))
    hull = load_hull(tm(v, f), merge_overlaps=True)
    # union of two 10 m boxes overlapping by 5 m: 15 x 4 x 2 = 120 m³
    assert hull.total_volume == pytest.approx(120.0, rel=1e-9)
    assert hull.report.merged


def test_separate_bodies_each_have_volume():
    a = box(10, 2, 2)
    v = np.concatenate([a[0] + [0, -3, 0], a[0] + [0, 3, 0]])
    f = np.concatenate([a[1], a[1] + 8])
    md, rep = check_mesh(tm(v, f))
    assert [b.volume for b in rep.bodies] == pytest.approx([40.0, 40.0])
    assert not rep.overlaps


def test_scale_that_looks_like_mm():
    v, f = box(12000, 4000, 2000)
    md, rep = check_mesh(tm(v, f), units="m")
    assert not rep.usable and "unit" in rep.problems[0]


def test_bad_files(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_hull(str(tmp_path / "missing.stl"))
    junk = tmp_path / "junk.stl"
    junk.write_text("this is not a mesh at all\n")
    with pytest.raises(InvalidMeshError):
        load_hull(str(junk))
    empty = tmp_path / "empty.obj"
    empty.write_text("# nothing\n")
    with pytest.raises(InvalidMeshError, match="empty|no triangle"):
        load_hull(str(empty))
    nan = tmp_path / "nan.obj"
    nan.write_text("v 0 0 0\nv 1 0 0\nv 0 nan 0\nv 0 0 1\nf 1 2 3\nf 1 2 4\nf 1 3 4\nf 2 3 4\n")
    with pytest.raises(InvalidMeshError, match="non-finite"):
        load_hull(str(nan))
    with pytest.raises(InputError, match="unit"):
        load_hull(tm(*box(1, 1, 1)), units="furlong")


def test_proportions_that_suggest_other_axes_give_a_hint(tmp_path):
    # a Y-up export read as Z-up stands the hull on its side: it passes as a mesh, so check says what
    # the proportions suggest (a hint, not an error; common practice: hulls are longer than wide, wider
    # than deep)
    v, f = box(12.0, 4.8, 1.6)
    p = tmp_path / "yup.stl"
    trimesh.Trimesh(v[:, [0, 2, 1]], f[:, ::-1], process=False).export(p)  # file y up, file z across
    _, rep = check_mesh(str(p))
    assert rep.usable and any("--up +y" in w and "3 times as tall" in w for w in rep.warnings)
    _, rep = check_mesh(str(p), up="+y")
    assert not any("--up" in w or "--forward" in w for w in rep.warnings)
    q = tmp_path / "yfwd.stl"
    trimesh.Trimesh(v[:, [1, 0, 2]], f[:, ::-1], process=False).export(q)  # file y forward
    _, rep = check_mesh(str(q))
    assert any("longest extent is along y" in w and "--forward" in w for w in rep.warnings)


def test_a_flat_mesh_gets_a_report_not_a_crash(tmp_path):
    # a plate with no breadth in y: no volume and no axes hint, but a health report (no division by zero)
    p = tmp_path / "plate.obj"
    p.write_text("v 0 0 0\nv 4 0 0\nv 4 0 1\nv 0 0 1\nf 1 2 3\nf 1 3 4\n")
    _, rep = check_mesh(str(p))
    assert "open" in " ".join(rep.warnings) and not any("--up" in w or "--forward" in w for w in rep.warnings)

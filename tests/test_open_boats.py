"""Open boats (no deck) assessed to the rim; inside-out open meshes; holes closed on request.

References: closed forms of a box (wall-sided volume L·B·T; heeled past bilge emergence the immersed
section is a right triangle, so the rim at height D goes under when tan φ = L·D² / (2V)); trimesh
for the hole filling (trimesh.repair.fill_holes) and its volume of the closed result.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from meshhydro import load_hull
from meshhydro.criteria import IMO_2008_GENERAL, evaluate
from meshhydro.errors import InvalidMeshError, OpenRimError
from meshhydro.mesh import check_mesh
from meshhydro.stability import SWAMPING
from meshhydro.sweep import heel_trace
from meshhydro.analysis import table_analysis

RHO = 1.025
L, B, D = 6.0, 2.0, 1.0


def _open_box(inside_out: bool = False) -> trimesh.Trimesh:
    """Box L x B x D (x 0..L, y ±B/2, z 0..D) without its top: an open boat with its rim at z = D."""
    b = trimesh.creation.box(extents=(L, B, D), transform=trimesh.transformations.translation_matrix((L / 2, 0, D / 2)))
    f = b.faces[b.face_normals[:, 2] < 0.5]
    v, f = trimesh.remesh.subdivide(b.vertices, f)
    return trimesh.Trimesh(v, f[:, ::-1] if inside_out else f, process=False)


@pytest.fixture(scope="module")
def boat():
    return load_hull(_open_box())


def test_table_gives_rows_below_the_rim_and_says_where_it_stops(boat):
    rows, doc = table_analysis(boat, np.arange(0.2, 1.45, 0.2), density=RHO)
    assert [round(r["draft"], 9) for r in rows] == [0.2, 0.4, 0.6, 0.8, 1.0]
    for r in rows:  # wall-sided box: V = L B T (closed form)
        assert r["volume"] == pytest.approx(L * B * r["draft"], rel=1e-12)
    assert any("stops at draft 1.0000 m" in n for n in doc.sections[0].notes)
    with pytest.raises(OpenRimError):
        table_analysis(boat, np.array([1.2, 1.4]), density=RHO)


def test_curve_ends_at_the_swamping_angle_closed_form(boat):
    v = 2.9268292682926829  # 3 t in sea water
    c = boat.righting_curve(v * RHO, (3.0, 0.0, 0.4), heels=np.arange(0.0, 91.0, 5.0))
    phi = math.degrees(math.atan(L * D * D / (2 * v)))  # right-triangle section, rim at z = D
    assert c.swamping[1] == pytest.approx(phi, abs=1e-7)
    assert c.heel[-1] == pytest.approx(phi, abs=1e-7) and c.heel[-2] == 45.0
    assert c.downflooding_angle(1) == (pytest.approx(phi, abs=1e-7), SWAMPING)
    assert c.summary(1)["swamping_angle"] == pytest.approx(phi, abs=1e-7)
    # the sweep follows the same curve
    t = heel_trace(boat, v * RHO, (3.0, 0.0, 0.4), np.arange(0.0, 91.0, 15.0))
    assert t.heel[-1] == pytest.approx(phi, abs=1e-7)


def test_criteria_use_the_swamping_angle_as_downflooding(boat):
    d = 5.0
    c = boat.righting_curve(d, (3.0, 0.0, 0.4), heels=np.arange(0.0, 91.0, 1.0))
    phi = c.swamping[1]
    assert phi < 40.0
    rep = evaluate(c, IMO_2008_GENERAL, sides=(1,))
    # clause 2.2.1's second area limit: 0° to 40° or to the flooding angle
    r = [r for r in rep.results if r.id == "2.2.1"][1]
    assert "40" in r.text
    assert r.attained == pytest.approx(c.area(0.0, phi), rel=1e-12)


def test_inside_out_open_mesh_detected_and_flipped():
    _, rep = check_mesh(_open_box(inside_out=True))
    assert not rep.usable and rep.inside_out_bodies == [0]
    assert "inside out" in rep.problems[0] and rep.bodies[0].capped_volume == pytest.approx(-L * B * D, rel=1e-12)
    with pytest.raises(InvalidMeshError):
        load_hull(_open_box(inside_out=True))
    h = load_hull(_open_box(inside_out=True), flip_inside_out=True)
    assert h.hydrostatics(0.5).volume == pytest.approx(L * B * 0.5, rel=1e-12)


def test_close_holes_on_request():
    b = trimesh.creation.box(extents=(L, B, D), transform=trimesh.transformations.translation_matrix((L / 2, 0, D / 2)))
    b = b.subdivide()
    low = int(np.flatnonzero(b.triangles_center[:, 2] < 1e-9)[0])  # one triangle of the bottom missing
    holed = trimesh.Trimesh(b.vertices, np.delete(b.faces, low, axis=0), process=False)
    with pytest.raises(OpenRimError):
        load_hull(holed).hydrostatics(0.5)
    h = load_hull(holed, close_holes=True)
    assert h.report.closed
    assert any("1 face(s) added" in w for w in h.report.warnings)
    ref = trimesh.Trimesh(h.vertices, h.faces, process=False)
    assert h.total_volume == pytest.approx(ref.volume, rel=1e-12)  # reference: trimesh's volume
    assert h.hydrostatics(0.5).volume == pytest.approx(L * B * 0.5, rel=1e-12)


def test_criteria_count_area_only_to_swamping(boat):
    # a heavier load swamps before 30°: the 0-30° area is counted to the swamping angle (nothing rights beyond)
    c = boat.righting_curve(8.0, (3.0, 0.0, 0.4), heels=np.arange(0.0, 91.0, 1.0))
    phi = c.swamping[1]
    assert phi < 30.0
    rep = evaluate(c, IMO_2008_GENERAL, sides=(1,))
    r = [r for r in rep.results if r.id == "2.2.1"][0]  # clause 2.2.1's first area limit, 0° to 30°
    assert "30" in r.text
    assert r.attained == pytest.approx(c.area(0.0, phi), rel=1e-12) and "swamps" in r.note


def test_cli_close_holes_and_refusals(tmp_path):
    import os
    import subprocess
    import sys

    from conftest import ROOT

    b = trimesh.creation.box(extents=(L, B, D), transform=trimesh.transformations.translation_matrix((L / 2, 0, D / 2)))
    b = b.subdivide()
    low = int(np.flatnonzero(b.triangles_center[:, 2] < 1e-9)[0])
    p = tmp_path / "holed.stl"
    trimesh.Trimesh(b.vertices, np.delete(b.faces, low, axis=0), process=False).export(p)

    def run(*a):
        r = subprocess.run([sys.executable, "-m", "meshhydro", *a], capture_output=True, text=True, cwd=ROOT)
        return r.returncode, r.stdout, r.stderr

    code, out, _ = run("check", str(p), "--close-holes")
    assert code == 0 and "closed holes as asked" in out and "1 face(s) added" in out
    case = os.path.join(ROOT, "meshes", "cases", "brindle_barge.toml")
    for args in (("float", case, "--close-holes"), ("float", case, "--x-aft", "1")):
        code, _, err = run(*args)
        assert code == 2 and "case file" in err and "Traceback" not in err

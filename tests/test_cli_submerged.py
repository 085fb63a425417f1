"""The submerged state and the submergence command on the CLI: outputs, notes and errors.

Box 20 m x 6 m x 4 m (forms.box): whole buoyancy 480 m³ x 1.025 = 492 t; KB submerged = D/2 = 2 m,
afloat KM = T/2 + B²/(12T) (box closed form, REFERENCES.md).
"""
from __future__ import annotations

import json
import math

import pytest
import trimesh

from meshhydro.cli import main
from meshhydro.forms import box
from meshhydro.submerged import NOTE


@pytest.fixture(scope="module")
def mesh(tmp_path_factory):
    d = tmp_path_factory.mktemp("sub")
    v, f = box(20.0, 6.0, 4.0)
    trimesh.Trimesh(v, f, process=False).export(d / "box.stl")
    return str(d / "box.stl")


FULL = "492"  # 480 m³ x 1.025 t/m³


def test_float_submerged_text_and_json(mesh, capsys):
    assert main(["float", mesh, "--displacement", FULL, "--cog", "10,0,1.5", "--submerged-depth", "3"]) == 0
    out = capsys.readouterr().out
    assert NOTE in out and "fully submerged" in out
    assert main(["float", mesh, "--displacement", FULL, "--cog", "10,0,1.5", "--format", "json"]) == 0
    eq = json.loads(capsys.readouterr().out)["equilibrium"]
    assert eq["submerged"] is True and eq["hydrostatics"] is None
    assert eq["gmt"] == pytest.approx(2.0 - 1.5, abs=1e-12)  # BM = 0: GM = KB - KG = D/2 - KG
    assert eq["draft"] == pytest.approx(4.0, abs=1e-12)  # default: the deck just under the surface


def test_righting_submerged(mesh, capsys):
    assert main(["righting", mesh, "--displacement", FULL, "--cog", "10,0,1.5", "--heels", "0:180:10",
                 "--format", "json", "--quiet"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["submerged"] is True and d["note"] == NOTE
    for r in d["rows"]:  # GZ = BG sin φ (closed form), BM = 0
        assert r["gz"] == pytest.approx(0.5 * math.sin(math.radians(r["heel"])), abs=1e-12)
        assert r["bm"] == 0.0
    assert d["summary"][0]["vanishing_angle"] == 180.0


def test_submerged_errors(mesh, capsys):
    # heavier than the whole buoyancy: exit 5 with the missing tonnes
    assert main(["float", mesh, "--displacement", "500", "--cog", "10,0,1.5"]) == 5
    assert "8 t of buoyancy missing" in capsys.readouterr().err
    # a depth for a load that floats at the surface is an unused option: exit 2
    assert main(["float", mesh, "--displacement", "100", "--cog", "10,0,1.5", "--submerged-depth", "1"]) == 2
    assert "submerged depth" in capsys.readouterr().err
    assert main(["float", mesh, "--displacement", FULL, "--cog", "10,0,1.5", "--submerged-depth", "-1"]) == 2
    assert "non-negative" in capsys.readouterr().err
    assert main(["submergence", mesh]) == 2
    assert "--drafts" in capsys.readouterr().err


def test_submergence_command(mesh, tmp_path, capsys):
    png = tmp_path / "s.png"
    assert main(["submergence", mesh, "--drafts", "1,2,3,5", "--kg", "2.5", "--plot", str(png),
                 "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    kms = [r["kmt"] for r in d["rows"]]
    assert kms[:3] == pytest.approx([t / 2 + 3.0 / t for t in (1, 2, 3)], rel=1e-12)  # T/2 + B²/(12T)
    assert kms[3] == pytest.approx(2.0, rel=1e-12) and d["rows"][3]["submerged"]  # KM = KB = D/2
    assert d["negative_gm_drafts"] == [5.0]
    assert png.stat().st_size > 1000
    assert main(["submergence", mesh, "--displacements", "123,492"]) == 0
    out = capsys.readouterr().out
    assert "fully submerged from draft 4.0000 m" in out and NOTE in out


def test_criteria_on_submerged_state(mesh, capsys):
    # GZ = 0.5 sin φ: areas 0.5 (cos a - cos b) m·rad (calculus); IMO 2008 limits from REFERENCES.md
    assert main(["criteria", mesh, "--displacement", FULL, "--cog", "10,0,1.5", "--format", "json",
                 "--quiet"]) == 0
    d = json.loads(capsys.readouterr().out)
    att = {r["id"]: r["attained"] for r in d["results"]}
    areas = [r for r in d["results"] if r["id"] == "2.2.1"]  # clause 2.2.1 holds the three area limits
    assert [("30" in a["text"], "40" in a["text"]) for a in areas] == [(True, False), (False, True),
                                                                                 (True, True)]
    assert areas[0]["attained"] == pytest.approx(0.5 * (1 - math.cos(math.radians(30))), rel=1e-5)
    assert areas[2]["attained"] == pytest.approx(0.5 * (math.cos(math.radians(30)) - math.cos(math.radians(40))),
                                                 rel=1e-5)
    assert att["2.2.4"] == pytest.approx(0.5, abs=1e-12)  # GM0 = KB - KG with BM = 0
    assert d["submerged"] is True and d["submerged_note"] == NOTE


def test_cross_curves_at_whole_buoyancy(mesh, capsys):
    # submerged: KN = KB sin φ with B at the box's centre (y = 0, z = D/2 = 2 m)
    assert main(["cross-curves", mesh, "--displacements", "246," + FULL, "--heels", "0:90:30",
                 "--format", "json", "--quiet"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["kn"][1] == pytest.approx([2.0 * math.sin(math.radians(h)) for h in (0, 30, 60, 90)], abs=1e-12)


def test_html_report_of_submergence(mesh):
    from meshhydro import figures
    from meshhydro.html import render_html
    from meshhydro.submergence import submergence_analysis
    from meshhydro.vessel import load_hull

    _, doc = submergence_analysis(load_hull(mesh), drafts=[1.0, 2.0, 3.0, 5.0], density=1.025, kg=2.5)
    html = render_html(doc, draw=figures.draw)
    assert "<svg" in html and "fully submerged from draft 5.0000 m" in html


def test_case_file_submerged_depth(mesh, tmp_path, capsys):
    case = tmp_path / "sub.toml"
    case.write_text(f'[hull]\nmesh = "{mesh}"\n[[condition]]\nname = "dived"\ndisplacement = {FULL}\n'
                    'cog = [10.0, 0.0, 1.5]\nsubmerged_depth = 2.5\n')
    assert main(["float", str(case), "--format", "json"]) == 0
    eq = json.loads(capsys.readouterr().out)["equilibrium"]
    assert eq["draft"] == pytest.approx(4.0 + 2.5, abs=1e-12)  # deck 2.5 m under the surface
    # the command-line option overrides the file's
    assert main(["float", str(case), "--format", "json", "--submerged-depth", "1"]) == 0
    assert json.loads(capsys.readouterr().out)["equilibrium"]["draft"] == pytest.approx(5.0, abs=1e-12)
    case.write_text(f'[hull]\nmesh = "{mesh}"\n[[condition]]\ndisplacement = 100\n'
                    'cog = [10.0, 0.0, 1.5]\nsubmerged_depth = -1\n')
    assert main(["float", str(case)]) == 2
    assert "submerged_depth" in capsys.readouterr().err

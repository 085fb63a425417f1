"""sections / offsets / sweep / compare on the CLI: outputs and one-line errors."""
from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
import trimesh

from meshhydro.cli import main
from meshhydro.forms import box, wigley

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


@pytest.fixture(scope="module")
def wig(tmp_path_factory):
    d = tmp_path_factory.mktemp("w")
    v, f = wigley(10.0, 1.0, 0.625, stations=40, waterlines=16)
    p = d / "wigley.stl"
    trimesh.Trimesh(v, f, process=False).export(p)
    return str(p)


def test_sections_export_and_offsets_roundtrip(wig, tmp_path, capsys):
    off = tmp_path / "off.csv"
    bj = tmp_path / "bj.csv"
    assert main(["sections", wig, "--stations", "8", "--waterlines", "4", "--drafts", "0.625",
                 "--export", str(off), "--bonjean", str(bj), "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    vol = [r for r in d["comparison"] if r["quantity"] == "volume"][0]
    assert abs(vol["percent"]) < 1.0
    assert off.read_text().startswith("station_x,waterline_z,half_breadth")
    stl = tmp_path / "loft.stl"
    assert main(["offsets", str(off), "--loft", str(stl), "--compare", wig, "--format", "json"]) == 0
    r = json.loads(capsys.readouterr().out)
    assert "table_vs_mesh" in r and "lofted_vs_mesh" in r
    assert trimesh.load(stl).is_watertight


def run(*args):
    p = subprocess.run([sys.executable, "-m", "meshhydro", *args], capture_output=True, text=True, cwd=ROOT)
    return p.returncode, p.stdout, p.stderr


def test_bad_offsets_table_one_line(tmp_path):
    p = tmp_path / "bad.csv"
    p.write_text("station_x,waterline_z,half_breadth\n0,0,1\n0,1,oops\n")
    stl = tmp_path / "never.stl"
    code, out, err = run("offsets", str(p), "--loft", str(stl))
    assert code == 2 and "row 3, column half_breadth" in err and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1 and not stl.exists()


def test_sweep_and_compare_cli(tmp_path):
    v, f = box(12.0, 4.0, 2.0)
    trimesh.Trimesh(v, f, process=False).export(tmp_path / "b.stl")
    (tmp_path / "b.toml").write_text('[hull]\nmesh = "b.stl"\n[[condition]]\nname = "a"\ndisplacement = 30.0\n'
                                     'cog = [6.0, 0.0, 1.0]\n[[condition]]\nname = "high"\ndisplacement = 30.0\n'
                                     'cog = [6.0, 0.0, 1.4]\n')
    out = tmp_path / "sw"
    code, so, err = run("sweep", str(tmp_path / "b.toml"), "--heels", "0:20:10", "--out", str(out), "--sheet",
                        "--size", "200x150", "--quiet")
    assert code == 0, err
    assert sorted(os.listdir(out / "frames")) and (out / "sheet.png").exists() and (out / "section.png").exists()
    code, so, err = run("compare", f"{tmp_path / 'b.toml'}@a", f"{tmp_path / 'b.toml'}@high", "--heels", "0:30:10",
                        "--out", str(tmp_path / "c.png"))
    assert code == 0, err
    assert (tmp_path / "c.png").stat().st_size > 5000
    code, so, err = run("sweep", str(tmp_path / "b.toml"), "--out", str(out), "--size", "big")
    assert code == 2 and "--size" in err


def test_sections_of_a_catamaran_per_body(capsys):
    # two demihulls: the estimate is made per body about its own centreline (never a filled tunnel), so the
    # total is close to the exact volume of the mesh and the per-body volumes add up to it
    cat = os.path.join(ROOT, "meshes", "twinfin_cat.stl")
    assert main(["sections", cat, "--stations", "10", "--waterlines", "8", "--drafts", "0.5", "--format",
                 "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    vol = [r for r in d["comparison"] if r["quantity"] == "volume"][0]
    assert abs(vol["percent"]) < 1.0
    bodies = d["bodies"]
    assert sorted(b["body"] for b in bodies) == [0, 1]
    assert sum(b["volume"] for b in bodies) == pytest.approx(vol["estimate"], rel=1e-12)
    assert d["meta"]["density"] == 1.025 and d["meta"]["units"]["draft"] == "m"
    assert main(["sections", cat, "--stations", "10", "--waterlines", "8", "--drafts", "0.5"]) == 0
    assert "per body (each about its own centreline):" in capsys.readouterr().out

"""Stability commands on the CLI: case files, quick checks, outputs and errors."""
from __future__ import annotations

import json
import math
import os
import subprocess
import sys

import pytest
import trimesh

from meshhydro.cli import main
from meshhydro.forms import box
from meshhydro.loading import read_case

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    d = tmp_path_factory.mktemp("case")
    v, f = box(20.0, 6.0, 4.0)
    trimesh.Trimesh(v, f, process=False).export(d / "box.stl")
    (d / "box.toml").write_text("""
[hull]
mesh = "box.stl"
[water]
density = 1.025
[[opening]]
name = "vent"
at = [10.0, -3.0, 3.5]
[[condition]]
name = "loaded"
items = [ { name = "ship", mass = 150.0, at = [10.0, 0.0, 2.0] },
          { name = "tank", mass = 34.5, at = [10.0, 0.0, 1.0], fsm = 6.0 } ]
[[condition]]
name = "light"
displacement = 100.0
cog = [10.0, 0.0, 1.5]
""")
    return str(d / "box.toml")


def test_case_totals(case):
    c = read_case(case)
    cond = c.condition("loaded")
    # totals: Σm, Σm·z/Σm, and KG fluid = KG + FSM/Δ (textbook virtual rise)
    assert cond.displacement == pytest.approx(184.5)
    assert cond.kg == pytest.approx((150 * 2 + 34.5) / 184.5)
    assert cond.kg_fluid == pytest.approx(cond.kg + 6.0 / 184.5)
    assert c.openings[0].name == "vent"


def test_float_json(case, capsys):
    assert main(["float", case, "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    eq = d["equilibrium"]
    assert eq["draft"] == pytest.approx(184.5 / 1.025 / 120.0, rel=1e-9)
    assert abs(eq["heel"]) < 1e-9 and eq["stable"] is True
    assert "not an approval" in d["caution"]


def test_righting_csv_and_plot(case, tmp_path, capsys):
    png = tmp_path / "gz.png"
    assert main(["righting", case, "--condition", "light", "--heels", "0:60:5", "--format", "csv",
                 "--plot", str(png)]) == 0
    out = capsys.readouterr().out.strip().splitlines()
    lines = [x for x in out if not x.startswith("#")]
    assert lines[0].startswith("heel,gz,kn") and len(lines) == 14  # symmetric: one side only
    assert out[-1].startswith("# CAUTION:")
    assert png.stat().st_size > 10000


def test_quick_check_and_both_sides(tmp_path, capsys):
    v, f = box(20.0, 6.0, 4.0)
    p = tmp_path / "b.stl"
    trimesh.Trimesh(v, f, process=False).export(p)
    assert main(["righting", str(p), "--displacement", "150", "--cog", "10,0.2,2", "--heels", "0:30:10",
                 "--format", "json", "--opening", "door=10,-3,3.5"]) == 0
    d = json.loads(capsys.readouterr().out)
    heels = [r["heel"] for r in d["rows"]]
    assert heels == [-30, -20, -10, 0, 10, 20, 30]  # off-centre G: both directions
    assert {s["side"] for s in d["summary"]} == {"starboard", "port"}


# Box 20 x 6 x 4 m, condition "light": Δ 100 t at KG 1.5 m in water of 1.025 t/m³.
# Textbook box closed forms: T = Δ / (ρ L B), KB = T / 2, BM = B² / (12 T), GM = KB + BM - KG;
# wall-sided GZ = sin φ (GM + BM tan² φ / 2) while the deck edge and the bilge stay wall-sided.
LIGHT_T = 100.0 / 1.025 / 120.0
LIGHT_BM = 36.0 / (12.0 * LIGHT_T)
LIGHT_GM = LIGHT_T / 2 + LIGHT_BM - 1.5


def _gm_set(tmp_path, minimum):
    p = tmp_path / f"gm_{minimum:.4f}.toml"
    p.write_text(f'name = "GM only"\n[[criterion]]\nid = "GM"\nkind = "gm"\nminimum = {minimum!r}\n'
                 f'[[criterion]]\nid = "GZ10"\nkind = "gz_at"\nangle = 10.0\nminimum = 0.0\n')
    return str(p)


def test_criteria_exit_code_and_text(case, capsys, tmp_path):
    # a minimum just below the closed-form GM is met (exit 0), just above it is not (exit 1)
    code = main(["criteria", case, "--condition", "light", "--heels", "0:40:1", "--set", _gm_set(tmp_path, LIGHT_GM - 0.01)])
    out = capsys.readouterr().out
    assert code == 0 and "verdict: all criteria met" in out and "not an approval" in out
    code = main(["criteria", case, "--condition", "light", "--heels", "0:40:1", "--format", "json",
                 "--set", _gm_set(tmp_path, LIGHT_GM + 0.01)])
    d = json.loads(capsys.readouterr().out)
    assert code == 1 and d["passed"] is False
    res = {r["id"]: r for r in d["results"]}
    assert res["GM"]["attained"] == pytest.approx(LIGHT_GM, rel=1e-6) and res["GM"]["passed"] is False
    phi = math.radians(10.0)
    wall = math.sin(phi) * (LIGHT_GM + 0.5 * LIGHT_BM * math.tan(phi) ** 2)
    assert res["GZ10"]["attained"] == pytest.approx(wall, rel=1e-6) and res["GZ10"]["passed"] is True


def test_cross_curves_json(case, capsys):
    assert main(["cross-curves", case, "--displacements", "100:200:50", "--heels", "0:30:15", "--format", "json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert len(d["kn"]) == 3 and len(d["kn"][0]) == 3
    # G at K (KG = 0): KN(0°) = 0, and while the box is wall-sided (bilge still immersed at 15°
    # for T ≥ 0.81 m: tan 15° < T / (B / 2)) the wall-sided formula with GM = KB + BM (textbook)
    phi = math.radians(15.0)
    for disp, row in zip((100.0, 150.0, 200.0), d["kn"], strict=True):
        t = disp / 1.025 / 120.0
        bm = 36.0 / (12.0 * t)
        assert abs(row[0]) < 1e-12
        assert row[1] == pytest.approx(math.sin(phi) * (t / 2 + bm + 0.5 * bm * math.tan(phi) ** 2), rel=1e-9)


def run(*args):
    r = subprocess.run([sys.executable, "-m", "meshhydro", *args], capture_output=True, text=True, cwd=ROOT)
    return r.returncode, r.stdout, r.stderr


@pytest.mark.parametrize("args,needle", [
    (["float", "MESH", "--displacement", "1e6", "--cog", "10,0,2"], "at most"),
    (["float", "MESH"], "--displacement"),
    (["float", "MESH", "--displacement", "100", "--cog", "10,0"], "three numbers"),
    (["righting", "MESH", "--displacement", "100", "--cog", "10,0,2", "--heels", "0:200:10"], "180"),
    (["criteria", "MESH", "--displacement", "100", "--cog", "10,0,2", "--set", "nosuch.toml"], "no such"),
])
def test_stability_errors_one_line(args, needle, tmp_path):
    v, f = box(20.0, 6.0, 4.0)
    p = tmp_path / "b.stl"
    trimesh.Trimesh(v, f, process=False).export(p)
    args = [str(p) if a == "MESH" else a for a in args]
    code, out, err = run(*args)
    assert code not in (0, 1)
    lines = [ln for ln in err.strip().splitlines() if ln]
    assert len(lines) == 1 and needle in lines[0] and "Traceback" not in err


def test_bad_case_file(tmp_path):
    p = tmp_path / "c.toml"
    p.write_text('[hull]\nmesh = "x.stl"\n[[condition]]\nname = "a"\nitems = [ { name = "m", mass = "heavy", at = [0,0,0] } ]\n')
    code, out, err = run("float", str(p))
    assert code == 2 and "[condition 1] items[1].mass: must be a number" in err and len(err.strip().splitlines()) == 1

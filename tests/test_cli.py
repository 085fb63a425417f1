"""CLI behaviour: outputs parse, errors are one line with a non-zero exit and no traceback."""
from __future__ import annotations

import json
import os
import subprocess
import sys

import numpy as np
import pytest
import trimesh

from meshhydro.cli import main
from meshhydro.forms import box

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


@pytest.fixture(scope="module")
def box_stl(tmp_path_factory):
    d = tmp_path_factory.mktemp("m")
    v, f = box(20.0, 6.0, 4.0)
    p = d / "box.stl"
    trimesh.Trimesh(v, f, process=False).export(p)
    return str(p)


def run(*args):
    r = subprocess.run([sys.executable, "-m", "meshhydro", *args], capture_output=True, text=True, cwd=ROOT)
    return r.returncode, r.stdout, r.stderr


def test_table_json_matches_api_keys(box_stl, tmp_path, capsys):
    out = tmp_path / "t.json"
    assert main(["table", box_stl, "--drafts", "1:3:1", "--format", "json", "--out", str(out)]) == 0
    doc = json.loads(out.read_text())
    rows = doc["rows"]
    assert [r["draft"] for r in rows] == [1.0, 2.0, 3.0]
    # the meta block says what the numbers are: vessel, density, units
    assert doc["meta"]["density"] == 1.025 and doc["meta"]["vessel"].endswith("box.stl")
    assert doc["meta"]["units"]["draft"] == "m" and doc["meta"]["units"]["displacement"] == "t"
    # box closed form BMt = B²/12T (textbook)
    assert rows[1]["bmt"] == pytest.approx(36 / 24)
    for k in "draft volume displacement lcb tcb vcb awp lcf tcf tpc mct bmt bml kmt kml cb cp cm cwp wsa lwl bwl".split():
        assert k in rows[0]


def test_table_text_csv_and_plot(box_stl, tmp_path, capsys):
    assert main(["table", box_stl, "--drafts", "0.5,1.5", "--water", "fresh"]) == 0
    text = capsys.readouterr().out
    assert "[t/cm]" in text and "displacement" in text
    assert main(["table", box_stl, "--drafts", "1:2:0.5", "--format", "csv", "--plot", str(tmp_path / "c.png")]) == 0
    lines = [x for x in capsys.readouterr().out.strip().splitlines() if not x.startswith("#")]  # the caution
    assert lines[0].startswith("draft,") and len(lines) == 4
    assert (tmp_path / "c.png").stat().st_size > 10000


def test_check_json_and_exit_codes(box_stl, tmp_path):
    code, out, err = run("check", box_stl, "--format", "json")
    assert code == 0 and json.loads(out)["usable"] is True
    v, f = box(10, 4, 2)
    bad = tmp_path / "inside_out.stl"
    trimesh.Trimesh(v, f[:, ::-1], process=False).export(bad)
    code, out, err = run("check", str(bad))
    assert code == 3 and "inside out" in err and "Traceback" not in err


@pytest.mark.parametrize("case", ["missing", "junk", "empty", "nan", "open", "range"])
def test_bad_input_one_line_no_traceback(case, box_stl, tmp_path):
    if case == "missing":
        args = ["table", str(tmp_path / "nope.stl"), "--drafts", "1:2:1"]
    elif case == "junk":
        p = tmp_path / "junk.stl"
        p.write_bytes(b"\x00garbage" * 10)
        args = ["table", str(p), "--drafts", "1:2:1"]
    elif case == "empty":
        p = tmp_path / "empty.obj"
        p.write_text("")
        args = ["check", str(p)]
    elif case == "nan":
        p = tmp_path / "nan.obj"
        p.write_text("v 0 0 0\nv 1 0 0\nv 0 inf 0\nv 0 0 1\nf 1 2 3\nf 1 2 4\nf 1 3 4\nf 2 3 4\n")
        args = ["table", str(p), "--drafts", "0.1:0.2:0.1"]
    elif case == "open":
        v, f = box(10, 4, 2)
        top = np.all(v[f][:, :, 2] == 2.0, axis=1)
        p = tmp_path / "open.stl"
        trimesh.Trimesh(v, f[~top], process=False).export(p)
        args = ["table", str(p), "--drafts", "2.5:3:0.5"]  # every draft above the rim (rows below it are given)
    else:
        args = ["table", box_stl, "--drafts", "3:1:0.5"]
    out = tmp_path / "never.json"
    code, so, err = run(*args, "--out", str(out)) if case != "empty" else run(*args)
    assert code != 0
    # the mesh's health warnings may come first (an open mesh says so); then one error line
    lines = [ln for ln in err.strip().splitlines() if ln and not ln.startswith("meshhydro: warning: ")]
    assert len(lines) == 1 and lines[0].startswith("meshhydro: error") and "Traceback" not in err
    assert not out.exists()  # nothing half-written
    if case == "open":
        assert "open rim" in err and "meshhydro: warning: the mesh is open" in err

"""Output files (whole or not at all, mode by umask, format by suffix, temporaries cleaned) and numbers.

File modes follow POSIX: a new file created with mode 0o666 gets 0o666 & ~umask (open(2), umask(2)).
File signatures: PNG starts with 89 50 4E 47 0D 0A 1A 0A (PNG spec, 5.2), PDF with "%PDF-" (ISO 32000-1,
7.5.2), GIF with "GIF89a"/"GIF87a" (GIF89a spec), SVG is XML with an <svg> root (SVG 1.1).
Float facts: 0.1 + 0.2 and 0.39999999999999997 are IEEE 754 doubles next to 0.3 and 0.4 (Python tutorial,
"Floating Point Arithmetic").
"""
from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import textwrap

import pytest

from meshhydro.errors import InputError
from meshhydro.output import (atomic_dir, format_column, key_values, remove_stale, save_atomic, save_figure,
                              text_table, to_csv, to_json, write_atomic)

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _hidden(folder) -> list[str]:
    return sorted(n for n in os.listdir(folder) if n.startswith("."))


@pytest.fixture
def umask():
    old = os.umask(0o022)
    os.umask(old)

    def set_(m: int) -> None:
        os.umask(m)
    yield set_
    os.umask(old)


# ---------------------------------------------------------------- modes

@pytest.mark.parametrize("mask, mode", [(0o022, 0o644), (0o027, 0o640), (0o077, 0o600)])
def test_new_file_mode_follows_umask(tmp_path, umask, mask, mode):
    umask(mask)
    p = tmp_path / "out.txt"
    write_atomic(str(p), "x\n")
    assert os.stat(p).st_mode & 0o777 == mode


def test_replaced_file_keeps_its_mode(tmp_path, umask):
    umask(0o022)
    p = tmp_path / "out.txt"
    p.write_text("old")
    os.chmod(p, 0o600)
    write_atomic(str(p), "new")
    assert p.read_text() == "new" and os.stat(p).st_mode & 0o777 == 0o600


def test_save_atomic_mode_follows_umask(tmp_path, umask):
    umask(0o022)
    p = tmp_path / "mesh.stl"
    save_atomic(str(p), lambda t: open(t, "w").write("solid x\nendsolid x\n"))
    assert os.stat(p).st_mode & 0o777 == 0o644


# ---------------------------------------------------------------- figures by suffix

@pytest.fixture(scope="module")
def fig():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    f, ax = plt.subplots(figsize=(2, 2))
    ax.plot([0, 1], [0, 1])
    yield f
    plt.close(f)


@pytest.mark.parametrize("name, head", [("a.png", b"\x89PNG\r\n\x1a\n"), ("a.pdf", b"%PDF-"), ("A.PDF", b"%PDF-")])
def test_figure_format_follows_suffix(tmp_path, fig, name, head):
    p = tmp_path / name
    save_figure(str(p), fig)
    assert p.read_bytes().startswith(head)


def test_svg_figure_is_svg(tmp_path, fig):
    p = tmp_path / "a.svg"
    save_figure(str(p), fig)
    text = p.read_text()
    assert text.startswith("<?xml") and "<svg" in text and "PNG" not in text[:200]


@pytest.mark.parametrize("name", ["gz.jpg", "x.gif", "noext"])
def test_other_suffixes_refused_and_nothing_written(tmp_path, fig, name):
    p = tmp_path / name
    with pytest.raises(InputError) as exc:
        save_figure(str(p), fig)
    assert str(exc.value).startswith(str(p)) and str(exc.value).endswith("use .png, .svg, .pdf")
    assert os.listdir(tmp_path) == []


def test_gif_where_the_caller_allows_it(tmp_path, fig):
    p = tmp_path / "still.gif"
    save_figure(str(p), fig, allowed=("png", "gif"))
    assert p.read_bytes()[:6] in (b"GIF89a", b"GIF87a")


# ---------------------------------------------------------------- whole or not at all; errors name the target

def test_failing_writer_keeps_old_file_and_leaves_nothing(tmp_path):
    p = tmp_path / "table.csv"
    p.write_text("old")

    def boom(t: str) -> None:
        open(t, "w").write("half")
        raise RuntimeError("writer failed")
    with pytest.raises(RuntimeError):
        save_atomic(str(p), boom)
    assert p.read_text() == "old" and _hidden(tmp_path) == []


def test_writer_os_error_names_the_target_not_the_temporary(tmp_path):
    p = tmp_path / "plot.png"

    def full(t: str) -> None:
        raise OSError(28, "No space left on device", t)
    with pytest.raises(InputError) as exc:
        save_atomic(str(p), full)
    assert str(exc.value) == f"{p}: cannot be written (No space left on device)"
    assert ".part" not in str(exc.value) and _hidden(tmp_path) == []


def test_missing_folder_names_the_target(tmp_path):
    p = tmp_path / "nope" / "out.txt"
    with pytest.raises(InputError, match=r"out\.txt: the folder .*nope does not exist"):
        write_atomic(str(p), "x")


# ---------------------------------------------------------------- temporaries

def _dead_pid() -> int:
    proc = subprocess.Popen([sys.executable, "-c", "pass"])
    proc.wait()
    return proc.pid


def test_stale_temporaries_of_a_killed_run_are_removed(tmp_path):
    p = tmp_path / "out.txt"
    dead = _dead_pid()
    stale_file = tmp_path / f".out.txt.{dead}-abc123.part"
    stale_file.write_text("half")
    stale_png = tmp_path / f".out.txt.{dead}-def456.part.png"
    stale_png.write_text("half")
    stale_dir = tmp_path / f".out.txt.{dead}-ghi789.part"
    stale_dir.mkdir()
    (stale_dir / "frame.png").write_text("x")
    live = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(60)"])
    try:
        alive = tmp_path / f".out.txt.{live.pid}-jkl000.part"
        alive.write_text("another run is writing")
        other = tmp_path / f".other.txt.{dead}-abc.part"
        other.write_text("not ours to touch")
        write_atomic(str(p), "new")
        assert p.read_text() == "new"
        assert _hidden(tmp_path) == sorted([alive.name, other.name])
    finally:
        live.kill()
        live.wait()


def test_remove_stale_reports_what_it_removed(tmp_path):
    dead = _dead_pid()
    s = tmp_path / f".a.csv.{dead}-x.part"
    s.write_text("")
    assert remove_stale(str(tmp_path / "a.csv")) == [str(s)]


_CHILD = textwrap.dedent("""
    import sys, time
    sys.path.insert(0, {root!r})
    from meshhydro.output import save_atomic, atomic_dir
    def slow(tmp):
        open(tmp, "w").write("half")
        print("ready", flush=True)
        time.sleep(60)
    if {use_dir!r}:
        with atomic_dir({target!r}) as d:
            print("ready", flush=True)
            time.sleep(60)
    else:
        save_atomic({target!r}, slow)
""")


@pytest.mark.parametrize("sig, use_dir", [(signal.SIGTERM, False), (signal.SIGINT, False), (signal.SIGTERM, True)])
def test_temporaries_removed_on_signal(tmp_path, sig, use_dir):
    target = str(tmp_path / ("sweep" if use_dir else "gz.png"))
    code = _CHILD.format(root=ROOT, target=target, use_dir=use_dir)
    proc = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    try:
        assert proc.stdout.readline().strip() == b"ready"
        assert len(_hidden(tmp_path)) == 1
        proc.send_signal(sig)
        proc.wait(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert proc.returncode != 0
    assert os.listdir(tmp_path) == []


def test_atomic_dir_replaces_the_folder_whole(tmp_path):
    out = tmp_path / "sweep"
    out.mkdir()
    (out / "old.png").write_text("old")
    with atomic_dir(str(out)) as d:
        open(os.path.join(d, "new.png"), "w").write("new")
    assert os.listdir(out) == ["new.png"] and _hidden(tmp_path) == []
    with pytest.raises(RuntimeError):
        with atomic_dir(str(out)) as d:
            open(os.path.join(d, "half.png"), "w").write("x")
            raise RuntimeError("render failed")
    assert os.listdir(out) == ["new.png"] and _hidden(tmp_path) == []


# ---------------------------------------------------------------- numbers in text

def _cells(table: str, col: int, head: int = 2) -> list[str]:
    return [ln.split()[col] for ln in table.splitlines()[head:]]


def test_rows_that_differ_in_the_fourth_decimal_print_apart():
    t = text_table([{"gm": 0.7999}, {"gm": 0.8}, {"gm": 0.8001}], ["gm"], {"gm": "m"}, 3)
    assert _cells(t, 0) == ["0.7999", "0.8000", "0.8001"]


def test_float_noise_adds_no_digits():
    # 0.1 + 0.2 differs from 0.3 only in the 17th significant digit
    assert format_column([0.1 + 0.2, 0.3, 0.5], 3) == ["0.300", "0.300", "0.500"]


def test_digits_grow_to_the_difference_and_stop_at_noise():
    assert format_column([1.0, 1.0 + 3e-5], 3) == ["1.00000", "1.00003"]
    assert format_column([1.0, 1.0 + 3e-7], 3) == ["1.000", "1.000"]  # below 1e-5 of the column: noise
    assert format_column([100.0, 100.0 + 3e-4], 3, max_digits=3) == ["100.000", "100.000"]  # capped


def test_only_adjacent_rows_are_separated():
    # symmetric rows far apart in a table (port and starboard) may print alike
    assert format_column([0.8123, 0.9, 0.81231], 3) == ["0.812", "0.900", "0.812"]


def test_no_exponent_inside_a_fixed_point_column():
    cells = format_column([6.637e-05, 0.5, 1.25], 3)
    assert all("e" not in c for c in cells) and cells[1:] == ["0.500", "1.250"]


def test_a_flagged_column_is_in_exponent_form_throughout():
    cells = format_column([4.7e-11, 1.2e-12, 0.0], 4, exponent=True)
    assert cells == ["4.70e-11", "1.20e-12", "0.00e+00"]
    t = text_table([{"r": 4.7e-11, "x": 1.0}, {"r": 0.0125, "x": 2.0}], ["r", "x"], exponent=["r"])
    assert _cells(t, 0, 1) == ["4.70e-11", "1.25e-02"] and _cells(t, 1, 1) == ["1.000", "2.000"]


def test_rounding_noise_in_a_zero_column_prints_as_zero():
    # a transverse centre of a symmetric form: zero, with rounding noise near 1e-16
    assert format_column([2.44e-16, -2.62e-17, 0.0], 3) == ["0.000", "0.000", "0.000"]


def test_small_values_get_the_decimals_that_show_them():
    assert format_column([6.6e-05, 1.0e-05], 3) == ["0.0001", "0.0000"]
    assert format_column([6.6e-05, 6.0e-05], 3) == ["0.00007", "0.00006"]


def test_no_negative_zero_and_blanks():
    cells = format_column([-0.0, -1e-9, None, float("nan"), 2.0], 3)
    assert cells == ["0.000", "0.000", "-", "-", "2.000"]


def test_key_values_fixed_point():
    out = key_values([("gm", 6.637e-05, "m"), ("displacement", 1234567.0, "t")], 4)
    assert out == "gm            0.0001 m\ndisplacement  1234567.0000 t\n"


# ---------------------------------------------------------------- CSV and JSON

def test_csv_drops_binary_noise():
    out = to_csv([{"a": 0.39999999999999997, "b": 0.1 + 0.2, "c": -0.0, "n": 3, "s": "x"}], ["a", "b", "c", "n", "s"])
    assert out == "a,b,c,n,s\n0.4,0.3,0.0,3,x\n"


def test_csv_rounds_lengths_to_a_micrometre():
    out = to_csv([{"draft": 1.23456789, "heel": 10.0000001}], ["draft", "heel"], units={"draft": "m"})
    assert out.splitlines()[1] == "1.234568,10.0000001"


def test_csv_explicit_decimals_and_lists():
    out = to_csv([{"at": [0.12345, 1.0 / 3.0]}], ["at"], decimals=2)
    assert out.splitlines()[1] == "0.12 0.33"


def test_csv_non_finite_is_blank():
    assert to_csv([{"a": float("inf"), "b": None}], ["a", "b"]).splitlines()[1] == ","


def test_json_keeps_full_precision():
    v = 0.39999999999999997
    assert json.loads(to_json({"v": v}))["v"] == v
    assert json.loads(to_json({"v": float("nan")}))["v"] is None


def test_plots_follow_the_suffix(tmp_path):
    from meshhydro import figures

    keys = ["draft", "displacement", "volume", "vcb", "kmt", "bmt", "bml", "kml", "lcb", "lcf", "awp", "wsa", "tpc",
            "mct", "cb", "cp", "cm", "cwp"]
    rows = [{k: 1.0 + 0.1 * i + 0.01 * j for j, k in enumerate(keys)} for i in range(3)]
    data = {"vessel": "box", "rows": rows}
    figures.hydrostatic_curves(data, path=str(tmp_path / "h.svg"))
    figures.hydrostatic_curves(data, path=str(tmp_path / "h.pdf"))
    assert "<svg" in (tmp_path / "h.svg").read_text()
    assert (tmp_path / "h.pdf").read_bytes().startswith(b"%PDF-")
    with pytest.raises(InputError, match=r"h\.jpg: cannot write a figure with suffix \.jpg; use \.png, \.svg, \.pdf"):
        figures.hydrostatic_curves(data, path=str(tmp_path / "h.jpg"))
    assert sorted(os.listdir(tmp_path)) == ["h.pdf", "h.svg"]


def test_csv_never_in_exponent_form():
    # a fixed-point CSV column reads the same in every spreadsheet; "6.637e-05" did not
    assert to_csv([{"a": 6.637e-05, "b": 1e-06}], ["a", "b"], units={"b": "m"}).splitlines()[1] == "0.00006637,0.000001"

"""Heel sweep: B trace and metacentre locus against closed forms; rendered images checked as pictures."""
from __future__ import annotations

import json
import math
import os

import numpy as np
import pytest
from PIL import Image

from meshhydro import InputError, load_hull
from meshhydro.forms import box, cylinder
from meshhydro.frames import up_vector
from meshhydro.sweep import heel_trace, write_sweep

from conftest import tm

RHO = 1.025


def test_box_b_trace_is_the_textbook_parabola(box_hull):
    # Wall-sided box: B shifts (B²/12T) tan φ transversely and rises (B²/24T) tan² φ above KB,
    # and the pro-metacentre is BM_φ = B²/(12 T cos³ φ) from B (Rawson & Tupper; Barrass & Derrett).
    B, T = 6.0, 1.5
    heels = np.arange(0.0, 26.0, 5.0)  # bilge emerges at 26.6°
    tr = heel_trace(box_hull, RHO * 20 * B * T, (10.0, 0.0, 2.0), heels)
    t = np.tan(np.radians(heels))
    assert np.allclose(tr.cob[:, 1], -(B * B / (12 * T)) * t, atol=1e-10)  # towards starboard (-y)
    assert np.allclose(tr.cob[:, 2], T / 2 + (B * B / (24 * T)) * t * t, atol=1e-10)
    bm = B * B / (12 * T * np.cos(np.radians(heels)) ** 3)
    assert np.allclose(tr.bm, bm, rtol=1e-10)
    assert np.allclose(np.linalg.norm(tr.metacentre - tr.cob, axis=1), bm, rtol=1e-10)


def test_cylinder_metacentre_locus_is_the_axis():
    # a circular cylinder's waterplane is the same at every heel: M stays on the axis (geometry)
    R = 1.0
    hull = load_hull(tm(*cylinder(8.0, R, segments=256)))
    vol = 0.4 * math.pi * R * R * 8.0
    tr = heel_trace(hull, RHO * vol, (4.0, 0.0, 0.7), np.arange(0.0, 91.0, 15.0))
    axis = np.array([R * 0, 0.0, R])
    d = np.linalg.norm(tr.metacentre[:, 1:] - axis[1:], axis=1)
    assert np.all(d < 2e-3 * R)  # faceting error of a 256-sided polygon, O(h²)
    # and B moves on a circle about the axis
    rb = np.linalg.norm(tr.cob[:, 1:] - axis[1:], axis=1)
    assert np.ptp(rb) < 1e-3 * R


def test_fully_submerged_body_b_does_not_move():
    # no waterplane: B is the centroid of the body whatever the heel (geometry)
    v, f = box(4.0, 1.0, 1.0)
    hull = load_hull(tm(v, f))
    ref = hull.total_centroid
    for h in np.arange(0.0, 181.0, 15.0):
        n = up_vector(h, 3.0)
        c = hull.cut(ref + 5.0 * n, n)
        assert c.waterplane_area == 0.0
        assert c.volume == pytest.approx(hull.total_volume, rel=1e-13)
        assert np.allclose(c.centroid, ref, atol=1e-12)


def _colour_fractions(path):
    a = np.asarray(Image.open(path).convert("RGB")).astype(int)
    r, g, b = a[..., 0], a[..., 1], a[..., 2]
    water = (b > r + 15) & (b > g - 5)
    hull_above = (abs(r - g) < 25) & (r > 120) & (b < r - 8) & (r < 235)
    hull_below = (r > g + 40) & (r > b + 40)
    return a, water.mean(), hull_above.mean(), hull_below.mean()


@pytest.fixture(scope="module")
def rendered(tmp_path_factory):
    v, f = box(12.0, 4.0, 2.0)
    hull = load_hull(tm(v, f))
    tr = heel_trace(hull, RHO * 12 * 4 * 0.8, (6.0, 0.0, 1.0), [0.0, 20.0, 40.0])
    out = tmp_path_factory.mktemp("s") / "sweep"
    written = write_sweep(hull, tr, str(out), view="both", size=(320, 240), sheet=True, gif=True)
    return hull, tr, out, written


def test_frames_are_pictures_of_the_right_size_and_colours(rendered):
    hull, tr, out, written = rendered
    frames = sorted(p for p in written if p.startswith("frames"))
    assert len(frames) == 3
    imgs = []
    for p in frames:
        im = Image.open(out / p)
        assert im.size == (320, 240)
        a, water, above, below = _colour_fractions(out / p)
        assert a.std() > 10  # not blank
        assert 0.03 < water < 0.8, water
        assert 0.01 < above < 0.7, above
        assert 0.002 < below < 0.5, below
        imgs.append(a)
    assert np.abs(imgs[0] - imgs[2]).mean() > 2  # two heel angles give different images
    sheet = Image.open(out / "sheet.png")
    assert sheet.size[0] >= 320 and sheet.size[1] >= 240
    gif = Image.open(out / "sweep.gif")
    assert gif.n_frames >= 3


def test_trace_json_and_clean_rerun(rendered, tmp_path):
    hull, tr, out, written = rendered
    d = json.loads((out / "trace.json").read_text())
    assert [a["heel"] for a in d["angles"]] == [0.0, 20.0, 40.0]
    # wall-sided box (bilge emerges only past atan(T / (B/2)) = 21.8°): B at 20° in the hull frame is
    # y = -B² tan φ / (12 T) (towards starboard), z = T/2 + B² tan² φ / (24 T) (textbook B-trace parabola)
    t = math.tan(math.radians(20.0))
    assert np.allclose(d["angles"][1]["B"], [6.0, -16.0 * t / (12 * 0.8), 0.4 + 16.0 * t * t / (24 * 0.8)],
                       atol=1e-9)
    # re-running replaces the folder whole: old frames vanish
    write_sweep(hull, tr, str(out), view="section", size=(320, 240))
    assert sorted(os.listdir(out)) == sorted([".meshhydro-sweep", "section.png", "trace.json"])
    # a folder that holds other files is not touched
    other = tmp_path / "mine"
    other.mkdir()
    (other / "keep.txt").write_text("x")
    with pytest.raises(InputError, match="not empty"):
        write_sweep(hull, tr, str(other), view="section")
    assert (other / "keep.txt").exists()


def test_a_failed_sweep_leaves_no_temporary_folder(box_hull, tmp_path, monkeypatch):
    # the sweep is built in a hidden folder beside the target (output.atomic_dir); a failure removes it
    from meshhydro import figures

    tr = heel_trace(box_hull, 1.025 * 180, (10.0, 0.0, 2.0), [0.0, 10.0])

    def broken(*a, **k):
        raise RuntimeError("drawing failed")

    monkeypatch.setattr(figures, "section_plot", broken)
    with pytest.raises(RuntimeError, match="drawing failed"):
        write_sweep(box_hull, tr, str(tmp_path / "review"), view="section")
    assert os.listdir(tmp_path) == []


def test_splitting_faces_between_the_coloured_parts_leaves_every_pixel():
    # the split hands each part (below / above water) only the faces near its side; the renderer's
    # clipping plane does the cut either way, so the pictures with and without it must be identical
    from meshhydro.render import Scene

    v, f = cylinder(10.0, 1.5, segments=96)
    hull = load_hull(tm(v, f))
    tr = heel_trace(hull, RHO * 0.45 * math.pi * 1.5 ** 2 * 10.0, (5.0, 0.0, 1.2), [0.0, 15.0, 35.0, 70.0])
    pictures = {}
    for split in (True, False):
        scene = Scene(hull, tr, size=(320, 240), split=split)
        try:
            pictures[split] = [scene.render(k) for k in range(len(tr.heel))]
        finally:
            scene.close()
    for a, b in zip(pictures[True], pictures[False]):
        assert a.shape == (240, 320, 3) and a.dtype == np.uint8
        assert np.array_equal(a, b)
    assert not np.array_equal(pictures[True][0], pictures[True][3])  # the heel shows


def test_smooth_edges_blend_only_along_edges(box_hull):
    # anti-aliasing (multisampling) changes pixels where colours meet, not the picture: the two renderings
    # differ in few pixels, and the smooth one has intermediate colours the plain one lacks (common practice)
    from meshhydro.render import Scene

    tr = heel_trace(box_hull, RHO * 20 * 6 * 1.5, (10.0, 0.0, 2.0), [20.0])
    out = {}
    for smooth in (False, True):
        scene = Scene(box_hull, tr, size=(320, 240), smooth=smooth)
        try:
            out[smooth] = scene.render(0).astype(int)
        finally:
            scene.close()
    changed = np.abs(out[True] - out[False]).sum(axis=-1) > 0
    assert 0 < changed.mean() < 0.1
    colours = {smooth: len(np.unique(a.reshape(-1, 3), axis=0)) for smooth, a in out.items()}
    assert colours[True] > colours[False]


def test_contact_sheet_and_gif_from_frames():
    from meshhydro.frame_files import gif_bytes, png_bytes, quantized, sheet_array

    rng = np.random.default_rng(3)
    frames = [np.full((30, 40, 3), 40 * k, dtype=np.uint8) for k in range(5)]
    frames[2] = rng.integers(0, 255, (30, 40, 3), dtype=np.uint8)
    sheet = sheet_array(frames, pad=6)
    # 5 frames of 40x30: ceil(sqrt(5 * 30 / 40)) = 2 columns, 3 rows, 6 px of white around each
    assert sheet.shape == (3 * 30 + 4 * 6, 2 * 40 + 3 * 6, 3)
    assert np.array_equal(sheet[6:36, 52:92], frames[1]) and np.array_equal(sheet[42:72, 6:46], frames[2])
    assert (sheet[:6] == 255).all() and (sheet[78:, 52:] == 255).all()  # the empty sixth place is white
    # PNG decodes to the same pixels (lossless; PNG spec, W3C/ISO 15948) with Pillow
    import io

    assert np.array_equal(np.asarray(Image.open(io.BytesIO(png_bytes(frames[2])))), frames[2])
    gif = Image.open(io.BytesIO(gif_bytes([quantized(a) for a in frames])))
    assert gif.n_frames == 5 + 3  # forth and back without repeating the ends
    with pytest.raises(ValueError, match="at least one frame"):
        sheet_array([])


def test_frames_name_the_openings_under_water(box_hull):
    # wall-sided box (20 x 6 x 4 m) at T = 1.5 m, G on the centreline: the waterline turns about the
    # centreline, so a point on the starboard side at height z goes under at tan φ = (z - T) / (B / 2)
    # (geometry of the wall-sided box; heel positive starboard down)
    from meshhydro.loading import Opening

    door = Opening("door", (10.0, -3.0, 2.2))
    heels = [0.0, 10.0, 20.0, 24.0]
    tr = heel_trace(box_hull, RHO * 20 * 6 * 1.5, (10.0, 0.0, 2.0), heels, openings=[door])
    limit = math.degrees(math.atan((2.2 - 1.5) / 3.0))  # 13.13°
    assert [bool(tr.immersed(k)) for k in range(len(heels))] == [h > limit for h in heels]
    assert tr.to_dict()["angles"][2]["openings_under_water"] == ["door"]
    assert tr.curve.downflooding_angle(1)[0] == pytest.approx(limit, abs=1e-6)


def test_a_long_sweep_of_large_frames_gets_a_sheet_of_reduced_frames(monkeypatch):
    # the sheet stays within SHEET_MAX_PIXELS: frames reduced by a whole factor (Pillow's box reduce)
    from meshhydro import frame_files
    from meshhydro.frame_files import FrameEncoder

    monkeypatch.setattr(frame_files, "SHEET_MAX_PIXELS", 10 * 40 * 30 // 4)  # room for 10 frames at half size
    enc = FrameEncoder(sheet=True, gif=False, count=10)
    frames = [np.full((30, 40, 3), 20 * k, dtype=np.uint8) for k in range(10)]
    for a in frames:
        enc.add(a)
    out = enc.finish()
    import io

    sheet = np.asarray(Image.open(io.BytesIO(out.sheet)))
    # 10 frames of 20 x 15 after halving: ceil(sqrt(10 * 15 / 20)) = 3 columns, 4 rows, 6 px gaps
    assert sheet.shape == (4 * 15 + 5 * 6, 3 * 20 + 4 * 6, 3)
    assert len(out.frames) == 10 and out.gif is None
    assert np.array_equal(np.asarray(Image.open(io.BytesIO(out.frames[3]))), frames[3])  # frames kept whole


@pytest.mark.parametrize("heel", [30.0, 100.0, 150.0])
def test_frame_label_says_where_the_keel_point_is(heel):
    # draft T = (vertical depth of K) / (cos φ cos θ) along the heeled hull's z axis (geometry): past 90° it
    # changes sign while K stays under water, so the label gives K's depth or height there, never a
    # negative or a misleading positive draft
    from meshhydro.render import _draft_text

    depth = 1.2
    t = depth / math.cos(math.radians(heel))
    text = _draft_text(t, depth)
    if heel < 90:
        assert text == f"draft {t:.3f} m"
    else:
        assert "under water" in text and "1.200 m" in text and "draft" not in text
    assert "above the water" in _draft_text(-t, -depth) and "1.200 m" in _draft_text(-t, -depth)

"""Sections per body (multihulls), end stations, and the strict offsets CSV.

Checks against closed forms (box: V = L B T, KB = T/2, I_T = L B³/12; Wigley form, see
meshhydro.forms.wigley_exact; the parallel-axis theorem for the inertia of hulls off the
centreline, any statics text) and against the exact mesh result.
"""
from __future__ import annotations

import numpy as np
import pytest
import shapely
import trimesh
from hypothesis import assume, given, settings, strategies as st

from meshhydro import InputError, load_hull
from meshhydro.forms import box, wigley, wigley_exact
from meshhydro.hull_shapes import concat
from meshhydro.loft import loft
from meshhydro.offsets import MultiOffsets, Offsets, fmt, parse_offsets, read_offsets
from meshhydro.sections import (
    body_faces,
    bonjean,
    half_breadths,
    loft_offsets,
    offsets_from_mesh,
    section_hydrostatics,
    sectional_areas,
)

from conftest import tm


def _shift(vf, dy=0.0, dx=0.0):
    v, f = vf
    return v + np.array([dx, dy, 0.0]), f


L, B, D, S = 10.0, 1.0, 2.0, 2.0  # box demihulls 10 x 1 x 2 m, centrelines at y = ±2 m


@pytest.fixture(scope="module")
def box_cat():
    return load_hull(tm(*concat([_shift(box(L, B, D), -S), _shift(box(L, B, D), S)])))


def test_box_catamaran_per_body_and_total_match_the_closed_form(box_cat):
    T = 0.6
    # closed form: V = 2 L B T = 12.0 m³ (not the 71.5 of a table that fills the tunnel)
    assert box_cat.hydrostatics(T).volume == pytest.approx(2 * L * B * T, rel=1e-12)
    off = offsets_from_mesh(box_cat, 6, np.linspace(0.0, T, 5))
    assert isinstance(off, MultiOffsets) and [t.body for t in off.tables] == [0, 1]
    assert [t.centreline for t in off.tables] == pytest.approx([-S, S])
    assert np.allclose(off.tables[0].half_breadth, B / 2) and np.allclose(off.tables[1].half_breadth, B / 2)
    for rule in ("simpson", "trapezoid"):
        sh = section_hydrostatics(off, rule=rule, upto=[T])
        (r,) = sh.rows
        assert r["volume"] == pytest.approx(2 * L * B * T, rel=1e-12)
        assert r["vcb"] == pytest.approx(T / 2, rel=1e-12)  # KB = T/2
        assert r["tcb"] == pytest.approx(0.0, abs=1e-12)
        # I_T of two waterplanes L x B at ±S: 2 (L B³/12 + L B S²) (parallel axes)
        assert r["bmt"] == pytest.approx(2 * (L * B ** 3 / 12 + L * B * S * S) / (2 * L * B * T), rel=1e-12)
        assert [b["body"] for b in sh.body_rows] == [0, 1]
        for b, yc in zip(sh.body_rows, (-S, S), strict=True):
            assert b["volume"] == pytest.approx(L * B * T, rel=1e-12)
            assert b["tcb"] == pytest.approx(yc, abs=1e-12)
            assert b["bmt"] == pytest.approx(B * B / (12 * T), rel=1e-12)  # BMt = B²/12T about its own centreline


def test_whole_hull_section_of_a_catamaran_is_refused_not_filled(box_cat):
    with pytest.raises(InputError, match="2 separate parts"):
        half_breadths(box_cat, 5.0, [0.3])
    assert half_breadths(box_cat, 5.0, [0.3], body=1) == pytest.approx([B / 2])
    with pytest.raises(InputError, match="body 2 does not exist"):
        half_breadths(box_cat, 5.0, [0.3], body=2)


def test_body_numbering_agrees_with_the_health_report(box_cat):
    parts = body_faces(box_cat)
    rep = box_cat.report.bodies
    assert len(parts) == len(rep) == 2
    for p, b in zip(parts, rep, strict=True):
        assert int(p[0]) == b.first_face and len(p) == b.n_faces


def test_sectional_areas_of_a_catamaran_are_the_two_hulls_only(box_cat):
    # exact section area of two boxes: 2 B T at every station, ends included (closed form)
    xs = np.linspace(0.0, L, 6)
    assert sectional_areas(box_cat, xs, 0.6) == pytest.approx(np.full(6, 2 * B * 0.6), rel=1e-12)


def test_two_wigley_hulls_off_the_centreline_match_the_closed_form():
    Lw, Bw, T, s = 10.0, 1.0, 0.625, 1.5
    demi = wigley(Lw, Bw, T, stations=160, waterlines=64)
    hull = load_hull(tm(*concat([_shift(demi, -s), _shift(demi, s)])), x_ref=0.0)
    ex = wigley_exact(Lw, Bw, T)
    # the mesh itself: exact polyhedron, O(h²) from the smooth form
    assert hull.hydrostatics(T).volume == pytest.approx(2 * ex["volume"], rel=2e-3)
    # stations and waterlines on mesh vertices, so the ordinates are the Wigley formula's
    off = offsets_from_mesh(hull, 8, np.linspace(0.0, T, 5))
    sh = section_hydrostatics(off, upto=[T])
    (r,) = sh.rows
    # Simpson is exact here: the integrands of V and the z moment are at most cubic (Wigley ordinates
    # are quadratic in x and z; Simpson's rule integrates cubics exactly)
    assert r["volume"] == pytest.approx(2 * ex["volume"], rel=1e-12)
    assert r["vcb"] == pytest.approx(ex["vcb"], rel=1e-12)
    assert r["lcb"] == pytest.approx(0.0, abs=1e-12) and r["tcb"] == pytest.approx(0.0, abs=1e-12)
    assert r["awp"] == pytest.approx(2 * ex["awp"], rel=1e-12)
    for b, yc in zip(sh.body_rows, (-s, s), strict=True):
        assert b["volume"] == pytest.approx(ex["volume"], rel=1e-12)
        assert b["tcb"] == pytest.approx(yc, abs=1e-12)
    # I_T = 2 (4/105 B³ L + Awp s²) (closed form plus parallel axes); y³ is of degree 6: Simpson is close only
    it = 2 * (4 / 105 * Bw ** 3 * Lw + ex["awp"] * s * s)
    assert r["bmt"] == pytest.approx(it / (2 * ex["volume"]), rel=1e-3)


def _workboat():
    # fore-and-aft symmetric chined hull with transoms at both ends: half-sections (y, z)
    end = [(0.0, 0.0), (0.5, 0.0), (1.0, 0.5), (1.0, 1.5), (0.0, 1.5)]
    mid = [(0.0, 0.0), (0.8, 0.0), (1.5, 0.5), (1.5, 1.5), (0.0, 1.5)]
    xs = np.array([0.0, 6.0, 12.0, 18.0, 24.0])
    return load_hull(tm(*loft(xs, np.array([end, mid, mid, mid, end], float))))


def test_end_stations_of_a_fore_aft_symmetric_hull_are_equal():
    hull = _workboat()
    T = 0.5
    # transom below T = 0.5: a trapezium 1.0 wide at the keel and 2.0 at the waterline: 0.75 m²
    a = sectional_areas(hull, [0.0, 24.0, 12.0], T)
    assert a[0] == pytest.approx(0.75, rel=1e-12) and a[1] == pytest.approx(0.75, rel=1e-12)
    assert a[2] == pytest.approx(0.5 * 0.5 * (1.6 + 3.0), rel=1e-12)  # trapezium 1.6 to 3.0 wide, 0.5 high
    bj = bonjean(hull, [0.0, 24.0], [0.25, T])
    assert bj.area[0] == pytest.approx(bj.area[1], rel=1e-12) and bj.moment[0] == pytest.approx(bj.moment[1], rel=1e-12)
    off = offsets_from_mesh(hull, 4, [0.0, 0.25, 0.5])
    assert off.half_breadth[0] == pytest.approx([0.5, 0.75, 1.0]) and off.half_breadth[-1] == pytest.approx([0.5, 0.75, 1.0])


def test_asymmetric_float_is_refused_with_the_reason():
    # a proa float with a flat inboard side: trapezium section (y, z) (0, 0) (0.4, 0) (0.6, 0.5) (0, 0.5)
    pts = np.array([(x, y, z) for x in (0.0, 4.0) for (y, z) in ((0, 0), (0.4, 0), (0.6, 0.5), (0, 0.5))], float)
    flt = trimesh.convex.convex_hull(pts)
    v, f = concat([box(6.0, 1.0, 1.0), (np.asarray(flt.vertices) + [1.0, 2.0, 0.0], np.asarray(flt.faces))])
    hull = load_hull(tm(v, f))
    with pytest.raises(InputError, match="body 1 is not symmetric about its own centreline"):
        offsets_from_mesh(hull, 4, 4)
    assert isinstance(offsets_from_mesh(hull, 4, 4, body=0), Offsets)
    with pytest.raises(InputError, match=r"body 1 is not symmetric .* spans y 2\.\.2\.5 m"):
        half_breadths(hull, 3.0, [0.25], body=1)
    # accepted on request: half the width is still the section's true width at z = 0.25 (0.5 m),
    # and the measure is 12 δ²/w² with the middle 0.05 m off the centreline y = 2.3: 0.12
    with pytest.raises(InputError, match="measure 0.12 > 0.1"):
        half_breadths(hull, 3.0, [0.25], body=1, asymmetry=0.1)
    assert half_breadths(hull, 3.0, [0.25], body=1, asymmetry=0.2) == pytest.approx([0.25])


def test_bridge_deck_catamaran_is_one_body_and_is_refused():
    a = trimesh.creation.box(extents=(10, 1, 2))
    a.apply_translation((5, -2, 1))
    b = a.copy()
    b.apply_translation((0, 4, 0))
    deck = trimesh.creation.box(extents=(10, 5, 0.5))
    deck.apply_translation((5, 0, 1.75))
    cat = trimesh.boolean.union([a, b, deck], engine="manifold")
    hull = load_hull(cat)
    assert len(body_faces(hull)) == 1
    with pytest.raises(InputError, match="separate parts"):
        offsets_from_mesh(hull, 4, 4)
    # the exact section below the deck is still the two hulls: 2 B T (closed form)
    assert sectional_areas(hull, [5.0], 0.6)[0] == pytest.approx(1.2, rel=1e-12)


# ----------------------------------------------------------------------------- CSV


def test_values_are_written_rounded_to_a_micrometre():
    assert fmt(0.39999999999999997) == "0.4" and fmt(0.1 + 0.2) == "0.3" and fmt(-1e-9) == "0"
    assert fmt(12.0) == "12" and fmt(1.2345674) == "1.234567"
    off = Offsets(np.array([0.0, 0.1 + 0.2]), np.array([0.0, 0.39999999999999997]), np.full((2, 2), 0.7 + 0.1))
    text = off.to_csv()
    assert "0.39999999999999997" not in text and "0.30000000000000004" not in text
    assert text.splitlines()[:3] == ["station_x,waterline_z,half_breadth,kind", "0,0,0.8,offset", "0,0.4,0.8,offset"]


def test_multibody_table_round_trip_and_loft(box_cat):
    off = offsets_from_mesh(box_cat, 4, [0.0, 1.0, 2.0])
    text = off.to_csv()
    assert text.splitlines()[0] == "station_x,waterline_z,half_breadth,kind,body,centreline_y"
    back = parse_offsets(text)
    assert isinstance(back, MultiOffsets) and [t.centreline for t in back.tables] == [-S, S]
    for a, b in zip(off.tables, back.tables, strict=True):
        assert np.array_equal(a.half_breadth, b.half_breadth) and np.array_equal(a.stations, b.stations)
    lofted = load_hull(tm(*loft_offsets(back)))
    assert len(lofted.report.bodies) == 2 and lofted.report.closed and not lofted.report.problems
    assert lofted.total_volume == pytest.approx(2 * L * B * D, rel=1e-12)  # 2 L B D
    # at a tabulated waterline the lofted boxes hold exactly 2 L B T
    assert lofted.hydrostatics(1.0).volume == pytest.approx(2 * L * B * 1.0, rel=1e-12)


def test_body_column_with_one_body_reads_as_one_table():
    t = parse_offsets("station_x,waterline_z,half_breadth,body\n0,0,1,3\n0,1,1,3\n10,0,1,3\n10,1,1,3\n")
    assert isinstance(t, Offsets) and t.body == 3


HEAD = "station_x,waterline_z,half_breadth"


@pytest.mark.parametrize("text,needle", [
    (HEAD + ",colour\n0,0,1,red\n", "row 1: unknown column 'colour'"),
    (HEAD + ",kind,KIND\n0,0,1,offset,offset\n", "column 'kind' appears twice"),
    (HEAD + ",\n0,0,1,\n", "header column 4 has no name"),
    (HEAD + "\n0,0,1,5\n", "row 2: 4 cells but the header has 3 columns"),
    (HEAD + ",body\n0,0,1,port\n", "row 2, column body: 'port' is not a body number"),
    (HEAD + ",body\n0,0,1,1.5\n", "row 2, column body: '1.5'"),
    (HEAD + ",body\n0,0,1,-1\n", "row 2, column body: -1 is negative"),
    (HEAD + ",body\n0,0,1,\n", "row 2, column body"),
    (HEAD + ",body\n0,0,1,0\n0,1,1,0\n9,0,1,0\n9,1,1,0\n0,0,1,1\n0,1,1,1\n9,0,1,1\n9,1,1,1\n",
     "needs a centreline_y column"),
    (HEAD + ",body,centreline_y\n0,0,1,0,2\n0,1,1,0,2.5\n", "row 3, column centreline_y: 2.5 differs from 2.0"),
    (HEAD + ",centreline_y\n0,0,1,abc\n", "row 2, column centreline_y: 'abc' is not a number"),
    (HEAD + ",body,centreline_y\n0,0,1,0,2\n0,1,1,0,2\n9,0,1,0,2\n9,1,1,0,2\n0,0,1,1,-2\n0,1,1,1,-2\n9,0,1,1,-2\n",
     "body 1: missing cell"),
])
def test_bad_tables_are_refused_naming_the_cell(text, needle):
    with pytest.raises(InputError) as e:
        parse_offsets(text, source="t.csv")
    assert needle in str(e.value) and "t.csv" in str(e.value)


def test_file_encoding(tmp_path):
    good = HEAD + "\n0,0,1\n0,1,1\n10,0,1\n10,1,1\n"
    p = tmp_path / "latin.csv"
    p.write_bytes(("# Schiff \u00fc\n" + good).encode("latin-1"))
    with pytest.raises(InputError, match=r"latin.csv: not UTF-8 text \(byte 0xfc at offset 9\)"):
        read_offsets(str(p))
    q = tmp_path / "bom.csv"
    q.write_bytes(good.encode("utf-8-sig"))  # a UTF-8 byte-order mark is part of UTF-8, not an unknown column
    assert read_offsets(str(q)).half_breadth.shape == (2, 2)
    with pytest.raises(InputError, match="no such file"):
        read_offsets(str(tmp_path / "none.csv"))


def test_convergence_table_of_a_catamaran_compares_totals(box_cat):
    from meshhydro.sections import convergence

    # two boxes: every rule is exact for V, KB and BMt (constant ordinates; closed forms above)
    for r in convergence(box_cat, 0.6, counts=(4, 5), waterlines=4):
        for k in ("volume", "vcb", "bmt", "lcb"):
            assert abs(r[f"{k}_error_percent"]) < 1e-9


@settings(max_examples=25, deadline=None)
@given(r=st.lists(st.floats(0.3, 1.5), min_size=4, max_size=9), zf=st.lists(st.floats(0.01, 0.99), min_size=1,
                                                                              max_size=6))
def test_half_breadths_agree_with_shapely_or_refuse_a_split_section(r, zf):
    # a prism whose section is a star-shaped polygon symmetric about y = 0 (radii mirrored), extruded
    # along x; shapely (general-purpose geometry library) gives the section's extent at each height
    th = np.linspace(-np.pi / 2, np.pi / 2, len(r))
    rr = np.array(r)
    half = np.stack([rr * np.cos(th), rr * np.sin(th) + 2.0], axis=1)[1:-1]
    pts = np.concatenate([[[0.0, 2.0 - rr[0]]], half, [[0.0, 2.0 + rr[-1]]], (half * [-1, 1])[::-1]])
    poly = shapely.Polygon(pts)
    assume(poly.is_valid)
    m = trimesh.creation.extrude_polygon(poly, 4.0)
    v = np.asarray(m.vertices)[:, [2, 0, 1]]  # (X, Y, Z) -> hull (x = Z, y = X, z = Y): a rotation
    hull = load_hull(tm(v, np.asarray(m.faces)))
    zlo, zhi = poly.bounds[1], poly.bounds[3]
    zs = [zlo + f * (zhi - zlo) for f in zf]
    parts = [poly.intersection(shapely.LineString([(-9, z), (9, z)])) for z in zs]
    n = [len(getattr(p, "geoms", [p])) for p in parts]
    if max(n) > 1:
        with pytest.raises(InputError, match="separate parts"):
            half_breadths(hull, 2.0, zs)
    else:
        assert half_breadths(hull, 2.0, zs) == pytest.approx([p.length / 2 for p in parts], abs=1e-9)

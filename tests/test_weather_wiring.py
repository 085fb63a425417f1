"""The weather criterion, heeling arms and KG limits wired through the case file, the criteria registry,
the analyses and the CLI, checked against computations made here from outside sources.

References: IMO 2008 IS Code (MSC.267(85)), Part A, 2.2 and 2.3, with the roll formula and factor tables
as in 46 CFR 28.575 (values and marks in /work/shared/REFERENCES.md: the wind-lever layout and the
16° / 80 % limit on θ0 are from memory); box closed forms (Barrass & Derrett): KM = T/2 + B²/(12T), the
wall-sided GZ = sin φ (GM + BM tan²φ / 2); and shapely (a general-purpose geometry library) for the
exact GZ of a box section at any heel.
"""
from __future__ import annotations

import csv
import io
import json
import math

import numpy as np
import pytest

from meshhydro.errors import InputError
import shapely
import trimesh
from scipy.integrate import quad
from scipy.optimize import brentq

from meshhydro.arms import HeelingArm
from meshhydro.cli import main
from meshhydro.criteria import AreaParams, ArmParams, CriteriaSet, Criterion, evaluate, read_criteria
from meshhydro.forms import box

L, B, D, T, KG = 30.0, 8.0, 4.0, 2.0, 2.6
RHO = 1.025
DISP = RHO * L * B * T
HOUSE_AREA, HOUSE_X, HOUSE_Z = 20.0, 10.0, 5.0


def _case(tmp_path, extra: str = "", *, set_name: str = "imo2008-weather", length: float = L) -> str:
    v, f = box(length, B, D)
    trimesh.Trimesh(v, f, process=False).export(tmp_path / "box.stl")
    (tmp_path / "box.toml").write_text(f"""
[hull]
mesh = "box.stl"

[water]
density = {RHO}

[[condition]]
name = "loaded"
displacement = {RHO * length * B * T}
cog = [{length / 2}, 0.0, {KG}]

[[windage]]
name = "deckhouse"
area = {HOUSE_AREA}
centroid = [{HOUSE_X}, {HOUSE_Z}]

[weather]
bilge = "sharp"

[[arm]]
name = "crowd"
kind = "constant"
a = 0.1
{extra}
[criteria]
set = "{set_name}"
""")
    return str(tmp_path / "box.toml")


def _box_gz(phi_deg: float, kg: float = KG) -> float:
    """Exact GZ of the box section at a heel (shapely clipping; prismatic box, no trim).

    Water lies where (sin φ, cos φ)·(y, z) < c in the section (y to port, z up); c is found so that
    the immersed area is B·T; GZ = (G − B)·(cos φ, −sin φ) (the project's convention, README)."""
    ph = math.radians(phi_deg)
    n = np.array([math.sin(ph), math.cos(ph)])
    t = np.array([math.cos(ph), -math.sin(ph)])
    rect = shapely.box(-B / 2, 0.0, B / 2, D)
    big = 100.0

    def wet(c: float):
        p0 = n * c
        return rect.intersection(shapely.Polygon([p0 - big * t, p0 + big * t, p0 + big * t - big * n,
                                                  p0 - big * t - big * n]))

    c = brentq(lambda c: wet(c).area - B * T, -20.0, 20.0, xtol=1e-13)
    cb = wet(c).centroid
    return float((np.array([0.0, kg]) - np.array([cb.x, cb.y])) @ t)


def _table(table, x):  # linear, end values held (common practice; REFERENCES.md)
    return float(np.interp(x, [k for k, _ in table], [v for _, v in table]))


def test_cli_json_weather_of_a_box_barge_against_the_formulas(tmp_path, capsys):
    path = _case(tmp_path)
    assert main(["criteria", path, "--set", "imo2008-weather", "--format", "json", "--heels", "0:90:1",
                 "--quiet"]) == 0
    out = json.loads(capsys.readouterr().out)
    w = out["weather"][0]
    assert w["side"] == "starboard"
    # windage: the box's lateral area above water is exactly L × freeboard, centred at mid-freeboard;
    # the deckhouse adds its stated area at its stated centroid; Z runs down to the centre of the
    # underwater lateral area, at T/2 (IS Code 2.3)
    fb = D - T
    area = L * fb + HOUSE_AREA
    zc = (L * fb * (T + fb / 2) + HOUSE_AREA * HOUSE_Z) / area
    xc = (L * fb * L / 2 + HOUSE_AREA * HOUSE_X) / area
    z = zc - T / 2
    assert w["windage_area"] == pytest.approx(area, rel=1e-12)
    assert w["windage_centroid"] == pytest.approx([xc, zc], rel=1e-12)
    assert w["z"] == pytest.approx(z, rel=1e-12)
    # levers: lw1 = P·A·Z/(1000·g·Δ), P = 504 N/m², g = 9.81; lw2 = 1.5 lw1 (IS Code 2.3; layout [memory])
    lw1 = 504.0 * area * z / (1000 * 9.81 * DISP)
    assert w["lw1"] == pytest.approx(lw1, rel=1e-9) and w["lw2"] == pytest.approx(1.5 * lw1, rel=1e-9)
    # roll: θ1 = 109 k X1 X2 √(r s) (46 CFR 28.575): sharp bilge k = 0.7; B/d = 4 is past the X1 table's
    # end (0.80 held); Cb = 1 is past X2's (1.00); OG = KG − d; T = 2 C B / √GM with the box's KM
    gm = T / 2 + B * B / (12 * T) - KG
    c = 0.373 + 0.023 * B / T - 0.043 * L / 100
    period = 2 * c * B / math.sqrt(gm)
    s = _table(((6, 0.100), (7, 0.098), (8, 0.093), (12, 0.065)), period)
    r = 0.73 + 0.6 * (KG - T) / T
    th1 = 109 * 0.7 * 0.80 * 1.00 * math.sqrt(r * s)
    assert w["roll_period"] == pytest.approx(period, rel=1e-9)
    assert (w["X1"], w["X2"], w["k"]) == (0.80, 1.00, 0.7)
    assert w["theta1"] == pytest.approx(th1, rel=1e-9)
    # θ0: the wall-sided formula holds below deck-edge immersion (tan φ < 2 fb / B)
    gz_ws = lambda p: math.sin(math.radians(p)) * (gm + (B * B / (12 * T)) / 2 * math.tan(math.radians(p)) ** 2)
    th0 = brentq(lambda p: gz_ws(p) - lw1, 0.0, 20.0, xtol=1e-12)
    assert w["theta0"] == pytest.approx(th0, abs=2e-3)
    assert w["theta0_limit"] == pytest.approx(min(16.0, 0.8 * math.degrees(math.atan(2 * fb / B))), abs=1e-3)
    # areas a and b between lw2 and GZ (exact box GZ by shapely); θ2 = 50° (no opening, θc beyond)
    lw2 = 1.5 * lw1
    thr = brentq(lambda p: _box_gz(p) - lw2, 0.0, 20.0, xtol=1e-12)
    rad = math.pi / 180
    a = quad(lambda p: lw2 - _box_gz(p), th0 - th1, thr, epsabs=1e-10)[0] * rad
    b = quad(lambda p: _box_gz(p) - lw2, thr, 50.0, points=[math.degrees(math.atan(2 * fb / B))],
             epsabs=1e-10, limit=200)[0] * rad
    assert w["theta2"] == pytest.approx(50.0) and w["theta2_reason"] == "limit angle"
    assert w["area_a"] == pytest.approx(a, rel=2e-3)
    assert w["area_b"] == pytest.approx(b, rel=2e-3)
    # the two result rows carry the code's clause 2.3 with our own labels, and the caution
    rows = {x["id"]: x for x in out["results"] if x["id"].startswith("2.3")}
    assert rows["2.3 (heel)"]["bound"] == "maximum" and rows["2.3 (heel)"]["attained"] == pytest.approx(th0, abs=2e-3)
    assert rows["2.3 (areas)"]["required"] == pytest.approx(a, rel=2e-3)
    assert "not an approval" in out["caution"]
    ids = [x["id"] for x in out["results"]]
    assert ids == ["2.2.1", "2.2.1", "2.2.1", "2.2.2", "2.2.3", "2.2.4", "2.3 (heel)", "2.3 (areas)"]


def test_text_output_lists_the_weather_values_and_imo2008_stays_general(tmp_path, capsys):
    path = _case(tmp_path)
    assert main(["criteria", path, "--set", "imo2008-weather", "--heels", "0:60:2", "--quiet"]) == 0
    text = capsys.readouterr().out
    for label in ("lw1", "lw2", "θ0", "θ1", "θ2", "area a", "area b", "windage area A", "lever Z", "X1"):
        assert label in text
    # a --set other than the case file's [criteria] set is a conflict, refused (never silently preferred)
    assert main(["criteria", path, "--set", "imo2008", "--heels", "0:60:2", "--quiet"]) == 2
    capsys.readouterr()
    general = tmp_path / "general"
    general.mkdir()
    path = _case(general, set_name="imo2008")
    assert main(["criteria", path, "--heels", "0:60:2", "--quiet", "--format", "json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert "weather" not in out and not any(r["id"].startswith("2.3") for r in out["results"])


def test_weather_needs_case_data(tmp_path, capsys):
    v, f = box(L, B, D)
    trimesh.Trimesh(v, f, process=False).export(tmp_path / "m.stl")
    rc = main(["criteria", str(tmp_path / "m.stl"), "--displacement", str(DISP), "--cog", f"15,0,{KG}",
               "--set", "imo2008-weather", "--quiet"])
    err = capsys.readouterr().err
    assert rc == 2 and "[weather]" in err and err.count("\n") == 1


def test_arm_criteria_with_maxima_and_minima(box_hull):
    # box 20 × 6 × 4 (conftest) at T = 1.5: wall-sided GZ = sin φ (GM + BM tan²φ / 2) (Barrass & Derrett)
    t, kg = 1.5, 2.0
    bm = 36.0 / (12 * t)
    gm = t / 2 + bm - kg
    c = box_hull.righting_curve(RHO * 120 * t, (10.0, 0.0, kg), heels=np.arange(0, 91.0, 1.0))
    arm = HeelingArm("crowd", "constant", a=0.1)
    eq = brentq(lambda p: math.sin(math.radians(p)) * (gm + bm / 2 * math.tan(math.radians(p)) ** 2) - 0.1,
                0.0, 20.0, xtol=1e-12)
    cs = CriteriaSet("arms", "test", (
        Criterion("max 10", "arm_equilibrium", None, params=ArmParams("crowd"), maximum=10.0),
        Criterion("max 5", "arm_equilibrium", None, params=ArmParams("crowd"), maximum=5.0),
        Criterion("resid", "arm_residual_area", 0.05, params=ArmParams("crowd", 40.0)),
        Criterion("area", "area", 0.0, params=AreaParams(0.0, 30.0)),
    ))
    rep = evaluate(c, cs, heeling_arms={"crowd": arm})
    r = {x.id: x for x in rep.results}
    assert r["max 10"].attained == pytest.approx(eq, abs=1e-3)
    assert r["max 10"].passed and r["max 10"].margin == pytest.approx(10.0 - eq, abs=1e-3)
    assert (eq > 5.0) == (not r["max 5"].passed) and r["max 5"].bound == "maximum"
    # residual area = ∫ (GZ − 0.1) from the equilibrium to 40°, against the curve's own integral of GZ
    assert r["resid"].attained == pytest.approx(c.area(eq, 40.0) - 0.1 * math.radians(40.0 - eq), abs=1e-5)
    # ratio of areas up to 25° (wall-sided while the bilge stays wet, tan φ < 2T/B): residual over the
    # area where the arm exceeds GZ before the equilibrium, both from the wall-sided formula by quadrature
    ws = lambda p: math.sin(math.radians(p)) * (gm + bm / 2 * math.tan(math.radians(p)) ** 2)
    ratio = quad(lambda p: ws(p) - 0.1, eq, 25.0)[0] / quad(lambda p: 0.1 - ws(p), 0.0, eq)[0]
    cs3 = CriteriaSet("ratio", "test", (
        Criterion("R", "arm_area_ratio", 1.0, params=ArmParams("crowd", 25.0)),
        Criterion("R max", "arm_area_ratio", None, params=ArmParams("crowd", 25.0), maximum=ratio / 2),))
    r3 = evaluate(c, cs3, heeling_arms={"crowd": arm}).results
    assert r3[0].attained == pytest.approx(ratio, rel=2e-3) and r3[0].passed and not r3[1].passed
    # a criteria file naming an arm the case lacks fails loudly, never passes
    rep2 = evaluate(c, cs, heeling_arms={})
    assert not rep2.results[0].passed and "no heeling arm" in rep2.results[0].note


def test_user_criteria_file_with_maximum_and_weather(tmp_path):
    p = tmp_path / "mine.toml"
    p.write_text('name = "mine"\n[[criterion]]\nid = "W"\nkind = "weather"\n'
                 '[[criterion]]\nid = "C"\nkind = "arm_equilibrium"\narm = "crowd"\nmaximum = 12.0\n')
    cs = read_criteria(str(p))
    assert [c.id for c in cs.items] == ["W (heel)", "W (areas)", "C"]
    assert cs.items[2].maximum == 12.0 and cs.items[2].minimum is None and cs.needs_weather
    assert cs.arms == {"crowd"}
    bad = tmp_path / "bad.toml"
    bad.write_text('[[criterion]]\nkind = "gm"\nminimum = 0.1\nmaximum = 2.0\n')
    with pytest.raises(InputError, match="give minimum or maximum, not both"):
        read_criteria(str(bad))


def test_kg_limits_cli_csv_and_json_where_gm_governs(tmp_path, capsys):
    # wall-sided box, GM0 ≥ 0.15 m alone (IS Code 2.2.4): KG_max = KM − 0.15 with KM = T/2 + B²/(12T)
    crit = tmp_path / "gm.toml"
    crit.write_text('name = "GM only"\n[[criterion]]\nid = "2.2.4"\nkind = "gm"\nminimum = 0.15\n')
    v, f = box(20.0, 6.0, 6.0)
    trimesh.Trimesh(v, f, process=False).export(tmp_path / "b.stl")
    ds = RHO * 20 * 6 * np.array([1.0, 2.0, 3.0])
    spec = f"{ds[0]}:{ds[-1]}:{ds[1] - ds[0]}"
    assert main(["kg-limits", str(tmp_path / "b.stl"), "--displacements", spec, "--set", str(crit),
                 "--format", "csv"]) == 0
    text = capsys.readouterr().out
    rows = list(csv.DictReader(io.StringIO("".join(x for x in text.splitlines(True) if not x.startswith("#")))))
    assert text.splitlines()[-1].startswith("# CAUTION:")
    assert list(rows[0]) == ["displacement", "kg_max", "governing", "gm_required", "search_end", "method", "note"]
    assert {r["search_end"] for r in rows} == {"false"}
    t = np.array([1.0, 2.0, 3.0])
    km = t / 2 + 36 / (12 * t)
    assert [float(r["kg_max"]) for r in rows] == pytest.approx(km - 0.15, abs=1e-5)
    assert {r["governing"] for r in rows} == {"2.2.4"}
    assert [float(r["gm_required"]) for r in rows] == pytest.approx([0.15] * 3, abs=1e-5)
    out = tmp_path / "k.json"
    plot = tmp_path / "k.png"
    assert main(["kg-limits", str(tmp_path / "b.stl"), "--displacements", spec, "--set", str(crit),
                 "--format", "json", "--out", str(out), "--plot", str(plot)]) == 0
    data = json.loads(out.read_text())
    assert [r["kg_max"] for r in data["rows"]] == pytest.approx(km - 0.15, abs=1e-5)
    assert "not an approval" in data["caution"] and plot.stat().st_size > 0


def test_kg_limits_with_the_weather_set_and_applicability_note(tmp_path, capsys):
    path = _case(tmp_path, length=20.0)
    assert main(["kg-limits", path, "--displacements", f"{RHO * 20 * B * T}", "--format", "json",
                 "--steps", "10"]) == 0
    data = json.loads(capsys.readouterr().out)
    (row,) = data["rows"]
    assert row["kg_max"] is not None and row["governing"] in {"2.2.1", "2.2.2", "2.2.3", "2.2.4", "2.3 (heel)",
                                                               "2.3 (areas)"}
    # IS Code 2.2 and 2.3 are written for ships of 24 m and over: a 20 m box gets the note
    assert any("shorter than 24 m" in n for n in data["notes"])


def test_windage_item_from_a_mesh_file(tmp_path, capsys):
    # a 6 m × 3 m × 2 m deckhouse box standing on the deck at x 4..10: its lateral projection is exactly
    # 6 × 2 m² centred at (7, D + 1) (closed-form rectangle), added to the hull's L × freeboard
    hv, hf = box(6.0, 3.0, 2.0)
    trimesh.Trimesh(hv + np.array([4.0, 0.0, D]), hf, process=False).export(tmp_path / "house.stl")
    path = _case(tmp_path)
    text = (tmp_path / "box.toml").read_text().replace(
        f"area = {HOUSE_AREA}\ncentroid = [{HOUSE_X}, {HOUSE_Z}]", 'mesh = "house.stl"')
    (tmp_path / "box.toml").write_text(text)
    assert main(["criteria", path, "--format", "json", "--heels", "0:60:2", "--quiet"]) in (0, 1)
    w = json.loads(capsys.readouterr().out)["weather"][0]
    fb = D - T
    area = L * fb + 12.0
    assert w["windage_area"] == pytest.approx(area, rel=1e-12)
    assert w["windage_centroid"] == pytest.approx([(L * fb * L / 2 + 12.0 * 7.0) / area,
                                                   (L * fb * (T + fb / 2) + 12.0 * (D + 1.0)) / area], rel=1e-12)
    assert w["items"] == [{"name": "deckhouse", "area": pytest.approx(12.0), "x": pytest.approx(7.0),
                           "z": pytest.approx(D + 1.0)}]


def test_kg_limits_bad_input_is_one_line(tmp_path, capsys):
    path = _case(tmp_path)
    for argv, word in ((["--units", "mm"], "--units"), (["--kg-range", "3:1"], "--kg-range"),
                       (["--set", "nonesuch.toml"], "nonesuch"), (["--steps", "0"], "steps")):
        assert main(["kg-limits", path, "--displacements", "400", *argv]) == 2
        err = capsys.readouterr().err
        assert word in err and err.count("\n") == 1


def test_criteria_plot_with_weather_and_arms_writes_the_figure(tmp_path, capsys):
    # the criteria plot of a set with the weather criterion and a heeling arm: the GZ curve with the limits,
    # and the levers in their own view beside it (PNG by suffix; PNG signature, ISO/IEC 15948)
    path = _case(tmp_path)
    png = tmp_path / "gz.png"
    assert main(["criteria", path, "--heels", "0:60:2", "--quiet", "--plot", str(png)]) == 0  # the box meets the set
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert (tmp_path / "gz-levers.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "gz-levers.png" in capsys.readouterr().err

"""The design-review report: composition from builders, checksums, criteria marks, the CLI command."""
from __future__ import annotations

import hashlib
import os
import re

import numpy as np
import pytest

import meshhydro
from meshhydro import review
from meshhydro.cli import main
from meshhydro.criteria import CAUTION, IMO_2008_GENERAL
from meshhydro.document import Section
from meshhydro.figure_data import gz_data
from meshhydro.render import side_words

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BARGE_CASE = os.path.join(ROOT, "meshes", "cases", "brindle_barge.toml")
BARGE = os.path.join(ROOT, "meshes", "brindle_barge.stl")
FAST = review.ReviewOptions(heels=np.arange(0.0, 61.0, 5.0), sweep_heels=None)


def _sha(path: str) -> str:  # checked against Python's hashlib, not the program's own helper
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest()


@pytest.fixture(scope="module")
def barge_review():
    rv = review.open_review(BARGE_CASE, FAST)
    return rv, review.report_document(rv)


def test_report_covers_the_case(barge_review):
    rv, doc = barge_review
    keys = [s.key for s in doc.sections]
    assert keys == ["vessel", "hydrostatics", "conditions", "assumptions"]  # no sweep, no sections asked
    conds = doc.section("conditions").sections
    assert [c.title for c in conds] == ["Condition: loaded with deck cargo", "Condition: light"]
    for c in conds:
        assert [s.key for s in c.sections] == ["weights", "equilibrium", "righting", "criteria"]  # no tanks
    # every criterion of the set on every side, with a margin = attained - required
    crit = [t for s in conds for t in s.sections[3].tables if t.key == "results"]
    for table, cr in zip(crit, rv.runs, strict=True):
        assert len(table.rows) == len(IMO_2008_GENERAL.items) * len(cr.sides)
        for r in table.rows:
            if r["attained"] is not None:
                # the limit reads "≥ x" for a minimum (margin = attained - x), "≤ x" for a maximum
                sense, req = r["required"].split()
                expected = r["attained"] - float(req) if sense == "≥" else float(req) - r["attained"]
                assert r["margin"] == pytest.approx(expected, abs=1e-4)
    assert doc.verdict == all(cr.report.passed for cr in rv.runs)
    assert CAUTION in doc.cautions and CAUTION in doc.section("assumptions").notes


def test_inputs_are_tied_by_sha256(barge_review):
    _, doc = barge_review
    got = {os.path.basename(i["path"]): i["sha256"] for i in doc.meta["inputs"]}
    assert got == {"brindle_barge.toml": _sha(BARGE_CASE), "brindle_barge.stl": _sha(BARGE)}
    assert doc.meta["version"] == meshhydro.__version__


def test_gz_figure_carries_the_criteria(barge_review):
    rv, doc = barge_review
    cr = rv.runs[0]
    fig = doc.section("conditions").sections[0].sections[2].figures[0]
    assert fig.view == "gz_curve"
    labels = [lim["label"] for lim in fig.data["limits"]]
    # IMO 2008 IS Code, Part A, 2.2.2 and 2.2.3 (limits as printed; clause numbers from memory)
    assert any(lim["kind"] == "gz" and lim["value"] == 0.2 and lim["from"] == 30.0 for lim in fig.data["limits"])
    assert any(lim["kind"] == "angle" and lim["value"] == 25.0 for lim in fig.data["limits"])
    assert len(labels) == len(set(labels))
    for side in fig.data["sides"]:
        sign = 1 if side["name"] == "starboard" else -1
        # the marked maximum is the printed one, and the drawn curve never rises above it
        assert (side["max_gz"], side["angle_of_max"]) == cr.curve.max_gz(sign)
        assert max(side["gz"]) <= side["max_gz"] + 1e-12
        # the shaded areas are the criteria's ranges, with the attained values of the criteria table
        first = next(r for r in cr.report.results if r.side == side["name"] and r.id == "2.2.1")
        assert "0° to 30°" in first.text  # clause 2.2.1's first area limit
        assert (0.0, 30.0, first.attained) in side["areas"]


def test_both_sides_read_righting_positive():
    # Closed-form symmetry: a port-starboard symmetric hull with G on the centreline has GZ(-φ) = -GZ(φ),
    # so the two sides drawn righting-positive coincide.
    hull = meshhydro.load_hull(BARGE)
    curve = hull.righting_curve(displacement=40.0, cog=(6.0, 0.0, 1.2), heels=np.arange(-60.0, 61.0, 5.0))
    d = gz_data(curve, (1, -1), "barge")
    s, p = d["sides"]
    assert s["heel"] == p["heel"]
    assert np.allclose(s["gz"], p["gz"], atol=1e-7)
    assert max(s["gz"]) > 0.1


def test_a_builder_adds_a_section():
    def extra(rv: review.Review) -> Section:
        return Section("extra", f"Extra for {rv.vessel}")

    rv = review.open_review(BARGE_CASE, FAST)
    doc = review.report_document(rv, builders=[extra, review.assumptions_section])
    assert [s.key for s in doc.sections] == ["extra", "assumptions"]
    assert doc.sections[0].title == "Extra for brindle_barge.stl"


@pytest.mark.parametrize("heel, gz, words", [
    (20.0, 0.3, ("to starboard", "righting")), (20.0, -0.1, ("to starboard", "heeling")),
    (-20.0, -0.3, ("to port", "righting")), (-20.0, 0.1, ("to port", "heeling")),
    (0.0, 0.02, ("upright", "heels to port")), (0.0, -0.02, ("upright", "heels to starboard")),
    (0.0, 0.0, ("upright", "no lever")), (0.0, 1e-17, ("upright", "no lever")), (30.0, -3e-4, ("to starboard", "no lever")),
])
def test_frame_header_words(heel, gz, words):
    # README conventions: heel + = starboard down; GZ + rights the vessel from a positive heel
    assert side_words(heel, gz) == words


def _run(*argv):
    return main(list(argv))


def test_report_command_writes_one_file(tmp_path, capsys):
    out = tmp_path / "review.html"
    code = _run("report", BARGE_CASE, "--out", str(out), "--heels", "0:60:5", "--sweep-heels", "0:20:20",
                "--size", "320x240", "--sections", "4", "--waterlines", "4", "--quiet")
    err = capsys.readouterr().err
    assert code == 1  # the loaded condition fails IMO 2008 2.2.3 (angle of max GZ below 25°), as README shows
    text = out.read_text(encoding="utf-8")
    assert sorted(os.listdir(tmp_path)) == ["review.html"]  # no temporaries left
    assert _sha(BARGE) in text and _sha(BARGE_CASE) in text and meshhydro.__version__ in text
    assert "Heel sweep: loaded with deck cargo" in text and "Section-based estimates" in text
    assert text.count('src="data:image/png;base64,') == 2 and text.count('src="data:image/gif;base64,') == 1
    assert not re.search(r'(?:src|href)="(?:https?:)?//', text)
    assert "\r" not in err and "%|" not in err  # --quiet: no bars


@pytest.mark.parametrize("argv, message", [
    (["--out", "r.txt"], "give a file ending in .html"),
    (["--out", "r.html", "--no-sweep", "--camera", "oblique"], "--camera is unused with --no-sweep"),
    (["--out", "r.html", "--no-sweep", "--smooth-edges"], "--smooth-edges is unused with --no-sweep"),
    (["--out", "r.html", "--waterlines", "5"], "--waterlines applies to --sections"),
    (["--out", "r.html", "--sections", "1"], "at least 2 station intervals"),
    (["--out", "r.html", "--heels", "0:200:5"], "--heels takes angles from 0 to 180"),
    (["--out", "r.html", "--sweep-condition", "nope"], "no condition named 'nope'"),
    (["--out", "r.html", "--kg-limits", "0,10"], "displacements must be positive"),
    (["--out", "r.html", "--kg-limits", "10:5:1"], "--kg-limits"),
])
def test_report_bad_options(tmp_path, capsys, monkeypatch, argv, message):
    monkeypatch.chdir(tmp_path)
    code = _run("report", BARGE_CASE, *argv, "--quiet")
    err = capsys.readouterr().err
    assert code == 2 and message in err and len(err.strip().splitlines()) == 1
    assert os.listdir(tmp_path) == []


def test_report_needs_a_case_file(tmp_path, capsys):
    code = _run("report", BARGE, "--out", str(tmp_path / "r.html"))
    assert code == 2 and "report takes a case file" in capsys.readouterr().err


def test_outline_segments_chain_into_closed_loops():
    from meshhydro.figure_data import chain_segments, largest_section_outline

    # a unit square's edges, out of order: one closed polyline of 5 points (common practice: a loop
    # repeats its first point at the end)
    sq = np.array([[[1, 0], [1, 1]], [[0, 0], [1, 0]], [[0, 1], [0, 0]], [[1, 1], [0, 1]]], dtype=float)
    lines = chain_segments(sq)
    assert len(lines) == 1 and len(lines[0]) == 5 and np.array_equal(lines[0][0], lines[0][-1])
    # the catamaran's widest section is two separate closed loops, one per demi-hull
    cat = meshhydro.load_hull(os.path.join(ROOT, "meshes", "twinfin_cat.stl"))
    loops = largest_section_outline(cat)
    assert len(loops) == 2 and all(np.array_equal(p[0], p[-1]) for p in loops)
    assert sorted(np.sign([p[:, 0].mean() for p in loops])) == [-1.0, 1.0]


# ---------------------------------------------------------------------------- tanks, damage, weather, KG limits,
# a fully submerged load

TANKS_CASE = os.path.join(ROOT, "meshes", "cases", "brindle_tanks.toml")


def _sections(doc, cond_index):
    return doc.section("conditions").sections[cond_index]


@pytest.fixture(scope="module")
def tanks_review():
    rv = review.open_review(TANKS_CASE, FAST)
    return rv, review.report_document(rv)


def test_tank_case_sections(tanks_review):
    rv, doc = tanks_review
    assert [s.key for s in doc.sections] == ["vessel", "hydrostatics", "conditions", "assumptions"]  # no KG limits
    keys = [[s.key for s in c.sections] for c in doc.section("conditions").sections]
    # tanks: the weight groups replace the plain weights; damage only where a space is flooded; no weather
    # criterion in the default set; nothing submerged
    assert keys == [["tanks", "equilibrium", "righting", "criteria"]] * 2 + [
        ["tanks", "equilibrium", "damage", "righting", "criteria"]]
    # the other fluid method beside the deciding one, with a figure of both
    for c, other in zip(doc.section("conditions").sections, ("FSM", "exact fluid", "FSM"), strict=True):
        beside = c.sections[0].sections[0]
        assert other in beside.title and beside.figures[0].view == "gz_curve"
        assert len(beside.figures[0].data["sides"]) == 4  # two curves, both sides


def test_tank_weight_groups_add_up(tanks_review):
    # Arithmetic against the case file itself: items plus, per tank, fill x box volume x fluid density
    # (a box tank's capacity is its closed-form volume, permeability 1).
    import tomllib

    rv, doc = tanks_review
    with open(TANKS_CASE, "rb") as fh:
        spec = tomllib.load(fh)
    cond = spec["condition"][0]
    items = sum(i["mass"] for i in cond["items"])
    tanks = 0.0
    for t in spec["tank"]:
        (x0, y0, z0), (x1, y1, z1) = t["box"]
        tanks += cond["fills"].get(t["name"], 0.0) * (x1 - x0) * (y1 - y0) * (z1 - z0) * t["density"]
    sec = _sections(doc, 0).sections[0]
    groups = next(t for t in sec.tables if t.key == "weight_groups")
    total = sum(r["mass"] for r in groups.rows)
    assert total == pytest.approx(items + tanks, rel=1e-9)
    assert sum(r["mass"] for r in groups.rows if r["group"] == "tank") == pytest.approx(tanks, rel=1e-9)
    values = {q.key: q.value for q in sec.values}
    assert values["displacement"] == pytest.approx(items + tanks, rel=1e-9)
    # KG fluid = KG + FSM/Δ (textbook virtual rise)
    assert values["kg_fluid"] == pytest.approx(values["kg"] + values["fsm"] / values["displacement"], rel=1e-12)
    fills = next(t for t in sec.tables if t.key == "tank_fills")
    assert [r["full"] for r in fills.rows] == pytest.approx([100 * cond["fills"][t["name"]] for t in spec["tank"]])


def test_damage_section(tanks_review):
    rv, doc = tanks_review
    dmg = _sections(doc, 2).sections[2]
    assert dmg.key == "damage"
    vals = {q.key: q.value for q in dmg.values}
    cr = rv.runs[2]
    pos = next(t for t in dmg.tables if t.key == "damaged_vs_intact")
    assert [r["case"] for r in pos.rows] == ["damaged", "intact"]
    under = [k for k in pos.rows[0] if k.startswith("opening:") and pos.rows[0][k] <= 0]
    assert vals["survival"] == ("survives" if cr.report.passed and not under else "does NOT survive")
    # flooding a starboard space heels the barge to starboard (heel + = starboard down, README)
    assert pos.rows[0]["heel"] > 0.1 and abs(pos.rows[1]["heel"]) < 1e-6
    assert "intact" in dmg.sections[0].title


def test_tank_report_command(tmp_path, capsys):
    out = tmp_path / "tanks.html"
    code = _run("report", TANKS_CASE, "--out", str(out), "--heels", "0:60:10", "--no-sweep", "--quiet")
    assert code in (0, 1) and out.exists()
    text = out.read_text(encoding="utf-8")
    assert "Weights and tanks" in text and "Damage: starboard void flooded" in text
    assert "not resolved against the hull" not in capsys.readouterr().err


@pytest.fixture(scope="module")
def weather_review():
    opts = review.ReviewOptions(heels=np.arange(0.0, 91.0, 5.0), sweep_heels=None, criteria="imo2008-weather",
                                kg_limits=np.array([30.0, 60.0, 85.0]))
    rv = review.open_review(BARGE_CASE, opts)
    return rv, review.report_document(rv)


def test_weather_section(weather_review):
    rv, doc = weather_review
    for c in doc.section("conditions").sections:
        keys = [s.key for s in c.sections]
        assert keys == ["weights", "equilibrium", "righting", "criteria", "weather"]
        w = c.sections[-1].tables[0]
        side = [col.key for col in w.columns][2]
        # IS Code 2.3.2 (from memory): the gust lever is 1.5 times the steady wind lever
        lw1 = next(r for r in w.rows if r["quantity"].startswith("steady wind lever"))[side]
        lw2 = next(r for r in w.rows if r["quantity"].startswith("gust lever"))[side]
        assert lw2 == pytest.approx(1.5 * lw1, rel=1e-12) and lw1 > 0
        labels = [r["quantity"] for r in w.rows]
        assert "area a" in labels and "area b" in labels and "windage area A" in labels and "lever Z" in labels
        # the picture of the same levers and areas, drawn by the report's view as SVG
        fig = c.sections[-1].figures[0]
        assert fig.view == "weather_gz" and side in fig.data["weather"]
        from meshhydro import figures

        svg = figures.draw(fig)
        assert svg.lstrip().startswith("<?xml") or "<svg" in svg[:500]
        assert f"lw1 {lw1:.4f} m" in svg and "area a" in svg


def test_kg_limit_rows_match_the_command(weather_review, capsys):
    import json

    rv, doc = weather_review
    sec = doc.section("kg_limits")
    assert sec.figures[0].view == "kg_limits"
    code = _run("kg-limits", BARGE_CASE, "--displacements", "30,60,85", "--set", "imo2008-weather", "--format",
                "json")
    assert code == 0
    cli = json.loads(capsys.readouterr().out)["rows"]
    assert sec.tables[0].rows == cli
    svg = review_figure_svg(sec.figures[0])
    assert svg.lstrip().startswith("<?xml") or "<svg" in svg[:400]


def review_figure_svg(fig):
    from meshhydro import figures

    return figures.draw(fig)


def test_fully_submerged_condition(tmp_path):
    import trimesh

    hull = meshhydro.load_hull(BARGE)
    tm = trimesh.load(BARGE)
    rho, kg = 1.025, 0.5
    case = tmp_path / "sub.toml"
    case.write_text(f'[hull]\nmesh = "{BARGE}"\nunits = "m"\n[water]\ndensity = {rho}\n[[condition]]\n'
                    f'name = "neutral"\ndisplacement = {hull.total_volume * rho!r}\ncog = [6.0, 0.0, {kg}]\n',
                    encoding="utf-8")
    rv = review.open_review(str(case), review.ReviewOptions(heels=np.arange(0.0, 61.0, 10.0), sweep_heels=None))
    doc = review.report_document(rv)
    cond = doc.section("conditions").sections[0]
    assert "submergence" in [s.key for s in cond.sections]
    sub = cond.sections[[s.key for s in cond.sections].index("submergence")]
    assert "no waterplane: weight stability only" in sub.notes
    vals = {q.key: q.value for q in sub.values}
    # the whole body's centroid from trimesh (an outside library); GM = KB - KG with no waterplane (textbook)
    assert vals["kb"] == pytest.approx(tm.center_mass[2], abs=1e-9)
    assert vals["gmt"] == pytest.approx(tm.center_mass[2] - kg, abs=1e-9)
    assert sub.sections[0].figures[0].view == "submergence"
    # the sequence ends fully under water, where KM = KB (no waterplane inertia; textbook)
    last = sub.sections[0].tables[0].rows[-1]
    assert last["submerged"] and last["awp"] == 0.0 and last["kmt"] == pytest.approx(tm.center_mass[2], abs=1e-9)


def test_sweep_of_a_flooded_condition_uses_its_damaged_curve(tanks_review):
    # the report's sweep floats the condition as its curve does (lost buoyancy, tank fluid): the trace's GZ
    # equals the damaged curve's at the same heels, and a note names the flooded spaces
    import dataclasses

    rv, _ = tanks_review
    saved = rv.options
    try:
        rv.options = dataclasses.replace(saved, sweep_heels=np.array([0.0, 10.0, 20.0]),
                                         sweep_condition="starboard void flooded")
        sec = review.sweep_section(rv)
    finally:
        rv.options = saved
    assert any("flooded (lost buoyancy): starboard void" in n for n in sec.notes)
    trace = sec.figures[0].data.trace
    cr = next(cr for cr in rv.runs if cr.inp.condition.name == "starboard void flooded")
    for k, h in enumerate(trace.heel):
        j = int(np.argmin(np.abs(cr.curve.heel - h)))
        assert cr.curve.heel[j] == h and trace.gz[k] == pytest.approx(cr.curve.gz[j], abs=1e-6)

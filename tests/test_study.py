"""Design studies and hull generators.

Outside references: itertools.product (grid expansion), pyarrow and the csv module (reading the tables
back), trimesh (volume, is_watertight, is_winding_consistent of the generated meshes) and the closed-form
volume of a wall-sided barge with plane raked ends (prism minus two triangular wedges).
"""
from __future__ import annotations

import copy
import csv
import itertools
import math
import os

import numpy as np
import pytest
import trimesh

from meshhydro.errors import InputError
from meshhydro.generators import PARAMETERS, make_hull, make_mesh
from meshhydro.schemas import validate_study
from meshhydro.study import expand_cases, run_case, run_study

ROOT = os.path.join(os.path.dirname(__file__), "..")

# A small, fast study: coarse demihulls, coarse heels; spacing 0.6 m < demihull beam 0.8 m must fail.
SMALL = {"study": {"name": "small", "generator": "catamaran"},
         "parameters": {"spacing": [0.6, 2.0, 3.0], "kg": [1.0, 1.5], "stations": [16]},
         "analysis": {"displacement": 3.0, "heels": {"start": 0, "stop": 60, "step": 5}}}


def spec_of(data: dict, source: str = "study.toml"):
    return validate_study(copy.deepcopy(data), source)


# ---------------------------------------------------------------- grid

def test_grid_matches_itertools_product():
    data = copy.deepcopy(SMALL)
    data["parameters"] = {"spacing": {"start": 2.0, "stop": 3.0, "step": 0.5}, "demihull_beam": [0.6, 0.8],
                          "kg": [1.0, 1.2, 1.4]}
    cases = expand_cases(spec_of(data))
    expected = list(itertools.product([2.0, 2.5, 3.0], [0.6, 0.8], [1.0, 1.2, 1.4]))  # outside reference
    assert [tuple(v for _, v in c.params) for c in cases] == expected
    assert all([n for n, _ in c.params] == ["spacing", "demihull_beam", "kg"] for c in cases)
    ids = [c.case_id for c in cases]
    assert len(set(ids)) == len(ids)
    assert ids == [c.case_id for c in expand_cases(spec_of(data))]  # stable


def test_case_id_follows_the_analysis_settings():
    a = expand_cases(spec_of(SMALL))
    data = copy.deepcopy(SMALL)
    data["analysis"]["heels"]["step"] = 10
    b = expand_cases(spec_of(data))
    assert not {c.case_id for c in a} & {c.case_id for c in b}  # results at other heels are never reused


def test_meshes_times_parameters(tmp_path):
    for name in ("twinfin_cat.stl", "brindle_barge.stl"):
        (tmp_path / name).write_bytes(open(os.path.join(ROOT, "meshes", name), "rb").read())
    data = {"study": {"name": "two", "meshes": ["twinfin_cat.stl", "brindle_barge.stl"]},
            "parameters": {"kg": [1.0, 1.2]}, "analysis": {"displacement": 3.0}}
    cases = expand_cases(spec_of(data, str(tmp_path / "s.toml")))
    assert [(c.hull, c.params) for c in cases] == [
        (m, (("kg", k),)) for m, k in itertools.product(["twinfin_cat.stl", "brindle_barge.stl"], [1.0, 1.2])]


def test_unknown_parameter_names_the_nearest():
    data = copy.deepcopy(SMALL)
    data["parameters"]["spacng"] = data["parameters"].pop("spacing")
    with pytest.raises(InputError, match=r"study.toml: \[parameters\] spacng: not a parameter of catamaran; "
                                         r"did you mean spacing\?"):
        expand_cases(spec_of(data))


def test_generator_parameter_with_meshes_refused():
    data = {"study": {"name": "m", "meshes": ["a.stl"]}, "parameters": {"spacing": [2.0]},
            "analysis": {"displacement": 3.0, "kg": 1.0}}
    with pytest.raises(InputError, match=r"\[parameters\] spacing: not sweepable with meshes"):
        expand_cases(spec_of(data))


@pytest.mark.parametrize("change, message", [
    (lambda d: d["analysis"].update(kg=1.0), r"\[analysis\] kg: contradicts \[parameters\] kg; give one"),
    (lambda d: d["analysis"].pop("displacement"), r"\[analysis\] displacement: missing"),
    (lambda d: d["parameters"].pop("kg"), r"\[analysis\] kg: missing; give kg or cog, or sweep kg"),
    (lambda d: d["analysis"].update(criteria="imo2008-weather"), r"imo2008-weather needs windage"),
    (lambda d: d["analysis"].update(kg_limit="yes"), r"\[analysis\] kg_limit: must be true or false"),
])
def test_loading_from_one_place(change, message):
    data = copy.deepcopy(SMALL)
    change(data)
    with pytest.raises(InputError, match=message):
        spec_of(data)


# ---------------------------------------------------------------- one case

def test_failing_cases_become_rows():
    cases = expand_cases(spec_of(SMALL))
    overlap = run_case(cases[0])  # spacing 0.6 m with 0.8 m demihulls
    assert overlap["error"].startswith("InputError: catamaran: spacing 0.6 m must exceed demihull_beam 0.8 m")
    assert overlap["spacing"] == 0.6 and overlap["kg"] == 1.0 and overlap.get("max_gz_m") is None
    data = copy.deepcopy(SMALL)
    data["analysis"]["displacement"] = 50.0  # far more than two 10 m canoes displace
    too_heavy = run_case(expand_cases(spec_of(data))[2])
    assert too_heavy["error"].startswith("CannotFloatError")


def test_case_row_figures_are_consistent():
    row = run_case(expand_cases(spec_of(SMALL))[2])  # spacing 2.0, kg 1.0
    assert row["error"] == ""
    # the G used: kg as given, on the centre line, at the level-flotation LCB (common practice for KG sweeps)
    assert row["kg_m"] == 1.0 and row["tcg_m"] == 0.0
    assert row["sides"] == "starboard"  # a symmetric hull loaded on the centre line
    assert 0 < row["angle_of_max_gz_deg"] <= 60 and row["max_gz_m"] > 0
    assert row["area_0_40_mrad"] > row["area_0_30_mrad"] > 0
    assert row["verdict"] in ("pass", "fail")


# ---------------------------------------------------------------- the whole study on a local cluster

def _read_csv(path):
    with open(path, newline="") as fh:
        return list(csv.DictReader(fh))


def test_local_cluster_run_tables_and_rerun(tmp_path):
    import pyarrow.parquet as pq

    spec = spec_of(SMALL)
    out = str(tmp_path / "out")
    s1 = run_study(spec, out, workers=2, progress=False)
    assert (s1.cases, s1.run, s1.skipped, s1.failed) == (6, 6, 0, 2)  # two overlapping-demihull cases
    table = pq.read_table(os.path.join(out, "results.parquet")).to_pylist()  # outside reader
    rows = _read_csv(os.path.join(out, "results.csv"))
    assert [r["case_id"] for r in table] == [c.case_id for c in expand_cases(spec)]
    assert list(rows[0]) == list(table[0])
    for t, c in zip(table, rows):  # the same values: Parquet in full, CSV to 12 significant digits
        for k, v in t.items():
            if isinstance(v, float):
                assert float(c[k]) == pytest.approx(v, rel=1e-11, abs=1e-12), k
            elif v is None:
                assert c[k] == "", k
            else:
                assert c[k] == v, k
    assert [r["spacing"] for r in table] == [0.6, 0.6, 2.0, 2.0, 3.0, 3.0]
    assert sum(1 for r in table if r["error"]) == 2
    assert "CAUTION" in open(os.path.join(out, "README.txt")).read()
    assert sorted(f for f in os.listdir(out) if f.endswith(".png")) == ["study_kg.png", "study_spacing.png"]
    # rerun: the done cases are skipped, only the failed ones run again (no cluster needed for 0 cases)
    before = open(os.path.join(out, "results.csv")).read()
    s2 = run_study(spec, out, workers=1, progress=False)
    assert (s2.cases, s2.run, s2.skipped, s2.failed) == (6, 2, 4, 2)
    assert open(os.path.join(out, "results.csv")).read().splitlines()[0] == before.splitlines()[0]
    kept = {r["case_id"]: r for r in pq.read_table(os.path.join(out, "results.parquet")).to_pylist()}
    for r in table:
        if not r["error"]:
            assert kept[r["case_id"]] == r


def test_damaged_results_file_is_named(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "results.parquet").write_bytes(b"not parquet")
    with pytest.raises(InputError, match=r"results.parquet: cannot be read as a results table"):
        run_study(spec_of(SMALL), str(out), workers=1, progress=False)


# ---------------------------------------------------------------- generators

def _mesh(gen, **params):
    v, f = make_mesh(gen, params)
    m = trimesh.Trimesh(v, f, process=False)
    assert m.is_watertight and m.is_winding_consistent
    return m


@pytest.mark.parametrize("params", [{}, {"length": 20.0, "beam": 6.0, "depth": 2.0, "rake_length": 2.5,
                                         "rake_height": 0.5, "stations": 40}])
def test_barge_volume_closed_form(params):
    p = {k: v.default for k, v in PARAMETERS["barge"].items()} | params
    m = _mesh("barge", **params)
    # wall-sided prism minus two plane wedges (1/2 rake_length x rake_height x beam): closed form
    exact = p["beam"] * (p["length"] * p["depth"] - p["rake_length"] * p["rake_height"])
    assert math.isclose(m.volume, exact, rel_tol=1e-12)
    assert math.isclose(make_hull("barge", params).total_volume, exact, rel_tol=1e-12)


def test_catamaran_two_equal_bodies_and_spacing():
    a, b = _mesh("catamaran"), _mesh("catamaran", spacing=3.0)
    assert len(a.split(only_watertight=True)) == 2
    assert math.isclose(a.volume, b.volume, rel_tol=1e-12)  # moving a body leaves its volume (trimesh)
    halves = a.split(only_watertight=True)
    assert math.isclose(halves[0].volume, halves[1].volume, rel_tol=1e-12)
    ys = sorted(h.bounds.mean(axis=0)[1] for h in halves)
    assert np.allclose(ys, [-2.2, 2.2], atol=1e-12)
    assert math.isclose(make_hull("catamaran").total_volume, a.volume, rel_tol=1e-9)


def test_outrigger_float_where_asked():
    m = _mesh("outrigger", float_offset=-2.5, float_keel=0.1, float_x=2.0)
    main, ama = sorted(m.split(only_watertight=True), key=lambda h: h.volume, reverse=True)
    lo, hi = ama.bounds
    assert math.isclose(0.5 * (lo[1] + hi[1]), -2.5, abs_tol=1e-12)  # starboard
    # the keel is reached where the section is fullest, between stations: at most 1 mm above
    assert 0.1 <= lo[2] < 0.1 + 1e-3 and math.isclose(hi[2], 0.68, abs_tol=1e-12)
    assert math.isclose(lo[0], 2.0, abs_tol=1e-12) and math.isclose(hi[0], 6.5, abs_tol=1e-12)
    assert math.isclose(make_hull("outrigger", {"float_offset": -2.5, "float_keel": 0.1, "float_x": 2.0})
                        .total_volume, m.volume, rel_tol=1e-9)


@pytest.mark.parametrize("gen, stl", [("barge", "brindle_barge.stl"), ("catamaran", "twinfin_cat.stl"),
                                      ("outrigger", "kestrel_outrigger.stl")])
def test_defaults_are_the_demo_vessels(gen, stl):
    shipped = trimesh.load(os.path.join(ROOT, "meshes", stl), process=False)
    v, f = make_mesh(gen)
    assert len(f) == len(shipped.faces)
    assert np.allclose(v[f], shipped.vertices[shipped.faces], atol=1e-6)  # STL stores float32


@pytest.mark.parametrize("gen, params, message", [
    ("catamaran", {"spaceing": 3.0}, r"catamaran: unknown parameter 'spaceing'; did you mean spacing\?"),
    ("trimaran", {}, r"unknown generator 'trimaran'; did you mean catamaran\?"),
    ("catamaran", {"spacing": 0.8}, r"spacing 0.8 m must exceed demihull_beam 0.8 m \(the demihulls would "
                                    r"overlap\)"),
    ("outrigger", {"float_offset": -0.4}, r"the float would overlap the main hull"),
    ("outrigger", {"float_deck": 0.3}, r"float_deck 0.3 m must be above float_keel \+ float_beam/2"),
    ("barge", {"rake_length": 7.0}, r"two raked ends of rake_length 7 m do not fit in length 12 m"),
    ("barge", {"stations": 10.5}, r"barge: stations must be a whole number of at least 4, got 10.5"),
    ("barge", {"beam": -1.0}, r"barge: beam must be positive \[m\], got -1.0"),
    ("barge", {"depth": float("nan")}, r"barge: depth must be a finite number"),
])
def test_generator_errors(gen, params, message):
    with pytest.raises(InputError, match=message):
        make_mesh(gen, params)


def test_existing_scheduler_by_address(tmp_path):
    import logging

    from dask.distributed import LocalCluster

    data = copy.deepcopy(SMALL)
    data["parameters"] = {"spacing": [2.0], "kg": [1.0], "stations": [16]}
    with LocalCluster(n_workers=1, threads_per_worker=1, processes=True, dashboard_address=None,
                      silence_logs=logging.ERROR) as cluster:
        s = run_study(spec_of(data), str(tmp_path), scheduler=cluster.scheduler_address, progress=False)
    assert (s.cases, s.run, s.failed) == (1, 1, 0)


@pytest.mark.parametrize("scheduler, workers, message", [
    ("tcp://127.0.0.1:8786", 2, "workers applies to the local cluster only"),
    (None, 0, "workers must be a whole number of at least 1, got 0"),
    (None, 1.5, "workers must be a whole number of at least 1, got 1.5"),
])
def test_run_options_checked(tmp_path, scheduler, workers, message):
    with pytest.raises(InputError, match=message):
        run_study(spec_of(SMALL), str(tmp_path), scheduler=scheduler, workers=workers, progress=False)


def test_example_study_file_expands():
    from meshhydro.schemas import read_toml

    path = os.path.join(ROOT, "meshes", "studies", "twinfin_spacing_kg.toml")
    cases = expand_cases(validate_study(read_toml(path), path))
    assert len(cases) == 5 * 3 and all(c.kg_limit for c in cases)
    assert os.path.isfile(cases[0].criteria)  # the example criteria set beside the study file


def test_undiagnosed_failure_is_a_row_and_others_run():
    from dataclasses import replace

    from meshhydro.study import run_cases

    good = expand_cases(spec_of(SMALL))[2]
    broken = replace(good, case_id="broken", cog=None, kg=None, params=(("spacing", 2.0),))  # no G at all
    rows = run_cases([broken, good])
    assert rows[0]["case_id"] == "broken" and rows[0]["error"].startswith("unexpected TypeError")
    assert rows[1]["error"] == "" and rows[1]["max_gz_m"] > 0


def test_study_command_refuses_workers_with_a_scheduler(tmp_path):
    """The CLI maps an option that would go unused to one error line and exit 2 (no cluster is started)."""
    from meshhydro.cli import main

    p = tmp_path / "s.toml"
    p.write_text('[study]\nname = "t"\ngenerator = "barge"\n[parameters]\nbeam = [4.0]\n'
                 '[analysis]\ndisplacement = 30.0\nkg = 1.0\n')
    assert main(["study", str(p), "--out", str(tmp_path / "o"), "--workers", "2",
                 "--scheduler", "tcp://127.0.0.1:1"]) == 2


def test_shipped_example_study_runs_its_cases():
    # the example study and its criteria file (three area limits under clause 2.2.1, as the IS Code
    # numbers them) must run as shipped: first and last case of the grid, no error
    from meshhydro.schemas import read_toml

    path = os.path.join(ROOT, "meshes", "studies", "twinfin_spacing_kg.toml")
    cases = expand_cases(validate_study(read_toml(path), path))
    for case in (cases[0], cases[-1]):
        row = run_case(case)
        assert row["error"] == "", row["error"]
        assert row["verdict"] in ("pass", "fail") and row["max_gz_m"] > 0

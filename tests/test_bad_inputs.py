"""Inventory of bad inputs: each is refused with one line naming the file, the table and the key.

The file formats are the project's own (README, "File formats"); the rule checked throughout is the
project's: unknown keys, wrong types (no coercion) and contradicting entries are errors, never ignored.
Each test builds a small document, validates it and compares the whole message.
"""
from __future__ import annotations

import copy
import os

import pytest

from meshhydro.errors import InputError
from meshhydro.schemas import check_against_case, read_toml, validate_case, validate_criteria, validate_study

F = "case.toml"

CASE = {
    "hull": {"mesh": "../brindle_barge.stl", "units": "m"},
    "water": {"density": 1.025},
    "opening": [{"name": "door sill", "at": [2.0, -1.2, 2.3]}],
    "condition": [
        {"name": "loaded", "items": [{"name": "lightship", "mass": 18.0, "at": [5.9, 0.0, 0.85]},
                                     {"name": "fuel", "mass": 2.0, "at": [1.2, 0.0, 0.6], "fsm": 0.9}]},
        {"name": "light", "displacement": 20.0, "cog": [5.9, 0.0, 0.95]},
    ],
}
TANK = {"name": "fore peak", "box": [[10.0, -1.0, 0.0], [12.0, 1.0, 1.0]]}


def case_error(change) -> str:
    data = copy.deepcopy(CASE)
    change(data)
    with pytest.raises(InputError) as exc:
        validate_case(data, F)
    msg = str(exc.value)
    assert "\n" not in msg
    return msg


def test_the_reference_case_is_accepted():
    spec = validate_case(copy.deepcopy(CASE), F)
    assert spec.water.rho == 1.025
    assert spec.conditions[0].items[1].fsm == 0.9
    assert spec.conditions[1].cog == (5.9, 0.0, 0.95)
    assert spec.openings[0].at == (2.0, -1.2, 2.3)
    assert spec.source == F


def test_every_new_key_is_accepted_and_typed():
    data = copy.deepcopy(CASE)
    data["hull"].update(flip_inside_out=True, merge_overlaps=False, close_holes=False, x_ref=6.0, x_aft=0.0,
                        x_fore=12.0, name="Brindle")
    data["water"] = {"kind": "fresh"}
    data["tank"] = [TANK, {"name": "fuel", "mesh": "fuel.stl", "density": 0.85, "permeability": 0.98},
                    {"name": "hull 2", "body": 1}]
    data["compartment"] = [{"name": "hold", "box": TANK["box"], "permeability": 0.85}]
    data["condition"][0].update(fills={"fore peak": 0.5}, soundings={"fuel": 0.3}, volumes={"hull 2": 0.1},
                                flooded=["hold"])
    data["windage"] = [{"name": "deckhouse", "area": 6.0, "centroid": [3.0, 2.5]}, {"name": "mast", "mesh": "m.stl"}]
    data["weather"] = {"bilge": "sharp", "bilge_keel_area": 0.0, "pressure": 504.0, "lever_to": "half_draft"}
    data["arm"] = [{"name": "wind", "kind": "constant", "a": 0.05},
                   {"name": "turn", "kind": "cosine", "a": 0.1, "n": 2},
                   {"name": "crowd", "kind": "table", "table": [[0, 0.1], [30, 0.08], [60, 0.0]]}]
    data["criteria"] = {"set": "imo2008-weather"}
    spec = validate_case(data, "/boats/brindle/case.toml")
    assert spec.hull.x_fore == 12.0 and spec.water.rho == 1.000
    assert spec.tanks[0].box == ((10.0, -1.0, 0.0), (12.0, 1.0, 1.0)) and spec.tanks[0].density == 1.025
    assert spec.tanks[2].body == 1 and spec.tanks[2].permeability == 1.0
    assert spec.conditions[0].fluid == "exact" and spec.conditions[1].fluid == "exact"
    assert spec.windage[0].centroid == (3.0, 2.5)
    assert [a.kind for a in spec.arms] == ["constant", "cosine", "table"] and spec.arms[1].n == 2.0
    assert spec.resolve(spec.tanks[1].mesh) == "/boats/brindle/fuel.stl"


def test_missing_names_are_numbered():
    data = copy.deepcopy(CASE)
    data["opening"][0].pop("name")
    data["condition"][0].pop("name")
    data["condition"][0]["items"][0].pop("name")
    spec = validate_case(data, F)
    assert (spec.openings[0].name, spec.conditions[0].name, spec.conditions[0].items[0].name) == \
        ("opening 1", "condition 1", "item 1")
    assert spec.conditions[0].fluid is None  # no tanks in this case


# ---------------------------------------------------------------- silently ignored keys (issue 9)

def test_misspelt_water_density():
    assert case_error(lambda d: d["water"].update(densty=1.0)) == \
        "case.toml: [water] densty: unknown key; did you mean density?"


def test_fms_on_a_condition():
    assert case_error(lambda d: d["condition"][0].update(fms=20)) == \
        "case.toml: [condition 1] fms: unknown key; did you mean fsm?"


def test_free_surface_on_an_item():
    assert case_error(lambda d: d["condition"][0]["items"][1].update(free_surface=20)) == \
        "case.toml: [condition 1] items[2].free_surface: unknown key; valid keys: name, mass, at, fsm"


def test_items_and_displacement_on_one_condition():
    assert case_error(lambda d: d["condition"][0].update(displacement=60)) == (
        "case.toml: [condition 1] displacement: contradicts items (the items' masses and centres give the "
        "displacement and cog); give items or displacement with cog, not both")


def test_unknown_top_level_table():
    assert case_error(lambda d: d.update(waters={"density": 1.0})) == \
        "case.toml: waters: unknown key; did you mean water?"


def test_unknown_key_in_an_opening():
    assert case_error(lambda d: d["opening"][0].update(height=2.0)) == \
        "case.toml: [opening 1] height: unknown key; valid keys: name, at"


# ---------------------------------------------------------------- wrong types (were tracebacks)

def test_water_as_a_number():
    assert case_error(lambda d: d.update(water=1.0)) == "case.toml: water: must be a table [water], got 1.0"


def test_items_as_a_number():
    assert case_error(lambda d: d["condition"][0].update(items=5)) == \
        "case.toml: [condition 1] items: must be a list, got 5"


def test_condition_as_a_string():
    assert case_error(lambda d: d.update(condition="heavy")) == \
        "case.toml: condition: must be an array of tables [[condition]], got 'heavy'"


def test_opening_as_a_number():
    assert case_error(lambda d: d.update(opening=5)) == \
        "case.toml: opening: must be an array of tables [[opening]], got 5"


def test_negative_mass():
    assert case_error(lambda d: d["condition"][0]["items"][1].update(mass=-3)) == \
        "case.toml: [condition 1] items[2].mass: must be a positive number, got -3"


def test_number_given_as_text():
    assert case_error(lambda d: d["water"].update(density="1.0")) == \
        "case.toml: [water] density: must be a number, got '1.0'"


def test_bool_given_as_text():
    assert case_error(lambda d: d["hull"].update(flip_inside_out="false")) == \
        "case.toml: [hull] flip_inside_out: must be true or false, got 'false'"


def test_cog_with_two_numbers():
    assert case_error(lambda d: d["condition"][1].update(cog=[5.9, 0.95])) == \
        "case.toml: [condition 2] cog: must be a list of 3 numbers [x, y, z], got [5.9, 0.95]"


def test_infinite_number():
    assert case_error(lambda d: d["condition"][1].update(displacement=float("inf"))) == \
        "case.toml: [condition 2] displacement: must be a finite number, got inf"


def test_unknown_unit():
    assert case_error(lambda d: d["hull"].update(units="metre")) == \
        "case.toml: [hull] units: must be 'm', 'mm', 'cm', 'ft' or 'in', got 'metre'"


def test_missing_mesh():
    assert case_error(lambda d: d["hull"].pop("mesh")) == "case.toml: [hull] mesh: missing; this key is required"


def test_no_condition():
    assert case_error(lambda d: d.pop("condition")) == "case.toml: condition: missing; this key is required"


def test_condition_without_load():
    assert case_error(lambda d: d["condition"].__setitem__(1, {"name": "empty"})) == \
        "case.toml: [condition 2] items: missing; give items = [...] or displacement and cog"


def test_forward_and_up_on_one_axis():
    assert case_error(lambda d: d["hull"].update(forward="+z")) == \
        "case.toml: [hull] up: must be another axis than forward (+z), got '+z'"


def test_draft_marks_reversed():
    assert case_error(lambda d: d["hull"].update(x_aft=12.0, x_fore=0.0)) == \
        "case.toml: [hull] x_fore: must be forward of x_aft (12), got 0"


# ---------------------------------------------------------------- water

def test_density_and_kind_disagree():
    assert case_error(lambda d: d["water"].update(kind="fresh")) == \
        "case.toml: [water] density: 1.025 t/m³ disagrees with kind = 'fresh' (1 t/m³); give one of them"


def test_density_in_kg_per_m3():
    # sea water is 1.025 t/m³ (REFERENCES.md, Densities); 1025 is the same in kg/m³, three orders off
    assert case_error(lambda d: d["water"].update(density=1025)) == \
        "case.toml: [water] density: must be in t/m³ (between 0.5 and 2), got 1025"


def test_water_kind_alone_gives_its_density():
    data = copy.deepcopy(CASE)
    data["water"] = {"kind": "fresh"}
    assert validate_case(data, F).water.rho == 1.000  # fresh water 1.000 t/m³ (REFERENCES.md, Densities)


# ---------------------------------------------------------------- tanks, compartments, fills

def test_tank_box_corners_reversed():
    assert case_error(lambda d: d.update(tank=[{"name": "t", "box": [[0, 0, 1], [1, 1, 0]]}])) == (
        "case.toml: [tank 1] box: the first corner must be below the second on every axis (min < max), "
        "got [[0.0, 0.0, 1.0], [1.0, 1.0, 0.0]]")


def test_tank_with_two_shapes():
    assert case_error(lambda d: d.update(tank=[dict(TANK, body=1)])) == \
        "case.toml: [tank 1] body: contradicts box; give only one of box, mesh, body"


def test_tank_without_shape():
    assert case_error(lambda d: d.update(tank=[{"name": "t"}])) == \
        "case.toml: [tank 1] box: missing; give one of box, mesh, body"


def test_tank_permeability_zero():
    assert case_error(lambda d: d.update(tank=[dict(TANK, permeability=0)])) == \
        "case.toml: [tank 1] permeability: must be a positive number, got 0"


def test_compartment_needs_permeability():
    assert case_error(lambda d: d.update(compartment=[{"name": "hold", "box": TANK["box"]}])) == \
        "case.toml: [compartment 1] permeability: missing; this key is required"


def test_fill_of_an_unknown_tank():
    def change(d):
        d["tank"] = [TANK]
        d["condition"][0]["fills"] = {"fore peek": 0.5}
    assert case_error(change) == \
        'case.toml: [condition 1] fills."fore peek": no [[tank]] named \'fore peek\'; did you mean fore peak?'


def test_fill_above_one():
    def change(d):
        d["tank"] = [TANK]
        d["condition"][0]["fills"] = {"fore peak": 1.5}
    assert case_error(change) == 'case.toml: [condition 1] fills."fore peak": must be at most 1, got 1.5'


def test_two_fills_for_one_tank():
    def change(d):
        d["tank"] = [TANK]
        d["condition"][0]["fills"] = {"fore peak": 0.5}
        d["condition"][0]["volumes"] = {"fore peak": 1.0}
    assert case_error(change) == \
        "case.toml: [condition 1] volumes: tank 'fore peak' already has a fill in fills; one fill per tank"


def test_flooded_unknown_compartment():
    def change(d):
        d["compartment"] = [{"name": "hold", "box": TANK["box"], "permeability": 0.85}]
        d["condition"][0]["flooded"] = ["engine room"]
    assert case_error(change) == \
        "case.toml: [condition 1] flooded[1]: no [[compartment]] named 'engine room'; compartments: hold"


def test_fluid_without_tanks():
    assert case_error(lambda d: d["condition"][0].update(fluid="exact")) == \
        "case.toml: [condition 1] fluid: applies to tank fluid, and this case has no [[tank]]"


def test_duplicate_tank_names():
    assert case_error(lambda d: d.update(tank=[TANK, TANK])) == \
        "case.toml: [tank 2] name: 'fore peak' is used twice; names must be unique"


# ---------------------------------------------------------------- windage, weather, arms, criteria ref

def test_windage_area_without_centroid():
    assert case_error(lambda d: d.update(windage=[{"name": "deckhouse", "area": 6.0}])) == \
        "case.toml: [windage 1] centroid: missing; area and centroid go together"


def test_weather_bilge_kind():
    assert case_error(lambda d: d.update(weather={"bilge": "square"})) == \
        "case.toml: [weather] bilge: must be 'round' or 'sharp', got 'square'"


def test_arm_kind_misspelt():
    assert case_error(lambda d: d.update(arm=[{"name": "wind", "kind": "cosin", "a": 0.1}])) == \
        "case.toml: [arm 1] kind: must be one of constant, cosine, table, got 'cosin'; did you mean cosine?"


def test_arm_table_angles_not_increasing():
    assert case_error(lambda d: d.update(arm=[{"name": "w", "kind": "table", "table": [[0, 0.1], [0, 0.2]]}])) \
        == "case.toml: [arm 1] table: angles must increase strictly; row 2 (0°) follows 0°"


def test_arm_unknown_key():
    assert case_error(lambda d: d.update(arm=[{"name": "w", "kind": "cosine", "a": 0.1, "m": 2}])) == \
        "case.toml: [arm 1] m: unknown key; valid keys: name, kind, a, n"


def test_weather_set_without_weather_data():
    assert case_error(lambda d: d.update(criteria={"set": "imo2008-weather"})) == \
        "case.toml: [criteria] set: imo2008-weather needs the [weather] data of this case; none given"


def test_criteria_set_neither_builtin_nor_file():
    assert case_error(lambda d: d.update(criteria={"set": "imo"})) == \
        "case.toml: [criteria] set: must be imo2008 or imo2008-weather or a path to a .toml file, got 'imo'"


# ---------------------------------------------------------------- criteria files

C = "set.toml"


def criteria_error(*criteria: dict, **top) -> str:
    with pytest.raises(InputError) as exc:
        validate_criteria(dict(top, criterion=list(criteria)), C)
    return str(exc.value)


def test_criteria_flag_as_text():
    # a non-empty string would read as true in Python; strict schemas refuse it
    assert criteria_error({"kind": "area", "from": 0, "to": 40, "to_flooding": "false", "minimum": 0.09}) == \
        "set.toml: [criterion 1] to_flooding: must be true or false, got 'false'"


def test_criteria_as_a_string():
    with pytest.raises(InputError) as exc:
        validate_criteria({"criterion": "gm"}, C)
    assert str(exc.value) == "set.toml: criterion: must be an array of tables [[criterion]], got 'gm'"


def test_criteria_area_backwards():
    assert criteria_error({"kind": "area", "from": 40, "to": 0, "minimum": 0.09}) == \
        "set.toml: [criterion 1] to: must be above from (40°), got 0°"


def test_criteria_unknown_kind():
    assert criteria_error({"kind": "gmm", "minimum": 0.15}).startswith(
        "set.toml: [criterion 1] kind: must be one of area, gz_at, ")
    assert criteria_error({"kind": "gmm", "minimum": 0.15}).endswith(", got 'gmm'; did you mean gm?")


def test_criteria_minimum_and_maximum():
    assert criteria_error({"kind": "gm", "minimum": 0.15, "maximum": 3.0}) == \
        "set.toml: [criterion 1] maximum: contradicts minimum; give minimum or maximum, not both"


def test_criteria_no_limit():
    assert criteria_error({"kind": "gm"}) == "set.toml: [criterion 1] minimum: missing; give minimum or maximum"


def test_criteria_key_of_another_kind():
    assert criteria_error({"kind": "gm", "minimum": 0.15}, {"kind": "range", "angle": 30, "minimum": 20}) == \
        "set.toml: [criterion 2] angle: unknown key; valid keys: id, text, minimum, maximum, kind"


def test_criteria_weather_takes_no_limit():
    assert criteria_error({"kind": "weather", "minimum": 1.0}) == \
        "set.toml: [criterion 1] minimum: unknown key; valid keys: id, text, kind"


def test_criteria_residual_area_needs_an_end():
    assert criteria_error({"kind": "arm_residual_area", "arm": "wind", "minimum": 0.01}) == \
        "set.toml: [criterion 1] to: missing; give to (deg) or to_flooding = true"


def test_criteria_angle_beyond_180():
    assert criteria_error({"kind": "gz_at", "angle": 200, "minimum": 0.2}) == \
        "set.toml: [criterion 1] angle: must be at most 180, got 200"


def test_criteria_duplicate_ids():
    assert criteria_error({"id": "A", "kind": "gm", "minimum": 0.15}, {"id": "A", "kind": "gm", "minimum": 1}) == \
        "set.toml: [criterion 2] id: 'A' is used twice; ids must be unique"


def test_criteria_empty():
    assert criteria_error() == "set.toml: criterion: must not be empty, got []"


def test_criteria_unknown_top_key():
    assert criteria_error({"kind": "gm", "minimum": 0.15}, nmae="x") == \
        "set.toml: nmae: unknown key; did you mean name?"


def test_criteria_arm_missing_from_the_case():
    case = validate_case(copy.deepcopy(CASE), F)
    crit = validate_criteria({"criterion": [{"kind": "arm_equilibrium", "arm": "wind", "maximum": 16.0}]}, C)
    with pytest.raises(InputError) as exc:
        check_against_case(crit, case, C)
    assert str(exc.value) == "set.toml: [criterion 1] arm: no arm named 'wind'; case.toml has no [[arm]]"


def test_criteria_arm_misspelt():
    data = copy.deepcopy(CASE)
    data["arm"] = [{"name": "wind", "kind": "constant", "a": 0.05}]
    case = validate_case(data, F)
    crit = validate_criteria({"criterion": [{"kind": "arm_equilibrium", "arm": "wnd", "maximum": 16.0}]}, C)
    with pytest.raises(InputError) as exc:
        check_against_case(crit, case, C)
    assert str(exc.value) == "set.toml: [criterion 1] arm: no arm named 'wnd'; did you mean wind?"


def test_weather_criterion_without_weather_data():
    case = validate_case(copy.deepcopy(CASE), F)
    with pytest.raises(InputError) as exc:
        check_against_case(validate_criteria({"criterion": [{"kind": "weather"}]}, C), case, C)
    assert str(exc.value) == "set.toml: [criterion 1] kind: weather needs [weather] and [[windage]] in case.toml"


# ---------------------------------------------------------------- study files

S = "study.toml"
STUDY = {"study": {"name": "beam sweep", "generator": "catamaran"},
         "parameters": {"beam": [4.0, 5.0], "length": {"start": 8.0, "stop": 10.0, "step": 1.0}},
         "analysis": {"displacement": 3.0, "kg": 1.2, "heels": {"start": 0, "stop": 90, "step": 5}}}


def study_error(change) -> str:
    data = copy.deepcopy(STUDY)
    change(data)
    with pytest.raises(InputError) as exc:
        validate_study(data, S)
    return str(exc.value)


def test_study_ranges_expand():
    spec = validate_study(copy.deepcopy(STUDY), S)
    assert spec.values("length") == [8.0, 9.0, 10.0]
    assert len(spec.analysis.heels.values()) == 19  # 0..90 in 5° steps, both ends included


def test_study_generator_and_meshes():
    assert study_error(lambda d: d["study"].update(meshes=["a.stl"])) == \
        "study.toml: [study] meshes: contradicts generator; give generator or meshes, not both"


def test_study_unknown_generator():
    assert study_error(lambda d: d["study"].update(generator="trimaran")) == \
        (
        "study.toml: [study] generator: must be 'catamaran', 'outrigger' or 'barge', got 'trimaran'; "
        "did you mean catamaran?")


def test_study_parameter_value_as_text():
    assert study_error(lambda d: d["parameters"].update(beam=[4.0, "5"])) == \
        "study.toml: [parameters] beam[2]: must be a number, got '5'"


def test_study_parameter_scalar():
    assert study_error(lambda d: d["parameters"].update(beam=5)) == \
        "study.toml: [parameters] beam: must be a list, got 5"


def test_study_range_misspelt():
    assert study_error(lambda d: d["parameters"].update(beam={"start": 1, "stop": 2, "steps": 1})) == \
        "study.toml: [parameters] beam.steps: unknown key; did you mean step?"


def test_study_range_backwards():
    assert study_error(lambda d: d["parameters"].update(beam={"start": 2, "stop": 1, "step": 1})) == \
        "study.toml: [parameters] beam.stop: must not be below start (2), got 1"


def test_study_criteria_set_unknown():
    assert study_error(lambda d: d["analysis"].update(criteria="imo2009")) == (
        "study.toml: [analysis] criteria: must be imo2008 or imo2008-weather or a path to a .toml file, "
        "got 'imo2009'")


def test_study_meshes_relative_to_the_file():
    data = copy.deepcopy(STUDY)
    data["study"] = {"name": "two hulls", "meshes": ["a.stl", "../b.stl"]}
    spec = validate_study(data, "/data/studies/s.toml")
    assert spec.mesh_paths() == ["/data/studies/a.stl", "/data/b.stl"]


def test_study_kg_and_cog():
    assert study_error(lambda d: d["analysis"].update(cog=[4.0, 0.0, 1.2])) == \
        "study.toml: [analysis] cog: contradicts kg; give kg or cog, not both"


# ---------------------------------------------------------------- reading the file

def test_missing_file(tmp_path):
    p = str(tmp_path / "nope.toml")
    with pytest.raises(InputError, match=r"nope\.toml: no such file$"):
        read_toml(p)


def test_non_utf8_bytes(tmp_path):
    p = tmp_path / "latin1.toml"
    p.write_bytes(b'[hull]\nmesh = "caf\xe9.stl"\n')
    with pytest.raises(InputError) as exc:
        read_toml(str(p))
    # 0xe9 is é in Latin-1 and not a valid UTF-8 sequence on its own (RFC 3629)
    assert str(exc.value) == f"{p}: not UTF-8 text: byte 0xe9 at byte offset 18 (line 2); save the file as UTF-8"


def test_toml_syntax_error(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_text('[hull]\nmesh = "a.stl"\nunits = m\n')
    with pytest.raises(InputError) as exc:
        read_toml(str(p))
    assert str(exc.value).startswith(f"{p}: line 3, column 9: not valid TOML (")


def test_folder_instead_of_file(tmp_path):
    with pytest.raises(InputError, match="is a folder, not a TOML file"):
        read_toml(str(tmp_path))


def test_utf8_with_byte_order_mark_reads(tmp_path):
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbfname = \"x\"\n")
    assert read_toml(str(p)) == {"name": "x"}


def test_shipped_case_files_validate():
    here = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "meshes", "cases")
    files = sorted(f for f in os.listdir(here) if f.endswith(".toml"))
    assert files
    for f in files:
        path = os.path.join(here, f)
        spec = validate_case(read_toml(path), path)
        assert spec.conditions and os.path.isabs(spec.mesh_path)

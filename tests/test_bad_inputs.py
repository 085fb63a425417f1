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
        ("set.toml: [criterion 2] id: 'A' already names criterion 1, which measures the same; give this limit its "
         "own id or remove one")


def test_criteria_one_clause_may_hold_several_limits():
    # the IS Code's 2.2.1 sets three area limits under one clause number; the built-in set uses that id
    # three times and a user file may too (results sharing an id pass together)
    spec = [{"id": "2.2.1", "kind": "area", "from": 0.0, "to": 30.0, "minimum": 0.055},
            {"id": "2.2.1", "kind": "area", "from": 0.0, "to": 40.0, "minimum": 0.09},
            {"id": "2.2.1", "kind": "area", "from": 30.0, "to": 40.0, "minimum": 0.03}]
    assert [c.id for c in validate_criteria({"criterion": spec}, C).criteria] == ["2.2.1"] * 3
    # a minimum and a maximum of one quantity under one id make a band (allowed)
    band = [{"id": "GM", "kind": "gm", "minimum": 0.15}, {"id": "GM", "kind": "gm", "maximum": 3.0}]
    assert len(validate_criteria({"criterion": band}, C).criteria) == 2
    # without a text each limit is described by its parameters, so that the rows can be told apart
    from meshhydro.criteria import criteria_from_spec

    spec[1]["to_flooding"] = True
    texts = [c.text for c in criteria_from_spec(validate_criteria({"criterion": spec}, C), C).items]
    assert texts == ["area from 0° to 30°", "area from 0° to 40°, or to the downflooding angle if less",
                     "area from 30° to 40°"]


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


# ---------------------------------------------------------------- the command line
# Each path below once ended in a traceback, a silently ignored option or a wrong file. The rule checked is the
# README's: an error is one line on standard error, exit 2 for bad input, never a traceback; every option is
# honoured or refused.

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BARGE = os.path.join(ROOT, "meshes", "brindle_barge.stl")
BARGE_CASE = os.path.join(ROOT, "meshes", "cases", "brindle_barge.toml")
QUICK = ["--displacement", "20", "--cog", "5.9,0,0.95"]


def refused(capsys, *argv: str, code: int = 2) -> str:
    """Run the CLI in-process; assert the exit code and a single error line without a traceback."""
    from meshhydro.cli import main

    rc = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    lines = err.strip().splitlines()
    assert rc == code, err
    assert len(lines) == 1 and lines[0].startswith("meshhydro: error: "), err
    assert "Traceback" not in err
    return lines[0]


COND = '[[condition]]\nname = "light"\ndisplacement = 20.0\ncog = [5.9, 0.0, 0.95]\n'


def test_cli_table_at_trim_90(capsys):
    msg = refused(capsys, "table", BARGE, "--drafts", "0.5", "--trim", "90")
    assert "trim 90°: a table over drafts takes heel and trim between -90 and 90°" in msg


def test_cli_table_at_heel_90(capsys):
    # at 90° of heel the waterplane holds the z axis: every draft would give the same row
    assert "heel 90°" in refused(capsys, "table", BARGE, "--drafts", "0.5,0.6", "--heel", "90")


def test_cli_float_with_g_far_outside_the_hull(capsys):
    msg = refused(capsys, "float", BARGE, "--displacement", "20", "--cog", "1000,0,1")
    assert "centre of gravity x = 1000 m lies outside the hull's length (x 0.000..12.000 m)" in msg


def test_cli_cross_curves_lcg_nan(capsys):
    assert refused(capsys, "cross-curves", BARGE, "--displacements", "20", "--lcg", "nan").endswith(
        "--lcg nan is not a finite number")


def test_cli_displacement_inf(capsys):
    assert "--displacement inf is not a finite number" in refused(capsys, "float", BARGE, "--displacement", "inf",
                                                                  "--cog", "5.9,0,0.95")


@pytest.mark.parametrize("top, rest, where", [
    ("water = 1.0", COND, "water: must be a table"),
    ("", '[[condition]]\nname = "a"\nitems = 5\n', "[condition 1] items: must be a list, got 5"),
    ('condition = "heavy"', "", "condition"),
    ("opening = 5", COND, "opening"),
])
def test_cli_case_file_of_wrong_shape(capsys, tmp_path, top, rest, where):
    p = tmp_path / "case.toml"
    p.write_text(f'{top}\n[hull]\nmesh = "{BARGE}"\n{rest}')  # top-level keys come before the first table
    msg = refused(capsys, "float", str(p))
    assert str(p) in msg and where in msg


def test_cli_case_file_not_utf8(capsys, tmp_path):
    p = tmp_path / "latin1.toml"
    p.write_bytes(b'[hull]\nmesh = "caf\xe9.stl"\n')
    assert "not UTF-8 text: byte 0xe9" in refused(capsys, "float", str(p))


@pytest.mark.parametrize("criterion, where", [
    ('criterion = "gm"\nminimum = 0.15', "[criterion 1] kind: missing; this key is required"),
    ('kind = "area"\nfrom = 40\nto = 0\nminimum = 0.05', "[criterion 1] to: must be above from (40°), got 0°"),
    ('kind = "area"\nfrom = 0\nto = 30\nto_flooding = "false"\nminimum = 0.05',
     "[criterion 1] to_flooding: must be true or false, got 'false'"),
])
def test_cli_criteria_file_refused(capsys, tmp_path, criterion, where):
    p = tmp_path / "set.toml"
    p.write_text(f"[[criterion]]\n{criterion}\n")
    msg = refused(capsys, "criteria", BARGE_CASE, "--set", str(p), "--heels", "0:40:10")
    assert msg == f"meshhydro: error: {p}: {where}"


def _offsets(tmp_path) -> str:
    from meshhydro import load_hull, sections as S

    hull = load_hull(BARGE)
    p = tmp_path / "off.csv"
    p.write_text(S.offsets_from_mesh(hull, 4, 4).to_csv())
    return str(p)


def test_cli_offsets_loft_to_a_folder(capsys, tmp_path):
    d = tmp_path / "dir"
    d.mkdir()
    assert "is a folder" in refused(capsys, "offsets", _offsets(tmp_path), "--loft", str(d))


def test_cli_offsets_loft_to_a_point_cloud_suffix(capsys, tmp_path):
    msg = refused(capsys, "offsets", _offsets(tmp_path), "--loft", str(tmp_path / "x.xyz"))
    assert "cannot write a mesh with suffix .xyz; use .stl, .obj, .ply, .off" in msg
    assert sorted(os.listdir(tmp_path)) == ["off.csv"]


def test_cli_offsets_mesh_options_without_compare(capsys, tmp_path):
    assert "--units: mesh options apply to the --compare mesh" in refused(
        capsys, "offsets", _offsets(tmp_path), "--units", "mm")


@pytest.mark.parametrize("cmd", [["table", BARGE, "--drafts", "0.5"], ["righting", BARGE_CASE],
                                 ["criteria", BARGE_CASE], ["cross-curves", BARGE, "--displacements", "20"],
                                 ["sections", BARGE]])
def test_cli_plot_suffix_refused_before_computing(capsys, tmp_path, cmd):
    msg = refused(capsys, *cmd, "--plot", str(tmp_path / "gz.jpg"))
    assert "cannot write a figure with suffix .jpg; use .png, .svg, .pdf" in msg
    assert os.listdir(tmp_path) == []


def test_cli_compare_out_suffix_refused(capsys, tmp_path):
    assert "--out" in refused(capsys, "compare", BARGE_CASE, BARGE_CASE, "--out", str(tmp_path / "c.jpg"))


@pytest.mark.parametrize("opt", [["--units", "mm"], ["--up", "+y"], ["--forward=-x"], ["--offset", "1,0,0"],
                                 ["--merge-overlaps"], ["--flip-inside-out"]])
def test_cli_mesh_options_with_a_case_file(capsys, opt):
    msg = refused(capsys, "float", BARGE_CASE, *opt)
    assert msg.startswith(f"meshhydro: error: {opt[0].split('=')[0]}: not taken with a case file; the case file's [hull] table")


def test_cli_mesh_options_with_a_case_file_for_cross_curves(capsys):
    assert "--units: not taken with a case file" in refused(capsys, "cross-curves", BARGE_CASE, "--displacements",
                                                            "20", "--units", "mm")


def test_cli_water_and_density_both(capsys):
    assert refused(capsys, "float", BARGE, *QUICK, "--water", "fresh", "--density", "1.025").endswith(
        "--water fresh and --density 1.025: give one of them, not both")


@pytest.mark.parametrize("opt", [["--fsm", "2"], ["--opening", "door=2,0,2"], ["--displacement", "20"]])
def test_cli_load_options_with_a_case_file(capsys, opt):
    assert "not taken with a case file" in refused(capsys, "righting", BARGE_CASE, *opt)


def test_cli_condition_with_a_mesh(capsys):
    assert "--condition: " in refused(capsys, "float", BARGE, *QUICK, "--condition", "light")


def test_cli_opening_where_unused(capsys, tmp_path):
    assert "--opening: this command does not use openings" in refused(capsys, "float", BARGE, *QUICK, "--opening",
                                                                      "door=2,0,2")


def test_cli_sweep_3d_options_with_section_view(capsys, tmp_path):
    msg = refused(capsys, "sweep", BARGE_CASE, "--view", "section", "--gif", "--out", str(tmp_path / "s"))
    assert "--gif: these shape the 3D frames" in msg
    msg = refused(capsys, "sweep", BARGE_CASE, "--view", "section", "--smooth-edges", "--out", str(tmp_path / "s"))
    assert "--smooth-edges: these shape the 3D frames" in msg


# ---------------------------------------------------------------- files follow what was asked for


def test_cli_plot_writes_the_format_its_suffix_names(capsys, tmp_path):
    from meshhydro.cli import main

    pdf, svg = tmp_path / "curves.pdf", tmp_path / "gz.svg"
    assert main(["table", BARGE, "--drafts", "0.4,0.8", "--plot", str(pdf)]) == 0
    assert main(["righting", BARGE_CASE, "--heels", "0:30:10", "--quiet", "--plot", str(svg)]) == 0
    capsys.readouterr()
    # file signatures: PDF files begin with "%PDF-" (ISO 32000-1, 7.5.2); SVG is XML with an <svg> root (W3C SVG 1.1)
    assert pdf.read_bytes().startswith(b"%PDF-")
    assert b"<svg" in svg.read_bytes()[:2000]


def test_cli_compare_writes_svg(capsys, tmp_path):
    from meshhydro.cli import main

    out = tmp_path / "c.svg"
    light = f"{BARGE_CASE}@light"
    assert main(["compare", BARGE_CASE, light, "--heels", "0:10:5", "--out", str(out)]) == 0
    capsys.readouterr()
    assert b"<svg" in out.read_bytes()[:2000]  # W3C SVG 1.1: an XML document with an <svg> root


def test_cli_csv_lengths_rounded_to_a_micrometre(capsys):
    from meshhydro.cli import main

    assert main(["table", BARGE, "--drafts", "0.1,0.3,0.7", "--format", "csv"]) == 0
    lines = capsys.readouterr().out.splitlines()
    head = lines[0].split(",")
    # the caution follows the table as a comment line (the binding rule: safety-relevant output carries it)
    assert lines[-1].startswith("# CAUTION: a design aid, not an approval")
    for line in (x for x in lines[1:] if not x.startswith("#")):
        for k, cell in zip(head, line.split(","), strict=True):
            # lengths in metres to 1e-6 m (what the data mean), no binary noise such as 0.30000000000000004
            if k in ("draft", "lcb", "vcb", "bmt", "kmt", "lwl", "bwl"):
                assert len(cell.split(".")[1]) <= 6 if "." in cell else True, (k, cell)
            assert "e" not in cell.lower(), (k, cell)  # fixed-point throughout, no exponent form


def test_cli_offsets_compare_with_csv(capsys, tmp_path):
    # the CSV output carries the table's estimates only: a comparison asked for would be computed and dropped
    assert "--compare: the CSV output holds the table's estimates only" in refused(
        capsys, "offsets", _offsets(tmp_path), "--compare", BARGE, "--format", "csv")


def test_cli_compare_with_g_outside_the_hull(capsys, tmp_path):
    p = tmp_path / "far.toml"
    p.write_text(f'[hull]\nmesh = "{BARGE}"\n[[condition]]\nname = "far"\ndisplacement = 20.0\n'
                 f'cog = [5.9, 40.0, 0.95]\n')
    msg = refused(capsys, "compare", BARGE_CASE, str(p), "--out", str(tmp_path / "c.png"))
    assert "centre of gravity y = 40 m lies outside the hull's breadth (y -2.400..2.400 m)" in msg


def test_cli_case_criteria_set_is_honoured(capsys, tmp_path):
    from meshhydro.cli import main

    (tmp_path / "ours.toml").write_text('[[criterion]]\nid = "GM-ours"\nkind = "gm"\nminimum = 0.15\n')
    p = tmp_path / "case.toml"
    p.write_text(f'[hull]\nmesh = "{BARGE}"\n[criteria]\nset = "ours.toml"\n{COND}')
    rc = main(["criteria", str(p), "--heels", "0:30:10", "--quiet", "--format", "json"])
    out = capsys.readouterr().out
    assert rc == 0 and '"GM-ours"' in out and "2.2.1" not in out  # the case's own set, not the default
    msg = refused(capsys, "criteria", str(p), "--set", "imo2008", "--heels", "0:30:10")
    assert msg.endswith("[criteria]; give one of them")


def test_cli_case_draft_marks_are_honoured(capsys, tmp_path):
    import json
    import math

    from meshhydro.cli import main

    p = tmp_path / "marks.toml"
    p.write_text(f'[hull]\nmesh = "{BARGE}"\nx_aft = 2.0\nx_fore = 10.0\n'
                 f'[[condition]]\nname = "trimmed"\ndisplacement = 40.0\ncog = [5.0, 0.0, 0.9]\n')
    assert main(["float", str(p), "--format", "json"]) == 0
    eq = json.loads(capsys.readouterr().out)["equilibrium"]
    assert (eq["x_aft"], eq["x_fore"]) == (2.0, 10.0)
    # drafts at the marks on a plane waterline (trim + bow down): d_fore - d_aft = (x_fore - x_aft) tan(trim),
    # and the reference point x_ref = 6 m lies midway between the marks (geometry)
    assert eq["draft_fore"] - eq["draft_aft"] == pytest.approx(8.0 * math.tan(math.radians(eq["trim"])), abs=1e-9)
    assert 0.5 * (eq["draft_fore"] + eq["draft_aft"]) == pytest.approx(eq["draft"], abs=1e-9)
    assert eq["trim"] < -0.1  # G aft of mid-length: trimmed by the stern


def test_cli_json_says_vessel_density_and_units(capsys):
    import json

    from meshhydro.cli import main

    assert main(["righting", BARGE_CASE, "--heels", "0:20:10", "--quiet", "--water", "fresh", "--format",
                 "json"]) == 0
    meta = json.loads(capsys.readouterr().out)["meta"]
    # fresh water is 1.000 t/m³ (README conventions; common practice)
    assert meta["density"] == 1.0 and meta["vessel"].endswith("brindle_barge.stl")
    assert meta["units"]["gz"] == "m" and meta["units"]["heel"] == "deg" and meta["caution"].startswith("CAUTION")


def test_a_metre_mesh_read_as_millimetres_is_refused(capsys):
    # A 12 m barge read with --units mm is 12 mm long: a unit mistake, refused (exit 3), never a table of numbers
    from meshhydro.cli import main

    assert main(["table", os.path.join(ROOT, "meshes", "brindle_barge.stl"), "--units", "mm",
                 "--drafts", "0.0005"]) == 3
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "0.012 m long in unit 'mm'" in err[0] and "unit mistake" in err[0]


def test_a_folder_in_place_of_a_case_or_mesh(capsys):
    from meshhydro.cli import main

    assert main(["float", os.path.join(ROOT, "meshes", "cases")]) == 2
    assert "is a folder; give a case file (.toml) or a mesh file" in capsys.readouterr().err


def test_cli_option_errors_are_one_line_with_a_hint(capsys):
    # a negative range read as an option: one line that says how to write it, no usage block
    from meshhydro.cli import main

    with pytest.raises(SystemExit) as exc:
        main(["righting", BARGE_CASE, "--heels", "-30:30:5"])
    err = capsys.readouterr().err
    assert exc.value.code == 2 and err.count("\n") == 1
    assert "--heels=-30:30:5" in err and "usage:" not in err
    with pytest.raises(SystemExit) as exc:
        main(["table", BARGE, "--nonesuch"])
    err = capsys.readouterr().err
    assert exc.value.code == 2 and err.count("\n") == 1 and "--nonesuch" in err

"""Tanks and flooded compartments through the solver, the curves, the criteria and the CLI.

References (see /work/shared/REFERENCES.md): the textbook rectangular-tank fluid shift and virtual
rise of G (Barrass & Derrett, Ship Stability for Masters and Mates; Rawson & Tupper, Basic Ship
Theory), the textbook lost-buoyancy box barge and the closed-form list of a bilged side compartment
(same sources; wall-sided geometry), trimesh slice_plane(cap=True) (general-purpose library) for the
fluid volume, and a central difference for the exact derivative of G.
"""
from __future__ import annotations

import json
import math
import os

import numpy as np
import pytest
import trimesh

from conftest import ROOT
from closed_forms import bilged_side_list
from meshhydro import analysis
from meshhydro.cli import main
from meshhydro.criteria import IMO_2008_GENERAL
from meshhydro.damage import compartment_from_box
from meshhydro.equilibrium import solve_load
from meshhydro.fluid import FluidLoad
from meshhydro.forms import box
from meshhydro.load import FixedLoad
from meshhydro.stability import curve_for_load
from meshhydro.tank_load import TankLoad
from meshhydro.tanks import tank_from_box

L, B, D = 20.0, 6.0, 4.0  # the box_hull fixture: x 0..20, |y| <= 3, z 0..4
TANK = [[8.0, -2.0, 0.2], [12.0, 2.0, 2.2]]  # 4 m long, 4 m wide, 2 m deep, centred on x = 10, y = 0


def _loads(fill, rho=1.0, solid=(300.0, (10.0, 0.0, 1.8)), corners=TANK):
    t = tank_from_box("centre", corners, density=rho)
    fl = FluidLoad.from_fills([t], {"centre": fill})
    m, g = solid
    exact = TankLoad(m, np.array(g) * m, fl)
    fsm = FixedLoad(exact.displacement, exact.cog, fl.fsm_upright())
    return t, fl, exact, fsm


# textbook: the fluid of a rectangular tank with its surface on the walls moves b² tan φ / (12 h) across
# and b² tan² φ / (24 h) up, so the exact loss of GZ is (FSM/Δ) sin φ (1 + ½ tan² φ) against the
# virtual rise's (FSM/Δ) sin φ: the two curves agree at small heel and differ by (FSM/Δ) ½ tan² φ sin φ.
# Fixed trim at zero (G over the box's LCB) keeps B the same on both curves.
def test_exact_and_fsm_curves_wall_sided_tank(box_hull):
    t, fl, exact, fsm = _loads(0.5)
    fsm_m = fl.fsm_upright()
    assert fsm_m == pytest.approx(1.0 * 4.0 * 4.0**3 / 12, rel=1e-12)  # i = l b³ / 12 (textbook)
    heels = [0.0, 1.0, 2.0, 5.0, 10.0, 20.0, 30.0]  # on the walls up to atan(1 / 2) = 26.6° (30° skipped)
    ce = curve_for_load(box_hull, exact, heels=heels, free_trim=False)
    cf = curve_for_load(box_hull, fsm, heels=heels, free_trim=False)
    delta = exact.displacement
    for k, h in enumerate(heels):
        p = math.radians(h)
        if 0.5 * 4.0 * math.tan(p) > 1.0:  # half fill, h = 1 m: the surface reaches top and bottom
            continue
        expected = -fsm_m / delta * 0.5 * math.tan(p) ** 2 * math.sin(p)
        assert ce.gz[k] - cf.gz[k] == pytest.approx(expected, abs=1e-10)
    # small heel: the textbook virtual rise holds to third order in φ
    assert abs(ce.gz[1] - cf.gz[1]) < 1e-6
    # both give the same upright GM, GM_solid - FSM/Δ (textbook virtual rise)
    assert ce.gm_upright == pytest.approx(cf.gm_upright, abs=1e-9)


# a nearly full tank presses its fluid against the top at moderate heel: the fluid hardly moves and the
# exact curve lies above the virtual-rise curve (common practice: FSM overstates nearly full tanks)
def test_tank_pressing_up_differs_from_fsm(box_hull):
    _, _, exact, fsm = _loads(0.97)
    heels = [0.0, 1.0, 30.0]
    ce = curve_for_load(box_hull, exact, heels=heels, free_trim=False)
    cf = curve_for_load(box_hull, fsm, heels=heels, free_trim=False)
    assert abs(ce.gz[1] - cf.gz[1]) < 1e-5  # small angle: the surface is still on the walls
    assert ce.gz[2] - cf.gz[2] > 0.5 * (fsm.fsm / fsm.displacement) * math.sin(math.radians(30))


# exact derivative of G (-Σ ρ J dn / Δ) against a central difference of the exact centre
def test_centre_derivatives_match_central_difference():
    _, _, exact, _ = _loads(0.4, corners=[[8.0, -2.0, 0.2], [12.0, 1.0, 2.2]])
    h, t, d = 7.0, 1.5, 1e-4
    num = np.column_stack([
        (exact.centre(h + d, t) - exact.centre(h - d, t)) / math.radians(2 * d),
        (exact.centre(h, t + d) - exact.centre(h, t - d)) / math.radians(2 * d)])
    assert np.allclose(exact.centre_derivatives(h, t), num, atol=1e-7)


# an off-centre slack tank lists the vessel; at the solved equilibrium the fluid volume below the level
# surface is the fill's (checked by trimesh slice_plane with cap, independent of the kernel)
def test_equilibrium_with_tank_conserves_fluid(box_hull):
    t, fl, exact, _ = _loads(0.3, rho=1.025, corners=[[6.0, 0.5, 0.2], [14.0, 2.9, 2.2]])
    eq = solve_load(box_hull, exact)
    assert eq.heel < -0.1  # the port tank lists it to port (negative heel)
    (st,) = fl.states(eq.up)
    assert np.allclose(st.normal, eq.up, atol=1e-15)
    body = trimesh.Trimesh(t.vertices, t.faces, process=False)
    part = body.slice_plane(st.level_point, -st.normal, cap=True)
    assert part.volume == pytest.approx(0.3 * t.capacity, rel=1e-9)
    assert np.allclose(part.center_mass, st.centroid, atol=1e-9)
    # B is on the vertical through the shifted G
    assert np.linalg.norm(np.cross(eq.cob - exact.centre(eq.heel, eq.trim), eq.up)) < 1e-7


# textbook lost buoyancy (box barge, midship compartment bilged): sinkage μ l B T / ((L - μ l) B),
# found here by the full free-trim solver with the compartment flooded
def test_bilged_midship_compartment_by_solver(box_hull):
    T0, ell, mu = 1.5, 4.0, 0.85
    comp = compartment_from_box("midship", [[8.0, -3.0, 0.0], [12.0, 3.0, 4.0]], permeability=mu)
    load = FixedLoad(L * B * T0 * 1.025, (10.0, 0.0, 1.0))
    eq = solve_load(box_hull, load, compartments=[comp])
    assert eq.draft - T0 == pytest.approx(mu * ell * B * T0 / ((L - mu * ell) * B), rel=1e-9)
    assert abs(eq.heel) < 1e-9 and abs(eq.trim) < 1e-9
    # the new BMt from the intact waterplane, I = (L - μ l) B³ / 12, over the volume L B T0
    assert eq.hydrostatics.bmt == pytest.approx((L - mu * ell) * B**3 / 12 / (L * B * T0), rel=1e-9)


# a bilged full-depth side compartment: the list by the full solver against the closed form
# tan φ (GM + ½ BM tan² φ) = y_B1 of the wall-sided net body (textbook lost buoyancy, wall-sided formula)
def test_bilged_side_compartment_list_by_solver(box_hull):
    T0, kg = 1.5, 1.2
    ell, b, yc = 4.0, 1.0, -2.5
    comp = compartment_from_box("starboard wing", [[8.0, -3.0, 0.0], [12.0, -2.0, 4.0]], permeability=1.0)
    v0 = L * B * T0
    eq = solve_load(box_hull, FixedLoad(v0 * 1.025, (10.0, 0.0, kg)), compartments=[comp])
    tan_phi = bilged_side_list(L, B, v0, kg, ell, b, yc)[0]
    assert eq.heel > 0  # lists to the damaged (starboard) side
    assert math.tan(math.radians(eq.heel)) == pytest.approx(tan_phi, rel=1e-8)


# ---------------------------------------------------------------------------- case files and CLI


CASE = """
[hull]
mesh = "box.stl"
[[opening]]
name = "vent"
at = [2.0, -2.5, 3.5]
[[tank]]
name = "centre"
box = [[8.0, -2.0, 0.2], [12.0, 2.0, 2.2]]
density = 1.0
[[tank]]
name = "wing"
box = [[2.0, 1.0, 0.2], [6.0, 2.9, 3.0]]
density = 1.025
[[compartment]]
name = "starboard wing"
box = [[8.0, -3.0, 0.0], [12.0, -2.0, 4.0]]
permeability = 1.0
[[condition]]
name = "exact"
items = [{ name = "lightship", mass = 250.0, at = [10.0, 0.0, 2.4] }]
fills = { "centre" = 0.97, "wing" = 0.4 }
fluid = "exact"
[[condition]]
name = "fsm"
items = [{ name = "lightship", mass = 250.0, at = [10.0, 0.0, 2.4] }]
fills = { "centre" = 0.97, "wing" = 0.4 }
fluid = "fsm"
[[condition]]
name = "damaged"
items = [{ name = "lightship", mass = 250.0, at = [10.0, 0.0, 2.4] }]
fills = { "centre" = 0.97 }
flooded = ["starboard wing"]
"""


@pytest.fixture()
def case_file(tmp_path):
    trimesh.Trimesh(*box(L, B, D), process=False).export(tmp_path / "box.stl")
    p = tmp_path / "tanks.toml"
    p.write_text(CASE)
    return str(p)


# the condition's fluid chooses the curve the criteria use: upright GM the same by both methods
# (textbook virtual rise), areas larger by the exact method where the nearly full tank presses up
def test_criteria_fluid_method_decides(case_file):
    heels = np.arange(0.0, 61.0, 1.0)
    re_, de = analysis.criteria_analysis(analysis.from_case(case_file, "exact"), IMO_2008_GENERAL, heels)
    rf, df = analysis.criteria_analysis(analysis.from_case(case_file, "fsm"), IMO_2008_GENERAL, heels)
    assert de.data["fluid"] == "exact" and df.data["fluid"] == "fsm"
    assert "exact fluid" in de.verdict_text and "FSM" in df.verdict_text

    def attained(rep, kind_text, side="starboard"):
        return [r.attained for r in rep.results if r.side == side and kind_text in r.text][0]

    gm_e, gm_f = attained(re_, "GM"), attained(rf, "GM")
    # equal but for the upright trim: the exact fluid also moves lengthwise as the vessel trims freely
    assert gm_e == pytest.approx(gm_f, rel=1e-3)
    a_e, a_f = attained(re_, "40"), attained(rf, "40")
    assert a_e > a_f
    # the other method is shown beside, for information, with the same numbers the other condition decides on
    assert de.data["beside"]["fsm"]["results"][0]["attained"] == pytest.approx(rf.results[0].attained, rel=1e-9)


def test_float_weight_groups_and_damage(case_file, capsys):
    assert main(["float", case_file, "--condition", "damaged", "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    rows = data["weight_groups"]
    assert sum(r["mass"] for r in rows) == pytest.approx(data["condition"]["displacement"], rel=1e-12)
    # tank contents: 97 % of a 4 x 4 x 2 m box of fresh water; an empty tank has no centre
    tank = [r for r in rows if r["name"].startswith("centre")][0]
    assert tank["mass"] == pytest.approx(0.97 * 32.0, rel=1e-12)
    assert [r for r in rows if r["name"].startswith("wing")][0]["lcg"] is None
    eq, intact = data["equilibrium"], data["intact_equilibrium"]
    assert eq["heel"] > 0 and abs(intact["heel"]) < 1e-9  # the damage lists it to starboard
    assert eq["draft"] > intact["draft"]
    fb = {r["case"]: r for r in data["damage"]["damaged_vs_intact"]}
    assert fb["damaged"]["opening:vent"] < fb["intact"]["opening:vent"]  # a starboard vent comes closer


def test_righting_reports_both_methods(case_file, capsys, tmp_path):
    png = tmp_path / "gz.png"
    assert main(["righting", case_file, "--heels", "0:40:5", "--quiet", "--format", "json",
                 "--plot", str(png)]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["fluid"] == "exact" and data["label"] == "exact fluid"
    other = data["beside"]["fsm"]["rows"]
    assert len(other) == len(data["rows"])
    assert png.stat().st_size > 1000


def test_tanks_command(case_file, capsys, tmp_path):
    assert main(["tanks", case_file, "--step", "0.5", "--tank", "centre", "--format", "csv",
                 "--plot", str(tmp_path / "t.png")]) == 0
    out = [x for x in capsys.readouterr().out.strip().splitlines() if not x.startswith("#")]  # the caution
    head = out[0].split(",")
    rows = [dict(zip(head, r.split(","))) for r in out[1:]]
    # closed-form box: volume l b s, i_t = l b³ / 12 while partly full
    assert [float(r["sounding"]) for r in rows] == [0.0, 0.5, 1.0, 1.5, 2.0]
    for r in rows:
        assert float(r["volume"]) == pytest.approx(16.0 * float(r["sounding"]), rel=1e-10, abs=1e-12)
    assert float(rows[2]["i_t"]) == pytest.approx(4.0 * 4.0**3 / 12, rel=1e-10)  # CSV keeps 12 digits
    assert main(["tanks", case_file, "--tank", "nope"]) == 2
    assert "no such tank" in capsys.readouterr().err


def test_table_by_displacement(box_hull, tmp_path, capsys):
    trimesh.Trimesh(*box(L, B, D), process=False).export(tmp_path / "box.stl")
    assert main(["table", str(tmp_path / "box.stl"), "--displacements", "123,246", "--format", "json"]) == 0
    rows = json.loads(capsys.readouterr().out)["rows"]
    assert [r["displacement"] for r in rows] == pytest.approx([123.0, 246.0], rel=1e-9)
    assert rows[0]["draft"] == pytest.approx(123.0 / 1.025 / (L * B), rel=1e-9)  # box: T = V / (L B)
    assert main(["table", str(tmp_path / "box.stl"), "--displacements", "1", "--drafts", "1"]) == 2
    assert "exactly one" in capsys.readouterr().err


def test_bad_tank_inputs(case_file, tmp_path, capsys):
    text = open(case_file).read()
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace("[[2.0, 1.0, 0.2], [6.0, 2.9, 3.0]]", "[[2.0, 1.0, 0.2], [6.0, 3.5, 3.0]]"))
    assert main(["float", str(bad)]) == 2
    assert "'wing' does not lie inside the hull" in capsys.readouterr().err
    bad.write_text(text.replace("flooded = [", 'flooded = ["nothing", '))
    assert main(["float", str(bad), "--condition", "damaged"]) == 2
    assert "nothing" in capsys.readouterr().err


def test_tank_permeability_and_unresolved_condition(case_file, tmp_path, capsys):
    from meshhydro.loading import read_case

    # a condition read with fills is not a load until its tanks are joined (never a wrong displacement)
    with pytest.raises(Exception, match="not resolved"):
        read_case(case_file).condition("exact").load()
    bad = tmp_path / "perm.toml"
    bad.write_text(open(case_file).read().replace('name = "wing"\n', 'name = "wing"\npermeability = 0.9\n'))
    assert main(["float", str(bad)]) == 2
    assert "permeability 0.9 is not supported" in capsys.readouterr().err


# the heel sweep sees the moving G: its lever at each angle is the curve's GZ (same G as the solver's)
def test_sweep_trace_moves_g(box_hull):
    from meshhydro.frames import transverse_direction
    from meshhydro.sweep import heel_trace

    _, _, exact, _ = _loads(0.5)
    tr = heel_trace(box_hull, 0.0, (0, 0, 0), [0.0, 10.0, 20.0], load=exact)
    gs = [np.array(r["G"]) for r in tr.to_dict()["angles"]]
    assert gs[2][1] < gs[1][1] < gs[0][1] + 1e-12  # the fluid runs to starboard (-y) as the heel grows
    for k, h in enumerate(tr.heel):
        assert (gs[k] - tr.cob[k]) @ transverse_direction(h) == pytest.approx(tr.gz[k], abs=1e-12)


def test_criteria_plot_of_a_tank_case_draws_both_curves(tmp_path):
    # the exact-fluid curve and the FSM curve beside it go to their own view (PNG by suffix)
    png = tmp_path / "gz.png"
    code = main(["criteria", os.path.join(ROOT, "meshes", "cases", "brindle_tanks.toml"), "--heels", "0:60:5",
                 "--quiet", "--plot", str(png)])
    assert code == 0  # the departure condition meets the general criteria (the shipped demo case)
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"

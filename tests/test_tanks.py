"""Tanks: exact fluid shift, free-surface moments, soundings, inside test, bad input.

References (see /work/shared/REFERENCES.md): rectangular-tank fluid shift and the
virtual rise of G with i = l b³/12, and the n² rule for subdivided tanks (textbook:
Barrass & Derrett, Ship Stability for Masters and Mates; Rawson & Tupper, Basic Ship
Theory); closed-form box geometry; trimesh slice_plane(cap=True) and manifold3d
(general-purpose geometry libraries).
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import trimesh

from meshhydro import kernel
from meshhydro.errors import InputError, InvalidMeshError
from meshhydro.forms import box
from meshhydro.frames import transverse_direction, up_vector
from meshhydro.mesh import check_mesh
from meshhydro.tank_tables import calibration_table, sounding_steps, weight_groups
from meshhydro.fluid import FluidLoad
from meshhydro.tanks import (
    check_inside,
    tank_from_body,
    tank_from_box,
    tank_from_mesh,
    tank_state,
)

# a rectangular tank l x b x depth, bottom at z = 0.5, centred on y = 0.3
L_T, B_T, D_T, Z0, Y0 = 4.0, 2.0, 2.0, 0.5, 0.3
CORNERS = [[1.0, Y0 - B_T / 2, Z0], [1.0 + L_T, Y0 + B_T / 2, Z0 + D_T]]


def _box_tank(rho=1.0, corners=CORNERS, name="wing"):
    return tank_from_box(name, corners, density=rho)


# textbook (Barrass & Derrett; Rawson & Tupper): surface on the walls, the fluid's
# centroid moves b² tan φ / (12 h) across (to the low side) and b² tan² φ / (24 h) up
@pytest.mark.parametrize("heel", [-35.0, -12.0, 3.0, 10.0, 25.0, 40.0])
def test_rectangular_tank_shift_with_heel(heel):
    t = _box_tank()
    h = 0.9  # fluid depth upright; the surface stays on the walls up to atan(2·0.9/2) = 42°
    st0 = tank_state(t, up_vector(0, 0), L_T * B_T * h)
    st = tank_state(t, up_vector(heel, 0), L_T * B_T * h)
    tn = math.tan(math.radians(heel))
    # positive heel puts starboard (-y) down: the fluid moves to -y
    assert st.centroid[1] - st0.centroid[1] == pytest.approx(-B_T**2 * tn / (12 * h), abs=1e-12)
    assert st.centroid[2] - st0.centroid[2] == pytest.approx(B_T**2 * tn**2 / (24 * h), abs=1e-12)
    assert st.centroid[0] == pytest.approx(st0.centroid[0], abs=1e-12)
    assert st.volume == L_T * B_T * h
    # the free surface is the tank's section: b / cos φ wide, l long (closed-form box)
    assert st.free_surface_area == pytest.approx(L_T * B_T / math.cos(math.radians(heel)), rel=1e-12)
    assert st.i_t == pytest.approx(L_T * (B_T / math.cos(math.radians(heel)))**3 / 12, rel=1e-12)


# the same textbook shift lengthwise: bow down moves the fluid forward by l² tan θ / (12 h)
@pytest.mark.parametrize("trim", [-8.0, 5.0, 15.0])
def test_rectangular_tank_shift_with_trim(trim):
    t = _box_tank()
    h = 1.2
    st0 = tank_state(t, up_vector(0, 0), L_T * B_T * h)
    st = tank_state(t, up_vector(0, trim), L_T * B_T * h)
    tn = math.tan(math.radians(trim))
    assert st.centroid[0] - st0.centroid[0] == pytest.approx(L_T**2 * tn / (12 * h), abs=1e-12)
    assert st.centroid[2] - st0.centroid[2] == pytest.approx(L_T**2 * tn**2 / (24 * h), abs=1e-12)
    assert st.i_l == pytest.approx(B_T * (L_T / math.cos(math.radians(trim)))**3 / 12, rel=1e-12)


def _fluid_heeling_lever(load: FluidLoad, heel: float) -> float:
    """m·ℓ: the fluid's moment [t·m] about its upright centre, along the earth transverse direction."""
    t = transverse_direction(heel)
    c0 = load.moment(up_vector(0, 0))
    return -float((load.moment(up_vector(heel, 0)) - c0) @ t)


# textbook virtual rise of G: FSM = ρ i, i = l b³ / 12 for a rectangular surface; the
# exact moment of the shifted fluid is ρ i sin φ (1 + ½ tan² φ) for a wall-sided tank
# (from the textbook shifts above), which tends to the virtual-rise moment ρ i sin φ
def test_exact_shift_tends_to_virtual_rise():
    rho = 0.85
    t = _box_tank(rho)
    load = FluidLoad([t], [0.45 * t.capacity])
    i = L_T * B_T**3 / 12
    assert load.fsm_upright() == pytest.approx(rho * i, rel=1e-12)
    assert load.fsm_upright_longitudinal() == pytest.approx(rho * B_T * L_T**3 / 12, rel=1e-12)
    for heel in (0.5, 5.0, 20.0):
        ratio = _fluid_heeling_lever(load, heel) / (rho * i * math.sin(math.radians(heel)))
        assert ratio == pytest.approx(1 + 0.5 * math.tan(math.radians(heel))**2, rel=1e-10)
    assert _fluid_heeling_lever(load, 0.5) / (rho * i * math.sin(math.radians(0.5))) == pytest.approx(1.0, abs=1e-4)


# textbook: dividing a tank into n equal longitudinal compartments divides the free-surface effect by n²
@pytest.mark.parametrize("n", [2, 3, 4])
def test_subdivision_divides_effect_by_n_squared(n):
    rho, frac = 1.025, 0.5
    one = FluidLoad.from_fills([_box_tank(rho)], {"wing": frac})
    y = np.linspace(Y0 - B_T / 2, Y0 + B_T / 2, n + 1)
    parts = [tank_from_box(f"p{k}", [[1.0, y[k], Z0], [1.0 + L_T, y[k + 1], Z0 + D_T]], density=rho)
             for k in range(n)]
    split = FluidLoad.from_fills(parts, {p.name: frac for p in parts})
    assert split.fsm_upright() == pytest.approx(one.fsm_upright() / n**2, rel=1e-12)
    assert split.mass == pytest.approx(one.mass, rel=1e-14)
    # also the exact shifted-fluid moment at a heel, surface on the walls in every part
    assert _fluid_heeling_lever(split, 15.0) == pytest.approx(_fluid_heeling_lever(one, 15.0) / n**2, rel=1e-10)


# trimesh slice_plane(cap=True) (general-purpose library): the level surface holds the volume
# and the fluid centroid matches trimesh's centre of mass, at random attitudes and fills
def test_irregular_tank_against_trimesh(blob):
    t = tank_from_mesh("blob", blob, density=1.0)
    assert t.capacity == pytest.approx(blob.volume, rel=1e-12)
    rng = np.random.default_rng(11)
    for _ in range(25):
        up = up_vector(rng.uniform(-180, 180), rng.uniform(-80, 80))
        vol = rng.uniform(0.03, 0.97) * t.capacity
        st = tank_state(t, up, vol)
        assert st.volume == vol
        ref = blob.slice_plane(st.level_point, -up, cap=True)
        assert ref.volume == pytest.approx(vol, rel=1e-9)
        assert np.allclose(st.centroid, ref.center_mass, atol=1e-8 * blob.scale)
        assert st.free_surface_area > 0


# volume conservation along a warm-started sweep, and the cost: about one to three cuts per level
def test_warm_started_sweep_conserves_volume_and_is_cheap(blob):
    t = tank_from_mesh("blob", blob, density=1.0)
    load = FluidLoad([t], [0.37 * t.capacity])
    n = 0
    for heel in np.arange(0.0, 90.1, 2.0):
        st = load.states(up_vector(heel, 1.5))[0]
        assert st.cuts >= 1
        check = kernel.cut(t.prepared, st.level_point, st.normal)
        assert check.volume == pytest.approx(0.37 * t.capacity, rel=1e-9)
        n += 1
    assert load.cuts / n <= 3.0


# closed-form box: full and empty tanks are exact without a cut
def test_full_and_empty_need_no_cut():
    t = _box_tank(1.0)
    full = tank_state(t, up_vector(30, 10), t.capacity)
    empty = tank_state(t, up_vector(30, 10), 0.0)
    assert full.cuts == 0 and empty.cuts == 0
    assert np.allclose(full.centroid, [1.0 + L_T / 2, Y0, Z0 + D_T / 2], atol=1e-14)
    assert full.free_surface_area == 0.0 and full.i_t == 0.0 and empty.mass == 0.0
    load = FluidLoad([t], [0.0])
    with pytest.raises(InputError, match="no fluid"):
        load.centre(up_vector(0, 0))


# closed-form box: volume, centroid and surface inertia against soundings, upright and trimmed
def test_calibration_table_box():
    rho = 1.0
    t = _box_tank(rho)
    # the sounding point is the lowest point upright: the middle of the flat bottom
    assert np.allclose(t.sounding_point, [1.0 + L_T / 2, Y0, Z0])
    up_rows = calibration_table(t, [0.4, 1.0, 1.7])
    for r in up_rows:
        s = r["sounding"]
        assert r["volume"] == pytest.approx(L_T * B_T * s, rel=1e-12)
        assert r["vcg"] == pytest.approx(Z0 + s / 2, rel=1e-12)
        assert r["i_t"] == pytest.approx(L_T * B_T**3 / 12, rel=1e-12)
        assert r["i_l"] == pytest.approx(B_T * L_T**3 / 12, rel=1e-12)
        assert r["fsm_t"] == pytest.approx(rho * L_T * B_T**3 / 12, rel=1e-12)
    th = 3.0
    ct = math.cos(math.radians(th))
    for r in calibration_table(t, [0.5, 1.2], trim=th):  # surface on the end walls at both
        s = r["sounding"]
        # the plane passes s / cos θ above the bottom at the mid-length: a prism of mean depth s / cos θ
        assert r["volume"] == pytest.approx(L_T * B_T * s / ct, rel=1e-12)
        assert r["fs_area"] == pytest.approx(L_T * B_T / ct, rel=1e-12)
        assert r["i_l"] == pytest.approx(B_T * (L_T / ct)**3 / 12, rel=1e-12)
        assert r["i_t"] == pytest.approx((L_T / ct) * B_T**3 / 12, rel=1e-12)
    steps = sounding_steps(t, 0.5)
    assert steps[0] == 0.0 and steps[-1] == pytest.approx(D_T) and len(steps) == 5
    # a step whose multiple lands on the top by a rounding above it (29 x 0.05 = 1.4500000000000002 > 1.45)
    deep = tank_from_box("deep", [[0.0, 0.0, 0.05], [1.0, 1.0, 1.5]], density=1.0)  # 1.45 m deep
    steps = sounding_steps(deep, 0.05)
    assert len(steps) == 30 and steps[-1] == max(s for s in steps) <= 1.45 + 1e-15
    assert calibration_table(deep, steps)[-1]["volume"] == pytest.approx(deep.capacity, rel=1e-12)
    # a level at the top fills the tank (no free surface) even where sounding point + depth lands an ulp
    # under the top (0.05 + 0.75 against 0.8): physical fact, a full tank's fluid cannot shift
    fw = tank_from_box("fw", [[9.0, -1.0, 0.05], [10.4, 1.0, 0.8]], density=1.0)
    last = calibration_table(fw, sounding_steps(fw, 0.2))[-1]
    assert last["volume"] == fw.capacity and last["fs_area"] == 0.0 and last["fsm_t"] == 0.0
    assert fw.volume_for(sounding=0.75) == fw.capacity  # a fill by sounding at the top is a full tank
    top = calibration_table(t, [D_T])[0]
    assert top["volume"] == pytest.approx(t.capacity) and top["fs_area"] == 0.0
    assert t.volume_for(sounding=0.8) == pytest.approx(L_T * B_T * 0.8, rel=1e-12)


# closed-form state after a sounding at a heel: the level holds the sounded volume
def test_state_reports_its_sounding():
    t = _box_tank()
    st = tank_state(t, up_vector(0, 0), L_T * B_T * 1.3)
    assert st.sounding == pytest.approx(1.3, rel=1e-12)


# manifold3d boolean difference (general-purpose library): inside test, with the outside volume in closed form
def test_inside_hull(box_hull):
    inside = tank_from_box("db", [[2.0, -3.0, 0.0], [6.0, 3.0, 1.0]], density=1.0)  # shares hull walls
    check_inside(inside.name, inside.vertices, inside.faces, box_hull)
    out = tank_from_box("sticking out", [[18.0, -1.0, 3.0], [21.0, 1.0, 5.0]], density=1.0)
    # outside: x 20..21 (1 x 2 x 2 = 4) plus z 4..5 over x 18..20 (2 x 2 x 1 = 4): 8 m³ of 12 m³
    with pytest.raises(InputError, match=r"'sticking out' does not lie inside the hull: 8 m³ of its 12 m³"):
        check_inside(out.name, out.vertices, out.faces, box_hull)


def test_tank_from_body_and_file(tmp_path):
    hv, hf = box(20.0, 6.0, 4.0)
    tv, tf = box(2.0, 1.0, 1.0, x0=5.0)
    v = np.vstack([hv, tv + [0.0, 1.0, 0.5]])
    f = np.vstack([hf, tf + len(hv)])
    md, rep = check_mesh(trimesh.Trimesh(v, f, process=False))
    k = next(b.index for b in rep.bodies if abs(b.volume - 2.0) < 1e-9)
    t = tank_from_body("fore peak", md, rep, k, density=1.0)
    assert t.capacity == pytest.approx(2.0, rel=1e-12)
    assert np.allclose(t.centroid_full, [6.0, 1.0, 1.0])
    with pytest.raises(InputError, match="body 7 does not exist"):
        tank_from_body("x", md, rep, 7, density=1.0)
    path = tmp_path / "tank.stl"
    trimesh.Trimesh(tv, tf, process=False).export(path)
    t2 = tank_from_mesh("aft", str(path), density=1.0, units="m")
    assert t2.capacity == pytest.approx(2.0, rel=1e-12)


# hand calculation (KG = Σ m z / Σ m, textbook virtual rise FSM/Δ with i = l b³/12)
def test_weight_groups_hand_calculation():
    t = _box_tank(1.0)
    fluid = FluidLoad([t, _box_tank(1.0, [[8, -1, 0], [9, 1, 1]], "empty one")], [L_T * B_T * 0.5, 0.0])
    table = weight_groups((30.0, (5.0, 0.0, 1.5)), [("cargo", 10.0, (6.0, -0.5, 3.0))], fluid)
    tank_mass, tank_z = L_T * B_T * 0.5, Z0 + 0.25
    disp = 30.0 + 10.0 + tank_mass
    kg = (30.0 * 1.5 + 10.0 * 3.0 + tank_mass * tank_z) / disp
    tot = table["totals"]
    assert tot["displacement"] == pytest.approx(disp)
    assert tot["vcg"] == pytest.approx(kg, rel=1e-12)
    assert tot["tcg"] == pytest.approx((10.0 * -0.5 + tank_mass * Y0) / disp, rel=1e-12)
    assert tot["fsm"] == pytest.approx(L_T * B_T**3 / 12, rel=1e-12)
    assert tot["kg_fluid"] == pytest.approx(kg + L_T * B_T**3 / 12 / disp, rel=1e-12)
    assert [r["group"] for r in table["rows"]] == ["lightship", "deadweight", "tank", "tank"]
    assert table["rows"][3]["vcg"] is None and table["units"]["fsm"] == "t.m"


@pytest.mark.parametrize("kw, msg", [
    ({"fraction": 1.2}, "fill fraction 1.2 is outside 0..1"),
    ({"volume": -1.0}, "volume -1 m³ is outside"),
    ({"volume": 1.0, "fraction": 0.1}, "exactly one of"),
    ({"sounding": 2.5}, "sounding 2.5 m is outside"),
    ({"fraction": float("nan")}, "must be finite"),
])
def test_bad_fills(kw, msg):
    with pytest.raises(InputError, match=msg):
        _box_tank().volume_for(**kw)


def test_bad_tanks():
    with pytest.raises(InputError, match="density must be positive"):
        tank_from_box("t", CORNERS, density=0.0)
    with pytest.raises(InputError, match="no extent along z"):
        tank_from_box("t", [[0, 0, 1], [1, 1, 1]], density=1.0)
    with pytest.raises(InputError, match="no tank named 'port'"):
        FluidLoad.from_fills([_box_tank()], {"port": 0.5})
    with pytest.raises(InputError, match="used twice"):
        FluidLoad([_box_tank(), _box_tank()], [1.0, 1.0])
    v, f = box(1.0, 1.0, 1.0)
    with pytest.raises(InvalidMeshError, match="not closed"):
        tank_from_mesh("open", trimesh.Trimesh(v, f[:-1], process=False), density=1.0)
    with pytest.raises(InvalidMeshError, match="inside out"):
        tank_from_mesh("flipped", trimesh.Trimesh(v, f[:, ::-1], process=False), density=1.0)
    two = trimesh.Trimesh(np.vstack([v, v + 3.0]), np.vstack([f, f + 8]), process=False)
    with pytest.raises(InvalidMeshError, match="2 bodies"):
        tank_from_mesh("two", two, density=1.0)


# closed-form geometry, degenerate level: a half-full cube at 45° heel has its surface exactly on two
# opposite edges; the fluid is a triangular prism with centroid at a third of the legs
def test_level_through_edges_is_exact():
    t = tank_from_box("cube", [[0.0, -1.0, 0.0], [2.0, 1.0, 2.0]], density=1.0)
    st = tank_state(t, up_vector(45.0, 0.0), 4.0)
    assert np.allclose(st.centroid, [1.0, -1.0 / 3.0, 1.0 - 1.0 / 3.0], atol=1e-12)
    assert st.free_surface_area == pytest.approx(2.0 * 2.0 * math.sqrt(2.0), rel=1e-12)
    assert st.i_t == pytest.approx(2.0 * (2.0 * math.sqrt(2.0)) ** 3 / 12, rel=1e-12)

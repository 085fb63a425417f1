"""Report parts for conditions with tanks and flooded compartments, and the tank calibration tables.

Used by :mod:`meshhydro.analysis` (which imports this module, never the other way): weight groups
(lightship, deadweight items, tank contents with mass, centres and free-surface moments; totals and
the fluid-corrected KG), the fluid method in words, the damage section (flooded compartments with
their lost buoyancy, heights of openings and deck edge above water, the intact position beside),
companion curves (the other fluid method; the intact ship beside a damaged one) and the tank
calibration tables (:func:`tank_tables_analysis`).

Hull frame (x forward, y to port, z up), m, t, t·m; angles in degrees.
"""
from __future__ import annotations

from typing import Any, Callable, Sequence

import numpy as np

from .criteria import CAUTION
from .damage import lost_buoyancy
from .document import Column, Document, Figure, Quantity, Section, Table
from .equilibrium import Equilibrium
from .fluid import FluidLoad
from .frames import up_vector
from .loading import Condition
from .stability import RightingCurve
from .tank_tables import CALIBRATION_UNITS, calibration_table, sounding_steps

#: Words for the fluid methods.
METHODS = {"exact": "exact fluid shift (level free surfaces at every attitude)",
           "fsm": "free-surface moment (virtual rise of G, FSM/Δ from the upright fills)"}


def other_method(cond: Condition) -> str | None:
    """The fluid method the condition does not choose (None without tanks)."""
    if not cond.tanks or not cond.fluid_mass > 0:
        return None
    return "fsm" if cond.fluid == "exact" else "exact"


def curve_label(cond: Condition, method: str | None = None, *, intact: bool = False) -> str:
    """A short label of a curve of this condition: fluid method and damage state."""
    parts = []
    if cond.tanks:
        parts.append("exact fluid" if (method or cond.fluid) == "exact" else "FSM")
    if cond.flooded:
        parts.append("intact" if intact else "flooded: " + ", ".join(c.name for c in cond.flooded))
    return ", ".join(parts) or "GZ"


def method_note(cond: Condition) -> list[str]:
    """Notes saying which fluid method a condition's results use."""
    if not cond.tanks:
        return []
    return [f"fluid in tanks: {METHODS[cond.fluid or 'exact']} (the condition's fluid = \"{cond.fluid}\")"]


# ---------------------------------------------------------------------------- weight groups


def weight_rows(cond: Condition) -> list[dict[str, Any]]:
    """Rows (group, name, mass [t], lcg, tcg, vcg [m], fsm [t·m]): items, then tank contents upright."""
    rows: list[dict[str, Any]] = []
    if cond.items:
        for i in cond.items:
            grp = "lightship" if "lightship" in i.name.lower() else "deadweight"
            rows.append({"group": grp, "name": i.name, "mass": i.mass, "lcg": i.at[0], "tcg": i.at[1],
                         "vcg": i.at[2], "fsm": i.fsm})
    else:
        m = cond.displacement - cond.fluid_mass
        g = (np.array(cond.cog) * cond.displacement - np.array(cond.fluid_moment)) / m if m > 0 else None
        rows.append({"group": "given", "name": "displacement and cog", "mass": m,
                     "lcg": None if g is None else float(g[0]), "tcg": None if g is None else float(g[1]),
                     "vcg": None if g is None else float(g[2]), "fsm": cond.fsm - cond.fluid_fsm})
    if cond.tanks:
        fl = FluidLoad(cond.tanks, cond.volumes)
        for t, st in zip(fl.tanks, fl.upright_states()):
            full = st.volume / t.capacity
            c = st.centroid if st.mass > 0 else None
            rows.append({"group": "tank", "name": f"{t.name} ({100 * full:.1f} %)", "mass": st.mass,
                         "lcg": None if c is None else float(c[0]), "tcg": None if c is None else float(c[1]),
                         "vcg": None if c is None else float(c[2]), "fsm": t.density * st.i_t})
    return rows


def weight_section(cond: Condition) -> Section:
    """Weight groups with totals and the fluid-corrected KG (textbook virtual rise FSM/Δ)."""
    cols = [Column("group", "group"), Column("name", "name"), Column("mass", "mass", "t", 3),
            Column("lcg", "lcg", "m", 3), Column("tcg", "tcg", "m", 3), Column("vcg", "vcg", "m", 3),
            Column("fsm", "fsm", "t.m", 3)]
    sec = Section("weights", "weight groups (tank contents upright):",
                  tables=[Table("weight_groups", "", cols, weight_rows(cond))])
    groups: dict[str, float] = {}
    for r in sec.tables[0].rows:
        groups[r["group"]] = groups.get(r["group"], 0.0) + r["mass"]
    sec.values = [Quantity(f"mass_{k}", f"{k} total", v, "t") for k, v in groups.items()]
    sec.values += [Quantity("displacement", "displacement", cond.displacement, "t"),
                   Quantity("kg", "KG (solid)", cond.kg, "m"), Quantity("fsm", "free-surface moment", cond.fsm, "t·m"),
                   Quantity("kg_fluid", "KG fluid (KG + FSM/Δ)", cond.kg_fluid, "m")]
    return sec


# ---------------------------------------------------------------------------- damage


def heights_above_water(hull: Any, eq: Equilibrium, points: np.ndarray) -> np.ndarray:
    """Heights (k,) [m] of hull-frame points (k, 3) above the water surface at an equilibrium."""
    k = np.array([hull.x_ref, 0.0, 0.0])
    return (np.asarray(points, float) - k) @ eq.up - eq.draft * float(eq.up[2])


def damage_section(inp: Any, eq: Equilibrium, intact: Equilibrium) -> Section:
    """Flooded compartments, heights of openings and deck edge above water, and the intact position beside."""
    cond = inp.condition
    sec = Section("damage", "damage (lost buoyancy; compartments open to the sea):")
    hcut = inp.hull.cut(eq.up * eq.draft * float(eq.up[2]) + np.array([inp.hull.x_ref, 0.0, 0.0]), eq.up)
    rows = lost_buoyancy(hcut, cond.flooded)
    sec.tables.append(Table("flooded", "", [Column("name", "compartment"), Column("permeability", "permeability", "-", 3),
                                            Column("lost_volume", "lost volume", "m3", 4),
                                            Column("lost_waterplane", "lost waterplane", "m2", 4)], rows))
    fb_rows = []
    deck = inp.hull.deck_edge
    for label, e in (("damaged", eq), ("intact", intact)):
        r: dict[str, Any] = {"case": label, "draft": e.draft, "heel": e.heel, "trim": e.trim, "gmt": e.gmt}
        r["deck_edge"] = float(heights_above_water(inp.hull, e, deck).min()) if len(deck) else None
        for o in inp.openings:
            r[f"opening:{o.name}"] = float(heights_above_water(inp.hull, e, np.array([o.at]))[0])
        fb_rows.append(r)
    keys = list(fb_rows[0])
    units = {"draft": "m", "heel": "deg", "trim": "deg", "gmt": "m"}
    cols = [Column(k, k, units.get(k, "m") if k != "case" else "", 4) for k in keys]
    sec.tables.append(Table("damaged_vs_intact", "position and heights above water (deck edge: least):",
                            cols, fb_rows))
    under = [k for k in keys[5:] if fb_rows[0][k] is not None and fb_rows[0][k] <= 0]
    if under:
        sec.notes.append("WARNING: under water at the damaged position: " + ", ".join(under))
    return sec


# ---------------------------------------------------------------------------- companion curves


def companions(cond: Condition, solve: Callable[..., RightingCurve]) -> list[tuple[str, str, RightingCurve]]:
    """(key, label, curve) of the curves shown beside the condition's own: the other fluid method
    (with tanks) and the intact ship (with flooding). ``solve(method=..., intact=...)`` gives a curve."""
    out = []
    other = other_method(cond)
    if other is not None:
        out.append((other, curve_label(cond, other), solve(method=other, intact=False)))
    if cond.flooded:
        out.append(("intact", curve_label(cond, intact=True), solve(method=None, intact=True)))
    return out


def comparison_section(cond: Condition, curve: RightingCurve, others: Sequence[tuple[str, str, RightingCurve]],
                       sides: Sequence[int]) -> Section:
    """GZ of the condition's curve beside its companions, angle by angle, with their derived values."""
    main = cond.fluid if cond.tanks else "gz"
    cols = [Column("heel", "heel", "deg", 1), Column(f"gz_{main}", f"gz {curve_label(cond)}", "m", 4)]
    cols += [Column(f"gz_{k}", f"gz {label}", "m", 4) for k, label, _ in others]
    rows = []
    for i, h in enumerate(curve.heel):
        r = {"heel": float(h), f"gz_{main}": float(curve.gz[i])}
        for k, _, c in others:
            r[f"gz_{k}"] = float(c.gz[i])
        rows.append(r)
    sec = Section("companions", "beside it:", tables=[Table("companion_levers", "", cols, rows)])
    for k, label, c in others:
        for s in sides:
            sm = c.summary(s)
            vals = [Quantity(f"{k}_{n}", n.replace("_", " "), sm.get(n), u) for n, u in (
                ("gm_upright", "m"), ("max_gz", "m"), ("angle_of_max_gz", "deg"), ("vanishing_angle", "deg"),
                ("area_0_30", "m·rad"), ("area_0_40", "m·rad")) if n in sm]
            sec.sections.append(Section(f"{k}_{sm['side']}", f"{label}, heeling to {sm['side']}:", values=vals))
    return sec


def curves_figure(key: str, title: str, cond: Condition, curve: RightingCurve,
                  others: Sequence[tuple[str, str, RightingCurve]]) -> Figure:
    """A figure of the condition's curve with its companions (view ``righting_curves``)."""
    return Figure(key, title, "righting_curves",
                  {"curves": [(curve_label(cond), curve)] + [(label, c) for _, label, c in others]})


# ---------------------------------------------------------------------------- calibration tables


def _with_limit_below_top(tank: Any, rows: list[dict[str, Any]], heel: float, trim: float) -> list[dict[str, Any]]:
    """The rows with one more just above an empty bottom and one just under a full top (a millionth of the
    sounding range away), for the figure: an empty or full tank has no free surface, but just above a flat
    bottom or just under a flat top the surface is whole, so the free-surface moment steps there rather
    than along the first or last step."""
    if len(rows) < 2:
        return rows
    gap = 1e-6 * max(rows[-1]["sounding"] - rows[0]["sounding"], 1e-9)
    out = list(rows)
    if rows[-1]["fs_area"] == 0.0 and rows[-2]["sounding"] < rows[-1]["sounding"] - gap:
        out[-1:-1] = calibration_table(tank, [rows[-1]["sounding"] - gap], heel=heel, trim=trim)
    if rows[0]["volume"] == 0.0 and rows[0]["sounding"] + gap < rows[1]["sounding"]:
        out[1:1] = calibration_table(tank, [rows[0]["sounding"] + gap], heel=heel, trim=trim)
    return out


def tank_tables_analysis(tanks: Sequence[Any], step: float, *, heel: float = 0.0, trim: float = 0.0,
                         label: str = "") -> tuple[dict[str, list[dict[str, Any]]], Document]:
    """Sounding tables of ``tanks`` every ``step`` [m] at a heel and trim [deg], and their report.

    Each row: sounding [m] (vertical depth above the tank's sounding point), volume, fill fraction,
    mass, centroid, free-surface area, i_t, i_l and ρ i (:func:`meshhydro.tank_tables.calibration_table`).
    """
    keys = list(CALIBRATION_UNITS)
    digits = {"sounding": 3, "fraction": 4}
    tables: dict[str, list[dict[str, Any]]] = {}
    rows: list[dict[str, Any]] = []
    notes = []
    for t in tanks:
        tables[t.name] = calibration_table(t, sounding_steps(t, step, heel=heel, trim=trim), heel=heel, trim=trim)
        rows += [{"tank": t.name, **r} for r in tables[t.name]]
        sp = t.sounding_point
        notes.append(f"tank {t.name!r}: capacity {t.capacity:.4f} m³, density {t.density:g} t/m³, "
                     f"sounding point ({sp[0]:.3f}, {sp[1]:.3f}, {sp[2]:.3f}) m")
    cols = [Column("tank", "tank")] + [Column(k, k, CALIBRATION_UNITS[k], digits.get(k, 4)) for k in keys]
    sec = Section("calibration", "", tables=[Table("calibration", "", cols, rows)], notes=notes)
    sec.figures.append(Figure("tanks", f"Tank calibration: {label} (heel {heel:g}°, trim {trim:g}°)",
                              "tank_calibration", {t.name: _with_limit_below_top(t, tables[t.name], heel, trim)
                                                   for t in tanks}))
    doc = Document(title=f"tank calibration tables: {label}  (heel {heel:g}°, trim {trim:g}°)", vessel=label,
                   header=["sounding: vertical depth of the level above the tank's sounding point; "
                           "i_t, i_l about the free surface's own centroid; fsm = ρ i"],
                   sections=[sec], cautions=[CAUTION], primary="calibration",
                   meta={"heel": heel, "trim": trim, "up": up_vector(heel, trim).tolist()})
    doc.data = {"heel": heel, "trim": trim, "step": step, "units": CALIBRATION_UNITS,
                "tanks": [{"name": t.name, "capacity": t.capacity, "density": t.density,
                           "sounding_point": t.sounding_point.tolist(), "rows": tables[t.name]} for t in tanks],
                "caution": CAUTION}
    return tables, doc

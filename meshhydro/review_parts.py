"""Design-review sections for tanks, damage, the weather criterion, KG limits and a fully submerged load.

Builders in the sense of :mod:`meshhydro.review` (which lists them in its ``CASE_BUILDERS`` and
``CONDITION_BUILDERS``): each takes the review (and a condition run) and returns a
:class:`~meshhydro.document.Section`, or None when the case does not use what it shows. They format
what the analyses computed (:mod:`meshhydro.analysis`, :mod:`meshhydro.analysis_tanks`,
:mod:`meshhydro.limits_analysis`, :mod:`meshhydro.submergence`); nothing here solves a new position
except the KG-limit search and the submergence sequence, which are analyses of their own.

Hull frame (x forward, y to port, z up); m, t, t·m, t/m³; angles in degrees.
"""
from __future__ import annotations

from typing import Any, Sequence

import numpy as np

from . import analysis_tanks as tk
from .case_wind import WEATHER_VALUES
from .document import Column, Figure, Quantity, Section, Table
from .figure_data import gz_data
from .stability import RightingCurve
from .submerged import NOTE as SUBMERGED_NOTE

#: The builders' arguments are :class:`meshhydro.review.Review` and :class:`meshhydro.review.ConditionRun`;
#: they are annotated loosely here because review imports this module (imports flow one way).
Review = Any
ConditionRun = Any


#: Derived values compared between the deciding curve and those beside it: (summary key, label, unit).
BESIDE_VALUES = (("gm_upright", "GM upright", "m"), ("max_gz", "max GZ", "m"), ("angle_of_max_gz", "angle of max GZ",
                 "deg"), ("vanishing_angle", "vanishing angle", "deg"), ("area_0_30", "area 0–30°", "m·rad"),
                 ("area_0_40", "area 0–40°", "m·rad"), ("area_30_40", "area 30–40°", "m·rad"))
SIDE_WORD = {1: "starboard", -1: "port"}
SIDE_SHORT = {1: "stbd", -1: "port"}
#: Short column names of the curves in the beside tables (the section's notes spell them out).
SHORT = {"exact": "exact", "fsm": "FSM", "intact": "intact"}


def beside_figure(key: str, title: str, vessel: str, curves: Sequence[tuple[str, RightingCurve]],
                  sides: Sequence[int], caption: str) -> Figure:
    """A ``gz_curve`` figure of several curves of one condition, each side righting-positive, maxima
    marked; the first curve is the deciding one. ``curves``: (label, curve) pairs on the same heels."""
    out = []
    for label, curve in curves:
        for side in gz_data(curve, sides, vessel)["sides"]:
            side["name"] = f"{side['name']}, {label}"
            side.update(areas=[], vanishing=None, deck_edge=None, downflooding=None)
            out.append(side)
    return Figure(key, title, "gz_curve", {"vessel": vessel, "sides": out, "gm": None, "title": title},
                  caption=caption)


def _beside(rv: Review, cr: ConditionRun, keys: Sequence[str], what: str) -> Section | None:
    """The companion curves with these keys beside the deciding one: figure, levers (righting-positive on
    each side, every 5° on one side or 10° on two) and derived values."""
    others = [o for o in cr.others if o[0] in keys]
    if not others:
        return None
    c = cr.inp.condition
    curves = [(tk.curve_label(c), cr.curve)] + [(lab, oc) for _, lab, oc in others]
    own = "damaged" if what == "intact" else SHORT[c.fluid or "exact"]
    short = [own] + [SHORT[k] for k, _, _ in others]
    cols = [Column("heel", "heel", "deg", 1)] + [
        Column(f"gz_{k}_{SIDE_WORD[s]}", f"{short[k]} {SIDE_SHORT[s]}", "m", 4)
        for k in range(len(curves)) for s in cr.sides]
    step = 5.0 if len(cr.sides) == 1 else 10.0
    top = float(np.max(np.abs(cr.curve.heel)))
    rows = []
    for h in np.arange(0.0, top + 1e-9, step):
        r: dict[str, Any] = {"heel": float(h)}
        for k, (_, cv) in enumerate(curves):
            for s in cr.sides:
                i = np.flatnonzero(np.isclose(cv.heel, s * h, atol=1e-9))
                r[f"gz_{k}_{SIDE_WORD[s]}"] = float(s * cv.gz[i[0]]) if len(i) else None
        rows.append(r)
    levers = Table(f"levers_{what}", "GZ at the computed heels (positive: righting)", cols, rows)
    vcols = [Column("quantity", "quantity")] + [Column(c.key, c.label, "", 4) for c in cols[1:]]
    sums = [[cv.summary(s) for s in cr.sides] for _, cv in curves]
    vrows = [{"quantity": f"{label} [{unit}]", **{f"gz_{k}_{SIDE_WORD[s]}": sm[j].get(key)
                                                 for k, sm in enumerate(sums) for j, s in enumerate(cr.sides)}}
             for key, label, unit in BESIDE_VALUES]
    names = ", ".join(o[1] for o in others)
    sec = Section(f"beside_{what}", f"{tk.curve_label(c)} (decides) beside {names}",
                  tables=[Table(f"derived_{what}", "Derived values", vcols, vrows), levers],
                  notes=["columns: " + "; ".join(f"{sh} = {lab}" for sh, (lab, _) in zip(short, curves, strict=True))
                         + " (the first decides); stbd = heeling to starboard, port = heeling to port."])
    title = f"{rv.vessel}, {c.name}: GZ, {tk.curve_label(c)} beside {names}"
    sec.figures.append(beside_figure(f"gz_beside_{what}", title, rv.vessel, curves, cr.sides,
                                     caption=f"the first curve ({tk.curve_label(c)}) decides; the others are "
                                             "for information"))
    return sec


# ---------------------------------------------------------------------------- tanks


def _tank_rows(rv: Review, cr: ConditionRun) -> list[dict[str, Any]]:
    """Per tank: declared shape, fluid density, capacity, the fill as given, volume, fraction, mass, FSM."""
    c = cr.inp.condition
    specs = {t.name: t for t in rv.case.spec.tanks}
    cs = next((s for s in rv.case.spec.conditions if s.name == c.name), None)
    fsm = [r["fsm"] for r in tk.weight_rows(c) if r["group"] == "tank"]
    rows = []
    for t, v, f in zip(c.tanks, c.volumes, fsm, strict=True):
        ts = specs[t.name]
        shape = "box" if ts.box is not None else (f"mesh {ts.mesh}" if ts.mesh is not None else f"body {ts.body}")
        given = "empty (not named)"
        if cs is not None:
            for key, unit in (("fills", ""), ("soundings", " m"), ("volumes", " m³")):
                x = getattr(cs, key).get(t.name)
                if x is not None:
                    given = f"{key[:-1]} {x:g}{unit}"
        rows.append({"tank": t.name, "shape": shape, "density": t.density, "capacity": t.capacity, "given": given,
                     "volume": v, "full": 100.0 * v / t.capacity, "mass": v * t.density, "fsm": f})
    return rows


def tanks_section(rv: Review, cr: ConditionRun) -> Section | None:
    """Weight groups with the tank contents, the tanks' fills and free-surface moments, the fluid method
    and the other method's curve beside the deciding one (None without tanks)."""
    c = cr.inp.condition
    if not c.tanks:
        return None
    ws = tk.weight_section(c)
    groups = ws.tables[0]
    groups.title = "Weight groups (tank contents at their upright centres)"
    cols = [Column("tank", "tank"), Column("shape", "shape"), Column("density", "ρ fluid", "t/m³", 3),
            Column("capacity", "capacity", "m³", 3), Column("given", "given"),
            Column("volume", "volume", "m³", 3), Column("full", "full", "%", 1), Column("mass", "mass", "t", 3),
            Column("fsm", "FSM", "t·m", 4)]
    sec = Section("tanks", "Weights and tanks", values=ws.values,
                  tables=[groups, Table("tank_fills", "Tanks in this condition", cols, _tank_rows(rv, cr))],
                  notes=tk.method_note(c) + [
                      "FSM of a tank: fluid density times the transverse second moment of its upright free surface "
                      "about the surface's own centroid; KG fluid = KG + FSM/Δ (the virtual rise of G)."])
    part = _beside(rv, cr, ("exact", "fsm"), "fluid")
    if part is not None:
        sec.sections.append(part)
    return sec


# ---------------------------------------------------------------------------- damage


def damage_section(rv: Review, cr: ConditionRun) -> Section | None:
    """Flooded compartments, the damaged position against the intact one with the heights of the openings
    and the deck edge above water, the intact curve beside, and the survival verdict (None when intact)."""
    c = cr.inp.condition
    if not c.flooded:
        return None
    d = cr.float_doc.section("damage")
    flooded, pos = d.tables[0], d.tables[1]
    flooded.title = "Flooded compartments (lost buoyancy at the damaged position)"
    pos.title = "Damaged position against intact; heights above water (deck edge: its lowest point)"
    pos.columns = [Column(col.key, col.key.split(":", 1)[1] if col.key.startswith("opening:") else
                          col.label.replace("_", " ").replace("gmt", "GMt"), col.unit, col.digits)
                   for col in pos.columns]
    row = pos.rows[0]
    keys = [k for k in row if k.startswith("opening:")]
    under = [k.split(":", 1)[1] for k in keys if row[k] is not None and row[k] <= 0]
    deck_under = row.get("deck_edge") is not None and row["deck_edge"] <= 0
    survives = cr.report.passed and not under
    names = ", ".join(x.name for x in c.flooded)
    sec = Section("damage", f"Damage: {names} flooded", tables=[flooded, pos], notes=list(d.notes))
    sec.values = [
        Quantity("survival", "survival verdict", "survives" if survives else "does NOT survive"),
        Quantity("criteria", f"criteria ({cr.report.set_name}) on the damaged curve",
                 "all met" if cr.report.passed else "NOT all met"),
        Quantity("openings_under", "openings under water at the damaged position", ", ".join(under) or "none"),
        Quantity("deck_edge_under", "deck edge under water at the damaged position", "yes" if deck_under else "no"),
    ]
    sec.notes.append("survival verdict: the criteria set met on the damaged curve (compartments open to the sea, "
                     "lost buoyancy) and every opening above the damaged waterline; the deck edge is reported "
                     "and does not decide.")
    part = _beside(rv, cr, ("intact",), "intact")
    if part is not None:
        sec.sections.append(part)
    return sec


# ---------------------------------------------------------------------------- weather


def weather_section(rv: Review, cr: ConditionRun) -> Section | None:
    """The weather criterion's values (IS Code 2.3: lw1, lw2, θ0, θ1, θ2, areas a and b, windage area and
    lever Z, ...) per side, one column each (None when the set has no weather criterion)."""
    parts = [s for s in cr.criteria_doc.sections if s.key.startswith("weather_")]
    if not parts:
        return None
    sides = [p.key.split("_", 1)[1] for p in parts]
    vals = [{q.key: q.value for q in p.values} for p in parts]
    rows = [{"quantity": label, "unit": unit, **{s: v.get(key) for s, v in zip(sides, vals, strict=True)}}
            for key, label, unit in WEATHER_VALUES]
    cols = [Column("quantity", "quantity"), Column("unit", "unit")] + [
        Column(s, f"heeling to {s}", "", 4) for s in sides]
    drawn = [f for s in cr.criteria_doc.sections for f in s.figures if f.view == "criteria_gz"]
    figures = [Figure("weather-gz", f"{cr.inp.condition.name}: GZ with the wind levers lw1, lw2 and areas a, b",
                      "weather_gz", {**drawn[0].data, "title": "Weather criterion: GZ with lw1, lw2 and areas "
                                      "a (red), b (green), heel positive starboard down"})] if drawn else []
    return Section("weather", "Weather criterion (severe wind and rolling, IS Code 2.3)",
                   tables=[Table("weather", "", cols, rows)], figures=figures,
                   notes=["lw1 from the windage area A and its lever Z at the wind pressure P; lw2 = 1.5 lw1 "
                          "(gust); θ1 the roll to windward from θ0; area a lies between lw2 and the curve from "
                          "θ0 − θ1 to the gust-lever intercept, area b between the curve and lw2 from that "
                          "intercept to θ2; the criterion asks b ≥ a and θ0 within its limit (the criteria "
                          "table gives the verdict)."])


# ---------------------------------------------------------------------------- KG limits


def kg_limits_section(rv: Review) -> Section | None:
    """The KG-limit table and figure for the report's criteria set over ``options.kg_limits`` [t]
    (the same inputs and defaults as the ``kg-limits`` command on the case file); None when not asked."""
    from .limits_analysis import kg_limits_analysis

    ds = rv.options.kg_limits
    if ds is None:
        return None
    bar = rv.bars(1, "KG limits")
    try:
        rows, doc = kg_limits_analysis(rv.hull, ds, rv.cset, density=rv.case.density, spec=rv.case.spec,
                                       openings=rv.case.openings)
        bar()
    finally:
        bar.close()
    sec = doc.sections[0]
    sec.key, sec.title = "kg_limits", f"KG limits: {rv.cset.name}"
    lim = sec.tables[0]
    lim.title = "Largest fluid-corrected KG per displacement, and the criterion that governs"
    labels = {"gm_required": "GM required"}  # a label that may wrap; the notes name the other keys
    lim.columns = [Column(col.key, labels.get(col.key, col.label), col.unit, col.digits) for col in lim.columns]
    fig = sec.figures[0]
    fig.title = f"{rv.vessel}: KG limits ({rv.cset.name}, free trim)"
    fig.data = {"vessel": rv.vessel, "rows": rows, "title": fig.title}
    return sec


# ---------------------------------------------------------------------------- a fully submerged load


def submergence_section(rv: Review, cr: ConditionRun) -> Section | None:
    """A neutral load (the hull's whole buoyancy): no waterplane, weight stability only — KB, KG, GM = KB − KG
    fluid, and the ballast-down sequence from floating to submerged for this KG (None when it floats)."""
    from .submergence import submergence_analysis

    eq, c = cr.equilibrium, cr.inp.condition
    if not eq.submerged:
        return None
    kb = float(eq.cob[2])
    q = Quantity
    sec = Section("submergence", "Fully submerged: weight stability only", values=[
        q("kb", "KB (centroid of the whole body)", kb, "m"), q("kg", "KG (solid)", c.kg, "m"),
        q("kg_fluid", "KG fluid", c.kg_fluid, "m"), q("bmt", "BMt (no waterplane)", 0.0, "m"),
        q("gmt", "GMt = KB − KG fluid", kb - c.kg_fluid, "m"),
        q("moment", "righting moment per radian, Δ·GM", c.displacement * (kb - c.kg_fluid), "t·m/rad")],
        notes=[SUBMERGED_NOTE, "B is fixed in the body and M lies on B at every heel: GZ = BG sin φ with the "
                               "sign of KB − KG (textbook)."])
    lo, hi = float(rv.hull.bounds[0][2]), float(rv.hull.bounds[1][2])
    # up to the top (a flat top there is still the waterplane: the limit from below) and just over it
    drafts = lo + (hi - lo) * np.append(np.linspace(0.05, 1.0, 20), 1.01)
    _, doc = submergence_analysis(rv.hull, drafts=drafts, density=rv.case.density, kg=c.kg_fluid)
    seq = doc.sections[0]
    seq.key, seq.title = "submergence_sequence", "Ballasting down to this state (upright, level trim)"
    keep = ("draft", "displacement", "kb", "awp", "bmt", "kmt", "gmt", "submerged")
    t = seq.tables[0]
    t.columns = [col for col in t.columns if col.key in keep]
    t.rows = [{k: r[k] for k in keep if k in r} for r in t.rows]  # new dicts: the figure keeps its rows
    seq.figures[0].title = f"{rv.vessel}: submergence, KG fluid {c.kg_fluid:.3f} m"
    sec.sections.append(seq)
    return sec

"""Analyses: a case (hull, water, condition, openings, criteria) in, results and a report document out.

The decisions that every front end shares live here: which side(s) a curve is computed on,
which angles are allowed, "case file or mesh with a load". The CLI, a report and a batch study
call these functions and render the :class:`~meshhydro.document.Document` they return
(:mod:`meshhydro.renderers`); figures are carried as data for the views.

Public: :class:`CaseInput`, :func:`from_case`, :func:`from_mesh`, :func:`choose_sides`,
:func:`curve_angles`, :func:`check_angles`, :func:`float_analysis`, :func:`righting_analysis`,
:func:`criteria_analysis`, :func:`cross_analysis`, :func:`table_analysis`, :func:`check_analysis`.
"""
from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Any, Callable, Sequence

import numpy as np

from . import tolerances as tol
from .applicability import applicability_notes
from .case_wind import WEATHER_VALUES, weather_values, wind_and_arms
from . import analysis_tanks as tk
from .criteria import CAUTION, CriteriaSet, Report, evaluate
from .document import Column, Document, Figure, Quantity, Section, Table
from .equilibrium import Equilibrium, solve_load
from .errors import InputError, OpenRimError
from .frames import SEA_WATER
from .hydrostatics import FIELDS, UNITS
from .loading import Condition, Opening, condition, read_case
from .mesh import HealthReport
from .solver import check_load, is_neutral
from .submerged import NOTE as SUBMERGED_NOTE
from .submerged import check_clearance
from .stability import CrossCurves, RightingCurve, cross_curves, curve_for_load
from .tank_case import resolve_condition
from .vessel import FloatingHull

Progress = Callable[[], object] | None

SIDES = {"starboard": (1,), "port": (-1,), "both": (1, -1)}


@dataclass(frozen=True, eq=False)
class CaseInput:
    """One hull with one loading condition: what every stability analysis starts from.

    hull : FloatingHull; condition : Condition; openings : tuple of Opening;
    density : float [t/m³]; label : str (for titles); spec : the validated case file
    (:class:`meshhydro.schemas.CaseSpec`: windage, weather, arms, ...) or None for a bare mesh.
    """

    hull: FloatingHull
    condition: Condition
    openings: tuple[Opening, ...]
    density: float
    label: str
    spec: Any = None
    #: for a load equal to the hull's whole buoyancy: depth [m] of the body's top below the surface
    #: (None: just under it); an error for a load that floats at the surface
    submerged_depth: float | None = None

    def depth_option(self) -> float:
        """The submerged depth [m] to solve with, after checking that it applies to this load."""
        if self.submerged_depth is None:
            return 0.0
        c = self.condition
        rho, v0 = check_load(self.hull, c.displacement, self.density)
        if not is_neutral(self.hull, v0):
            raise InputError(f"a submerged depth was given but the load ({c.displacement:.6g} t) is not the "
                             f"hull's whole buoyancy ({self.hull.total_volume * rho:.6g} t): it floats at the surface")
        return check_clearance(self.submerged_depth)


def from_case(path: str, condition_name: str | None = None, *, density: float | None = None,
              progress: Callable[[str, int, int], object] | None = None) -> CaseInput:
    """A case file's hull and condition (the first unless named); ``density`` overrides the file's [t/m³];
    ``progress(stage, done, total)`` follows the mesh's reading and checking."""
    case = read_case(path)
    return case_input(case, case.load_hull(progress=progress), condition_name, density=density)


def case_input(case: Any, hull: FloatingHull, condition_name: str | None = None, *, density: float | None = None,
               tanks: Any = None) -> CaseInput:
    """One condition of a read case (:class:`meshhydro.loading.Case`) on its loaded hull: tank fills and flooded
    compartments resolved against the hull (``tanks``: already built ones, else built here), the case spec
    (weather, windage, arms) and the condition's submerged depth."""
    cond = resolve_condition(case, hull, condition_name, tanks=tanks)
    rho = case.density if density is None else float(density)
    specs = [c for c in getattr(case.spec, "conditions", ()) if c.name == cond.name]
    depth = specs[0].submerged_depth if specs else None
    return CaseInput(hull, cond, case.openings, rho, f"{os.path.basename(case.path)}: {cond.name}", case.spec,
                     submerged_depth=depth)


def from_mesh(hull: FloatingHull, source: str, displacement: float, cog: Sequence[float], *, fsm: float = 0.0,
              openings: Sequence[Opening] = (), density: float | None = None) -> CaseInput:
    """A quick check: a loaded mesh with a displacement [t], G (3,) [m] and free-surface moment [t·m]."""
    cond = condition(displacement, cog, name="quick check", fsm=fsm)
    rho = SEA_WATER if density is None else float(density)
    return CaseInput(hull, cond, tuple(openings), rho, f"{os.path.basename(source)}: Δ {cond.displacement:g} t")


# ---------------------------------------------------------------------------- angles and sides


def check_angles(angles: np.ndarray, lo: float, hi: float, *, what: str = "heels", hint: str = "") -> np.ndarray:
    """``angles`` [deg] unchanged when all lie within lo..hi, else an InputError naming ``what``."""
    a = np.asarray(angles, dtype=float)
    if len(a) == 0 or not np.all(np.isfinite(a)) or np.any(a < lo) or np.any(a > hi):
        raise InputError(f"{what} takes angles from {lo:g} to {hi:g}°{hint}")
    return a


def choose_sides(hull: FloatingHull, cond: Condition, direction: str = "auto") -> tuple[int, ...]:
    """Heel sides (+1 starboard down, -1 port down): ``auto`` is starboard alone when hull and load
    are port-starboard symmetric, both otherwise."""
    if direction == "auto":
        # tanks and flooded compartments may act unevenly on the two sides: both sides
        plain = not cond.tanks and not cond.flooded
        direction = "starboard" if plain and hull.is_symmetric and abs(cond.cog[1]) < tol.CENTRELINE else "both"
    if direction not in SIDES:
        raise InputError(f"direction must be auto, both, starboard or port, got {direction!r}")
    return SIDES[direction]


def curve_angles(heels: np.ndarray, sides: tuple[int, ...]) -> np.ndarray:
    """Signed heels [deg] for angles 0..180 on the given sides, upright included."""
    hs = np.asarray(heels, dtype=float)
    return np.unique(np.concatenate([hs * s for s in sides] + [np.array([0.0])]))


# ---------------------------------------------------------------------------- shared sections


def condition_section(cond: Condition) -> Section:
    """The loading condition: items (when given) and its totals."""
    sec = Section("condition", f"condition: {cond.name}")
    if cond.items:
        cols = [Column("item", "item"), Column("mass", "mass", "t"), Column("x", "x", "m"), Column("y", "y", "m"),
                Column("z", "z", "m"), Column("fsm", "fsm", "t.m")]
        rows = [{"item": i.name, "mass": i.mass, "x": i.at[0], "y": i.at[1], "z": i.at[2], "fsm": i.fsm}
                for i in cond.items]
        sec.tables.append(Table("items", "", cols, rows))
    sec.sections.append(Section("totals", "", values=[
        Quantity("displacement", "displacement", cond.displacement, "t"), Quantity("lcg", "LCG", cond.cog[0], "m"),
        Quantity("tcg", "TCG", cond.cog[1], "m"), Quantity("vcg", "VCG (KG)", cond.cog[2], "m"),
        Quantity("fsm", "free-surface moment", cond.fsm, "t·m"),
        Quantity("kg_fluid", "KG corrected (fluid)", cond.kg_fluid, "m"),
    ]))
    return sec


def _doc(title: str, inp: CaseInput | None = None, **kw: object) -> Document:
    vessel = inp.hull.name if inp is not None else ""
    meta = {"density": inp.density} if inp is not None else {}
    return Document(title=title, vessel=vessel, cautions=[CAUTION], meta=meta, **kw)  # type: ignore[arg-type]


# ---------------------------------------------------------------------------- floating position


def _equilibrium_values(inp: CaseInput, eq: Equilibrium) -> list[Quantity]:
    h = eq.hydrostatics
    q = Quantity
    return [
        q("draft", "draft at reference", eq.draft, "m"), q("x_ref", "reference x", inp.hull.x_ref, "m"),
        q("draft_fore", "draft fore (x = %.3f)" % eq.x_fore, eq.draft_fore, "m"),
        q("draft_aft", "draft aft (x = %.3f)" % eq.x_aft, eq.draft_aft, "m"),
        q("trim_m", "trim (fore - aft drafts)", eq.trim_m, "m"),
        q("heel", "heel (+ starboard down)", eq.heel, "deg"), q("trim", "trim (+ bow down)", eq.trim, "deg"),
        q("volume", "volume", eq.volume, "m³"), q("lcb", "LCB", eq.cob[0], "m"), q("tcb", "TCB", eq.cob[1], "m"),
        q("vcb", "VCB (KB)", eq.cob[2], "m"), q("bmt", "BMt", h.bmt, "m"), q("kmt", "KMt", h.kmt, "m"),
        q("gmt", "GMt (fluid)", eq.gmt, "m"), q("gml", "GMl (fluid)", eq.gml, "m"),
        q("tpc", "TPC", h.tpc, "t/cm"), q("mct", "MCT 1 cm", h.mct, "t·m/cm"), q("stable", "stable", eq.stable),
        q("solver", "solver", f"{eq.iterations} Newton steps, {eq.evaluations} kernel evaluations"),
        q("residual_volume", "residual volume (relative)", f"{eq.residual_volume:.1e}"),
        q("residual_lever", "residual lever", f"{eq.residual_lever:.1e}", "m"),
    ]


def _submerged_values(inp: CaseInput, eq: Equilibrium) -> list[Quantity]:
    """The values of a fully submerged position: no waterplane, so BM = 0 and KM = KB."""
    q = Quantity
    return [
        q("submerged", "fully submerged", True), q("draft", "depth of reference point", eq.draft, "m"),
        q("x_ref", "reference x", inp.hull.x_ref, "m"),
        q("heel", "heel (+ starboard down)", eq.heel, "deg"), q("trim", "trim (+ bow down)", eq.trim, "deg"),
        q("volume", "volume", eq.volume, "m³"), q("lcb", "LCB", eq.cob[0], "m"), q("tcb", "TCB", eq.cob[1], "m"),
        q("vcb", "VCB (KB)", eq.cob[2], "m"), q("bmt", "BMt", 0.0, "m"), q("kmt", "KMt (= KB)", eq.cob[2], "m"),
        q("gmt", "GMt (fluid)", eq.gmt, "m"), q("gml", "GMl (fluid)", eq.gml, "m"), q("stable", "stable", eq.stable),
        q("residual_volume", "residual volume (relative)", f"{eq.residual_volume:.1e}"),
        q("residual_lever", "residual lever", f"{eq.residual_lever:.1e}", "m"),
    ]


def float_analysis(inp: CaseInput) -> tuple[Equilibrium, Document]:
    """Free-floating position of the condition, and its report."""
    c = inp.condition
    eq = solve_load(inp.hull, c.load(), density=inp.density, compartments=c.flooded,
                    submerged_depth=inp.depth_option())
    values = _submerged_values(inp, eq) if eq.submerged else _equilibrium_values(inp, eq)
    sec = Section("equilibrium", "equilibrium:" if not c.flooded else "equilibrium (damaged):",
                  values=values, notes=tk.method_note(c))
    if eq.note:
        sec.notes.append(f"note: {eq.note}")
    secs = [condition_section(c), sec]
    if c.tanks or c.items:
        secs.insert(1, tk.weight_section(c))
    data = {"condition": c.to_dict(), "equilibrium": eq.to_dict(), "caution": CAUTION}
    if c.tanks:
        data["fluid"] = c.fluid
        data["weight_groups"] = secs[1].tables[0].rows
    if c.flooded:
        intact = solve_load(inp.hull, c.load(), density=inp.density)
        secs.append(tk.damage_section(inp, eq, intact))
        data["intact_equilibrium"] = intact.to_dict()
        data["damage"] = {t.key: t.rows for t in secs[-1].tables}
    doc = _doc(f"floating position: {inp.label}  (density {inp.density:g} t/m³)", inp, sections=secs,
               primary="equilibrium")
    doc.data = data
    return eq, doc


# ---------------------------------------------------------------------------- righting curve

ROW_KEYS = ["heel", "gz", "kn", "draft", "keel_depth", "trim", "lcb", "tcb", "vcb", "up_x", "up_y", "up_z", "bm"]
ROW_UNITS = {"heel": "deg", "gz": "m", "kn": "m", "draft": "m", "keel_depth": "m", "trim": "deg", "lcb": "m",
             "tcb": "m", "vcb": "m",
             "bm": "m", "deck_freeboard": "m"}
SUMMARY_UNITS = {
    "gm_upright": "m", "gm_from_slope": "m", "max_gz": "m", "angle_of_max_gz": "deg", "equilibrium_angle": "deg",
    "vanishing_angle": "deg", "range_of_stability": "deg", "deck_edge_angle": "deg", "downflooding_angle": "deg",
    "swamping_angle": "deg",
    "area_0_30": "m·rad", "area_0_40": "m·rad", "area_30_40": "m·rad",
}


def solve_curve(inp: CaseInput, heels: np.ndarray, *, direction: str = "auto", free_trim: bool = True,
                progress: Progress = None, method: str | None = None,
                intact: bool = False) -> tuple[RightingCurve, tuple[int, ...]]:
    """The GZ curve over ``heels`` [deg, 0..180] on the chosen side(s), and those sides.

    ``method`` overrides the condition's fluid method (``exact``/``fsm``); ``intact`` leaves out the
    condition's flooded compartments.
    """
    sides = choose_sides(inp.hull, inp.condition, direction)
    hs = curve_angles(check_angles(heels, 0.0, 180.0), sides)
    c = inp.condition
    curve = curve_for_load(inp.hull, c.load(method), heels=hs, free_trim=free_trim, density=inp.density,
                           openings=inp.openings, progress=progress, compartments=() if intact else c.flooded,
                           submerged_depth=inp.depth_option())
    return curve, sides


def curve_count(heels: np.ndarray, inp: CaseInput, direction: str = "auto") -> int:
    """Number of angles :func:`solve_curve` will solve (for a progress bar)."""
    return len(curve_angles(heels, choose_sides(inp.hull, inp.condition, direction)))


def _levers_table(curve: RightingCurve) -> Table:
    rows = curve.rows()
    keys = ROW_KEYS + (["deck_freeboard"] if curve.deck_freeboard is not None else [])
    for name, fb in curve.openings.items():
        for r, v in zip(rows, fb, strict=True):
            r[f"opening:{name}"] = float(v)
        keys.append(f"opening:{name}")
    digits = {"heel": 1, "trim": 3}
    # openings: their height above the water [m]
    cols = [Column(k, k, ROW_UNITS.get(k, "m" if k.startswith("opening:") else ""), digits.get(k, 4)) for k in keys] \
        + [Column("evaluations", "evaluations")]
    return Table("levers", "", cols, rows, text_keys=keys)


def _derived_section(curve: RightingCurve, sides: tuple[int, ...]) -> Section:
    sec = Section("derived", "")
    for s in sides:
        sm = curve.summary(s)
        if sm.get("max_gz_beyond_range"):
            sec.notes.append(f"note: heeling to {sm['side']}, GZ still rises at the last computed angle: "
                             f"its maximum lies beyond the range")
        vals = [Quantity(k, k.replace("_", " "), sm.get(k), SUMMARY_UNITS[k]) for k in SUMMARY_UNITS if k in sm]
        if sm.get("downflooding_opening"):
            vals.append(Quantity("downflooding_opening", "downflooding opening", sm["downflooding_opening"]))
        sec.sections.append(Section(f"derived_{sm['side']}", f"derived values, heeling to {sm['side']}:",
                                    values=vals))
    sec.notes.append("areas: exact integrals of the not-a-knot cubic spline through the computed points; "
                     "maximum GZ and the angles are solved on the true geometry between them.")
    sec.notes.append(f"kernel evaluations per angle: {curve.evaluations.mean():.2f} on average")
    if curve.submerged:
        sec.notes.append(f"note: fully submerged at every angle (B fixed, BM = 0, M on B): {SUBMERGED_NOTE}")
    return sec


def derived_section(curve: RightingCurve, sides: tuple[int, ...]) -> Section:
    """The derived values of a curve on each side (GM, max GZ, angles, areas) as a section."""
    return _derived_section(curve, sides)


def righting_analysis(inp: CaseInput, heels: np.ndarray, *, direction: str = "auto", free_trim: bool = True,
                      progress: Progress = None) -> tuple[RightingCurve, Document]:
    """GZ curve with derived values, and its report (figure ``gz``)."""
    curve, sides = solve_curve(inp, heels, direction=direction, free_trim=free_trim, progress=progress)
    c = inp.condition
    others = tk.companions(c, lambda **kw: solve_curve(inp, heels, direction=direction, free_trim=free_trim,
                                                       **kw)[0])
    trim = "free" if curve.free_trim else "fixed"
    secs = [condition_section(c), Section("levers", tk.curve_label(c) + ":" if others else "",
                                          tables=[_levers_table(curve)], notes=tk.method_note(c)),
            _derived_section(curve, sides)]
    title = f"GZ: {inp.label} (Δ {c.displacement:.3f} t, KG fluid {c.kg_fluid:.3f} m, {trim} trim)"
    if others:
        secs.append(tk.comparison_section(c, curve, others, sides))
        secs[1].figures.append(tk.curves_figure("gz", title, c, curve, others))
    else:
        secs[1].figures.append(Figure("gz", title, "righting_curve", curve))
    doc = _doc(f"righting levers: {inp.label}  ({trim} trim, density {inp.density:g} t/m³)", inp,
               sections=secs, primary="levers")
    doc.data = {"condition": c.to_dict(), "free_trim": curve.free_trim, "density": curve.density,
                "rows": doc.table("levers").rows, "summary": [curve.summary(s) for s in sides], "caution": CAUTION}
    if curve.submerged:
        doc.data.update(submerged=True, note=SUBMERGED_NOTE)
    if c.tanks:
        doc.data["fluid"] = c.fluid
    if others:
        doc.data["label"] = tk.curve_label(c)
        doc.data["beside"] = {k: {"label": label, "rows": oc.rows(), "summary": [oc.summary(s) for s in sides]}
                              for k, label, oc in others}
    return curve, doc


# ---------------------------------------------------------------------------- criteria


def _check(inp: CaseInput, curve: RightingCurve, cset: CriteriaSet, sides: tuple[int, ...], *,
           key: str = "results", wind: Any = None, arms: Any = None) -> tuple[Report, Table, Any]:
    """A criteria set evaluated on one curve: the report, its results table and the upright hydrostatics
    (None for a submerged body, which has no waterplane)."""
    i0 = int(np.argmin(np.abs(curve.heel)))  # upright is always on the curve
    upright = None if curve.submerged else inp.hull.hydrostatics(
        float(curve.draft[i0]), heel=0.0, trim=float(curve.trim[i0]), density=inp.density)
    rep = evaluate(curve, cset, sides=sides, hydrostatics=upright, openings=inp.openings, windage=wind,
                   heeling_arms=arms)
    keys = ["id", "side", "criterion", "unit", "bound", "required", "attained", "margin", "result", "note"]
    rows = [{"id": r.id, "side": r.side, "criterion": r.text, "unit": r.unit, "bound": r.bound[:3],
             "required": r.required, "attained": r.attained, "margin": r.margin,
             "result": "pass" if r.passed else "FAIL", "note": r.note} for r in rep.results]
    table = Table(key, "", [Column(k, k) for k in keys], rows,
                  text_keys=["id", "side", "criterion", "bound", "required", "attained", "margin", "unit", "result",
                             "note"])
    return rep, table, upright


#: relative difference between GM0 and the GZ curve's slope at 0° beyond which a note says GM0 describes
#: only the very start of the curve (common practice: on a wall-sided form the two agree closely)
GM_SLOPE_RTOL = 0.1
#: ... and the least absolute difference [m] for it (a finite-difference slope over coarse heel steps)
GM_SLOPE_ATOL = 0.05


def _extra_notes(inp: CaseInput, curve: RightingCurve, cset: CriteriaSet, upright: Any) -> list[str]:
    """Notes beside a criteria check: a submerged body, and where the set says it applies."""
    notes = []
    if curve.submerged:
        notes.append(f"fully submerged at every angle (B fixed, BM = 0, M on B): {SUBMERGED_NOTE}")
    if cset.clauses and upright is not None:
        notes += applicability_notes(upright.lwl, len(inp.hull.report.bodies), clauses=cset.clauses)
    gm_up, gm_slope = curve.gm_upright, curve.gm_from_slope()
    if any(c.kind == "gm" for c in cset.items) and gm_up is not None and gm_slope is not None and \
            abs(gm_slope - gm_up) > max(GM_SLOPE_RTOL * abs(gm_up), GM_SLOPE_ATOL):
        notes.append(f"GM0 {gm_up:.3f} m is the upright waterplane's, but the GZ curve's slope at 0° gives "
                     f"{gm_slope:.3f} m per radian: the waterplane changes within the first degrees (a float or "
                     "a hull lifting or immersing), so GM0 describes only the very start of the curve; judge "
                     "stability by the curve's areas and angles there")
    return notes


def criteria_analysis(inp: CaseInput, cset: CriteriaSet, heels: np.ndarray, *, direction: str = "auto",
                      free_trim: bool = True, progress: Progress = None,
                      keep: dict[str, Any] | None = None) -> tuple[Report, Document]:
    """A criteria set checked on the condition's GZ curve, and its report (verdict set).

    ``keep`` (a dict, optional) receives the solved objects for a caller composing its own report:
    ``curve`` (the deciding RightingCurve), ``sides``, ``others`` (the companion curves, as
    :func:`meshhydro.analysis_tanks.companions`) and ``wind`` (the WindSetup or None).

    Weather and heeling-arm criteria take the case's [weather], [[windage]] and [[arm]] data
    (InputError when the set needs what the input lacks). With tanks the condition's ``fluid`` method
    decides (the other method's results are shown beside, for information); with flooded compartments
    the damaged curve decides (survival) and the intact ship's results are shown beside.
    """
    c = inp.condition
    sym = inp.hull.is_symmetric and abs(c.cog[1]) < tol.CENTRELINE
    wind, arms = wind_and_arms(inp.spec, inp.hull, cset, mirror=sym, where=inp.label)
    curve, sides = solve_curve(inp, heels, direction=direction, free_trim=free_trim, progress=progress)
    rep, table, upright = _check(inp, curve, cset, sides, wind=wind, arms=arms)
    weather = [] if wind is None else [{"side": k, **weather_values(*v)} for k, v in wind.last.items()]
    others = tk.companions(c, lambda **kw: solve_curve(inp, heels, direction=direction, free_trim=free_trim,
                                                       **kw)[0])
    what = tk.curve_label(c)
    if keep is not None:
        keep.update(curve=curve, sides=sides, others=others, wind=wind)
    extra = _extra_notes(inp, curve, cset, upright)
    sec = Section("results", f"decided on: {what}" if others else "", tables=[table],
                  notes=tk.method_note(c) + [f"note: {n}" for n in list(rep.notes) + extra])
    title = f"GZ and criteria: {inp.label} - {'PASS' if rep.passed else 'FAIL'}"
    sec.figures.append(tk.curves_figure("gz", title, c, curve, others) if others
                       else _criteria_figure(inp, rep, curve, sides, wind, cset, arms))
    secs = [condition_section(c), sec]
    for w in weather:
        secs.append(Section(f"weather_{w['side']}", f"weather criterion (IS Code 2.3), heeling to {w['side']}:",
                            values=[Quantity(k, label, w[k], unit) for k, label, unit in WEATHER_VALUES]))
    beside = {}
    for k, label, oc in others:
        orep, otab, _ = _check(inp, oc, cset, sides, key=f"results_{k}", wind=wind, arms=arms)
        secs.append(Section(f"results_{k}", f"beside it, for information: {label} - "
                            f"{'all met' if orep.passed else 'NOT all met'}", tables=[otab]))
        beside[k] = {"label": label, "passed": orep.passed, **orep.to_dict()}
    doc = Document(title=f"criteria: {rep.set_name}", vessel=inp.hull.name,
                   header=[f"source: {rep.source}", f"vessel: {inp.label}"],
                   sections=secs, cautions=[rep.caution], verdict=rep.passed,
                   verdict_text=("all criteria met" if rep.passed else "NOT all criteria met")
                   + (f" ({what})" if others else ""), primary="results",
                   meta={"density": inp.density})
    doc.data = {**rep.to_dict(), "condition": c.to_dict(), "notes": list(rep.notes) + extra}
    if weather:
        doc.data["weather"] = weather
    if curve.submerged:
        doc.data.update(submerged=True, submerged_note=SUBMERGED_NOTE)
    if c.tanks:
        doc.data["fluid"] = c.fluid
    if others:
        doc.data["decided_on"] = what
        doc.data["beside"] = beside
    return rep, doc


def _criteria_figure(inp: CaseInput, rep: Report, curve: RightingCurve, sides: tuple[int, ...], wind: Any,
                     cset: CriteriaSet, arms: dict[str, Any]) -> Figure:
    """The GZ figure of a criteria check: the plain curve, or with the heeling arms the set uses (their
    areas as the first area criterion on each arm bounds them) and the weather levers and areas a, b."""
    from .arms import GZCurve, arm_analysis

    title = f"GZ and criteria: {inp.label} - {'PASS' if rep.passed else 'FAIL'}"
    shades = []
    for name in sorted(cset.arms):
        ps = [c.params for c in cset.items if getattr(c.params, "arm", None) == name]
        p = next((q for q in ps if q.end is not None or q.to_flooding), ps[0])
        for s in sides:
            flood = curve.downflooding_angle(s)[0] if p.to_flooding else None
            try:
                an = arm_analysis(GZCurve(*curve.side(s)), arms[name], limit=p.end, flooding=flood)
            except InputError:
                continue  # the criterion row already says why; nothing to draw
            shades.append({"sign": s, "name": name, "arm": arms[name], "analysis": an})
    if wind is None and not shades:
        return Figure("gz", title, "righting_curve", curve)
    data = {"curve": curve, "arms": shades,
            "weather": {} if wind is None else {k: v[0] for k, v in wind.last.items()}}
    return Figure("gz", title, "criteria_gz", data)


# ---------------------------------------------------------------------------- cross curves and tables


def cross_analysis(hull: FloatingHull, displacements: np.ndarray, heels: np.ndarray, *, density: float,
                   lcg: float | None = None, progress: Progress = None) -> tuple[CrossCurves, Document]:
    """KN cross curves (free trim, G at K) and their report (figure ``kn``)."""
    cc = cross_curves(hull, displacements, heels, density=density, lcg=lcg, progress=progress)
    rows = []
    for i, d in enumerate(cc.displacements):
        r: dict[str, object] = {"displacement": float(d), "lcg": float(cc.lcg[i])}
        for j, h in enumerate(cc.heels):
            r[f"kn_{h:g}"] = float(cc.kn[i, j])
        rows.append(r)
    cols = [Column("displacement", "displacement", "t", 4), Column("lcg", "lcg", "m", 4)]
    cols += [Column(f"kn_{h:g}", f"kn_{h:g}", "m", 4) for h in cc.heels]
    sec = Section("kn", "", tables=[Table("kn", "", cols, rows)])
    sec.figures.append(Figure("kn", f"Cross curves (KN, free trim): {os.path.basename(hull.name)}, "
                                    f"ρ {density:g} t/m³", "cross_curves", cc))
    doc = Document(title=f"cross curves KN [m]: {hull.name}  (free trim, G at K, LCG for level upright flotation"
                         f"{'' if lcg is None else ' overridden'}; density {density:g} t/m³)", vessel=hull.name,
                   header=["GZ = KN - KG sin(heel) for a centre of gravity on the centreline"], sections=[sec],
                   cautions=[CAUTION], primary="kn", meta={"density": density})
    # the blank line between the header and the table
    doc.header.append("")
    doc.data = {"density": density, "heels": cc.heels, "displacements": cc.displacements, "lcg": cc.lcg,
                "kn": cc.kn, "note": "G at K (KG = 0) on the centreline; free trim", "caution": CAUTION}
    return cc, doc


def drafts_for_displacements(hull: FloatingHull, displacements: np.ndarray, *, heel: float = 0.0,
                             trim: float = 0.0, density: float = SEA_WATER) -> np.ndarray:
    """Drafts [m] at (x_ref, 0) at which the hull displaces each of ``displacements`` [t] (fixed heel, trim)."""
    from .solver import check_load

    out = []
    for d in np.asarray(displacements, float):
        rho, v0 = check_load(hull, float(d), density)
        out.append(hull.draft_for_volume(v0, heel=heel, trim=trim))
    return np.array(out)


def table_analysis(hull: FloatingHull, drafts: np.ndarray, *, heel: float = 0.0, trim: float = 0.0,
                   density: float = SEA_WATER) -> tuple[list[dict[str, float]], Document]:
    """Hydrostatic particulars over ``drafts`` [m] at one heel and trim [deg] (each strictly between -90 and
    90°: the draft is measured along the hull's z axis), and their report; rows stop below an open rim."""
    for name, a in (("heel", heel), ("trim", trim)):
        if not (np.isfinite(a) and abs(a) < 90.0):
            raise InputError(f"{name} {a:g}°: a table over drafts takes heel and trim between -90 and 90° "
                             f"(drafts are measured along the hull's z axis)")
    rim = hull.rim_draft(heel, trim)
    below = [float(t) for t in drafts if rim is None or t <= rim]
    if not below:
        raise OpenRimError(f"every draft asked for reaches the open rim of the mesh (at draft {rim:.4f} m, heel "
                           f"{heel:g}°, trim {trim:g}°)")
    rows = []
    for t in below:
        try:
            rows.append(hull.hydrostatics(t, heel=heel, trim=trim, density=density).to_dict())
        except OpenRimError:
            if rows:  # the rim lies at this draft within rounding: the table stops before it
                break
            raise
    below = [r["draft"] for r in rows]
    digits = {"cb": 4, "cp": 4, "cm": 4, "cwp": 4, "heel": 1, "trim": 2}
    cols = [Column(k, k, UNITS[k], digits.get(k, 3)) for k in FIELDS]
    table = Table("hydrostatics", "", cols, rows, text_keys=[k for k in FIELDS if k not in ("heel", "trim")])
    sec = Section("hydrostatics", "", tables=[table])
    if len(below) < len(drafts):
        sec.notes.append(f"note: the table stops at draft {below[-1]:.4f} m: the water reaches the open rim of the "
                         f"mesh at draft {rim:.4f} m; {len(drafts) - len(below)} deeper draft(s) left out")
    sec.figures.append(Figure("curves", f"Hydrostatic curves: {os.path.basename(hull.name)} "
                                        f"(ρ = {density:g} t/m³, heel {heel:g}°, trim {trim:g}°)",
                              "hydrostatic_curves", rows))
    doc = Document(title=f"hydrostatics: {hull.name}  density {density:g} t/m³  heel {heel:g}°  trim {trim:g}° "
                         f"(draft at x = {hull.x_ref:.3f} m on the centreline, above z = 0)", vessel=hull.name,
                   sections=[sec], cautions=[CAUTION], primary="hydrostatics", data=rows, meta={"density": density})
    return rows, doc


# ---------------------------------------------------------------------------- mesh check


def check_analysis(rep: HealthReport) -> Document:
    """The health report of a mesh as a document (verdict: usable or not)."""
    lo, hi = rep.bounds
    vals = [("vertices", "vertices", rep.n_vertices, ""), ("faces", "faces", rep.n_faces, ""),
            ("welded_vertices", "welded duplicates", rep.welded_vertices, "vertices"),
            ("extent", "extent x, y, z", "  ".join(f"{e:.4f}" for e in rep.extent), "m"),
            ("z_range", "z range", f"{lo[2]:.4f} to {hi[2]:.4f}", "m"), ("closed", "closed", rep.closed, ""),
            ("consistent_winding", "consistent winding", rep.consistent_winding, ""),
            ("degenerate_faces", "degenerate faces", len(rep.degenerate_faces), ""),
            ("duplicate_faces", "duplicate faces", len(rep.duplicate_faces), ""),
            ("bodies", "bodies", len(rep.bodies), ""), ("volume", "total volume", rep.volume, "m³")]
    lines = []
    for b in rep.bodies:
        vol = "open" if b.volume is None else f"{b.volume:.6g} m³"
        lines.append(f"  body {b.index}: {b.n_faces} faces, volume {vol}, "
                     f"x {b.bounds[0][0]:.3f}..{b.bounds[1][0]:.3f}, y {b.bounds[0][1]:.3f}..{b.bounds[1][1]:.3f}, "
                     f"z {b.bounds[0][2]:.3f}..{b.bounds[1][2]:.3f} m")
    lines += [f"  rim {i}: {r.n_edges} edges, z {r.z_min:.4f} to {r.z_max:.4f} m (face {r.first_face})"
              for i, r in enumerate(rep.rims)]
    lines += [f"warning: {w}" for w in rep.warnings] + [f"problem: {p}" for p in rep.problems]
    sec = Section("mesh", "", values=[Quantity(k, label, v, u) for k, label, v, u in vals], notes=lines)
    return Document(title=f"mesh check: {rep.source}", vessel=str(rep.source), sections=[sec], verdict=rep.usable,
                    verdict_text="usable" if rep.usable else "NOT usable", primary="mesh", data=rep.to_dict())

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
from typing import Callable, Sequence

import numpy as np

from . import tolerances as tol
from .criteria import CAUTION, CriteriaSet, Report, evaluate
from .document import Column, Document, Figure, Quantity, Section, Table
from .equilibrium import Equilibrium
from .errors import InputError
from .frames import SEA_WATER
from .hydrostatics import FIELDS, UNITS
from .loading import Condition, Opening, condition, read_case
from .mesh import HealthReport
from .stability import CrossCurves, RightingCurve, cross_curves
from .vessel import FloatingHull

Progress = Callable[[], object] | None

SIDES = {"starboard": (1,), "port": (-1,), "both": (1, -1)}


@dataclass(frozen=True, eq=False)
class CaseInput:
    """One hull with one loading condition: what every stability analysis starts from.

    hull : FloatingHull; condition : Condition; openings : tuple of Opening;
    density : float [t/m³]; label : str (for titles).
    """

    hull: FloatingHull
    condition: Condition
    openings: tuple[Opening, ...]
    density: float
    label: str


def from_case(path: str, condition_name: str | None = None, *, density: float | None = None,
              progress: Callable[[str, int, int], object] | None = None) -> CaseInput:
    """A case file's hull and condition (the first unless named); ``density`` overrides the file's [t/m³];
    ``progress(stage, done, total)`` follows the mesh's reading and checking."""
    case = read_case(path)
    cond = case.condition(condition_name)
    rho = case.density if density is None else float(density)
    return CaseInput(case.load_hull(progress=progress), cond, case.openings, rho, f"{os.path.basename(path)}: {cond.name}")


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
        direction = "starboard" if hull.is_symmetric and abs(cond.cog[1]) < tol.CENTRELINE else "both"
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
        q("heel", "heel (+ starboard down)", eq.heel, "deg"), q("trim", "trim (+ bow down)", eq.trim, "deg"),
        q("volume", "volume", eq.volume, "m³"), q("lcb", "LCB", eq.cob[0], "m"), q("tcb", "TCB", eq.cob[1], "m"),
        q("vcb", "VCB (KB)", eq.cob[2], "m"), q("bmt", "BMt", h.bmt, "m"), q("kmt", "KMt", h.kmt, "m"),
        q("gmt", "GMt (fluid)", eq.gmt, "m"), q("gml", "GMl (fluid)", eq.gml, "m"),
        q("tpc", "TPC", h.tpc, "t/cm"), q("mct", "MCT 1 cm", h.mct, "t·m/cm"), q("stable", "stable", eq.stable),
        q("solver", "solver", f"{eq.iterations} Newton steps, {eq.evaluations} kernel evaluations"),
        q("residual_volume", "residual volume (relative)", f"{eq.residual_volume:.1e}"),
        q("residual_lever", "residual lever", f"{eq.residual_lever:.1e}", "m"),
    ]


def float_analysis(inp: CaseInput) -> tuple[Equilibrium, Document]:
    """Free-floating position of the condition, and its report."""
    c = inp.condition
    eq = inp.hull.equilibrium(c.displacement, c.cog, density=inp.density, fsm=c.fsm)
    sec = Section("equilibrium", "equilibrium:", values=_equilibrium_values(inp, eq))
    if eq.note:
        sec.notes.append(f"note: {eq.note}")
    doc = _doc(f"floating position: {inp.label}  (density {inp.density:g} t/m³)", inp,
               sections=[condition_section(c), sec], primary="equilibrium")
    doc.data = {"condition": c.to_dict(), "equilibrium": eq.to_dict(), "caution": CAUTION}
    return eq, doc


# ---------------------------------------------------------------------------- righting curve

ROW_KEYS = ["heel", "gz", "kn", "draft", "trim", "lcb", "tcb", "vcb", "up_x", "up_y", "up_z", "bm"]
ROW_UNITS = {"heel": "deg", "gz": "m", "kn": "m", "draft": "m", "trim": "deg", "lcb": "m", "tcb": "m", "vcb": "m",
             "bm": "m", "deck_freeboard": "m"}
SUMMARY_UNITS = {
    "gm_upright": "m", "gm_from_slope": "m", "max_gz": "m", "angle_of_max_gz": "deg", "equilibrium_angle": "deg",
    "vanishing_angle": "deg", "range_of_stability": "deg", "deck_edge_angle": "deg", "downflooding_angle": "deg",
    "area_0_30": "m·rad", "area_0_40": "m·rad", "area_30_40": "m·rad",
}


def solve_curve(inp: CaseInput, heels: np.ndarray, *, direction: str = "auto", free_trim: bool = True,
                progress: Progress = None) -> tuple[RightingCurve, tuple[int, ...]]:
    """The GZ curve over ``heels`` [deg, 0..180] on the chosen side(s), and those sides."""
    sides = choose_sides(inp.hull, inp.condition, direction)
    hs = curve_angles(check_angles(heels, 0.0, 180.0), sides)
    c = inp.condition
    curve = inp.hull.righting_curve(c.displacement, c.cog, heels=hs, free_trim=free_trim, density=inp.density,
                                    fsm=c.fsm, openings=inp.openings, progress=progress)
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
    cols = [Column(k, k, ROW_UNITS.get(k, ""), digits.get(k, 4)) for k in keys] + [Column("evaluations", "evaluations")]
    return Table("levers", "", cols, rows, text_keys=keys)


def _derived_section(curve: RightingCurve, sides: tuple[int, ...]) -> Section:
    sec = Section("derived", "")
    for s in sides:
        sm = curve.summary(s)
        vals = [Quantity(k, k.replace("_", " "), sm.get(k), SUMMARY_UNITS[k]) for k in SUMMARY_UNITS if k in sm]
        if sm.get("downflooding_opening"):
            vals.append(Quantity("downflooding_opening", "downflooding opening", sm["downflooding_opening"]))
        sec.sections.append(Section(f"derived_{sm['side']}", f"derived values, heeling to {sm['side']}:",
                                    values=vals))
    sec.notes.append("areas: exact integrals of the not-a-knot cubic spline through the computed points.")
    sec.notes.append(f"kernel evaluations per angle: {curve.evaluations.mean():.2f} on average")
    return sec


def derived_section(curve: RightingCurve, sides: tuple[int, ...]) -> Section:
    """The derived values of a curve on each side (GM, max GZ, angles, areas) as a section."""
    return _derived_section(curve, sides)


def righting_analysis(inp: CaseInput, heels: np.ndarray, *, direction: str = "auto", free_trim: bool = True,
                      progress: Progress = None) -> tuple[RightingCurve, Document]:
    """GZ curve with derived values, and its report (figure ``gz``)."""
    curve, sides = solve_curve(inp, heels, direction=direction, free_trim=free_trim, progress=progress)
    c = inp.condition
    trim = "free" if curve.free_trim else "fixed"
    doc = _doc(f"righting levers: {inp.label}  ({trim} trim, density {inp.density:g} t/m³)", inp,
               sections=[condition_section(c), Section("levers", "", tables=[_levers_table(curve)]),
                         _derived_section(curve, sides)], primary="levers")
    doc.sections[1].figures.append(Figure(
        "gz", f"GZ: {inp.label} (Δ {c.displacement:.3f} t, KG fluid {c.kg_fluid:.3f} m, {trim} trim)",
        "righting_curve", curve))
    doc.data = {"condition": c.to_dict(), "free_trim": curve.free_trim, "density": curve.density,
                "rows": doc.table("levers").rows, "summary": [curve.summary(s) for s in sides], "caution": CAUTION}
    return curve, doc


# ---------------------------------------------------------------------------- criteria


def criteria_analysis(inp: CaseInput, cset: CriteriaSet, heels: np.ndarray, *, direction: str = "auto",
                      free_trim: bool = True, progress: Progress = None) -> tuple[Report, Document]:
    """A criteria set checked on the condition's GZ curve, and its report (verdict set)."""
    curve, sides = solve_curve(inp, heels, direction=direction, free_trim=free_trim, progress=progress)
    i0 = int(np.argmin(np.abs(curve.heel)))  # upright is always on the curve
    upright = inp.hull.hydrostatics(float(curve.draft[i0] / curve.up[i0, 2]), heel=0.0, trim=float(curve.trim[i0]),
                                    density=inp.density)
    rep = evaluate(curve, cset, sides=sides, hydrostatics=upright, openings=inp.openings)
    keys = ["id", "side", "criterion", "unit", "required", "attained", "margin", "result", "note"]
    rows = [{"id": r.id, "side": r.side, "criterion": r.text, "unit": r.unit, "required": r.required,
             "attained": r.attained, "margin": r.margin, "result": "pass" if r.passed else "FAIL", "note": r.note}
            for r in rep.results]
    table = Table("results", "", [Column(k, k) for k in keys], rows,
                  text_keys=["id", "side", "criterion", "required", "attained", "margin", "unit", "result", "note"])
    sec = Section("results", "", tables=[table], notes=[f"note: {n}" for n in rep.notes])
    sec.figures.append(Figure("gz", f"GZ and criteria: {inp.label} - {'PASS' if rep.passed else 'FAIL'}",
                              "righting_curve", curve))
    doc = Document(title=f"criteria: {rep.set_name}", vessel=inp.hull.name,
                   header=[f"source: {rep.source}", f"vessel: {inp.label}"],
                   sections=[condition_section(inp.condition), sec], cautions=[rep.caution], verdict=rep.passed,
                   verdict_text="all criteria met" if rep.passed else "NOT all criteria met", primary="results",
                   meta={"density": inp.density})
    doc.data = {**rep.to_dict(), "condition": inp.condition.to_dict()}
    return rep, doc


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


def table_analysis(hull: FloatingHull, drafts: np.ndarray, *, heel: float = 0.0, trim: float = 0.0,
                   density: float = SEA_WATER) -> tuple[list[dict[str, float]], Document]:
    """Hydrostatic particulars over ``drafts`` [m] at one heel and trim [deg], and their report."""
    rows = [h.to_dict() for h in hull.table(drafts, heel=heel, trim=trim, density=density)]
    digits = {"cb": 4, "cp": 4, "cm": 4, "cwp": 4, "heel": 1, "trim": 2}
    cols = [Column(k, k, UNITS[k], digits.get(k, 3)) for k in FIELDS]
    table = Table("hydrostatics", "", cols, rows, text_keys=[k for k in FIELDS if k not in ("heel", "trim")])
    sec = Section("hydrostatics", "", tables=[table])
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

"""The design-review report: one document composed from the analyses, for the whole case file.

:func:`report_document` runs the analyses of a case (every loading condition) and collects their
sections into one :class:`~meshhydro.document.Document` that the HTML renderer writes as one file.
Sections come from *builders*, plain functions listed in two lists that are the extension points:

* :data:`CASE_BUILDERS` — ``f(review: Review) -> Section | None``, run once (vessel and mesh health,
  hydrostatics, heel sweep, section-based comparison, conventions and assumptions);
* :data:`CONDITION_BUILDERS` — ``f(review: Review, cr: ConditionRun) -> Section | None``, run per
  loading condition, their sections nested under that condition (weights, tanks, floating position,
  righting levers, criteria).

A builder returns None when its subject is absent from the case (no tanks, sections not asked).
A new analysis (tanks, damage, weather, KG limits, ...) joins the report by adding its builder to
the right list, at the place it should appear. Figures are carried as data; the views draw them.
"""
from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass, field
from typing import Any, Callable, Sequence

import numpy as np

from . import __version__
from . import analysis as A
from . import review_parts as P
from .criteria import CAUTION, CriteriaSet, Report, read_criteria
from .document import Column, Document, Figure, Quantity, Section, Table
from .equilibrium import Equilibrium
from .analysis_tanks import method_note
from .figure_data import gz_data
from .loading import Case, read_case
from .stability import RightingCurve
from .tank_case import build_tanks, resolve_condition
from .vessel import FloatingHull

#: A progress-bar factory: ``bars(total, label)`` returns a callable counting one unit per call, with close().
Bars = Callable[[int, str], Any]


class _NoBar:
    def __call__(self, n: int = 1) -> None:
        return None

    def stage(self, stage: str, done: int, total: int) -> None:
        return None

    def close(self) -> None:
        return None


def _no_bars(total: int, label: str) -> _NoBar:
    return _NoBar()


@dataclass(frozen=True)
class ReviewOptions:
    """What the report covers (angles in degrees, drafts in m).

    heels : righting-curve heels, 0..180; drafts : hydrostatic table drafts, or None for nine drafts
    between 10 % and 90 % of the hull's depth; criteria : built-in set name or criteria file (None:
    the case's ``[criteria] set``, else ``imo2008``); sweep_heels : heels of the rendered sweep, or
    None for no sweep; sweep_condition : condition name for the sweep (None: the first);
    sweep_size : frame size (width, height) px; camera : ``astern`` or ``oblique``; smooth_edges :
    anti-aliased sweep frames (about twice the drawing time);
    stations : station intervals of the section-based comparison, or None to leave it out;
    waterlines : waterline intervals of that comparison; direction : heel side(s) (see analysis);
    kg_limits : displacements [t] of the KG-limit table for the report's criteria set, or None to
    leave it out.
    """

    heels: np.ndarray = field(default_factory=lambda: np.arange(0.0, 181.0, 1.0))
    drafts: np.ndarray | None = None
    criteria: str | None = None
    sweep_heels: np.ndarray | None = field(default_factory=lambda: np.arange(0.0, 61.0, 10.0))
    sweep_condition: str | None = None
    sweep_size: tuple[int, int] = (800, 600)
    camera: str = "astern"
    smooth_edges: bool = False
    stations: int | None = None
    waterlines: int = 10
    direction: str = "auto"
    kg_limits: np.ndarray | None = None


@dataclass(eq=False)
class ConditionRun:
    """The solved results of one loading condition that the condition builders format."""

    inp: A.CaseInput
    equilibrium: Equilibrium
    float_doc: Document
    curve: RightingCurve
    sides: tuple[int, ...]
    report: Report
    criteria_doc: Document
    #: the companion curves shown beside the deciding one: (key, label, RightingCurve) — the other
    #: fluid method with tanks, the intact ship with flooding (see analysis_tanks.companions)
    others: list[tuple[str, str, RightingCurve]] = field(default_factory=list)


@dataclass(eq=False)
class Review:
    """Everything a builder may use: the case, its hull, the options, the criteria set and the runs."""

    case: Case
    hull: FloatingHull
    options: ReviewOptions
    cset: CriteriaSet
    inputs: list[dict[str, str]]
    bars: Bars = _no_bars
    runs: list[ConditionRun] = field(default_factory=list)
    #: the case's tanks built against the hull once (empty without tanks)
    tanks: tuple[Any, ...] = ()

    @property
    def vessel(self) -> str:
        """The vessel's name for titles: the case's hull name, else the mesh file's name."""
        return self.case.name or os.path.basename(str(self.hull.name))


@dataclass(frozen=True, eq=False)
class SweepFigure:
    """Figure data of the heel-sweep views: the hull, its trace, and which picture (``frame`` index k,
    ``animation`` or ``sheet``); frames are ``size`` (width, height) px seen by ``camera``, anti-aliased
    when ``smooth``."""

    hull: FloatingHull
    trace: Any
    size: tuple[int, int]
    camera: str
    picture: str
    index: int = 0
    smooth: bool = False


def sha256_file(path: str) -> str:
    """SHA-256 of a file's bytes, hex."""
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def _criteria_source(case: Case, name: str | None) -> tuple[str, str | None]:
    """(name or path of the criteria set, the file to checksum or None for a built-in set)."""
    if name is None and case.spec is not None and case.spec.criteria is not None and case.spec.criteria.set:
        name = case.spec.criteria.set
        if name.endswith(".toml"):
            name = case.spec.resolve(name)
    name = name or "imo2008"
    return name, (name if name.endswith(".toml") else None)


def open_review(case_path: str, options: ReviewOptions = ReviewOptions(), *, bars: Bars = _no_bars) -> Review:
    """Read the case file, its criteria set and its hull (mesh loading and checking shown by ``bars``)."""
    case = read_case(case_path)
    cname, cfile = _criteria_source(case, options.criteria)
    cset = read_criteria(cname)
    bar = bars(1, "loading mesh")
    try:
        hull = case.load_hull(progress=getattr(bar, "stage", None))
    finally:
        bar.close()
    # every input by its full path, so that the list reads the same wherever the report is opened
    inputs = [{"role": "case file", "path": os.path.abspath(case_path), "sha256": sha256_file(case_path)},
              {"role": "hull mesh", "path": os.path.abspath(case.mesh), "sha256": sha256_file(case.mesh)}]
    if cfile is not None:
        inputs.append({"role": "criteria set", "path": os.path.abspath(cfile), "sha256": sha256_file(cfile)})
    tanks = build_tanks(case, hull) if case.spec is not None and case.spec.tanks else ()
    return Review(case, hull, options, cset, inputs, bars, tanks=tanks)


def case_input(rv: Review, name: str) -> A.CaseInput:
    """The CaseInput of one condition, as :func:`meshhydro.analysis.from_case` builds it (the review's tanks
    built once)."""
    return A.case_input(rv.case, rv.hull, name, tanks=rv.tanks)


def solve_condition(rv: Review, name: str) -> ConditionRun:
    """Floating position, righting curve (taken from the criteria analysis itself) and criteria of one condition."""
    inp = case_input(rv, name)
    c = inp.condition
    eq, fdoc = A.float_analysis(inp)
    o = rv.options
    bar = rv.bars(A.curve_count(o.heels, inp, o.direction), f"GZ curve, {c.name}")
    kept: dict[str, Any] = {}
    try:
        rep, cdoc = A.criteria_analysis(inp, rv.cset, o.heels, direction=o.direction, progress=bar, keep=kept)
    finally:
        bar.close()
    return ConditionRun(inp, eq, fdoc, kept["curve"], kept["sides"], rep, cdoc, others=list(kept["others"]))


# ---------------------------------------------------------------------------- case builders


def vessel_section(rv: Review) -> Section:
    """The vessel's main dimensions and the mesh's health report."""
    h = rv.hull
    q = Quantity
    sec = Section("vessel", "Vessel and mesh", values=[
        q("name", "vessel", rv.vessel), q("mesh", "mesh file", os.path.basename(rv.case.mesh)),
        q("length", "length overall (mesh)", h.length, "m", 3), q("breadth", "breadth overall", h.breadth, "m", 3),
        q("depth", "depth overall", h.depth, "m", 3), q("x_ref", "draft reference x", h.x_ref, "m", 3),
        q("symmetric", "port-starboard symmetric", h.is_symmetric),
        q("conditions", "loading conditions", len(rv.case.conditions))])
    health = A.check_analysis(h.report).sections[0]
    health.key, health.title = "mesh_health", "Mesh health"
    health.values.append(Quantity("verdict", "verdict", "usable" if h.report.usable else "NOT usable"))
    sec.sections.append(health)
    return sec


def _default_drafts(hull: FloatingHull) -> np.ndarray:
    lo, d = float(hull.bounds[0][2]), hull.depth
    return np.round(lo + d * np.linspace(0.1, 0.9, 9), 6)


#: The hydrostatic table in three parts: (key, title, columns).
HYDRO_TABLES = (
    ("volume", "Volume and centres", ("draft", "volume", "displacement", "lcb", "tcb", "vcb", "lcf", "tcf")),
    ("waterplane", "Waterplane and metacentres", ("draft", "awp", "tpc", "mct", "bmt", "bml", "kmt", "kml")),
    ("form", "Waterline extents, wetted surface and form coefficients",
     ("draft", "lwl", "bwl", "wsa", "cb", "cp", "cm", "cwp")),
)


def hydrostatics_section(rv: Review) -> Section:
    """Hydrostatic table over drafts (upright, level) and its curves."""
    drafts = rv.options.drafts if rv.options.drafts is not None else _default_drafts(rv.hull)
    rows, doc = A.table_analysis(rv.hull, drafts, density=rv.case.density)
    sec = doc.sections[0]
    sec.key, sec.title = "hydrostatics", "Hydrostatics (upright, level trim)"
    full = sec.tables[0]
    sec.tables = []
    for key, title, keys in HYDRO_TABLES:  # split so that each table fits a printed page's width
        cols = [c for c in full.columns if c.key in keys]
        sec.tables.append(Table(f"hydrostatics_{key}", title, cols, [{c.key: r[c.key] for c in cols} for r in rows]))
    fig = sec.figures[0]
    fig.view, fig.data = "hydrostatic_curves", {"vessel": rv.vessel, "rows": rows}
    sec.notes.insert(0, f"draft measured on the hull's z axis at x = {rv.hull.x_ref:.3f} m on the centreline, "
                        f"above z = 0; density {rv.case.density:g} t/m³.")
    return sec


def conditions_section(rv: Review) -> Section:
    """Each loading condition: every condition builder's section, in order."""
    sec = Section("conditions", "Loading conditions")
    for cr in rv.runs:
        sub = Section(f"condition-{cr.inp.condition.name}", f"Condition: {cr.inp.condition.name}")
        for build in CONDITION_BUILDERS:
            part = build(rv, cr)
            if part is not None:
                sub.sections.append(part)
        sec.sections.append(sub)
    rows = [{"condition": cr.inp.condition.name, "displacement": cr.inp.condition.displacement,
             "heel": cr.equilibrium.heel, "trim": cr.equilibrium.trim, "draft": cr.equilibrium.draft,
             "gmt": cr.equilibrium.gmt, "result": "pass" if cr.report.passed else "FAIL"} for cr in rv.runs]
    cols = [Column("condition", "condition"), Column("displacement", "displacement", "t", 3),
            Column("draft", "draft", "m", 4), Column("heel", "heel", "deg", 2), Column("trim", "trim", "deg", 2),
            Column("gmt", "GMt (fluid)", "m", 4), Column("result", f"criteria ({rv.cset.name})")]
    sec.tables.append(Table("conditions_summary", "Summary", cols, rows))
    return sec


def sweep_section(rv: Review) -> Section | None:
    """The heel sweep of one condition: frames, the animation, the B trace and metacentre locus."""
    from .figure_data import largest_section_outline, section_data
    from .sweep import condition_trace

    o = rv.options
    if o.sweep_heels is None:
        return None
    name = rv.case.condition(o.sweep_condition).name
    c = next((cr.inp.condition for cr in rv.runs if cr.inp.condition.name == name), None)
    c = c if c is not None else resolve_condition(rv.case, rv.hull, name, tanks=rv.tanks)
    bar = rv.bars(len(o.sweep_heels), f"sweep, {c.name}")
    try:  # the same load and flooding as the condition's curve and the sweep command
        tr = condition_trace(rv.hull, c, o.sweep_heels, density=rv.case.density, label=c.name, progress=bar,
                             openings=rv.case.openings)
    finally:
        bar.close()
    sec = Section("sweep", f"Heel sweep: {c.name}")
    if c.tanks:
        sec.notes += [f"tank contents in the sweep as in the condition's curve: {n}" for n in method_note(c)]
    if c.flooded:
        sec.notes.append(f"flooded (lost buoyancy): {', '.join(x.name for x in c.flooded)}; the frames show the "
                         "hull at the damaged attitude, with B and M of the hull less the flooded spaces.")
    sec.notes.append(f"free-trim positions at {len(tr.heel)} heels, seen {o.camera.replace('astern', 'from astern')}"
                     f"; frames {o.sweep_size[0]}×{o.sweep_size[1]} px.")
    for k, h in enumerate(tr.heel):
        sec.figures.append(Figure(f"frame-{k}", f"{c.name}: heel {h:g}°", "sweep_frame",
                                  SweepFigure(rv.hull, tr, o.sweep_size, o.camera, "frame", k, o.smooth_edges)))
    sec.figures.append(Figure("animation", f"{c.name}: heel sweep animation", "sweep_frame",
                              SweepFigure(rv.hull, tr, o.sweep_size, o.camera, "animation",
                                          smooth=o.smooth_edges)))
    sec.figures.append(Figure("section", f"{c.name}: trace of B and locus of M (seen from astern)", "section_plot",
                              section_data(tr, rv.vessel, outline=largest_section_outline(rv.hull))))
    rows = [{"heel": float(tr.heel[k]), "gz": float(tr.gz[k]), "b_y": float(tr.cob[k][1]),
             "b_z": float(tr.cob[k][2]), "bm": float(tr.bm[k]), "m_y": float(tr.metacentre[k][1]),
             "m_z": float(tr.metacentre[k][2])} for k in range(len(tr.heel))]
    cols = [Column("heel", "heel", "deg", 1), Column("gz", "GZ", "m", 4), Column("b_y", "B y", "m", 4),
            Column("b_z", "B z", "m", 4), Column("bm", "BM", "m", 4), Column("m_y", "M y", "m", 4),
            Column("m_z", "M z", "m", 4)]
    sec.tables.append(Table("trace", "B trace and metacentre locus (hull frame)", cols, rows))
    return sec


def sections_comparison(rv: Review) -> Section | None:
    """Section-based (Simpson) estimates against the exact mesh result, when asked."""
    from . import sections as S

    o = rv.options
    if o.stations is None:
        return None
    h, rho = rv.hull, rv.case.density
    lo, hi = h.bounds
    t = float(rv.runs[0].equilibrium.draft) if rv.runs else float(lo[2] + 0.5 * (hi[2] - lo[2]))
    xs = np.linspace(lo[0], hi[0], o.stations + 1)
    off = S.offsets_from_mesh(h, xs, np.linspace(lo[2], t, o.waterlines + 1))
    sh = S.section_hydrostatics(off, rule="simpson", density=rho, upto=[t])
    rows = S.compare_rows([h.hydrostatics(t, density=rho).to_dict()], sh.rows, scale=h.length)
    cols = [Column("draft", "draft", "m", 3), Column("quantity", "quantity"), Column("exact", "exact", "", 5),
            Column("estimate", "estimate", "", 5), Column("difference", "difference", "", 5),
            Column("percent", "difference", "%", 4)]
    sec = Section("sections", f"Section-based estimates against the exact result ({o.stations} stations)",
                  tables=[Table("section_comparison", "", cols, rows)],
                  notes=["percent: of the exact value; for LCB and LCF, of the hull length.",
                         f"Simpson's rules over {o.stations} station and {o.waterlines} waterline intervals, "
                         f"upright at the first condition's draft {t:.4f} m."])
    conv = S.convergence(h, t, waterlines=o.waterlines, density=rho)
    sec.figures.append(Figure("convergence", f"{rv.vessel}: section estimates against exact at draft {t:.3f} m",
                              "convergence", {"vessel": rv.vessel, "rows": conv}))
    return sec


CONVENTIONS = [
    ("hull frame", "right-handed, metres: x forward, y to port, z up; baseline z = 0"),
    ("heel", "rotation about the hull x axis; positive = starboard down"),
    ("trim", "inclination of the hull x axis below the horizontal; positive = bow down"),
    ("GZ", "(G − B)·(0, cos φ, −sin φ): positive rights the vessel; both sides drawn righting-positive"),
    ("units", "m, t, t/m³, degrees; areas under GZ in m·rad"),
]


def assumptions_section(rv: Review) -> Section:
    """Conventions, assumptions (density, draft datum, fluids, criteria set) and the caution."""
    h = rv.hull
    sec = Section("assumptions", "Conventions and assumptions")
    sec.tables.append(Table("conventions", "Conventions", [Column("what", "what"), Column("convention", "convention")],
                            [{"what": a, "convention": b} for a, b in CONVENTIONS]))
    sec.values = [
        Quantity("density", "water density", rv.case.density, "t/m³", 3),
        Quantity("draft_datum", "draft datum", f"hull z axis at x = {h.x_ref:.3f} m on the centreline, above z = 0"),
        Quantity("curve_draft", "draft in GZ curves", "T as above at every heel (keel_depth: vertical depth of "
                 "K = (x_ref, 0, 0) below the water)"),
        Quantity("fluids", "fluids", "free-surface moment: G raised by FSM/Δ (virtual rise, fluid GM)"
                 + ("; tanks: each condition's own fluid method (exact fluid shift with level free surfaces, "
                    "or the FSM virtual rise), the other method shown beside it" if rv.tanks else "")),
        Quantity("trim", "trim in GZ curves", "free (displacement and longitudinal moment balanced at each heel)"),
        Quantity("criteria", "criteria set", rv.cset.name),
        Quantity("criteria_source", "criteria source", rv.cset.source),
        Quantity("method", "method", "exact: the submerged polyhedron below each waterplane (divergence theorem)"),
    ]
    sec.notes.append(CAUTION)
    return sec


# ---------------------------------------------------------------------------- condition builders


def weights_section(rv: Review, cr: ConditionRun) -> Section | None:
    """The condition's weights and their totals (None with tanks: the tanks section gives the weight groups)."""
    if cr.inp.condition.tanks:
        return None
    sec = A.condition_section(cr.inp.condition)
    sec.key, sec.title = "weights", "Weights"
    for sub in sec.sections:  # the totals, shown under the items rather than as an untitled part
        sec.values += sub.values
        sec.notes += sub.notes
    sec.sections = []
    return sec


def floating_section(rv: Review, cr: ConditionRun) -> Section:
    """The free-floating position and the particulars there."""
    sec = cr.float_doc.section("equilibrium")
    sec.title = "Floating position"
    return sec


def righting_section(rv: Review, cr: ConditionRun) -> Section:
    """GZ curve with the criteria's limits and areas first, then the derived values and the levers
    (every 5° on one side, every 10° on two, so the table stays within a page or two)."""
    c, curve = cr.inp.condition, cr.curve
    trim = "free" if curve.free_trim else "fixed"
    sec = Section("righting", "Righting levers")
    load = (f"KG fluid {c.kg_fluid:.3f} m" if not (c.tanks and c.fluid == "exact")
            else f"KG {c.kg:.3f} m, exact fluid shift")
    title = f"{rv.vessel}, {c.name}: GZ (Δ {c.displacement:.3f} t, {load}, {trim} trim)"
    sec.figures.append(Figure("gz", title, "gz_curve", gz_data(curve, cr.sides, rv.vessel, cset=rv.cset,
                                                              report=cr.report, title=title),
                              caption="both sides drawn righting-positive; shaded: the areas the criteria ask for; "
                                      "lines: their limits"))
    derived = A.derived_section(curve, cr.sides)
    for sub in derived.sections:
        sub.title = sub.title.rstrip(":").capitalize()
        sec.sections.append(sub)
    sec.notes += derived.notes
    step = 5.0 if len(cr.sides) == 1 else 10.0
    rows = [r for r in curve.rows() if abs(r["heel"] / step - round(r["heel"] / step)) < 1e-9]
    keys = [("heel", "heel", "deg", 1), ("gz", "GZ", "m", 4), ("kn", "KN", "m", 4), ("draft", "draft", "m", 4),
            ("trim", "trim", "deg", 3), ("lcb", "LCB", "m", 4), ("tcb", "TCB", "m", 4), ("vcb", "VCB", "m", 4)]
    cols = [Column(k, lab, u, d) for k, lab, u, d in keys]
    levers = Table("levers", f"Levers every {step:g}° (GZ sign: + rights from a starboard heel)", cols,
                   [{k: r[k] for k, *_ in keys} for r in rows])
    sec.sections.append(Section("levers", "Levers", tables=[levers]))
    return sec


def _limit_text(row: dict[str, Any]) -> str | None:
    """'≥ 0.0550' or '≤ 12.8536' from a criteria row's bound and required value."""
    req = row.get("required")
    if req is None:
        return None
    return f"{'≤' if str(row.get('bound', '')).startswith('max') else '≥'} {float(req):.4f}"


def criteria_section(rv: Review, cr: ConditionRun) -> Section:
    """The criteria table with margins and the condition's verdict."""
    old = cr.criteria_doc.section("results")
    cols = [Column("id", "id"), Column("side", "side"), Column("criterion", "criterion"),
            Column("required", "required"), Column("attained", "attained", "", 4),
            Column("margin", "margin", "", 4), Column("unit", "unit"), Column("result", "result")]
    keys = [c.key for c in cols]
    # the limit with its sense: ≥ for a minimum, ≤ for a maximum (a maximum read as a minimum looks missed)
    rows = [{**{k: r[k] for k in keys}, "required": _limit_text(r)} for r in old.tables[0].rows]
    notes = [f"{r['id']} ({r['side']}): {r['note']}" for r in old.tables[0].rows if r.get("note")]
    sec = Section("criteria", f"Criteria: {cr.report.set_name}", tables=[Table("results", "", cols, rows)],
                  notes=notes + list(old.notes))
    sec.values = [Quantity("verdict", "verdict", "all criteria met" if cr.report.passed else "NOT all criteria met"),
                  Quantity("source", "source", cr.report.source)]
    return sec


#: Sections once per case, in report order; each ``f(review) -> Section | None``.
CASE_BUILDERS: list[Callable[[Review], Section | None]] = [
    vessel_section, hydrostatics_section, conditions_section, P.kg_limits_section, sweep_section,
    sections_comparison, assumptions_section,
]
#: Sections per loading condition, in order; each ``f(review, condition_run) -> Section | None``.
CONDITION_BUILDERS: list[Callable[[Review, ConditionRun], Section | None]] = [
    weights_section, P.tanks_section, floating_section, P.damage_section, P.submergence_section,
    righting_section, criteria_section, P.weather_section,
]


def report_document(rv: Review, *, builders: Sequence[Callable[[Review], Section | None]] | None = None) -> Document:
    """Solve every condition of the case, then compose the report from the builders (default
    :data:`CASE_BUILDERS`). Verdict: True when every condition meets every criterion."""
    rv.runs = [solve_condition(rv, c.name) for c in rv.case.conditions]
    sections = []
    for build in CASE_BUILDERS if builders is None else builders:
        s = build(rv)
        if s is not None:
            sections.append(s)
    passed = all(cr.report.passed for cr in rv.runs)
    return Document(
        title=f"Design review: {rv.vessel}", vessel=rv.vessel, sections=sections, cautions=[CAUTION],
        verdict=passed, verdict_text="all criteria met" if passed else "NOT all criteria met",
        header=[f"criteria: {rv.cset.name}"], primary="conditions_summary",
        meta={"program": "meshhydro", "version": __version__, "inputs": rv.inputs, "density": rv.case.density,
              "criteria": rv.cset.name, "conditions": [c.name for c in rv.case.conditions]})

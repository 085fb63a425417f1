"""The submergence sequence: a body ballasted down from floating to fully submerged.

Upright and at level trim, for each draft (or each displacement, whose draft is solved), the
exact cut gives KB, the waterplane and so BMt = I_T / V and KMt = KB + BMt. As the waterplane closes
(the deck or the top of a float goes under), BM falls to zero and M comes down onto B: KM = KB once
the body is fully under water. KMt is the KG limit for a positive GMt (free surface aside), so the
least KMt over the passage is the most dangerous moment of a dive or a ballast-down; the band of
drafts where the waterplane is small (under ``tol.SMALL_WATERPLANE`` of the largest in the sequence)
is reported with it. With a KG, GMt = KMt - KG is given at each step and the drafts where it is
negative are named.

Textbook background: the box's KM = T/2 + B²/(12T) while wall-sided (Barrass & Derrett; Rawson &
Tupper) and KM = KB for a submerged body (no waterplane inertia).

Public: :class:`SubmergenceStep`, :func:`sequence_by_drafts`, :func:`sequence_by_displacements`,
:func:`submergence_analysis`.
"""
from __future__ import annotations

import os
from dataclasses import asdict, dataclass
from typing import Any, Sequence

import numpy as np

from . import tolerances as tol
from .criteria import CAUTION
from .document import Column, Document, Figure, Section, Table
from .errors import InputError
from .hull import Hull
from .hydrostatics import check_density
from .solver import Evaluator, check_load, is_neutral, solve_volume
from .submerged import NOTE


@dataclass(frozen=True)
class SubmergenceStep:
    """One step of the sequence (hull frame, SI; upright, level trim).

    draft [m] at (x_ref, 0) above z = 0 (for a neutral displacement: the draft at which the top
    just goes under); volume [m³]; displacement [t]; kb, lcb [m]; awp [m²]; bmt, bml, kmt, kml [m];
    kg_limit [m] = kmt, the largest KG with positive GMt; gmt [m] for the given KG (None without);
    submerged: no waterplane (BM = 0, KM = KB).
    """

    draft: float
    volume: float
    displacement: float
    kb: float
    lcb: float
    awp: float
    bmt: float
    bml: float
    kmt: float
    kml: float
    kg_limit: float
    gmt: float | None
    submerged: bool


def _step(hull: Hull, draft: float, rho: float, kg: float | None) -> SubmergenceStep:
    c = hull.cut(point=(hull.x_ref, 0.0, draft), normal=(0.0, 0.0, 1.0))
    if c.volume <= 0:
        raise InputError(f"draft {draft:g} m: nothing of the hull is under water (its keel is at "
                         f"z = {hull.bounds[0][2]:g} m)")
    v = c.volume
    submerged = c.waterplane_area == 0.0  # volume > 0 and no waterplane: the whole body is under water
    bmt, bml = c.inertia_t / v, c.inertia_l / v
    kb = float(c.centroid[2])
    kmt = kb + bmt
    return SubmergenceStep(
        draft=float(draft), volume=float(v), displacement=float(v * rho), kb=kb, lcb=float(c.centroid[0]),
        awp=float(c.waterplane_area), bmt=float(bmt), bml=float(bml), kmt=float(kmt), kml=float(kb + bml),
        kg_limit=float(kmt), gmt=None if kg is None else float(kmt - kg), submerged=bool(submerged))


def _submerged_step(hull: Hull, rho: float, kg: float | None) -> SubmergenceStep:
    """The fully submerged step (no waterplane): the whole hull's volume and centroid, BM = 0, KM = KB;
    its draft is the top of the hull, where it just goes under."""
    v, b = float(hull.total_volume), hull.total_centroid
    kb = float(b[2])
    return SubmergenceStep(
        draft=float(hull.bounds[1][2]), volume=v, displacement=v * rho, kb=kb, lcb=float(b[0]), awp=0.0, bmt=0.0,
        bml=0.0, kmt=kb, kml=kb, kg_limit=kb, gmt=None if kg is None else kb - kg, submerged=True)


def _check_kg(kg: float | None) -> float | None:
    if kg is None:
        return None
    k = float(kg)
    if not np.isfinite(k):
        raise InputError(f"KG must be a finite number of metres, got {kg!r}")
    return k


def sequence_by_drafts(hull: Hull, drafts: Sequence[float], *, density: float, kg: float | None = None
                       ) -> list[SubmergenceStep]:
    """Steps at the given drafts [m] (upright, level trim); drafts above the top are fully submerged. A
    draft exactly at a flat top (a deck) has that top as its waterplane: the limit from below."""
    rho = check_density(density)
    k = _check_kg(kg)
    ds = np.asarray(drafts, dtype=float)
    if len(ds) == 0 or not np.all(np.isfinite(ds)):
        raise InputError("drafts must be finite numbers of metres")
    return [_step(hull, float(t), rho, k) for t in ds]


def sequence_by_displacements(hull: Hull, displacements: Sequence[float], *, density: float,
                              kg: float | None = None) -> list[SubmergenceStep]:
    """Steps at the given displacements [t] (upright, level trim). A displacement equal to the hull's
    whole buoyancy is fully submerged (its draft: where the top just goes under); a heavier one sinks
    (CannotFloatError with the missing buoyancy)."""
    rho = check_density(density)
    k = _check_kg(kg)
    ev = Evaluator(hull)
    out = []
    for d in np.asarray(displacements, dtype=float):
        _, v0 = check_load(hull, float(d), rho)
        if is_neutral(hull, v0):
            out.append(_submerged_step(hull, rho, k))
        else:
            out.append(_step(hull, solve_volume(ev, v0, 0.0, 0.0).draft, rho, k))
    return out


def _bands(steps: list[SubmergenceStep], kg: float | None) -> tuple[list[str], dict[str, Any]]:
    """Notes on the critical parts of the passage, and the same as data."""
    notes: list[str] = []
    awp = np.array([s.awp for s in steps])
    kmt = np.array([s.kmt for s in steps])
    i = int(np.argmin(kmt))
    notes.append(f"least KMt {kmt[i]:.4f} m at draft {steps[i].draft:.4f} m: the KG limit for positive GM is "
                 f"least there")
    data: dict[str, Any] = {"least_kmt": float(kmt[i]), "least_kmt_draft": steps[i].draft}
    top = float(awp.max())
    small = [s.draft for s in steps if 0 < s.awp < tol.SMALL_WATERPLANE * top]
    data["small_waterplane_drafts"] = small
    if small:
        notes.append(f"small waterplane (under {tol.SMALL_WATERPLANE:.0%} of the largest, {top:.4g} m²) at "
                     f"drafts {min(small):.4f} to {max(small):.4f} m (of those computed): stability least")
    sub = [s.draft for s in steps if s.submerged]
    if sub:
        notes.append(f"fully submerged from draft {min(sub):.4f} m: BM = 0, M on B (KM = KB); {NOTE}")
    if kg is not None:
        neg = [s.draft for s in steps if s.gmt is not None and s.gmt < 0]
        data["negative_gm_drafts"] = neg
        if neg:
            span = f"draft {neg[0]:.4f} m" if len(neg) == 1 else f"drafts {min(neg):.4f} to {max(neg):.4f} m"
            notes.append(f"GMt negative for KG {kg:.4f} m at {span} (of those computed)")
        else:
            notes.append(f"GMt positive for KG {kg:.4f} m at every computed draft")
    return notes, data


COLUMNS = [("draft", "m", 4), ("volume", "m³", 4), ("displacement", "t", 4), ("kb", "m", 4), ("lcb", "m", 4),
           ("awp", "m²", 4), ("bmt", "m", 4), ("bml", "m", 4), ("kmt", "m", 4), ("kml", "m", 4),
           ("kg_limit", "m", 4), ("gmt", "m", 4), ("submerged", "", 0)]


def submergence_analysis(hull: Hull, *, drafts: Sequence[float] | None = None,
                         displacements: Sequence[float] | None = None, density: float,
                         kg: float | None = None) -> tuple[list[SubmergenceStep], Document]:
    """The sequence over drafts [m] or displacements [t] (exactly one), and its report (figure
    ``submergence``, view ``submergence``)."""
    if (drafts is None) == (displacements is None):
        raise InputError("give either drafts or displacements for the submergence sequence")
    if drafts is not None:
        steps = sequence_by_drafts(hull, drafts, density=density, kg=kg)
    else:
        steps = sequence_by_displacements(hull, displacements, density=density, kg=kg)  # type: ignore[arg-type]
    k = _check_kg(kg)
    rows = [asdict(s) for s in steps]
    keys = [c for c in COLUMNS if c[0] != "gmt" or k is not None]
    cols = [Column(key, key, unit, d) for key, unit, d in keys]
    notes, band = _bands(steps, k)
    sec = Section("submergence", "", tables=[Table("submergence", "", cols, rows)], notes=notes)
    name = os.path.basename(str(hull.name))
    data = {"vessel": name, "rows": rows, "kg": k, "small_share": tol.SMALL_WATERPLANE, **band}
    sec.figures.append(Figure("submergence", f"Submergence: {name} (upright, level trim, ρ {density:g} t/m³)",
                              "submergence", data))
    doc = Document(title=f"submergence sequence: {hull.name}  (upright, level trim; density {density:g} t/m³; "
                         f"draft at x = {hull.x_ref:.3f} m above z = 0)", vessel=str(hull.name), sections=[sec],
                   cautions=[CAUTION], primary="submergence", meta={"density": density})
    doc.data = {"density": density, "kg": k, "rows": rows, **band, "caution": CAUTION}
    return steps, doc

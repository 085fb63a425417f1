"""KG limit curves as an analysis: a hull, a criteria set and a range of displacements in, rows and a
report document out.

For each displacement the largest fluid-corrected KG at which every criterion of the set passes, the
criterion that governs (its id), and the GM that KG leaves (the required GM), by bracketing on cross
curves of KN with free trim (:mod:`meshhydro.kg_limits`). The case's [weather], [[windage]] and [[arm]]
data feed the weather and heeling-arm criteria.

Public: :data:`ROW_KEYS`, :func:`kg_limits_analysis`.
"""
from __future__ import annotations

import os
from typing import Any, Callable, Sequence

import numpy as np

from .applicability import applicability_notes
from .case_wind import wind_and_arms
from .criteria import CAUTION, CriteriaSet
from .document import Column, Document, Figure, Section, Table
from .errors import InputError
from .kg_limits import kg_limits_for_hull

#: Columns of a KG-limit row: key, unit, digits in text.
ROW_KEYS = (("displacement", "t", 3), ("kg_max", "m", 4), ("governing", "", 0), ("gm_required", "m", 4),
            ("search_end", "", 0), ("method", "", 0), ("note", "", 0))


def kg_limits_analysis(hull: Any, displacements: Sequence[float], cset: CriteriaSet, *, density: float,
                       spec: Any = None, openings: Sequence[Any] = (), lcg: float | None = None,
                       kg_range: tuple[float, float] | None = None, steps: int = 40,
                       heels: Sequence[float] | None = None,
                       progress: Callable[[], Any] | None = None) -> tuple[list[dict[str, Any]], Document]:
    """KG limits of ``hull`` [t, m] for ``cset`` over ``displacements`` [t], and their report.

    G lies on the centreline at ``lcg`` [m] (default: the LCB of level flotation at each
    displacement); ``kg_range`` (lo, hi) [m] bounds the search (default 0 to the hull's depth);
    ``steps`` grid steps over it bracket each limit before Brent's method refines it; ``heels``
    [deg] (default 0..90 in 1°) are the angles of the curves. ``spec`` is the case file (for
    weather and arms), None for a bare mesh. Sides: starboard for a symmetric hull (the weather
    roll mirrors the curve), both otherwise. ``progress`` is called once per displacement done.
    """
    ds = np.asarray(displacements, dtype=float)
    if ds.ndim != 1 or len(ds) == 0 or not np.all(np.isfinite(ds)) or np.any(ds <= 0):
        raise InputError("KG limits: displacements must be positive numbers")
    if steps < 1:
        raise InputError(f"KG limits: steps must be at least 1, got {steps}")
    sym = bool(hull.is_symmetric)
    wind, arms = wind_and_arms(spec, hull, cset, mirror=sym, where=os.path.basename(hull.name))
    sides = (1,) if sym else (1, -1)
    res = kg_limits_for_hull(hull, ds, cset, kg_range=kg_range, lcg=lcg, heels=heels, density=density,
                             openings=tuple(openings), sides=sides, steps=steps, wind=wind, heeling_arms=arms,
                             progress=progress)
    # search_end: every criterion still passed at the top of the KG range, so kg_max is only a lower bound
    rows = [{"displacement": r.displacement, "kg_max": r.kg_max, "governing": r.governing,
             "gm_required": r.gm_required, "search_end": r.kg_max is not None and r.governing is None,
             "method": r.method, "note": r.note} for r in res]
    cols = [Column(k, k, u, d) for k, u, d in ROW_KEYS]
    notes = [f"sides: {'starboard (hull symmetric)' if sym else 'starboard and port'}; G on the centreline; "
             "KG is the fluid-corrected KG (free-surface rise included)",
             "method kn: cross curves of KN (exact for any KG when the vessel does not trim as it heels); "
             "refined: curves solved at the trial KG",
             "search_end yes: all criteria still pass at the top of the KG range; kg_max is only a lower bound "
             "there (widen the range)"]
    if cset.clauses:
        notes += applicability_notes(hull.length, len(hull.report.bodies), clauses=cset.clauses)
    sec = Section("limits", "", tables=[Table("limits", "", cols, rows)], notes=[f"note: {n}" for n in notes])
    title = f"KG limits: {os.path.basename(hull.name)}\n{cset.name}"
    sec.figures.append(Figure("kg_limits", title, "kg_limits", {"rows": rows, "title": title}))
    doc = Document(title=f"KG limits: {hull.name}  ({cset.name}; density {density:g} t/m³, free trim)",
                   vessel=hull.name, header=[f"source: {cset.source}"], sections=[sec], cautions=[CAUTION],
                   primary="limits", meta={"density": density})
    doc.data = {"set": cset.name, "source": cset.source, "density": density, "rows": rows, "notes": notes,
                "caution": CAUTION}
    return rows, doc

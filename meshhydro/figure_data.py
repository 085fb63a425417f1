"""Plain figure data for the report-grade views (:mod:`meshhydro.figures`), built from results.

The analyses carry results in their :class:`~meshhydro.document.Figure` objects (a
RightingCurve, hydrostatic rows); the views want plain mappings. This module turns one into the
other, so the CLI's ``--plot`` and the HTML report draw the same pictures. Nothing here draws or
imports a plotting package.

Public: :func:`gz_data`, :func:`criteria_marks`, :func:`section_data`, :func:`compare_data`,
:func:`as_view`.
"""
from __future__ import annotations

import os
from typing import Any, Sequence

import numpy as np

from .criteria import CriteriaSet, Report
from .document import Figure
from .stability import RightingCurve

SIDE_NAME = {1: "starboard", -1: "port"}
#: step [deg] of the spline samples drawn between the computed points
SAMPLE_STEP = 0.25


def _side(curve: RightingCurve, sign: int) -> dict[str, Any]:
    """One side of the curve, righting positive, sampled on its spline so the drawn maximum is the printed one."""
    x, _ = curve.side(sign)
    fine = np.union1d(x, np.arange(0.0, float(x[-1]), SAMPLE_STEP))
    sp = curve.interpolant()
    gz = sp(fine * sign) * sign
    gmax, amax = curve.max_gz(sign)
    out: dict[str, Any] = {"name": SIDE_NAME[sign], "heel": fine.tolist(), "gz": np.asarray(gz).tolist(),
                           "max_gz": gmax, "angle_of_max": amax, "gz_digits": 4, "angle_digits": 4,
                           "vanishing": curve.vanishing_angle(sign), "deck_edge": curve.deck_edge_angle(sign),
                           "downflooding": curve.downflooding_angle(sign)[0]}
    return out


def criteria_marks(curve: RightingCurve, cset: CriteriaSet, report: Report, sign: int
                   ) -> tuple[list[tuple[float, float, float]], list[dict[str, Any]]]:
    """The areas (from, to, attained m·rad) and limit lines of a criteria set on one side.

    Areas end at the downflooding angle when the criterion says so and flooding comes first. Limits:
    a GZ line [m] from the criterion's angle for ``gz_at`` / ``gz_max_beyond``; an angle line [deg]
    for ``angle_of_max``, ``range`` and ``vanishing``. ``gm`` is shown by the GM tangent.
    """
    side = SIDE_NAME[sign]
    # results come in the set's order on each side (ids may repeat: clause 2.2.1 holds three area limits)
    attained = [r.attained for r in report.results if r.side == side]
    flood = curve.downflooding_angle(sign)[0]
    top = float(curve.side(sign)[0][-1])
    areas, limits = [], []
    for c, got in zip(cset.items, attained, strict=True):
        p = c.params
        if c.minimum is None:  # an upper limit (heeling-arm angles): no area or line to draw here
            continue
        if c.kind == "area":
            end = min(p.end, flood) if p.to_flooding and flood is not None else p.end
            if end <= top and end > p.start and got is not None:
                areas.append((float(p.start), float(end), float(got)))
        elif c.kind in ("gz_at", "gz_max_beyond"):
            at = "at" if c.kind == "gz_at" else "from"
            limits.append({"kind": "gz", "value": c.minimum, "from": float(p.angle),
                           "label": f"{c.id}: GZ ≥ {c.minimum:g} m {at} {p.angle:g}°"})
        elif c.kind in ("angle_of_max", "range", "vanishing"):
            what = {"angle_of_max": "angle of max GZ", "range": "range", "vanishing": "vanishing angle"}[c.kind]
            limits.append({"kind": "angle", "value": c.minimum, "label": f"{c.id}: {what} ≥ {c.minimum:g}°"})
    return areas, limits


def gz_data(curve: RightingCurve, sides: Sequence[int], vessel: str, *, cset: CriteriaSet | None = None,
            report: Report | None = None, title: str | None = None) -> dict[str, Any]:
    """Data of the ``gz_curve`` view: each side righting-positive, with its criteria areas and limits.

    Without a criteria set the areas 0–30°, 0–40° and 30–40° (as far as the curve reaches) are shaded.
    """
    out_sides, limits = [], []
    for s in sides:
        d = _side(curve, s)
        if cset is not None and report is not None:
            areas, lim = criteria_marks(curve, cset, report, s)
            limits += [x for x in lim if x not in limits]
        else:
            top = float(d["heel"][-1])
            areas = [(a, b, curve.area(s * a, s * b)) for a, b in ((0, 30), (30, 40)) if b <= top]
        d["areas"] = areas
        out_sides.append(d)
    data: dict[str, Any] = {"vessel": vessel, "sides": out_sides, "gm": curve.gm_upright,
                            "free_trim": curve.free_trim, "limits": limits}
    if title:
        data["title"] = title
    return data


def section_data(trace: Any, vessel: str, *, at: float | None = None,
                 outline: Sequence[np.ndarray] | None = None, title: str | None = None) -> dict[str, Any]:
    """Data of the ``section_plot`` view from a heel trace; GZ drawn at ``at`` [deg] (default: the computed
    angle nearest the maximum GZ of the trace, where the lever is largest and easiest to read)."""
    heel = np.asarray(trace.heel, dtype=float)
    if at is None:
        k = int(np.argmax(np.asarray(trace.gz) * np.sign(heel + (heel == 0))))
        at = float(heel[k])
    data: dict[str, Any] = {"vessel": vessel, "heel": heel.tolist(), "cob": np.asarray(trace.cob).tolist(),
                            "metacentre": np.asarray(trace.metacentre).tolist(), "up": np.asarray(trace.up).tolist(),
                            "cog": np.asarray(trace.cog).tolist(), "gz": np.asarray(trace.gz).tolist(),
                            "at": float(at)}
    if outline is not None:
        data["outline"] = [np.asarray(p).tolist() for p in outline]
    if title:
        data["title"] = title
    return data


def compare_data(traces: Sequence[Any], labels: Sequence[str], title: str) -> dict[str, Any]:
    """Data of the ``compare_overlay`` view: each trace's GZ, B trace and M locus."""
    cases = [{"label": lab, "heel": np.asarray(t.heel).tolist(), "gz": np.asarray(t.gz).tolist(),
              "cob": np.asarray(t.cob).tolist(), "metacentre": np.asarray(t.metacentre).tolist()}
             for t, lab in zip(traces, labels, strict=True)]
    return {"title": title, "cases": cases}


def largest_section_outline(hull: Any, n: int = 41) -> list[np.ndarray]:
    """Polylines (k, 2) of (y, z) [m] outlining the transverse section of largest area, among ``n``
    stations spread over the hull's length (hull frame)."""
    from .sections import section_segments, sectional_areas

    xs = np.linspace(hull.bounds[0][0], hull.bounds[1][0], n + 2)[1:-1]
    areas = sectional_areas(hull, xs, hull.bounds[1][2] + hull.size)  # whole sections: water above all
    seg = section_segments(hull, float(xs[int(np.argmax(areas))]))
    return chain_segments(seg[:, :, 1:])


def chain_segments(seg: np.ndarray) -> list[np.ndarray]:
    """Join segments (k, 2, d) that share end points exactly into polylines (m, d), in order of first use.

    A segment whose start is the end of the polyline being built extends it; otherwise a new polyline
    starts. Cut outlines share end points bit for bit, so closed loops come out as closed polylines.
    """
    starts: dict[bytes, list[int]] = {}
    for i, s in enumerate(seg):
        starts.setdefault(s[0].tobytes(), []).append(i)
    used = np.zeros(len(seg), dtype=bool)
    lines = []
    for i in range(len(seg)):
        if used[i]:
            continue
        used[i] = True
        pts = [seg[i][0], seg[i][1]]
        while True:
            nxt = [j for j in starts.get(pts[-1].tobytes(), []) if not used[j]]
            if not nxt:
                break
            used[nxt[0]] = True
            pts.append(seg[nxt[0]][1])
        lines.append(np.array(pts))
    return lines


def _vessel(name: str) -> str:
    return os.path.basename(str(name)) or str(name)


def as_view(fig: Figure, vessel: str = "") -> Figure:
    """A document figure in the form the report-grade views draw.

    ``righting_curve`` (data: RightingCurve) becomes ``gz_curve``; ``hydrostatic_curves`` with a list of
    rows gets the mapping {"vessel", "rows"}; a figure already in view form is returned as is.
    """
    if fig.view == "righting_curve" and isinstance(fig.data, RightingCurve):
        c = fig.data
        sides = [s for s in (1, -1) if np.any(c.heel * s > 0)] or [1]
        return Figure(fig.key, fig.title, "gz_curve", gz_data(c, sides, _vessel(vessel), title=fig.title), fig.caption)
    if fig.view == "hydrostatic_curves" and isinstance(fig.data, list):
        return Figure(fig.key, fig.title, "hydrostatic_curves",
                      {"vessel": _vessel(vessel), "rows": fig.data, "title": fig.title}, fig.caption)
    return fig

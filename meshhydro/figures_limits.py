"""The KG-limit figure (a views module): the largest fluid-corrected KG against displacement, marked by
the criterion that governs, with the GM it leaves.

Data in (the rows of :func:`meshhydro.limits_analysis.kg_limits_analysis`), SVG text out through
:mod:`meshhydro.figures`. Matplotlib is imported inside the functions only. Units: t, m.
"""
from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from .errors import InputError
from .figures_common import MARKERS, check_keys, new_figure, side_style

KEYS = {"vessel", "rows", "title"}


def kg_limits_figure(data: Mapping[str, Any]) -> Any:
    """Build the figure. ``data``: rows (mappings with displacement [t], kg_max [m] or None, governing
    criterion id or None, gm_required [m] or None, search_end bool); vessel and title (str, optional)."""
    check_keys(data, KEYS, {"rows"}, "kg_limits")
    rows = [r for r in data["rows"] if r.get("kg_max") is not None]
    fig, ax = new_figure((9.0, 5.4))
    if rows:
        try:
            d = np.array([float(r["displacement"]) for r in rows])
            kg = np.array([float(r["kg_max"]) for r in rows])
        except (KeyError, TypeError, ValueError):
            raise InputError("kg_limits: every row needs numbers 'displacement' and 'kg_max'") from None
        colour, ls = side_style(0)
        end = np.array([r.get("governing") is None for r in rows])
        # solid between limits found; dotted where an end is only a lower bound (the limit lies above it)
        for j in range(len(d) - 1):
            bound = bool(end[j] or end[j + 1])
            ax.plot(d[j:j + 2], kg[j:j + 2], color=colour, lw=1.2 if bound else 1.8, ls=":" if bound else ls,
                    label=None)
        ax.plot([], [], color=colour, ls=ls, lw=1.8, label="largest KG (fluid-corrected)")
        if len(d) == 1:
            ax.plot(d, kg, "o", color=colour, ms=4)
        govs = sorted({str(r["governing"]) for r in rows if r.get("governing") is not None})
        for i, gov in enumerate(govs):
            m = np.array([str(r.get("governing")) == gov for r in rows])
            ax.plot(d[m], kg[m], MARKERS[i % len(MARKERS)], ls="none", ms=6, color=side_style(i + 1)[0],
                    label=f"governed by {gov}")
        if end.any():
            ax.plot(d[end], kg[end], "^", ls="none", ms=8, mfc="white", color="0.3",
                    label="all pass to the top of the search (a lower bound)")
        gm = [(float(r["displacement"]), float(r["gm_required"])) for r in rows if r.get("gm_required") is not None]
        if gm:
            ax2 = ax.twinx()
            ax2.plot(*zip(*gm, strict=True), color="0.45", ls="--", lw=1.2, label="GM left at the limit")
            ax2.set_ylabel("GM at the limit [m] (dashed)")
    else:
        ax.text(0.5, 0.5, "no displacement has a KG limit in the search range", ha="center", va="center",
                transform=ax.transAxes)
    none = [float(r["displacement"]) for r in data["rows"] if r.get("kg_max") is None]
    if none and rows:
        ax.plot(none, [ax.get_ylim()[0]] * len(none), "x", ls="none", ms=9, color="0.15", clip_on=False,
                label="no KG passes (fails already at KG 0)")
    ax.set_xlabel("displacement Δ [t]")
    ax.set_ylabel("largest KG, fluid-corrected [m]")
    ax.grid(True, alpha=0.3)
    if rows:
        handles, labels = ax.get_legend_handles_labels()
        for other in fig.axes:  # the GM line on the twin axis joins the legend
            if other is not ax:
                h2, l2 = other.get_legend_handles_labels()
                handles, labels = handles + h2, labels + l2
        ax.legend(handles, labels, loc="upper left", bbox_to_anchor=(1.12, 1.0), fontsize=8.5, frameon=False)
    ax.set_title(data.get("title") or f"{data.get('vessel', '')}: KG limits".lstrip(": "))
    return fig

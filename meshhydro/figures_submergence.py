"""The submergence-sequence figure (a views module): KB, KMt (the KG limit), BMt and GMt against draft.

Data in (what :func:`meshhydro.submergence.submergence_analysis` puts on its figure), SVG text out,
PNG/SVG/PDF on request. Matplotlib is imported inside the functions only.
"""
from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from .errors import InputError
from .figures_common import check_keys, new_figure, side_style

KEYS = {"vessel", "rows", "kg", "small_share", "least_kmt", "least_kmt_draft", "small_waterplane_drafts",
        "negative_gm_drafts", "title"}


def _column(rows: Any, key: str) -> np.ndarray:
    try:
        return np.array([float(r[key]) for r in rows])
    except (KeyError, TypeError, ValueError):
        raise InputError(f"submergence: every row needs a number {key!r}") from None


def submergence_figure(data: Mapping[str, Any]) -> Any:
    """Build the figure: upper panel KB, KMt (= KG limit for positive GM), BMt and KG; lower panel the
    waterplane area and GMt; the small-waterplane band and the fully submerged part shaded."""
    check_keys(data, KEYS, {"vessel", "rows"}, "submergence")
    rows = list(data["rows"])
    if len(rows) < 2:
        raise InputError("submergence: at least 2 rows are needed for a figure")
    t = _column(rows, "draft")
    o = np.argsort(t)
    t = t[o]
    col = {k: _column(rows, k)[o] for k in ("kb", "kmt", "bmt", "awp")}
    sub = np.array([bool(r.get("submerged")) for r in rows])[o]
    fig, (ax, ax2) = new_figure((9.0, 7.0), 2, 1, sharex=True, gridspec_kw={"height_ratios": (3, 2)})
    for i, (key, label) in enumerate((("kmt", "KMt = KG limit for GM > 0"), ("kb", "KB"), ("bmt", "BMt"))):
        c, ls = side_style(i)
        ax.plot(t, col[key], color=c, ls=ls, marker=".", lw=1.8, label=label)
    kg = data.get("kg")
    if kg is not None:
        ax.axhline(float(kg), color="k", lw=1.0, ls="--", label=f"KG {float(kg):.3f} m")
        gm = col["kmt"] - float(kg)
        c, ls = side_style(3)
        ax2.plot(t, gm, color=c, ls=ls, marker=".", lw=1.6, label="GMt for that KG")
        ax2.axhline(0, color="k", lw=0.8)
    c, ls = side_style(4)
    ax2b = ax2.twinx()
    ax2b.plot(t, col["awp"], color=c, ls=ls, lw=1.4, label="waterplane area")
    ax2b.set_ylabel("Awp [m²]")
    small = data.get("small_waterplane_drafts") or []
    for a in (ax, ax2):
        if small:
            a.axvspan(min(small), max(small), color="#f5b041", alpha=0.25, lw=0)
        if np.any(sub):
            a.axvspan(float(t[sub].min()), float(t[-1]), color="#85c1e9", alpha=0.25, lw=0)
        a.grid(True, alpha=0.3)
    if data.get("least_kmt") is not None:
        ax.plot([float(data["least_kmt_draft"])], [float(data["least_kmt"])], marker="o", mfc="white", color="k",
                ls="none", label=f"least KMt {float(data['least_kmt']):.3f} m")
    ax.set_ylabel("height above base [m]")
    ax.set_title(data.get("title") or f"{data['vessel']}: ballasting down to full submergence "
                 "(orange: small waterplane; blue: submerged, M on B)", fontsize=10)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8.5, frameon=False)
    h1, l1 = ax2.get_legend_handles_labels()
    h2, l2 = ax2b.get_legend_handles_labels()
    ax2.legend(h1 + h2, l1 + l2, loc="upper left", bbox_to_anchor=(1.08, 1.0), fontsize=8.5, frameon=False)
    ax2.set_xlabel("draft at the reference point [m] (upright, level trim)")
    ax2.set_ylabel("GMt [m]" if kg is not None else "")
    return fig

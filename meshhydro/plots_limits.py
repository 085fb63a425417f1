"""Matplotlib figures of the heeling-arm, weather and KG-limit results (PNG, SVG or PDF by suffix).

Views only: they draw what the analyses computed and recompute nothing that is reported.
"""
from __future__ import annotations

from typing import Any, Mapping

import numpy as np

from .criteria import CAUTION_SHORT as CAUTION
from .figures_common import new_figure
from .output import save_figure


def _weather(ax: Any, side: str, w: Any) -> None:
    """lw1, lw2 and the shaded areas a and b of one weather result, in the signed heel frame."""
    s = 1.0 if side == "starboard" else -1.0
    lo = w.theta0 - w.theta1 if w.theta0 is not None else 0.0
    hi = w.theta2 if w.theta2 is not None else 50.0
    ax.plot([s * lo, s * hi], [s * w.lw1] * 2, color="tab:orange", lw=1.2, label=f"lw1 {w.lw1:.4f} m ({side})")
    ax.plot([s * lo, s * hi], [s * w.lw2] * 2, color="tab:red", lw=1.2, ls="--",
            label=f"lw2 {w.lw2:.4f} m ({side})")
    for key, colour in (("a", "tab:red"), ("b", "tab:green")):
        band = w.shade.get(key)
        if band is None:
            continue
        x, g, h = (np.asarray(v, dtype=float) for v in band)
        area = w.area_a if key == "a" else w.area_b
        ax.fill_between(s * x, s * g, s * h, color=colour, alpha=0.3, lw=0,
                        label=f"area {key} = {area:.4f} m·rad ({side})")
    if w.theta0 is not None:
        ax.axvline(s * lo, color="tab:red", lw=0.8, ls=":")


def _arm(ax: Any, item: Mapping[str, Any], top: float) -> None:
    s, an, arm = item["sign"], item["analysis"], item["arm"]
    side = "starboard" if s > 0 else "port"
    x = np.linspace(0.0, min(top, 90.0, arm.max_angle), 200)
    ax.plot(s * x, s * arm(x), color="tab:brown", lw=1.3, ls="-.", label=f"arm {item['name']} ({side})")
    band = an.shade.get("residual")
    if band is not None and an.residual_area is not None:
        bx, g, h = (np.asarray(v, dtype=float) for v in band)
        ax.fill_between(s * bx, s * g, s * h, color="tab:brown", alpha=0.25, lw=0,
                        label=f"residual {item['name']} = {an.residual_area:.4f} m·rad ({side})")


def criteria_gz(data: Mapping[str, Any], path: str, *, title: str = "") -> None:
    """GZ curve (signed heel, positive starboard down) with heeling arms and their residual areas shaded,
    and the weather criterion's levers lw1, lw2 and areas a, b: one panel per wind direction, written to
    ``path`` (see :func:`criteria_gz_figure`)."""
    fig = criteria_gz_figure(data, title=title)
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    save_figure(path, fig, dpi=130)


def criteria_gz_figure(data: Mapping[str, Any], *, title: str = "") -> Any:
    """The matplotlib figure of :func:`criteria_gz`, without the caution line.

    ``data``: curve (RightingCurve), arms (list of {sign, name, arm, analysis}), weather ({side name:
    WeatherResult}). A curve computed on one side is drawn mirrored (dashed) where a weather roll
    reaches the other side."""
    curve = data["curve"]
    weather = list(data["weather"].items())
    panels = weather or [(None, None)]
    fig, axes = new_figure((10 if len(panels) == 1 else 15, 6), 1, len(panels), squeeze=False)
    h = curve.heel
    fine = np.linspace(h[0], h[-1], max(400, 4 * len(h)))
    top = float(np.max(np.abs(h)))
    for ax, (side, w) in zip(axes[0], panels, strict=True):
        ax.plot(fine, curve.interpolant()(fine), color="tab:blue", lw=2, label="GZ")
        if w is not None and not np.any(h < 0):
            ax.plot(-fine, -curve.interpolant()(fine), color="tab:blue", lw=1, ls="--",
                    label="GZ mirrored (symmetric)")
        if w is not None:
            _weather(ax, side, w)
            ax.set_xlim(-90, 90)
            ax.set_title(f"wind heeling to {side}", fontsize=9)
        sign = None if side is None else (1 if side == "starboard" else -1)
        for item in data["arms"]:
            if sign is None or item["sign"] == sign:
                _arm(ax, item, top)
        ax.axhline(0, color="k", lw=0.8)
        ax.set_xlabel("heel φ [deg]  (positive: starboard down)")
        ax.set_ylabel("righting lever GZ, heeling arms [m]")
        ax.grid(True, alpha=0.3)
        ax.legend(loc="best", fontsize=7)
    fig.suptitle(title or "GZ curve with heeling arms", fontsize=11)
    return fig


def kg_limits(data: Mapping[str, Any], path: str, *, title: str = "") -> None:
    """KG limit [m] against displacement [t], marked by the governing criterion, with the required GM.

    ``data``: rows (dicts with displacement, kg_max, governing, gm_required)."""
    rows = [r for r in data["rows"] if r["kg_max"] is not None]
    fig, ax = new_figure((9, 6))
    if rows:
        d = np.array([r["displacement"] for r in rows])
        kg = np.array([r["kg_max"] for r in rows])
        ax.plot(d, kg, color="tab:blue", lw=1.8, label="KG limit (fluid)")
        for gov in sorted({str(r["governing"]) for r in rows if r["governing"] is not None}):
            m = np.array([str(r["governing"]) == gov for r in rows])
            ax.plot(d[m], kg[m], "o", ms=5, label=f"governed by {gov}")
        end = np.array([r["governing"] is None for r in rows])
        if end.any():
            ax.plot(d[end], kg[end], "^", ms=8, mfc="white", color="tab:red",
                    label="all pass to the end of the search range (lower bound)")
        gm = [(r["displacement"], r["gm_required"]) for r in rows if r["gm_required"] is not None]
        if gm:
            ax2 = ax.twinx()
            ax2.plot(*zip(*gm, strict=True), color="tab:gray", ls="--", lw=1.2)
            ax2.set_ylabel("GM required [m] (dashed)")
    ax.set_xlabel("displacement Δ [t]")
    ax.set_ylabel("largest KG, fluid-corrected [m]")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize=8)
    ax.set_title(title or "KG limit curve", fontsize=9, wrap=True)
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    save_figure(path, fig, dpi=130)

"""Matplotlib figures (PNG). Imported only by the views and the CLI."""
from __future__ import annotations

from typing import Any, Sequence

import numpy as np

from .output import save_atomic

CAUTION = ("Design aid, not an approval: flag administration, class rules, local codes "
           "and a qualified naval architect decide.")


def _figure(*args: Any, **kw: Any):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt.subplots(*args, **kw)


def _save(fig: Any, path: str, dpi: int = 130) -> None:
    import matplotlib.pyplot as plt

    try:
        save_atomic(path, lambda p: fig.savefig(p, dpi=dpi, format="png"))
    finally:
        plt.close(fig)


def hydrostatic_curves(rows: Sequence[dict[str, float]], path: str, *, title: str = "") -> None:
    """Hydrostatic curves against draft (draft on the vertical axis, as drawn in practice)."""
    t = np.array([r["draft"] for r in rows])
    panels = [
        (("displacement", "displacement, t"), ("volume", "volume, m³")),
        (("vcb", "KB, m"), ("kmt", "KMt, m"), ("bmt", "BMt, m")),
        (("lcb", "LCB, m"), ("lcf", "LCF, m")),
        (("awp", "Awp, m²"), ("wsa", "WSA, m²")),
        (("tpc", "TPC, t/cm"), ("mct", "MCT 1 cm, t·m/cm")),
        (("cb", "Cb"), ("cp", "Cp"), ("cm", "Cm"), ("cwp", "Cwp")),
    ]
    fig, axes = _figure(2, 3, figsize=(13, 8), sharey=True)
    for ax, panel in zip(axes.ravel(), panels):
        for key, label in panel:
            ax.plot([r[key] for r in rows], t, marker=".", label=label)
        vals = np.concatenate([[r[k] for r in rows] for k, _ in panel])
        span = float(vals.max() - vals.min())
        floor = 0.02 * max(float(np.abs(vals).max()), float(t.max()), 1e-9)
        if span < floor:  # flat curves (e.g. LCB of a symmetric form): no magnified round-off
            mid = 0.5 * float(vals.max() + vals.min())
            ax.set_xlim(mid - floor, mid + floor)
        ax.ticklabel_format(axis="x", useOffset=False)
        ax.grid(True, alpha=0.3)
        ax.legend(fontsize=8)
    for ax in axes[:, 0]:
        ax.set_ylabel("draft T [m]")
    fig.suptitle(title or "Hydrostatic curves")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 0.97))
    _save(fig, path)


def righting_curve(curve: Any, path: str, *, title: str = "", criteria: Any = None) -> None:
    """GZ curve with the GM tangent to 57.3°, and marks for the derived angles on each side."""
    fig, ax = _figure(figsize=(10, 6))
    h, gz = curve.heel, curve.gz
    fine = np.linspace(h[0], h[-1], max(400, 4 * len(h)))
    sp = curve._spline()
    ax.plot(fine, sp(fine), color="tab:blue", lw=2, label="GZ (free trim)" if curve.free_trim else "GZ (fixed trim)")
    ax.plot(h, gz, ".", color="tab:blue", ms=3)
    ax.axhline(0, color="k", lw=0.8)
    gm = curve.gm_upright
    sides = [s for s in (1, -1) if np.any(h * s > 0)]
    for s in sides:
        if gm is not None and gm > 0:
            rad = 180 / np.pi
            ax.plot([0, s * rad], [0, s * gm], "--", color="tab:gray", lw=1)
            ax.plot([s * rad, s * rad], [0, s * gm], ":", color="tab:gray", lw=1)
            ax.annotate(f"GM {gm:.3f} m", (s * rad, s * gm), fontsize=8, ha="center",
                        xytext=(0, 6 * s), textcoords="offset points")
        gmax, amax = curve.max_gz(s)
        ax.plot([s * amax], [s * gmax], "^", color="tab:red")
        ax.annotate(f"max {gmax:.3f} m at {amax:.1f}°", (s * amax, s * gmax), fontsize=8,
                    xytext=(5, 5 * s), textcoords="offset points")
        marks = [("vanishing", curve.vanishing_angle(s), "tab:red"),
                 ("deck edge", curve.deck_edge_angle(s), "tab:green"),
                 ("downflooding", curve.downflooding_angle(s)[0], "tab:purple")]
        for name, ang, col in marks:
            if ang is not None:
                ax.axvline(s * ang, color=col, lw=1, ls="-.", alpha=0.8)
                ax.annotate(f"{name} {ang:.1f}°", (s * ang, ax.get_ylim()[0]), rotation=90, fontsize=7,
                            color=col, xytext=(3, 8), textcoords="offset points", va="bottom")
    ax.set_xlabel("heel φ [deg]  (positive: starboard down)")
    ax.set_ylabel("righting lever GZ [m]")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize=8)
    ax.set_title(title or "Righting-lever curve")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    _save(fig, path)


def cross_curves(cc: Any, path: str, *, title: str = "") -> None:
    """KN against displacement, one line per heel angle."""
    fig, ax = _figure(figsize=(9, 6))
    for j, h in enumerate(cc.heels):
        ax.plot(cc.displacements, cc.kn[:, j], marker=".", label=f"{h:g}°")
    ax.set_xlabel("displacement Δ [t]")
    ax.set_ylabel("KN [m]  (lever of buoyancy about K, free trim)")
    ax.grid(True, alpha=0.3)
    ax.legend(title="heel", fontsize=8, ncol=2)
    ax.set_title(title or "Cross curves of stability")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    _save(fig, path)

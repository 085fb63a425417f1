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

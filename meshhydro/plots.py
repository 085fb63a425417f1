"""Matplotlib figures not (yet) in the report-grade views: the cross curves (PNG, SVG or PDF by the suffix asked
for). The GZ curve, hydrostatic curves, section view, compare and convergence plots are drawn by
:mod:`meshhydro.figures`. Imported only by the views and the CLI."""
from __future__ import annotations

from typing import Any

from .criteria import CAUTION_SHORT as CAUTION
from .output import save_figure


def _figure(*args: Any, **kw: Any):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt.subplots(*args, **kw)


def _save(fig: Any, path: str, dpi: int = 130) -> None:
    import matplotlib.pyplot as plt

    try:
        save_figure(path, fig, dpi=dpi)
    finally:
        plt.close(fig)


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


def draw(figure: Any, path: str) -> None:
    """Draw a document :class:`~meshhydro.document.Figure` to a PNG at ``path`` with the view it names."""
    views = {"cross_curves": cross_curves}
    views[figure.view](figure.data, path, title=figure.title)

"""Matplotlib figures not (yet) in the report-grade views: the cross curves (PNG, SVG or PDF by the suffix asked
for). The GZ curve, hydrostatic curves, section view, compare and convergence plots are drawn by
:mod:`meshhydro.figures`. Imported only by the views and the CLI."""
from __future__ import annotations

from typing import Any

import numpy as np

from .criteria import CAUTION_SHORT as CAUTION
from .figures_common import new_figure
from .output import save_figure


def cross_curves(cc: Any, path: str, *, title: str = "") -> None:
    """KN against displacement, one line per heel angle."""
    fig, ax = new_figure((9, 6))
    for j, h in enumerate(cc.heels):
        ax.plot(cc.displacements, cc.kn[:, j], marker=".", label=f"{h:g}°")
    ax.set_xlabel("displacement Δ [t]")
    ax.set_ylabel("KN [m]  (lever of buoyancy about K, free trim)")
    ax.grid(True, alpha=0.3)
    ax.legend(title="heel", fontsize=8, ncol=2)
    ax.set_title(title or "Cross curves of stability")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    save_figure(path, fig, dpi=130)


def righting_curves(data: Any, path: str, *, title: str = "") -> None:
    """Several GZ curves of one condition on one axes (``data["curves"]``: (label, RightingCurve) pairs):
    the exact fluid shift beside the FSM virtual rise, a damaged ship beside the intact one."""
    fig, ax = new_figure((10, 6))
    for k, (label, curve) in enumerate(data["curves"]):
        h = curve.heel
        fine = np.linspace(h[0], h[-1], max(400, 4 * len(h)))
        ax.plot(fine, curve.interpolant()(fine), lw=2 if k == 0 else 1.4, ls="-" if k == 0 else "--",
                color=f"C{k}", label=label + (" (decides)" if k == 0 else ""))
        ax.plot(h, curve.gz, ".", color=f"C{k}", ms=2)
    ax.axhline(0, color="k", lw=0.8)
    ax.set_xlabel("heel φ [deg]  (positive: starboard down)")
    ax.set_ylabel("righting lever GZ [m]")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize=8)
    ax.set_title(title or "Righting-lever curves")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    save_figure(path, fig, dpi=130)


def tank_calibration(tables: Any, path: str, *, title: str = "") -> None:
    """Sounding against volume and against transverse free-surface moment, one line per tank
    (``tables``: tank name -> calibration rows of :func:`meshhydro.tank_tables.calibration_table`)."""
    fig, (a1, a2) = new_figure((11, 5.5), 1, 2, sharey=True)
    for k, (name, rows) in enumerate(tables.items()):
        s = [r["sounding"] for r in rows]
        a1.plot([r["volume"] for r in rows], s, ".-", color=f"C{k}", label=name)
        a2.plot([r["fsm_t"] for r in rows], s, ".-", color=f"C{k}", label=name)
    a1.set_xlabel("volume [m³]")
    a2.set_xlabel("free-surface moment ρ i_t [t·m]")
    a1.set_ylabel("sounding [m]")
    for ax in (a1, a2):
        ax.grid(True, alpha=0.3)
    a1.legend(fontsize=8)
    fig.suptitle(title or "Tank calibration")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 0.97))
    save_figure(path, fig, dpi=130)


def draw(figure: Any, path: str) -> None:
    """Draw a document :class:`~meshhydro.document.Figure` to a PNG at ``path`` with the view it names."""
    if figure.view == "submergence":  # drawn by the report-grade view
        from .figures import submergence_plot

        submergence_plot(figure.data, path=path)
        return
    from .plots_limits import criteria_gz, kg_limits

    views = {"cross_curves": cross_curves, "criteria_gz": criteria_gz, "kg_limits": kg_limits,
             "righting_curves": righting_curves, "tank_calibration": tank_calibration}
    views[figure.view](figure.data, path, title=figure.title)

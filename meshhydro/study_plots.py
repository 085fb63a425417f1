"""Summary plots of a study (view): each key figure against each swept parameter, PNG.

matplotlib is imported here only, lazily, with the Agg backend. One figure per swept parameter
``study_<parameter>.png``: a panel per key figure, one line per combination of the other swept values
(and hull); failed cases and missing figures leave gaps. Every figure carries the short caution.
"""
from __future__ import annotations

import os
from typing import Any, Sequence

__all__ = ["plot_study", "PLOTTED"]

#: Figures plotted (column -> axis label).
PLOTTED = {
    "max_gz_m": "max GZ [m]", "angle_of_max_gz_deg": "angle of max GZ [deg]",
    "vanishing_angle_deg": "vanishing angle [deg]", "area_0_30_mrad": "area 0-30° [m·rad]",
    "area_0_40_mrad": "area 0-40° [m·rad]", "gm_m": "GM (fluid) [m]", "draft_m": "draft T [m]",
    "kg_limit_m": "KG limit [m]",
}
_MAX_LEGEND = 8


def _unit(spec: Any, name: str) -> str:
    """The unit of a swept parameter: the loading's (displacement t, kg m) or the generator's."""
    if name in ("displacement", "kg"):
        return {"displacement": "t", "kg": "m"}[name]
    from .generators import PARAMETERS

    p = PARAMETERS.get(getattr(spec.study, "generator", None) or "", {}).get(name)
    return "" if p is None or p.unit == "-" else p.unit


def _series(rows: Sequence[dict[str, Any]], x: str, others: Sequence[str],
            units: dict[str, str]) -> dict[str, list[dict[str, Any]]]:
    out: dict[str, list[dict[str, Any]]] = {}
    for r in rows:
        label = ", ".join(f"{o} = {r.get(o):g}{(' ' + units[o]) if units.get(o) else ''}" if o != "hull"
                          else str(r.get(o)) for o in others)
        out.setdefault(label, []).append(r)
    for v in out.values():
        v.sort(key=lambda r: r[x])
    return out


def _flat_axis(ax: Any, values: Sequence[Any]) -> None:
    """Keep a figure that does not change (to rounding) from being drawn as a large offset-axis swing."""
    ys = [float(v) for v in values if v is not None]
    ax.ticklabel_format(axis="y", useOffset=False)
    if ys and max(ys) - min(ys) <= 1e-9 * max(1.0, max(abs(y) for y in ys)):
        mid = 0.5 * (max(ys) + min(ys))
        pad = 0.05 * abs(mid) or 0.01
        ax.set_ylim(mid - pad, mid + pad)


def plot_study(rows: Sequence[dict[str, Any]], spec: Any, out_dir: str) -> list[str]:
    """Write ``study_<parameter>.png`` into ``out_dir`` for every swept parameter with 2 or more values;
    returns the paths written. ``rows``: dict rows of :mod:`meshhydro.study`."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from .criteria import CAUTION_SHORT
    from .output import save_figure

    swept = [p for p in spec.parameters if len(spec.values(p)) > 1]
    multi_hull = len({r.get("hull") for r in rows}) > 1
    figs = [f for f in PLOTTED if any(r.get(f) is not None for r in rows)]
    paths = []
    units = {p: _unit(spec, p) for p in swept}
    for x in swept:
        others = (["hull"] if multi_hull else []) + [p for p in swept if p != x]
        series = _series(rows, x, others, units)
        ncol = 4 if len(figs) > 4 else max(len(figs), 1)
        nrow = max(1, -(-len(figs) // ncol))
        fig, axes = plt.subplots(nrow, ncol, figsize=(3.6 * ncol, 2.9 * nrow + 0.8), squeeze=False)
        for ax, f in zip(axes.flat, figs):
            for label, rs in series.items():
                ys = [float("nan") if r.get(f) is None else r[f] for r in rs]
                ax.plot([r[x] for r in rs], ys, marker="o", ms=3, lw=1.2, label=label or None)
                bad = [(r[x], y) for r, y in zip(rs, ys) if r.get("verdict") == "fail"]
                if bad:  # the cases that do not meet the criteria: a ring round the point
                    ax.plot(*zip(*bad), "o", ms=8, mfc="none", mec="tab:red", mew=1.2, ls="none")
            _flat_axis(ax, [r.get(f) for r in rows])
            ax.set_xlabel(f"{x} [{units[x]}]" if units.get(x) else x)
            ax.set_ylabel(PLOTTED[f])
            ax.grid(True, alpha=0.3)
        for ax in list(axes.flat)[len(figs):]:
            ax.set_visible(False)
        if others and len(series) <= _MAX_LEGEND:
            axes.flat[0].legend(fontsize=7)
        failed = any(r.get("verdict") == "fail" for r in rows)
        fig.suptitle(f"{spec.study.name}: key figures against {x}"
                     + ("  (red ring: criteria not met)" if failed else ""))
        fig.text(0.5, 0.005, CAUTION_SHORT, ha="center", va="bottom", fontsize=7, color="0.3")
        fig.tight_layout(rect=(0, 0.03, 1, 0.97))
        path = os.path.join(out_dir, f"study_{x}.png")
        save_figure(path, fig)
        plt.close(fig)
        paths.append(path)
    return paths

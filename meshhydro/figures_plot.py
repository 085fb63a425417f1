"""Figure builders other than the GZ curve: hydrostatic curves, section-plane plot, compare, convergence.

Each ``*_figure(data)`` returns a matplotlib Figure (Agg canvas); :mod:`meshhydro.figures` adds
the caution and turns it into SVG or a file. Hull frame: x forward, y to port, z up [m].
"""
from __future__ import annotations

from typing import Any, Mapping, Sequence

import numpy as np

from .errors import InputError
from .figures_common import MARKERS, check_keys, new_figure, side_style

# --------------------------------------------------------------------------- hydrostatic curves
#: Panels of the hydrostatic curves: (x-axis label with unit, [(key, legend label)]).
HYDRO_PANELS = (
    ("displacement Δ [t]", [("displacement", "Δ")]),
    ("vertical heights [m]", [("vcb", "KB"), ("bmt", "BMt"), ("kmt", "KMt")]),
    ("longitudinal metacentre [m]", [("bml", "BMl"), ("kml", "KMl")]),
    ("x from the hull origin [m]", [("lcb", "LCB"), ("lcf", "LCF")]),
    ("area [m²]", [("awp", "waterplane area"), ("wsa", "wetted surface")]),
    ("TPC [t/cm]", [("tpc", "TPC")]),
    ("MCT 1 cm [t·m/cm]", [("mct", "MCT 1 cm")]),
    ("form coefficient [-]", [("cb", "Cb"), ("cp", "Cp"), ("cm", "Cm"), ("cwp", "Cwp")]),
)


def _rows_array(rows: Sequence[Mapping[str, Any]], key: str, where: str) -> np.ndarray:
    try:
        return np.array([float(r[key]) for r in rows])
    except KeyError:
        raise InputError(f"{where}: a row has no {key!r}") from None


def hydrostatics_figure(data: Mapping[str, Any]) -> Any:
    """``data``: {"vessel": str, "rows": [Hydrostatics.to_dict(), ...] (two or more drafts), "title"}."""
    check_keys(data, {"vessel", "rows", "title"}, {"vessel", "rows"}, "hydrostatic_curves")
    rows = list(data["rows"])
    if len(rows) < 2:
        raise InputError("hydrostatic_curves: 'rows' needs two or more drafts")
    t = _rows_array(rows, "draft", "hydrostatic_curves")
    fig, axes = new_figure((12.0, 7.6), 2, 4, sharey=True)
    for ax, (xlabel, series) in zip(axes.ravel(), HYDRO_PANELS, strict=True):
        vals = []
        for i, (key, label) in enumerate(series):
            v = _rows_array(rows, key, "hydrostatic_curves")
            colour, ls = side_style(i)
            ax.plot(v, t, color=colour, ls=ls, marker=MARKERS[i], ms=3, lw=1.4, label=label)
            vals.append(v)
        allv = np.concatenate(vals)
        span = float(allv.max() - allv.min())
        floor = 0.02 * max(float(np.abs(allv).max()), 1e-9)
        if span < floor:  # a flat curve (LCB of a box): do not magnify round-off into a slope
            mid = 0.5 * float(allv.max() + allv.min())
            ax.set_xlim(mid - floor, mid + floor)
        ax.ticklabel_format(axis="x", useOffset=False)
        ax.set_xlabel(xlabel, fontsize=8.5)
        ax.tick_params(labelsize=7.5)
        ax.grid(True, alpha=0.3)
        ax.legend(fontsize=7.5, loc="best")
    if "density" in rows[0]:
        rho = float(rows[0]["density"])
        top = axes[0, 0].secondary_xaxis("top", functions=(lambda d: d / rho, lambda v: v * rho))
        top.set_xlabel(f"volume [m³] at ρ = {rho:g} t/m³", fontsize=8)
        top.tick_params(labelsize=7)
    for ax in axes[:, 0]:
        ax.set_ylabel("draft T [m]")
    attitude = ""
    if all(k in r for r in rows for k in ("heel", "trim")) and len({(r["heel"], r["trim"]) for r in rows}) == 1:
        attitude = f" (heel {float(rows[0]['heel']):g}°, trim {float(rows[0]['trim']):g}°)"
    fig.suptitle(data.get("title") or f"{data['vessel']}: hydrostatic curves{attitude}", fontsize=11)
    fig.tight_layout(rect=(0, 0.02, 1, 0.98))
    return fig


# --------------------------------------------------------------------------- section-plane plot
SECTION_KEYS = {"vessel", "heel", "cob", "metacentre", "up", "cog", "gz", "at", "outline", "title"}


def _points(data: Mapping[str, Any], key: str, n: int) -> np.ndarray:
    a = np.asarray(data[key], dtype=float)
    if a.shape != (n, 3) or not np.all(np.isfinite(a)):
        raise InputError(f"section_plot: {key!r} must be a finite ({n}, 3) array in the hull frame [m]")
    return a


def _window(pts: list[np.ndarray]) -> tuple[float, float, float, float, float]:
    allp = np.vstack(pts)
    ylo, zlo = allp.min(axis=0)
    yhi, zhi = allp.max(axis=0)
    ext = max(yhi - ylo, zhi - zlo, 1e-3)
    return ylo - 0.25 * ext, yhi + 0.25 * ext, zlo - 0.25 * ext, zhi + 0.6 * ext, ext


def _angle_labels(ax: Any, heel: np.ndarray, b: np.ndarray, g: np.ndarray, colour: str, gap: float) -> None:
    """Label angles along the trace, offset from it away from G. A point closer than ``gap`` [m] to
    the last labelled one is skipped, and so is any label whose box would touch one already placed
    (measured after the axes' final layout), so labels never pile up where the trace bunches."""
    ax.apply_aspect()
    rend = ax.figure.canvas.get_renderer()
    placed: list[Any] = []
    last = None
    for j in range(len(heel)):
        if last is not None and np.linalg.norm(b[j] - b[last]) < gap:
            continue
        lo, hi = max(j - 1, 0), min(j + 1, len(heel) - 1)
        d = b[hi] - b[lo]
        nrm = np.array([-d[1], d[0]])
        nrm = nrm / np.linalg.norm(nrm) if np.linalg.norm(nrm) > 0 else np.array([0.0, -1.0])
        if nrm @ (b[j] - g) < 0:
            nrm = -nrm
        t = ax.annotate(f"{heel[j]:g}°", b[j], xytext=tuple(12 * nrm), textcoords="offset points", fontsize=7,
                        color=colour, ha="center", va="center")
        box = t.get_window_extent(rend).expanded(1.15, 1.3)
        if any(box.overlaps(p) for p in placed):
            t.remove()
            continue
        placed.append(box)
        last = j


def section_figure(data: Mapping[str, Any]) -> Any:
    """Trace of B, locus of M, G and GZ at one angle in the section plane, seen from astern.

    ``data``: vessel; heel (n,) [deg]; cob, metacentre, up (n, 3) hull frame [m] (up: earth's
    vertical); cog (3,) [m]; gz (n,) [m] as computed; at: the heel [deg] (one of ``heel``) whose
    GZ is drawn; outline: optional list of (k, 2) polylines (y, z) [m] of a hull section; title.
    """
    check_keys(data, SECTION_KEYS, {"vessel", "heel", "cob", "metacentre", "up", "cog", "gz", "at"},
               "section_plot")
    heel = np.asarray(data["heel"], dtype=float)
    n = len(heel)
    cob, met, up = (_points(data, k, n) for k in ("cob", "metacentre", "up"))
    gz = np.asarray(data["gz"], dtype=float)
    g3 = np.asarray(data["cog"], dtype=float)
    if gz.shape != (n,) or g3.shape != (3,):
        raise InputError(f"section_plot: 'gz' must have shape ({n},) and 'cog' shape (3,)")
    hit = np.flatnonzero(np.abs(heel - float(data["at"])) < 1e-9)
    if len(hit) == 0:
        raise InputError(f"section_plot: 'at' = {data['at']!r} is not one of the heels")
    k = int(hit[0])
    b, g = cob[:, 1:], g3[1:]
    outline = [np.asarray(p, dtype=float) for p in data.get("outline") or []]
    for i, p in enumerate(outline):
        if p.ndim != 2 or p.shape[1] != 2 or len(p) < 2 or not np.all(np.isfinite(p)):
            raise InputError(f"section_plot: outline polyline {i} must be a finite (k, 2) array of (y, z) [m]")
    y0, y1, z0, z1, ext = _window([b, g[None, :]] + outline)
    fig, ax = new_figure((7.8, 6.4))
    for i, p in enumerate(outline):
        ax.plot(p[:, 0], p[:, 1], color="0.3", lw=1.5, label="hull section" if i == 0 else None)
    ax.plot(b[:, 0], b[:, 1], "o-", color="#1f5fa8", ms=3, lw=1.6, label="B trace")
    inside = (met[:, 2] <= z1) & (met[:, 2] >= z0) & (met[:, 1] >= y0) & (met[:, 1] <= y1)
    m = np.where(inside[:, None], met, np.nan)
    ax.plot(m[:, 1], m[:, 2], "s--", color="#c0392b", ms=3, lw=1.1, label="M locus")
    out = ~inside
    if out.any():
        ax.plot(np.clip(met[out, 1], y0, y1), np.full(out.sum(), z1 - 0.03 * ext), "^", color="#c0392b", ms=6,
                ls="none", label=f"M off scale (BM ≤ {float(np.max(np.linalg.norm(met[out] - cob[out], axis=1))):.1f} m)")
    ax.plot([g[0]], [g[1]], "X", color="#2e8b57", ms=10, mec="k", ls="none", label="G")
    u = up[k]
    foot = cob[k] + ((g3 - cob[k]) @ u) * u  # Z: foot of the perpendicular from G on the vertical through B
    ax.plot([cob[k][1], cob[k][1] + 2 * ext * u[1]], [cob[k][2], cob[k][2] + 2 * ext * u[2]], ":", color="0.35",
            lw=1, label=f"vertical through B at {heel[k]:g}°")
    ax.plot([g[0], foot[1]], [g[1], foot[2]], color="#d35400", lw=3, label=f"GZ {gz[k]:+.3f} m at {heel[k]:g}°")
    ax.set_xlim(y0, y1)
    ax.set_ylim(z0, z1)
    ax.invert_xaxis()  # seen from astern: port (+y) on the left
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel("y [m]  (seen from astern: port on the left)")
    ax.set_ylabel("z above baseline [m]")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8.5, frameon=False)
    ax.set_title(data.get("title") or f"{data['vessel']}: trace of B and locus of M", fontsize=10)
    _angle_labels(ax, heel, b, g, "#1f5fa8", 0.05 * ext)
    return fig


# --------------------------------------------------------------------------- compare overlay
def compare_figure(data: Mapping[str, Any]) -> Any:
    """Several cases on shared axes; legend outside, each case its own colour, line style and marker.

    ``data``: {"title", "cases": [{"label", "heel" (n,) [deg], "gz" (n,) [m], optional "cob" and
    "metacentre" (n, 3) [m]}]}. With B and M for every case a second panel shows them in the
    section plane (seen from astern).
    """
    check_keys(data, {"title", "cases"}, {"title", "cases"}, "compare_overlay")
    cases = list(data["cases"])
    if len(cases) < 2:
        raise InputError("compare_overlay: 'cases' needs two or more entries")
    planes = all("cob" in c and "metacentre" in c for c in cases)
    fig, axes = new_figure((12.0 if planes else 8.5, 5.4), 1, 2 if planes else 1)
    ax = axes[0] if planes else axes
    for i, c in enumerate(cases):
        check_keys(c, {"label", "heel", "gz", "cob", "metacentre"}, {"label", "heel", "gz"}, f"compare_overlay case {i}")
        colour, ls = side_style(i)
        h, y = np.asarray(c["heel"], dtype=float), np.asarray(c["gz"], dtype=float)
        if h.shape != y.shape or h.ndim != 1:
            raise InputError(f"compare_overlay case {i}: 'heel' and 'gz' must be 1-d arrays of one length")
        every = max(1, len(h) // 10)
        ax.plot(h, y, color=colour, ls=ls, lw=1.7, marker=MARKERS[i % len(MARKERS)], ms=4, markevery=every,
                label=str(c["label"]))
        if planes:
            b, m = np.asarray(c["cob"], dtype=float), np.asarray(c["metacentre"], dtype=float)
            axes[1].plot(b[:, 1], b[:, 2], color=colour, ls=ls, lw=1.7, marker=MARKERS[i % len(MARKERS)], ms=3,
                         markevery=every)
            axes[1].plot(m[:, 1], m[:, 2], color=colour, ls=ls, lw=0.9, alpha=0.7)
    ax.axhline(0, color="k", lw=0.8)
    ax.set_xlabel("heel [deg]  (positive: starboard down)")
    ax.set_ylabel("righting lever GZ [m]")
    ax.grid(True, alpha=0.3)
    ax.set_title("righting levers", fontsize=10)
    if planes:
        a2 = axes[1]
        # the window holds every B trace with room around it; a metacentre far above (a catamaran's BM of
        # many metres) is cut at the frame instead of squashing the traces into a corner
        bs = np.vstack([np.asarray(c["cob"], dtype=float)[:, 1:] for c in cases])
        ext = max(float(np.ptp(bs[:, 0])), float(np.ptp(bs[:, 1])), 1e-3)
        a2.set_xlim(float(bs[:, 0].min()) - ext, float(bs[:, 0].max()) + ext)
        a2.set_ylim(float(bs[:, 1].min()) - 0.5 * ext, float(bs[:, 1].max()) + 1.5 * ext)
        a2.invert_xaxis()
        a2.set_aspect("equal", adjustable="box")
        a2.set_xlabel("y [m]  (seen from astern: port on the left)")
        a2.set_ylabel("z above baseline [m]")
        a2.grid(True, alpha=0.3)
        a2.set_title("B traces (thick) and M loci (thin, cut at the frame)", fontsize=10)
    fig.suptitle(str(data["title"]), fontsize=11)
    fig.legend(*ax.get_legend_handles_labels(), loc="center left", bbox_to_anchor=(1.0, 0.5), fontsize=10,
               frameon=False)
    fig.tight_layout(rect=(0, 0.03, 1, 0.96))
    return fig


# --------------------------------------------------------------------------- convergence
def convergence_figure(data: Mapping[str, Any]) -> Any:
    """|estimate − exact| [%] against station count, log-log, with round-off shown as a floor band.

    ``data``: {"vessel", "rows": rows of meshhydro.sections.convergence ("stations", "rule",
    "<quantity>_error_percent"), "floor": float [%] (default 1e-9; smaller errors are round-off),
    "title"}.
    """
    check_keys(data, {"vessel", "rows", "floor", "title"}, {"vessel", "rows"}, "convergence")
    rows = list(data["rows"])
    if not rows:
        raise InputError("convergence: 'rows' is empty")
    floor = float(data.get("floor", 1e-9))
    keys = [k for k in rows[0] if k.endswith("_error_percent")]
    fig, ax = new_figure((9.0, 5.6))
    counts = sorted({int(r["stations"]) for r in rows})
    rules = sorted({str(r["rule"]) for r in rows})
    top = floor
    for qi, key in enumerate(keys):
        colour, _ = side_style(qi)
        for ri, rule in enumerate(rules):
            sel = sorted((r for r in rows if r["rule"] == rule), key=lambda r: r["stations"])
            n = np.array([int(r["stations"]) for r in sel])
            e = np.abs(np.array([float(r[key]) for r in sel]))
            top = max(top, float(e.max()))
            shown = np.maximum(e, floor)
            mk = MARKERS[qi % len(MARKERS)]
            ax.plot(n, shown, color=colour, ls=("-", "--", ":")[ri % 3], lw=1.3, marker=mk, ms=4,
                    label=f"{key.removesuffix('_error_percent')} ({rule})")
            low = e <= floor
            ax.plot(n[low], shown[low], ls="none", marker=mk, ms=4, color=colour, mfc="white")
    ax.set_xscale("log", base=2)
    ax.set_yscale("log")
    ax.set_ylim(floor / 30, top * 5)
    ax.axhspan(floor / 30, floor, color="0.85", zorder=0, label=f"round-off: below {floor:g} % (open marks)")
    from matplotlib.ticker import FixedLocator, NullLocator, StrMethodFormatter

    ax.xaxis.set_major_locator(FixedLocator(counts))
    ax.xaxis.set_minor_locator(NullLocator())
    ax.xaxis.set_major_formatter(StrMethodFormatter("{x:.0f}"))
    ax.set_xlabel("number of station intervals")
    ax.set_ylabel("|estimate − exact| [%]  (LCB, LCF: % of length)")
    ax.grid(True, which="major", alpha=0.3)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8.5, frameon=False)
    ax.set_title(data.get("title") or f"{data['vessel']}: section-based estimates against the exact result",
                 fontsize=10)
    return fig

"""Matplotlib figures (PNG, SVG or PDF by the suffix asked for). Imported only by the views and the CLI."""
from __future__ import annotations

from typing import Any, Sequence

import numpy as np

from .criteria import CAUTION_SHORT as CAUTION
from .hull import Hull
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
    for ax, panel in zip(axes.ravel(), panels, strict=False):
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


def righting_curve(curve: Any, path: str, *, title: str = "") -> None:
    """GZ curve with the GM tangent to 57.3°, and marks for the derived angles on each side."""
    fig, ax = _figure(figsize=(10, 6))
    h, gz = curve.heel, curve.gz
    fine = np.linspace(h[0], h[-1], max(400, 4 * len(h)))
    sp = curve.interpolant()
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
        beyond = curve.max_beyond_range(s)
        ax.plot([s * amax], [s * gmax], "^", color="tab:red")
        ax.annotate(f"GZ still rising at {amax:.1f}°" if beyond else f"max {gmax:.3f} m at {amax:.1f}°",
                    (s * amax, s * gmax), fontsize=8, xytext=(5, 5 * s), textcoords="offset points")
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


def largest_section(hull: Hull, n: int = 41) -> tuple[float, np.ndarray]:
    """x [m] and outline segments (k, 2, 3) of the transverse section of largest area."""
    from .sections import section_segments, sectional_areas

    xs = np.linspace(hull.bounds[0][0], hull.bounds[1][0], n + 2)[1:-1]
    areas = sectional_areas(hull, xs, hull.bounds[1][2] + hull.size)  # whole sections: water above all
    xb = float(xs[int(np.argmax(areas))])
    return xb, section_segments(hull, xb)


def section_view(hull: Hull | Sequence[Hull], traces: Sequence[Any], path: str, *, size: tuple[int, int] = (960, 720),
                 current: int | None = None, labels: Sequence[str] | None = None) -> None:
    """The transverse-plane figure: outline, waterlines, trace of B, metacentre locus, G and GZ.

    Drawn in the hull frame as seen from astern (port on the left, starboard on the
    right), so the vessel stands still and the waterline turns round it. With several
    traces (compare mode) their B traces and metacentre loci are overlaid with a legend.
    Metacentres beyond the window are drawn as arrow heads on its top edge.
    """
    dpi = 100
    fig, ax = _figure(figsize=(size[0] / dpi, size[1] / dpi))
    hulls = list(hull) if isinstance(hull, (list, tuple)) else [hull] * len(traces)
    colours = ["tab:blue", "tab:red", "tab:green", "tab:purple", "tab:orange", "tab:brown"]
    ylo, yhi, zlo, zhi = np.inf, -np.inf, np.inf, -np.inf
    seen: set[int] = set()
    for i, h in enumerate(hulls):
        if id(h) in seen:
            continue
        seen.add(id(h))
        _, seg = largest_section(h)
        col = "0.25" if len(seen) == 1 and len(set(map(id, hulls))) == 1 else colours[i % len(colours)]
        for s in seg:
            ax.plot(s[:, 1], s[:, 2], color=col, lw=1.6)
        ylo, yhi = min(ylo, h.bounds[0][1]), max(yhi, h.bounds[1][1])
        zlo, zhi = min(zlo, h.bounds[0][2]), max(zhi, h.bounds[1][2])
    w, hh = yhi - ylo, zhi - zlo
    ext = max(w, hh)
    y0, y1 = ylo - 0.3 * ext, yhi + 0.3 * ext
    z0, z1 = zlo - 0.3 * ext, zhi + 0.9 * ext
    for i, (h, t) in enumerate(zip(hulls, traces, strict=False)):
        col = colours[i % len(colours)]
        name = (labels[i] if labels else t.label) or f"case {i + 1}"
        K = np.array([h.x_ref, 0.0, 0.0])
        if len(traces) == 1:
            for k in range(len(t.heel)):
                n = t.up[k]
                d = np.array([n[2], -n[1]])  # waterline direction in (y, z)
                d /= max(np.linalg.norm(d), 1e-12)
                c = (K + t.keel_depth[k] * n)[1:]
                q = c + (t.cob[k][1:] - c) @ d * d
                a, b = q - 0.6 * ext * d, q + 0.6 * ext * d
                ax.plot([a[0], b[0]], [a[1], b[1]], color="tab:cyan", lw=0.8, alpha=0.5)
        ax.plot(t.cob[:, 1], t.cob[:, 2], "o-", color=col, ms=3, lw=1.6, label=f"B trace: {name}")
        m = t.metacentre
        inside = (m[:, 2] <= z1) & (m[:, 1] >= y0) & (m[:, 1] <= y1)
        mm = np.where(inside[:, None], m, np.nan)
        ax.plot(mm[:, 1], mm[:, 2], "s--", color=col, ms=3, lw=1.0, alpha=0.85, label=f"M locus: {name}")
        out = ~inside & (m[:, 1] >= y0) & (m[:, 1] <= y1)
        if out.any():
            ax.plot(m[out, 1], np.full(out.sum(), z1 - 0.02 * ext), "^", color=col, ms=6, alpha=0.8,
                    label=f"M above the window (BM up to {float(np.max(t.bm[out])):.1f} m)")
        k = len(t.heel) - 1 if current is None else current
        g = t.cog_at(k) if hasattr(t, "cog_at") else t.cog
        ax.plot([g[1]], [g[2]], "X", color=col, ms=10, mec="k", label=f"G: {name}")
        n = t.up[k]
        z = t.cob[k] + ((g - t.cob[k]) @ n) * n  # foot of the perpendicular from G on the vertical through B
        ax.plot([g[1], z[1]], [g[2], z[2]], color="tab:orange" if len(traces) == 1 else col, lw=3,
                label=f"GZ {t.gz[k]:+.3f} m at {t.heel[k]:g}°" + ("" if len(traces) == 1 else f" ({name})"))
        ax.plot([t.cob[k][1], t.cob[k][1] + ext * n[1]], [t.cob[k][2], t.cob[k][2] + ext * n[2]], ":", color=col, lw=1)
        for j in range(0, len(t.heel), max(1, len(t.heel) // 6)):
            ax.annotate(f"{t.heel[j]:g}°", (t.cob[j][1], t.cob[j][2]), fontsize=7, color=col,
                        xytext=(3, -9), textcoords="offset points")
    ax.set_xlim(y0, y1)
    ax.set_ylim(z0, z1)
    ax.invert_xaxis()  # seen from astern: port (+y) on the left
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel("y [m]   (seen from astern: port on the left, starboard on the right)")
    ax.set_ylabel("z above baseline [m]")
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=7, loc="upper right")
    notes = [getattr(t, "note", "") for t in traces]
    if any(notes):
        ax.text(0.02, 0.02, "\n".join(n for n in notes if n), transform=ax.transAxes, fontsize=8, va="bottom",
                ha="left", color="0.15", bbox={"facecolor": "white", "alpha": 0.8, "lw": 0})
    ax.set_title("Heel sweep: trace of B and locus of the metacentre (hull frame)", fontsize=10)
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    _save(fig, path, dpi=dpi)


def convergence_plot(rows: Sequence[dict[str, Any]], path: str, *, title: str = "") -> None:
    """Error of section-based estimates [%] against the number of stations, log-log, per rule."""
    keys = [k for k in rows[0] if k.endswith("_error_percent")]
    fig, ax = _figure(figsize=(9, 6))
    styles = {"simpson": "-", "trapezoid": "--"}
    colours = dict(zip(keys, ["tab:blue", "tab:orange", "tab:green", "tab:red", "tab:purple", "tab:brown", "tab:pink"], strict=False))
    for rule in sorted({r["rule"] for r in rows}):
        sel = [r for r in rows if r["rule"] == rule]
        n = np.array([r["stations"] for r in sel])
        for k in keys:
            e = np.abs([r[k] for r in sel])
            if np.all(e < 1e-10):
                continue
            ax.loglog(n, np.maximum(e, 1e-12), styles.get(rule, ":"), marker="o", ms=3, color=colours[k],
                      label=f"{k.replace('_error_percent', '')} ({rule})")
    ax.set_xlabel("number of station intervals")
    ax.set_ylabel("|estimate - exact| [%]  (LCB, LCF: % of length)")
    ax.grid(True, which="both", alpha=0.3)
    ax.legend(fontsize=7, ncol=2)
    ax.set_title(title or "Section-based estimates against the exact mesh result")
    fig.text(0.01, 0.005, CAUTION, fontsize=7, color="0.35")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    _save(fig, path)


def righting_curves(data: Any, path: str, *, title: str = "") -> None:
    """Several GZ curves of one condition on one axes (``data["curves"]``: (label, RightingCurve) pairs):
    the exact fluid shift beside the FSM virtual rise, a damaged ship beside the intact one."""
    fig, ax = _figure(figsize=(10, 6))
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
    _save(fig, path)


def tank_calibration(tables: Any, path: str, *, title: str = "") -> None:
    """Sounding against volume and against transverse free-surface moment, one line per tank
    (``tables``: tank name -> calibration rows of :func:`meshhydro.tank_tables.calibration_table`)."""
    fig, (a1, a2) = _figure(1, 2, figsize=(11, 5.5), sharey=True)
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
    _save(fig, path)


def draw(figure: Any, path: str) -> None:
    """Draw a document :class:`~meshhydro.document.Figure` to a PNG at ``path`` with the view it names."""
    if figure.view == "submergence":  # drawn by the report-grade view
        from .figures import submergence_plot

        submergence_plot(figure.data, path=path)
        return
    from .plots_limits import criteria_gz, kg_limits

    views = {"righting_curve": righting_curve, "cross_curves": cross_curves, "hydrostatic_curves": hydrostatic_curves,
             "criteria_gz": criteria_gz, "kg_limits": kg_limits,
             "righting_curves": righting_curves, "tank_calibration": tank_calibration}
    views[figure.view](figure.data, path, title=figure.title)

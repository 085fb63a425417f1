"""Report-grade figures (a views module): plain data in, SVG text out, PNG/SVG/PDF on request.

Every public drawing function takes a ``data`` mapping of plain numbers and arrays (what a
:class:`meshhydro.document.Figure` carries), returns the figure as SVG text and, when ``path`` is
given, also writes it whole (PNG, SVG or PDF by the path's suffix). :func:`draw` maps a document
figure to its drawing function through :data:`VIEWS`. Matplotlib (Agg) is imported inside the
functions only; no pyplot state is used, so figures never leak between calls.

Conventions: angles in degrees, lengths in m, masses in t; the hull frame is x forward, y to
port, z up; section views are seen from astern (port on the left).
"""
from __future__ import annotations

import io
import math
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from .criteria import CAUTION_SHORT
from .document import Figure
from .errors import InputError
from .figures_plot import compare_figure, convergence_figure, hydrostatics_figure, section_figure
from .figures_common import check_keys, new_figure, side_style
from .figures_submergence import submergence_figure
from .output import figure_format, save_atomic

#: One radian in degrees: the GM tangent reaches GM at this heel.
RADIAN_DEG = 180.0 / math.pi


def _fmt(v: float, digits: int) -> str:
    return f"{v:.{digits}f}"


# --------------------------------------------------------------------------- GZ curve
GZ_KEYS = {"vessel", "sides", "gm", "free_trim", "limits", "heeling_arm", "title"}
SIDE_KEYS = {"name", "heel", "gz", "max_gz", "angle_of_max", "areas", "downflooding", "vanishing",
             "deck_edge", "gz_digits", "angle_digits"}


def _side_arrays(s: Mapping[str, Any], where: str) -> tuple[np.ndarray, np.ndarray]:
    check_keys(s, SIDE_KEYS, {"name", "heel", "gz"}, where)
    x = np.asarray(s["heel"], dtype=float)
    y = np.asarray(s["gz"], dtype=float)
    if x.ndim != 1 or x.shape != y.shape or len(x) < 2:
        raise InputError(f"{where}: 'heel' and 'gz' must be 1-d arrays of one length (at least 2)")
    if np.any(x < -1e-9) or np.any(np.diff(x) <= 0):
        raise InputError(f"{where}: 'heel' must be increasing angles towards the side, from 0 [deg]")
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise InputError(f"{where}: 'heel' and 'gz' must be finite")
    return x, y


def _gz_limits(sides: list[tuple[np.ndarray, np.ndarray]], extra: list[float]) -> tuple[float, float]:
    """y-limits from the curves (and limit lines, heeling arms) only: the GM tangent never sets them."""
    vals = np.concatenate([y for _, y in sides] + [np.asarray(extra, dtype=float), np.zeros(1)])
    lo, hi = float(vals.min()), float(vals.max())
    pad = 0.12 * max(hi - lo, 1e-3)
    return lo - pad, hi + 2.0 * pad


def _shade_areas(ax: Any, x: np.ndarray, y: np.ndarray, areas: Sequence[Any], colour: str, side: str, *,
                 hatched: bool = False) -> None:
    """Shade the areas under the curve: disjoint bands between all break angles, alternating tone; hatched
    without fill (``hatched``) for a second side, so that two sides' areas stay apart where they overlap."""
    ranges = []
    for a in areas:
        if len(a) not in (2, 3):
            raise InputError(f"gz_curve side {side!r}: an area is (from, to) or (from, to, value), got {a!r}")
        ranges.append((float(a[0]), float(a[1]), None if len(a) == 2 else float(a[2])))
    breaks = sorted({b for r in ranges for b in r[:2]})
    for j, (a, b) in enumerate(zip(breaks[:-1], breaks[1:], strict=False)):
        if not any(r[0] <= a and b <= r[1] for r in ranges):
            continue
        fine = np.linspace(a, b, 60)
        if hatched:
            ax.fill_between(fine, 0, np.interp(fine, x, y), facecolor="none", edgecolor=colour, lw=0,
                            hatch="///" if j % 2 == 0 else "\\\\", alpha=0.55)
        else:
            ax.fill_between(fine, 0, np.interp(fine, x, y), color=colour, alpha=0.22 if j % 2 == 0 else 0.12, lw=0)
    for b in breaks:
        ax.plot([b, b], [0, float(np.interp(b, x, y))], color=colour, lw=0.6, alpha=0.7)
    for a, b, v in ranges:
        text = f"area {a:g}–{b:g}°" + ("" if v is None else f" = {v:.4f} m·rad") + f" ({side})"
        if hatched:
            ax.fill_between([], [], [], facecolor="none", edgecolor=colour, hatch="///", lw=0, alpha=0.55,
                            label=text)
        else:
            ax.plot([], [], color=colour, alpha=0.3, lw=6, label=text)


def _limit_lines(ax: Any, limits: Sequence[Mapping[str, Any]], xmax: float) -> list[float]:
    ys = []
    for i, lim in enumerate(limits):
        check_keys(lim, {"kind", "value", "from", "to", "label"}, {"kind", "value", "label"}, f"gz_curve limit {i}")
        v = float(lim["value"])
        if lim["kind"] == "gz":
            a, b = float(lim.get("from", 0.0)), float(lim.get("to", xmax))
            ax.plot([a, b], [v, v], color="0.25", lw=1.1, ls=(0, (6, 2, 1, 2)), label=str(lim["label"]))
            ys.append(v)
        elif lim["kind"] == "angle":
            ax.axvline(v, color="0.25", lw=1.0, ls=(0, (2, 2)), label=str(lim["label"]))
        else:
            raise InputError(f"gz_curve limit {i}: kind must be 'gz' or 'angle', got {lim['kind']!r}")
    return ys


def _mark_max(ax: Any, s: Mapping[str, Any], colour: str) -> None:
    """Mark a side's printed maximum at its point; the value goes in the legend (outside the axes),
    so it can never collide with the curves or another label. Formatted to the printed digits."""
    if s.get("max_gz") is None or s.get("angle_of_max") is None:
        return
    g, a = float(s["max_gz"]), float(s["angle_of_max"])
    text = f"GZmax {_fmt(g, int(s.get('gz_digits', 3)))} m at {_fmt(a, int(s.get('angle_digits', 1)))}°"
    ax.plot([a], [g], marker="^", color=colour, ms=8, mec="k", mew=0.6, ls="none", zorder=5,
            label=f"{text} ({s['name']})")


def _gm_tangent(ax: Any, gm: float, ylim: tuple[float, float], xmax: float) -> None:
    """The GM tangent from the origin to (1 rad, GM), drawn without taking part in the scaling."""
    top = ylim[1]
    ax.plot([0, RADIAN_DEG], [0, gm], color="0.45", lw=0.9, ls="--", scalex=False, scaley=False,
            label=f"GM tangent, GM = {gm:.3f} m")
    if 0 < gm <= top and RADIAN_DEG <= xmax:
        ax.plot([RADIAN_DEG, RADIAN_DEG], [0, gm], color="0.45", lw=0.7, ls=":", scalex=False, scaley=False)
        ax.annotate("1 rad", (RADIAN_DEG, 0), xytext=(3, 3), textcoords="offset points", fontsize=7, color="0.35")


def _heeling_arm(ax: Any, arm: Mapping[str, Any], curves: dict[str, tuple[np.ndarray, np.ndarray]]) -> list[float]:
    check_keys(arm, {"heel", "arm", "label", "side", "residual"}, {"heel", "arm", "label"}, "gz_curve heeling_arm")
    x = np.asarray(arm["heel"], dtype=float)
    y = np.asarray(arm["arm"], dtype=float)
    if x.ndim != 1 or x.shape != y.shape or len(x) < 2 or np.any(np.diff(x) <= 0):
        raise InputError("gz_curve heeling_arm: 'heel' (increasing) and 'arm' must be 1-d arrays of one length")
    ax.plot(x, y, color="tab:brown", lw=1.4, ls="-.", label=str(arm["label"]))
    if "residual" in arm:
        side = str(arm.get("side", next(iter(curves))))
        if side not in curves:
            raise InputError(f"gz_curve heeling_arm: side {side!r} is not among the curves")
        cx, cy = curves[side]
        a, b = (float(v) for v in arm["residual"])
        fine = np.linspace(a, b, 200)
        g, h = np.interp(fine, cx, cy), np.interp(fine, x, y)
        ax.fill_between(fine, h, g, where=g >= h, color="tab:brown", alpha=0.25, lw=0,
                        label=f"residual area {a:g}–{b:g}°")
    return [float(y.min()), float(y.max())]


def gz_figure(data: Mapping[str, Any]) -> Any:
    """Build the righting-lever figure; see :func:`gz_curve` for ``data``."""
    check_keys(data, GZ_KEYS, {"vessel", "sides"}, "gz_curve")
    sides = list(data["sides"])
    if not sides:
        raise InputError("gz_curve: 'sides' is empty")
    curves = {}
    for i, s in enumerate(sides):
        arrays = _side_arrays(s, f"gz_curve side {i}")
        if str(s["name"]) in curves:
            raise InputError(f"gz_curve side {i}: the name {s['name']!r} is used twice")
        curves[str(s["name"])] = arrays
    fig, ax = new_figure((9.0, 5.6))
    xmax = max(float(x[-1]) for x, _ in curves.values())
    for i, (s, (x, y)) in enumerate(zip(sides, curves.values(), strict=True)):
        colour, ls = side_style(i)
        ax.plot(x, y, color=colour, ls=ls, lw=1.9, label=f"GZ, heeling to {s['name']}")
        _mark_max(ax, s, colour)
        if s.get("areas"):
            _shade_areas(ax, x, y, s["areas"], colour, str(s["name"]), hatched=i > 0)
        for key, name, mk in (("downflooding", "downflooding", "v"), ("vanishing", "vanishing", "o"),
                              ("deck_edge", "deck edge", "D")):
            if s.get(key) is not None:
                ang = float(s[key])
                ax.plot([ang], [float(np.interp(ang, x, y))], marker=mk, ls="none", color=colour, mfc="white",
                        ms=6, label=f"{name} {ang:.1f}° ({s['name']})")
                if key == "downflooding":
                    ax.axvline(ang, color=colour, lw=0.8, ls=(0, (1, 2)))
    extra = _limit_lines(ax, data.get("limits", ()), xmax)
    if data.get("heeling_arm"):
        extra += _heeling_arm(ax, data["heeling_arm"], curves)
    ylim = _gz_limits(list(curves.values()), extra)
    ax.set_xlim(0, xmax)
    ax.set_ylim(*ylim)
    if data.get("gm") is not None:
        _gm_tangent(ax, float(data["gm"]), ylim, xmax)
    ax.axhline(0, color="k", lw=0.8)
    ax.set_xlabel("heel towards the side named [deg]")
    ax.set_ylabel("righting lever GZ [m]  (positive: righting)")
    trim = "free trim" if data.get("free_trim", True) else "fixed trim"
    ax.set_title(data.get("title") or f"{data['vessel']}: righting-lever curve ({trim})")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8.5, frameon=False)
    return fig


def gz_curve(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Righting-lever curve(s) with both sides read as righting = positive; SVG text.

    ``data`` keys:
      vessel : str (in the title); sides : list of side mappings (below); gm : float [m] or None
      (upright GM, drawn as the tangent to 1 rad, clipped to the curves' scale); free_trim : bool;
      limits : list of {"kind": "gz"|"angle", "value", "label", "from", "to"} (criteria limits:
      a horizontal GZ line from an angle, or a vertical angle line); heeling_arm : {"heel" (m,),
      "arm" (m,) [m], "label", "side", "residual": (from, to)} (residual area shaded); title : str.
    Side keys: name ("starboard"/"port"), heel (n,) [deg] from 0 towards that side, gz (n,) [m]
      positive righting, max_gz [m] and angle_of_max [deg] as printed elsewhere (annotated as
      given, never recomputed), gz_digits / angle_digits (of the printed values), areas: list of
      (from, to[, value m·rad]), downflooding / vanishing / deck_edge [deg] or None.
    """
    return finish(gz_figure(data), path)


def weather_gz(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """GZ in the signed heel frame with the weather criterion's levers and areas a, b (one panel per wind
    direction) and any heeling arms; SVG text. ``data`` as :func:`meshhydro.plots_limits.criteria_gz_figure`
    takes it, plus an optional ``title``."""
    from .plots_limits import criteria_gz_figure

    fig = criteria_gz_figure(data, title=data.get("title", ""))
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return finish(fig, path)


# --------------------------------------------------------------------------- output
def finish(fig: Any, path: str | None) -> str:
    """Add the caution, write ``path`` (by suffix) when given, and return the figure as SVG text."""
    fig.text(0.005, 0.003, CAUTION_SHORT, fontsize=6.5, color="0.4", ha="left", va="bottom")
    if path is not None:
        save_figure(fig, path)
    return svg_text(fig)


def svg_text(fig: Any) -> str:
    """SVG text of a matplotlib figure: text kept as text, no metadata, stable ids."""
    import matplotlib

    buf = io.StringIO()
    with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "meshhydro"}):
        fig.savefig(buf, format="svg", bbox_inches="tight", pad_inches=0.08,
                    metadata={"Creator": None, "Date": None, "Format": None, "Type": None})
    return buf.getvalue()


SUFFIXES = {".png": "png", ".svg": "svg", ".pdf": "pdf"}


def save_figure(fig: Any, path: str, *, dpi: int = 150) -> None:
    """Write the figure whole (or not at all) as PNG, SVG or PDF chosen by the suffix of ``path``."""
    fmt = figure_format(path, tuple(s.lstrip(".") for s in SUFFIXES))
    meta = {"Creator": None} if fmt in ("svg", "pdf") else {}
    save_atomic(path, lambda p: fig.savefig(p, format=fmt, dpi=dpi, bbox_inches="tight", pad_inches=0.08,
                                            metadata=meta))


def hydrostatic_curves(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Hydrostatic curves against draft (SVG). ``data``: {"vessel", "rows": Hydrostatics.to_dict rows}."""
    return finish(hydrostatics_figure(data), path)


def section_plot(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Trace of B and locus of M in the section plane, GZ at a chosen angle (SVG); see figures_plot."""
    return finish(section_figure(data), path)


def compare_overlay(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Several hulls' GZ curves (and B traces / M loci when given) on shared axes (SVG)."""
    return finish(compare_figure(data), path)


def convergence_plot(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Section-based estimates against the exact result over station counts (SVG)."""
    return finish(convergence_figure(data), path)


def submergence_plot(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """KB, KMt (the KG limit), BMt, waterplane and GMt over a ballast-down passage (SVG); see
    :mod:`meshhydro.figures_submergence`."""
    return finish(submergence_figure(data), path)


def kg_limits_plot(data: Mapping[str, Any], *, path: str | None = None) -> str:
    """Largest KG against displacement, marked by the governing criterion (SVG); see
    :mod:`meshhydro.figures_limits`."""
    from .figures_limits import kg_limits_figure

    return finish(kg_limits_figure(data), path)


#: Figure.view name -> drawing function (data, *, path) -> SVG text.
VIEWS: dict[str, Callable[..., str]] = {
    "gz_curve": gz_curve,
    "weather_gz": weather_gz,
    "hydrostatic_curves": hydrostatic_curves,
    "section_plot": section_plot,
    "compare_overlay": compare_overlay,
    "convergence": convergence_plot,
    "submergence": submergence_plot,
    "kg_limits": kg_limits_plot,
}


def draw(figure: Figure) -> str:
    """SVG text of a document figure, drawn by the view its ``view`` names (see :data:`VIEWS`)."""
    fn = VIEWS.get(figure.view)
    if fn is None:
        raise InputError(f"figure {figure.key!r}: no view named {figure.view!r} (known: {', '.join(sorted(VIEWS))})")
    return fn(figure.data)


def save(figure: Figure, path: str) -> None:
    """Write a document figure to ``path`` (PNG, SVG or PDF by suffix)."""
    fn = VIEWS.get(figure.view)
    if fn is None:
        raise InputError(f"figure {figure.key!r}: no view named {figure.view!r} (known: {', '.join(sorted(VIEWS))})")
    fn(figure.data, path=path)

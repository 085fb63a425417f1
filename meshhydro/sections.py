"""Stations, Bonjean data, offsets tables, Simpson's rules and lofting.

Section-based estimates are what a hand or spreadsheet calculation does: half-breadths
y(x, z) at stations x and waterlines z, integrated first up each section and then
along the length. This module computes them from a mesh or from an offsets table and
compares them with the exact mesh result.

Integration rules (any numerical-analysis text; Simpson's first rule integrates cubics
exactly):

* ``simpson``: on equally spaced ordinates, Simpson's first rule (1, 4, 2, 4, ..., 1) x h/3
  when the number of intervals is even; when it is odd (>= 3), the first rule over all but
  the last three intervals and Simpson's second rule (1, 3, 3, 1) x 3h/8 over those, as the
  textbooks do; one interval falls back to the trapezoidal rule. Unequal spacing uses
  Simpson's rule for unequal intervals (scipy). Each case is reported in ``notes``.
* ``trapezoid``: the trapezoidal rule.

Multihulls: sections, offsets and Simpson's estimates are taken per body (each
demihull or float, found as the connected components of the mesh through shared edges),
each about its own centreline, with totals; a section in several parts at one height
(a tunnel under a bridge deck) or a body not symmetric about its own centreline is
refused with the reason, never tabulated with the gap filled.

End stations: a station at a body's end is the section just inside the body (from
forward at the aft end, from aft at the fore end), so a transom counts alike at both
ends; interior sections are the same from either side wherever they are continuous.

The offsets table model and its CSV format live in :mod:`meshhydro.offsets`.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property
from typing import Any, Sequence

import numpy as np

from . import kernel
from .errors import InputError
from .loft import loft_offsets
from .offsets import MultiOffsets, Offsets, parse_offsets, read_offsets

__all__ = [
    "Bonjean", "MultiOffsets", "Offsets", "SectionHydrostatics", "body_faces", "bonjean", "compare_rows",
    "convergence", "cumulative", "half_breadths", "integrate", "loft_offsets", "offsets_from_mesh",
    "parse_offsets", "read_offsets", "section_hydrostatics", "section_segments", "sectional_areas",
]

RULES = ("simpson", "trapezoid")


# ----------------------------------------------------------------------------- integration rules


def integrate(y: np.ndarray, x: np.ndarray, rule: str = "simpson") -> tuple[np.ndarray, str]:
    """Integral of ordinates ``y`` (..., n) over abscissae ``x`` (n,) along the last axis.

    Returns the integral (...,) and a note saying which rule was used.
    """
    y = np.asarray(y, dtype=float)
    x = np.asarray(x, dtype=float)
    n = len(x) - 1
    if n < 1:
        return np.zeros(y.shape[:-1]), "single ordinate: zero"
    if rule == "trapezoid":
        return np.trapezoid(y, x, axis=-1), "trapezoidal rule"
    if rule != "simpson":
        raise InputError(f"rule must be one of {RULES}, got {rule!r}")
    h = np.diff(x)
    if np.ptp(h) > 1e-9 * max(abs(h).max(), 1e-300):
        from scipy.integrate import simpson

        return simpson(y, x=x, axis=-1), "Simpson's rule for unequal intervals"
    hh = float(h.mean())
    if n == 1:
        return 0.5 * hh * (y[..., 0] + y[..., 1]), "one interval: trapezoidal rule"
    if n % 2 == 0:
        w = np.ones(n + 1)
        w[1:-1:2] = 4.0
        w[2:-1:2] = 2.0
        return (y @ w) * hh / 3.0, "Simpson's first rule"
    # odd number of intervals: first rule on n-3, second rule (3/8) on the last three
    m = n - 3
    total = np.zeros(y.shape[:-1])
    if m > 0:
        w = np.ones(m + 1)
        w[1:-1:2] = 4.0
        w[2:-1:2] = 2.0
        total = (y[..., : m + 1] @ w) * hh / 3.0
    w2 = np.array([1.0, 3.0, 3.0, 1.0])
    total = total + (y[..., m:] @ w2) * 3.0 * hh / 8.0
    note = "odd number of intervals: Simpson's first rule" + (f" over {m}" if m else " over none") + \
        " and the second rule (3/8) over the last three"
    return total, note


def cumulative(y: np.ndarray, x: np.ndarray, rule: str = "simpson") -> tuple[np.ndarray, list[str]]:
    """Integrals from x[0] to each x[j] (j = 0..n) along the last axis, with the rule's note per j."""
    y = np.asarray(y, dtype=float)
    out = np.zeros(y.shape)
    notes = [""]
    for j in range(1, len(x)):
        val, note = integrate(y[..., : j + 1], x[: j + 1], rule)
        out[..., j] = val
        notes.append(note)
    return out, notes


# ----------------------------------------------------------------------------- bodies


def body_faces(hull: Any) -> list[np.ndarray]:
    """Face indices of each body: connected components of the faces through shared edges.

    Returns a list of (k,) int64 arrays, ordered by each body's first face, so the
    numbering agrees with ``hull.report.bodies`` wherever the two splits agree (the
    health report may join bodies that only touch at a vertex; here they stay apart).
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    f = np.asarray(hull.faces, dtype=np.int64)
    m = len(f)
    e = np.sort(f[:, [0, 1, 1, 2, 2, 0]].reshape(-1, 2), axis=1)
    _, eid = np.unique(e, axis=0, return_inverse=True)
    eid = eid.reshape(-1)
    g = coo_matrix((np.ones(3 * m), (np.repeat(np.arange(m), 3), eid)), shape=(m, int(eid.max()) + 1)).tocsr()
    _, lab = connected_components(g @ g.T, directed=False)
    first = np.full(int(lab.max()) + 1, m)
    np.minimum.at(first, lab, np.arange(m))
    return [np.flatnonzero(lab == c) for c in np.argsort(first)]


class _Body:
    """One body prepared for sections: kernel data of its faces (and, when asked, of its mirror
    image in x, for sections taken from forward), its extent (3,) lo/hi [m] and centreline."""

    def __init__(self, hull: Any, faces: np.ndarray, index: int | None) -> None:
        self.index = index
        self._v = np.asarray(hull.vertices, float)
        self._f = np.asarray(hull.faces, np.int64)[faces]
        used = self._v[np.unique(self._f)]
        self.lo, self.hi = used.min(axis=0), used.max(axis=0)
        self.prep = kernel.prepare(self._v, self._f)

    @cached_property
    def mirror(self) -> Any:
        """kernel data of the body mirrored in x (x -> -x, winding reversed to stay outward)."""
        return kernel.prepare(self._v * np.array([-1.0, 1.0, 1.0]), self._f[:, ::-1])

    @property
    def centreline(self) -> float:
        return float(0.5 * (self.lo[1] + self.hi[1]))


def _bodies(hull: Any, body: int | None = None, *, split: bool = True) -> list[_Body]:
    """The bodies of a hull (all, or the one numbered ``body``); ``split=False`` gives the whole hull as one."""
    if not split and body is None:
        return [_Body(hull, np.arange(len(hull.faces)), None)]
    parts = body_faces(hull)
    if body is not None:
        if not 0 <= int(body) < len(parts):
            raise InputError(f"body {body} does not exist: {hull.name} has {len(parts)} bodies (0..{len(parts) - 1})")
        return [_Body(hull, parts[int(body)], int(body))]
    if len(parts) == 1:
        return [_Body(hull, parts[0], None)]
    return [_Body(hull, p, i) for i, p in enumerate(parts)]


# ----------------------------------------------------------------------------- from a mesh


def _segments(b: _Body, x: float) -> np.ndarray:
    """Outline segments (k, 2, 3) [m] of body ``b``'s section at x, taken from inside its length:
    at and beyond its aft end the limit from forward, at and beyond its fore end the limit from
    aft, in between the side toward the nearer end (the same where the section is continuous)."""
    prep = b.prep
    if float(x) - b.lo[0] < b.hi[0] - float(x):  # keep the body on the 'below' side of the plane
        cl = kernel.clip(prep, np.array([-1.0, 0.0, 0.0]), -(float(x) - prep.origin[0]))
    else:
        cl = kernel.clip(prep, np.array([1.0, 0.0, 0.0]), float(x) - prep.origin[0])
    return cl.seg + prep.origin


def section_segments(hull: Any, x: float, *, body: int | None = None) -> np.ndarray:
    """Outline segments (k, 2, 3) [m], hull frame, of the transverse section at x: of the whole
    hull (default, all bodies) or of body number ``body`` (see :func:`body_faces`). End
    sections are taken from inside the body (see :func:`half_breadths`)."""
    return _segments(_bodies(hull, body, split=body is not None)[0], x)


def _intervals(seg: np.ndarray, z: float) -> np.ndarray:
    """Intervals (k, 2) [m] in y covered by a closed section outline at height z.

    The outline's crossings of the line at z are taken just above it (segments with
    z_low <= z < z_high), or just below it where nothing lies above (the top of the
    section); sorted, they pair into inside intervals. Touching intervals are merged.
    """
    za, zb = seg[:, 0, 2], seg[:, 1, 2]
    lo, hi = np.minimum(za, zb), np.maximum(za, zb)
    m = (lo <= z) & (z < hi)
    if not m.any():
        m = (lo < z) & (z <= hi)
    if not m.any():
        return np.zeros((0, 2))
    t = (z - za[m]) / (zb[m] - za[m])
    y = np.sort(seg[m, 0, 1] + t * (seg[m, 1, 1] - seg[m, 0, 1]))
    if len(y) % 2:
        raise InputError(f"the section outline is not closed at z = {z:g} m (an open mesh?)")
    merged: list[list[float]] = []
    for a, c in y.reshape(-1, 2):
        if merged and a <= merged[-1][1]:
            merged[-1][1] = max(merged[-1][1], c)
        else:
            merged.append([a, c])
    return np.array(merged, float)


#: default bound of the asymmetry measure (see :func:`half_breadths`)
ASYMMETRY = 1e-4


def _widths(b: _Body, x: float, zs: np.ndarray, what: str) -> tuple[np.ndarray, np.ndarray]:
    """Half-widths (W,) [m] of body b's section at x on waterlines zs and the offsets (W,) [m] of
    the sections' middles from the body's centreline (0 where there is no section)."""
    seg = _segments(b, x)
    hw, mid = np.zeros(len(zs)), np.zeros(len(zs))
    if len(seg) == 0:
        return hw, mid
    for j, z in enumerate(zs):
        try:
            iv = _intervals(seg, float(z))
        except InputError as e:
            raise InputError(f"{what}: station x = {x:g} m: {e}") from None
        if len(iv) == 0:
            continue
        if len(iv) > 1:
            raise InputError(
                f"{what}: the section at x = {x:g} m, z = {z:g} m is in {len(iv)} separate parts (y "
                + ", ".join(f"{a:.4g}..{c:.4g}" for a, c in iv[:4])
                + " m): a half-breadth would fill the gap between them; take the sections per body (a tunnel "
                  "between hulls joined by a deck cannot be tabulated as offsets)")
        a, c = iv[0]
        hw[j], mid[j] = 0.5 * (c - a), 0.5 * (a + c) - b.centreline
    return hw, mid


def _check_symmetry(b: _Body, xs: np.ndarray, zs: np.ndarray, hw: np.ndarray, mid: np.ndarray,
                    asymmetry: float, what: str) -> None:
    """Refuse a table whose sections' middles stray from the centreline: the measure is
    Σ w δ² / Σ w³/12 over the cells (w the width, δ the offset of its middle)."""
    w = 2.0 * hw
    own = float(np.sum(w ** 3)) / 12.0
    miss = w * mid * mid
    if own <= 0.0 or float(miss.sum()) <= asymmetry * own:
        return
    i, j = np.unravel_index(int(np.argmax(miss)), miss.shape)
    y0 = b.centreline + mid[i, j] - hw[i, j]
    raise InputError(
        f"{what} is not symmetric about its own centreline y = {b.centreline:.6g} m: at x = {xs[i]:g} m, "
        f"z = {zs[j]:g} m its section spans y {y0:.6g}..{y0 + w[i, j]:.6g} m (asymmetry measure "
        f"{float(miss.sum()) / own:.3g} > {asymmetry:g}); a half-breadth table assumes a symmetric body "
        f"(an asymmetric float would need port and starboard tables)")


def half_breadths(hull: Any, x: float, zs: Sequence[float], *, body: int | None = None,
                  asymmetry: float = ASYMMETRY) -> np.ndarray:
    """Half-breadths (W,) [m] of the section at x on waterlines zs, measured from the centreline
    of the whole hull (default) or of body number ``body``; 0 where the section has no breadth.

    The half-breadth is half the width of the section at that height, so sectional areas
    and their moments in x and z are those of the real section. It is refused (InputError)
    where the section at a height is in several parts (a tunnel between demihulls, a
    hollow): a half-breadth would fill the gap. The table assumes a body symmetric about
    its own centreline y = middle of the body's extent; where a section's middle is off
    it by δ, a strip of width w misses w δ² of the transverse second moment. The sections
    are refused when Σ w δ² exceeds ``asymmetry`` (default 1e-4) times their own Σ w³/12,
    summed over the table's cells: an asymmetric proa float is refused (port and starboard
    would need tables of their own, which the format does not carry), while a symmetric
    surface triangulated differently on its two sides (sections slightly off the middle
    between mesh stations, part of the mesh's own discretisation) passes. Heights exactly
    on a horizontal edge of the outline take the breadth just above it (just below at the
    top of the section).
    """
    b = _bodies(hull, body, split=body is not None)[0]
    what = f"{hull.name}" + ("" if b.index is None else f", body {b.index}")
    zs = np.asarray(zs, float)
    hw, mid = _widths(b, float(x), zs, what)
    _check_symmetry(b, np.array([float(x)]), zs, hw[None, :], mid[None, :], asymmetry, what)
    return hw


def offsets_from_mesh(hull: Any, stations: int | Sequence[float], waterlines: int | Sequence[float], *,
                      body: int | None = None, asymmetry: float = ASYMMETRY) -> Offsets | MultiOffsets:
    """Half-breadth tables of a mesh, one per body, each about the body's own centreline.

    An integer ``stations`` gives that many equally spaced intervals over each body's own
    length (its ends included); an integer ``waterlines`` gives intervals from the lowest
    to the highest point of the whole hull, the same for every body. Arrays are used as
    given for every body. A hull of one body (or ``body`` given) gives an :class:`Offsets`;
    several bodies give a :class:`MultiOffsets`. Sections in several parts or bodies not
    symmetric about their centreline (``asymmetry``) are refused (see :func:`half_breadths`).
    """
    lo, hi = hull.bounds
    zs = np.linspace(lo[2], hi[2], int(waterlines) + 1) if np.isscalar(waterlines) else np.asarray(waterlines, float)
    tables = []
    for b in _bodies(hull, body):
        xs = np.linspace(b.lo[0], b.hi[0], int(stations) + 1) if np.isscalar(stations) \
            else np.asarray(stations, float)
        what = f"{hull.name}" + ("" if b.index is None else f", body {b.index}")
        cells = [_widths(b, float(x), zs, what) for x in xs]
        hb, mid = np.array([c[0] for c in cells]), np.array([c[1] for c in cells])
        _check_symmetry(b, xs, zs, hb, mid, asymmetry, what)
        tables.append(Offsets(xs, zs, hb, source=str(hull.name), centreline=b.centreline, body=b.index))
    return tables[0] if len(tables) == 1 else MultiOffsets(tuple(tables), str(hull.name))


def _station_area(b: _Body, x: float, p: np.ndarray, n: np.ndarray) -> tuple[float, float]:
    """Immersed area [m²] and z moment [m³] of body b's section at x, by the station rule: at (or
    beyond) the body's aft end the section just forward of it, at its fore end the section just
    aft of it, in between the mean of both sides (equal wherever the section is continuous)."""
    x = float(x)
    pm, nm = p * np.array([-1.0, 1.0, 1.0]), n * np.array([-1.0, 1.0, 1.0])
    if x <= b.lo[0]:  # from forward = from the left in the mirror
        return kernel.section_area(b.mirror, -x, pm, nm)
    left = kernel.section_area(b.prep, x, p, n)
    if x >= b.hi[0]:
        return left
    right = kernel.section_area(b.mirror, -x, pm, nm)
    return 0.5 * (left[0] + right[0]), 0.5 * (left[1] + right[1])


def _areas(hull: Any, xs: np.ndarray, plane: tuple[np.ndarray, np.ndarray], bodies: list[_Body]) -> np.ndarray:
    p, n = (np.asarray(a, float) for a in plane)
    return np.array([[sum(_station_area(b, x, p, n)[k] for b in bodies) for k in (0, 1)] for x in xs])


def sectional_areas(hull: Any, xs: Sequence[float], draft: float, heel: float = 0.0, trim: float = 0.0) -> np.ndarray:
    """Exact immersed areas (S,) [m²] of the mesh's transverse sections at draft (hull frame),
    summed over the bodies, each end section taken from inside its body (see :func:`bonjean`)."""
    xs = np.asarray(xs, float)
    return _areas(hull, xs, hull.plane(draft, heel, trim), _bodies(hull))[:, 0]


@dataclass(frozen=True, eq=False)
class Bonjean:
    """Bonjean data: per station, immersed area and its moment about the baseline against draft."""

    stations: np.ndarray  # (S,)
    drafts: np.ndarray  # (D,)
    area: np.ndarray  # (S, D) [m²]
    moment: np.ndarray  # (S, D) [m³] about z = 0

    def rows(self) -> list[dict[str, float]]:
        return [{"station_x": float(x), "draft": float(t), "area": float(self.area[i, j]),
                 "vertical_moment": float(self.moment[i, j])}
                for i, x in enumerate(self.stations) for j, t in enumerate(self.drafts)]


def bonjean(hull: Any, xs: Sequence[float], drafts: Sequence[float]) -> Bonjean:
    """Exact Bonjean data of the mesh (upright), summed over its bodies.

    A station at (or beyond) a body's aft end takes that body's section just forward of
    the end, one at its fore end the section just aft of it, so a transom counts at both
    ends alike; interior stations take the mean of the two sides (equal wherever the
    section is continuous).
    """
    xs = np.asarray(xs, float)
    ds = np.asarray(drafts, float)
    bodies = _bodies(hull)
    out = np.stack([_areas(hull, xs, hull.plane(float(t)), bodies) for t in ds], axis=1)  # (S, D, 2)
    return Bonjean(xs, ds, out[:, :, 0], out[:, :, 1])


# ----------------------------------------------------------------------------- section-based hydrostatics


SECTION_FIELDS = ("draft", "volume", "displacement", "lcb", "vcb", "awp", "lcf", "bmt", "bml", "tpc")


@dataclass(frozen=True, eq=False)
class SectionHydrostatics:
    """Section-based (Simpson or trapezoidal) hydrostatics at each tabulated waterline above the lowest.

    ``rows`` are the totals over all bodies (each with ``tcb`` too); ``body_rows`` the
    same per body (with a ``body`` key) when the table holds several bodies.
    """

    rule: str
    rows: list[dict[str, float]]
    notes: tuple[str, ...] = field(default_factory=tuple)
    body_rows: list[dict[str, float]] = field(default_factory=list)


def _sums(off: Offsets, rule: str, drafts: Sequence[float], notes: set[str]) -> dict[float, np.ndarray]:
    """Per draft (a tabulated waterline of ``off``): integrals of one body by the rule,
    [V, ∫xA, ∫M, Awp, ∫2xy, I_T about its centreline, ∫2x²y] (m³, m⁴, m⁴, m², m³, m⁴, m⁴)."""
    xs, zs, y = off.stations, off.waterlines, off.half_breadth
    area, vnotes = cumulative(2.0 * y, zs, rule)
    mom, _ = cumulative(2.0 * y * zs[None, :], zs, rule)
    out = {}
    for t in drafts:
        j = int(np.flatnonzero(zs == t)[0])
        if j >= 1:
            notes.add(f"vertical (up to {zs[j]:g} m): {vnotes[j]}")
        v, nl = integrate(area[:, j], xs, rule)
        notes.add(f"longitudinal: {nl}")
        yw = y[:, j]
        vals = [v, integrate(xs * area[:, j], xs, rule)[0], integrate(mom[:, j], xs, rule)[0],
                integrate(2.0 * yw, xs, rule)[0], integrate(2.0 * xs * yw, xs, rule)[0],
                integrate(2.0 / 3.0 * yw ** 3, xs, rule)[0], integrate(2.0 * xs * xs * yw, xs, rule)[0]]
        out[float(t)] = np.array(vals, float)
    return out


def _row(draft: float, parts: list[tuple[np.ndarray, float]], density: float) -> dict[str, float] | None:
    """Hydrostatics from the integrals of bodies with centrelines yc: I_T about the common
    waterplane's centroid by the parallel-axis rule."""
    s = sum(p for p, _ in parts)
    v, mx, mz, awp, ax, _, ixx = s
    if v <= 0:
        return None
    my = sum(p[0] * yc for p, yc in parts)
    ay = sum(p[3] * yc for p, yc in parts)
    lcf = ax / awp if awp > 0 else 0.0
    tcf = ay / awp if awp > 0 else 0.0
    it = sum(p[5] + p[3] * yc * yc for p, yc in parts) - awp * tcf * tcf
    il = ixx - awp * lcf * lcf
    return {"draft": float(draft), "volume": float(v), "displacement": float(density * v), "lcb": float(mx / v),
            "tcb": float(my / v), "vcb": float(mz / v), "awp": float(awp), "lcf": float(lcf), "bmt": float(it / v),
            "bml": float(il / v), "tpc": float(awp * density / 100.0)}


def section_hydrostatics(off: Offsets | MultiOffsets, *, rule: str = "simpson", density: float = 1.025,
                         upto: Sequence[float] | None = None) -> SectionHydrostatics:
    """Hydrostatics from an offsets table by the chosen rule, at each waterline above the lowest.

    Per station the immersed area 2∫y dz and moment 2∫y z dz come from the rule over
    the waterlines up to the draft (from the lowest tabulated waterline); along the
    length V = ∫A dx, LCB = ∫xA dx / V, KB = ∫M dx / V; the waterplane at the draft gives
    Awp = 2∫y dx, LCF, I_T = (2/3)∫y³ dx and I_L = 2∫x²y dx - Awp LCF². With several
    bodies each is integrated on its own table about its own centreline, and the totals
    add them, the transverse inertia about the common centre of flotation (parallel
    axes). Totals are given at the waterlines every body's table has; ``upto`` picks the
    nearest of them to each value.
    """
    tables = list(off.tables) if isinstance(off, MultiOffsets) else [off]
    common = sorted(set.intersection(*(set(t.waterlines.tolist()) for t in tables)))
    if not common:
        raise InputError(f"{off.source}: the bodies' tables share no waterline, so no totals can be formed")
    lowest = max(float(t.waterlines[0]) for t in tables)
    cz = np.array([z for z in common if z > lowest] if upto is None else
                  sorted({common[int(np.argmin(np.abs(np.array(common) - u)))] for u in upto}))
    notes: set[str] = set()
    sums = [_sums(t, rule, cz, notes) for t in tables]
    rows, body_rows = [], []
    for z in cz:
        parts = [(s[float(z)], t.centreline) for s, t in zip(sums, tables, strict=True)]
        r = _row(float(z), parts, density)
        if r is not None:
            rows.append(r)
        if len(tables) > 1:
            for t, part in zip(tables, parts, strict=True):
                rb = _row(float(z), [part], density)
                if rb is not None:
                    body_rows.append({"body": t.body, **rb})
    return SectionHydrostatics(rule, rows, tuple(sorted(notes)), body_rows)


# ----------------------------------------------------------------------------- comparison


COMPARE_KEYS = ("volume", "lcb", "vcb", "awp", "lcf", "bmt", "bml")


def compare_rows(exact: Sequence[dict[str, float]], approx: Sequence[dict[str, float]],
                 keys: Sequence[str] = COMPARE_KEYS, scale: float = 1.0) -> list[dict[str, Any]]:
    """Rows of (draft, quantity, exact, estimate, difference, percent).

    Positions (lcb, lcf) are compared as a percentage of ``scale`` (the hull length),
    other quantities relative to the exact value.
    """
    out = []
    for e, a in zip(exact, approx, strict=False):
        for k in keys:
            ev, av = float(e[k]), float(a[k])
            ref = scale if k in ("lcb", "lcf") else abs(ev)
            out.append({"draft": float(e["draft"]), "quantity": k, "exact": ev, "estimate": av,
                        "difference": av - ev, "percent": 100.0 * (av - ev) / ref if ref > 0 else 0.0})
    return out


def convergence(hull: Any, draft: float, counts: Sequence[int] = (4, 8, 16, 32, 64), *, waterlines: int = 16,
                rules: Sequence[str] = RULES, density: float = 1.025) -> list[dict[str, Any]]:
    """Section-based estimates at ``draft`` against the exact result as the number of stations grows.

    Waterlines run from the lowest point of the hull to the draft in ``waterlines``
    intervals, so the vertical integration ends on the draft.
    """
    ex = hull.hydrostatics(draft, density=density).to_dict()
    zs = np.linspace(hull.bounds[0][2], draft, waterlines + 1)
    out = []
    for n in counts:
        off = offsets_from_mesh(hull, int(n), zs)
        for rule in rules:
            sh = section_hydrostatics(off, rule=rule, density=density, upto=[draft])
            row = sh.rows[-1]
            r: dict[str, Any] = {"stations": int(n), "rule": rule}
            for k in COMPARE_KEYS:
                ref = hull.length if k in ("lcb", "lcf") else abs(ex[k])
                r[f"{k}_error_percent"] = 100.0 * (row[k] - ex[k]) / ref if ref > 0 else 0.0
            out.append(r)
    return out

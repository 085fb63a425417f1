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

Offsets CSV (our own long format): a header with ``station_x, waterline_z,
half_breadth`` [m] and optionally ``kind``; one row per point. ``kind`` is ``offset``
(default), ``keel`` (the keel height at that station in waterline_z, with the
half-breadth of a flat bottom there) or ``sheer`` (the deck-edge height and its
half-breadth). A symmetric hull is assumed; every station must have a half-breadth on
every waterline.
"""
from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from . import kernel
from .errors import InputError
from .loft import loft

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


# ----------------------------------------------------------------------------- offsets


@dataclass(frozen=True, eq=False)
class Offsets:
    """A half-breadth table (symmetric hull), hull frame, metres.

    Attributes
    ----------
    stations : (S,) float64, increasing
    waterlines : (W,) float64, increasing
    half_breadth : (S, W) float64
    keel : (S,) float64 or None
        Keel height per station (``kind = keel`` rows).
    keel_half : (S,) float64 or None
    sheer : (S,) float64 or None
        Deck-edge height per station (``kind = sheer`` rows).
    sheer_half : (S,) float64 or None
    source : str
    """

    stations: np.ndarray
    waterlines: np.ndarray
    half_breadth: np.ndarray
    keel: np.ndarray | None = None
    keel_half: np.ndarray | None = None
    sheer: np.ndarray | None = None
    sheer_half: np.ndarray | None = None
    source: str = ""

    def to_csv(self) -> str:
        """The table in the long CSV format."""
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(["station_x", "waterline_z", "half_breadth", "kind"])
        for i, x in enumerate(self.stations):
            if self.keel is not None:
                w.writerow([repr(float(x)), repr(float(self.keel[i])), repr(float(self.keel_half[i])), "keel"])
            for j, z in enumerate(self.waterlines):
                w.writerow([repr(float(x)), repr(float(z)), repr(float(self.half_breadth[i, j])), "offset"])
            if self.sheer is not None:
                w.writerow([repr(float(x)), repr(float(self.sheer[i])), repr(float(self.sheer_half[i])), "sheer"])
        return buf.getvalue()


def read_offsets(path: str) -> Offsets:
    """Read and validate an offsets CSV; every error names the row (file line) and column."""
    try:
        with open(path, newline="") as fh:
            text = fh.read()
    except FileNotFoundError:
        raise InputError(f"{path}: no such file") from None
    except UnicodeDecodeError:
        raise InputError(f"{path}: not a text CSV file") from None
    return parse_offsets(text, source=path)


def parse_offsets(text: str, *, source: str = "<offsets>") -> Offsets:
    rows = list(csv.reader(io.StringIO(text)))
    rows = [(k + 1, r) for k, r in enumerate(rows) if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#")]
    if not rows:
        raise InputError(f"{source}: the offsets table is empty")
    line0, head = rows[0]
    head = [h.strip().lower() for h in head]
    need = ["station_x", "waterline_z", "half_breadth"]
    for col in need:
        if col not in head:
            raise InputError(f"{source}: row {line0}: the header lacks column {col!r} (needs {', '.join(need)})")
    ix = {c: head.index(c) for c in need}
    ik = head.index("kind") if "kind" in head else None
    pts: dict[tuple[float, float], tuple[float, int]] = {}
    keel: dict[float, tuple[float, float]] = {}
    sheer: dict[float, tuple[float, float]] = {}
    for line, r in rows[1:]:
        vals = {}
        for col in need:
            k = ix[col]
            cell = r[k].strip() if k < len(r) else ""
            if cell == "":
                raise InputError(f"{source}: row {line}, column {col}: missing value")
            try:
                v = float(cell)
            except ValueError:
                raise InputError(f"{source}: row {line}, column {col}: {cell!r} is not a number") from None
            if not math.isfinite(v):
                raise InputError(f"{source}: row {line}, column {col}: {cell!r} is not finite")
            vals[col] = v
        if vals["half_breadth"] < 0:
            raise InputError(f"{source}: row {line}, column half_breadth: negative half-breadth {vals['half_breadth']}")
        kind = (r[ik].strip().lower() if ik is not None and ik < len(r) else "") or "offset"
        key = (vals["station_x"], vals["waterline_z"])
        if kind == "offset":
            if key in pts:
                raise InputError(f"{source}: row {line}, columns station_x/waterline_z: station {key[0]} waterline "
                                 f"{key[1]} given twice (first at row {pts[key][1]})")
            pts[key] = (vals["half_breadth"], line)
        elif kind in ("keel", "sheer"):
            d = keel if kind == "keel" else sheer
            if vals["station_x"] in d:
                raise InputError(f"{source}: row {line}, column kind: a second {kind} row for station {vals['station_x']}")
            d[vals["station_x"]] = (vals["waterline_z"], vals["half_breadth"])
        else:
            raise InputError(f"{source}: row {line}, column kind: {kind!r} is not offset, keel or sheer")
    if not pts:
        raise InputError(f"{source}: no offset rows")
    xs = np.array(sorted({k[0] for k in pts}))
    zs = np.array(sorted({k[1] for k in pts}))
    if len(xs) < 2 or len(zs) < 2:
        raise InputError(f"{source}: needs at least two stations and two waterlines")
    hb = np.full((len(xs), len(zs)), np.nan)
    xi = {x: i for i, x in enumerate(xs)}
    zi = {z: j for j, z in enumerate(zs)}
    for (x, z), (v, _) in pts.items():
        hb[xi[x], zi[z]] = v
    if np.isnan(hb).any():
        i, j = (int(a[0]) for a in np.nonzero(np.isnan(hb)))
        raise InputError(f"{source}: missing cell: station_x {xs[i]} has no half_breadth on waterline_z {zs[j]} "
                         f"(stations and waterlines must form a grid)")

    def per_station(d: dict, what: str):
        if not d:
            return None, None
        missing = [x for x in xs if x not in d]
        if missing:
            raise InputError(f"{source}: {what} rows given for some stations but not for station_x {missing[0]}")
        extra = [x for x in d if x not in xi]
        if extra:
            raise InputError(f"{source}: a {what} row names station_x {extra[0]}, which has no offsets")
        return np.array([d[x][0] for x in xs]), np.array([d[x][1] for x in xs])

    k, kh = per_station(keel, "keel")
    s, sh = per_station(sheer, "sheer")
    return Offsets(xs, zs, hb, k, kh, s, sh, source)


# ----------------------------------------------------------------------------- from a mesh


def section_segments(hull: Any, x: float) -> np.ndarray:
    """Outline segments (k, 2, 3) [m] of the transverse section at hull-frame x."""
    prep = hull.prepared
    lo, hi = hull.bounds[0][0], hull.bounds[1][0]
    # keep the hull on the 'below' side of the cutting plane, so end sections are found too
    if float(x) - lo < hi - float(x):
        cl = kernel.clip(prep, np.array([-1.0, 0.0, 0.0]), -(float(x) - prep.origin[0]))
    else:
        cl = kernel.clip(prep, np.array([1.0, 0.0, 0.0]), float(x) - prep.origin[0])
    return cl.seg + prep.origin


def half_breadths(hull: Any, x: float, zs: Sequence[float]) -> np.ndarray:
    """Port half-breadths (W,) [m] of the section at x on waterlines zs: the largest y of
    the outline at each height (0 where the section has no breadth there)."""
    seg = section_segments(hull, x)
    out = np.zeros(len(zs))
    if len(seg) == 0:
        return out
    za, zb = seg[:, 0, 2], seg[:, 1, 2]
    ya, yb = seg[:, 0, 1], seg[:, 1, 1]
    for j, z in enumerate(zs):
        lo, hi = np.minimum(za, zb), np.maximum(za, zb)
        m = (lo <= z) & (hi >= z)
        if not m.any():
            continue
        dz = zb[m] - za[m]
        with np.errstate(divide="ignore", invalid="ignore"):
            t = np.where(np.abs(dz) > 0, (z - za[m]) / dz, 0.0)
        y = np.where(np.abs(dz) > 0, ya[m] + t * (yb[m] - ya[m]), np.maximum(ya[m], yb[m]))
        out[j] = max(0.0, float(y.max()))
    return out


def offsets_from_mesh(hull: Any, stations: int | Sequence[float], waterlines: int | Sequence[float]) -> Offsets:
    """Half-breadth table of a mesh. Integer counts give equally spaced stations over the
    length (ends included) and waterlines from the lowest to the highest point."""
    lo, hi = hull.bounds
    xs = np.linspace(lo[0], hi[0], int(stations) + 1) if np.isscalar(stations) else np.asarray(stations, float)
    zs = np.linspace(lo[2], hi[2], int(waterlines) + 1) if np.isscalar(waterlines) else np.asarray(waterlines, float)
    hb = np.array([half_breadths(hull, x, zs) for x in xs])
    return Offsets(xs, zs, hb, source=str(hull.name))


def sectional_areas(hull: Any, xs: Sequence[float], draft: float, heel: float = 0.0, trim: float = 0.0) -> np.ndarray:
    """Exact immersed areas (S,) [m²] of the mesh's transverse sections at draft (hull frame)."""
    p, n = hull.plane(draft, heel, trim)
    return np.array([kernel.section_area(hull.prepared, float(x), p, n)[0] for x in xs])


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
    """Exact Bonjean data of the mesh (upright)."""
    xs = np.asarray(xs, float)
    ds = np.asarray(drafts, float)
    a = np.zeros((len(xs), len(ds)))
    m = np.zeros_like(a)
    for j, t in enumerate(ds):
        p, n = hull.plane(t)
        for i, x in enumerate(xs):
            a[i, j], m[i, j] = kernel.section_area(hull.prepared, float(x), p, n)
    return Bonjean(xs, ds, a, m)


# ----------------------------------------------------------------------------- section-based hydrostatics


SECTION_FIELDS = ("draft", "volume", "displacement", "lcb", "vcb", "awp", "lcf", "bmt", "bml", "tpc")


@dataclass(frozen=True, eq=False)
class SectionHydrostatics:
    """Section-based (Simpson or trapezoidal) hydrostatics at each tabulated waterline above the lowest."""

    rule: str
    rows: list[dict[str, float]]
    notes: tuple[str, ...] = field(default_factory=tuple)


def section_hydrostatics(off: Offsets, *, rule: str = "simpson", density: float = 1.025,
                         upto: Sequence[float] | None = None) -> SectionHydrostatics:
    """Hydrostatics from an offsets table by the chosen rule, at each waterline above the lowest.

    Per station the immersed area 2∫y dz and moment 2∫y z dz come from the rule over
    the waterlines up to the draft (from the lowest tabulated waterline); along the
    length V = ∫A dx, LCB = ∫xA dx / V, KB = ∫M dx / V; the waterplane at the draft gives
    Awp = 2∫y dx, LCF, I_T = (2/3)∫y³ dx and I_L = 2∫x²y dx - Awp LCF².
    """
    xs, zs, y = off.stations, off.waterlines, off.half_breadth
    notes: set[str] = set()
    area, vnotes = cumulative(2.0 * y, zs, rule)
    mom, _ = cumulative(2.0 * y * zs[None, :], zs, rule)
    rows = []
    js = range(1, len(zs)) if upto is None else [int(np.argmin(np.abs(zs - t))) for t in upto]
    for j in js:
        if j < 1:
            continue
        notes.add(f"vertical (up to {zs[j]:g} m): {vnotes[j]}")
        v, nl = integrate(area[:, j], xs, rule)
        notes.add(f"longitudinal: {nl}")
        if v <= 0:
            continue
        mx, _ = integrate(xs * area[:, j], xs, rule)
        mz, _ = integrate(mom[:, j], xs, rule)
        yw = y[:, j]
        awp, _ = integrate(2.0 * yw, xs, rule)
        ax, _ = integrate(2.0 * xs * yw, xs, rule)
        it, _ = integrate(2.0 / 3.0 * yw ** 3, xs, rule)
        ixx, _ = integrate(2.0 * xs * xs * yw, xs, rule)
        lcf = ax / awp if awp > 0 else 0.0
        il = ixx - awp * lcf * lcf
        rows.append({"draft": float(zs[j]), "volume": float(v), "displacement": float(density * v),
                     "lcb": float(mx / v), "vcb": float(mz / v), "awp": float(awp), "lcf": float(lcf),
                     "bmt": float(it / v), "bml": float(il / v), "tpc": float(awp * density / 100.0)})
    return SectionHydrostatics(rule, rows, tuple(sorted(notes)))


# ----------------------------------------------------------------------------- lofting


def loft_offsets(off: Offsets) -> tuple[np.ndarray, np.ndarray]:
    """A closed, watertight triangle mesh through the offsets (vertices [m], faces).

    Each station's half-section runs from the keel (the keel row, else the lowest
    waterline) up through the tabulated half-breadths to the sheer (the sheer row,
    else the highest waterline) and across a flat deck to the centreline. Points below
    the keel or above the sheer collapse onto them, so every station has the same
    number of points; coincident points are welded.
    """
    xs, zs = off.stations, off.waterlines
    halves = []
    for i in range(len(xs)):
        zk = off.keel[i] if off.keel is not None else zs[0]
        yk = off.keel_half[i] if off.keel is not None else 0.0
        zt = off.sheer[i] if off.sheer is not None else zs[-1]
        yt = off.sheer_half[i] if off.sheer is not None else off.half_breadth[i, -1]
        pts = [(0.0, zk), (yk, zk)]
        for j, z in enumerate(zs):
            zc = min(max(z, zk), zt)
            yv = off.half_breadth[i, j] if zk <= z <= zt else (yk if z < zk else yt)
            pts.append((yv, zc))
        pts += [(yt, zt), (0.0, zt)]
        halves.append(pts)
    return loft(xs, np.array(halves, float))


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

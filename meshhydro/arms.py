"""Heeling arms as data, and the intercepts and areas between an arm and a GZ curve.

A heeling arm h(φ) [m] (wind, crowding of passengers, turning, towing, lifting) is one of

* ``constant``: h = a;
* ``cosine``:   h = a·cosⁿφ (n ≥ 0);
* ``table``:    h from (angle [deg], arm [m]) pairs, linear between keys; asking outside the
  table's angles is an error (no extrapolation).

The GZ side is plain data: angles [deg] and GZ [m] sampled on a curve (for example
``RightingCurve.heel`` and ``.gz``), interpolated by the same not-a-knot cubic spline the
righting curve uses, so areas agree with ``RightingCurve.area``. Angles are degrees,
positive heel = starboard down, the arm heels the vessel towards positive angles; areas are
in m·rad.

Nothing here prints or draws; :func:`arm_analysis` returns the arrays a GZ plot needs to
draw the arm and shade the areas.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from .errors import InputError, finite_number

ARM_KINDS = ("constant", "cosine", "table")
#: Samples per knot interval when looking for sign changes of GZ − arm (roots are then
#: found by Brent's method to 1e-12°).
_SUB = 16
_DEG = math.pi / 180.0


# --------------------------------------------------------------------------- GZ as data
class GZCurve:
    """GZ [m] against heel [deg] from samples, as a not-a-knot cubic spline.

    Parameters
    ----------
    heels : (n,) [deg], strictly increasing after sorting, n ≥ 2
    gz : (n,) [m]
    mirror : bool
        Extend to negative angles by GZ(−φ) = −GZ(φ). Only right for a hull and load
        symmetric about the centreplane; the caller decides (nothing is assumed).
    """

    def __init__(self, heels: Sequence[float], gz: Sequence[float], *, mirror: bool = False) -> None:
        h = np.asarray(heels, dtype=float).reshape(-1)
        g = np.asarray(gz, dtype=float).reshape(-1)
        if h.shape != g.shape or len(h) < 2:
            raise InputError(f"GZ curve: heels and gz must be equal-length arrays of at least 2, got {h.shape} and {g.shape}")
        if not (np.all(np.isfinite(h)) and np.all(np.isfinite(g))):
            raise InputError("GZ curve: heels and gz must be finite")
        o = np.argsort(h)
        h, g = h[o], g[o]
        if np.any(np.diff(h) <= 0):
            raise InputError("GZ curve: heels must be distinct")
        if mirror:
            if h[0] < -1e-12:
                raise InputError("GZ curve: mirror needs a curve on non-negative angles only")
            keep = h > 1e-12
            h = np.concatenate([-h[keep][::-1], h])
            g = np.concatenate([-g[keep][::-1], g])
        self.heels, self.gz = h, g
        from scipy.interpolate import CubicSpline, make_interp_spline

        if len(h) >= 4:
            self._sp = CubicSpline(h, g, bc_type="not-a-knot")
        else:
            self._sp = make_interp_spline(h, g, k=len(h) - 1)

    @property
    def lo(self) -> float:
        return float(self.heels[0])

    @property
    def hi(self) -> float:
        return float(self.heels[-1])

    def check(self, a: float, b: float, what: str = "angles") -> None:
        if min(a, b) < self.lo - 1e-9 or max(a, b) > self.hi + 1e-9:
            raise InputError(f"{what} {a:g}..{b:g}° lie outside the GZ curve {self.lo:g}..{self.hi:g}°")

    def __call__(self, deg: Any) -> np.ndarray:
        return np.asarray(self._sp(deg), dtype=float)

    def integral(self, a: float, b: float) -> float:
        """∫ GZ dφ from a to b [m·rad] (exact integral of the spline)."""
        self.check(a, b)
        return float(self._sp.integrate(a, b)) * _DEG


# --------------------------------------------------------------------------- arms
@dataclass(frozen=True)
class HeelingArm:
    """One heeling arm (see the module docstring). ``table`` is (k, 2): angle [deg], arm [m]."""

    name: str
    kind: str
    a: float = 0.0
    n: float = 0.0
    table: np.ndarray = field(default_factory=lambda: np.zeros((0, 2)))

    def __call__(self, deg: Any) -> np.ndarray:
        """Arm [m] at angles ``deg`` (any shape)."""
        x = np.asarray(deg, dtype=float)
        if self.kind == "constant":
            return np.full(x.shape, self.a)
        if self.kind == "cosine":
            c = np.cos(np.radians(x))
            if np.any(c < -1e-12) and self.n != int(self.n):
                raise InputError(f"arm {self.name!r}: cos^{self.n:g} is undefined beyond 90°")
            if self.n == int(self.n):
                return self.a * c ** int(self.n)
            return self.a * np.clip(c, 0.0, None) ** self.n
        t = self.table
        if x.size and (x.min() < t[0, 0] - 1e-9 or x.max() > t[-1, 0] + 1e-9):
            raise InputError(f"arm {self.name!r}: its table covers {t[0, 0]:g}..{t[-1, 0]:g}°, "
                             f"asked for {x.min():g}..{x.max():g}°")
        return np.interp(x, t[:, 0], t[:, 1])

    @property
    def max_angle(self) -> float:
        """Largest angle [deg] at which the arm is defined (table end; 90° for cosⁿ with a
        fractional n; otherwise unbounded)."""
        if self.kind == "table":
            return float(self.table[-1, 0])
        if self.kind == "cosine" and self.n != int(self.n):
            return 90.0
        return math.inf

    @property
    def breakpoints(self) -> np.ndarray:
        """Angles [deg] where the arm is not smooth (table keys); empty otherwise."""
        return self.table[:, 0] if self.kind == "table" else np.zeros(0)

    def integral(self, a: float, b: float) -> float:
        """∫ h dφ from a to b [deg limits], in m·rad (closed forms; adaptive quadrature for
        a cosine arm with a non-integer or large exponent)."""
        if self.kind == "constant":
            return self.a * (b - a) * _DEG
        if self.kind == "table":
            self(np.array([a, b]))  # range check
            lo, hi, s = (a, b, 1.0) if a <= b else (b, a, -1.0)
            k = self.table[:, 0]
            xs = np.unique(np.concatenate([[lo, hi], k[(k > lo) & (k < hi)]]))
            ys = self(xs)
            return s * float(np.sum(0.5 * (ys[1:] + ys[:-1]) * np.diff(xs))) * _DEG
        ra, rb = a * _DEG, b * _DEG
        if self.n == 0:
            return self.a * (rb - ra)
        if self.n == 1:
            return self.a * (math.sin(rb) - math.sin(ra))
        if self.n == 2:
            return self.a * (0.5 * (rb - ra) + 0.25 * (math.sin(2 * rb) - math.sin(2 * ra)))
        from scipy.integrate import quad

        val, _ = quad(lambda d: float(self(d)), a, b, epsabs=1e-14, epsrel=1e-12, limit=200)
        return float(val) * _DEG


def make_arm(name: str, kind: str, *, a: float | None = None, n: float | None = None,
             table: Sequence[Sequence[float]] | None = None) -> HeelingArm:
    """Build and check an arm from case-file values (``[[arm]]`` name, kind, a, n, table).

    Raises InputError naming the arm and the key when a value is missing, unused or wrong.
    """
    where = f"arm {name!r}"
    if kind not in ARM_KINDS:
        raise InputError(f"{where}: kind must be one of {', '.join(ARM_KINDS)}, got {kind!r}")
    used = {"constant": {"a"}, "cosine": {"a", "n"}, "table": {"table"}}[kind]
    given = {k for k, v in (("a", a), ("n", n), ("table", table)) if v is not None}
    if given - used:
        raise InputError(f"{where}: key {sorted(given - used)[0]} is not used by kind {kind!r}")
    if used - given - ({"n"} if kind == "cosine" else set()):
        raise InputError(f"{where}: kind {kind!r} needs {sorted(used - given)[0]}")
    if kind == "table":
        try:
            t = np.asarray(table, dtype=float)
        except (TypeError, ValueError):
            raise InputError(f"{where}: table must be [[deg, m], ...] numbers") from None
        if t.ndim != 2 or t.shape[1] != 2 or len(t) < 2 or not np.all(np.isfinite(t)):
            raise InputError(f"{where}: table must hold at least two finite [deg, m] pairs")
        bad = np.nonzero(np.diff(t[:, 0]) <= 0)[0]
        if len(bad):
            raise InputError(f"{where}: table angles must increase (row {bad[0] + 2}, {t[bad[0] + 1, 0]:g}°)")
        return HeelingArm(name, kind, table=t)
    fa = finite_number(a, f"{where}: a")
    fn = 0.0 if n is None else finite_number(n, f"{where}: n")
    if fn < 0:
        raise InputError(f"{where}: n must not be negative, got {fn:g}")
    return HeelingArm(name, kind, a=fa, n=fn if kind == "cosine" else 0.0)


# --------------------------------------------------------------------------- intercepts
def crossings(gz: GZCurve, arm: HeelingArm, lo: float, hi: float) -> tuple[list[tuple[float, int]], int]:
    """Angles [deg] in [lo, hi] where f = GZ − arm changes sign, with +1 where f rises
    through zero (GZ overtakes the arm) and −1 where it falls, and the sign of f just
    after ``lo`` (0 if f vanishes on every sample). A zero touched without a sign change
    is not a crossing."""
    gz.check(lo, hi)
    knots = gz.heels[(gz.heels > lo) & (gz.heels < hi)]
    bp = arm.breakpoints[(arm.breakpoints > lo) & (arm.breakpoints < hi)]
    nodes = np.unique(np.concatenate([[lo, hi], knots, bp]))
    t = np.linspace(0.0, 1.0, _SUB + 1)[:-1]
    xs = np.concatenate([(nodes[:-1, None] + t[None, :] * np.diff(nodes)[:, None]).ravel(), [hi]])
    f = gz(xs) - arm(xs)
    nz = np.nonzero(f)[0]
    first = int(np.sign(f[nz[0]])) if len(nz) else 0
    return _sign_changes(lambda x: float(gz(x) - arm(x)), xs, f), first


def _sign_changes(fun: Any, xs: np.ndarray, f: np.ndarray) -> list[tuple[float, int]]:
    from scipy.optimize import brentq

    s = np.sign(f)
    nz = np.nonzero(s)[0]
    out: list[tuple[float, int]] = []
    for i, j in zip(nz[:-1], nz[1:], strict=False):
        if s[i] == s[j]:
            continue
        if j > i + 1:  # exact zeros between: the crossing is at the first of them
            out.append((float(xs[i + 1]), int(s[j])))
        else:
            out.append((float(brentq(fun, xs[i], xs[j], xtol=1e-12, rtol=1e-15, maxiter=200)), int(s[j])))
    return out


@dataclass(frozen=True)
class ArmAnalysis:
    """Intercepts and areas of one arm against one GZ curve (angles deg, areas m·rad).

    ``equilibrium``: first angle at or after ``start`` where GZ reaches the arm (None if it
    never does); ``second_intercept``: first angle after it where GZ falls below the arm;
    ``end``: the least of ``limit``, the downflooding angle and the second intercept (those
    given); ``residual_area``: ∫(GZ − h) from equilibrium to end; ``area_before``:
    ∫(h − GZ) from ``start`` to equilibrium; ``ratio`` = residual_area / area_before.
    ``shade`` holds drawing data: name → (angles (k,), gz (k,), arm (k,)).
    """

    name: str
    start: float
    equilibrium: float | None
    second_intercept: float | None
    end: float | None
    end_reason: str
    residual_area: float | None
    area_before: float | None
    ratio: float | None
    shade: dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]]

    def to_dict(self) -> dict[str, Any]:
        d = {k: getattr(self, k) for k in ("name", "start", "equilibrium", "second_intercept", "end",
                                           "end_reason", "residual_area", "area_before", "ratio")}
        d["shade"] = {k: {"angle": a.tolist(), "gz": g.tolist(), "arm": h.tolist()} for k, (a, g, h) in
                      self.shade.items()}
        return d


def arm_analysis(gz: GZCurve, arm: HeelingArm, *, start: float = 0.0, limit: float | None = None,
                 flooding: float | None = None, samples: int = 60) -> ArmAnalysis:
    """Intercepts, residual area and area ratio of ``arm`` on ``gz`` from ``start`` [deg].

    ``limit`` and ``flooding`` [deg] cap the residual area (as does the second intercept);
    ``samples`` sets the points per shaded polygon (drawing only, not the areas).
    """
    top = gz.hi
    top_reason = "end of the GZ curve"
    if arm.max_angle < top:
        top, top_reason = arm.max_angle, ("end of the arm's table" if arm.kind == "table"
                                          else "90° (cosⁿ with a fractional n ends there)")
    gz.check(start, top, f"arm {arm.name!r}:")
    f0 = float(gz(start) - arm(start))
    cr, first = crossings(gz, arm, start, top) if top > start else ([], int(np.sign(f0)))
    if f0 > 0 or (f0 == 0 and first >= 0):
        eq: float | None = start
    else:
        ups = [x for x, d in cr if d > 0]
        eq = ups[0] if ups else None
    if eq is None:
        return ArmAnalysis(arm.name, start, None, None, None, "GZ never reaches the arm", None, None, None, {})
    downs = [x for x, d in cr if d < 0 and x > eq]
    sec = downs[0] if downs else None
    cands = [] if limit is None else [(limit, "limit angle")]
    if flooding is not None:
        cands.append((flooding, "downflooding angle"))
    if sec is not None:
        cands.append((sec, "second intercept"))
    cands.append((top, top_reason))  # last: ties go to the named limits
    end, why = min(cands, key=lambda c: c[0])
    end = max(end, eq)
    resid = gz.integral(eq, end) - arm.integral(eq, end)
    before = arm.integral(start, eq) - gz.integral(start, eq)
    ratio = math.inf if before <= 0 and resid > 0 else (resid / before if before > 0 else None)
    shade = {"before": _band(gz, arm, start, eq, samples), "residual": _band(gz, arm, eq, end, samples)}
    return ArmAnalysis(arm.name, start, eq, sec, end, why, resid, before, ratio, shade)


def _band(gz: GZCurve, arm: HeelingArm, a: float, b: float, k: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    x = np.linspace(a, b, max(k, 2))
    return x, gz(x), arm(x)


# --------------------------------------------------------------------------- criteria on arms
ARM_CRITERIA = {"equilibrium_angle": "deg", "residual_area": "m·rad", "area_ratio": "-"}


@dataclass(frozen=True)
class ArmCriterion:
    """A limit on an arm: ``kind`` in :data:`ARM_CRITERIA`, with ``minimum`` and/or ``maximum``.

    ``start`` [deg] is where the area before the equilibrium starts (area_ratio);
    ``limit`` [deg] caps the residual area, as do the downflooding angle when
    ``to_flooding`` and the second intercept (always).
    """

    id: str
    kind: str
    minimum: float | None = None
    maximum: float | None = None
    start: float = 0.0
    limit: float | None = None
    to_flooding: bool = True
    text: str = ""

    def __post_init__(self) -> None:
        if self.kind not in ARM_CRITERIA:
            raise InputError(f"arm criterion {self.id!r}: kind must be one of {', '.join(ARM_CRITERIA)}, "
                             f"got {self.kind!r}")
        if self.minimum is None and self.maximum is None:
            raise InputError(f"arm criterion {self.id!r}: needs a minimum or a maximum")


@dataclass(frozen=True)
class ArmResult:
    id: str
    kind: str
    arm: str
    unit: str
    value: float | None
    minimum: float | None
    maximum: float | None
    margin: float | None
    passed: bool
    note: str = ""


def limit_margin(value: float | None, minimum: float | None, maximum: float | None) -> float | None:
    """Least of value − minimum and maximum − value (positive passes); None without a value."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return None
    m = math.inf
    if minimum is not None:
        m = min(m, value - minimum)
    if maximum is not None:
        m = min(m, maximum - value)
    return m


def evaluate_arm(gz: GZCurve, arm: HeelingArm, criteria: Sequence[ArmCriterion], *,
                 flooding: float | None = None) -> list[ArmResult]:
    """Evaluate each criterion of ``criteria`` for ``arm`` on ``gz``.

    ``flooding`` [deg]: the downflooding angle (None when no opening immerses on the curve).
    A missing value (GZ never reaches the arm) fails with a note, never passes.
    """
    out = []
    for c in criteria:
        an = arm_analysis(gz, arm, start=c.start, limit=c.limit, flooding=flooding if c.to_flooding else None)
        val = {"equilibrium_angle": an.equilibrium, "residual_area": an.residual_area,
               "area_ratio": an.ratio}[c.kind]
        note = "" if an.equilibrium is not None else an.end_reason
        if c.kind != "equilibrium_angle" and an.end is not None:
            note = f"to {an.end:.2f}° ({an.end_reason})"
        m = limit_margin(val, c.minimum, c.maximum)
        out.append(ArmResult(c.id, c.kind, arm.name, ARM_CRITERIA[c.kind], val, c.minimum, c.maximum,
                             m, bool(m is not None and m >= -1e-12), note))
    return out

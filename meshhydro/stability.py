"""Righting-lever (GZ) and cross curves with free trim, derived angles and areas, openings.

At each heel the displacement is held and, with free trim, the trim too is solved so
that the longitudinal moment balances (B and G on one vertical in the longitudinal
plane). With fixed trim, the trim stays at the upright free-floating value. The
sweep runs outward from upright in each direction, each angle starting from a linear
extrapolation of the two previous solutions, so Newton usually needs two or three
kernel evaluations per angle.

Derived values come from the not-a-knot cubic spline through the computed points
(in degrees): the angle of maximum GZ, the angle of vanishing stability (its roots),
and areas (its exact integral, converted to m·rad). On a 1° curve the spline's area
agrees with a much finer curve to better than 1e-6 m·rad on smooth forms.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from .equilibrium import (
    Evaluator,
    NewtonResult,
    State,
    _check_load,
    _converged,
    metacentric_heights,
    newton,
    residuals,
    solve_volume,
)
from .loading import virtual_cog
from .errors import InputError, NotConvergedError, OpenRimError
from .frames import SEA_WATER, transverse_direction


@dataclass(frozen=True, eq=False)
class RightingCurve:
    """A righting-lever curve (hull frame, SI; heel in degrees, positive starboard down).

    Attributes
    ----------
    heel : (n,) [deg], increasing
    gz : (n,) [m]
        Righting lever, positive when righting.
    kn : (n,) [m]
        Lever of buoyancy about K = (x, 0, 0): GZ = KN - KG sin φ + TCG cos φ.
    draft : (n,) [m]
        Vertical depth of the reference keel point (x_ref, 0, 0) below the water
        surface: the draft when upright, defined at every angle.
    trim : (n,) [deg]
    cob : (n, 3) [m]
    up : (n, 3)
        Earth's upward vertical in the hull frame.
    volume, waterplane_area : (n,)
    bm : (n,) [m]
        Transverse radius I_T / V of the waterplane at each angle (B to the pro-metacentre).
    evaluations : (n,) int
        Kernel evaluations spent at each angle.
    displacement, density : float
    cog : (3,) [m]
        Centre of gravity used (free-surface corrected).
    free_trim : bool
    gm_upright : float or None [m]
        GMt from the hydrostatics of the upright free-trim position (when 0° is on the curve).
    deck_freeboard : (n,) [m] or None
        Least height of the deck edge above the water at each angle.
    openings : dict name -> (n,) [m]
        Height of each opening above the water at each angle.
    """

    heel: np.ndarray
    gz: np.ndarray
    kn: np.ndarray
    draft: np.ndarray
    trim: np.ndarray
    cob: np.ndarray
    up: np.ndarray
    volume: np.ndarray
    waterplane_area: np.ndarray
    bm: np.ndarray
    evaluations: np.ndarray
    displacement: float
    density: float
    cog: np.ndarray
    free_trim: bool
    gm_upright: float | None
    deck_freeboard: np.ndarray | None
    openings: dict[str, np.ndarray] = field(default_factory=dict)

    # ------------------------------------------------------------ interpolation
    def _spline(self):
        from scipy.interpolate import CubicSpline

        if len(self.heel) < 4:
            from scipy.interpolate import make_interp_spline

            return make_interp_spline(self.heel, self.gz, k=min(len(self.heel) - 1, 3))
        return CubicSpline(self.heel, self.gz, bc_type="not-a-knot")

    def gz_at(self, heel: float) -> float:
        """GZ [m] at ``heel`` [deg], from the spline (within the computed range)."""
        self._check_range(heel, heel)
        return float(self._spline()(heel))

    def _check_range(self, a: float, b: float) -> None:
        lo, hi = float(self.heel[0]), float(self.heel[-1])
        if min(a, b) < lo - 1e-9 or max(a, b) > hi + 1e-9:
            raise InputError(f"angles {a:g}..{b:g}° lie outside the computed curve {lo:g}..{hi:g}°")

    def area(self, from_deg: float, to_deg: float) -> float:
        """Area under the GZ curve between two heels [m·rad] (exact integral of the cubic spline)."""
        self._check_range(from_deg, to_deg)
        sp = self._spline()
        return float(sp.integrate(from_deg, to_deg)) * math.pi / 180.0

    # ------------------------------------------------------------ derived values
    def _side(self, sign: int, values: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Angles (ascending, as positive numbers) and values on one side; GZ is sign-adjusted."""
        m = self.heel * sign >= -1e-12
        x = self.heel[m] * sign
        y = self.gz[m] * sign if values is None else values[m]
        o = np.argsort(x)
        return x[o], y[o]

    def gm_from_slope(self) -> float | None:
        """Slope of GZ at 0° [m per rad]: central difference if both sides exist, else 3-point one-sided."""
        h = self.heel
        if not np.any(np.abs(h) < 1e-12):
            return None
        i = int(np.argmin(np.abs(h)))
        if 0 < i < len(h) - 1 and abs(h[i + 1] + h[i - 1]) < 1e-9:
            return float((self.gz[i + 1] - self.gz[i - 1]) / math.radians(h[i + 1] - h[i - 1]))
        if i + 2 < len(h) and abs((h[i + 2] - h[i + 1]) - (h[i + 1] - h[i])) < 1e-9:
            d = math.radians(h[i + 1] - h[i])
            return float((-3 * self.gz[i] + 4 * self.gz[i + 1] - self.gz[i + 2]) / (2 * d))
        return None

    def max_gz(self, sign: int = 1) -> tuple[float, float]:
        """(largest GZ [m], its angle [deg]) on one side (+1 starboard-down heels, -1 port)."""
        sp = self._spline()
        x, y = self._side(sign)
        if len(x) == 0:
            raise InputError("the curve has no angles on that side")
        k = int(np.argmax(y))
        best = (float(y[k]), float(x[k]))
        lo, hi = x[max(k - 1, 0)], x[min(k + 1, len(x) - 1)]
        if hi > lo:
            for r in _roots(sp.derivative(), sign * lo, sign * hi):
                val = float(sp(r)) * sign
                if val > best[0]:
                    best = (val, abs(float(r)))
        return best

    def vanishing_angle(self, sign: int = 1) -> float | None:
        """Angle of vanishing stability [deg]: first down-crossing of GZ past its maximum."""
        x, y = self._side(sign)
        _, amax = self.max_gz(sign)
        sp = self._spline()
        for k in range(len(x) - 1):
            if x[k + 1] <= amax:
                continue
            if y[k] > 0 >= y[k + 1]:
                rr = _roots(sp, sign * x[k], sign * x[k + 1])
                return float(abs(rr[0])) if rr else float(x[k] + (x[k + 1] - x[k]) * y[k] / (y[k] - y[k + 1]))
        return None

    def equilibrium_angle(self, sign: int = 1) -> float:
        """Angle [deg] at which GZ first becomes positive on that side (0 when upright is stable)."""
        x, y = self._side(sign)
        if len(y) and y[0] >= 0 and (len(y) < 2 or y[1] > 0):
            return 0.0
        for k in range(len(x) - 1):
            if y[k] <= 0 < y[k + 1]:
                return float(x[k] + (x[k + 1] - x[k]) * (-y[k]) / (y[k + 1] - y[k]))
        return 0.0

    def range_of_stability(self, sign: int = 1) -> float | None:
        v = self.vanishing_angle(sign)
        return None if v is None else v - self.equilibrium_angle(sign)

    def _first_immersion(self, free: np.ndarray | None, sign: int) -> float | None:
        if free is None:
            return None
        x, y = self._side(sign, free)
        for k in range(len(x) - 1):
            if y[k] > 0 >= y[k + 1]:
                return float(x[k] + (x[k + 1] - x[k]) * y[k] / (y[k] - y[k + 1]))
            if k == 0 and y[0] <= 0:
                return 0.0
        return None

    def deck_edge_angle(self, sign: int = 1) -> float | None:
        """Heel [deg] at which the deck edge first reaches the water (linear between points)."""
        return self._first_immersion(self.deck_freeboard, sign)

    def downflooding_angle(self, sign: int = 1) -> tuple[float | None, str | None]:
        """(Least angle [deg] at which an opening immerses, its name) on one side."""
        best: tuple[float | None, str | None] = (None, None)
        for name, fb in self.openings.items():
            a = self._first_immersion(fb, sign)
            if a is not None and (best[0] is None or a < best[0]):
                best = (a, name)
        return best

    def summary(self, sign: int = 1) -> dict[str, Any]:
        """Derived values for one side as a dict (angles in degrees, GZ in m, areas in m·rad)."""
        gmax, amax = self.max_gz(sign)
        flood, which = self.downflooding_angle(sign)
        out = {
            "side": "starboard" if sign > 0 else "port",
            "gm_upright": self.gm_upright,
            "gm_from_slope": self.gm_from_slope(),
            "max_gz": gmax,
            "angle_of_max_gz": amax,
            "equilibrium_angle": self.equilibrium_angle(sign),
            "vanishing_angle": self.vanishing_angle(sign),
            "range_of_stability": self.range_of_stability(sign),
            "deck_edge_angle": self.deck_edge_angle(sign),
            "downflooding_angle": flood,
            "downflooding_opening": which,
        }
        top = float(np.max(self.heel * sign))
        for a, b in ((0, 30), (0, 40), (30, 40)):
            if top >= b:
                out[f"area_{a}_{b}"] = self.area(sign * a, sign * b)
        return out

    def rows(self) -> list[dict[str, Any]]:
        """One dict per angle, for tables."""
        out = []
        for k in range(len(self.heel)):
            r = {"heel": float(self.heel[k]), "gz": float(self.gz[k]), "kn": float(self.kn[k]),
                 "draft": float(self.draft[k]), "trim": float(self.trim[k]),
                 "lcb": float(self.cob[k, 0]), "tcb": float(self.cob[k, 1]), "vcb": float(self.cob[k, 2]),
                 "up_x": float(self.up[k, 0]), "up_y": float(self.up[k, 1]), "up_z": float(self.up[k, 2]),
                 "bm": float(self.bm[k]), "evaluations": int(self.evaluations[k])}
            if self.deck_freeboard is not None:
                r["deck_freeboard"] = float(self.deck_freeboard[k])
            out.append(r)
        return out


def _roots(sp: Any, a: float, b: float) -> list[float]:
    lo, hi = min(a, b), max(a, b)
    try:
        rr = sp.roots(extrapolate=False) if hasattr(sp, "roots") else []
    except Exception:
        rr = []
    return [float(r) for r in np.atleast_1d(rr) if lo - 1e-12 <= r <= hi + 1e-12]


def deck_edge_points(hull: Any) -> np.ndarray:
    """Deck-edge vertices (k, 3) [m]: shared by an upward-facing face (n_z > 0.5) and a
    side face (|n_z| < 0.5), in the upper half of the hull's height. Empty when the
    mesh has no such edge (a rounded top)."""
    v, f = hull.vertices, hull.faces
    nrm = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    ln = np.linalg.norm(nrm, axis=1)
    ok = ln > 0
    nz = np.zeros(len(f))
    nz[ok] = nrm[ok, 2] / ln[ok]
    deck = np.zeros(len(v), bool)
    side = np.zeros(len(v), bool)
    deck[f[ok & (nz > 0.5)].ravel()] = True
    side[f[ok & (np.abs(nz) < 0.5)].ravel()] = True
    zmid = 0.5 * (hull.bounds[0][2] + hull.bounds[1][2])
    sel = deck & side & (v[:, 2] > zmid)
    return v[sel]


def _freeboard(st: State, K: np.ndarray, pts: np.ndarray) -> np.ndarray:
    """Heights (k,) [m] of points above the water surface at a state."""
    return (pts - K) @ st.cut.normal - st.s


def _sweep(ev: Evaluator, v0: float, g: np.ndarray, heels: np.ndarray, start: State, free_trim: bool,
           progress: Any = None) -> list[tuple[State, int]]:
    """Solve each heel of ``heels`` (monotone away from ``start.heel``) by continuation."""
    out: list[tuple[State, int]] = []
    hist: list[State] = [start]
    for h in heels:
        before = ev.count
        if abs(h - start.heel) < 1e-12:
            st = start
        else:
            if len(hist) >= 2:
                a, b = hist[-2], hist[-1]
                w = (h - b.heel) / (b.heel - a.heel) if b.heel != a.heel else 0.0
                s0 = b.s + w * (b.s - a.s)
                t0 = b.trim + w * (b.trim - a.trim)
            else:
                s0, t0 = hist[-1].s, hist[-1].trim
            lo, hi = ev.s_range(h, t0)
            if not (lo < s0 < hi):
                s0 = None
            try:
                guess = ev.state(s0, h, t0) if s0 is not None else solve_volume(ev, v0, h, t0)
            except OpenRimError:
                guess = solve_volume(ev, v0, h, t0)
            res = newton(ev, v0, g, guess, free_heel=False, free_trim=free_trim)
            if not res.converged and free_trim:
                # safeguard: bracket the trim with the volume solved exactly at each trial
                res = _bracketed_trim(ev, v0, g, h, hist[-1].trim)
            if not res.converged:
                raise NotConvergedError(
                    f"free-trim position not found at heel {h:g}° (volume residual {res.residual[0]:.2e}, "
                    f"trim lever {abs(res.residual[2]) * ev.L:.2e} m)")
            st = res.state
        hist.append(st)
        out.append((st, ev.count - before))
        if progress is not None:
            progress()
    return out


def _bracketed_trim(ev: Evaluator, v0: float, g: np.ndarray, heel: float, t0: float):
    """Free trim at one heel by Brent's method on the longitudinal lever, with V = v0
    solved exactly for each trial trim (continuous in trim, so a bracket converges)."""
    from scipy.optimize import brentq

    cache: dict[float, State] = {}

    def lever(t: float) -> float:
        st = solve_volume(ev, v0, heel, t, None)
        cache[t] = st
        return float(residuals(st, v0, g, ev.L)[2])

    f0 = lever(t0)
    step = 1.0
    bracket = None
    while step <= 64.0:
        lo, hi = max(t0 - step, -60.0), min(t0 + step, 60.0)
        flo, fhi = lever(lo), lever(hi)
        if flo * f0 <= 0:
            bracket = (lo, t0) if lo < t0 else None
            break
        if fhi * f0 <= 0:
            bracket = (t0, hi)
            break
        step *= 2.0
    if bracket is None:
        st = cache[t0]
        return NewtonResult(st, False, 0, residuals(st, v0, g, ev.L))
    t = brentq(lever, bracket[0], bracket[1], xtol=1e-13, rtol=1e-14, maxiter=200)
    st = cache.get(t) or solve_volume(ev, v0, heel, t, None)
    res = newton(ev, v0, g, st, free_heel=False, free_trim=True, max_iter=6)
    if not res.converged:
        r = residuals(st, v0, g, ev.L)
        return NewtonResult(st, _converged(r, [0, 2]), 0, r)
    return res


def righting_curve(hull: Any, *, displacement: float, cog: np.ndarray, heels: Sequence[float] | None = None,
                   free_trim: bool = True, density: float = SEA_WATER, fsm: float = 0.0,
                   openings: Sequence[Any] = (), progress: Any = None) -> RightingCurve:
    """GZ curve at the given heels [deg] (default 0 to 180 in 1° steps).

    Parameters
    ----------
    hull : Hull
    displacement : float [t]
    cog : (3,) [m], hull frame
    heels : sequence of float [deg]
        Any mix of positive (starboard down) and negative (port down) angles within ±180.
    free_trim : bool
        Solve trim at each angle (default); otherwise keep the upright trim.
    density : float [t/m³]
    fsm : float [t·m]
        Free-surface moment; G is raised by fsm / displacement.
    openings : sequence of objects with ``name`` and ``at`` (3,)
        Points whose immersion gives the downflooding angle.
    progress : callable, optional
        Called once per solved angle.
    """
    rho, v0 = _check_load(hull, displacement, density)
    g = virtual_cog(cog, fsm, displacement)
    hs = np.arange(0.0, 181.0, 1.0) if heels is None else np.asarray(sorted(set(float(h) for h in heels)))
    if len(hs) == 0 or not np.all(np.isfinite(hs)) or np.any(np.abs(hs) > 180.0 + 1e-9):
        raise InputError("heels must be finite angles within -180..180°")
    ev = Evaluator(hull)
    # upright: free trim, heel held at 0
    st0 = solve_volume(ev, v0, 0.0, 0.0)
    r0 = newton(ev, v0, g, st0, free_heel=False, free_trim=True)
    if not r0.converged:
        raise NotConvergedError("the upright free-trim position was not found")
    up0 = r0.state
    start_cost = ev.count
    pos = hs[hs >= 0]
    neg = hs[hs < 0][::-1]
    solved: dict[float, tuple[State, int]] = {}
    for part in (pos, neg):
        if len(part):
            for h, (st, n) in zip(part, _sweep(ev, v0, g, part, up0, free_trim, progress), strict=False):
                solved[float(h)] = (st, n)
    k0 = float(hs[np.argmin(np.abs(hs))])
    st, n = solved[k0]
    solved[k0] = (st, n + start_cost)
    states = [solved[float(h)][0] for h in hs]
    evals = np.array([solved[float(h)][1] for h in hs])
    gz = np.array([(g - s.cut.centroid) @ transverse_direction(s.heel) for s in states])
    kn = np.array([-(s.cut.centroid @ transverse_direction(s.heel)) for s in states])
    deck = hull.deck_edge
    deck_fb = np.array([_freeboard(s, ev.K, deck).min() for s in states]) if len(deck) else None
    ops = {}
    for o in openings:
        pt = np.asarray(o.at, float)[None, :]
        ops[o.name] = np.array([_freeboard(s, ev.K, pt)[0] for s in states])
    gm_up = float(metacentric_heights(up0, g)[0]) if abs(k0) < 1e-12 else None
    return RightingCurve(
        heel=hs, gz=gz, kn=kn, draft=np.array([s.s for s in states]), trim=np.array([s.trim for s in states]),
        cob=np.array([s.cut.centroid for s in states]), up=np.array([s.cut.normal for s in states]),
        volume=np.array([s.cut.volume for s in states]),
        waterplane_area=np.array([s.cut.waterplane_area for s in states]),
        bm=np.array([s.cut.inertia_t / s.cut.volume for s in states]), evaluations=evals,
        displacement=float(displacement), density=rho, cog=g, free_trim=bool(free_trim), gm_upright=gm_up,
        deck_freeboard=deck_fb, openings=ops,
    )


def find_loll(ev: Evaluator, v0: float, g: np.ndarray, upright: State) -> State | None:
    """From an unstable upright position, the nearest stable heeled equilibrium (either side)."""
    best = None
    for sign in (1.0, -1.0):
        hs = sign * np.arange(1.0, 90.0, 1.0)
        prev = None
        for st, _ in _sweep(ev, v0, g, hs, upright, True):
            gz = (g - st.cut.centroid) @ transverse_direction(st.heel)
            if prev is not None and prev[1] * sign <= 0 < gz * sign:
                res = newton(ev, v0, g, st, free_heel=True, free_trim=True)
                if res.converged and (best is None or abs(res.state.heel) < abs(best.heel) - 1e-6):
                    best = res.state
                break
            prev = (st, gz)
    # a symmetric load lolls equally both ways: the starboard (positive) angle is kept on ties (1e-6°)
    return best


@dataclass(frozen=True, eq=False)
class CrossCurves:
    """KN [m] over displacements [t] (rows) and heels [deg] (columns), free trim, G at K."""

    displacements: np.ndarray
    heels: np.ndarray
    kn: np.ndarray
    lcg: np.ndarray
    density: float


def cross_curves(hull: Any, displacements: Sequence[float], heels: Sequence[float], *, density: float = SEA_WATER,
                 lcg: float | None = None, progress: Any = None) -> CrossCurves:
    """KN curves with free trim. G is taken at K height on the centreline (KG = 0, TCG = 0)
    and, unless ``lcg`` is given, at the LCB of the level upright flotation of each
    displacement, so that the vessel floats without trim when upright."""
    ds = np.asarray(displacements, float)
    hs = np.asarray(sorted(set(float(h) for h in heels)))
    kn = np.zeros((len(ds), len(hs)))
    lcgs = np.zeros(len(ds))
    for i, d in enumerate(ds):
        rho, v0 = _check_load(hull, d, density)
        ev = Evaluator(hull)
        x = lcg
        if x is None:
            x = float(solve_volume(ev, v0, 0.0, 0.0).cut.centroid[0])
        lcgs[i] = x
        c = righting_curve(hull, displacement=d, cog=np.array([x, 0.0, 0.0]), heels=hs, density=density,
                           progress=progress)
        kn[i] = c.kn
    return CrossCurves(ds, hs, kn, lcgs, float(density))

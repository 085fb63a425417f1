"""Righting-lever (GZ) and cross curves with free trim, derived angles and areas, openings.

At each heel the displacement is held and, with free trim, the trim too is solved so
that the longitudinal moment balances (B and G on one vertical in the longitudinal
plane). With fixed trim, the trim stays at the upright free-floating value. The
sweep runs outward from upright in each direction, each angle starting from a linear
extrapolation of the two previous solutions, so Newton usually needs two or three
kernel evaluations per angle.

Areas come from the not-a-knot cubic spline through the computed points (its exact
integral, converted to m·rad); on a 1° curve the spline's area agrees with a much finer
curve to better than 1e-6 m·rad on smooth forms. The angle and value of maximum GZ and the
vanishing, deck-edge, downflooding and equilibrium angles are refined on the true geometry
between the computed points (:mod:`meshhydro.curve_probe`), so a slope jump where a hull
lifts out cannot make a spline overshoot the reported maximum.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Callable, Protocol, Sequence

import numpy as np

from . import tolerances as tol
from .errors import InputError, MeshHydroError
from .frames import SEA_WATER, transverse_direction
from .hull import Hull
from . import submerged as sub
from .load import FixedLoad, Load
from .curve_probe import CurveProbe, refine_max, refine_root, swamping_state
from .settle import check_centre
from .solver import (
    Evaluator,
    State,
    check_load,
    freeboard,
    is_neutral,
    load_metacentric_heights,
    solve_volume,
    step_angles,
    upright_free_trim,
)


#: Name of the "opening" an open hull floods through: its rim (the swamping angle).
SWAMPING = "open rim (swamping)"


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
        Draft T along the hull z axis at (x_ref, 0), as in ``hull.hydrostatics(draft, heel, trim)``;
        NaN where it is undefined (the hull z axis lies in the waterplane: heel or trim of 90°).
    keel_depth : (n,) [m]
        Vertical depth of the reference keel point (x_ref, 0, 0) below the water surface
        (equals T upright, defined at every angle).
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
        Centre of gravity used (free-surface corrected); for a load whose G moves with the
        attitude, G at the first angle of the curve.
    free_trim : bool
    gm_upright : float or None [m]
        GMt from the hydrostatics of the upright free-trim position (when 0° is on the curve).
    deck_freeboard : (n,) [m] or None
        Least height of the deck edge above the water at each angle.
    openings : dict name -> (n,) [m]
        Height of each opening above the water at each angle.
    submerged : bool
        A neutral load, fully submerged at every angle: no waterplane (``bm`` is 0, M on B), B fixed
        in the hull, weight stability only (:data:`meshhydro.submerged.NOTE`).
    centres : (n, 3) [m] or None
        G at each angle (it moves with the attitude when tank fluid shifts).
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
    submerged: bool = False
    centres: np.ndarray | None = None
    keel_depth: np.ndarray | None = None
    #: Solves the true position at any heel (None for a curve built from points alone).
    probe: CurveProbe | None = field(default=None, repr=False)
    _memo: dict = field(default_factory=dict, repr=False)
    #: open hull: side (+1, -1) -> swamping angle [deg], where the water reaches the rim and the curve ends
    swamping: dict[int, float] = field(default_factory=dict)

    def centre_at(self, k: int) -> np.ndarray:
        """G (3,) [m] at the k-th angle (``cog`` when the curve has no per-angle centres)."""
        return self.cog if self.centres is None else self.centres[k]

    # ------------------------------------------------------------ interpolation
    def interpolant(self) -> Any:
        """The not-a-knot cubic spline GZ(heel [deg]) [m] through the computed points (scipy PPoly-like:
        callable, ``derivative()``, ``integrate(a, b)``, ``roots()``); a lower-order spline below 4 points."""
        from scipy.interpolate import CubicSpline

        if len(self.heel) < 4:
            from scipy.interpolate import make_interp_spline

            return make_interp_spline(self.heel, self.gz, k=min(len(self.heel) - 1, 3))
        return CubicSpline(self.heel, self.gz, bc_type="not-a-knot")

    def gz_at(self, heel: float) -> float:
        """GZ [m] at ``heel`` [deg], from the spline (within the computed range)."""
        self._check_range(heel, heel)
        return float(self.interpolant()(heel))

    def _check_range(self, a: float, b: float) -> None:
        lo, hi = float(self.heel[0]), float(self.heel[-1])
        if min(a, b) < lo - tol.ANGLE_SLACK or max(a, b) > hi + tol.ANGLE_SLACK:
            raise InputError(f"angles {a:g}..{b:g}° lie outside the computed curve {lo:g}..{hi:g}°")

    def area(self, from_deg: float, to_deg: float) -> float:
        """Area under the GZ curve between two heels [m·rad] (exact integral of the cubic spline)."""
        self._check_range(from_deg, to_deg)
        sp = self.interpolant()
        return float(sp.integrate(from_deg, to_deg)) * math.pi / 180.0

    # ------------------------------------------------------------ derived values
    def side(self, sign: int, values: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Angles (k,) [deg] ascending as positive numbers, and values (k,) on one side (+1 starboard
        down, -1 port down). Without ``values`` these are GZ [m] with the sign turned so that positive
        rights the vessel on that side; otherwise ``values`` (n,) taken at those angles."""
        m = self.heel * sign >= -tol.UPRIGHT
        x = self.heel[m] * sign
        y = self.gz[m] * sign if values is None else values[m]
        o = np.argsort(x)
        return x[o], y[o]

    def gm_from_slope(self) -> float | None:
        """Slope of GZ at 0° [m per rad]: central difference if both sides exist, else 3-point one-sided."""
        h = self.heel
        if not np.any(np.abs(h) < tol.UPRIGHT):
            return None
        i = int(np.argmin(np.abs(h)))
        if 0 < i < len(h) - 1 and abs(h[i + 1] + h[i - 1]) < tol.ANGLE_SLACK:
            return float((self.gz[i + 1] - self.gz[i - 1]) / math.radians(h[i + 1] - h[i - 1]))
        if i + 2 < len(h) and abs((h[i + 2] - h[i + 1]) - (h[i + 1] - h[i])) < tol.ANGLE_SLACK:
            d = math.radians(h[i + 1] - h[i])
            return float((-3 * self.gz[i] + 4 * self.gz[i + 1] - self.gz[i + 2]) / (2 * d))
        return None

    def _refined(self, key: tuple, compute: Callable[[], Any]) -> Any:
        if key not in self._memo:
            self._memo[key] = compute()
        return self._memo[key]

    def _gz_side(self, sign: int) -> Callable[[float], float]:
        probe = self.probe
        assert probe is not None
        return lambda a: sign * probe.gz(sign * a)

    def max_gz(self, sign: int = 1) -> tuple[float, float]:
        """(largest GZ [m], its angle [deg]) on one side (+1 starboard-down heels, -1 port).

        Refined on the true geometry between the neighbours of the largest computed point (bounded
        Brent search; the result is a solved position, never above the curve). When GZ still rises at
        the last computed angle the maximum lies beyond the range (:meth:`max_beyond_range`) and this
        gives the last point."""
        return self._refined(("max", sign), lambda: self._max_gz(sign))

    def _max_gz(self, sign: int) -> tuple[float, float]:
        x, y = self.side(sign)
        if len(x) == 0:
            raise InputError("the curve has no angles on that side")
        k = _peak_index(y)
        best = (float(y[k]), float(x[k]))
        lo, hi = x[max(k - 1, 0)], x[min(k + 1, len(x) - 1)]
        if hi <= lo or self.max_beyond_range(sign):
            return best
        if self.probe is not None:
            try:
                val, a = refine_max(self._gz_side(sign), float(lo), float(hi))
            except MeshHydroError:
                return best  # no position between the points: the largest computed one stands
            return (val, a) if val >= best[0] else best
        sp = self.interpolant()
        for r in _roots(sp.derivative(), sign * lo, sign * hi):
            val = float(sp(r)) * sign
            if val > best[0]:
                best = (val, abs(float(r)))
        return best

    def max_beyond_range(self, sign: int = 1) -> bool:
        """True when GZ still rises at the last computed angle on that side: its maximum lies beyond
        (never for a side that ends at its swamping angle: an open hull's curve has no beyond)."""
        if sign in self.swamping:
            return False
        x, y = self.side(sign)
        return bool(len(y) >= 2 and _peak_index(y) == len(y) - 1 and y[-1] > y[-2])

    def _root(self, sign: int, f: Callable[[float], float] | None, k: int, x: np.ndarray,
              y: np.ndarray) -> float:
        """Root between computed points k and k+1 (values y): refined when ``f`` is given, else linear."""
        if f is not None:
            try:
                return refine_root(f, float(x[k]), float(x[k + 1]), float(y[k]), float(y[k + 1]))
            except (MeshHydroError, ValueError):
                pass
        return float(x[k] + (x[k + 1] - x[k]) * y[k] / (y[k] - y[k + 1]))

    def vanishing_angle(self, sign: int = 1) -> float | None:
        """Angle of vanishing stability [deg]: first down-crossing of GZ past its maximum."""
        return self._refined(("vanish", sign), lambda: self._vanishing(sign))

    def _vanishing(self, sign: int) -> float | None:
        x, y = self.side(sign)
        _, amax = self.max_gz(sign)
        for k in range(len(x) - 1):
            if x[k + 1] <= amax:
                continue
            if y[k] > 0 >= y[k + 1]:
                if self.probe is not None:
                    return self._root(sign, self._gz_side(sign), k, x, y)
                rr = _roots(self.interpolant(), sign * x[k], sign * x[k + 1])
                return float(abs(rr[0])) if rr else self._root(sign, None, k, x, y)
        if len(x) > 1 and x[-1] >= 180.0 - tol.ANGLE_SLACK and y[-2] > 0 and x[-2] > amax \
                and abs(y[-1]) <= tol.GZ_ROUNDING * float(np.max(np.abs(self.gz))):
            return 180.0  # GZ vanishes at 180° (inverted, G and B on the centreline): rounding left it tiny
        return None

    def equilibrium_angle(self, sign: int = 1) -> float:
        """Angle [deg] at which GZ first becomes positive on that side (0 when upright is stable)."""
        return self._refined(("equil", sign), lambda: self._equilibrium(sign))

    def _equilibrium(self, sign: int) -> float:
        x, y = self.side(sign)
        if len(y) and y[0] >= 0 and (len(y) < 2 or y[1] > 0):
            return 0.0
        f = self._gz_side(sign) if self.probe is not None else None
        for k in range(len(x) - 1):
            if y[k] <= 0 < y[k + 1]:
                return self._root(sign, f, k, x, y)
        return 0.0

    def range_of_stability(self, sign: int = 1) -> float | None:
        v = self.vanishing_angle(sign)
        return None if v is None else v - self.equilibrium_angle(sign)

    def _first_immersion(self, free: np.ndarray | None, sign: int, points: np.ndarray | None) -> float | None:
        if free is None:
            return None
        x, y = self.side(sign, free)
        probe = self.probe
        f = None if probe is None or points is None else (lambda a: probe.freeboard(sign * a, points))
        for k in range(len(x) - 1):
            if k == 0 and y[0] <= 0:
                return 0.0
            if y[k] > 0 >= y[k + 1]:
                return self._root(sign, f, k, x, y)
        return None

    def deck_edge_angle(self, sign: int = 1) -> float | None:
        """Heel [deg] at which the deck edge first reaches the water (refined on the true geometry)."""
        pts = self.probe.points.get("deck") if self.probe is not None else None
        return self._refined(("deck", sign), lambda: self._first_immersion(self.deck_freeboard, sign, pts))

    def downflooding_angle(self, sign: int = 1) -> tuple[float | None, str | None]:
        """(Least angle [deg] at which an opening immerses, its name) on one side."""
        return self._refined(("flood", sign), lambda: self._downflooding(sign))

    def _downflooding(self, sign: int) -> tuple[float | None, str | None]:
        best: tuple[float | None, str | None] = (self.swamping.get(sign), SWAMPING if sign in self.swamping else None)
        for name, fb in self.openings.items():
            pts = self.probe.points.get(f"opening:{name}") if self.probe is not None else None
            a = self._first_immersion(fb, sign, pts)
            if a is not None and (best[0] is None or a < best[0]):
                best = (a, name)
        return best

    def summary(self, sign: int = 1) -> dict[str, Any]:
        """Derived values for one side as a dict (angles in degrees, GZ in m, areas in m·rad)."""
        gmax, amax = self.max_gz(sign)
        beyond = self.max_beyond_range(sign)
        flood, which = self.downflooding_angle(sign)
        out = {
            "side": "starboard" if sign > 0 else "port",
            "gm_upright": self.gm_upright,
            "gm_from_slope": self.gm_from_slope(),
            "max_gz": None if beyond else gmax,
            "angle_of_max_gz": None if beyond else amax,
            "max_gz_beyond_range": beyond,
            "equilibrium_angle": self.equilibrium_angle(sign),
            "vanishing_angle": self.vanishing_angle(sign),
            "range_of_stability": self.range_of_stability(sign),
            "deck_edge_angle": self.deck_edge_angle(sign),
            "downflooding_angle": flood,
            "downflooding_opening": which,
        }
        if sign in self.swamping:
            out["swamping_angle"] = self.swamping[sign]
        top = float(np.max(self.heel * sign))
        for a, b in ((0, 30), (0, 40), (30, 40)):
            if top >= b:
                out[f"area_{a}_{b}"] = self.area(sign * a, sign * b)
        if self.submerged:
            out["note"] = sub.NOTE
        return out

    def rows(self) -> list[dict[str, Any]]:
        """One dict per angle, for tables."""
        out = []
        for k in range(len(self.heel)):
            r = {"heel": float(self.heel[k]), "gz": float(self.gz[k]), "kn": float(self.kn[k]),
                 "draft": float(self.draft[k]) if math.isfinite(self.draft[k]) else None,
                 "keel_depth": None if self.keel_depth is None else float(self.keel_depth[k]),
                 "trim": float(self.trim[k]),
                 "lcb": float(self.cob[k, 0]), "tcb": float(self.cob[k, 1]), "vcb": float(self.cob[k, 2]),
                 "up_x": float(self.up[k, 0]), "up_y": float(self.up[k, 1]), "up_z": float(self.up[k, 2]),
                 "bm": float(self.bm[k]), "evaluations": int(self.evaluations[k])}
            if self.deck_freeboard is not None:
                r["deck_freeboard"] = float(self.deck_freeboard[k])
            out.append(r)
        return out


def _peak_index(y: np.ndarray) -> int:
    """Index of the largest computed GZ of the first righting range on one side: from the first positive
    point to the first point after it where GZ is no longer positive (common practice: the maximum GZ is
    that of the range of positive stability, not a second lobe such as a stable inverted position near
    180°). The largest point overall when GZ is nowhere positive."""
    pos = np.flatnonzero(y > 0)
    if len(pos) == 0:
        return int(np.argmax(y))
    i0 = int(pos[0])
    ends = np.flatnonzero(y[i0:] <= 0)
    i1 = i0 + int(ends[0]) if len(ends) else len(y) - 1
    return i0 + int(np.argmax(y[i0:i1 + 1]))


def _roots(sp: Any, a: float, b: float) -> list[float]:
    """Roots [deg] of a piecewise polynomial between a and b (none for a spline type without roots:
    the callers then interpolate linearly between the computed points)."""
    lo, hi = min(a, b), max(a, b)
    rr = sp.roots(extrapolate=False) if hasattr(sp, "roots") else []
    return [float(r) for r in np.atleast_1d(rr) if lo - tol.ROOT_SLACK <= r <= hi + tol.ROOT_SLACK]


class HasPoint(Protocol):
    """An opening: a ``name`` and a point ``at`` (3,) [m, hull frame]."""

    name: str
    at: Sequence[float]


def righting_curve(hull: Hull, *, displacement: float, cog: np.ndarray, heels: Sequence[float] | None = None,
                   free_trim: bool = True, density: float = SEA_WATER, fsm: float = 0.0,
                   openings: Sequence[HasPoint] = (), progress: Callable[[], object] | None = None,
                   submerged_depth: float = 0.0) -> RightingCurve:
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
    submerged_depth : float [m]
        For a load equal to the hull's whole buoyancy (fully submerged): the depth of the body's
        highest point below the surface at every angle (default 0, just under it).
    """
    check_load(hull, displacement, density)
    return curve_for_load(hull, FixedLoad(displacement, cog, fsm), heels=heels, free_trim=free_trim,
                          density=density, openings=openings, progress=progress, submerged_depth=submerged_depth)


def _heel_set(heels: Sequence[float] | None) -> np.ndarray:
    hs = np.arange(0.0, 181.0, 1.0) if heels is None else np.asarray(sorted(set(float(h) for h in heels)))
    if len(hs) == 0 or not np.all(np.isfinite(hs)) or np.any(np.abs(hs) > 180.0 + tol.ANGLE_SLACK):
        raise InputError("heels must be finite angles within -180..180°")
    return hs


def curve_for_load(hull: Hull, load: Load, *, heels: Sequence[float] | None = None, free_trim: bool = True,
                   density: float = SEA_WATER, openings: Sequence[HasPoint] = (),
                   progress: Callable[[], object] | None = None, submerged_depth: float = 0.0,
                   compartments: Sequence[Any] = ()) -> RightingCurve:
    """GZ curve for any :class:`~meshhydro.load.Load` (see :func:`righting_curve`); G is taken at each angle.

    ``compartments`` (:class:`meshhydro.damage.Compartment`) are flooded, open to the sea at every
    angle (lost buoyancy): the curve is the damaged one, the displacement the intact ship's.
    """
    rho, v0 = check_load(hull, load.displacement, density)
    check_centre(hull, load)
    hs = _heel_set(heels)
    ev = Evaluator(hull, compartments)
    if is_neutral(hull, v0):
        return _submerged_curve(hull, ev, load, hs, rho, free_trim, openings, progress, submerged_depth)
    up0 = upright_free_trim(ev, v0, load)
    start_cost = ev.count
    solved: dict[float, tuple[State, int]] = {}
    swamp: dict[int, float] = {}
    open_hull = not hull.report.closed
    for sign, part in ((1, hs[hs >= 0]), (-1, hs[hs < 0][::-1])):
        if len(part):
            got = step_angles(ev, v0, load, part, up0, free_trim, progress, stop_at_rim=open_hull)
            for h, (st, n) in zip(part, got):
                solved[float(h)] = (st, n)
            if len(got) < len(part):  # the water reaches the open rim: the curve ends at the swamping angle
                before = ev.count
                st = swamping_state(ev, v0, load, free_trim, got[-1][0] if got else up0, float(part[len(got)]))
                solved[st.heel] = (st, ev.count - before)
                swamp[sign] = abs(st.heel)
    hs = np.array(sorted(solved))
    k0 = float(hs[np.argmin(np.abs(hs))])
    st, n = solved[k0]
    solved[k0] = (st, n + start_cost)
    states = [solved[float(h)][0] for h in hs]
    curve = _assemble(hull, ev, load, hs, states, np.array([solved[float(h)][1] for h in hs]), rho, free_trim,
                      openings, up0 if abs(k0) < tol.UPRIGHT else None)
    curve.swamping.update(swamp)
    return curve


def _submerged_curve(hull: Hull, ev: Evaluator, load: Load, hs: np.ndarray, rho: float, free_trim: bool,
                     openings: Sequence[HasPoint], progress: Callable[[], object] | None,
                     clearance: float) -> RightingCurve:
    """The curve of a neutral load: fully submerged at every angle (see :mod:`meshhydro.submerged`)."""
    up0, solved = sub.curve_states(ev, load, hs, clearance, free_trim)
    if progress is not None:
        for _ in hs:
            progress()
    k0 = float(hs[np.argmin(np.abs(hs))])
    return _assemble(hull, ev, load, hs, [st for st, _ in solved], np.array([n for _, n in solved]), rho,
                     free_trim, openings, up0 if abs(k0) < tol.UPRIGHT else None, submerged=True)


def _assemble(hull: Hull, ev: Evaluator, load: Load, hs: np.ndarray, states: list[State], evals: np.ndarray,
              rho: float, free_trim: bool, openings: Sequence[HasPoint], upright: State | None,
              submerged: bool = False) -> RightingCurve:
    gs = np.array([load.centre(s.heel, s.trim) for s in states])
    gz = np.array([(g - s.cut.centroid) @ transverse_direction(s.heel) for g, s in zip(gs, states, strict=True)])
    kn = np.array([-(s.cut.centroid @ transverse_direction(s.heel)) for s in states])
    deck = hull.deck_edge
    deck_fb = np.array([freeboard(s, ev.K, deck).min() for s in states]) if len(deck) else None
    ops = {}
    for o in openings:
        pt = np.asarray(o.at, float)[None, :]
        ops[o.name] = np.array([freeboard(s, ev.K, pt)[0] for s in states])
    gm_up = None
    if upright is not None:
        gm_up = float((sub.metacentric_heights if submerged else load_metacentric_heights)(upright, load)[0])
    probe = None if submerged else CurveProbe(ev, float(load.displacement) / rho, load, free_trim, hs, states)
    if probe is not None and len(deck):
        probe.points["deck"] = np.asarray(deck, float)
    for o in openings if probe is not None else ():
        probe.points[f"opening:{o.name}"] = np.asarray(o.at, float)[None, :]
    depth = np.array([s.depth for s in states])
    nz = np.array([s.cut.normal[2] for s in states])
    defined = np.abs(nz) >= tol.DRAFT_DEFINED
    draft = np.where(defined, depth / np.where(defined, nz, 1.0), np.nan)
    return RightingCurve(
        heel=hs, gz=gz, kn=kn, draft=draft, keel_depth=depth, probe=probe, trim=np.array([s.trim for s in states]),
        cob=np.array([s.cut.centroid for s in states]), up=np.array([s.cut.normal for s in states]),
        volume=np.array([s.cut.volume for s in states]),
        waterplane_area=np.zeros(len(states)) if submerged else np.array([s.cut.waterplane_area for s in states]),
        bm=np.zeros(len(states)) if submerged else np.array([s.cut.inertia_t / s.cut.volume for s in states]),
        evaluations=evals,
        displacement=float(load.displacement), density=rho, cog=np.array(gs[0], dtype=float),
        free_trim=bool(free_trim), gm_upright=gm_up, deck_freeboard=deck_fb, openings=ops, submerged=submerged,
        centres=gs,
    )


@dataclass(frozen=True, eq=False)
class CrossCurves:
    """KN [m] over displacements [t] (rows) and heels [deg] (columns), free trim, G at K."""

    displacements: np.ndarray
    heels: np.ndarray
    kn: np.ndarray
    lcg: np.ndarray
    density: float


def cross_curves(hull: Hull, displacements: Sequence[float], heels: Sequence[float], *, density: float = SEA_WATER,
                 lcg: float | None = None, progress: Callable[[], object] | None = None) -> CrossCurves:
    """KN curves with free trim. G is taken at K height on the centreline (KG = 0, TCG = 0)
    and, unless ``lcg`` is given, at the LCB of the level upright flotation of each
    displacement, so that the vessel floats without trim when upright."""
    ds = np.asarray(displacements, float)
    hs = np.asarray(sorted(set(float(h) for h in heels)))
    kn = np.zeros((len(ds), len(hs)))
    lcgs = np.zeros(len(ds))
    for i, d in enumerate(ds):
        rho, v0 = check_load(hull, d, density)
        ev = Evaluator(hull)
        x = lcg
        if x is None and is_neutral(hull, v0):  # fully submerged: B is the hull's centroid
            x = float(hull.total_centroid[0])
        elif x is None:
            x = float(solve_volume(ev, v0, 0.0, 0.0).cut.centroid[0])
        lcgs[i] = x
        c = righting_curve(hull, displacement=d, cog=np.array([x, 0.0, 0.0]), heels=hs, density=density,
                           progress=progress)
        kn[i] = c.kn
    return CrossCurves(ds, hs, kn, lcgs, float(density))

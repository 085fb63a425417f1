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
from typing import Any, Callable, Protocol, Sequence

import numpy as np

from . import tolerances as tol
from .errors import InputError
from .frames import SEA_WATER, transverse_direction
from .hull import Hull
from . import submerged as sub
from .load import FixedLoad, Load
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

    def max_gz(self, sign: int = 1) -> tuple[float, float]:
        """(largest GZ [m], its angle [deg]) on one side (+1 starboard-down heels, -1 port)."""
        sp = self.interpolant()
        x, y = self.side(sign)
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
        x, y = self.side(sign)
        _, amax = self.max_gz(sign)
        sp = self.interpolant()
        for k in range(len(x) - 1):
            if x[k + 1] <= amax:
                continue
            if y[k] > 0 >= y[k + 1]:
                rr = _roots(sp, sign * x[k], sign * x[k + 1])
                return float(abs(rr[0])) if rr else float(x[k] + (x[k + 1] - x[k]) * y[k] / (y[k] - y[k + 1]))
        if len(x) > 1 and x[-1] >= 180.0 - tol.ANGLE_SLACK and y[-2] > 0 and x[-2] > amax \
                and abs(y[-1]) <= tol.GZ_ROUNDING * float(np.max(np.abs(self.gz))):
            return 180.0  # GZ vanishes at 180° (inverted, G and B on the centreline): rounding left it tiny
        return None

    def equilibrium_angle(self, sign: int = 1) -> float:
        """Angle [deg] at which GZ first becomes positive on that side (0 when upright is stable)."""
        x, y = self.side(sign)
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
        x, y = self.side(sign, free)
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
        if self.submerged:
            out["note"] = sub.NOTE
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
    hs = _heel_set(heels)
    ev = Evaluator(hull, compartments)
    if is_neutral(hull, v0):
        return _submerged_curve(hull, ev, load, hs, rho, free_trim, openings, progress, submerged_depth)
    up0 = upright_free_trim(ev, v0, load)
    start_cost = ev.count
    solved: dict[float, tuple[State, int]] = {}
    for part in (hs[hs >= 0], hs[hs < 0][::-1]):
        if len(part):
            for h, (st, n) in zip(part, step_angles(ev, v0, load, part, up0, free_trim, progress), strict=True):
                solved[float(h)] = (st, n)
    k0 = float(hs[np.argmin(np.abs(hs))])
    st, n = solved[k0]
    solved[k0] = (st, n + start_cost)
    states = [solved[float(h)][0] for h in hs]
    return _assemble(hull, ev, load, hs, states, np.array([solved[float(h)][1] for h in hs]), rho, free_trim,
                     openings, up0 if abs(k0) < tol.UPRIGHT else None)


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
    return RightingCurve(
        heel=hs, gz=gz, kn=kn, draft=np.array([s.depth for s in states]), trim=np.array([s.trim for s in states]),
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

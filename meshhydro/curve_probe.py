"""True values of a righting curve between its computed angles.

A GZ curve is computed at a set of heels; its derived angles (maximum GZ, vanishing,
deck edge, downflooding) lie between them. Reading them from a spline through the points
overshoots where GZ has a slope jump (a hull or float lifting out, the deck edge going
under), and can report a maximum above every computed point. A :class:`CurveProbe` solves
the floating position at any heel on the true geometry (same load, same trim rule, started
from the nearest computed position), so the derived values are refined by a bounded scalar
search (Brent's method with golden-section steps) and by Brent's root finder.

An open hull (a boat with no deck) ends its curve at the swamping angle, where the water
reaches the rim with the displacement held (:func:`swamping_state`).

Public: :class:`CurveProbe`, :func:`refine_max`, :func:`refine_root`, :func:`swamping_state`.
"""
from __future__ import annotations

import math
from typing import Callable

import numpy as np

from . import tolerances as tol
from .errors import OpenRimError
from .frames import transverse_direction
from .load import Load
from .solver import Evaluator, State, freeboard, step_angles


class CurveProbe:
    """Solves the floating position of one curve at any heel [deg] (hull frame, SI).

    Parameters
    ----------
    ev : Evaluator
    v0 : float [m³]
        Volume to displace.
    load : Load
    free_trim : bool
    heels : (n,) [deg]
        The computed heels, and ``states`` (n,) their solved positions (continuation starts).
    """

    def __init__(self, ev: Evaluator, v0: float, load: Load, free_trim: bool, heels: np.ndarray,
                 states: list[State]) -> None:
        self.ev, self.v0, self.load, self.free_trim = ev, v0, load, free_trim
        self.heels = np.asarray(heels, float)
        self.states = list(states)
        self._cache: dict[float, State] = {}
        #: named point sets (k, 3) [m, hull frame] whose freeboard is refined: "deck", "opening:NAME"
        self.points: dict[str, np.ndarray] = {}

    def state(self, heel: float) -> State:
        """The solved position at ``heel`` [deg] (NotConvergedError/OpenRimError when there is none)."""
        h = float(heel)
        if h in self._cache:
            return self._cache[h]
        k = int(np.argmin(np.abs(self.heels - h)))
        start = self.states[k]
        if abs(self.heels[k] - h) < tol.SAME_ANGLE:
            st = start
        else:
            st = step_angles(self.ev, self.v0, self.load, np.array([h]), start, self.free_trim)[0][0]
        self._cache[h] = st
        return st

    def gz(self, heel: float) -> float:
        """GZ [m] at ``heel`` [deg], positive when it rights from a positive heel."""
        st = self.state(heel)
        return float((self.load.centre(st.heel, st.trim) - st.cut.centroid) @ transverse_direction(st.heel))

    def freeboard(self, heel: float, points: np.ndarray) -> float:
        """Least height [m] of ``points`` (k, 3) [m, hull frame] above the water at ``heel`` [deg]."""
        return float(freeboard(self.state(heel), self.ev.K, points).min())


def refine_max(f: Callable[[float], float], lo: float, hi: float) -> tuple[float, float]:
    """(largest value, its abscissa) of ``f`` on [lo, hi] by bounded Brent search, never below f(lo), f(hi).

    ``f`` is evaluated on the true geometry; the result is the best point actually evaluated, so it
    is a value of the curve, never an extrapolation.
    """
    from scipy.optimize import minimize_scalar

    seen: dict[float, float] = {}

    def g(x: float) -> float:
        x = float(x)
        if x not in seen:
            seen[x] = f(x)
        return -seen[x]

    g(lo)
    g(hi)
    minimize_scalar(g, bounds=(lo, hi), method="bounded",
                    options={"xatol": tol.PEAK_XTOL, "maxiter": tol.PEAK_MAX_ITER})
    x = max(seen, key=lambda k: seen[k])
    return seen[x], x


def refine_root(f: Callable[[float], float], lo: float, hi: float, flo: float, fhi: float) -> float:
    """A root of ``f`` in [lo, hi] where ``flo`` and ``fhi`` bracket zero (Brent's method, to
    :data:`~meshhydro.tolerances.ROOT_XTOL` degrees)."""
    from scipy.optimize import brentq

    if flo == 0.0:
        return lo
    if fhi == 0.0:
        return hi
    if not (math.copysign(1.0, flo) != math.copysign(1.0, fhi)):
        raise ValueError("refine_root: no sign change")
    return float(brentq(f, lo, hi, xtol=tol.ROOT_XTOL, rtol=4 * np.finfo(float).eps, maxiter=tol.BRENT_MAX_ITER))


def swamping_state(ev: Evaluator, v0: float, load: Load, free_trim: bool, good: State, bad_heel: float) -> State:
    """The position at the swamping angle of an open hull: the last heel between ``good.heel`` (solved)
    and ``bad_heel`` [deg] (water over the rim) at which the displacement is still held below the rim,
    by bisection to :data:`~meshhydro.tolerances.SWAMP_XTOL` degrees."""
    lo_st, hi = good, float(bad_heel)
    while abs(hi - lo_st.heel) > tol.SWAMP_XTOL:
        mid = 0.5 * (lo_st.heel + hi)
        try:
            lo_st = step_angles(ev, v0, load, np.array([mid]), lo_st, free_trim)[0][0]
        except OpenRimError:
            hi = mid
    return lo_st

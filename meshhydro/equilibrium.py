"""Free-floating equilibrium: draft, heel and trim for a displacement and a centre of gravity.

The waterplane is written ``n(phi, theta) . (x - K) = s`` with K = (x_ref, 0, 0) the
keel reference point and s the vertical depth of K below the water surface (so the
draft at the reference point is ``T = s / n_z``). Unknowns are (s, phi, theta); the
residuals are the relative volume error and the horizontal levers of B about G,
transverse and longitudinal. Newton's method uses the exact Jacobian from the
waterplane properties: moving the plane by ``h(x) = ds - dn . (x - K)`` changes

    dV = ∫ h dA = A ds - dn . A (F - K)
    dM = ∫ x h dA = A F ds - (J + A F (F - K)ᵀ) dn,    dB = (dM - B dV) / V

with A, F, J the waterplane area, centroid and second-moment tensor. Steps are
limited and backtracked on the residual norm, and the volume alone is always
re-solved by a bracketed one-dimensional search (V is monotone in s), so the solver
converges from upright or says why not.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from . import kernel
from .errors import CannotFloatError, InputError, NotConvergedError, OpenRimError
from .frames import SEA_WATER, longitudinal_direction, transverse_direction, up_derivatives, up_vector
from .hydrostatics import Hydrostatics, check_density
from .loading import virtual_cog

VOLUME_TOL = 1e-10  # relative
LEVER_TOL = 1e-8  # times the hull length


@dataclass(frozen=True, eq=False)
class State:
    """One evaluated floating position (hull frame, SI; angles in degrees)."""

    s: float
    heel: float
    trim: float
    cut: kernel.Cut

    @property
    def up(self) -> np.ndarray:
        return self.cut.normal


class Evaluator:
    """Evaluates states of one hull and counts kernel evaluations."""

    def __init__(self, hull: Any) -> None:
        self.hull = hull
        self.prep: kernel.Prepared = hull.prepared
        self.K = np.array([hull.x_ref, 0.0, 0.0])
        self.count = 0
        self.L = max(hull.length, 1e-9)
        #: hull vertices relative to K (n, 3) [m], for the extent of the hull along a normal
        self.rel = self.prep.vertices + (self.prep.origin - self.K)

    def state(self, s: float, heel: float, trim: float) -> State:
        n = up_vector(heel, trim)
        self.count += 1
        c = kernel.cut(self.prep, self.K + s * n, n)
        return State(float(s), float(heel), float(trim), c)

    def s_range(self, heel: float, trim: float) -> tuple[float, float]:
        h = self.rel @ up_vector(heel, trim)
        return float(h.min()), float(h.max())


def residuals(st: State, v0: float, g: np.ndarray, L: float) -> np.ndarray:
    """Scaled residuals: relative volume error, transverse and longitudinal levers of B about G over L."""
    c = st.cut
    bg = c.centroid - g
    return np.array([
        (c.volume - v0) / v0,
        bg @ transverse_direction(st.heel) / L,
        bg @ longitudinal_direction(st.heel, st.trim) / L,
    ])


def jacobian(st: State, v0: float, g: np.ndarray, K: np.ndarray, L: float) -> np.ndarray:
    """Jacobian (3, 3) of :func:`residuals` with respect to (s [m], heel [rad], trim [rad])."""
    c = st.cut
    A, F, V, B = c.waterplane_area, c.waterplane_centroid, max(c.volume, 1e-300), c.centroid
    J = c.inertia_tensor
    dn_phi, dn_th = up_derivatives(st.heel, st.trim)
    et = transverse_direction(st.heel)
    el = longitudinal_direction(st.heel, st.trim)
    ph, th = math.radians(st.heel), math.radians(st.trim)
    det_phi = np.array([0.0, -math.sin(ph), -math.cos(ph)])
    del_phi = np.array([0.0, math.cos(ph) * math.sin(th), -math.sin(ph) * math.sin(th)])
    del_th = np.array([-math.sin(th), math.sin(ph) * math.cos(th), math.cos(ph) * math.cos(th)])
    FK = F - K
    P = J + A * np.outer(F, FK)
    out = np.zeros((3, 3))
    bg = B - g
    for j, (ds, dn) in enumerate(((1.0, np.zeros(3)), (0.0, dn_phi), (0.0, dn_th))):
        dV = A * ds - dn @ (A * FK)
        dM = A * F * ds - P @ dn
        dB = (dM - B * dV) / V
        out[0, j] = dV / v0
        d_et = det_phi if j == 1 else np.zeros(3)
        d_el = del_phi if j == 1 else (del_th if j == 2 else np.zeros(3))
        out[1, j] = (dB @ et + bg @ d_et) / L
        out[2, j] = (dB @ el + bg @ d_el) / L
    return out


def solve_volume(ev: Evaluator, v0: float, heel: float, trim: float, s0: float | None = None,
                 tol: float = VOLUME_TOL) -> State:
    """Bracketed Newton on s at fixed heel and trim so that V = v0 (V is monotone in s)."""
    lo, hi = ev.s_range(heel, trim)
    closed = bool(ev.hull.report.closed)
    vmax = ev.hull.total_volume if closed else None
    if vmax is not None and v0 >= vmax * (1 - 1e-12):
        raise CannotFloatError(_too_heavy_message(ev.hull, v0))
    a, b = lo, hi
    frac = 0.5 if vmax is None else min(max(v0 / vmax, 0.05), 0.95)
    s = s0 if s0 is not None and lo < s0 < hi else lo + (hi - lo) * frac
    best = None
    rim: OpenRimError | None = None
    for _ in range(200):
        try:
            st = ev.state(s, heel, trim)
        except OpenRimError as exc:
            rim = exc
            b = s  # the rim is under water here: the answer lies lower
            if b - a < 1e-12 * max(ev.L, 1.0):
                break
            s = 0.5 * (a + b)
            continue
        r = st.cut.volume - v0
        if abs(r) <= tol * v0:
            return st
        if r < 0:
            a = s
        else:
            b = s
        best = st
        A = st.cut.waterplane_area * 1.0
        s_new = s - r / A if A > 0 else 0.5 * (a + b)
        if not (a < s_new < b):
            s_new = 0.5 * (a + b)
        if b - a < 1e-15 * max(ev.L, 1.0):
            break
        s = s_new
    if best is not None and abs(best.cut.volume - v0) <= 1e-9 * v0:
        return best
    if rim is not None or (not closed and best is not None and best.cut.volume < v0):
        held = best.cut.volume if best is not None and best.cut.volume < v0 else None
        more = f" (the open hull holds about {held:.6g} m³ below its rim there)" if held else ""
        detail = f": {rim}" if rim is not None else ""
        raise OpenRimError(f"the load needs {v0:.6g} m³ of displacement but the water reaches an open rim "
                           f"of the mesh first at heel {heel:g}°, trim {trim:g}°{more}{detail}")
    raise NotConvergedError(f"could not find the draft for volume {v0:.6g} m³ at heel {heel:g}°, trim {trim:g}°")


def _too_heavy_message(hull: Any, v0: float) -> str:
    return (f"the load needs {v0:.6g} m³ of displacement but the closed hull holds at most "
            f"{hull.total_volume:.6g} m³ (fully submerged): it cannot float")


@dataclass
class NewtonResult:
    state: State
    converged: bool
    iterations: int
    residual: np.ndarray


def newton(ev: Evaluator, v0: float, g: np.ndarray, start: State, *, free_heel: bool, free_trim: bool,
           max_iter: int = 40) -> NewtonResult:
    """Newton on (s[, heel][, trim]) from ``start``; volume is always free."""
    rows = [0] + ([1] if free_heel else []) + ([2] if free_trim else [])
    st = start
    r = residuals(st, v0, g, ev.L)
    max_step = {1: math.radians(8.0), 2: math.radians(4.0)}
    for it in range(1, max_iter + 1):
        if _converged(r, rows):
            return NewtonResult(st, True, it - 1, r)
        Jf = jacobian(st, v0, g, ev.K, ev.L)[np.ix_(rows, rows)]
        rr = r[rows]
        try:
            dq = np.linalg.solve(Jf, -rr)
            if not np.all(np.isfinite(dq)):
                raise np.linalg.LinAlgError
        except np.linalg.LinAlgError:
            dq = -np.linalg.lstsq(Jf, rr, rcond=None)[0]
        # limit angular steps and the draft step
        scale = 1.0
        for k, var in enumerate(rows[1:], start=1):
            if abs(dq[k]) > max_step[var]:
                scale = min(scale, max_step[var] / abs(dq[k]))
        ds_lim = 0.25 * ev.hull.depth + 0.1 * ev.hull.size
        if abs(dq[0]) > ds_lim:
            scale = min(scale, ds_lim / abs(dq[0]))
        dq = dq * scale
        f0 = float(rr @ rr)
        lam = 1.0
        accepted = None
        for _ in range(8):
            s = st.s + lam * dq[0]
            heel = st.heel + (math.degrees(lam * dq[rows.index(1)]) if free_heel else 0.0)
            trim = st.trim + (math.degrees(lam * dq[rows.index(2)]) if free_trim else 0.0)
            try:
                cand = ev.state(s, heel, trim)
            except OpenRimError:
                lam *= 0.5
                continue
            rc = residuals(cand, v0, g, ev.L)
            if float(rc[rows] @ rc[rows]) < (1 - 1e-4 * lam) * f0 or lam < 0.02:
                accepted = (cand, rc)
                break
            lam *= 0.5
        if accepted is None:
            # re-solve the volume alone at the current attitude and continue
            cand = solve_volume(ev, v0, st.heel, st.trim, st.s)
            accepted = (cand, residuals(cand, v0, g, ev.L))
        st, r = accepted
    return NewtonResult(st, _converged(r, rows), max_iter, r)


def _converged(r: np.ndarray, rows: list[int]) -> bool:
    ok = abs(r[0]) <= VOLUME_TOL
    for k in rows[1:]:
        ok = ok and abs(r[k]) <= LEVER_TOL
    return bool(ok)


@dataclass(frozen=True, eq=False)
class Equilibrium:
    """Free-floating position for a load (hull frame, SI, degrees).

    Attributes
    ----------
    draft : float [m]
        Draft at the reference point (x_ref, 0), above the baseline z = 0.
    draft_fore, draft_aft : float [m]
        Drafts on the centreline at the fore and aft ends of the waterline
        (``x_fore``, ``x_aft``).
    heel, trim : float [deg]
        Positive starboard down, positive bow down.
    volume : float [m³]
    cob : (3,) [m]
        Centre of buoyancy.
    up : (3,)
        Earth's upward vertical in the hull frame.
    cog, cog_fluid : (3,) [m]
        Centre of gravity, and the same raised by the free-surface correction.
    gmt, gml : float [m]
        Metacentric heights at the equilibrium (with the free-surface correction, "fluid").
    stable : bool
        Both GMt and GMl are positive at this position.
    loll : bool
        Upright was unstable (negative GM) and the vessel lolls to this angle.
    hydrostatics : Hydrostatics
        The particulars at this draft, heel and trim.
    converged, iterations, evaluations, residual_volume, residual_lever
        Solver report: relative volume error and the largest lever of B off the
        vertical through G [m].
    note : str
        Plain words on anything the user must know (loll, list, ...).
    """

    displacement: float
    density: float
    draft: float
    draft_fore: float
    draft_aft: float
    x_fore: float
    x_aft: float
    heel: float
    trim: float
    volume: float
    cob: np.ndarray
    up: np.ndarray
    cog: np.ndarray
    cog_fluid: np.ndarray
    gmt: float
    gml: float
    stable: bool
    loll: bool
    hydrostatics: Hydrostatics
    converged: bool
    iterations: int
    evaluations: int
    residual_volume: float
    residual_lever: float
    note: str = ""

    def to_dict(self) -> dict[str, Any]:
        d = {k: getattr(self, k) for k in (
            "displacement", "density", "draft", "draft_fore", "draft_aft", "x_fore", "x_aft", "heel", "trim",
            "volume", "gmt", "gml", "stable", "loll", "converged", "iterations", "evaluations",
            "residual_volume", "residual_lever", "note")}
        d["cob"] = self.cob.tolist()
        d["up"] = self.up.tolist()
        d["cog"] = self.cog.tolist()
        d["cog_fluid"] = self.cog_fluid.tolist()
        d["hydrostatics"] = self.hydrostatics.to_dict()
        return d


def metacentric_heights(st: State, g: np.ndarray) -> tuple[float, float]:
    """GMt and GMl [m] at a floating position: BM + (B - G) . up."""
    c = st.cut
    v = max(c.volume, 1e-300)
    bg = (c.centroid - g) @ c.normal
    return c.inertia_t / v + bg, c.inertia_l / v + bg


def _check_load(hull: Any, displacement: float, density: float) -> tuple[float, float]:
    rho = check_density(density)
    d = float(displacement)
    if not math.isfinite(d) or d <= 0:
        raise InputError(f"displacement must be a positive number of tonnes, got {displacement!r}")
    v0 = d / rho
    if hull.report.closed and v0 >= hull.total_volume * (1 - 1e-12):
        raise CannotFloatError(
            f"the load needs {d:.6g} t but the closed hull displaces at most {hull.total_volume * rho:.6g} t "
            f"fully submerged (ρ = {rho:g} t/m³): it cannot float")
    return rho, v0


def draft_for_volume(hull: Any, volume: float, *, heel: float = 0.0, trim: float = 0.0) -> float:
    """Draft [m] at (x_ref, 0) giving ``volume`` [m³] at a fixed heel and trim."""
    ev = Evaluator(hull)
    st = solve_volume(ev, float(volume), heel, trim)
    return st.s / st.cut.normal[2]


def solve(hull: Any, *, displacement: float, cog: np.ndarray, density: float = SEA_WATER, fsm: float = 0.0,
          start_heel: float = 0.0, start_trim: float = 0.0) -> Equilibrium:
    """Find draft, heel and trim so that buoyancy equals weight and B is under G.

    Parameters
    ----------
    hull : Hull
    displacement : float [t]
    cog : (3,) [m], hull frame
        Centre of gravity (solid).
    density : float [t/m³]
    fsm : float [t·m]
        Total free-surface moment; G is raised by fsm / displacement.
    start_heel, start_trim : float [deg]
        Starting attitude (default upright, level).

    Raises
    ------
    CannotFloatError, OpenRimError, NotConvergedError
    """
    rho, v0 = _check_load(hull, displacement, density)
    g_solid = np.asarray(cog, dtype=float)
    g = virtual_cog(g_solid, fsm, displacement)
    ev = Evaluator(hull)
    st = solve_volume(ev, v0, start_heel, start_trim)
    res = newton(ev, v0, g, st, free_heel=True, free_trim=True)
    if not res.converged:
        raise NotConvergedError(
            f"equilibrium not found within tolerances after {res.iterations} iterations "
            f"(volume residual {res.residual[0]:.2e}, levers {abs(res.residual[1]) * ev.L:.2e} m, "
            f"{abs(res.residual[2]) * ev.L:.2e} m)")
    st = res.state
    gmt, gml = metacentric_heights(st, g)
    loll = False
    note = ""
    if gmt < 0:
        # unstable in roll: look for the angle of loll on either side with the free-trim curve
        from .stability import find_loll

        st2 = find_loll(ev, v0, g, st)
        if st2 is None:
            raise NotConvergedError("upright GM is negative and no stable heeled position was found: the vessel capsizes")
        st = st2
        gmt, gml = metacentric_heights(st, g)
        loll = True
        note = (f"upright GM is negative ({metacentric_heights(res.state, g)[0]:.4f} m): the vessel lolls to "
                f"{abs(st.heel):.2f}° (either side for a symmetric load); this is not a stable upright condition")
    elif abs(st.heel) > 0.01:
        note = f"lists {abs(st.heel):.2f}° to {'starboard' if st.heel > 0 else 'port'}"
    r = residuals(st, v0, g, ev.L)
    n = st.cut.normal
    T = st.s / n[2]
    xa, xf = float(st.cut.waterline_x[0]), float(st.cut.waterline_x[1])

    def draft_at(x: float) -> float:  # z of the waterplane on the centreline at x
        return float((st.s + n[0] * (hull.x_ref - x)) / n[2])

    hs = hull.hydrostatics(T, heel=st.heel, trim=st.trim, density=rho)
    return Equilibrium(
        displacement=float(displacement), density=rho, draft=float(T), draft_fore=draft_at(xf),
        draft_aft=draft_at(xa), x_fore=xf, x_aft=xa, heel=st.heel, trim=st.trim, volume=st.cut.volume,
        cob=st.cut.centroid.copy(), up=n.copy(), cog=g_solid, cog_fluid=g, gmt=float(gmt), gml=float(gml),
        stable=bool(gmt > 0 and gml > 0), loll=loll, hydrostatics=hs, converged=True,
        iterations=res.iterations, evaluations=ev.count, residual_volume=float(abs(r[0])),
        residual_lever=float(max(abs(r[1]), abs(r[2])) * ev.L), note=note,
    )

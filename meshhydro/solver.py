"""The floating-position solver shared by equilibrium and stability curves.

The waterplane is written ``n(phi, theta) . (x - K) = depth`` with K = (x_ref, 0, 0) the
keel reference point and ``depth`` the vertical depth of K below the water surface (so
the draft at the reference point is ``T = depth / n_z``). Unknowns are (depth, heel,
trim); the residuals are the relative volume error and the horizontal levers of B about
G, transverse and longitudinal, over the hull length L. Newton's method uses the exact
Jacobian from the waterplane properties: moving the plane by ``h(x) = dd - dn . (x - K)``
changes

    dV = ∫ h dA = A dd - dn . A (F - K)
    dM = ∫ x h dA = A F dd - (J + A F (F - K)ᵀ) dn,    dB = (dM - B dV) / V

with A, F, J the waterplane area, centroid and second-moment tensor. Steps are limited
and backtracked on the residual norm, and the volume alone is always re-solved by a
bracketed one-dimensional search (V is monotone in depth). The load is asked for G at
each attitude (:class:`meshhydro.load.Load`), so a G that moves with the fluid in a tank
needs no change here. Every tolerance is in :mod:`meshhydro.tolerances`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np

from . import kernel
from . import tolerances as tol
from .damage import Compartment, flooded_cut
from .errors import CannotFloatError, InputError, NotConvergedError, OpenRimError
from .frames import transverse_direction, up_derivatives, up_vector
from .hull import Hull
from .hydrostatics import check_density
from .load import Load


@dataclass(frozen=True, eq=False)
class State:
    """One evaluated floating position (hull frame, SI; angles in degrees).

    ``depth`` [m] is the vertical depth of K = (x_ref, 0, 0) below the water surface.
    """

    depth: float
    heel: float
    trim: float
    cut: kernel.Cut

    @property
    def up(self) -> np.ndarray:
        """Earth's upward vertical (3,) in the hull frame."""
        return self.cut.normal

    @property
    def draft(self) -> float:
        """Draft [m] along the hull z axis at (x_ref, 0)."""
        return self.depth / float(self.cut.normal[2])


class Evaluator:
    """Evaluates states of one hull and counts kernel evaluations.

    ``compartments`` (optional, :class:`meshhydro.damage.Compartment`) are flooded, open to the
    sea: every state's cut is the net buoyant body (intact minus μ × their part below the plane,
    lost-buoyancy method, :func:`meshhydro.damage.flooded_cut`); the weight does not change.
    """

    def __init__(self, hull: Hull, compartments: Sequence[Compartment] = ()) -> None:
        self.hull = hull
        self.compartments = tuple(compartments)
        #: largest net volume [m³] the closed hull can displace (fully submerged, flooded spaces lost)
        self.max_volume = hull.total_volume - sum(c.permeability * c.volume for c in self.compartments)
        self.prep: kernel.Prepared = hull.prepared
        self.K = np.array([hull.x_ref, 0.0, 0.0])
        self.count = 0
        self.L = max(hull.length, tol.TINY_LENGTH)
        self._k_off = self.prep.origin - self.K  # (3,) [m]: centred mesh frame to K

    def state(self, depth: float, heel: float, trim: float) -> State:
        n = up_vector(heel, trim)
        self.count += 1
        c = kernel.cut(self.prep, self.K + depth * n, n)
        if self.compartments:
            c = flooded_cut(c, self.compartments)
        return State(float(depth), float(heel), float(trim), c)

    def depth_range(self, heel: float, trim: float) -> tuple[float, float]:
        """A bracket [m] on the depth of K at which the plane touches the hull: every vertex lies in it.

        From the kernel's block bounds (:func:`meshhydro.kernel.extent_along`), widened by the
        kernel's rounding allowance, so no per-attitude scan of every vertex; a safe bracket for
        the volume search (V = 0 at the lower end, the whole hull at the upper end).
        """
        n = up_vector(heel, trim)
        lo, hi = kernel.extent_along(self.prep, n)
        off = float(n @ self.K)
        return lo - off, hi - off

    def top_depth(self, heel: float, trim: float) -> float:
        """Exact depth [m] of K at which the plane touches the hull's highest vertex."""
        n = up_vector(heel, trim)
        return float((self.prep.vertices @ n).max() + float(self._k_off @ n))


def residuals(st: State, v0: float, load: Load, L: float) -> np.ndarray:
    """Scaled residuals (3,): relative volume error, transverse and longitudinal levers of B about G over L."""
    c = st.cut
    B, g = c.centroid.tolist(), load.centre(st.heel, st.trim).tolist()
    bg = (B[0] - g[0], B[1] - g[1], B[2] - g[2])
    ph, th = math.radians(st.heel), math.radians(st.trim)
    sp, cp, s_t, ct = math.sin(ph), math.cos(ph), math.sin(th), math.cos(th)
    # B - G on the earth-horizontal directions across (0, cos φ, -sin φ) and along the hull (as
    # frames.transverse_direction and frames.longitudinal_direction)
    return np.array([(c.volume - v0) / v0, (bg[1] * cp - bg[2] * sp) / L,
                     (bg[0] * ct + bg[1] * (sp * s_t) + bg[2] * (cp * s_t)) / L])


def _dot(a: Sequence[float], b: Sequence[float]) -> float:
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]


def jacobian(st: State, v0: float, load: Load, K: np.ndarray, L: float) -> np.ndarray:
    """Jacobian (3, 3) of :func:`residuals` with respect to (depth [m], heel [rad], trim [rad]).

    Exact for the cut: a change dn of the plane's normal (at fixed depth of K) changes the volume by
    -A (F - K)·dn and its first moment by -P dn (with P the waterplane's second moments about K,
    I + A F (F - K)ᵀ), a change of depth by A and A F. Written with plain floats: numpy's cost per call
    on 3-vectors would be most of the time of a small hull's curve.
    """
    c = st.cut
    A, V = c.waterplane_area, max(c.volume, tol.TINY_VOLUME)
    F, B = c.waterplane_centroid.tolist(), c.centroid.tolist()
    u, v = c.axis_u.tolist(), c.axis_v.tolist()
    i_l, i_t, i_uv = c.inertia_l, c.inertia_t, c.inertia_uv
    g = load.centre(st.heel, st.trim).tolist()
    dg_phi, dg_th = load.centre_derivatives(st.heel, st.trim).T.tolist()
    k = K.tolist()
    ph, th = math.radians(st.heel), math.radians(st.trim)
    sp, cp, s_t, ct = math.sin(ph), math.cos(ph), math.sin(th), math.cos(th)
    fk = (F[0] - k[0], F[1] - k[1], F[2] - k[2])
    bg = (B[0] - g[0], B[1] - g[1], B[2] - g[2])
    et, el = (0.0, cp, -sp), (ct, sp * s_t, cp * s_t)  # earth-horizontal across and along, hull frame
    # per unknown: the change of the up normal, of G, and of et and el (per rad; depth changes none)
    columns = (((0.0, cp * ct, -sp * ct), dg_phi, (0.0, -sp, -cp), (0.0, cp * s_t, -sp * s_t)),
               ((-ct, -sp * s_t, -cp * s_t), dg_th, (0.0, 0.0, 0.0), (-s_t, sp * ct, cp * ct)))
    rows = [[A / v0], [A * (_dot(et, F) - _dot(et, B)) / (V * L)], [A * (_dot(el, F) - _dot(el, B)) / (V * L)]]
    for dn, dg, d_et, d_el in columns:
        f_dn, u_dn, v_dn = _dot(fk, dn), _dot(u, dn), _dot(v, dn)
        dv = -A * f_dn
        rows[0].append(dv / v0)
        for row, e, de in ((rows[1], et, d_et), (rows[2], el, d_el)):
            eu, ev = _dot(e, u), _dot(e, v)
            e_dm = -(i_l * eu * u_dn + i_t * ev * v_dn + i_uv * (eu * v_dn + ev * u_dn) + A * _dot(e, F) * f_dn)
            row.append(((e_dm - _dot(e, B) * dv) / V - _dot(e, dg) + _dot(bg, de)) / L)
    return np.array(rows)


def converged(r: np.ndarray, rows: Sequence[int]) -> bool:
    """True when the residuals ``r`` (3,) meet the tolerances in the solved rows (0 volume, 1 heel, 2 trim)."""
    ok = abs(r[0]) <= tol.VOLUME_TOL
    for k in rows[1:]:
        ok = ok and abs(r[k]) <= tol.LEVER_TOL
    return bool(ok)


def check_load(hull: Hull, displacement: float, density: float) -> tuple[float, float]:
    """(density [t/m³], volume to displace [m³]) after checking that the closed hull can carry the load.

    A load up to the hull's whole buoyancy (within ``tol.NEUTRAL_BUOYANCY``) is accepted: see
    :func:`is_neutral` for the fully submerged (neutral) case. A heavier load raises CannotFloatError
    naming the missing buoyancy in tonnes.
    """
    rho = check_density(density)
    d = float(displacement)
    if not math.isfinite(d) or d <= 0:
        raise InputError(f"displacement must be a positive number of tonnes, got {displacement!r}")
    v0 = d / rho
    if hull.report.closed and v0 > hull.total_volume * (1 + tol.NEUTRAL_BUOYANCY):
        most = hull.total_volume * rho
        raise CannotFloatError(
            f"the load needs {d:.6g} t but the closed hull displaces at most {most:.6g} t fully submerged "
            f"(ρ = {rho:g} t/m³): it sinks, {d - most:.6g} t of buoyancy missing")
    return rho, v0


def is_neutral(hull: Hull, v0: float) -> bool:
    """True when a load of volume ``v0`` [m³] (checked by :func:`check_load`) equals the closed hull's
    whole buoyancy within ``tol.NEUTRAL_BUOYANCY``: it floats fully submerged, at any depth."""
    return bool(hull.report.closed and v0 >= hull.total_volume * (1 - tol.NEUTRAL_BUOYANCY))


def metacentric_heights(st: State, g: np.ndarray, dg: np.ndarray | None = None) -> tuple[float, float]:
    """GMt and GMl [m] at a floating position for G (3,) [m]: BM + (B - G) . up.

    ``dg`` (3, 2) [m per rad] is the motion of G with heel and trim (a load's
    ``centre_derivatives``); it adds dG/dq . dup/dq, the loss of GM to a shifting load.
    """
    c = st.cut
    v = max(c.volume, tol.TINY_VOLUME)
    bg = (c.centroid - g) @ c.normal
    gmt, gml = c.inertia_t / v + bg, c.inertia_l / v + bg
    if dg is not None:
        d_phi, d_th = up_derivatives(st.heel, st.trim)
        gmt += float(dg[:, 0] @ d_phi)
        gml += float(dg[:, 1] @ d_th)
    return gmt, gml


def load_metacentric_heights(st: State, load: Load) -> tuple[float, float]:
    """GMt and GMl [m] of a load at a floating position, its shift of G with the attitude included."""
    return metacentric_heights(st, load.centre(st.heel, st.trim), load.centre_derivatives(st.heel, st.trim))


def freeboard(st: State, K: np.ndarray, pts: np.ndarray) -> np.ndarray:
    """Heights (k,) [m] of points (k, 3) [m, hull frame] above the water surface at a state."""
    return (pts - K) @ st.cut.normal - st.depth


# ---------------------------------------------------------------------------- volume


def solve_volume(ev: Evaluator, v0: float, heel: float, trim: float, start: float | None = None) -> State:
    """Bracketed Newton on the depth at fixed heel and trim so that V = v0 [m³] (V is monotone in depth).

    Raises CannotFloatError (too heavy for a closed hull), OpenRimError (an open rim is reached
    first) or NotConvergedError.
    """
    lo, hi = ev.depth_range(heel, trim)
    closed = bool(ev.hull.report.closed)
    vmax = ev.max_volume if closed else None
    if vmax is not None and v0 >= vmax * (1 - tol.FULLY_SUBMERGED):
        lost = " with its flooded compartments" if ev.compartments else ""
        raise CannotFloatError(f"the load needs {v0:.6g} m³ of displacement but the closed hull{lost} holds at "
                               f"most {vmax:.6g} m³ (fully submerged): it cannot float")
    a, b = lo, hi
    frac = 0.5 if vmax is None else min(max(v0 / vmax, 0.05), 0.95)
    d = start if start is not None and lo < start < hi else lo + (hi - lo) * frac
    scale = max(ev.L, 1.0)
    best = None
    rim: OpenRimError | None = None
    for _ in range(tol.VOLUME_MAX_ITER):
        try:
            st = ev.state(d, heel, trim)
        except OpenRimError as exc:
            rim = exc
            b = d  # the rim is under water here: the answer lies lower
            if b - a < tol.RIM_BRACKET * scale:
                break
            d = 0.5 * (a + b)
            continue
        r = st.cut.volume - v0
        if abs(r) <= tol.VOLUME_TOL * v0:
            return st
        if r < 0:
            a = d
        else:
            b = d
        best = st
        A = st.cut.waterplane_area
        d_new = d - r / A if A > 0 else 0.5 * (a + b)
        if not (a < d_new < b):
            d_new = 0.5 * (a + b)
        if b - a < tol.VOLUME_BRACKET * scale:
            break
        d = d_new
    if best is not None and abs(best.cut.volume - v0) <= tol.VOLUME_ACCEPT * v0:
        return best
    if rim is not None or (not closed and best is not None and best.cut.volume < v0):
        held = best.cut.volume if best is not None and best.cut.volume < v0 else None
        more = f" (the open hull holds about {held:.6g} m³ below its rim there)" if held else ""
        detail = f": {rim}" if rim is not None else ""
        raise OpenRimError(f"the load needs {v0:.6g} m³ of displacement but the water reaches an open rim "
                           f"of the mesh first at heel {heel:g}°, trim {trim:g}°{more}{detail}")
    raise NotConvergedError(f"could not find the draft for volume {v0:.6g} m³ at heel {heel:g}°, trim {trim:g}°")


# ---------------------------------------------------------------------------- Newton


@dataclass(frozen=True, eq=False)
class NewtonResult:
    """Outcome of :func:`newton`: the last state, whether it met the tolerances, steps and residuals (3,).

    ``jacobian`` (3, 3) is the full Jacobian (:func:`jacobian`) at the start of the last step taken,
    None when no step was taken; a predictor may use it as the path's slope near the result.
    """

    state: State
    converged: bool
    iterations: int
    residual: np.ndarray
    jacobian: np.ndarray | None = None


def _limited_step(ev: Evaluator, dq: np.ndarray, rows: list[int]) -> np.ndarray:
    """Scale a Newton step so that no angle and no depth change exceeds its limit."""
    max_step = {1: math.radians(tol.MAX_HEEL_STEP), 2: math.radians(tol.MAX_TRIM_STEP)}
    scale = 1.0
    for k, var in enumerate(rows[1:], start=1):
        if abs(dq[k]) > max_step[var]:
            scale = min(scale, max_step[var] / abs(dq[k]))
    ds_lim = tol.DRAFT_STEP_DEPTH * ev.hull.depth + tol.DRAFT_STEP_SIZE * ev.hull.size
    if abs(dq[0]) > ds_lim:
        scale = min(scale, ds_lim / abs(dq[0]))
    return dq * scale


def _solve_small(m: Sequence[Sequence[float]], b: Sequence[float]) -> list[float] | None:
    """x with m x = b for a 1×1, 2×2 or 3×3 system by Cramer's rule in plain floats (a LAPACK call costs
    more than the arithmetic at this size); None when m is singular or x is not finite."""
    if len(b) == 1:
        det = m[0][0]
        x = [b[0] / det] if det else None
    elif len(b) == 2:
        det = m[0][0] * m[1][1] - m[0][1] * m[1][0]
        x = [(b[0] * m[1][1] - m[0][1] * b[1]) / det, (m[0][0] * b[1] - b[0] * m[1][0]) / det] if det else None
    else:
        c0 = m[1][1] * m[2][2] - m[1][2] * m[2][1]
        c1 = m[1][2] * m[2][0] - m[1][0] * m[2][2]
        c2 = m[1][0] * m[2][1] - m[1][1] * m[2][0]
        det = m[0][0] * c0 + m[0][1] * c1 + m[0][2] * c2
        if not det:
            return None
        x = [(b[0] * c0 + m[0][1] * (m[1][2] * b[2] - b[1] * m[2][2]) + m[0][2] * (b[1] * m[2][1] - m[1][1] * b[2]))
             / det,
             (m[0][0] * (b[1] * m[2][2] - m[1][2] * b[2]) + b[0] * c1 + m[0][2] * (m[1][0] * b[2] - b[1] * m[2][0]))
             / det,
             (m[0][0] * (m[1][1] * b[2] - b[1] * m[2][1]) + m[0][1] * (b[1] * m[2][0] - m[1][0] * b[2]) + b[0] * c2)
             / det]
    if x is None or not all(math.isfinite(e) for e in x):
        return None
    return x


def _newton_direction(J: np.ndarray, rows: list[int], r: np.ndarray) -> np.ndarray:
    """Newton step on the unknowns ``rows`` (0 depth, 1 heel, 2 trim): solves J dq = -r on those rows and
    columns; least squares where that system is singular."""
    jl, rl = J.tolist(), r.tolist()
    m = [[jl[i][j] for j in rows] for i in rows]
    dq = _solve_small(m, [-rl[i] for i in rows])
    if dq is None:
        return -np.linalg.lstsq(np.array(m), np.array([rl[i] for i in rows]), rcond=None)[0]
    return np.array(dq)


def _backtrack(ev: Evaluator, v0: float, load: Load, st: State, dq: np.ndarray, rows: list[int],
               f0: float) -> tuple[State, np.ndarray] | None:
    """Line search along ``dq`` on the squared residual norm; None when every trial fails."""
    lam = 1.0
    for _ in range(tol.BACKTRACK_STEPS):
        depth = st.depth + lam * dq[0]
        heel = st.heel + (math.degrees(lam * dq[rows.index(1)]) if 1 in rows else 0.0)
        trim = st.trim + (math.degrees(lam * dq[rows.index(2)]) if 2 in rows else 0.0)
        try:
            cand = ev.state(depth, heel, trim)
        except OpenRimError:
            lam *= 0.5
            continue
        rc = residuals(cand, v0, load, ev.L)
        if float(rc[rows] @ rc[rows]) < (1 - tol.ARMIJO * lam) * f0 or lam < tol.MIN_STEP_FRACTION:
            return cand, rc
        lam *= 0.5
    return None


def newton(ev: Evaluator, v0: float, load: Load, start: State, *, free_heel: bool, free_trim: bool,
           max_iter: int = tol.NEWTON_MAX_ITER) -> NewtonResult:
    """Newton on (depth[, heel][, trim]) from ``start``; the volume is always free."""
    rows = [0] + ([1] if free_heel else []) + ([2] if free_trim else [])
    st = start
    r = residuals(st, v0, load, ev.L)
    J = None
    for it in range(1, max_iter + 1):
        if converged(r, rows):
            return NewtonResult(st, True, it - 1, r, J)
        J = jacobian(st, v0, load, ev.K, ev.L)
        rr = r[rows]
        dq = _limited_step(ev, _newton_direction(J, rows, r), rows)
        accepted = _backtrack(ev, v0, load, st, dq, rows, float(rr @ rr))
        if accepted is None:
            # re-solve the volume alone at the current attitude and continue
            cand = solve_volume(ev, v0, st.heel, st.trim, st.depth)
            accepted = (cand, residuals(cand, v0, load, ev.L))
        st, r = accepted
    return NewtonResult(st, converged(r, rows), max_iter, r, J)


# ---------------------------------------------------------------------------- angle stepping


def bracketed_trim(ev: Evaluator, v0: float, load: Load, heel: float, t0: float) -> NewtonResult:
    """Free trim at one heel by Brent's method on the longitudinal lever, with V = v0
    solved exactly for each trial trim (continuous in trim, so a bracket converges)."""
    from scipy.optimize import brentq

    cache: dict[float, State] = {}

    def lever(t: float) -> float:
        st = solve_volume(ev, v0, heel, t, None)
        cache[t] = st
        return float(residuals(st, v0, load, ev.L)[2])

    f0 = lever(t0)
    step = tol.TRIM_BRACKET_START
    bracket = None
    while step <= tol.TRIM_BRACKET_MAX:
        lo, hi = max(t0 - step, -tol.TRIM_LIMIT), min(t0 + step, tol.TRIM_LIMIT)
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
        return NewtonResult(st, False, 0, residuals(st, v0, load, ev.L))
    t = brentq(lever, bracket[0], bracket[1], xtol=tol.BRENT_XTOL, rtol=tol.BRENT_RTOL, maxiter=tol.BRENT_MAX_ITER)
    st = cache.get(t) or solve_volume(ev, v0, heel, t, None)
    res = newton(ev, v0, load, st, free_heel=False, free_trim=True, max_iter=tol.POLISH_MAX_ITER)
    if not res.converged:
        r = residuals(st, v0, load, ev.L)
        return NewtonResult(st, converged(r, [0, 2]), 0, r)
    return res


def _tangent(J: np.ndarray, free_trim: bool) -> np.ndarray:
    """(d depth / d heel [m/deg], d trim / d heel [-]) along the solution path from the Jacobian (3, 3)
    of :func:`residuals` at (or next to) a solved state (implicit function theorem; trim free or held)."""
    rows = [0, 2] if free_trim else [0]
    jl = J.tolist()
    t = _solve_small([[jl[i][j] for j in rows] for i in rows], [-jl[i][1] for i in rows])
    if t is None:
        return np.zeros(2)
    return np.array([math.radians(t[0]), t[1] if free_trim else 0.0])


def _extrapolate(ev: Evaluator, v0: float, load: Load, hist: list[State], tangents: dict[int, np.ndarray],
                 heel: float, free_trim: bool) -> tuple[float, float]:
    """(depth [m], trim [deg]) at ``heel`` [deg] predicted from the last solved state of ``hist``: along
    the path's tangent there, with the curvature from the change of tangent since the state before.
    The trim is held exactly while the last three solved trims are equal (a symmetric hull keeps
    trim 0, free of rounding in the tangent) and always when it is not free."""
    b = hist[-1]

    def tan(st: State) -> np.ndarray:
        if id(st) not in tangents:
            tangents[id(st)] = _tangent(jacobian(st, v0, load, ev.K, ev.L), free_trim)
        return tangents[id(st)]

    h = heel - b.heel
    q = np.array([b.depth, b.trim]) + h * tan(b)
    if len(hist) >= 2 and abs(b.heel - hist[-2].heel) > tol.SAME_ANGLE:
        a = hist[-2]
        q += 0.5 * h * h * (tan(b) - tan(a)) / (b.heel - a.heel)
    if not free_trim or all(st.trim == b.trim for st in hist[-3:]):
        q[1] = b.trim
    return float(q[0]), float(q[1])


def _guess(ev: Evaluator, v0: float, load: Load, heel: float, hist: list[State], tangents: dict[int, np.ndarray],
           free_trim: bool) -> State:
    """Starting state at ``heel``: extrapolated from the previous solutions (:func:`_extrapolate`).

    The guessed plane is evaluated directly; where it misses the hull (no waterplane, or nothing or
    everything immersed) or reaches an open rim, the volume is solved at the guessed trim instead.
    """
    d0, t0 = _extrapolate(ev, v0, load, hist, tangents, heel, free_trim)
    if abs(t0) > tol.TRIM_LIMIT:
        t0 = hist[-1].trim
    try:
        st = ev.state(d0, heel, t0)
    except OpenRimError:
        return solve_volume(ev, v0, heel, t0)
    c = st.cut
    if not c.waterplane_area > 0:
        return solve_volume(ev, v0, heel, t0)
    return st


def step_angles(ev: Evaluator, v0: float, load: Load, heels: np.ndarray, start: State, free_trim: bool,
                progress: Callable[[], object] | None = None, *, stop_at_rim: bool = False) -> list[tuple[State, int]]:
    """Solve each heel [deg] of ``heels`` (monotone away from ``start.heel``) by continuation.

    Returns (state, kernel evaluations spent) per heel. With ``free_trim`` the trim balances the
    longitudinal moment (bracketed search where Newton stalls); otherwise it stays at the start's.
    With ``stop_at_rim`` the list ends before the first heel at which the water reaches an open
    rim (OpenRimError otherwise).
    """
    out: list[tuple[State, int]] = []
    hist: list[State] = [start]
    tangents: dict[int, np.ndarray] = {}  # by id() of a state held in hist
    for h in heels:
        before = ev.count
        if abs(h - start.heel) < tol.SAME_ANGLE:
            st = start
        elif stop_at_rim:
            try:
                st = _solve_heel(ev, v0, load, float(h), hist, free_trim, tangents)
            except OpenRimError:
                break
        else:
            st = _solve_heel(ev, v0, load, float(h), hist, free_trim, tangents)
        hist.append(st)
        out.append((st, ev.count - before))
        if progress is not None:
            progress()
    return out


def _solve_heel(ev: Evaluator, v0: float, load: Load, h: float, hist: list[State], free_trim: bool,
                tangents: dict[int, np.ndarray]) -> State:
    """One heel of :func:`step_angles` (continued from ``hist``)."""
    guess = _guess(ev, v0, load, h, hist, tangents, free_trim)
    res = newton(ev, v0, load, guess, free_heel=False, free_trim=free_trim)
    if not res.converged and free_trim:
        res = bracketed_trim(ev, v0, load, h, hist[-1].trim)
    if not res.converged:
        raise NotConvergedError(
            f"free-trim position not found at heel {h:g}° (volume residual {res.residual[0]:.2e}, "
            f"trim lever {abs(res.residual[2]) * ev.L:.2e} m)")
    if res.jacobian is not None:  # taken next to the result: the next heel's predictor reuses it
        tangents[id(res.state)] = _tangent(res.jacobian, free_trim)
    return res.state


def find_loll(ev: Evaluator, v0: float, load: Load, upright: State) -> State | None:
    """From an unstable upright position, the nearest stable heeled equilibrium (either side), or None."""
    best = None
    for sign in (1.0, -1.0):
        hs = sign * np.arange(tol.LOLL_STEP, tol.LOLL_LAST, tol.LOLL_STEP)
        prev = None
        for st, _ in step_angles(ev, v0, load, hs, upright, True):
            gz = (load.centre(st.heel, st.trim) - st.cut.centroid) @ transverse_direction(st.heel)
            if prev is not None and prev * sign <= 0 < gz * sign:
                res = newton(ev, v0, load, st, free_heel=True, free_trim=True)
                if res.converged and (best is None or abs(res.state.heel) < abs(best.heel) - tol.LOLL_TIE):
                    best = res.state
                break
            prev = gz
    # a symmetric load lolls equally both ways: the starboard (positive) angle is kept on ties
    return best


def upright_free_trim(ev: Evaluator, v0: float, load: Load) -> State:
    """The upright position with free trim (heel held at 0)."""
    st0 = solve_volume(ev, v0, 0.0, 0.0)
    r0 = newton(ev, v0, load, st0, free_heel=False, free_trim=True)
    if not r0.converged:
        raise NotConvergedError("the upright free-trim position was not found")
    return r0.state

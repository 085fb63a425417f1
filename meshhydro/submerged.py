"""Fully submerged bodies: a load equal to the closed hull's whole buoyancy (neutral).

With the whole hull under water there is no waterplane: B is the centroid of the hull, it does not
move when the body heels or trims (BM = 0, so M lies on B), and only G below B keeps the body
upright (weight stability). For a load whose G is fixed in the hull, GZ = (G - B)·(0, cos φ, -sin φ)
reduces to GZ = (KB - KG) sin φ when G is on the hull's vertical through B (textbook: the righting
lever of a submerged body, e.g. Rawson & Tupper, *Basic Ship Theory*, submarines).

A neutral body is in equilibrium at any depth, so the depth is the caller's: the clearance
[m] of the body's highest point below the water surface, held at every attitude (0, the default,
is just under the surface). The kernel cuts the hull with the plane at that depth, so the
volume and B come from the same exact sums as any floating position.

Public: :data:`NOTE`, :func:`check_clearance`, :func:`state_at`, :func:`attitude_of`,
:func:`equilibrium_state`, :func:`curve_states`, :func:`metacentric_heights`.
"""
from __future__ import annotations

import math
from typing import Sequence

import numpy as np

from . import tolerances as tol
from .errors import InputError, NotConvergedError
from .frames import up_derivatives
from .load import Load
from .solver import Evaluator, State

#: What every report of a submerged state says.
NOTE = "no waterplane: weight stability only"


def check_clearance(clearance: float) -> float:
    """The clearance [m] of the body's top below the surface, checked (finite, not negative)."""
    c = float(clearance)
    if not math.isfinite(c) or c < 0:
        raise InputError(f"submerged depth (clearance of the body's top below the surface) must be a "
                         f"non-negative number of metres, got {clearance!r}")
    return c


def state_at(ev: Evaluator, heel: float, trim: float, clearance: float) -> State:
    """The fully submerged state at an attitude [deg]: the body's top ``clearance`` [m] under the water."""
    return ev.state(ev.top_depth(heel, trim) + clearance, heel, trim)


def attitude_of(up: np.ndarray) -> tuple[float, float]:
    """(heel, trim) [deg] whose upward vertical (:func:`meshhydro.frames.up_vector`) is along ``up`` (3,)."""
    u = np.asarray(up, float) / float(np.linalg.norm(up))
    trim = math.degrees(math.asin(max(-1.0, min(1.0, -float(u[0])))))
    heel = math.degrees(math.atan2(float(u[1]), float(u[2])))
    return heel, trim


def _scale(ev: Evaluator) -> float:
    return tol.TINY_LENGTH * max(ev.hull.size, 1.0)


def equilibrium_state(ev: Evaluator, load: Load, clearance: float, buoyancy: float) -> tuple[State, str]:
    """The stable submerged equilibrium of a neutral load, and its note.

    G must lie on the vertical through B and below it: the upward vertical is along B - G (a fixed
    point iteration when G moves with the attitude). ``buoyancy`` [t] is the hull's whole buoyancy,
    for the note. Raises NotConvergedError when a moving G gives no fixed point.
    """
    c = check_clearance(clearance)
    b = state_at(ev, 0.0, 0.0, c).cut.centroid
    heel = trim = 0.0
    centred = False
    for _ in range(tol.SUBMERGED_MAX_ITER):
        d = b - load.centre(heel, trim)
        if float(np.linalg.norm(d)) <= _scale(ev):
            heel, trim, centred = 0.0, 0.0, True
            break
        h2, t2 = attitude_of(d)
        done = abs(h2 - heel) + abs(t2 - trim) <= math.degrees(tol.SUBMERGED_TOL)
        heel, trim = h2, t2
        if done:
            break
    else:
        raise NotConvergedError("no submerged attitude found with G on the vertical below B")
    st = state_at(ev, heel, trim, c)
    note = (f"fully submerged: the load equals the hull's whole buoyancy ({buoyancy:.6g} t, within "
            f"{tol.NEUTRAL_BUOYANCY:g} of it) and is neutral at any depth; its top is taken {c:g} m "
            f"under the surface; {NOTE}")
    g0 = load.centre(0.0, 0.0)
    if centred:
        note += "; G coincides with B: no righting moment at any attitude"
    elif float((b - g0)[2]) < 0:
        note += (f"; G is above B (KG {g0[2]:.4f} m > KB {b[2]:.4f} m): upright is unstable and the body "
                 f"turns over to heel {heel:.2f}°, trim {trim:.2f}° with G below B")
    elif abs(heel) > tol.LIST_NOTE:
        note += f"; lists {abs(heel):.2f}° to {'starboard' if heel > 0 else 'port'}"
    return st, note


def metacentric_heights(st: State, load: Load) -> tuple[float, float]:
    """GMt and GMl [m] of a fully submerged state: BM = 0, so GM = (B - G)·up, less the shift of a moving G.

    The plane of a state may touch the body's top (clearance 0) or lie on a flat top face; the kernel
    then reports that contact as a waterplane, but the body is under water and has none, so its
    inertia is not used here.
    """
    g = load.centre(st.heel, st.trim)
    dg = load.centre_derivatives(st.heel, st.trim)
    bg = float((st.cut.centroid - g) @ st.cut.normal)
    d_phi, d_th = up_derivatives(st.heel, st.trim)
    return bg + float(dg[:, 0] @ d_phi), bg + float(dg[:, 1] @ d_th)


def _free_trim(ev: Evaluator, load: Load, b: np.ndarray, heel: float, trim: float) -> float:
    """Trim [deg] at ``heel`` that puts G and B on one vertical in the longitudinal plane.

    The longitudinal lever (B - G)·(cos θ, sin φ sin θ, cos φ sin θ) vanishes at
    tan θ = -d_x / (d_y sin φ + d_z cos φ) with d = B - G (fixed point when G moves).
    """
    ph = math.radians(heel)
    for _ in range(tol.SUBMERGED_MAX_ITER):
        d = b - load.centre(heel, trim)
        w = float(d[1] * math.sin(ph) + d[2] * math.cos(ph))
        if abs(float(d[0])) <= _scale(ev):
            t2 = 0.0
        elif abs(w) <= _scale(ev):
            raise NotConvergedError(f"no free-trim position at heel {heel:g}°: G and B lie along the hull's "
                                    f"length there and the submerged body would stand on end")
        else:
            t2 = math.degrees(math.atan(-float(d[0]) / w))
        if abs(t2 - trim) <= math.degrees(tol.SUBMERGED_TOL):
            return t2
        trim = t2
    raise NotConvergedError(f"free-trim position of the submerged body not found at heel {heel:g}°")


def curve_states(ev: Evaluator, load: Load, heels: Sequence[float], clearance: float, free_trim: bool
                 ) -> tuple[State, list[tuple[State, int]]]:
    """The upright submerged state (free trim) and (state, kernel evaluations) at each heel [deg].

    With ``free_trim`` the trim balances the longitudinal moment at each heel; otherwise it stays at
    the upright state's.
    """
    c = check_clearance(clearance)
    b = state_at(ev, 0.0, 0.0, c).cut.centroid
    up0 = state_at(ev, 0.0, _free_trim(ev, load, b, 0.0, 0.0), c)
    out = []
    for h in heels:
        before = ev.count
        t = _free_trim(ev, load, b, float(h), up0.trim) if free_trim else up0.trim
        out.append((state_at(ev, float(h), t, c), ev.count - before))
    return up0, out

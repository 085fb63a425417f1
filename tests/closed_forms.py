"""Closed forms shared by several test files (textbook naval architecture; each names its source)."""
from __future__ import annotations

from scipy.optimize import brentq


def bilged_side_list(L: float, B: float, v0: float, kg: float, ell: float, b: float,
                     yc: float) -> tuple[float, float, float, float]:
    """(tan φ, y_B1, GM, BM) of the list of a wall-sided box L × B [m] holding ``v0`` [m³] with a full-depth side compartment
    ell × b at y = ``yc`` bilged (permeability 1, lost-buoyancy method: the intact waterplane's inertia about its
    own centroid; Barrass & Derrett, Rawson & Tupper), solved from the wall-sided formula
    tan φ (GM + ½ BM tan² φ) = y_B1 of the net body (y_B1 the transverse shift of B on bilging)."""
    a_int = L * B - ell * b
    t1 = v0 / a_int
    y_b1 = -(ell * b * t1 * yc) / v0
    yf = -ell * b * yc / a_int
    i_f = L * B**3 / 12 + L * B * yf**2 - (ell * b**3 / 12 + ell * b * (yc - yf) ** 2)
    bm = i_f / v0
    gm = t1 / 2 + bm - kg
    return brentq(lambda x: x * (gm + 0.5 * bm * x * x) - y_b1, 0.0, 1.0, xtol=1e-16), y_b1, gm, bm

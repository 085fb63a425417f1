"""Reference forms with closed-form hydrostatics, as meshes (for checks and demos).

Each function returns ``(vertices (n, 3) [m], faces (m, 3))`` in the hull frame
(x forward, y to port, z up, baseline z = 0).
"""
from __future__ import annotations

import numpy as np

from .loft import loft


def box(length: float, breadth: float, depth: float, *, x0: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """Rectangular box from x0 to x0 + length, |y| <= breadth/2, 0 <= z <= depth (12 faces)."""
    x = np.array([x0, x0 + length])
    y = np.array([-breadth / 2, breadth / 2])
    z = np.array([0.0, depth])
    v = np.array([[x[i], y[j], z[k]] for i in (0, 1) for j in (0, 1) for k in (0, 1)], float)
    # index = 4i + 2j + k
    f = np.array([
        [0, 1, 3], [0, 3, 2],  # x = x0 (aft), normal -x
        [4, 6, 7], [4, 7, 5],  # x = x1 (fore), normal +x
        [0, 4, 5], [0, 5, 1],  # y = -B/2, normal -y
        [2, 3, 7], [2, 7, 6],  # y = +B/2, normal +y
        [0, 2, 6], [0, 6, 4],  # z = 0, normal -z
        [1, 5, 7], [1, 7, 3],  # z = D, normal +z
    ])
    return v, f


def wigley(length: float = 1.0, breadth: float = 0.1, draft: float = 0.0625, depth: float | None = None,
           *, stations: int = 40, waterlines: int = 16, above: int = 4) -> tuple[np.ndarray, np.ndarray]:
    """The Wigley parabolic hull, closed above the design waterline by vertical sides and a deck.

    Below the waterline z = T the half-breadth is
    ``y = (B/2) (1 - (2x/L)²) (1 - ((T - z)/T)²)`` for -L/2 <= x <= L/2, 0 <= z <= T;
    above it the sides are vertical (the waterline shape) up to a flat deck at
    ``depth`` (default 1.6 T). ``stations`` and ``waterlines`` set the mesh spacing below
    the waterline; ``above`` the number of point rows on the topsides.
    """
    L, B, T = float(length), float(breadth), float(draft)
    D = 1.6 * T if depth is None else float(depth)
    xs = np.linspace(-L / 2, L / 2, stations + 1)
    zb = np.linspace(0.0, T, waterlines + 1)
    za = np.linspace(T, D, above + 1)[1:]
    halves = []
    for x in xs:
        xi = 2 * x / L
        fx = max(0.0, 1.0 - xi * xi)
        yb = 0.5 * B * fx * (1.0 - ((T - zb) / T) ** 2)
        ya = np.full_like(za, 0.5 * B * fx)
        pts = np.concatenate([np.stack([yb, zb], 1), np.stack([ya, za], 1), [[0.0, D]]])
        halves.append(pts)
    return loft(xs, np.array(halves))


def wigley_exact(length: float, breadth: float, draft: float) -> dict[str, float]:
    """Closed-form particulars of the Wigley form at its design draft.

    Derivation (x from midships, d = T - z the depth below the waterline,
    y = (B/2)(1 - ξ²)(1 - ζ²), ξ = 2x/L, ζ = d/T):

    * section area A(x) = 2 ∫₀ᵀ y dd = (2/3) B T (1 - ξ²), so Cm = 2/3;
    * V = ∫ A dx = (2/3) B T (L/2) ∫₋₁¹ (1 - ξ²) dξ = (4/9) L B T, so Cb = 4/9 and
      Cp = Cb / Cm = 2/3;
    * Awp = ∫ B (1 - ξ²) dx = (2/3) L B, so Cwp = 2/3;
    * the centroid of (1 - ζ²) over ζ in [0, 1] is at ζ = (1/4)/(2/3) = 3/8, so KB = 5T/8;
    * I_T = ∫ (2/3) y_wl³ dx = (2/3)(B/2)³(L/2) ∫₋₁¹ (1 - ξ²)³ dξ = (4/105) B³ L, since
      ∫₋₁¹ (1 - ξ²)³ dξ = 32/35; hence BMt = I_T / V = 3 B² / (35 T);
    * I_L = ∫ x² B (1 - ξ²) dx = B L³ / 30, hence BMl = 3 L² / (40 T).
    """
    L, B, T = length, breadth, draft
    return {
        "volume": 4.0 / 9.0 * L * B * T,
        "awp": 2.0 / 3.0 * L * B,
        "cb": 4.0 / 9.0,
        "cm": 2.0 / 3.0,
        "cp": 2.0 / 3.0,
        "cwp": 2.0 / 3.0,
        "vcb": 5.0 / 8.0 * T,
        "bmt": 3.0 * B * B / (35.0 * T),
        "bml": 3.0 * L * L / (40.0 * T),
    }


def cylinder(length: float, radius: float, *, segments: int = 64, x0: float = 0.0,
             z_axis: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Circular cylinder along x with flat ends, axis at height ``z_axis`` (default = radius)."""
    za = radius if z_axis is None else z_axis
    k = segments // 2
    th = np.linspace(0.0, np.pi, k + 1)  # keel (th=0) to top (th=pi) on the port side
    half = np.stack([radius * np.sin(th), za - radius * np.cos(th)], axis=1)
    half[0, 0] = 0.0
    half[-1, 0] = 0.0
    xs = np.array([x0, x0 + length])
    return loft(xs, np.array([half, half]))

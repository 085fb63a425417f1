"""Building blocks of the hull generators: half-sections, canoe bodies, fins, bulbs, joining bodies.

All coordinates are metres in the hull frame (x forward, y to port, z up). Bodies are
``(vertices (n, 3) float64, faces (m, 3) int64)`` closed and outward-oriented (lofted by
:func:`meshhydro.loft.loft`).
"""
from __future__ import annotations

import numpy as np

from .loft import loft

__all__ = ["round_bilge_half", "canoe", "fin", "bulb", "union", "concat"]


def union(parts: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    """Boolean union of closed bodies (manifold3d), one closed body out."""
    import manifold3d as m3d

    out = None
    for v, f in parts:
        man = m3d.Manifold(m3d.Mesh64(vert_properties=np.asarray(v, np.float64),
                                      tri_verts=np.asarray(f, np.uint32)))
        out = man if out is None else out + man
    mesh = out.to_mesh64()
    return np.asarray(mesh.vert_properties, float)[:, :3], np.asarray(mesh.tri_verts, np.int64)


def concat(parts: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    """Several separate bodies as one mesh (faces renumbered); the bodies must not overlap."""
    vs, fs, n = [], [], 0
    for v, f in parts:
        vs.append(v)
        fs.append(f + n)
        n += len(v)
    return np.concatenate(vs), np.concatenate(fs)


def round_bilge_half(b: float, t: float, z_chine: float, z_deck: float, *, n_bilge: int = 10,
                     n_side: int = 4, power: float = 2.5) -> np.ndarray:
    """Half-section (K, 2) of (y, z) [m]: superelliptic bilge of half-breadth b and depth t below z_chine,
    wall side up to z_deck, flat deck back to the centreline."""
    th = np.linspace(0.0, np.pi / 2, n_bilge + 1)
    y = b * np.sin(th) ** (2.0 / power)
    z = z_chine - t * np.cos(th) ** (2.0 / power)
    zs = np.linspace(z_chine, z_deck, n_side + 1)[1:]
    pts = np.concatenate([np.stack([y, z], 1), np.stack([np.full_like(zs, b), zs], 1), [[0.0, z_deck]]])
    pts[0, 0] = 0.0
    return pts


def canoe(L: float, b_max: float, t_max: float, z_chine: float, z_deck: float, *, stations: int = 60,
          transom: float = 0.35, y0: float = 0.0, x0: float = 0.0, n_bilge: int = 10) -> tuple[np.ndarray, np.ndarray]:
    """Slender canoe body from x0 to x0 + L on the centreline y = y0: pointed bow, small transom aft
    (``transom`` × b_max), greatest half-breadth b_max and bilge depth t_max below z_chine [m]."""
    xs = np.linspace(0.0, L, stations + 1)
    halves = []
    for x in xs:
        s = x / L  # 0 aft, 1 bow
        shape = np.sin(np.pi * np.clip(0.5 * s + 0.5 * s ** 0.7, 0, 1)) ** 0.8
        b = b_max * max(shape, transom * (1 - s) ** 4 if s < 0.2 else shape)
        t = t_max * max(shape, 0.25 * (1 - s) ** 4 if s < 0.2 else shape)
        if x >= L - 1e-12:
            b, t = 0.0, 0.0
        if b <= 0.0:
            half = round_bilge_half(1.0, 1.0, z_chine, z_deck, n_bilge=n_bilge)
            half[:, 0] = 0.0
            # the stem: a vertical line from the keel height to the deck
            half[:, 1] = np.linspace(z_chine, z_deck, len(half))
        else:
            half = round_bilge_half(b, t, z_chine, z_deck, n_bilge=n_bilge)
        halves.append(half)
    v, f = loft(xs, np.array(halves))
    v = v + np.array([x0, y0, 0.0])
    return v, f


def fin(x_le: float, chord: float, thick: float, z_tip: float, z_root: float, *,
        n: int = 24) -> tuple[np.ndarray, np.ndarray]:
    """Vertical fin of symmetric foil thickness (NACA four-digit thickness form, ``thick`` × chord)
    between z_tip and z_root [m], leading edge at x_le."""
    s = 0.5 * (1 - np.cos(np.linspace(0, np.pi, n + 1)))
    xs = x_le + chord * s
    halves = []
    for si in s:
        t = 5 * thick * (0.2969 * np.sqrt(si) - 0.1260 * si - 0.3516 * si ** 2 + 0.2843 * si ** 3 - 0.1036 * si ** 4)
        t = max(t, 0.0) if 0 < si < 1 else 0.0
        zs = np.linspace(z_tip, z_root, 8)
        pts = np.concatenate([[[0.0, z_tip]], np.stack([np.full(8, t), zs], 1), [[0.0, z_root]]])
        halves.append(pts)
    return loft(xs, np.array(halves))


def bulb(x0: float, length: float, radius: float, z_axis: float, *, n: int = 24,
         k: int = 12) -> tuple[np.ndarray, np.ndarray]:
    """Body of revolution about the line z = z_axis on the centreline, from x0 to x0 + length [m]."""
    s = np.linspace(0.0, 1.0, n + 1)
    xs = x0 + length * s
    th = np.linspace(0, np.pi, k + 1)
    halves = []
    for si in s:
        r = radius * np.sqrt(max(0.0, 1 - (2 * si - 1) ** 2)) ** 0.9
        pts = np.stack([r * np.sin(th), z_axis - r * np.cos(th)], 1)
        pts[0, 0] = pts[-1, 0] = 0.0
        if r == 0.0:
            pts[:, 1] = z_axis
        halves.append(pts)
    return loft(xs, np.array(halves))

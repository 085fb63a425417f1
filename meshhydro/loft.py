"""Closed, watertight meshes lofted through transverse sections.

Used by the demo-hull generator and to turn an offsets table into a mesh the exact
engine can run on. A hull is described by stations at increasing x, each with a
*half-section*: a polyline on the port side (y >= 0) from the keel on the centreline
up the side and across the deck back to the centreline. Every station has the same
number of points. The full section is the half mirrored to starboard.

Stations whose half-section has zero breadth (a stem or a pointed stern) close the
surface by welding coincident points; other end stations get a flat cap (a transom).
"""
from __future__ import annotations

import numpy as np

from .errors import InputError


def _ring(half: np.ndarray) -> np.ndarray:
    """Full section ring (2K-2, 2) in (y, z), counter-clockwise about +x."""
    port = half
    star = half[-2:0:-1].copy()
    star[:, 0] *= -1.0
    ring = np.concatenate([port, star])
    ring[ring[:, 0] == 0.0, 0] = 0.0  # no negative zeros: welding compares bits
    return ring


def loft(xs: np.ndarray, halves: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Loft a closed triangle mesh through half-sections.

    Parameters
    ----------
    xs : (S,) float64 [m]
        Station positions, strictly increasing, S >= 2.
    halves : (S, K, 2) float64 [m]
        Per station, K points (y >= 0, z) from the keel on the centreline (y = 0) to
        the deck on the centreline (y = 0).

    Returns
    -------
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int64, outward-oriented
    """
    xs = np.asarray(xs, dtype=float)
    halves = np.asarray(halves, dtype=float)
    if xs.ndim != 1 or len(xs) < 2 or np.any(np.diff(xs) <= 0):
        raise InputError("stations must be at least two strictly increasing x positions")
    if halves.ndim != 3 or halves.shape[0] != len(xs) or halves.shape[2] != 2 or halves.shape[1] < 3:
        raise InputError(f"half-sections must have shape (stations, points >= 3, 2), got {halves.shape}")
    if np.any(halves[:, :, 0] < 0) or np.any(halves[:, [0, -1], 0] != 0):
        raise InputError("half-sections must have y >= 0 and start and end on the centreline (y = 0)")
    S = len(xs)
    rings = np.stack([_ring(h) for h in halves])  # (S, R, 2)
    R = rings.shape[1]
    verts = np.concatenate([np.repeat(xs, R)[:, None], rings.reshape(-1, 2)], axis=1)
    faces = []
    j = np.arange(R)
    jn = (j + 1) % R
    for i in range(S - 1):
        a = i * R + j
        b = i * R + jn
        c = (i + 1) * R + jn
        d = (i + 1) * R + j
        faces.append(np.stack([a, b, c], axis=1))
        faces.append(np.stack([a, c, d], axis=1))
    extra = []
    for end, sign in ((0, -1.0), (S - 1, 1.0)):
        ring = rings[end]
        if np.max(ring[:, 0]) <= 0.0:
            continue  # zero breadth: closed by welding
        centre = np.array([xs[end], 0.0, 0.5 * (ring[:, 1].min() + ring[:, 1].max())])
        ci = len(verts) + len(extra)
        extra.append(centre)
        base = end * R
        if sign > 0:
            faces.append(np.stack([np.full(R, ci), base + j, base + jn], axis=1))
        else:
            faces.append(np.stack([np.full(R, ci), base + jn, base + j], axis=1))
    if extra:
        verts = np.concatenate([verts, np.array(extra)])
    f = np.concatenate(faces).astype(np.int64)
    # weld bit-identical points, drop triangles collapsed by the weld
    uniq, inv = np.unique(verts, axis=0, return_inverse=True)
    f = inv.reshape(-1)[f]
    keep = (f[:, 0] != f[:, 1]) & (f[:, 1] != f[:, 2]) & (f[:, 0] != f[:, 2])
    f = f[keep]
    used, f2 = np.unique(f, return_inverse=True)
    return uniq[used], f2.reshape(-1, 3).astype(np.int64)

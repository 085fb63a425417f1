"""Closed, watertight meshes lofted through transverse sections.

Used by the demo-hull generator and to turn an offsets table into a mesh the exact
engine can run on. A hull is described by stations at increasing x, each with a
*half-section*: a polyline on the port side (y >= 0) from the keel on the centreline
up the side and across the deck back to the centreline. Every station has the same
number of points. The full section is the half mirrored to starboard.

Stations whose half-section has zero breadth (a stem or a pointed stern) close the
surface by welding coincident points; other end stations get a flat cap (a transom).

:func:`loft_offsets` lofts an offsets table (:mod:`meshhydro.offsets`), one closed body
per table about its own centreline.
"""
from __future__ import annotations

import numpy as np

from .errors import InputError
from .offsets import MultiOffsets, Offsets


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


def _extent(off: Offsets, i: int) -> tuple[float, float, float, float]:
    """Keel height, keel half-breadth, sheer height, sheer half-breadth [m] of station i.

    From the keel and sheer rows when given; otherwise the section spans the waterlines
    with breadth plus the zero waterline just below and just above them (a flat bottom or
    deck where the lowest or highest waterline has breadth)."""
    if off.keel is not None and off.sheer is not None:
        return off.keel[i], off.keel_half[i], off.sheer[i], off.sheer_half[i]
    zs, hb = off.waterlines, off.half_breadth[i]
    pos = np.flatnonzero(hb > 0)
    if len(pos):
        j0, j1 = int(pos[0]), int(pos[-1])
        if np.any(hb[j0:j1 + 1] == 0):
            j = j0 + int(np.flatnonzero(hb[j0:j1 + 1] == 0)[0])
            raise InputError(f"{off.source}: station_x {off.stations[i]:g}: half-breadth 0 at waterline_z "
                             f"{zs[j]:g} between waterlines with breadth: a section in two parts cannot be lofted")
        zk, yk = (zs[0], hb[0]) if j0 == 0 else (zs[j0 - 1], 0.0)
        zt, yt = (zs[-1], hb[-1]) if j1 == len(zs) - 1 else (zs[j1 + 1], 0.0)
    else:
        zk, yk, zt, yt = zs[0], 0.0, zs[-1], 0.0
    if off.keel is not None:
        zk, yk = off.keel[i], off.keel_half[i]
    if off.sheer is not None:
        zt, yt = off.sheer[i], off.sheer_half[i]
    return zk, yk, zt, yt


def _loft_one(off: Offsets) -> tuple[np.ndarray, np.ndarray]:
    xs, zs = off.stations, off.waterlines
    full = np.flatnonzero((off.half_breadth > 0).any(axis=1))
    if len(full) == 0:
        raise InputError(f"{off.source}: every half-breadth is 0: nothing to loft")
    empty = np.flatnonzero(~(off.half_breadth > 0).any(axis=1))
    inner = empty[(empty > full[0]) & (empty < full[-1])]
    if len(inner) and off.keel is None:
        raise InputError(f"{off.source}: station_x {xs[inner[0]]:g} has no breadth between stations with "
                         f"breadth: two bodies need a body column")
    # stations without breadth beyond the ends add nothing; keep the one next to each end (a stem line)
    keep = np.arange(max(int(full[0]) - 1, 0), min(int(full[-1]) + 2, len(xs)))
    ext = {int(i): _extent(off, int(i)) for i in full}
    halves = []
    for i in keep:
        near = int(full[0]) if i < full[0] else int(full[-1]) if i > full[-1] else int(i)
        zk, yk, zt, yt = ext[near] if i not in ext else ext[int(i)]
        if i not in ext:
            yk = yt = 0.0
        pts = [(0.0, zk), (yk, zk)]
        for j, z in enumerate(zs):
            zc = min(max(z, zk), zt)
            yv = off.half_breadth[i, j] if zk <= z <= zt else (yk if z < zk else yt)
            pts.append((yv, zc))
        pts += [(yt, zt), (0.0, zt)]
        halves.append(pts)
    v, f = loft(xs[keep], np.array(halves, float))
    return v + np.array([0.0, off.centreline, 0.0]), f


def loft_offsets(off: Offsets | MultiOffsets) -> tuple[np.ndarray, np.ndarray]:
    """A closed, watertight triangle mesh through the offsets (vertices (n, 3) [m], hull frame;
    faces (m, 3) int64), one closed body per table, each about its own centreline.

    Each station's half-section runs from the keel (the keel row, else the lowest
    waterline) up through the tabulated half-breadths to the sheer (the sheer row,
    else the highest waterline) and across a flat deck to the centreline. Points below
    the keel or above the sheer collapse onto them, so every station has the same
    number of points; coincident points are welded.
    """
    parts = [_loft_one(t) for t in (off.tables if isinstance(off, MultiOffsets) else [off])]
    base = np.cumsum([0] + [len(v) for v, _ in parts[:-1]])
    return (np.concatenate([v for v, _ in parts]),
            np.concatenate([f + k for (_, f), k in zip(parts, base, strict=True)]).astype(np.int64))

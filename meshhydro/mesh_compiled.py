"""Compiled (numba) linear-time passes for loading and checking large meshes.

Hash tables instead of sorts: welding bit-identical corners, the edge table, bodies by
union-find over manifold edges, and per-body volume, bounds and counts in one pass. The
numpy versions in :mod:`meshhydro.mesh_stl` and :mod:`meshhydro.mesh_topology` remain the
reference (same results; vertex and edge numbering may differ). ``AVAILABLE`` is False
without numba.
"""
from __future__ import annotations

import numpy as np

from .jit import AVAILABLE, njit  # noqa: F401 - AVAILABLE is part of this module's interface


@njit(cache=True, nogil=True)
def _table_size(k):  # pragma: no cover - compiled
    size = 1024
    while size < 2 * k:
        size *= 2
    return size


@njit(cache=True, nogil=True)
def _mix3(a, b, c):  # pragma: no cover - compiled
    h = np.uint64(a) * np.uint64(0x9E3779B97F4A7C15)
    h ^= np.uint64(b) * np.uint64(0xC2B2AE3D27D4EB4F) + (h >> np.uint64(29))
    h ^= np.uint64(c) * np.uint64(0x165667B19E3779F9) + (h >> np.uint64(32))
    return h ^ (h >> np.uint64(31))


@njit(cache=True, nogil=True)
def weld_points(pts, bits):  # pragma: no cover - compiled
    """Weld corners (k, 3) with equal coordinates (bit-identical, -0.0 taken as 0.0).

    ``bits`` is the unsigned-integer view of ``pts``. Returns the vertex id (k,) of each
    corner, the first corner (n,) of each vertex (ids in order of first appearance) and
    the first corner with a non-finite coordinate (-1 when all are finite).
    """
    k = pts.shape[0]
    for i in range(k):
        for j in range(3):
            if not np.isfinite(pts[i, j]):
                return np.empty(0, np.int64), np.empty(0, np.int64), i
    size = _table_size(k)
    mask = np.uint64(size - 1)
    table = np.full(size, -1, np.int32)
    first = np.empty(k, np.int64)
    inv = np.empty(k, np.int64)
    nv = 0
    for i in range(k):
        b0 = bits[i, 0] if pts[i, 0] != 0.0 else 0
        b1 = bits[i, 1] if pts[i, 1] != 0.0 else 0
        b2 = bits[i, 2] if pts[i, 2] != 0.0 else 0
        h = _mix3(b0, b1, b2) & mask
        while True:
            t = table[h]
            if t < 0:
                table[h] = nv
                first[nv] = i
                inv[i] = nv
                nv += 1
                break
            j = first[t]
            if pts[j, 0] == pts[i, 0] and pts[j, 1] == pts[i, 1] and pts[j, 2] == pts[i, 2]:
                inv[i] = t
                break
            h = (h + np.uint64(1)) & mask
    return inv, first[:nv], -1


@njit(cache=True, nogil=True)
def same_third_vertex(f, fa, fb):  # pragma: no cover - compiled
    """(k,) bool: faces fa[i] and fb[i], which share an edge, have the same three vertices."""
    out = np.empty(fa.shape[0], np.bool_)
    for i in range(fa.shape[0]):
        a, b = fa[i], fb[i]
        out[i] = f[a, 0] + f[a, 1] + f[a, 2] == f[b, 0] + f[b, 1] + f[b, 2]
    return out


@njit(cache=True, nogil=True)
def edge_buckets(f, nv):  # pragma: no cover - compiled
    """Edge table of faces (m, 3) over vertices 0..nv-1: lo, hi, n_fwd, n_tot, first face,
    second face (-1 if none), the edge id of each half-edge (3m,) (3i + k: corner k -> k + 1
    of face i) and whether it runs lo -> hi. Half-edges are bucketed by their lower vertex
    (a counting sort), then matched within each bucket; edges are numbered by lower vertex."""
    m = f.shape[0]
    k = 3 * m
    ptr = np.zeros(nv + 1, np.int64)
    for i in range(m):
        for c in range(3):
            ptr[min(f[i, c], f[i, (c + 1) % 3]) + 1] += 1
    for j in range(nv):
        ptr[j + 1] += ptr[j]
    fill = ptr[:-1].copy()
    bucket = np.empty(k, np.int64)
    for h in range(k):
        a, b = f[h // 3, h % 3], f[h // 3, (h % 3 + 1) % 3]
        x = min(a, b)
        bucket[fill[x]] = h
        fill[x] += 1
    cap = k // 2 + 16  # a closed mesh has k / 2 edges; grown when more are found
    tab = np.empty((cap, 6), np.int64)  # lo, hi, n_fwd, n_tot, first face, second face
    edge_of = np.empty(k, np.int64)
    fwd = np.empty(k, np.bool_)
    ne = 0
    for x in range(nv):
        e0 = ne
        for q in range(ptr[x], ptr[x + 1]):
            h = bucket[q]
            a, b = f[h // 3, h % 3], f[h // 3, (h % 3 + 1) % 3]
            y = max(a, b)
            t = e0
            while t < ne and tab[t, 1] != y:
                t += 1
            if t == ne:
                if ne == cap:
                    bigger = np.empty((2 * cap, 6), np.int64)
                    bigger[:cap] = tab
                    tab = bigger
                    cap *= 2
                tab[t, 0], tab[t, 1], tab[t, 2], tab[t, 3], tab[t, 4], tab[t, 5] = x, y, 0, 0, h // 3, -1
                ne += 1
            elif tab[t, 3] == 1:
                tab[t, 5] = h // 3
            tab[t, 3] += 1
            fwd[h] = a < b
            tab[t, 2] += a < b
            edge_of[h] = t
    t = tab[:ne]
    return (t[:, 0].copy(), t[:, 1].copy(), t[:, 2].copy(), t[:, 3].copy(), t[:, 4].copy(), t[:, 5].copy(),
            edge_of, fwd)


@njit(cache=True, nogil=True)
def _find(parent, i):  # pragma: no cover - compiled
    while parent[i] != i:
        parent[i] = parent[parent[i]]
        i = parent[i]
    return i


@njit(cache=True, nogil=True)
def components(m, fa, fb):  # pragma: no cover - compiled
    """Labels (m,) of the components joined by face pairs (fa[i], fb[i]), numbered in
    order of each component's lowest face."""
    parent = np.arange(m)
    for i in range(fa.shape[0]):
        ra, rb = _find(parent, fa[i]), _find(parent, fb[i])
        if ra < rb:
            parent[rb] = ra
        elif rb < ra:
            parent[ra] = rb
    lab = np.empty(m, np.int64)
    nb = 0
    for i in range(m):
        r = _find(parent, i)
        if r == i:
            lab[i] = nb
            nb += 1
        else:
            lab[i] = lab[r]
    return lab


@njit(cache=True, nogil=True)
def body_sums(v, f, lab, nb, centre):  # pragma: no cover - compiled
    """Per body: six times the signed volume about ``centre`` (nb,), least and greatest
    coordinates (nb, 3), face count and first face (nb,); faces with label -1 are skipped."""
    det6 = np.zeros(nb)
    lo = np.full((nb, 3), np.inf)
    hi = np.full((nb, 3), -np.inf)
    count = np.zeros(nb, np.int64)
    first = np.full(nb, -1, np.int64)
    for i in range(f.shape[0]):
        b = lab[i]
        if b < 0:
            continue
        a0, a1, a2 = v[f[i, 0], 0] - centre[0], v[f[i, 0], 1] - centre[1], v[f[i, 0], 2] - centre[2]
        b0, b1, b2 = v[f[i, 1], 0] - centre[0], v[f[i, 1], 1] - centre[1], v[f[i, 1], 2] - centre[2]
        c0, c1, c2 = v[f[i, 2], 0] - centre[0], v[f[i, 2], 1] - centre[1], v[f[i, 2], 2] - centre[2]
        det6[b] += a0 * (b1 * c2 - b2 * c1) + a1 * (b2 * c0 - b0 * c2) + a2 * (b0 * c1 - b1 * c0)
        for c in range(3):
            for j in range(3):
                x = v[f[i, c], j]
                lo[b, j] = min(lo[b, j], x)
                hi[b, j] = max(hi[b, j], x)
        if first[b] < 0:
            first[b] = i
        count[b] += 1
    return det6, lo, hi, count, first

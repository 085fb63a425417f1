"""Compiled (numba) construction of the kernel's block tables, one pass over the faces.

Produces exactly what :func:`meshhydro.kernel_prep.prepare` builds with numpy (the same
per-face formulas, so the slot rows are bit-identical; block sums differ only in the
order of summation), without the large temporaries. ``AVAILABLE`` is False without numba.
"""
from __future__ import annotations

import numpy as np

from .jit import AVAILABLE, njit  # noqa: F401 - AVAILABLE is part of this module's interface


def spread_bits(x):
    """The 10 low bits of ``x`` (uint64, a scalar or an array) spread to every third bit, for Morton
    keys; plain numpy here, compiled as ``_spread`` for :func:`morton_keys`."""
    x = x & np.uint64(0x3FF)
    x = (x | (x << np.uint64(16))) & np.uint64(0x30000FF)
    x = (x | (x << np.uint64(8))) & np.uint64(0x300F00F)
    x = (x | (x << np.uint64(4))) & np.uint64(0x30C30C3)
    x = (x | (x << np.uint64(2))) & np.uint64(0x9249249)
    return x


_spread = njit(cache=True, nogil=True)(spread_bits)


@njit(cache=True, nogil=True)
def morton_keys(vc, f):  # pragma: no cover - compiled
    """Morton keys (m,) uint64 of the face centroids on a 2**10 grid (as kernel_prep._morton)."""
    m = f.shape[0]
    cen = np.empty((m, 3))
    for i in range(m):
        for j in range(3):
            cen[i, j] = (vc[f[i, 0], j] + vc[f[i, 1], j] + vc[f[i, 2], j]) / 3.0
    lo = np.empty(3)
    span = np.empty(3)
    for j in range(3):
        lo[j] = cen[:, j].min()
        span[j] = max(cen[:, j].max() - lo[j], 1e-300)
    keys = np.empty(m, np.uint64)
    for i in range(m):
        k = np.uint64(0)
        for j in range(3):
            q = (cen[i, j] - lo[j]) / span[j] * 1023.0
            qi = np.uint64(min(max(q, 0.0), 1023.0))
            k |= _spread(qi) << np.uint64(j)
        keys[i] = k
    return keys


@njit(cache=True, nogil=True)
def build_leaves(vc, f, order, L, nl):  # pragma: no cover - compiled
    """Slot table (nl, L, 14), leaf bounds (nl, 3) x 2 and leaf sums (nl, 5)."""
    m = order.shape[0]
    data = np.empty((nl, L, 14))
    llo = np.full((nl, 3), np.inf)
    lhi = np.full((nl, 3), -np.inf)
    lsum = np.zeros((nl, 5))
    pad = f[order[m - 1], 0]
    for slot in range(nl * L):
        leaf, k = slot // L, slot % L
        row = data[leaf, k]
        real = slot < m
        for c in range(3):
            vi = f[order[slot], c] if real else pad
            for j in range(3):
                x = vc[vi, j]
                row[3 * c + j] = x
                llo[leaf, j] = min(llo[leaf, j], x)
                lhi[leaf, j] = max(lhi[leaf, j], x)
        if not real:
            for j in range(9, 14):
                row[j] = 0.0
            continue
        a0, a1, a2, b0, b1, b2, c0, c1, c2 = row[0], row[1], row[2], row[3], row[4], row[5], row[6], row[7], row[8]
        det = a0 * (b1 * c2 - b2 * c1) + a1 * (b2 * c0 - b0 * c2) + a2 * (b0 * c1 - b1 * c0)
        row[9] = det
        row[10] = det * (a0 + b0 + c0)
        row[11] = det * (a1 + b1 + c1)
        row[12] = det * (a2 + b2 + c2)
        e0, e1, e2 = b0 - a0, b1 - a1, b2 - a2
        g0, g1, g2 = c0 - a0, c1 - a1, c2 - a2
        x = e1 * g2 - e2 * g1
        y = e2 * g0 - e0 * g2
        z = e0 * g1 - e1 * g0
        row[13] = 0.5 * np.sqrt(x * x + y * y + z * z)
        for j in range(5):
            lsum[leaf, j] += row[9 + j]
    return data, llo, lhi, lsum

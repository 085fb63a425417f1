"""The compiled (numba) pass of the plane kernel, beside the numpy reference pass.

It follows the rules of :mod:`meshhydro.kernel_clip` exactly: the same conservative block
test, the same element-by-element signed distances and the same intersection points, so
the two passes classify every vertex alike and differ only in the order of summation.
In one sweep over the two-level blocks it sums the submerged face products, clips the
straddling faces and accumulates the Green's-theorem moments and extents of the cut
segments; faces lying in the plane (rare) are returned by slot and finished in numpy.

Compiled on first use and cached on disk (``cache=True``). ``AVAILABLE`` is False when
numba cannot be imported; the kernel then uses the numpy pass.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .kernel_clip import Clip, flat_segments as clip_flat_segments
from .kernel_prep import Prepared

from .jit import AVAILABLE, njit  # noqa: F401 - AVAILABLE is part of this module's interface


@dataclass(frozen=True, eq=False)
class PassResult:
    """Sums of one plane (centred frame), as the finishing step of :func:`kernel.cut` needs them.

    Attributes
    ----------
    sums : (5,) float64
        det [m³], det·(a+b+c) (3) [m⁴] and wetted area [m²] of the submerged face parts.
    green : (6,) float64
        ``∫dA, ∫u dA, ∫v dA, ∫u² dA, ∫v² dA, ∫uv dA`` of the section just below the plane,
        about ``o`` on axes u, v (from the cut segments).
    extent : (6,) float64
        Least and greatest u, v and x [m] over the cut segments' ends (inf when none).
    n_segments : int
    segments : (k, 2, 3) float64 or None
        The cut segments when asked.
    seg_faces : (k,) int64 or None
        Face index of each segment when asked.
    flat_slots : (j,) int64
        Slots (leaf * L + k) of faces lying in the plane.
    """

    sums: np.ndarray
    green: np.ndarray
    extent: np.ndarray
    n_segments: int
    segments: np.ndarray | None
    seg_faces: np.ndarray | None
    flat_slots: np.ndarray


@njit(cache=True, nogil=True)
def _green_add(g, ext, p, q, o, u, v):  # pragma: no cover - compiled
    """Add segment p -> q to the Green moments g (6,) and the extents ext (6,)."""
    p0, p1, p2 = p[0] - o[0], p[1] - o[1], p[2] - o[2]
    q0, q1, q2 = q[0] - o[0], q[1] - o[1], q[2] - o[2]
    u1 = p0 * u[0] + p1 * u[1] + p2 * u[2]
    v1 = p0 * v[0] + p1 * v[1] + p2 * v[2]
    u2 = q0 * u[0] + q1 * u[1] + q2 * u[2]
    v2 = q0 * v[0] + q1 * v[1] + q2 * v[2]
    cr = u1 * v2 - u2 * v1
    g[0] += 0.5 * cr
    g[1] += (u1 + u2) * cr / 6.0
    g[2] += (v1 + v2) * cr / 6.0
    g[3] += (u1 * u1 + u1 * u2 + u2 * u2) * cr / 12.0
    g[4] += (v1 * v1 + v1 * v2 + v2 * v2) * cr / 12.0
    g[5] += (u1 * v2 + 2.0 * u1 * v1 + 2.0 * u2 * v2 + u2 * v1) * cr / 24.0
    for w in (u1, u2):
        ext[0] = min(ext[0], w)
        ext[1] = max(ext[1], w)
    for w in (v1, v2):
        ext[2] = min(ext[2], w)
        ext[3] = max(ext[3], w)
    for w in (p[0], q[0]):
        ext[4] = min(ext[4], w)
        ext[5] = max(ext[5], w)


@njit(cache=True, nogil=True)
def _hit(p, q, sp, sq, out):  # pragma: no cover - compiled
    """Where edge p (below) -> q meets the plane; q itself when sq == 0 (as in numpy)."""
    if sq == 0.0:
        for i in range(3):
            out[i] = q[i]
    else:
        t = sp / (sp - sq)
        for i in range(3):
            out[i] = p[i] + (q[i] - p[i]) * t


@njit(cache=True, nogil=True)
def _tri_add(sums, a, b, c):  # pragma: no cover - compiled
    """Add triangle (a, b, c)'s det, det·(a+b+c) and area to sums (5,)."""
    det = (a[0] * (b[1] * c[2] - b[2] * c[1]) + a[1] * (b[2] * c[0] - b[0] * c[2])
           + a[2] * (b[0] * c[1] - b[1] * c[0]))
    sums[0] += det
    for i in range(3):
        sums[1 + i] += det * (a[i] + b[i] + c[i])
    e0, e1, e2 = b[0] - a[0], b[1] - a[1], b[2] - a[2]
    f0, f1, f2 = c[0] - a[0], c[1] - a[1], c[2] - a[2]
    x = e1 * f2 - e2 * f1
    y = e2 * f0 - e0 * f2
    z = e0 * f1 - e1 * f0
    sums[4] += 0.5 * np.sqrt(x * x + y * y + z * z)


@njit(cache=True, nogil=True)
def _clip_face(row, s, below, sums, p1, p2):  # pragma: no cover - compiled
    """Add the submerged part of a straddling face; its cut segment is p1 -> p2."""
    cnt = below[0] + below[1] + below[2]
    lone = 0
    for k in range(3):
        if (cnt == 1 and below[k]) or (cnt == 2 and not below[k]):
            lone = k
    ia, ib, ic = lone, (lone + 1) % 3, (lone + 2) % 3
    a, b, c = row[3 * ia:3 * ia + 3], row[3 * ib:3 * ib + 3], row[3 * ic:3 * ic + 3]
    sa, sb, sc = s[ia], s[ib], s[ic]
    if cnt == 1:  # lone vertex below: (a, pab, pac); segment pac -> pab
        _hit(a, b, sa, sb, p2)
        _hit(a, c, sa, sc, p1)
        _tri_add(sums, a, p2, p1)
    else:  # lone vertex above: (pab, b, c) + (pab, c, pac); segment pab -> pac
        _hit(b, a, sb, sa, p1)
        _hit(c, a, sc, sa, p2)
        _tri_add(sums, p1, b, c)
        _tri_add(sums, p1, c, p2)


@njit(cache=True, nogil=True)
def _straddle(center, half, n, d, tol):  # pragma: no cover - compiled
    """-1: surely wholly below; 1: surely wholly above; 0: open it (as kernel_clip.classify)."""
    sc = center[0] * n[0] + center[1] * n[1] + center[2] * n[2] - d
    reach = half[0] * abs(n[0]) + half[1] * abs(n[1]) + half[2] * abs(n[2])
    if sc + reach < -tol:
        return -1
    if sc - reach > tol:
        return 1
    return 0


@njit(cache=True, nogil=True)
def _sweep(gc, gh, gs, lc, lh, ls, data, fidx, G, n, d, tol, cull, o, u, v, want):  # pragma: no cover
    """One pass over the blocks: sums (5,), Green moments (6,), extents (6,), segments,
    their faces, their count, and the slots of faces lying in the plane."""
    sums = np.zeros(5)
    green = np.zeros(6)
    ext = np.array([np.inf, -np.inf, np.inf, -np.inf, np.inf, -np.inf])
    cap = 1024 if want else 1
    segs = np.empty((cap, 2, 3))
    sfaces = np.empty(cap, np.int64)
    flat = np.empty(16, np.int64)
    nseg = 0
    nflat = 0
    L = data.shape[1]
    s = np.empty(3)
    below = np.empty(3, np.bool_)
    p1 = np.empty(3)
    p2 = np.empty(3)
    for g in range(gc.shape[0]):
        if cull:
            w = _straddle(gc[g], gh[g], n, d, tol)
            if w == -1:
                sums += gs[g]
                continue
            if w == 1:
                continue
        for leaf in range(g * G, (g + 1) * G):
            if cull:
                w = _straddle(lc[leaf], lh[leaf], n, d, tol)
                if w == -1:
                    sums += ls[leaf]
                    continue
                if w == 1:
                    continue
            for k in range(L):
                row = data[leaf, k]
                cnt = 0
                for j in range(3):
                    s[j] = row[3 * j] * n[0] + row[3 * j + 1] * n[1] + row[3 * j + 2] * n[2] - d
                    below[j] = s[j] < 0.0
                    cnt += below[j]
                if cnt == 3:
                    for j in range(5):
                        sums[j] += row[9 + j]
                elif cnt == 0:
                    if s[0] == 0.0 and s[1] == 0.0 and s[2] == 0.0:
                        if nflat == flat.shape[0]:
                            flat = np.concatenate((flat, np.empty(nflat, np.int64)))
                        flat[nflat] = leaf * L + k
                        nflat += 1
                else:
                    _clip_face(row, s, below, sums, p1, p2)
                    _green_add(green, ext, p1, p2, o, u, v)
                    if want:
                        if nseg == cap:
                            segs = np.concatenate((segs, np.empty((cap, 2, 3))))
                            sfaces = np.concatenate((sfaces, np.empty(cap, np.int64)))
                            cap *= 2
                        segs[nseg, 0] = p1
                        segs[nseg, 1] = p2
                        sfaces[nseg] = fidx[leaf, k]
                    nseg += 1
    return sums, green, ext, segs[:nseg if want else 0], sfaces[:nseg if want else 0], nseg, flat[:nflat]


@njit(cache=True, nogil=True)
def _level_search(gc, gh, gs, lc, lh, ls, data, fidx, G, n, up, u, v, origin, bound, rounding, volume,
                  capacity, s, a, b, tol, vol_floor, max_cuts):  # pragma: no cover - compiled
    """The level search of :func:`meshhydro.tanks.level_probe` in one compiled loop: safeguarded
    Newton on the plane offset s (the plane through ``origin + s up``, unit normal ``n``), each trial
    plane cut by :func:`_sweep` and its volume formed as ``kernel._finish`` forms it.

    Returns (k, s, d, sums, green): k the cuts taken, negative when the k-th plane lies on faces of
    the mesh (the caller takes the full path), 0 when ``max_cuts`` did not reach the volume."""
    va, vb = 0.0, capacity
    prev_side = 0
    o = np.empty(3)
    sums = np.zeros(5)
    green = np.zeros(6)
    d = 0.0
    for k in range(1, max_cuts + 1):
        if not a < s < b:
            s = 0.5 * (a + b)
        # the plane through origin + s n, as kernel.cut measures it from the centred origin
        d = n[0] * ((origin[0] + s * up[0]) - origin[0]) + n[1] * ((origin[1] + s * up[1]) - origin[1]) \
            + n[2] * ((origin[2] + s * up[2]) - origin[2])
        for j in range(3):
            o[j] = d * n[j]
        sums, green, _, _, _, _, flat = _sweep(gc, gh, gs, lc, lh, ls, data, fidx, G, n, d,
                                               rounding * (bound + abs(d)), True, o, u, v, False)
        if flat.shape[0] > 0:
            return -k, s, d, sums, green
        vol = sums[0] / 6.0 + green[0] * d / 3.0
        if not vol > vol_floor:
            vol = max(vol, 0.0)
        r = vol - volume
        if abs(r) <= tol:
            return k, s, d, sums, green
        side = 1 if r > 0 else -1
        if side > 0:
            b, vb = s, vol
        else:
            a, va = s, vol
        area = green[0] if green[0] > 0.0 else 0.0
        nxt = s - r / area if area > 0.0 else np.nan
        if not a < nxt < b:
            # false position; bisection when the same end moved twice in a row
            nxt = 0.5 * (a + b) if side == prev_side else a + (b - a) * (volume - va) / (vb - va)
        prev_side = side
        s = nxt
    return 0, s, d, sums, green


@njit(cache=True, nogil=True)
def _level_set(gc, gh, gs, lc, lh, ls, data, fidx, g_off, l_off, G, origins, bounds, floors, n, up, u, v,
               rounding, volumes, caps, s0, lo, hi, tols, max_cuts):  # pragma: no cover - compiled
    """:func:`_level_search` for several meshes at one attitude, each fluid's fields formed as
    ``kernel._finish`` forms them (a plane without faces in it; the same operations in the same
    order). Mesh t's blocks are the rows ``g_off[t]:g_off[t + 1]`` of the group arrays and
    ``l_off[t]:l_off[t + 1]`` of the leaf arrays. Returns per mesh: cuts (as k of
    :func:`_level_search`), volume, centroid (3), waterplane area, its centroid (3), i_l, i_t, i_uv."""
    nt = volumes.shape[0]
    ks = np.zeros(nt, np.int64)
    vol = np.zeros(nt)
    cen = np.zeros((nt, 3))
    area = np.zeros(nt)
    cwp = np.zeros((nt, 3))
    inert = np.zeros((nt, 3))  # i_l, i_t, i_uv
    for t in range(nt):
        g0, g1, l0, l1 = g_off[t], g_off[t + 1], l_off[t], l_off[t + 1]
        k, s, d, sm, g = _level_search(gc[g0:g1], gh[g0:g1], gs[g0:g1], lc[l0:l1], lh[l0:l1], ls[l0:l1],
                                       data[l0:l1], fidx[l0:l1], G, n, up, u, v, origins[t], bounds[t], rounding,
                                       volumes[t], caps[t], s0[t], lo[t], hi[t], tols[t], floors[t], max_cuts)
        ks[t] = k
        a = g[0]
        vt = sm[0] / 6.0 + a * d / 3.0
        if not vt > floors[t]:
            vt = max(vt, 0.0)
        vol[t] = vt
        for j in range(3):
            p = origins[t, j] + s * up[j]
            if vt > floors[t]:
                o = d * n[j]
                cen[t, j] = (sm[1 + j] / 24.0 + d * (a * o + g[1] * u[j] + g[2] * v[j]) / 4.0) / vt + origins[t, j]
            else:
                cen[t, j] = p
            cwp[t, j] = p
        if a > 0.0:
            cu, cv = g[1] / a, g[2] / a
            for j in range(3):
                cwp[t, j] = d * n[j] + cu * u[j] + cv * v[j] + origins[t, j]
            area[t] = a
            inert[t, 0], inert[t, 1], inert[t, 2] = g[3] - a * cu * cu, g[4] - a * cv * cv, g[5] - a * cu * cv
    return ks, vol, cen, area, cwp, inert


def sweep(prep: Prepared, n: np.ndarray, d: float, o: np.ndarray, u: np.ndarray, v: np.ndarray, *,
          cull: bool = True, segments: bool = False) -> PassResult:
    """Run the compiled pass for the plane ``n . x = d`` (centred frame); see :class:`PassResult`."""
    sums, green, ext, segs, sfaces, nseg, flat = _sweep(
        prep.group_center, prep.group_half, prep.group_sums, prep.leaf_center, prep.leaf_half,
        prep.leaf_sums, prep.data, prep.face_index, prep.group_size, n, float(d), prep.rounding(d),
        bool(cull), o, u, v, bool(segments))
    return PassResult(sums, green, ext, int(nseg), segs if segments else None,
                      sfaces if segments else None, flat)


def clip(prep: Prepared, n: np.ndarray, d: float, *, cull: bool = True) -> Clip:
    """The compiled counterpart of :func:`meshhydro.kernel_clip.clip` (same arguments and result)."""
    n = np.asarray(n, dtype=np.float64)
    zero = np.zeros(3)
    r = sweep(prep, n, d, zero, zero, zero, cull=cull, segments=True)
    return Clip(float(r.sums[0]), r.sums[1:4].copy(), float(r.sums[4]), r.segments, r.seg_faces,
                flat_segments_at(prep, r.flat_slots, n, d))


def flat_segments_at(prep: Prepared, slots: np.ndarray, n: np.ndarray, d: float) -> np.ndarray:
    """Waterplane segments (j, 2, 3) of the faces lying in the plane, from their slots."""
    if len(slots) == 0:
        return np.zeros((0, 2, 3))
    rows = prep.data.reshape(-1, 14)[slots]
    return clip_flat_segments(rows[:, :9].reshape(-1, 3, 3), n, d)

"""The reference (numpy) clipping pass of the plane kernel, and its exact rules.

Classification: a vertex is *below* the plane ``n . x = d`` when its signed distance
``s = n . x - d`` (computed element by element, the same way for every face that holds
the vertex) is ``< 0``, and *above* otherwise. The submerged solid is the part of the
mesh strictly below the plane together with its limit at the plane:

* an intersection point on an edge is computed from the edge's below end, or is the
  above end itself when that end lies on the plane (``s == 0``), so the two faces
  sharing an edge produce the identical point and the cut segments close exactly,
  also when the plane passes through vertices or contains edges;
* faces lying in the plane (all three ``s == 0``) are above; the cut segments bound the
  section just below the plane (a deck at the plane is in it, a bottom is not);
* the waterplane is the closed section: that region plus the faces lying in the plane
  that face down (a flat bottom at the plane), less where such a face covers a face
  that faces up (two bodies touching there), returned as the extra segments ``flat``.

Blocks are taken whole only when every corner is below by more than the rounding
allowance of the signed distances, and skipped only when every corner is above by more
than it; everything else is opened and decided face by face, so culling never changes
a result (``cull=False`` opens every block, for tests).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .kernel_prep import Prepared, area_rows, det_rows


@dataclass(frozen=True, eq=False)
class Clip:
    """The clipped state of a hull against one plane (centred frame).

    Attributes
    ----------
    det : float [m³]
        Sum of ``det`` of the submerged face parts (six times their cone volume).
    mom : (3,) float64 [m⁴]
        Sum of ``det (a + b + c)`` of the submerged face parts.
    area : float [m²]
        Wetted area (faces strictly below; faces lying in the plane are not wetted).
    seg : (k, 2, 3) float64 [m]
        Cut segments bounding the section just below the plane, counter-clockwise about n.
    faces : (k,) int64
        Face index (as given to ``prepare``) of each segment.
    flat : (j, 2, 3) float64 [m]
        Extra oriented boundary segments that complete the closed waterplane (faces
        lying in the plane that face down); empty in general position.
    """

    det: float
    mom: np.ndarray
    area: float
    seg: np.ndarray
    faces: np.ndarray
    flat: np.ndarray


def classify(center: np.ndarray, half: np.ndarray, n: np.ndarray, d: float, tol: float) -> tuple[
    np.ndarray, np.ndarray
]:
    """Boxes surely wholly below the plane, and boxes to open (bool arrays (k,)).

    ``tol`` [m] bounds the rounding of the box bound and of any corner's signed distance.
    """
    reach = half @ np.abs(n)
    sc = center @ n - d
    below = sc + reach < -tol
    return below, ~below & ~(sc - reach > tol)


def signed_distances(tri: np.ndarray, n: np.ndarray, d: float) -> np.ndarray:
    """``n . x - d`` (m, 3) for corners (m, 3, 3), element by element (no BLAS reordering)."""
    return tri[..., 0] * n[0] + tri[..., 1] * n[1] + tri[..., 2] * n[2] - d


def _hit(p: np.ndarray, q: np.ndarray, sp: np.ndarray, sq: np.ndarray) -> np.ndarray:
    """Point where edge p (below) -> q (above or on) meets the plane; q itself when sq == 0."""
    return np.where(sq == 0.0, q, p + (q - p) * (sp / (sp - sq)))


def _clip_mixed(t3: np.ndarray, s3: np.ndarray, b3: np.ndarray) -> tuple[float, np.ndarray, float, np.ndarray]:
    """Submerged parts of faces with one or two corners below: det, mom, area, segments."""
    one = b3.sum(axis=1) == 1  # a lone vertex below
    lone = np.where(one, np.argmax(b3, axis=1), np.argmin(b3, axis=1))
    r = np.arange(len(t3))[:, None]
    perm = (lone[:, None] + np.arange(3)[None, :]) % 3
    t3 = t3[r, perm]
    s3 = s3[r, perm]
    a, b, c = t3[:, 0], t3[:, 1], t3[:, 2]
    sa, sb, sc_ = s3[:, 0:1], s3[:, 1:2], s3[:, 2:3]
    o1 = one[:, None]
    pab = np.where(o1, _hit(a, b, sa, sb), _hit(b, a, sb, sa))
    pac = np.where(o1, _hit(a, c, sa, sc_), _hit(c, a, sc_, sa))
    # submerged part: lone below -> (a, pab, pac); lone above -> (pab, b, c) + (pab, c, pac)
    t1a = np.where(o1, a, pab)
    t1b = np.where(o1, pab, b)
    t1c = np.where(o1, pac, c)
    d1 = det_rows(t1a, t1b, t1c)
    d2 = np.where(one, 0.0, det_rows(pab, c, pac))
    mom = d1 @ (t1a + t1b + t1c) + d2 @ (pab + c + pac)
    ar = area_rows(t1a, t1b, t1c).sum() + np.where(one, 0.0, area_rows(pab, c, pac)).sum()
    seg = np.stack([np.where(o1, pac, pab), np.where(o1, pab, pac)], axis=1)
    return float(d1.sum() + d2.sum()), mom, float(ar), seg


def clip_faces(rows: np.ndarray, fidx: np.ndarray, n: np.ndarray, d: float) -> Clip:
    """Clip face slots ``rows`` (m, 14) (layout of ``Prepared.data``) against one plane."""
    tri = rows[:, :9].reshape(-1, 3, 3)
    s = signed_distances(tri, n, d)
    isb = s < 0.0
    cnt = isb.sum(axis=1)
    tot = (cnt == 3).astype(np.float64) @ rows[:, 9:14]
    det, mom, area = float(tot[0]), tot[1:4], float(tot[4])
    mixed = np.flatnonzero((cnt == 1) | (cnt == 2))
    seg = np.zeros((0, 2, 3))
    if len(mixed):
        dd, dm, da, seg = _clip_mixed(tri[mixed], s[mixed], isb[mixed])
        det, mom, area = det + dd, mom + dm, area + da
    on = np.flatnonzero((s == 0.0).all(axis=1))
    flat = flat_segments(tri[on], n, d) if len(on) else np.zeros((0, 2, 3))
    return Clip(det, mom, area, seg, fidx[mixed], flat)


def clip(prep: Prepared, n: np.ndarray, d: float, *, cull: bool = True) -> Clip:
    """Sum the below-plane face products and collect the oriented cap segments.

    Parameters
    ----------
    prep : Prepared
    n : (3,) float64
        Unit normal (the centred frame has the hull frame's directions).
    d : float [m]
        Plane offset in the centred frame: the plane is ``n . x = d``.
    cull : bool
        Take blocks whole or skip them where that is certain (default); False opens
        every block (same result, for tests).
    """
    n = np.asarray(n, dtype=np.float64)
    nl = prep.data.shape[0]
    if not cull:
        leaves = np.arange(nl)
        tot = np.zeros(5)
    else:
        tol = prep.rounding(d)
        gb, gx = classify(prep.group_center, prep.group_half, n, d, tol)
        tot = gb.astype(np.float64) @ prep.group_sums
        G = prep.group_size
        leaves = (np.flatnonzero(gx)[:, None] * G + np.arange(G)).ravel()
        lb, lx = classify(prep.leaf_center[leaves], prep.leaf_half[leaves], n, d, tol)
        tot = tot + lb.astype(np.float64) @ prep.leaf_sums[leaves]
        leaves = leaves[lx]
    if len(leaves) == 0:
        return Clip(float(tot[0]), tot[1:4], float(tot[4]), np.zeros((0, 2, 3)), np.zeros(0, np.int64),
                    np.zeros((0, 2, 3)))
    rows = np.take(prep.data, leaves, axis=0).reshape(-1, 14)
    c = clip_faces(rows, prep.face_index[leaves].ravel(), n, d)
    return Clip(float(tot[0]) + c.det, tot[1:4] + c.mom, float(tot[4]) + c.area, c.seg, c.faces, c.flat)


# ------------------------------------------------------------------ faces lying in the plane


def plane_axes(n: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """In-plane axes (u along projected hull x, v = n x u) for a unit normal n."""
    n0, n1, n2 = float(n[0]), float(n[1]), float(n[2])
    u0, u1, u2 = 1.0 - n0 * n0, -n0 * n1, -n0 * n2
    nu = math.sqrt(u0 * u0 + u1 * u1 + u2 * u2)
    if nu < 1e-9:  # plane perpendicular to x: fall back to projected y
        u0, u1, u2 = -n1 * n0, 1.0 - n1 * n1, -n1 * n2
        nu = math.sqrt(u0 * u0 + u1 * u1 + u2 * u2)
    u0, u1, u2 = u0 / nu, u1 / nu, u2 / nu
    return np.array([u0, u1, u2]), np.array([n1 * u2 - n2 * u1, n2 * u0 - n0 * u2, n0 * u1 - n1 * u0])


def _edges_of(tri: np.ndarray) -> np.ndarray:
    """Boundary segments (3k, 2, 3) of triangles (k, 3, 3) in their own winding."""
    return np.stack([tri, np.roll(tri, -1, axis=1)], axis=2).reshape(-1, 2, 3)


def flat_segments(tri: np.ndarray, n: np.ndarray, d: float) -> np.ndarray:
    """Waterplane segments from faces lying in the plane: down-facing faces, reversed to
    run counter-clockwise about n, less their overlap with up-facing faces."""
    a, b, c = tri[:, 0], tri[:, 1], tri[:, 2]
    orient = np.cross(b - a, c - a) @ n
    down = tri[orient < 0.0][:, ::-1]  # now counter-clockwise about n
    up = tri[orient > 0.0]
    if len(down) == 0:
        return np.zeros((0, 2, 3))
    segs = [_edges_of(down)]
    if len(up):
        u, v = plane_axes(n)
        for poly in _overlaps_2d(down, up, u, v):
            pts = d * n + poly[:, 0:1] * u + poly[:, 1:2] * v
            segs.append(np.stack([np.roll(pts, -1, axis=0), pts], axis=1))  # reversed: subtract
    return np.concatenate(segs)


def _overlaps_2d(down: np.ndarray, up: np.ndarray, u: np.ndarray, v: np.ndarray) -> list[np.ndarray]:
    """Intersection polygons (each (k, 2), counter-clockwise) of every down triangle with
    every up triangle, in plane coordinates (u, v). Triangles within each set do not
    overlap each other in a valid mesh, so the pieces do not overlap either."""
    d2 = np.stack([down @ u, down @ v], axis=-1)  # (p, 3, 2)
    u2 = np.stack([up @ u, up @ v], axis=-1)  # (q, 3, 2)
    dlo, dhi = d2.min(axis=1), d2.max(axis=1)
    ulo, uhi = u2.min(axis=1), u2.max(axis=1)
    near = np.all((dlo[:, None] < uhi[None]) & (ulo[None] < dhi[:, None]), axis=2)
    out = []
    for i, j in zip(*np.nonzero(near), strict=True):
        poly = _clip_convex(d2[i], u2[j])
        if len(poly) >= 3:
            out.append(poly)
    return out


def _clip_convex(subject: np.ndarray, window: np.ndarray) -> np.ndarray:
    """Sutherland-Hodgman: convex polygon ``subject`` (k, 2) clipped to the counter-clockwise
    triangle ``window`` (3, 2)."""
    poly = subject
    for k in range(3):
        if len(poly) == 0:
            break
        p, q = window[k], window[(k + 1) % 3]
        e = q - p
        side = e[0] * (poly[:, 1] - p[1]) - e[1] * (poly[:, 0] - p[0])  # > 0: inside
        nxt = np.roll(poly, -1, axis=0)
        snx = np.roll(side, -1)
        pts = []
        for x, y, sx, sy in zip(poly, nxt, side, snx, strict=True):
            if sx >= 0:
                pts.append(x)
            if (sx >= 0) != (sy >= 0):
                pts.append(x + (y - x) * (sx / (sx - sy)))
        poly = np.array(pts).reshape(-1, 2)
    return poly

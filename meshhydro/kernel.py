"""Exact submerged properties of a closed triangle mesh cut by one plane.

Pure functions over arrays. The submerged part of a closed, outward-oriented
triangle mesh below the plane ``n . x = d`` is a polyhedron bounded by the clipped
faces and the waterplane cap. With the origin O of the (centred) mesh as apex,

* every face (a, b, c) contributes the signed tetrahedron ``det(a, b, c) / 6`` to the
  volume and ``det(a, b, c) (a + b + c) / 24`` to its first moment (divergence theorem);
* the cap is a plane polygon of area A and centroid c at signed distance d from O, so
  it contributes the cone ``A d / 3`` and first moment ``A d c / 4``.

The cap's area, centroid and second moments come from the oriented cut segments by
Green's theorem, so the cap is never triangulated. Faces wholly below the plane need
no clipping; faces are sorted into spatially compact blocks (Morton order) with
bounding boxes and block sums, so only blocks that straddle the plane are opened and
the cost follows the waterline rather than the mesh.

Classification: a vertex is *below* when its signed distance ``n . x - d`` is < 0 and
*above* otherwise. The intersection point on an edge is always computed from its
below end, so the two faces sharing an edge produce the identical point and the cut
segments close exactly, also when the plane passes through vertices, edges or whole
coplanar faces.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import OpenRimError

LEAF_SIZE = 16
GROUP_SIZE = 16


@dataclass(frozen=True, eq=False)
class Prepared:
    """Per-face and per-block products of a mesh, reused across planes.

    Faces are sorted in Morton order of their centroids and grouped into leaves of
    ``L`` faces; leaves are grouped into groups of ``G`` leaves. Both levels carry an
    axis-aligned bounding box and the sums of their faces' products.

    Attributes
    ----------
    origin : (3,) float64 [m], hull frame
        The centring shift: internal coordinates are hull coordinates minus ``origin``.
    vertices : (n, 3) float64 [m], centred
    data : (nl, L, 14) float64
        Per face slot: corners a, b, c (9 values, m, centred), ``det(a, b, c)`` [m³],
        ``det(a, b, c) (a + b + c)`` (3 values, m⁴) and the area [m²]. Padding slots
        are zero-area triangles with zero products.
    face_index : (nl, L) int64
        Index of each slot's face in the original face array (-1 for padding).
    leaf_center, leaf_half : (nl, 3) float64 [m]
        Bounding boxes of the leaves.
    leaf_sums : (nl, 5) float64
        Per leaf: sum of det, of det·(a+b+c) (3) and of area.
    group_center, group_half, group_sums : (ng, 3), (ng, 3), (ng, 5)
        The same for groups of ``G`` consecutive leaves.
    group_size : int
        Leaves per group.
    rim : (r, 3) float64 [m], centred
        Vertices on open boundaries (empty for a closed mesh).
    size : float [m]
        Largest bounding-box extent, for scaled tolerances.
    """

    origin: np.ndarray
    vertices: np.ndarray
    data: np.ndarray
    face_index: np.ndarray
    leaf_center: np.ndarray
    leaf_half: np.ndarray
    leaf_sums: np.ndarray
    group_center: np.ndarray
    group_half: np.ndarray
    group_sums: np.ndarray
    group_size: int
    rim: np.ndarray
    size: float


@dataclass(frozen=True, eq=False)
class Cut:
    """Exact properties of the part of the hull below one plane (hull frame, SI).

    Attributes
    ----------
    point, normal : (3,) float64
        The plane: a point on it [m] and its unit upward normal. Water lies on the
        side opposite the normal.
    volume : float [m³]
        Submerged volume.
    centroid : (3,) float64 [m]
        Centre of the submerged volume (centre of buoyancy). Set to ``point`` when
        the volume is zero (undefined).
    wetted_area : float [m²]
        Area of the hull surface below the plane.
    waterplane_area : float [m²]
        Area of the waterplane (the cap), all loops together.
    waterplane_centroid : (3,) float64 [m]
        Centroid of the waterplane (centre of flotation). ``point`` when area is 0.
    axis_u, axis_v : (3,) float64
        In-plane axes: ``axis_u`` is the hull x axis projected on the plane (the
        waterplane's longitudinal axis), ``axis_v = normal x axis_u`` (transverse,
        towards port).
    inertia_t : float [m⁴]
        Second moment of the waterplane area about the longitudinal axis through its
        centroid, ``∫ v² dA`` (transverse inertia, gives BMt).
    inertia_l : float [m⁴]
        Second moment about the transverse axis through the centroid, ``∫ u² dA``
        (longitudinal inertia, gives BMl).
    inertia_uv : float [m⁴]
        Product of inertia ``∫ u v dA`` about the centroid.
    waterline_length, waterline_breadth : float [m]
        Extents of the waterline along ``axis_u`` and ``axis_v``.
    waterline_x : (2,) float64 [m]
        Smallest and largest hull-frame x of the waterline (aft and fore ends).
    n_segments : int
        Number of cut segments (0 when the plane misses the hull).
    segments : (k, 2, 3) float64 [m] or None
        The oriented cut segments (counter-clockwise about the normal), when asked.
    """

    point: np.ndarray
    normal: np.ndarray
    volume: float
    centroid: np.ndarray
    wetted_area: float
    waterplane_area: float
    waterplane_centroid: np.ndarray
    axis_u: np.ndarray
    axis_v: np.ndarray
    inertia_t: float
    inertia_l: float
    inertia_uv: float
    waterline_length: float
    waterline_breadth: float
    waterline_x: np.ndarray
    n_segments: int
    segments: np.ndarray | None = field(default=None, repr=False)

    @property
    def inertia_tensor(self) -> np.ndarray:
        """Waterplane second-moment tensor (3, 3) about its centroid, hull frame [m⁴]."""
        u, v = self.axis_u, self.axis_v
        return (
            self.inertia_l * np.outer(u, u)
            + self.inertia_t * np.outer(v, v)
            + self.inertia_uv * (np.outer(u, v) + np.outer(v, u))
        )


def _morton(points: np.ndarray) -> np.ndarray:
    """Morton (Z-order) keys (m,) uint64 of points (m, 3) on a 2**10 grid."""
    lo = points.min(axis=0)
    span = np.maximum(points.max(axis=0) - lo, 1e-300)
    q = np.clip(((points - lo) / span * 1023.0).astype(np.uint64), 0, 1023)

    def spread(x: np.ndarray) -> np.ndarray:
        x = x & np.uint64(0x3FF)
        x = (x | (x << np.uint64(16))) & np.uint64(0x30000FF)
        x = (x | (x << np.uint64(8))) & np.uint64(0x300F00F)
        x = (x | (x << np.uint64(4))) & np.uint64(0x30C30C3)
        x = (x | (x << np.uint64(2))) & np.uint64(0x9249249)
        return x

    return spread(q[:, 0]) | (spread(q[:, 1]) << np.uint64(1)) | (spread(q[:, 2]) << np.uint64(2))


def _det_rows(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Row-wise ``a . (b x c)`` for arrays (..., 3)."""
    return (
        a[..., 0] * (b[..., 1] * c[..., 2] - b[..., 2] * c[..., 1])
        + a[..., 1] * (b[..., 2] * c[..., 0] - b[..., 0] * c[..., 2])
        + a[..., 2] * (b[..., 0] * c[..., 1] - b[..., 1] * c[..., 0])
    )


def _area_rows(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Row-wise triangle areas for corner arrays (..., 3)."""
    e, f = b - a, c - a
    x = e[..., 1] * f[..., 2] - e[..., 2] * f[..., 1]
    y = e[..., 2] * f[..., 0] - e[..., 0] * f[..., 2]
    z = e[..., 0] * f[..., 1] - e[..., 1] * f[..., 0]
    return 0.5 * np.sqrt(x * x + y * y + z * z)


def _boxes(lo: np.ndarray, hi: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return 0.5 * (lo + hi), 0.5 * (hi - lo)


def prepare(
    vertices: np.ndarray,
    faces: np.ndarray,
    *,
    rim_vertices: np.ndarray | None = None,
    leaf_size: int = LEAF_SIZE,
    group_size: int = GROUP_SIZE,
) -> Prepared:
    """Precompute the per-face and per-block products of a mesh.

    Parameters
    ----------
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int
        Outward-oriented triangles (counter-clockwise seen from outside).
    rim_vertices : (r,) int, optional
        Indices of vertices on open boundaries; a plane that puts any of them under
        water raises :class:`OpenRimError`.
    leaf_size, group_size : int
        Faces per leaf block and leaves per group.
    """
    v = np.asarray(vertices, dtype=np.float64)
    f = np.asarray(faces, dtype=np.int64)
    lo, hi = v.min(axis=0), v.max(axis=0)
    origin = 0.5 * (lo + hi)
    vc = v - origin
    tri = vc[f]  # (m, 3, 3)
    order = np.argsort(_morton(tri.mean(axis=1)), kind="stable")
    m = len(f)
    L, G = int(leaf_size), int(group_size)
    nl = max(1, -(-m // L))
    nl = -(-nl // G) * G  # whole groups
    ng = nl // G
    tri_s = np.empty((nl * L, 3, 3))
    tri_s[:m] = tri[order]
    tri_s[m:] = tri_s[m - 1, 0]  # padding: degenerate triangles at a real vertex
    idx = -np.ones(nl * L, dtype=np.int64)
    idx[:m] = order
    a, b, c = tri_s[:, 0], tri_s[:, 1], tri_s[:, 2]
    det = _det_rows(a, b, c)
    mom = det[:, None] * (a + b + c)
    area = _area_rows(a, b, c)
    det[m:] = 0.0
    mom[m:] = 0.0
    area[m:] = 0.0
    data = np.concatenate(
        [tri_s.reshape(-1, 9), det[:, None], mom, area[:, None]], axis=1
    ).reshape(nl, L, 14)
    corners = tri_s.reshape(nl, L * 3, 3)
    llo, lhi = corners.min(axis=1), corners.max(axis=1)
    lsum = data[:, :, 9:14].sum(axis=1)
    glo = llo.reshape(ng, G, 3).min(axis=1)
    ghi = lhi.reshape(ng, G, 3).max(axis=1)
    gsum = lsum.reshape(ng, G, 5).sum(axis=1)
    lc, lh = _boxes(llo, lhi)
    gc, gh = _boxes(glo, ghi)
    rim = (
        vc[np.asarray(rim_vertices, dtype=np.int64)]
        if rim_vertices is not None and len(rim_vertices)
        else np.zeros((0, 3))
    )
    return Prepared(
        origin=origin,
        vertices=vc,
        data=data,
        face_index=idx.reshape(nl, L),
        leaf_center=lc,
        leaf_half=lh,
        leaf_sums=lsum,
        group_center=gc,
        group_half=gh,
        group_sums=gsum,
        group_size=G,
        rim=rim,
        size=float(np.max(hi - lo)) if m else 0.0,
    )


def _plane_axes(n: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """In-plane axes (u along projected hull x, v = n x u) for a unit normal n."""
    u = np.array([1.0, 0.0, 0.0]) - n[0] * n
    nu = np.linalg.norm(u)
    if nu < 1e-9:  # plane perpendicular to x: fall back to projected y
        u = np.array([0.0, 1.0, 0.0]) - n[1] * n
        nu = np.linalg.norm(u)
    u = u / nu
    return u, np.cross(n, u)


@dataclass(frozen=True, eq=False)
class _Clip:
    """Internal: the clipped state of the hull against one plane (centred frame)."""

    det: float
    mom: np.ndarray
    area: float
    seg: np.ndarray  # (k, 2, 3) cap segments, CCW about n
    faces: np.ndarray  # (k,) original face index of each segment


def _classify(
    center: np.ndarray, half: np.ndarray, n: np.ndarray, d: float
) -> tuple[np.ndarray, np.ndarray]:
    """Boxes wholly below the plane, and boxes that straddle it (bool arrays)."""
    reach = half @ np.abs(n)
    sc = center @ n - d
    below = sc + reach < 0.0
    return below, ~below & (sc - reach < 0.0)


def clip(prep: Prepared, n: np.ndarray, d: float) -> _Clip:
    """Sum the below-plane face products and collect the oriented cap segments.

    Parameters
    ----------
    prep : Prepared
    n : (3,) float64
        Unit normal (the centred frame has the hull frame's directions).
    d : float [m]
        Plane offset in the centred frame: the plane is ``n . x = d``.
    """
    gb, gx = _classify(prep.group_center, prep.group_half, n, d)
    tot = gb.astype(np.float64) @ prep.group_sums
    empty = _Clip(float(tot[0]), tot[1:4], float(tot[4]), np.zeros((0, 2, 3)), np.zeros(0, np.int64))
    if not gx.any():
        return empty
    G = prep.group_size
    leaves = (np.flatnonzero(gx)[:, None] * G + np.arange(G)).ravel()
    lb, lx = _classify(prep.leaf_center[leaves], prep.leaf_half[leaves], n, d)
    tot = tot + lb.astype(np.float64) @ prep.leaf_sums[leaves]
    empty = _Clip(float(tot[0]), tot[1:4], float(tot[4]), np.zeros((0, 2, 3)), np.zeros(0, np.int64))
    if not lx.any():
        return empty
    cl = leaves[lx]
    rows = np.take(prep.data, cl, axis=0).reshape(-1, 14)
    tri = rows[:, :9].reshape(-1, 3, 3)
    s = (tri.reshape(-1, 3) @ n).reshape(-1, 3) - d  # (m, 3) signed distances
    isb = s < 0.0
    cnt = isb[:, 0].astype(np.int8) + isb[:, 1] + isb[:, 2]
    tot = tot + (cnt == 3).astype(np.float64) @ rows[:, 9:14]
    mixed = np.flatnonzero((cnt == 1) | (cnt == 2))
    if len(mixed) == 0:
        return _Clip(float(tot[0]), tot[1:4], float(tot[4]), np.zeros((0, 2, 3)), np.zeros(0, np.int64))
    t3 = tri[mixed]
    s3 = s[mixed]
    b3 = isb[mixed]
    one = cnt[mixed] == 1  # a lone vertex below
    lone = np.where(one, np.argmax(b3, axis=1), np.argmin(b3, axis=1))
    r = np.arange(len(t3))[:, None]
    perm = (lone[:, None] + np.arange(3)[None, :]) % 3
    t3 = t3[r, perm]
    s3 = s3[r, perm]
    a, b, c = t3[:, 0], t3[:, 1], t3[:, 2]
    sa, sb, sc_ = s3[:, 0:1], s3[:, 1:2], s3[:, 2:3]
    o1 = one[:, None]
    # each intersection is computed from its below end: bit-identical in both faces
    pab = np.where(o1, a + (b - a) * (sa / (sa - sb)), b + (a - b) * (sb / (sb - sa)))
    pac = np.where(o1, a + (c - a) * (sa / (sa - sc_)), c + (a - c) * (sc_ / (sc_ - sa)))
    # submerged part: lone below -> (a, pab, pac); lone above -> (pab, b, c) + (pab, c, pac)
    t1a = np.where(o1, a, pab)
    t1b = np.where(o1, pab, b)
    t1c = np.where(o1, pac, c)
    d1 = _det_rows(t1a, t1b, t1c)
    d2 = np.where(one, 0.0, _det_rows(pab, c, pac))
    mom = tot[1:4] + d1 @ (t1a + t1b + t1c) + d2 @ (pab + c + pac)
    ar = _area_rows(t1a, t1b, t1c).sum() + np.where(one, 0.0, _area_rows(pab, c, pac)).sum()
    seg = np.stack([np.where(o1, pac, pab), np.where(o1, pab, pac)], axis=1)
    fidx = prep.face_index[cl].ravel()[mixed]
    return _Clip(float(tot[0] + d1.sum() + d2.sum()), mom, float(tot[4] + ar), seg, fidx)


def waterplane_moments(
    seg: np.ndarray, origin: np.ndarray, u: np.ndarray, v: np.ndarray
) -> tuple[float, float, float, float, float, float]:
    """Green's-theorem moments of the region bounded by oriented segments.

    Parameters
    ----------
    seg : (k, 2, 3) float64 [m]
        Oriented boundary segments, counter-clockwise about ``u x v``.
    origin : (3,) float64 [m]
        Origin of the in-plane coordinates.
    u, v : (3,) float64
        Orthonormal in-plane axes.

    Returns
    -------
    A, Su, Sv, Suu, Svv, Suv : float
        ``∫dA, ∫u dA, ∫v dA, ∫u² dA, ∫v² dA, ∫uv dA`` about ``origin``.
    """
    if len(seg) == 0:
        return 0.0, 0.0, 0.0, 0.0, 0.0, 0.0
    rel = seg - origin
    uu = rel @ u
    vv = rel @ v
    u1, u2 = uu[:, 0], uu[:, 1]
    v1, v2 = vv[:, 0], vv[:, 1]
    cr = u1 * v2 - u2 * v1
    a = 0.5 * cr.sum()
    su = ((u1 + u2) * cr).sum() / 6.0
    sv = ((v1 + v2) * cr).sum() / 6.0
    suu = ((u1 * u1 + u1 * u2 + u2 * u2) * cr).sum() / 12.0
    svv = ((v1 * v1 + v1 * v2 + v2 * v2) * cr).sum() / 12.0
    suv = ((u1 * v2 + 2 * u1 * v1 + 2 * u2 * v2 + u2 * v1) * cr).sum() / 24.0
    return float(a), float(su), float(sv), float(suu), float(svv), float(suv)


def check_rim(prep: Prepared, n: np.ndarray, d: float) -> None:
    """Raise :class:`OpenRimError` when an open-rim vertex lies below the plane."""
    if len(prep.rim) == 0:
        return
    s = prep.rim @ n - d
    tol = 1e-9 * max(prep.size, 1.0)
    k = int(np.argmin(s))
    if s[k] < -tol:
        z = float(prep.rim[k, 2] + prep.origin[2])
        raise OpenRimError(
            f"the waterplane reaches an open rim of the mesh (rim point at z = {z:.4f} m "
            f"is {-s[k]:.4f} m under water): the submerged part is not closed"
        )


def cut(
    prep: Prepared,
    point: np.ndarray,
    normal: np.ndarray,
    *,
    segments: bool = False,
) -> Cut:
    """Exact submerged properties below the plane through ``point`` with ``normal``.

    Parameters
    ----------
    prep : Prepared
        From :func:`prepare`.
    point : (3,) float64 [m], hull frame
        Any point on the plane.
    normal : (3,) float64, hull frame
        Upward normal (normalised here); water lies on the side opposite it.
    segments : bool
        Also return the cut segments (hull frame).

    Raises
    ------
    OpenRimError
        If an open rim of the mesh lies below the plane.
    """
    n = np.asarray(normal, dtype=np.float64)
    n = n / np.linalg.norm(n)
    p_hull = np.asarray(point, dtype=np.float64)
    p = p_hull - prep.origin
    d = float(n @ p)
    check_rim(prep, n, d)
    cl = clip(prep, n, d)
    u, v = _plane_axes(n)
    o = d * n  # foot of the centred origin on the plane
    a, su, sv, suu, svv, suv = waterplane_moments(cl.seg, o, u, v)
    if a > 0.0:
        cu, cv = su / a, sv / a
        c_wp = o + cu * u + cv * v
        i_l = suu - a * cu * cu
        i_t = svv - a * cv * cv
        i_uv = suv - a * cu * cv
    else:
        a, c_wp, i_l, i_t, i_uv = 0.0, p, 0.0, 0.0, 0.0
    vol = cl.det / 6.0 + a * d / 3.0
    mom = cl.mom / 24.0 + a * d * c_wp / 4.0
    if len(cl.seg):
        pts = cl.seg.reshape(-1, 3)
        pu = (pts - o) @ u
        pv = (pts - o) @ v
        lwl = float(pu.max() - pu.min())
        bwl = float(pv.max() - pv.min())
        wx = np.array([pts[:, 0].min(), pts[:, 0].max()]) + prep.origin[0]
    else:
        lwl = bwl = 0.0
        wx = np.array([p_hull[0], p_hull[0]])
    tol = 1e-12 * max(prep.size, 1.0) ** 3
    if vol > tol:
        centroid = mom / vol + prep.origin
    else:
        vol = max(vol, 0.0)
        centroid = p_hull.copy()
    return Cut(
        point=p_hull.copy(),
        normal=n,
        volume=float(vol),
        centroid=centroid,
        wetted_area=float(cl.area),
        waterplane_area=float(a),
        waterplane_centroid=c_wp + prep.origin if a > 0 else p_hull.copy(),
        axis_u=u,
        axis_v=v,
        inertia_t=float(i_t),
        inertia_l=float(i_l),
        inertia_uv=float(i_uv),
        waterline_length=lwl,
        waterline_breadth=bwl,
        waterline_x=wx,
        n_segments=int(len(cl.seg)),
        segments=(cl.seg + prep.origin) if segments else None,
    )


def total_volume(prep: Prepared) -> tuple[float, np.ndarray]:
    """Volume [m³] and centroid (3,) [m, hull frame] of the whole closed mesh."""
    s = prep.group_sums.sum(axis=0)
    vol = float(s[0] / 6.0)
    c = s[1:4] / 24.0 / vol + prep.origin if vol != 0 else prep.origin.copy()
    return vol, c


def section_area(
    prep: Prepared,
    x: float,
    water_point: np.ndarray,
    water_normal: np.ndarray,
) -> tuple[float, float]:
    """Area [m²] of the transverse section at hull-frame ``x`` below a waterplane.

    The section's cut segments (oriented about +x) are clipped to below the
    waterplane; with the in-section origin on the waterline, the closing segments
    along the waterline add nothing to Green's integral.

    Returns
    -------
    area : float [m²]
    z_moment : float [m³]
        First moment of that area about the hull baseline z = 0.
    """
    ex = np.array([1.0, 0.0, 0.0])
    dx = float(x - prep.origin[0])
    cl = clip(prep, ex, dx)
    if len(cl.seg) == 0:
        return 0.0, 0.0
    seg = cl.seg  # CCW about +x, centred
    nw = np.asarray(water_normal, float)
    nw = nw / np.linalg.norm(nw)
    dw = float(nw @ (np.asarray(water_point, float) - prep.origin))
    s = seg @ nw - dw  # (k, 2)
    p, q = seg[:, 0], seg[:, 1]
    sp, sq = s[:, 0], s[:, 1]
    keep = (sp < 0) | (sq < 0)
    p, q, sp, sq = p[keep], q[keep], sp[keep], sq[keep]
    # clip the parts above water
    split = (sp < 0) != (sq < 0)  # one end below, the other above or on the line
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(split, sp / np.where(split, sp - sq, 1.0), 0.0)[:, None]
    mid = p + (q - p) * t
    p2 = np.where((sp >= 0)[:, None], mid, p)
    q2 = np.where((sq >= 0)[:, None], mid, q)
    segc = np.stack([p2, q2], axis=1)
    # in-section axes: b along the projection of the water normal, a = b x ex
    nb_ = nw - nw[0] * ex
    nrm = np.linalg.norm(nb_)
    if nrm < 1e-12:
        raise ValueError("waterplane is parallel to the section plane")
    eb = nb_ / nrm
    ea = np.cross(eb, ex)
    # origin on the line where both planes meet: x = dx, nw . o = dw, o in span(ex, eb)
    o = dx * ex + eb * ((dw - nw[0] * dx) / (nw @ eb))
    # z moment: ∫ z dA with z = (o + a ea + b eb)_z + origin_z
    a_, sa, sb, _, _, _ = waterplane_moments(segc, o, ea, eb)
    zc = (o[2] + prep.origin[2]) * a_ + ea[2] * sa + eb[2] * sb
    return float(a_), float(zc)

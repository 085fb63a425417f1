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
bounding boxes and block sums (:mod:`meshhydro.kernel_prep`), so only blocks that may
touch the plane are opened and the cost follows the waterline rather than the mesh.
The exact rules for vertices, edges and faces lying in the plane, and the conservative
block test, are in :mod:`meshhydro.kernel_clip` (the numpy reference pass); a compiled
pass with the same rules sits beside it in :mod:`meshhydro.kernel_compiled`.
"""
from __future__ import annotations

import math
import os
from dataclasses import dataclass, field

import numpy as np

from . import kernel_compiled
from .errors import InputError, OpenRimError
from .kernel_clip import Clip, plane_axes
from .kernel_clip import clip as clip_numpy
from .kernel_prep import GROUP_SIZE, LEAF_SIZE, Prepared, prepare

__all__ = [
    "Clip", "Cut", "GROUP_SIZE", "LEAF_SIZE", "Prepared", "check_rim", "clip", "cut", "extent_along",
    "prepare", "section_area", "total_volume", "unit_normal", "waterplane_moments",
]


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


def unit_normal(normal: np.ndarray) -> np.ndarray:
    """The unit vector (3,) along ``normal``, scaled before normalising so that huge or
    tiny components neither overflow nor underflow.

    Raises
    ------
    InputError
        When the normal is not three finite numbers or is the zero vector.
    """
    n = np.asarray(normal, dtype=np.float64).reshape(-1)
    if n.shape != (3,):
        raise InputError(f"normal must be three finite numbers, got {normal!r}")
    x0, x1, x2 = n.tolist()  # Python floats: the same IEEE arithmetic, less overhead
    if not (math.isfinite(x0) and math.isfinite(x1) and math.isfinite(x2)):
        raise InputError(f"normal must be three finite numbers, got {normal!r}")
    big = max(abs(x0), abs(x1), abs(x2))
    if big == 0.0:
        raise InputError("normal must not be the zero vector")
    x0, x1, x2 = x0 / big, x1 / big, x2 / big
    r = math.sqrt(x0 * x0 + x1 * x1 + x2 * x2)
    return np.array([x0 / r, x1 / r, x2 / r])


#: Kernel pass used when ``backend`` is not given: "compiled" when numba imports, else
#: "numpy"; the environment variable ``MESHHYDRO_KERNEL=numpy`` forces the reference pass.
DEFAULT_BACKEND = (
    "numpy" if os.environ.get("MESHHYDRO_KERNEL", "").lower() == "numpy" or not kernel_compiled.AVAILABLE
    else "compiled"
)


def resolve_backend(backend: str | None) -> str:
    """The kernel backend to use: ``backend`` or the default, checked (InputError when unknown or unavailable)."""
    name = DEFAULT_BACKEND if backend is None else backend
    if name not in ("numpy", "compiled"):
        raise InputError(f"kernel backend must be 'numpy' or 'compiled', got {backend!r}")
    if name == "compiled" and not kernel_compiled.AVAILABLE:
        raise InputError("the compiled kernel needs numba, which cannot be imported here")
    return name


def clip(prep: Prepared, n: np.ndarray, d: float, *, cull: bool = True, backend: str | None = None) -> Clip:
    """Face sums and oriented cut segments for the plane ``n . x = d`` (centred frame, unit n).

    See :func:`meshhydro.kernel_clip.clip`; ``backend`` as in :func:`cut`.
    """
    if resolve_backend(backend) == "compiled":
        return kernel_compiled.clip(prep, n, d, cull=cull)
    return clip_numpy(prep, n, d, cull=cull)


def _pass_numpy(prep: Prepared, n: np.ndarray, d: float, o: np.ndarray, u: np.ndarray, v: np.ndarray,
                cull: bool) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Reference pass: face sums (5,), Green moments (6,) of the section below, all
    waterplane segments (in + flat) and the flat ones."""
    cl = clip_numpy(prep, n, d, cull=cull)
    sums = np.concatenate([[cl.det], cl.mom, [cl.area]])
    green = np.array(waterplane_moments(cl.seg, o, u, v))
    wseg = np.concatenate([cl.seg, cl.flat]) if len(cl.flat) else cl.seg
    return sums, green, wseg, cl.flat


def _extent_rows(seg: np.ndarray, o: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Least and greatest u, v and x (6,) over segment ends (inf when there are none)."""
    if len(seg) == 0:
        return np.array([np.inf, -np.inf, np.inf, -np.inf, np.inf, -np.inf])
    pts = seg.reshape(-1, 3)
    pu = (pts - o) @ u
    pv = (pts - o) @ v
    return np.array([pu.min(), pu.max(), pv.min(), pv.max(), pts[:, 0].min(), pts[:, 0].max()])


def cut(
    prep: Prepared,
    point: np.ndarray,
    normal: np.ndarray,
    *,
    segments: bool = False,
    cull: bool = True,
    backend: str | None = None,
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
    cull : bool
        Take or skip whole blocks where that is certain (default); False opens every
        block and must give the same result (for tests).
    backend : {"compiled", "numpy"}, optional
        The kernel pass; default :data:`DEFAULT_BACKEND`. Both give the same result
        (to rounding in the order of summation).

    Raises
    ------
    OpenRimError
        If an open rim of the mesh lies below the plane.
    InputError
        If the normal is zero or not finite, or the backend is unknown.
    """
    n = unit_normal(normal)
    p_hull = np.asarray(point, dtype=np.float64)
    p = p_hull - prep.origin
    d = float(n @ p)
    check_rim(prep, n, d)
    u, v = plane_axes(n)
    o = d * n  # foot of the centred origin on the plane
    if resolve_backend(backend) == "compiled":
        r = kernel_compiled.sweep(prep, n, d, o, u, v, cull=cull, segments=segments)
        return finish_compiled(prep, p_hull, n, d, u, v, o, r, segments)
    sums, green, wseg, flat = _pass_numpy(prep, n, d, o, u, v, cull)
    ext, nseg = _extent_rows(wseg, o, u, v), len(wseg) - len(flat)
    wseg = wseg if segments else None
    return _finish(prep, p_hull, n, d, u, v, o, sums, green, flat, ext, nseg + len(flat), wseg)


def finish_compiled(prep: Prepared, p_hull: np.ndarray, n: np.ndarray, d: float, u: np.ndarray,
                     v: np.ndarray, o: np.ndarray, r: kernel_compiled.PassResult, segments: bool) -> Cut:
    """:func:`_finish` for a compiled pass ``r``, with the faces lying in the plane added."""
    ext, wseg = r.extent, r.segments
    flat = kernel_compiled.flat_segments_at(prep, r.flat_slots, n, d)
    if len(flat):
        ext = _merge_extents(ext, _extent_rows(flat, o, u, v))
        wseg = np.concatenate([wseg, flat]) if segments else None
    return _finish(prep, p_hull, n, d, u, v, o, r.sums, r.green, flat, ext, r.n_segments + len(flat), wseg)


def _merge_extents(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return np.array([min(a[0], b[0]), max(a[1], b[1]), min(a[2], b[2]), max(a[3], b[3]),
                     min(a[4], b[4]), max(a[5], b[5])])


def cap_volume(det_sum: float, area: float, d: float, tol: float) -> float:
    """Volume [m³] below the plane ``n . x = d`` (centred frame): the submerged faces' determinant sum over 6
    plus the cap cone of the section of ``area`` [m²]; clamped at zero when not above ``tol``."""
    vol = det_sum / 6.0 + area * d / 3.0
    return vol if vol > tol else max(vol, 0.0)


def volume_centroid(sums: list[float], green3: list[float], d: float, tol: float, ol: list[float], ul: list[float],
                    vl: list[float], org: list[float], p_hull: np.ndarray) -> tuple[float, np.ndarray]:
    """(volume [m³], centroid (3,) [m, hull frame]) below the plane ``n . x = d`` (centred frame) from a pass's
    face sums (det, det·(a+b+c), ...) and the first three Green moments of the section (A, Su, Sv about
    ``o`` on u, v), with the cap cone added; a volume not above ``tol`` is clamped at zero and its centroid
    is ``p_hull``. Plain floats (lists ``ol, ul, vl`` = o, u, v; ``org`` the centring origin), the same
    operations in the same order wherever a cut is finished."""
    a_in, g1, g2 = green3
    vol = cap_volume(sums[0], a_in, d, tol)
    if not vol > tol:
        return vol, p_hull.copy()
    return vol, np.array([(sm / 24.0 + d * (a_in * oi + g1 * ui + g2 * vi) / 4.0) / vol + ri
                          for sm, oi, ui, vi, ri in zip(sums[1:4], ol, ul, vl, org)])


def waterplane_fields(g: list[float], ol: list[float], ul: list[float], vl: list[float], org: list[float],
                      p_hull: np.ndarray) -> tuple[float, np.ndarray, float, float, float]:
    """(area [m²], centroid (3,) [m, hull frame], i_l, i_t, i_uv [m⁴] about it) of a waterplane from its
    Green moments ``g`` (A, Su, Sv, Suu, Svv, Suv about o on u, v); an empty waterplane has its centroid at
    ``p_hull``. Plain floats, as :func:`volume_centroid`."""
    a, su, sv, suu, svv, suv = g
    if not a > 0.0:
        return 0.0, p_hull.copy(), 0.0, 0.0, 0.0
    cu, cv = su / a, sv / a
    c_wp = np.array([oi + cu * ui + cv * vi + ri for oi, ui, vi, ri in zip(ol, ul, vl, org)])
    return a, c_wp, suu - a * cu * cu, svv - a * cv * cv, suv - a * cu * cv


def _finish(prep: Prepared, p_hull: np.ndarray, n: np.ndarray, d: float, u: np.ndarray, v: np.ndarray,
            o: np.ndarray, sums: np.ndarray, green: np.ndarray, flat: np.ndarray, ext: np.ndarray,
            nseg: int, wseg: np.ndarray | None) -> Cut:
    """Volume and centroid with the cap cone, waterplane properties, extents: a :class:`Cut`.

    Works on Python floats (the same IEEE operations in the same order as on the arrays; on
    3-vectors numpy's cost per call would outweigh the arithmetic)."""
    ol, ul, vl, org = o.tolist(), u.tolist(), v.tolist(), prep.origin.tolist()
    tol = 1e-12 * max(prep.size, 1.0) ** 3
    vol, centroid = volume_centroid(sums.tolist(), green[:3].tolist(), d, tol, ol, ul, vl, org, p_hull)
    g = green
    if len(flat):  # faces lying in the plane complete the closed waterplane
        g = green + np.array(waterplane_moments(flat, o, u, v))
        if abs(g[0]) <= 1e-13 * max(prep.size, 1e-300) ** 2:
            g = np.zeros(6)
    a, c_wp, i_l, i_t, i_uv = waterplane_fields(g.tolist(), ol, ul, vl, org, p_hull)
    if nseg:
        e = ext.tolist()
        lwl, bwl = e[1] - e[0], e[3] - e[2]
        wx = np.array([e[4] + org[0], e[5] + org[0]])
    else:
        lwl, bwl, wx = 0.0, 0.0, np.array([p_hull[0], p_hull[0]])
    return Cut(
        point=p_hull.copy(), normal=n, volume=float(vol), centroid=centroid,
        wetted_area=float(sums[4]), waterplane_area=float(a), waterplane_centroid=c_wp,
        axis_u=u, axis_v=v, inertia_t=float(i_t), inertia_l=float(i_l), inertia_uv=float(i_uv),
        waterline_length=lwl, waterline_breadth=bwl, waterline_x=wx, n_segments=int(nseg),
        segments=(wseg + prep.origin) if wseg is not None else None,
    )


def total_volume(prep: Prepared) -> tuple[float, np.ndarray]:
    """Volume [m³] and centroid (3,) [m, hull frame] of the whole closed mesh."""
    s = prep.group_sums.sum(axis=0)
    vol = float(s[0] / 6.0)
    c = s[1:4] / 24.0 / vol + prep.origin if vol != 0 else prep.origin.copy()
    return vol, c


def extent_along(prep: Prepared, normal: np.ndarray) -> tuple[float, float]:
    """Least and greatest ``n . x`` [m] over the hull's vertices (hull frame), from the blocks.

    Only blocks whose bounds can hold an extreme are opened, so the cost follows the
    surface near the extremes. The values are those of the vertices, widened by the
    kernel's rounding allowance, so ``lo <= n . x <= hi`` holds for every vertex
    (a safe bracket for a draft search); ``n`` is normalised here.
    """
    n = unit_normal(normal)
    tol = prep.rounding(0.0)
    off = float(n @ prep.origin)
    lo = _least(prep, n, tol)
    hi = -_least(prep, -n, tol)
    return lo + off - tol, hi + off + tol


def _least(prep: Prepared, n: np.ndarray, tol: float) -> float:
    """Least ``n . x`` over the face corners (centred frame)."""
    an = np.abs(n)
    gl = prep.group_center @ n - prep.group_half @ an
    gu = prep.group_center @ n + prep.group_half @ an
    groups = np.flatnonzero(gl <= gu.min() + 2 * tol)
    G = prep.group_size
    leaves = (groups[:, None] * G + np.arange(G)).ravel()
    ll = prep.leaf_center[leaves] @ n - prep.leaf_half[leaves] @ an
    lu = prep.leaf_center[leaves] @ n + prep.leaf_half[leaves] @ an
    leaves = leaves[ll <= lu.min() + 2 * tol]
    c = prep.data[leaves, :, :9].reshape(-1, 3)
    return float((c[:, 0] * n[0] + c[:, 1] * n[1] + c[:, 2] * n[2]).min())


def section_area(
    prep: Prepared,
    x: float,
    water_point: np.ndarray,
    water_normal: np.ndarray,
) -> tuple[float, float]:
    """Area [m²] of the transverse section at hull-frame ``x`` below a waterplane.

    The section is the closed section at ``x`` (a transom lying in it counts); its
    oriented outline is clipped to below the waterplane; with the in-section origin on
    the waterline, the closing segments along the waterline add nothing to Green's
    integral.

    Returns
    -------
    area : float [m²]
    z_moment : float [m³]
        First moment of that area about the hull baseline z = 0.
    """
    ex = np.array([1.0, 0.0, 0.0])
    dx = float(x - prep.origin[0])
    cl = clip(prep, ex, dx)
    seg = np.concatenate([cl.seg, cl.flat]) if len(cl.flat) else cl.seg  # CCW about +x, centred
    if len(seg) == 0:
        return 0.0, 0.0
    nw = unit_normal(water_normal)
    dw = float(nw @ (np.asarray(water_point, float) - prep.origin))
    s = seg[..., 0] * nw[0] + seg[..., 1] * nw[1] + seg[..., 2] * nw[2] - dw  # (k, 2)
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

"""Per-face and per-block products of a mesh, prepared once and reused for every plane.

Faces are sorted in Morton order of their centroids into leaves of ``L`` faces, and
leaves into groups of ``G`` leaves; both levels carry a bounding box and the sums of
their faces' products, so a plane only opens the blocks it may touch. Faces with a
repeated vertex index (two or three identical corners) bound nothing and are left out.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import kernel_build
from .mesh_topology import degenerate_faces

LEAF_SIZE = 16
GROUP_SIZE = 16
#: Relative rounding allowance of a signed distance ``n . x - d`` (in units of
#: ``coord_bound + |d|``); far above the worst error (a few ulp) of the block and vertex sums.
ROUNDING = 1e-13


@dataclass(frozen=True, eq=False)
class Prepared:
    """Per-face and per-block products of a mesh, reused across planes.

    Attributes
    ----------
    origin : (3,) float64 [m], hull frame
        The centring shift: internal coordinates are hull coordinates minus ``origin``.
    vertices : (n, 3) float64 [m], centred
    data : (nl, L, 14) float64
        Per face slot: corners a, b, c (9 values, m, centred), ``det(a, b, c)`` [m³],
        ``det(a, b, c) (a + b + c)`` (3 values, m⁴) and the area [m²]. Padding slots
        repeat one real vertex three times and have zero products.
    face_index : (nl, L) int64
        Index of each slot's face in the face array given to :func:`prepare` (-1 for padding).
    leaf_center, leaf_half : (nl, 3) float64 [m]
        Bounding boxes of the leaves (centred frame).
    leaf_sums : (nl, 5) float64
        Per leaf: sum of det, of det·(a+b+c) (3) and of area.
    group_center, group_half, group_sums : (ng, 3), (ng, 3), (ng, 5)
        The same for groups of ``group_size`` consecutive leaves.
    group_size : int
        Leaves per group.
    rim : (r, 3) float64 [m], centred
        Vertices on open boundaries (empty for a closed mesh).
    size : float [m]
        Largest bounding-box extent, for scaled tolerances.
    coord_bound : float [m]
        Sum over the axes of the largest absolute centred coordinate: bounds ``|n . x|``
        for any unit normal, and so the rounding of every signed distance.
    n_dropped : int
        Faces left out because two or three of their corners are the same vertex.
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
    coord_bound: float
    n_dropped: int = 0

    def rounding(self, d: float) -> float:
        """Allowance [m] on a computed signed distance to the plane ``n . x = d``."""
        return ROUNDING * (self.coord_bound + abs(d))


def _morton(points: np.ndarray) -> np.ndarray:
    """Morton (Z-order) keys (m,) uint64 of points (m, 3) on a 2**10 grid."""
    lo = points.min(axis=0)
    span = np.maximum(points.max(axis=0) - lo, 1e-300)
    q = np.clip(((points - lo) / span * 1023.0).astype(np.uint64), 0, 1023)
    spread = kernel_build.spread_bits
    return spread(q[:, 0]) | (spread(q[:, 1]) << np.uint64(1)) | (spread(q[:, 2]) << np.uint64(2))


def det_rows(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Row-wise ``a . (b x c)`` for arrays (..., 3)."""
    return (
        a[..., 0] * (b[..., 1] * c[..., 2] - b[..., 2] * c[..., 1])
        + a[..., 1] * (b[..., 2] * c[..., 0] - b[..., 0] * c[..., 2])
        + a[..., 2] * (b[..., 0] * c[..., 1] - b[..., 1] * c[..., 0])
    )


def area_rows(a: np.ndarray, b: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Row-wise triangle areas for corner arrays (..., 3)."""
    e, f = b - a, c - a
    x = e[..., 1] * f[..., 2] - e[..., 2] * f[..., 1]
    y = e[..., 2] * f[..., 0] - e[..., 0] * f[..., 2]
    z = e[..., 0] * f[..., 1] - e[..., 1] * f[..., 0]
    return 0.5 * np.sqrt(x * x + y * y + z * z)


def _block_data(tri_s: np.ndarray, m: int, nl: int, L: int) -> np.ndarray:
    """Slot table (nl, L, 14) from sorted, padded corners (nl*L, 3, 3)."""
    a, b, c = tri_s[:, 0], tri_s[:, 1], tri_s[:, 2]
    det = det_rows(a, b, c)
    mom = det[:, None] * (a + b + c)
    area = area_rows(a, b, c)
    det[m:] = 0.0
    mom[m:] = 0.0
    area[m:] = 0.0
    return np.concatenate([tri_s.reshape(-1, 9), det[:, None], mom, area[:, None]], axis=1).reshape(nl, L, 14)


def _build_numpy(vc: np.ndarray, f: np.ndarray, L: int, nl: int) -> tuple[np.ndarray, ...]:
    """Morton order (m,), slot table (nl, L, 14), leaf bounds and sums, with numpy."""
    m = len(f)
    tri = vc[f]  # (m, 3, 3)
    order = np.argsort(_morton(tri.mean(axis=1)), kind="stable") if m else np.zeros(0, np.int64)
    tri_s = np.empty((nl * L, 3, 3))
    tri_s[:m] = tri[order]
    tri_s[m:] = tri_s[m - 1, 0] if m else 0.0  # padding: a real vertex three times
    data = _block_data(tri_s, m, nl, L)
    corners = tri_s.reshape(nl, L * 3, 3)
    return order, data, corners.min(axis=1), corners.max(axis=1), data[:, :, 9:14].sum(axis=1)


def prepare(
    vertices: np.ndarray,
    faces: np.ndarray,
    *,
    rim_vertices: np.ndarray | None = None,
    leaf_size: int = LEAF_SIZE,
    group_size: int = GROUP_SIZE,
    compiled: bool = True,
) -> Prepared:
    """Precompute the per-face and per-block products of a mesh.

    Parameters
    ----------
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int
        Outward-oriented triangles (counter-clockwise seen from outside). Faces with a
        repeated vertex index are left out (they bound no area; the health report
        names them).
    rim_vertices : (r,) int, optional
        Indices of vertices on open boundaries; a plane that puts any of them under
        water raises :class:`~meshhydro.errors.OpenRimError`.
    leaf_size, group_size : int
        Faces per leaf block and leaves per group.
    compiled : bool
        Build the tables with the compiled pass when numba is there (same tables).
    """
    v = np.asarray(vertices, dtype=np.float64)
    f_all = np.asarray(faces, dtype=np.int64).reshape(-1, 3)
    keep = ~degenerate_faces(f_all) if len(f_all) else np.zeros(0, bool)
    kept = np.flatnonzero(keep)
    f = f_all[kept] if len(kept) < len(f_all) else f_all
    used = np.zeros(len(v), dtype=bool)
    used[f.ravel()] = True
    lo, hi = (v[used].min(axis=0), v[used].max(axis=0)) if len(f) else (np.zeros(3), np.zeros(3))
    origin = 0.5 * (lo + hi)
    vc = v - origin
    m = len(f)
    L, G = int(leaf_size), int(group_size)
    nl = max(1, -(-m // L))
    nl = -(-nl // G) * G  # whole groups
    ng = nl // G
    if compiled and kernel_build.AVAILABLE and m:
        order = np.argsort(kernel_build.morton_keys(vc, f), kind="stable")
        data, llo, lhi, lsum = kernel_build.build_leaves(vc, f, order, L, nl)
    else:
        order, data, llo, lhi, lsum = _build_numpy(vc, f, L, nl)
    idx = -np.ones(nl * L, dtype=np.int64)
    idx[:m] = kept[order]
    glo = llo.reshape(ng, G, 3).min(axis=1)
    ghi = lhi.reshape(ng, G, 3).max(axis=1)
    gsum = lsum.reshape(ng, G, 5).sum(axis=1)
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
        leaf_center=0.5 * (llo + lhi),
        leaf_half=0.5 * (lhi - llo),
        leaf_sums=lsum,
        group_center=0.5 * (glo + ghi),
        group_half=0.5 * (ghi - glo),
        group_sums=gsum,
        group_size=G,
        rim=rim,
        size=float(np.max(hi - lo)) if m else 0.0,
        coord_bound=float(np.maximum(np.abs(llo), np.abs(lhi)).max(axis=0).sum()),
        n_dropped=int(len(f_all) - m),
    )

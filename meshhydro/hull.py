"""The hull's geometry: a checked mesh with read-only arrays and cached products, forwarding to the kernels.

Floating and stability methods sit on :class:`meshhydro.vessel.FloatingHull`, above the solver;
:func:`meshhydro.load_hull` returns one.
"""
from __future__ import annotations

import math
from functools import cached_property
from typing import Any, Sequence

import numpy as np

from . import hydrostatics as _hs
from . import kernel
from .errors import InputError, InvalidMeshError
from . import tolerances as tol
from .frames import SEA_WATER, up_vector
from .mesh import HealthReport, MeshData


def vec3(value: Any, name: str) -> np.ndarray:
    """``value`` as a finite (3,) float64 array; InputError naming ``name`` otherwise."""
    try:
        a = np.asarray(value, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be three numbers, got {value!r}") from None
    if a.shape != (3,) or not np.all(np.isfinite(a)):
        raise InputError(f"{name} must be three finite numbers, got {value!r}")
    return a


def _frozen(a: np.ndarray, dtype: type) -> np.ndarray:
    out = np.array(a, dtype=dtype)
    out.flags.writeable = False
    return out


class Hull:
    """A usable hull: vertices and faces in the hull frame plus cached kernel products.

    Build it with :func:`meshhydro.load_hull`. The arrays are read-only copies, so the cached
    products cannot go stale; make a new hull for a changed mesh. Coordinates are metres in the hull frame
    (x forward, y to port, z up); angles are degrees (see :mod:`meshhydro.frames`).

    Attributes
    ----------
    vertices : (n, 3) float64 [m]
    faces : (m, 3) int64
    report : HealthReport
    name : str
    x_ref : float [m]
        Longitudinal position of the draft reference point ``(x_ref, 0, T)``.
    x_aft, x_fore : float [m]
        Where drafts aft and fore are read (perpendiculars or draft marks); default the hull's ends.
    """

    def __init__(self, mesh: MeshData, report: HealthReport, *, name: str | None = None,
                 x_ref: float | None = None, x_aft: float | None = None,
                 x_fore: float | None = None) -> None:
        if not report.usable:
            raise InvalidMeshError(report.problems[0])
        self.vertices = _frozen(mesh.vertices, np.float64)
        self.faces = _frozen(mesh.faces, np.int64)
        self.report = report
        self.name = name or mesh.source
        lo, hi = _frozen(report.bounds[0], np.float64), _frozen(report.bounds[1], np.float64)
        self.bounds = (lo, hi)
        self.x_ref = float(0.5 * (lo[0] + hi[0]) if x_ref is None else x_ref)
        self.x_aft = float(lo[0] if x_aft is None else x_aft)
        self.x_fore = float(hi[0] if x_fore is None else x_fore)
        for name, v in (("x_ref", self.x_ref), ("x_aft", self.x_aft), ("x_fore", self.x_fore)):
            if not math.isfinite(v):
                raise InputError(f"{name} must be a finite x [m], got {v!r}")
        if not self.x_aft < self.x_fore:
            raise InputError(f"x_fore ({self.x_fore:g} m) must lie forward of x_aft ({self.x_aft:g} m)")
        rim_vertices = self._rim_vertices()
        self._prep = kernel.prepare(self.vertices, self.faces, rim_vertices=rim_vertices)
        #: volume [m³] and centroid (3,) of the whole mesh; meaningful only when the mesh is closed
        self.total_volume, self.total_centroid = kernel.total_volume(self._prep)

    def _rim_vertices(self) -> np.ndarray:
        if self.report.closed:
            return np.zeros(0, dtype=np.int64)
        from .mesh import _edges

        e = _edges(self.faces)
        b = (e["n_tot"] == 1) | (e["n_fwd"] != e["n_tot"] - e["n_fwd"])
        return np.unique(np.concatenate([e["lo"][b], e["hi"][b]]))

    # ---------------------------------------------------------------- geometry
    @property
    def length(self) -> float:
        """Overall length of the mesh along x [m]."""
        return float(self.bounds[1][0] - self.bounds[0][0])

    @property
    def breadth(self) -> float:
        """Overall breadth along y [m]."""
        return float(self.bounds[1][1] - self.bounds[0][1])

    @property
    def depth(self) -> float:
        """Overall height along z [m]."""
        return float(self.bounds[1][2] - self.bounds[0][2])

    @property
    def size(self) -> float:
        return float(max(self.length, self.breadth, self.depth))

    @cached_property
    def is_symmetric(self) -> bool:
        """True when the mesh is its own mirror image in y (to :data:`~meshhydro.tolerances.SYMMETRY` of its size)."""
        from scipy.spatial import cKDTree

        v = self.vertices
        d, _ = cKDTree(v).query(v * np.array([1.0, -1.0, 1.0]), k=1)
        return bool(np.max(d) <= tol.SYMMETRY * max(self.size, tol.TINY_LENGTH))

    @cached_property
    def deck_edge(self) -> np.ndarray:
        """Deck-edge vertices (k, 3) [m], read-only: see :func:`deck_edge_points`."""
        return _frozen(deck_edge_points(self.vertices, self.faces, self.bounds), np.float64)

    @property
    def prepared(self) -> kernel.Prepared:
        return self._prep

    def plane(self, draft: float, heel: float = 0.0, trim: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
        """Point (3,) and unit normal (3,) of the waterplane at draft, heel, trim."""
        return np.array([self.x_ref, 0.0, float(draft)]), up_vector(heel, trim)

    def cut(self, point: Sequence[float] = (0.0, 0.0, 0.0), normal: Sequence[float] = (0.0, 0.0, 1.0),
            *, segments: bool = False) -> kernel.Cut:
        """Exact properties of the part of the hull below a plane.

        Parameters
        ----------
        point : (3,) [m], hull frame
            A point on the plane.
        normal : (3,), hull frame
            Upward normal; water lies on the side opposite it.
        segments : bool
            Also return the waterline segments.
        """
        p = vec3(point, "point")
        n = vec3(normal, "normal")
        if not np.any(n):  # kernel.cut scales before normalising
            raise InputError("normal must not be the zero vector")
        return kernel.cut(self._prep, p, n, segments=segments)

    def hydrostatics(self, draft: float, heel: float = 0.0, trim: float = 0.0,
                     density: float = SEA_WATER) -> _hs.Hydrostatics:
        """Hydrostatic particulars at ``draft`` [m], heel and trim [deg], density [t/m³]."""
        return _hs.compute(self._prep, draft, heel=heel, trim=trim, density=density, x_ref=self.x_ref)

    def rim_draft(self, heel: float = 0.0, trim: float = 0.0) -> float | None:
        """Draft T [m] at which the water first reaches an open rim at this heel and trim [deg]
        (None for a closed mesh): the rim's lowest point along the waterplane normal."""
        rim = self._prep.rim
        if len(rim) == 0:
            return None
        n = up_vector(heel, trim)
        if abs(n[2]) < tol.DRAFT_DEFINED:
            return None
        depth = float(((rim + self._prep.origin - np.array([self.x_ref, 0.0, 0.0])) @ n).min())
        return depth / float(n[2])

    def table(self, drafts: Sequence[float], heel: float = 0.0, trim: float = 0.0,
              density: float = SEA_WATER) -> list[_hs.Hydrostatics]:
        """Hydrostatics at each draft of ``drafts`` [m]."""
        return [self.hydrostatics(float(t), heel, trim, density) for t in drafts]

    def __repr__(self) -> str:
        return (f"Hull({self.name!r}, faces={len(self.faces)}, L={self.length:.3f} m, "
                f"B={self.breadth:.3f} m, D={self.depth:.3f} m)")


def deck_edge_points(vertices: np.ndarray, faces: np.ndarray,
                     bounds: tuple[np.ndarray, np.ndarray]) -> np.ndarray:
    """Deck-edge vertices (k, 3) [m]: shared by an upward-facing face (n_z > 0.5) and a
    side face (|n_z| < 0.5), in the upper half of the hull's height. Empty when the
    mesh has no such edge (a rounded top).

    vertices : (n, 3) float64 [m]; faces : (m, 3) int; bounds : ((3,), (3,)) [m]
    """
    v, f = vertices, faces
    nrm = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    ln = np.linalg.norm(nrm, axis=1)
    ok = ln > 0
    nz = np.zeros(len(f))
    nz[ok] = nrm[ok, 2] / ln[ok]
    deck = np.zeros(len(v), bool)
    side = np.zeros(len(v), bool)
    deck[f[ok & (nz > 0.5)].ravel()] = True
    side[f[ok & (np.abs(nz) < 0.5)].ravel()] = True
    zmid = 0.5 * (bounds[0][2] + bounds[1][2])
    sel = deck & side & (v[:, 2] > zmid)
    return v[sel]

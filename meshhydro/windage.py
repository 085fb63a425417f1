"""Lateral windage from the mesh: projected area above the waterline, its centroid, and the
wind lever Z.

Upright at trim θ the water surface is the plane through (x_ref, ·, T) with the normal
n = (−sin θ, 0, cos θ) in the hull frame. That normal has no y part, so the plane is a
cylinder along y and the projection onto the centreplane (x, z) of "the part of a
triangle above the plane" is exactly "the projected triangle ∩ the half-plane above the
projected waterline". The silhouette is the union (shapely) of the projected triangles;
clipping it at the waterline gives the windage area A above and the underwater lateral
area below, with exact polygon areas and centroids for the polyhedral mesh (to
floating-point rounding of the polygon overlay).

Z is the vertical distance, measured along n (the earth vertical), from the centroid of A
down to the centroid of the underwater lateral area (``lever_to="underwater_centre"``) or
to half the draught below the waterline (``lever_to="half_draft"``).

Windage items add to A: a stated area with its centroid (x, z) [m², m], added as given
(the user makes sure it does not overlap the hull's silhouette), or a closed mesh whose
above-water silhouette is united with the hull's (overlaps count once).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from .errors import InputError

LEVER_TO = ("underwater_centre", "half_draft")


@dataclass(frozen=True)
class WindageItem:
    """A windage item: ``area`` [m²] with ``centroid`` (x, z) [m, hull frame], or a mesh
    given as ``vertices`` (n, 3) [m, hull frame] and ``faces`` (m, 3)."""

    name: str
    area: float | None = None
    centroid: tuple[float, float] | None = None
    vertices: np.ndarray | None = None
    faces: np.ndarray | None = None


def windage_item(name: str, *, area: float | None = None, centroid: Sequence[float] | None = None,
                 mesh: Any = None) -> WindageItem:
    """Check and build a ``[[windage]]`` entry: area + centroid = [x, z], or mesh = a trimesh
    object / (vertices, faces) pair already in the hull frame (the case reader loads the file)."""
    where = f"windage {name!r}"
    if mesh is not None:
        if area is not None or centroid is not None:
            raise InputError(f"{where}: give either mesh or area and centroid, not both")
        v, f = (mesh.vertices, mesh.faces) if hasattr(mesh, "vertices") else mesh
        v, f = np.asarray(v, float), np.asarray(f, np.int64)
        if v.ndim != 2 or v.shape[1] != 3 or f.ndim != 2 or f.shape[1] != 3 or len(f) == 0:
            raise InputError(f"{where}: mesh must have (n, 3) vertices and (m, 3) faces")
        if not np.all(np.isfinite(v)) or f.min() < 0 or f.max() >= len(v):
            raise InputError(f"{where}: mesh has non-finite vertices or face indices out of range")
        return WindageItem(name, vertices=v, faces=f)
    if area is None or centroid is None:
        raise InputError(f"{where}: needs area and centroid = [x, z] (or mesh)")
    a = float(area)
    c = np.asarray(centroid, float).reshape(-1)
    if not (math.isfinite(a) and a >= 0):
        raise InputError(f"{where}: area must be a number ≥ 0, got {area!r}")
    if c.shape != (2,) or not np.all(np.isfinite(c)):
        raise InputError(f"{where}: centroid must be [x, z], got {centroid!r}")
    return WindageItem(name, area=a, centroid=(float(c[0]), float(c[1])))


def silhouette(vertices: np.ndarray, faces: np.ndarray, *, closed: bool = False) -> Any:
    """Union of the triangles projected onto the centreplane (x, z): a shapely geometry.

    vertices (n, 3) [m], faces (m, 3). Triangles seen edge-on (zero projected area) add
    nothing to the union and are skipped. ``closed``: the mesh is closed with outward
    normals; then only the faces facing +y are united, since every line along y that
    meets the solid leaves it through such a face: the same silhouette (up to sets of no
    area) for half the work."""
    import shapely

    p = np.asarray(vertices, float)[np.asarray(faces)][:, :, [0, 2]]  # (m, 3, 2)
    # cross product of the projected edges: the y component of the face normal, negated
    cr = (p[:, 1, 0] - p[:, 0, 0]) * (p[:, 2, 1] - p[:, 0, 1]) - (p[:, 1, 1] - p[:, 0, 1]) * (p[:, 2, 0] - p[:, 0, 0])
    p = p[cr < 0] if closed else p[cr != 0]
    if len(p) == 0:
        return shapely.Polygon()
    rings = np.concatenate([p, p[:, :1]], axis=1)
    return shapely.unary_union(shapely.polygons(rings))


def half_planes(point: Sequence[float], trim: float, size: float) -> tuple[Any, Any]:
    """(above, below) half-planes of the centreplane about the waterline through ``point``
    (x, z) [m] at ``trim`` [deg], as rectangles reaching ``size`` [m] beyond everything."""
    import shapely

    th = math.radians(trim)
    n = np.array([-math.sin(th), math.cos(th)])
    d = np.array([math.cos(th), math.sin(th)])
    p = np.asarray(point, float)
    r = float(size)
    a, b = p - r * d, p + r * d
    above = shapely.Polygon([a, b, b + r * n, a + r * n])
    below = shapely.Polygon([a, b, b - r * n, a - r * n])
    return above, below


def _area_centroid(geom: Any) -> tuple[float, np.ndarray | None]:
    if geom.is_empty or geom.area == 0:
        return 0.0, None
    c = geom.centroid
    return float(geom.area), np.array([c.x, c.y])


@dataclass(frozen=True)
class Windage:
    """Windage at one waterline (hull frame; m, m²).

    area, centroid (2,) (x, z): total lateral windage above water, items included;
    hull_area: the hull's own part; underwater_area, underwater_centroid (2,);
    z: wind lever Z [m]; lever_to: how Z was measured; items: name → (area, (x, z)), for a
    mesh item its own above-water silhouette (in the total, overlaps with the hull count once).
    above, below: the shapely silhouettes (for drawing).
    """

    area: float
    centroid: np.ndarray
    hull_area: float
    underwater_area: float
    underwater_centroid: np.ndarray | None
    z: float
    lever_to: str
    draft: float
    trim: float
    items: dict[str, tuple[float, tuple[float, float]]]
    above: Any = None
    below: Any = None


def windage(vertices: np.ndarray, faces: np.ndarray, *, draft: float, trim: float = 0.0, x_ref: float = 0.0,
            items: Sequence[WindageItem] = (), lever_to: str = "underwater_centre",
            mean_draft: float | None = None, closed: bool = False) -> Windage:
    """Lateral windage of a hull mesh upright at ``draft`` [m] (at ``x_ref``) and ``trim`` [deg].

    Parameters
    ----------
    vertices : (n, 3) [m], faces : (m, 3)    hull mesh in the hull frame
    items : windage items (:func:`windage_item`)
    lever_to : "underwater_centre" | "half_draft"
    mean_draft : float [m], optional
        The d of "half the draught" (default ``draft``).
    closed : bool
        The hull mesh is closed with outward normals (see :func:`silhouette`).
    """
    if lever_to not in LEVER_TO:
        raise InputError(f"windage: lever_to must be one of {', '.join(LEVER_TO)}, got {lever_to!r}")
    v = np.asarray(vertices, float)
    pts = [v[:, [0, 2]]] + [it.vertices[:, [0, 2]] for it in items if it.vertices is not None]
    allp = np.vstack(pts)
    size = 10.0 * float(np.abs(allp).max() + abs(draft) + abs(x_ref) + 1.0)
    above_hp, below_hp = half_planes((x_ref, draft), trim, size)
    sil = silhouette(v, faces, closed=closed)
    hull_above = sil.intersection(above_hp)
    below = sil.intersection(below_hp)
    import shapely

    geoms = [hull_above]
    out_items: dict[str, tuple[float, tuple[float, float]]] = {}
    for it in items:
        if it.vertices is not None:
            g = silhouette(it.vertices, it.faces).intersection(above_hp)
            a, c = _area_centroid(g)
            out_items[it.name] = (a, (float(c[0]), float(c[1])) if c is not None else (math.nan, math.nan))
            geoms.append(g)
    above = shapely.unary_union(geoms)
    a_mesh, c_mesh = _area_centroid(above)
    total, moment = a_mesh, (a_mesh * c_mesh if c_mesh is not None else np.zeros(2))
    for it in items:
        if it.vertices is None:
            out_items[it.name] = (float(it.area), it.centroid)
            total += it.area
            moment = moment + it.area * np.asarray(it.centroid)
    if total <= 0:
        raise InputError("windage: nothing of the hull or its items stands above the waterline")
    cen = moment / total
    ua, uc = _area_centroid(below)
    th = math.radians(trim)
    n = np.array([-math.sin(th), math.cos(th)])
    height = float((cen - np.array([x_ref, draft])) @ n)
    if lever_to == "underwater_centre":
        if uc is None:
            raise InputError("windage: no underwater lateral area (the hull does not reach the water)")
        z = float((cen - uc) @ n)
    else:
        z = height + 0.5 * float(draft if mean_draft is None else mean_draft)
    return Windage(total, cen, _area_centroid(hull_above)[0], ua, uc, z, lever_to, float(draft), float(trim),
                   out_items, above, below)

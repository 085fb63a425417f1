"""Flooded compartments by the lost-buoyancy method.

A compartment is a closed mesh inside the hull with a permeability μ (0 < μ <= 1, the
share of its volume the sea can fill). Open to the sea, it loses the buoyancy of μ
times its part below the outside waterplane at every attitude, and μ times its cut
area is lost from the waterplane. :func:`flooded_cut` turns the hull's kernel cut and
the compartments' cuts at the same plane into one :class:`~meshhydro.kernel.Cut` of the
net (intact minus lost) buoyant body, so the solver can use it exactly like a hull cut:
the displacement stays that of the intact ship and the weight does not change
(textbook lost-buoyancy method, e.g. Barrass & Derrett; Rawson & Tupper).

Frames and units: hull frame (x forward, y to port, z up), m, m², m³, m⁴.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any, Sequence

import numpy as np

from . import kernel
from .errors import InputError
from .mesh import check_mesh
from .tanks import body_mesh, box_mesh, closed_body, require_closed

#: A net volume or waterplane area below this fraction of the intact one counts as none.
NET_RTOL = 1e-12


@dataclass(frozen=True, eq=False)
class Compartment:
    """A checked compartment mesh with its permeability and kernel products.

    Attributes
    ----------
    name : str
    permeability : float [-], 0 < μ <= 1
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int64, outward oriented
    prepared : kernel.Prepared
    volume : float [m³]
        Moulded volume of the compartment (before μ).
    source : str
    """

    name: str
    permeability: float
    vertices: np.ndarray
    faces: np.ndarray
    prepared: kernel.Prepared
    volume: float
    source: str


def _permeability(value: Any, name: str) -> float:
    try:
        mu = float(value)
    except (TypeError, ValueError):
        raise InputError(f"compartment {name!r}: permeability must be a number, got {value!r}") from None
    if not (math.isfinite(mu) and 0.0 < mu <= 1.0):
        raise InputError(f"compartment {name!r}: permeability {value!r} is outside 0 < μ <= 1")
    return mu


def make_compartment(name: str, vertices: np.ndarray, faces: np.ndarray, *, permeability: float,
                     source: str) -> Compartment:
    """A compartment from a checked closed mesh (hull frame, m)."""
    mu = _permeability(permeability, name)
    prep = kernel.prepare(vertices, faces)
    vol, _ = kernel.total_volume(prep)
    if not vol > 0.0:
        raise InputError(f"compartment {name!r} ({source}): encloses no volume ({vol:.6g} m³)")
    return Compartment(str(name), mu, np.asarray(vertices, float), np.asarray(faces, np.int64), prep,
                       float(vol), source)


def compartment_from_box(name: str, corners: Any, *, permeability: float) -> Compartment:
    """A box compartment from two opposite corners ``[[x, y, z], [x, y, z]]`` [m, hull frame]."""
    v, f = box_mesh(corners, f"compartment {name!r}")
    return make_compartment(name, v, f, permeability=permeability, source="box")


def compartment_from_mesh(name: str, source: Any, *, permeability: float, units: str = "m",
                          forward: str = "+x", up: str = "+z",
                          offset: Sequence[float] = (0.0, 0.0, 0.0)) -> Compartment:
    """A compartment from its own mesh file (or trimesh), mapped to the hull frame like a hull."""
    md, rep = check_mesh(source, units=units, forward=forward, up=up, offset=tuple(offset))
    require_closed(rep, f"compartment {name!r} ({md.source})")
    return make_compartment(name, md.vertices, md.faces, permeability=permeability, source=md.source)


def compartment_from_body(name: str, mesh: Any, report: Any, body: int, *, permeability: float) -> Compartment:
    """A compartment from body ``body`` of an already-checked mesh (``MeshData``, ``HealthReport``)."""
    what = f"compartment {name!r}"
    v, f = body_mesh(mesh.vertices, mesh.faces, report, body, what)
    v, f = closed_body(v, f, f"{what} (body {body} of {report.source})")
    return make_compartment(name, v, f, permeability=permeability, source=f"body {body} of {report.source}")


def _plane_moments(c: kernel.Cut, o: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """[A, ∫u, ∫v, ∫u², ∫v², ∫uv] of a cut's waterplane about ``o`` in the axes (u, v)."""
    a = c.waterplane_area
    if a == 0.0:
        return np.zeros(6)
    t = c.inertia_tensor
    r = c.waterplane_centroid - o
    ru, rv = float(r @ u), float(r @ v)
    return np.array([a, a * ru, a * rv, u @ t @ u + a * ru * ru, v @ t @ v + a * rv * rv,
                     u @ t @ v + a * ru * rv])


def flooded_cut(hull_cut: kernel.Cut, compartments: Sequence[Compartment]) -> kernel.Cut:
    """The net buoyant body (hull minus μ × flooded compartments) below ``hull_cut``'s plane.

    Parameters
    ----------
    hull_cut : kernel.Cut
        The intact hull cut at the waterplane (``point``, ``normal``).
    compartments : sequence of Compartment
        Flooded compartments, each open to the sea; each is cut at the same plane.

    Returns
    -------
    kernel.Cut
        ``volume`` = V_hull - Σ μ V_c, ``centroid`` the centre of that net volume;
        ``waterplane_area`` = A_hull - Σ μ A_c with its centroid, and ``inertia_t``,
        ``inertia_l``, ``inertia_uv`` about the net waterplane's own centroid in the
        hull cut's axes. ``wetted_area``, the waterline extents and segments stay the
        hull's (the outside shell).
    """
    if not compartments:
        return hull_cut
    p, n = hull_cut.point, hull_cut.normal
    u, v = hull_cut.axis_u, hull_cut.axis_v
    o = hull_cut.waterplane_centroid
    vol = hull_cut.volume
    mom = hull_cut.volume * hull_cut.centroid
    wp = _plane_moments(hull_cut, o, u, v)
    for comp in compartments:
        cc = kernel.cut(comp.prepared, p, n)
        mu = comp.permeability
        vol -= mu * cc.volume
        mom = mom - mu * cc.volume * cc.centroid
        wp = wp - mu * _plane_moments(cc, o, u, v)
    if vol > NET_RTOL * hull_cut.volume:
        centroid = mom / vol
    else:
        vol, centroid = max(vol, 0.0), p.copy()
    a = float(wp[0])
    if a > NET_RTOL * hull_cut.waterplane_area:
        cu, cv = wp[1] / a, wp[2] / a
        c_wp = o + cu * u + cv * v
        i_l, i_t, i_uv = wp[3] - a * cu * cu, wp[4] - a * cv * cv, wp[5] - a * cu * cv
    else:
        a, c_wp, i_l, i_t, i_uv = max(a, 0.0), p.copy(), 0.0, 0.0, 0.0
    return replace(hull_cut, volume=float(vol), centroid=np.asarray(centroid, float), waterplane_area=a,
                   waterplane_centroid=np.asarray(c_wp, float), inertia_t=float(i_t), inertia_l=float(i_l),
                   inertia_uv=float(i_uv))


def lost_buoyancy(hull_cut: kernel.Cut, compartments: Sequence[Compartment]) -> list[dict[str, Any]]:
    """Per compartment at ``hull_cut``'s plane: name, μ, lost volume μ V_c [m³], lost waterplane μ A_c [m²]."""
    rows = []
    for comp in compartments:
        cc = kernel.cut(comp.prepared, hull_cut.point, hull_cut.normal)
        rows.append({"name": comp.name, "permeability": comp.permeability,
                     "lost_volume": comp.permeability * cc.volume,
                     "lost_waterplane": comp.permeability * cc.waterplane_area})
    return rows

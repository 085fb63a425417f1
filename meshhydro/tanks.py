"""Tanks: closed meshes holding fluid whose free surface stays level at every attitude.

A tank is a closed, outward-oriented mesh in the hull frame (x forward, y to port,
z up; metres) with a fluid density [t/m³]. At an attitude the earth's upward vertical
seen in the hull frame is ``up(φ, θ)`` (:func:`meshhydro.frames.up_vector`); the fluid
of volume V fills the tank below the plane ``up · x = s`` whose offset s holds V. That
part is exactly a kernel cut of the tank's own :class:`~meshhydro.kernel.Prepared`, so
its volume, centroid, free-surface area and free-surface second moments are exact
(no sampling). The offset is found by a safeguarded Newton iteration
(dV/ds = free-surface area), bracketed by the tank's extent along ``up`` and
warm-started from the previous attitude's free surface.

Fills are given as a volume [m³], a fraction of capacity (0..1) or a sounding [m]:
the vertical depth of fluid above the tank's *sounding point*, which by default is
the lowest point of the tank upright (the mean of the vertices at the least z; for a
flat-bottomed tank that is a point on its bottom). Full and empty tanks are exact
special cases that need no cut.

The fluid of several tanks as one load is :class:`meshhydro.fluid.FluidLoad`.
Nothing here prints, exits or knows the command line; inputs are checked once and
bad values raise :class:`~meshhydro.errors.InputError` naming the tank and the value.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from . import kernel
from .errors import InputError, InvalidMeshError, NotConvergedError, finite_number
from .kernel_level import PlaneFamily, Probe
from .mesh import check_mesh

#: Relative volume tolerance of the level solve (times the tank's capacity).
LEVEL_VOLUME_RTOL = 1e-10
#: Most kernel cuts one level solve may take before it gives up.
LEVEL_MAX_CUTS = 60
#: Relative tolerance (times the tank's volume) for fluid volume found outside the hull.
INSIDE_RTOL = 1e-9
#: Vertices within this fraction of the tank size of the least z count as lowest.
LOWEST_RTOL = 1e-9
#: The upright vertical in the hull frame.
UP_UPRIGHT = np.array([0.0, 0.0, 1.0])


@dataclass(frozen=True, eq=False)
class Tank:
    """A checked tank mesh with its kernel products.

    Build it with :func:`tank_from_box`, :func:`tank_from_mesh` or :func:`tank_from_body`.

    Attributes
    ----------
    name : str
    density : float [t/m³]
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int64, outward oriented
    prepared : kernel.Prepared
    capacity : float [m³]
        Volume of the closed mesh.
    centroid_full : (3,) float64 [m], hull frame
        Centroid of the whole tank (of its fluid when full).
    sounding_point : (3,) float64 [m], hull frame
        Where soundings are taken from (default: the lowest point upright).
    source : str
        Where the mesh came from (file, body of a file, or box), for messages.
    """

    name: str
    density: float
    vertices: np.ndarray
    faces: np.ndarray
    prepared: kernel.Prepared
    capacity: float
    centroid_full: np.ndarray
    sounding_point: np.ndarray
    source: str

    @property
    def size(self) -> float:
        """Largest bounding-box extent [m]."""
        return float(self.prepared.size)

    def volume_for(self, *, volume: float | None = None, fraction: float | None = None,
                   sounding: float | None = None) -> float:
        """Fluid volume [m³] for exactly one of: volume [m³], fraction (0..1), sounding [m] upright."""
        given = [k for k, x in (("volume", volume), ("fraction", fraction), ("sounding", sounding))
                 if x is not None]
        if len(given) != 1:
            raise InputError(f"tank {self.name!r}: give exactly one of volume, fraction, sounding "
                             f"(got {', '.join(given) or 'none'})")
        kind = given[0]
        x = finite_number(volume if kind == "volume" else fraction if kind == "fraction" else sounding,
                    f"tank {self.name!r}: {kind}")
        if kind == "volume":
            if not 0.0 <= x <= self.capacity:
                raise InputError(f"tank {self.name!r}: volume {x:.6g} m³ is outside 0..{self.capacity:.6g} m³ "
                                 f"(its capacity)")
            return x
        if kind == "fraction":
            if not 0.0 <= x <= 1.0:
                raise InputError(f"tank {self.name!r}: fill fraction {x:.6g} is outside 0..1")
            return x * self.capacity
        return sounding_volume(self, x, UP_UPRIGHT)

    def state(self, up: np.ndarray, volume: float, *, guess: np.ndarray | None = None) -> "TankState":
        """The fluid of ``volume`` [m³] with its surface level at attitude ``up`` (3,), hull frame.

        ``guess`` (3,) [m] is a point near the free surface (warm start), e.g. the
        previous attitude's ``TankState.level_point``.
        """
        return tank_state(self, up, volume, guess=guess)


_NO_INERTIA = np.zeros((3, 3))
_NO_INERTIA.flags.writeable = False


@dataclass(frozen=True)
class TankState:
    """The fluid of one tank at one attitude (hull frame, SI).

    Attributes
    ----------
    name : str
    volume : float [m³]
    mass : float [t]
    centroid : (3,) float64 [m], hull frame
        Centre of the fluid. For an empty tank (undefined) the lowest tank point
        along ``normal``; its mass is zero then.
    free_surface_area : float [m²]
    i_t, i_l : float [m⁴]
        Second moments of the free surface about its own centroid: about the axis
        along the hull x projected on the surface (``i_t``, gives the transverse
        free-surface moment ``ρ i_t``) and about the axis across it (``i_l``).
    normal : (3,) float64
        The upward vertical (free-surface normal) of this attitude.
    level_point : (3,) float64 [m], hull frame
        A point of the free surface (its centroid; full/empty: the highest/lowest tank point).
    sounding : float [m]
        Vertical depth of the surface above the sounding point, ``normal · (level_point - sounding_point)``.
    cuts : int
        Kernel cuts this state took (0 for full and empty tanks).
    inertia_tensor : (3, 3) float64 [m⁴], hull frame
        Second-moment tensor of the free surface about its centroid, ∫ (x - F)(x - F)ᵀ dA
        (zeros for full and empty tanks). Tilting the surface by dn moves the fluid's
        first moment by -J dn (volume held), which gives the exact rate of the fluid shift.
    """

    name: str
    volume: float
    mass: float
    centroid: np.ndarray
    free_surface_area: float
    i_t: float
    i_l: float
    normal: np.ndarray
    level_point: np.ndarray
    sounding: float
    cuts: int
    inertia_tensor: np.ndarray = field(default_factory=lambda: _NO_INERTIA)

    @property
    def fsm_t(self) -> float:
        """Transverse free-surface moment ρ i_t [t·m] at this attitude."""
        return self.mass / self.volume * self.i_t if self.volume > 0 else 0.0


# --------------------------------------------------------------------------- construction

def _density(value: Any, name: str) -> float:
    rho = finite_number(value, f"tank {name!r}: density")
    if rho <= 0.0:
        raise InputError(f"tank {name!r}: density must be positive, got {rho:.6g} t/m³")
    return rho


def box_mesh(corners: Any, what: str) -> tuple[np.ndarray, np.ndarray]:
    """Outward-oriented box mesh from two opposite corners ``[[x, y, z], [x, y, z]]`` [m].

    Returns vertices (8, 3) and faces (12, 3). ``what`` names the box in errors.
    """
    try:
        c = np.asarray(corners, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{what}: box must be two corners [[x, y, z], [x, y, z]], got {corners!r}") from None
    if c.shape != (2, 3) or not np.all(np.isfinite(c)):
        raise InputError(f"{what}: box must be two corners [[x, y, z], [x, y, z]] of finite numbers, "
                         f"got {corners!r}")
    lo, hi = c.min(axis=0), c.max(axis=0)
    if np.any(hi - lo <= 0.0):
        k = int(np.argmin(hi - lo))
        raise InputError(f"{what}: box has no extent along {'xyz'[k]} ({lo[k]:.6g} to {hi[k]:.6g} m)")
    v = np.array([[(lo, hi)[i][0], (lo, hi)[j][1], (lo, hi)[k][2]]
                  for i in (0, 1) for j in (0, 1) for k in (0, 1)], float)
    f = np.array([[0, 1, 3], [0, 3, 2], [4, 6, 7], [4, 7, 5], [0, 4, 5], [0, 5, 1],
                  [2, 3, 7], [2, 7, 6], [0, 2, 6], [0, 6, 4], [1, 5, 7], [1, 7, 3]], dtype=np.int64)
    return v, f


def closed_body(vertices: np.ndarray, faces: np.ndarray, what: str) -> tuple[np.ndarray, np.ndarray]:
    """Check that a mesh is one closed, consistently and outwardly oriented body, like a hull.

    Returns the checked (welded) vertices (n, 3) [m] and faces (m, 3). Raises
    :class:`InvalidMeshError` naming ``what`` and the first problem.
    """
    import trimesh

    md, rep = check_mesh(trimesh.Trimesh(np.asarray(vertices, float), np.asarray(faces, np.int64),
                                         process=False))
    require_closed(rep, what)
    return md.vertices, md.faces


def require_closed(rep: Any, what: str) -> None:
    """Raise InvalidMeshError unless a HealthReport shows one usable, closed body."""
    if not rep.usable:
        raise InvalidMeshError(f"{what}: " + rep.problems[0].split(": ", 1)[-1])
    if not rep.closed:
        raise InvalidMeshError(f"{what}: the mesh is not closed ({len(rep.rims)} open rim(s), lowest at "
                               f"z = {rep.rims[0].z_min:.4f} m); a tank or compartment must be closed")
    if len(rep.bodies) != 1:
        raise InvalidMeshError(f"{what}: the mesh has {len(rep.bodies)} bodies; give one closed body")


def lowest_point(vertices: np.ndarray) -> np.ndarray:
    """Mean (3,) [m] of the vertices at the least z (within a tiny fraction of the size)."""
    z = vertices[:, 2]
    tol = LOWEST_RTOL * max(float(np.ptp(vertices, axis=0).max()), 1e-300)
    return vertices[z <= z.min() + tol].mean(axis=0)


def make_tank(name: str, vertices: np.ndarray, faces: np.ndarray, *, density: float, source: str,
              sounding_point: Sequence[float] | None = None) -> Tank:
    """A tank from a checked closed mesh (hull frame, m) and its density [t/m³]."""
    rho = _density(density, name)
    prep = kernel.prepare(vertices, faces)
    cap, cen = kernel.total_volume(prep)
    if not cap > 0.0:
        raise InvalidMeshError(f"tank {name!r} ({source}): encloses no volume ({cap:.6g} m³)")
    sp = lowest_point(vertices) if sounding_point is None else np.asarray(sounding_point, float)
    if sp.shape != (3,) or not np.all(np.isfinite(sp)):
        raise InputError(f"tank {name!r}: sounding point must be three finite numbers, got {sounding_point!r}")
    return Tank(name=str(name), density=rho, vertices=np.asarray(vertices, float),
                faces=np.asarray(faces, np.int64), prepared=prep, capacity=float(cap),
                centroid_full=np.asarray(cen, float), sounding_point=sp, source=source)


def tank_from_box(name: str, corners: Any, *, density: float) -> Tank:
    """A box tank from two opposite corners ``[[x, y, z], [x, y, z]]`` [m, hull frame]."""
    v, f = box_mesh(corners, f"tank {name!r}")
    return make_tank(name, v, f, density=density, source="box")


def tank_from_mesh(name: str, source: Any, *, density: float, units: str = "m", forward: str = "+x",
                   up: str = "+z", offset: Sequence[float] = (0.0, 0.0, 0.0)) -> Tank:
    """A tank from its own mesh file (or trimesh), mapped to the hull frame like a hull."""
    md, rep = check_mesh(source, units=units, forward=forward, up=up, offset=tuple(offset))
    require_closed(rep, f"tank {name!r} ({md.source})")
    return make_tank(name, md.vertices, md.faces, density=density, source=md.source)


def body_mesh(vertices: np.ndarray, faces: np.ndarray, report: Any, body: int,
              what: str) -> tuple[np.ndarray, np.ndarray]:
    """Vertices and faces of body ``body`` of a checked mesh (numbering of its HealthReport)."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    if isinstance(body, bool) or not isinstance(body, (int, np.integer)) or not 0 <= body < len(report.bodies):
        raise InputError(f"{what}: body {body!r} does not exist in {report.source} "
                         f"(it has bodies 0..{len(report.bodies) - 1})")
    b = report.bodies[int(body)]
    if not b.closed:
        raise InvalidMeshError(f"{what}: body {body} of {report.source} is not closed")
    f = np.asarray(faces, np.int64)
    m = len(f)
    # faces joined through shared vertices: components of the face-vertex graph
    g = coo_matrix((np.ones(3 * m), (np.repeat(np.arange(m), 3), f.ravel())),
                   shape=(m, len(vertices))).tocsr()
    _, lab = connected_components(g @ g.T, directed=False)
    sel = f[lab == lab[b.first_face]]
    used, local = np.unique(sel, return_inverse=True)
    return np.asarray(vertices, float)[used], local.reshape(-1, 3)


def tank_from_body(name: str, mesh: Any, report: Any, body: int, *, density: float) -> Tank:
    """A tank from body ``body`` of an already-checked mesh (``MeshData`` and its ``HealthReport``)."""
    what = f"tank {name!r}"
    v, f = body_mesh(mesh.vertices, mesh.faces, report, body, what)
    v, f = closed_body(v, f, f"{what} (body {body} of {report.source})")
    return make_tank(name, v, f, density=density, source=f"body {body} of {report.source}")


def outside_volume(vertices: np.ndarray, faces: np.ndarray, hull_vertices: np.ndarray,
                   hull_faces: np.ndarray) -> float:
    """Volume [m³] of a closed mesh lying outside a closed hull mesh (manifold3d boolean difference)."""
    import manifold3d as m3d

    def man(v: np.ndarray, f: np.ndarray) -> Any:
        mesh = m3d.Mesh64(vert_properties=np.array(v, np.float64), tri_verts=np.array(f, np.uint32))  # writeable copies
        return m3d.Manifold(mesh)

    a, h = man(vertices, faces), man(hull_vertices, hull_faces)
    for what, mm in (("the tank or compartment", a), ("the hull", h)):
        if mm.status() != m3d.Error.NoError:
            raise InvalidMeshError(f"{what} is not a closed manifold for the inside test ({mm.status()})")
    return float((a - h).volume())


def check_inside(name: str, vertices: np.ndarray, faces: np.ndarray, hull: Any, *, kind: str = "tank") -> None:
    """Raise :class:`InputError` when a closed mesh does not lie inside ``hull`` (``.vertices``, ``.faces``).

    The test is a robust boolean difference (manifold3d), so walls shared with the hull
    count as inside; anything more than ``INSIDE_RTOL`` of the volume outside is an error
    naming the tank or compartment and how much lies outside.
    """
    out = outside_volume(vertices, faces, hull.vertices, hull.faces)
    prep_vol = kernel.total_volume(kernel.prepare(vertices, faces))[0]
    if out > INSIDE_RTOL * max(prep_vol, 1e-300):
        raise InputError(f"{kind} {name!r} does not lie inside the hull: {out:.6g} m³ of its "
                         f"{prep_vol:.6g} m³ ({100 * out / prep_vol:.3g} %) is outside")


# --------------------------------------------------------------------------- level solve

def unit_vertical(up: Any) -> np.ndarray:
    """The vertical ``up`` (3,) normalised; InputError when not three finite numbers, not all zero."""
    n = np.asarray(up, dtype=float).reshape(-1)
    r = math.sqrt(float(n @ n)) if n.shape == (3,) else math.nan
    if not (math.isfinite(r) and r > 0):
        raise InputError(f"the vertical must be three finite numbers, not all zero, got {up!r}")
    return n / r


def solve_level(prep: kernel.Prepared, up: np.ndarray, volume: float, *, capacity: float,
                guess: np.ndarray | None = None, name: str = "tank") -> tuple[kernel.Cut, int]:
    """The kernel cut of a closed mesh whose volume below a plane with normal ``up`` is ``volume``.

    Safeguarded Newton on the plane offset s (``up · x = s``): dV/ds is the cut's
    area; the bracket starts as the mesh's extent along ``up`` and shrinks with every
    cut; a Newton step leaving the bracket is replaced by false position, or by
    bisection when false position stalls.

    Parameters
    ----------
    prep : kernel.Prepared
    up : (3,) unit normal, hull frame
    volume : float [m³], strictly between 0 and ``capacity``
    capacity : float [m³]
    guess : (3,) [m], hull frame, optional
        A point near the sought plane (warm start).

    Returns
    -------
    cut : kernel.Cut
        With ``|cut.volume - volume| <= LEVEL_VOLUME_RTOL * capacity``.
    cuts : int
        Kernel cuts taken.
    """
    planes, probe, k = level_probe(prep, up, volume, capacity=capacity, guess=guess, name=name)
    return planes.cut(probe), k


def level_probe(prep: kernel.Prepared, up: np.ndarray, volume: float, *, capacity: float,
                guess: np.ndarray | None = None, name: str = "tank",
                axes: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None) -> tuple[PlaneFamily, Probe, int]:
    """:func:`solve_level` without finishing the whole cut: the plane family, the probe that
    holds the volume, and the cuts taken (``planes.level(probe)`` gives the fluid's fields).
    ``axes``: :func:`meshhydro.kernel_level.family_axes` of ``up`` when already formed."""
    n = up
    s_all = (prep.vertices @ n).tolist()
    a, b = min(s_all), max(s_all)
    va, vb = 0.0, float(capacity)
    if guess is not None:
        s = float(n @ (np.asarray(guess, float) - prep.origin))
    else:
        s = a + (b - a) * volume / capacity
    tol = LEVEL_VOLUME_RTOL * capacity
    prev_side = 0
    planes = PlaneFamily(prep, n, axes=axes)  # lean cuts: kernel.cut's numbers, whole cut at the end
    found = planes.search(volume, capacity, s, a, b, tol, LEVEL_MAX_CUTS)  # the loop below, compiled
    if found is not None:
        return planes, found[0], found[1]
    for k in range(1, LEVEL_MAX_CUTS + 1):
        if not a < s < b:
            s = 0.5 * (a + b)
        c = planes.probe(prep.origin + s * n)
        r = c.volume - volume
        if abs(r) <= tol:
            return planes, c, k
        side = 1 if r > 0 else -1
        if side > 0:
            b, vb = s, c.volume
        else:
            a, va = s, c.volume
        area = c.waterplane_area
        nxt = s - r / area if area > 0.0 else math.nan
        if not a < nxt < b:
            # false position; bisection when the same end moved twice in a row
            nxt = 0.5 * (a + b) if side == prev_side else a + (b - a) * (volume - va) / (vb - va)
        prev_side = side
        s = nxt
    raise NotConvergedError(f"tank {name!r}: the level for {volume:.6g} m³ was not found in "
                            f"{LEVEL_MAX_CUTS} cuts (up = {np.round(n, 6).tolist()})")


def _extreme(tank: Tank, n: np.ndarray, top: bool) -> np.ndarray:
    s = tank.vertices @ n
    return tank.vertices[int(np.argmax(s) if top else np.argmin(s))].copy()


def surface_tensor(c: Any) -> np.ndarray:
    """The cut's waterplane second-moment tensor (3, 3) [m⁴] about its centroid, hull frame: the same
    as ``c.inertia_tensor``, i_l u uᵀ + i_t v vᵀ + i_uv (u vᵀ + v uᵀ), in plain floats."""
    u, v = c.axis_u.tolist(), c.axis_v.tolist()
    i_l, i_t, i_uv = c.inertia_l, c.inertia_t, c.inertia_uv
    return np.array([[i_l * u[i] * u[j] + i_t * v[i] * v[j] + i_uv * (u[i] * v[j] + v[i] * u[j]) for j in range(3)]
                     for i in range(3)])


def tank_state(tank: Tank, up: Any, volume: float, *, guess: np.ndarray | None = None) -> TankState:
    """The fluid of ``volume`` [m³] in ``tank`` with a level surface at attitude ``up`` (3,).

    Full (``volume == capacity``) and empty (``volume == 0``) tanks need no cut.
    """
    n = unit_vertical(up)
    vol = finite_number(volume, f"tank {tank.name!r}: volume")
    if not 0.0 <= vol <= tank.capacity:
        raise InputError(f"tank {tank.name!r}: volume {vol:.6g} m³ is outside 0..{tank.capacity:.6g} m³")
    return checked_state(tank, n, vol, guess)


def checked_state(tank: Tank, n: np.ndarray, vol: float, guess: np.ndarray | None,
                  axes: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None) -> TankState:
    """:func:`tank_state` for a unit vertical ``n`` (3,) and a volume already checked to lie in 0..capacity
    (``axes``: :func:`meshhydro.kernel_level.family_axes` of ``n`` when already formed)."""
    if vol == 0.0 or vol == tank.capacity:
        full = vol == tank.capacity
        lp = _extreme(tank, n, top=full)
        cen = tank.centroid_full.copy() if full else lp.copy()
        return TankState(tank.name, vol, tank.density * vol, cen, 0.0, 0.0, 0.0, n, lp,
                         float(n @ (lp - tank.sounding_point)), 0)
    planes, probe, k = level_probe(tank.prepared, n, vol, capacity=tank.capacity, guess=guess, name=tank.name,
                                   axes=axes)
    c = planes.level(probe)
    lp = c.waterplane_centroid
    return TankState(tank.name, vol, tank.density * vol, c.centroid, c.waterplane_area, c.inertia_t,
                     c.inertia_l, n, lp, float(n @ (lp - tank.sounding_point)), k, surface_tensor(c))


def sounding_cut(tank: Tank, sounding: float, up: Any) -> kernel.Cut:
    """The fluid below the level ``sounding`` [m] above the sounding point, vertical ``up`` (3,)."""
    n = unit_vertical(up)
    h = finite_number(sounding, f"tank {tank.name!r}: sounding")
    s = tank.vertices @ n
    base = float(n @ tank.sounding_point)
    lo, hi = float(s.min()) - base, float(s.max()) - base
    if not lo <= h <= hi:
        raise InputError(f"tank {tank.name!r}: sounding {h:.6g} m is outside {max(lo, 0.0):.6g}..{hi:.6g} m "
                         f"(the tank's depth at the sounding point)")
    return kernel.cut(tank.prepared, tank.sounding_point + h * n, n)


#: relative allowance [-] within which a sounding is taken as the tank's top (a few units of rounding)
TOP_SOUNDING_RTOL = 1e-12


def at_top(tank: Tank, sounding: float, up: Any) -> bool:
    """True when a sounding [m] with vertical ``up`` (3,) reaches the tank's top: the tank is full. Decided
    on the geometry, not on the cut volume: sounding point + depth may land an ulp under the top (0.05 +
    0.75 against 0.8) and would leave a free surface of the whole top on a full tank."""
    n = unit_vertical(up)
    top = float((tank.vertices @ n).max() - n @ tank.sounding_point)
    return float(sounding) >= top - TOP_SOUNDING_RTOL * max(abs(top), 1.0)


def sounding_volume(tank: Tank, sounding: float, up: Any) -> float:
    """Fluid volume [m³] at a sounding [m] with vertical ``up`` (3,); the capacity at the top."""
    if at_top(tank, sounding, up):
        sounding_cut(tank, sounding, up)  # still refuses a sounding above the top
        return tank.capacity
    return min(sounding_cut(tank, sounding, up).volume, tank.capacity)

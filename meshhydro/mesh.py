"""Mesh input and the health report: report, don't repair.

Loading goes through trimesh with ``process=False`` so that nothing is merged,
removed or re-wound behind the user's back. The one step always taken is welding
vertices whose coordinates are *bit-identical*: STL stores every triangle with its own
three corners, so topology can only be recovered that way; geometry is unchanged.
Everything else (flipping an inside-out body, merging overlapping bodies) happens only
when asked and is reported.
"""
from __future__ import annotations

import os
from dataclasses import asdict, dataclass, field, replace
from typing import Any

import numpy as np

from .errors import InputError, InvalidMeshError
from .frames import axis_matrix, unit_scale
from .mesh_stl import Progress, binary_stl_count, read_binary_stl, weld
from .mesh_topology import (EdgeTable, EdgeUse, bodies_by_edges, body_sums, capped_volumes_below,
                            degenerate_faces, duplicate_faces, edge_table, edge_use, rim_chains)
from .mesh_proportions import axis_findings, scale_findings


@dataclass(frozen=True)
class Rim:
    """An open boundary loop (or chain) of the mesh.

    Attributes
    ----------
    n_edges : int
    z_min, z_max : float [m], hull frame
    first_face : int
        A face on the rim, for locating it.
    """

    n_edges: int
    z_min: float
    z_max: float
    first_face: int


@dataclass(frozen=True)
class Body:
    """A connected component of the mesh.

    Attributes
    ----------
    index : int
    n_faces : int
    closed : bool
        Every edge is matched by one edge running the other way.
    volume : float or None [m³]
        Enclosed volume (positive for outward orientation); None when open.
    bounds : tuple of two (3,) lists [m]
        Bounding box (min, max), hull frame.
    first_face : int
    capped_volume : float or None [m³]
        Open body: signed volume of its part below its lowest rim point, capped there (negative when
        the body is inside out); None when closed.
    """

    index: int
    n_faces: int
    closed: bool
    volume: float | None
    bounds: tuple[list[float], list[float]]
    first_face: int
    capped_volume: float | None = None


@dataclass(frozen=True)
class HealthReport:
    """What is right and wrong with a mesh, in hull-frame metres.

    ``usable`` is False when any entry of ``problems`` is present; ``warnings`` do
    not stop the hull from being used.
    """

    source: str
    units: str
    n_vertices: int
    n_faces: int
    welded_vertices: int
    bounds: tuple[list[float], list[float]]
    extent: list[float]
    closed: bool
    rims: list[Rim]
    consistent_winding: bool
    inconsistent_edges: int
    non_manifold_edges: int
    degenerate_faces: list[int]
    duplicate_faces: list[int]
    bodies: list[Body]
    inside_out_bodies: list[int]
    overlaps: list[tuple[int, int, float]]
    overlap_checked: bool
    flipped_bodies: list[int]
    merged: bool
    problems: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)

    @property
    def usable(self) -> bool:
        return not self.problems

    @property
    def volume(self) -> float:
        """Total enclosed volume [m³] of the closed bodies."""
        return float(sum(b.volume for b in self.bodies if b.volume is not None))

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        d["usable"] = self.usable
        d["volume"] = self.volume
        return d


@dataclass(frozen=True, eq=False)
class MeshData:
    """Vertices and faces in the hull frame after units, axes and offset.

    Attributes
    ----------
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int64
    source : str
    units : str
    welded : int
        Number of bit-identical duplicate vertices welded on load.
    """

    vertices: np.ndarray
    faces: np.ndarray
    source: str
    units: str
    welded: int


def _read_trimesh(source: Any) -> tuple[np.ndarray, np.ndarray, str]:
    import trimesh

    if isinstance(source, trimesh.Trimesh):
        return np.asarray(source.vertices, float), np.asarray(source.faces, np.int64), "<trimesh>"
    path = os.fspath(source)
    try:
        loaded = trimesh.load(path, process=False, force="mesh")
    except Exception as exc:  # trimesh raises many kinds; all mean "not a mesh we can read"
        msg = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        raise InvalidMeshError(f"{path}: not a readable mesh ({msg})") from None
    if not isinstance(loaded, trimesh.Trimesh):
        raise InvalidMeshError(f"{path}: contains no triangle mesh")
    v = np.asarray(loaded.vertices, dtype=float)
    f = np.asarray(loaded.faces, dtype=np.int64)
    return v, f, path


def _read_welded(source: Any, progress: Progress | None) -> tuple[np.ndarray, np.ndarray, str, int]:
    """Vertices, faces, source name and the number of corners welded away."""
    fast = None
    if not hasattr(source, "vertices"):
        path = os.fspath(source)
        if not os.path.exists(path):
            raise InputError(f"{path}: no such file")
        if os.path.isdir(path):
            raise InputError(f"{path}: is a folder, not a mesh file")
        if path.lower().endswith(".stl"):
            fast = binary_stl_count(path)
    if fast is not None:
        if fast == 0:
            raise InvalidMeshError(f"{path}: the mesh is empty (no faces)")
        corners = read_binary_stl(path, fast, progress)
        v, f = weld(corners, path)
        if progress is not None:
            progress("weld", 1, 1)
        return v.astype(np.float64), f, path, 3 * fast - len(v)
    v, f, src = _read_trimesh(source)
    if len(f) == 0 or len(v) == 0:
        raise InvalidMeshError(f"{src}: the mesh is empty (no faces)")
    if f.ndim != 2 or f.shape[1] != 3:
        raise InvalidMeshError(f"{src}: faces are not triangles (shape {f.shape})")
    if f.min() < 0 or f.max() >= len(v):
        k = int(np.flatnonzero((f < 0).any(axis=1) | (f >= len(v)).any(axis=1))[0])
        raise InvalidMeshError(f"{src}: face {k} refers to a vertex that does not exist")
    bad = ~np.all(np.isfinite(v), axis=1)
    if bad.any():
        k = int(np.flatnonzero(bad)[0])
        raise InvalidMeshError(
            f"{src}: vertex {k} has a non-finite coordinate {v[k].tolist()} "
            f"({int(bad.sum())} such vertices)"
        )
    vw, fw = weld(v[f], src)
    return vw, fw, src, len(v) - len(vw)


def read_mesh(
    source: Any,
    *,
    units: str = "m",
    forward: str = "+x",
    up: str = "+z",
    offset: tuple[float, float, float] | np.ndarray = (0.0, 0.0, 0.0),
    progress: Progress | None = None,
) -> MeshData:
    """Read a mesh file (STL/OBJ/PLY/OFF/GLB) or a ``trimesh.Trimesh`` into the hull frame.

    Binary STL is read directly (numpy, in chunks); other formats through trimesh with
    ``process=False``. Corners with bit-identical coordinates are welded into one vertex
    (vertices no face uses are dropped); nothing else is changed.

    Parameters
    ----------
    source : path or trimesh.Trimesh
    units : str
        Length unit of the file: m, mm, cm, ft or in.
    forward, up : str
        File axes pointing forward and up (``'+x'``, ``'-y'``, ...). Y-up exports
        typically need ``forward='+x', up='+y'`` or similar.
    offset : (3,) [m]
        Added to the hull-frame coordinates after scaling and rotation (for example
        to put the baseline at z = 0).
    progress : callable(stage, done, total), optional
        Called as the work advances (stages "read" and "weld" for a binary STL).

    Raises
    ------
    InputError, InvalidMeshError
        Missing file, unreadable or empty mesh, non-finite coordinates, bad face indices.
    """
    scale = unit_scale(units)
    rot = axis_matrix(forward, up)
    off = np.asarray(offset, dtype=float).reshape(-1)
    if off.shape != (3,) or not np.all(np.isfinite(off)):
        raise InputError(f"offset must be three finite numbers, got {offset!r}")
    v, f, src, welded = _read_welded(source, progress)
    if scale != 1.0:
        v *= scale
    if not np.array_equal(rot, np.eye(3)):
        v = v @ rot.T
    if np.any(off):
        v += off
    return MeshData(vertices=v, faces=f, source=src, units=units, welded=int(welded))


# --------------------------------------------------------------------------- topology


def _edges(faces: np.ndarray) -> dict[str, np.ndarray]:
    """Undirected-edge table of the faces without a repeated vertex index: for each edge
    its vertices, forward/total counts and first face (index into ``faces``)."""
    f = np.asarray(faces, dtype=np.int64)
    kept = np.flatnonzero(~degenerate_faces(f))
    et = edge_table(f[kept])
    return {"lo": et.lo, "hi": et.hi, "n_fwd": et.n_fwd, "n_tot": et.n_tot, "first_face": kept[et.first_face]}


@dataclass(frozen=True, eq=False)
class _Topology:
    """Topology of the faces without a repeated index (``kept`` maps them to file faces)."""

    kept: np.ndarray
    labels: np.ndarray  # (m,) body of each file face, -1 for the left-out ones
    et: EdgeTable
    use: EdgeUse
    degenerate: np.ndarray  # file face indices with a repeated vertex index
    duplicate: np.ndarray  # file face indices


def _topology(faces: np.ndarray, n_vertices: int) -> _Topology:
    deg = degenerate_faces(faces)
    kept = np.flatnonzero(~deg)
    fk = faces[kept] if len(kept) < len(faces) else faces
    et = edge_table(fk, n_vertices)
    lab_k = bodies_by_edges(len(fk), et)
    labels = np.full(len(faces), -1, dtype=np.int64)
    labels[kept] = lab_k
    return _Topology(kept, labels, et, edge_use(et, lab_k), np.flatnonzero(deg), kept[duplicate_faces(fk, et)])


def body_labels(md: MeshData) -> np.ndarray:
    """Body label (m,) of each face of ``md`` (bodies joined through edges; -1 for faces
    with a repeated vertex index)."""
    return _topology(md.faces, len(md.vertices)).labels


def _bodies(v: np.ndarray, f: np.ndarray, topo: _Topology) -> list[Body]:
    """Per-body face count, closure, volume and bounds."""
    lab = topo.labels
    nb = int(lab.max()) + 1 if len(lab) else 0
    bad = topo.use.boundary | topo.use.unbalanced
    open_b = np.zeros(nb, bool)
    open_b[topo.use.body[bad]] = True
    vols, lo, hi, counts, first = body_sums(v, f, lab, nb)
    capped = np.full(nb, np.nan)
    if open_b.any():  # lowest rim point of each open body, and the capped part below it
        rim = topo.use.boundary
        e, rb = topo.use.edge[rim], topo.use.body[rim]
        z0 = np.full(nb, np.inf)
        np.minimum.at(z0, rb, np.minimum(v[topo.et.lo[e], 2], v[topo.et.hi[e], 2]))
        capped = capped_volumes_below(v, f, lab, nb, np.where(np.isfinite(z0), z0, hi[:, 2]))
    return [
        Body(index=b, n_faces=int(counts[b]), closed=bool(not open_b[b]),
             volume=None if open_b[b] else float(vols[b]),
             bounds=(lo[b].tolist(), hi[b].tolist()), first_face=int(first[b]),
             capped_volume=float(capped[b]) if open_b[b] else None)
        for b in range(nb)
    ]


def _rims(v: np.ndarray, topo: _Topology) -> list[Rim]:
    rims = [
        Rim(n_edges, float(v[verts, 2].min()), float(v[verts, 2].max()), int(topo.kept[face]))
        for verts, n_edges, face in rim_chains(topo.et, topo.use, len(v))
    ]
    return sorted(rims, key=lambda r: r.z_min)


def _overlap_pairs(bodies: list[Body]) -> list[tuple[Body, Body]]:
    """Pairs of closed, outward bodies whose bounding boxes share interior."""
    closed = [b for b in bodies if b.closed and b.volume and b.volume > 0]
    pairs = []
    for i, bi in enumerate(closed):
        for bj in closed[i + 1:]:
            lo = np.maximum(bi.bounds[0], bj.bounds[0])
            hi = np.minimum(bi.bounds[1], bj.bounds[1])
            if np.all(hi > lo):
                pairs.append((bi, bj))
    return pairs


def _overlaps(v: np.ndarray, f: np.ndarray, labels: np.ndarray, bodies: list[Body]) -> tuple[
    list[tuple[int, int, float]], bool
]:
    """Pairs of closed bodies whose interiors overlap, with the shared volume [m³] (manifold3d)."""
    pairs = _overlap_pairs(bodies)
    if not pairs:
        return [], True
    import manifold3d as m3d

    found = []
    checked = True
    cache: dict[int, Any] = {}

    def manifold(b: Body):
        if b.index not in cache:
            sel = f[labels == b.index]
            used, local = np.unique(sel, return_inverse=True)
            mesh = m3d.Mesh64(vert_properties=np.asarray(v[used], np.float64),
                              tri_verts=np.asarray(local.reshape(-1, 3), np.uint32))
            cache[b.index] = m3d.Manifold(mesh)
        return cache[b.index]

    for bi, bj in pairs:
        try:
            vol = float((manifold(bi) ^ manifold(bj)).volume())
        except Exception:  # manifold3d refuses some inputs; then the pair is not checked
            checked = False
            continue
        if vol > 1e-6 * min(bi.volume, bj.volume):
            found.append((bi.index, bj.index, vol))
    return found, checked


def _edge_name(v: np.ndarray, et: EdgeTable, e: int) -> str:
    a, b = int(et.lo[e]), int(et.hi[e])
    pa = ", ".join(f"{x:.6g}" for x in v[a])
    pb = ", ".join(f"{x:.6g}" for x in v[b])
    return f"vertices {a}-{b} at ({pa}) and ({pb})"


def _topology_findings(src: str, v: np.ndarray, topo: _Topology) -> tuple[list[str], list[str], int]:
    """Problems and warnings about winding, non-manifold edges and rims; unbalanced count."""
    problems: list[str] = []
    warnings: list[str] = []
    use, et = topo.use, topo.et
    unbal = np.flatnonzero(use.unbalanced)
    if len(unbal):
        e = int(use.edge[unbal[0]])
        problems.append(
            f"{src}: inconsistent winding: {len(unbal)} edges are not run once each way by the faces "
            f"of their body (first at face {int(topo.kept[et.first_face[e]])}, edge {_edge_name(v, et, e)}); "
            f"the volume would be wrong"
        )
    nm = np.flatnonzero(et.n_tot > 2)
    if len(nm):
        e = int(nm[0])
        warnings.append(
            f"{len(nm)} non-manifold edges (used by three or more faces), first the edge {_edge_name(v, et, e)} "
            f"used by {int(et.n_tot[e])} faces (first face {int(topo.kept[et.first_face[e]])})"
        )
    return problems, warnings, len(unbal)


def _body_findings(src: str, bodies: list[Body], overlaps: list[tuple[int, int, float]],
                   checked: bool) -> tuple[list[str], list[str]]:
    problems: list[str] = []
    warnings: list[str] = []
    for b in bodies:
        if b.capped_volume is not None and b.capped_volume < 0:
            problems.append(
                f"{src}: open body {b.index} (first face {b.first_face}) is inside out (its part below the "
                f"lowest rim point, capped, has volume {b.capped_volume:.6g} m³); flip it explicitly with "
                f"--flip-inside-out / flip_inside_out=True")
        if b.volume is not None and b.volume < 0:
            problems.append(
                f"{src}: body {b.index} (first face {b.first_face}) is inside out (volume {b.volume:.6g} m³); "
                f"flip it explicitly with --flip-inside-out / flip_inside_out=True"
            )
    for i, j, vol in overlaps:
        inner = min(bodies[i].volume, bodies[j].volume)
        how = (f"body {j if bodies[j].volume <= bodies[i].volume else i} lies inside the other"
               if vol >= inner * (1 - 1e-6) else f"they overlap by {vol:.6g} m³")
        problems.append(
            f"{src}: bodies {i} and {j} share volume ({how}; {vol:.6g} m³ would be counted twice); "
            f"merge them explicitly with --merge-overlaps / merge_overlaps=True"
        )
    if not checked:
        warnings.append("overlap between bodies could not be checked for every pair")
    return problems, warnings


def _face_findings(src: str, md: MeshData, topo: _Topology, rims: list[Rim]) -> tuple[list[str], list[str]]:
    problems: list[str] = []
    warnings: list[str] = []
    if rims:
        warnings.append(
            f"the mesh is open: {len(rims)} rim(s), lowest rim point at z = {rims[0].z_min:.4f} m; "
            f"usable only while the water stays below it"
        )
    if len(topo.degenerate):
        shown = ", ".join(str(int(k)) for k in topo.degenerate[:10])
        more = f" and {len(topo.degenerate) - 10} more" if len(topo.degenerate) > 10 else ""
        warnings.append(
            f"{len(topo.degenerate)} degenerate faces (two or three identical corners): faces {shown}{more}; "
            f"they bound nothing and are left out"
        )
    if len(topo.duplicate):
        problems.append(
            f"{src}: {len(topo.duplicate)} duplicate faces (first at face {int(topo.duplicate[0])}): "
            f"the surface is counted twice there"
        )
    return problems, warnings


def inspect(md: MeshData, *, progress: Progress | None = None) -> HealthReport:
    """Build the health report of a mesh already in the hull frame.

    ``progress("check", done, 3)`` is called after each of the three steps (topology,
    bodies, rims and overlaps).
    """
    v, f = md.vertices, md.faces
    src = md.source
    step = progress or (lambda *a: None)
    topo = _topology(f, len(v))
    step("check", 1, 3)
    used = np.zeros(len(v), dtype=bool)
    used[(f[topo.kept] if len(topo.kept) else f).ravel()] = True
    lo, hi = v[used].min(axis=0), v[used].max(axis=0)
    size = float(np.max(hi - lo))
    bodies = _bodies(v, f, topo)
    step("check", 2, 3)
    rims = _rims(v, topo)
    overlaps, checked = _overlaps(v, f, topo.labels, bodies)
    step("check", 3, 3)
    problems, warnings, n_unbal = _topology_findings(src, v, topo)
    for p, w in (_body_findings(src, bodies, overlaps, checked), _face_findings(src, md, topo, rims),
                 scale_findings(src, size, md.units)):
        problems += p
        warnings += w
    warnings += axis_findings(hi - lo)
    return HealthReport(
        source=src, units=md.units, n_vertices=int(len(v)), n_faces=int(len(f)), welded_vertices=md.welded,
        bounds=(lo.tolist(), hi.tolist()), extent=(hi - lo).tolist(),
        closed=bool(not topo.use.boundary.any() and n_unbal == 0), rims=rims,
        consistent_winding=n_unbal == 0, inconsistent_edges=int(n_unbal),
        non_manifold_edges=int(np.count_nonzero(topo.et.n_tot > 2)),
        degenerate_faces=topo.degenerate[:20].tolist(), duplicate_faces=topo.duplicate[:20].tolist(),
        bodies=bodies, inside_out_bodies=[b.index for b in bodies if (b.volume if b.volume is not None
                                                                     else b.capped_volume or 0.0) < 0],
        overlaps=overlaps, overlap_checked=checked, flipped_bodies=[], merged=False,
        problems=problems, warnings=warnings,
    )


def _enclosed(rep: HealthReport) -> float:
    """Total enclosed volume [m³]: closed bodies whole, open ones capped below their lowest rim point."""
    return float(sum(b.volume if b.volume is not None else (b.capped_volume or 0.0) for b in rep.bodies))


def flip_bodies(md: MeshData, report: HealthReport) -> tuple[MeshData, list[int]]:
    """Reverse the winding of the inside-out bodies (explicit repair)."""
    if not report.inside_out_bodies:
        return md, []
    labels = body_labels(md)
    f = md.faces.copy()
    sel = np.isin(labels, report.inside_out_bodies)
    f[sel] = f[sel][:, ::-1]
    return MeshData(md.vertices, f, md.source, md.units, md.welded), list(report.inside_out_bodies)


def merge_overlapping(md: MeshData) -> MeshData:
    """Union all closed bodies with a robust boolean (manifold3d) (explicit repair)."""
    import manifold3d as m3d

    labels = body_labels(md)
    result = None
    for b in range(int(labels.max()) + 1):
        sel = md.faces[labels == b]
        used, local = np.unique(sel, return_inverse=True)
        mesh = m3d.Mesh64(
            vert_properties=np.asarray(md.vertices[used], np.float64),
            tri_verts=np.asarray(local.reshape(-1, 3), np.uint32),
        )
        man = m3d.Manifold(mesh)
        if man.status() != m3d.Error.NoError:
            raise InvalidMeshError(
                f"{md.source}: body {b} is not a closed manifold, so it cannot be merged ({man.status()})"
            )
        result = man if result is None else result + man
    out = result.to_mesh64()
    v = np.asarray(out.vert_properties, dtype=float)[:, :3]
    f = np.asarray(out.tri_verts, dtype=np.int64)
    return MeshData(v, f, md.source, md.units, md.welded)


def check_mesh(
    source: Any,
    *,
    units: str = "m",
    forward: str = "+x",
    up: str = "+z",
    offset: tuple[float, float, float] = (0.0, 0.0, 0.0),
    flip_inside_out: bool = False,
    merge_overlaps: bool = False,
    progress: Progress | None = None,
    close_holes: bool = False,
) -> tuple[MeshData, HealthReport]:
    """Read a mesh, apply only the repairs asked for, and report on it.

    ``progress(stage, done, total)`` is called as the work advances (see :func:`read_mesh`;
    stage "check" counts the steps of the health check).

    Returns
    -------
    mesh : MeshData
        The (possibly repaired) mesh in the hull frame.
    report : HealthReport
        The report on that mesh; repairs made are listed in it.
    """
    md = read_mesh(source, units=units, forward=forward, up=up, offset=offset, progress=progress)
    closed_note = None
    if close_holes:
        from .mesh_repair import close_holes as _close

        before = inspect(md)
        f, closed_note = _close(md.vertices, md.faces)
        md = MeshData(md.vertices, f, md.source, md.units, md.welded)
        after = inspect(md)
        closed_note += (f"; volume {_enclosed(before):.6g} -> {_enclosed(after):.6g} m³ "
                        f"(open bodies capped at their lowest rim point)")
    rep = inspect(md, progress=progress)
    flipped: list[int] = []
    merged = False
    if flip_inside_out and rep.inside_out_bodies:
        md, flipped = flip_bodies(md, rep)
        rep = inspect(md)
    if merge_overlaps and rep.overlaps:
        md = merge_overlapping(md)
        merged = True
        rep = inspect(md)
    if flipped or merged or closed_note:
        notes = list(rep.warnings) + ([closed_note] if closed_note else [])
        if flipped:
            notes.append(f"flipped inside-out bodies {flipped} as asked")
        if merged:
            notes.append("merged overlapping bodies with a boolean union as asked")
        rep = replace(rep, flipped_bodies=flipped, merged=merged, warnings=notes)
    return md, rep

"""Closing holes of an open mesh, only on request (a well-kept library does the filling).

Public: :func:`close_holes`.
"""
from __future__ import annotations

import numpy as np

from .mesh_topology import edge_table


def close_holes(vertices: np.ndarray, faces: np.ndarray) -> tuple[np.ndarray, str]:
    """Faces (m', 3) with the small holes (one missing triangle or quad) filled by
    ``trimesh.repair.fill_holes``, and a one-line account: faces added, their area [m²], rim edges
    left open. Vertices (n, 3) [m] are not changed (hull frame)."""
    import trimesh

    tm = trimesh.Trimesh(np.array(vertices, float), np.array(faces, np.int64), process=False)
    n0 = len(tm.faces)
    trimesh.repair.fill_holes(tm)
    f = np.asarray(tm.faces, np.int64)
    added = f[n0:]
    tri = np.asarray(vertices, float)[added]
    area = float(0.5 * np.linalg.norm(np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0]), axis=1).sum())
    et = edge_table(f, len(vertices))
    left = int(np.count_nonzero(et.n_tot == 1))
    text = (f"closed holes as asked (trimesh.repair.fill_holes): {len(added)} face(s) added, {area:.6g} m² of "
            f"new surface; " + (f"{left} rim edge(s) remain open (only one-triangle and quad holes are filled)"
                                if left else "no open rim remains"))
    return f, text

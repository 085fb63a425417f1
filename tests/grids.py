"""Test meshes built from plain coordinates (no program code involved)."""
from __future__ import annotations

import numpy as np


def grid_box(xs, ys, zs) -> tuple[np.ndarray, np.ndarray]:
    """Closed, outward-wound surface of the box [xs[0], xs[-1]] x [ys[0], ys[-1]] x [zs[0], zs[-1]]
    with a vertex at every grid point of each side (coordinates used exactly as given)."""
    xs, ys, zs = (np.asarray(a, dtype=np.float64) for a in (xs, ys, zs))
    n = (len(xs), len(ys), len(zs))
    ii, jj, kk = np.meshgrid(*(np.arange(k) for k in n), indexing="ij")
    surf = (ii == 0) | (ii == n[0] - 1) | (jj == 0) | (jj == n[1] - 1) | (kk == 0) | (kk == n[2] - 1)
    index = -np.ones(n, dtype=np.int64)
    index[surf] = np.arange(int(surf.sum()))
    verts = np.stack([xs[ii[surf]], ys[jj[surf]], zs[kk[surf]]], axis=1)
    faces = []
    for axis in range(3):
        for side, outward in ((0, -1.0), (n[axis] - 1, 1.0)):
            sl = np.take(index, side, axis=axis)  # 2-D grid of the other two axes
            a, b = sl[:-1, :-1].ravel(), sl[1:, :-1].ravel()
            c, d = sl[1:, 1:].ravel(), sl[:-1, 1:].ravel()
            tri = np.concatenate([np.stack([a, b, c], 1), np.stack([a, c, d], 1)])
            p = verts[tri]
            nrm = np.cross(p[:, 1] - p[:, 0], p[:, 2] - p[:, 0])[:, axis]
            tri[nrm * outward < 0] = tri[nrm * outward < 0][:, ::-1]
            faces.append(tri)
    return verts, np.concatenate(faces)

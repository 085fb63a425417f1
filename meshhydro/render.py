"""Off-screen pyvista scenes of the hull floating at each angle of a heel sweep.

The hull is drawn in an earth frame (x forward, y to port, z up, water surface at
z = 0) so that it heels in front of a fixed camera, with the same camera, scale and
lighting in every frame: a sequence reads as motion. The submerged part and the
part above water have different colours, the water is a translucent sheet, the
waterline is drawn on the hull, G, B and the pro-metacentre M are marked, and the
righting lever is the horizontal segment from G to the vertical through B.
"""
from __future__ import annotations

from typing import Any

import numpy as np

from .frames import hull_to_earth
from .hull import Hull

COLOURS = {
    "background": "#f4f1ea",
    "above": "#e8e2d0",
    "below": "#9c3b22",
    "water": "#3a78b5",
    "waterline": "#10304f",
    "G": "#111111",
    "B": "#1f5fbf",
    "M": "#2e8b3a",
    "lever": "#f08c00",
}


def _draft_text(t: float) -> str:
    """Label text for a draft T [m] (undefined when the hull z axis lies in the waterplane)."""
    return f"draft {t:.3f} m" if np.isfinite(t) else "draft undefined (hull z in the waterplane)"


def _pv():
    import pyvista as pv

    pv.OFF_SCREEN = True
    try:  # VTK warns about the missing X display before it falls back to off-screen EGL
        from vtkmodules.vtkCommonCore import vtkLogger

        vtkLogger.SetStderrVerbosity(vtkLogger.VERBOSITY_ERROR)
    except ImportError:  # pragma: no cover - older VTK
        pass
    return pv


class Scene:
    """One plotter reused for every frame of a sweep.

    Parameters
    ----------
    hull : Hull
    trace : meshhydro.sweep.Trace
    size : (width, height) pixels
    camera : 'astern' (looking forward along the hull, parallel projection) or 'oblique'
    """

    def __init__(self, hull: Hull, trace: Any, *, size: tuple[int, int] = (960, 720), camera: str = "astern") -> None:
        if camera not in ("astern", "oblique"):
            from .errors import InputError

            raise InputError(f"camera must be astern or oblique, got {camera!r}")
        pv = _pv()
        self.pv = pv
        self.hull = hull
        self.trace = trace
        self.K = np.array([hull.x_ref, 0.0, 0.0])
        faces = np.hstack([np.full((len(hull.faces), 1), 3), hull.faces]).ravel()
        self.base = pv.PolyData(hull.vertices.copy(), faces)
        self.plotter = pv.Plotter(off_screen=True, window_size=list(size))
        self.plotter.set_background(COLOURS["background"])
        self.size = size
        self.camera = camera
        self.xc = float(0.5 * (hull.bounds[0][0] + hull.bounds[1][0]) - self.K[0])
        rel = hull.vertices - self.K
        #: largest distance of the hull from the heel axis: the frame holds it at every angle
        self.r_axis = float(np.max(np.hypot(rel[:, 1], rel[:, 2])))
        #: x just astern of the hull: markers drawn there are seen unobstructed from astern
        self.x_front = float(hull.bounds[0][0] - self.K[0]) - 0.02 * hull.length
        # the union of the hull's earth-frame boxes over all frames fixes one camera for the sweep
        step = max(1, len(hull.vertices) // 20000)
        sample = hull.vertices[::step]
        boxes = [self._to_earth(k, sample) for k in range(len(trace.heel))]
        allp = np.concatenate(boxes)
        self.lo, self.hi = allp.min(axis=0), allp.max(axis=0)
        # the water sheet is the same in every frame (earth frame, z = 0)
        sheet = pv.Plane(center=(self.xc, 0.0, 0.0), direction=(0, 0, 1), i_size=1.1 * hull.length,
                         j_size=4 * self.r_axis, i_resolution=1, j_resolution=1)
        self.plotter.add_mesh(sheet, color=COLOURS["water"], opacity=0.38, name="water", render=False)
        self._camera_set = False

    def _to_earth(self, k: int, pts: np.ndarray) -> np.ndarray:
        R = hull_to_earth(self.trace.heel[k], self.trace.trim[k])
        return (pts - self.K) @ R.T - np.array([0.0, 0.0, self.trace.keel_depth[k]])

    def _set_camera(self) -> None:
        p = self.plotter
        lo, hi = self.lo, self.hi
        centre = 0.5 * (lo + hi)
        ext = hi - lo
        aspect = self.size[0] / self.size[1]
        if self.camera == "astern":
            d = 6 * max(float(ext.max()), 1e-9)
            el = np.radians(4.0)  # a little above the water, so the sheet shows
            f = (centre[0], centre[1], centre[2])
            p.camera_position = [(f[0] - d * np.cos(el), f[1], f[2] + d * np.sin(el)), f, (0.0, 0.0, 1.0)]
            p.enable_parallel_projection()
            p.camera.parallel_scale = 0.55 * max(float(ext[2]), float(ext[1]) / aspect) * 1.08
        else:
            r = 0.5 * float(np.linalg.norm(ext))
            direction = np.array([-1.0, -0.9, 0.6])
            direction /= np.linalg.norm(direction)
            p.camera_position = [tuple(centre + 2.3 * r * direction), tuple(centre), (0.0, 0.0, 1.0)]
            p.camera.view_angle = 30.0
        self._camera_set = True

    def render(self, k: int, path: str) -> None:
        """Render angle ``k`` of the trace to the PNG ``path``."""
        pv = self.pv
        p = self.plotter
        t = self.trace
        mesh = self.base.copy()
        mesh.points = self._to_earth(k, self.hull.vertices)
        below = mesh.clip(normal=(0, 0, 1), origin=(0, 0, 0), invert=True)
        above = mesh.clip(normal=(0, 0, 1), origin=(0, 0, 0), invert=False)
        alpha = 1.0 if self.camera == "astern" else 0.72
        if below.n_points:
            p.add_mesh(below, color=COLOURS["below"], name="below", smooth_shading=False, render=False,
                       opacity=alpha)
        else:
            p.remove_actor("below", render=False)
        if above.n_points:
            p.add_mesh(above, color=COLOURS["above"], name="above", smooth_shading=False, render=False,
                       opacity=alpha)
        else:
            p.remove_actor("above", render=False)
        cut = self.hull.cut(self.K + t.keel_depth[k] * t.up[k], t.up[k], segments=True)
        if cut.segments is not None and len(cut.segments):
            seg = self._to_earth(k, cut.segments.reshape(-1, 3))
            seg[:, 2] += 1e-4 * self.r_axis  # keep the line above the sheet
            n = len(seg) // 2
            lines = np.hstack([np.full((n, 1), 2), np.arange(2 * n).reshape(n, 2)]).ravel()
            p.add_mesh(pv.PolyData(seg, lines=lines), color=COLOURS["waterline"], line_width=3, name="waterline", render=False)
        G = self._to_earth(k, t.cog_at(k)[None, :])[0]
        B = self._to_earth(k, t.cob[k][None, :])[0]
        M = self._to_earth(k, t.metacentre[k][None, :])[0]
        if self.camera == "astern":
            # seen along x in parallel projection: moving the marks astern of the hull keeps
            # their place on the picture and keeps them in front of the hull
            for q in (G, B, M):
                q[0] = self.x_front
        rad = 0.03 * self.r_axis
        p.add_mesh(pv.Sphere(radius=rad, center=G), color=COLOURS["G"], name="G", render=False)
        p.add_mesh(pv.Sphere(radius=rad, center=B), color=COLOURS["B"], name="B", render=False)
        if np.linalg.norm(M[1:]) < 1.1 * self.r_axis:
            p.add_mesh(pv.Sphere(radius=rad, center=M), color=COLOURS["M"], name="M", render=False)
            mtext = ""
        else:
            p.remove_actor("M", render=False)
            mtext = f"  (M off view: BM {t.bm[k]:.2f} m)"
        if getattr(t, "note", ""):
            mtext += f"\n{t.note}"
        Z = np.array([G[0], B[1], G[2]])
        p.add_mesh(pv.Line(G, Z), color=COLOURS["lever"], line_width=6, name="lever", render=False)
        ra = self.r_axis
        top = max(G[2], B[2], 0.0) + 0.5 * ra
        p.add_mesh(pv.Line(B - np.array([0, 0, 0.3 * ra]), np.array([B[0], B[1], top])), color=COLOURS["B"],
                   line_width=1, name="vB", render=False)
        p.add_mesh(pv.Line(G - np.array([0, 0, 0.5 * ra]), np.array([G[0], G[1], top])), color=COLOURS["G"],
                   line_width=1, name="vG", render=False)
        label = (f"heel {t.heel[k]:+.1f}°   GZ {t.gz[k]:+.3f} m   Δ {t.displacement:.3f} t   "
                 f"{_draft_text(t.draft[k])}   trim {t.trim[k]:+.2f}°{mtext}")
        fs = max(5, int(round(11 * self.size[0] / 960)))
        p.add_text(label, position="upper_left", font_size=fs, color="#222222", name="label", render=False)
        p.add_text("G black   B blue   M green   GZ orange   (viewed from astern: starboard on the right)"
                   if self.camera == "astern" else "G black   B blue   M green   GZ orange",
                   position="lower_left", font_size=max(4, fs - 3), color="#444444", name="legend", render=False)
        if not self._camera_set:
            self._set_camera()
        p.render()
        p.screenshot(path)

    def close(self) -> None:
        self.plotter.close()

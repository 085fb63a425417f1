"""Off-screen pyvista scenes of the hull floating at each angle of a heel sweep.

The hull is drawn in an earth frame (x forward, y to port, z up, water surface at
z = 0) so that it heels in front of a fixed camera, with the same camera, scale and
lighting in every frame: a sequence reads as motion. The submerged part and the
part above water have different colours; seen from astern (looking along the hull,
level with the water) the water is the region below the surface line at the
waterline, seen obliquely it is a translucent sheet. The waterline is drawn on the
hull; G, B and the pro-metacentre M are marked with letters as well as colours; the
righting lever is the horizontal segment from G to the vertical through B. The
header names the side, says whether GZ rights or heels, and the frame keeps the hull
clear of the header; the camera is noted at the foot.
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


def _draft_text(t: float, keel_depth: float) -> str:
    """Label text for a draft T [m] and the vertical depth of K [m] (positive under water): the draft
    while K is under water and the hull is heeled less than 90°; once K (the keel point on the centreline)
    is out of the water, as on a heeled catamaran, its height above the water; past 90° with K under
    water, its depth (a draft measured along the heeled hull's z axis would read as an error there)."""
    if keel_depth < 0.0:
        return f"keel point on the centreline {-keel_depth:.3f} m above the water"
    if np.isfinite(t) and t >= 0.0:
        return f"draft {t:.3f} m"
    return f"keel point on the centreline {keel_depth:.3f} m under water (heeled 90° or more)"


#: shares of the frame height kept free of the hull for the header (top) and the legend (foot)
TOP_BAND, FOOT_BAND = 0.12, 0.07
CAMERA_NOTE = {"astern": "camera: astern, looking forward level with the water (parallel projection); "
                         "starboard on the right",
               "oblique": "camera: oblique, from aft on the starboard quarter, above the water (perspective)"}


#: samples per pixel of the anti-aliased (smooth) frames
MULTI_SAMPLES = 8
#: half a unit of the last digit of GZ in the frame header [m]
GZ_SHOWN = 0.0005


def side_words(heel: float, gz: float) -> tuple[str, str]:
    """('to starboard' | 'to port' | 'upright', 'righting' | 'heeling' | 'no lever') for a heel [deg]
    (+ starboard down) and its GZ [m] (+ rights from a starboard heel); 'no lever' when |GZ| shows as
    0.000 m."""
    side = "upright" if heel == 0 else ("to starboard" if heel > 0 else "to port")
    if abs(gz) < GZ_SHOWN:  # shown as 0.000 m: no words that a round-off sign would decide
        return side, "no lever"
    if heel == 0:
        return side, "heels to starboard" if gz < 0 else "heels to port"
    return side, "righting" if gz * heel > 0 else "heeling"


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
    smooth : anti-alias edges (multisampling; in software OpenGL about twice the drawing time)
    split : give each coloured part only the faces that can reach its side of the water (a shortcut
        that leaves every pixel as it is; ``False`` draws every face twice, for checking it)
    """

    def __init__(self, hull: Hull, trace: Any, *, size: tuple[int, int] = (960, 720), camera: str = "astern",
                 smooth: bool = False, split: bool = True) -> None:
        if camera not in ("astern", "oblique"):
            from .errors import InputError

            raise InputError(f"camera must be astern or oblique, got {camera!r}")
        pv = _pv()
        self.pv = pv
        self.hull = hull
        self.trace = trace
        self.split = split
        self.K = np.array([hull.x_ref, 0.0, 0.0])
        self.size = size
        self.camera = camera
        self.plotter = pv.Plotter(off_screen=True, window_size=list(size))
        try:
            self._build(pv, smooth)
        except BaseException:  # the off-screen window is not left open behind a failed scene
            self.plotter.close()
            raise

    def _build(self, pv: Any, smooth: bool) -> None:
        """Everything of the scene but the plotter: water, hull, camera, marks."""
        hull, trace = self.hull, self.trace
        # the sample count takes effect when the window is first drawn, so it is set before that
        self.plotter.ren_win.SetMultiSamples(MULTI_SAMPLES if smooth else 0)
        self.plotter.set_background(COLOURS["background"])
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
        self._add_water(pv, hull)
        self._add_hull(pv)
        self._camera_set = False
        self.z_top, self.z_foot = np.inf, -np.inf
        self._set_camera()
        self._add_marks(pv)

    def _add_water(self, pv: Any, hull: Hull) -> None:
        """The water, the same in every frame (earth frame, surface at z = 0)."""
        ra = self.r_axis
        if self.camera == "astern":
            # looking along x level with the water: the water is a face beyond the bow, below z = 0,
            # and its surface a line at z = 0 in front of the hull, so the waterline reads as a surface
            x_back = float(hull.bounds[1][0] - self.K[0]) + 0.05 * hull.length
            body = pv.Plane(center=(x_back, 0.0, -2.0 * ra), direction=(1, 0, 0), i_size=4.0 * ra, j_size=12 * ra,
                            i_resolution=1, j_resolution=1)
            self.plotter.add_mesh(body, color=COLOURS["water"], opacity=0.45, name="water", render=False,
                                  lighting=False)
            line = pv.Line((self.x_front, -6 * ra, 0.0), (self.x_front, 6 * ra, 0.0))
            self.plotter.add_mesh(line, color=COLOURS["waterline"], line_width=2, name="surface", render=False)
        else:
            sheet = pv.Plane(center=(self.xc, 0.0, 0.0), direction=(0, 0, 1), i_size=1.1 * hull.length,
                             j_size=4 * ra, i_resolution=1, j_resolution=1)
            self.plotter.add_mesh(sheet, color=COLOURS["water"], opacity=0.38, name="water", render=False)

    def _add_hull(self, pv: Any) -> None:
        """The hull geometry, uploaded once in the hull frame, drawn twice: the part below the water
        and the part above it, each cut by the renderer at the earth plane z = 0 (a clipping plane in
        world coordinates); each frame only moves the actors (:meth:`_earth_matrix`)."""
        from vtkmodules.vtkCommonDataModel import vtkPlane

        alpha = 1.0 if self.camera == "astern" else 0.72
        # an opaque closed hull seen from outside hides every back face behind a front face: skipping
        # them halves the drawing and leaves the picture as it is (an open or see-through hull draws all)
        cull = "back" if alpha == 1.0 and self.hull.report.closed else None
        self.parts = {}
        points = pv.vtk_points(self.hull.vertices)  # one set of points, uploaded once per part
        for name, nz in (("below", -1.0), ("above", 1.0)):  # the renderer keeps the side the normal points to
            part = pv.PolyData()
            part.SetPoints(points)
            part.regular_faces = self.hull.faces
            actor = self.plotter.add_mesh(part, color=COLOURS[name], name=name, smooth_shading=False,
                                          render=False, opacity=alpha, culling=cull)
            plane = vtkPlane()
            plane.SetOrigin(0.0, 0.0, 0.0)
            plane.SetNormal(0.0, 0.0, nz)
            actor.GetMapper().AddClippingPlane(plane)
            self.parts[name] = (actor, part)

    def _split_faces(self, m: np.ndarray) -> None:
        """Give each part only the faces that can reach its side of the water (a shortcut: the clipping
        plane still does the cut). A face is kept when a vertex lies on that side or within a margin of
        the plane far wider than the renderer's single-precision round-off, so no drawn pixel changes."""
        if not self.split:
            return
        z = self.hull.vertices @ m[2, :3] + m[2, 3]  # earth z [m] of each vertex, (n_vertices,)
        tol = 1e-3 * max(self.r_axis, 1e-9)
        for name, near in (("below", z <= tol), ("above", z >= -tol)):
            keep = near[self.hull.faces].any(axis=1)  # (n_faces,) bool
            actor, part = self.parts[name]
            part.regular_faces = self.hull.faces[keep]
            actor.SetVisibility(bool(keep.any()))

    def _earth_matrix(self, k: int) -> np.ndarray:
        """(4, 4) homogeneous hull-to-earth transform of angle ``k`` (the same map as :meth:`_to_earth`)."""
        R = hull_to_earth(self.trace.heel[k], self.trace.trim[k])
        m = np.eye(4)
        m[:3, :3] = R
        m[:3, 3] = -R @ self.K - np.array([0.0, 0.0, self.trace.keel_depth[k]])
        return m

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
            # half-height S of the view: the hull's extent fits between the header band (top) and the
            # legend band (foot), and across the width, at every angle of the sweep
            free = 1.0 - TOP_BAND - FOOT_BAND
            S = 1.04 * max(float(ext[2]) / (2 * free), float(ext[1]) / (2 * aspect), 1e-9)
            zc = float(centre[2]) - S * (FOOT_BAND - TOP_BAND)
            f = (float(centre[0]), float(centre[1]), zc)
            p.camera_position = [(f[0] - d, f[1], f[2]), f, (0.0, 0.0, 1.0)]  # level with the water
            p.enable_parallel_projection()
            p.camera.parallel_scale = S
            self.z_top = zc + S * (1.0 - 2.0 * TOP_BAND)  # lowest z of the header band
            self.z_foot = zc - S * (1.0 - 2.0 * FOOT_BAND)  # highest z of the legend band
        else:
            r = 0.5 * float(np.linalg.norm(ext))
            direction = np.array([-1.0, -0.9, 0.6])
            direction /= np.linalg.norm(direction)
            # aim a little below the centre and stand back: the hull clears the header and the legend at every angle
            f = centre + np.array([0.0, 0.0, -0.08 * r])
            p.camera_position = [tuple(f + 3.6 * r * direction), tuple(f), (0.0, 0.0, 1.0)]
            p.camera.view_angle = 30.0
        self._camera_set = True

    def _add_marks(self, pv: Any) -> None:
        """The marks drawn in every frame, made once and moved per frame: spheres for G, B and M, the
        lever, the verticals through B and G, the waterline, the header and the legend."""
        p = self.plotter
        self.rad = 0.03 * self.r_axis
        self.marks: dict[str, Any] = {}
        for n in ("G", "B", "M"):
            self.marks[n] = p.add_mesh(pv.Sphere(radius=self.rad, center=(0.0, 0.0, 0.0)), color=COLOURS[n], name=n,
                                       render=False)
        self.lines: dict[str, Any] = {}
        for n, colour, width in (("lever", COLOURS["lever"], 6), ("vB", COLOURS["B"], 1), ("vG", COLOURS["G"], 1)):
            self.lines[n] = pv.Line((0.0, 0.0, 0.0), (0.0, 0.0, 1.0))
            p.add_mesh(self.lines[n], color=colour, line_width=width, name=n, render=False)
        self.waterline = pv.PolyData(np.zeros((2, 3)), lines=np.array([2, 0, 1]))
        self.waterline_actor = p.add_mesh(self.waterline, color=COLOURS["waterline"], line_width=3, name="waterline",
                                          render=False)
        fs = max(7, int(round(13 * self.size[0] / 960)))
        self.header = p.add_text("", position="upper_left", font_size=fs, color="#222222", name="label",
                                 render=False)
        p.add_text("G centre of gravity (black)   B centre of buoyancy (blue)   M metacentre (green)   "
                   "GZ lever (orange)\n" + CAMERA_NOTE[self.camera],
                   position="lower_left", font_size=max(6, fs - 2), color="#444444", name="legend", render=False)

    def _place_waterline(self, k: int) -> None:
        """The waterline of angle ``k`` (the kernel's cut segments), drawn just above the water."""
        t = self.trace
        cut = self.hull.cut(self.K + t.keel_depth[k] * t.up[k], t.up[k], segments=True)
        has = cut.segments is not None and len(cut.segments) > 0
        self.waterline_actor.SetVisibility(has)
        if has:
            seg = self._to_earth(k, cut.segments.reshape(-1, 3))
            seg[:, 2] += 1e-4 * self.r_axis  # keep the line above the sheet
            n = len(seg) // 2
            self.waterline.points = seg
            self.waterline.lines = np.hstack([np.full((n, 1), 2), np.arange(2 * n).reshape(n, 2)]).ravel()

    def render(self, k: int, path: str | None = None) -> np.ndarray:
        """Draw angle ``k`` of the trace: returns the picture, (height, width, 3) uint8 RGB, and writes it
        to the PNG ``path`` when given."""
        t = self.trace
        m = self._earth_matrix(k)
        self._split_faces(m)
        for actor, _ in self.parts.values():
            actor.user_matrix = m
        self._place_waterline(k)
        G = self._to_earth(k, t.cog_at(k)[None, :])[0]
        B = self._to_earth(k, t.cob[k][None, :])[0]
        M = self._to_earth(k, t.metacentre[k][None, :])[0]
        if self.camera == "astern":
            # seen along x in parallel projection: moving the marks astern of the hull keeps
            # their place on the picture and keeps them in front of the hull
            for q in (G, B, M):
                q[0] = self.x_front
        self.marks["G"].SetPosition(*G)
        self.marks["B"].SetPosition(*B)
        shown = [("G", G), ("B", B)]
        m_in_view = bool(np.linalg.norm(M[1:]) < 1.1 * self.r_axis)
        self.marks["M"].SetVisibility(m_in_view)
        if m_in_view:
            self.marks["M"].SetPosition(*M)
            shown.append(("M", M))
            mtext = ""
        else:
            mtext = f"   M off view (BM {t.bm[k]:.2f} m)"
        under = t.immersed(k) if hasattr(t, "immersed") else []
        if under:
            mtext += f"\nopening under water: {', '.join(under)} (past the downflooding angle)"
        if getattr(t, "note", ""):
            mtext += f"\n{t.note}"
        self._letters(shown, self.rad)
        self.lines["lever"].points = np.array([G, [G[0], B[1], G[2]]])
        ra = self.r_axis
        top = max(G[2], B[2], 0.0) + 0.5 * ra
        if self.camera == "astern" and self._camera_set:
            top = min(top, self.z_top)  # the verticals stop below the header text
        for q, below, name in ((B, 0.3, "vB"), (G, 0.5, "vG")):  # verticals through B and G, clear of the texts
            self.lines[name].points = np.array([[q[0], q[1], max(q[2] - below * ra, self.z_foot)], [q[0], q[1], top]])
        side, lever = side_words(float(t.heel[k]), float(t.gz[k]))
        heel = f"heel {abs(t.heel[k]):.1f}° {side}" if t.heel[k] != 0 else "upright"
        where = _draft_text(t.draft[k], t.keel_depth[k])
        self.header.set_text("upper_left", f"{heel}   GZ {abs(t.gz[k]):.3f} m {lever}\n"
                             f"Δ {t.displacement:.3f} t   {where}   trim {t.trim[k]:+.2f}° (+ bow down){mtext}")
        self.plotter.render()
        rgb = self.plotter.screenshot(None, return_img=True)
        if path is not None:
            from PIL import Image

            Image.fromarray(rgb).save(path, format="PNG", compress_level=1)
        return rgb

    def _letters(self, shown: list[tuple[str, np.ndarray]], rad: float) -> None:
        """The letters G, B, M beside their marks (offset up and to the left on the picture)."""
        # G up and to the left, B down and to the left, M up and to the right, so that letters of marks
        # that nearly coincide (B and M at large heels) do not overlap; seen from astern +y is the left
        side = {"G": (1.0, 1.0), "B": (1.0, -1.4), "M": (-1.0, 1.0)}
        pts = []
        for n, q in shown:
            a, b = side[n]
            if self.camera == "astern":
                pts.append(q + np.array([0.0, 2.6 * a * rad, 2.0 * b * rad]))
            else:
                pts.append(q + np.array([0.0, 0.0, 2.5 * b * rad]))
        fs = max(8, int(round(16 * self.size[0] / 960)))
        self.plotter.add_point_labels(np.array(pts), [n for n, _ in shown], font_size=fs, bold=True,
                                      text_color="#111111", show_points=False, shape="rect", shape_color="white",
                                      shape_opacity=0.75, margin=2, always_visible=True, name="letters",
                                      render=False)

    def close(self) -> None:
        self.plotter.close()


def render_pictures(hull: Hull, trace: Any, *, size: tuple[int, int] = (960, 720), camera: str = "astern",
                    smooth: bool = False, sheet: bool = True, gif: bool = True, progress: Any = None) -> Any:
    """Draw every angle of the trace and encode the pictures while the next frame draws.

    Returns a :class:`meshhydro.frame_files.SweepPictures` (frame PNGs in angle order, the contact sheet
    and the GIF when asked). ``progress`` is called once per frame drawn.
    """
    from .frame_files import FrameEncoder

    scene = Scene(hull, trace, size=size, camera=camera, smooth=smooth)
    encoder = FrameEncoder(sheet=sheet, gif=gif, count=len(trace.heel))
    try:
        for k in range(len(trace.heel)):
            encoder.add(scene.render(k))
            if progress is not None:
                progress()
    except BaseException:
        encoder.cancel()
        raise
    finally:
        scene.close()
    return encoder.finish()

"""The heel sweep: B trace, metacentre locus and the outputs for a design review.

At each heel of the sweep the hull floats at its free-trim position (displacement and
longitudinal moment balanced). Per angle the trace holds, in the hull frame:

* B, the centre of buoyancy;
* M, the pro-metacentre of that angle: ``M = B + (I_T / V) up``, with I_T the
  waterplane's second moment about its longitudinal axis through its centroid and
  ``up`` the earth vertical of that angle (for a wall-sided box
  ``BM_φ = B² / (12 T cos³ φ)``);
* G (free-surface corrected), GZ, draft and trim.

A fully submerged body (a load equal to the hull's whole buoyancy) has no waterplane: B stays
fixed in the hull and M lies on B at every angle (BM = 0); the trace carries the note
"no waterplane: weight stability only".

:func:`write_sweep` renders frames, the section view, a contact sheet and a GIF into a
folder. It builds everything in a temporary folder beside the target and swaps it in
only when complete (:func:`meshhydro.output.atomic_dir`: removed on error, SIGINT or SIGTERM, and a folder
left by a killed run is removed on the next run); a target that holds anything but an earlier sweep is refused.
"""
from __future__ import annotations

import math
import os
import time
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from .errors import InputError
from .frames import SEA_WATER
from .hull import Hull, vec3
from .stability import RightingCurve, righting_curve
from .submerged import NOTE as SUBMERGED_NOTE
from .output import atomic_dir, to_json

MARKER = ".meshhydro-sweep"


@dataclass(frozen=True, eq=False)
class Trace:
    """A heel sweep: a free-trim righting curve seen as B, M and G positions (hull frame, SI, degrees).

    The per-angle arrays are the curve's own (``heel, gz, draft, trim`` (n,), ``cob, up`` (n, 3),
    ``bm`` (n,) [m], ``cog`` (3,) [m], ``displacement``, ``density``); ``metacentre`` (n, 3) [m] is
    the pro-metacentre ``B + BM up`` of each angle.
    """

    curve: RightingCurve
    label: str = ""

    heel = property(lambda self: self.curve.heel)
    gz = property(lambda self: self.curve.gz)
    draft = property(lambda self: self.curve.draft)
    keel_depth = property(lambda self: self.curve.keel_depth)
    trim = property(lambda self: self.curve.trim)
    cob = property(lambda self: self.curve.cob)
    up = property(lambda self: self.curve.up)
    bm = property(lambda self: self.curve.bm)
    cog = property(lambda self: self.curve.cog)
    displacement = property(lambda self: self.curve.displacement)
    density = property(lambda self: self.curve.density)

    def cog_at(self, k: int) -> np.ndarray:
        """G (3,) [m] at the k-th angle (moves with shifting tank fluid)."""
        return self.curve.centre_at(k)

    @property
    def metacentre(self) -> np.ndarray:
        """Pro-metacentre (n, 3) [m] of each angle: B + (I_T / V) up."""
        return self.curve.cob + self.curve.bm[:, None] * self.curve.up

    def to_dict(self) -> dict[str, Any]:
        rows = []
        for k in range(len(self.heel)):
            t = float(self.draft[k])
            rows.append({"heel": float(self.heel[k]), "draft": t if math.isfinite(t) else None,
                         "keel_depth": float(self.keel_depth[k]), "trim": float(self.trim[k]),
                         "gz": float(self.gz[k]), "B": self.cob[k].tolist(), "M": self.metacentre[k].tolist(),
                         "G": self.cog_at(k).tolist(), "up": self.up[k].tolist(), "bm": float(self.bm[k]),
                         "openings_under_water": self.immersed(k)})
        return {"label": self.label, "displacement": self.displacement, "density": self.density,
                "frame": "hull frame: x forward, y to port, z up [m]; heel positive starboard down",
                "submerged": bool(self.curve.submerged), "note": self.note, "angles": rows}

    def immersed(self, k: int) -> list[str]:
        """Names of the openings under water at the k-th angle (their height above the water below zero)."""
        return [name for name, fb in self.curve.openings.items() if fb[k] < 0.0]

    @property
    def note(self) -> str:
        """Plain words for a fully submerged sweep (B fixed, M on B), else empty."""
        return f"fully submerged: B fixed, M on B; {SUBMERGED_NOTE}" if self.curve.submerged else ""


def heel_trace(hull: Hull, displacement: float, cog: Sequence[float], heels: Sequence[float], *,
               density: float = SEA_WATER, fsm: float = 0.0, label: str = "", progress: Any = None,
               submerged_depth: float = 0.0, load: Any = None, compartments: Sequence[Any] = (),
               openings: Sequence[Any] = ()) -> Trace:
    """Free-trim positions over ``heels`` [deg] with B, M and G in the hull frame.

    ``submerged_depth`` [m]: see :func:`meshhydro.stability.righting_curve`. ``load`` (a
    :class:`meshhydro.load.Load`, e.g. a condition's ``load()`` with tank fluid that shifts) replaces
    displacement, cog and fsm when given; ``compartments`` are flooded (lost buoyancy); ``openings``
    (objects with ``name`` and ``at``) are followed, so that a frame says which are under water.
    """
    if load is not None or compartments:
        from .load import FixedLoad
        from .stability import curve_for_load

        ld = load if load is not None else FixedLoad(displacement, vec3(cog, "cog"), fsm)
        return Trace(curve_for_load(hull, ld, heels=heels, density=density, progress=progress,
                                    compartments=compartments, submerged_depth=submerged_depth,
                                    openings=openings), label)
    return Trace(righting_curve(hull, displacement=displacement, cog=vec3(cog, "cog"), heels=heels, density=density,
                                fsm=fsm, progress=progress, submerged_depth=submerged_depth, openings=openings),
                 label)


def condition_trace(hull: Hull, cond: Any, heels: Sequence[float], *, density: float, label: str = "",
                    progress: Any = None, submerged_depth: float = 0.0, openings: Sequence[Any] = ()) -> Trace:
    """:func:`heel_trace` of a loading condition (:class:`meshhydro.loading.Condition`) as its own curve is
    solved: its tank fluid by the condition's method and its flooded spaces (lost buoyancy)."""
    return heel_trace(hull, cond.displacement, cond.cog, heels, density=density, fsm=cond.fsm, label=label,
                      progress=progress, submerged_depth=submerged_depth,
                      load=cond.load() if cond.tanks else None, compartments=cond.flooded, openings=openings)


def _check_target(out: str) -> None:
    """Refuse an output path that is a file, or a folder holding anything but an earlier sweep."""
    if os.path.exists(out):
        if not os.path.isdir(out):
            raise InputError(f"{out}: exists and is not a folder")
        if os.listdir(out) and not os.path.exists(os.path.join(out, MARKER)):
            raise InputError(f"{out}: folder is not empty and holds no earlier sweep; choose another folder")


def _write_bytes(path: str, data: bytes) -> None:
    with open(path, "wb") as fh:
        fh.write(data)


def write_sweep(hull: Hull, trace: Trace, out: str, *, view: str = "both", size: tuple[int, int] = (960, 720),
                sheet: bool = True, gif: bool = True, camera: str = "astern", smooth: bool = False,
                progress: Any = None, timings: dict[str, float] | None = None) -> list[str]:
    """Write the sweep outputs into folder ``out`` (replacing an earlier sweep whole).

    Writes ``trace.json``; with view 3d or both: ``frames/frame_NNN_<heel>.png``,
    ``sheet.png`` and ``sweep.gif`` when asked; with section or both: ``section.png``.
    Returns the written paths (relative to ``out``).
    """
    if view not in ("3d", "section", "both"):
        raise InputError(f"view must be 3d, section or both, got {view!r}")
    out = os.path.abspath(out)
    _check_target(out)
    written: list[str] = []
    tt = timings if timings is not None else {}
    with atomic_dir(out) as tmp:
        with open(os.path.join(tmp, MARKER), "w") as fh:
            fh.write("outputs of meshhydro sweep; this folder is replaced whole on the next run\n")
        with open(os.path.join(tmp, "trace.json"), "w") as fh:
            fh.write(to_json(trace.to_dict()))
        written.append("trace.json")
        if view in ("section", "both"):
            from .figure_data import largest_section_outline, section_data
            from .figures import section_plot

            t = time.perf_counter()
            name = trace.label or os.path.basename(str(getattr(hull, "name", "")))
            section_plot(section_data(trace, name, outline=largest_section_outline(hull)),
                         path=os.path.join(tmp, "section.png"))
            tt["section"] = time.perf_counter() - t
            written.append("section.png")
        if view in ("3d", "both"):
            from .render import render_pictures

            t = time.perf_counter()
            pics = render_pictures(hull, trace, size=size, camera=camera, smooth=smooth, sheet=sheet, gif=gif,
                                   progress=progress)
            os.makedirs(os.path.join(tmp, "frames"))
            for k, png in enumerate(pics.frames):
                name = f"frame_{k:03d}_{trace.heel[k]:+07.2f}.png".replace("+", "p").replace("-", "m")
                _write_bytes(os.path.join(tmp, "frames", name), png)
                written.append(os.path.join("frames", name))
            for name, data in (("sheet.png", pics.sheet), ("sweep.gif", pics.gif)):
                if data is not None:
                    _write_bytes(os.path.join(tmp, name), data)
                    written.append(name)
            tt["render"] = time.perf_counter() - t
    return written

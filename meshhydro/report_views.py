"""Drawing the figures of a design-review document (a views module).

:class:`ReportDrawer` is the ``draw`` callable :func:`meshhydro.html.render_html` takes: line art
through the report-grade views of :mod:`meshhydro.figures` (SVG text); heel-sweep pictures
(``sweep_frame`` figures carrying a :class:`meshhydro.review.SweepFigure`) rendered off-screen by
:mod:`meshhydro.render` as PNG frames and an animated GIF (bytes). A sweep's frames are rendered
once, in one scene, and reused for its animation.
"""
from __future__ import annotations

from typing import Any, Callable

from . import figures
from .document import Figure
from .errors import InputError


class ReportDrawer:
    """``drawer(figure) -> SVG text | PNG/GIF bytes``.

    ``bars(total, label)`` gives a progress counter (a callable with ``close()``) for frame rendering;
    ``tick`` (optional) is called once per figure drawn.
    """

    def __init__(self, bars: Callable[[int, str], Any] | None = None, tick: Callable[[], Any] | None = None) -> None:
        self.bars = bars
        self.tick = tick
        self._sweeps: dict[int, tuple[list[bytes], bytes]] = {}

    def __call__(self, fig: Figure) -> str | bytes:
        out = self._sweep(fig) if fig.view == "sweep_frame" else figures.draw(fig)
        if self.tick is not None:
            self.tick()
        return out

    def _sweep(self, fig: Figure) -> bytes:
        d = fig.data
        frames, gif = self._rendered(d)
        if d.picture == "frame":
            if not 0 <= d.index < len(frames):
                raise InputError(f"figure {fig.key!r}: frame {d.index} is not in the sweep of {len(frames)} angles")
            return frames[d.index]
        if d.picture == "animation":
            return gif
        raise InputError(f"figure {fig.key!r}: sweep picture must be 'frame' or 'animation', got {d.picture!r}")

    def _rendered(self, d: Any) -> tuple[list[bytes], bytes]:
        key = id(d.trace)
        if key not in self._sweeps:
            self._sweeps[key] = render_sweep(d.hull, d.trace, size=d.size, camera=d.camera, smooth=d.smooth,
                                             bars=self.bars)
        return self._sweeps[key]


def render_sweep(hull: Any, trace: Any, *, size: tuple[int, int], camera: str, smooth: bool = False,
                 bars: Callable[[int, str], Any] | None = None) -> tuple[list[bytes], bytes]:
    """PNG bytes of every frame of the trace, and the animated GIF of them (forth and back)."""
    from .render import render_pictures

    bar = bars(len(trace.heel), "rendering frames") if bars is not None else None
    try:
        pics = render_pictures(hull, trace, size=size, camera=camera, smooth=smooth, sheet=False, gif=True,
                               progress=bar)
    finally:
        if bar is not None:
            bar.close()
    return pics.frames, pics.gif

"""Files of a rendered heel sweep: a PNG of every frame, the contact sheet and the animated GIF.

Frames arrive as RGB arrays while the next one draws; :class:`FrameEncoder` encodes each on one
background thread (Pillow releases the interpreter lock while it compresses and quantizes, so the
work overlaps the drawing). Each frame is quantized for the GIF once; the return leg of the
forth-and-back animation repeats the same images. The sheet is pasted from the arrays, never read
back from files.
"""
from __future__ import annotations

import io
import math
from concurrent.futures import Future, ThreadPoolExecutor
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

#: zlib level of the frame PNGs: a light compression encodes several times faster than the default
FRAME_PNG_LEVEL = 1
#: zlib level of the contact sheet (a large picture: a middle level keeps the file small and quick)
SHEET_PNG_LEVEL = 3
#: most pixels of the frames on a contact sheet: beyond it each frame is reduced by a whole factor (box
#: filter), so a long sweep of large frames neither builds a sheet nobody can open nor holds every frame
SHEET_MAX_PIXELS = 40_000_000


@dataclass(frozen=True)
class SweepPictures:
    """Encoded pictures: ``frames`` PNG bytes in angle order; ``sheet`` PNG and ``gif`` bytes or None."""

    frames: list[bytes]
    sheet: bytes | None
    gif: bytes | None


def png_bytes(rgb: np.ndarray, *, level: int = FRAME_PNG_LEVEL) -> bytes:
    """PNG file bytes of an (h, w, 3) uint8 RGB picture."""
    from PIL import Image

    buf = io.BytesIO()
    Image.fromarray(rgb).save(buf, format="PNG", compress_level=level)
    return buf.getvalue()


def sheet_array(frames: Sequence[np.ndarray], *, columns: int | None = None, pad: int = 6) -> np.ndarray:
    """Grid of equal-size (h, w, 3) uint8 frames on white, ``pad`` pixels apart: (H, W, 3) uint8.

    Columns default to a grid about as tall as it is wide."""
    if not frames:
        raise ValueError("a contact sheet needs at least one frame")
    h, w = frames[0].shape[:2]
    n = len(frames)
    cols = columns or int(np.ceil(np.sqrt(n * h / w))) or 1
    cols = max(1, min(cols, n))
    rows = int(np.ceil(n / cols))
    sheet = np.full((rows * h + (rows + 1) * pad, cols * w + (cols + 1) * pad, 3), 255, dtype=np.uint8)
    for i, a in enumerate(frames):
        r, c = divmod(i, cols)
        y, x = pad + r * (h + pad), pad + c * (w + pad)
        sheet[y:y + h, x:x + w] = a[..., :3]
    return sheet


def quantized(rgb: np.ndarray) -> Any:
    """The frame as a 255-colour palette image (median cut) for the GIF."""
    from PIL import Image

    return Image.fromarray(rgb).quantize(colors=255, method=Image.Quantize.MEDIANCUT)


def gif_bytes(images: Sequence[Any], *, frame_ms: int = 350, bounce: bool = True) -> bytes:
    """Animated GIF of palette images (forth and back when ``bounce``), looping."""
    seq = list(images)
    if bounce and len(seq) > 2:
        seq = seq + seq[-2:0:-1]
    buf = io.BytesIO()
    seq[0].save(buf, format="GIF", save_all=True, append_images=seq[1:], duration=frame_ms, loop=0, disposal=2)
    return buf.getvalue()


class FrameEncoder:
    """Encodes frames on a background thread as they are drawn.

    ``add(rgb)`` queues a frame (angle order); ``finish()`` waits and returns the
    :class:`SweepPictures`; ``cancel()`` drops queued work (on an error). The sheet and the GIF are
    made only when asked; ``count`` (the frames to come) lets the sheet's frames be reduced so that
    the sheet stays within :data:`SHEET_MAX_PIXELS`.
    """

    def __init__(self, *, sheet: bool = True, gif: bool = True, count: int | None = None) -> None:
        self.want_sheet, self.want_gif = sheet, gif
        self.count = count
        self._pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="meshhydro-frames")
        self._jobs: list[Future] = []

    def add(self, rgb: np.ndarray) -> None:
        self._jobs.append(self._pool.submit(self._encode, rgb))

    def _encode(self, rgb: np.ndarray) -> tuple[bytes, Any, np.ndarray | None]:
        return png_bytes(rgb), (quantized(rgb) if self.want_gif else None), \
            (self._for_sheet(rgb) if self.want_sheet else None)

    def _for_sheet(self, rgb: np.ndarray) -> np.ndarray:
        """The frame as the sheet shows it: reduced by a whole factor when the sheet would be too large."""
        h, w = rgb.shape[:2]
        f = math.ceil(math.sqrt((self.count or 1) * h * w / SHEET_MAX_PIXELS))
        if f <= 1:
            return rgb
        from PIL import Image

        return np.asarray(Image.fromarray(rgb).reduce(f))

    def finish(self) -> SweepPictures:
        try:
            done = [j.result() for j in self._jobs]
            gif_job = self._pool.submit(gif_bytes, [q for _, q, _ in done]) if self.want_gif and done else None
            sheet = png_bytes(sheet_array([a for _, _, a in done]), level=SHEET_PNG_LEVEL) \
                if self.want_sheet and done else None
            return SweepPictures([p for p, _, _ in done], sheet, gif_job.result() if gif_job is not None else None)
        finally:
            self._pool.shutdown(wait=True)

    def cancel(self) -> None:
        self._pool.shutdown(wait=True, cancel_futures=True)

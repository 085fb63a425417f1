"""Progress bars on standard error, drawn by tqdm: a thin wrapper with the two call shapes the library uses.

* :class:`Progress` — ``bar()`` once per unit of work (curve angles, rendered frames), ``bar.close()``
  at the end; :meth:`Progress.stage` gives the ``progress(stage, done, total)`` callback that mesh
  loading and checking call (:func:`meshhydro.mesh.check_mesh`), one bar per stage.
* Quiet unless the stream is a terminal (and always quiet with ``enabled=False``, the CLI's
  ``--quiet``); a bar appears only after ``delay`` seconds, so short steps print nothing.

Nothing here decides what is computed: a bar only counts calls.
"""
from __future__ import annotations

import sys
from typing import Any, TextIO


def _is_terminal(stream: Any) -> bool:
    return bool(getattr(stream, "isatty", None) and stream.isatty())


class Progress:
    """Call once per unit of work (``bar()`` or ``bar(n)``); ``close()`` when done.

    Parameters
    ----------
    total : int
        Units of work expected (at least 1).
    label : str
        Shown before the bar.
    enabled : bool | None
        None: draw only when ``stream`` is a terminal; False: never draw.
    stream : text stream, default standard error
    delay : float [s]
        Nothing is drawn for steps shorter than this.
    """

    def __init__(self, total: int, label: str, *, enabled: bool | None = None, stream: TextIO | None = None,
                 delay: float = 1.0) -> None:
        self.total = max(int(total), 1)
        self.label = label
        self.stream = stream or sys.stderr
        self.enabled = _is_terminal(self.stream) if enabled is None else bool(enabled)
        self.delay = delay
        self.done = 0
        self._bar: Any = None
        self._stages: dict[str, Any] = {}

    def _new(self, total: int, label: str) -> Any:
        from tqdm import tqdm

        return tqdm(total=max(int(total), 1), desc=label, file=self.stream, delay=self.delay, leave=False,
                    dynamic_ncols=True, unit="", bar_format="{desc} {percentage:3.0f}%|{bar}| {n_fmt}/{total_fmt} "
                                                              "[{elapsed}<{remaining}]")

    def __call__(self, n: int = 1) -> None:
        self.done += n
        if not self.enabled:
            return
        if self._bar is None:
            self._bar = self._new(self.total, self.label)
        self._bar.update(n)

    def stage(self, stage: str, done: int, total: int) -> None:
        """Callback of the shape ``progress(stage, done, total)``: one bar per stage name."""
        if not self.enabled:
            return
        bar = self._stages.get(stage)
        if bar is None:
            bar = self._stages[stage] = self._new(total, f"{self.label}: {stage}")
        bar.total = max(int(total), 1)
        bar.update(max(int(done) - bar.n, 0))

    def close(self) -> None:
        """Remove the bars (they leave no line behind)."""
        for bar in [self._bar, *self._stages.values()]:
            if bar is not None:
                bar.close()
        self._bar = None
        self._stages = {}

    def __enter__(self) -> "Progress":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

"""Small helpers shared by the figure modules: a fresh Agg figure, line styles, data checks."""
from __future__ import annotations

from typing import Any, Mapping

from .errors import InputError

#: Colours and line styles cycled together, so curves differ in print and for colour-blind readers.
COLOURS = ("#1f5fa8", "#c0392b", "#2e8b57", "#8e44ad", "#d35400", "#5d6d7e", "#b7950b")
STYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (8, 3)), (0, (1, 1)))
MARKERS = ("o", "s", "^", "D", "v", "P", "X")


def new_figure(size: tuple[float, float], rows: int = 1, cols: int = 1, **kw: Any) -> tuple[Any, Any]:
    """A matplotlib Figure on the Agg canvas (no pyplot state) and its axes; size in inches."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure as MplFigure

    fig = MplFigure(figsize=size, dpi=100)
    FigureCanvasAgg(fig)
    axes = fig.subplots(rows, cols, **kw)
    return fig, axes


def side_style(i: int) -> tuple[str, Any]:
    """(colour, line style) of the i-th series."""
    return COLOURS[i % len(COLOURS)], STYLES[i % len(STYLES)]


def check_keys(data: Mapping[str, Any], allowed: set[str], required: set[str], where: str) -> None:
    """Refuse a non-mapping, an unknown key or a missing key, naming it and where it is."""
    if not isinstance(data, Mapping):
        raise InputError(f"{where}: figure data must be a mapping, got {type(data).__name__}")
    unknown = sorted(set(data) - allowed)
    if unknown:
        raise InputError(f"{where}: unknown key {unknown[0]!r} (known: {', '.join(sorted(allowed))})")
    missing = sorted(required - set(data))
    if missing:
        raise InputError(f"{where}: missing key {missing[0]!r}")

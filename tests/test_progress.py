"""Progress bars: drawn by tqdm on a terminal, silent otherwise or when disabled (--quiet)."""
from __future__ import annotations

import io

from meshhydro.progress import Progress


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_bar_on_a_terminal():
    out = _Terminal()
    bar = Progress(3, "curve", stream=out, delay=0.0)
    for _ in range(3):
        bar()
    bar.close()
    text = out.getvalue()
    assert "curve" in text and "/3" in text and bar.done == 3  # tqdm redraws at most every 0.1 s


def test_stage_bars_follow_the_loader():
    out = _Terminal()
    bar = Progress(1, "mesh", stream=out, delay=0.0)
    bar.stage("read", 5, 10)
    bar.stage("read", 10, 10)
    bar.stage("check", 1, 3)
    bar.close()
    text = out.getvalue()
    assert "mesh: read" in text and "/10" in text and "mesh: check" in text and "/3" in text


def test_silent_off_a_terminal_and_when_quiet():
    pipe = io.StringIO()  # not a terminal: nothing is drawn
    bar = Progress(2, "curve", stream=pipe, delay=0.0)
    bar()
    bar.stage("read", 1, 2)
    bar.close()
    quiet = _Terminal()
    bar = Progress(2, "curve", stream=quiet, enabled=False, delay=0.0)
    bar()
    bar.close()
    assert pipe.getvalue() == "" and quiet.getvalue() == "" and bar.done == 1

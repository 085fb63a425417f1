"""Writing outputs whole or not at all, and formatting numbers as text tables, CSV and JSON.

Files are written to a hidden temporary beside the target (``.<name>.<pid>-<random>.part<ext>``) and renamed
onto it, so a reader sees the old file or the new one, never half of one. The new file gets the mode the
user's umask gives (or keeps the mode of the file it replaces). Temporaries still open when the process gets
SIGINT or SIGTERM are removed; those left by a run that was killed outright are removed on the next write to
the same target. Errors name the target, never the temporary.
"""
from __future__ import annotations

import contextlib
import io
import json
import math
import os
import shutil
import signal
import tempfile
import threading
from typing import Any, Callable, Iterable, Iterator, Sequence

import numpy as np

from .errors import InputError

__all__ = ["write_atomic", "save_atomic", "save_figure", "figure_format", "atomic_dir",
           "remove_stale", "cleanup_temps", "text_table", "key_values", "to_csv", "to_json", "csv_number",
           "format_column", "FIGURE_FORMATS", "CSV_DECIMALS"]

#: Figure formats (file suffixes, also matplotlib's format names) :func:`save_figure` writes by default.
FIGURE_FORMATS = ("png", "svg", "pdf")
_LIVE: set[str] = set()
_LOCK = threading.RLock()  # re-entrant: the signal handler may run while the main thread holds it
_HANDLED = False
_PREVIOUS: dict[int, Any] = {}  # signal -> handler in place before ours, called after the cleanup


# ---------------------------------------------------------------- temporaries and signals

def _on_signal(signum: int, frame: Any) -> None:
    cleanup_temps()
    prev = _PREVIOUS.get(signum)
    if callable(prev):
        prev(signum, frame)
    else:
        signal.signal(signum, signal.SIG_DFL)
        os.kill(os.getpid(), signum)


def _install_handlers() -> None:
    """Chain SIGINT/SIGTERM handlers that remove live temporaries (main thread only, once)."""
    global _HANDLED
    if _HANDLED or threading.current_thread() is not threading.main_thread():
        return
    for sig in (signal.SIGINT, signal.SIGTERM):
        prev = signal.getsignal(sig)
        if prev is signal.SIG_IGN:
            continue
        _PREVIOUS[sig] = prev
        signal.signal(sig, _on_signal)
    _HANDLED = True


def cleanup_temps() -> None:
    """Remove every temporary file or folder this process still has open (called by the signal handlers)."""
    with _LOCK:
        live = list(_LIVE)
        _LIVE.clear()
    for p in live:
        if os.path.isdir(p) and not os.path.islink(p):
            shutil.rmtree(p, ignore_errors=True)
        else:
            with contextlib.suppress(OSError):
                os.unlink(p)


@contextlib.contextmanager
def _registered(path: str) -> Iterator[str]:
    _install_handlers()
    with _LOCK:
        _LIVE.add(path)
    try:
        yield path
    finally:
        with _LOCK:
            _LIVE.discard(path)


def _prefix(path: str) -> str:
    return "." + os.path.basename(path) + "."


def remove_stale(path: str) -> list[str]:
    """Remove temporaries beside ``path`` left by runs that are no longer alive; returns what was removed.

    Only names of our own pattern ``.<name>.<pid>-<random>.part[<ext>]`` whose process is gone are touched.
    """
    d = os.path.dirname(os.path.abspath(path))
    pre = _prefix(path)
    removed = []
    try:
        names = os.listdir(d)
    except OSError:
        return removed
    for n in names:
        if not n.startswith(pre) or ".part" not in n[len(pre):]:
            continue
        tag = n[len(pre):].split(".part", 1)[0]
        pid = tag.split("-", 1)[0]
        if not pid.isdigit() or int(pid) == os.getpid() or _alive(int(pid)):
            continue
        p = os.path.join(d, n)
        if os.path.isdir(p) and not os.path.islink(p):
            shutil.rmtree(p, ignore_errors=True)
        else:
            with contextlib.suppress(OSError):
                os.unlink(p)
        removed.append(p)
    return removed


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def _folder(path: str) -> str:
    d = os.path.dirname(os.path.abspath(path)) or "."
    if not os.path.isdir(d):
        raise InputError(f"{path}: the folder {d} does not exist")
    return d


def _new_mode(path: str) -> int:
    """Mode for a new file at ``path``: that of the file it replaces, else 0o666 less the umask."""
    try:
        return os.stat(path).st_mode & 0o7777
    except OSError:
        pass
    return 0o666 & ~_umask()


def _tmp_beside(path: str, ext: str = "") -> tuple[int, str]:
    d = _folder(path)
    remove_stale(path)
    try:
        return tempfile.mkstemp(prefix=f"{_prefix(path)}{os.getpid()}-", suffix=".part" + ext, dir=d)
    except OSError as exc:
        raise InputError(f"{path}: cannot be written ({exc.strerror})") from None


def _commit(tmp: str, path: str) -> None:
    try:
        os.chmod(tmp, _new_mode(path))
        os.replace(tmp, path)
    except OSError as exc:
        raise InputError(f"{path}: cannot be written ({exc.strerror})") from None


def write_atomic(path: str, data: str | bytes) -> None:
    """Write ``data`` (text as UTF-8) to ``path`` whole or not at all."""
    fd, tmp = _tmp_beside(path)
    with _registered(tmp):
        try:
            try:
                with os.fdopen(fd, "wb") as fh:
                    fh.write(data.encode("utf-8") if isinstance(data, str) else data)
            except OSError as exc:
                raise InputError(f"{path}: cannot be written ({exc.strerror})") from None
            _commit(tmp, path)
        except BaseException:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
            raise


def save_atomic(path: str, writer: Callable[[str], None]) -> None:
    """Call ``writer(tmp_path)`` (the temporary keeps the target's suffix) and move the result onto ``path``
    only if it succeeds. An ``OSError`` of the writer is reported against ``path``."""
    ext = os.path.splitext(path)[1]
    fd, tmp = _tmp_beside(path, ext)
    os.close(fd)
    with _registered(tmp):
        try:
            try:
                writer(tmp)
            except OSError as exc:
                raise InputError(f"{path}: cannot be written ({exc.strerror or exc})") from None
            if not os.path.exists(tmp):
                raise InputError(f"{path}: the writer produced no file")
            _commit(tmp, path)
        except BaseException:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
            raise


@contextlib.contextmanager
def atomic_dir(path: str) -> Iterator[str]:
    """A hidden temporary folder beside ``path`` to fill; on success it replaces ``path`` whole.

    Removed on error, SIGINT or SIGTERM; a folder left by a killed run is removed on the next use.
    Checking what ``path`` may hold before it is replaced is the caller's business.
    """
    d = _folder(path)
    remove_stale(path)
    tmp = tempfile.mkdtemp(prefix=f"{_prefix(path)}{os.getpid()}-", suffix=".part", dir=d)
    os.chmod(tmp, 0o777 & ~_umask())
    with _registered(tmp):
        try:
            yield tmp
            old = None
            if os.path.exists(path):
                old = tempfile.mkdtemp(prefix=f"{_prefix(path)}{os.getpid()}-", suffix=".part", dir=d)
                os.rmdir(old)
                os.rename(path, old)
            os.rename(tmp, path)
            if old:
                shutil.rmtree(old, ignore_errors=True)
        except BaseException:
            shutil.rmtree(tmp, ignore_errors=True)
            raise


def _umask() -> int:
    """The process umask, read from /proc where it is shown, else set and restored."""
    try:
        with open("/proc/self/status") as fh:
            for line in fh:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    with _LOCK:
        mask = os.umask(0o022)
        os.umask(mask)
    return mask


def figure_format(path: str, allowed: Sequence[str] = FIGURE_FORMATS) -> str:
    """The format of a figure file from its suffix (``'png'``, ``'svg'``, ``'pdf'``, ...); a suffix not in
    ``allowed`` is an :class:`InputError` listing the allowed ones. Call it before computing the figure."""
    ext = os.path.splitext(str(path))[1].lower().lstrip(".")
    if ext not in allowed:
        got = f"suffix .{ext}" if ext else "no suffix"
        raise InputError(f"{path}: cannot write a figure with {got}; use "
                         f"{', '.join('.' + a for a in allowed)}")
    return ext


def save_figure(path: str, fig: Any, *, dpi: int = 130, allowed: Sequence[str] = FIGURE_FORMATS) -> None:
    """Write a matplotlib figure in the format its suffix names (PNG, SVG or PDF; GIF when ``allowed``
    includes it, as a single still image through Pillow), atomically."""
    fmt = figure_format(path, allowed)
    if fmt == "gif":
        def writer(tmp: str) -> None:
            from PIL import Image

            buf = io.BytesIO()
            fig.savefig(buf, dpi=dpi, format="png")
            buf.seek(0)
            Image.open(buf).convert("RGB").save(tmp, format="GIF")
    else:
        def writer(tmp: str) -> None:
            fig.savefig(tmp, dpi=dpi, format=fmt)
    save_atomic(path, writer)


# ---------------------------------------------------------------- text

def text_table(rows: Sequence[dict[str, Any]], keys: Sequence[str], units: dict[str, str] | None = None,
               digits: dict[str, int] | int = 3, headers: dict[str, str] | None = None, *,
               max_digits: int = 8, exponent: Sequence[str] = ()) -> str:
    """An aligned text table with a units line under the header.

    ``digits`` is the least number of decimals of a column; a column gets more (up to ``max_digits``) where
    its distinct values would otherwise print alike. A column is fixed-point throughout, or in exponent
    form throughout for the keys in ``exponent`` (see :func:`format_column`).
    """
    units = units or {}
    headers = headers or {}
    cols = []
    for k in keys:
        vals = [r.get(k) for r in rows]
        texts = all(v is None or isinstance(v, str) for v in vals)
        if rows and texts and any(isinstance(v, str) for v in vals) and not any(vals):
            continue  # a text column with nothing in it (no notes) is left out; an all-empty number column stays
        d = digits.get(k, 3) if isinstance(digits, dict) else digits
        cells = format_column(vals, d, max_digits=max(max_digits, d), exponent=k in exponent)
        h = headers.get(k, k)
        u = f"[{units[k]}]" if units.get(k) else ""
        w = max([len(h), len(u)] + [len(c) for c in cells])
        # long text (criterion wording, notes) reads from the left; numbers and short words align right
        cols.append((h, u, cells, w, str.ljust if texts and w > TEXT_LEFT_WIDTH else str.rjust))
    lines = ["  ".join(j(h, w) for h, _, _, w, j in cols).rstrip()]
    if any(u for _, u, _, _, _ in cols):
        lines.append("  ".join(j(u, w) for _, u, _, w, j in cols).rstrip())
    for i in range(len(rows)):
        lines.append("  ".join(j(c[i], w) for _, _, c, w, j in cols).rstrip())
    return "\n".join(lines) + "\n"


#: text columns wider than this [characters] are aligned left in text tables
TEXT_LEFT_WIDTH = 16


def key_values(pairs: Iterable[tuple[str, Any, str]], digits: int = 4) -> str:
    """Aligned ``name  value unit`` lines (a lone value too small for ``digits`` decimals in exponent form)."""
    pairs = list(pairs)
    w = max((len(k) for k, _, _ in pairs), default=0)
    out = []
    for k, v, u in pairs:
        out.append(f"{k.ljust(w)}  {_fmt_cell(v, digits)}{(' ' + u) if u else ''}")
    return "\n".join(out) + "\n"


# ---------------------------------------------------------------- numbers

def _is_float(v: Any) -> bool:
    return isinstance(v, (float, np.floating)) and not isinstance(v, bool)


def _fixed(f: float, k: int) -> str:
    s = f"{f:.{k}f}"
    return s[1:] if s.startswith("-") and not s.strip("-0.") else s


def _fmt_cell(v: Any, digits: int) -> str:
    """One value as text: floats fixed-point with ``digits`` decimals (no ``-0``), ints whole, bools yes/no,
    None and non-finite numbers ``-``."""
    if v is None:
        return "-"
    if isinstance(v, (bool, np.bool_)):
        return "yes" if v else "no"
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    if _is_float(v):
        f = float(v)
        return _fixed(f, digits) if math.isfinite(f) else "-"
    return str(v)


#: Differences between adjacent rows below this share of the column's largest magnitude (or, in exponent
#: form, of the larger value) are taken as rounding noise and add no digits.
NOISE = 1e-5


def _fewest(seq: list[float], fmt: Callable[[float, int], str], lo: int, hi: int, floor: float) -> int:
    """Least precision in lo..hi at which adjacent values that differ by more than ``floor`` (or, with
    ``floor`` < 0, by more than NOISE of the larger) print apart; ``hi`` when none does."""
    pairs = [(a, b) for a, b in zip(seq, seq[1:])
             if abs(a - b) > (floor if floor >= 0 else NOISE * max(abs(a), abs(b)))]
    for k in range(lo, hi + 1):
        if all(fmt(a, k) != fmt(b, k) for a, b in pairs):
            return k
    return hi


def _sci(f: float, k: int) -> str:
    return f"{f:.{k}e}"


def format_column(values: Sequence[Any], digits: int = 3, *, max_digits: int = 8,
                  exponent: bool = False) -> list[str]:
    """Cells of one table column, all in one notation.

    Floats are fixed-point with the fewest decimals >= ``digits`` (and <= ``max_digits``) that print apart
    every two adjacent rows whose values differ by more than :data:`NOISE` times the column's largest
    magnitude (so 0.7999, 0.8 and 0.8001 get 4 decimals, and rounding noise adds none); a column whose
    largest value would print as zero gets the decimals that show it, if ``max_digits`` can. With
    ``exponent`` (a column the caller flags, such as residuals) the whole column is in exponent form, with
    as many significant digits (3 to ``max_digits``) as keep adjacent values apart. Non-float cells as
    :func:`_fmt_cell`.
    """
    fl = [float(v) for v in values if _is_float(v) and math.isfinite(float(v))]
    if not fl:
        return [_fmt_cell(v, digits) for v in values]
    if exponent:
        k = _fewest(fl, _sci, 2, max(2, max_digits - 1), -1.0)
        return [_sci(float(v), k) if _is_float(v) and math.isfinite(float(v)) else _fmt_cell(v, digits)
                for v in values]
    scale = max(abs(f) for f in fl)
    lo = digits
    if _fixed(scale, max_digits).strip("-0."):
        while lo < max_digits and not _fixed(scale, lo).strip("-0."):
            lo += 1
    k = _fewest(fl, _fixed, lo, max(lo, max_digits), max(NOISE * scale, 10.0 ** -max_digits))
    return [_fmt_cell(v, k) for v in values]


#: Decimals of CSV values by unit: lengths to 1e-6 m, and to like resolution for what is derived from them.
CSV_DECIMALS = {"m": 6, "m2": 6, "m²": 6, "m3": 6, "m³": 6, "t": 6, "deg": 6, "m·rad": 7, "m.rad": 7,
                "t/cm": 6, "t.m/cm": 6, "t·m/cm": 6, "t.m": 6, "t·m": 6}


def csv_number(v: float, decimals: int | None = None) -> str:
    """A float for CSV: rounded to ``decimals`` places, or else to 12 significant digits (which drops the
    binary noise of 0.39999999999999997 but keeps every digit the data mean), written shortest
    (``'0.4'``) in fixed-point, never in exponent form (``'0.000001'``); no ``-0``; non-finite as an empty cell."""
    f = float(v)
    if not math.isfinite(f):
        return ""
    r = round(f, decimals) if decimals is not None else float(f"{f:.12g}")
    return np.format_float_positional(r + 0.0, trim="0") if r != 0 else "0.0"


def _fmt_csv(v: Any, decimals: int | None) -> str:
    if v is None:
        return ""
    if isinstance(v, (bool, np.bool_)):
        return "true" if v else "false"
    if _is_float(v):
        return csv_number(v, decimals)
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    if isinstance(v, (list, tuple, np.ndarray)):
        return " ".join(_fmt_csv(x, decimals) for x in v)
    return str(v)


class _CsvWriter:
    """RFC 4180 rows that also quote a field holding ``#``, so that a reader told to skip ``#`` comment
    lines (the verdict and caution after a table) cannot cut a name such as "hatch #2" short."""

    def __init__(self, buf: io.StringIO) -> None:
        self.buf = buf

    def writerow(self, cells: Sequence[Any]) -> None:
        out = []
        for c in cells:
            t = "" if c is None else str(c)
            if any(ch in t for ch in ',"\r\n#'):
                t = '"' + t.replace('"', '""') + '"'
            out.append(t)
        self.buf.write(",".join(out) + "\n")


def to_csv(rows: Sequence[dict[str, Any]], keys: Sequence[str], *, units: dict[str, str] | None = None,
           decimals: dict[str, int] | int | None = None) -> str:
    """CSV text with a header row. Floats are rounded per column: ``decimals`` (per key or for all), else
    by the column's unit in ``units`` (:data:`CSV_DECIMALS`), else to 12 significant digits."""
    units = units or {}
    buf = io.StringIO()
    w = _CsvWriter(buf)
    w.writerow(keys)
    dec = {}
    for k in keys:
        if isinstance(decimals, dict) and k in decimals:
            dec[k] = decimals[k]
        elif isinstance(decimals, int):
            dec[k] = decimals
        else:
            dec[k] = CSV_DECIMALS.get(units.get(k, ""))
    for r in rows:
        w.writerow([_fmt_csv(r.get(k), dec[k]) for k in keys])
    return buf.getvalue()


def _clean(v: Any) -> Any:
    if _is_float(v):
        f = float(v)
        return f if math.isfinite(f) else None
    if isinstance(v, np.bool_):
        return bool(v)
    if isinstance(v, np.integer):
        return int(v)
    if isinstance(v, np.ndarray):
        return [_clean(x) for x in v.tolist()]
    if isinstance(v, (list, tuple)):
        return [_clean(x) for x in v]
    if isinstance(v, dict):
        return {k: _clean(x) for k, x in v.items()}
    return v


def to_json(obj: Any) -> str:
    """JSON text at full precision, with numpy values converted and non-finite numbers as null."""
    return json.dumps(_clean(obj), indent=2) + "\n"

"""Writing outputs whole or not at all, and formatting tables as text, CSV and JSON."""
from __future__ import annotations

import csv
import io
import json
import math
import os
import sys
import tempfile
from typing import Any, Callable, Iterable, Sequence

import numpy as np

from .errors import InputError


def _tmp_beside(path: str) -> tuple[int, str]:
    d = os.path.dirname(os.path.abspath(path)) or "."
    if not os.path.isdir(d):
        raise InputError(f"{path}: the folder {d} does not exist")
    return tempfile.mkstemp(prefix="." + os.path.basename(path) + ".", suffix=".part", dir=d)


def write_atomic(path: str, data: str | bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file and a rename."""
    fd, tmp = _tmp_beside(path)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data.encode("utf-8") if isinstance(data, str) else data)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def emit(path: str | None, text: str) -> None:
    """Write ``text`` atomically to ``path`` (and say so on stderr), or to stdout when no path."""
    if path:
        write_atomic(path, text)
        print(f"wrote {path}", file=sys.stderr)
    else:
        sys.stdout.write(text)


def save_atomic(path: str, writer: Callable[[str], None]) -> None:
    """Call ``writer(tmp_path)`` and move the result onto ``path`` only if it succeeds."""
    ext = os.path.splitext(path)[1]
    fd, tmp = _tmp_beside(path)
    os.close(fd)
    tmp2 = tmp + ext
    os.replace(tmp, tmp2)
    try:
        writer(tmp2)
        os.replace(tmp2, path)
    except BaseException:
        if os.path.exists(tmp2):
            os.unlink(tmp2)
        raise


def _clean(v: Any) -> Any:
    if isinstance(v, (np.floating, float)):
        f = float(v)
        return f if math.isfinite(f) else None
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
    """JSON text with numpy values converted and non-finite numbers as null."""
    return json.dumps(_clean(obj), indent=2) + "\n"


def to_csv(rows: Sequence[dict[str, Any]], keys: Sequence[str]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(keys)
    for r in rows:
        w.writerow([_fmt_csv(r.get(k)) for k in keys])
    return buf.getvalue()


def _fmt_csv(v: Any) -> str:
    if v is None:
        return ""
    if isinstance(v, (float, np.floating)):
        return repr(float(v))
    if isinstance(v, (list, tuple, np.ndarray)):
        return " ".join(_fmt_csv(x) for x in v)
    return str(v)


def _fmt_cell(v: Any, digits: int) -> str:
    if v is None:
        return "-"
    if isinstance(v, (bool, np.bool_)):
        return "yes" if v else "no"
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    if isinstance(v, (float, np.floating)):
        f = float(v)
        if not math.isfinite(f):
            return "-"
        if abs(f) < 0.5 * 10 ** (-digits):
            return f"{0.0:.{digits}f}"
        if f != 0 and (abs(f) >= 1e6 or abs(f) < 10 ** (-digits)):
            return f"{f:.{digits}g}"
        return f"{f:.{digits}f}"
    return str(v)


def text_table(rows: Sequence[dict[str, Any]], keys: Sequence[str], units: dict[str, str] | None = None,
               digits: dict[str, int] | int = 3, headers: dict[str, str] | None = None) -> str:
    """An aligned text table with a units line under the header."""
    units = units or {}
    headers = headers or {}
    cols = []
    for k in keys:
        d = digits.get(k, 3) if isinstance(digits, dict) else digits
        cells = [_fmt_cell(r.get(k), d) for r in rows]
        h = headers.get(k, k)
        u = f"[{units[k]}]" if units.get(k) else ""
        w = max([len(h), len(u)] + [len(c) for c in cells])
        cols.append((h, u, cells, w))
    lines = ["  ".join(h.rjust(w) for h, _, _, w in cols)]
    if any(u for _, u, _, _ in cols):
        lines.append("  ".join(u.rjust(w) for _, u, _, w in cols))
    for i in range(len(rows)):
        lines.append("  ".join(c[i].rjust(w) for _, _, c, w in cols))
    return "\n".join(lines) + "\n"


def key_values(pairs: Iterable[tuple[str, Any, str]], digits: int = 4) -> str:
    """Aligned ``name  value unit`` lines."""
    pairs = list(pairs)
    w = max((len(k) for k, _, _ in pairs), default=0)
    out = []
    for k, v, u in pairs:
        out.append(f"{k.ljust(w)}  {_fmt_cell(v, digits)}{(' ' + u) if u else ''}")
    return "\n".join(out) + "\n"

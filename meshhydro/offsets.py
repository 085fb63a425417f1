"""Offsets tables: the half-breadth model of one or several bodies, and its strict CSV format.

A table describes each body by half-breadths measured from the body's own centreline
``y = centreline`` at stations x and waterlines z (hull frame, metres). The model
assumes a body symmetric about its own centreline; a multihull is several tables, one
per demihull or float, each with its own centreline.

CSV format (our own long format, UTF-8, an optional byte-order mark is accepted; blank
lines and lines starting with ``#`` are skipped). Header columns, in any order:

* ``station_x``, ``waterline_z``, ``half_breadth`` [m] (required);
* ``kind`` (optional): ``offset`` (default), ``keel`` (the keel height at that station in
  waterline_z, with the half-breadth of a flat bottom there) or ``sheer`` (the deck-edge
  height and its half-breadth);
* ``body`` (optional): a whole number >= 0 naming the body a row belongs to; required
  when a table holds several bodies;
* ``centreline_y`` [m] (optional, default 0): y of the body's centreline, the same on
  every row of a body; required when there are several bodies.

Any other column is refused, naming it. Within a body, stations and waterlines must
form a full grid. Values are written rounded to 1e-6 m.
"""
from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass

import numpy as np

from .errors import InputError

REQUIRED = ("station_x", "waterline_z", "half_breadth")
OPTIONAL = ("kind", "body", "centreline_y")
KINDS = ("offset", "keel", "sheer")


def fmt(value: float) -> str:
    """A length [m] rounded to 1e-6 m, without trailing zeros (0.4, never 0.39999999999999997)."""
    s = f"{float(value):.6f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


@dataclass(frozen=True, eq=False)
class Offsets:
    """A half-breadth table of one body, hull frame, metres.

    Attributes
    ----------
    stations : (S,) float64, increasing
    waterlines : (W,) float64, increasing
    half_breadth : (S, W) float64
        Half the breadth of the body's section at (station, waterline), measured from
        the body's centreline.
    keel, keel_half : (S,) float64 or None
        Keel height and flat-bottom half-breadth per station (``kind = keel`` rows).
    sheer, sheer_half : (S,) float64 or None
        Deck-edge height and half-breadth per station (``kind = sheer`` rows).
    source : str
    centreline : float [m]
        y of the body's centreline (0 for a monohull on the hull centreline).
    body : int or None
        Body number in a multi-body table; None for a table of a single body.
    """

    stations: np.ndarray
    waterlines: np.ndarray
    half_breadth: np.ndarray
    keel: np.ndarray | None = None
    keel_half: np.ndarray | None = None
    sheer: np.ndarray | None = None
    sheer_half: np.ndarray | None = None
    source: str = ""
    centreline: float = 0.0
    body: int | None = None

    def csv_rows(self, *, with_body: bool, with_centreline: bool) -> list[list[str]]:
        """Data rows in the CSV column order ``REQUIRED + kind [+ body] [+ centreline_y]``."""
        tail = ([str(self.body if self.body is not None else 0)] if with_body else []) + \
            ([fmt(self.centreline)] if with_centreline else [])
        out = []
        for i, x in enumerate(self.stations):
            if self.keel is not None:
                out.append([fmt(x), fmt(self.keel[i]), fmt(self.keel_half[i]), "keel"] + tail)
            for j, z in enumerate(self.waterlines):
                out.append([fmt(x), fmt(z), fmt(self.half_breadth[i, j]), "offset"] + tail)
            if self.sheer is not None:
                out.append([fmt(x), fmt(self.sheer[i]), fmt(self.sheer_half[i]), "sheer"] + tail)
        return out

    def to_csv(self) -> str:
        """The table in the long CSV format (a ``centreline_y`` column when the centreline is off y = 0)."""
        return _write([self], with_body=self.body is not None, with_centreline=self.centreline != 0.0)


@dataclass(frozen=True, eq=False)
class MultiOffsets:
    """Half-breadth tables of several bodies (demihulls, floats), each with its own centreline.

    Attributes
    ----------
    tables : tuple of Offsets
        One per body, ordered by body number.
    source : str
    """

    tables: tuple[Offsets, ...]
    source: str = ""

    @property
    def stations(self) -> np.ndarray:
        """All stations of all bodies (S,) [m], sorted, without repeats."""
        return np.unique(np.concatenate([t.stations for t in self.tables]))

    @property
    def waterlines(self) -> np.ndarray:
        """All waterlines of all bodies (W,) [m], sorted, without repeats."""
        return np.unique(np.concatenate([t.waterlines for t in self.tables]))

    def to_csv(self) -> str:
        """The tables in the long CSV format with ``body`` and ``centreline_y`` columns."""
        return _write(list(self.tables), with_body=True, with_centreline=True)


def _write(tables: list[Offsets], *, with_body: bool, with_centreline: bool) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(list(REQUIRED) + ["kind"] + (["body"] if with_body else []) +
               (["centreline_y"] if with_centreline else []))
    for t in tables:
        w.writerows(t.csv_rows(with_body=with_body, with_centreline=with_centreline))
    return buf.getvalue()


# ----------------------------------------------------------------------------- reading


def read_offsets(path: str) -> Offsets | MultiOffsets:
    """Read and validate an offsets CSV (UTF-8); every error names the file, row and column."""
    try:
        with open(path, "rb") as fh:
            data = fh.read()
    except FileNotFoundError:
        raise InputError(f"{path}: no such file") from None
    except OSError as e:
        raise InputError(f"{path}: cannot be read ({e.strerror or e})") from None
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        raise InputError(f"{path}: not UTF-8 text (byte 0x{data[e.start]:02x} at offset {e.start}); "
                         f"save the table as UTF-8 CSV") from None
    return parse_offsets(text, source=path)


def _header(line: int, head: list[str], source: str) -> dict[str, int]:
    cols: dict[str, int] = {}
    for k, h in enumerate(head):
        name = h.strip().lower()
        if not name:
            raise InputError(f"{source}: row {line}: header column {k + 1} has no name")
        if name not in REQUIRED + OPTIONAL:
            raise InputError(f"{source}: row {line}: unknown column {h.strip()!r} (allowed: "
                             f"{', '.join(REQUIRED + OPTIONAL)})")
        if name in cols:
            raise InputError(f"{source}: row {line}: column {name!r} appears twice")
        cols[name] = k
    for col in REQUIRED:
        if col not in cols:
            raise InputError(f"{source}: row {line}: the header lacks column {col!r} (needs {', '.join(REQUIRED)})")
    return cols


def _number(cell: str, line: int, col: str, source: str) -> float:
    if cell == "":
        raise InputError(f"{source}: row {line}, column {col}: missing value")
    try:
        v = float(cell)
    except ValueError:
        raise InputError(f"{source}: row {line}, column {col}: {cell!r} is not a number") from None
    if not math.isfinite(v):
        raise InputError(f"{source}: row {line}, column {col}: {cell!r} is not finite")
    return v


class _BodyRows:
    """Rows of one body while reading."""

    def __init__(self, centreline: float, line: int) -> None:
        self.centreline, self.line = centreline, line
        self.pts: dict[tuple[float, float], tuple[float, int]] = {}
        self.keel: dict[float, tuple[float, float]] = {}
        self.sheer: dict[float, tuple[float, float]] = {}


def parse_offsets(text: str, *, source: str = "<offsets>") -> Offsets | MultiOffsets:
    """Parse an offsets CSV text (see the module docstring).

    Returns an :class:`Offsets` when the table holds one body (with or without a
    ``body`` column) and a :class:`MultiOffsets` when it holds several.
    """
    try:
        raw = list(csv.reader(io.StringIO(text)))
    except csv.Error as e:
        raise InputError(f"{source}: not a readable CSV table ({e})") from None
    rows = [(k + 1, r) for k, r in enumerate(raw) if r and any(c.strip() for c in r) and not r[0].lstrip().startswith("#")]
    if not rows:
        raise InputError(f"{source}: the offsets table is empty")
    line0, head = rows[0]
    cols = _header(line0, head, source)
    bodies: dict[int, _BodyRows] = {}
    for line, r in rows[1:]:
        if len(r) > len(head):
            raise InputError(f"{source}: row {line}: {len(r)} cells but the header has {len(head)} columns")
        cell = {c: (r[k].strip() if k < len(r) else "") for c, k in cols.items()}
        vals = {c: _number(cell[c], line, c, source) for c in REQUIRED}
        if vals["half_breadth"] < 0:
            raise InputError(f"{source}: row {line}, column half_breadth: negative half-breadth {vals['half_breadth']}")
        kind = cell.get("kind", "").lower() or "offset"
        if kind not in KINDS:
            raise InputError(f"{source}: row {line}, column kind: {kind!r} is not offset, keel or sheer")
        b = 0
        if "body" in cols:
            try:
                b = int(cell["body"])
            except ValueError:
                raise InputError(f"{source}: row {line}, column body: {cell['body']!r} is not a body number "
                                 f"(a whole number >= 0)") from None
            if b < 0:
                raise InputError(f"{source}: row {line}, column body: {b} is negative")
        yc = _number(cell["centreline_y"], line, "centreline_y", source) if "centreline_y" in cols else 0.0
        br = bodies.setdefault(b, _BodyRows(yc, line))
        if yc != br.centreline:
            raise InputError(f"{source}: row {line}, column centreline_y: {yc} differs from {br.centreline} given "
                             f"for body {b} at row {br.line}")
        key = (vals["station_x"], vals["waterline_z"])
        if kind == "offset":
            if key in br.pts:
                raise InputError(f"{source}: row {line}, columns station_x/waterline_z: station {key[0]} waterline "
                                 f"{key[1]} given twice (first at row {br.pts[key][1]})")
            br.pts[key] = (vals["half_breadth"], line)
        else:
            d = br.keel if kind == "keel" else br.sheer
            if key[0] in d:
                raise InputError(f"{source}: row {line}, column kind: a second {kind} row for station {key[0]}")
            d[key[0]] = (vals["waterline_z"], vals["half_breadth"])
    if not bodies:
        raise InputError(f"{source}: no offset rows")
    if len(bodies) > 1 and "centreline_y" not in cols:
        raise InputError(f"{source}: row {line0}: a table of {len(bodies)} bodies needs a centreline_y column "
                         f"(each body's own centreline)")
    single = len(bodies) == 1
    tables = [_grid(br, source, None if single and "body" not in cols else b) for b, br in sorted(bodies.items())]
    return tables[0] if single else MultiOffsets(tuple(tables), source)


def _grid(br: _BodyRows, source: str, body: int | None) -> Offsets:
    where = f"{source}" + ("" if body is None else f", body {body}")
    if not br.pts:
        raise InputError(f"{where}: no offset rows")
    xs = np.array(sorted({k[0] for k in br.pts}))
    zs = np.array(sorted({k[1] for k in br.pts}))
    if len(xs) < 2 or len(zs) < 2:
        raise InputError(f"{where}: needs at least two stations and two waterlines")
    hb = np.full((len(xs), len(zs)), np.nan)
    xi = {x: i for i, x in enumerate(xs)}
    zi = {z: j for j, z in enumerate(zs)}
    for (x, z), (v, _) in br.pts.items():
        hb[xi[x], zi[z]] = v
    if np.isnan(hb).any():
        i, j = (int(a[0]) for a in np.nonzero(np.isnan(hb)))
        raise InputError(f"{where}: missing cell: station_x {xs[i]} has no half_breadth on waterline_z {zs[j]} "
                         f"(stations and waterlines must form a grid)")

    def per_station(d: dict, what: str):
        if not d:
            return None, None
        missing = [x for x in xs if x not in d]
        if missing:
            raise InputError(f"{where}: {what} rows given for some stations but not for station_x {missing[0]}")
        extra = [x for x in d if x not in xi]
        if extra:
            raise InputError(f"{where}: a {what} row names station_x {extra[0]}, which has no offsets")
        return np.array([d[x][0] for x in xs]), np.array([d[x][1] for x in xs])

    k, kh = per_station(br.keel, "keel")
    s, sh = per_station(br.sheer, "sheer")
    return Offsets(xs, zs, hb, k, kh, s, sh, source, float(br.centreline), body)

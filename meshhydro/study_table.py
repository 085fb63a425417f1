"""The results table of a study: written whole as CSV and Parquet (same rows, same columns), read back.

A row is a dict column -> value; text columns (:data:`TEXT_COLUMNS`) hold strings, every other column a
float or None (missing: the case failed, or the figure does not exist, e.g. no vanishing angle within the
computed heels). CSV writes floats with ``repr`` (shortest round-trip form) and None as an empty field, so
the CSV and the Parquet file hold the same numbers bit for bit.
"""
from __future__ import annotations

import csv
import io
import os
from typing import Any, Sequence

from .criteria import CAUTION
from .errors import InputError
from .output import csv_number, write_atomic

__all__ = ["TEXT_COLUMNS", "read_results", "write_results", "RESULTS_CSV", "RESULTS_PARQUET"]

TEXT_COLUMNS = frozenset({"case_id", "hull", "kg_limit_governing", "sides", "verdict", "criteria_failed", "error"})
RESULTS_CSV = "results.csv"
RESULTS_PARQUET = "results.parquet"


def _cell(col: str, v: Any) -> str:
    if v is None:
        return ""
    return str(v) if col in TEXT_COLUMNS else csv_number(v)  # 12 significant digits; Parquet keeps full precision


def _csv_text(rows: Sequence[dict[str, Any]], cols: Sequence[str]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(cols)
    for r in rows:
        w.writerow([_cell(c, r.get(c)) for c in cols])
    return buf.getvalue()


def _parquet_bytes(rows: Sequence[dict[str, Any]], cols: Sequence[str]) -> bytes:
    import pyarrow as pa
    import pyarrow.parquet as pq

    arrays = {}
    for c in cols:
        vals = [r.get(c) for r in rows]
        if c in TEXT_COLUMNS:
            arrays[c] = pa.array([None if v is None else str(v) for v in vals], type=pa.string())
        else:
            arrays[c] = pa.array([None if v is None else float(v) for v in vals], type=pa.float64())
    sink = pa.BufferOutputStream()
    pq.write_table(pa.table(arrays), sink)
    return sink.getvalue().to_pybytes()


def write_results(out_dir: str, rows: Sequence[dict[str, Any]], cols: Sequence[str], *,
                  caution_for: str | None = None) -> list[str]:
    """Write ``results.parquet`` and ``results.csv`` (and, with ``caution_for`` = the study name,
    ``README.txt`` holding the caution and the column units) into ``out_dir``, each atomically.
    Returns the paths written."""
    pq_path, csv_path = os.path.join(out_dir, RESULTS_PARQUET), os.path.join(out_dir, RESULTS_CSV)
    write_atomic(pq_path, _parquet_bytes(rows, cols))
    write_atomic(csv_path, _csv_text(rows, cols))
    out = [csv_path, pq_path]
    if caution_for is not None:
        path = os.path.join(out_dir, "README.txt")
        write_atomic(path, _readme(caution_for, len(rows)))
        out.append(path)
    return out


def _readme(name: str, n: int) -> str:
    return (f"Design study {name!r}: {n} cases, one row per case in results.csv and results.parquet.\n\n"
            f"{CAUTION}\n\n"
            "Columns: case_id (hash of hull, parameters and analysis settings), hull, one column per swept\n"
            "parameter (generator parameters in m or as documented, displacement in t, kg in m), then\n"
            "displacement_t, lcg_m, tcg_m, kg_m (the G used), draft_m, heel_deg, trim_deg, gm_m (free-floating\n"
            "equilibrium, fluid GMt), max_gz_m with angle_of_max_gz_deg, vanishing_angle_deg, area_0_30_mrad,\n"
            "area_0_40_mrad (the lesser of both sides when both are computed; empty when not reached within\n"
            "the computed heels), kg_limit_m and kg_limit_governing when asked, sides, verdict (pass/fail of\n"
            "the criteria set), criteria_failed, error (empty when the case ran), seconds.\n")


def read_results(out_dir: str) -> dict[str, dict[str, Any]]:
    """Rows of an existing ``results.parquet`` in ``out_dir`` by case id ({} when there is none).
    An unreadable file is an :class:`InputError` naming it (remove it to run every case again)."""
    path = os.path.join(out_dir, RESULTS_PARQUET)
    if not os.path.exists(path):
        return {}
    import pyarrow.parquet as pq

    try:
        rows = pq.read_table(path).to_pylist()
    except Exception as exc:  # pyarrow raises several types for a damaged file
        raise InputError(f"{path}: cannot be read as a results table ({exc}); remove it to run every case "
                         "again") from None
    if rows and "case_id" not in rows[0]:
        raise InputError(f"{path}: has no case_id column; remove it to run every case again")
    return {r["case_id"]: r for r in rows}

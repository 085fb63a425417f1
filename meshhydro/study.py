"""Design studies: a grid of cases (hull generator or mesh files × parameter values), each analysed on Dask.

A case is one hull (a generator with parameters, or a mesh file) under one loading (displacement [t] and G,
from ``kg`` [m] on the centre line above the level-flotation LCB, or a given ``cog`` [m] hull frame). Each case
gives one row: the parameters, the upright/free-floating figures, the GZ-curve figures, the criteria verdict
and, when asked, the KG limit. A case that fails with a diagnosed error is a row carrying the error.

Entry point: :func:`run_study` (writes ``DIR/results.csv``, ``DIR/results.parquet``, ``DIR/README.txt`` with
the caution, and ``DIR/study_<parameter>.png`` per swept parameter). Cases with the same id and no error in
an existing ``results.parquet`` are not run again. Only public library calls are used: generators,
:func:`meshhydro.load_hull`, ``Hull.hydrostatics/equilibrium/righting_curve``, :mod:`meshhydro.criteria`,
:func:`meshhydro.kg_limits.kg_limits_for_hull`.
"""
from __future__ import annotations

import functools
import hashlib
import json
import math
import os
import time
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from .errors import InputError, MeshHydroError
from .frames import SEA_WATER
from .generators import PARAMETERS, did_you_mean
from .study_table import read_results, write_results

__all__ = ["Case", "StudySummary", "expand_cases", "run_case", "run_study", "run_cases", "clear_caches", "columns", "ANALYSIS_PARAMETERS",
           "FIGURES", "STUDY_FORMAT"]

#: Bumped when the meaning of a row changes, so older results are not reused.
STUDY_FORMAT = 1
#: Parameters of the loading that a study may sweep besides the generator's own.
ANALYSIS_PARAMETERS = ("displacement", "kg")
#: Figure columns of a row (name -> unit); ``kg_limit_m`` and ``kg_limit_governing`` only when asked.
FIGURES = {
    "displacement_t": "t", "lcg_m": "m", "tcg_m": "m", "kg_m": "m",
    "draft_m": "m", "heel_deg": "deg", "trim_deg": "deg", "gm_m": "m",
    "max_gz_m": "m", "angle_of_max_gz_deg": "deg", "vanishing_angle_deg": "deg",
    "area_0_30_mrad": "m·rad", "area_0_40_mrad": "m·rad",
}
KG_LIMIT_FIGURES = {"kg_limit_m": "m", "kg_limit_governing": ""}
TAIL = ("sides", "verdict", "criteria_failed", "error", "seconds")


@dataclass(frozen=True)
class Case:
    """One case of a study, picklable.

    ``params`` are the swept values in file order (generator parameters [their units], ``displacement``
    [t], ``kg`` [m]); ``displacement``/``kg``/``cog`` the fixed loading from ``[analysis]`` (None when
    swept or not given); ``heels`` [deg] of the GZ curve (None: 0..180 in 1°); ``criteria`` a built-in
    name or an absolute path; ``density`` [t/m³].
    """

    case_id: str
    hull: str
    generator: str | None
    mesh: str | None
    params: tuple[tuple[str, float], ...]
    displacement: float | None
    kg: float | None
    cog: tuple[float, float, float] | None
    heels: tuple[float, ...] | None
    criteria: str
    kg_limit: bool
    density: float = SEA_WATER


@dataclass(frozen=True)
class StudySummary:
    """What :func:`run_study` did: ``cases`` in the grid = ``run`` now + ``skipped`` (reused rows);
    ``failed`` rows carry an error; ``seconds`` wall time; ``files`` written."""

    cases: int
    run: int
    skipped: int
    failed: int
    seconds: float
    files: tuple[str, ...]

    @property
    def done(self) -> int:
        """Cases whose row holds results (no error)."""
        return self.cases - self.failed


def _digest(path: str) -> str:
    try:
        with open(path, "rb") as fh:
            return hashlib.sha256(fh.read()).hexdigest()
    except OSError as exc:
        raise InputError(f"{path}: cannot be read ({exc.strerror})") from None


def _check_names(spec: Any) -> None:
    gen = spec.study.generator
    known = list(PARAMETERS[gen]) + list(ANALYSIS_PARAMETERS) if gen else list(ANALYSIS_PARAMETERS)
    for name in spec.parameters:
        if name not in known:
            owner = f"a parameter of {gen}" if gen else "sweepable with meshes"
            raise InputError(f"{spec.source}: [parameters] {name}: not {owner}{did_you_mean(name, known)}")


def _grid(lengths: Sequence[int]) -> np.ndarray:
    """Index tuples (n, k) of the full grid, last dimension varying fastest."""
    if not lengths:
        return np.zeros((1, 0), dtype=int)
    idx = np.indices(tuple(lengths)).reshape(len(lengths), -1).T
    return idx


def expand_cases(spec: Any) -> list[Case]:
    """All cases of a :class:`~meshhydro.schemas.StudySpec`: meshes (if any) × parameter values, the last
    parameter varying fastest. Raises :class:`InputError` for a parameter the generator does not have."""
    _check_names(spec)
    a = spec.analysis
    names = list(spec.parameters)
    values = [spec.values(n) for n in names]
    crit = a.criteria or "imo2008"
    crit_key = crit
    if crit.endswith(".toml"):
        base = os.path.dirname(os.path.abspath(spec.source)) if spec.source else os.getcwd()
        crit = os.path.normpath(os.path.join(base, crit))
        crit_key = "criteria-sha256:" + _digest(crit)
    heels = tuple(a.heels.values()) if a.heels is not None else None
    hulls: list[tuple[str, str | None, str | None, str]] = []  # label, generator, mesh, identity
    if spec.study.generator:
        hulls.append((spec.study.generator, spec.study.generator, None, spec.study.generator))
    for path in spec.mesh_paths():
        hulls.append((os.path.basename(path), None, path, os.path.basename(path) + ":" + _digest(path)))
    fixed = {"displacement": a.displacement, "kg": a.kg, "cog": list(a.cog) if a.cog else None,
             "heels": list(heels) if heels else None, "criteria": crit_key, "kg_limit": a.kg_limit,
             "density": SEA_WATER, "format": STUDY_FORMAT}
    cases = []
    for label, gen, mesh, ident in hulls:
        for row in _grid([len(v) for v in values]):
            params = tuple((n, float(values[k][i])) for k, (n, i) in enumerate(zip(names, row)))
            key = json.dumps({"hull": ident, "params": params, **fixed}, sort_keys=True)
            cid = hashlib.sha256(key.encode()).hexdigest()[:16]
            cases.append(Case(cid, label, gen, mesh, params, a.displacement, a.kg, a.cog, heels, crit,
                              a.kg_limit))
    return cases


# ---------------------------------------------------------------- one case (runs on a worker)

@functools.lru_cache(maxsize=4)
def _hull(generator: str | None, mesh: str | None, gparams: tuple[tuple[str, float], ...]) -> Any:
    if generator is not None:
        from .generators import make_hull

        return make_hull(generator, dict(gparams))
    from .vessel import load_hull

    return load_hull(mesh)


@functools.lru_cache(maxsize=4)
def _criteria(name: str) -> Any:
    from .criteria import BUILTIN, read_criteria

    return BUILTIN[name] if name in BUILTIN else read_criteria(name)


def _heels(case: Case, sides: tuple[int, ...]) -> list[float]:
    hs = list(case.heels) if case.heels is not None else [float(h) for h in range(0, 181)]
    if -1 in sides:
        hs = sorted(set(hs) | {-h for h in hs})
    return hs


def _num(v: Any) -> float | None:
    return None if v is None or not math.isfinite(float(v)) else float(v)


def _least(summaries: list[dict[str, Any]], key: str) -> float | None:
    vals = [s.get(key) for s in summaries]
    if any(v is None for v in vals):
        return None  # not reached on some side within the computed angles: no number rather than a wrong one
    return min(float(v) for v in vals)


@functools.lru_cache(maxsize=16)
def _kg_limit(generator: str | None, mesh: str | None, gparams: tuple, displacement: float,
              lcg: float | None, tcg: float, heels: tuple[float, ...], criteria: str, density: float,
              sides: tuple[int, ...]) -> tuple[float | None, str | None]:
    from .kg_limits import kg_limits_for_hull

    hull = _hull(generator, mesh, gparams)
    level = hull.hydrostatics(hull.draft_for_volume(displacement / density), density=density)
    top = 1.5 * max(float(hull.depth), float(level.kmt))  # above KMt: GM < 0, beyond any sane limit
    row = kg_limits_for_hull(hull, [displacement], _criteria(criteria), kg_range=(0.0, top), lcg=lcg, tcg=tcg,
                             heels=heels, density=density, sides=sides)[0]
    if row.kg_max is not None and row.governing is None:  # the search stopped at its top, not at a limit
        return None, f"none: all criteria pass up to KG {top:.3g} m"
    return row.kg_max, row.governing


def clear_caches() -> None:
    """Forget the hulls, criteria sets and KG limits this process has kept between cases."""
    for fn in (_hull, _criteria, _kg_limit):
        fn.cache_clear()


def _analyse(case: Case) -> dict[str, Any]:
    from .criteria import evaluate

    swept = dict(case.params)
    gparams = tuple((k, v) for k, v in case.params if k not in ANALYSIS_PARAMETERS)
    hull = _hull(case.generator, case.mesh, gparams)
    disp = swept.get("displacement", case.displacement)
    rho = case.density
    kg = swept.get("kg", case.kg)
    if kg is not None:
        lcg = float(hull.hydrostatics(hull.draft_for_volume(disp / rho), density=rho).lcb)
        cog = (lcg, 0.0, float(kg))
    else:
        cog = tuple(float(c) for c in case.cog)
    sides = (1,) if hull.is_symmetric and cog[1] == 0.0 else (1, -1)
    eq = hull.equilibrium(disp, cog, density=rho)
    curve = hull.righting_curve(disp, cog, heels=_heels(case, sides), density=rho)
    report = evaluate(curve, _criteria(case.criteria), sides=sides)
    sums = [curve.summary(s) for s in sides]
    worst = min(sums, key=lambda s: s["max_gz"])
    failed = [r.id + (f" {r.side}" if len(sides) > 1 else "") for r in report.results if not r.passed]
    row = {"displacement_t": float(disp), "lcg_m": cog[0], "tcg_m": cog[1], "kg_m": cog[2],
           "draft_m": eq.draft, "heel_deg": eq.heel, "trim_deg": eq.trim, "gm_m": eq.gmt,
           "max_gz_m": worst["max_gz"], "angle_of_max_gz_deg": worst["angle_of_max_gz"],
           "vanishing_angle_deg": _least(sums, "vanishing_angle"),
           "area_0_30_mrad": _least(sums, "area_0_30"), "area_0_40_mrad": _least(sums, "area_0_40"),
           "sides": ", ".join(s["side"] for s in sums), "verdict": "pass" if report.passed else "fail",
           "criteria_failed": "; ".join(failed)}
    if case.kg_limit:
        top = [h for h in _heels(case, (1,)) if h >= 0]
        lim, gov = _kg_limit(case.generator, case.mesh, gparams, float(disp), cog[0] if kg is None else None,
                             cog[1], tuple(top), case.criteria, rho, sides)
        row["kg_limit_m"], row["kg_limit_governing"] = lim, gov or ""
    return {k: (_num(v) if isinstance(v, (int, float, np.floating)) and not isinstance(v, bool) else v)
            for k, v in row.items()}


def columns(parameters: Sequence[str], kg_limit: bool) -> list[str]:
    """Column names of the results table, in order."""
    figs = list(FIGURES) + (list(KG_LIMIT_FIGURES) if kg_limit else [])
    return ["case_id", "hull", *parameters, *figs, *TAIL]


def run_case(case: Case) -> dict[str, Any]:
    """Analyse one case; a dict row (keys of :func:`columns`). A diagnosed error
    (:class:`~meshhydro.errors.MeshHydroError`) becomes the ``error`` text and never propagates."""
    t0 = time.perf_counter()
    row: dict[str, Any] = {"case_id": case.case_id, "hull": case.hull, **dict(case.params)}
    try:
        row.update(_analyse(case))
        row["error"] = ""
    except MeshHydroError as exc:
        row["error"] = f"{type(exc).__name__}: {exc}"
        row["verdict"] = ""
    row["seconds"] = time.perf_counter() - t0
    return row


def run_cases(cases: Sequence[Case]) -> list[dict[str, Any]]:
    """:func:`run_case` for each case in turn (one task: cases sharing a hull reuse it and its KG limit).
    An undiagnosed failure of one case becomes that case's error row; the others still run."""
    rows = []
    for c in cases:
        try:
            rows.append(run_case(c))
        except Exception as exc:  # a defect, not a diagnosed error: keep it visible as the case's row
            rows.append(_failed_row(c, exc))
    return rows


def _tasks(todo: list[Case], workers: int) -> list[list[Case]]:
    """Cases grouped into tasks by hull (and displacement when the KG limit is asked, which is per hull and
    displacement); without a KG limit, large groups are cut so that there are a few tasks per worker."""
    groups: dict[Any, list[Case]] = {}
    for c in todo:
        swept = dict(c.params)
        key = (c.generator, c.mesh, tuple((k, v) for k, v in c.params if k not in ANALYSIS_PARAMETERS),
               swept.get("displacement") if c.kg_limit else None)
        groups.setdefault(key, []).append(c)
    tasks = list(groups.values())
    if todo and not todo[0].kg_limit:
        size = max(1, math.ceil(len(todo) / (3 * max(int(workers), 1))))
        tasks = [g[i:i + size] for g in tasks for i in range(0, len(g), size)]
    return tasks


def _failed_row(case: Case, exc: BaseException) -> dict[str, Any]:
    return {"case_id": case.case_id, "hull": case.hull, **dict(case.params), "verdict": "",
            "error": f"unexpected {type(exc).__name__}: {exc}", "seconds": None}


# ---------------------------------------------------------------- the whole study

def _check_workers(scheduler: str | None, workers: Any) -> int | None:
    """The number of local workers (None with a scheduler); a one-line error for a bad or unused value."""
    if scheduler is not None:
        if workers is not None:
            raise InputError("workers applies to the local cluster only; a scheduler's own workers run the "
                             "cases (give one, not both)")
        if not isinstance(scheduler, str) or not scheduler.strip():
            raise InputError(f"scheduler must be an address such as tcp://host:8786, got {scheduler!r}")
        return None
    workers = 2 if workers is None else workers
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError(f"workers must be a whole number of at least 1, got {workers!r}")
    return workers


def _client(scheduler: str | None, workers: int | None) -> tuple[Any, Any]:
    import logging

    from dask.distributed import Client, LocalCluster

    if scheduler is not None:
        try:
            return Client(scheduler, timeout="10s"), None
        except (OSError, TimeoutError, ValueError) as exc:
            raise InputError(f"scheduler {scheduler}: cannot connect ({exc})") from None
    cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                           dashboard_address=None, silence_logs=logging.ERROR)
    return Client(cluster), cluster


def _execute(todo: list[Case], scheduler: str | None, workers: int | None, progress: bool | None,
             on_row: Any) -> None:
    from dask.distributed import as_completed
    from tqdm import tqdm

    client, cluster = _client(scheduler, workers)
    try:
        tasks = _tasks(todo, len(client.scheduler_info().get("workers", {})) or 2)
        futures = client.map(run_cases, tasks, pure=False)
        owner = {f.key: t for f, t in zip(futures, tasks)}
        with tqdm(total=len(todo), desc="study", unit="case",
                  disable=None if progress is None else not progress) as bar:
            for fut in as_completed(futures):
                try:
                    rows = fut.result()
                except Exception as exc:  # a worker lost or an undiagnosed failure: keep it as rows
                    rows = [_failed_row(c, exc) for c in owner[fut.key]]
                for row in rows:
                    on_row(row)
                bar.update(len(rows))
    finally:
        client.close()
        if cluster is not None:
            cluster.close()


def run_study(spec: Any, out_dir: str, scheduler: str | None = None, workers: int | None = None,
              progress: bool | None = None) -> StudySummary:
    """Run every case of ``spec`` not already done in ``out_dir`` and write the results there.

    Parameters
    ----------
    spec : StudySpec (:func:`meshhydro.schemas.validate_study`)
    out_dir : str
        Folder for ``results.csv``, ``results.parquet``, ``README.txt`` and ``study_<parameter>.png``.
    scheduler : str, optional
        Address of a running Dask scheduler (its workers need meshhydro and the mesh files); default a
        local cluster of ``workers`` processes (default 2) with one thread each. ``workers`` with a
        scheduler is an error (it would go unused).
    progress : bool, optional
        Progress bar on standard error; None shows it only on a terminal.

    The tables are rewritten whole (atomically) every 30 s while cases finish, at the end, and when the
    run is interrupted or the cluster fails, so a rerun continues from what finished.
    """
    t0 = time.perf_counter()
    workers = _check_workers(scheduler, workers)
    cases = expand_cases(spec)
    if os.path.exists(out_dir) and not os.path.isdir(out_dir):
        raise InputError(f"{out_dir}: is a file, not a folder")
    os.makedirs(out_dir, exist_ok=True)
    cols = columns(list(spec.parameters), spec.analysis.kg_limit)
    old = read_results(out_dir)
    rows: dict[str, dict[str, Any]] = {}
    for c in cases:
        r = old.get(c.case_id)
        if r is not None and not r.get("error"):
            rows[c.case_id] = r
    skipped = len(rows)
    todo = [c for c in cases if c.case_id not in rows]
    order = [c.case_id for c in cases]
    last = [time.perf_counter()]

    def on_row(row: dict[str, Any]) -> None:
        rows[row["case_id"]] = row
        if time.perf_counter() - last[0] > 30.0:
            write_results(out_dir, [rows[k] for k in order if k in rows], cols)
            last[0] = time.perf_counter()

    if todo:
        try:
            _execute(todo, scheduler, workers, progress, on_row)
        except BaseException:  # interrupted or the cluster failed: keep what finished for the rerun
            write_results(out_dir, [rows[k] for k in order if k in rows], cols)
            raise
    table = [rows[k] for k in order]
    files = write_results(out_dir, table, cols, caution_for=spec.study.name)
    from .study_plots import plot_study

    files += plot_study(table, spec, out_dir)
    failed = sum(1 for r in table if r.get("error"))
    return StudySummary(len(cases), len(todo), skipped, failed, time.perf_counter() - t0, tuple(files))

"""Loading conditions and case files (TOML, read with the standard library).

A case file names the hull mesh (path relative to the case file) with its units and
axis mapping, the water density, openings (points that let water in when immersed)
and one or more loading conditions. A condition is either a displacement with a
centre of gravity, or a list of mass items; an item may carry the free-surface
moment ``fsm`` [t·m] of a slack tank (its ``i ρ_tank``), which raises G virtually by
FSM / Δ (textbook virtual rise of G).

Example::

    [hull]
    mesh = "../brindle_barge.stl"   # relative to this file
    units = "m"                     # m, mm, cm, ft, in
    forward = "+x"                  # file axis pointing forward
    up = "+z"                       # file axis pointing up
    offset = [0.0, 0.0, 0.0]        # added after scaling [m]

    [water]
    density = 1.025                 # t/m³

    [[opening]]
    name = "deckhouse door sill"
    at = [2.0, -1.2, 2.3]           # hull frame [m]

    [[condition]]
    name = "loaded"
    items = [ { name = "lightship", mass = 18.0, at = [5.9, 0.0, 0.85] },
              { name = "fuel (slack)", mass = 2.0, at = [1.2, 0.0, 0.6], fsm = 0.9 } ]

    [[condition]]
    name = "light"
    displacement = 20.0             # t
    cog = [5.9, 0.0, 0.95]          # LCG, TCG, VCG (KG) [m]
"""
from __future__ import annotations

import math
import os
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from .errors import InputError
from .frames import SEA_WATER
from .load import FixedLoad, virtual_cog
from .vessel import FloatingHull, load_hull


@dataclass(frozen=True)
class MassItem:
    """A named mass [t] at ``at`` (3,) [m, hull frame], with free-surface moment ``fsm`` [t·m]."""

    name: str
    mass: float
    at: tuple[float, float, float]
    fsm: float = 0.0


@dataclass(frozen=True)
class Condition:
    """A loading condition: displacement [t] and centre of gravity (3,) [m, hull frame].

    ``fsm`` is the total free-surface moment [t·m]; ``kg_fluid`` = KG + FSM/Δ and
    ``cog_fluid`` is G raised by that amount along the hull z axis.

    With tanks (:func:`meshhydro.tank_case.resolve_condition` fills these in), ``displacement``,
    ``cog`` and ``fsm`` include the tank contents upright (fluid centroids at heel 0, trim 0, and
    their free-surface moments ρ i_t): ``tanks`` (Tank objects) hold ``volumes`` [m³] of fluid, of
    mass ``fluid_mass`` [t], first moment ``fluid_moment`` (3,) [t·m] and ``fluid_fsm`` [t·m];
    ``fluid`` is the method the condition's results use (``"exact"`` level surfaces or ``"fsm"``
    virtual rise). ``flooded`` holds the Compartment objects open to the sea (lost buoyancy).
    """

    name: str
    displacement: float
    cog: tuple[float, float, float]
    fsm: float = 0.0
    items: tuple[MassItem, ...] = ()
    tanks: tuple[Any, ...] = ()
    volumes: tuple[float, ...] = ()
    fluid: str | None = None
    flooded: tuple[Any, ...] = ()
    fluid_mass: float = 0.0
    fluid_moment: tuple[float, float, float] = (0.0, 0.0, 0.0)
    fluid_fsm: float = 0.0
    #: True while the condition's tank fills or flooded compartments are not yet joined to it
    #: (as read from a case file, before :func:`meshhydro.tank_case.resolve_condition`)
    pending: bool = False

    @property
    def free_surface_rise(self) -> float:
        return self.fsm / self.displacement

    @property
    def kg(self) -> float:
        return self.cog[2]

    @property
    def kg_fluid(self) -> float:
        return self.cog[2] + self.free_surface_rise

    @property
    def cog_fluid(self) -> np.ndarray:
        return virtual_cog(self.cog, self.fsm, self.displacement)

    def load(self, method: str | None = None) -> Any:
        """The condition as the solver's load (a new object each call: a tank load keeps a warm start).

        ``method`` (default the condition's ``fluid``): ``"fsm"`` gives a :class:`FixedLoad`, G upright
        raised by FSM / Δ; ``"exact"`` with tanks gives a :class:`~meshhydro.tank_load.TankLoad` whose G
        moves with the levelled fluid (typed item FSM still as a virtual rise).
        """
        if self.pending:
            raise InputError(f"condition {self.name!r} has tank fills or flooded compartments that are not "
                             f"resolved against the hull (meshhydro.tank_case.resolve_condition)")
        m = method or self.fluid or "fsm"
        if m not in ("exact", "fsm"):
            raise InputError(f"condition {self.name!r}: fluid method must be exact or fsm, got {m!r}")
        if m == "fsm" or not self.tanks:
            return FixedLoad(self.displacement, self.cog, self.fsm)
        from .fluid import FluidLoad
        from .tank_load import TankLoad

        solid_mass = self.displacement - self.fluid_mass
        solid_moment = np.array(self.cog) * self.displacement - np.array(self.fluid_moment)
        return TankLoad(max(solid_mass, 0.0), solid_moment, FluidLoad(self.tanks, self.volumes),
                        item_fsm=max(self.fsm - self.fluid_fsm, 0.0))

    def to_dict(self) -> dict[str, Any]:
        return {
            "name": self.name, "displacement": self.displacement, "lcg": self.cog[0], "tcg": self.cog[1],
            "vcg": self.cog[2], "fsm": self.fsm, "free_surface_rise": self.free_surface_rise,
            "kg_fluid": self.kg_fluid,
            "items": [{"name": i.name, "mass": i.mass, "x": i.at[0], "y": i.at[1], "z": i.at[2], "fsm": i.fsm}
                      for i in self.items],
            **({"fluid": self.fluid, "fluid_mass": self.fluid_mass, "fluid_fsm": self.fluid_fsm,
                "tanks": [{"name": t.name, "volume": v, "fraction": v / t.capacity, "density": t.density}
                          for t, v in zip(self.tanks, self.volumes)]} if self.tanks else {}),
            **({"flooded": [{"name": c.name, "permeability": c.permeability} for c in self.flooded]}
               if self.flooded else {}),
        }


def _num(v: Any, where: str, *, positive: bool = False, nonneg: bool = False) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        raise InputError(f"{where}: expected a number, got {v!r}")
    f = float(v)
    if not math.isfinite(f):
        raise InputError(f"{where}: must be finite, got {v!r}")
    if positive and f <= 0:
        raise InputError(f"{where}: must be positive, got {v!r}")
    if nonneg and f < 0:
        raise InputError(f"{where}: must not be negative, got {v!r}")
    return f


def _vec(v: Any, where: str) -> tuple[float, float, float]:
    if not isinstance(v, (list, tuple)) or len(v) != 3:
        raise InputError(f"{where}: expected three numbers [x, y, z], got {v!r}")
    a = [_num(x, where) for x in v]
    return a[0], a[1], a[2]


def rectangular_tank_fsm(length: float, breadth: float, density: float, *, compartments: int = 1) -> float:
    """Free-surface moment [t·m] of a slack rectangular tank: ρ l b³ / 12, and with the
    tank divided by longitudinal bulkheads into n equal compartments, ρ l b³ / (12 n²)
    (textbook; each compartment has breadth b / n)."""
    n = int(compartments)
    if n < 1:
        raise InputError(f"compartments must be at least 1, got {compartments!r}")
    return float(density) * float(length) * (float(breadth) / n) ** 3 / 12.0 * n


def condition_from_items(name: str, items: list[MassItem]) -> Condition:
    """Sum mass items into a condition (moments about the hull-frame origin)."""
    if not items:
        raise InputError(f"condition {name!r}: no mass items")
    m = sum(i.mass for i in items)
    if m <= 0:
        raise InputError(f"condition {name!r}: total mass must be positive, got {m}")
    mom = np.sum([np.array(i.at) * i.mass for i in items], axis=0) / m
    return Condition(name=name, displacement=float(m), cog=(float(mom[0]), float(mom[1]), float(mom[2])),
                     fsm=float(sum(i.fsm for i in items)), items=tuple(items))


def condition(displacement: float, cog: Any, *, name: str = "condition", fsm: float = 0.0) -> Condition:
    """A condition from a displacement [t] and a centre of gravity (3,) [m]."""
    d = _num(displacement, "displacement", positive=True)
    c = _vec(list(np.asarray(cog, dtype=float).reshape(-1)) if not isinstance(cog, (list, tuple)) else cog, "cog")
    return Condition(name=name, displacement=d, cog=c, fsm=_num(fsm, "fsm", nonneg=True))


@dataclass(frozen=True)
class Opening:
    """A point [m, hull frame] through which water floods once it is immersed."""

    name: str
    at: tuple[float, float, float]


@dataclass(frozen=True)
class Case:
    """A parsed, validated case file.

    ``spec`` is the whole validated file (:class:`meshhydro.schemas.CaseSpec`): tanks, compartments,
    windage, weather, heeling arms and the criteria set are read from it by the analyses that use them.
    """

    path: str
    mesh: str
    units: str = "m"
    forward: str = "+x"
    up: str = "+z"
    offset: tuple[float, float, float] = (0.0, 0.0, 0.0)
    density: float = SEA_WATER
    openings: tuple[Opening, ...] = ()
    conditions: tuple[Condition, ...] = field(default_factory=tuple)
    flip_inside_out: bool = False
    merge_overlaps: bool = False
    x_ref: float | None = None
    name: str | None = None
    x_aft: float | None = None
    x_fore: float | None = None
    close_holes: bool = False
    spec: Any = None

    def condition(self, name: str | None = None) -> Condition:
        """The named condition, or the first one."""
        if name is None:
            return self.conditions[0]
        for c in self.conditions:
            if c.name == name:
                return c
        raise InputError(f"{self.path}: no condition named {name!r}; have {[c.name for c in self.conditions]}")

    def load_hull(self, progress: Any = None) -> FloatingHull:
        """Load and check the case's hull mesh with the case's own mesh options and repairs
        (``progress(stage, done, total)`` called as reading and checking advance)."""
        return load_hull(self.mesh, units=self.units, forward=self.forward, up=self.up, offset=self.offset,
                         flip_inside_out=self.flip_inside_out, merge_overlaps=self.merge_overlaps,
                         x_ref=self.x_ref, name=self.name or os.path.relpath(self.mesh), x_aft=self.x_aft, x_fore=self.x_fore,
                         close_holes=self.close_holes, progress=progress)


def _condition_from_spec(c: Any) -> Condition:
    """A :class:`Condition` from a validated ``[[condition]]`` entry (mass items, or displacement and cog).

    Tank fills and flooded compartments need the hull: the condition is marked ``pending`` until
    :func:`meshhydro.tank_case.resolve_condition` joins them.
    """
    cond = _solid_condition(c)
    if c.fills or c.soundings or c.volumes or c.flooded:
        cond = replace(cond, pending=True)
    return cond


def _solid_condition(c: Any) -> Condition:
    if c.items is not None:
        items = [MassItem(i.name, float(i.mass), tuple(float(x) for x in i.at), float(i.fsm or 0.0))
                 for i in c.items]
        cond = condition_from_items(c.name, items)
        if c.fsm:
            cond = Condition(cond.name, cond.displacement, cond.cog, cond.fsm + float(c.fsm), cond.items)
        return cond
    return Condition(c.name, float(c.displacement), tuple(float(x) for x in c.cog), float(c.fsm or 0.0))


def read_case(path: str) -> Case:
    """Read and validate a case file; errors name the file and the key (strict: unknown keys are refused)."""
    from .schemas import read_toml, validate_case

    spec = validate_case(read_toml(path), path)
    h = spec.hull
    if not spec.conditions:
        raise InputError(f"{path}: no [[condition]] given")
    return Case(path=path, mesh=spec.mesh_path, units=h.units, forward=h.forward, up=h.up,
                offset=tuple(float(x) for x in h.offset), density=spec.water.rho,
                openings=tuple(Opening(o.name, tuple(float(x) for x in o.at)) for o in spec.openings),
                conditions=tuple(_condition_from_spec(c) for c in spec.conditions),
                flip_inside_out=h.flip_inside_out, merge_overlaps=h.merge_overlaps, x_ref=h.x_ref,
                name=h.name, spec=spec, x_aft=h.x_aft, x_fore=h.x_fore,
                close_holes=h.close_holes)

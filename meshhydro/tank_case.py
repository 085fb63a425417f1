"""Tanks and flooded compartments of a case file, built against its hull and joined to a condition.

A validated case (:class:`meshhydro.loading.Case`, its ``spec``) names ``[[tank]]`` and
``[[compartment]]`` entries as boxes, mesh files (read with the hull's units, axes and offset)
or bodies of the hull mesh; each is checked closed and inside the hull. A condition's
``fills`` (fraction of capacity), ``soundings`` [m] and ``volumes`` [m³] give the fluid in each
tank (tanks not named are empty); ``flooded`` lists the compartments open to the sea.
:func:`resolve_condition` returns the :class:`~meshhydro.loading.Condition` with the tank
contents added upright (mass, centroid, free-surface moment ρ i_t) and the tanks, volumes,
method and flooded compartments attached, so ``Condition.load()`` and the solver's
``compartments`` see them.

Hull frame (x forward, y to port, z up), m, t, t/m³.
"""
from __future__ import annotations

from dataclasses import replace
from types import SimpleNamespace
from typing import Any, Sequence

import numpy as np

from .damage import Compartment, compartment_from_box, compartment_from_mesh
from .errors import InputError
from .fluid import FluidLoad
from .loading import Case, Condition
from .tanks import Tank, check_inside, tank_from_body, tank_from_box, tank_from_mesh


def _mesh_opts(case: Case) -> dict[str, Any]:
    return {"units": case.units, "forward": case.forward, "up": case.up, "offset": case.offset}


def _hull_mesh(hull: Any) -> Any:
    """The hull's checked arrays (``vertices``, ``faces``) in the shape :func:`tank_from_body` takes."""
    return SimpleNamespace(vertices=np.asarray(hull.vertices), faces=np.asarray(hull.faces))


def build_tanks(case: Case, hull: Any) -> tuple[Tank, ...]:
    """The case's ``[[tank]]`` entries as checked tanks inside ``hull`` (errors name the tank)."""
    out = []
    for t in case.spec.tanks if case.spec is not None else ():
        if t.permeability != 1.0:
            raise InputError(f"{case.path}: tank {t.name!r}: permeability {t.permeability:g} is not supported; "
                             f"give the tank's net shape as its mesh (permeability 1)")
        if t.box is not None:
            tank = tank_from_box(t.name, [list(t.box[0]), list(t.box[1])], density=t.density)
        elif t.mesh is not None:
            tank = tank_from_mesh(t.name, case.spec.resolve(t.mesh), density=t.density, **_mesh_opts(case))
        else:
            tank = tank_from_body(t.name, _hull_mesh(hull), hull.report, t.body, density=t.density)
        check_inside(tank.name, tank.vertices, tank.faces, hull, kind="tank")
        out.append(tank)
    return tuple(out)


def build_compartments(case: Case, hull: Any, names: Sequence[str] | None = None) -> tuple[Compartment, ...]:
    """The case's ``[[compartment]]`` entries (only ``names`` when given), checked inside ``hull``."""
    out = []
    for c in case.spec.compartments if case.spec is not None else ():
        if names is not None and c.name not in names:
            continue
        if c.box is not None:
            comp = compartment_from_box(c.name, [list(c.box[0]), list(c.box[1])], permeability=c.permeability)
        else:  # the schema requires exactly one of box and mesh
            comp = compartment_from_mesh(c.name, case.spec.resolve(c.mesh), permeability=c.permeability,
                                         **_mesh_opts(case))
        check_inside(comp.name, comp.vertices, comp.faces, hull, kind="compartment")
        out.append(comp)
    if names is not None:
        order = {n: k for k, n in enumerate(names)}
        out.sort(key=lambda c: order[c.name])
    return tuple(out)


def tank_volumes(tanks: Sequence[Tank], spec: Any) -> tuple[float, ...]:
    """Fluid volume [m³] per tank from a validated condition's fills, soundings and volumes (others empty)."""
    vols = []
    for t in tanks:
        if t.name in spec.fills:
            vols.append(t.volume_for(fraction=spec.fills[t.name]))
        elif t.name in spec.soundings:
            vols.append(t.volume_for(sounding=spec.soundings[t.name]))
        elif t.name in spec.volumes:
            vols.append(t.volume_for(volume=spec.volumes[t.name]))
        else:
            vols.append(0.0)
    return tuple(vols)


def with_tanks(cond: Condition, tanks: Sequence[Tank], volumes: Sequence[float], *, fluid: str | None,
               flooded: Sequence[Compartment] = ()) -> Condition:
    """``cond`` with the tank contents added upright and the tanks, method and flooded compartments attached."""
    if not tanks:
        return replace(cond, flooded=tuple(flooded), pending=False)
    fl = FluidLoad(tanks, volumes)
    up = fl.upright_states()
    m_f = fl.mass
    mom_f = np.sum([s.mass * s.centroid for s in up], axis=0) if m_f > 0 else np.zeros(3)
    fsm_f = fl.fsm_upright()
    disp = cond.displacement + m_f
    g = (np.array(cond.cog) * cond.displacement + mom_f) / disp
    return replace(cond, displacement=float(disp), cog=(float(g[0]), float(g[1]), float(g[2])),
                   fsm=cond.fsm + fsm_f, tanks=tuple(tanks), volumes=tuple(float(v) for v in volumes),
                   fluid=fluid or "exact", flooded=tuple(flooded), fluid_mass=float(m_f),
                   fluid_moment=(float(mom_f[0]), float(mom_f[1]), float(mom_f[2])), fluid_fsm=float(fsm_f),
                   pending=False)


def resolve_condition(case: Case, hull: Any, name: str | None = None, *,
                      tanks: Sequence[Tank] | None = None) -> Condition:
    """The named condition (the first by default) with its tanks and flooded compartments resolved.

    ``tanks`` (already built by :func:`build_tanks`) saves rebuilding them for several conditions.
    """
    cond = case.condition(name)
    if case.spec is None:
        return cond
    spec = case.spec.condition(cond.name)
    tk = build_tanks(case, hull) if tanks is None else tuple(tanks)
    flooded = build_compartments(case, hull, list(spec.flooded)) if spec.flooded else ()
    return with_tanks(cond, tk, tank_volumes(tk, spec), fluid=spec.fluid, flooded=flooded)

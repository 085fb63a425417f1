"""meshhydro: exact hydrostatics and intact stability from a closed hull surface mesh.

A design aid, not an approval: results do not replace the flag administration,
class rules, local codes or a qualified naval architect.

Public API::

    hull = meshhydro.load_hull("hull.stl", units="m")
    hull.cut(point=(x, y, z), normal=(nx, ny, nz))
    hull.hydrostatics(draft, heel=0.0, trim=0.0, density=1.025)
    hull.equilibrium(displacement=..., cog=(x, y, z), density=1.025)
    hull.righting_curve(displacement=..., cog=(x, y, z), heels=[...], free_trim=True)
"""
from __future__ import annotations

from .errors import (
    CannotFloatError,
    InputError,
    InvalidMeshError,
    MeshHydroError,
    NotConvergedError,
    OpenRimError,
)
from .frames import FRESH_WATER, SEA_WATER
from .hull import Hull
from .load import FixedLoad, Load
from .hydrostatics import Hydrostatics
from .kernel import Cut
from .mesh import HealthReport, check_mesh
from .vessel import FloatingHull, load_hull

__version__ = "0.1.0"

__all__ = [
    "CannotFloatError",
    "Cut",
    "FRESH_WATER",
    "HealthReport",
    "Hull",
    "Hydrostatics",
    "InputError",
    "InvalidMeshError",
    "MeshHydroError",
    "NotConvergedError",
    "OpenRimError",
    "SEA_WATER",
    "FixedLoad",
    "FloatingHull",
    "Load",
    "check_mesh",
    "load_hull",
    "__version__",
]

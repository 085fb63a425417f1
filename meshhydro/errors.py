"""Error hierarchy of meshhydro.

Every failure the library can diagnose raises a subclass of :class:`MeshHydroError`
with a one-line message that names what is wrong and where (file, face index, value).
The CLI maps these to exit codes; nothing below the CLI prints or exits.
"""
from __future__ import annotations


class MeshHydroError(Exception):
    """Base class of all diagnosed meshhydro errors."""

    exit_code = 2


class InputError(MeshHydroError, ValueError):
    """A user-supplied argument, range, file or case is malformed."""

    exit_code = 2


class InvalidMeshError(InputError):
    """The mesh cannot be used: unreadable, empty, non-finite, inconsistent or inside out."""

    exit_code = 3


class OpenRimError(MeshHydroError, ValueError):
    """The waterplane reaches an open rim of the mesh, so the submerged part is not closed."""

    exit_code = 4


class CannotFloatError(MeshHydroError, ValueError):
    """The load cannot be carried: more than the closed hull displaces, or nothing submerged."""

    exit_code = 5


class CapsizeError(CannotFloatError):
    """The load has no stable floating position: its GZ curve never turns righting (it capsizes)."""

    exit_code = 5


class NotConvergedError(MeshHydroError, RuntimeError):
    """An iterative solver did not meet its tolerances."""

    exit_code = 6


def finite_number(value: object, what: str) -> float:
    """``value`` as a finite float, else an :class:`InputError` ``'<what> must be a number | finite, got ...'``."""
    import math

    try:
        x = float(value)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number, got {value!r}") from None
    if not math.isfinite(x):
        raise InputError(f"{what} must be finite, got {value!r}")
    return x

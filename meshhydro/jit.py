"""numba's ``njit`` when numba imports (a declared dependency), else a stand-in that leaves functions as
plain Python so the modules still import; ``AVAILABLE`` says which. The compiled passes check it and the
numpy reference paths are used when it is False."""
from __future__ import annotations

try:
    from numba import njit

    AVAILABLE = True
except ImportError:  # pragma: no cover - numba is a declared dependency
    AVAILABLE = False

    def njit(*args, **kwargs):  # noqa: D103 - stand-in so the modules import without numba
        return lambda f: f

__all__ = ["AVAILABLE", "njit"]

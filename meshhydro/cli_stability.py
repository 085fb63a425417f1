"""Stability commands of the CLI (float, righting, cross-curves, criteria)."""
from __future__ import annotations

import argparse
from typing import Callable


def register(sub: argparse._SubParsersAction, mesh_args: Callable, out_args: Callable, water_args: Callable) -> None:
    """Add the stability sub-commands (filled in by the stability work)."""
    return None

#!/usr/bin/env python3
"""Generate the demo hulls and their case files into meshes/ (invented vessels, demo only).

Vessels (all made up for this project):

* ``brindle_barge``   - "Brindle", a 12 m flat-bottomed work barge with raked ends.
* ``tern_sloop``      - "Tern", a 9 m narrow sloop with a deep fin keel and bulb.
* ``twinfin_cat``     - "Twinfin", a 10 m catamaran of two slender demihulls.
* ``kestrel_outrigger`` - "Kestrel", an 8 m outrigger canoe with a float to port.
* ``wigley``          - the Wigley parabolic test form (L = 10 m), a reference shape.

The shapes are the generators of :mod:`meshhydro.generators` at their default parameters.
Run: ``python scripts/make_demo_hulls.py [--out meshes]``. Files are small binary STL.
"""
from __future__ import annotations

import argparse
import os
import sys

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from meshhydro.forms import wigley  # noqa: E402
from meshhydro.generators import barge, catamaran, outrigger, sloop  # noqa: E402


def _write_stl(path: str, v: np.ndarray, f: np.ndarray) -> None:
    import trimesh

    m = trimesh.Trimesh(v, f, process=False)
    tmp = path + ".tmp"
    with open(tmp, "wb") as fh:
        fh.write(trimesh.exchange.stl.export_stl(m))
    os.replace(tmp, path)


CASES = {
    "brindle_tanks": """# "Brindle" with six tanks and two spaces that may flood (invented demo loading)
[hull]
mesh = "../brindle_barge.stl"
units = "m"

[water]
density = 1.025

[[opening]]
name = "deckhouse door sill"
at = [2.0, -1.2, 2.3]

[[tank]]
name = "fuel port"
box = [[1.6, 0.4, 0.05], [3.0, 2.3, 0.9]]
density = 0.85

[[tank]]
name = "fuel starboard"
box = [[1.6, -2.3, 0.05], [3.0, -0.4, 0.9]]
density = 0.85

[[tank]]
name = "fresh water"
box = [[9.0, -1.0, 0.05], [10.4, 1.0, 0.8]]
density = 1.0

[[tank]]
name = "ballast port wing"
box = [[4.0, 1.4, 0.05], [8.0, 2.3, 1.5]]
density = 1.025

[[tank]]
name = "ballast starboard wing"
box = [[4.0, -2.3, 0.05], [8.0, -1.4, 1.5]]
density = 1.025

[[tank]]
name = "double bottom"
box = [[4.0, -1.3, 0.05], [8.0, 1.3, 0.4]]
density = 1.025

[[compartment]]
name = "starboard void"
box = [[8.2, -2.35, 0.02], [10.4, -1.2, 1.55]]
permeability = 0.95

[[compartment]]
name = "midship store"
box = [[4.1, -1.2, 0.45], [7.9, 1.2, 1.55]]
permeability = 0.6

[[condition]]
name = "departure"
items = [
  { name = "lightship",       mass = 18.0, at = [5.9, 0.0, 0.85] },
  { name = "deck cargo",      mass = 8.0,  at = [6.5, 0.0, 2.00] },
  { name = "crew and stores", mass = 1.0,  at = [2.0, 0.0, 2.10] },
]
fills = { "fuel port" = 0.9, "fuel starboard" = 0.9, "fresh water" = 0.8, "ballast port wing" = 0.5, "ballast starboard wing" = 0.5, "double bottom" = 1.0 }
fluid = "exact"

[[condition]]
name = "departure, free-surface moments"
items = [
  { name = "lightship",       mass = 18.0, at = [5.9, 0.0, 0.85] },
  { name = "deck cargo",      mass = 8.0,  at = [6.5, 0.0, 2.00] },
  { name = "crew and stores", mass = 1.0,  at = [2.0, 0.0, 2.10] },
]
fills = { "fuel port" = 0.9, "fuel starboard" = 0.9, "fresh water" = 0.8, "ballast port wing" = 0.5, "ballast starboard wing" = 0.5, "double bottom" = 1.0 }
fluid = "fsm"

[[condition]]
name = "starboard void flooded"
items = [
  { name = "lightship",       mass = 18.0, at = [5.9, 0.0, 0.85] },
  { name = "deck cargo",      mass = 8.0,  at = [6.5, 0.0, 2.00] },
  { name = "crew and stores", mass = 1.0,  at = [2.0, 0.0, 2.10] },
]
fills = { "fuel port" = 0.9, "fuel starboard" = 0.9, "fresh water" = 0.8, "ballast port wing" = 0.5, "ballast starboard wing" = 0.5, "double bottom" = 1.0 }
flooded = ["starboard void"]
fluid = "exact"
""",
    "brindle_barge": """# "Brindle": 12 m work barge carrying a deck load (invented demo vessel)
[hull]
mesh = "../brindle_barge.stl"
units = "m"

[water]
density = 1.025

[[opening]]
name = "deckhouse door sill"
at = [2.0, -1.2, 2.3]

[[condition]]
name = "loaded with deck cargo"
items = [
  { name = "lightship",        mass = 18.0, at = [5.9, 0.0, 0.85] },
  { name = "crane",            mass = 3.5,  at = [3.0, 1.5, 2.60] },
  { name = "deck cargo",       mass = 22.0, at = [7.0, -0.2, 2.20] },
  { name = "fuel (slack)",     mass = 2.0,  at = [1.2, 0.0, 0.60], fsm = 0.9 },
  { name = "crew and stores",  mass = 1.0,  at = [2.0, 0.0, 2.10] },
]

[[condition]]
name = "light"
displacement = 20.0
cog = [5.9, 0.0, 0.95]

# windage above the hull's own (the hull's lateral area comes from the mesh at each waterline)
[[windage]]
name = "deckhouse"
area = 4.2
centroid = [2.0, 2.6]

[[windage]]
name = "deck cargo"
area = 6.0
centroid = [7.0, 2.4]

[weather]
bilge = "sharp"
bilge_keel_area = 0.0

# the crane lifting 0.5 t at 4 m outreach on about 46.5 t: a = 0.5 x 4 / 46.5 m, falling as cos(heel)
[[arm]]
name = "crane lift"
kind = "cosine"
a = 0.043
n = 1
""",
    "tern_sloop": """# "Tern": 9 m sloop with a fin keel (invented demo vessel)
[hull]
mesh = "../tern_sloop.stl"

[[opening]]
name = "companionway"
at = [3.2, 0.0, 3.05]

[[condition]]
name = "cruising"
displacement = 4.2
cog = [4.45, 0.0, 1.55]
""",
    "twinfin_cat": """# "Twinfin": 10 m catamaran (invented demo vessel)
[hull]
mesh = "../twinfin_cat.stl"

[[condition]]
name = "half load"
displacement = 3.6
cog = [4.7, 0.0, 1.60]
""",
    "kestrel_outrigger": """# "Kestrel": 8 m outrigger canoe, float to port (invented demo vessel)
[hull]
mesh = "../kestrel_outrigger.stl"

[[condition]]
name = "two paddlers"
displacement = 0.42
cog = [3.9, 0.45, 0.62]
""",
}


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..", "meshes"))
    args = ap.parse_args(argv)
    os.makedirs(args.out, exist_ok=True)
    os.makedirs(os.path.join(args.out, "cases"), exist_ok=True)
    builders = {
        "brindle_barge": barge,
        "tern_sloop": sloop,
        "twinfin_cat": catamaran,
        "kestrel_outrigger": outrigger,
        "wigley": lambda: wigley(10.0, 1.0, 0.625, stations=48, waterlines=16),
    }
    for name, build in builders.items():
        v, f = build()
        path = os.path.join(args.out, name + ".stl")
        _write_stl(path, v, f)
        print(f"{path}: {len(f)} faces")
    for name, text in CASES.items():
        path = os.path.join(args.out, "cases", name + ".toml")
        with open(path + ".tmp", "w") as fh:
            fh.write(text)
        os.replace(path + ".tmp", path)
        print(path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

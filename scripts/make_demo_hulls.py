#!/usr/bin/env python3
"""Generate the demo hulls and their case files into meshes/ (invented vessels, demo only).

Vessels (all made up for this project):

* ``brindle_barge``   - "Brindle", a 12 m flat-bottomed work barge with raked ends.
* ``tern_sloop``      - "Tern", a 9 m narrow sloop with a deep fin keel and bulb.
* ``twinfin_cat``     - "Twinfin", a 10 m catamaran of two slender demihulls.
* ``kestrel_outrigger`` - "Kestrel", an 8 m outrigger canoe with a float to port.
* ``wigley``          - the Wigley parabolic test form (L = 10 m), a reference shape.

Run: ``python scripts/make_demo_hulls.py [--out meshes]``. Files are small binary STL.
"""
from __future__ import annotations

import argparse
import os
import sys

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from meshhydro.forms import wigley  # noqa: E402
from meshhydro.loft import loft  # noqa: E402


def _write_stl(path: str, v: np.ndarray, f: np.ndarray) -> None:
    import trimesh

    m = trimesh.Trimesh(v, f, process=False)
    tmp = path + ".tmp"
    with open(tmp, "wb") as fh:
        fh.write(trimesh.exchange.stl.export_stl(m))
    os.replace(tmp, path)


def _union(parts: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    import manifold3d as m3d

    out = None
    for v, f in parts:
        man = m3d.Manifold(m3d.Mesh64(vert_properties=np.asarray(v, np.float64),
                                      tri_verts=np.asarray(f, np.uint32)))
        out = man if out is None else out + man
    mesh = out.to_mesh64()
    return np.asarray(mesh.vert_properties, float)[:, :3], np.asarray(mesh.tri_verts, np.int64)


def _concat(parts: list[tuple[np.ndarray, np.ndarray]]) -> tuple[np.ndarray, np.ndarray]:
    vs, fs, n = [], [], 0
    for v, f in parts:
        vs.append(v)
        fs.append(f + n)
        n += len(v)
    return np.concatenate(vs), np.concatenate(fs)


def round_bilge_half(b: float, t: float, z_chine: float, z_deck: float, *, n_bilge: int = 10,
                     n_side: int = 4, power: float = 2.5) -> np.ndarray:
    """Half-section: superelliptic bilge of half-breadth b and depth t below z_chine, wall side to z_deck."""
    th = np.linspace(0.0, np.pi / 2, n_bilge + 1)
    y = b * np.sin(th) ** (2.0 / power)
    z = z_chine - t * np.cos(th) ** (2.0 / power)
    zs = np.linspace(z_chine, z_deck, n_side + 1)[1:]
    pts = np.concatenate([np.stack([y, z], 1), np.stack([np.full_like(zs, b), zs], 1), [[0.0, z_deck]]])
    pts[0, 0] = 0.0
    return pts


def brindle_barge() -> tuple[np.ndarray, np.ndarray]:
    """12 m x 4.8 m x 1.6 m barge; bottom flat from x = 1.5 to 10.5 m, raked to 0.7 m at the ends."""
    L, B, D = 12.0, 4.8, 1.6
    xs = np.linspace(0.0, L, 49)
    halves = []
    for x in xs:
        rake = max(0.0, 1.5 - x, x - (L - 1.5)) / 1.5
        zb = 0.7 * rake
        ys = np.linspace(0.0, B / 2, 9)
        zs = np.linspace(zb, D, 7)[1:]
        pts = np.concatenate([np.stack([ys, np.full_like(ys, zb)], 1),
                              np.stack([np.full_like(zs, B / 2), zs], 1),
                              np.stack([ys[::-1][1:], np.full(len(ys) - 1, D)], 1)])
        halves.append(pts)
    return loft(xs, np.array(halves))


def _canoe(L: float, b_max: float, t_max: float, z_chine: float, z_deck: float, *, stations: int = 60,
           transom: float = 0.35, y0: float = 0.0, x0: float = 0.0, n_bilge: int = 10) -> tuple[np.ndarray, np.ndarray]:
    """Slender canoe body: pointed bow, small transom (fraction of b_max) aft."""
    xs = np.linspace(0.0, L, stations + 1)
    halves = []
    for x in xs:
        s = x / L  # 0 aft, 1 bow
        shape = np.sin(np.pi * np.clip(0.5 * s + 0.5 * s ** 0.7, 0, 1)) ** 0.8
        b = b_max * max(shape, transom * (1 - s) ** 4 if s < 0.2 else shape)
        t = t_max * max(shape, 0.25 * (1 - s) ** 4 if s < 0.2 else shape)
        if x >= L - 1e-12:
            b, t = 0.0, 0.0
        if b <= 0.0:
            half = round_bilge_half(1.0, 1.0, z_chine, z_deck, n_bilge=n_bilge)
            half[:, 0] = 0.0
            # the stem: a vertical line from the keel height to the deck
            half[:, 1] = np.linspace(z_chine, z_deck, len(half))
        else:
            half = round_bilge_half(b, t, z_chine, z_deck, n_bilge=n_bilge)
        halves.append(half)
    v, f = loft(xs, np.array(halves))
    v = v + np.array([x0, y0, 0.0])
    return v, f


def _fin(x_le: float, chord: float, thick: float, z_tip: float, z_root: float, *, n: int = 24) -> tuple[np.ndarray, np.ndarray]:
    """Vertical fin of symmetric foil thickness (NACA-like) between z_tip and z_root."""
    s = 0.5 * (1 - np.cos(np.linspace(0, np.pi, n + 1)))
    xs = x_le + chord * s
    halves = []
    for si in s:
        t = 5 * thick * (0.2969 * np.sqrt(si) - 0.1260 * si - 0.3516 * si ** 2 + 0.2843 * si ** 3 - 0.1036 * si ** 4)
        t = max(t, 0.0) if 0 < si < 1 else 0.0
        zs = np.linspace(z_tip, z_root, 8)
        pts = np.concatenate([[[0.0, z_tip]], np.stack([np.full(8, t), zs], 1), [[0.0, z_root]]])
        halves.append(pts)
    return loft(xs, np.array(halves))


def _bulb(x0: float, length: float, radius: float, z_axis: float, *, n: int = 24, k: int = 12) -> tuple[np.ndarray, np.ndarray]:
    s = np.linspace(0.0, 1.0, n + 1)
    xs = x0 + length * s
    th = np.linspace(0, np.pi, k + 1)
    halves = []
    for si in s:
        r = radius * np.sqrt(max(0.0, 1 - (2 * si - 1) ** 2)) ** 0.9
        pts = np.stack([r * np.sin(th), z_axis - r * np.cos(th)], 1)
        pts[0, 0] = pts[-1, 0] = 0.0
        if r == 0.0:
            pts[:, 1] = z_axis
        halves.append(pts)
    return loft(xs, np.array(halves))


def tern_sloop() -> tuple[np.ndarray, np.ndarray]:
    """9 m sloop: canoe body (beam 2.6 m), fin keel to 1.7 m below the canoe body, lead bulb."""
    z_base = 1.75  # canoe-body keel at z = 1.75 - 0.5; keel bulb bottom near z = 0
    canoe = _canoe(9.0, 1.3, 0.5, z_base, z_base + 1.35, stations=60, transom=0.55)
    fin = _fin(3.6, 1.1, 0.11, 0.20, z_base - 0.25)
    bulb = _bulb(3.3, 1.8, 0.22, 0.22)
    return _union([canoe, fin, bulb])


def twinfin_cat() -> tuple[np.ndarray, np.ndarray]:
    """10 m catamaran: two demihulls of 0.8 m beam, 0.45 m canoe depth, centres 2.2 m off the centreline."""
    hulls = [_canoe(10.0, 0.4, 0.45, 0.45, 1.25, stations=60, transom=0.6, y0=y) for y in (-2.2, 2.2)]
    return _concat(hulls)


def kestrel_outrigger() -> tuple[np.ndarray, np.ndarray]:
    """8 m outrigger canoe (beam 0.7 m) with a 4.5 m float (beam 0.36 m) 3 m to port."""
    main = _canoe(8.0, 0.35, 0.35, 0.35, 0.95, stations=60, transom=0.3)
    ama = _canoe(4.5, 0.18, 0.18, 0.38, 0.68, stations=40, transom=0.2, x0=1.9, y0=3.0)
    return _concat([main, ama])


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
        "brindle_barge": brindle_barge,
        "tern_sloop": tern_sloop,
        "twinfin_cat": twinfin_cat,
        "kestrel_outrigger": kestrel_outrigger,
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

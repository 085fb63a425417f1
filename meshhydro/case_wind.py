"""A case file's wind and heeling-arm data turned into what the criteria look at.

From the validated case (:class:`meshhydro.schemas.CaseSpec`): the ``[[arm]]`` entries become
:class:`meshhydro.arms.HeelingArm` objects by name, and ``[weather]`` with the ``[[windage]]``
items becomes a :class:`meshhydro.weather.WindSetup` bound to the hull. A windage item given as
a mesh file is read here, relative to the case file, with the hull's own units and axes
(``[hull] units / forward / up / offset``), so it lands in the hull frame.

Public: :func:`case_arms`, :func:`case_wind`, :func:`wind_and_arms`.
"""
from __future__ import annotations

from typing import Any

from .arms import HeelingArm, make_arm
from .errors import InputError
from .weather import PRESSURE, WindSetup
from .windage import windage_item


def case_arms(spec: Any) -> dict[str, HeelingArm]:
    """Heeling arms of a case spec by name (empty when it has none or ``spec`` is None)."""
    if spec is None:
        return {}
    out = {}
    for a in spec.arms:
        out[a.name] = make_arm(a.name, a.kind, a=getattr(a, "a", None),
                               n=getattr(a, "n", None) if a.kind == "cosine" else None,
                               table=getattr(a, "table", None))
    return out


def case_wind(spec: Any, hull: Any, *, mirror: bool) -> WindSetup | None:
    """The weather set-up of a case spec for ``hull``; None without ``[weather]`` or ``[[windage]]``.

    ``mirror``: hull and load are symmetric about the centreplane (a one-sided GZ curve may be
    mirrored for the windward roll)."""
    if spec is None or spec.weather is None or not spec.windage:
        return None
    from .mesh import read_mesh

    h = spec.hull
    items = []
    for w in spec.windage:
        if w.mesh is not None:
            md = read_mesh(spec.resolve(w.mesh), units=h.units, forward=h.forward, up=h.up,
                           offset=tuple(float(x) for x in h.offset))
            items.append(windage_item(w.name, mesh=(md.vertices, md.faces)))
        else:
            items.append(windage_item(w.name, area=w.area, centroid=w.centroid))
    ws = spec.weather
    return WindSetup(hull, tuple(items), bilge=ws.bilge, bilge_keel_area=float(ws.bilge_keel_area),
                     pressure=PRESSURE if ws.pressure is None else float(ws.pressure), lever_to=ws.lever_to,
                     mirror=mirror)


def wind_and_arms(spec: Any, hull: Any, cset: Any, *, mirror: bool,
                  where: str = "the case") -> tuple[WindSetup | None, dict[str, HeelingArm]]:
    """(WindSetup or None, arms by name) for a criteria set; InputError when the set needs weather data
    or an arm that ``spec`` (None for a bare mesh) lacks."""
    wind = case_wind(spec, hull, mirror=mirror) if cset.needs_weather else None
    if cset.needs_weather and wind is None:
        raise InputError(f"{cset.name}: the weather criterion needs [weather] and [[windage]] in {where} "
                         "(a case file)")
    arms = case_arms(spec)
    missing = sorted(cset.arms - set(arms))
    if missing:
        have = ", ".join(arms) or "none"
        raise InputError(f"{cset.name}: no heeling arm named {missing[0]!r} in {where} ([[arm]] names: {have})")
    return wind, arms


# ---------------------------------------------------------------------------- report pieces

#: (key, label, unit) of the weather values reported, in order.
WEATHER_VALUES = (
    ("lw1", "steady wind lever lw1", "m"), ("lw2", "gust lever lw2 = 1.5 lw1", "m"),
    ("theta0", "steady heel θ0 (lw1 meets GZ)", "deg"), ("theta0_limit", "limit on θ0", "deg"),
    ("theta1", "roll to windward θ1", "deg"), ("theta_r", "gust-lever intercept", "deg"),
    ("theta2", "end of area b θ2", "deg"), ("theta2_reason", "θ2 set by", ""),
    ("theta_c", "second intercept θc", "deg"), ("area_a", "area a", "m·rad"), ("area_b", "area b", "m·rad"),
    ("windage_area", "windage area A", "m²"), ("windage_x", "centroid of A, x", "m"),
    ("windage_z", "centroid of A, z", "m"), ("z", "lever Z", "m"), ("lever_to", "Z measured to", ""),
    ("underwater_x", "underwater lateral centre, x", "m"), ("underwater_z", "underwater lateral centre, z", "m"),
    ("pressure", "wind pressure P", "N/m²"), ("roll_period", "roll period T", "s"), ("X1", "X1 (B/d)", ""),
    ("X2", "X2 (Cb)", ""), ("k", "k (bilge keels)", ""), ("s", "s (roll period)", ""), ("r", "r", ""),
    ("OG", "OG = KG - d", "m"), ("ratio_bd", "B/d", ""), ("ak_ratio", "100 Ak/(L B)", ""),
)


def weather_values(result: Any, windage: Any) -> dict[str, Any]:
    """Plain values of one weather evaluation: the result's, the windage's centroids and items."""
    d = result.to_dict()
    d.pop("windage_centroid", None)
    cx, cz = (float(v) for v in windage.centroid)
    uc = windage.underwater_centroid
    d.update(windage_x=cx, windage_z=cz, windage_centroid=[cx, cz], hull_windage_area=windage.hull_area,
             underwater_area=windage.underwater_area, lever_to=windage.lever_to,
             underwater_x=None if uc is None else float(uc[0]), underwater_z=None if uc is None else float(uc[1]),
             ratio_bd=result.roll.ratio_bd, ak_ratio=result.roll.ak_ratio,
             items=[{"name": k, "area": a, "x": c[0], "z": c[1]} for k, (a, c) in windage.items.items()])
    return d

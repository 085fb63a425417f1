"""Schema of a case file: hull, water, openings, conditions, tanks, compartments, windage, weather, arms.

All positions are in the hull frame (x forward, y to port, z up) in metres; masses in t, densities in t/m³,
free-surface moments in t·m, angles in degrees. Mesh paths are as written, relative to the case file
(:meth:`CaseSpec.resolve` makes them absolute).
"""
from __future__ import annotations

import os
from typing import Annotated, Any, Literal, Optional

from pydantic import Field, PrivateAttr, model_validator

from ..frames import FRESH_WATER, SEA_WATER
from ._base import (Angle, Flag, Fraction, Index, NonNeg, Num, Permeability, Pos, SchemaTable, Text, Vec2, Vec3,
                    conflict, fail, suggest, validate)

#: Water kinds and their densities [t/m³] (standard values in stability practice).
WATER_KINDS = {"sea": SEA_WATER, "fresh": FRESH_WATER}
#: Built-in criteria set names that ``[criteria] set`` may give instead of a path.
BUILTIN_SETS = ("imo2008", "imo2008-weather")
#: Plausible densities [t/m³] of water and of tank fluids; outside, the value is most likely in kg/m³.
WATER_DENSITY_RANGE = (0.5, 2.0)
FLUID_DENSITY_RANGE = (0.3, 3.0)

Axis = Literal["+x", "-x", "+y", "-y", "+z", "-z", "x", "y", "z"]


def _density_in(v: float, lo_hi: tuple[float, float], key: str = "density") -> None:
    if not lo_hi[0] <= v <= lo_hi[1]:
        raise conflict(key, f"must be in t/m³ (between {lo_hi[0]:g} and {lo_hi[1]:g}), got {v:g}")


def _box_ok(box: tuple[tuple[float, float, float], tuple[float, float, float]] | None, key: str = "box") -> None:
    if box is not None and not all(a < b for a, b in zip(box[0], box[1])):
        raise conflict(key, f"the first corner must be below the second on every axis (min < max), got "
                            f"{[list(box[0]), list(box[1])]}")


BoxCorners = Annotated[tuple[Vec3, Vec3], Field(description="[[x, y, z] min, [x, y, z] max] [m, hull frame]")]


class HullSpec(SchemaTable):
    """``[hull]``: the mesh file and how to read it."""

    mesh: Text = Field(description="mesh file, relative to the case file")
    units: Literal["m", "mm", "cm", "ft", "in"] = Field("m", description="length unit of the mesh file")
    forward: Axis = Field("+x", description="file axis pointing forward")
    up: Axis = Field("+z", description="file axis pointing up")
    offset: Vec3 = Field((0.0, 0.0, 0.0), description="added after scaling [m]")
    flip_inside_out: Flag = Field(False, description="repair: turn inside-out bodies outward")
    merge_overlaps: Flag = Field(False, description="repair: union overlapping bodies")
    close_holes: Flag = Field(False, description="repair: close open rims")
    x_ref: Optional[Num] = Field(None, description="x of the draft reference point [m]; default mid-length")
    x_aft: Optional[Num] = Field(None, description="x of the aft draft mark / perpendicular [m]")
    x_fore: Optional[Num] = Field(None, description="x of the fore draft mark / perpendicular [m]")
    name: Optional[Text] = Field(None, description="vessel name for reports")

    @model_validator(mode="after")
    def _check(self) -> "HullSpec":
        if self.forward.lstrip("+-") == self.up.lstrip("+-"):
            raise conflict("up", f"must be another axis than forward ({self.forward}), got {self.up!r}")
        if self.x_aft is not None and self.x_fore is not None and not self.x_aft < self.x_fore:
            raise conflict("x_fore", f"must be forward of x_aft ({self.x_aft:g}), got {self.x_fore:g}")
        return self


class WaterSpec(SchemaTable):
    """``[water]``: density [t/m³] or kind; both given must agree. Neither: sea water."""

    density: Optional[Pos] = Field(None, description="t/m³")
    kind: Optional[Literal["sea", "fresh"]] = Field(None, description="sea 1.025 or fresh 1.000 t/m³")

    @model_validator(mode="after")
    def _check(self) -> "WaterSpec":
        if self.density is not None:
            _density_in(self.density, WATER_DENSITY_RANGE)
            if self.kind is not None and abs(self.density - WATER_KINDS[self.kind]) > 1e-12:
                raise conflict("density", f"{self.density:g} t/m³ disagrees with kind = {self.kind!r} "
                                          f"({WATER_KINDS[self.kind]:g} t/m³); give one of them")
        return self

    @property
    def rho(self) -> float:
        """Density in use [t/m³]."""
        if self.density is not None:
            return self.density
        return WATER_KINDS[self.kind or "sea"]


class OpeningSpec(SchemaTable):
    """``[[opening]]``: a point through which water floods once immersed."""

    name: Optional[Text] = None
    at: Vec3 = Field(description="[x, y, z] m, hull frame")


class ItemSpec(SchemaTable):
    """One mass item of a condition."""

    name: Optional[Text] = None
    mass: Pos = Field(description="t")
    at: Vec3 = Field(description="centre of the mass [x, y, z] m, hull frame")
    fsm: NonNeg = Field(0.0, description="free-surface moment i·ρ of a slack tank [t·m]")


class ConditionSpec(SchemaTable):
    """``[[condition]]``: mass items, or displacement with cog; plus tank fills and flooded compartments."""

    name: Optional[Text] = None
    items: Optional[Annotated[list[ItemSpec], Field(min_length=1)]] = None
    displacement: Optional[Pos] = Field(None, description="t")
    cog: Optional[Vec3] = Field(None, description="LCG, TCG, VCG (KG) [m]")
    fsm: Optional[NonNeg] = Field(None, description="free-surface moment added to the items' [t·m]")
    fills: dict[Text, Fraction] = Field(default_factory=dict, description="tank name -> filling fraction 0..1")
    soundings: dict[Text, NonNeg] = Field(default_factory=dict, description="tank name -> sounding [m]")
    volumes: dict[Text, NonNeg] = Field(default_factory=dict, description="tank name -> fluid volume [m³]")
    flooded: list[Text] = Field(default_factory=list, description="names of flooded compartments")
    fluid: Optional[Literal["exact", "fsm"]] = Field(None, description="tank fluid: shifting surface or FSM")
    submerged_depth: Optional[NonNeg] = Field(
        None, description="for a load equal to the hull's whole buoyancy (fully submerged): depth of the "
                          "body's top below the surface [m]; default 0, just under it")

    @model_validator(mode="after")
    def _check(self) -> "ConditionSpec":
        if self.items is not None:
            for key in ("displacement", "cog"):
                if getattr(self, key) is not None:
                    raise conflict(key, "contradicts items (the items' masses and centres give the displacement "
                                        "and cog); give items or displacement with cog, not both")
        elif self.displacement is None and self.cog is None:
            raise conflict("items", "missing; give items = [...] or displacement and cog")
        elif self.displacement is None:
            raise conflict("displacement", "missing; cog needs displacement (t)")
        elif self.cog is None:
            raise conflict("cog", "missing; displacement needs cog = [x, y, z] (m)")
        seen: dict[str, str] = {}
        for key in ("fills", "soundings", "volumes"):
            for tank in getattr(self, key):
                if tank in seen:
                    raise conflict(key, f"tank {tank!r} already has a fill in {seen[tank]}; one fill per tank")
                seen[tank] = key
        if len(set(self.flooded)) != len(self.flooded):
            raise conflict("flooded", "names a compartment twice")
        return self


class TankSpec(SchemaTable):
    """``[[tank]]``: a tank as a box, a mesh file or a body of the hull mesh."""

    name: Text
    box: Optional[BoxCorners] = None
    mesh: Optional[Text] = Field(None, description="closed mesh file of the tank, relative to the case file")
    body: Optional[Index] = Field(None, description="index of a body of the hull mesh")
    density: Pos = Field(SEA_WATER, description="fluid density [t/m³]")
    permeability: Permeability = Field(1.0, description="share of the volume the fluid can fill, 0 < μ <= 1")

    @model_validator(mode="after")
    def _check(self) -> "TankSpec":
        _one_shape(self, ("box", "mesh", "body"))
        _box_ok(self.box)
        _density_in(self.density, FLUID_DENSITY_RANGE)
        return self


class CompartmentSpec(SchemaTable):
    """``[[compartment]]``: a space that floods, as a box or a mesh file."""

    name: Text
    box: Optional[BoxCorners] = None
    mesh: Optional[Text] = Field(None, description="closed mesh file, relative to the case file")
    permeability: Permeability = Field(description="share of the volume water fills, 0 < μ <= 1 (required)")

    @model_validator(mode="after")
    def _check(self) -> "CompartmentSpec":
        _one_shape(self, ("box", "mesh"))
        _box_ok(self.box)
        return self


def _one_shape(spec: SchemaTable, keys: tuple[str, ...]) -> None:
    given = [k for k in keys if getattr(spec, k) is not None]
    if not given:
        raise conflict(keys[0], f"missing; give one of {', '.join(keys)}")
    if len(given) > 1:
        raise conflict(given[1], f"contradicts {given[0]}; give only one of {', '.join(keys)}")


class WindageSpec(SchemaTable):
    """``[[windage]]``: a lateral area above water, as area and centroid or as a mesh file."""

    name: Text
    area: Optional[Pos] = Field(None, description="projected lateral area [m²]")
    centroid: Optional[Vec2] = Field(None, description="centre of the area [x, z] m, hull frame")
    mesh: Optional[Text] = Field(None, description="mesh file of the windage, relative to the case file")

    @model_validator(mode="after")
    def _check(self) -> "WindageSpec":
        if self.mesh is not None:
            for key in ("area", "centroid"):
                if getattr(self, key) is not None:
                    raise conflict(key, "contradicts mesh; give area with centroid, or mesh")
        elif self.area is None and self.centroid is None:
            raise conflict("area", "missing; give area with centroid, or mesh")
        elif self.area is None or self.centroid is None:
            k = "centroid" if self.centroid is None else "area"
            raise conflict(k, "missing; area and centroid go together")
        return self


class WeatherSpec(SchemaTable):
    """``[weather]``: data of the severe wind and rolling check."""

    bilge: Literal["round", "sharp"] = Field(description="bilge form")
    bilge_keel_area: NonNeg = Field(0.0, description="total bilge-keel (and bar keel) area [m²]")
    pressure: Optional[Pos] = Field(None, description="wind pressure [N/m²]; default the criterion's")
    lever_to: Literal["underwater_centre", "half_draft"] = Field(
        "underwater_centre", description="wind lever measured to the underwater lateral centre or to half draft")


class ConstantArm(SchemaTable):
    """Heeling arm ``a`` [m] at every angle."""

    name: Text
    kind: Literal["constant"]
    a: Pos = Field(description="m")


class CosineArm(SchemaTable):
    """Heeling arm ``a cos^n φ`` [m]."""

    name: Text
    kind: Literal["cosine"]
    a: Pos = Field(description="m at 0°")
    n: NonNeg = Field(1.0, description="exponent of cos φ")


class TableArm(SchemaTable):
    """Heeling arm from a table of ``[angle deg, arm m]`` rows, angles strictly increasing."""

    name: Text
    kind: Literal["table"]
    table: Annotated[list[tuple[Angle, NonNeg]], Field(min_length=2)] = Field(description="[[deg, m], ...]")

    @model_validator(mode="after")
    def _check(self) -> "TableArm":
        for k in range(1, len(self.table)):
            if not self.table[k][0] > self.table[k - 1][0]:
                raise conflict("table", f"angles must increase strictly; row {k + 1} ({self.table[k][0]:g}°) "
                                        f"follows {self.table[k - 1][0]:g}°")
        return self


ArmSpec = Annotated[ConstantArm | CosineArm | TableArm, Field(discriminator="kind")]


class CriteriaRef(SchemaTable):
    """``[criteria]``: the criteria set to apply, a built-in name or a path to a criteria file."""

    set: Optional[Text] = Field(None, description="imo2008, imo2008-weather or path.toml")

    @model_validator(mode="after")
    def _check(self) -> "CriteriaRef":
        if self.set is not None and self.set not in BUILTIN_SETS and not self.set.endswith(".toml"):
            raise conflict("set", f"must be {' or '.join(BUILTIN_SETS)} or a path to a .toml file, "
                                  f"got {self.set!r}")
        return self


class CaseSpec(SchemaTable):
    """A validated case file. ``source`` is the file it came from (set by :func:`validate_case`)."""

    hull: HullSpec
    water: WaterSpec = Field(default_factory=WaterSpec)
    openings: list[OpeningSpec] = Field(default_factory=list, alias="opening")
    conditions: Annotated[list[ConditionSpec], Field(min_length=1)] = Field(alias="condition")
    tanks: list[TankSpec] = Field(default_factory=list, alias="tank")
    compartments: list[CompartmentSpec] = Field(default_factory=list, alias="compartment")
    windage: list[WindageSpec] = Field(default_factory=list, alias="windage")
    weather: Optional[WeatherSpec] = None
    arms: list[ArmSpec] = Field(default_factory=list, alias="arm")
    criteria: Optional[CriteriaRef] = None
    _source: str = PrivateAttr("")

    @property
    def source(self) -> str:
        """The case file this came from (as given to :func:`validate_case`)."""
        return self._source

    def resolve(self, relative: str) -> str:
        """A path written in the case file, made absolute against the case file's folder."""
        base = os.path.dirname(os.path.abspath(self.source)) if self.source else os.getcwd()
        return os.path.normpath(os.path.join(base, relative))

    @property
    def mesh_path(self) -> str:
        """Absolute path of the hull mesh."""
        return self.resolve(self.hull.mesh)

    def condition(self, name: str) -> ConditionSpec:
        """The condition of that name (``KeyError`` when absent; names are checked unique)."""
        for c in self.conditions:
            if c.name == name:
                return c
        raise KeyError(name)


#: Top-level keys of a case file that are arrays of tables.
CASE_ARRAYS = ("opening", "condition", "tank", "compartment", "windage", "arm")


def validate_case(data: dict[str, Any], source: str) -> CaseSpec:
    """Validate a case file read from TOML (``source`` names the file in messages) into a :class:`CaseSpec`.

    Beyond each table's own rules: names of conditions, tanks, compartments, windage and arms are unique;
    fills, soundings, volumes and flooded name existing tanks and compartments; ``fluid`` needs tanks and
    defaults to ``"exact"`` when there are tanks; missing names become ``"opening k"``, ``"condition k"``,
    ``"item k"`` (k from 1); ``[criteria] set = "imo2008-weather"`` needs ``[weather]`` and ``[[windage]]``.
    """
    spec: CaseSpec = validate(CaseSpec, data, source, CASE_ARRAYS)
    _unique_names(spec, source)
    tanks = [t.name for t in spec.tanks]
    rooms = [c.name for c in spec.compartments]
    conds = []
    for k, c in enumerate(spec.conditions):
        for key in ("fills", "soundings", "volumes"):
            for tank in getattr(c, key):
                _exists(tank, tanks, "tank", source, ["condition", k, key, tank])
        for j, room in enumerate(c.flooded):
            _exists(room, rooms, "compartment", source, ["condition", k, "flooded", j])
        if c.fluid is not None and not tanks:
            raise fail(source, ["condition", k, "fluid"], "applies to tank fluid, and this case has no [[tank]]",
                       CASE_ARRAYS)
        items = None if c.items is None else [
            it if it.name else it.model_copy(update={"name": f"item {j + 1}"}) for j, it in enumerate(c.items)]
        conds.append(c.model_copy(update={"name": c.name or f"condition {k + 1}", "items": items,
                                          "fluid": c.fluid or ("exact" if tanks else None)}))
    ref = spec.criteria.set if spec.criteria else None
    if ref == "imo2008-weather":
        for key, have in (("weather", spec.weather is not None), ("windage", bool(spec.windage))):
            if not have:
                raise fail(source, ["criteria", "set"], f"imo2008-weather needs the [{key}] data of this case; "
                                                        f"none given", CASE_ARRAYS)
    opens = [o if o.name else o.model_copy(update={"name": f"opening {k + 1}"})
             for k, o in enumerate(spec.openings)]
    out = spec.model_copy(update={"conditions": conds, "openings": opens})
    out._source = source
    return out


def _unique_names(spec: CaseSpec, source: str) -> None:
    for key, attr in (("condition", "conditions"), ("tank", "tanks"), ("compartment", "compartments"),
                      ("windage", "windage"), ("arm", "arms")):
        seen: set[str] = set()
        for k, x in enumerate(getattr(spec, attr)):
            if x.name is not None and x.name in seen:
                raise fail(source, [key, k, "name"], f"{x.name!r} is used twice; names must be unique",
                           CASE_ARRAYS)
            seen.add(x.name)


def _exists(name: str, names: list[str], what: str, source: str, loc: list[Any]) -> None:
    if name in names:
        return
    if not names:
        raise fail(source, loc, f"no [[{what}]] named {name!r}; this case has none", CASE_ARRAYS)
    hint = suggest(name, names)
    hint = hint if hint.startswith("; did") else f"; {what}s: {', '.join(names)}"
    raise fail(source, loc, f"no [[{what}]] named {name!r}{hint}", CASE_ARRAYS)

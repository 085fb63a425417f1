"""Schema of a study file: cases from a generator or a list of meshes, swept over parameter values.

Parameter values are plain numbers in the unit the generator documents (lengths in m); a range
``{start, stop, step}`` means start, start + step, ... up to stop inclusive (within 1e-9 of a step).
"""
from __future__ import annotations

import math
import os
from typing import Annotated, Any, Literal, Optional, Union

from pydantic import Discriminator, Field, PrivateAttr, Tag, model_validator

from ._base import Flag, Num, Pos, SchemaTable, Text, Vec3, conflict, fail, validate
from .case import BUILTIN_SETS

#: Most values a range may expand to (a typing slip such as step = 0.0001 stops here, not in memory).
MAX_RANGE_VALUES = 100_000


class RangeSpec(SchemaTable):
    """``{start, stop, step}``: start, start + step, ... up to stop inclusive."""

    start: Num
    stop: Num
    step: Pos

    @model_validator(mode="after")
    def _check(self) -> "RangeSpec":
        if self.stop < self.start:
            raise conflict("stop", f"must not be below start ({self.start:g}), got {self.stop:g}")
        if (self.stop - self.start) / self.step + 1 > MAX_RANGE_VALUES:
            raise conflict("step", f"gives more than {MAX_RANGE_VALUES} values; use a larger step")
        return self

    def values(self) -> list[float]:
        """The values of the range, stop included when it lies on a step."""
        n = int(math.floor((self.stop - self.start) / self.step + 1e-9))
        return [self.start + k * self.step for k in range(n + 1)]


ValueList = Annotated[list[Num], Field(min_length=1)]
ParameterValues = Annotated[
    Union[Annotated[ValueList, Tag("list")], Annotated[RangeSpec, Tag("range")]],
    Discriminator(lambda v: "range" if isinstance(v, (dict, RangeSpec)) else "list")]


class StudyHead(SchemaTable):
    """``[study]``: name and where the hulls come from (a generator or mesh files, exactly one)."""

    name: Text
    generator: Optional[Literal["catamaran", "outrigger", "barge"]] = Field(None, description="hull family")
    meshes: Optional[Annotated[list[Text], Field(min_length=1)]] = Field(
        None, description="mesh files, relative to the study file")

    @model_validator(mode="after")
    def _one_source(self) -> "StudyHead":
        if self.generator is None and self.meshes is None:
            raise conflict("generator", "missing; give generator or meshes")
        if self.generator is not None and self.meshes is not None:
            raise conflict("meshes", "contradicts generator; give generator or meshes, not both")
        return self


class AnalysisSpec(SchemaTable):
    """``[analysis]``: the loading and what to compute for every case."""

    displacement: Optional[Pos] = Field(None, description="t (or swept in [parameters])")
    kg: Optional[Num] = Field(None, description="KG [m]; G on the centre line above the centre of buoyancy")
    cog: Optional[Vec3] = Field(None, description="[x, y, z] m, hull frame")
    criteria: Optional[Text] = Field(None, description="criteria set: a built-in name or a path")
    heels: Optional[RangeSpec] = Field(None, description="heel angles [deg]")
    kg_limit: Flag = Field(False, description="also find the largest KG meeting the criteria")

    @model_validator(mode="after")
    def _one_g(self) -> "AnalysisSpec":
        if self.kg is not None and self.cog is not None:
            raise conflict("cog", "contradicts kg; give kg or cog, not both")
        if self.criteria is not None and self.criteria not in BUILTIN_SETS and not self.criteria.endswith(".toml"):
            raise conflict("criteria", f"must be {' or '.join(BUILTIN_SETS)} or a path to a .toml file, "
                                       f"got {self.criteria!r}")
        if self.heels is not None and not (-180 <= self.heels.start and self.heels.stop <= 180):
            raise conflict("heels", f"must lie within -180..180 deg, got {self.heels.start:g}..{self.heels.stop:g}")
        return self


class StudySpec(SchemaTable):
    """A validated study file."""

    study: StudyHead
    parameters: dict[Text, ParameterValues] = Field(default_factory=dict,
                                                    description="parameter name -> values or range")
    analysis: AnalysisSpec
    _source: str = PrivateAttr("")

    @property
    def source(self) -> str:
        """The study file this came from (as given to :func:`validate_study`)."""
        return self._source

    def mesh_paths(self) -> list[str]:
        """``[study] meshes`` made absolute against the study file's folder (empty with a generator)."""
        base = os.path.dirname(os.path.abspath(self._source)) if self._source else os.getcwd()
        return [os.path.normpath(os.path.join(base, m)) for m in self.study.meshes or []]

    def values(self, name: str) -> list[float]:
        """The values of one parameter (a range expanded)."""
        v = self.parameters[name]
        return v.values() if isinstance(v, RangeSpec) else list(v)


def validate_study(data: dict[str, Any], source: str) -> StudySpec:
    """Validate a study file read from TOML into a :class:`StudySpec`.

    Parameter names are not checked here: they depend on the generator, which checks them. The loading
    comes from exactly one place: ``displacement`` from ``[analysis]`` or ``[parameters]``, G from
    ``[analysis] kg``, ``[analysis] cog`` or ``[parameters] kg``.
    """
    spec: StudySpec = validate(StudySpec, data, source, ())
    spec._source = source
    a, swept = spec.analysis, spec.parameters
    if "displacement" in swept and a.displacement is not None:
        raise fail(source, ["analysis", "displacement"], "contradicts [parameters] displacement; give one", ())
    if "displacement" not in swept and a.displacement is None:
        raise fail(source, ["analysis", "displacement"], "missing; give it here or sweep it in [parameters]", ())
    if "kg" in swept and (a.kg is not None or a.cog is not None):
        key = "kg" if a.kg is not None else "cog"
        raise fail(source, ["analysis", key], "contradicts [parameters] kg; give one", ())
    if "kg" not in swept and a.kg is None and a.cog is None:
        raise fail(source, ["analysis", "kg"], "missing; give kg or cog, or sweep kg in [parameters]", ())
    if a.criteria == "imo2008-weather":
        raise fail(source, ["analysis", "criteria"], "imo2008-weather needs windage, which a study does not "
                   "describe; use imo2008 or a criteria file", ())
    return spec

"""Schema of a criteria file: ``name``, ``source`` and ``[[criterion]]`` entries, one model per kind.

Angles in degrees (0..180), areas in m·rad, levers in m. Each limited kind takes ``minimum`` or ``maximum``
(exactly one) in the unit of the kind (:data:`KIND_UNITS`); ``weather`` carries its own limits.
"""
from __future__ import annotations

from typing import Annotated, Any, Literal, Optional

from pydantic import Field, model_validator

from ._base import Angle, Flag, Num, SchemaTable, Text, conflict, fail, suggest, validate

#: Unit of the value each kind compares with its limit.
KIND_UNITS = {
    "area": "m·rad", "gz_at": "m", "gz_max_beyond": "m", "angle_of_max": "deg", "gm": "m", "range": "deg",
    "vanishing": "deg", "arm_equilibrium": "deg", "arm_residual_area": "m·rad", "arm_area_ratio": "-",
    "weather": "-",
}


class _Criterion(SchemaTable):
    """Fields every criterion has."""

    id: Optional[Text] = Field(None, description="label in reports; default the position, counted from 1")
    text: Optional[Text] = Field(None, description="wording in reports")


class _Limited(_Criterion):
    """A criterion compared with a lower or an upper limit (exactly one)."""

    minimum: Optional[Num] = Field(None, description="lower limit, unit of the kind")
    maximum: Optional[Num] = Field(None, description="upper limit, unit of the kind")

    @model_validator(mode="after")
    def _one_limit(self) -> "_Limited":
        if self.minimum is None and self.maximum is None:
            raise conflict("minimum", "missing; give minimum or maximum")
        if self.minimum is not None and self.maximum is not None:
            raise conflict("maximum", "contradicts minimum; give minimum or maximum, not both")
        return self

    @property
    def limit(self) -> float:
        """The limit given [unit of the kind]."""
        return self.minimum if self.minimum is not None else self.maximum  # type: ignore[return-value]

    @property
    def is_minimum(self) -> bool:
        return self.minimum is not None


class AreaCriterion(_Limited):
    """Area under GZ from ``from`` to ``to`` [deg], or to the downflooding angle if less (``to_flooding``)."""

    kind: Literal["area"]
    start: Angle = Field(alias="from", description="deg")
    end: Angle = Field(alias="to", description="deg")
    to_flooding: Flag = Field(False, description="stop at the downflooding angle when it comes first")

    @model_validator(mode="after")
    def _order(self) -> "AreaCriterion":
        if not self.start < self.end:
            raise conflict("to", f"must be above from ({self.start:g}°), got {self.end:g}°")
        return self


class GzAtCriterion(_Limited):
    """GZ [m] at ``angle`` [deg]."""

    kind: Literal["gz_at"]
    angle: Angle = Field(description="deg")


class GzMaxBeyondCriterion(_Limited):
    """Largest GZ [m] at or beyond ``angle`` [deg]."""

    kind: Literal["gz_max_beyond"]
    angle: Angle = Field(description="deg")


class AngleOfMaxCriterion(_Limited):
    """Angle of the largest GZ [deg]."""

    kind: Literal["angle_of_max"]


class GmCriterion(_Limited):
    """Initial GM [m]."""

    kind: Literal["gm"]


class RangeCriterion(_Limited):
    """Range of positive stability [deg]."""

    kind: Literal["range"]


class VanishingCriterion(_Limited):
    """Angle of vanishing stability [deg]."""

    kind: Literal["vanishing"]


class ArmEquilibriumCriterion(_Limited):
    """Heel [deg] where the named heeling arm meets GZ."""

    kind: Literal["arm_equilibrium"]
    arm: Text = Field(description="name of an [[arm]] of the case")


class ArmResidualAreaCriterion(_Limited):
    """Area [m·rad] between GZ and the arm from their crossing to ``to`` [deg] and/or the downflooding angle."""

    kind: Literal["arm_residual_area"]
    arm: Text = Field(description="name of an [[arm]] of the case")
    end: Optional[Angle] = Field(None, alias="to", description="deg")
    to_flooding: Flag = Field(False, description="stop at the downflooding angle when it comes first")

    @model_validator(mode="after")
    def _has_end(self) -> "ArmResidualAreaCriterion":
        if self.end is None and not self.to_flooding:
            raise conflict("to", "missing; give to (deg) or to_flooding = true")
        return self


class ArmAreaRatioCriterion(_Limited):
    """Ratio [-] of the residual area to the area under the arm, up to ``to`` [deg] and/or downflooding."""

    kind: Literal["arm_area_ratio"]
    arm: Text = Field(description="name of an [[arm]] of the case")
    end: Optional[Angle] = Field(None, alias="to", description="deg")
    to_flooding: Flag = Field(False, description="stop at the downflooding angle when it comes first")

    @model_validator(mode="after")
    def _has_end(self) -> "ArmAreaRatioCriterion":
        if self.end is None and not self.to_flooding:
            raise conflict("to", "missing; give to (deg) or to_flooding = true")
        return self


class WeatherCriterion(_Criterion):
    """The severe wind and rolling check with the case's [weather] and [[windage]] data (no parameters)."""

    kind: Literal["weather"]


CriterionSpec = Annotated[
    AreaCriterion | GzAtCriterion | GzMaxBeyondCriterion | AngleOfMaxCriterion | GmCriterion | RangeCriterion
    | VanishingCriterion | ArmEquilibriumCriterion | ArmResidualAreaCriterion | ArmAreaRatioCriterion
    | WeatherCriterion,
    Field(discriminator="kind")]


class CriteriaSpec(SchemaTable):
    """A validated criteria file."""

    name: Optional[Text] = Field(None, description="title of the set")
    source: Optional[Text] = Field(None, description="where the limits come from")
    criteria: Annotated[list[CriterionSpec], Field(min_length=1)] = Field(alias="criterion")

    @property
    def arms(self) -> set[str]:
        """Names of the heeling arms the set refers to (to check against a case's [[arm]] names)."""
        return {c.arm for c in self.criteria if hasattr(c, "arm")}


CRITERIA_ARRAYS = ("criterion",)


#: fields that say what a criterion measures; the id, its text and the limits do not
_NOT_MEASURE = {"id", "text", "minimum", "maximum"}


def validate_criteria(data: dict[str, Any], source: str) -> CriteriaSpec:
    """Validate a criteria file read from TOML into a :class:`CriteriaSpec` (default ids are the positions
    counted from 1).

    An id may hold several limits, as a clause of a code does (the three areas of the IS Code's 2.2.1):
    results sharing an id pass together. Two entries under one id that measure the same thing (the same
    kind and parameters, both minima or both maxima, only the text or the value differing) are refused:
    one of them is a slip. A minimum and a maximum of the same quantity under one id make a band."""
    spec: CriteriaSpec = validate(CriteriaSpec, data, source, CRITERIA_ARRAYS)
    items = []
    seen: dict[tuple[str, str], int] = {}
    for k, c in enumerate(spec.criteria):
        cid = c.id or str(k + 1)
        # what it measures and which way it bounds it: a minimum and a maximum of one quantity make a band
        what = repr(sorted((f, v) for f, v in c.model_dump().items() if f not in _NOT_MEASURE)) + \
            ("max" if getattr(c, "maximum", None) is not None else "min")
        if (cid, what) in seen:
            raise fail(source, ["criterion", k, "id"], f"{cid!r} already names criterion {seen[cid, what] + 1}, "
                       "which measures the same; give this limit its own id or remove one", CRITERIA_ARRAYS)
        seen[cid, what] = k
        items.append(c if c.id else c.model_copy(update={"id": cid}))
    return spec.model_copy(update={"criteria": items})


def check_against_case(criteria: CriteriaSpec, case: Any, source: str) -> None:
    """Refuse a criteria set that needs what the case lacks: an arm it names that the case's ``[[arm]]``
    entries do not hold, or a ``weather`` criterion without ``[weather]`` and ``[[windage]]``.
    ``case`` is a :class:`~meshhydro.schemas.case.CaseSpec`; ``source`` names the criteria file."""
    arms = [a.name for a in case.arms]
    for k, c in enumerate(criteria.criteria):
        name = getattr(c, "arm", None)
        if name is not None and name not in arms:
            have = f"; arms of {case.source or 'the case'}: {', '.join(arms)}" if arms else \
                f"; {case.source or 'the case'} has no [[arm]]"
            hint = suggest(name, arms) if arms else ""
            raise fail(source, ["criterion", k, "arm"], f"no arm named {name!r}"
                       f"{hint if hint.startswith('; did') else have}", CRITERIA_ARRAYS)
        if c.kind == "weather" and (case.weather is None or not case.windage):
            raise fail(source, ["criterion", k, "kind"], f"weather needs [weather] and [[windage]] in "
                       f"{case.source or 'the case'}", CRITERIA_ARRAYS)

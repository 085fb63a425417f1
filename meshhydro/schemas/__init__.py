"""Strict schemas of the input files (case, criteria, study), pure: dict from TOML in, typed objects out.

Entry points: :func:`read_toml`, :func:`validate_case`, :func:`validate_criteria`, :func:`validate_study`.
Every failure is a one-line :class:`~meshhydro.errors.InputError` naming the file, the table and the key.
"""
from __future__ import annotations

from ._base import read_toml
from .case import (ArmSpec, CaseSpec, CompartmentSpec, ConditionSpec, ConstantArm, CosineArm, CriteriaRef,
                   HullSpec, ItemSpec, OpeningSpec, TableArm, TankSpec, WaterSpec, WeatherSpec, WindageSpec,
                   validate_case)

__all__ = ["read_toml", "validate_case", "CaseSpec", "HullSpec", "WaterSpec", "OpeningSpec", "ConditionSpec",
           "ItemSpec", "TankSpec", "CompartmentSpec", "WindageSpec", "WeatherSpec", "ArmSpec", "ConstantArm",
           "CosineArm", "TableArm", "CriteriaRef"]

from .criteria import CriteriaSpec, CriterionSpec, KIND_UNITS, validate_criteria  # noqa: E402
from .study import AnalysisSpec, RangeSpec, StudyHead, StudySpec, validate_study  # noqa: E402

__all__ += ["validate_criteria", "CriteriaSpec", "CriterionSpec", "KIND_UNITS", "validate_study", "StudySpec",
            "StudyHead", "AnalysisSpec", "RangeSpec"]

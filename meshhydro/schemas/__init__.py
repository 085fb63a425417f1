"""Strict schemas of the input files (case, criteria, study), pure: dict from TOML in, typed objects out.

Entry points: :func:`read_toml`, :func:`validate_case`, :func:`validate_criteria`, :func:`validate_study`,
and :func:`check_against_case` for a criteria set used with a case. Every failure is a one-line
:class:`~meshhydro.errors.InputError` naming the file, the table and the key.
"""
from __future__ import annotations

from ._base import read_toml
from .case import (ArmSpec, CaseSpec, CompartmentSpec, ConditionSpec, ConstantArm, CosineArm, CriteriaRef,
                   HullSpec, ItemSpec, OpeningSpec, TableArm, TankSpec, WaterSpec, WeatherSpec, WindageSpec,
                   validate_case)
from .criteria import CriteriaSpec, CriterionSpec, KIND_UNITS, check_against_case, validate_criteria
from .study import AnalysisSpec, RangeSpec, StudyHead, StudySpec, validate_study

__all__ = ["read_toml", "validate_case", "validate_criteria", "validate_study", "check_against_case",
           "CaseSpec", "HullSpec", "WaterSpec", "OpeningSpec", "ConditionSpec", "ItemSpec", "TankSpec",
           "CompartmentSpec", "WindageSpec", "WeatherSpec", "ArmSpec", "ConstantArm", "CosineArm", "TableArm",
           "CriteriaRef", "CriteriaSpec", "CriterionSpec", "KIND_UNITS", "StudySpec", "StudyHead", "AnalysisSpec",
           "RangeSpec"]

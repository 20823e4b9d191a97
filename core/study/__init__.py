"""The study document: model, validation and JSON files."""

from core.schema import Problem
from core.study.io import StudyError, dumps_study, load_study, loads_study, save_study
from core.study.model import (
    FORMAT_TAG,
    FORMAT_VERSION,
    BandSpec,
    Candidate,
    CandidateKind,
    Combining,
    CostSettings,
    DieArrangement,
    EstimatorSettings,
    LinkScenario,
    Polarization,
    Study,
    Targets,
    Tolerance,
    Weights,
    YieldModelName,
)
from core.study.validate import check_study

__all__ = [
    "FORMAT_TAG",
    "FORMAT_VERSION",
    "BandSpec",
    "Candidate",
    "CandidateKind",
    "Combining",
    "CostSettings",
    "DieArrangement",
    "EstimatorSettings",
    "LinkScenario",
    "Polarization",
    "Problem",
    "Study",
    "StudyError",
    "Targets",
    "Tolerance",
    "Weights",
    "YieldModelName",
    "check_study",
    "dumps_study",
    "load_study",
    "loads_study",
    "save_study",
]

"""Whole-study validation: the rules that involve more than one field.

Field types and ranges are checked by the codec (:mod:`core.schema`) while decoding;
:func:`check_study` adds the cross-field rules and works on a decoded :class:`Study`, so the
same rules guard a file being loaded and an edit being made in the GUI.
"""

from __future__ import annotations

import itertools
from collections import Counter

from core.bands import overlapping_pairs
from core.schema import Problem, walk_numbers
from core.study.model import CandidateKind, Study

__all__ = ["check_study", "errors_of", "warnings_of"]


def _duplicates(names: list[str]) -> set[str]:
    return {n for n, c in Counter(names).items() if c > 1}


def check_study(study: Study) -> list[Problem]:
    """Every problem of ``study``: errors (the study is unusable) and warnings.

    Returns
    -------
    list of Problem
        In document order. Errors make the study invalid; warnings (overlapping bands,
        a disabled-only candidate list) are shown but do not block anything.
    """
    problems: list[Problem] = []
    # Ranges again: a study built in code (not decoded) must obey them too.
    for path, spec, value in walk_numbers(study):
        if spec.kind in ("float", "int") and value is not None:
            if isinstance(value, bool) or not isinstance(value, int | float):
                problems.append(Problem(path, "must be a number"))
                continue
            if value != value or value in (float("inf"), float("-inf")):
                problems.append(Problem(path, "must be a finite number"))
                continue
            reason = spec.range_problem(value)
            if reason:
                problems.append(Problem(path, reason))
        elif spec.kind == "str" and isinstance(value, str) and len(value) > spec.max_len:
            problems.append(Problem(path, f"is longer than {spec.max_len} characters"))

    if not study.name.strip():
        problems.append(Problem("name", "must not be empty"))
    if not study.bands:
        problems.append(Problem("bands", "needs at least one band"))
    for i, b in enumerate(study.bands):
        p = f"bands[{i}]"
        if not b.name.strip():
            problems.append(Problem(f"{p}.name", "must not be empty"))
        if b.f_high_ghz <= b.f_low_ghz:
            problems.append(
                Problem(f"{p}.f_high_ghz", f"must be greater than f_low_ghz ({b.f_low_ghz:g})")
            )
    for name in sorted(_duplicates([b.name for b in study.bands])):
        idx = [i for i, b in enumerate(study.bands) if b.name == name][1]
        problems.append(Problem(f"bands[{idx}].name", f"duplicates the band name {name!r}"))

    for i, c in enumerate(study.process_cards):
        p = f"process_cards[{i}]"
        if not c.name.strip():
            problems.append(Problem(f"{p}.name", "must not be empty"))
        if c.v_knee_v >= c.vdd_v:
            problems.append(Problem(f"{p}.v_knee_v", f"must be below vdd_v ({c.vdd_v:g} V)"))
        if c.drain_eff_untuned_pct > c.drain_eff_tuned_pct:
            problems.append(
                Problem(
                    f"{p}.drain_eff_untuned_pct",
                    f"must not exceed drain_eff_tuned_pct ({c.drain_eff_tuned_pct:g} %)",
                )
            )
        usable = c.wafer_diameter_mm - 2 * study.cost.edge_exclusion_mm
        if usable <= 0:
            problems.append(
                Problem(
                    f"{p}.wafer_diameter_mm",
                    f"leaves no usable wafer after {study.cost.edge_exclusion_mm:g} mm "
                    "edge exclusion",
                )
            )
    for name in sorted(_duplicates([c.name for c in study.process_cards])):
        idx = [i for i, c in enumerate(study.process_cards) if c.name == name][1]
        problems.append(Problem(f"process_cards[{idx}].name", f"duplicates the card name {name!r}"))

    card_names = {c.name for c in study.process_cards}
    for i, cand in enumerate(study.candidates):
        p = f"candidates[{i}]"
        if not cand.name.strip():
            problems.append(Problem(f"{p}.name", "must not be empty"))
        if cand.process not in card_names:
            known = ", ".join(sorted(card_names)) or "none defined"
            problems.append(
                Problem(f"{p}.process", f"names no process card ({cand.process!r}; known: {known})")
            )
        if cand.kind == CandidateKind.SWITCHED and len(study.bands) > 1:
            f0 = sorted(b.band.f0_hz for b in study.bands)
            if any(abs(a - b) < 1e-9 * a for a, b in itertools.pairwise(f0)):
                problems.append(Problem(f"{p}.kind", "switched states need distinct band centres"))
    for name in sorted(_duplicates([c.name for c in study.candidates])):
        idx = [i for i, c in enumerate(study.candidates) if c.name == name][1]
        problems.append(Problem(f"candidates[{idx}].name", f"duplicates the name {name!r}"))

    if study.cost.lifetime_volume < study.cost.design_volume:
        problems.append(
            Problem(
                "cost.lifetime_volume",
                f"must be at least design_volume ({study.cost.design_volume})",
            )
        )

    w = study.weights
    if w.performance + w.unit_cost + w.dc_power + w.area <= 0:
        problems.append(Problem("weights", "at least one score weight must be above zero"))

    valid_bands = [b.band for b in study.bands if b.f_high_ghz > b.f_low_ghz]
    for i, j in overlapping_pairs(valid_bands):
        problems.append(
            Problem(
                f"bands[{j}]",
                f"{valid_bands[j].name} overlaps {valid_bands[i].name}",
                severity="warning",
            )
        )
    if study.candidates and not any(c.enabled for c in study.candidates):
        problems.append(Problem("candidates", "every candidate is hidden", severity="warning"))
    return problems


def errors_of(problems: list[Problem]) -> list[Problem]:
    return [p for p in problems if p.severity == "error"]


def warnings_of(problems: list[Problem]) -> list[Problem]:
    return [p for p in problems if p.severity == "warning"]

"""Findings read as an engineer would expect: the right band, the right severity."""

from __future__ import annotations

import dataclasses

from core.estimate import evaluate
from core.resources import demo_path
from core.study import load_study


def test_met_gain_without_margin_is_a_note_not_an_error():
    ev = evaluate(load_study(demo_path("rural-fwa-terminal")))
    sc = ev.scorecard.set_index(["candidate", "band", "metric"])
    for f in ev.findings:
        if "design margin" in f.message and "Gain target" in f.message:
            assert f.severity == "info"
            assert sc.loc[(f.candidate, f.band, "gain"), "status"] == "meets"


def test_surplus_gain_of_a_shared_design_is_flagged():
    ev = evaluate(load_study(demo_path("rural-fwa-terminal")))
    flagged = {(f.candidate, f.band) for f in ev.findings if "above the target" in f.message}
    sc = ev.scorecard[ev.scorecard.metric == "gain"]
    # common practice threshold of the estimator: 10 dB above target, switched designs only
    expected = {
        (r.candidate, r.band)
        for r in sc.itertuples()
        if r.margin > 10.0 and r.candidate.startswith("Switched")
    }
    assert flagged == expected and expected


def test_cell_limit_finding_names_the_band_that_sets_it():
    study = load_study(demo_path("harbour-small-cell"))
    b0 = study.bands[0]
    hard = dataclasses.replace(b0, targets=dataclasses.replace(b0.targets, p1db_dbm=40.0))
    ev = evaluate(dataclasses.replace(study, bands=(hard, *study.bands[1:])))
    cells = [f for f in ev.findings if "unit cells" in f.message and f.candidate == "Wideband GaAs"]
    assert {f.band for f in cells} == {"n257", "n260"}
    own = next(f for f in cells if f.band == "n257")
    other = next(f for f in cells if f.band == "n260")
    assert "P1dB 40 dBm" in own.message and own.severity == "error"
    assert "n257" in other.message  # points to the band whose target holds the design

"""Tests of the comparison workbook, the CSV files and the clipboard text (core.export).

The writer is checked against the tables it is given, so the evaluation-shaped input here is a
small set of explicit tables (``_evaluation``). The cost inputs are computed with core.cost
(``_cost``), and the workbook's live formulas are evaluated with the ``formulas`` package (a
reference spreadsheet engine used only in tests) and compared with core.cost's own numbers.
"""

from __future__ import annotations

import dataclasses
import hashlib
import math
import os
import types
from pathlib import Path

import numpy as np
import openpyxl
import pandas as pd
import pytest

import core
from core.cost import CostInputs, nre_usd, unit_cost, unit_cost_at_volume
from core.export import (
    SHEETS,
    build_workbook,
    scorecard_tsv,
    write_curves_csv,
    write_scorecard_csv,
    write_workbook,
)
from core.link_plan import study_ledgers
from core.resources import demo_path
from core.study import Candidate, CandidateKind, Study, load_study

HOSTILE = ("=cmd|' /C calc'!A0", "+1", "-2", "@SUM(1)")
_METRICS = (("gain", "dB"), ("p1db", "dBm"), ("pae", "%"))


def _evaluation(study: Study, seed: int = 1, n_freq: int = 11) -> types.SimpleNamespace:
    """Evaluation-shaped tables for ``study`` (scorecard, curves, design, summary, findings)."""
    rng = np.random.default_rng(seed)
    rows, curves, design, summary = [], [], [], []
    for cand in study.candidates:
        for b in study.bands:
            targets = {"gain": b.targets.gain_db, "p1db": b.targets.p1db_dbm}
            targets["pae"] = b.targets.pae_pct
            for m, unit in _METRICS:
                est = targets[m] + float(rng.normal(0.0, 1.5))
                margin = est - targets[m]
                win = study.tolerance.marginal_pae_pts if m == "pae" else 0.5
                status = "meets" if margin >= 0 else "marginal" if margin > -win else "misses"
                rows.append([cand.name, b.name, m, unit, est, targets[m], margin, status])
            f = np.linspace(b.f_low_hz, b.f_high_hz, n_freq)
            g, p, e = (rng.normal(v, 0.3, n_freq) for v in (22.0, 25.0, 25.0))
            curves += [[cand.name, b.name, *v] for v in zip(f, g, p, e, strict=True)]
            design.append([cand.name, b.name, 3, 1.2, float(rng.uniform(0.3, 0.9))])
        summary.append([cand.name, float(rng.uniform(1, 9)), float(rng.uniform(0.5, 3))])
    return types.SimpleNamespace(
        scorecard=pd.DataFrame(
            rows,
            columns=[
                "candidate",
                "band",
                "metric",
                "unit",
                "estimate",
                "target",
                "margin",
                "status",
            ],
        ),
        curves=pd.DataFrame(
            curves, columns=["candidate", "band", "f_hz", "gain_db", "p1db_dbm", "pae_pct"]
        ),
        design=pd.DataFrame(
            design, columns=["candidate", "design", "stages", "w_out_mm", "output_loss_db"]
        ),
        summary=pd.DataFrame(summary, columns=["candidate", "die_area_mm2", "dc_power_w"]),
        findings=(
            types.SimpleNamespace(
                candidate=study.candidates[0].name, band=None, message="example finding"
            ),
        ),
    )


def _inputs(study: Study, card_name: str) -> CostInputs:
    """CostInputs of a card under the study's cost settings (percent → fraction)."""
    c, card = study.cost, study.card(card_name)
    return CostInputs(
        wafer_cost_usd=card.wafer_cost_usd, wafer_diameter_mm=card.wafer_diameter_mm,
        edge_exclusion_mm=c.edge_exclusion_mm, scribe_mm=c.scribe_mm, d0_per_cm2=card.d0_per_cm2,
        yield_model=str(c.yield_model), yield_alpha=c.yield_alpha,
        critical_area_fraction=c.critical_area_pct / 100, test_time_s=c.test_time_s,
        test_rate_usd_per_h=c.test_rate_usd_per_h, test_yield=c.test_yield_pct / 100,
        package_cost_usd=c.package_cost_usd, package_yield=c.package_yield_pct / 100,
        mask_set_cost_usd=card.mask_set_cost_usd, spins=c.spins,
        design_effort_h=c.design_effort_h, design_rate_usd_per_h=c.design_rate_usd_per_h,
        test_development_usd=c.test_development_usd,
    )  # fmt: skip


def _cost(study: Study) -> types.SimpleNamespace:
    """Cost-result-shaped tables computed with core.cost for a 2.0 × 1.5 mm die per design."""
    dies, per = [], []
    n_bands = len(study.bands)
    for cand in study.candidates:
        ci = _inputs(study, cand.process)
        separate = cand.kind == CandidateKind.SEPARATE
        names = [b.name for b in study.bands] if separate else ["all bands"]
        radio = 0.0
        for name in names:
            uc = unit_cost(2.0, 1.5, ci)
            n_per_radio = 16
            packaged = (uc.recurring_usd - uc.extra_part_cost_usd) / uc.n_dies_per_unit
            radio += n_per_radio * packaged
            dies.append(dict(candidate=cand.name, die=name, band=name, process=cand.process,
                             n_per_radio=n_per_radio, width_mm=2.0, height_mm=1.5, fits=True,
                             gross_dpw_exact=uc.gross_dpw_exact, die_yield=uc.die_yield,
                             packaged_die_usd=packaged))  # fmt: skip
        nre = nre_usd(ci, cand.design_effort_factor, len(names)).total_usd
        total = unit_cost_at_volume(radio, nre, study.cost.design_volume)
        per.append(dict(candidate=cand.name, n_designs=len(names), band_select_per_radio=0,
                        pa_cost_per_radio_usd=radio, nre_usd=nre, recurring_usd=radio,
                        unit_cost_at_design_volume_usd=total))  # fmt: skip
    assert n_bands >= 1
    return types.SimpleNamespace(per_candidate=pd.DataFrame(per), dies=pd.DataFrame(dies))


@pytest.fixture(scope="module")
def demo() -> Study:
    return load_study(demo_path())


def test_every_sheet_and_summary_values(demo, tmp_path):
    ev, cost = _evaluation(demo), _cost(demo)
    out = tmp_path / "cmp.xlsx"
    write_workbook(demo, ev, out, study_path=demo_path(), cost=cost, ledgers=study_ledgers(demo))
    wb = openpyxl.load_workbook(out)
    assert wb.sheetnames == list(SHEETS)
    ws = wb["Summary"]
    assert ws.freeze_panes == "B4"
    assert ws.print_title_rows == "$1:$3"
    assert ws.page_setup.orientation == "landscape"
    # Every scorecard number is in the sheet as a number with a number format.
    names = [ws.cell(row=r, column=1).value for r in range(4, 4 + len(demo.candidates))]
    assert names == [c.name for c in demo.candidates]
    found = 0
    for rec in ev.scorecard.itertuples(index=False):
        r = 4 + names.index(rec.candidate)
        b = [b.name for b in demo.bands].index(rec.band)
        m = [m for m, _ in _METRICS].index(rec.metric)
        c = 2 + 12 * b + 4 * m
        assert ws.cell(row=3, column=c).value.endswith(f"({rec.unit})")
        cells = [ws.cell(row=r, column=c + k) for k in range(4)]
        # Excel keeps 15 significant digits and openpyxl writes about that many.
        want = [rec.estimate, rec.target, rec.margin]
        assert [x.value for x in cells[:3]] == pytest.approx(want, rel=1e-14, abs=1e-14)
        assert all(x.number_format != "General" for x in cells[:3])
        assert cells[3].value.endswith(rec.status) and cells[3].value[0] in "✓~✗"
        found += 1
    assert found == len(demo.candidates) * len(demo.bands) * 3
    rules = [r for cf in ws.conditional_formatting for r in cf.rules]
    assert len(rules) == 4 * 3 * len(demo.bands)  # 4 statuses × (3 metrics × bands)
    assert all(r.dxf.fill is not None for r in rules)
    about = {r[0].value: r[1].value for r in wb["About"].iter_rows()}
    assert about["Program version"] == core.__version__
    assert about["Study file SHA-256"] == hashlib.sha256(demo_path().read_bytes()).hexdigest()
    assert wb["Curves"]._charts and len(wb["Curves"]._charts) == 3
    # Assumptions: one row per study input (walk_numbers), with the card's source note.
    from core.schema import walk_numbers

    assert wb["Assumptions"].max_row == 1 + len(walk_numbers(demo))
    notes = " ".join(str(c.value) for c in wb["Cautions"]["B"])
    assert "local regulation" in notes
    assert any(str(c.value) == "Rule of thumb" for c in wb["Cautions"]["A"])


def _solve(path: Path) -> dict[str, float]:
    """Evaluate every formula with the formulas package; keys 'SHEET'!A1 (upper case)."""
    import formulas

    sol = formulas.ExcelModel().loads(str(path)).finish().calculate()
    out = {}
    for key, v in sol.items():
        ref = "'" + key.split("]", 1)[-1]
        val = v.value[0, 0] if hasattr(v, "value") else v
        out[ref] = val
    return out


def test_formulas_reproduce_core_cost(demo, tmp_path):
    # Method: the workbook is evaluated by the `formulas` package (an independent spreadsheet
    # engine) and its unit costs compared with core.cost.unit_cost / nre_usd /
    # unit_cost_at_volume; then the wafer cost and volume are edited and recomputed.
    cost = _cost(demo)
    out = tmp_path / "f.xlsx"
    write_workbook(demo, _evaluation(demo), out, cost=cost)
    ws = openpyxl.load_workbook(out)["Area & Cost"]
    head = next(r for r in range(1, ws.max_row + 1) if ws.cell(r, 1).value == "Per radio") + 1
    assert str(ws.cell(head + 1, 12).value).startswith("=")
    sol = _solve(out)
    for i, p in enumerate(cost.per_candidate.itertuples(index=False)):
        got = sol[f"'AREA & COST'!L{head + 1 + i}"]
        assert math.isclose(got, p.unit_cost_at_design_volume_usd, rel_tol=1e-12)
        assert math.isclose(sol[f"'AREA & COST'!J{head + 1 + i}"], p.nre_usd, rel_tol=1e-12)
    for i, d in enumerate(cost.dies.itertuples(index=False)):
        assert math.isclose(sol[f"'AREA & COST'!R{3 + i}"], d.packaged_die_usd, rel_tol=1e-12)

    # Edit the wafer cost of the first card and the design volume in the workbook.
    wb = openpyxl.load_workbook(out)
    a = wb["Assumptions"]
    paths = {a.cell(r, 6).value: r for r in range(2, a.max_row + 1)}
    a.cell(paths["process_cards[0].wafer_cost_usd"], 3).value = 9000.0
    a.cell(paths["cost.design_volume"], 3).value = 5000
    edited = tmp_path / "edited.xlsx"
    wb.save(edited)
    sol = _solve(edited)
    card0 = demo.process_cards[0].name
    study2 = dataclasses.replace(
        demo,
        process_cards=(
            dataclasses.replace(demo.process_cards[0], wafer_cost_usd=9000.0),
            *demo.process_cards[1:],
        ),
        cost=dataclasses.replace(demo.cost, design_volume=5000),
    )
    ref = _cost(study2)
    for i, p in enumerate(ref.per_candidate.itertuples(index=False)):
        got = sol[f"'AREA & COST'!L{head + 1 + i}"]
        assert math.isclose(got, p.unit_cost_at_design_volume_usd, rel_tol=1e-12)
    changed = cost.per_candidate["unit_cost_at_design_volume_usd"].to_numpy()
    assert not np.allclose(changed, ref.per_candidate["unit_cost_at_design_volume_usd"])
    assert card0 in set(cost.dies["process"])


def test_csv_round_trip(demo, tmp_path):
    ev = _evaluation(demo)
    write_scorecard_csv(ev, tmp_path / "s.csv")
    write_curves_csv(ev, tmp_path / "c.csv")
    back = pd.read_csv(tmp_path / "s.csv", encoding="utf-8-sig")
    pd.testing.assert_frame_equal(back, ev.scorecard)
    back = pd.read_csv(tmp_path / "c.csv", encoding="utf-8-sig")
    pd.testing.assert_frame_equal(back, ev.curves)
    tsv = scorecard_tsv(ev).splitlines()
    assert tsv[0].split("\t") == list(ev.scorecard.columns)
    assert len(tsv) == 1 + len(ev.scorecard)


def _hostile_study(demo: Study) -> Study:
    cands = tuple(
        dataclasses.replace(demo.candidates[i % len(demo.candidates)], name=n)
        for i, n in enumerate(HOSTILE)
    )
    bands = (dataclasses.replace(demo.bands[0], name="=1+1"), *demo.bands[1:])
    return dataclasses.replace(demo, name="@SUM(A1)", notes="-2+3", candidates=cands,
                               bands=bands)  # fmt: skip


def test_hostile_names_are_inert(demo, tmp_path):
    study = _hostile_study(demo)
    ev = _evaluation(study)
    out = tmp_path / "h.xlsx"
    write_workbook(study, ev, out, cost=_cost(study), ledgers=study_ledgers(study))
    wb = openpyxl.load_workbook(out)
    seen = set()
    for ws in wb:
        for row in ws.iter_rows():
            for cell in row:
                v = cell.value
                if isinstance(v, str) and v.lstrip("'").startswith((*HOSTILE, "=1+1")):
                    if cell.data_type == "f":
                        # Only our own formulas may be formulas; none contains user text.
                        assert not any(h in v for h in HOSTILE)
                        continue
                    assert cell.data_type == "s" and v.startswith("'"), (ws.title, cell, v)
                    seen.add(v[1:])
    assert set(HOSTILE) <= seen
    write_scorecard_csv(ev, tmp_path / "h.csv")
    back = pd.read_csv(tmp_path / "h.csv", encoding="utf-8-sig")
    assert set(back["candidate"]) == {"'" + h for h in HOSTILE}
    assert set(back["band"]) >= {"'=1+1"}
    # Numbers are untouched by the guard: negative margins stay numbers.
    assert back["margin"].dtype == float and (back["margin"] < 0).any()
    for line in scorecard_tsv(ev).splitlines()[1:]:
        assert not line.split("\t")[0].startswith(("=", "+", "-", "@"))


def test_atomic_failure_keeps_old_file(demo, tmp_path, monkeypatch):
    out = tmp_path / "keep.xlsx"
    out.write_bytes(b"old contents")
    ev = _evaluation(demo)

    def boom(src, dst):
        raise OSError("disk full (simulated)")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError, match="disk full"):
        write_workbook(demo, ev, out)
    with pytest.raises(OSError, match="disk full"):
        write_scorecard_csv(ev, out)
    assert out.read_bytes() == b"old contents"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.xlsx"]


def test_unicode_long_names_and_large_study(demo):
    long_name = "Ωmega-switched ★ " + "x" * 50  # > 31 characters, non-ASCII
    base = demo.bands[0]
    bands = tuple(
        dataclasses.replace(base, name=f"β{i:02d}", f_low_ghz=20 + i, f_high_ghz=20.8 + i)
        for i in range(50)
    )
    cands = tuple(
        Candidate(name=f"{i:02d} {long_name}"[:60], kind=list(CandidateKind)[i % 3],
                  process=demo.process_cards[i % 2].name)
        for i in range(20)
    )  # fmt: skip
    study = dataclasses.replace(demo, bands=bands, candidates=cands)
    ev = _evaluation(study, n_freq=5)
    wb = build_workbook(study, ev, cost=_cost(study))
    ws = wb["Summary"]
    assert ws.cell(4, 1).value == cands[0].name
    assert ws.cell(1, 2 + 12 * 49).value == "β49"
    assert ws.max_row == 23
    assert wb["Curves"].max_row == 1 + len(ev.curves)
    # Sheet titles never come from user text, so every one is a fixed, valid title.
    assert all(len(t) <= 31 for t in wb.sheetnames)


def test_formulas_reproduce_the_real_cost_model(tmp_path):
    # Same method as above (the `formulas` package recomputes the workbook), but on the real
    # chain: core.estimate.evaluate → core.costing.cost_study for both demo studies.
    from core.costing import cost_study
    from core.estimate import evaluate
    from core.resources import demo_studies

    for name, path in demo_studies().items():
        study = load_study(path)
        ev = evaluate(study)
        cost = cost_study(study, ev)
        out = tmp_path / f"{name}.xlsx"
        write_workbook(study, ev, out, cost=cost)
        ws = openpyxl.load_workbook(out)["Area & Cost"]
        head = next(r for r in range(1, ws.max_row + 1) if ws.cell(r, 1).value == "Per radio")
        sol = _solve(out)
        for i, p in enumerate(cost.per_candidate.itertuples(index=False)):
            got = sol[f"'AREA & COST'!L{head + 2 + i}"]
            assert math.isclose(got, p.unit_cost_at_design_volume_usd, rel_tol=1e-9), (name, i)
            assert math.isclose(sol[f"'AREA & COST'!J{head + 2 + i}"], p.nre_usd, rel_tol=1e-9)


def test_large_curve_tables_are_thinned_but_keep_edges_and_worst_points():
    from core.export.workbook import _MAX_CURVE_ROWS, _thin_curves

    rng = np.random.default_rng(3)
    n_curves, n_f = 400, 101  # 40 400 rows, above the sheet limit
    curves = pd.DataFrame(
        {
            "candidate": np.repeat([f"c{i // 4}" for i in range(n_curves)], n_f),
            "band": np.repeat([f"b{i % 4}" for i in range(n_curves)], n_f),
            "f_hz": np.tile(np.linspace(24e9, 28e9, n_f), n_curves),
            "gain_db": rng.normal(20, 1, n_curves * n_f),
            "p1db_dbm": rng.normal(25, 1, n_curves * n_f),
            "pae_pct": rng.normal(20, 2, n_curves * n_f),
        }
    )
    thin, k = _thin_curves(curves)
    assert k == 2 and len(thin) <= _MAX_CURVE_ROWS + 3 * n_curves
    for (_c, _b), g in curves.groupby(["candidate", "band"]):
        t = thin[(thin.candidate == _c) & (thin.band == _b)]
        assert t.f_hz.min() == g.f_hz.min() and t.f_hz.max() == g.f_hz.max()
        for m in ("gain_db", "p1db_dbm", "pae_pct"):
            assert t[m].min() == g[m].min()  # the worst in-band value survives

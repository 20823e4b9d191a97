"""Plain-text and JSON reports of a study, for the command line."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any, Literal

from core.study import Study, check_study

__all__ = [
    "evaluate_command",
    "scorecard_text",
    "study_summary_text",
    "write_comparison_workbook",
]


def study_summary_text(study: Study) -> str:
    """A short human-readable summary of the validated study."""
    lines = [f"Study: {study.name}", "", "Bands:"]
    for b in study.bands:
        t = b.targets
        lines.append(
            f"  {b.name:<10} {b.f_low_ghz:7.3f}–{b.f_high_ghz:7.3f} GHz "
            f"(f0 {b.band.f0_hz / 1e9:.3f} GHz, {100 * b.band.fractional_bw:.1f} %)  "
            f"targets: gain {t.gain_db:g} dB, P1dB {t.p1db_dbm:g} dBm, PAE {t.pae_pct:g} %"
        )
    lines += ["", "Process cards:"]
    lines += [f"  {c.name} ({c.technology.value})" for c in study.process_cards]
    lines += ["", "Candidates:"]
    lines += [
        f"  {c.name:<28} {c.kind.value:<9} on {c.process}" + ("" if c.enabled else " (hidden)")
        for c in study.candidates
    ]
    from core.link_plan import target_findings

    warnings = [p for p in check_study(study) if p.severity == "warning"]
    warnings += target_findings(study)
    if warnings:
        lines += ["", "Warnings:"] + [f"  {w}" for w in warnings]
    return "\n".join(lines) + "\n"


_SYMBOL = {"meets": "✓", "marginal": "~", "misses": "✗", "infeasible": "!"}
_METRIC = {"gain": ("Gain", "dB"), "p1db": ("P1dB", "dBm"), "pae": ("PAE", "%")}


def scorecard_text(study: Study, evaluation: Any) -> str:
    """The scorecard as aligned text: one block per candidate, one line per band × metric."""
    sc = evaluation.scorecard
    lines = [f"Scorecard: {study.name}", ""]
    tol = study.tolerance
    lines.append(
        f"Status: ✓ meets, ~ marginal (within {tol.marginal_db:g} dB / {tol.marginal_pae_pts:g} "
        "PAE points), ✗ misses, ! not reachable. Estimates are worst case over each band."
    )
    if sc.empty:
        lines += ["", "No candidate is enabled: add or show one to compare (candidates)."]
    summary = evaluation.summary.set_index("candidate") if len(evaluation.summary) else None
    for cand in dict.fromkeys(sc["candidate"]):
        rows = sc[sc["candidate"] == cand]
        lines += ["", cand]
        if summary is not None and cand in summary.index:
            s = summary.loc[cand]
            lines.append(
                f"  {s['kind']} on {s['process']}; die area {s['die_area_mm2']:.2f} mm², "
                f"DC power {s['dc_power_w']:.2f} W per PA, array {s['array_dc_power_w']:.1f} W"
            )
        for _, r in rows.iterrows():
            name, unit = _METRIC.get(r["metric"], (r["metric"], r["unit"]))
            if r["status"] == "infeasible":
                lines.append(
                    f"  {r['band']:<8} {name:<5} {'':>9} target {r['target']:7.2f} {unit:<3} !"
                )
                continue
            lines.append(
                f"  {r['band']:<8} {name:<5} {r['estimate']:9.2f} {unit:<3} target "
                f"{r['target']:7.2f}  margin {r['margin']:+6.2f}  {_SYMBOL.get(r['status'], '?')}"
            )
    if evaluation.findings:
        lines += ["", "Findings:"]
        for f in evaluation.findings:
            where = f.candidate + (f" / {f.band}" if f.band else "")
            lines.append(f"  [{f.severity}] {where}: {f.message}")
    return "\n".join(lines) + "\n"


def write_comparison_workbook(
    study: Study,
    path: Path,
    *,
    study_path: Path | None = None,
    evaluation: Any = None,
    cost: Any = None,
    scores: Any = None,
) -> None:
    """Write the comparison workbook; the GUI and ``bandwright evaluate --xlsx`` both call this.

    Parts already computed (the GUI keeps them) are reused; missing ones are computed here
    from ``study``, so both routes produce the same workbook.

    Raises
    ------
    OSError
        If the file cannot be written; an existing file is left intact.
    """
    from core.costing import cost_study, weighted_scores
    from core.estimate import evaluate
    from core.export import write_workbook
    from core.link_plan import study_ledgers

    evaluation = evaluate(study) if evaluation is None else evaluation
    cost = cost_study(study, evaluation) if cost is None else cost
    scores = weighted_scores(study, evaluation, cost) if scores is None else scores
    write_workbook(
        study,
        evaluation,
        path,
        study_path=study_path,
        cost=cost,
        ledgers=study_ledgers(study),
        scores=scores,
    )


def evaluate_command(
    study: Study,
    source: Path,
    *,
    fmt: Literal["text", "json"] = "text",
    csv: str | None = None,
    xlsx: str | None = None,
) -> str:
    """What ``bandwright evaluate`` prints (and writes, for ``csv``/``xlsx``)."""
    from core.estimate import evaluate

    evaluation = evaluate(study)
    if csv:
        from core.export import write_curves_csv, write_scorecard_csv

        out = Path(csv)
        write_scorecard_csv(evaluation, out)
        write_curves_csv(evaluation, out.with_name(out.stem + "-curves" + out.suffix))
    if xlsx:
        write_comparison_workbook(study, Path(xlsx), study_path=source, evaluation=evaluation)
    if fmt == "json":
        doc = {
            "source": str(source),
            "study": study.name,
            "scorecard": json.loads(evaluation.scorecard.to_json(orient="records")),
            "summary": json.loads(evaluation.summary.to_json(orient="records")),
            "findings": [
                {
                    "candidate": f.candidate,
                    "band": f.band,
                    "severity": f.severity,
                    "message": f.message,
                }
                for f in evaluation.findings
            ],
        }
        return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"
    return study_summary_text(study) + "\n" + scorecard_text(study, evaluation)

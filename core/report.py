"""Plain-text and JSON reports of a study, for the command line."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Literal

from core.schema import encode
from core.study import Study, check_study

__all__ = ["evaluate_command", "study_summary_text"]


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
    warnings = [p for p in check_study(study) if p.severity == "warning"]
    if warnings:
        lines += ["", "Warnings:"] + [f"  {w}" for w in warnings]
    return "\n".join(lines) + "\n"


def evaluate_command(
    study: Study,
    source: Path,
    *,
    fmt: Literal["text", "json"] = "text",
    csv: str | None = None,
    xlsx: str | None = None,
) -> str:
    """What ``bandwright evaluate`` prints (and writes, for ``csv``/``xlsx``)."""
    if fmt == "json":
        return json.dumps({"source": str(source), "study": encode(study)}, indent=2) + "\n"
    return study_summary_text(study)

"""Exports of an evaluated study: the comparison workbook, tidy CSV files, clipboard text."""

from core.export.safe_text import inert_text, is_hostile
from core.export.tables import scorecard_tsv, write_curves_csv, write_scorecard_csv
from core.export.workbook import SHEETS, build_workbook, write_workbook

__all__ = [
    "SHEETS",
    "build_workbook",
    "inert_text",
    "is_hostile",
    "scorecard_tsv",
    "write_curves_csv",
    "write_scorecard_csv",
    "write_workbook",
]

"""The comparison workbook (.xlsx): scorecard, bands, link ledgers, designs, cost, curves, inputs.

Every number is written as a real number with a number format (never as text), units are named
in the headers, and every piece of user text passes the formula-injection guard of
:mod:`core.export.safe_text`. The "Area & Cost" sheet holds live formulas that reference the
"Assumptions" sheet, so a reviewer who edits a wafer cost or the design volume there sees the
unit cost recompute; the values core computed are kept beside the formulas for comparison.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import math
import os
from collections.abc import Mapping
from enum import Enum
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
from openpyxl import Workbook
from openpyxl.chart import Reference, ScatterChart, Series
from openpyxl.formatting.rule import FormulaRule
from openpyxl.styles import Alignment, Font, PatternFill
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.worksheet import Worksheet

import core
from core.export.safe_text import inert_text, xml_safe
from core.fileio import atomic_write
from core.link import EXPOSURE_CAUTION, LinkBudget
from core.schema import walk_numbers
from core.study.model import Study

__all__ = ["SHEETS", "STATUS_STYLE", "build_workbook", "write_workbook"]

#: Sheet titles in workbook order ("Link Ledger" and "Area & Cost" need their inputs).
SHEETS = (
    "Summary",
    "Bands & Targets",
    "Link Ledger",
    "Design",
    "Area & Cost",
    "Curves",
    "Assumptions",
    "Cautions",
    "About",
)

#: status → (symbol, word, fill). Our colour-blind-safe light tints (blue-green, yellow-orange,
#: vermillion, grey); the symbol always goes with the colour so that colour is never the only cue.
STATUS_STYLE: dict[str, tuple[str, str, str]] = {
    "meets": ("✓", "meets", "CFE8DF"),
    "marginal": ("~", "marginal", "F6E3B4"),
    "misses": ("✗", "misses", "F3CDB8"),
    "infeasible": ("!", "not reachable", "E0E0E0"),
}
# Okabe–Ito categorical palette for candidate series in charts.
_OKABE_ITO = ("0072B2", "E69F00", "009E73", "CC79A7", "56B4E9", "D55E00", "F0E442")
# Excel draws at most 255 series in one chart.
_MAX_SERIES = 255

_BOLD = Font(bold=True)
_HEAD_FILL = PatternFill("solid", fgColor="DDE3EA")
_WRAP = Alignment(wrap_text=True, vertical="top")
_CENTRE = Alignment(horizontal="center", vertical="center", wrap_text=True)

# Column-name suffix → (unit shown in the header, number format).
_SUFFIX_UNITS: tuple[tuple[str, str, str], ...] = (
    ("_dbm", "dBm", "0.00"),
    ("_dbi", "dBi", "0.00"),
    ("_db", "dB", "0.00"),
    ("_pct", "%", "0.0"),
    ("_ghz", "GHz", "0.000"),
    ("_hz", "Hz", "0.000E+00"),
    ("_mm2", "mm²", "0.000"),
    ("_mm", "mm", "0.000"),
    ("_um", "µm", "0.0"),
    ("_usd", "USD", "#,##0.00"),
    ("_w", "W", "0.000"),
    ("_v", "V", "0.00"),
    ("_ohm", "Ω", "0.00"),
    ("_f", "F", "0.000E+00"),
    ("_m", "m", "0.000"),
)
_METRIC_LABELS = {"gain": "Gain", "p1db": "P1dB", "pae": "PAE"}
_MARGIN_FMT = "+0.00;-0.00;0.00"


# --------------------------------------------------------------------------------- cells
def _value(v: Any) -> Any:
    """A cell value: guarded text, a plain float/int, or None for a missing number."""
    if isinstance(v, Enum):
        v = v.value
    if isinstance(v, str):
        return inert_text(xml_safe(v))
    if isinstance(v, bool | np.bool_):
        return bool(v)
    if isinstance(v, int | np.integer):
        return int(v)
    if isinstance(v, float | np.floating):
        return float(v) if math.isfinite(v) else None
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return None
    return inert_text(xml_safe(str(v)))


def _put(ws: Worksheet, row: int, col: int, v: Any, fmt: str | None = None, font=None):
    """Write ``v`` to (row, col); text is stored as a string cell, never as a formula."""
    cell = ws.cell(row=row, column=col)
    val = _value(v)
    cell.value = val
    if isinstance(val, str):
        cell.data_type = "s"  # belt and braces: openpyxl must not read it as a formula
    elif fmt and val is not None:
        cell.number_format = fmt
    if font is not None:
        cell.font = font
    return cell


def _formula(ws: Worksheet, row: int, col: int, text: str, fmt: str):
    """Write one of our own formulas (never user text) with a number format."""
    cell = ws.cell(row=row, column=col, value=text)
    cell.number_format = fmt
    return cell


def _header(ws: Worksheet, row: int, labels: list[str], start: int = 1) -> None:
    for i, label in enumerate(labels):
        c = _put(ws, row, start + i, label, font=_BOLD)
        c.fill = _HEAD_FILL
        c.alignment = _CENTRE


def _label_for(column: str) -> tuple[str, str | None]:
    """Header text with unit and a number format for a DataFrame column named by suffix."""
    for suffix, unit, fmt in _SUFFIX_UNITS:
        if column.endswith(suffix):
            return f"{column[: -len(suffix)].replace('_', ' ')} ({unit})", fmt
    return column.replace("_", " "), None


def _widths(ws: Worksheet, widths: Mapping[int, float]) -> None:
    for col, w in widths.items():
        ws.column_dimensions[get_column_letter(col)].width = w


def _print_setup(ws: Worksheet, title_rows: str | None = None) -> None:
    """Landscape, fit to one page wide, header rows repeated on every printed page."""
    ws.page_setup.orientation = "landscape"
    ws.page_setup.fitToWidth = 1
    ws.page_setup.fitToHeight = 0
    ws.sheet_properties.pageSetUpPr.fitToPage = True
    if title_rows:
        ws.print_title_rows = title_rows


def _frame_sheet(ws: Worksheet, df: pd.DataFrame, start_row: int = 1) -> int:
    """Write ``df`` as a table with unit headers; returns the last row written."""
    cols = list(df.columns)
    labels, fmts = zip(*(_label_for(str(c)) for c in cols), strict=True) if cols else ((), ())
    _header(ws, start_row, list(labels))
    for r, rec in enumerate(df.itertuples(index=False), start=start_row + 1):
        for c, v in enumerate(rec, start=1):
            _put(ws, r, c, v, fmts[c - 1] or ("0.000" if isinstance(v, float) else None))
    _widths(ws, {c: max(12, min(40, len(str(labels[c - 1])) + 2)) for c in range(1, len(cols) + 1)})
    ws.freeze_panes = ws.cell(row=start_row + 1, column=1)
    return start_row + len(df)


# ------------------------------------------------------------------------------- Summary
def _summary_sheet(
    ws: Worksheet, study: Study, ev: Any, cost: Any, scores: pd.DataFrame | None = None
) -> None:
    sc: pd.DataFrame = ev.scorecard
    cands = list(dict.fromkeys(sc["candidate"]))
    present = set(sc["band"])
    bands = [b.name for b in study.bands if b.name in present]
    metrics = list(dict.fromkeys(sc["metric"]))
    units = dict(zip(sc["metric"], sc["unit"], strict=True))
    look = {(r.candidate, r.band, r.metric): r for r in sc.itertuples(index=False)}

    _put(ws, 1, 1, "Candidate", font=_BOLD)
    ws.merge_cells(start_row=1, start_column=1, end_row=3, end_column=1)
    ws.cell(row=1, column=1).alignment = _CENTRE
    col = 2
    status_cols: list[int] = []
    for band in bands:
        span = 4 * len(metrics)
        _put(ws, 1, col, band, font=_BOLD).alignment = _CENTRE
        ws.cell(row=1, column=col).fill = _HEAD_FILL
        ws.merge_cells(start_row=1, start_column=col, end_row=1, end_column=col + span - 1)
        for m in metrics:
            u = units[m]
            _put(ws, 2, col, _METRIC_LABELS.get(m, m), font=_BOLD).alignment = _CENTRE
            ws.merge_cells(start_row=2, start_column=col, end_row=2, end_column=col + 3)
            _header(ws, 3, [f"Estimate ({u})", f"Target ({u})", f"Margin ({u})", "Status"], col)
            for r, cand in enumerate(cands, start=4):
                rec = look.get((cand, band, m))
                if rec is None:
                    continue
                fmt = "0.0" if u == "%" else "0.00"
                _put(ws, r, col, rec.estimate, fmt)
                _put(ws, r, col + 1, rec.target, fmt)
                _put(ws, r, col + 2, rec.margin, _MARGIN_FMT)
                _put(ws, r, col + 3, _status_text(rec.status)).alignment = _CENTRE
            status_cols.append(col + 3)
            col += 4
    for r, cand in enumerate(cands, start=4):
        _put(ws, r, 1, cand, font=_BOLD)

    per = _per_candidate(ev, cost, scores)
    if per:
        _put(ws, 1, col, "Per candidate", font=_BOLD).alignment = _CENTRE
        ws.cell(row=1, column=col).fill = _HEAD_FILL
        if len(per) > 1:
            ws.merge_cells(start_row=1, start_column=col, end_row=2, end_column=col + len(per) - 1)
        for label, fmt, values in per:
            _header(ws, 3, [label], col)
            for r, cand in enumerate(cands, start=4):
                _put(ws, r, col, values.get(cand), fmt)
            col += 1

    last = 3 + len(cands)
    if cands:
        _status_rules(ws, status_cols, 4, last)
    ws.freeze_panes = "B4"
    _widths(ws, {1: 28, **{c: 10 for c in range(2, col)}})
    ws.row_dimensions[3].height = 30
    _print_setup(ws, "1:3")


def _status_text(status: Any) -> str:
    key = status.value if isinstance(status, Enum) else str(status)
    symbol, word, _ = STATUS_STYLE.get(key, ("?", key, "FFFFFF"))
    return f"{symbol} {word}"


def _status_rules(ws: Worksheet, cols: list[int], first: int, last: int) -> None:
    """Conditional fills on the status columns, keyed on the status text (symbol + word)."""
    for status, (_, _, fill) in STATUS_STYLE.items():
        text = _status_text(status)
        pattern = PatternFill("solid", start_color=fill, end_color=fill, bgColor=fill)
        for c in cols:
            letter = get_column_letter(c)
            rng = f"{letter}{first}:{letter}{last}"
            ws.conditional_formatting.add(
                rng, FormulaRule(formula=[f'{letter}{first}="{text}"'], fill=pattern)
            )


def _per_candidate(
    ev: Any, cost: Any, scores: pd.DataFrame | None = None
) -> list[tuple[str, str, dict[str, Any]]]:
    """Per-candidate summary columns present in the evaluation and the cost result."""
    out: list[tuple[str, str, dict[str, Any]]] = []
    summary = getattr(ev, "summary", None)
    wanted = (
        ("die_area_mm2", "Largest die (mm²)", "0.00"),
        ("dc_power_w", "DC power per PA at P1dB (W)", "0.000"),
        ("array_dc_power_w", "Array DC power at P1dB (W)", "0.00"),
    )
    frames: list[tuple[pd.DataFrame, tuple]] = []
    if isinstance(summary, pd.DataFrame):
        frames.append((summary, wanted))
    per = getattr(cost, "per_candidate", None) if cost is not None else None
    cost_cols = (
        ("unit_cost_at_design_volume_usd", "PA cost per radio at design volume (USD)", "#,##0.00"),
        ("recurring_usd", "Recurring PA cost per element (USD)", "#,##0.00"),
        ("nre_usd", "NRE (USD)", "#,##0"),
    )
    if isinstance(per, pd.DataFrame):
        frames.append((per, cost_cols))
    elif isinstance(summary, pd.DataFrame):
        frames.append((summary, (("unit_cost_usd", "Unit cost (USD)", "#,##0.00"), cost_cols[2])))
    for df, cols in frames:
        for name, label, fmt in cols:
            if name in df.columns and "candidate" in df.columns:
                out.append((label, fmt, dict(zip(df["candidate"], df[name], strict=True))))
    if isinstance(scores, pd.DataFrame) and "score" in scores.columns:
        out.append(
            ("Score (0–1)", "0.000", dict(zip(scores["candidate"], scores["score"], strict=True)))
        )
        if "pareto" in scores.columns:
            marks = ["◆ yes" if bool(p) else "—" for p in scores["pareto"]]
            out.append(("Pareto set", "@", dict(zip(scores["candidate"], marks, strict=True))))
    return out


# -------------------------------------------------------------------- Bands, ledger, design
def _bands_sheet(ws: Worksheet, study: Study) -> None:
    labels = [
        "Band",
        "Preset",
        "f low (GHz)",
        "f high (GHz)",
        "f0 (GHz)",
        "Fractional bandwidth (%)",
        "Gain target (dB)",
        "P1dB target (dBm)",
        "PAE target (%)",
        "Input RL target (dB)",
        "Output RL target (dB)",
    ]
    _header(ws, 1, labels)
    fmts = [None, None, "0.000", "0.000", "0.000", "0.00", "0.00", "0.00", "0.0", "0.0", "0.0"]
    for r, b in enumerate(study.bands, start=2):
        t = b.targets
        band = b.band
        vals = [
            b.name,
            b.preset,
            b.f_low_ghz,
            b.f_high_ghz,
            band.f0_hz / 1e9,
            100.0 * band.fractional_bw,
            t.gain_db,
            t.p1db_dbm,
            t.pae_pct,
            t.input_rl_db,
            t.output_rl_db,
        ]
        for c, (v, f) in enumerate(zip(vals, fmts, strict=True), start=1):
            _put(ws, r, c, v, f)
    ws.freeze_panes = "B2"
    _widths(ws, {1: 24, 2: 10, **{c: 13 for c in range(3, len(labels) + 1)}})
    _print_setup(ws, "1:1")


def _ledger_sheet(ws: Worksheet, ledgers: Mapping[str, LinkBudget]) -> None:
    labels = ["Band", "Group", "Line", "Value", "Unit", "Formula", "Source"]
    _header(ws, 1, labels)
    r = 2
    for band, budget in ledgers.items():
        for item in budget.items:
            fmt = "0.000" if abs(item.value) < 1e4 else "0.000E+00"
            for c, v in enumerate(
                [band, item.group, item.name, item.value, item.unit, item.formula, item.source],
                start=1,
            ):
                _put(ws, r, c, v, fmt if c == 4 else None)
            r += 1
        _put(ws, r, 1, band)
        _put(ws, r, 3, "Caution")
        _put(ws, r, 6, budget.exposure_caution).alignment = _WRAP
        r += 2  # a blank row between bands
    ws.freeze_panes = "A2"
    _widths(ws, {1: 16, 2: 10, 3: 34, 4: 14, 5: 9, 6: 48, 7: 48})
    _print_setup(ws, "1:1")


def _design_sheet(ws: Worksheet, design: pd.DataFrame) -> None:
    _frame_sheet(ws, design)
    _print_setup(ws, "1:1")


# --------------------------------------------------------------------------------- Curves
#: Above this many curve rows the Curves sheet is thinned (openpyxl writes ~15k rows/s here,
#: and a reviewer reads curves in the charts; the CSV export keeps every point).
_MAX_CURVE_ROWS = 30_000


def _thin_curves(curves: pd.DataFrame) -> tuple[pd.DataFrame, int]:
    """Every k-th point of each (candidate, band) curve plus its last and its worst points."""
    k = math.ceil(len(curves) / _MAX_CURVE_ROWS)
    if k <= 1:
        return curves, 1
    keys = [curves["candidate"].astype(str), curves["band"].astype(str)]
    grouped = curves.groupby(keys, sort=False)
    pos = grouped.cumcount().to_numpy()
    size = grouped["f_hz"].transform("size").to_numpy()
    keep = (pos % k == 0) | (pos == size - 1)
    for metric in ("gain_db", "p1db_dbm", "pae_pct"):
        keep[curves.index.get_indexer(grouped[metric].idxmin())] = True
    return curves[keep], k


def _curves_sheet(ws: Worksheet, study: Study, curves: pd.DataFrame) -> None:
    """Tidy table, then one chart per metric with a series per (candidate, band)."""
    labels = ["Candidate", "Band", "f (GHz)", "Gain (dB)", "P1dB (dBm)", "PAE (%)"]
    _header(ws, 1, labels)
    n_all = len(curves)
    curves, k = _thin_curves(curves.reset_index(drop=True))
    if k > 1:
        _put(
            ws, 2, 8,
            f"Large study: the table keeps every {k}th frequency point of each curve plus its "
            f"last and worst points ({len(curves)} of {n_all} rows); the CSV export of the "
            "curves has every point.",
        )  # fmt: skip
    cand = [_value(v) for v in curves["candidate"]]
    band = [_value(v) for v in curves["band"]]
    f_ghz = (curves["f_hz"].to_numpy(float) / 1e9).tolist()
    cols = [curves[c].to_numpy(float).tolist() for c in ("gain_db", "p1db_dbm", "pae_pct")]
    # ws.append is the fast path for 10^5 rows; numbers keep the General format (full precision).
    for row in zip(cand, band, f_ghz, *cols, strict=True):
        ws.append([None if isinstance(v, float) and not math.isfinite(v) else v for v in row])
    ws.freeze_panes = "A2"
    _widths(ws, {1: 28, 2: 14, 3: 10, 4: 10, 5: 11, 6: 9})
    _print_setup(ws, "1:1")

    # Contiguous row runs of one (candidate, band) become one series each.
    runs: list[tuple[str, str, int, int]] = []
    start = 0
    for i in range(1, len(cand) + 1):
        if i == len(cand) or (cand[i], band[i]) != (cand[start], band[start]):
            runs.append((str(cand[start]), str(band[start]), start + 2, i + 1))
            start = i
    colour = {c.name: _OKABE_ITO[i % len(_OKABE_ITO)] for i, c in enumerate(study.candidates)}
    raw = [str(v.value if isinstance(v, Enum) else v) for v in curves["candidate"]]
    shown = runs[:_MAX_SERIES]
    if len(runs) > _MAX_SERIES:
        note = f"Charts show the first {_MAX_SERIES} of {len(runs)} curves; the table has all."
        _put(ws, 1, 8, note)
    x_title = "Frequency (GHz)"
    for k, (col, title) in enumerate(((4, "Gain (dB)"), (5, "P1dB (dBm)"), (6, "PAE (%)"))):
        chart = ScatterChart()
        chart.title = f"{title.split(' (')[0]} over frequency"
        chart.style = 13
        chart.x_axis.title = x_title
        chart.y_axis.title = title
        chart.height, chart.width = 9, 18
        chart.x_axis.delete = False
        chart.y_axis.delete = False
        for c_name, b_name, r0, r1 in shown:
            xs = Reference(ws, min_col=3, min_row=r0, max_row=r1)
            ys = Reference(ws, min_col=col, min_row=r0, max_row=r1)
            s = Series(ys, xs, title=xml_safe(f"{c_name} · {b_name}")[:250])
            s.marker.symbol = "none"
            s.smooth = False
            s.graphicalProperties.line.solidFill = colour.get(raw[r0 - 2], _OKABE_ITO[0])
            s.graphicalProperties.line.width = 15000
            chart.series.append(s)
        ws.add_chart(chart, f"H{3 + 19 * k}")


# ---------------------------------------------------------------- Assumptions, Cautions, About
def _section(study: Study, path: str) -> str:
    head = path.split(".", 1)[0]
    for prefix, seq, word in (
        ("bands[", study.bands, "Band"),
        ("process_cards[", study.process_cards, "Process card"),
        ("candidates[", study.candidates, "Candidate"),
    ):
        if head.startswith(prefix):
            return f"{word}: {seq[int(head[len(prefix) : -1])].name}"
    return head.replace("_", " ").capitalize() if "." in path else "Study"


def _assumptions_sheet(ws: Worksheet, study: Study) -> dict[str, str]:
    """Every study input with unit and note; returns field path → absolute cell reference."""
    _header(ws, 1, ["Section", "Input", "Value", "Unit", "Note", "Field path"])
    refs: dict[str, str] = {}
    for r, (path, spec, value) in enumerate(walk_numbers(study), start=2):
        _put(ws, r, 1, _section(study, path))
        _put(ws, r, 2, spec.label or path.rsplit(".", 1)[-1])
        if spec.kind == "float":
            fmt = "0.000E+00" if value is not None and abs(value) >= 1e6 else "General"
        else:
            fmt = "0" if spec.kind == "int" else None
        cell = _put(ws, r, 3, value, fmt)
        if value is None:
            _put(ws, r, 3, "auto" if spec.kind == "int" else "not set")
        if spec.kind == "str" and len(str(value)) > 60:
            cell.alignment = _WRAP
        _put(ws, r, 4, "" if spec.unit == "1" else spec.unit)
        _put(ws, r, 5, spec.note).alignment = _WRAP
        _put(ws, r, 6, path)
        refs[path] = f"Assumptions!$C${r}"
    ws.freeze_panes = "C2"
    _widths(ws, {1: 30, 2: 30, 3: 16, 4: 9, 5: 60, 6: 44})
    _print_setup(ws, "1:1")
    return refs


def _cautions_sheet(ws: Worksheet, study: Study, ev: Any) -> None:
    lines = [
        ("Regulation", EXPOSURE_CAUTION),
        (
            "Regulation",
            "RF-exposure and transmit-power limits are local regulatory matters. The compliance "
            "distances in the link ledger use an editable power-density limit and a far-field "
            "formula; they are not a compliance assessment.",
        ),
        (
            "Estimates",
            "Every figure in this workbook is a closed-form estimate for comparing architectures "
            "early. It is not a simulation or a measurement; calibrate the process cards "
            "against measured data before relying on absolute numbers.",
        ),
    ]
    for path, spec, _v in walk_numbers(study):
        note = spec.note.lower()
        if "rule of thumb" in note or "common practice" in note:
            lines.append(("Rule of thumb", f"{_section(study, path)} — {spec.label}: {spec.note}"))
    for card in study.process_cards:
        lines.append(("Process card source", f"{card.name}: {card.source_note}"))
    for f in getattr(ev, "findings", ()) or ():
        where = " · ".join(str(x) for x in (f.candidate, f.band) if x)
        lines.append(("Finding", f"{where}: {f.message}" if where else f.message))
    _header(ws, 1, ["Topic", "Caution"])
    for r, (topic, text) in enumerate(lines, start=2):
        _put(ws, r, 1, topic, font=_BOLD)
        _put(ws, r, 2, text).alignment = _WRAP
    _widths(ws, {1: 22, 2: 110})
    _print_setup(ws, "1:1")


def _about_sheet(ws: Worksheet, study: Study, ev: Any, study_path: Path | None) -> None:
    rows: list[tuple[str, Any]] = [
        ("Program", "Bandwright"),
        ("Program version", core.__version__),
        ("Model version", getattr(ev, "model_version", None) or f"core {core.__version__}"),
        ("Study", study.name),
        ("Exported (UTC)", _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%d %H:%M:%S")),
    ]
    if study_path is not None:
        data = Path(study_path).read_bytes()
        rows += [
            ("Study file", Path(study_path).name),
            ("Study file SHA-256", hashlib.sha256(data).hexdigest()),
        ]
    if study.notes:
        rows.append(("Study notes", study.notes))
    for r, (k, v) in enumerate(rows, start=1):
        _put(ws, r, 1, k, font=_BOLD)
        _put(ws, r, 2, v).alignment = _WRAP
    _widths(ws, {1: 22, 2: 90})
    _print_setup(ws)


# ---------------------------------------------------------------------------- Area & Cost
def _cost_sheet(ws: Worksheet, study: Study, cost: Any, refs: Mapping[str, str]) -> None:
    """Die and per-radio cost as live formulas over the "Assumptions" inputs.

    Formulas follow :func:`core.cost.unit_cost` and the per-radio rules of
    :mod:`core.costing`: die = wafer / (N·Y); test = t/3600·rate/(Y·Ty); test-yield loss =
    die·(1/Ty − 1); KGD = die + test + loss; packaged = KGD + package/Py + KGD·(1/Py − 1);
    PA cost per radio = Σ n_per_radio·packaged + band-select parts; unit cost at volume V =
    PA cost per radio + NRE / V. Gross die count N and yield Y are geometry and yield-model
    results written as values (columns marked "core").
    """
    card_i = {c.name: i for i, c in enumerate(study.process_cards)}
    cand_i = {c.name: i for i, c in enumerate(study.candidates)}

    def ref(path: str) -> str:
        return refs[path]

    t_time, t_rate = ref("cost.test_time_s"), ref("cost.test_rate_usd_per_h")
    ty, py = f"({ref('cost.test_yield_pct')}/100)", f"({ref('cost.package_yield_pct')}/100)"
    pkg = ref("cost.package_cost_usd")

    _put(ws, 1, 1, "Dies (one row per die design). Formulas reference the Assumptions sheet.",
         font=_BOLD)  # fmt: skip
    labels = [
        "Candidate", "Die", "Band", "Process", "Dies per radio", "Width (mm)", "Height (mm)",
        "Area (mm²)", "Gross dies per wafer (core)", "Die yield (core)", "Wafer cost (USD)",
        "Die cost (USD)", "Test cost (USD)", "Test-yield loss (USD)", "Known good die (USD)",
        "Package (USD)", "Assembly-yield loss (USD)", "Packaged die (USD)",
        "Packaged die, core value (USD)",
    ]  # fmt: skip
    _header(ws, 2, labels)
    usd = "#,##0.0000"
    die_rows: dict[str, list[int]] = {}
    r = 3
    for d in cost.dies.itertuples(index=False):
        if not bool(d.fits) or not math.isfinite(float(d.gross_dpw_exact)):
            continue
        die_rows.setdefault(d.candidate, []).append(r)
        vals = [d.candidate, d.die, d.band, d.process, d.n_per_radio, d.width_mm, d.height_mm]
        for c, v in enumerate(vals, start=1):
            _put(ws, r, c, v, "0.000" if c > 5 else "0")
        _formula(ws, r, 8, f"=F{r}*G{r}", "0.000")
        _put(ws, r, 9, int(d.gross_dpw_exact), "0")
        _put(ws, r, 10, d.die_yield, "0.0000")
        _formula(ws, r, 11, f"={ref(f'process_cards[{card_i[d.process]}].wafer_cost_usd')}", usd)
        _formula(ws, r, 12, f"=K{r}/(I{r}*J{r})", usd)
        _formula(ws, r, 13, f"={t_time}/3600*{t_rate}/(J{r}*{ty})", usd)
        _formula(ws, r, 14, f"=L{r}*(1/{ty}-1)", usd)
        _formula(ws, r, 15, f"=L{r}+M{r}+N{r}", usd)
        _formula(ws, r, 16, f"={pkg}/{py}", usd)
        _formula(ws, r, 17, f"=O{r}*(1/{py}-1)", usd)
        _formula(ws, r, 18, f"=O{r}+P{r}+Q{r}", usd)
        _put(ws, r, 19, d.packaged_die_usd, usd)
        r += 1

    r += 1
    _put(ws, r, 1, "Per radio", font=_BOLD)
    r += 1
    head = r
    labels = [
        "Candidate", "Band-select parts per radio", "Band-select part (USD)",
        "PA cost per radio (USD)", "Die designs", "Mask sets × spins (USD)",
        "PA designs (single-PA effort units)", "Design (USD)", "Test development (USD)",
        "NRE (USD)", "Design volume (radios)", "Unit cost at design volume (USD)",
        "Unit cost at design volume, core value (USD)",
    ]  # fmt: skip
    _header(ws, head, labels)
    volume = ref("cost.design_volume")
    n_bands = len(study.bands)
    r = head + 1
    for p in cost.per_candidate.itertuples(index=False):
        rows = die_rows.get(p.candidate)
        if not rows or p.candidate not in cand_i:
            continue
        cand = study.candidates[cand_i[p.candidate]]
        cpath = f"candidates[{cand_i[p.candidate]}]"
        card = f"process_cards[{card_i[cand.process]}]"
        _put(ws, r, 1, p.candidate)
        _put(ws, r, 2, p.band_select_per_radio, "0")
        _formula(ws, r, 3, f"={ref(cpath + '.band_select_cost_usd')}", usd)
        terms = "+".join(f"E{i}*R{i}" for i in rows)
        _formula(ws, r, 4, f"={terms}+B{r}*C{r}", "#,##0.00")
        _put(ws, r, 5, p.n_designs, "0")
        _formula(ws, r, 6, f"={ref(card + '.mask_set_cost_usd')}*{ref('cost.spins')}*E{r}", "#,##0")
        # Design effort in single-PA units: the candidate's factor, × the band count for
        # separate PAs (one PA design per band, on one die or on several) — core.costing's rule.
        per = n_bands if cand.kind.value == "separate" else 1
        _formula(ws, r, 7, f"={ref(cpath + '.design_effort_factor')}*{per}", "0.00")
        eff, rate = ref("cost.design_effort_h"), ref("cost.design_rate_usd_per_h")
        _formula(ws, r, 8, f"={eff}*{rate}*G{r}", "#,##0")
        _formula(ws, r, 9, f"={ref('cost.test_development_usd')}*E{r}", "#,##0")
        _formula(ws, r, 10, f"=F{r}+H{r}+I{r}", "#,##0")
        _formula(ws, r, 11, f"={volume}", "#,##0")
        _formula(ws, r, 12, f"=D{r}+J{r}/K{r}", "#,##0.00")
        _put(ws, r, 13, p.unit_cost_at_design_volume_usd, "#,##0.00")
        r += 1
    ws.freeze_panes = "B3"
    _widths(ws, {1: 28, 2: 14, 3: 12, 4: 22, **{c: 14 for c in range(5, 20)}})
    ws.row_dimensions[2].height = 45
    ws.row_dimensions[head].height = 45
    _print_setup(ws, "1:2")


# -------------------------------------------------------------------------------- public
def build_workbook(
    study: Study,
    evaluation: Any,
    *,
    study_path: str | os.PathLike[str] | None = None,
    cost: Any = None,
    ledgers: Mapping[str, LinkBudget] | None = None,
    scores: pd.DataFrame | None = None,
) -> Workbook:
    """Build the comparison workbook in memory (see :func:`write_workbook`)."""
    wb = Workbook()
    wb.remove(wb.active)
    ws = {name: wb.create_sheet(name) for name in SHEETS}
    if ledgers is None:
        wb.remove(ws.pop("Link Ledger"))
    if cost is None:
        wb.remove(ws.pop("Area & Cost"))
    _summary_sheet(ws["Summary"], study, evaluation, cost, scores)
    _bands_sheet(ws["Bands & Targets"], study)
    if ledgers is not None:
        _ledger_sheet(ws["Link Ledger"], ledgers)
    _design_sheet(ws["Design"], evaluation.design)
    _curves_sheet(ws["Curves"], study, evaluation.curves)
    refs = _assumptions_sheet(ws["Assumptions"], study)
    if cost is not None:
        _cost_sheet(ws["Area & Cost"], study, cost, refs)
    _cautions_sheet(ws["Cautions"], study, evaluation)
    _about_sheet(ws["About"], study, evaluation, None if study_path is None else Path(study_path))
    wb.properties.title = xml_safe(study.name)
    wb.properties.creator = f"Bandwright {core.__version__}"
    return wb


def write_workbook(
    study: Study,
    evaluation: Any,
    path: str | os.PathLike[str],
    *,
    study_path: str | os.PathLike[str] | None = None,
    cost: Any = None,
    ledgers: Mapping[str, LinkBudget] | None = None,
    scores: pd.DataFrame | None = None,
) -> None:
    """Write the comparison workbook (.xlsx) of an evaluated study, atomically.

    Parameters
    ----------
    study : Study
    evaluation : core.estimate.Evaluation
        Its ``scorecard``, ``curves``, ``design``, ``summary`` and ``findings``.
    path : path-like
        Destination .xlsx; its folder must exist.
    study_path : path-like, optional
        The study file; its name and the SHA-256 of its bytes go on the "About" sheet.
    cost : core.costing.CostResult, optional
        Adds the "Area & Cost" sheet (live formulas) and the cost columns of "Summary".
    ledgers : mapping of band name → core.link.LinkBudget, optional
        From :func:`core.link_plan.study_ledgers`; adds the "Link Ledger" sheet.
    scores : pandas.DataFrame, optional
        From :func:`core.costing.weighted_scores`; adds "Score" and "Pareto set" to "Summary".

    Raises
    ------
    OSError
        If the file (or ``study_path``) cannot be read or written; an existing file at ``path``
        is then left byte-for-byte intact and no temporary file remains.
    """
    wb = build_workbook(
        study, evaluation, study_path=study_path, cost=cost, ledgers=ledgers, scores=scores
    )
    atomic_write(path, wb.save)

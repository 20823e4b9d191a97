"""Tidy CSV files and a tab-separated clipboard text of an evaluation.

Both CSV files are "tidy" (one observation per row, one header row). The curves carry their
units in the column names (``f_hz``, ``gain_db``, ``p1db_dbm``, ``pae_pct``); the scorecard mixes
metrics of different units in one long table, so its ``unit`` column states the unit of the
``estimate``, ``target`` and ``margin`` of that row. Numbers are written with Python's shortest
round-trip representation, so reading the file back gives the same floats.

Every text cell passes through :func:`core.export.safe_text.inert_text` (OWASP "CSV Injection").
"""

from __future__ import annotations

import io
import os
from typing import Any

import pandas as pd

from core.evaluation import CURVE_COLUMNS, SCORECARD_COLUMNS
from core.export.safe_text import inert_text
from core.fileio import atomic_write_bytes

__all__ = [
    "scorecard_tsv",
    "write_curves_csv",
    "write_scorecard_csv",
]

# The CSV files keep the Evaluation's own column order (core.evaluation).


def _frame(evaluation: Any, attr: str, columns: tuple[str, ...]) -> pd.DataFrame:
    """The evaluation's table ``attr`` restricted to ``columns``, text made inert."""
    df = getattr(evaluation, attr, None)
    if not isinstance(df, pd.DataFrame):
        raise ValueError(f"evaluation.{attr}: must be a pandas DataFrame")
    missing = [c for c in columns if c not in df.columns]
    if missing:
        raise ValueError(f"evaluation.{attr}: missing column(s) {', '.join(missing)}")
    out = df.loc[:, list(columns)].copy()
    for c in out.columns:
        if out[c].dtype == object or isinstance(out[c].dtype, pd.StringDtype | pd.CategoricalDtype):
            # Enum members (status) are written by value; only str values are guarded.
            out[c] = [_text(v) for v in out[c]]
    return out


def _text(v: Any) -> Any:
    if isinstance(v, str):
        # str(StrEnum) is its value; a plain str is returned as is.
        return inert_text(str(v))
    return v


def _csv_bytes(df: pd.DataFrame, sep: str) -> str:
    buf = io.StringIO()
    df.to_csv(buf, index=False, sep=sep, lineterminator="\r\n" if sep == "," else "\n")
    return buf.getvalue()


def write_scorecard_csv(evaluation: Any, path: str | os.PathLike[str]) -> None:
    """Write the scorecard as a tidy CSV file, atomically.

    Parameters
    ----------
    evaluation : core.estimate.Evaluation
        Its ``scorecard`` DataFrame has the columns of :data:`SCORECARD_COLUMNS`.
    path : path-like
        Destination; its folder must exist. Written UTF-8 with a byte-order mark (so that
        spreadsheet programs read non-ASCII names correctly), CRLF line ends (RFC 4180).

    Raises
    ------
    ValueError
        If the scorecard is missing or lacks a column.
    OSError
        If the file cannot be written; an existing file is then left intact.

    Examples
    --------
    >>> import pandas as pd, types, tempfile, pathlib
    >>> sc = pd.DataFrame([["A", "n257", "gain", "dB", 21.0, 20.0, 1.0, "meets"]],
    ...                   columns=list(SCORECARD_COLUMNS))
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "s.csv"
    >>> write_scorecard_csv(types.SimpleNamespace(scorecard=sc), p)
    >>> p.read_text("utf-8-sig").splitlines()[1]
    'A,n257,gain,dB,21.0,20.0,1.0,meets'
    """
    df = _frame(evaluation, "scorecard", SCORECARD_COLUMNS)
    atomic_write_bytes(path, _csv_bytes(df, ",").encode("utf-8-sig"))


def write_curves_csv(evaluation: Any, path: str | os.PathLike[str]) -> None:
    """Write the frequency curves as a tidy CSV file, atomically (one row per frequency point).

    Parameters
    ----------
    evaluation : core.estimate.Evaluation
        Its ``curves`` DataFrame has the columns of :data:`CURVE_COLUMNS`.
    path : path-like
        Destination, as for :func:`write_scorecard_csv`.

    Raises
    ------
    ValueError
        If the curves are missing or lack a column.
    OSError
        If the file cannot be written; an existing file is then left intact.
    """
    df = _frame(evaluation, "curves", CURVE_COLUMNS)
    atomic_write_bytes(path, _csv_bytes(df, ",").encode("utf-8-sig"))


def scorecard_tsv(evaluation: Any) -> str:
    """The scorecard as tab-separated text with a header row, for the clipboard.

    Tabs and line breaks inside text are replaced by spaces (they would split cells or rows
    when pasted) before the formula guard is applied.

    Parameters
    ----------
    evaluation : core.estimate.Evaluation

    Returns
    -------
    str
        ``"\\n"``-separated rows, ``"\\t"``-separated cells.

    Raises
    ------
    ValueError
        If the scorecard is missing or lacks a column.

    Examples
    --------
    >>> import pandas as pd, types
    >>> sc = pd.DataFrame([["=A", "n257", "gain", "dB", 21.0, 20.0, 1.0, "meets"]],
    ...                   columns=list(SCORECARD_COLUMNS))
    >>> scorecard_tsv(types.SimpleNamespace(scorecard=sc)).splitlines()[1].split("\\t")[0]
    "'=A"
    """
    df = getattr(evaluation, "scorecard", None)
    if isinstance(df, pd.DataFrame):
        df = df.copy()
        for c in df.columns:
            if df[c].dtype == object:
                df[c] = [
                    # Leading blanks are dropped so the guard sees the first real character.
                    " ".join(v.replace("\r", " ").replace("\t", " ").splitlines()).lstrip()
                    if isinstance(v, str)
                    else v
                    for v in df[c]
                ]
        evaluation = _Holder(df)
    return _csv_bytes(_frame(evaluation, "scorecard", SCORECARD_COLUMNS), "\t")


class _Holder:
    __slots__ = ("scorecard",)

    def __init__(self, scorecard: pd.DataFrame) -> None:
        self.scorecard = scorecard

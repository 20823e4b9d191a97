"""Colours, symbols and number formats shared by the views.

The candidate palette is Okabe & Ito's colour-blind-safe set ("Color Universal Design", 2008);
status colours are chosen from it too and always come with a symbol and a word.
"""

from __future__ import annotations

import pyqtgraph as pg
from PySide6.QtGui import QColor

__all__ = ["STATUS_STYLE", "candidate_color", "status_color", "style_plot"]

# Okabe–Ito order, black last (reserved for targets and masks).
_OKABE_ITO = ("#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00", "#F0E442")

#: status → (symbol, word, background colour). Blue-green / yellow-orange / vermillion, light.
STATUS_STYLE: dict[str, tuple[str, str, str]] = {
    "meets": ("✓", "meets", "#cfe8df"),
    "marginal": ("~", "marginal", "#f6e3b4"),
    "misses": ("✗", "misses", "#f3cdb8"),
    "infeasible": ("!", "not reachable", "#e0e0e0"),
}


def candidate_color(index: int) -> QColor:
    """Colour of the ``index``-th candidate (cycles through the palette), a new QColor."""
    return QColor(_OKABE_ITO[index % len(_OKABE_ITO)])


def status_color(status: str) -> QColor:
    """Fill colour of a status, a new QColor."""
    return QColor(STATUS_STYLE.get(status, ("", "", "#ffffff"))[2])


def style_plot(
    plot: pg.PlotItem, left: str, *, bottom: str = "", grid: bool = True, left_width: int = 70
) -> pg.PlotItem:
    """The house look of a plot: no context menu, dark-grey axes, labelled axes, light grid."""
    plot.setMenuEnabled(False)
    plot.hideButtons()
    if grid:
        plot.showGrid(x=True, y=True, alpha=0.2)
    plot.setLabel("left", left)
    if bottom:
        plot.setLabel("bottom", bottom)
    for name in ("left", "bottom"):
        axis = plot.getAxis(name)
        axis.setPen(pg.mkPen("#404040"))
        axis.setTextPen(pg.mkPen("#202020"))
    plot.getAxis("left").setWidth(left_width)
    return plot

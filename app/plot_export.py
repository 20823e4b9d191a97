"""Export a pyqtgraph plot to PNG or SVG, atomically, with a fix for newer Qt's SVG paths.

pyqtgraph 0.14's SVG exporter rewrites every ``<path d="...">`` that Qt's SVG generator writes,
reading each space-separated token as an ``x,y`` pair. Qt 6.11 and later end closed sub-paths
with a ``Z`` (close-path) token, which that loop cannot read (``ValueError: not enough values to
unpack``) — every plot with a filled region or a view-box frame then fails to export. Importing
this module wraps pyqtgraph's ``correctCoordinates`` once, only when a probe shows the installed
version fails on a close-path token: the ``Z`` tokens are taken out before the original runs and
put back, at the same places, after it.
"""

from __future__ import annotations

import functools
import importlib
import os
import xml.dom.minidom as minidom
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pyqtgraph as pg
import pyqtgraph.exporters  # makes pg.exporters.ImageExporter / SVGExporter available
from PySide6.QtCore import QBuffer, QByteArray, QIODevice
from PySide6.QtWidgets import QGraphicsItem, QGraphicsScene, QGraphicsView

from core.fileio import atomic_write_bytes

__all__ = ["close_path_patch_applied", "export_plot", "plot_to_png_bytes", "plot_to_svg_bytes"]

#: Attribute set on our wrapper so that a second import (or reload) never wraps it twice.
_PATCH_MARK = "_bandwright_close_path_patch"
_CLOSE = frozenset("Zz")


def _svg_module() -> Any:
    # ``pyqtgraph.exporters.SVGExporter`` as an attribute is the class (the package re-exports
    # it), so the module itself is fetched by its full name.
    return importlib.import_module("pyqtgraph.exporters.SVGExporter")


def _split_close_tokens(d: str) -> tuple[str, list[int]]:
    """Path data without close-path tokens, and the index of the token each one followed."""
    kept: list[str] = []
    after: list[int] = []
    for tok in d.split():
        if tok in _CLOSE:
            after.append(len(kept) - 1)
            continue
        if tok[-1] in _CLOSE and "," in tok:  # "x,yZ" written without a space
            kept.append(tok[:-1])
            after.append(len(kept) - 1)
            continue
        kept.append(tok)
    return " ".join(kept), after


def _restore_close_tokens(d: str, after: list[int]) -> str:
    tokens = d.split()
    out: list[str] = []
    pending = sorted(after)
    for i, tok in enumerate(tokens):
        out.append(tok)
        while pending and pending[0] == i:
            out.append("Z")
            pending.pop(0)
    # A close token with no coordinate before it (cannot come from Qt) goes at the end.
    out.extend("Z" for _ in pending)
    return " ".join(out) + " "


def _wrap(original: Callable[..., Any]) -> Callable[..., Any]:
    @functools.wraps(original)
    def correct_coordinates(node: Any, defs: Any, item: Any, options: Any) -> Any:
        closes: dict[Any, list[int]] = {}
        for path in node.getElementsByTagName("path"):
            d = path.getAttribute("d")
            if "Z" in d or "z" in d:
                stripped, after = _split_close_tokens(d)
                if after:
                    path.setAttribute("d", stripped)
                    closes[path] = after
        result = original(node, defs, item, options)
        for path, after in closes.items():
            path.setAttribute("d", _restore_close_tokens(path.getAttribute("d"), after))
        return result

    setattr(correct_coordinates, _PATCH_MARK, True)
    return correct_coordinates


def _fails_on_close_path(correct: Callable[..., Any]) -> bool:
    """Whether ``correct`` (pyqtgraph's function) raises on a path with a ``Z`` token."""
    doc = minidom.parseString(
        '<g><g transform="matrix(1,0,0,1,0,0)"><path d="M0,0 L1,0 L1,1 Z "/></g></g>'
    )
    try:
        correct(doc.documentElement, [], None, {})
    except ValueError:
        return True
    return False


def _install_close_path_patch() -> None:
    module = _svg_module()
    current = module.correctCoordinates
    if getattr(current, _PATCH_MARK, False) or not _fails_on_close_path(current):
        return
    module.correctCoordinates = _wrap(current)


def close_path_patch_applied() -> bool:
    """True when pyqtgraph's SVG coordinate fix-up is our close-path-tolerant wrapper."""
    return bool(getattr(_svg_module().correctCoordinates, _PATCH_MARK, False))


_install_close_path_patch()


def _export_item(target: Any) -> QGraphicsItem | QGraphicsScene:
    """The graphics item (or scene) a pyqtgraph exporter should render for ``target``."""
    if isinstance(target, QGraphicsItem | QGraphicsScene):
        return target
    if isinstance(target, QGraphicsView):
        # PlotWidget and GraphicsLayoutWidget: their central item frames exactly the plot.
        central = getattr(target, "centralWidget", None)
        if isinstance(central, QGraphicsItem):
            return central
        scene = target.scene()
        if scene is not None:
            return scene
    raise TypeError(
        "plot: expected a pyqtgraph PlotWidget, GraphicsView, PlotItem or graphics scene "
        f"(got {type(target).__name__})"
    )


def _check_width(width_px: int | None) -> None:
    if width_px is not None and (isinstance(width_px, bool) or width_px < 1):
        raise ValueError(f"width_px: must be a positive whole number of pixels (got {width_px!r})")


def plot_to_png_bytes(target: Any, *, width_px: int | None = None) -> bytes:
    """Render ``target`` to PNG bytes with pyqtgraph's ImageExporter.

    Parameters
    ----------
    target : PlotWidget, GraphicsView, PlotItem, QGraphicsItem or QGraphicsScene
        What to render.
    width_px : int, optional
        Image width in pixels; the height keeps the plot's aspect ratio. Default: the plot's
        size on screen.

    Returns
    -------
    bytes
        PNG file content.

    Raises
    ------
    ValueError
        If ``width_px`` is not positive or the plot has no size yet.
    TypeError
        If ``target`` is not something pyqtgraph can export.
    """
    _check_width(width_px)
    exporter = pg.exporters.ImageExporter(_export_item(target))
    if width_px is not None:
        exporter.parameters()["width"] = int(width_px)
    if exporter.parameters()["width"] < 1 or exporter.parameters()["height"] < 1:
        raise ValueError("plot: has no size yet (show or resize the widget before exporting)")
    image = exporter.export(toBytes=True)
    data = QByteArray()
    buf = QBuffer(data)
    buf.open(QIODevice.OpenModeFlag.WriteOnly)
    if not image.save(buf, "PNG"):
        raise OSError("plot: Qt could not encode the image as PNG")
    buf.close()
    return bytes(data.data())


def plot_to_svg_bytes(target: Any, *, width_px: int | None = None) -> bytes:
    """Render ``target`` to SVG bytes with pyqtgraph's SVGExporter.

    Parameters
    ----------
    target : PlotWidget, GraphicsView, PlotItem, QGraphicsItem or QGraphicsScene
        What to render.
    width_px : int, optional
        Width of the SVG view box in pixels (height keeps the aspect ratio).

    Returns
    -------
    bytes
        UTF-8 SVG document.
    """
    _check_width(width_px)
    exporter = pg.exporters.SVGExporter(_export_item(target))
    if width_px is not None:
        exporter.parameters()["width"] = float(width_px)
    return exporter.export(toBytes=True)


def export_plot(target: Any, path: str | os.PathLike[str], *, width_px: int | None = None) -> Path:
    """Write ``target`` to ``path`` as PNG or SVG (chosen by the suffix), atomically.

    The file is written to a temporary file in the same folder and moved into place, so an
    existing file at ``path`` is either replaced whole or left as it was.

    Parameters
    ----------
    target : PlotWidget, GraphicsView, PlotItem, QGraphicsItem or QGraphicsScene
        What to export.
    path : path-like
        Destination ending in ``.png`` or ``.svg`` (any case); its folder must exist.
    width_px : int, optional
        Output width in pixels (PNG) or view-box width (SVG).

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    ValueError
        If the suffix is neither ``.png`` nor ``.svg``, or ``width_px`` is not positive.
    OSError
        If the file cannot be written (the previous file is then intact).
    """
    out = Path(path)
    suffix = out.suffix.lower()
    if suffix == ".png":
        data = plot_to_png_bytes(target, width_px=width_px)
    elif suffix == ".svg":
        data = plot_to_svg_bytes(target, width_px=width_px)
    else:
        raise ValueError(f"path: suffix must be .png or .svg (got {out.suffix or 'none'!r})")
    atomic_write_bytes(out, data)
    return out

"""Where the shipped demo studies live, in a wheel install and in a source checkout."""

from __future__ import annotations

from pathlib import Path

__all__ = ["DEFAULT_DEMO", "demo_path", "demo_studies", "samples_dir"]

#: The demo study the GUI opens when no file is given.
DEFAULT_DEMO = "harbour-small-cell"


def samples_dir() -> Path:
    """Folder of the shipped demo studies.

    A wheel carries them as ``core/samples`` (see ``[tool.hatch...force-include]`` in
    pyproject.toml); a source checkout or editable install has them at ``<repo>/samples``.
    """
    here = Path(__file__).resolve().parent
    for candidate in (here / "samples", here.parent / "samples"):
        if candidate.is_dir():
            return candidate
    raise FileNotFoundError("the demo studies are missing from this installation")


def demo_studies() -> dict[str, Path]:
    """Name → path of every shipped demo study (``samples/<name>.json``)."""
    return {p.stem: p for p in sorted(samples_dir().glob("*.json"))}


def demo_path(name: str = DEFAULT_DEMO) -> Path:
    """Path of the demo study ``name``."""
    studies = demo_studies()
    if name not in studies:
        raise KeyError(f"no demo study {name!r} (have: {', '.join(studies)})")
    return studies[name]

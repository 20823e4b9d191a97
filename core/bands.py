"""Frequency bands: centre, fractional bandwidth, 3GPP NR FR2 presets and overlap checks.

All frequencies are in hertz inside core; GHz appears only at the edges (files, UI).
"""

from __future__ import annotations

from dataclasses import dataclass
from types import MappingProxyType

__all__ = ["FR2_PRESETS", "Band", "overlapping_pairs", "preset_band"]


@dataclass(frozen=True, slots=True)
class Band:
    """A frequency band ``[f_low_hz, f_high_hz]``.

    Parameters
    ----------
    name : str
        Display name, e.g. ``"n257"``.
    f_low_hz, f_high_hz : float
        Band edges in Hz, ``f_high_hz > f_low_hz > 0``.

    Notes
    -----
    The centre is the arithmetic mean, as in transmission-line transformer theory where the
    electrical length of a section is proportional to frequency (Pozar, *Microwave
    Engineering*, §5.5-5.8). The fractional bandwidth is ``(f_high - f_low) / f0``.

    Examples
    --------
    >>> b = Band("n257", 26.5e9, 29.5e9)
    >>> round(b.f0_hz / 1e9, 3), round(b.fractional_bw, 4)
    (28.0, 0.1071)
    """

    name: str
    f_low_hz: float
    f_high_hz: float

    @property
    def f0_hz(self) -> float:
        """Arithmetic centre frequency in Hz."""
        return 0.5 * (self.f_low_hz + self.f_high_hz)

    @property
    def fractional_bw(self) -> float:
        """Fractional bandwidth ``(f_high - f_low) / f0`` (dimensionless)."""
        return (self.f_high_hz - self.f_low_hz) / self.f0_hz

    def overlaps(self, other: Band) -> bool:
        """True when the two bands share more than an edge."""
        return self.f_low_hz < other.f_high_hz and other.f_low_hz < self.f_high_hz

    @classmethod
    def union(cls, bands: list[Band] | tuple[Band, ...], name: str = "union") -> Band:
        """The smallest band that covers every band given (the wideband design band)."""
        if not bands:
            raise ValueError("bands: at least one band is needed")
        return cls(name, min(b.f_low_hz for b in bands), max(b.f_high_hz for b in bands))


# 3GPP TS 38.101-2 (UE) Table 5.2-1 and TS 38.104 (BS) Table 5.2-2, NR operating bands in FR2.
# All are TDD; uplink and downlink edges coincide. Edges in GHz.
_FR2_EDGES_GHZ: tuple[tuple[str, float, float], ...] = (
    ("n257", 26.50, 29.50),
    ("n258", 24.25, 27.50),
    ("n259", 39.50, 43.50),
    ("n260", 37.00, 40.00),
    ("n261", 27.50, 28.35),
    ("n262", 47.20, 48.20),
)

#: Read-only map of FR2 operating band name -> :class:`Band` (3GPP TS 38.101-2 Table 5.2-1).
FR2_PRESETS: MappingProxyType[str, Band] = MappingProxyType(
    {name: Band(name, lo * 1e9, hi * 1e9) for name, lo, hi in _FR2_EDGES_GHZ}
)


def preset_band(name: str) -> Band:
    """Return the FR2 preset called ``name``.

    Raises
    ------
    KeyError
        If ``name`` is not an FR2 operating band known here.
    """
    try:
        return FR2_PRESETS[name]
    except KeyError:
        known = ", ".join(FR2_PRESETS)
        raise KeyError(f"{name!r} is not a known FR2 band (known: {known})") from None


def overlapping_pairs(bands: list[Band] | tuple[Band, ...]) -> list[tuple[int, int]]:
    """Index pairs ``(i, j)``, ``i < j``, of bands that overlap.

    Overlap is legitimate (n257 contains n261) and is reported as a warning, never an error.

    >>> overlapping_pairs([FR2_PRESETS["n257"], FR2_PRESETS["n261"], FR2_PRESETS["n260"]])
    [(0, 1)]
    """
    return [
        (i, j)
        for i in range(len(bands))
        for j in range(i + 1, len(bands))
        if bands[i].overlaps(bands[j])
    ]

"""Bandwright core: the engineering model, pure Python and numpy (never Qt)."""

__version__ = "0.1.0"

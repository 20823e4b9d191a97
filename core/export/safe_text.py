"""Formula-injection guard for text written to spreadsheets, CSV and the clipboard.

A spreadsheet program treats a cell whose text begins with ``=``, ``+``, ``-`` or ``@`` as a
formula, and a leading tab or carriage return can smuggle one past a naive check. Study, band,
candidate and card names and notes are user text, so every such string is made inert before it
is written. This follows the OWASP "CSV Injection" guidance
(https://owasp.org/www-community/attacks/CSV_Injection): prefix the field with a single quote so
that it is read as text. Numbers are never altered: only ``str`` values pass through here.
"""

from __future__ import annotations

import re

__all__ = ["FORMULA_TRIGGERS", "inert_text", "is_hostile", "xml_safe"]

#: Leading characters that make a spreadsheet read a cell as a formula (OWASP list).
FORMULA_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")

# Characters XML 1.0 forbids (C0 controls other than tab, newline, carriage return). A study
# note pasted from elsewhere can carry one, and an .xlsx file containing it will not open.
_XML_ILLEGAL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f]")


def is_hostile(text: str) -> bool:
    """True when ``text`` would be read as a formula by a spreadsheet program.

    Examples
    --------
    >>> is_hostile("=1+1"), is_hostile("n257")
    (True, False)
    """
    return text.startswith(FORMULA_TRIGGERS)


def inert_text(text: str) -> str:
    """``text`` made inert for a spreadsheet: a single quote prefixed when it is hostile.

    Parameters
    ----------
    text : str
        User text (a name or a note).

    Returns
    -------
    str
        ``"'" + text`` when ``text`` starts with one of :data:`FORMULA_TRIGGERS`, else ``text``.

    Raises
    ------
    TypeError
        If ``text`` is not a string (numbers must not pass through the guard).

    References
    ----------
    OWASP, "CSV Injection", https://owasp.org/www-community/attacks/CSV_Injection

    Examples
    --------
    >>> inert_text("=cmd|' /C calc'!A0")
    "'=cmd|' /C calc'!A0"
    >>> inert_text("Switched PA")
    'Switched PA'
    """
    if not isinstance(text, str):
        raise TypeError(f"text: must be a str (got {type(text).__name__})")
    return "'" + text if is_hostile(text) else text


def xml_safe(text: str) -> str:
    """``text`` without the control characters an .xlsx (XML 1.0) part cannot hold.

    Examples
    --------
    >>> xml_safe("a\\x07b")
    'ab'
    """
    return _XML_ILLEGAL.sub("", text)

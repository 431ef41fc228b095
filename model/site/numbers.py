"""The one reading of a number typed by a person or found in a file.

A value is recorded exactly as typed or refused with the reason, never
guessed: digits with at most one decimal mark.  Either "." or "," is taken as
the decimal mark (both are usual on site), but "1,000" is refused because it
may mean one thousand.  Exponents ("1e3"), "inf", "nan" and thousands
separators are refused.

The same function reads a value typed in the app (the reading screen and every
form) and a cell of an imported CSV, so both accept and refuse the same texts:

- accepted: the digits 0-9 with one optional decimal mark ("12", "12.5",
  "12,5", ".5"), a leading "+" or "-" (a negative value is then refused by
  the field's own limit, with that reason), spaces before and after;
- refused, with the reason: exponents ("1e3"), "_" or "," as thousands
  separators ("1_000", "1,000"), spaces inside, digits of other scripts
  (full-width "１２", Arabic-Indic "١٢"), "inf", "nan", anything else.
"""

from __future__ import annotations

import re
from decimal import Decimal

from model.site.safe_text import echoed

_NUMBER = re.compile(r"[+-]?(?:[0-9]+(?:[.,][0-9]*)?|[.,][0-9]+)")
_AMBIGUOUS = re.compile(r"[+-]?[0-9]{1,3},[0-9]{3}")

#: What a number may look like, for messages.
NUMBER_RULE = "digits with at most one decimal point, e.g. 0.5"


def parse_number(text: str) -> float | None:
    """The number in ``text``; None when it is empty.

    Raises ValueError, in plain words, for anything that is not a plain
    decimal number.
    """
    t = text.strip()
    if not t:
        return None
    shown = f"'{echoed(t)}'"
    if _AMBIGUOUS.fullmatch(t):
        raise ValueError(f"{shown} is ambiguous: write it without the comma, or with a point")
    if not _NUMBER.fullmatch(t):
        if any(c.isdigit() and not "0" <= c <= "9" for c in t):
            raise ValueError(f"{shown} is not a number: write it with the digits 0-9")
        raise ValueError(f"{shown} is not a number ({NUMBER_RULE})")
    return float(t.replace(",", "."))


def number_text(value: float) -> str:
    """A stored number as text to edit: every digit it has, never rounded, never an exponent.

    :func:`parse_number` reads the text back as exactly ``value``, so opening a
    form and saving it unchanged never changes a value (``1.2345678`` is not
    shown as ``1.23457``, nor ``0.00001`` as ``1e-05``, which would be refused).
    """
    text = format(Decimal(repr(float(value))), "f")
    return text.rstrip("0").rstrip(".") if "." in text else text

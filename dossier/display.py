"""How numbers are written for people: one convention for every page, PDF and message.

A negative number is written with the minus sign U+2212 (−), never the
hyphen-minus (-); a power of ten as "× 10⁻⁵", never "e-05"; a value that
rounds to zero at the digits shown carries no sign ("0.000", not "−0.000").
Machine-readable files (results.json, the CSV tables, ledger.json) keep
plain numbers and never pass through this module.

The template filters ``num``, ``signed``, ``sig`` and ``g``
(:func:`dossier.render.html.environment`) and the drafted prose of the
analyses (verdict reasons, justification paragraphs) all call these
functions, so a page cannot show "-0.025" beside "−0.0250".
"""

from __future__ import annotations

import re

__all__ = ["MINUS", "fixed", "signed", "significant", "plain"]

MINUS = "\u2212"
"""The minus sign (U+2212) of displayed numbers."""

_SUPERSCRIPT = str.maketrans("0123456789-+", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺")
_EXPONENT = re.compile(r"e([-+]?)0*(\d+)")


def _minus(text: str) -> str:
    return text.replace("-", MINUS)


def _unsigned_zero(text: str) -> str:
    """'-0.000' or '+0.000' → '0.000' (a value that rounds to zero has no sign)."""
    if text[:1] in "+-" and not any(ch in "123456789" for ch in text):
        return text[1:]
    return text


def _power_of_ten(text: str) -> str:
    """'1.2e-05' → '1.2 × 10⁻⁵'; text without an exponent unchanged."""
    m = _EXPONENT.search(text)
    if not m:
        return text
    sign = "-" if m.group(1) == "-" else ""
    mantissa = text[: m.start()]
    power = f"10{(sign + m.group(2)).translate(_SUPERSCRIPT)}"
    return power if mantissa == "1" else f"{mantissa} × {power}"


def fixed(value: float, digits: int = 3) -> str:
    """A number with ``digits`` decimals.

    Examples
    --------
    >>> fixed(-0.025)
    '−0.025'
    >>> fixed(-0.0001)
    '0.000'
    """
    return _minus(_unsigned_zero(f"{value:.{digits}f}"))


def signed(value: float, digits: int = 3) -> str:
    """A number with its sign always written (an error, a shift).

    Examples
    --------
    >>> signed(0.0123, 4), signed(-0.025)
    ('+0.0123', '−0.025')
    >>> signed(-0.00002)
    '0.000'
    """
    return _minus(_unsigned_zero(f"{value:+.{digits}f}"))


def significant(value: float, digits: int = 3) -> str:
    """A number to ``digits`` significant digits; small and large ones as powers of ten.

    Examples
    --------
    >>> significant(-0.00123, 2)
    '−0.0012'
    >>> significant(1.25e-7, 3)
    '1.25 × 10⁻⁷'
    >>> significant(1e-10, 3)
    '10⁻¹⁰'
    """
    return _minus(_power_of_ten(_unsigned_zero(f"{value:.{digits}g}")))


def plain(value: float | int) -> str:
    """A stated value as short as it was written (up to 6 significant digits): 25, 6.86, −7.9."""
    return significant(value, 6)

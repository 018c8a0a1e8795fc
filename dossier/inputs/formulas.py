"""Molar masses from chemical formulas.

Formulas are written the usual way: element symbols with counts,
parentheses, and adducts after a middle dot or period with an optional
leading count, e.g. ``C4H11NO3``, ``Ca(OH)2``, ``Na2B4O7·10H2O``.

Atomic weights: IUPAC abridged standard atomic weights (conventional values
for H, B, C, N, O, S, Cl), CIAAW 2021 — recalled from memory, to the digits
printed in the abridged table.
"""

from __future__ import annotations

import re

__all__ = ["ATOMIC_WEIGHTS", "FormulaError", "molar_mass", "subscripted", "water_of_crystallisation"]

ATOMIC_WEIGHTS: dict[str, float] = {
    "H": 1.008,
    "B": 10.81,
    "C": 12.011,
    "N": 14.007,
    "O": 15.999,
    "F": 18.998,
    "Na": 22.990,
    "Mg": 24.305,
    "P": 30.974,
    "S": 32.06,
    "Cl": 35.45,
    "K": 39.098,
    "Ca": 40.078,
}
"""Abridged standard atomic weights [g/mol] of the elements the table uses."""

_SUBSCRIPT = str.maketrans("0123456789", "₀₁₂₃₄₅₆₇₈₉")
_COUNT_AFTER_ATOM = re.compile(r"(?<=[A-Za-z)])\d+")

_TOKEN = re.compile(r"([A-Z][a-z]?)(\d*)|(\()|(\))(\d*)")


class FormulaError(ValueError):
    """A formula that cannot be read (unknown element, unbalanced parentheses)."""


def _parse(part: str) -> float:
    stack: list[float] = [0.0]
    pos = 0
    while pos < len(part):
        m = _TOKEN.match(part, pos)
        if not m:
            raise FormulaError(f"cannot read {part[pos:]!r} in formula {part!r}")
        symbol, count, opening, closing, group_count = m.groups()
        if symbol:
            if symbol not in ATOMIC_WEIGHTS:
                raise FormulaError(f"unknown element {symbol!r} in formula {part!r}")
            stack[-1] += ATOMIC_WEIGHTS[symbol] * (int(count) if count else 1)
        elif opening:
            stack.append(0.0)
        else:
            if len(stack) == 1:
                raise FormulaError(f"unbalanced ')' in formula {part!r}")
            group = stack.pop()
            stack[-1] += group * (int(group_count) if group_count else 1)
        pos = m.end()
    if len(stack) != 1:
        raise FormulaError(f"unbalanced '(' in formula {part!r}")
    return stack[0]


def molar_mass(formula: str) -> float:
    """Molar mass of a formula [g/mol].

    Parameters
    ----------
    formula : str
        E.g. ``"KH2PO4"``, ``"Na2B4O7·10H2O"``.

    Returns
    -------
    float
        Molar mass [g/mol], rounded to 3 decimals.

    Examples
    --------
    Potassium hydrogen phthalate, 204.22 g/mol:

    >>> molar_mass("C8H5KO4")
    204.222
    >>> molar_mass("Na2B4O7·10H2O")
    381.37
    """
    total = 0.0
    for part in re.split(r"[·.]", formula.replace(" ", "")):
        m = re.match(r"(\d+)(.*)", part)
        count, body = (int(m.group(1)), m.group(2)) if m else (1, part)
        if not body:
            raise FormulaError(f"empty part in formula {formula!r}")
        total += count * _parse(body)
    return round(total, 3)


def water_of_crystallisation(formula: str) -> int:
    """Molecules of water of crystallisation a formula carries: the ``nH2O`` adducts.

    Parameters
    ----------
    formula : str
        E.g. ``"Na2HPO4·12H2O"``.

    Returns
    -------
    int
        The count of the water adducts after a middle dot or period (0 for an
        anhydrous formula; ``·H2O`` counts 1).

    Examples
    --------
    >>> water_of_crystallisation("Na2HPO4·12H2O")
    12
    >>> water_of_crystallisation("C6H8O7·H2O")
    1
    >>> water_of_crystallisation("KH2PO4")
    0
    """
    total = 0
    for part in re.split(r"[·.]", formula.replace(" ", ""))[1:]:
        m = re.fullmatch(r"(\d*)H2O", part)
        if m:
            total += int(m.group(1)) if m.group(1) else 1
    return total


def subscripted(formula: str) -> str:
    """A formula for reading: atom counts as subscript digits (U+2080 … U+2089).

    The leading count of an adduct (the 10 of ``·10H2O``) stays on the line.

    Parameters
    ----------
    formula : str
        As the substance table writes it, e.g. ``"KH2PO4"``.

    Returns
    -------
    str

    Examples
    --------
    >>> subscripted("KH2PO4")
    'KH₂PO₄'
    >>> subscripted("Na2B4O7·10H2O")
    'Na₂B₄O₇·10H₂O'
    >>> subscripted("Ca(OH)2")
    'Ca(OH)₂'
    """
    return _COUNT_AFTER_ATOM.sub(lambda m: m.group(0).translate(_SUBSCRIPT), formula)

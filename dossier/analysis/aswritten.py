"""The constants a shortcut's equation was evaluated with, beside the model's.

A procedure may state the constants its own calculation uses (``as_written:``
in the method file; :class:`~dossier.chemistry.StatedConstants`): a mixed pKa″
at the working ionic strength, the 25 °C value used at 37 °C, pKw = 14. The
shortcut is then judged as the procedure computes it, against the exact pH of
the thermodynamic model. :class:`ConstantsUsed` records both sets at the
nominal conditions, so that a reader (and results.json) sees which values went
into the shortcut's equation.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..chemistry import Approximation, Solution, working_constants

__all__ = ["ConstantsUsed", "constants_used"]


@dataclass(frozen=True)
class ConstantsUsed:
    """The constants of one shortcut at nominal conditions.

    Attributes
    ----------
    formula : bool
        False for an exact-solution variant, whose "equation" is the whole
        model (then ``pka`` is empty and ``pkw`` None).
    pka : tuple of (float or None)
        The value put into the equation for each step of the first
        component; None for a step the equation does not use.
    pkw : float or None
        pKw put into the equation; None when the equation has no pKw.
    model_pka : tuple of float
        The model's value of each step at the working conditions
        (thermodynamic, at the working temperature).
    model_pkw : float
        The model's pKw at the working temperature (or the method's override).
    stated_pka : tuple of bool
        For each step: True when the value is the procedure's own.
    stated_pkw : bool
        True when pKw is the procedure's own.
    """

    formula: bool
    pka: tuple[float | None, ...]
    pkw: float | None
    model_pka: tuple[float, ...]
    model_pkw: float
    stated_pka: tuple[bool, ...]
    stated_pkw: bool

    @property
    def any_stated(self) -> bool:
        """True when the equation used at least one of the procedure's own constants."""
        return self.stated_pkw or any(self.stated_pka)


def constants_used(approx: Approximation, solution: Solution) -> ConstantsUsed:
    """The constants ``approx`` (possibly bound to the procedure's constants,
    :meth:`~dossier.chemistry.Approximation.as_written`) puts into its equation
    for a scalar ``solution``, and the model's.

    Examples
    --------
    >>> from dossier.chemistry import CATALOGUE, Component, Protolyte, StatedConstants
    >>> tris = Protolyte("tris", (8.072,), charge=1, dh=(47.45,))
    >>> s = Solution([Component(tris, 0.05), Component(tris, 0.05, 1)], temperature=37.0)
    >>> k = constants_used(CATALOGUE["henderson-hasselbalch"].as_written(StatedConstants(pka=(8.07,))), s)
    >>> k.pka, round(k.model_pka[0], 2), k.stated_pka
    ((8.07,), 7.75, (True,))
    """
    model = working_constants(solution)
    pka, pkw = approx.constants_used(solution)
    stated = approx.stated
    n = len(model.pka[0]) if model.pka else 0
    stated_pka = tuple(
        bool(approx.formula and stated is not None and i < len(stated.pka) and stated.pka[i] is not None and pka[i] is not None)
        for i in range(n)
    )
    stated_pkw = bool(approx.formula and stated is not None and stated.pkw is not None and pkw is not None)
    return ConstantsUsed(
        formula=approx.formula,
        pka=tuple(None if v is None else float(v) for v in pka),
        pkw=None if pkw is None else float(pkw),
        model_pka=tuple(float(v) for v in (model.pka[0] if model.pka else ())),
        model_pkw=float(model.pkw),
        stated_pka=stated_pka,
        stated_pkw=stated_pkw,
    )

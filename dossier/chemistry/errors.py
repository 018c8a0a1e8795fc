"""Exceptions raised by the chemistry engine.

The engine never clips an input silently and never returns a number it did
not converge to: it raises one of these, with a message that names the
argument (or the grid point) and the allowed range.
"""

from __future__ import annotations

__all__ = ["ChemistryError", "InputRangeError", "ConvergenceError"]


class ChemistryError(Exception):
    """Base class of every error the engine raises on purpose."""


class InputRangeError(ChemistryError, ValueError):
    """An argument is not a finite number in its allowed range, or has the wrong form.

    Attributes
    ----------
    argument : str
        Name of the offending argument, e.g. ``"Component(acetic).total"``.
    message : str
        What is wrong with it.
    """

    def __init__(self, argument: str, message: str) -> None:
        self.argument = argument
        self.message = message
        super().__init__(f"{argument}: {message}")


class ConvergenceError(ChemistryError, ArithmeticError):
    """The equilibrium solve did not converge at one or more points.

    Attributes
    ----------
    index : tuple of int
        Index of the first failing point in the broadcast grid (empty for a
        scalar solve).
    """

    def __init__(self, message: str, index: tuple[int, ...] = ()) -> None:
        self.index = index
        super().__init__(message)

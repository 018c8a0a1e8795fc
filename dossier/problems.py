"""One type for everything wrong with an input: where it is, and what is wrong.

Every stage that reads user input reports :class:`Problem` values rather
than raising, so that all problems of a file are shown at once, as

    path:line:column: field.path: message

(with ``warning:`` before the message for a warning).
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum

__all__ = ["Severity", "Problem", "UserError", "format_problems", "has_errors"]


class Severity(str, Enum):
    """How serious a problem is. Warnings become errors with ``--strict``."""

    ERROR = "error"
    WARNING = "warning"


@dataclass(frozen=True, order=True)
class Problem:
    """A located problem in an input file.

    Attributes
    ----------
    file : str
        Path as the user gave it.
    line, column : int
        1-based position of the offending value (0 when unknown).
    field : str
        Dotted field path, e.g. ``solutions[0].components[1].concentration``
        (empty for a problem with the whole file).
    message : str
        What is wrong, with the allowed values or range.
    severity : Severity
    """

    file: str
    line: int
    column: int
    field: str
    message: str
    severity: Severity = Severity.ERROR

    def __str__(self) -> str:
        where = f"{self.file}:{self.line}:{self.column}"
        field = f" {self.field}:" if self.field else ""
        level = " warning:" if self.severity is Severity.WARNING else ""
        return f"{where}:{field}{level} {self.message}"

    def as_error(self) -> Problem:
        """The same problem as an error (``--strict``)."""
        return Problem(self.file, self.line, self.column, self.field, self.message, Severity.ERROR)


def has_errors(problems: list[Problem] | tuple[Problem, ...]) -> bool:
    """Whether any problem is an error."""
    return any(p.severity is Severity.ERROR for p in problems)


def format_problems(problems: list[Problem] | tuple[Problem, ...]) -> str:
    """One line per problem, sorted by file and position."""
    return "\n".join(str(p) for p in sorted(problems, key=lambda p: (p.file, p.line, p.column, p.field, p.message)))


class UserError(Exception):
    """A request that cannot be done, explained by the message in the user's
    terms (bad input, a refused action); the command line prints it and exits
    with :attr:`exit_code`. Carries the located :attr:`problems` of the input
    files when there are any."""

    exit_code = 1

    def __init__(self, message: str = "", problems: tuple[Problem, ...] = ()) -> None:
        super().__init__(message)
        self.problems = problems

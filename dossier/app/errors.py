"""What the application layer raises when a request cannot be done: the
message says why in the user's terms, and the command line prints it
(:class:`~dossier.problems.UserError` and these subclasses)."""

from __future__ import annotations

from ..problems import UserError

__all__ = ["UserError", "UsageError", "OptionError"]


class UsageError(UserError):
    """A request that contradicts itself (exit code 2, like an unknown option)."""

    exit_code = 2


class OptionError(UserError):
    """A value of one command-line option is out of range.

    Attributes
    ----------
    option : str
        The option, e.g. ``--pka``.
    """

    def __init__(self, option: str, message: str) -> None:
        super().__init__(f"{option}: {message}")
        self.option = option

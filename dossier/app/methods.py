"""Commands about method files and the substance table: ``check``, ``new``,
``schema`` and ``substances``."""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..inputs.loader import load_paths
from ..inputs.schema import ID_PATTERN, ID_RULE, json_schema
from ..inputs.starter import starter_text
from ..inputs.substances import SubstanceTable, load_table
from ..problems import Problem, Severity
from ..publish.writer import write_one_file
from .errors import UserError

__all__ = ["CheckOutcome", "check", "check_method_id", "starter", "write_starter", "schema_document", "substance_table"]


@dataclass(frozen=True)
class CheckOutcome:
    """Every problem of the method files found, and how many files were read."""

    problems: tuple[Problem, ...]
    files: int

    @property
    def errors(self) -> int:
        return sum(p.severity is Severity.ERROR for p in self.problems)

    @property
    def warnings(self) -> int:
        return len(self.problems) - self.errors


def check(paths: list[str | Path], *, strict: bool = False) -> CheckOutcome:
    """Load and check method files (or every .yaml/.yml under folders)."""
    inputs = load_paths(list(paths), strict=strict)
    return CheckOutcome(inputs.problems, len(inputs.loads))


def check_method_id(text: str) -> str:
    """``text`` if it is a valid method id, else :class:`UserError` saying the rule."""
    if not re.match(ID_PATTERN, text):
        raise UserError(f"a method id is {ID_RULE}; got {text!r}")
    return text


def starter(method_id: str, title: str | None = None) -> str:
    """The commented starter method file for ``method_id``."""
    return starter_text(check_method_id(method_id), title or method_id)


def write_starter(method_id: str, output: str | Path | None = None, *, title: str | None = None, force: bool = False) -> Path:
    """Write the starter method file (default ``<id>.yaml``) and return its path.

    Raises
    ------
    UserError
        When the file exists (without ``force``) or cannot be written.
    """
    text = starter(method_id, title)
    out = Path(output or f"{method_id}.yaml")
    try:
        return write_one_file(out, text.encode("utf-8"), overwrite=force)
    except FileExistsError:
        raise UserError(f"{out} exists; choose another name with -o or add --force") from None
    except OSError as exc:
        raise UserError(f"cannot write {out}: {exc.strerror or exc}") from None


def schema_document() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of the method-file format."""
    return json_schema()


def substance_table() -> SubstanceTable:
    """The bundled substance table."""
    return load_table()

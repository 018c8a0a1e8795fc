"""Reasons for change: against ``--previous``, a method whose content changed
must carry a higher revision and a stated reason (``method.change_reason``)."""

from __future__ import annotations

import json
import re
from pathlib import Path

from ..analysis.ledger import Ledger
from ..inputs.model import Method
from ..inputs.serialize import method_to_dict
from ..inputs.yamlpos import Position, YamlError, load_yaml
from ..problems import Problem, Severity

__all__ = ["revision_problems", "content_changed", "revision_is_higher"]

_NOT_CONTENT = ("path", "source_sha256", "revision", "change_reason")


def content_changed(old: Method, new: Method) -> bool:
    """True when anything of the method but its file name, hash, revision and reason differs."""
    def content(m: Method) -> str:
        d = {k: v for k, v in method_to_dict(m).items() if k not in _NOT_CONTENT}
        return json.dumps(d, sort_keys=True, default=repr)

    return content(old) != content(new)


def _natural(text: str) -> tuple[tuple[int, int | str], ...]:
    return tuple((0, int(part)) if part.isdigit() else (1, part.lower()) for part in re.findall(r"\d+|\D+", text.strip()))


def revision_is_higher(old: str, new: str) -> bool:
    """``new`` sorts after ``old`` with numbers compared as numbers ('10' after '9', '2026-02' after '2026-01').

    >>> revision_is_higher("9", "10"), revision_is_higher("3", "3"), revision_is_higher("B", "A")
    (True, False, False)
    """
    return _natural(new) > _natural(old)


def _where(method: Method, field: tuple[str, ...]) -> Position:
    try:
        return load_yaml(Path(method.path).read_bytes()).where(field)
    except (OSError, YamlError):
        return Position(1, 1)


def revision_problems(methods: tuple[Method, ...], previous: dict[str, Ledger], previous_label: str, *, strict: bool) -> tuple[Problem, ...]:
    """A warning (an error with ``strict``) for each method whose content changed since the
    previous dossier without a higher revision, or without a new reason for the change."""
    severity = Severity.ERROR if strict else Severity.WARNING
    out: list[Problem] = []
    for m in methods:
        before = previous.get(m.id)
        if before is None or not content_changed(before.method, m):
            continue
        old = before.method
        if not revision_is_higher(old.revision, m.revision):
            pos = _where(m, ("method", "revision"))
            out.append(Problem(m.path, pos.line, pos.column, "method.revision",
                               f"the method changed since the previous dossier ({previous_label}), but its revision {m.revision!r} "
                               f"is not higher than the previous {old.revision!r}: raise it", severity))
        reason = (m.change_reason or "").strip()
        if not reason:
            pos = _where(m, ("method",))
            out.append(Problem(m.path, pos.line, pos.column, "method.change_reason",
                               f"the method changed since the previous dossier ({previous_label}, revision {old.revision}): "
                               "state why in method.change_reason", severity))
        elif reason == (old.change_reason or "").strip():
            pos = _where(m, ("method", "change_reason"))
            out.append(Problem(m.path, pos.line, pos.column, "method.change_reason",
                               f"the reason is the previous revision's ({old.revision}) unchanged: state why this revision differs", severity))
    return tuple(out)

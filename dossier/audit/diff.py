"""``dossier diff``: what changed between two built dossiers — per method, the
inputs, the numbers and the verdicts. Regulatory change control reads this.

This module reads both sides from disk — a built dossier's ``manifest.json``
and method ledgers — as typed :class:`~dossier.analysis.ledger.Ledger`
values; the comparison itself is :func:`dossier.analysis.changes.diff_ledgers`.
"""

from __future__ import annotations

import json
from pathlib import Path

from ..analysis.changes import Change, DossierDiff, MethodDiff, diff_ledgers
from ..analysis.ledger import Ledger, LedgerError
from ..layout import LAYOUT
from ..problems import UserError
from ..publish.manifest import Manifest, ManifestError

__all__ = ["Change", "MethodDiff", "DossierDiff", "NotADossier", "read_ledgers", "read_ledger", "diff_ledgers", "diff_dossiers"]


class NotADossier(UserError):
    """A folder that is not a readable built dossier (the message says why)."""


def read_ledgers(folder: Path) -> dict[str, Ledger]:
    """{method id: ledger} of a built dossier.

    Raises
    ------
    NotADossier
        When the folder is not a built dossier, or a ledger is unreadable.
    """
    try:
        manifest = Manifest.read(folder)
    except ManifestError as exc:
        raise NotADossier(str(exc)) from None
    return {m.id: read_ledger(folder, m.id) for m in manifest.methods}


def read_ledger(folder: Path, method_id: str) -> Ledger:
    """The ledger of one method of a built dossier.

    Raises
    ------
    NotADossier
        When the ledger is missing or unreadable.
    """
    rel = LAYOUT.ledger(method_id)
    try:
        return Ledger.from_document(json.loads((folder / rel).read_text(encoding="utf-8")))
    except (OSError, ValueError, LedgerError) as exc:
        raise NotADossier(f"{folder}: cannot read {rel}: {exc}") from None


def diff_dossiers(old: Path, new: Path) -> DossierDiff:
    """Compare two built dossiers on disk.

    Raises
    ------
    NotADossier
        When either folder is not a readable built dossier.
    """
    return diff_ledgers(read_ledgers(old), read_ledgers(new), str(old), str(new))

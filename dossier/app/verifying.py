"""``dossier verify``: the audit's verification, with the renderer's own data files to compare against."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from ..audit.verify import VerifyReport
from ..audit.verify import verify as audit_verify
from ..render.site import data_files
from .build_dossier import dossier_data_files

__all__ = ["verify"]


def verify(output: str | Path, *, methods: list[str | Path] | None = None, progress: Callable[[str], None] | None = None,
           cache: bool = True) -> VerifyReport:
    """Check a built dossier: every file's hash, the fingerprint on every page, every
    ledger entry re-computed, every number shown (data files and workbooks, pages, PDFs' bodies and ledger appendices), the method
    files given, and every signature beside it (:func:`dossier.audit.verify.verify`).
    ``cache``: reuse this machine's earlier re-computations of the same recorded inputs
    with the same code (the verify cache; ``False`` re-computes every method).

    Raises
    ------
    NotADossier
        When the folder holds no manifest (it is not a dossier).
    """
    return audit_verify(output, methods=methods, progress=progress, data_files=data_files, dossier_data_files=dossier_data_files, cache=cache)

"""What the pages say about the build itself (kept apart: no heavy imports)."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["BuildInfo", "RecordedSignature", "STAMP_PLACEHOLDER"]

STAMP_PLACEHOLDER = "@@ph-dossier-stamp@@"
"""Where a page shows the dossier's fingerprint line. Pages are rendered (and
cached) with this placeholder; the build replaces it with the fingerprint,
tool version and commit when it publishes (the fingerprint seals the data
files, so it is known only once every method is done)."""


@dataclass(frozen=True)
class BuildInfo:
    """Tool version, rendering time, Python and library versions, table hash, Monte-Carlo settings."""

    version: str
    time: str
    python: str
    dependencies: tuple[tuple[str, str], ...]
    table_sha256: str
    draws: int
    seed: int
    adaptive: bool = False


@dataclass(frozen=True)
class RecordedSignature:
    """A signature found beside the output when the build started (pages list them)."""

    signer: str
    meaning: str
    signed_at: str
    key_id: str
    fingerprint: str
    valid: bool

"""What the pages say about the build itself (kept apart: no heavy imports)."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["BuildInfo"]


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

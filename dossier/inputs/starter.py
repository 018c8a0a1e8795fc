"""The commented starter method file written by ``dossier new``."""

from __future__ import annotations

from importlib import resources
from string import Template

__all__ = ["starter_text"]


def starter_text(method_id: str, title: str) -> str:
    """The starter file for a method id and title (the title is quoted for YAML)."""
    template = resources.files("dossier").joinpath("data/starter.yaml").read_text(encoding="utf-8")
    safe_title = title.replace("\\", "\\\\").replace('"', '\\"')
    return Template(template).substitute(id=method_id, title=safe_title)

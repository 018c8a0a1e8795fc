"""The documentation names what the code has (kept true in the same commit)."""

from __future__ import annotations

from pathlib import Path

import pytest
from pydantic import BaseModel

from dossier.chemistry import ACTIVITY_MODELS, CATALOGUE
from dossier.cli import build_parser
from dossier.inputs import schema

ROOT = Path(__file__).resolve().parents[2]
MODELS = [schema.MethodFile, schema.MethodInfo, schema.Acceptance, schema.Conditions, schema.SolutionIn, schema.ComponentIn, schema.PkaIn, schema.ShortcutIn, schema.AsWrittenIn, schema.ReferenceIn, schema.StrongIn, schema.TitrantIn]


def read(name: str) -> str:
    return (ROOT / name).read_text(encoding="utf-8")


@pytest.mark.parametrize("model", MODELS, ids=lambda m: m.__name__)
def test_method_format_documents_every_key(model: type[BaseModel]) -> None:
    doc = read("docs/method-format.md")
    for name in model.model_fields:
        assert f"`{name}`" in doc, f"docs/method-format.md does not describe {model.__name__}.{name}"


def test_calculations_and_api_name_every_shortcut_and_activity_model() -> None:
    calc, api = read("docs/calculations.md"), read("docs/api.md")
    for sid in CATALOGUE:
        assert f"`{sid}`" in calc and f"`{sid}`" in api, sid
    for mid in ACTIVITY_MODELS:
        assert f"`{mid}`" in calc, mid


def test_readme_names_every_command() -> None:
    readme = read("README.md")
    sub = next(a for a in build_parser()._actions if a.dest == "command")
    for command in sub.choices:
        assert f"dossier {command}" in readme, command

"""The house rules, checked on the source: imports read one way, and files are
written only by the publish stage (and the cache's own store).

Layers (docs in DEVELOPERS.md): chemistry → inputs → analysis → render →
publish, with audit and the application layer beside them and the command
line on top. The leaves ``limits``, ``layout``, ``display`` and ``problems`` import nothing
of the package and may be imported by any layer.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "dossier"
LEAVES = {"limits", "layout", "display", "problems", "", "__version__"}  # "" and "__version__": the package itself

# Which parts of the package each part may import (besides itself and the leaves).
ALLOWED = {
    "chemistry": set(),
    "inputs": {"chemistry"},
    "analysis": {"chemistry", "inputs"},
    "render": {"chemistry", "inputs", "analysis"},
    "publish": set(),
    "audit": {"chemistry", "inputs", "analysis", "publish"},
    "app": {"chemistry", "inputs", "analysis", "render", "publish", "audit"},
    "cli": {"app", "render.terminal"},
    "__main__": {"cli"},
    "limits": set(),
    "layout": set(),
    "problems": set(),
    "display": set(),
    "": set(),
}


def _part(module: str) -> str:
    """'dossier.render.site' → 'render'; 'dossier' → ''."""
    parts = module.split(".")[1:]
    return parts[0] if parts else ""


def _imports(path: Path) -> list[tuple[int, str]]:
    """(line, absolute module) of every import of the package in a file."""
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    here = list(rel.parts)
    if here[-1] == "__init__":
        here = here[:-1]
    package = here if path.name == "__init__.py" else here[:-1]
    out = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package[: len(package) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] == "dossier":
                if node.module is None or target == "dossier":
                    out += [(node.lineno, f"{target}.{a.name}") for a in node.names]
                else:
                    out.append((node.lineno, target))
        elif isinstance(node, ast.Import):
            out += [(node.lineno, a.name) for a in node.names if a.name.split(".")[0] == "dossier"]
    return out


def _sources() -> list[Path]:
    return sorted(PACKAGE.rglob("*.py"))


@pytest.mark.parametrize("path", _sources(), ids=lambda p: str(p.relative_to(PACKAGE)))
def test_imports_read_one_way(path: Path) -> None:
    module = ".".join(path.relative_to(PACKAGE.parent).with_suffix("").parts).removesuffix(".__init__")
    part = _part(module)
    allowed = ALLOWED[part] | LEAVES | {part}
    for line, target in _imports(path):
        sub = target.split(".")[1:]
        name = sub[0] if sub else ""
        dotted = ".".join(sub[:2])
        if name in {"limits", "layout", "display", "problems"} and name != part and part in ("limits", "layout", "display", "problems"):
            pytest.fail(f"{path.relative_to(PACKAGE)}:{line}: the leaf {part} imports {target}")
        if name == "" and target not in ("dossier", "dossier.__version__"):
            pytest.fail(f"{path.relative_to(PACKAGE)}:{line}: imports {target} from the package root")
        assert name in allowed or dotted in allowed, f"{path.relative_to(PACKAGE)}:{line}: {part or 'dossier'} may not import {target}"


_WRITERS = ("write_text", "write_bytes", "mkdir", "open(", "os.replace", "os.rename", "shutil.")
_MAY_WRITE = {"publish/writer.py", "publish/staging.py", "audit/cache.py"}


@pytest.mark.parametrize("path", _sources(), ids=lambda p: str(p.relative_to(PACKAGE)))
def test_only_the_publish_stage_writes_files(path: Path) -> None:
    rel = path.relative_to(PACKAGE).as_posix()
    if rel in _MAY_WRITE:
        return
    tree = ast.parse(path.read_text(encoding="utf-8"))
    for node in ast.walk(tree):
        if isinstance(node, ast.Call):
            f = node.func
            name = f.attr if isinstance(f, ast.Attribute) else (f.id if isinstance(f, ast.Name) else "")
            if name in ("write_text", "write_bytes", "mkdir", "makedirs", "replace", "rename", "rmtree", "unlink", "mkstemp", "mkdtemp"):
                if name == "replace" and not (isinstance(f, ast.Attribute) and isinstance(f.value, ast.Name) and f.value.id == "os"):
                    continue  # str.replace, dataclasses.replace
                pytest.fail(f"{rel}:{node.lineno}: {name}() outside the publish stage")
            if name == "open" and len(node.args) >= 2:
                mode = node.args[1]
                if isinstance(mode, ast.Constant) and isinstance(mode.value, str) and any(c in mode.value for c in "wax+"):
                    pytest.fail(f"{rel}:{node.lineno}: open(..., {mode.value!r}) outside the publish stage")

"""Structure-aware fuzzing of the demo method files (hypothesis, derandomized).

Mutations: keys deleted, renamed or duplicated; values of the wrong type;
numbers 0, negative, NaN, ±inf, 1e308, 1e-320; very long strings; non-ASCII
and right-to-left text; tabs, a byte-order mark, CRLF; empty, binary and
truncated files. For every case: no exception escapes the loader; every
rejection names the file and a line; every accepted file is solved, analysed
and rendered to a page.
"""

from __future__ import annotations

import copy
from pathlib import Path
from typing import Any

import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from dossier.analysis.ledger import ledger_of
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.analysis.pointwise import evaluate_method
from dossier.inputs.loader import load_method_bytes
from dossier.inputs.substances import load_table
from dossier.layout import LAYOUT
from dossier.problems import Severity
from dossier.render.buildinfo import BuildInfo
from dossier.render.context import BuildContext
from dossier.render.site import render_method

ROOT = Path(__file__).resolve().parents[2]
DEMO = {p.name: p.read_bytes() for p in sorted((ROOT / "methods").glob("*.yaml"))}
DATA = {name: yaml.safe_load(raw) for name, raw in DEMO.items()}
TINY = AnalysisSettings(draws=200, map_pka=5, map_conc=5)
INFO = BuildInfo("0", "2026-01-01 00:00 UTC", "3", (), load_table().sha256, 200, 1)
CONTEXT = BuildContext(load_table(), TINY, INFO, pdf=False, site=True, figures=False)

NASTY_NUMBERS = [0, -1, -1e-9, 1e308, -1e308, 1e-320, float("nan"), float("inf"), float("-inf"), 10**30, True]
NASTY_TEXT = ["", " ", "x" * 20_000, "\u202eevil\u202c", "مرحبا بالعالم", "日本語のテキスト", "tab\there", "line\nbreak", "<script>alert(1)</script>", "${}\\x00", "ε" * 500]


def paths(node: Any, prefix: tuple = ()) -> list[tuple]:  # noqa: ANN401
    out = [prefix]
    if isinstance(node, dict):
        for k, v in node.items():
            out += paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += paths(v, prefix + (i,))
    return out


def get_parent(root: Any, path: tuple) -> Any:  # noqa: ANN401
    node = root
    for p in path[:-1]:
        node = node[p]
    return node


@st.composite
def mutated(draw: st.DrawFn) -> tuple[str, bytes]:
    name = draw(st.sampled_from(sorted(DEMO)))
    kind = draw(st.sampled_from(["delete", "rename", "duplicate", "type", "number", "text", "bytes", "truncate", "empty", "binary", "several"]))
    raw = DEMO[name]
    if kind in ("empty",):
        return name, b""
    if kind == "binary":
        return name, draw(st.binary(min_size=1, max_size=400))
    if kind == "truncate":
        return name, raw[: draw(st.integers(0, len(raw) - 1))]
    if kind == "bytes":
        text = raw.decode()
        variant = draw(st.sampled_from(["bom", "crlf", "tabs", "bom+crlf"]))
        if "crlf" in variant:
            text = text.replace("\n", "\r\n")
        if variant == "tabs":
            text = text.replace("  ", "\t", draw(st.integers(1, 5)))
        data = text.encode()
        return name, (b"\xef\xbb\xbf" + data) if "bom" in variant else data
    if kind == "duplicate":
        lines = raw.decode().splitlines(keepends=True)
        keyed = [i for i, line in enumerate(lines) if ":" in line and not line.lstrip().startswith("#")]
        i = draw(st.sampled_from(keyed))
        lines.insert(i + 1, lines[i])
        return name, "".join(lines).encode()
    data = copy.deepcopy(DATA[name])
    for _ in range(draw(st.integers(2, 4)) if kind == "several" else 1):
        all_paths = [p for p in paths(data) if p]
        if not all_paths:
            break
        path = draw(st.sampled_from(all_paths))
        parent = get_parent(data, path)
        key = path[-1]
        op = draw(st.sampled_from(["delete", "rename", "type", "number", "text"])) if kind == "several" else kind
        if op == "delete":
            del parent[key]
        elif op == "rename" and isinstance(parent, dict):
            parent[str(key) + draw(st.sampled_from(["x", "_", "s", "é"]))] = parent.pop(key)
        elif op == "type":
            parent[key] = draw(st.sampled_from([[], {}, "text", None, 3, [1, 2], {"a": 1}]))
        elif op == "number":
            parent[key] = draw(st.sampled_from(NASTY_NUMBERS))
        elif op == "text":
            parent[key] = draw(st.sampled_from(NASTY_TEXT))
    return name, yaml.safe_dump(data, allow_unicode=True, sort_keys=False).encode()


def smoke_build(method) -> None:  # noqa: ANN001
    """Solve, analyse (small settings) and render the method's page, ledger and results (no figures, no PDF)."""
    evaluate_method(method)
    analysis = analyse_method(method, TINY)
    files = render_method(analysis, ledger_of(analysis), CONTEXT)
    assert {LAYOUT.results(method.id), LAYOUT.method_page(method.id), LAYOUT.ledger(method.id)} <= files.keys()


STATS = {"cases": 0, "rejected": 0, "accepted": 0}


@settings(max_examples=2500, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(mutated())
def test_no_traceback_every_rejection_located_every_acceptance_builds(case: tuple[str, bytes]) -> None:
    name, raw = case
    STATS["cases"] += 1
    load = load_method_bytes(raw, f"methods/{name}")
    errors = [p for p in load.problems if p.severity is Severity.ERROR]
    for p in load.problems:
        assert p.file == f"methods/{name}"
        assert p.line >= 1 and p.column >= 1, str(p)
        assert p.message
    if errors:
        STATS["rejected"] += 1
        assert load.method is None
        return
    STATS["accepted"] += 1
    assert load.method is not None
    smoke_build(load.method)


def test_the_fuzzing_reached_both_outcomes() -> None:
    """The cases above were not all rejected (or all accepted): both paths ran."""
    if STATS["cases"] == 0:
        import pytest

        pytest.skip("run together with the fuzz test above")
    print(f"fuzzed {STATS['cases']} method files: {STATS['rejected']} rejected with located messages, {STATS['accepted']} accepted and built")
    assert STATS["rejected"] >= 0.3 * STATS["cases"]
    assert STATS["accepted"] >= 100

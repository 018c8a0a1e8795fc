"""The build (dossier.app.build): manifest, ledger, verify, byte-identical and atomic builds, cache, diff."""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from dossier.analysis.method import AnalysisSettings
from dossier.app import BuildOptions, verify
from dossier.app import build_dossier as build_module
from dossier.app.build_dossier import OutputError
from dossier.layout import LAYOUT
from dossier.publish import writer as writer_module

ROOT = Path(__file__).resolve().parents[2]
FAST = AnalysisSettings(draws=2000, map_pka=21, map_conc=31)
TWO = ["benzoate-extract.yaml", "tris-buffer-37c.yaml"]


def methods_dir(tmp: Path, names: list[str] = TWO) -> Path:
    d = tmp / "methods"
    d.mkdir(exist_ok=True)
    for n in names:
        if not (d / n).exists():  # keep a copy the test has edited
            shutil.copy(ROOT / "methods" / n, d / n)
    return d


def tree(folder: Path) -> dict[str, str]:
    return {p.relative_to(folder).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.rglob("*")) if p.is_file()}


def build(tmp: Path, out: Path, **kw):  # noqa: ANN003, ANN201
    kw.setdefault("settings", FAST)
    kw.setdefault("workers", 1)
    return build_module.build([methods_dir(tmp)], out, BuildOptions(**kw))


def test_manifest_lists_versions_inputs_outputs_settings(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")  # 2026-01-01 00:00 UTC
    monkeypatch.chdir(tmp_path)
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    m = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    assert m["format"] == "ph-dossier-manifest/1"
    assert m["tool"]["name"] == "ph-dossier" and m["tool"]["version"]
    assert m["build_time"] == "2026-01-01 00:00 UTC" and m["source_date_epoch"] == 1767225600
    assert {d["name"] for d in m["dependencies"]} >= {"numpy", "scipy", "matplotlib", "jinja2", "weasyprint", "pydantic", "pint"}
    inputs = {i["path"]: i for i in m["inputs"]}
    for n in TWO:
        assert inputs[f"methods/{n}"]["sha256"] == hashlib.sha256((ROOT / "methods" / n).read_bytes()).hexdigest()
    assert any(i["role"] == "substance table" for i in m["inputs"])
    assert {o["path"]: o["sha256"] for o in m["outputs"]} == {k: v for k, v in tree(out).items() if k != "manifest.json"}
    assert m["settings"]["monte_carlo"]["seed"] == FAST.seed and m["settings"]["monte_carlo"]["draws"] == FAST.draws
    assert m["settings"]["solver"]["tolerance_ln_h"] == 1e-12


def test_same_inputs_give_byte_identical_outputs_in_any_folder(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")
    monkeypatch.chdir(tmp_path)
    a, b = tmp_path / "first" / "output", tmp_path / "second place" / "dossier"
    assert build(tmp_path, a, cache=False).ok  # every job in this process
    assert build(tmp_path, b, cache=False, workers=2).ok  # method jobs and PDF stamps in two worker processes
    ta, tb = tree(a), tree(b)
    assert ta == tb  # PDFs, SVGs, pages, results, manifest: every byte
    assert any(k.endswith(".pdf") for k in ta) and any(k.endswith(".svg") for k in ta)
    for p in b.rglob("*"):
        if p.is_file():
            data = p.read_bytes()
            for leak in (str(tmp_path), str(Path.home()), str(ROOT)):
                assert leak.encode() not in data, (p, leak)


def test_verify_passes_then_reports_each_tampering(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    clean = verify(out, methods=[tmp_path / "methods"])
    assert clean.ok, [str(m) for m in clean.mismatches]
    assert clean.entries_checked > 50
    # an edited number in a published file
    results = out / "methods" / "benzoate-extract" / "results.json"
    results.write_text(results.read_text(encoding="utf-8").replace('"ph": 3.', '"ph": 4.', 1), encoding="utf-8")
    # an edited ledger entry, with the manifest's hash forged to match
    ledger = out / "methods" / "tris-buffer-37c" / "ledger.json"
    doc = json.loads(ledger.read_text(encoding="utf-8"))
    target = next(e for e in doc["entries"] if e["id"] == "medium/henderson-hasselbalch/error")
    target["value"] += 0.01
    ledger.write_text(json.dumps(doc, indent=2), encoding="utf-8")
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    for o in manifest["outputs"]:
        if o["path"] == "methods/tris-buffer-37c/ledger.json":
            o["sha256"] = hashlib.sha256(ledger.read_bytes()).hexdigest()
    (out / "manifest.json").write_text(json.dumps(manifest), encoding="utf-8")
    # a missing file, an extra file, a changed method file
    (out / "methods" / "benzoate-extract" / "validity.csv").unlink()
    (out / "notes.txt").write_text("extra", encoding="utf-8")
    method = tmp_path / "methods" / "benzoate-extract.yaml"
    method.write_text(method.read_text(encoding="utf-8").replace("revision: \"3\"", "revision: \"3b\""), encoding="utf-8")
    report = verify(out, methods=[tmp_path / "methods"])
    lines = [str(m) for m in report.mismatches]
    assert any(line.startswith("methods/benzoate-extract/results.json: changed: SHA-256") for line in lines)
    assert any(line.startswith("methods/tris-buffer-37c/ledger.json: medium/henderson-hasselbalch/error: recorded") for line in lines)
    assert "methods/benzoate-extract/validity.csv: missing (listed in the manifest)" in lines
    assert "notes.txt: extra file, not in the manifest" in lines
    assert any("benzoate-extract.yaml: changed since the build" in line for line in lines)
    assert not report.ok


def _forge_hash(out: Path, rel: str) -> None:
    """Record the file's present SHA-256 in the manifest (a tamper that re-hashes)."""
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    for o in manifest["outputs"]:
        if o["path"] == rel:
            o["sha256"] = hashlib.sha256((out / rel).read_bytes()).hexdigest()
    (out / "manifest.json").write_text(json.dumps(manifest), encoding="utf-8")


def test_verify_reuses_only_its_own_recomputation_of_the_same_recorded_inputs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    cache_home = tmp_path / "user-cache"
    monkeypatch.setenv("XDG_CACHE_HOME", str(cache_home))
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    kept = cache_home / "ph-dossier" / "verify" / "recomputed"
    first = verify(out)
    assert first.ok and first.reused == ()
    assert len(list(kept.glob("*.pickle"))) == 2  # one re-computation per method, in the user's cache folder
    assert not (tmp_path / ".output.cache" / "recomputed").exists()  # never beside the dossier
    second = verify(out)
    assert second.ok, [str(m) for m in second.mismatches]
    assert sorted(second.reused) == ["benzoate-extract", "tris-buffer-37c"]
    assert second.entries_checked == first.entries_checked
    # a reused re-computation is still compared: an edited value of a data file is found
    results = out / "methods" / "benzoate-extract" / "results.json"
    original = results.read_text(encoding="utf-8")
    results.write_text(original.replace('"ph": 3.', '"ph": 4.', 1), encoding="utf-8")
    _forge_hash(out, "methods/benzoate-extract/results.json")
    edited = verify(out)
    assert "benzoate-extract" in edited.reused
    assert any(str(m).startswith("methods/benzoate-extract/results.json: ") and "ph" in str(m) for m in edited.mismatches)
    results.write_text(original, encoding="utf-8")
    _forge_hash(out, "methods/benzoate-extract/results.json")
    # a changed recorded input (the acceptance limit in the ledger, re-hashed) is another key: re-computed, and found
    ledger = out / "methods" / "tris-buffer-37c" / "ledger.json"
    doc = json.loads(ledger.read_text(encoding="utf-8"))
    doc["method"]["criteria"]["max_ph_error"] = 0.01
    ledger.write_text(json.dumps(doc, indent=2), encoding="utf-8")
    _forge_hash(out, "methods/tris-buffer-37c/ledger.json")
    third = verify(out)
    assert third.reused == ("benzoate-extract",)
    assert any(str(m).startswith("methods/tris-buffer-37c/") for m in third.mismatches)
    # without the cache every method is re-computed, and nothing is read or written there
    for f in kept.glob("*.pickle"):
        f.write_bytes(b"not a pickle")
    fourth = verify(out, cache=False)
    assert fourth.reused == () and not fourth.ok
    assert all(f.read_bytes() == b"not a pickle" for f in kept.glob("*.pickle"))
    # an unreadable entry is a miss, re-computed and kept again
    fifth = verify(out)
    assert fifth.reused == () and [str(m) for m in fifth.mismatches] == [str(m) for m in third.mismatches]


def test_verify_command_exit_codes(tmp_path: Path) -> None:
    methods = methods_dir(tmp_path, TWO[:1])
    out = tmp_path / "output"
    run = lambda *a: subprocess.run([sys.executable, "-m", "dossier", *a], cwd=tmp_path, capture_output=True, text=True, timeout=600)  # noqa: E731
    assert run("build", str(methods), "-o", str(out), "--draws", "2000", "--no-pdf", "--quiet").returncode == 0
    ok = run("verify", str(out), "--methods", str(methods))
    assert ok.returncode == 0 and "everything matches" in ok.stdout
    (out / "index.html").write_text("tampered", encoding="utf-8")
    bad = run("verify", str(out))
    assert bad.returncode == 1
    first, second = bad.stdout.splitlines()[:2]
    assert first == f"fingerprint {json.loads((out / 'manifest.json').read_text(encoding='utf-8'))['fingerprint']}"
    assert second.startswith("index.html: changed: SHA-256")


def test_a_failed_write_leaves_the_previous_dossier_and_no_staging(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    before = tree(out)
    real = writer_module.Writer.write
    calls = {"n": 0}

    def failing(self, rel, data):  # noqa: ANN001, ANN202
        calls["n"] += 1
        if calls["n"] > 20:
            raise OSError(28, "No space left on device")
        return real(self, rel, data)

    monkeypatch.setattr(writer_module.Writer, "write", failing)
    with pytest.raises(OutputError, match="the previous dossier is unchanged"):
        build(tmp_path, out, pdf=False, cache=False)
    assert tree(out) == before
    assert not [p for p in tmp_path.iterdir() if "staging" in p.name]


def test_an_exception_in_rendering_leaves_the_previous_dossier(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    before = tree(out)

    def broken(*a, **k):  # noqa: ANN002, ANN003, ANN202
        raise RuntimeError("template exploded")

    monkeypatch.setattr(build_module, "render_dossier", broken)
    with pytest.raises(RuntimeError, match="template exploded"):
        build(tmp_path, out, pdf=False, cache=False)
    assert tree(out) == before
    assert not [p for p in tmp_path.iterdir() if "staging" in p.name]


def test_a_worker_that_dies_ends_the_build_with_a_message_and_leaves_the_previous_dossier(tmp_path: Path) -> None:
    """A worker process killed during a method's job (SIGKILL, as the out-of-memory killer
    sends; the test-only hook makes the job kill its own process): the build names the
    method, says nothing published was changed, exits 1, and the earlier dossier is intact."""
    from dossier.app.jobs import KILL_JOB_FOR_TESTS

    methods = methods_dir(tmp_path)
    out = tmp_path / "output"
    args = [sys.executable, "-m", "dossier", "build", str(methods), "-o", str(out), "--draws", "2000", "--no-pdf", "--quiet", "--workers", "2"]
    assert subprocess.run(args, cwd=tmp_path, capture_output=True, text=True, timeout=600).returncode == 0
    before = tree(out)
    env = {**os.environ, KILL_JOB_FOR_TESTS: "tris-buffer-37c"}
    env.pop("DOSSIER_DEBUG", None)
    lost = subprocess.run([*args, "--no-cache"], cwd=tmp_path, capture_output=True, text=True, timeout=600, env=env)
    assert lost.returncode == 1, lost.stderr
    assert "Traceback" not in lost.stderr and "BrokenProcessPool" not in lost.stderr
    assert "worker process ended abruptly" in lost.stderr
    assert "during the job of method 'tris-buffer-37c'" in lost.stderr
    assert "benzoate-extract" not in lost.stderr.split("worker process")[1]  # the other method's worker did not die
    assert "Nothing already published was changed" in lost.stderr
    assert tree(out) == before
    assert not [p for p in tmp_path.iterdir() if "staging" in p.name]


def test_previous_that_does_not_exist_says_so_and_names_it(tmp_path: Path) -> None:
    missing = tmp_path / "no-such-dossier"
    with pytest.raises(build_module.PreviousDossierError) as err:
        build(tmp_path, tmp_path / "output", pdf=False, previous=missing)
    assert str(err.value) == f"--previous: no such folder: {missing}"
    (tmp_path / "empty").mkdir()
    with pytest.raises(build_module.PreviousDossierError, match=r"--previous: .*empty is not a built dossier \(no manifest.json\)"):
        build(tmp_path, tmp_path / "output", pdf=False, previous=tmp_path / "empty")
    assert not (tmp_path / "output").exists()


def test_nothing_changed_recomputes_nothing_and_one_change_recomputes_one(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    out = tmp_path / "output"
    first = build(tmp_path, out, pdf=False)
    assert set(first.recomputed) == {"benzoate-extract", "tris-buffer-37c"}
    calls: list[str] = []
    real = build_module.method_job

    def counting(method, *a):  # noqa: ANN001, ANN002, ANN202
        calls.append(method.id)
        return real(method, *a)

    monkeypatch.setattr(build_module, "method_job", counting)
    again = build(tmp_path, out, pdf=False)
    assert again.recomputed == () and calls == []
    assert verify(out).ok  # published again, complete, every number still re-computes
    m = tmp_path / "methods" / "tris-buffer-37c.yaml"
    m.write_text(m.read_text(encoding="utf-8").replace("max_ph_error: 0.05", "max_ph_error: 0.1"), encoding="utf-8")
    third = build(tmp_path, out, pdf=False)
    assert third.recomputed == ("tris-buffer-37c",) and calls == ["tris-buffer-37c"]
    assert verify(out).ok


_COUNT_DRAWINGS = """
import json, sys
from dossier.cli import main
from dossier.render import memo
code = main(sys.argv[1:])
print(json.dumps({"code": code, "made": {name: [len(key[0]) if isinstance(key, tuple) else 1 for key in m.made] for name, m in memo._MEMOS.items()}}))
"""


def test_a_rebuild_takes_the_drawings_an_earlier_build_made_from_the_cache(tmp_path: Path) -> None:
    """The equations and the "dossier page N of T" lines are drawn by the first build only: a
    second process, as a user runs it, with one method changed draws no equation and lays out
    only the new fingerprint line (the binder's memo is made after the cache is read), and
    publishes the same equation files. Each build is a process of its own."""
    methods = methods_dir(tmp_path)
    out = tmp_path / "output"

    def run() -> dict[str, list[int]]:
        done = subprocess.run([sys.executable, "-c", _COUNT_DRAWINGS, "build", str(methods), "-o", str(out), "--draws", "2000", "--quiet"],
                              cwd=tmp_path, capture_output=True, text=True, timeout=900)
        assert done.returncode == 0, done.stderr[-2000:]
        report = json.loads(done.stdout.strip().splitlines()[-1])
        assert report["code"] == 0
        return report["made"]

    first = run()
    assert len(first["equations"]) > 10 and sorted(first["page stamps"])[-1] > 10  # drawn: the equations, the page-number lines
    folder = LAYOUT.equation("x").rsplit("/", 1)[0]
    before = {k: v for k, v in tree(out).items() if k.startswith(folder)}
    assert before
    m = methods / "tris-buffer-37c.yaml"
    m.write_text(m.read_text(encoding="utf-8") + "# edited, nothing else changed\n", encoding="utf-8")
    again = run()
    assert again["equations"] == [] and again["page stamps"] == [1]  # only the new fingerprint line, laid out once
    assert {k: v for k, v in tree(out).items() if k.startswith(folder)} == before


def test_diff_and_the_changes_page(tmp_path: Path) -> None:
    old = tmp_path / "old"
    assert build(tmp_path, old, pdf=False).ok
    m = tmp_path / "methods" / "tris-buffer-37c.yaml"
    # Henderson–Hasselbalch as the SOP writes it (the 25 °C pKa at 37 °C) errs by at most 0.27 pH: it meets a 0.3 limit
    m.write_text(m.read_text(encoding="utf-8").replace("max_ph_error: 0.05", "max_ph_error: 0.3").replace('revision: "3"', 'revision: "4"'), encoding="utf-8")
    new = tmp_path / "new"
    assert build(tmp_path, new, pdf=False, previous=old).ok
    from dossier.audit.diff import diff_dossiers

    d = diff_dossiers(old, new)
    (changed,) = d.changed
    assert changed.id == "tris-buffer-37c" and (changed.old_revision, changed.new_revision) == ("3", "4")
    assert any(c.what == "criteria.max_ph_error" and c.old == 0.05 and c.new == 0.3 for c in changed.inputs)
    assert any(c.what == "medium/henderson-hasselbalch" and (c.old, c.new) == ("fail", "pass") for c in changed.verdicts)
    page = (new / "changes.html").read_text(encoding="utf-8")
    assert "tris-buffer-37c — changed (revision 3 → 4)" in page and "benzoate-extract —" not in page
    assert "1 of 2 methods changed; the 1 unchanged one is not listed" in page
    # a dimensionless number (a conformity probability, ledger unit "1") changed: no unit "1" beside its difference
    assert "/conformity" in page and "<td>1</td>" not in page
    assert 'href="changes.html"' in (new / "index.html").read_text(encoding="utf-8")
    cli = subprocess.run([sys.executable, "-m", "dossier", "diff", str(old), str(new)], capture_output=True, text=True, timeout=120)
    assert cli.returncode == 0
    assert cli.stdout.splitlines()[0].startswith("1 of 2 methods changed")
    assert "    criteria.max_ph_error: 0.05 → 0.3" in cli.stdout


def test_every_published_number_on_a_page_links_to_a_ledger_entry(tmp_path: Path) -> None:
    out = tmp_path / "output"
    assert build(tmp_path, out, pdf=False).ok
    import re

    for mid in ("benzoate-extract", "tris-buffer-37c"):
        page = (out / "methods" / mid / "index.html").read_text(encoding="utf-8")
        ledger = json.loads((out / "methods" / mid / "ledger.json").read_text(encoding="utf-8"))
        ids = {e["id"] for e in ledger["entries"]}
        links = re.findall(r'href="ledger\.html#L-([^"]+)"', page)
        assert len(links) > 20
        assert set(links) <= ids
        ledger_page = (out / "methods" / mid / "ledger.html").read_text(encoding="utf-8")
        for eid in ids:
            assert f'id="L-{eid}"' in ledger_page

"""End to end: the demo dossier built by `dossier build` into a temporary folder."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

from .conftest import ROOT, method_ids, statuses


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], cwd=cwd, capture_output=True, text=True, timeout=900)


def test_every_page_pdf_and_result_is_there(built: Path) -> None:
    for name in ("index.html", "references.html", "calculations.html", "provenance.html", "dossier.pdf", "assets/site.css"):
        assert (built / name).is_file(), name
    ids = method_ids()
    assert len(ids) >= 8
    for mid in ids:
        folder = built / "methods" / mid
        for name in ("index.html", "results.json", f"{mid}.pdf", "validity.csv", "sensitivity.csv"):
            assert (folder / name).is_file(), (mid, name)
        svgs = sorted((folder / "figures").glob("*.svg"))
        assert svgs and not list((folder / "figures").glob("*.png"))  # each figure written once, as the SVG the pages show
        doc = json.loads((folder / "results.json").read_text(encoding="utf-8"))
        assert doc["method"]["id"] == mid


def test_the_dossier_holds_only_what_the_build_made(built: Path) -> None:
    """No README (or other placeholder of an output folder) is copied into a dossier or its manifest."""
    listed = [o["path"] for o in json.loads((built / "manifest.json").read_text(encoding="utf-8"))["outputs"]]
    assert listed, "the manifest lists no outputs"
    assert not [p for p in listed if Path(p).name.lower() in ("readme.md", ".gitkeep")], listed
    assert not [p for p in built.rglob("*") if p.name.lower() in ("readme.md", ".gitkeep")]
    on_disk = sorted(p.relative_to(built).as_posix() for p in built.rglob("*") if p.is_file())
    assert on_disk == sorted([*listed, "manifest.json"])


def test_index_lists_every_method_with_its_verdicts(built: Path) -> None:
    index = (built / "index.html").read_text(encoding="utf-8")
    for mid in method_ids():
        assert f'href="methods/{mid}/index.html"' in index
        assert f'href="methods/{mid}/{mid}.pdf"' in index
    present = statuses(built)
    assert len(present) >= 2, present  # the demo shows more than one outcome
    for word in present:
        assert f"verdict-{word}" in index


def test_pages_carry_the_cautions(built: Path) -> None:
    page = (built / "methods" / "benzoate-extract" / "index.html").read_text(encoding="utf-8")
    assert "does not replace measurement with a calibrated pH meter" in page
    assert "qualified staff under the laboratory&#39;s quality system" in page
    assert "pharmacopoeial requirements and licensed practice take precedence" in page


def test_a_bad_method_file_builds_nothing_and_keeps_the_previous_dossier(tmp_path: Path) -> None:
    out = tmp_path / "output"
    out.mkdir()
    (out / "previous.txt").write_text("the previous dossier", encoding="utf-8")
    methods = tmp_path / "methods"
    methods.mkdir()
    shutil.copy(ROOT / "methods" / "benzoate-extract.yaml", methods)
    shutil.copy(ROOT / "tests" / "inputs" / "bad" / "unknown-substance.yaml", methods)
    r = run("build", str(methods), "-o", str(out), "--draws", "1000", "--no-pdf")
    assert r.returncode == 1
    assert "unknown-substance.yaml:15:20: solutions[0].components[0].substance" in r.stderr
    assert r.stderr.strip().endswith("dossier build: nothing built: fix the errors above (the previous dossier is unchanged)")
    assert [p.name for p in out.iterdir()] == ["previous.txt"]
    assert not [p for p in tmp_path.iterdir() if "staging" in p.name]


def test_progress_lines_quiet_and_timings(tmp_path: Path) -> None:
    methods = tmp_path / "m"
    methods.mkdir()
    shutil.copy(ROOT / "methods" / "benzoate-extract.yaml", methods)
    r = run("build", str(methods), "-o", str(tmp_path / "o"), "--draws", "1000", "--no-pdf", "--timings", "--workers", "1")
    assert r.returncode == 0, r.stderr
    assert "analysing and rendering methods: benzoate-extract (1/1)" in r.stderr  # plain lines when not a terminal
    assert "check inputs" in r.stdout and "publish" in r.stdout
    timings = [line for line in r.stdout.splitlines() if line.endswith(" s") and line.startswith("  ")]
    assert len(timings) >= 3  # check inputs, analyse …, publish
    assert len({len(line) for line in timings}) == 1, timings  # one width: the seconds end in one column
    assert len({line.index(".", len(line) - 8) for line in timings}) == 1, timings  # decimal points aligned
    q = run("build", str(methods), "-o", str(tmp_path / "o"), "--draws", "1000", "--no-pdf", "--quiet")
    # --quiet prints only problems: here the table's unverified benzoic-acid values (data-quality warnings)
    assert q.returncode == 0 and all(": warning: " in line for line in q.stderr.splitlines())
    assert q.stdout.startswith("built ")


def test_diff_into_a_closed_pipe_stops_quietly(built: Path) -> None:
    """`dossier diff A B | head`: the reader leaves, the command ends with 141 and no message."""
    proc = subprocess.Popen([sys.executable, "-m", "dossier", "diff", str(built), str(built)], cwd=ROOT,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    proc.stdout.close()  # the only reader is gone before the first line is written
    err = proc.stderr.read()
    proc.stderr.close()
    assert (proc.wait(timeout=300), err) == (141, "")

"""Records an auditor accepts: the fingerprint, signatures, every published
number verified (tests on one small real dossier, PDFs included)."""

from __future__ import annotations

import hashlib
import json
import shutil
import subprocess
from collections.abc import Iterator
from pathlib import Path

import pytest

from dossier.analysis.method import AnalysisSettings
from dossier.app import BuildOptions, build, verify
from tests.conftest import require_executable

ROOT = Path(__file__).resolve().parents[2]
FAST = AnalysisSettings(draws=2000, map_pka=21, map_conc=31)
METHOD = "benzoate-extract"


@pytest.fixture(scope="module")
def dossier(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Path]:
    """One method, with its PDF and the dossier PDF, built once for this module (never edited: copy it)."""
    tmp = tmp_path_factory.mktemp("records")
    shutil.copy(ROOT / "methods" / f"{METHOD}.yaml", tmp / f"{METHOD}.yaml")
    with pytest.MonkeyPatch.context() as mp:
        mp.setenv("SOURCE_DATE_EPOCH", "1767225600")
        outcome = build([tmp / f"{METHOD}.yaml"], tmp / "output", BuildOptions(settings=FAST, workers=1, cache=False))
    assert outcome.ok and len(outcome.fingerprint) == 64
    yield tmp / "output"


@pytest.fixture()
def copy(dossier: Path, tmp_path: Path) -> Path:
    """A copy of the dossier a test may tamper with."""
    return Path(shutil.copytree(dossier, tmp_path / "copy"))


def manifest(folder: Path) -> dict:
    return json.loads((folder / "manifest.json").read_text(encoding="utf-8"))


def rehash(folder: Path, rel: str) -> None:
    """Forge the manifest's hash of ``rel`` to match the file as it is now."""
    m = manifest(folder)
    for o in m["outputs"]:
        if o["path"] == rel:
            data = (folder / rel).read_bytes()
            o["sha256"], o["bytes"] = hashlib.sha256(data).hexdigest(), len(data)
    (folder / "manifest.json").write_text(json.dumps(m, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")


# ---------------------------------------------------------------- fingerprint
def sealed_hash(m: dict) -> str:
    """The fingerprint as docs/manifest-format.md defines it, computed here independently."""
    doc = {k: v for k, v in m.items() if k != "fingerprint"}
    doc["outputs"] = [o for o in m["outputs"] if not o["path"].endswith((".html", ".pdf"))]
    return hashlib.sha256(json.dumps(doc, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode("utf-8")).hexdigest()


def test_fingerprint_is_the_hash_of_the_sealed_manifest(dossier: Path) -> None:
    m = manifest(dossier)
    assert m["fingerprint"] == sealed_hash(m)
    sealed = {o["path"] for o in m["outputs"] if not o["path"].endswith((".html", ".pdf"))}
    assert f"methods/{METHOD}/results.json" in sealed and f"methods/{METHOD}/ledger.json" in sealed


def test_every_page_and_pdf_page_shows_the_fingerprint_version_and_commit(dossier: Path) -> None:
    pdftotext = require_executable("pdftotext", "reads the PDFs' text")
    m = manifest(dossier)
    fp, version = m["fingerprint"], m["tool"]["version"]
    pages = sorted(dossier.rglob("*.html"))
    assert pages
    for page in pages:
        text = page.read_text(encoding="utf-8")
        assert f"Dossier fingerprint {fp}" in text and f"ph-dossier {version}" in text, page
    pdfs = sorted(dossier.rglob("*.pdf"))
    assert {p.name for p in pdfs} == {"dossier.pdf", f"{METHOD}.pdf"}
    for pdf in pdfs:
        text = subprocess.run([pdftotext, "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout
        pages_text = text.split("\f")[:-1]
        assert len(pages_text) > 3
        for n, page_text in enumerate(pages_text, start=1):
            assert f"Dossier fingerprint {fp} - ph-dossier {version}" in page_text, f"{pdf.name} page {n}"
            if m["tool"]["git_commit"]:
                assert f"commit {m['tool']['git_commit'][:12]}" in page_text


def test_every_font_of_the_pdfs_is_embedded(dossier: Path) -> None:
    """The page stamps too (they once used a standard font that was not embedded)."""
    from tests.pdfa import unembedded_fonts

    pdffonts = require_executable("pdffonts", "lists the PDFs' fonts")
    for pdf in sorted(dossier.rglob("*.pdf")):
        assert unembedded_fonts(pdf, pdffonts) == [], pdf.name


def test_verify_prints_the_fingerprint_and_refuses_a_forged_one(dossier: Path, copy: Path) -> None:
    assert verify(dossier).fingerprint == manifest(dossier)["fingerprint"]
    # a data file edited and its hash forged: the sealed part no longer hashes to the recorded fingerprint
    results = copy / "methods" / METHOD / "results.json"
    results.write_text(results.read_text(encoding="utf-8").replace('"title"', '"title" ', 1), encoding="utf-8")
    rehash(copy, f"methods/{METHOD}/results.json")
    lines = [str(x) for x in verify(copy).mismatches]
    assert any(line.startswith("manifest.json: fingerprint: recorded") for line in lines), lines
    # the fingerprint forged too: now the pages show another one
    m = manifest(copy)
    m["fingerprint"] = sealed_hash(m)
    (copy / "manifest.json").write_text(json.dumps(m, indent=2), encoding="utf-8")
    lines = [str(x) for x in verify(copy).mismatches]
    assert "index.html: footer: does not show this dossier's fingerprint line" in "\n".join(lines)
    assert any(line.startswith("dossier.pdf: page 1: does not show") for line in lines), lines


# ---------------------------------------------------------------- signatures
def tree(folder: Path) -> dict[str, str]:
    return {p.relative_to(folder).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.rglob("*")) if p.is_file()}


def dossier_cli(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    import sys

    return subprocess.run([sys.executable, "-m", "dossier", *args], cwd=cwd, capture_output=True, text=True, timeout=600)


def test_keygen_writes_a_private_key_for_its_owner_only_and_never_into_a_dossier(copy: Path, tmp_path: Path) -> None:
    (tmp_path / "keys").mkdir()  # keygen makes no folders (tests/app/test_keygen.py)
    r = dossier_cli("keygen", "keys/ana.key", "--name", "A. Analyst", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    key, pub = tmp_path / "keys" / "ana.key", tmp_path / "keys" / "ana.key.pub"
    assert key.stat().st_mode & 0o777 == 0o600
    public = json.loads(pub.read_text(encoding="utf-8"))
    assert public["name"] == "A. Analyst" and "private_key" not in public
    assert f"key id {public['key_id']}" in r.stdout
    again = dossier_cli("keygen", "keys/ana.key", "--name", "A. Analyst", cwd=tmp_path)
    assert again.returncode == 1 and "exists; a key is never overwritten" in again.stderr
    inside = dossier_cli("keygen", str(copy / "methods" / "k.key"), "--name", "B", cwd=tmp_path)
    assert inside.returncode == 1 and "a private key is never written into a dossier" in inside.stderr
    assert not (copy / "methods" / "k.key").exists() and "Traceback" not in inside.stderr


def test_sign_records_a_detached_signature_and_verify_checks_it(copy: Path, tmp_path: Path) -> None:
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    before = tree(copy)
    r = dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    assert tree(copy) == before  # no byte of the dossier changed
    (sig,) = sorted((tmp_path / "copy.signatures").glob("*.json"))
    st = json.loads(sig.read_text(encoding="utf-8"))["statement"]
    fp = manifest(copy)["fingerprint"]
    assert (st["signer"], st["meaning"], st["fingerprint"]) == ("A. Analyst", "approved", fp)
    assert st["manifest_sha256"] == hashlib.sha256((copy / "manifest.json").read_bytes()).hexdigest()
    report = verify(copy)
    assert report.ok and len(report.signatures) == 1 and report.signatures[0].applies
    # a signature whose statement was altered (reviewed → approved, say) no longer checks
    doc = json.loads(sig.read_text(encoding="utf-8"))
    doc["statement"]["meaning"] = "reviewed"
    sig.write_text(json.dumps(doc), encoding="utf-8")
    lines = [str(x) for x in verify(copy).mismatches]
    assert lines == [f"copy.signatures/{sig.name}: signature: the signature does not match its statement (altered or forged)"]


def test_a_signature_does_not_apply_once_a_page_changed(copy: Path, tmp_path: Path) -> None:
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    assert dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "reviewed", cwd=tmp_path).returncode == 0
    page = copy / "references.html"
    page.write_text(page.read_text(encoding="utf-8").replace("<h1>", "<h1>Approved: ", 1), encoding="utf-8")
    rehash(copy, "references.html")  # the page's hash forged; the fingerprint (pages excluded) is unchanged
    report = verify(copy)
    assert [str(x) for x in report.mismatches] == [
        f"copy.signatures/{report.signatures[0].file.split('/')[-1]}: signature: signed another manifest.json "
        "(same fingerprint, other pages or PDFs): the dossier changed since it was signed"]
    # a damaged dossier (a file that no longer hashes to its record) is not signed at all
    (copy / "index.html").write_text("edited", encoding="utf-8")
    r = dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path)
    assert r.returncode == 1 and "does not match its manifest, so it is not signed" in r.stderr


def test_a_key_readable_by_others_is_refused(tmp_path: Path, copy: Path) -> None:
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    (tmp_path / "ana.key").chmod(0o644)
    r = dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path)
    assert r.returncode == 1 and "the private key is readable by others (mode 644)" in r.stderr
    assert not (tmp_path / "copy.signatures").exists()


def test_signing_with_the_public_key_or_a_file_that_is_no_key_says_so(tmp_path: Path, copy: Path) -> None:
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    r = dossier_cli("sign", str(copy), "--key", "ana.key.pub", "--meaning", "approved", cwd=tmp_path)
    assert r.returncode == 1 and "this is the public key; sign with the private key file beside it (ana.key)" in r.stderr
    (tmp_path / "junk.key").write_text("not json", encoding="utf-8")
    (tmp_path / "junk.key").chmod(0o600)
    r = dossier_cli("sign", str(copy), "--key", "junk.key", "--meaning", "approved", cwd=tmp_path)
    assert r.returncode == 1 and "not a private key made by dossier keygen" in r.stderr and "Expecting value" not in r.stderr
    assert "Traceback" not in r.stderr and not (tmp_path / "copy.signatures").exists()


def test_a_rebuilt_dossier_shows_that_earlier_signatures_no_longer_apply(copy: Path, tmp_path: Path) -> None:
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    assert dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path).returncode == 0
    old = manifest(copy)["fingerprint"]
    source = tmp_path / f"{METHOD}.yaml"
    source.write_text((ROOT / "methods" / f"{METHOD}.yaml").read_text(encoding="utf-8") + "# a comment: the file's bytes changed\n", encoding="utf-8")
    assert build([source], copy, BuildOptions(settings=FAST, workers=1, pdf=False, cache=False)).ok
    assert manifest(copy)["fingerprint"] != old
    provenance = (copy / "provenance.html").read_text(encoding="utf-8")
    assert "Signatures recorded before this build: they signed an earlier build and do not apply to this one" in provenance
    assert old in provenance and "A. Analyst" in provenance
    # the rebuild moved the earlier signature aside: verify passes, says so, and nothing signs the new build
    moved = list((tmp_path / "copy.signatures" / "earlier" / old).glob("*.json"))
    assert len(moved) == 1 and not list((tmp_path / "copy.signatures").glob("*.json"))
    report = verify(copy)
    assert report.ok and report.signatures == (), report.mismatches
    assert any("signature(s) of earlier builds" in n for n in report.notes)
    # signing the new build: verify checks that one only
    assert dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path).returncode == 0
    report = verify(copy)
    assert report.ok and len(report.signatures) == 1 and report.signatures[0].applies


def test_a_signature_left_beside_a_changed_dossier_fails_verify(copy: Path, tmp_path: Path) -> None:
    """Without a rebuild by the tool (files edited and the manifest re-sealed), the signature stays and no longer applies."""
    assert dossier_cli("keygen", "ana.key", "--name", "A. Analyst", cwd=tmp_path).returncode == 0
    assert dossier_cli("sign", str(copy), "--key", "ana.key", "--meaning", "approved", cwd=tmp_path).returncode == 0
    page = copy / "references.html"
    page.write_text(page.read_text(encoding="utf-8").replace("<h1>", "<h1>Edited: ", 1), encoding="utf-8")
    forge(copy, "references.html")
    report = verify(copy)
    assert not report.ok and any("the dossier changed since it was signed" in str(m) for m in report.mismatches)


# ---------------------------------------------------------------- every published number
def forge(folder: Path, *rels: str) -> None:
    """The careful tamper: hashes of the edited files updated, the fingerprint re-sealed and
    written into every page in place of the old one (only the PDFs still show the old one)."""
    for rel in rels:
        rehash(folder, rel)
    m = manifest(folder)
    old, new = m["fingerprint"], sealed_hash(m)
    for page in folder.rglob("*.html"):
        page.write_text(page.read_text(encoding="utf-8").replace(old, new), encoding="utf-8")
    for o in m["outputs"]:
        if o["path"].endswith(".html"):
            data = (folder / o["path"]).read_bytes()
            o["sha256"], o["bytes"] = hashlib.sha256(data).hexdigest(), len(data)
    m["fingerprint"] = new
    (folder / "manifest.json").write_text(json.dumps(m, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")


def test_the_careful_tamper_of_the_exact_ph_is_caught_in_every_file(copy: Path) -> None:
    """The exact pH changed in results.json, on the method page and a validity bound in
    validity.csv, hashes and fingerprint forged: verify names each file, place and both values."""
    folder = copy / "methods" / METHOD
    results = json.loads((folder / "results.json").read_text(encoding="utf-8"))
    true_ph = results["solutions"][0]["exact"]["ph"]
    results["solutions"][0]["exact"]["ph"] = true_ph + 0.03
    (folder / "results.json").write_text(json.dumps(results, indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
    page = (folder / "index.html").read_text(encoding="utf-8")
    link = f'href="ledger.html#L-{results["solutions"][0]["id"]}/exact/ph">'
    shown = page.split(link, 1)[1].split("<", 1)[0]
    forged = f"{float(shown) + 0.03:.{len(shown.split('.')[1])}f}"
    (folder / "index.html").write_text(page.replace(link + shown, link + forged), encoding="utf-8")
    rows = (folder / "validity.csv").read_text(encoding="utf-8").splitlines()
    cells = rows[1].split(",")
    low = cells[4]
    cells[4] = repr(float(low) * 1.5)
    (folder / "validity.csv").write_text("\n".join([rows[0], ",".join(cells), *rows[2:]]) + "\n", encoding="utf-8")
    forge(copy, f"methods/{METHOD}/results.json", f"methods/{METHOD}/validity.csv")

    report = verify(copy)
    lines = [str(x) for x in report.mismatches]
    assert f"methods/{METHOD}/results.json: solutions[0].exact.ph: shows {true_ph + 0.03!r}, re-computed {true_ph!r}" in lines
    assert f"methods/{METHOD}/index.html: number linked to {results['solutions'][0]['id']}/exact/ph: shows {forged}, re-computed {true_ph!r}" in lines
    assert f"methods/{METHOD}/validity.csv: line 2, column low [unit of range of]: shows {cells[4]!r}, re-computed {low!r}" in lines
    assert not any(line.startswith("manifest.json: fingerprint") for line in lines)  # the forgery of the seal itself held
    assert not any(".html: footer" in line for line in lines)


def test_a_pdf_whose_ledger_appendix_shows_other_numbers_is_caught(copy: Path, tmp_path: Path) -> None:
    """A method PDF replaced by one made with another seed (its Monte-Carlo numbers differ), hash forged."""
    source = tmp_path / f"{METHOD}.yaml"
    shutil.copy(ROOT / "methods" / f"{METHOD}.yaml", source)
    other = tmp_path / "other"
    settings = AnalysisSettings(draws=FAST.draws, seed=FAST.seed + 1, map_pka=FAST.map_pka, map_conc=FAST.map_conc)
    assert build([source], other, BuildOptions(settings=settings, workers=1, cache=False)).ok
    rel = f"methods/{METHOD}/{METHOD}.pdf"
    shutil.copy(other / rel, copy / rel)
    rehash(copy, rel)
    lines = [str(x) for x in verify(copy).mismatches]
    mc = [line for line in lines if line.startswith(f"{rel}: page ") and "/mc_mean: shows " in line]
    assert mc, lines
    assert ", re-computed " in mc[0]


def test_a_pdf_whose_fingerprint_stamp_was_taken_off_is_caught(copy: Path) -> None:
    """The stamp is the last incremental update of each PDF: cut off, the PDF is the one laid
    out before (still a valid PDF, its page numbers kept), and no page shows the fingerprint."""
    from pypdf import PdfReader

    require_executable("pdftotext", "reads the PDFs' text")
    data = (copy / "dossier.pdf").read_bytes()
    cut = data.rindex(b"%%EOF", 0, len(data) - 8) + len(b"%%EOF\n")
    (copy / "dossier.pdf").write_bytes(data[:cut])
    rehash(copy, "dossier.pdf")
    lines = [str(m) for m in verify(copy, cache=False).mismatches]
    pages = [line for line in lines if line.startswith("dossier.pdf: page ") and ": does not show this dossier's fingerprint line " in line]
    assert len(pages) == len(PdfReader(copy / "dossier.pdf").pages) > 6, lines
    assert all(not line.startswith("methods/") for line in lines)  # the reports keep their stamps


def test_without_pdftotext_verify_reads_the_appendix_and_the_fingerprint_lines_with_pypdf_and_says_so(dossier: Path, copy: Path,
                                                                                                     tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """pdftotext missing from PATH: the intact dossier still verifies (every PDF's ledger rows and
    fingerprint lines read by pypdf's text extraction), a note says the PDFs' body was not read, and a
    forged fingerprint is still found on the PDF pages."""
    monkeypatch.setenv("PATH", str(tmp_path / "no-programs"))
    report = verify(dossier)
    assert report.ok, [str(x) for x in report.mismatches]
    assert report.entries_checked > 0
    assert any(n.startswith("the numbers in the body of the PDFs were not read: pdftotext") for n in report.notes), report.notes
    results = copy / "methods" / METHOD / "results.json"
    results.write_text(results.read_text(encoding="utf-8").replace('"title"', '"title" ', 1), encoding="utf-8")
    rehash(copy, f"methods/{METHOD}/results.json")
    m = manifest(copy)
    m["fingerprint"] = sealed_hash(m)
    (copy / "manifest.json").write_text(json.dumps(m, indent=2), encoding="utf-8")
    lines = [str(x) for x in verify(copy).mismatches]
    assert any(line.startswith("dossier.pdf: page 1: does not show") for line in lines), lines
    assert any(line.startswith(f"methods/{METHOD}/{METHOD}.pdf: page 1: does not show") for line in lines), lines


# ---------------------------------------------------------------- the method files in the dossier
def test_each_method_file_is_published_beside_its_page_and_attached_to_the_pdfs(dossier: Path) -> None:
    from pypdf import PdfReader

    source = (ROOT / "methods" / f"{METHOD}.yaml").read_bytes()
    assert (dossier / "methods" / METHOD / f"{METHOD}.yaml").read_bytes() == source
    assert f'href="{METHOD}.yaml"' in (dossier / "methods" / METHOD / "index.html").read_text(encoding="utf-8")
    assert f'href="methods/{METHOD}/{METHOD}.yaml"' in (dossier / "provenance.html").read_text(encoding="utf-8")
    for pdf in (dossier / "dossier.pdf", dossier / "methods" / METHOD / f"{METHOD}.pdf"):
        attached = PdfReader(pdf).attachments
        assert list(attached) == [f"{METHOD}.yaml"]
        assert attached[f"{METHOD}.yaml"][0] == source
    sealed = {o["path"] for o in manifest(dossier)["outputs"] if not o["path"].endswith((".html", ".pdf"))}
    assert f"methods/{METHOD}/{METHOD}.yaml" in sealed  # the fingerprint seals the method file itself


def test_a_pdf_with_another_method_file_attached_is_caught(copy: Path) -> None:
    import io

    from pypdf import PdfReader, PdfWriter

    rel = f"methods/{METHOD}/{METHOD}.pdf"
    writer = PdfWriter()
    for page in PdfReader(copy / rel).pages:
        writer.add_page(page)
    edited = (ROOT / "methods" / f"{METHOD}.yaml").read_bytes().replace(b"revision:", b"revision: 9 #", 1)
    writer.add_attachment(f"{METHOD}.yaml", edited)
    buf = io.BytesIO()
    writer.write(buf)
    (copy / rel).write_bytes(buf.getvalue())
    rehash(copy, rel)
    lines = [str(x) for x in verify(copy).mismatches]
    assert any(line.startswith(f"{rel}: attachment {METHOD}.yaml: SHA-256 ") and "is not the method file the manifest records" in line for line in lines), lines


# ---------------------------------------------------------------- spreadsheets
def test_each_method_has_a_workbook_with_numbers_as_numbers_and_units_in_the_headers(dossier: Path) -> None:
    import csv

    from openpyxl import load_workbook

    folder = dossier / "methods" / METHOD
    book = load_workbook(folder / f"{METHOD}.xlsx", read_only=True)
    index = {sheet: table for sheet, table in list(book["tables"].iter_rows(values_only=True))[1:]}
    assert set(index.values()) == {p.name for p in folder.glob("*.csv")}
    for sheet, table in index.items():
        rows = list(book[sheet].iter_rows(values_only=True))
        with open(folder / table, encoding="utf-8", newline="") as fh:
            csv_rows = list(csv.reader(fh))
        assert list(rows[0]) == csv_rows[0]  # the same headers, with units
        for got, want in zip(rows[1:], csv_rows[1:]):
            for g, w in zip(got, want):
                try:
                    number = float(w)
                except ValueError:
                    assert str(g) == w
                else:
                    assert isinstance(g, (int, float)) and g == pytest.approx(number, rel=1e-12)  # numbers as numbers
    assert "total [mol/L]" in open(next(folder.glob("*-concentration-sweep.csv")), encoding="utf-8").readline()
    assert "exact pH [pH]" in open(next(folder.glob("*-concentration-sweep.csv")), encoding="utf-8").readline()
    assert "contribution to u [pH]" in (folder / "sensitivity.csv").read_text(encoding="utf-8").splitlines()[0]
    whole = load_workbook(dossier / "dossier.xlsx", read_only=True)
    validity = list(whole["validity"].iter_rows(values_only=True))
    assert validity[0][0] == "method" and {r[0] for r in validity[1:]} == {METHOD}
    assert len(validity) == len((folder / "validity.csv").read_text(encoding="utf-8").splitlines())


def test_a_workbook_with_a_changed_number_is_caught(copy: Path) -> None:
    from openpyxl import load_workbook

    rel = f"methods/{METHOD}/{METHOD}.xlsx"
    book = load_workbook(copy / rel)
    sheet = book["validity"]
    true_low = sheet["E2"].value
    sheet["E2"] = true_low * 2
    book.save(copy / rel)
    forge(copy, rel)
    lines = [str(x) for x in verify(copy).mismatches]
    assert f"{rel}: sheet validity, cell E2: shows {true_low * 2!r}, re-computed {true_low!r}" in lines


# ---------------------------------------------------------------- a number in the body of a PDF
def _to_unicode(font: object) -> dict[str, bytes]:
    """{character: glyph code} of a composite font, from its ToUnicode map (single codes only)."""
    import re

    data = font["/ToUnicode"].get_object().get_data().decode("latin-1")  # type: ignore[index]
    out = {}
    for block in re.findall(r"beginbfchar(.*?)endbfchar", data, re.S):
        for code, uni in re.findall(r"<([0-9a-fA-F]+)>\s*<([0-9a-fA-F]{4})>", block):
            out.setdefault(chr(int(uni, 16)), code.lower().encode())
    return out


def alter_pdf_text(pdf: Path, page_index: int, text: str) -> str:
    """Re-write the first occurrence of ``text`` on a page of ``pdf`` (glyph codes in the
    content stream, as an editor of PDFs would) with its last digit changed; return the new text.

    The text is found through each font's ToUnicode map, so a reader (and pdftotext)
    sees the changed digit; every other byte of the page stays."""
    import re

    from pypdf import PdfReader, PdfWriter
    from pypdf.generic import ContentStream

    writer = PdfWriter(clone_from=PdfReader(pdf))
    page = writer.pages[page_index]
    content = page.get_contents()
    assert content is not None
    data = content.get_data()
    for font in page["/Resources"]["/Font"].values():
        codes = _to_unicode(font.get_object())
        if not all(ch in codes for ch in text):
            continue
        pattern = rb"-?[\d.]*".join(b"<" + codes[ch] + b">" for ch in text)
        hit = re.search(pattern, data, re.I)
        if hit is None:
            continue
        last = text[-1]
        other = next(d for d in "8321" if d != last and d in codes)
        changed = hit.group(0)[: -len(codes[last]) - 2] + b"<" + codes[other] + b">"
        stream = ContentStream(None, writer)
        stream.set_data(data[: hit.start()] + changed + data[hit.end():])
        page.replace_contents(stream)
        with open(pdf, "wb") as fh:
            writer.write(fh)
        return text[:-1] + other
    raise AssertionError(f"{text!r} not found on page {page_index + 1} of {pdf}")


@pytest.mark.parametrize("rel", [f"methods/{METHOD}/{METHOD}.pdf", "dossier.pdf"])
def test_a_number_changed_in_the_body_of_a_pdf_is_caught(copy: Path, rel: str) -> None:
    """The exact pH as the PDF's body shows it, its glyphs re-written, the PDF's hash forged:
    verify names the file, page, entry and both values (the ledger appendix is left as it was)."""
    pdftotext = require_executable("pdftotext", "reads the words of the PDFs with their positions")
    results = json.loads((copy / "methods" / METHOD / "results.json").read_text(encoding="utf-8"))
    eid = f"{results['solutions'][0]['id']}/exact/ph"
    true_ph = results["solutions"][0]["exact"]["ph"]
    page = (copy / "methods" / METHOD / "index.html").read_text(encoding="utf-8")
    shown = page.split(f'href="ledger.html#L-{eid}">', 1)[1].split("<", 1)[0]  # the page and the PDF show the same digits
    texts = subprocess.run([pdftotext, "-layout", str(copy / rel), "-"], capture_output=True, text=True, check=True).stdout.split("\f")
    index = next(i for i, t in enumerate(texts) if shown in t and "Calculation ledger" not in t)
    forged = alter_pdf_text(copy / rel, index, shown)
    after = subprocess.run([pdftotext, "-f", str(index + 1), "-l", str(index + 1), str(copy / rel), "-"], capture_output=True, text=True, check=True).stdout
    assert forged in after  # a reader sees the forged number
    rehash(copy, rel)
    lines = [str(x) for x in verify(copy).mismatches]
    assert f"{rel}: page {index + 1}, number linked to {eid}: shows {forged}, re-computed {true_ph!r}" in lines, lines
    assert all(line.startswith(f"{rel}: page {index + 1}, number linked to {eid}") for line in lines), lines


def test_a_changed_cell_of_the_dossier_workbook_is_caught(copy: Path) -> None:
    from openpyxl import load_workbook

    rel = "dossier.xlsx"
    book = load_workbook(copy / rel)
    sheet = book["sensitivity"]
    header = [c.value for c in sheet[1]]
    column = next(i for i, h in enumerate(header) if isinstance(sheet.cell(2, i + 1).value, float))
    cell = sheet.cell(2, column + 1)
    true = cell.value
    cell.value = true * 2  # exact in binary: the workbook keeps it digit for digit
    book.save(copy / rel)
    forge(copy, rel)
    lines = [str(x) for x in verify(copy).mismatches]
    assert f"{rel}: sheet sensitivity, cell {cell.coordinate}: shows {true * 2!r}, re-computed {true!r}" in lines
    others = [line for line in lines if "sheet sensitivity" not in line]
    assert others and all(".pdf: page " in line and "does not show this dossier's fingerprint line" in line for line in others)  # the seal's forgery held; the PDFs still show the old one

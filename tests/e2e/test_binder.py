"""The binder on small real PDFs (laid out by WeasyPrint as PDF/A-3b, as the build
lays them out): order, stamps, links, same bytes, still archival after binding,
stamping and attaching."""

from __future__ import annotations

import io

import pytest
from pypdf import PdfReader

from dossier.render.archival import PDF_VARIANT
from dossier.render.binder import BoundReport, bind, page_count, stamp_every_page
from tests.pdfa import archival_problems


def _pdf(body: str, variant: str | None = PDF_VARIANT) -> bytes:
    from weasyprint import HTML

    return HTML(string=f"<html><body>{body}</body></html>").write_pdf(pdf_variant=variant)


def _pages(n: int, word: str) -> str:
    return "".join(f'<p style="break-after: page">{word} {i}</p>' for i in range(1, n + 1))


@pytest.fixture(scope="module")
def parts() -> tuple[bytes, list[BoundReport], bytes]:
    front = _pdf('<p>front</p><p><a href="bind:report/beta">to beta</a> <a href="bind:signatures">to the end</a></p>')
    reports = [BoundReport("alpha", "Alpha", _pdf(_pages(2, "alpha"))), BoundReport("beta", "Beta", _pdf(_pages(3, "beta")))]
    back = _pdf("<p>back</p>")
    return front, reports, back


def test_pages_in_order_each_stamped(parts) -> None:  # noqa: ANN001
    front, reports, back = parts
    out = bind(front, reports, back, title="t", creator="ph-dossier test")
    reader = PdfReader(io.BytesIO(out))
    texts = [p.extract_text() for p in reader.pages]
    assert len(texts) == 1 + 2 + 3 + 1 == page_count(out)
    for word, n in (("front", 1), ("alpha 1", 2), ("alpha 2", 3), ("beta 1", 4), ("beta 3", 6), ("back", 7)):
        assert word in texts[n - 1]
    for n, t in enumerate(texts, start=1):
        assert f"dossier page {n} of 7" in t
    assert reader.metadata["/Title"] == "t"


def test_front_matter_links_go_to_the_first_page_of_their_target(parts) -> None:  # noqa: ANN001
    front, reports, back = parts
    reader = PdfReader(io.BytesIO(bind(front, reports, back, title="t", creator="c")))
    index = {p.indirect_reference.idnum: i for i, p in enumerate(reader.pages)}
    dests = sorted(index[ref.get_object()["/Dest"][0].idnum] for ref in reader.pages[0]["/Annots"])
    assert dests == [3, 6]  # beta starts on the fourth page, the back matter on the seventh


def test_same_parts_same_bytes(parts) -> None:  # noqa: ANN001
    front, reports, back = parts
    assert bind(front, reports, back, title="t", creator="c") == bind(front, reports, back, title="t", creator="c")


def test_a_link_to_a_report_not_bound_is_an_error() -> None:
    front = _pdf('<a href="bind:report/gamma">gamma</a>')
    with pytest.raises(ValueError, match="bind:report/gamma"):
        bind(front, [], _pdf("<p>back</p>"), title="t", creator="c")


def test_the_bound_pdf_declares_pdfa_3b_with_its_own_title(parts) -> None:  # noqa: ANN001
    front, reports, back = parts
    out = bind(front, reports, back, title="A dossier & co", creator="ph-dossier test")
    assert archival_problems(out) == []
    reader = PdfReader(io.BytesIO(out))
    assert reader.metadata["/Title"] == "A dossier & co"
    assert b"<rdf:li xml:lang=\"x-default\">A dossier &amp; co</rdf:li>" in reader.trailer["/Root"]["/Metadata"].get_object().get_data()


def test_parts_not_laid_out_as_pdfa_are_refused() -> None:
    with pytest.raises(ValueError, match="output intent"):
        bind(_pdf("<p>front</p>", None), [], _pdf("<p>back</p>", None), title="t", creator="c")


def test_stamping_and_attaching_keeps_the_pdf_archival(parts) -> None:  # noqa: ANN001
    from datetime import datetime, timezone

    front, reports, back = parts
    bound = bind(front, reports, back, title="t", creator="c")
    when = datetime(2026, 1, 1, tzinfo=timezone.utc)
    files = {"alpha.yaml": b"method:\n  id: alpha\n", "beta.yaml": b"method:\n  id: beta\n"}
    out = stamp_every_page(bound, "Dossier fingerprint 0123abcd", attachments=files, modified=when)
    assert out.startswith(bound)  # an incremental update: the bound PDF's bytes are kept as they were
    assert archival_problems(out) == []
    reader = PdfReader(io.BytesIO(out))
    assert {name: data[0] for name, data in reader.attachments.items()} == files
    for ef in reader.attachment_list:
        assert ef.pdf_object["/AFRelationship"] == "/Source" and ef.subtype == "/application/yaml"
        assert ef.modification_date == when
    assert all("Dossier fingerprint 0123abcd" in p.extract_text() for p in reader.pages)
    assert out == stamp_every_page(bound, "Dossier fingerprint 0123abcd", attachments=files, modified=when)


def test_the_checker_finds_what_a_plain_pdf_lacks() -> None:
    """The test helper itself: a PDF not laid out as PDF/A fails it, for the reasons it names."""
    problems = archival_problems(_pdf("<p>plain</p>", None))
    assert "no XMP metadata in the catalog" in problems

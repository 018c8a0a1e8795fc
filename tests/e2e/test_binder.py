"""The binder on small real PDFs (laid out by WeasyPrint): order, stamps, links, same bytes."""

from __future__ import annotations

import io

import pytest
from pypdf import PdfReader

from dossier.render.binder import BoundReport, bind, page_count, stamp_every_page


def _pdf(body: str) -> bytes:
    from weasyprint import HTML

    return HTML(string=f"<html><body>{body}</body></html>").write_pdf()


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


def test_a_page_stamped_twice_keeps_both_lines_and_a_repeated_line_is_stored_once(parts) -> None:  # noqa: ANN001
    """dossier.pdf is stamped twice (page numbers, then the fingerprint); each stamp draws a form XObject of its own."""
    front, reports, back = parts
    bound = bind(front, reports, back, title="t", creator="c")
    out = stamp_every_page(bound, "fingerprint 0123abcd")
    reader = PdfReader(io.BytesIO(out))
    for n, page in enumerate(reader.pages, start=1):
        text = page.extract_text()
        assert f"dossier page {n} of 7" in text and "fingerprint 0123abcd" in text, (n, text)
    forms = {ref.idnum for page in reader.pages for ref in page["/Resources"]["/XObject"].values()}
    assert len(forms) == 7 + 1  # one per page number, one fingerprint shared by every page
    assert stamp_every_page(bound, "fingerprint 0123abcd") == out

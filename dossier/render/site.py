"""Render a whole dossier in memory: every page, table, figure and PDF as
bytes under its relative path. Nothing is written here; the publish stage
writes the files (so that nothing reaches the disk unless everything
rendered).
"""

from __future__ import annotations

import json
import mimetypes
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from typing import TYPE_CHECKING, Any

from ..analysis.ledger import ledger_document, ledger_entries
from ..analysis.method import MethodAnalysis
from ..analysis.results import csv_tables, results_document
from ..chemistry import ACTIVITY_MODELS, CATALOGUE
from ..inputs.model import METHOD_FILE, Method
from ..inputs.substances import STATUS_MEANINGS, SubstanceTable, load_table
from .equations import EXACT_MODEL, all_equations, equation_svg
from .figures import FigureFile, method_figures
from .buildinfo import BuildInfo
from .html import render

if TYPE_CHECKING:
    from ..publish.diff import DossierDiff

__all__ = ["BuildInfo", "RefView", "shared_assets", "render_method", "method_pdf", "method_pdf_path", "dossier_pdf", "render_site", "OUTPUT_README", "references_for"]

OUTPUT_README = """# output/

`make demo` and `dossier build` write the dossier here. Everything in this
folder except this file is generated and ignored by git.
"""
"""The README.md every build writes at the top of the output (the same as the committed one)."""


@dataclass(frozen=True)
class RefView:
    """A reference as a page shows it."""

    anchor: str
    short: str
    citation: str
    kind: str
    doi: str | None
    document: str | None
    note: str


def references_for(method: Method, table: SubstanceTable, prefix: str = "") -> dict[str, RefView]:
    """Every reference the method's values cite: its own, and the table sources used."""
    out: dict[str, RefView] = {}
    for r in method.references:
        out[f"ref:{r.key}"] = RefView(f"{prefix}ref-{r.key}", r.key, r.citation, r.kind, r.doi, r.document, "cited by the method file")
    used = sorted({p.reference for s in method.solutions for c in s.components for p in c.pka if p.origin != METHOD_FILE})
    for key in used:
        src = table.sources[key]
        out[f"src:{key}"] = RefView(f"{prefix}src-{key}", key, src.citation, src.kind, src.doi, None, f"substance table; checked: {src.checked}")
    return out


@dataclass(frozen=True)
class LedgerRow:
    """A ledger entry as the pages show it."""

    id: str
    value: float
    unit: str
    quantity: str
    equation: str
    equation_href: str


@dataclass(frozen=True)
class LedgerView:
    entries: tuple[LedgerRow, ...]


def _ledger_view(a: MethodAnalysis) -> LedgerView:
    rows = []
    for e in ledger_entries(a):
        anchor = f"shortcut-{e.equation}" if e.equation in CATALOGUE else ("exact" if e.equation in ("exact-equilibrium", "van-t-hoff", "unit-conversion") else "analyses")
        rows.append(LedgerRow(e.id, e.value, e.unit, e.quantity, e.equation, f"../../calculations.html#{anchor}"))
    return LedgerView(tuple(rows))


def _page_context(a: MethodAnalysis, figures: tuple[FigureFile, ...], table: SubstanceTable, prefix: str = "") -> dict[str, Any]:
    by_pair: dict[tuple[str, str], list[FigureFile]] = {}
    for f in figures:
        by_pair.setdefault((f.solution, f.shortcut), []).append(f)
    return {"a": a, "refs": references_for(a.method, table, prefix), "figures": by_pair, "ledger": _ledger_view(a)}


def _common() -> dict[str, Any]:
    eq = {e.id.removeprefix("shortcut-"): e for e in all_equations() if e.id.startswith("shortcut-")}
    return {"eq": eq, "assumptions": {k: v.assumptions for k, v in CATALOGUE.items()}}


def _asset(name: str) -> bytes:
    return resources.files("dossier.templates").joinpath(name).read_bytes()


_ROOT_URL = "file:///ph-dossier/"


def _resolve(url: str, files: dict[str, bytes]) -> tuple[bytes, str]:
    if url.startswith(_ROOT_URL):
        rel = url[len(_ROOT_URL):].split("#")[0].split("?")[0]
        if rel in files:
            return files[rel], mimetypes.guess_type(rel)[0] or "application/octet-stream"
    raise ValueError(f"not part of this dossier: {url}")


def _fetcher(files: dict[str, bytes]) -> Any:
    """A WeasyPrint URL fetcher that serves the dossier's own files and nothing else."""
    import weasyprint

    if hasattr(weasyprint, "URLFetcher"):  # WeasyPrint 66 and later
        from weasyprint.urls import URLFetcherResponse

        class DossierFetcher(weasyprint.URLFetcher):
            def fetch(self, url: str, headers: Any = None) -> URLFetcherResponse:
                if url.startswith("data:"):  # embedded in a figure (the error map's raster)
                    return super().fetch(url, headers)
                body, mime = _resolve(url, files)
                return URLFetcherResponse(url, body, {"Content-Type": mime})

        return DossierFetcher(fail_on_errors=True, allowed_protocols=("file", "data"))

    def fetch(url: str, *args: Any, **kwargs: Any) -> dict[str, Any]:
        if url.startswith("data:"):
            return weasyprint.default_url_fetcher(url)
        body, mime = _resolve(url, files)
        return {"string": body, "mime_type": mime, "redirected_url": url}

    return fetch


def _document(html: str, base: str, files: dict[str, bytes]) -> Any:
    """A laid-out WeasyPrint document from HTML whose relative URLs resolve,
    under ``base``, to ``files`` only (no network)."""
    from weasyprint import HTML  # imported lazily: slow to import

    return HTML(string=html, base_url=_ROOT_URL + base, url_fetcher=_fetcher(files)).render()


def _pdf(html: str, base: str, files: dict[str, bytes]) -> bytes:
    """A PDF from HTML (see :func:`_document`)."""
    return _document(html, base, files).write_pdf()


def shared_assets() -> dict[str, bytes]:
    """Files every page needs: README, stylesheets, equation images (a new dict
    each call; drawn once per process)."""
    return dict(_shared_assets())


@lru_cache(maxsize=1)
def _shared_assets() -> dict[str, bytes]:
    files: dict[str, bytes] = {"README.md": OUTPUT_README.encode()}
    files["assets/site.css"] = _asset("site.css")
    files["assets/pdf.css"] = _asset("pdf.css")
    files["assets/favicon.svg"] = _asset("favicon.svg")
    for e in all_equations():
        files[f"assets/equations/{e.id}.svg"] = equation_svg(e.latex)
    return files


def render_method(a: MethodAnalysis, build: BuildInfo) -> tuple[dict[str, bytes], tuple[FigureFile, ...]]:
    """One method's files: page, results, tables, figures (its PDF: :func:`method_pdf`)."""
    table = load_table()
    mid = a.method.id
    here = f"methods/{mid}/"
    files: dict[str, bytes] = {here + "results.json": (json.dumps(results_document(a), indent=2, ensure_ascii=False) + "\n").encode()}
    for name, text in csv_tables(a).items():
        files[here + name] = text.encode()
    figures = method_figures(a)
    for f in figures:
        files[f"{here}figures/{f.stem}.svg"] = f.svg
        files[f"{here}figures/{f.stem}.png"] = f.png
    ctx = _page_context(a, figures, table)
    files[here + "index.html"] = render("method.html", root="../../", build=build, **ctx, **_common()).encode()
    files[here + "ledger.json"] = (json.dumps(ledger_document(a), indent=2, ensure_ascii=False) + "\n").encode()
    files[here + "ledger.html"] = render("ledger.html", root="../../", build=build, a=a, ledger=ctx["ledger"]).encode()
    return files, figures


def method_pdf_path(method_id: str) -> str:
    """Where a method's PDF is in the dossier."""
    return f"methods/{method_id}/{method_id}.pdf"


def method_pdf(a: MethodAnalysis, figures: tuple[FigureFile, ...], build: BuildInfo, files: dict[str, bytes]) -> dict[str, bytes]:
    """The PDF of one method ({path: bytes}); ``files`` must hold its figures and the assets."""
    mid = a.method.id
    html = render("pdf_method.html", root="../../", build=build, **_page_context(a, figures, load_table(), prefix=f"{mid}-"), **_common())
    return {method_pdf_path(mid): _pdf(html, f"methods/{mid}/", files)}


def dossier_pdf(analyses: tuple[MethodAnalysis, ...], reports: dict[str, bytes], build: BuildInfo, files: dict[str, bytes]) -> dict[str, bytes]:
    """The PDF of the whole dossier ({path: bytes}), bound from the method PDFs.

    The dossier's front matter (cover, contents, verdicts at a glance) and
    back matter (signatures) are laid out here, once; the method reports
    (``reports``: method id → PDF bytes) are bound in between as they are
    (:mod:`~dossier.render.binder`). The contents name dossier pages, so the
    front matter is laid out again in the rare case that its own length
    differs from the first guess.
    """
    from .binder import BoundReport, bind, page_count

    lengths = [page_count(reports[a.method.id]) for a in analyses]
    n_front = 2  # cover and contents, the usual case
    for _ in range(4):
        starts, page = {}, n_front + 1
        for a, n in zip(analyses, lengths):
            starts[a.method.id] = page
            page += n
        doc = _document(render("pdf_dossier.html", root="", build=build, analyses=analyses, starts=starts, signatures_page=page, **_common()), "", files)
        split = next(i for i, pg in enumerate(doc.pages) if "dossier-signatures" in pg.anchors)
        if split == n_front:
            break
        n_front = split
    else:  # pragma: no cover - the length of the front matter does not depend on three-digit page numbers
        raise RuntimeError("the dossier's front matter did not settle to a fixed length")
    front = doc.copy(doc.pages[:split]).write_pdf()
    back = doc.copy(doc.pages[split:]).write_pdf()
    bound = bind(front, [BoundReport(a.method.id, a.method.title, reports[a.method.id]) for a in analyses], back,
                 title="pH calculation dossier", creator=f"ph-dossier {build.version}")
    return {"dossier.pdf": bound}


def render_site(analyses: tuple[MethodAnalysis, ...], build: BuildInfo, diff: DossierDiff | None = None) -> dict[str, bytes]:
    """The pages about the whole dossier: index, references, calculation methods,
    provenance, and the changes since a previous build when ``diff`` is given."""
    table = load_table()
    out: dict[str, bytes] = {}
    counts = {k: sum(s.verdict.status == k for a in analyses for sa in a.solutions for s in sa.shortcuts) for k in ("pass", "conditional", "fail")}
    out["index.html"] = render("index.html", root="", build=build, analyses=analyses, counts=counts, has_changes=diff is not None).encode()
    if diff is not None:
        out["changes.html"] = render("changes.html", root="", build=build, diff=diff).encode()
    out["references.html"] = render(
        "references.html", root="", build=build,
        method_refs=[(a, references_for(a.method, table, prefix=f"{a.method.id}-")) for a in analyses],
        table_sources=list(table.sources.values()), status_meanings=STATUS_MEANINGS,
    ).encode()
    out["calculations.html"] = render(
        "calculations.html", root="", build=build, exact_model=EXACT_MODEL,
        activity_models=list(ACTIVITY_MODELS.values()), shortcuts=list(CATALOGUE.values()),
    ).encode()
    out["provenance.html"] = render("provenance.html", root="", build=build, analyses=analyses).encode()
    return out

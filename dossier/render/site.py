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
from collections.abc import Sequence
from importlib import resources
from typing import TYPE_CHECKING, Any

from ..analysis.ledger import Ledger
from ..analysis.method import MethodAnalysis
from ..analysis.verdicts import VerdictStatus
from .results import csv_tables, results_document
from ..chemistry import ACTIVITY_MODELS, CATALOGUE
from ..inputs.model import METHOD_FILE, Method
from ..inputs.substances import STATUS_MEANINGS, SubstanceTable
from ..layout import LAYOUT
from .equations import EXACT_MODEL, all_equations, equation_svg
from .buildinfo import BuildInfo, RecordedSignature
from .context import BuildContext
from .html import render

if TYPE_CHECKING:
    from ..analysis.changes import DossierDiff
    from .figures import FigureFile

__all__ = ["BuildInfo", "BuildContext", "RefView", "shared_assets", "data_files", "render_method", "render_dossier", "references_for"]


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


def _ledger_view(ledger: Ledger) -> LedgerView:
    rows = []
    for e in ledger.entries:
        anchor = f"shortcut-{e.equation}" if e.equation in CATALOGUE else ("exact" if e.equation in ("exact-equilibrium", "van-t-hoff", "unit-conversion") else "analyses")
        rows.append(LedgerRow(e.id, e.value, e.unit, e.quantity, e.equation, f"{LAYOUT.root_of(LAYOUT.ledger_page(ledger.method.id))}{LAYOUT.calculations}#{anchor}"))
    return LedgerView(tuple(rows))


def _page_context(a: MethodAnalysis, figures: tuple[FigureFile, ...], ledger: Ledger, table: SubstanceTable, prefix: str = "") -> dict[str, Any]:
    by_pair: dict[tuple[str, str], list[FigureFile]] = {}
    for f in figures:
        by_pair.setdefault((f.solution, f.shortcut), []).append(f)
    return {"a": a, "refs": references_for(a.method, table, prefix), "figures": by_pair, "ledger": _ledger_view(ledger)}


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
    """A PDF/A-3b from HTML (see :func:`_document` and :mod:`~dossier.render.archival`)."""
    from .archival import PDF_VARIANT

    return _document(html, base, files).write_pdf(pdf_variant=PDF_VARIANT)


def shared_assets() -> dict[str, bytes]:
    """Files every page needs: stylesheets, icon, equation images (a new dict
    each call; drawn once per process). A dossier holds only what the build
    made: no README or other placeholder of the output folder is copied in."""
    return dict(_shared_assets())


@lru_cache(maxsize=1)
def _shared_assets() -> dict[str, bytes]:
    files: dict[str, bytes] = {LAYOUT.site_css: _asset("site.css"), LAYOUT.pdf_css: _asset("pdf.css"), LAYOUT.favicon: _asset("favicon.svg")}
    for e in all_equations():
        files[LAYOUT.equation(e.id)] = equation_svg(e.latex)
    return files


def _json(document: object) -> bytes:
    return (json.dumps(document, indent=2, ensure_ascii=False) + "\n").encode()


def data_files(a: MethodAnalysis, table_sha256: str) -> dict[str, bytes]:
    """A method's data files: results.json, its CSV tables (headers with units) and the
    same tables as one workbook, under their dossier paths (also what ``dossier verify``
    compares the published ones with)."""
    from .workbooks import with_units, workbook

    mid = a.method.id
    files: dict[str, bytes] = {LAYOUT.results(mid): _json(results_document(a, table_sha256))}
    tables = {name: with_units(text) for name, text in csv_tables(a).items()}
    for name, text in tables.items():
        files[LAYOUT.table(mid, name)] = text.encode()
    files[LAYOUT.workbook(mid)] = workbook(tables)
    return files


def render_method(a: MethodAnalysis, ledger: Ledger, ctx: BuildContext) -> dict[str, bytes]:
    """Every file of one method under its dossier path.

    Always its results, CSV tables, figures and ledger; with ``ctx.site`` its
    page and ledger page; with ``ctx.pdf`` its PDF too.
    """
    mid = a.method.id
    files = data_files(a, ctx.table.sha256)
    from .figure_robustness import robustness_figures  # matplotlib, imported where figures are drawn (not by verify)
    from .figures import method_figures

    figures = method_figures(a) + robustness_figures(a) if ctx.figures else ()
    for f in figures:
        files[LAYOUT.figure(mid, f.stem, "svg")] = f.svg
    files[LAYOUT.ledger(mid)] = _json(ledger.to_document())
    if not ctx.site:
        return files
    page = LAYOUT.method_page(mid)
    view = _page_context(a, figures, ledger, ctx.table)
    files[page] = render("method.html", root=LAYOUT.root_of(page), build=ctx.info, **view, **_common()).encode()
    files[LAYOUT.ledger_page(mid)] = render("ledger.html", root=LAYOUT.root_of(page), build=ctx.info, a=a, ledger=view["ledger"]).encode()
    if ctx.pdf:
        html = render("pdf_method.html", root=LAYOUT.root_of(page), build=ctx.info, **_page_context(a, figures, ledger, ctx.table, prefix=f"{mid}-"), **_common())
        files[LAYOUT.method_pdf(mid)] = _pdf(html, LAYOUT.method_folder(mid), {**shared_assets(), **files})
    return files


def render_dossier(analyses: tuple[MethodAnalysis, ...], reports: dict[str, bytes], ctx: BuildContext, diff: DossierDiff | None = None,
                   recorded: Sequence[RecordedSignature] = ()) -> dict[str, bytes]:
    """The files about the whole dossier: shared assets, index, references,
    calculation methods, provenance, the changes since a previous build when
    ``diff`` is given, and (with ``ctx.pdf``) the dossier PDF bound from the
    method PDFs in ``reports`` (method id → bytes). ``recorded``: the
    signatures found beside the output before this build (listed on the
    provenance page and the dossier's signature page as not applying to it)."""
    files = {**shared_assets(), **_dossier_pages(analyses, ctx, diff, recorded)}
    if ctx.pdf:
        files[LAYOUT.dossier_pdf] = _dossier_pdf(analyses, reports, ctx, files, recorded, diff)
    return files


def _dossier_pdf(analyses: tuple[MethodAnalysis, ...], reports: dict[str, bytes], ctx: BuildContext, files: dict[str, bytes],
                 recorded: Sequence[RecordedSignature], diff: DossierDiff | None = None) -> bytes:
    """The PDF of the whole dossier, bound from the method PDFs.

    The dossier's front matter (cover, contents, verdicts at a glance) and
    back matter (signatures) are laid out here, once; the method reports
    are bound in between as they are (:mod:`~dossier.render.binder`). The
    contents name dossier pages, so the front matter is laid out again in
    the rare case that its own length differs from the first guess.
    """
    from .archival import PDF_VARIANT
    from .binder import BoundReport, bind

    bound = [BoundReport(a.method.id, a.method.title, reports[a.method.id]) for a in analyses]
    lengths = [r.pages for r in bound]
    n_front = 2  # cover and contents, the usual case
    for _ in range(4):
        starts, page = {}, n_front + 1
        for a, n in zip(analyses, lengths):
            starts[a.method.id] = page
            page += n
        doc = _document(render("pdf_dossier.html", root="", build=ctx.info, analyses=analyses, starts=starts, signatures_page=page, recorded=recorded, diff=diff, **_common()), "", files)
        split = next(i for i, pg in enumerate(doc.pages) if "dossier-signatures" in pg.anchors)
        if split == n_front:
            break
        n_front = split
    else:  # pragma: no cover - the length of the front matter does not depend on three-digit page numbers
        raise RuntimeError("the dossier's front matter did not settle to a fixed length")
    front = doc.copy(doc.pages[:split]).write_pdf(pdf_variant=PDF_VARIANT)
    back = doc.copy(doc.pages[split:]).write_pdf(pdf_variant=PDF_VARIANT)
    return bind(front, bound, back,
                title="pH calculation dossier", creator=f"ph-dossier {ctx.info.version}")


def _dossier_pages(analyses: tuple[MethodAnalysis, ...], ctx: BuildContext, diff: DossierDiff | None,
                   recorded: Sequence[RecordedSignature]) -> dict[str, bytes]:
    """Index, references, calculation methods, provenance, and the changes page when ``diff`` is given."""
    table, build = ctx.table, ctx.info
    out: dict[str, bytes] = {}
    counts = {k: sum(s.verdict.status == k for a in analyses for sa in a.solutions for s in sa.shortcuts) for k in VerdictStatus}
    out[LAYOUT.index] = render("index.html", root="", build=build, analyses=analyses, counts=counts, has_changes=diff is not None).encode()
    if diff is not None:
        out[LAYOUT.changes] = render("changes.html", root="", build=build, diff=diff).encode()
    out[LAYOUT.references] = render(
        "references.html", root="", build=build,
        method_refs=[(a, references_for(a.method, table, prefix=f"{a.method.id}-")) for a in analyses],
        table_sources=list(table.sources.values()), status_meanings=STATUS_MEANINGS,
    ).encode()
    out[LAYOUT.calculations] = render(
        "calculations.html", root="", build=build, exact_model=EXACT_MODEL,
        activity_models=list(ACTIVITY_MODELS.values()), shortcuts=list(CATALOGUE.values()),
    ).encode()
    out[LAYOUT.provenance] = render("provenance.html", root="", build=build, analyses=analyses, recorded=recorded).encode()
    return out

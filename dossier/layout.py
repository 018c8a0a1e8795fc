"""The layout of a built dossier: every path in it, in one place.

No other module spells a path of the dossier: the application layer writes
files where :data:`LAYOUT` says, the pages link to them through it (it is a
global of the templates), and the audit reads them back through it. Paths
are relative to the dossier's root, with forward slashes. This module
imports nothing.

Examples
--------
>>> LAYOUT.method_page("boric-rinse")
'methods/boric-rinse/index.html'
>>> LAYOUT.figure("boric-rinse", "rinse-weak-acid-square-root-error-map", "svg")
'methods/boric-rinse/figures/rinse-weak-acid-square-root-error-map.svg'
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Layout", "LAYOUT"]


@dataclass(frozen=True)
class Layout:
    """Where each file of a dossier lives (relative paths)."""

    manifest: str = "manifest.json"
    index: str = "index.html"
    dossier_pdf: str = "dossier.pdf"
    dossier_workbook: str = "dossier.xlsx"
    changes: str = "changes.html"
    references: str = "references.html"
    calculations: str = "calculations.html"
    provenance: str = "provenance.html"
    site_css: str = "assets/site.css"
    pdf_css: str = "assets/pdf.css"
    favicon: str = "assets/favicon.svg"
    methods_folder: str = "methods"

    # ---------------------------------------------------------------- one method
    def method_folder(self, method_id: str) -> str:
        """The folder of one method, with a trailing slash."""
        return f"{self.methods_folder}/{method_id}/"

    def method_page(self, method_id: str) -> str:
        return self.method_folder(method_id) + "index.html"

    def method_pdf(self, method_id: str) -> str:
        return self.method_folder(method_id) + f"{method_id}.pdf"

    def results(self, method_id: str) -> str:
        return self.method_folder(method_id) + "results.json"

    def ledger(self, method_id: str) -> str:
        return self.method_folder(method_id) + "ledger.json"

    def ledger_page(self, method_id: str) -> str:
        return self.method_folder(method_id) + "ledger.html"

    def method_source(self, method_id: str) -> str:
        """The method file as it was built, published beside its page (and attached to its PDF)."""
        return self.method_folder(method_id) + f"{method_id}.yaml"

    def workbook(self, method_id: str) -> str:
        """The method's tables as one spreadsheet, beside its results.json."""
        return self.method_folder(method_id) + f"{method_id}.xlsx"

    def table(self, method_id: str, name: str) -> str:
        """A CSV table of a method (``name`` with its extension)."""
        return self.method_folder(method_id) + name

    def figure(self, method_id: str, stem: str, extension: str) -> str:
        return self.method_folder(method_id) + f"figures/{stem}.{extension}"

    # ---------------------------------------------------------------- beside the dossier
    @staticmethod
    def signatures_folder(dossier_name: str) -> str:
        """The folder of a dossier's signatures, beside it in the same parent folder
        (signing changes no byte of the dossier; a rebuild does not remove them).

        >>> LAYOUT.signatures_folder("output")
        'output.signatures'
        """
        return f"{dossier_name}.signatures"

    # ---------------------------------------------------------------- shared
    def equation(self, equation_id: str) -> str:
        """An equation drawn as SVG."""
        return f"assets/equations/{equation_id}.svg"

    def method_of(self, path: str) -> str | None:
        """The method id a path belongs to, or None for a dossier-wide file.

        >>> LAYOUT.method_of("methods/boric-rinse/results.json")
        'boric-rinse'
        >>> LAYOUT.method_of("index.html") is None
        True
        """
        parts = path.split("/")
        if len(parts) >= 3 and parts[0] == self.methods_folder:
            return parts[1]
        return None

    @staticmethod
    def root_of(path: str) -> str:
        """The relative URL from the page at ``path`` back to the dossier's root.

        >>> Layout.root_of("methods/boric-rinse/index.html")
        '../../'
        >>> Layout.root_of("index.html")
        ''
        """
        return "../" * path.count("/")


LAYOUT = Layout()
"""The layout every dossier has."""

"""What the stages after the analysis need to know about the build, passed
explicitly: the substance table the inputs were checked against, the
analysis settings, the build information, and what to make."""

from __future__ import annotations

from dataclasses import dataclass

from ..analysis.method import AnalysisSettings
from ..inputs.substances import SubstanceTable
from .buildinfo import BuildInfo

__all__ = ["BuildContext"]


@dataclass(frozen=True)
class BuildContext:
    """The build's context (frozen; built once by the application layer).

    Attributes
    ----------
    table : SubstanceTable
        The substance table the method files were loaded with: the one the
        references page shows and the manifest records.
    settings : AnalysisSettings
    info : BuildInfo
        Tool version, build time, Python and library versions.
    pdf : bool
        Make the PDFs.
    site : bool
        Make the pages (False: results, tables, figures and ledgers only).
    figures : bool
        Draw the figures.
    """

    table: SubstanceTable
    settings: AnalysisSettings
    info: BuildInfo
    pdf: bool = True
    site: bool = True
    figures: bool = True

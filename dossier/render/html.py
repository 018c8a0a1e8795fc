"""HTML pages from the Jinja2 templates in templates/ (one environment,
autoescape on, undefined names are errors). No HTML is built in Python:
this module only prepares values and filters for the templates.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import resources
from pathlib import Path
from typing import Any

import jinja2
from markdown_it import MarkdownIt
from markupsafe import Markup

from .. import display
from ..analysis.verdicts import VerdictStatus
from ..layout import LAYOUT
from ..inputs.formulas import subscripted
from ..inputs.units import format_concentration
from .buildinfo import STAMP_PLACEHOLDER
from .prose import format_percent, prose, status_words

__all__ = ["environment", "render", "markdown", "templates_dir", "reference_key", "CAUTIONS", "STATUS_MARK"]

CAUTIONS = (
    "A calculated pH supports and does not replace measurement with a calibrated pH meter.",
    "These results need review by qualified staff under the laboratory's quality system before use.",
    "Local regulations, pharmacopoeial requirements and licensed practice take precedence over anything computed or drafted here.",
)
"""The cautions every report carries (DESIGN §9)."""

STATUS_MARK = {VerdictStatus.PASS: "✓", VerdictStatus.FAIL: "✗", VerdictStatus.CONDITIONAL: "◐"}
"""A shape for each verdict, so that it never depends on colour alone."""


def templates_dir() -> Path:
    """The templates folder (``templates/`` of the project, installed as ``dossier.templates``)."""
    return Path(str(resources.files("dossier.templates")))


@lru_cache(maxsize=1)
def _md() -> MarkdownIt:
    # CommonMark with raw HTML off; markdown-it refuses javascript:, vbscript:,
    # file: and non-image data: links by itself.
    return MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})


def markdown(text: str) -> Markup:
    """Markdown to HTML (raw HTML shown as text)."""
    return Markup(_md().render(text or ""))


def reference_key(pka_value: Any) -> str:
    """Key of a pKa value's reference in the page's reference list (table sources and
    the method's own references live in separate name spaces)."""
    return ("src:" if pka_value.origin == "substance table" else "ref:") + pka_value.reference


@lru_cache(maxsize=1)
def environment() -> jinja2.Environment:
    """The one template environment."""
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir())),
        autoescape=jinja2.select_autoescape(["html", "xml"], default_for_string=True),
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )
    env.filters.update(
        {
            "markdown": markdown,
            # every displayed number goes through dossier.display (U+2212 minus)
            "num": display.fixed,
            "signed": display.signed,
            "sig": display.significant,
            "g": display.plain,
            "pct": format_percent,
            "conc": format_concentration,
            "mark": lambda status: STATUS_MARK.get(status, "?"),
            "words": status_words,
            "refkey": reference_key,
            "formula": subscripted,
        }
    )
    env.globals["cautions"] = CAUTIONS
    env.globals["layout"] = LAYOUT  # every path of the dossier, relative to its root
    env.globals["LAYOUT"] = LAYOUT
    env.globals["prose"] = prose
    env.globals["stamp"] = STAMP_PLACEHOLDER
    return env


def render(template: str, **context: Any) -> str:
    """Render one template with the given values."""
    return environment().get_template(template).render(**context)

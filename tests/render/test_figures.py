"""Every figure kind of every demo method, drawn for real with matplotlib (Agg and SVG).

What a reader needs from a figure, checked on the drawn artists:

- text is text: no tick label, title or legend entry carries math markup
  (``$``) or a backslash, in the Agg-drawn figure or in the SVG ``<text>``;
  the SVG keeps its text as ``<text>`` elements, not glyph outlines;
- log-axis ticks read as powers of ten with superscript digits (10⁻¹⁰);
- nothing is drawn outside the figure, so nothing is cut off;
- the tick labels of an axis do not overlap or run together;
- legends stand outside the plotting area, so they never cover a curve.

The analyses use few Monte-Carlo draws and coarse maps: the figures' layout,
not the numbers, is under test here.
"""

from __future__ import annotations

import re

import math
import xml.etree.ElementTree as ET
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

import matplotlib.pyplot as plt
import pytest
from matplotlib.axes import Axes
from matplotlib.axis import Axis
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.legend import Legend
from matplotlib.text import Text
from matplotlib.transforms import Bbox

from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.inputs.loader import load_method
from dossier.inputs.substances import load_table
from dossier.render.figure_robustness import ROBUSTNESS_KIND, draw_robustness_figure
from dossier.render.figures import FIGURE_KINDS, draw_figure, figure_kinds, figure_svg

DEMO = sorted((Path(__file__).resolve().parents[2] / "methods").glob("*.yaml"))
SVG_NS = "{http://www.w3.org/2000/svg}"
SUBSTANCE_IDS = [sid for sid in load_table().substances if "-" in sid]
"""Table ids that differ from a name a reader would use (``phosphoric-acid``)."""
SLACK_PX = 0.5
"""Rounding allowance when comparing extents [px at the figure's dpi]."""
MIN_GAP_PX = 4.0
"""Smallest gap between neighbouring tick labels [px at 100 dpi]: about one space at 9 pt; closer,
labels read as one word (common practice, no source)."""


@dataclass
class Drawn:
    """One figure after an Agg draw, with its SVG."""

    name: str
    fig: Figure
    svg: bytes


@pytest.fixture(scope="module", params=DEMO, ids=lambda p: p.stem)
def drawn(request: pytest.FixtureRequest) -> Iterator[list[Drawn]]:
    """Every figure of one demo method: drawn by Agg, and written as SVG."""
    load = load_method(request.param)
    assert load.method is not None, [str(p) for p in load.problems]
    analysis = analyse_method(load.method, AnalysisSettings(draws=2000, map_pka=31, map_conc=31))
    limit = analysis.method.criteria.max_ph_error
    out = []
    for sa in analysis.solutions:
        for s in sa.shortcuts:
            kinds = figure_kinds(s)
            # every kind, but the pKa figures only for a shortcut that uses a pKa
            assert set(kinds) == set(FIGURE_KINDS) - ({"error-vs-pka", "error-map"} if s.validity.pka_step is None else set())
            for kind in kinds:
                fig, _, _ = draw_figure(kind, sa, s, limit)
                svg = figure_svg(fig)  # closes the figure in pyplot: draw it again on a canvas of its own
                FigureCanvasAgg(fig).draw()
                out.append(Drawn(f"{request.param.stem}/{sa.spec.id}/{s.id}/{kind}", fig, svg))
    for sa in analysis.solutions:  # the robustness figure: one per solution
        fig, _, _ = draw_robustness_figure(sa, limit)
        svg = figure_svg(fig)
        FigureCanvasAgg(fig).draw()
        out.append(Drawn(f"{request.param.stem}/{sa.spec.id}/{ROBUSTNESS_KIND}", fig, svg))
    yield out
    for d in out:
        plt.close(d.fig)


def _texts(fig: Figure) -> list[Text]:
    """The text artists a draw shows: visible, non-empty, and no label of a tick outside the view."""
    tick_labels = {id(t.label1) for ax in fig.axes for axis in (ax.xaxis, ax.yaxis) for t in [*axis.get_major_ticks(), *axis.get_minor_ticks()]}
    shown = {id(t) for ax in fig.axes for axis in (ax.xaxis, ax.yaxis) for t in _shown_tick_labels(axis)}
    return [t for t in fig.findobj(Text) if t.get_visible() and t.get_text().strip() and (id(t) in shown or id(t) not in tick_labels)]


def _shown_tick_labels(axis: Axis) -> list[Text]:
    """Tick labels that the last draw showed: visible, non-empty, with their tick inside the view."""
    scale = axis.get_transform()  # compare in the axis' scale (log10 on a log axis)
    lo, hi = sorted(scale.transform(axis.get_view_interval()))
    pad = 1e-9 * (hi - lo)
    ticks = [*axis.get_major_ticks(), *axis.get_minor_ticks()]
    return [
        t.label1 for t in ticks
        if t.get_visible() and t.label1.get_visible() and t.label1.get_text().strip()
        and lo - pad <= float(scale.transform([t.get_loc()])[0]) <= hi + pad
    ]


def _axes(fig: Figure) -> list[Axes]:
    return [ax for ax in fig.axes if ax.get_visible()]


def _inside(inner: Bbox, outer: Bbox) -> bool:
    return (
        inner.x0 >= outer.x0 - SLACK_PX and inner.y0 >= outer.y0 - SLACK_PX
        and inner.x1 <= outer.x1 + SLACK_PX and inner.y1 <= outer.y1 + SLACK_PX
    )


def test_no_text_carries_math_markup_or_a_backslash(drawn: list[Drawn]) -> None:
    for d in drawn:
        bad = [t.get_text() for t in _texts(d.fig) if "$" in t.get_text() or "\\" in t.get_text()]
        assert not bad, f"{d.name}: {bad[:4]}"


def test_svg_text_stays_text_without_markup(drawn: list[Drawn]) -> None:
    for d in drawn:
        root = ET.fromstring(d.svg)
        texts = ["".join(e.itertext()) for e in root.iter(f"{SVG_NS}text")]
        assert len(texts) >= 6, f"{d.name}: the SVG carries its text as outlines, not <text>"
        bad = [t for t in texts if "$" in t or "\\" in t]
        assert not bad, f"{d.name}: {bad[:4]}"


def test_figure_text_names_substances_and_writes_minus_signs(drawn: list[Drawn]) -> None:
    """The words of the pages hold in the figures too: a substance's name, not its table id
    ("phosphoric-acid"), and U+2212 before a negative number, never a hyphen-minus."""
    for d in drawn:
        texts = [t.get_text() for t in _texts(d.fig)]
        hyphen = [t for t in texts if re.search(r"(?<![\w])-\d", t)]
        assert not hyphen, f"{d.name}: {hyphen[:4]}"
        ids = [t for t in texts for sid in SUBSTANCE_IDS if re.search(rf"(?<![\w-]){re.escape(sid)}(?![\w-])", t)]
        assert not ids, f"{d.name}: {ids[:4]}"


def test_log_axis_ticks_read_as_powers_of_ten() -> None:
    """10⁻¹⁰ … 10⁰ with superscript digits and the minus sign U+2212 (ISO 80000-2 writes powers so)."""
    # drawn separately from the fixture: one method is enough to see the labels' form
    load = load_method(DEMO[0])
    assert load.method is not None
    analysis = analyse_method(load.method, AnalysisSettings(draws=500, map_pka=11, map_conc=11))
    sa = analysis.solutions[0]
    fig, _, _ = draw_figure("error-vs-concentration", sa, sa.shortcuts[0], analysis.method.criteria.max_ph_error)
    fig.canvas.draw()
    axis = fig.axes[0].xaxis
    labels = [t.get_text() for t in _shown_tick_labels(axis)]
    plt.close(fig)
    assert len(labels) >= 3, labels
    lo, hi = sorted(axis.get_view_interval())
    for text in labels:
        assert text.startswith("10"), labels
        exponent = text[2:].translate(str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-"))
        assert exponent.lstrip("-").isdigit(), labels
        assert math.log10(lo) - 1e-9 <= int(exponent) <= math.log10(hi) + 1e-9, (labels, lo, hi)
        assert "-" not in text, "a superscript minus (U+207B) or U+2212, never a hyphen-minus"
    assert any("⁻" in t for t in labels), labels


def test_nothing_is_drawn_outside_the_figure(drawn: list[Drawn]) -> None:
    for d in drawn:
        renderer = d.fig.canvas.get_renderer()
        frame = d.fig.bbox
        outside = [t.get_text() for t in _texts(d.fig) if not _inside(t.get_window_extent(renderer), frame)]
        outside += [f"legend {i}" for i, leg in enumerate(d.fig.findobj(Legend)) if not _inside(leg.get_window_extent(renderer), frame)]
        outside += [f"axes {i}" for i, ax in enumerate(_axes(d.fig)) if not _inside(ax.get_tightbbox(renderer), frame)]
        assert not outside, f"{d.name}: drawn outside the figure ({frame.width:.0f}×{frame.height:.0f} px): {outside[:4]}"


def test_tick_labels_do_not_overlap(drawn: list[Drawn]) -> None:
    for d in drawn:
        renderer = d.fig.canvas.get_renderer()
        for ax in _axes(d.fig):
            for axis, lo_edge, hi_edge in ((ax.xaxis, "x0", "x1"), (ax.yaxis, "y0", "y1")):
                labels = [(t.get_window_extent(renderer), t.get_text()) for t in _shown_tick_labels(axis)]
                boxes = sorted(labels, key=lambda b: getattr(b[0], lo_edge))
                for (a, ta), (b, tb) in zip(boxes, boxes[1:], strict=False):
                    gap = getattr(b, lo_edge) - getattr(a, hi_edge)
                    assert gap >= MIN_GAP_PX, f"{d.name}: tick labels {ta!r} and {tb!r} are {gap:.1f} px apart"


def test_legends_stand_outside_every_plotting_area(drawn: list[Drawn]) -> None:
    for d in drawn:
        renderer = d.fig.canvas.get_renderer()
        for leg in d.fig.findobj(Legend):
            box = leg.get_window_extent(renderer)
            covered = [ax.get_title() or ax.get_ylabel() for ax in _axes(d.fig) if box.overlaps(ax.get_window_extent(renderer))]
            assert not covered, f"{d.name}: a legend lies over the plotting area of {covered}"

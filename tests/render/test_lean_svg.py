"""The lean SVG (:func:`dossier.render.figures.lean_svg`) draws exactly what
matplotlib's SVG draws: every figure kind of a demo method is opened in a real
headless Chromium, as matplotlib wrote it and made lean, and the two
screenshots must be the same pixel for pixel. The lean file has no ``style``
attributes, no style sheet and no group that carries only an id."""

from __future__ import annotations

import io
from pathlib import Path
from xml.etree import ElementTree as ET

import matplotlib.pyplot as plt
import pytest

from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.inputs.loader import load_method
from dossier.render.figure_robustness import draw_robustness_figure
from dossier.render.figures import draw_figure, figure_kinds, lean_svg, matplotlib_svg

from ..conftest import require_executable

ROOT = Path(__file__).resolve().parents[2]
# phosphate: an error map (a raster inside the SVG), hatched contribution bars, dashed
# lines, rotated axis labels, and the titration curve of the robustness section
METHOD = ROOT / "methods" / "phosphate-buffer-hh.yaml"
SVG_NS = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def pairs() -> list[tuple[str, bytes, bytes]]:
    """(name, matplotlib's SVG, lean SVG) of every figure of the method."""
    load = load_method(METHOD)
    assert load.method is not None, [str(p) for p in load.problems]
    analysis = analyse_method(load.method, AnalysisSettings(draws=2000, map_pka=31, map_conc=31))
    out = []
    for sa in analysis.solutions:
        figures = [(f"{s.id}/{kind}", draw_figure(kind, sa, s, analysis.method.criteria.max_ph_error)[0]) for s in sa.shortcuts for kind in figure_kinds(s)]
        figures.append((f"{sa.spec.id}/robustness", draw_robustness_figure(sa, analysis.method.criteria.max_ph_error)[0]))
        for name, fig in figures:
            raw = matplotlib_svg(fig)
            plt.close(fig)
            out.append((name, raw, lean_svg(raw)))
    assert len({n.rsplit("/", 1)[-1] for n, _, _ in out}) >= 6, "expected every figure kind"
    return out


def test_lean_svg_has_no_css_and_no_bare_groups(pairs: list[tuple[str, bytes, bytes]]) -> None:
    for name, raw, lean in pairs:
        assert b"style=" in raw, name  # matplotlib's own writes CSS: the test below compares against it
        root = ET.fromstring(lean)
        assert not [e for e in root.iter() if "style" in e.attrib], name
        assert root.find(f".//{SVG_NS}style") is None, name
        assert not [e for e in root.iter(f"{SVG_NS}g") if set(e.attrib) <= {"id"}], name
        assert root.get("stroke-linejoin") == "round" and root.get("stroke-linecap") == "butt", name
        assert len(lean) < len(raw), name
        assert lean_svg(raw) == lean, f"{name}: not deterministic"


@pytest.mark.browser
def test_lean_svg_draws_the_same_pixels_in_chromium(pairs: list[tuple[str, bytes, bytes]]) -> None:
    chromium = require_executable("chromium", "figures are compared in a real browser")
    from PIL import Image, ImageChops
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=chromium, args=["--no-sandbox", "--disable-gpu", "--disable-background-networking"])
        try:
            page = browser.new_page(viewport={"width": 900, "height": 700})
            for name, raw, lean in pairs:
                shots = []
                for svg in (raw, lean):
                    text = svg.decode("utf-8")
                    inline = text[text.index("<svg"):]  # without the XML declaration and DOCTYPE
                    page.set_content(f'<html><body style="margin:0">{inline}</body></html>')
                    shots.append(Image.open(io.BytesIO(page.screenshot(full_page=True))).convert("RGB"))
                assert shots[0].size == shots[1].size, name
                assert ImageChops.difference(*shots).getbbox() is None, f"{name}: the lean SVG draws differently"
        finally:
            browser.close()


def test_lean_svg_bytes_do_not_depend_on_the_namespace_registry(pairs: list[tuple[str, bytes, bytes]]) -> None:
    # Other libraries (the PDF and workbook writers) register XML prefixes of their own in
    # ElementTree's process-wide registry; a figure's bytes must not change with them.
    saved = dict(ET._namespace_map)
    try:
        ET.register_namespace("s", "http://www.w3.org/2000/svg")
        ET.register_namespace("xl", "http://www.w3.org/1999/xlink")
        for name, raw, lean in pairs:
            assert lean_svg(raw) == lean, name
            assert lean.startswith(b'<?xml version="1.0" encoding="utf-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"'), name
    finally:
        ET._namespace_map.clear()
        ET._namespace_map.update(saved)

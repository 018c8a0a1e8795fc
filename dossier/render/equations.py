"""Equations as SVG images (matplotlib mathtext, text drawn as paths), so
that they read the same on screen and in the PDF with no network and no
script: nothing is fetched at view time."""

from __future__ import annotations

import io
from dataclasses import dataclass

from .. import __version__
from ..chemistry import ACTIVITY_MODELS, CATALOGUE
from .memo import Memo

__all__ = ["Equation", "EXACT_MODEL", "equation_svg", "all_equations"]


@dataclass(frozen=True)
class Equation:
    """An equation: stable id, LaTeX (mathtext subset), and a text for screen readers."""

    id: str
    latex: str
    alt: str


EXACT_MODEL = (
    Equation(
        "charge-balance",
        r"h + C_b + \sum_k C_k \sum_{j<r_k} (r_k - j)\,\alpha_{kj} = \frac{K_w'}{h} + C_a + \sum_k C_k \sum_{j>r_k} (j - r_k)\,\alpha_{kj}",
        "Charge balance as a proton condition: h plus strong base plus the protons taken up equals Kw' over h plus strong acid plus the protons given off.",
    ),
    Equation(
        "fractions",
        r"\alpha_{kj} = \frac{D_{kj}}{\sum_i D_{ki}},\quad D_{k0} = 1,\quad D_{kj} = D_{k,j-1}\,\frac{K'_{kj}}{h}",
        "Fraction of component k in state j, from the conditional constants.",
    ),
    Equation(
        "conditional-constants",
        r"\log K'_{kj} = \log K_{kj} + 2 f(I)\,(z_{k0} - j),\quad \log K_w' = \log K_w - 2 f(I),\quad \log_{10}\gamma_z = z^2 f(I)",
        "Conditional constants from the thermodynamic ones and the activity coefficient of a monovalent ion.",
    ),
    Equation(
        "ionic-strength",
        r"I = I_{bg} + \frac{1}{2}\left(h + \frac{K_w'}{h} + C_a + C_b + \sum_k C_k\left(|z_{k0} - r_k| + \sum_j \alpha_{kj}(z_{k0} - j)^2\right)\right)",
        "Ionic strength of the solution, iterated to self-consistency.",
    ),
    Equation(
        "ph-scales",
        r"\mathrm{pH} = -\log_{10}(\gamma_H\,h),\qquad \mathrm{pH}_c = -\log_{10} h",
        "pH on the activity scale and on the concentration scale.",
    ),
    Equation(
        "van-t-hoff",
        r"\mathrm{p}K(T) = \mathrm{p}K(T_0) + \frac{\Delta H^\circ}{R\ln 10}\left(\frac{1}{T} - \frac{1}{T_0}\right) - \frac{\Delta C_p^\circ}{R\ln 10}\left(\frac{T_0}{T} - 1 + \ln\frac{T}{T_0}\right)",
        "Van 't Hoff equation with a constant heat-capacity change.",
    ),
)


def equation_svg(latex: str, fontsize: float = 13.0) -> bytes:
    """One equation as a deterministic SVG, drawn once (matplotlib's mathtext; the 27
    of the catalogue take about 1 s), and kept for the next build (:mod:`.memo`)."""
    return _DRAWN((latex, fontsize))


def _draw(key: tuple[str, float]) -> bytes:
    latex, fontsize = key
    import matplotlib  # imported here: verify and the catalogue need the equations' text, not matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    with matplotlib.rc_context({"svg.hashsalt": "ph-dossier", "svg.fonttype": "path", "mathtext.fontset": "dejavusans"}):
        fig = Figure(figsize=(0.01, 0.01))
        fig.text(0.0, 0.0, f"${latex}$", fontsize=fontsize, color="#1b2a3a")
        buf = io.BytesIO()
        fig.savefig(buf, format="svg", bbox_inches="tight", pad_inches=0.04, transparent=True,
                    metadata={"Date": None, "Creator": f"ph-dossier {__version__}"})
    return buf.getvalue()


def all_equations() -> tuple[Equation, ...]:
    """The exact model, every activity model and every shortcut of the catalogue."""
    out = list(EXACT_MODEL)
    out += [Equation(f"activity-{m.id}", m.equation, f"{m.title}.") for m in ACTIVITY_MODELS.values()]
    out += [Equation(f"shortcut-{a.id}", a.equation, f"{a.title}.") for a in CATALOGUE.values()]
    return tuple(out)


_DRAWN = Memo("equations", _draw)

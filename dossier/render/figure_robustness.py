"""The robustness figure of a solution: pH against strong acid or base added.

One figure per solution (not per shortcut), drawn in the style of
:mod:`dossier.render.figures` (plain-text ticks, U+2212 minus, substance
names, legend under the plotting area). The curve is the titration curve of
:class:`~dossier.analysis.robustness.TitrationCurve`; the band is the exact pH
as stated ± the acceptance limit, and the two open triangles are the small
additions of the robustness table.
"""

from __future__ import annotations

import matplotlib
import matplotlib.pyplot as plt
import numpy as np
from matplotlib.figure import Figure

from ..analysis.method import MethodAnalysis, SolutionAnalysis
from ..display import fixed, signed, significant
from .figures import _RC, MINUS, PALETTE, FigureFile, _arrange, _legend_below, _plain_axis, _short, figure_svg

__all__ = ["ROBUSTNESS_KIND", "draw_robustness_figure", "robustness_figures"]

ROBUSTNESS_KIND = "titration-curve"
"""The figure kind (and the end of its file stem): ``SOLUTION-titration-curve``."""


def _names(sa: SolutionAnalysis) -> str:
    """The solution's substances by name, each once: ``phosphoric acid``, ``acetic acid + ammonia``."""
    names = list(dict.fromkeys(_short(c.name) for c in sa.spec.components))
    return " + ".join(names) if names else "strong acid and base"


def draw_robustness_figure(sa: SolutionAnalysis, limit: float) -> tuple[Figure, str, str]:
    """pH against strong base added (negative: strong acid) for one solution.

    Parameters
    ----------
    sa : SolutionAnalysis
        A solution with its robustness result.
    limit : float
        The acceptance limit [pH], drawn as a band around the exact pH.

    Returns
    -------
    (Figure, str, str)
        The open figure, its alt text and its caption.
    """
    r = sa.robustness
    assert r is not None
    with matplotlib.rc_context(_RC):
        x = r.curve.added_mol_per_l * 1e3
        add = r.strong_addition_mol_per_l * 1e3
        fig, ax = plt.subplots()
        ax.axhspan(r.ph - limit, r.ph + limit, color=PALETTE["band"], zorder=0, label=f"exact pH ±{limit:g} (acceptance limit)")
        ax.axvline(0.0, color=PALETTE["ink"], lw=0.6, zorder=1)
        ax.plot(x, r.curve.ph, color=PALETTE["blue"], lw=1.8, label="exact pH")
        ax.plot([0.0], [r.ph], marker="o", ms=7, mfc="white", mec=PALETTE["ink"], mew=1.5, ls="none", label="as stated", zorder=5)
        pts = ([-add, add], [r.ph + r.delta_ph_strong_acid, r.ph + r.delta_ph_strong_base])
        ax.plot(*pts, marker="^", ms=7, mfc="white", mec=PALETTE["orange"], mew=1.5, ls="none",
                label=f"{add:g} mmol/L strong acid or base added", zorder=5)
        _plain_axis(ax.xaxis)
        _plain_axis(ax.yaxis)
        ax.set_xlim(float(x[0]), float(x[-1]))
        ax.set_xlabel(f"strong base added / (mmol/L); {MINUS}: strong acid added")
        ax.set_ylabel("pH")
        ax.set_title(f"{sa.spec.id}: {_names(sa)}, pH against strong acid or base added")
        _arrange(fig, below=_legend_below(fig, ax))
    lo, hi = float(x[0]), float(x[-1])
    alt = (
        f"pH of solution {sa.spec.id} ({_names(sa)}) against strong base added from {fixed(lo, 1)} to {fixed(hi, 1)} mmol/L "
        f"(negative values: strong acid). The exact pH as stated is {fixed(r.ph, 3)}; {add:g} mmol/L of strong acid moves it by "
        f"{signed(r.delta_ph_strong_acid, 3)}, of strong base by {signed(r.delta_ph_strong_base, 3)}; the pH runs from "
        f"{fixed(float(np.min(r.curve.ph)), 2)} to {fixed(float(np.max(r.curve.ph)), 2)} over the plot; "
        f"buffer capacity {significant(r.buffer_capacity_mol_per_l_per_ph, 3)} mol/(L·pH)."
    )
    caption = "pH against strong acid or base added, with the acceptance band around the exact pH and the small additions of the robustness table."
    return fig, alt, caption


def robustness_figures(analysis: MethodAnalysis) -> tuple[FigureFile, ...]:
    """The robustness figure of every solution, as SVG bytes (drawn once, :func:`figure_svg`).

    The figures' ``shortcut`` is empty: they belong to the solution.
    """
    limit = analysis.method.criteria.max_ph_error
    out = []
    for sa in analysis.solutions:
        if sa.robustness is None:
            continue
        fig, alt, caption = draw_robustness_figure(sa, limit)
        out.append(FigureFile(f"{sa.spec.id}-{ROBUSTNESS_KIND}", ROBUSTNESS_KIND, sa.spec.id, "", figure_svg(fig), alt, caption))
    return tuple(out)

"""Figures of the analyses (matplotlib), as deterministic SVG and PNG bytes.

Five kinds per claimed shortcut: error against concentration (working range
shaded, acceptance band, nominal point), error against pKa at several
concentrations, the pKa × log C error map with the acceptance contour and
the method's point, the Monte-Carlo histogram of the error, and the ranking
of the inputs' contributions.

The palette is our own and colour-blind safe (blue/orange contrast, no
red/green pair); every series also differs in line style or marker, so the
plots stay readable printed in grey. Same inputs give byte-identical files:
fixed SVG hash salt, no dates; text stays text in the SVG (DejaVu Sans, the
font the site and the PDFs use), which WeasyPrint draws 2.7× faster than
glyph paths.
"""

from __future__ import annotations

import io
from dataclasses import dataclass

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.colors import LinearSegmentedColormap, Normalize  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

from .. import __version__  # noqa: E402
from ..analysis.method import MethodAnalysis, ShortcutAnalysis, SolutionAnalysis  # noqa: E402
from ..inputs.units import format_concentration  # noqa: E402

__all__ = ["PALETTE", "FIGURE_KINDS", "FigureFile", "draw_figure", "method_figures", "figure_bytes"]

PALETTE = {
    "ink": "#1b2a3a",
    "blue": "#2f6690",
    "orange": "#c8671d",
    "teal": "#2f8f80",
    "plum": "#7b4b94",
    "grey": "#7d838c",
    "band": "#d9e4ee",
    "range": "#f2e2c4",
}
"""The dossier's colours: ink for text and axes, four series colours, fills."""

SERIES = [("blue", "-", "o"), ("orange", "--", "s"), ("teal", "-.", "^"), ("plum", ":", "D"), ("grey", (0, (5, 1, 1, 1)), "v")]
ERROR_MAP = LinearSegmentedColormap.from_list("ph-dossier-error", ["#1d4e74", "#2f6690", "#f7f7f7", "#c8671d", "#8a4212"])

_RC = {
    "text.parse_math": False,  # text from method files is shown as written, never read as mathtext
    "svg.hashsalt": "ph-dossier",
    "svg.fonttype": "none",
    "font.family": "DejaVu Sans",
    "font.size": 9,
    "axes.edgecolor": PALETTE["ink"],
    "axes.labelcolor": PALETTE["ink"],
    "xtick.color": PALETTE["ink"],
    "ytick.color": PALETTE["ink"],
    "axes.titlesize": 10,
    "axes.grid": True,
    "grid.color": "#e3e6ea",
    "grid.linewidth": 0.6,
    "legend.frameon": False,
    "figure.dpi": 100,
}


@dataclass(frozen=True)
class FigureFile:
    """One figure: file stem, SVG and PNG bytes, alt text and caption."""

    stem: str
    kind: str
    solution: str
    shortcut: str
    svg: bytes
    png: bytes
    alt: str
    caption: str


def figure_bytes(fig: Figure) -> tuple[bytes, bytes]:
    """(SVG, PNG) of a figure, deterministic; closes the figure."""
    svg, png = io.BytesIO(), io.BytesIO()
    with matplotlib.rc_context(_RC):
        fig.savefig(svg, format="svg", metadata={"Date": None, "Creator": f"ph-dossier {__version__}"})
        fig.savefig(png, format="png", dpi=120, metadata={"Software": f"ph-dossier {__version__}"})
    plt.close(fig)
    return svg.getvalue(), png.getvalue()


_MARGINS = {"left": 0.11, "right": 0.98, "bottom": 0.13, "top": 0.92}
"""Fixed margins (instead of tight_layout, which costs a fifth of the plotting time)."""


def _band(ax, limit: float) -> None:  # noqa: ANN001
    ax.axhspan(-limit, limit, color=PALETTE["band"], zorder=0, label=f"acceptance band ±{limit:g} pH")
    for y in (-limit, limit):
        ax.axhline(y, color=PALETTE["blue"], lw=0.8, ls=(0, (4, 2)), zorder=1)
    ax.axhline(0.0, color=PALETTE["ink"], lw=0.6, zorder=1)


def _ylim(limit: float, focus: float) -> tuple[float, float]:
    span = max(3.0 * limit, 1.3 * focus)
    span = min(span, max(3.0, 3.0 * limit))
    return -span, span


def _error_vs_concentration(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    v = s.validity
    sw = v.concentration_sweep
    fig, ax = plt.subplots(figsize=(6.4, 3.8))
    _band(ax, limit)
    lo, hi = v.working_range
    ax.axvspan(lo, hi, facecolor=PALETTE["range"], edgecolor=PALETTE["orange"], hatch="///", lw=0.0, alpha=0.6, zorder=0, label="working range")
    for n, (name, values) in enumerate(sw.parts.items(), start=1):
        color, ls, _ = SERIES[n % len(SERIES)]
        ax.plot(sw.x, values, color=PALETTE[color], ls=ls, lw=1.0, label=f"part: {name}")
    ax.plot(sw.x, sw.error, color=PALETTE["blue"], lw=1.8, label=f"{s.id} − exact")
    c0 = sa.spec.components[0].concentration
    ax.plot([c0], [s.error], marker="o", ms=7, mfc="white", mec=PALETTE["ink"], mew=1.5, ls="none", label="nominal", zorder=5)
    ax.set_xscale("log")
    ax.set_ylim(*_ylim(limit, v.max_abs_error))
    ax.set_xlabel(f"total concentration of {sa.spec.components[0].substance} (whole solution scaled) / (mol/L)")
    ax.set_ylabel("error, shortcut pH − exact pH")
    ax.set_title(f"{sa.spec.id}: {s.title}")
    ax.legend(fontsize=7, loc="best")
    fig.subplots_adjust(**_MARGINS)
    holds = "; ".join(f"{format_concentration(a)} – {format_concentration(b)}" for a, b in v.holds_within_working_range) or "nowhere"
    alt = (
        f"Error of {s.id} against concentration for solution {sa.spec.id}, from {format_concentration(v.concentration_span[0])} "
        f"to {format_concentration(v.concentration_span[1])}. Within the working range {format_concentration(lo)} – {format_concentration(hi)} "
        f"the largest |error| is {v.max_abs_error:.3f} pH; the limit is ±{limit:g} pH; it holds within the working range for: {holds}."
    )
    return fig, alt, "Error against concentration, with the working range (hatched) and the acceptance band."


def _error_vs_pka(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    cv = s.curves
    assert cv is not None
    fig, ax = plt.subplots(figsize=(6.4, 3.8))
    _band(ax, limit)
    for i, c in enumerate(cv.concentrations):
        color, ls, _ = SERIES[i % len(SERIES)]
        ax.plot(cv.pka, cv.error[i], color=PALETTE[color], ls=ls, lw=1.5, label=format_concentration(float(c)))
    comp, step = s.validity.pka_step
    nominal = sa.spec.components[comp].pka[step].thermodynamic
    ax.axvline(nominal, color=PALETTE["ink"], lw=1.0, ls=":", label=f"pKa{step + 1} = {nominal:.3f}")
    ax.set_ylim(-5.0 * limit, 5.0 * limit)
    ax.set_xlabel(f"pKa{step + 1} of {sa.spec.components[comp].substance} (25 °C, I = 0)")
    ax.set_ylabel("error, shortcut pH − exact pH")
    ax.set_title(f"{sa.spec.id}: error against pKa at several concentrations")
    ax.legend(fontsize=7, title="total of first component", title_fontsize=7, loc="best")
    fig.subplots_adjust(**_MARGINS)
    ranges = "; ".join(f"{iv.low:.2f} – {iv.high:.2f}" for iv in s.validity.pka_intervals) or "none"
    alt = f"Error of {s.id} against pKa{step + 1} for {len(cv.concentrations)} concentrations; at the nominal concentration it holds for pKa {ranges}."
    return fig, alt, "Error against pKa at 1/100, 1/10, 1, 10 and 100 times the nominal concentration (where allowed)."


def _error_map(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    mp = s.map
    assert mp is not None
    fig, ax = plt.subplots(figsize=(6.4, 4.4))
    vmax = 3.0 * limit
    img = ax.imshow(
        np.clip(mp.error, -vmax, vmax), origin="lower", aspect="auto", cmap=ERROR_MAP, norm=Normalize(-vmax, vmax),
        extent=(mp.log_c[0], mp.log_c[-1], mp.pka[0], mp.pka[-1]), interpolation="nearest",
    )
    cs = ax.contour(mp.log_c, mp.pka, mp.error, levels=[-limit, limit], colors=[PALETTE["ink"]], linestyles=["--", "-"], linewidths=1.2)
    ax.clabel(cs, fmt={-limit: f"−{limit:g}", limit: f"+{limit:g}"}, fontsize=7)
    ax.plot([mp.nominal[1]], [mp.nominal[0]], marker="*", ms=13, mfc="white", mec=PALETTE["ink"], mew=1.2, ls="none", label="this method")
    lo, hi = s.validity.working_range
    ax.plot(np.log10([lo, hi]), [mp.nominal[0]] * 2, color=PALETTE["ink"], lw=3, solid_capstyle="butt", label="working range")
    cb = fig.colorbar(img, ax=ax, extend="both")
    cb.set_label(f"error / pH (clipped at ±{vmax:g})")
    comp, step = s.validity.pka_step
    ax.set_xlabel(f"log10(total of {sa.spec.components[0].substance} / (mol/L))")
    ax.set_ylabel(f"pKa{step + 1} (25 °C, I = 0)")
    ax.set_title(f"{sa.spec.id}: {s.id}, error map (solid +{limit:g}, dashed −{limit:g})")
    ax.legend(fontsize=7, loc="lower left")
    ax.grid(False)
    fig.subplots_adjust(left=0.1, right=0.97, bottom=0.12, top=0.92)
    inside = float(np.mean(np.abs(mp.error) <= limit)) * 100
    alt = (
        f"Map of the error of {s.id} over pKa{step + 1} from {mp.pka[0]:.1f} to {mp.pka[-1]:.1f} and log10 concentration from "
        f"{mp.log_c[0]:.1f} to {mp.log_c[-1]:.1f}; the error is within ±{limit:g} pH on {inside:.0f} % of the map. "
        f"The method's point is at pKa {mp.nominal[0]:.2f}, log10 c {mp.nominal[1]:.2f}, where the error is {s.error:+.3f} pH."
    )
    return fig, alt, "Error over pKa and concentration; contours at the acceptance limits; the star is the method."


def _histogram(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    mc = sa.monte_carlo
    d = mc.errors[s.id]
    counts, edges = np.array(d.histogram[0]), np.array(d.histogram[1])
    fig, ax = plt.subplots(figsize=(6.4, 3.4))
    ax.stairs(counts / counts.sum() / np.diff(edges), edges, fill=True, color=PALETTE["band"], ec=PALETTE["blue"], lw=1.0, label="Monte-Carlo error")
    lo, hi = float(edges[0]), float(edges[-1])
    zoom = (hi - lo) < 0.1 * (max(hi, limit) - min(lo, -limit))
    if zoom:  # a narrow distribution far from the limits: show it, and say where the limits are
        pad = 0.15 * (hi - lo) + 1e-6
        ax.set_xlim(lo - pad, hi + pad)
    for x, ls in ((-limit, "--"), (limit, "-")):
        if not zoom or lo - 0.15 * (hi - lo) <= x <= hi + 0.15 * (hi - lo):
            ax.axvline(x, color=PALETTE["orange"], ls=ls, lw=1.5, label=f"limit {x:+g} pH")
    ax.axvline(d.coverage[0], color=PALETTE["ink"], ls=":", lw=1.0, label="95 % coverage interval")
    ax.axvline(d.coverage[1], color=PALETTE["ink"], ls=":", lw=1.0)
    p = mc.p_exceed[s.id]
    ax.set_xlabel("error, shortcut pH − exact pH" + (f"  (the limits ±{limit:g} pH lie outside this window)" if zoom else ""))
    ax.set_ylabel("probability density / (1/pH)")
    ax.set_title(f"{sa.spec.id}: {s.id}, {mc.draws:,} draws, P(|error| > {limit:g}) = {p:.3g}")
    ax.legend(fontsize=7, loc="best")
    fig.subplots_adjust(left=0.11, right=0.98, bottom=0.15, top=0.9)
    alt = (
        f"Histogram of the error of {s.id} over {mc.draws:,} Monte-Carlo draws: mean {d.mean:+.4f} pH, standard deviation {d.u:.4f}, "
        f"95 % coverage interval {d.coverage[0]:+.4f} to {d.coverage[1]:+.4f} pH; probability beyond ±{limit:g} pH {p:.3g}."
    )
    return fig, alt, "Distribution of the shortcut's error under the stated input uncertainties."


def _contributions(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    assert s.gum is not None
    fig, axes = plt.subplots(1, 2, figsize=(7.6, 3.2), sharey=False)
    text = []
    for ax, g, title in ((axes[0], sa.gum, "exact pH"), (axes[1], s.gum, f"error of {s.id}")):
        items = [c for c in g.contributions][:8][::-1]
        y = np.arange(len(items))
        ax.barh(y, [c.contribution for c in items], color=PALETTE["blue"] if title == "exact pH" else PALETTE["orange"],
                hatch=None if title == "exact pH" else "//", edgecolor=PALETTE["ink"], lw=0.5)
        ax.set_yticks(y, [c.label for c in items], fontsize=7)
        ax.set_xlabel("contribution / pH (input moved by ±u)")
        ax.set_title(f"{title}\nu = {g.u:.3g} pH", fontsize=9)
        text.append(f"{title}: " + ", ".join(f"{c.label} {c.contribution:.2g}" for c in g.contributions[:3]))
    fig.tight_layout()
    alt = "Ranking of the inputs by their contribution to the uncertainty. " + "; ".join(text) + "."
    return fig, alt, "One-at-a-time ranking: half the change when each input moves alone by ± its standard uncertainty."


_KINDS = {
    "error-vs-concentration": _error_vs_concentration,
    "error-vs-pka": _error_vs_pka,
    "error-map": _error_map,
    "error-histogram": _histogram,
    "contributions": _contributions,
}
FIGURE_KINDS = tuple(_KINDS)
"""The figure kinds drawn for every claimed shortcut, in page order."""


def draw_figure(kind: str, sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """Draw one figure of a claimed shortcut with the dossier's style.

    Parameters
    ----------
    kind : str
        One of :data:`FIGURE_KINDS`.
    sa, s : SolutionAnalysis, ShortcutAnalysis
        The solution and its claimed shortcut.
    limit : float
        The acceptance limit [pH].

    Returns
    -------
    (Figure, str, str)
        The open figure, its alt text and its caption.
    """
    with matplotlib.rc_context(_RC):
        return _KINDS[kind](sa, s, limit)


def method_figures(analysis: MethodAnalysis) -> tuple[FigureFile, ...]:
    """Every figure of a method's analysis, as SVG and PNG bytes."""
    limit = analysis.method.criteria.max_ph_error
    out = []
    for sa in analysis.solutions:
        for s in sa.shortcuts:
            for kind in FIGURE_KINDS:
                fig, alt, caption = draw_figure(kind, sa, s, limit)
                svg, png = figure_bytes(fig)
                out.append(FigureFile(f"{sa.spec.id}-{s.id}-{kind}", kind, sa.spec.id, s.id, svg, png, alt, caption))
    return tuple(out)

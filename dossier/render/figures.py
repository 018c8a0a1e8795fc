"""Figures of the analyses (matplotlib), as deterministic SVG bytes.

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

Each figure is laid out once (:func:`draw_figure`) and written once, as SVG
(:func:`figure_svg`): the pages and the PDFs show the SVG, and a second
format would cost a second full drawing (a PNG took longer than the SVG).
The error map's dense layer is a raster image inside the SVG; its contours,
text and axes stay vectors. The SVG is then made lean (:func:`lean_svg`):
styles as presentation attributes and no empty groups, which draws the same
and costs WeasyPrint less to draw into the PDFs.

Text is plain Unicode throughout: mathtext is off, so that text from method
files shows as written, and tick labels come from our own formatters
(:func:`power_of_ten`, :class:`PlainTicks`: 10⁻¹⁰, 2×10⁻⁵, −0.05), never
from matplotlib's mathtext ones. Legends stand under the plotting area, never
over a curve, and each figure is sized around its plotting area so that
nothing is cut off.
"""

from __future__ import annotations

import io
from dataclasses import dataclass
from xml.etree import ElementTree as ET
from xml.sax.saxutils import escape, quoteattr

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402
from matplotlib.colors import LinearSegmentedColormap, Normalize  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.ticker import Formatter, FuncFormatter, LogLocator, MaxNLocator, NullFormatter  # noqa: E402

from .. import __version__  # noqa: E402
from ..analysis.method import MethodAnalysis, ShortcutAnalysis, SolutionAnalysis  # noqa: E402
from ..display import fixed, signed, significant  # noqa: E402
from ..inputs.units import format_concentration  # noqa: E402

__all__ = ["PALETTE", "FIGURE_KINDS", "FigureFile", "draw_figure", "method_figures", "figure_svg", "matplotlib_svg", "lean_svg", "power_of_ten", "plain_number", "PlainTicks"]

PALETTE = {
    "ink": "#1b2a3a",
    "blue": "#2f6690",
    "orange": "#c8671d",
    "teal": "#2f8f80",
    "plum": "#7b4b94",
    "grey": "#7d838c",
    "band": "#d9e4ee",
    "range": "#f2e2c4",
    "outside": "#c9ccd1",
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
    """One figure: file stem, SVG bytes, alt text and caption."""

    stem: str
    kind: str
    solution: str
    shortcut: str
    svg: bytes
    alt: str
    caption: str


def figure_svg(fig: Figure) -> bytes:
    """The SVG of a figure drawn by :func:`draw_figure`, deterministic; closes the figure.

    The one place figures are written: every figure of the dossier goes
    through here, drawn once by the SVG renderer.
    """
    svg = matplotlib_svg(fig)
    plt.close(fig)
    return lean_svg(svg)


def matplotlib_svg(fig: Figure) -> bytes:
    """The SVG matplotlib writes of ``fig`` (deterministic), before :func:`lean_svg`; the figure stays open."""
    svg = io.BytesIO()
    with matplotlib.rc_context(_RC):
        fig.savefig(svg, format="svg", metadata={"Date": None, "Creator": f"ph-dossier {__version__}"})
    return svg.getvalue()


_SVG_NS = "http://www.w3.org/2000/svg"
_PREFIXES = {_SVG_NS: "", "http://www.w3.org/1999/xlink": "xlink", "http://purl.org/dc/elements/1.1/": "dc",
             "http://creativecommons.org/ns#": "cc", "http://www.w3.org/1999/02/22-rdf-syntax-ns#": "rdf",
             "http://www.w3.org/XML/1998/namespace": "xml"}
"""The namespaces of matplotlib's SVG, with the prefixes :func:`lean_svg` writes them with."""


def lean_svg(svg: bytes) -> bytes:
    """The same drawing in fewer, simpler SVG nodes.

    matplotlib writes every property as a ``style`` attribute (CSS, which
    WeasyPrint parses anew on each element), wraps each artist in a group that
    carries only an ``id``, and sets the line joins and caps with a style
    sheet rule ``* { … }``. Here each style declaration becomes the
    presentation attribute of the same name, groups with nothing but an
    ``id`` give their children to their parent, and the style sheet's
    declarations move to the root element, whose presentation attributes
    every element inherits unless it sets its own — as it did when the rule
    set them and the element's ``style`` overrode it (SVG 1.1, 6.4: any CSS
    rule outranks a presentation attribute, so the rule must not stay). The
    no-op ``rotate(-0 …)`` transforms of horizontal text go too. The picture is
    unchanged; WeasyPrint writes a report in about 0.84 of the time
    (docs/performance.md). Deterministic: same input, same bytes.
    """
    root = ET.fromstring(svg)
    svg_tag, style_tag, group_tag = f"{{{_SVG_NS}}}svg", f"{{{_SVG_NS}}}style", f"{{{_SVG_NS}}}g"
    if root.tag != svg_tag:  # pragma: no cover - matplotlib always writes an svg root
        raise ValueError("not an SVG document")
    for defs in root.findall(f"{{{_SVG_NS}}}defs"):
        for sheet in defs.findall(style_tag):
            body = (sheet.text or "").strip()
            if not (body.startswith("*{") and body.endswith("}") and "{" not in body[2:]):  # pragma: no cover - matplotlib's one rule
                raise ValueError(f"unexpected style sheet in a figure: {body!r}")
            for name, value in _declarations(body[2:-1]):
                root.set(name, value)
            defs.remove(sheet)
        if len(defs) == 0:
            root.remove(defs)

    def lean(parent: ET.Element) -> None:
        children: list[ET.Element] = []
        for child in list(parent):
            lean(child)
            style = child.attrib.pop("style", None)
            for name, value in _declarations(style or ""):
                child.set(name, value)
            if child.get("transform", "").startswith("rotate(-0 "):
                del child.attrib["transform"]
            if child.tag == group_tag and set(child.attrib) <= {"id"}:
                children.extend(child)
            else:
                children.append(child)
        parent[:] = children

    lean(root)
    return _xml(root)


def _xml(root: ET.Element) -> bytes:
    """``root`` as an XML document, with the prefixes of :data:`_PREFIXES`.

    Written here rather than by ``ElementTree.tostring``, whose prefixes come
    from a registry that any other module (WeasyPrint's, the workbook
    writer's) may change, which made the same figure's bytes depend on what
    else the process had done.
    """

    def name(qualified: str) -> str:
        if not qualified.startswith("{"):
            return qualified
        uri, local = qualified[1:].split("}", 1)
        if uri not in _PREFIXES:
            raise ValueError(f"unexpected namespace in a figure: {uri}")
        return f"{_PREFIXES[uri]}:{local}" if _PREFIXES[uri] else local

    used = {qualified[1:].split("}", 1)[0] for e in root.iter() for qualified in (e.tag, *e.attrib) if qualified.startswith("{")}
    parts = ['<?xml version="1.0" encoding="utf-8"?>\n']

    def write(e: ET.Element, declarations: str = "") -> None:
        attributes = "".join(f" {name(k)}={quoteattr(v)}" for k, v in e.attrib.items())
        parts.append(f"<{name(e.tag)}{declarations}{attributes}")
        if len(e) == 0 and not e.text:
            parts.append("/>")
        else:
            parts.append(">" + escape(e.text or ""))
            for child in e:
                write(child)
            parts.append(f"</{name(e.tag)}>")
        parts.append(escape(e.tail or ""))

    write(root, "".join(f' xmlns{":" + _PREFIXES[uri] if _PREFIXES[uri] else ""}="{uri}"' for uri in sorted(used, key=_PREFIXES.get) if uri != "http://www.w3.org/XML/1998/namespace"))
    return "".join(parts).encode("utf-8")


def _declarations(css: str) -> list[tuple[str, str]]:
    """``name: value`` pairs of a CSS declaration list (no shorthand, no comments: matplotlib's own)."""
    out = []
    for declaration in css.split(";"):
        name, sep, value = declaration.partition(":")
        if sep:
            out.append((name.strip(), value.strip()))
    return out


_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")
MINUS = "\u2212"
"""The minus sign (U+2212) of printed numbers; a hyphen-minus is not one."""


def power_of_ten(x: float, pos: int | None = None) -> str:
    """Plain-text label of a positive number as a power of ten.

    A tick formatter for log axes that keeps text as text: superscript
    digits and the superscript minus (U+207B) instead of mathtext markup.

    Parameters
    ----------
    x : float
        The tick value; zero, negative or non-finite values get no label.
    pos : int, optional
        Tick position (unused; the formatter signature of matplotlib).

    Returns
    -------
    str
        ``"10⁻¹⁰"`` for 1e-10, ``"2×10⁻³"`` for 2e-3, ``"10⁰"`` for 1.

    Examples
    --------
    >>> power_of_ten(1e-10), power_of_ten(2e-3), power_of_ten(1.0)
    ('10⁻¹⁰', '2×10⁻³', '10⁰')
    """
    if not (np.isfinite(x) and x > 0):
        return ""
    exponent = int(np.floor(np.log10(x) + 1e-9))
    mantissa = float(f"{x / 10.0**exponent:.3g}")
    power = "10" + str(exponent).translate(_SUPERSCRIPT)
    return power if mantissa == 1.0 else f"{mantissa:g}×{power}"


def plain_number(x: float, pos: int | None = None) -> str:
    """One number in plain text for a title or a legend entry: −0.05, 0.0002, 3×10⁻⁵.

    (Axes use :class:`PlainTicks`, which gives every label of an axis one style.)

    Parameters
    ----------
    x : float
        The number.
    pos : int, optional
        Unused (kept so that it also serves as a matplotlib tick formatter).

    Returns
    -------
    str
        Up to four significant digits; below 10⁻⁴ in magnitude (except zero)
        and from 10⁴ up as a multiple of a power of ten; the minus sign is U+2212.

    Examples
    --------
    >>> plain_number(-0.05), plain_number(0.0002), plain_number(3e-5), plain_number(0.0)
    ('−0.05', '0.0002', '3×10⁻⁵', '0')
    """
    if x == 0 or 1e-4 <= abs(x) < 1e4:
        return f"{x:.4g}".replace("-", MINUS)
    return (MINUS if x < 0 else "") + power_of_ten(abs(x))


class PlainTicks(Formatter):
    """Tick labels of a linear axis in plain text, one style for the whole axis.

    Decimals: as many as the tick step needs (0, 0.0001, 0.0002), with the
    minus sign U+2212. Steps below 10⁻⁵ or from 10⁵ up: a power of ten shared
    by every label (0, 2×10⁻⁶, 4×10⁻⁶), written with superscripts, never as
    mathtext or as an offset in the corner.

    Examples
    --------
    >>> f = PlainTicks(); ticks = [-0.1, -0.05, 0.0, 0.05]; f.set_locs(ticks); [f(x) for x in ticks]
    ['−0.10', '−0.05', '0.00', '0.05']
    >>> ticks = [0.0, 2e-6, 4e-6]; f.set_locs(ticks); [f(x) for x in ticks]
    ['0', '2×10⁻⁶', '4×10⁻⁶']
    """

    def set_locs(self, locs) -> None:  # noqa: ANN001
        """Choose the labels' style from the ticks about to be drawn."""
        self._ticks = [float(x) for x in locs]
        steps = np.diff(sorted(self._ticks))
        self._step = float(steps.min()) if len(steps) and steps.min() > 0 else (abs(self._ticks[0]) if self._ticks and self._ticks[0] else 1.0)
        self._exponent = int(np.floor(np.log10(self._step) + 1e-9))
        self._shared = not -5 <= self._exponent < 5
        scale = 10.0 ** self._exponent if self._shared else 1.0
        self._decimals = next(
            (d for d in range(9) if all(abs(round(x / scale, d) - x / scale) <= 1e-6 * self._step / scale for x in self._ticks)), 8
        )

    def __call__(self, x: float, pos: int | None = None) -> str:
        """The label of tick value ``x``."""
        if not hasattr(self, "_step"):
            self.set_locs([x])
        if abs(x) < 1e-9 * self._step:
            x = 0.0
        if self._shared:
            mantissa = f"{x / 10.0 ** self._exponent:.{self._decimals}f}"
            text = "0" if x == 0 else ("" if mantissa == "1" else mantissa + "×") + "10" + str(self._exponent).translate(_SUPERSCRIPT)
            return text.replace("-", MINUS)
        return f"{x:.{self._decimals}f}".replace("-", MINUS)


_PLOT = (5.35, 2.6)
"""Size of a single plotting area [in] (width, height)."""
_PAD = {"left": 0.75, "right": 0.3, "top": 0.35, "bottom": 0.55}
"""Room around a plotting area [in]: tick labels and axis labels, the title, the last tick label's overhang."""


def _legend_below(fig: Figure, ax: Axes, *, title: str | None = None) -> float:
    """Draw ``ax``'s legend at the foot of the figure, never over the data.

    Uses as many columns (up to three) as fit the figure's width.

    Returns
    -------
    float
        The legend's height [in], for :func:`_arrange`.
    """
    handles, labels = ax.get_legend_handles_labels()
    renderer = fig.canvas.get_renderer()
    for ncol in range(min(3, len(labels)), 0, -1):
        legend = fig.legend(handles, labels, loc="lower center", bbox_to_anchor=(0.5, 0.0), ncol=ncol,
                            fontsize=7, title=title, title_fontsize=7, borderaxespad=0.3)
        box = legend.get_window_extent(renderer)
        if ncol == 1 or box.width <= fig.bbox.width - 0.2 * fig.dpi:
            break
        legend.remove()
    return box.height / fig.dpi + 0.1


def _arrange(fig: Figure, *, plot: tuple[float, float] = _PLOT, pad: dict[str, float] = _PAD, below: float = 0.0) -> None:
    """Size the figure around its plotting area.

    Parameters
    ----------
    fig : Figure
    plot : (float, float)
        Width and height of the plotting area [in] (colour bar included).
    pad : dict
        Room left, right, above and below the plotting area [in].
    below : float
        Extra room at the foot for the legend [in].

    Fixed room instead of tight_layout, which costs a fifth of the plotting time.
    """
    _place(fig, plot, pad, below)
    overhang = _y_axis_overhang(fig)
    if overhang > 0:  # wide tick labels: give the y axis the room it needs, the plotting area keeps its size
        _place(fig, plot, {**pad, "left": pad["left"] + overhang + 0.05}, below)


def _place(fig: Figure, plot: tuple[float, float], pad: dict[str, float], below: float) -> None:
    """Set the figure's size and its plotting area's position from sizes in inches."""
    width = pad["left"] + plot[0] + pad["right"]
    height = pad["top"] + plot[1] + pad["bottom"] + below
    fig.set_size_inches(width, height)
    fig.subplots_adjust(left=pad["left"] / width, right=1 - pad["right"] / width,
                        top=1 - pad["top"] / height, bottom=(pad["bottom"] + below) / height)


def _y_axis_overhang(fig: Figure) -> float:
    """How far the first axes' y tick labels and label reach past the figure's left edge [in] (≤ 0: they fit)."""
    box = fig.axes[0].yaxis.get_tightbbox(fig.canvas.get_renderer())
    return 0.0 if box is None else -box.x0 / fig.dpi


def _log_axis(axis) -> None:  # noqa: ANN001
    """Log scale with plain-text decade labels (see :func:`power_of_ten`)."""
    axis.set_major_locator(LogLocator(base=10.0, numticks=8))
    axis.set_major_formatter(FuncFormatter(power_of_ten))
    axis.set_minor_formatter(NullFormatter())


def _plain_axis(axis, nbins: int = 7) -> None:  # noqa: ANN001
    """At most ``nbins`` intervals at 1, 2 or 5 × 10ⁿ, labelled by :class:`PlainTicks`."""
    axis.set_major_locator(MaxNLocator(nbins=nbins, steps=[1, 2, 5, 10]))
    axis.set_major_formatter(PlainTicks())


def _short(name: str) -> str:
    """A substance's name without its explanation in brackets, for an axis label:
    ``TRIS (tris(hydroxymethyl)aminomethane)`` → ``TRIS``."""
    return name.split(" (", 1)[0]


def _band(ax, limit: float) -> None:  # noqa: ANN001
    ax.axhspan(-limit, limit, color=PALETTE["band"], zorder=0, label=f"acceptance band ±{limit:g} pH")
    for y in (-limit, limit):
        ax.axhline(y, color=PALETTE["blue"], lw=0.8, ls=(0, (4, 2)), zorder=1)
    ax.axhline(0.0, color=PALETTE["ink"], lw=0.6, zorder=1)


def _outside(ax, parts: tuple[tuple[float, float], ...], transform=None) -> None:  # noqa: ANN001
    """Shade the parts of a sweep outside the model's range (or above a solubility): grey, cross-hatched, one legend entry."""
    for n, (a, b) in enumerate(parts):
        a, b = (transform(a), transform(b)) if transform else (a, b)
        ax.axvspan(a, b, facecolor=PALETTE["outside"], edgecolor=PALETTE["grey"], hatch="\\\\", lw=0.0, alpha=0.55, zorder=0.5,
                   label="outside the model's range (not judged)" if n == 0 else None)


def _ylim(limit: float, focus: float) -> tuple[float, float]:
    span = max(3.0 * limit, 1.3 * focus)
    span = min(span, max(3.0, 3.0 * limit))
    return -span, span


def _error_vs_concentration(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """Error against the whole solution's concentration, log axis, legend underneath."""
    v = s.validity
    sw = v.concentration_sweep
    fig, ax = plt.subplots()
    _band(ax, limit)
    lo, hi = v.working_range
    ax.axvspan(lo, hi, facecolor=PALETTE["range"], edgecolor=PALETTE["orange"], hatch="///", lw=0.0, alpha=0.6, zorder=0, label="working range")
    _outside(ax, sw.outside)
    for n, (name, values) in enumerate(sw.parts.items(), start=1):
        color, ls, _ = SERIES[n % len(SERIES)]
        ax.plot(sw.x, values, color=PALETTE[color], ls=ls, lw=1.0, label=f"part: {name}")
    ax.plot(sw.x, sw.error, color=PALETTE["blue"], lw=1.8, label=f"{s.id} − exact")
    c0 = sa.spec.lead_concentration
    ax.plot([c0], [s.error], marker="o", ms=7, mfc="white", mec=PALETTE["ink"], mew=1.5, ls="none", label="nominal", zorder=5)
    ax.set_xscale("log")
    _log_axis(ax.xaxis)
    _plain_axis(ax.yaxis)
    ax.set_ylim(*_ylim(limit, v.max_abs_error))
    ax.set_xlabel(f"total concentration of {_short(sa.spec.lead_name)} (whole solution scaled) / (mol/L)")
    ax.set_ylabel("error, shortcut pH − exact pH")
    ax.set_title(f"{sa.spec.id}: {s.title}")
    _arrange(fig, below=_legend_below(fig, ax))
    holds = "; ".join(f"{format_concentration(a)} – {format_concentration(b)}" for a, b in v.holds_within_working_range) or "nowhere"
    alt = (
        f"Error of {s.id} against concentration for solution {sa.spec.id}, from {format_concentration(v.concentration_span[0])} "
        f"to {format_concentration(v.concentration_span[1])}. Within the working range {format_concentration(lo)} – {format_concentration(hi)} "
        f"the largest |error| is {v.max_abs_error:.3f} pH; the limit is ±{limit:g} pH; it holds within the working range for: {holds}."
        + (f" Above {format_concentration(v.concentration_cut)} the sweep is outside the model's range and not judged." if v.concentration_cut is not None else "")
    )
    caption = "Error against concentration, with the working range (hatched) and the acceptance band"
    return fig, alt, caption + ("; grey: outside the model's range (not judged)." if sw.outside else ".")


def _error_vs_pka(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """Error against the key pKa, one curve per concentration, legend underneath."""
    cv = s.curves
    assert cv is not None
    fig, ax = plt.subplots()
    _band(ax, limit)
    for i, c in enumerate(cv.concentrations):
        color, ls, _ = SERIES[i % len(SERIES)]
        ax.plot(cv.pka, cv.error[i], color=PALETTE[color], ls=ls, lw=1.5, label=format_concentration(float(c)))
    comp, step = s.validity.pka_step
    nominal = sa.spec.components[comp].pka[step].thermodynamic
    ax.axvline(nominal, color=PALETTE["ink"], lw=1.0, ls=":", label=f"pKa{step + 1} = {nominal:.3f}")
    ax.set_ylim(-5.0 * limit, 5.0 * limit)
    _plain_axis(ax.xaxis)
    _plain_axis(ax.yaxis)
    ax.set_xlabel(f"pKa{step + 1} of {_short(sa.spec.components[comp].name)} (25 °C, I = 0)")
    ax.set_ylabel("error, shortcut pH − exact pH")
    ax.set_title(f"{sa.spec.id}: error against pKa at several concentrations")
    _arrange(fig, below=_legend_below(fig, ax, title="total of first component"))
    ranges = "; ".join(f"{fixed(iv.low, 2)} – {fixed(iv.high, 2)}" for iv in s.validity.pka_intervals) or "none"
    alt = f"Error of {s.id} against pKa{step + 1} for {len(cv.concentrations)} concentrations; at the nominal concentration it holds for pKa {ranges}."
    return fig, alt, "Error against pKa at 1/100, 1/10, 1, 10 and 100 times the nominal concentration (where allowed)."


def _error_map(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """The pKa × log C error map with the acceptance contours; legend underneath."""
    mp = s.map
    assert mp is not None
    fig, ax = plt.subplots()
    vmax = 3.0 * limit
    img = ax.imshow(
        np.clip(mp.error, -vmax, vmax), origin="lower", aspect="auto", cmap=ERROR_MAP, norm=Normalize(-vmax, vmax),
        extent=(mp.log_c[0], mp.log_c[-1], mp.pka[0], mp.pka[-1]), interpolation="nearest",
    )
    cs = ax.contour(mp.log_c, mp.pka, mp.error, levels=[-limit, limit], colors=[PALETTE["ink"]], linestyles=["--", "-"], linewidths=1.2)
    ax.clabel(cs, fmt={-limit: f"{MINUS}{limit:g}", limit: f"+{limit:g}"}, fontsize=7)
    ax.plot([mp.nominal[1]], [mp.nominal[0]], marker="*", ms=13, mfc="white", mec=PALETTE["ink"], mew=1.2, ls="none", label="this method")
    lo, hi = s.validity.working_range
    ax.plot(np.log10([lo, hi]), [mp.nominal[0]] * 2, color=PALETTE["ink"], lw=3, solid_capstyle="butt", label="working range")
    if s.validity.concentration_cut is not None:  # at the nominal pKa; the map's other pKa values move the ionic strength little
        _outside(ax, ((s.validity.concentration_cut, 10.0 ** mp.log_c[-1]),), np.log10)
    cb = fig.colorbar(img, ax=ax, extend="both", format=PlainTicks())
    cb.set_label(f"error / pH (clipped at ±{vmax:g})")
    comp, step = s.validity.pka_step
    _plain_axis(ax.xaxis)
    _plain_axis(ax.yaxis)
    ax.set_xlabel(f"log10(total of {_short(sa.spec.lead_name)} / (mol/L))")
    ax.set_ylabel(f"pKa{step + 1} (25 °C, I = 0)")
    ax.set_title(f"{sa.spec.id}: {s.id}, error map (solid +{limit:g}, dashed {MINUS}{limit:g})")
    ax.grid(False)
    _arrange(fig, plot=(_PLOT[0], 3.2), below=_legend_below(fig, ax))
    inside = float(np.mean(np.abs(mp.error) <= limit)) * 100
    alt = (
        f"Map of the error of {s.id} over pKa{step + 1} from {fixed(mp.pka[0], 1)} to {fixed(mp.pka[-1], 1)} and log10 concentration from "
        f"{fixed(mp.log_c[0], 1)} to {fixed(mp.log_c[-1], 1)}; the error is within ±{limit:g} pH on {inside:.0f} % of the map. "
        f"The method's point is at pKa {fixed(mp.nominal[0], 2)}, log10 c {fixed(mp.nominal[1], 2)}, where the error is {signed(s.error, 3)} pH."
    )
    return fig, alt, "Error over pKa and concentration; contours at the acceptance limits; the star is the method."


def _histogram(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """Monte-Carlo distribution of the error, the limits where they fall in view; legend underneath."""
    mc = sa.monte_carlo
    d = mc.errors[s.id]
    counts, edges = np.array(d.histogram[0]), np.array(d.histogram[1])
    fig, ax = plt.subplots()
    ax.stairs(counts / counts.sum() / np.diff(edges), edges, fill=True, color=PALETTE["band"], ec=PALETTE["blue"], lw=1.0, label="Monte-Carlo error")
    lo, hi = float(edges[0]), float(edges[-1])
    zoom = (hi - lo) < 0.1 * (max(hi, limit) - min(lo, -limit))
    if zoom:  # a narrow distribution far from the limits: show it, and say where the limits are
        pad = 0.15 * (hi - lo) + 1e-6
        ax.set_xlim(lo - pad, hi + pad)
    for x, ls in ((-limit, "--"), (limit, "-")):
        if not zoom or lo - 0.15 * (hi - lo) <= x <= hi + 0.15 * (hi - lo):
            ax.axvline(x, color=PALETTE["orange"], ls=ls, lw=1.5, label=f"limit {plain_number(x) if x < 0 else '+' + plain_number(x)} pH")
    ax.axvline(d.coverage[0], color=PALETTE["ink"], ls=":", lw=1.0, label="95 % coverage interval")
    ax.axvline(d.coverage[1], color=PALETTE["ink"], ls=":", lw=1.0)
    _plain_axis(ax.xaxis, nbins=5)
    _plain_axis(ax.yaxis)
    p = mc.p_exceed[s.id]
    ax.set_xlabel("error, shortcut pH − exact pH" + (f"  (the limits ±{limit:g} pH lie outside this window)" if zoom else ""))
    ax.set_ylabel("probability density / (1/pH)")
    ax.set_title(f"{sa.spec.id}: {s.id}, {mc.draws:,} draws, P(|error| > {limit:g}) = {significant(p, 3)}")
    _arrange(fig, plot=(_PLOT[0], 2.3), below=_legend_below(fig, ax))
    alt = (
        f"Histogram of the error of {s.id} over {mc.draws:,} Monte-Carlo draws: mean {signed(d.mean, 4)} pH, standard deviation {fixed(d.u, 4)}, "
        f"95 % coverage interval {signed(d.coverage[0], 4)} to {signed(d.coverage[1], 4)} pH; probability beyond ±{limit:g} pH {significant(p, 3)}."
    )
    return fig, alt, "Distribution of the shortcut's error under the stated input uncertainties."


_BAR_IN = 0.26
"""Height of one bar's row in the contributions chart [in]."""


def _contribution_bars(ax: Axes, g, title: str, colour: str, hatch: str | None) -> list[str]:  # noqa: ANN001
    """One panel of the contributions chart: the eight largest, largest on top; returns the text for the alt."""
    items = list(g.contributions)[:8][::-1]
    y = np.arange(len(items))
    ax.barh(y, [c.contribution for c in items], color=PALETTE[colour], hatch=hatch, edgecolor=PALETTE["ink"], lw=0.5)
    ax.set_yticks(y, [c.label for c in items], fontsize=7)
    ax.set_ylim(-0.6, max(len(items), 1) - 0.4)
    _plain_axis(ax.xaxis, nbins=5)
    ax.set_xlabel("contribution / pH (input moved by ±u)")
    ax.set_title(f"{title}, u = {plain_number(float(f'{g.u:.3g}'))} pH", fontsize=9)
    return [f"{c.label} {significant(c.contribution, 2)}" for c in g.contributions[:3]]


def _contributions(sa: SolutionAnalysis, s: ShortcutAnalysis, limit: float) -> tuple[Figure, str, str]:
    """Ranking of the inputs for the exact pH (top) and the shortcut's error (below), each panel full width."""
    assert s.gum is not None
    panels = ((sa.gum, "exact pH", "blue", None), (s.gum, f"error of {s.id}", "orange", "//"))
    fig, axes = plt.subplots(2, 1)
    text = [f"{title}: " + ", ".join(_contribution_bars(ax, g, title, colour, hatch)) for ax, (g, title, colour, hatch) in zip(axes, panels, strict=True)]
    renderer = fig.canvas.get_renderer()
    widest = max(t.get_window_extent(renderer).width for ax in axes for t in ax.get_yticklabels()) / fig.dpi
    rows = max(min(len(g.contributions), 8) for g, *_ in panels)
    height = _BAR_IN * rows + 0.15
    gap = _PAD["bottom"] + _PAD["top"]
    _arrange(fig, plot=(7.4 - widest - 0.5, 2 * height + gap), pad={**_PAD, "left": widest + 0.2})
    fig.subplots_adjust(hspace=gap / height)
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
_PKA_KINDS = frozenset({"error-vs-pka", "error-map"})
"""The kinds drawn only for a shortcut that uses a pKa."""


def figure_kinds(s: ShortcutAnalysis) -> tuple[str, ...]:
    """The figure kinds drawn for a claimed shortcut, in page order: every kind,
    but no pKa figures for a shortcut that uses no pKa (a strong acid or base alone)."""
    return tuple(k for k in FIGURE_KINDS if s.validity.pka_step is not None or k not in _PKA_KINDS)


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
    """Every figure of a method's analysis, as SVG bytes (:func:`figure_svg`)."""
    limit = analysis.method.criteria.max_ph_error
    out = []
    for sa in analysis.solutions:
        for s in sa.shortcuts:
            for kind in figure_kinds(s):
                fig, alt, caption = draw_figure(kind, sa, s, limit)
                out.append(FigureFile(f"{sa.spec.id}-{s.id}-{kind}", kind, sa.spec.id, s.id, figure_svg(fig), alt, caption))
    return tuple(out)

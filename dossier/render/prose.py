"""The words of a verdict: status words, reasons, the condition and the drafted justification.

The analysis returns a structured :class:`~dossier.analysis.verdicts.Verdict`
(numbers, a status, the findings); this module writes them for people, every
number through :mod:`dossier.display`. The words follow validation reports:
a shortcut *meets the criterion*, *meets it within a restricted range*, or
*does not meet it*; the probability is the *conformity probability*
(JCGM 106:2012).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..analysis.decision import ResultUsed
from ..analysis.method import ShortcutAnalysis, SolutionAnalysis
from ..analysis.region import RegionPoint, RegionResult
from ..analysis.verdicts import Finding, Verdict, VerdictStatus
from ..chemistry import CATALOGUE
from ..display import fixed, plain, signed, significant
from ..inputs.formulas import subscripted
from ..inputs.model import Method, SolutionSpec
from ..inputs.units import format_concentration

__all__ = ["STATUS_WORDS", "RULE_WORDS", "ShortcutProse", "status_words", "format_percent", "reasons", "condition", "justification", "prose"]

STATUS_WORDS = {
    VerdictStatus.PASS: "meets the criterion",
    VerdictStatus.CONDITIONAL: "meets it within a restricted range",
    VerdictStatus.FAIL: "does not meet it",
}
"""What each verdict status reads as on a page."""

RULE_WORDS = "simple acceptance with a conformity probability (JCGM 106:2012)"
"""The decision rule, in words."""


def status_words(status: VerdictStatus | str) -> str:
    """The words for a verdict status ('meets the criterion', ...)."""
    return STATUS_WORDS[VerdictStatus(status)]


def format_percent(p: float) -> str:
    """A probability as a percentage: 0 %, 0.0006 %, 4.5 %, 100.0 %."""
    if p == 0.0:
        return "0 %"
    if p * 100 >= 0.1:
        return f"{fixed(p * 100, 1)} %"
    return f"{significant(p * 100, 1)} %"


def _range(a: float, b: float) -> str:
    return f"{format_concentration(a)} – {format_concentration(b)}"


def _span(a: float, b: float, unit: str) -> str:
    return f"{plain(a)} {unit}" if a == b else f"{plain(round(a, 6))} – {plain(round(b, 6))} {unit}"


def _point(p: RegionPoint, region: RegionResult) -> str:
    text = f"{format_concentration(p.concentration)}, {plain(round(p.temperature, 2))} °C"
    if region.background[1] > 0.0:
        text += f", background {significant(p.background, 3)} mol/kg"
    return text


def _region(region: RegionResult) -> str:
    text = f"working range {_range(*region.concentration)}; {_span(*region.temperature, '°C')}"
    if region.background[1] > 0.0:
        text += f"; background {_span(*region.background, 'mol/kg')}"
    return text


def _source(v: Verdict) -> str:
    if v.result_used == ResultUsed.GUM:
        return "closed form with the GUM uncertainty of the exact pH (validated against Monte Carlo, JCGM 101 §8)"
    return f"counted over {v.draws:,} Monte Carlo draws (the GUM result of the exact pH is not validated, JCGM 101 §8)"


def reasons(v: Verdict) -> tuple[str, ...]:
    """Why the verdict is what it is, each reason with its numbers."""
    r = v.region
    return (
        f"error at the nominal composition {signed(v.nominal_error)} pH (limit ±{plain(v.limit)})",
        f"operating region ({_region(r)}): largest |error| {fixed(abs(r.worst.error))} pH at {_point(r.worst, r)}",
        f"conformity probability P(|pH by the shortcut − true pH| ≤ {plain(v.limit)}) = {format_percent(v.conformity)} "
        f"(required at least {format_percent(v.required_probability)}; {_source(v)})",
        f"uncertainty of the true pH: {significant(v.exact_u, 2)} from the inputs and {significant(v.model.u, 2)} from the activity model "
        f"at I = {significant(v.model.ionic_strength, 2)} mol/kg ({v.model.source})",
    )


def condition(v: Verdict) -> str:
    """For a shortcut that meets the criterion within a restricted range: which range, in words."""
    if v.status != VerdictStatus.CONDITIONAL:
        return ""
    r = v.region
    if r.holds:
        parts = " and ".join(_range(a, b) for a, b in r.holds)
        where = f"only for {parts} of the working range {_range(*r.concentration)}"
    else:
        where = f"at no concentration of the working range {_range(*r.concentration)} over the whole operating region"
    return f"within the limit {where} at every temperature{' and background' if r.background[1] > 0 else ''} allowed; outside it ({signed(r.worst.error)} pH) at {_point(r.worst, r)}"


def _composition(spec: SolutionSpec) -> str:
    # "potassium dihydrogen phosphate (KH₂PO₄) 20 mmol/L": the form as added, then its concentration
    parts = [
        f"{c.compound} ({subscripted(c.formula)}) {format_concentration(c.concentration)}" if c.formula
        else f"{c.added_as}: {format_concentration(c.concentration)}"
        for c in spec.components
    ]
    if spec.strong_alone is not None:
        return f"{spec.strong_alone.name} {format_concentration(spec.strong_alone.concentration)}"
    if spec.strong_acid:
        parts.append(f"strong acid {format_concentration(spec.strong_acid)}")
    if spec.strong_base:
        parts.append(f"strong base {format_concentration(spec.strong_base)}")
    return ", ".join(parts)


def _exact_result(v: Verdict) -> str:
    lo, hi = v.exact_interval
    if v.result_used == ResultUsed.GUM:
        return (f"pH {fixed(v.exact_ph)} with standard uncertainty {fixed(v.exact_u)} from the inputs "
                f"(GUM, 95 % interval {fixed(lo)} – {fixed(hi)}, validated against Monte Carlo)")
    return (f"pH {fixed(v.exact_ph)} with standard uncertainty {fixed(v.exact_u)} from the inputs "
            f"(Monte Carlo, {v.draws:,} draws, 95 % coverage interval {fixed(lo)} – {fixed(hi)}; the GUM result is not validated and not used)")


def justification(method: Method, sa: SolutionAnalysis, s: ShortcutAnalysis) -> str:
    """A drafted paragraph for the SOP or validation report, every number filled in.

    It quotes the uncertainty result the verdict used (GUM or Monte Carlo).
    The scientist reviews and edits it; it is a draft, not a conclusion.
    """
    v: Verdict = s.verdict  # type: ignore[assignment]
    spec = sa.spec
    approx = CATALOGUE[s.id]
    c = method.conditions
    r = v.region
    pkas = "; ".join(
        f"pKa{j + 1} of {comp.name} {fixed(p.at_working_temperature)} ± {plain(p.uncertainty)} ({'substance table, ' if p.origin != 'method file' else ''}source {p.reference})"
        for comp in spec.components[:1]
        for j, p in enumerate(comp.pka)
    )
    text = (
        f"The pH of solution '{spec.id}' ({_composition(spec)}, {plain(c.temperature)} °C) is calculated in the procedure by "
        f"the shortcut '{approx.title}' ({approx.id}). Compared with the exact solution of the charge and mass balances "
        f"(activity model {c.activity}{'; ' + pkas if pkas else ''}), which gives {_exact_result(v)}, the shortcut's error at the nominal "
        f"composition is {signed(v.nominal_error)} pH against the acceptance limit of ±{plain(v.limit)} pH. Over the operating "
        f"region the method allows ({_region(r)}) its largest magnitude is {fixed(abs(r.worst.error))} pH, at {_point(r.worst, r)}. "
        f"Decision rule: {RULE_WORDS}. With the uncertainty of the true pH from the inputs and from the activity model "
        f"({significant(v.model.u, 2)} pH at I = {significant(v.model.ionic_strength, 2)} mol/kg), the conformity probability "
        f"that the shortcut's pH lies within ±{plain(v.limit)} of the true pH is {format_percent(v.conformity)} "
        f"(required at least {format_percent(v.required_probability)})."
    )
    if v.status == VerdictStatus.PASS:
        text += " The shortcut therefore meets the criterion over the whole operating region."
    elif v.status == VerdictStatus.CONDITIONAL:
        text += f" The shortcut meets it within a restricted range: {condition(v)}."
    else:
        why = []
        if Finding.NOMINAL_OUTSIDE in v.findings:
            why.append("its error at the nominal composition exceeds the limit")
        if Finding.CONFORMITY_LOW in v.findings:
            why.append("the conformity probability is below the required one")
        text += (
            f" The shortcut does not meet it ({' and '.join(why)}); the procedure should state the pH from the exact "
            "calculation or from measurement."
        )
    text += (
        " A calculated pH supports and does not replace measurement with a calibrated pH meter; this draft needs review "
        "by qualified staff under the laboratory's quality system."
    )
    return text


@dataclass(frozen=True)
class ShortcutProse:
    """Everything a page or results.json says in words about one claimed shortcut."""

    words: str
    condition: str
    reasons: tuple[str, ...]
    justification: str


def prose(method: Method, sa: SolutionAnalysis, s: ShortcutAnalysis) -> ShortcutProse:
    """The words for one claimed shortcut of one solution."""
    v: Verdict = s.verdict  # type: ignore[assignment]
    return ShortcutProse(status_words(v.status), condition(v), reasons(v), justification(method, sa, s))

"""Verdicts on each claimed shortcut, and the drafted justification paragraph.

Rules (per solution and shortcut, with L the acceptance limit and P the
required probability):

``pass``
    |error| ≤ L over the whole working range at nominal inputs, and
    P(|error| > L) ≤ 1 − P under the stated uncertainties (Monte Carlo).
``fail``
    |error| > L at the nominal composition.
``conditional``
    holds at the nominal composition, but only on part of the working range,
    or only at nominal inputs (P(|error| > L) > 1 − P); the condition is
    stated in words.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from ..chemistry import CATALOGUE
from ..display import fixed, plain, signed, significant
from ..inputs.formulas import subscripted
from ..inputs.units import format_concentration
from ..inputs.model import Method, SolutionSpec
from .montecarlo import McResult
from .validity import ValidityResult

__all__ = ["VerdictStatus", "Verdict", "verdict", "justification", "PASS", "FAIL", "CONDITIONAL", "format_percent"]


class VerdictStatus(StrEnum):
    """The outcome of a shortcut against the acceptance criterion (rules: module docstring).

    The values are stable identifiers (results.json); the words a reader sees
    belong to the render layer.
    """

    PASS = "pass"
    CONDITIONAL = "conditional"
    FAIL = "fail"


PASS, FAIL, CONDITIONAL = VerdictStatus.PASS, VerdictStatus.FAIL, VerdictStatus.CONDITIONAL


@dataclass(frozen=True)
class Verdict:
    """The outcome for one shortcut of one solution.

    Attributes
    ----------
    status : VerdictStatus
    condition : str
        For ``conditional``: the condition under which the shortcut holds.
    reasons : tuple of str
        Why, in words, each with its numbers.
    """

    status: VerdictStatus
    condition: str
    reasons: tuple[str, ...]


def _range(a: float, b: float) -> str:
    return f"{format_concentration(a)} – {format_concentration(b)}"


def format_percent(p: float) -> str:
    """A probability as a percentage: 0 %, 0.0006 %, 4.5 %, 100.0 %."""
    if p == 0.0:
        return "0 %"
    if p * 100 >= 0.1:
        return f"{fixed(p * 100, 1)} %"
    return f"{significant(p * 100, 1)} %"


def verdict(v: ValidityResult, mc: McResult, probability: float) -> Verdict:
    """Apply the rules of the module docstring."""
    limit = v.limit
    p = mc.p_exceed[v.shortcut]
    allowed = 1.0 - probability
    lo, hi = v.working_range
    reasons = [
        f"error at the nominal composition {signed(v.nominal_error)} pH (limit ±{plain(limit)})",
        f"largest |error| over the working range {_range(lo, hi)}: {fixed(v.max_abs_error)} pH at {format_concentration(v.max_abs_error_at)}",
        f"P(|error| > {plain(limit)}) = {format_percent(p)} under the stated uncertainties (allowed {format_percent(allowed)}; {mc.draws:,} Monte-Carlo draws)",
    ]
    if abs(v.nominal_error) > limit:
        return Verdict(FAIL, "", tuple(reasons))
    whole = v.max_abs_error <= limit
    conditions = []
    if not whole:
        parts = " and ".join(_range(a, b) for a, b in v.holds_within_working_range) or "no part of it"
        conditions.append(f"holds only for {parts} of the working range {_range(lo, hi)}")
    if p > allowed:
        conditions.append(f"holds only at nominal inputs: with the stated uncertainties P(|error| > {plain(limit)}) = {format_percent(p)}, above the allowed {format_percent(allowed)}")
    if not conditions:
        return Verdict(PASS, "", tuple(reasons))
    return Verdict(CONDITIONAL, "; ".join(conditions), tuple(reasons))


def _composition(spec: SolutionSpec) -> str:
    # "potassium dihydrogen phosphate (KH₂PO₄) 20 mmol/L": the form as added, then its concentration
    parts = [
        f"{c.compound} ({subscripted(c.formula)}) {format_concentration(c.concentration)}" if c.formula
        else f"{c.added_as}: {format_concentration(c.concentration)}"
        for c in spec.components
    ]
    if spec.strong_acid:
        parts.append(f"strong acid {format_concentration(spec.strong_acid)}")
    if spec.strong_base:
        parts.append(f"strong base {format_concentration(spec.strong_base)}")
    return ", ".join(parts)


def justification(method: Method, spec: SolutionSpec, v: ValidityResult, exact_ph: float, exact_u: float, mc: McResult, verdict_: Verdict) -> str:
    """A drafted paragraph for the SOP or validation report, every number filled in.

    The scientist reviews and edits it; it is a draft, not a conclusion.
    """
    approx = CATALOGUE[v.shortcut]
    c = method.conditions
    limit = v.limit
    lo, hi = v.working_range
    pkas = "; ".join(
        f"pKa{j + 1} of {comp.name} {fixed(p.at_working_temperature)} ± {plain(p.uncertainty)} ({'substance table, ' if p.origin != 'method file' else ''}source {p.reference})"
        for comp in spec.components[:1]
        for j, p in enumerate(comp.pka)
    )
    p = mc.p_exceed[v.shortcut]
    text = (
        f"The pH of solution '{spec.id}' ({_composition(spec)}, {plain(c.temperature)} °C) is calculated in the procedure by "
        f"the shortcut '{approx.title}' ({approx.id}). Compared with the exact solution of the charge and mass balances "
        f"(activity model {c.activity}; {pkas}), which gives pH {fixed(exact_ph)} (standard uncertainty {fixed(exact_u)}), "
        f"the shortcut's error at the nominal composition is {signed(v.nominal_error)} pH, and over the working range "
        f"{_range(lo, hi)} its largest magnitude is {fixed(v.max_abs_error)} pH (at {format_concentration(v.max_abs_error_at)}), "
        f"against the acceptance limit of ±{plain(limit)} pH. With the stated uncertainties of the pKa values, concentrations and "
        f"temperature (Monte Carlo, {mc.draws:,} draws, seed {mc.seed}), the probability that the error exceeds the limit is "
        f"{format_percent(p)} (required at most {format_percent(1 - method.criteria.probability)})."
    )
    if verdict_.status == PASS:
        text += " The shortcut is therefore fit for this purpose over the whole working range."
    elif verdict_.status == CONDITIONAL:
        text += f" The shortcut is fit for purpose only under a condition: it {verdict_.condition}."
    else:
        text += (
            " The shortcut is therefore not fit for this purpose; the procedure should state the pH from the exact "
            "calculation or from measurement."
        )
    text += (
        " A calculated pH supports and does not replace measurement with a calibrated pH meter; this draft needs review "
        "by qualified staff under the laboratory's quality system."
    )
    return text

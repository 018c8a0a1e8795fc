"""The calculation ledger: every number a report publishes, with an id, its
value, the equation it came from and the inputs it used.

``ledger.json`` (format ``ph-dossier-ledger/1``, docs/manifest-format.md)
records the method's inputs as used (:func:`dossier.inputs.serialize.method_to_dict`)
and the analysis settings, so that every entry can be re-computed from the
ledger alone; the method page links each published number to its entry.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .. import __version__
from ..inputs.model import Method
from ..inputs.serialize import method_from_dict, method_to_dict
from .method import AnalysisSettings, MethodAnalysis, ShortcutAnalysis, SolutionAnalysis

__all__ = ["Entry", "Ledger", "LedgerError", "ledger_of", "ledger_entries", "ledger_document", "settings_to_dict", "settings_from_dict", "LEDGER_FORMAT", "EQUATIONS"]

LEDGER_FORMAT = "ph-dossier-ledger/1"

EQUATIONS = {
    "exact-equilibrium": "charge and mass balances with water, activity model, temperature (calculations: the exact equilibrium)",
    "unit-conversion": "concentration as written, converted to mol/L (pint; mol/kg with the water density, mass units with the molar mass)",
    "van-t-hoff": "pKa converted to I = 0 and 25 °C, then to the working temperature (van 't Hoff with ΔCp°)",
    "gum-jcgm-100": "law of propagation of uncertainty, JCGM 100:2008 §5.1.2",
    "monte-carlo-jcgm-101": "Monte Carlo propagation, JCGM 101:2008, seeded PCG64",
    "validity-crossing": "crossing of the acceptance limit, grid, then batches of points within the crossing's grid cell (0.1 % in concentration, 0.001 in pKa)",
    "working-range-maximum": "largest |error| over the working range, grid, then batches of points around the largest value",
    "operating-region-maximum": "largest |error| over the operating region (working range × temperature ± tolerance × background ± tolerance), grid and L-BFGS-B",
    "conformity-jcgm-106": "conformity probability P(|shortcut pH − true pH| ≤ limit), JCGM 106:2012 §7.3 (GUM closed form or Monte Carlo count)",
    "buffer-capacity": "β = dC_b/dpH from the analytic derivative of the charge balance (Van Slyke 1922)",
    "robustness-variation": "exact pH of the solution varied as stated minus the exact pH as stated (calculations: buffer robustness)",
}
"""What each ``equation`` of a ledger entry means (shortcut entries name the catalogue id)."""


@dataclass(frozen=True)
class Entry:
    """One published number.

    Attributes
    ----------
    id : str
        Stable id, e.g. ``buffer/henderson-hasselbalch/error``.
    value : float
    unit : str
    quantity : str
        What it is, in words.
    equation : str
        Catalogue id of the shortcut, or a key of :data:`EQUATIONS`.
    solution : str
        The solution whose recorded inputs it used.
    """

    id: str
    value: float
    unit: str
    quantity: str
    equation: str
    solution: str


def _shortcut_entries(sa: SolutionAnalysis, s: ShortcutAnalysis) -> list[Entry]:
    sid, k = sa.spec.id, s.id
    base = f"{sid}/{k}" if s.claimed else f"{sid}/appendix/{k}"
    v = s.validity
    first = f"total of {sa.spec.lead_added_as}"
    out = [
        Entry(f"{base}/ph", s.ph, "pH", f"pH by the shortcut {k}, nominal inputs", k, sid),
        Entry(f"{base}/error", s.error, "pH", f"error of {k} (shortcut − exact), nominal inputs", k, sid),
        Entry(f"{base}/max_abs_error", v.max_abs_error, "pH", f"largest |error| of {k} over the working range", "working-range-maximum", sid),
        Entry(f"{base}/max_abs_error_at", v.max_abs_error_at, "mol/L", f"where the largest |error| occurs ({first})", "working-range-maximum", sid),
    ]
    for i, iv in enumerate(v.concentration_intervals):
        out.append(Entry(f"{base}/validity_total/{i}/low", iv.low, "mol/L", f"lower end of validity interval {i + 1} ({first})", "validity-crossing", sid))
        out.append(Entry(f"{base}/validity_total/{i}/high", iv.high, "mol/L", f"upper end of validity interval {i + 1} ({first})", "validity-crossing", sid))
    for i, iv in enumerate(v.pka_intervals):
        out.append(Entry(f"{base}/validity_pka/{i}/low", iv.low, "pKa", f"lower end of pKa interval {i + 1}", "validity-crossing", sid))
        out.append(Entry(f"{base}/validity_pka/{i}/high", iv.high, "pKa", f"upper end of pKa interval {i + 1}", "validity-crossing", sid))
    cu = s.constants_used
    if s.claimed and cu is not None:
        name = sa.spec.lead_name
        for j, value in enumerate(cu.pka):
            if value is not None:
                source = "the procedure's own value" if cu.stated_pka[j] else "the model's value at the working conditions"
                out.append(Entry(f"{base}/constants/pka/{j + 1}", value, "pKa", f"pKa{j + 1} of {name} put into {k} ({source})", k, sid))
        if cu.pkw is not None:
            source = "the procedure's own value" if cu.stated_pkw else "the model's value at the working temperature"
            out.append(Entry(f"{base}/constants/pkw", cu.pkw, "pKw", f"pKw put into {k} ({source})", k, sid))
    if s.claimed:
        mc = sa.monte_carlo
        d = mc.errors[k]
        out += [
            Entry(f"{base}/u_gum", s.gum.u, "pH", f"combined standard uncertainty of the error of {k} (GUM)", "gum-jcgm-100", sid),  # type: ignore[union-attr]
            Entry(f"{base}/mc_mean", d.mean, "pH", f"Monte-Carlo mean of the error of {k}", "monte-carlo-jcgm-101", sid),
            Entry(f"{base}/mc_u", d.u, "pH", f"Monte-Carlo standard deviation of the error of {k}", "monte-carlo-jcgm-101", sid),
            Entry(f"{base}/mc_coverage_low", d.coverage[0], "pH", "lower end of the 95 % coverage interval of the error", "monte-carlo-jcgm-101", sid),
            Entry(f"{base}/mc_coverage_high", d.coverage[1], "pH", "upper end of the 95 % coverage interval of the error", "monte-carlo-jcgm-101", sid),
            Entry(f"{base}/p_exceed", mc.p_exceed[k], "1", "probability that |error| exceeds the limit", "monte-carlo-jcgm-101", sid),
        ]
        vd = s.verdict
        w = vd.worst  # type: ignore[union-attr]
        out += [
            Entry(f"{base}/conformity", vd.conformity, "1", f"conformity probability of {k} ({vd.result_used})", "conformity-jcgm-106", sid),  # type: ignore[union-attr]
            Entry(f"{base}/region_worst_error", w.error, "pH", f"error of {k} at the worst point of the operating region", "operating-region-maximum", sid),
            Entry(f"{base}/region_worst_total", w.concentration, "mol/L", f"worst point of the operating region ({first})", "operating-region-maximum", sid),
            Entry(f"{base}/region_worst_temperature", w.temperature, "°C", "worst point of the operating region (temperature)", "operating-region-maximum", sid),
            Entry(f"{base}/region_worst_background", w.background, "mol/kg", "worst point of the operating region (background ionic strength)", "operating-region-maximum", sid),
        ]
    return out


def ledger_entries(analysis: MethodAnalysis) -> tuple[Entry, ...]:
    """Every number the method's page and PDF publish."""
    out: list[Entry] = []
    for sa in analysis.solutions:
        sid = sa.spec.id
        for ci, c in enumerate(sa.spec.components):
            out.append(Entry(f"{sid}/component/{ci}/total", c.concentration, "mol/L", f"total of {c.added_as} ({c.concentration_text} as written)", "unit-conversion", sid))
            for j, p in enumerate(c.pka):
                out.append(Entry(f"{sid}/component/{ci}/pka/{j + 1}/thermodynamic", p.thermodynamic, "pKa", f"pKa{j + 1} of {c.name} at 25 °C and I = 0", "van-t-hoff", sid))
                out.append(Entry(f"{sid}/component/{ci}/pka/{j + 1}/at_working_temperature", p.at_working_temperature, "pKa", f"pKa{j + 1} of {c.name} at the working temperature", "van-t-hoff", sid))
        st = sa.spec.strong_alone
        if st is not None:
            out.append(Entry(f"{sid}/strong_{st.kind}/total", st.concentration, "mol/L", f"total of {st.name} ({st.concentration_text} as written)", "unit-conversion", sid))
        e = sa.exact
        mc = sa.monte_carlo.exact
        out += [
            Entry(f"{sid}/exact/ph", e.ph, "pH", "exact pH, activity scale", "exact-equilibrium", sid),
            Entry(f"{sid}/exact/ph_conc", e.ph_conc, "pH", "exact pH, concentration scale", "exact-equilibrium", sid),
            Entry(f"{sid}/exact/ionic_strength", e.ionic_strength, "mol/kg", "ionic strength", "exact-equilibrium", sid),
            Entry(f"{sid}/exact/pkw", e.pkw, "pKw", "pKw at the working temperature (IAPWS R11-07)", "exact-equilibrium", sid),
            Entry(f"{sid}/exact/u_gum", sa.gum.u, "pH", "combined standard uncertainty of the exact pH (GUM)", "gum-jcgm-100", sid),
            Entry(f"{sid}/exact/mc_mean", mc.mean, "pH", "Monte-Carlo mean of the exact pH", "monte-carlo-jcgm-101", sid),
            Entry(f"{sid}/exact/mc_u", mc.u, "pH", "Monte-Carlo standard deviation of the exact pH", "monte-carlo-jcgm-101", sid),
            Entry(f"{sid}/exact/mc_coverage_low", mc.coverage[0], "pH", "lower end of the 95 % coverage interval of the exact pH", "monte-carlo-jcgm-101", sid),
            Entry(f"{sid}/exact/mc_coverage_high", mc.coverage[1], "pH", "upper end of the 95 % coverage interval of the exact pH", "monte-carlo-jcgm-101", sid),
        ]
        for s in sa.shortcuts + sa.appendix:
            out += _shortcut_entries(sa, s)
        out += _robustness_entries(sa)
    return tuple(out)


def _robustness_entries(sa: SolutionAnalysis) -> list[Entry]:
    """The robustness table's numbers (ids ``SOLUTION/robustness/...``)."""
    r = sa.robustness
    if r is None:
        return []
    sid = sa.spec.id
    x = f"{sid}/robustness"
    v = "robustness-variation"
    out = [
        Entry(f"{x}/buffer_capacity", r.buffer_capacity_mol_per_l_per_ph, "mol/(L·pH)", "buffer capacity β", "buffer-capacity", sid),
        Entry(f"{x}/dilution_value", r.dilution_value, "pH", "dilution value: pH after dilution 1 + 1 with water minus pH", v, sid),
    ]
    for c in r.components:
        name = sa.spec.components[c.component].added_as
        out += [
            Entry(f"{x}/component/{c.component}/minus", c.delta_ph_minus, "pH", f"ΔpH with {name} alone at −{c.percent:g} %", v, sid),
            Entry(f"{x}/component/{c.component}/plus", c.delta_ph_plus, "pH", f"ΔpH with {name} alone at +{c.percent:g} %", v, sid),
        ]
    if (c := r.strong_alone) is not None:
        name = sa.spec.lead_added_as
        out += [
            Entry(f"{x}/strong_alone/minus", c.delta_ph_minus, "pH", f"ΔpH with {name} at −{c.percent:g} % of its concentration", v, sid),
            Entry(f"{x}/strong_alone/plus", c.delta_ph_plus, "pH", f"ΔpH with {name} at +{c.percent:g} % of its concentration", v, sid),
        ]
    add = f"{r.strong_addition_mol_per_l * 1e3:g} mmol/L"
    out += [
        Entry(f"{x}/strong_acid", r.delta_ph_strong_acid, "pH", f"ΔpH on adding {add} of strong acid", v, sid),
        Entry(f"{x}/strong_base", r.delta_ph_strong_base, "pH", f"ΔpH on adding {add} of strong base", v, sid),
        Entry(f"{x}/temperature_low", r.delta_ph_temperature_low, "pH", f"ΔpH at {r.temperature_low_c:g} °C", v, sid),
        Entry(f"{x}/temperature_high", r.delta_ph_temperature_high, "pH", f"ΔpH at {r.temperature_high_c:g} °C", v, sid),
        Entry(f"{x}/dph_dt", r.dph_dt_per_k, "pH/K", "dpH/dT over the temperature step (central difference)", v, sid),
        Entry(f"{x}/co2_shift", r.co2_shift_ph, "pH", "pH with CO₂ minus pH CO₂-free", v, sid),
    ]
    return out


def settings_to_dict(settings: AnalysisSettings) -> dict[str, Any]:
    return {"draws": settings.draws, "seed": settings.seed, "map_pka": settings.map_pka, "map_conc": settings.map_conc,
            "adaptive": settings.adaptive}


def settings_from_dict(d: dict[str, Any]) -> AnalysisSettings:
    # a ledger written before adaptive Monte Carlo (issue 16) drew exactly ``draws``
    return AnalysisSettings(draws=int(d["draws"]), seed=int(d["seed"]), map_pka=int(d["map_pka"]), map_conc=int(d["map_conc"]),
                            adaptive=bool(d.get("adaptive", False)))


class LedgerError(ValueError):
    """A ledger document that cannot be read (the message says what is wrong)."""


@dataclass(frozen=True)
class Ledger:
    """The calculation ledger of one method: its inputs as used, the settings,
    the verdicts and every published number.

    Attributes
    ----------
    method : Method
        The validated method, as the analysis used it.
    settings : AnalysisSettings
    verdicts : tuple of (str, str)
        ``("solution/shortcut", status)`` for every claimed shortcut.
    entries : tuple of Entry
    tool_version : str
    """

    method: Method
    settings: AnalysisSettings
    verdicts: tuple[tuple[str, str], ...]
    entries: tuple[Entry, ...]
    tool_version: str = __version__

    def values(self) -> dict[str, float]:
        """{entry id: value}."""
        return {e.id: e.value for e in self.entries}

    def to_document(self) -> dict[str, Any]:
        """The ``ledger.json`` document (format ``ph-dossier-ledger/1``)."""
        return {
            "format": LEDGER_FORMAT,
            "tool_version": self.tool_version,
            "method": method_to_dict(self.method),
            "settings": settings_to_dict(self.settings),
            "equations": EQUATIONS,
            "verdicts": dict(self.verdicts),
            "entries": [
                {"id": e.id, "value": e.value, "unit": e.unit, "quantity": e.quantity, "equation": e.equation, "solution": e.solution}
                for e in self.entries
            ],
        }

    @classmethod
    def from_document(cls, d: Any) -> Ledger:
        """Read a ``ledger.json`` document back.

        Raises
        ------
        LedgerError
            When ``d`` is not a ledger of this format.
        """
        if not isinstance(d, dict) or d.get("format") != LEDGER_FORMAT:
            raise LedgerError(f"not a ledger of format {LEDGER_FORMAT!r}")
        try:
            return cls(
                method=method_from_dict(d["method"]),
                settings=settings_from_dict(d["settings"]),
                verdicts=tuple((str(k), str(v)) for k, v in d["verdicts"].items()),
                entries=tuple(Entry(e["id"], float(e["value"]), e["unit"], e["quantity"], e["equation"], e["solution"]) for e in d["entries"]),
                tool_version=str(d["tool_version"]),
            )
        except (KeyError, TypeError, ValueError, AttributeError) as exc:
            raise LedgerError(f"the ledger is incomplete or malformed: {type(exc).__name__}: {exc}") from None


def ledger_of(analysis: MethodAnalysis) -> Ledger:
    """The ledger of one method's analysis."""
    verdicts = tuple((f"{sa.spec.id}/{s.id}", str(s.verdict.status)) for sa in analysis.solutions for s in sa.shortcuts)  # type: ignore[union-attr]
    return Ledger(analysis.method, analysis.settings, verdicts, ledger_entries(analysis))


def ledger_document(analysis: MethodAnalysis) -> dict[str, Any]:
    """The ``ledger.json`` document of one method."""
    return ledger_of(analysis).to_document()

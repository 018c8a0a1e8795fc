"""Machine-readable results: the ``results.json`` document and CSV tables.

The format (``ph-dossier-results/1``) is documented in docs/results-format.md.
It echoes the inputs as used (converted pKa values, concentrations in mol/L,
pKw, the Debye–Hückel A) so that every number can be re-computed.
"""

from __future__ import annotations

import csv
import io
from typing import Any

from .. import __version__
from ..analysis.method import MethodAnalysis, ShortcutAnalysis, SolutionAnalysis
from ..analysis.montecarlo import Comparison, Stopping, Summary
from ..analysis.preparation import Preparation
from ..analysis.sensitivity import GumResult
from ..analysis.region import RegionPoint
from ..analysis.validity import Interval, Sweep
from ..analysis.verdicts import Verdict
from ..inputs.model import Method, StrongAlone
from ..chemistry.activity import BATES_GUGGENHEIM_BA, DAVIES_COEFFICIENT
from ..chemistry.solver import TOLERANCE
from .prose import prose

__all__ = ["RESULTS_FORMAT", "results_document", "csv_tables"]

RESULTS_FORMAT = "ph-dossier-results/1"


def _intervals(ivs: tuple[Interval, ...]) -> list[list[float]]:
    return [[iv.low, iv.high] for iv in ivs]


def _interval_objects(ivs: tuple[Interval, ...]) -> list[dict[str, Any]]:
    """Each interval with its ends' ionic strengths and what bounds it."""
    return [
        {
            "low": iv.low,
            "high": iv.high,
            "ionic_strength_low": iv.ionic_strength_low,
            "ionic_strength_high": iv.ionic_strength_high,
            "without_compensating_errors": iv.without_compensating_errors,
            "low_is_sweep_end": iv.low_is_sweep_end,
            "high_is_sweep_end": iv.high_is_sweep_end,
            "low_is_cut": iv.low_is_cut,
            "high_is_cut": iv.high_is_cut,
        }
        for iv in ivs
    ]


def _comparison(c: Comparison) -> dict[str, Any]:
    return {
        "gum_interval": list(c.gum_interval),
        "monte_carlo_interval": list(c.mc_interval),
        "d_low": c.d_low,
        "d_high": c.d_high,
        "numerical_tolerance": c.tolerance,
        "validated": c.validated,
    }


def _gum(g: GumResult) -> dict[str, Any]:
    return {
        "value": g.value,
        "u_combined": g.u,
        "sensitivity": {
            "d_dpka": g.coefficients.d_pka,
            "d_dlog10_c": g.coefficients.d_log_c,
            "d_dt_per_k": g.coefficients.d_temperature,
            "d_di_per_mol_per_kg": g.coefficients.d_ionic_strength,
        },
        "inputs": [
            {"key": c.key, "label": c.label, "unit": c.unit, "u": c.u, "coefficient": c.coefficient, "contribution": c.contribution}
            for c in g.contributions
        ],
    }


def _distribution(d: Summary) -> dict[str, Any]:
    return {"mean": d.mean, "u": d.u, "coverage_95": list(d.coverage)}


def _stopping(st: Stopping | None, draws: int) -> dict[str, Any]:
    """Draws used and why drawing stopped (JCGM 101 §7.9); see docs/results-format.md."""
    if st is None:
        return {"adaptive": False, "draws_used": draws}
    return {
        "adaptive": st.adaptive,
        "draws_used": draws,
        "draws_max": st.draws_max,
        "batch_size": st.batch_size,
        "batches": st.batches,
        "digits_stable": st.digits_stable,
        "probabilities_decided": st.probabilities_decided,
        "decision_confidence": st.confidence,
        "decided_against_required_probability": st.required_probability,
        "conformity_interval": {k: list(v) for k, v in st.conformity_interval.items()},
        "tolerance": {k: {"numerical_tolerance": d, "largest_two_s": two_s} for k, (d, two_s) in st.tolerance.items()},
    }




def _point(p: RegionPoint) -> dict[str, Any]:
    return {"total_mol_per_l": p.concentration, "temperature_c": p.temperature, "background_ionic_strength": p.background, "error": p.error}


def _decision(v: Verdict) -> dict[str, Any]:
    r = v.region
    return {
        "rule": v.rule,
        "findings": [str(f) for f in v.findings],
        "limit": v.limit,
        "required_probability": v.required_probability,
        "conformity_probability": v.conformity,
        "result_used": v.result_used,
        "exact_ph": v.exact_ph,
        "exact_u_inputs": v.exact_u,
        "exact_interval_95": list(v.exact_interval),
        "model_uncertainty": {"u": v.model.u, "ionic_strength": v.model.ionic_strength, "source": v.model.source},
        "operating_region": {
            "total_mol_per_l": list(r.concentration),
            "temperature_c": list(r.temperature),
            "background_ionic_strength": list(r.background),
            "worst": _point(r.worst),
            "corners": [_point(c) for c in r.corners],
            "holds_mol_per_l": [list(h) for h in r.holds],
        },
    }


def _strong_alone(st: StrongAlone | None) -> dict[str, Any] | None:
    """The strong acid or base that is the whole solution, with its tolerance and working range (None otherwise)."""
    if st is None:
        return None
    return {
        "kind": st.kind,
        "name": st.name,
        "total_mol_per_l": st.concentration,
        "total_as_written": st.concentration_text,
        "tolerance_mol_per_l": st.tolerance,
        "working_range_mol_per_l": list(st.working_range),
    }


def _shortcut(sa: SolutionAnalysis, s: ShortcutAnalysis, method: Method) -> dict[str, Any]:
    v = s.validity
    out: dict[str, Any] = {
        "id": s.id,
        "title": s.title,
        "claimed": s.claimed,
        "ph": s.ph,
        "error": s.error,
        "validity_total_mol_per_l": _intervals(v.concentration_intervals),
        "validity_total_robust": [iv.robust for iv in v.concentration_intervals],
        "validity_total_swept_mol_per_l": list(v.concentration_span),
        "validity_pka": _intervals(v.pka_intervals),
        "validity_pka_robust": [iv.robust for iv in v.pka_intervals],
        "validity_pka_step": {"component": v.pka_step[0], "step": v.pka_step[1] + 1} if v.pka_step is not None else None,
        "validity_total_intervals": _interval_objects(v.concentration_intervals),
        "validity_pka_intervals": _interval_objects(v.pka_intervals),
        "model_range": {
            "max_ionic_strength_mol_per_kg": v.max_ionic_strength,
            "cut_total_mol_per_l": v.model_range_cut,
            "solubility_cut_total_mol_per_l": v.solubility_cut,
            "solubility_component": v.solubility_component,
            "outside_total_mol_per_l": [list(p) for p in v.concentration_sweep.outside],
            "outside_pka": [list(p) for p in v.pka_sweep.outside],
        },
        "max_abs_error_working_range": v.max_abs_error,
        "max_abs_error_at_total_mol_per_l": v.max_abs_error_at,
        "holds_within_working_range_mol_per_l": [list(p) for p in v.holds_within_working_range],
    }
    cu = s.constants_used
    if cu is not None:
        out["constants_used"] = {"pka": list(cu.pka), "pkw": cu.pkw}
        out["constants_stated"] = {"pka": list(cu.stated_pka), "pkw": cu.stated_pkw}
    if s.claimed:
        mc = sa.monte_carlo
        vd: Verdict = s.verdict  # type: ignore[assignment]
        words = prose(method, sa, s)
        out.update(
            {
                "verdict": vd.status,
                "condition": words.condition,
                "reasons": list(words.reasons),
                "justification": words.justification,
                "decision": _decision(vd),
                "gum": _gum(s.gum),  # type: ignore[arg-type]
                "monte_carlo": {
                    "draws": mc.draws,
                    "seed": mc.seed,
                    "spawn_key": list(mc.spawn_key),
                    "error_mean": mc.errors[s.id].mean,
                    "error_u": mc.errors[s.id].u,
                    "error_coverage": list(mc.errors[s.id].coverage),
                    "p_exceed": mc.p_exceed[s.id],
                },
                "gum_vs_monte_carlo": _comparison(s.comparison),  # type: ignore[arg-type]
            }
        )
    return out


def _solution(sa: SolutionAnalysis, analysis: MethodAnalysis) -> dict[str, Any]:
    spec = sa.spec
    c = analysis.method.conditions
    return {
        "id": spec.id,
        "description": spec.description,
        "conditions": {
            "temperature_c": c.temperature,
            "temperature_tolerance_c": c.temperature_tolerance,
            "pkw": sa.exact.pkw,
            "activity": c.activity,
            "davies_coefficient": DAVIES_COEFFICIENT,
            "bates_guggenheim_ba": BATES_GUGGENHEIM_BA,
            "debye_huckel_a": sa.exact.debye_huckel_a,
            "background_ionic_strength": c.background,
            "background_ionic_strength_tolerance": c.background_tolerance,
        },
        "components": [
            {
                "substance": comp.substance,
                "name": comp.name,
                "compound": comp.compound,
                "formula": comp.formula,
                "from_table": comp.from_table,
                "form": comp.form,
                "charge": comp.charge,
                "removed": comp.removed,
                "pka": [p.at_working_temperature for p in comp.pka],
                "total_mol_per_l": comp.concentration,
                "total_as_written": comp.concentration_text,
                "tolerance_mol_per_l": comp.tolerance,
                "working_range_mol_per_l": list(comp.working_range),
                "molar_mass_g_per_mol": comp.molar_mass,
                "pka_details": [
                    {
                        "step": j + 1,
                        "stated": p.stated,
                        "stated_temperature_c": p.stated_temperature,
                        "stated_ionic_strength": p.stated_ionic_strength,
                        "thermodynamic_25c": p.thermodynamic,
                        "at_working_temperature": p.at_working_temperature,
                        "uncertainty": p.uncertainty,
                        "distribution": p.distribution,
                        "enthalpy_kj_per_mol": p.enthalpy,
                        "heat_capacity_j_per_k_mol": p.heat_capacity,
                        "origin": p.origin,
                        "reference": p.reference,
                        "status": p.status,
                        "enthalpy_origin": p.enthalpy_origin,
                    }
                    for j, p in enumerate(comp.pka)
                ],
            }
            for comp in spec.components
        ],
        "strong_acid_mol_per_l": spec.strong_acid,
        "strong_base_mol_per_l": spec.strong_base,
        "strong_alone": _strong_alone(spec.strong_alone),
        "exact": {
            "ph": sa.exact.ph,
            "ph_conc": sa.exact.ph_conc,
            "ionic_strength": sa.exact.ionic_strength,
            "gum": _gum(sa.gum),
            "monte_carlo": _distribution(sa.monte_carlo.exact),
            "gum_vs_monte_carlo": _comparison(sa.comparison),
        },
        "monte_carlo_stopping": _stopping(sa.monte_carlo.stopping, sa.monte_carlo.draws),
        "approximations": [_shortcut(sa, s, analysis.method) for s in sa.shortcuts],
        "appendix": [_shortcut(sa, s, analysis.method) for s in sa.appendix],
        "data_quality": [
            {
                "component": q.flag.component,
                "step": q.flag.step + 1,
                "quantity": str(q.flag.quantity),
                "concern": str(q.flag.concern),
                "value": q.flag.value,
                "origin": q.flag.origin,
                "reference": q.flag.reference,
                "plausible_error": q.plausible_error,
                "common_practice": q.common_practice,
                "pka_shift": q.pka_shift,
                "at_temperature_c": q.temperature,
                "d_ph_d_pka": q.coefficient,
                "shift_exact_ph": q.shift_exact,
                "shift_error": q.shift_error,
                "worst_abs_error": q.worst_abs_error,
                "in_budget": q.in_budget,
            }
            for q in sa.data_quality
        ],
        **_co2(sa),
        **_robustness(sa),
    }


def _robustness(sa: SolutionAnalysis) -> dict[str, Any]:
    """``robustness``: buffer capacity, dilution value and ΔpH under small variations (docs/results-format.md)."""
    r = sa.robustness
    if r is None:
        return {}
    return {
        "robustness": {
            "buffer_capacity_mol_per_l_per_ph": r.buffer_capacity_mol_per_l_per_ph,
            "dilution_value": r.dilution_value,
            "component_variations": [
                {
                    "component": v.component,
                    "substance": sa.spec.components[v.component].substance,
                    "percent": v.percent,
                    "percent_source": "tolerance" if v.from_tolerance else "default",
                    "delta_ph_minus": v.delta_ph_minus,
                    "delta_ph_plus": v.delta_ph_plus,
                }
                for v in r.components
            ],
            "strong_alone_variation": None if (a := r.strong_alone) is None else {
                "name": sa.spec.lead_added_as,
                "percent": a.percent,
                "percent_source": "tolerance" if a.from_tolerance else "default",
                "delta_ph_minus": a.delta_ph_minus,
                "delta_ph_plus": a.delta_ph_plus,
            },
            "strong_addition_mol_per_l": r.strong_addition_mol_per_l,
            "delta_ph_strong_acid": r.delta_ph_strong_acid,
            "delta_ph_strong_base": r.delta_ph_strong_base,
            "temperature_step_c": r.temperature_step_c,
            "temperature_step_source": "tolerance" if r.temperature_step_from_tolerance else "default",
            "temperature_low_c": r.temperature_low_c,
            "temperature_high_c": r.temperature_high_c,
            "delta_ph_temperature_low": r.delta_ph_temperature_low,
            "delta_ph_temperature_high": r.delta_ph_temperature_high,
            "dph_dt_per_k": r.dph_dt_per_k,
            "co2_shift_ph": r.co2_shift_ph,
            "co2_shift_compares": r.co2_shift_compares,
        }
    }


def _co2(sa: SolutionAnalysis) -> dict[str, Any]:
    """``co2`` (the condition as solved) and ``co2_open_to_air`` (when the method assumes none)."""
    r = sa.co2
    if r is None:
        return {}
    air = None
    if r.mode == "none":
        air = {"ph": r.ph_open_to_air, "shift": r.shift_open_to_air, "exceeds_acceptance_limit": r.exceeds_limit}
    return {
        "co2": {
            "mode": r.mode,
            "partial_pressure_atm": r.partial_pressure_atm,
            "henry_mol_per_l_atm": r.henry_mol_per_l_atm,
            "total_mol_per_l": r.total_mol_per_l,
            "pka": list(r.pka) if r.pka is not None else None,
        },
        "co2_open_to_air": air,
        **_adjustment(sa),
        "preparation": _preparation(sa.preparation),
    }


def _adjustment(sa: SolutionAnalysis) -> dict[str, Any]:
    """``adjustment`` (null without ``adjusted_to``) and ``adjustment_stock`` (null without a stock)."""
    r = sa.adjustment
    if r is None:
        return {"adjustment": None, "adjustment_stock": None}
    stock = None
    if r.stock_mol_per_l is not None:
        stock = {"stock_mol_per_l": r.stock_mol_per_l, "volume_ml_per_l": r.volume_ml_per_l, "shortcut_volume_ml_per_l": r.shortcut_volume_ml_per_l}
    return {
        "adjustment": {
            "target_ph": r.target_ph,
            "titrant": r.titrant,
            "amount_mol_per_l": r.amount_mol_per_l,
            "shortcut_amount_mol_per_l": r.shortcut_amount_mol_per_l,
            "shortcut_recipe_ph": r.shortcut_recipe_ph,
        },
        "adjustment_stock": stock,
    }


def _preparation(p: Preparation) -> dict[str, Any]:
    """``preparation``: the mass of each component and the volume of each titrant per litre (docs/results-format.md)."""
    return {
        "components": [
            {
                "component": w.index,
                "substance": w.substance,
                "compound": w.compound,
                "formula": w.formula,
                "water_of_crystallisation": w.water,
                "molar_mass_g_per_mol": w.molar_mass_g_per_mol,
                "amount_mol_per_l": w.amount_mol_per_l,
                "mass_g_per_l": w.mass_g_per_l,
                "mass_stated": w.stated_mass,
                "as_written": w.as_written,
            }
            for w in p.components
        ],
        "titrants": [
            {
                "role": t.role,
                "titrant": t.titrant,
                "amount_mol_per_l": t.amount_mol_per_l,
                "stock_mol_per_l": t.stock_mol_per_l,
                "volume_ml_per_l": t.volume_ml_per_l,
                "target_ph": t.target_ph,
                "compound": t.weighed.compound if t.weighed else None,
                "formula": t.weighed.formula if t.weighed else None,
                "molar_mass_g_per_mol": t.weighed.molar_mass_g_per_mol if t.weighed else None,
                "mass_g_per_l": t.weighed.mass_g_per_l if t.weighed else None,
            }
            for t in p.titrants
        ],
    }


def results_document(analysis: MethodAnalysis, table_sha256: str) -> dict[str, Any]:
    """The ``results.json`` document of one method (see docs/results-format.md).

    ``table_sha256``: the SHA-256 of the substance table the method was loaded with.
    """
    m = analysis.method
    return {
        "format": RESULTS_FORMAT,
        "tool": {"name": "ph-dossier", "version": __version__},
        "method": {"id": m.id, "title": m.title, "revision": m.revision, "source_sha256": m.source_sha256},
        "substance_table_sha256": table_sha256,
        "criteria": {"max_ph_error": m.criteria.max_ph_error, "probability": m.criteria.probability},
        "settings": {
            "solver_tolerance_ln_h": TOLERANCE,
            "monte_carlo_draws": analysis.settings.draws,
            "monte_carlo_adaptive": analysis.settings.adaptive,
            "monte_carlo_seed": analysis.settings.seed,
            "monte_carlo_generator": "numpy PCG64, SeedSequence(seed, spawn_key=(solution index,))",
        },
        "solutions": [_solution(sa, analysis) for sa in analysis.solutions],
    }


def _csv(header: list[str], rows: list[list[Any]]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for r in rows:
        w.writerow([repr(x) if isinstance(x, float) else x for x in r])
    return buf.getvalue()


def _sweep_rows(sweep: Sweep) -> tuple[list[str], list[list[Any]]]:
    names = list(sweep.parts)
    rows = [[float(sweep.x[i]), float(sweep.exact_ph[i]), float(sweep.error[i])] + [float(sweep.parts[n][i]) for n in names] for i in range(len(sweep.x))]
    return names, rows


def csv_tables(analysis: MethodAnalysis) -> dict[str, str]:
    """CSV tables of a method: validity intervals, sensitivities, and each sweep."""
    out: dict[str, str] = {}
    validity_rows = []
    sens_rows = []
    for sa in analysis.solutions:
        sens_rows += [[sa.spec.id, "exact pH", c.key, c.label, c.unit, c.u, c.coefficient, c.contribution] for c in sa.gum.contributions]
        for s in sa.shortcuts + sa.appendix:
            v = s.validity
            for kind, ivs in (("total_mol_per_l", v.concentration_intervals), ("pka", v.pka_intervals)):
                validity_rows += [[sa.spec.id, s.id, "claimed" if s.claimed else "appendix", kind, iv.low, iv.high, iv.robust,
                                  iv.ionic_strength_low, iv.ionic_strength_high, iv.high_is_cut] for iv in ivs]
            if s.claimed and s.gum is not None:
                sens_rows += [[sa.spec.id, f"error of {s.id}", c.key, c.label, c.unit, c.u, c.coefficient, c.contribution] for c in s.gum.contributions]
                names, rows = _sweep_rows(v.concentration_sweep)
                out[f"{sa.spec.id}-{s.id}-concentration-sweep.csv"] = _csv(["total_mol_per_l", "exact_ph", "error"] + [f"error_part: {n}" for n in names], rows)
                if v.pka_step is None:  # a shortcut that uses no pKa has no pKa sweep
                    continue
                names, rows = _sweep_rows(v.pka_sweep)
                out[f"{sa.spec.id}-{s.id}-pka-sweep.csv"] = _csv(["pka", "exact_ph", "error"] + [f"error_part: {n}" for n in names], rows)
    out["validity.csv"] = _csv(["solution", "shortcut", "role", "range_of", "low", "high", "robust",
                                     "ionic_strength_low", "ionic_strength_high", "high_is_cut"], validity_rows)
    out["sensitivity.csv"] = _csv(["solution", "quantity", "input", "label", "unit", "u", "coefficient", "contribution"], sens_rows)
    return dict(sorted(out.items()))

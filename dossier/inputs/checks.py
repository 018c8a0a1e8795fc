"""Checks beyond types, and the conversion of a typed method file into the
frozen :class:`~dossier.inputs.model.Method`.

Here the substance table fills in values, units are converted, pKa values
are converted to I = 0 and 25 °C, and everything that needs several values
at once is checked: references that resolve, working ranges that contain
the nominal concentration, pKa order, shortcuts that exist and apply.
"""

from __future__ import annotations

import dataclasses
import difflib
import re
from collections.abc import Callable
from dataclasses import dataclass, field

from .. import limits
from ..chemistry import (
    AIR_PARTIAL_PRESSURE_ATM,
    CATALOGUE,
    ActivityModelId,
    ChemistryError,
    Component,
    ConvergenceError,
    InputRangeError,
    Solution,
    StatedConstants,
    activity_model,
    equilibrium,
    titrant_for_ph,
)
from ..chemistry.activity import thermodynamic_pka
from ..chemistry.temperature import REFERENCE_TEMPERATURE, pka_at_temperature
from ..problems import Problem, Severity
from .model import (
    METHOD_FILE,
    AdjustmentSpec,
    TABLE,
    ClaimedShortcut,
    ComponentSpec,
    ConditionsSpec,
    Criteria,
    Distribution,
    Method,
    PkaValue,
    ReferenceSpec,
    SolutionSpec,
    StrongAlone,
)
from pydantic import ValidationError

from .forms import FormError, protons_removed
from .quality import Concern, DataFlag, Quantity, data_flags, farthest_temperature
from .substances import STATUS_MEANINGS
from .schema import Co2Open, ComponentIn, Conditions, MethodFile, PkaIn, ShortcutIn, SolutionIn, StrongIn, TitrantIn
from .substances import Substance, SubstanceTable, TableCompound, TableForm
from .units import UnitError, format_concentration, parse_concentration, parse_pressure
from .yamlpos import LoadedYaml

__all__ = ["build_method", "CONCENTRATION_LIMITS", "closest", "did_you_mean"]

CONCENTRATION_LIMITS = limits.CONCENTRATION
"""Allowed concentrations in a method file, nominal and working range [mol/L]."""

Loc = tuple[str | int, ...]


def closest(word: str, choices: list[str] | tuple[str, ...]) -> str | None:
    """The choice closest to ``word`` (difflib ratio ≥ 0.7, ignoring case), or None."""
    folded = {c.casefold(): c for c in choices}
    close = difflib.get_close_matches(word.casefold(), list(folded), n=1, cutoff=0.7)
    return folded[close[0]] if close else None


def did_you_mean(word: str, choices: list[str] | tuple[str, ...]) -> str:
    """' (did you mean 'x'?)' when a choice is close (:func:`closest`), else ''."""
    close = closest(word, choices)
    return f" (did you mean {close!r}?)" if close else ""


@dataclass
class _Ctx:
    path: str
    doc: LoadedYaml
    table: SubstanceTable
    problems: list[Problem] = field(default_factory=list)
    reference_kinds: dict[str, str] = field(default_factory=dict)

    def add(self, loc: Loc, message: str, severity: Severity = Severity.ERROR) -> None:
        pos = self.doc.where(loc)
        self.problems.append(Problem(self.path, pos.line, pos.column, dotted(loc), message, severity))

    def warn(self, loc: Loc, message: str) -> None:
        self.add(loc, message, Severity.WARNING)


def _num(x: float) -> str:
    """A limit as a message shows it: ``−5``, ``20`` (a minus sign, not a hyphen)."""
    return f"{x:g}".replace("-", "\u2212")


def dotted(loc: Loc) -> str:
    """('solutions', 0, 'id') → 'solutions[0].id'."""
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += ("." if out else "") + str(part)
    return out


_PERCENT = re.compile(r"^\s*([0-9.eE+-]+)\s*%\s*$")


def _concentration(ctx: _Ctx, loc: Loc, text: str, molar_mass: float | None, temperature: float, *, allow_zero: bool = False) -> float | None:
    try:
        c = parse_concentration(text, molar_mass=molar_mass, temperature=temperature).mol_per_l
    except UnitError as exc:
        ctx.add(loc, str(exc))
        return None
    lo, hi = CONCENTRATION_LIMITS
    if allow_zero and c == 0.0:
        return c
    if not lo <= c <= hi:
        ctx.add(loc, f"{text!r} ({c:.3g} mol/L) is outside the allowed range {lo:g} … {hi:g} mol/L")
        return None
    return c


def _tolerance(ctx: _Ctx, loc: Loc, text: str | None, nominal: float, molar_mass: float | None, temperature: float) -> float | None:
    if text is None:
        return 0.0
    m = _PERCENT.match(text)
    if m and "w/v" not in text:
        try:
            pct = float(m.group(1))
        except ValueError:
            pct = -1.0
        p_lo, p_hi = limits.PERCENT_TOLERANCE
        if not p_lo <= pct <= p_hi:
            ctx.add(loc, f"a percentage tolerance must be {_num(p_lo)} … {_num(p_hi)} %; got {text!r}")
            return None
        return nominal * pct / 100.0
    try:
        tol = parse_concentration(text, molar_mass=molar_mass, temperature=temperature).mol_per_l
    except UnitError as exc:
        ctx.add(loc, f"{exc}; or a percentage such as '2 %'")
        return None
    if tol >= nominal:
        ctx.add(loc, f"tolerance {text!r} is not smaller than the nominal concentration ({format_concentration(nominal)})")
        return None
    return tol


def _form(ctx: _Ctx, loc: Loc, form: str | int, steps: int) -> int | None:
    try:
        return protons_removed(form, steps)
    except FormError as exc:
        ctx.add(loc, str(exc))
        return None


def _pka(
    ctx: _Ctx,
    loc: Loc,
    entry: PkaIn,
    step: int,
    charge: int,
    substance: Substance | None,
    refs: set[str],
    conditions: ConditionsSpec,
    cited: set[str],
) -> PkaValue | None:
    table_step = substance.steps[step - 1] if substance is not None else None
    if entry.value is not None:
        value, origin, status = entry.value, METHOD_FILE, "stated"
        if entry.reference is None:
            ctx.add(loc + ("reference",), "a stated pKa value needs the key of its reference (under references:)")
            return None
        if entry.reference not in refs:
            ctx.add(loc + ("reference",), f"reference {entry.reference!r} is not defined under references:{did_you_mean(entry.reference, sorted(refs))}")
            return None
        reference = entry.reference
        cited.add(reference)
    elif table_step is not None:
        value, origin, status, reference = table_step.pka.value, TABLE, table_step.pka.status, table_step.pka.source
        if entry.reference is not None:
            ctx.warn(loc + ("reference",), f"ignored: the value comes from the substance table (source {reference!r})")
        if entry.temperature != REFERENCE_TEMPERATURE or entry.ionic_strength != 0.0:
            ctx.add(loc, "temperature and ionic_strength describe a stated value; the table's values hold at 25 °C and I = 0")
            return None
    else:
        ctx.add(loc + ("value",), "give the pKa value: the substance is not in the substance table")
        return None

    enthalpy, dh_origin = entry.enthalpy, METHOD_FILE
    dh_status = dh_source = dcp_status = dcp_source = ""
    if enthalpy is None and table_step is not None and table_step.enthalpy is not None:
        enthalpy, dh_origin = table_step.enthalpy.value, TABLE
        dh_status, dh_source = table_step.enthalpy.status, table_step.enthalpy.source
    if enthalpy is None:
        dh_origin = "none"
    heat_capacity = entry.heat_capacity
    if heat_capacity is None and entry.enthalpy is None and table_step is not None and table_step.heat_capacity is not None:
        heat_capacity = table_step.heat_capacity.value
        dcp_status, dcp_source = table_step.heat_capacity.status, table_step.heat_capacity.source

    # stated value (T_s, I_s) -> thermodynamic at T_s -> thermodynamic at 25 °C
    t_s, i_s = entry.temperature, entry.ionic_strength
    pk_ts = value
    if i_s > 0.0:
        if conditions.activity == ActivityModelId.IDEAL:
            ctx.warn(loc + ("ionic_strength",), f"stated at I = {i_s:g} mol/kg but the activity model is ideal: taken as thermodynamic without conversion")
        else:
            pk_ts = float(thermodynamic_pka(value, i_s, t_s, charge - step, conditions.activity, entry.convention))
    if t_s != REFERENCE_TEMPERATURE:
        if enthalpy is None:
            if t_s == conditions.temperature:
                ctx.warn(loc + ("temperature",), "no enthalpy: the pKa is taken as independent of temperature, so the temperature sensitivity leaves out its change")
                pk25 = pk_ts
            else:
                ctx.add(loc + ("enthalpy",), f"the pKa is stated at {t_s:g} °C and the method works at {conditions.temperature:g} °C: give the enthalpy of ionization to convert it")
                return None
        else:
            pk25 = pk_ts - (float(pka_at_temperature(0.0, t_s, enthalpy, heat_capacity)))
    else:
        pk25 = pk_ts
    at_t = float(pka_at_temperature(pk25, conditions.temperature, enthalpy, heat_capacity))
    distribution = Distribution(entry.distribution)
    spread = limits.DRAW_TRUNCATION_SIGMAS * entry.uncertainty if distribution == Distribution.NORMAL else 3.0**0.5 * entry.uncertainty
    (eng_lo, eng_hi), (conv_lo, conv_hi), (st_lo, st_hi) = limits.PKA_ENGINE, limits.PKA_CONVERTED, limits.PKA_STATED
    if pk25 - spread < eng_lo or pk25 + spread > eng_hi:
        ctx.add(loc + ("uncertainty",), f"pKa {pk25:.3f} with u = {entry.uncertainty:g} would be drawn outside {_num(eng_lo)} … {_num(eng_hi)}, the range the engine solves")
        return None
    if not conv_lo <= pk25 <= conv_hi:
        ctx.add(loc, f"converted to 25 °C and I = 0 the pKa is {pk25:.3f}; allowed: {_num(st_lo)} … {_num(st_hi)} (as stated) and {_num(conv_lo)} … {_num(conv_hi)} after conversion")
        return None
    return PkaValue(
        stated=value,
        stated_temperature=t_s,
        stated_ionic_strength=i_s,
        thermodynamic=pk25,
        at_working_temperature=at_t,
        uncertainty=entry.uncertainty,
        distribution=distribution,
        enthalpy=enthalpy,
        heat_capacity=heat_capacity,
        origin=origin,
        reference=reference,
        status=status,
        enthalpy_origin=dh_origin,
        enthalpy_status=dh_status,
        heat_capacity_status=dcp_status,
        enthalpy_source=dh_source,
        heat_capacity_source=dcp_source,
    )


def _component(ctx: _Ctx, loc: Loc, comp: ComponentIn, refs: set[str], conditions: ConditionsSpec, cited: set[str]) -> ComponentSpec | None:
    substance = ctx.table.get(comp.substance)
    ok = True
    if substance is None:
        missing = comp.charge is None or any(p.value is None for p in comp.pka)
        if missing:
            ctx.add(
                loc + ("substance",),
                f"{comp.substance!r} is not in the substance table{did_you_mean(comp.substance, list(ctx.table.substances))}: "
                "use a table id (see `dossier substances`) or give charge and every pKa value",
            )
            return None
        charge = comp.charge
        name = comp.substance
    else:
        name = substance.name
        if len(comp.pka) != len(substance.steps):
            ctx.add(loc + ("pka",), f"{comp.substance} has {len(substance.steps)} ionization step(s) in the table; give {len(substance.steps)} pka entr{'y' if len(substance.steps) == 1 else 'ies'} (got {len(comp.pka)})")
            return None
        charge = substance.charge
        if comp.charge is not None and comp.charge != substance.charge:
            ctx.add(loc + ("charge",), f"the table gives charge {substance.charge:+d} for the fully protonated form of {comp.substance}; got {comp.charge:+d}")
            ok = False
    assert charge is not None
    steps = len(comp.pka)
    removed = _form(ctx, loc + ("form",), comp.form, steps)
    table_form = substance.form(removed) if (substance is not None and removed is not None) else None
    molar_mass = comp.molar_mass if comp.molar_mass is not None else (table_form.molar_mass if table_form else None)
    compound = table_form.compound if table_form else name
    weighed = _weighed_as(ctx, loc, comp, substance, table_form, removed)
    if weighed is False:
        ok = False
        weighed = None
    mass_basis = weighed.molar_mass if isinstance(weighed, TableCompound) else molar_mass
    t = conditions.temperature
    conc = _concentration(ctx, loc + ("concentration",), comp.concentration, mass_basis, t)
    lo = _concentration(ctx, loc + ("working_range", 0), comp.working_range[0], mass_basis, t)
    hi = _concentration(ctx, loc + ("working_range", 1), comp.working_range[1], mass_basis, t)
    tol = _tolerance(ctx, loc + ("tolerance",), comp.tolerance, conc, mass_basis, t) if conc is not None else None
    if conc is not None and lo is not None and hi is not None:
        if lo >= hi:
            ctx.add(loc + ("working_range",), f"the working range must go from low to high; got {comp.working_range[0]!r} to {comp.working_range[1]!r}")
            ok = False
        elif not lo * (1 - 1e-12) <= conc <= hi * (1 + 1e-12):
            ctx.add(
                loc + ("working_range",),
                f"working range {format_concentration(lo)} … {format_concentration(hi)} does not contain the nominal concentration {format_concentration(conc)}",
            )
            ok = False
    pkas = []
    for i, entry in enumerate(comp.pka):
        pv = _pka(ctx, loc + ("pka", i), entry, i + 1, charge, substance, refs, conditions, cited)
        if pv is None:
            ok = False
        pkas.append(pv)
    if all(p is not None for p in pkas):
        for i in range(1, len(pkas)):
            if pkas[i].thermodynamic < pkas[i - 1].thermodynamic:  # type: ignore[union-attr]
                ctx.add(loc + ("pka", i), f"pKa values must be in ascending order; step {i + 1} ({pkas[i].thermodynamic:.3f}) is below step {i} ({pkas[i - 1].thermodynamic:.3f})")  # type: ignore[union-attr]
                ok = False
    if not ok or None in (removed, conc, lo, hi, tol) or any(p is None for p in pkas):
        return None
    return ComponentSpec(
        substance=comp.substance,
        name=name,
        from_table=substance is not None,
        charge=charge,
        removed=removed,  # type: ignore[arg-type]
        form=str(comp.form),
        compound=compound,
        concentration=conc,  # type: ignore[arg-type]
        concentration_text=comp.concentration,
        tolerance=tol,  # type: ignore[arg-type]
        tolerance_text=comp.tolerance or "",
        working_range=(lo, hi),  # type: ignore[arg-type]
        working_range_text=(comp.working_range[0], comp.working_range[1]),
        molar_mass=molar_mass,
        pka=tuple(pkas),  # type: ignore[arg-type]
        formula=table_form.formula if table_form else None,
        solubility=table_form.solubility.value if (table_form and table_form.solubility) else None,
        solubility_source=table_form.solubility.source if (table_form and table_form.solubility) else None,
        weighed_compound=weighed.compound if isinstance(weighed, TableCompound) else None,
        weighed_formula=weighed.formula if isinstance(weighed, TableCompound) else None,
        weighed_molar_mass=weighed.molar_mass if isinstance(weighed, TableCompound) else None,
        weighed_water=weighed.water if isinstance(weighed, TableCompound) else 0,
        concentration_kind=_concentration_kind(comp.concentration, mass_basis, t),
    )


def _concentration_kind(text: str, molar_mass: float | None, temperature: float) -> str:
    """How a concentration that was read without problems was written: ``amount``, ``molality`` or ``mass``."""
    try:
        return parse_concentration(text, molar_mass=molar_mass, temperature=temperature).kind
    except UnitError:  # pragma: no cover - the concentration was read above
        return "amount"


def _weighed_as(ctx: _Ctx, loc: Loc, comp: ComponentIn, substance: Substance | None, table_form: TableForm | None,
                removed: int | None) -> TableCompound | None | bool:
    """The compound ``weighed_as:`` names, among those the table lists for the form
    (None when the file names none; False when it names one that cannot be used, with the problem added)."""
    text = comp.weighed_as
    if text is None:
        return None
    here = loc + ("weighed_as",)
    if substance is None:
        ctx.add(here, f"{comp.substance!r} is not in the substance table, which lists the compounds that may be weighed: "
                      "leave weighed_as out and state molar_mass for the compound you weigh")
        return False
    if removed is None:
        return False
    if table_form is None:
        ctx.add(here, f"the substance table lists no compound for {substance.name} with {removed} proton(s) removed: "
                      "leave weighed_as out and state molar_mass for the compound you weigh")
        return False
    if comp.molar_mass is not None:
        ctx.add(here, "give weighed_as or molar_mass, not both: weighed_as takes the molar mass from the table's formula")
        return False
    wanted = text.strip().casefold().replace(".", "·")
    for c in table_form.weighable:
        if wanted in (c.compound.casefold(), c.formula.casefold()):
            return c
    names = [c.compound for c in table_form.weighable]
    ctx.add(here, f"{text!r} is not a compound the substance table lists for {substance.name}, {table_form.compound}"
                  f"{did_you_mean(text, names)}; choose one of: {'; '.join(f'{c.compound} ({c.formula})' for c in table_form.weighable)}")
    return False


def _solution(ctx: _Ctx, loc: Loc, sol: SolutionIn, refs: set[str], conditions: ConditionsSpec, cited: set[str]) -> SolutionSpec | None:
    comps = [_component(ctx, loc + ("components", i), c, refs, conditions, cited) for i, c in enumerate(sol.components)]
    t = conditions.temperature
    alone = _strong_alone(ctx, loc, sol, t)
    acid = _strong_amount(ctx, loc + ("strong_acid",), sol.strong_acid, t)
    base = _strong_amount(ctx, loc + ("strong_base",), sol.strong_base, t)
    ids = [sc.id for sc in sol.shortcuts]
    unknown = False
    for i, sc in enumerate(sol.shortcuts):
        if sc.id not in CATALOGUE:
            where = loc + (("shortcuts", i, "id") if sc.as_written is not None else ("shortcuts", i))
            ctx.add(where, f"unknown shortcut {sc.id!r}{did_you_mean(sc.id, list(CATALOGUE))}; known: {', '.join(CATALOGUE)}")
            unknown = True
    if len(set(ids)) != len(ids):
        ctx.warn(loc + ("shortcuts",), "a shortcut is listed twice")
    if any(c is None for c in comps) or acid is None or base is None or alone is False or unknown:
        return None
    for i, comp in enumerate(comps[1:], start=1):
        first = comps[0]
        ratio_lo = comp.working_range[0] / comp.concentration / (first.working_range[0] / first.concentration)  # type: ignore[union-attr]
        ratio_hi = comp.working_range[1] / comp.concentration / (first.working_range[1] / first.concentration)  # type: ignore[union-attr]
        if abs(ratio_lo - 1) > 0.01 or abs(ratio_hi - 1) > 0.01:
            ctx.warn(
                loc + ("components", i, "working_range"),
                "not in proportion to the first component's: the analyses dilute or concentrate the whole solution "
                "together over the first component's working range",
            )
    if not _one_set_of_constants(ctx, loc, comps):  # type: ignore[arg-type]
        return None
    claims = _claims(ctx, loc, sol.shortcuts, comps[0] if comps else None)  # type: ignore[arg-type]
    if claims is None:
        return None
    acid_stock = _stock(ctx, loc, "strong_acid", sol.strong_acid_stock, acid, t)
    base_stock = _stock(ctx, loc, "strong_base", sol.strong_base_stock, base, t)
    if acid_stock is False or base_stock is False:
        return None
    spec = SolutionSpec(sol.id, sol.description, tuple(comps), acid, base, tuple(dict.fromkeys(ids)), as_written=claims,  # type: ignore[arg-type]
                        strong_acid_stock=acid_stock, strong_base_stock=base_stock, strong_alone=alone)  # type: ignore[arg-type]
    try:
        engine_solution = spec.to_solution(conditions)
    except InputRangeError as exc:
        ctx.add(loc, f"cannot be solved as given: {exc}")
        return None
    if sol.adjusted_to is not None:
        spec = _adjusted(ctx, loc + ("adjusted_to",), sol, spec, engine_solution, conditions, refs, cited)
        if spec is None:
            return None
        engine_solution = spec.to_solution(conditions)
    for flag in data_flags(spec, conditions, ctx.reference_kinds):
        _warn_flag(ctx, loc, spec, conditions, flag)
    ok = True
    for i, sid in enumerate(ids):
        why = CATALOGUE[sid].why_not(engine_solution)
        if why is not None:
            ctx.add(loc + ("shortcuts", i), f"{sid} does not apply to this solution: {why}")
            ok = False
    ok = _within_model_range(ctx, loc, spec, conditions) and ok
    return spec if ok else None


_QUANTITY_WORDS = {Quantity.PKA: "pKa{n}", Quantity.ENTHALPY: "ΔH° of step {n}", Quantity.HEAT_CAPACITY: "ΔCp° of step {n}"}
_UNITS = {Quantity.PKA: "", Quantity.ENTHALPY: " kJ/mol", Quantity.HEAT_CAPACITY: " J/(K·mol)"}


def _warn_flag(ctx: _Ctx, loc: Loc, spec: SolutionSpec, conditions: ConditionsSpec, flag: DataFlag) -> None:
    """A data-quality warning at the pKa entry, naming the value (an error under --strict)."""
    comp = spec.components[flag.component]
    what = _QUANTITY_WORDS[flag.quantity].format(n=flag.step + 1) + f" of {comp.name}"
    here: Loc = loc + ("components", flag.component, "pka", flag.step)
    if flag.concern == Concern.NO_ENTHALPY:
        t = farthest_temperature(conditions)
        ctx.warn(here, f"pKa{flag.step + 1} of {comp.name} has no enthalpy of ionization ΔH°, and the working temperature reaches {t:g} °C: the 25 °C pKa is used unchanged, "
                       "and the uncertainty budget takes ΔH° as unknown within ±50 kJ/mol; state the enthalpy with its reference")
        return
    value = f"{_num(flag.value or 0.0)}{_UNITS[flag.quantity]}"
    source = f"{flag.origin}, source {flag.reference!r}" if flag.origin == TABLE else f"reference {flag.reference!r}"
    if flag.concern in (Concern.RECALLED, Concern.UNVERIFIED):
        ctx.warn(here, f"{what} = {value} ({source}) is {flag.concern}: {STATUS_MEANINGS[flag.concern]}; "
                       "check it against the source or state a value with its reference")
    elif flag.concern == Concern.ESTIMATE:
        ctx.warn(here + ("reference",), f"{what} = {value} ({source}) is an estimate, not a measurement or a compilation")
    else:
        ctx.warn(here + ("uncertainty",), f"{what} = {value} has no uncertainty (0): its error does not enter the budget; state a standard uncertainty")


def _strong_amount(ctx: _Ctx, loc: Loc, value: str | StrongIn | None, temperature: float) -> float | None:
    """A strong acid's (base's) concentration [mol/L], as text or from its ``{concentration, …}`` (0 when not given)."""
    if value is None:
        return 0.0
    if isinstance(value, StrongIn):
        return _concentration(ctx, loc + ("concentration",), value.concentration, None, temperature)
    return _concentration(ctx, loc, value, None, temperature, allow_zero=True)


def _strong_alone(ctx: _Ctx, loc: Loc, sol: SolutionIn, temperature: float) -> StrongAlone | None | bool:
    """The strong acid or base that is the whole solution (None when the solution has
    components; False after an error). A solution needs components, or exactly one
    strong acid or base stated with its working range."""
    given = [(key, v) for key, v in (("strong_acid", sol.strong_acid), ("strong_base", sol.strong_base)) if v is not None]
    if sol.components:
        ok = True
        for key, v in given:
            if isinstance(v, StrongIn):
                ctx.add(loc + (key,), "tolerance, working_range and name are for a strong acid or base alone in its solution; "
                                      "beside components, give the concentration as text (e.g. '10 mmol/L'): the analyses scale it with the first component")
                ok = False
        return None if ok else False
    if not given:
        ctx.add(loc + ("components",), "the solution holds nothing: give its components, or a strong acid or base alone "
                                       "(strong_acid: {concentration, tolerance, working_range})")
        return False
    if len(given) > 1:
        ctx.add(loc + ("strong_base",), "a solution without components holds a strong acid or a strong base, not both (they neutralize each other to a salt)")
        return False
    key, v = given[0]
    kind = "acid" if key == "strong_acid" else "base"
    if not isinstance(v, StrongIn):
        ctx.add(loc + (key,), f"alone in its solution (no components), the strong {kind} needs its working range: write "
                              f"{key}: {{concentration: {v}, tolerance: 2 %, working_range: [low, high]}}")
        return False
    if sol.adjusted_to is not None:
        ctx.add(loc + ("adjusted_to",), f"needs a weak acid–base component to adjust; for a strong {kind} alone, state its concentration")
        return False
    here = loc + (key,)
    conc = _concentration(ctx, here + ("concentration",), v.concentration, None, temperature)
    lo = _concentration(ctx, here + ("working_range", 0), v.working_range[0], None, temperature)
    hi = _concentration(ctx, here + ("working_range", 1), v.working_range[1], None, temperature)
    tol = _tolerance(ctx, here + ("tolerance",), v.tolerance, conc, None, temperature) if conc is not None else None
    if None in (conc, lo, hi, tol):
        return False
    assert conc is not None and lo is not None and hi is not None and tol is not None
    if lo >= hi:
        ctx.add(here + ("working_range",), f"the working range must go from low to high; got {v.working_range[0]!r} to {v.working_range[1]!r}")
        return False
    if not lo * (1 - 1e-12) <= conc <= hi * (1 + 1e-12):
        ctx.add(here + ("working_range",), f"working range {format_concentration(lo)} … {format_concentration(hi)} does not contain the nominal concentration {format_concentration(conc)}")
        return False
    return StrongAlone(kind, v.name or f"strong {kind}", conc, v.concentration, tol, v.tolerance or "", (lo, hi), (v.working_range[0], v.working_range[1]))


def _claims(ctx: _Ctx, loc: Loc, shortcuts: list[ShortcutIn], first: ComponentSpec | None) -> tuple[ClaimedShortcut, ...] | None:
    """The claims that state the procedure's own constants (``as_written:``), checked:
    one pKa per step of the first component, each within the limits of a
    stated pKa, pKw within the limits of an override, only for a formula.
    None when one is wrong (each problem added)."""
    out: list[ClaimedShortcut] = []
    ok = True
    seen: set[str] = set()
    for i, sc in enumerate(shortcuts):
        aw = sc.as_written
        if aw is None or sc.id in seen:
            continue
        seen.add(sc.id)
        here = loc + ("shortcuts", i, "as_written")
        if not CATALOGUE[sc.id].formula:
            ctx.add(here, f"{sc.id} is the exact solution with one assumption changed, not a formula: it has no constants of its own to state")
            ok = False
            continue
        steps = len(first.pka) if first is not None else 0
        pka: tuple[float | None, ...] = ()
        if aw.pka is not None:
            if first is None:
                ctx.add(here + ("pka",), "the solution has no weak component: there is no pKa to state")
                ok = False
                continue
            if len(aw.pka) != steps:
                ctx.add(here + ("pka",), f"{len(aw.pka)} value(s) for {first.name}, which has {steps} ionization step(s): give one per step, null for the model's value")
                ok = False
                continue
            (lo, hi) = limits.PKA_STATED
            for j, v in enumerate(aw.pka):
                if v is not None and not lo <= v <= hi:
                    ctx.add(here + ("pka", j), f"must be a pKa from {_num(lo)} to {_num(hi)}; got {v:g}")
                    ok = False
            pka = tuple(aw.pka)
        if aw.pkw is not None:
            (lo, hi) = limits.PKW_OVERRIDE
            if not lo <= aw.pkw <= hi:
                ctx.add(here + ("pkw",), f"must be a pKw from {_num(lo)} to {_num(hi)}; got {aw.pkw:g}")
                ok = False
        stated = StatedConstants(pka, aw.pkw)
        if stated.empty:
            ctx.warn(here, "states no constant of the procedure's own: the shortcut uses the model's values")
            continue
        out.append(ClaimedShortcut(sc.id, stated))
    return tuple(out) if ok else None


def _background_beyond_range(conditions: ConditionsSpec) -> bool:
    """Whether the background ionic strength (with its tolerance) alone leaves the activity model's range."""
    model = activity_model(conditions.activity)
    return not model.in_range(conditions.background + conditions.background_tolerance)


def _range_problem(ctx: _Ctx, loc: Loc, what: str, ionic_strength: float, conditions: ConditionsSpec) -> bool:
    """Warn beyond the activity model's range, refuse beyond
    :data:`~dossier.limits.MODEL_RANGE_REFUSAL_FACTOR` times it; False when refused."""
    model = activity_model(conditions.activity)
    top = model.max_ionic_strength
    if top is None or ionic_strength <= top:
        return True
    name = model.title if model.title.startswith(("Davies", "Debye")) else model.title[0].lower() + model.title[1:]
    factor = limits.MODEL_RANGE_REFUSAL_FACTOR
    if ionic_strength > factor * top:
        ctx.add(loc, f"{what} I = {ionic_strength:.3g} mol/kg, more than {factor:g} × the range of the {name} (I ≤ {top:g} mol/kg): "
                     "the model does not describe this solution")
        return False
    ctx.warn(loc, f"{what} I = {ionic_strength:.3g} mol/kg, beyond the range of the {name} (I ≤ {top:g} mol/kg): "
                  f"shortcuts are judged only up to I = {top:g} mol/kg")
    return True


def _within_model_range(ctx: _Ctx, loc: Loc, spec: SolutionSpec, conditions: ConditionsSpec) -> bool:
    """The ionic strength at the upper end of the working range (the whole
    solution scaled with the first component, solved by the engine) against
    the activity model's range; the working range against the solubility of
    each component's form. False when refused."""
    lo, hi = spec.working_range
    lead = spec.lead_concentration
    lead_loc: Loc = (f"strong_{spec.strong_alone.kind}",) if spec.strong_alone is not None else ("components", 0)
    top_loc = loc + lead_loc + ("working_range", 1)
    ok = True
    if not _background_beyond_range(conditions):
        try:
            ionic = float(equilibrium(spec.to_solution(conditions, scale=hi / lead)).ionic_strength)
        except ChemistryError as exc:
            ctx.add(top_loc, f"cannot be solved at the working range's upper end: {exc}")
            return False
        ok = _range_problem(ctx, top_loc, f"at the working range's upper end ({format_concentration(hi)}) the ionic strength is", ionic, conditions)
    for k, comp in enumerate(spec.components):
        top = comp.concentration * hi / lead
        if comp.solubility is not None and top > comp.solubility:
            ctx.warn(loc + ("components", k, "working_range", 1),
                     f"the working range goes to {format_concentration(top)}, above the solubility of {comp.compound} in water at 25 °C "
                     f"({format_concentration(comp.solubility)}, source {comp.solubility_source!r}): shortcuts are judged only up to the solubility")
    return ok


def _pka_clash(a: ComponentSpec, b: ComponentSpec) -> list[tuple[int, float, float]]:
    """The steps (index, a's, b's thermodynamic pKa) where two components of one substance disagree."""
    if not a.protolyte().is_same_substance(b.protolyte()):
        return []
    return [(k, p.thermodynamic, q.thermodynamic) for k, (p, q) in enumerate(zip(a.pka, b.pka)) if abs(p.thermodynamic - q.thermodynamic) > 1e-9]


def _one_set_of_constants(ctx: _Ctx, loc: Loc, comps: list[ComponentSpec]) -> bool:
    """One substance added in two forms has one set of pKa values: an error at the later
    component whose thermodynamic pKa values differ from an earlier one's."""
    ok = True
    for j, comp in enumerate(comps):
        for i in range(j):
            if clash := _pka_clash(comps[i], comp):
                shown = "; ".join(f"step {k + 1}: {x:.4g} vs {y:.4g}" for k, x, y in clash)
                ctx.add(loc + ("components", j, "pka"),
                        f"{comp.name} is also component {i + 1} with other pKa values ({shown}, thermodynamic, 25 °C): one substance "
                        "has one set of constants; state the same values in both, or leave them to the substance table")
                ok = False
                break
    return ok


def _stock(ctx: _Ctx, loc: Loc, key: str, text: str | None, amount: float, temperature: float) -> float | None | bool:
    """The stock a stated strong acid or base is measured from [mol/L]: None when not stated
    (or stated without the acid or base, with a warning); False when it cannot be used (problem added)."""
    if text is None:
        return None
    here = loc + (f"{key}_stock",)
    if amount == 0.0:
        ctx.warn(here, f"ignored: the solution states no {key}")
        return None
    stock = _concentration(ctx, here, text, None, temperature)
    if stock is None:
        return False
    if amount > stock:
        ctx.add(here, f"the {key.replace('_', ' ')} stated ({format_concentration(amount)}) is more than the stock itself ({text}): no volume of it can deliver that")
        return False
    return stock


def _adjusted(ctx: _Ctx, loc: Loc, sol: SolutionIn, spec: SolutionSpec, solution: Solution, conditions: ConditionsSpec,
              refs: set[str], cited: set[str]) -> SolutionSpec | None:
    """The solution with the exact amount of titrant that reaches ``adjusted_to.ph``: a strong
    titrant joins ``strong_base`` (``strong_acid``), a weak one becomes the last component."""
    adj = sol.adjusted_to
    assert adj is not None
    stock = None
    if adj.stock is not None:
        stock = _concentration(ctx, loc + ("stock",), adj.stock, None, conditions.temperature)
        if stock is None:
            return None
    weak = None
    if isinstance(adj.with_, TitrantIn):
        weak = _titrant(ctx, loc + ("with",), adj.with_, sol, conditions, refs, cited)
        if weak is None:
            return None
        for i, comp in enumerate(spec.components):
            if _pka_clash(comp, weak):
                ctx.add(loc + ("with", "pka"), f"{weak.name} is also component {i + 1} with other pKa values: one substance has one set of "
                                               "constants; leave the titrant's pka out (it takes the component's) or state the same values")
                return None
    try:
        titrant = Component(weak.protolyte(), 1.0, weak.removed) if weak is not None else adj.with_
        amount = float(titrant_for_ph(solution, adj.ph, titrant))  # type: ignore[arg-type]
    except InputRangeError as exc:
        ctx.add(loc + ("ph",), f"cannot be reached: {exc.message}")
        return None
    except ConvergenceError:
        lo, hi = CONCENTRATION_LIMITS
        ctx.add(loc + ("ph",), f"cannot be reached with this titrant: the amount needed keeps growing with the ionic strength it adds, "
                               f"beyond the allowed {lo:g} … {hi:g} mol/L (the target is too far past the titrant's own pKa); "
                               "choose a stronger titrant or another target")
        return None
    lo, hi = CONCENTRATION_LIMITS
    if not lo <= amount <= hi and not (weak is None and amount == 0.0):
        ctx.add(loc + ("ph",), f"cannot be reached: it needs {amount:.3g} mol/L of titrant, outside the allowed {lo:g} … {hi:g} mol/L")
        return None
    if stock is not None and amount > stock:
        ctx.add(loc + ("stock",), f"the titrant needed ({format_concentration(amount)}) is more than the stock itself ({adj.stock}): no volume of it can deliver that")
        return None
    if weak is not None:
        lead, (w_lo, w_hi) = spec.lead_concentration, spec.working_range
        text = format_concentration(amount)
        added = dataclasses.replace(
            weak, concentration=amount, concentration_text=text, tolerance=0.0, tolerance_text="",
            working_range=(amount * w_lo / lead, amount * w_hi / lead),
            working_range_text=(format_concentration(amount * w_lo / lead), format_concentration(amount * w_hi / lead)),
        )
        adjustment = AdjustmentSpec(adj.ph, f"{weak.substance}, form {weak.removed}", amount, stock, adj.stock, component=len(spec.components))
        return dataclasses.replace(spec, components=spec.components + (added,), adjustment=adjustment)
    adjustment = AdjustmentSpec(adj.ph, adj.with_, amount, stock, adj.stock)  # type: ignore[arg-type]
    if adj.with_ == "strong-base":
        return dataclasses.replace(spec, strong_base=spec.strong_base + amount, adjustment=adjustment)
    return dataclasses.replace(spec, strong_acid=spec.strong_acid + amount, adjustment=adjustment)


def _titrant(ctx: _Ctx, loc: Loc, t: TitrantIn, sol: SolutionIn, conditions: ConditionsSpec, refs: set[str], cited: set[str]) -> ComponentSpec | None:
    """A weak titrant checked as a component (its amount still to be found). Without ``pka`` it
    takes the pKa entries (and charge) of the solution's component of the same substance."""
    pka, charge = t.pka, t.charge
    if pka is None:
        same = next((c for c in sol.components if c.substance == t.substance), None)
        if same is None:
            if ctx.table.get(t.substance) is None:
                ctx.add(loc + ("substance",), f"{t.substance!r} is neither in the substance table{did_you_mean(t.substance, list(ctx.table.substances))} "
                                              "nor a component of this solution: use a table id (see `dossier substances`), or give charge and every pKa value")
            else:
                ctx.add(loc + ("substance",), f"{t.substance!r} is not a component of this solution: give its pka entries "
                                              "(one per step, each with its uncertainty), as for a component")
            return None
        pka, charge = same.pka, same.charge if charge is None else charge
    as_component = ComponentIn(substance=t.substance, form=t.form, concentration="1 mol/L", working_range=["0.5 mol/L", "2 mol/L"],
                               charge=charge, pka=pka)
    return _component(ctx, loc, as_component, refs, conditions, cited)


def _check_solutions(ctx: _Ctx, indexed: list[tuple[int, SolutionIn]], refs: set[str], conditions: ConditionsSpec, cited: set[str]) -> list[SolutionSpec | None]:
    seen: dict[str, int] = {}  # id folded to lower case → index of its first use
    out = []
    for i, sol in indexed:
        checked = _solution(ctx, ("solutions", i), sol, refs, conditions, cited)
        first = seen.get(sol.id.casefold())
        if first is not None:
            other = next(s.id for j, s in indexed if j == first)
            ctx.add(("solutions", i, "id"), _duplicate_solution_message(sol.id, other, first))
            checked = None
        seen.setdefault(sol.id.casefold(), i)
        out.append(checked)
    return out


def _duplicate_solution_message(sid: str, other: str, first: int) -> str:
    if sid == other:
        return f"solution id {sid!r} is used twice in this method (also solutions[{first}])"
    return (
        f"solution id {sid!r} differs only in case from {other!r} (solutions[{first}]); a case-insensitive file system "
        "would give their figure files one name: ids must differ by more than case"
    )


def check_valid_parts(path: str, data: dict, doc: LoadedYaml, table: SubstanceTable) -> list[Problem]:
    """Checks beyond types for the parts of a file that passed the type check
    on their own, when another part did not: so that every problem of the
    file is reported at once."""
    ctx = _Ctx(path, doc, table)
    try:
        c = Conditions.model_validate(data.get("conditions", {}))
    except ValidationError:
        c = Conditions()
    conditions = _conditions(None, c)
    refs = set()
    raw_refs = data.get("references", {})
    if isinstance(raw_refs, dict):
        refs = set(raw_refs)
    indexed = []
    for i, raw in enumerate(data.get("solutions", []) if isinstance(data.get("solutions"), list) else []):
        try:
            indexed.append((i, SolutionIn.model_validate(raw)))
        except ValidationError:
            continue
    _check_solutions(ctx, indexed, refs, conditions, set())
    return ctx.problems


def _conditions(ctx: _Ctx | None, c: Conditions) -> ConditionsSpec:
    """The checked conditions; a CO₂ statement that cannot be read is reported (when ``ctx``) and taken as none."""
    base = (c.temperature, c.temperature_tolerance, c.activity_model, c.background_ionic_strength, c.background_ionic_strength_tolerance)
    co2 = c.co2
    if co2 == "none":
        return ConditionsSpec(*base)
    if co2 == "air":
        return ConditionsSpec(*base, co2="open", co2_partial_pressure=AIR_PARTIAL_PRESSURE_ATM, co2_as_written="air")
    if isinstance(co2, Co2Open):
        p = _co2_amount(ctx, "partial_pressure", co2.partial_pressure, parse_pressure, limits.CO2_PARTIAL_PRESSURE, "atm")
        return ConditionsSpec(*base) if p is None else ConditionsSpec(*base, co2="open", co2_partial_pressure=p, co2_as_written=f"partial_pressure: {co2.partial_pressure}")
    total = _co2_amount(ctx, "dissolved", co2.dissolved, lambda text: parse_concentration(text, temperature=c.temperature).mol_per_l,
                        limits.CONCENTRATION, "mol/L")
    return ConditionsSpec(*base) if total is None else ConditionsSpec(*base, co2="closed", co2_total=total, co2_as_written=f"dissolved: {co2.dissolved}")


def _co2_amount(ctx: _Ctx | None, key: str, text: str, parse: Callable[[str], float], bounds: tuple[float, float], unit: str) -> float | None:
    """The value of ``co2: {key: text}`` in ``unit`` (``parse`` reads it), or None, reported
    when ``ctx``, when it cannot be read or lies outside ``bounds``."""
    try:
        value = parse(text)
    except UnitError as e:
        if ctx:
            ctx.add(("conditions", "co2", key), str(e))
        return None
    lo, hi = bounds
    if not lo <= value <= hi:
        if ctx:
            ctx.add(("conditions", "co2", key), f"{text} is {value:g} {unit}; allowed {lo:g} … {hi:g} {unit}")
        return None
    return value


_RESERVED_NAMES = re.compile(r"^(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?$", re.IGNORECASE)


def _check_ids(ctx: _Ctx, mf: MethodFile) -> None:
    """Ids become folder and file names: refuse the names some systems reserve."""
    named = [(("method", "id"), mf.method.id)] + [(("solutions", i, "id"), s.id) for i, s in enumerate(mf.solutions)]
    for loc, value in named:
        if _RESERVED_NAMES.match(value) or value.endswith("."):
            ctx.add(loc, f"{value!r} cannot be a file name on every system (reserved device name, or a trailing dot); choose another id")


def build_method(path: str, sha256: str, mf: MethodFile, doc: LoadedYaml, table: SubstanceTable) -> tuple[Method | None, list[Problem]]:
    """Check a typed method file and build the frozen :class:`Method`.

    Parameters
    ----------
    path : str
        File name for messages.
    sha256 : str
        Hash of the file's bytes.
    mf : MethodFile
        The type-checked content.
    doc : LoadedYaml
        Positions of the values, for messages.
    table : SubstanceTable

    Returns
    -------
    (Method or None, list of Problem)
        None when any error was found.
    """
    ctx = _Ctx(path, doc, table, reference_kinds={k: r.kind for k, r in mf.references.items()})
    c = mf.conditions
    conditions = _conditions(ctx, c)
    refs = set(mf.references)
    cited: set[str] = set()
    _check_ids(ctx, mf)
    t_lo, t_hi = limits.TEMPERATURE
    if c.temperature - c.temperature_tolerance < t_lo or c.temperature + c.temperature_tolerance > t_hi:
        ctx.add(("conditions", "temperature_tolerance"), f"{c.temperature:g} ± {c.temperature_tolerance:g} °C leaves the allowed {_num(t_lo)} … {_num(t_hi)} °C")
    if c.background_ionic_strength_tolerance > c.background_ionic_strength:
        ctx.add(("conditions", "background_ionic_strength_tolerance"), f"± {c.background_ionic_strength_tolerance:g} mol/kg is larger than the background ionic strength itself ({c.background_ionic_strength:g} mol/kg)")
    if _background_beyond_range(conditions):
        _range_problem(ctx, ("conditions", "background_ionic_strength"), "the background ionic strength" + (" with its tolerance" if c.background_ionic_strength_tolerance else "") + " is",
                      c.background_ionic_strength + c.background_ionic_strength_tolerance, conditions)
    solutions = _check_solutions(ctx, list(enumerate(mf.solutions)), refs, conditions, cited)
    for key in sorted(refs - cited):
        ctx.warn(("references", key), f"reference {key!r} is not cited by any stated value")
    if any(p.severity is Severity.ERROR for p in ctx.problems) or any(s is None for s in solutions):
        return None, ctx.problems
    m = mf.method
    method = Method(
        path=path,
        source_sha256=sha256,
        id=m.id,
        title=m.title,
        revision=m.revision,
        purpose=m.purpose,
        prepared_by=m.prepared_by,
        reviewed_by=m.reviewed_by,
        notes=m.notes,
        criteria=Criteria(mf.acceptance.max_ph_error, mf.acceptance.probability),
        conditions=conditions,
        solutions=tuple(solutions),  # type: ignore[arg-type]
        references=tuple(ReferenceSpec(k, r.citation, r.kind, r.doi, r.document) for k, r in mf.references.items()),
        change_reason=m.change_reason,
    )
    return method, ctx.problems

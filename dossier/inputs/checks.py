"""Checks beyond types, and the conversion of a typed method file into the
frozen :class:`~dossier.inputs.model.Method`.

Here the substance table fills in values, units are converted, pKa values
are converted to I = 0 and 25 °C, and everything that needs several values
at once is checked: references that resolve, working ranges that contain
the nominal concentration, pKa order, shortcuts that exist and apply.
"""

from __future__ import annotations

import difflib
import re
from dataclasses import dataclass, field

from .. import limits
from ..chemistry import CATALOGUE, ActivityModelId, InputRangeError
from ..chemistry.activity import thermodynamic_pka
from ..chemistry.temperature import REFERENCE_TEMPERATURE, pka_at_temperature
from ..problems import Problem, Severity
from .model import (
    METHOD_FILE,
    TABLE,
    ComponentSpec,
    ConditionsSpec,
    Criteria,
    Distribution,
    Method,
    PkaValue,
    ReferenceSpec,
    SolutionSpec,
)
from pydantic import ValidationError

from .forms import FormError, protons_removed
from .schema import ComponentIn, Conditions, MethodFile, PkaIn, SolutionIn
from .substances import Substance, SubstanceTable
from .units import UnitError, format_concentration, parse_concentration
from .yamlpos import LoadedYaml

__all__ = ["build_method", "CONCENTRATION_LIMITS"]

CONCENTRATION_LIMITS = (1e-10, 10.0)
"""Allowed concentrations in a method file, nominal and working range [mol/L]."""

Loc = tuple[str | int, ...]


def did_you_mean(word: str, choices: list[str] | tuple[str, ...]) -> str:
    """' (did you mean 'x'?)' when a choice is close, else ''."""
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.7)
    return f" (did you mean {close[0]!r}?)" if close else ""


@dataclass
class _Ctx:
    path: str
    doc: LoadedYaml
    table: SubstanceTable
    problems: list[Problem] = field(default_factory=list)

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
        if not 0.0 <= pct <= 50.0:
            ctx.add(loc, f"a percentage tolerance must be 0 … 50 %; got {text!r}")
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
    if enthalpy is None and table_step is not None and table_step.enthalpy is not None:
        enthalpy, dh_origin = table_step.enthalpy.value, TABLE
    if enthalpy is None:
        dh_origin = "none"
    heat_capacity = entry.heat_capacity
    if heat_capacity is None and entry.enthalpy is None and table_step is not None and table_step.heat_capacity is not None:
        heat_capacity = table_step.heat_capacity.value

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
    if t_s == REFERENCE_TEMPERATURE and enthalpy is None and conditions.temperature != REFERENCE_TEMPERATURE:
        ctx.warn(loc, f"no enthalpy of ionization: the 25 °C pKa is used unchanged at {conditions.temperature:g} °C")
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
    t = conditions.temperature
    conc = _concentration(ctx, loc + ("concentration",), comp.concentration, molar_mass, t)
    lo = _concentration(ctx, loc + ("working_range", 0), comp.working_range[0], molar_mass, t)
    hi = _concentration(ctx, loc + ("working_range", 1), comp.working_range[1], molar_mass, t)
    tol = _tolerance(ctx, loc + ("tolerance",), comp.tolerance, conc, molar_mass, t) if conc is not None else None
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
    )


def _solution(ctx: _Ctx, loc: Loc, sol: SolutionIn, refs: set[str], conditions: ConditionsSpec, cited: set[str]) -> SolutionSpec | None:
    comps = [_component(ctx, loc + ("components", i), c, refs, conditions, cited) for i, c in enumerate(sol.components)]
    t = conditions.temperature
    acid = _concentration(ctx, loc + ("strong_acid",), sol.strong_acid, None, t, allow_zero=True) if sol.strong_acid else 0.0
    base = _concentration(ctx, loc + ("strong_base",), sol.strong_base, None, t, allow_zero=True) if sol.strong_base else 0.0
    unknown = False
    for i, sid in enumerate(sol.shortcuts):
        if sid not in CATALOGUE:
            ctx.add(loc + ("shortcuts", i), f"unknown shortcut {sid!r}{did_you_mean(sid, list(CATALOGUE))}; known: {', '.join(CATALOGUE)}")
            unknown = True
    if len(set(sol.shortcuts)) != len(sol.shortcuts):
        ctx.warn(loc + ("shortcuts",), "a shortcut is listed twice")
    if any(c is None for c in comps) or acid is None or base is None or unknown:
        return None
    first = comps[0]
    for i, comp in enumerate(comps[1:], start=1):
        ratio_lo = comp.working_range[0] / comp.concentration / (first.working_range[0] / first.concentration)  # type: ignore[union-attr]
        ratio_hi = comp.working_range[1] / comp.concentration / (first.working_range[1] / first.concentration)  # type: ignore[union-attr]
        if abs(ratio_lo - 1) > 0.01 or abs(ratio_hi - 1) > 0.01:
            ctx.warn(
                loc + ("components", i, "working_range"),
                "not in proportion to the first component's: the analyses dilute or concentrate the whole solution "
                "together over the first component's working range",
            )
    spec = SolutionSpec(sol.id, sol.description, tuple(comps), acid, base, tuple(dict.fromkeys(sol.shortcuts)))  # type: ignore[arg-type]
    try:
        engine_solution = spec.to_solution(conditions)
    except InputRangeError as exc:
        ctx.add(loc, f"cannot be solved as given: {exc}")
        return None
    ok = True
    for i, sid in enumerate(sol.shortcuts):
        why = CATALOGUE[sid].why_not(engine_solution)
        if why is not None:
            ctx.add(loc + ("shortcuts", i), f"{sid} does not apply to this solution: {why}")
            ok = False
    return spec if ok else None


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
    conditions = ConditionsSpec(c.temperature, c.temperature_tolerance, c.activity_model, c.background_ionic_strength, c.background_ionic_strength_tolerance)
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
    ctx = _Ctx(path, doc, table)
    c = mf.conditions
    conditions = ConditionsSpec(c.temperature, c.temperature_tolerance, c.activity_model, c.background_ionic_strength, c.background_ionic_strength_tolerance)
    refs = set(mf.references)
    cited: set[str] = set()
    _check_ids(ctx, mf)
    if c.temperature - c.temperature_tolerance < 0.0 or c.temperature + c.temperature_tolerance > 100.0:
        ctx.add(("conditions", "temperature_tolerance"), f"{c.temperature:g} ± {c.temperature_tolerance:g} °C leaves the allowed 0 … 100 °C")
    if c.background_ionic_strength_tolerance > c.background_ionic_strength:
        ctx.add(("conditions", "background_ionic_strength_tolerance"), f"± {c.background_ionic_strength_tolerance:g} mol/kg is larger than the background ionic strength itself ({c.background_ionic_strength:g} mol/kg)")
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

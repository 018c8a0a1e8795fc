"""The ``conditions: co2`` key: every form it may take, its units, its errors,
and its way into the engine and through the ledger's round trip."""

from __future__ import annotations

import pytest

from dossier.chemistry import equilibrium
from dossier.inputs.serialize import method_from_dict, method_to_dict
from dossier.inputs.units import UnitError, parse_pressure

from ..builders import MethodBuilder, component

_ACID = component("boric-acid", concentration="1 mmol/L", working_range=("0.1 mmol/L", "5 mmol/L"))


def _builder(co2: object) -> MethodBuilder:
    return MethodBuilder(co2=co2).solution(_ACID, shortcuts=["weak-acid-square-root"])


@pytest.mark.parametrize(
    ("co2", "mode", "pressure", "total", "written"),
    [
        (None, "none", 0.0, 0.0, "none"),
        ("none", "none", 0.0, 0.0, "none"),
        ("air", "open", 420e-6, 0.0, "air"),
        ({"partial_pressure": "1000 µatm"}, "open", 1e-3, 0.0, "partial_pressure: 1000 µatm"),
        ({"partial_pressure": "0.5 atm"}, "open", 0.5, 0.0, "partial_pressure: 0.5 atm"),
        ({"partial_pressure": "101.325 Pa"}, "open", 1e-3, 0.0, "partial_pressure: 101.325 Pa"),
        ({"partial_pressure": "10.1325 kPa"}, "open", 0.1, 0.0, "partial_pressure: 10.1325 kPa"),
        ({"dissolved": "0.05 mmol/L"}, "closed", 0.0, 5e-5, "dissolved: 0.05 mmol/L"),
    ],
)
def test_each_form_of_the_co2_key(co2: object, mode: str, pressure: float, total: float, written: str) -> None:
    m = _builder(co2).build()
    c = m.conditions
    assert (c.co2, c.co2_as_written) == (mode, written)
    assert c.co2_partial_pressure == pytest.approx(pressure, rel=1e-12)
    assert c.co2_total == pytest.approx(total, rel=1e-12)
    sol = m.solutions[0].to_solution(c)
    assert sol.co2.mode == mode
    eq = equilibrium(sol)
    assert (eq.carbonate is None) == (mode == "none")
    # the ledger's round trip keeps it
    again = method_from_dict(method_to_dict(m))
    assert again.conditions == c


def test_air_lowers_the_ph_of_a_dilute_weak_acid() -> None:
    # 1 mmol/L boric acid: CO2-free ≈ 6.1; open to air the carbonic acid (pK1 6.35)
    # dominates: near the 5.6 of water open to air.
    free = equilibrium(_builder("none").build().solutions[0].to_solution(_builder("none").build().conditions)).ph
    m = _builder("air").build()
    air = equilibrium(m.solutions[0].to_solution(m.conditions)).ph
    assert 6.0 < free < 6.3 and 5.5 < air < 5.7


@pytest.mark.parametrize(
    ("co2", "field", "words"),
    [
        ({"partial_pressure": "1000"}, "partial_pressure", "µatm"),
        ({"partial_pressure": "3 atm"}, "partial_pressure", "allowed 0 … 1 atm"),
        ({"partial_pressure": "400 ppm"}, "partial_pressure", "µatm"),
        ({"dissolved": "0.05"}, "dissolved", "unit"),
    ],
)
def test_bad_co2_values_name_the_field(co2: object, field: str, words: str) -> None:
    result = _builder(co2).load()
    errors = [p for p in result.problems if p.severity.value == "error"]
    assert result.method is None and errors
    text = " ".join(str(p) for p in errors)
    assert f"co2.{field}" in text or f"co2 → {field}" in text or field in text
    assert words in text


@pytest.mark.parametrize("co2", ["open", {"pressure": "1 atm"}])
def test_unknown_co2_forms_are_type_errors(co2: object) -> None:
    result = _builder(co2).load()
    assert result.method is None
    assert any("co2" in str(p) for p in result.problems)


def test_both_open_and_closed_keeps_one_and_warns_about_the_other() -> None:
    # Unknown keys are ignored with a warning across the format (the house rule);
    # here the warning names the key that was dropped.
    result = _builder({"partial_pressure": "1 atm", "dissolved": "1 mmol/L"}).load()
    assert result.method is not None and result.method.conditions.co2 == "open"
    assert any("dissolved" in str(p) and p.severity.value == "warning" for p in result.problems)


def test_parse_pressure_needs_a_unit() -> None:
    # 1 atm = 101325 Pa exactly (CGPM 1954, Resolution 4).
    assert parse_pressure("101325 Pa") == 1.0
    with pytest.raises(UnitError, match="needs a unit"):
        parse_pressure(0.1)  # type: ignore[arg-type]
    with pytest.raises(UnitError, match="negative"):
        parse_pressure("-1 atm")


def _messages(co2: object) -> list[str]:
    return [f"{p.field}: {p.message}" for p in _builder(co2).load().problems if "co2" in p.field]


@pytest.mark.parametrize(("co2", "meant"), [({"disolved": "0.05 mmol/L"}, "dissolved"), ({"partial_presure": "1000 µatm"}, "partial_pressure")])
def test_a_typo_in_a_co2_key_gets_a_suggestion_from_every_form(co2: object, meant: str) -> None:
    # the suggestion comes from the keys of both mapping forms, not only the one taken first
    typo = next(iter(co2))  # type: ignore[call-overload]
    assert f"conditions.co2.{typo}: unknown key {typo!r} (ignored); did you mean {meant!r}?" in _messages(co2)


@pytest.mark.parametrize("co2", ["airr", 5, "Air"])
def test_a_co2_word_that_is_no_form_lists_the_mapping_forms_too(co2: object) -> None:
    (msg,) = _messages(co2)
    assert msg.startswith("conditions.co2: must be none, air, {partial_pressure: …} or {dissolved: …}; got ")
    assert msg.endswith("(did you mean 'air'?)") == isinstance(co2, str)


@pytest.mark.parametrize("co2", [{}, {"pressure": "1 atm"}])
def test_a_co2_mapping_without_either_key_names_both(co2: object) -> None:
    msgs = _messages(co2)
    assert ("conditions.co2: as a mapping, needs one of the keys 'partial_pressure' (open to a gas at a stated CO₂ partial pressure) "
            "or 'dissolved' (closed: a stated total of dissolved inorganic carbon added (as CO₂))") in msgs
    assert not any("required key" in m for m in msgs)


def test_both_co2_keys_say_that_one_form_is_taken() -> None:
    assert ("conditions.co2.dissolved: unknown key 'dissolved' (ignored); conditions.co2 takes one of 'partial_pressure' or 'dissolved', not both"
            in _messages({"partial_pressure": "1 atm", "dissolved": "1 mmol/L"}))

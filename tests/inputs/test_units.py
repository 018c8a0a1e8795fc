"""Concentrations with units (pint)."""

from __future__ import annotations

import pytest

from dossier.chemistry import water_density
from dossier.inputs.units import UnitError, parse_concentration


@pytest.mark.parametrize(
    ("text", "mol_per_l"),
    [
        ("0.1 mol/L", 0.1),
        ("10 mmol/L", 0.01),
        ("5 µmol/L", 5e-6),  # micro sign
        ("5 μmol/L", 5e-6),  # Greek mu
        ("5 umol/L", 5e-6),
        ("10 mM", 0.01),
        ("0.25 M", 0.25),
        ("2.5e-3 mol/l", 2.5e-3),
    ],
)
def test_amount_concentrations(text: str, mol_per_l: float) -> None:
    c = parse_concentration(text)
    assert c.mol_per_l == pytest.approx(mol_per_l, rel=1e-15)
    assert c.kind == "amount"


def test_molality_uses_the_water_density_at_the_temperature() -> None:
    c = parse_concentration("0.1 mol/kg", temperature=37.0)
    assert c.mol_per_l == pytest.approx(0.1 * water_density(37.0) / 1000, rel=1e-14)
    assert c.kind == "molality"


def test_mass_concentrations_need_a_molar_mass() -> None:
    # 0.9 % w/v sodium chloride (M = 58.44 g/mol) is 9 g/L = 0.154 mol/L.
    assert parse_concentration("0.9 % w/v", molar_mass=58.44).mol_per_l == pytest.approx(9.0 / 58.44, rel=1e-14)
    assert parse_concentration("250 mg/L", molar_mass=60.05).mol_per_l == pytest.approx(0.25 / 60.05, rel=1e-14)
    with pytest.raises(UnitError, match="is a mass concentration: state the molar mass"):
        parse_concentration("250 mg/L")


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("10", "'10' has no unit"),
        (10, "needs a unit: write e.g. '10 mmol/L'"),
        ("", "must be a number with a unit such as '10 mmol/L'"),
        ("ten mmol/L", "cannot read 'ten mmol/L' as a number with a unit"),
        ("10 kg", "'10 kg' is not a concentration"),
        ("nan mol/L", "'nan mol/L' is not a finite number"),
        ("-2 mmol/L", "'-2 mmol/L' is negative; a concentration is 0 or more"),
    ],
)
def test_bad_concentrations(text: object, message: str) -> None:
    with pytest.raises(UnitError) as info:
        parse_concentration(text)  # type: ignore[arg-type]
    assert str(info.value).startswith(message)

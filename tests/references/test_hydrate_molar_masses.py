"""Molar masses of the compounds the substance table lists for weighing
(its forms' compounds and the hydrates and salts each form is sold as).

Two checks, each with its source named:

- an independent sum over atoms written out by hand (not through the formula
  parser), with the IUPAC standard atomic weights 2021 (CIAAW, Pure Appl.
  Chem. 94, 573–600 (2022); conventional values for H, C, N, O, S; the
  weights of the mononuclidic Na and P and of K to their published digits):
  recalled from memory, not checked against the printed table;
- the molar masses a handbook prints for the hydrates (CRC Handbook of
  Chemistry and Physics, "Physical Constants of Inorganic Compounds" and
  "Physical Constants of Organic Compounds", edition not recorded): recalled
  from memory, not checked, to two decimals.
"""

from __future__ import annotations

import pytest

from dossier.inputs.formulas import water_of_crystallisation
from dossier.inputs.substances import load_table

TABLE = load_table()

# IUPAC standard atomic weights 2021 (recalled from memory; see the module docstring)
IUPAC_2021 = {"H": 1.008, "C": 12.011, "N": 14.007, "O": 15.999, "Na": 22.98976928, "P": 30.973761998, "K": 39.0983, "S": 32.06}

# atoms of each compound counted by hand, water of crystallisation included
ATOMS = {
    "C2H3NaO2·3H2O": {"C": 2, "H": 9, "Na": 1, "O": 5},
    "C6H8O7·H2O": {"C": 6, "H": 10, "O": 8},
    "C6H5Na3O7·2H2O": {"C": 6, "H": 9, "Na": 3, "O": 9},
    "NaH2PO4": {"Na": 1, "H": 2, "P": 1, "O": 4},
    "NaH2PO4·H2O": {"Na": 1, "H": 4, "P": 1, "O": 5},
    "NaH2PO4·2H2O": {"Na": 1, "H": 6, "P": 1, "O": 6},
    "Na2HPO4": {"Na": 2, "H": 1, "P": 1, "O": 4},
    "Na2HPO4·2H2O": {"Na": 2, "H": 5, "P": 1, "O": 6},
    "Na2HPO4·7H2O": {"Na": 2, "H": 15, "P": 1, "O": 11},
    "Na2HPO4·12H2O": {"Na": 2, "H": 25, "P": 1, "O": 16},
    "K2HPO4": {"K": 2, "H": 1, "P": 1, "O": 4},
    "K2HPO4·3H2O": {"K": 2, "H": 7, "P": 1, "O": 7},
    "Na3PO4·12H2O": {"Na": 3, "H": 24, "P": 1, "O": 16},
    "C6H13NO4S·H2O": {"C": 6, "H": 15, "N": 1, "O": 5, "S": 1},
}

# CRC Handbook molar masses [g/mol], recalled from memory, not checked
HANDBOOK = {
    "C2H3NaO2·3H2O": 136.08,   # sodium acetate trihydrate
    "C6H8O7·H2O": 210.14,      # citric acid monohydrate
    "C6H5Na3O7·2H2O": 294.10,  # trisodium citrate dihydrate
    "NaH2PO4·H2O": 137.99,     # sodium dihydrogen phosphate monohydrate
    "NaH2PO4·2H2O": 156.01,    # sodium dihydrogen phosphate dihydrate
    "Na2HPO4": 141.96,         # disodium hydrogen phosphate
    "Na2HPO4·2H2O": 177.99,    # … dihydrate
    "Na2HPO4·7H2O": 268.07,    # … heptahydrate
    "Na2HPO4·12H2O": 358.14,   # … dodecahydrate
    "K2HPO4": 174.18,          # dipotassium hydrogen phosphate
    "Na3PO4·12H2O": 380.12,    # trisodium phosphate dodecahydrate
    "Na2CO3·10H2O": 286.14,    # sodium carbonate decahydrate
    "C2H2O4·2H2O": 126.07,     # oxalic acid dihydrate
    "Na2SO4·10H2O": 322.20,    # sodium sulfate decahydrate
}


def _weighable() -> dict[str, float]:
    """Formula → molar mass of every compound the table lists for weighing."""
    return {c.formula: c.molar_mass for s in TABLE.substances.values() for f in s.forms for c in f.weighable}


def test_the_named_hydrates_are_in_the_table() -> None:
    names = {c.compound for s in TABLE.substances.values() for f in s.forms for c in f.sold_as}
    for n in ("sodium acetate trihydrate", "disodium hydrogen phosphate dihydrate", "disodium hydrogen phosphate heptahydrate",
              "disodium hydrogen phosphate dodecahydrate", "sodium dihydrogen phosphate monohydrate",
              "sodium dihydrogen phosphate dihydrate", "citric acid monohydrate", "trisodium citrate dihydrate"):
        assert n in names, n


@pytest.mark.parametrize("formula", sorted(ATOMS))
def test_molar_mass_against_iupac_2021_atomic_weights(formula: str) -> None:
    by_hand = sum(IUPAC_2021[el] * n for el, n in ATOMS[formula].items())
    # the table rounds to 0.001 g/mol and uses the abridged weights (Na 22.990, P 30.974, K 39.098)
    assert _weighable()[formula] == pytest.approx(by_hand, abs=0.005)


@pytest.mark.parametrize("formula", sorted(HANDBOOK))
def test_molar_mass_against_the_handbook(formula: str) -> None:
    assert _weighable()[formula] == pytest.approx(HANDBOOK[formula], abs=0.015)


@pytest.mark.parametrize("sid", sorted(TABLE.substances))
def test_a_compound_sold_as_delivers_the_same_form(sid: str) -> None:
    # Each compound listed for a form differs from the form's own compound only by
    # water of crystallisation and by the alkali cation (Na ↔ K): its molar mass minus
    # n·M(H2O) is the form's, give or take whole multiples of M(K) − M(Na).
    water = 18.015  # H2O with the abridged weights
    step = 39.098 - 22.990
    for f in TABLE.get(sid).forms:
        for c in f.sold_as:
            assert c.water == water_of_crystallisation(c.formula)
            rest = c.molar_mass - c.water * water - f.molar_mass
            assert abs(rest / step - round(rest / step)) < 1e-3, (sid, c.compound, rest)

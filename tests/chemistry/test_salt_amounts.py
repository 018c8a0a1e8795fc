"""The salt formula ½(pKa,HA + pKa,BH⁺) counts as the procedure's calculation for a
1:1 salt made up within its tolerances (limits.SALT_EQUAL_AMOUNTS_REL), not beyond."""

from __future__ import annotations

from dossier.chemistry import CATALOGUE, Component, Protolyte, Solution
from dossier.limits import SALT_EQUAL_AMOUNTS_REL

# pKa of acetic acid 4.756 (Harned & Ehlers, J. Am. Chem. Soc. 55, 652 (1933));
# ammonium 9.245 (Bates & Pinching, J. Res. NBS 42, 419 (1949)), as in
# tests/chemistry/test_mixtures_and_titration.py (recalled from memory).
ACETIC = Protolyte("acetic", (4.756,))
AMMONIUM = Protolyte("ammonium", (9.245,), charge=1)
SALT = CATALOGUE["weak-acid-weak-base-salt"]


def _mix(acid: float, base: float) -> Solution:
    return Solution([Component(ACETIC, acid), Component(AMMONIUM, base, removed=1)])


def test_salt_formula_applies_within_the_tolerance_and_not_beyond() -> None:
    assert SALT.why_not(_mix(0.010, 0.010 * (1 - 0.5 * SALT_EQUAL_AMOUNTS_REL))) is None
    why = SALT.why_not(_mix(0.010, 0.010 * (1 - 2 * SALT_EQUAL_AMOUNTS_REL)))
    assert why is not None and "equal amounts" in why
    # the formula does not depend on the amounts: ½(4.756 + 9.245) = 7.0005
    assert abs(float(SALT.ph(_mix(0.010, 0.0099))) - 7.0005) < 1e-9

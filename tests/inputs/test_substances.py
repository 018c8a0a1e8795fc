"""The bundled substance table: complete, sourced, consistent."""

from __future__ import annotations

import pytest

from dossier.inputs.formulas import FormulaError, molar_mass
from dossier.inputs.substances import SOURCE_KINDS, STATUSES, load_table

TABLE = load_table()


def test_at_least_25_substances_including_the_named_ones() -> None:
    assert len(TABLE.substances) >= 25
    for sid in ("acetic-acid", "phosphoric-acid", "citric-acid", "carbonic-acid", "boric-acid", "ammonium",
                "tris", "hepes", "mes", "glycine", "hydrofluoric-acid"):
        assert sid in TABLE.substances


@pytest.mark.parametrize("sid", sorted(TABLE.substances))
def test_every_value_has_a_source_and_a_status(sid: str) -> None:
    s = TABLE.substances[sid]
    assert s.steps and s.forms
    for st in s.steps:
        for v in (st.pka, st.enthalpy, st.heat_capacity):
            if v is None:
                continue
            assert v.source in TABLE.sources, (sid, v)
            assert v.status in STATUSES, (sid, v)
        assert -2.0 <= st.pka.value <= 16.0
    pkas = [st.pka.value for st in s.steps]
    assert pkas == sorted(pkas)
    for f in s.forms:
        assert 0 <= f.removed <= len(s.steps)
        assert f.molar_mass > 0


def test_sources_are_classified() -> None:
    for src in TABLE.sources.values():
        assert src.kind in SOURCE_KINDS
        assert src.citation and src.checked


def test_values_recalled_from_memory_are_marked_as_such() -> None:
    # No published text was read for oxalic or lactic acid: their values are from memory.
    assert TABLE.get("oxalic-acid").steps[0].pka.status == "recalled"
    assert TABLE.get("lactic-acid").steps[0].pka.status == "recalled"
    assert TABLE.sources["crc-handbook"].checked.startswith("not checked")


@pytest.mark.parametrize(
    ("formula", "mass"),
    [
        # IUPAC abridged atomic weights (recalled from memory); textbook molar masses:
        ("H2O", 18.015),
        ("NaCl", 58.44),
        ("KH2PO4", 136.084),  # 136.09 on reagent labels
        ("C4H11NO3", 121.136),  # TRIS, 121.14
        ("Na2B4O7·10H2O", 381.37),  # borax, 381.37
        ("Ca(OH)2", 74.092),
    ],
)
def test_molar_masses(formula: str, mass: float) -> None:
    # abridged weights (B 10.81, not 10.811) shift borax by 0.007
    assert molar_mass(formula) == pytest.approx(mass, abs=0.01)


@pytest.mark.parametrize("formula", ["Xx2", "Ca(OH", "CaOH)2", "2"])
def test_bad_formulas(formula: str) -> None:
    with pytest.raises(FormulaError):
        molar_mass(formula)

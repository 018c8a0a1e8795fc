"""Components the analysis tests use often, built with :mod:`tests.builders`."""

from __future__ import annotations

from typing import Any

from tests.builders import component, pka


def acid(value: float, conc: str = "10 mmol/L", lo: str = "1 mmol/L", hi: str = "100 mmol/L", u: float = 0.01, tol: str = "0 %") -> dict[str, Any]:
    """An invented monoprotic acid (charge 0) with a stated pKa ``value``."""
    return component("acid-x", charge=0, concentration=conc, tolerance=tol, working_range=(lo, hi), pka=[pka(value, uncertainty=u)])


def tris_buffer(conc: str, lo: str, hi: str, u: float) -> tuple[dict[str, Any], dict[str, Any]]:
    """TRIS hydrochloride + TRIS, equal concentrations (table values)."""
    return tuple(component("tris", form=form, concentration=conc, working_range=(lo, hi), pka=[pka(uncertainty=u)]) for form in ("acid", "base"))  # type: ignore[return-value]

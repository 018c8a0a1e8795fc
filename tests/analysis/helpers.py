"""Method files written inline for the analysis tests."""

from __future__ import annotations

from dossier.inputs.loader import load_method_bytes
from dossier.inputs.model import Method


def method(components: str, *, shortcuts: str, limit: float = 0.02, temperature: float = 25.0, model: str = "ideal",
           temperature_tolerance: float = 0.0, strong_base: str | None = None, references: str = "") -> Method:
    """A one-solution method; ``components`` is the YAML list under components:."""
    base = f"  strong_base: {strong_base}\n" if strong_base else ""
    text = f"""format: ph-dossier-method/1
method: {{id: t, title: T, revision: "1", purpose: P}}
acceptance: {{max_ph_error: {limit}}}
conditions: {{temperature: {temperature}, temperature_tolerance: {temperature_tolerance}, activity_model: {model}}}
solutions:
- id: s
  components:
{components}
{base}  shortcuts: [{shortcuts}]
{references}"""
    load = load_method_bytes(text.encode(), "t.yaml")
    errors = [str(p) for p in load.problems if p.severity.value == "error"]
    assert not errors, errors
    assert load.method is not None
    return load.method


def acid(pka: float, conc: str = "10 mmol/L", lo: str = "1 mmol/L", hi: str = "100 mmol/L", u: float = 0.01, tol: str = "0 %") -> str:
    return f"""  - substance: acid-x
    charge: 0
    form: acid
    concentration: {conc}
    tolerance: {tol}
    working_range: [{lo}, {hi}]
    pka: [{{value: {pka}, uncertainty: {u}, reference: r}}]"""


REF = "references: {r: {citation: Invented test value, kind: estimate}}\n"


def tris_buffer(conc: str, lo: str, hi: str, u: float) -> str:
    """TRIS hydrochloride + TRIS, equal concentrations (table values)."""
    return "\n".join(
        f"""  - substance: tris
    form: {form}
    concentration: {conc}
    working_range: [{lo}, {hi}]
    pka: [{{uncertainty: {u}}}]"""
        for form in ("acid", "base")
    )

"""Loading good method files: the demo dossier, the starter, conversions."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import jsonschema
import pytest
import yaml

from dossier.chemistry import log_gamma, pka_at_temperature, water_density
from dossier.inputs.loader import load_method_bytes, load_paths
from dossier.inputs.model import METHOD_FILE, TABLE
from dossier.inputs.schema import json_schema
from dossier.inputs.starter import starter_text

ROOT = Path(__file__).resolve().parents[2]
DEMO = sorted((ROOT / "methods").glob("*.yaml"))


DATA_QUALITY = ("is unverified: ", "is recalled: ", "no enthalpy of ionization", "is an estimate", "has no uncertainty (0)")


def test_demo_dossier_loads_with_data_quality_warnings_only() -> None:
    # The demo uses table values not read in their sources (docs/method-format.md, "Data you cannot trust"):
    # check warns about each, naming it; --strict makes them errors.
    inputs = load_paths([ROOT / "methods"])
    assert len(inputs.methods) >= 8 and inputs.ok
    assert inputs.problems and all(p.severity.value == "warning" and any(w in p.message for w in DATA_QUALITY) for p in inputs.problems)
    strict = load_paths([ROOT / "methods"], strict=True)
    assert not strict.ok and len(strict.problems) == len(inputs.problems)


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.stem)
def test_demo_files_validate_against_the_json_schema(path: Path) -> None:
    jsonschema.validate(yaml.safe_load(path.read_text(encoding="utf-8")), json_schema())


def test_json_schema_rejects_what_the_loader_rejects() -> None:
    bad = yaml.safe_load((ROOT / "tests/inputs/bad/unknown-activity-model.yaml").read_text(encoding="utf-8"))
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(bad, json_schema())


def test_starter_file_is_accepted_as_it_stands() -> None:
    load = load_method_bytes(starter_text("new-method", 'A "quoted" title').encode(), "new-method.yaml")
    # the starter's acetic acid comes from the table, whose values are unverified: warnings, no errors
    assert load.problems and all(p.severity.value == "warning" and any(w in p.message for w in DATA_QUALITY) for p in load.problems)
    assert load.method is not None and load.method.title == 'A "quoted" title'


def _one(text: str):  # noqa: ANN202
    load = load_method_bytes(text.encode(), "t.yaml")
    assert not [p for p in load.problems if p.severity.value == "error"], [str(p) for p in load.problems]
    return load.method, load.problems


TEMPLATE = """format: ph-dossier-method/1
method: {{id: t, title: T, revision: "1", purpose: P}}
acceptance: {{max_ph_error: 0.05}}
conditions: {{temperature: {temperature}, activity_model: {model}}}
solutions:
  - id: s
    components:
      - substance: {substance}
        form: {form}
        concentration: {conc}
        working_range: [{lo}, {hi}]
{extra}        pka:
{pka}
    shortcuts: [{shortcut}]
references:
  r: {{citation: C, kind: in-house-measurement}}
"""


def method_text(**kw: str) -> str:
    base = dict(temperature="25", model="davies", substance="acetic-acid", form="acid", conc="10 mmol/L",
                lo="1 mmol/L", hi="20 mmol/L", extra="", pka="          - {value: 4.756, uncertainty: 0.01, reference: r}",
                shortcut="weak-acid-square-root")
    base.update(kw)
    return TEMPLATE.format(**base)


def test_table_values_and_stated_values_say_where_they_came_from() -> None:
    m, _ = _one(method_text(pka="          - {uncertainty: 0.01}").replace("references:\n  r: {citation: C, kind: in-house-measurement}\n", ""))
    p = m.solutions[0].components[0].pka[0]
    assert (p.origin, p.reference, p.status, p.stated, p.enthalpy, p.enthalpy_origin) == (TABLE, "nist46", "unverified", 4.757, -0.41, TABLE)
    m, _ = _one(method_text())
    p = m.solutions[0].components[0].pka[0]
    assert (p.origin, p.reference, p.status, p.stated) == (METHOD_FILE, "r", "stated", 4.756)
    assert p.enthalpy == -0.41 and p.enthalpy_origin == TABLE  # the table's ΔH° fills in


@pytest.mark.parametrize("convention", ["mixed", "concentration"])
def test_pka_stated_at_ionic_strength_is_converted_to_thermodynamic(convention: str) -> None:
    # Second step of phosphoric acid (H2PO4- -> HPO4 2- + H+), stated at I = 0.1 mol/kg.
    pka = ("          - {uncertainty: 0.02}\n"
           f"          - {{value: 6.86, uncertainty: 0.02, ionic_strength: 0.1, convention: {convention}, reference: r}}\n"
           "          - {uncertainty: 0.05}")
    m, _ = _one(method_text(substance="phosphoric-acid", form="1", pka=pka, shortcut="ampholyte-mean"))
    got = m.solutions[0].components[0].pka[1].thermodynamic
    # Ka = a(H) a(HPO4) / a(H2PO4); from the single-ion coefficients directly:
    g = {z: float(log_gamma(z, 0.1, 25.0, "davies")) for z in (-2, -1, 1)}
    if convention == "mixed":  # K'' = a(H)[HPO4]/[H2PO4] = Ka γ(-1)/γ(-2)
        want = 6.86 + (g[-1] - g[-2])
    else:  # K' = [H][HPO4]/[H2PO4] = Ka γ(-1)/(γ(H) γ(-2))
        want = 6.86 + (g[-1] - g[1] - g[-2])
    assert got == pytest.approx(want, abs=1e-12)


def test_pka_stated_at_another_temperature_is_brought_to_25c() -> None:
    pka = "          - {value: 7.75, uncertainty: 0.01, temperature: 37, enthalpy: 47.45, reference: r}"
    m, _ = _one(method_text(substance="tris", form="base", pka=pka, shortcut="weak-base-square-root", temperature="30"))
    p = m.solutions[0].components[0].pka[0]
    assert pka_at_temperature(p.thermodynamic, 37.0, dh=47.45) == pytest.approx(7.75, abs=1e-12)
    assert p.at_working_temperature == pytest.approx(pka_at_temperature(p.thermodynamic, 30.0, dh=47.45), abs=1e-12)


@pytest.mark.parametrize(("written", "celsius"), [("20", 20.0), ("20 °C", 20.0), ("20°C", 20.0), ("'20 ℃'", 20.0), ("293.15 K", 20.0), ("310.15 K", 37.0)])
def test_temperatures_carry_their_unit_or_are_celsius(written: str, celsius: float) -> None:
    """Concentrations carry units, so temperatures may too: °C and K (T/K = t/°C + 273.15, by definition)."""
    m, _ = _one(method_text(temperature=written))
    assert m.conditions.temperature == pytest.approx(celsius, abs=1e-12)
    m, _ = _one(method_text(temperature="30", pka=f"          - {{value: 7.75, uncertainty: 0.01, temperature: {written}, enthalpy: 47.45, reference: r}}",
                            substance="tris", form="base", shortcut="weak-base-square-root"))
    assert m.solutions[0].components[0].pka[0].stated_temperature == pytest.approx(celsius, abs=1e-12)


def test_temperature_tolerance_in_kelvin_or_celsius() -> None:
    for written in ("2", "2 K", "2 °C"):
        m, _ = _one(method_text().replace("activity_model: davies}", f"activity_model: davies, temperature_tolerance: {written}}}"))
        assert m.conditions.temperature_tolerance == 2.0


def test_temperature_with_unit_validates_against_the_json_schema() -> None:
    data = yaml.safe_load(method_text(temperature="20 °C"))
    jsonschema.validate(data, json_schema())
    data["conditions"]["temperature"] = "77 °F"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(data, json_schema())


def test_pka_at_the_working_temperature_without_enthalpy_is_a_warning() -> None:
    pka = "          - {value: 4.0, uncertainty: 0.02, temperature: 37, reference: r}"
    text = method_text(substance="x-acid", pka=pka, temperature="37").replace("        form: acid", "        charge: 0\n        form: acid")
    m, problems = _one(text)
    assert [p.message for p in problems] == [
        "no enthalpy: the pKa is taken as independent of temperature, so the temperature sensitivity leaves out its change",
        "pKa1 of x-acid has no enthalpy of ionization ΔH°, and the working temperature reaches 37 °C: the 25 °C pKa is used unchanged, "
        "and the uncertainty budget takes ΔH° as unknown within ±50 kJ/mol; state the enthalpy with its reference",
    ]
    assert m.solutions[0].components[0].pka[0].at_working_temperature == 4.0


@pytest.mark.parametrize(
    ("conc", "molar_mass", "want"),
    [
        ("10 mmol/L", None, 0.01),
        ("600.52 mg/L", None, 0.01),  # acetic acid, C2H4O2 = 60.052 g/mol
        ("0.060052 % w/v", None, 0.01),
        ("500 mg/L", "50", 0.01),
    ],
)
def test_concentration_units(conc: str, molar_mass: str | None, want: float) -> None:
    extra = f"        molar_mass: {molar_mass}\n" if molar_mass else ""
    m, _ = _one(method_text(conc=conc, extra=extra))
    assert m.solutions[0].components[0].concentration == pytest.approx(want, rel=1e-12)


def test_molality_converts_with_the_water_density_at_the_working_temperature() -> None:
    m, _ = _one(method_text(conc="0.01 mol/kg", temperature="37"))
    assert m.solutions[0].components[0].concentration == pytest.approx(0.01 * water_density(37.0) / 1000.0, rel=1e-12)


def test_tolerance_as_percentage_and_as_concentration() -> None:
    m, _ = _one(method_text(extra="        tolerance: 2 %\n"))
    assert m.solutions[0].components[0].tolerance == pytest.approx(2e-4, rel=1e-12)
    m, _ = _one(method_text(extra="        tolerance: 0.5 mmol/L\n"))
    assert m.solutions[0].components[0].tolerance == pytest.approx(5e-4, rel=1e-12)


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], capture_output=True, text=True, cwd=cwd, timeout=120)


def test_new_then_check(tmp_path: Path) -> None:
    r = run("new", "my-method", cwd=tmp_path)
    assert r.returncode == 0 and (tmp_path / "my-method.yaml").exists()
    assert run("check", "my-method.yaml", cwd=tmp_path).returncode == 0
    assert run("check", "--strict", "my-method.yaml", cwd=tmp_path).returncode == 1  # the table's unverified values
    again = run("new", "my-method", cwd=tmp_path)
    assert again.returncode == 1
    assert again.stderr.strip() == "dossier new: my-method.yaml exists; choose another name with -o or add --force"
    upper = run("new", "QC-M-0042", cwd=tmp_path)  # laboratories number their methods so
    assert upper.returncode == 0, upper.stderr
    assert "id: QC-M-0042 " in (tmp_path / "QC-M-0042.yaml").read_text(encoding="utf-8")
    assert run("check", "QC-M-0042.yaml", cwd=tmp_path).returncode == 0
    bad = run("new", "My Method", cwd=tmp_path)
    assert bad.returncode == 2
    assert bad.stderr.strip().endswith(
        "dossier new: error: argument ID: a method id is letters (a-z, A-Z), digits, '-', '_' or '.', "
        "starting with a letter or digit, at most 63 characters; got 'My Method'"
    )


def test_schema_command_prints_the_schema() -> None:
    r = run("schema")
    assert r.returncode == 0
    assert json.loads(r.stdout) == json.loads(json.dumps(json_schema()))


def test_substances_command() -> None:
    r = run("substances", "--json")
    assert r.returncode == 0
    data = json.loads(r.stdout)
    assert len(data["substances"]) >= 25
    assert "tris" in run("substances").stdout
    listing = run("substances").stdout
    assert "sodium acetate trihydrate" in listing and "Na2HPO4·12H2O" in listing  # the compounds weighed_as may name


def test_solve_a_method_file() -> None:
    r = run("solve", "methods/tris-buffer-37c.yaml", "--json")
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    assert data["method"]["id"] == "tris-buffer-37c"
    (sol,) = data["solutions"]
    assert [s["id"] for s in sol["shortcuts"]] == ["henderson-hasselbalch", "constants-at-25c"]
    # 12 K above 25 °C with ΔH° = 47.45 kJ/mol: the 25 °C constants are about 0.32 too high
    assert sol["shortcuts"][1]["error"] == pytest.approx(0.32, abs=0.01)
    table = run("solve", "methods/tris-buffer-37c.yaml")
    assert "tris-buffer-37c · medium" in table.stdout


def test_solve_a_bad_method_file_exits_1() -> None:
    r = run("solve", "tests/inputs/bad/unknown-substance.yaml")
    assert r.returncode == 1
    assert r.stderr.splitlines()[-1] == "dossier solve: tests/inputs/bad/unknown-substance.yaml: not solved, the file has errors"

"""The command line, run as a real process (python -m dossier)."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], capture_output=True, text=True, timeout=120)


def test_solve_prints_both_scales_and_the_shortcuts() -> None:
    r = run("solve", "--pka", "4.756", "--conc", "10 mmol/L")
    assert r.returncode == 0, r.stderr
    assert "exact pH, activity scale" in r.stdout
    assert "exact pH, concentration scale" in r.stdout
    assert "weak-acid-square-root" in r.stdout
    assert "3.3871" in r.stdout  # exact pH of 0.01 mol/L acetic acid, pKa 4.756, 25 °C


def test_solve_json_for_a_polyprotic_ampholyte() -> None:
    r = run("solve", "--pka", "2.148", "--pka", "7.198", "--pka", "12.35", "--conc", "0.1 mol/L", "--form", "1", "--json")
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    assert data["ph"] == pytest.approx(4.688, abs=0.001)
    assert [s["id"] for s in data["shortcuts"]] == ["ampholyte-mean"]
    assert data["shortcuts"][0]["error"] == pytest.approx(4.673 - data["ph"], abs=1e-12)


def test_solve_with_temperature_and_activity() -> None:
    r = run("solve", "--pka", "8.072", "--charge", "1", "--dh", "47.45", "--conc", "50 mmol/L",
            "--strong-acid", "25 mmol/L", "--temperature", "37", "--activity", "davies", "--json")
    assert r.returncode == 0, r.stderr
    data = json.loads(r.stdout)
    assert data["temperature"] == 37.0
    assert {s["id"] for s in data["shortcuts"]} == {"ideal-activity", "constants-at-25c"}


def test_selected_shortcut_that_does_not_apply_is_reported() -> None:
    r = run("solve", "--pka", "4.756", "--conc", "1 mmol/L", "--shortcut", "ampholyte-mean", "--json")
    assert r.returncode == 0
    assert json.loads(r.stdout)["not_applicable"] == [
        {"id": "ampholyte-mean", "reason": "the component is not added in an intermediate (amphiprotic) form"}
    ]


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--pka", "4.756", "--conc", "-1 mmol/L"), "dossier solve: --conc: '-1 mmol/L' is negative; a concentration is 0 or more"),
        (("--pka", "4.756", "--conc", "1"), "dossier solve: --conc: '1' has no unit (allowed: mol/L, mmol/L, µmol/L (or umol/L), mol/kg, mg/L or g/L (with a molar mass), % w/v (with a molar mass))"),
        (("--pka", "7", "--pka", "4", "--conc", "1 mmol/L"), "dossier solve: --pka: values must be ascending (pKa1 ≤ pKa2); got 7 then 4"),
        (("--pka", "4.756", "--conc", "1 mmol/L", "--temperature", "120"), "dossier solve: --temperature: must be in 0 … 100 °C; got 120"),
        (("--pka", "4.756", "--conc", "1 mmol/L", "--activity", "pitzer"), "dossier solve: --activity: unknown activity model 'pitzer'; allowed: ideal, debye-huckel, extended-debye-huckel, davies"),
        (("--pka", "4.756", "--conc", "1 mmol/L", "--form", "3"), "dossier solve: --form: protons removed must be 0 … 1 for a substance with 1 ionization step(s); got 3"),
        (("--pka", "nan", "--conc", "1 mmol/L"), "dossier solve: --pka[0]: must be a finite number in -5 … 20; got nan"),
        (("--pka", "4.756", "--conc", "250 mg/L"), "dossier solve: --conc: '250 mg/L' is a mass concentration: state the molar mass (g/mol) to convert it"),
        (("--pka", "4.756", "--conc", "1 mmol/L", "--shortcut", "magic"), "dossier solve: --shortcut: unknown id 'magic'; known: weak-acid-square-root, weak-acid-quadratic, weak-acid-water-corrected, weak-base-square-root, weak-base-quadratic, conjugate-base-square-root, henderson-hasselbalch, ampholyte-mean, strong-acid, strong-acid-water-corrected, strong-base, strong-base-water-corrected, weak-acid-weak-base-salt, henderson-hasselbalch-two-substances, first-step-only, ideal-activity, constants-at-25c"),
    ],
)
def test_bad_values_exit_1_with_one_clear_line(args: tuple[str, ...], message: str) -> None:
    r = run("solve", *args)
    assert r.returncode == 1
    assert r.stderr.strip() == message
    assert "Traceback" not in r.stderr


def test_usage_error_exits_2() -> None:
    r = run("solve", "--pka", "4.756")
    assert r.returncode == 2
    assert r.stderr.strip() == "dossier solve: give a method FILE, or --pka and --conc for one solution"
    assert run("frobnicate").returncode == 2


def test_version() -> None:
    r = run("--version")
    assert r.returncode == 0 and r.stdout.startswith("ph-dossier ")


def _with_reader_gone(*args: str) -> tuple[int, str]:
    """Run the command with its standard output a pipe whose reader has closed it
    (as ``| head`` does once it has its lines); exit code and standard error."""
    proc = subprocess.Popen([sys.executable, "-m", "dossier", *args], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    proc.stdout.close()  # the only reader: every write of the child now fails with EPIPE
    err = proc.stderr.read()
    proc.stderr.close()
    return proc.wait(timeout=120), err


@pytest.mark.parametrize("args", [("substances",), ("schema",), ("solve", "--pka", "4.756", "--conc", "10 mmol/L", "--json"),
                                  ("solve", "--pka", "4.756", "--conc", "10 mmol/L")])
def test_a_closed_output_pipe_ends_the_command_quietly(args: tuple[str, ...]) -> None:
    code, err = _with_reader_gone(*args)
    assert (code, err) == (141, "")  # 128 + SIGPIPE, as a shell reports for tools ended by a closed pipe


def test_piped_into_head_through_a_shell() -> None:
    command = f"'{sys.executable}' -m dossier substances | head -n 1; echo \"status ${{PIPESTATUS[0]}}\" >&2"
    r = subprocess.run(["bash", "-c", command], capture_output=True, text=True, timeout=120)
    assert r.stdout.startswith("Substance table")
    assert r.stderr.splitlines()[-1] in ("status 0", "status 141"), r.stderr  # 0 if all was written before head left
    assert len(r.stderr.splitlines()) == 1, r.stderr


def _run_in(cwd: object, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], capture_output=True, text=True, timeout=120, cwd=cwd)


NEEDS_BUILD = "serve needs a dossier folder built by `dossier build`"


def test_serve_names_what_it_needs(tmp_path) -> None:  # noqa: ANN001
    (tmp_path / "file.yaml").write_text("format: ph-dossier-method/1\n", encoding="utf-8")
    (tmp_path / "notes.txt").write_text("x\n", encoding="utf-8")
    (tmp_path / "empty").mkdir()
    cases = {
        "file.yaml": f"dossier serve: file.yaml is a file, not a dossier folder: {NEEDS_BUILD} "
                     "(e.g. dossier build file.yaml -o output, then dossier serve output)",
        "notes.txt": f"dossier serve: notes.txt is a file, not a dossier folder: {NEEDS_BUILD} "
                     "(e.g. dossier build methods -o output, then dossier serve output)",
        "empty": f"dossier serve: empty holds no built dossier (no index.html): {NEEDS_BUILD} "
                 "(e.g. dossier build methods -o output, then dossier serve output)",
        "missing": f"dossier serve: no such folder missing: {NEEDS_BUILD} (e.g. dossier build methods -o missing)",
    }
    for target, message in cases.items():
        r = _run_in(tmp_path, "serve", target, "--port", "0")
        assert (r.returncode, r.stderr.strip(), r.stdout) == (1, message, ""), target
        assert "build -o file.yaml" not in r.stderr


def test_verify_of_a_folder_that_is_no_dossier(tmp_path) -> None:  # noqa: ANN001
    (tmp_path / "some.txt").write_text("x\n", encoding="utf-8")
    r = _run_in(tmp_path, "verify", str(tmp_path))
    assert (r.returncode, r.stderr.strip(), r.stdout) == (1, f"dossier verify: not a dossier: no manifest.json in {tmp_path}", "")
    r = _run_in(tmp_path, "verify", "nowhere")
    assert (r.returncode, r.stderr.strip()) == (1, "dossier verify: not a dossier: no folder nowhere")
    (tmp_path / "manifest.json").write_text("{not json", encoding="utf-8")  # a damaged dossier is a mismatch, not "no dossier"
    r = _run_in(tmp_path, "verify", ".")
    assert r.returncode == 1
    assert r.stdout.splitlines()[0].startswith("manifest.json: cannot read the manifest:")
    assert r.stdout.splitlines()[-1] == ".: 1 mismatch(es)"


def test_timing_columns_line_up_whatever_the_stage_names() -> None:
    from dossier.render.terminal import timing_lines

    stages = {"check inputs": 0.04, "analyse, plot and render methods (pages and PDFs)": 1234.5, "bind the dossier PDF": 3.0, "publish": 0.2}
    lines = timing_lines(stages)
    assert [line.split()[0] for line in lines] == ["check", "analyse,", "bind", "publish"]
    assert len({len(line) for line in lines}) == 1, lines  # seconds right-aligned: every line ends in the same column
    assert len({line.rindex(".") for line in lines}) == 1, lines  # decimal points one above the other
    name_end = max(len(name) for name in stages) + 2
    assert all(line[name_end] == " " and line[:name_end].rstrip() == "  " + name for line, name in zip(lines, stages))
    assert lines[1].endswith("1234.50 s") and lines[0].endswith("   0.04 s")

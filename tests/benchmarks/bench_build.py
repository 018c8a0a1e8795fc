"""Build speed, measured side by side (issue 16).

* A cold build (``--no-cache``) of the fixed benchmark set
  (``tests/benchmarks/demo-set``, the ten demo methods of 2026-12-03) with this
  checkout and with the code of :data:`OLD_COMMIT`, extracted by ``git
  archive`` into a temporary folder and run with ``PYTHONPATH``; the two are
  run alternately, :data:`PAIRS` times, and each pair gives one ratio.
* The whole demo dossier of the day (``methods/``), cold, new against old.
  When the old code cannot read today's method files (its ``check`` fails:
  keys and forms added since), the old side builds the benchmark set — the
  ten demo methods of its own day — and the row says so.
* A one-method rebuild and ``dossier verify``, against the cold build of the
  same run. Each verify follows a one-method rebuild and may take the other
  methods' re-computations from the verify cache of the verifies before it
  (the run's own cache folder, ``XDG_CACHE_HOME`` in its temporary folder:
  nothing of an earlier run is reused); ``verify --no-cache`` of the same
  dossier is measured beside it.

Every build runs in its own process (``python -m dossier``), as a user runs
it. Set ``BENCH_PAIRS`` to change the number of pairs and ``BENCH_OLD`` to
compare against another commit.
"""

from __future__ import annotations

import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from collections.abc import Iterator
from pathlib import Path
from statistics import median

from .run import Row

ROOT = Path(__file__).resolve().parents[2]
DEMO_SET = Path(__file__).parent / "demo-set"
OLD_COMMIT = os.environ.get("BENCH_OLD", "d30262e56c6b90e77202bd927ae4be10d541fc7f")
"""The main commit before issue 16 (2026-12-03)."""
PAIRS = int(os.environ.get("BENCH_PAIRS", "3"))


def _extract(commit: str, dest: Path) -> Path:
    """The package of ``commit`` as files in ``dest`` (no git worktree is registered)."""
    dest.mkdir(parents=True)
    archive = subprocess.run(["git", "-C", str(ROOT), "archive", commit, "dossier", "templates"], check=True, capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(dest)], input=archive, check=True)
    (dest / "templates").rename(dest / "dossier" / "templates")  # the package dossier.templates (pyproject's package-dir)
    # An editable install of this checkout puts an import finder ahead of PYTHONPATH:
    # take it out, in this process and in the worker processes it starts.
    (dest / "sitecustomize.py").write_text(
        "import sys\nsys.meta_path[:] = [f for f in sys.meta_path if '__editable__' not in getattr(f, '__module__', '')"
        " and '__editable__' not in getattr(f, '__name__', '')]\n",
        encoding="utf-8",
    )
    return dest


CPU: dict[str, list[float]] = {}
"""CPU seconds (user + system, all processes of the command) of every run, by label."""


def _children_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def _which(code: Path) -> str:
    """The folder the package is imported from with ``code`` on PYTHONPATH."""
    env = dict(os.environ, PYTHONPATH=str(code))
    return subprocess.run([sys.executable, "-c", "import dossier; print(dossier.__file__)"], env=env, capture_output=True, text=True, check=True,
                          cwd=tempfile.gettempdir()).stdout.strip()


def _run(code: Path, *args: str, label: str = "") -> float:
    """Wall time of one ``python -m dossier`` command [s]; its CPU time goes to :data:`CPU`."""
    env = dict(os.environ, PYTHONPATH=str(code))
    c0, t0 = _children_cpu(), time.perf_counter()
    # not from the checkout's folder: ``python -m`` puts the working folder first on sys.path
    done = subprocess.run([sys.executable, "-m", "dossier", *args], env=env, capture_output=True, text=True, cwd=tempfile.gettempdir())
    seconds = time.perf_counter() - t0
    CPU.setdefault(label, []).append(_children_cpu() - c0)
    if done.returncode != 0:
        raise RuntimeError(f"dossier {' '.join(args)} failed ({done.returncode}): {done.stdout[-2000:]}{done.stderr[-2000:]}")
    return seconds


def _cold(code: Path, methods: Path, out: Path, label: str) -> float:
    shutil.rmtree(out, ignore_errors=True)
    return _run(code, "build", str(methods), "-o", str(out), "--no-cache", "--quiet", label=label)


def _spread(values: list[float]) -> str:
    return f"min {min(values):.3g}, median {median(values):.3g}, max {max(values):.3g}"


def _reads(code: Path, methods: Path) -> bool:
    """Whether ``code``'s ``dossier check`` accepts the method files in ``methods``."""
    env = dict(os.environ, PYTHONPATH=str(code))
    return subprocess.run([sys.executable, "-m", "dossier", "check", str(methods)], env=env, capture_output=True,
                          cwd=tempfile.gettempdir()).returncode == 0


def _side_by_side(label: str, old: Path, methods: Path, tmp: Path, aim: str, old_methods: Path | None = None) -> tuple[list[Row], list[float]]:
    """Cold builds of ``methods`` by this code and of ``old_methods`` (default: the same) by the old code, alternating."""
    new_t, old_t, ratios = [], [], []
    inputs = {"new": methods, "old": old_methods or methods}
    for i in range(PAIRS):
        # alternate which goes first, so a slow spell of the host hits both
        order = [("new", ROOT), ("old", old)] if i % 2 == 0 else [("old", old), ("new", ROOT)]
        got = {name: _cold(code, inputs[name], tmp / f"out-{name}", f"{label}/{name}") for name, code in order}
        new_t.append(got["new"])
        old_t.append(got["old"])
        ratios.append(got["new"] / got["old"])
    rows = [
        Row(f"{label}: cold build, this code", median(new_t), "s", _spread(new_t)),
        Row(f"{label}: cold build, code of {OLD_COMMIT[:7]}", median(old_t), "s", _spread(old_t)),
        Row(f"{label}: new / old, per pair", median(ratios), "×", f"{_spread(ratios)}; aim {aim}"),
        Row(f"{label}: CPU, this code", median(CPU[f"{label}/new"]), "s", _spread(CPU[f"{label}/new"])),
        Row(f"{label}: CPU, code of {OLD_COMMIT[:7]}", median(CPU[f"{label}/old"]), "s", _spread(CPU[f"{label}/old"])),
        Row(f"{label}: CPU new / old, per pair", median(a / b for a, b in zip(CPU[f"{label}/new"], CPU[f"{label}/old"])), "×"),
    ]
    return rows, new_t


def _same_files(a: Path, b: Path) -> bool:
    names = sorted(p.name for p in a.glob("*.yaml"))
    return names == sorted(p.name for p in b.glob("*.yaml")) and all((a / n).read_bytes() == (b / n).read_bytes() for n in names)


def run() -> Iterator[Row]:
    """The rows, each as soon as it is measured (a long run that is cut short still shows what it measured)."""
    with tempfile.TemporaryDirectory() as tmp_name:
        tmp = Path(tmp_name)
        old = _extract(OLD_COMMIT, tmp / "old-code")
        if not _which(old).startswith(str(old)):
            raise RuntimeError(f"the old code is not the one imported: {_which(old)}")
        set_rows, set_new = _side_by_side("benchmark set (10 methods)", old, DEMO_SET, tmp, "≤ 0.3")
        yield from set_rows
        demo = tmp / "methods"
        shutil.copytree(ROOT / "methods", demo)
        if _same_files(ROOT / "methods", DEMO_SET):
            yield Row("demo dossier of the day: the same method files as the benchmark set", 0, "", "not built twice")
            cold_times = set_new
        elif _reads(old, demo):
            demo_rows, cold_times = _side_by_side("demo dossier of the day", old, demo, tmp, "≤ 0.5")
            yield from demo_rows
        else:
            yield Row("demo dossier of the day: the old code cannot read its method files", 0, "",
                      f"old side: the benchmark set ({OLD_COMMIT[:7]}'s demo)")
            demo_rows, cold_times = _side_by_side("demo of the day (old: benchmark set)", old, demo, tmp, "≤ 0.5", DEMO_SET)
            yield from demo_rows

        out = tmp / "out-rebuilt"
        os.environ["XDG_CACHE_HOME"] = str(tmp / "user-cache")  # verify's cache: this run's own (the child processes inherit it)
        _run(ROOT, "build", str(demo), "-o", str(out), "--quiet", label="warm-up")  # fills the cache; not timed
        cold = median(cold_times)
        one, unchanged, verify, recomputing = [], [], [], []
        f = demo / "benzoate-extract.yaml"
        text = f.read_text(encoding="utf-8")
        if "max_ph_error: 0.05" not in text:  # the change below must change the method, or nothing is rebuilt
            raise RuntimeError(f"{f.name} no longer has 'max_ph_error: 0.05': pick another change for the one-method rebuild")
        for i in range(PAIRS):
            unchanged.append(_run(ROOT, "build", str(demo), "-o", str(out), "--quiet", label="unchanged"))
            limit = ("0.04", "0.05")[i % 2]
            f.write_text(text.replace("max_ph_error: 0.05", f"max_ph_error: {limit}"), encoding="utf-8")
            one.append(_run(ROOT, "build", str(demo), "-o", str(out), "--quiet", label="one"))
            verify.append(_run(ROOT, "verify", str(out), label="verify"))
            recomputing.append(_run(ROOT, "verify", str(out), "--no-cache", label="verify --no-cache"))
        yield from [
            Row("rebuild, nothing changed", median(unchanged), "s", _spread(unchanged)),
            Row("rebuild, one method changed", median(one), "s", _spread(one)),
            Row("  one-method rebuild / cold build", median(one) / cold, "×", "aim ≤ 0.15"),
            Row("verify the demo dossier", median(verify), "s", _spread(verify)),
            Row("  verify / cold build", median(verify) / cold, "×", "aim ≤ 0.3"),
            Row("verify --no-cache (every method re-computed)", median(recomputing), "s", _spread(recomputing)),
            Row("  verify --no-cache / cold build", median(recomputing) / cold, "×", "aim ≤ 0.3"),
            Row("CPU: rebuild nothing changed, one method changed, verify", median(CPU["one"]), "s",
                f"nothing {median(CPU['unchanged']):.3g} s, one method {median(CPU['one']):.3g} s, verify {median(CPU['verify']):.3g} s, "
                f"verify --no-cache {median(CPU['verify --no-cache']):.3g} s"),
        ]

"""Analysis speed: Monte Carlo with 10⁶ draws (triprotic, Davies), a 400 × 400
error map, and the whole analysis of one method."""

from __future__ import annotations

from pathlib import Path

from dossier.analysis.maps import error_map
from dossier.analysis.method import analyse_method
from dossier.analysis.montecarlo import monte_carlo
from dossier.inputs.loader import load_method
from dossier.render.figures import method_figures

from .run import Row, timed

ROOT = Path(__file__).resolve().parents[2]


def run() -> list[Row]:
    phosphate = load_method(ROOT / "methods" / "phosphate-buffer-hh.yaml").method  # triprotic, Davies
    spec, cond, limit = phosphate.solutions[0], phosphate.conditions, phosphate.criteria.max_ph_error
    t_mc = timed(lambda: monte_carlo(("henderson-hasselbalch",), spec, cond, limit, draws=1_000_000), repeat=3)
    t_map = timed(lambda: error_map("henderson-hasselbalch", spec, cond, n_pka=400, n_conc=400), repeat=3)
    t_method = timed(lambda: analyse_method(phosphate), repeat=2)
    analysis = analyse_method(phosphate)
    t_figures = timed(lambda: method_figures(analysis), repeat=2)
    return [
        Row("Monte Carlo, 10^6 draws, triprotic Davies (phosphate buffer)", t_mc, "s", "aim < 2 s"),
        Row("error map 400 x 400 (triprotic Davies)", t_map, "s", "aim < 1 s"),
        Row("whole analysis of one method (phosphate buffer, 10^6 draws)", t_method, "s", "aim < 5 s"),
        Row("its five figures (SVG)", t_figures, "s"),
    ]

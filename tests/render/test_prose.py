"""The words of verdicts (dossier.render.prose): status words, reasons, condition, justification."""

from __future__ import annotations

import re
from functools import lru_cache
from pathlib import Path

from dossier import display
from dossier.analysis.method import AnalysisSettings, MethodAnalysis, analyse_method
from dossier.analysis.verdicts import VerdictStatus
from dossier.inputs.loader import load_method
from dossier.render.prose import STATUS_WORDS, format_percent, prose, status_words

ROOT = Path(__file__).resolve().parents[2]
FAST = AnalysisSettings(draws=20_000, map_pka=11, map_conc=11)


@lru_cache(maxsize=None)
def demo(name: str) -> MethodAnalysis:
    return analyse_method(load_method(ROOT / "methods" / f"{name}.yaml").method, FAST)


def test_status_words_read_as_validation_reports_do() -> None:
    assert status_words(VerdictStatus.PASS) == "meets the criterion"
    assert status_words("conditional") == "meets it within a restricted range"
    assert status_words(VerdictStatus.FAIL) == "does not meet it"
    assert set(STATUS_WORDS) == set(VerdictStatus)


def test_percentages() -> None:
    assert format_percent(0.0) == "0 %" and format_percent(0.95) == "95.0 %" and format_percent(6e-6) == "0.0006 %"


def test_prose_of_every_demo_shortcut_uses_the_trade_words_and_display_numbers() -> None:
    for name in ("ammonia-reagent", "boric-rinse", "tris-buffer-37c"):
        a = demo(name)
        for sa in a.solutions:
            for s in sa.shortcuts:
                p = prose(a.method, sa, s)
                text = " ".join((p.words, p.condition, *p.reasons, p.justification))
                assert "robust" not in text.lower()
                assert not re.search(r"\b(pass|fail|conditional)\b", text), text
                assert "conformity probability" in text and format_percent(s.verdict.conformity) in text
                assert not re.search(r"(?<![\w.])-\d", text), "a hyphen-minus before a number"
                assert display.fixed(abs(s.verdict.worst.error)) in p.reasons[1]
                assert (p.condition != "") == (s.verdict.status == "conditional")


def test_ammonia_reagent_does_not_meet_it_and_says_why() -> None:
    a = demo("ammonia-reagent")
    sa = a.solutions[0]
    (s,) = sa.shortcuts
    assert s.verdict.status == "fail" and abs(s.verdict.nominal_error) < 0.02
    p = prose(a.method, sa, s)
    assert p.words == "does not meet it"
    assert "the conformity probability is below the required one" in p.justification
    assert "error at the nominal composition exceeds" not in p.justification

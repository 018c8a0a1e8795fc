"""Drawings made once (dossier.render.memo): made on first use, kept only when asked for, reused."""

from __future__ import annotations

import pytest

from dossier.render import memo


def test_a_result_is_made_once_and_only_what_was_asked_for_is_kept(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(memo, "_MEMOS", {})
    monkeypatch.setattr(memo, "_PENDING", {})
    made: list[int] = []
    squares = memo.Memo("squares", lambda k: made.append(k) or k * k)
    assert squares(3) == 9 and squares(3) == 9 and made == [3]
    squares.take({4: 16, 5: 25})  # an earlier build's
    assert squares(4) == 16 and made == [3]  # taken, not made
    assert memo.kept() == {"squares": {3: 9, 4: 16}}  # 5 was handed over but not used: not kept again
    with pytest.raises(ValueError, match="squares"):
        memo.Memo("squares", abs)


def test_reuse_hands_each_memo_its_own_results_even_one_made_later(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(memo, "_MEMOS", {})
    monkeypatch.setattr(memo, "_PENDING", {})
    made: list[str] = []
    upper = memo.Memo("upper", lambda k: made.append(k) or k.upper())
    memo.reuse({"upper": {"a": "A"}, "later": {"x": "X!"}, "never": {"y": 1}})
    assert upper("a") == "A" and upper("b") == "B" and made == ["b"]
    # a memo whose module is imported after the results were handed over (the binder's) takes them then
    later = memo.Memo("later", lambda k: made.append(k) or k.upper())
    assert later("x") == "X!" and made == ["b"]
    # results of a memo this process never made are kept as they were, for the next build
    assert memo.kept() == {"upper": {"a": "A", "b": "B"}, "later": {"x": "X!"}, "never": {"y": 1}}


def test_spare_keeps_the_most_recent_unused_results_of_earlier_builds(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(memo, "_MEMOS", {})
    monkeypatch.setattr(memo, "_PENDING", {})
    made: list[int] = []
    lines = memo.Memo("lines", lambda k: made.append(k) or -k, spare=2)
    lines.take({7: -7, 6: -6, 5: -5})  # the earlier build's, most recent first
    assert lines(8) == -8 and lines(6) == -6 and made == [8]
    assert list(memo.kept()["lines"].items()) == [(8, -8), (6, -6), (7, -7), (5, -5)]  # used first, then two spares
    lines.spare = 1
    assert list(memo.kept()["lines"]) == [8, 6, 7]

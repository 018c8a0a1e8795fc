"""Drawings made once (dossier.render.memo): made on first use, kept only when asked for, reused."""

from __future__ import annotations

import pytest

from dossier.render import memo


def test_a_result_is_made_once_and_only_what_was_asked_for_is_kept(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(memo, "_MEMOS", {})
    made: list[int] = []
    squares = memo.Memo("squares", lambda k: made.append(k) or k * k)
    assert squares(3) == 9 and squares(3) == 9 and made == [3]
    squares.take({4: 16, 5: 25})  # an earlier build's
    assert squares(4) == 16 and made == [3]  # taken, not made
    assert memo.kept() == {"squares": {3: 9, 4: 16}}  # 5 was handed over but not used: not kept again
    with pytest.raises(ValueError, match="squares"):
        memo.Memo("squares", abs)


def test_reuse_hands_each_memo_its_own_results_and_skips_unknown_names(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(memo, "_MEMOS", {})
    made: list[str] = []
    upper = memo.Memo("upper", lambda k: made.append(k) or k.upper())
    memo.reuse({"upper": {"a": "A"}, "gone": {"x": 1}})  # a memo of an older version of the code: ignored
    assert upper("a") == "A" and upper("b") == "B" and made == ["b"]

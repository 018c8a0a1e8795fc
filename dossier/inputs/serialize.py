"""A validated method as plain JSON data, and back.

The ledger records the inputs of every published number this way, so that
``dossier verify`` can re-compute them without the method file (and check the
method file against them when it is given).
"""

from __future__ import annotations

from dataclasses import asdict
from typing import Any

from ..chemistry import StatedConstants
from .model import AdjustmentSpec, ClaimedShortcut, StrongAlone, ComponentSpec, ConditionsSpec, Criteria, Method, PkaValue, ReferenceSpec, SolutionSpec

__all__ = ["method_to_dict", "method_from_dict"]


def method_to_dict(method: Method) -> dict[str, Any]:
    """Every field of the method (tuples become lists); the file path is reduced to its name."""
    d = asdict(method)
    d["path"] = method.path.replace("\\", "/").rsplit("/", 1)[-1]
    return d


def _pka(d: dict[str, Any]) -> PkaValue:
    return PkaValue(**d)


def _component(d: dict[str, Any]) -> ComponentSpec:
    d = dict(d)
    d["pka"] = tuple(_pka(p) for p in d["pka"])
    d["working_range"] = tuple(d["working_range"])
    d["working_range_text"] = tuple(d["working_range_text"])
    return ComponentSpec(**d)


def _solution(d: dict[str, Any]) -> SolutionSpec:
    d = dict(d)
    d["components"] = tuple(_component(c) for c in d["components"])
    d["shortcuts"] = tuple(d["shortcuts"])
    if d.get("adjustment") is not None:
        d["adjustment"] = AdjustmentSpec(**d["adjustment"])
    d["as_written"] = tuple(_claim(c) for c in d.get("as_written", ()))
    if d.get("strong_alone") is not None:
        st = dict(d["strong_alone"])
        st["working_range"] = tuple(st["working_range"])
        st["working_range_text"] = tuple(st["working_range_text"])
        d["strong_alone"] = StrongAlone(**st)
    return SolutionSpec(**d)


def _claim(d: dict[str, Any]) -> ClaimedShortcut:
    st = d["stated"]
    return ClaimedShortcut(d["id"], None if st is None else StatedConstants(tuple(st["pka"]), st["pkw"]))


def method_from_dict(d: dict[str, Any]) -> Method:
    """The inverse of :func:`method_to_dict`.

    Raises
    ------
    KeyError, TypeError
        When the data is not a serialized method.
    """
    d = dict(d)
    d["criteria"] = Criteria(**d["criteria"])
    d["conditions"] = ConditionsSpec(**d["conditions"])
    d["solutions"] = tuple(_solution(s) for s in d["solutions"])
    d["references"] = tuple(ReferenceSpec(**r) for r in d["references"])
    return Method(**d)

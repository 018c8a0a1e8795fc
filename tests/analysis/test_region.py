"""The operating region: corners, the worst point inside, and where the shortcut holds."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from dossier.analysis.batch import Variation, solution_for
from dossier.analysis.region import operating_region
from dossier.chemistry import CATALOGUE

from tests.builders import MethodBuilder

from .helpers import acid, tris_buffer


def _error(sid, spec, cond, c, t, b):  # noqa: ANN001, ANN202 - one point, one engine call, no grid
    sol = solution_for(spec, cond, Variation(scale=c / spec.components[0].concentration, temperature=t, background=b))
    return float(CATALOGUE[sid].error(sol))


def test_worst_point_is_at_least_as_bad_as_every_corner_and_a_dense_independent_scan() -> None:
    # TRIS with the 25 °C constants at 30 ± 3 °C, background 0.05 ± 0.03 mol/kg (Davies): the error grows with |T − 25|.
    comp = tris_buffer("50 mmol/L", "10 mmol/L", "100 mmol/L", 0.001)
    m = MethodBuilder(limit=0.05, temperature=30.0, temperature_tolerance=3.0, activity_model="davies", background=0.05, background_tolerance=0.03).solution(*comp, shortcuts=["constants-at-25c"]).build()
    spec, cond = m.solutions[0], m.conditions
    r = operating_region("constants-at-25c", spec, cond, 0.05)
    assert r.temperature == (27.0, 33.0)
    assert r.background == pytest.approx((0.02, 0.08)) and len(r.corners) == 8
    for c in r.corners:
        assert c.error == pytest.approx(_error("constants-at-25c", spec, cond, c.concentration, c.temperature, c.background), abs=1e-12)
        assert abs(r.worst.error) >= abs(c.error) - 1e-12
    # an independent scan point by point (a loop, 11 × 7 × 3)
    scan = max(
        abs(_error("constants-at-25c", spec, cond, c, t, b))
        for c, t, b in itertools.product(np.geomspace(0.01, 0.1, 11), np.linspace(27, 33, 7), np.linspace(*r.background, 3))
    )
    assert abs(r.worst.error) >= scan - 1e-9
    assert r.worst.temperature == pytest.approx(33.0)  # farthest from 25 °C
    assert abs(r.worst.error) > 0.05 and not r.holds_everywhere


def test_nominal_region_of_a_clean_case_holds_everywhere() -> None:
    # acetic-like acid 10 mmol/L (pKa 4.76), square root, limit 0.05: holds over 1 – 100 mmol/L at 25 ± 2 °C
    m = MethodBuilder(limit=0.05, temperature_tolerance=2.0).solution(acid(4.76), shortcuts=["weak-acid-square-root"]).build()
    r = operating_region("weak-acid-square-root", m.solutions[0], m.conditions, 0.05)
    assert r.holds_everywhere and r.holds == ((pytest.approx(1e-3), pytest.approx(0.1)),)
    assert r.background == (0.0, 0.0)


def test_holds_part_ends_where_the_error_over_the_box_reaches_the_limit() -> None:
    # pKa 3.0 at 1 – 100 mmol/L: the square root fails at the dilute end
    m = MethodBuilder(limit=0.05, temperature_tolerance=2.0).solution(acid(3.0), shortcuts=["weak-acid-square-root"]).build()
    spec, cond = m.solutions[0], m.conditions
    r = operating_region("weak-acid-square-root", spec, cond, 0.05)
    (low, high), = r.holds
    assert high == pytest.approx(0.1) and 1e-3 < low < 0.1
    worst_at_low = max(abs(_error("weak-acid-square-root", spec, cond, low, t, 0.0)) for t in np.linspace(23, 27, 5))
    assert worst_at_low == pytest.approx(0.05, abs=2e-4)

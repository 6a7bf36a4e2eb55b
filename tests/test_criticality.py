"""Criticality classes, severity and probability levels.

Source of the class definitions: F. Stoessel, "What is your thermal risk?", Chem. Eng. Prog.
89(10) (1993) 68-75, and Stoessel, Thermal Safety of Chemical Processes, Wiley-VCH 2008, ch. 3
(ordering of the classes from memory). Tie resolution to the more critical class is our design.
Severity/probability bands: Stoessel 2008 ch. 3, from memory.
"""

import itertools

import numpy as np
import pytest
from hypothesis import given, strategies as st

from screen.models.criticality import (
    criticality_class, probability_level, severity_level, severity_codes, probability_codes,
    SEVERITY_4_LEVELS, PROBABILITY_6_LEVELS,
)

TP = 300.0


@pytest.mark.parametrize(
    "mtsr, mtt, td24, expected",
    [
        # strict orderings, Stoessel 1993
        (350, 380, 420, 1),  # MTSR < MTT < TD24
        (350, 420, 380, 2),  # MTSR < TD24 < MTT
        (390, 380, 420, 3),  # MTT < MTSR < TD24
        (430, 380, 420, 4),  # MTT < TD24 < MTSR
        (400, 420, 380, 5),  # TD24 < MTSR < MTT
        (430, 400, 380, 5),  # TD24 < MTT < MTSR
    ],
)
def test_every_strict_ordering(mtsr, mtt, td24, expected):
    assert criticality_class(TP, mtsr, mtt, td24) == expected


@pytest.mark.parametrize(
    "mtsr, mtt, td24, expected",
    [
        # ties resolve to the more critical class (design)
        (380, 380, 420, 3),  # MTSR == MTT < TD24: 1 or 3 -> 3
        (350, 400, 400, 2),  # MTSR < MTT == TD24: 1 or 2 -> 2
        (420, 380, 420, 4),  # MTT < MTSR == TD24: 3 or 4 -> 4
        (400, 400, 380, 5),  # TD24 < MTSR == MTT -> 5
        (400, 380, 380, 5),  # MTT == TD24 < MTSR: 4 or 5 -> 5
        (400, 400, 400, 5),  # all equal -> 5
        (350, 380, 350, 5),  # MTSR == TD24 < MTT: 2 or 5 -> 5
    ],
)
def test_ties_go_to_the_more_critical_class(mtsr, mtt, td24, expected):
    assert criticality_class(TP, mtsr, mtt, td24) == expected


def test_td24_at_or_below_process_temperature_is_most_critical():
    assert criticality_class(TP, 320, 400, TP) == 5
    assert criticality_class(TP, 320, 400, TP - 10) == 5


def test_vectorised_equals_scalar():
    values = np.array(list(itertools.product([320, 380, 400, 420, 450], repeat=3)), dtype=float)
    vector = criticality_class(TP, values[:, 0], values[:, 1], values[:, 2])
    scalar = [criticality_class(TP, *row) for row in values]
    assert list(vector) == scalar


@given(st.floats(301, 600), st.floats(301, 600), st.floats(301, 600), st.floats(0, 200))
def test_class_never_decreases_when_mtsr_rises(mtsr, mtt, td24, extra):
    # A higher MTSR (more accumulation) never gives a less critical class.
    assert criticality_class(TP, mtsr + extra, mtt, td24) >= criticality_class(TP, mtsr, mtt, td24)


@pytest.mark.parametrize("rise, four, three", [
    (10, "negligible", "low"), (49.9, "negligible", "low"), (50, "medium", "medium"),
    (199, "medium", "medium"), (200, "critical", "high"), (399, "critical", "high"),
    (400, "catastrophic", "high"), (900, "catastrophic", "high"),
])
def test_severity_bands(rise, four, three):
    # Bands from Stoessel 2008 ch. 3 (from memory); limits to the more severe level (design).
    assert severity_level(rise, 4) == four
    assert severity_level(rise, 3) == three
    assert SEVERITY_4_LEVELS[int(severity_codes(rise))] == four


@pytest.mark.parametrize("hours, six, three", [
    (0.5, "frequent", "high"), (1.0, "frequent", "high"), (1.01, "probable", "high"),
    (8.0, "probable", "high"), (8.5, "occasional", "medium"), (24.0, "occasional", "medium"),
    (30, "seldom", "low"), (50, "seldom", "low"), (80, "remote", "low"),
    (100, "remote", "low"), (101, "almost impossible", "low"),
])
def test_probability_bands(hours, six, three):
    assert probability_level(hours, 6) == six
    assert probability_level(hours, 3) == three
    assert PROBABILITY_6_LEVELS[int(probability_codes(hours))] == six


def test_levels_reject_nan():
    with pytest.raises(ValueError):
        probability_level(float("nan"))
    with pytest.raises(ValueError):
        severity_level(float("nan"))


def test_nan_fails_closed():
    # Design: an unknown temperature never yields a low class (fail closed).
    from screen.errors import ModelDomainError

    with pytest.raises(ModelDomainError):
        criticality_class(TP, 350.0, 400.0, float("nan"))
    assert list(criticality_class(TP, [350.0, 350.0], 400.0, [450.0, float("nan")])) == [1, 5]
    assert PROBABILITY_6_LEVELS[int(probability_codes(float("nan")))] == "frequent"
    assert SEVERITY_4_LEVELS[int(severity_codes(float("nan")))] == "catastrophic"

"""CT ratings against the standard series of IEC 61869-2:2012, 5.201 (primary) and 5.202 (secondary)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from notchwise.addin import udfs
from notchwise.formulas.current_transformers import MAX_PRIMARY_A, MIN_PRIMARY_A, ct_primary_a, ct_ratio
from notchwise.formulas.errors import InputError, InputTypeError

#: IEC 61869-2:2012, 5.201: 10, 12.5, 15, 20, 25, 30, 40, 50, 60, 75 A and their decimal multiples or fractions.
SERIES = (10.0, 12.5, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 60.0, 75.0)
DECADES = (1e-2, 1e-1, 1.0, 10.0, 100.0, 1000.0)
WHOLE_RANGE = np.array([v * 10.0**d for v in SERIES for d in range(-5, 7)])
EVERY_VALUE = sorted({round(v * d / 10.0, 10) for v in SERIES for d in DECADES} | {1e4})


@pytest.mark.parametrize("value", EVERY_VALUE)
def test_at_around_every_value_of_the_series(value):
    following = EVERY_VALUE[EVERY_VALUE.index(value) + 1] if value != EVERY_VALUE[-1] else None
    assert ct_primary_a(value) == pytest.approx(value, rel=1e-12)  # at the value: the value itself
    assert ct_primary_a(value * (1.0 - 1e-6)) == pytest.approx(value, rel=1e-12)  # just below: the value
    if following is not None:
        assert ct_primary_a(value * (1.0 + 1e-6)) == pytest.approx(following, rel=1e-12)  # just above: the next


def test_vector_equals_scalar():
    currents = np.array([0.7, 8.0, 130.0, 1999.0])
    assert list(ct_primary_a(currents)) == [ct_primary_a(c) for c in currents]


@settings(max_examples=300, deadline=None)
@given(current=st.floats(MIN_PRIMARY_A, MAX_PRIMARY_A))
def test_the_choice_is_in_the_series_at_or_above_and_below_the_next(current):
    primary = ct_primary_a(current)
    assert primary >= current * (1.0 - 1e-9)
    assert np.any(np.isclose(primary, WHOLE_RANGE, rtol=1e-12))
    assert primary <= 1.34 * current  # the widest steps of the series, 15 -> 20 and 75 -> 100, are x 4/3


def test_ratio_over_a_standard_secondary():
    assert ct_ratio(130.0, 5.0) == 30.0  # 150/5 A, IEC 61869-2 5.201 and 5.202
    assert ct_ratio(130.0) == 150.0  # 150/1 A
    with pytest.raises(InputError, match="1 A or 5 A"):
        ct_ratio(130.0, 2.0)


@pytest.mark.parametrize("bad, error", [(0.0, InputError), (-5.0, InputError), (1e8, InputError), ("x", InputTypeError), (None, InputTypeError)])
def test_bad_current_gives_a_message(bad, error):
    with pytest.raises(error, match="current"):
        ct_primary_a(bad)


def test_cell_column():
    assert udfs.NW_CT_PRIMARY([[8.0], [130.0]]) == [[10.0], [150.0]]
    assert udfs.NW_CT_PRIMARY(0.0).startswith("Error: current (0 A) must be at least")

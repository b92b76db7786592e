"""The add-in's converters and error path, with raw values as Excel passes them."""

from __future__ import annotations

import math

import numpy as np
import pytest

from notchwise.addin.cells import ERROR_PREFIX, column, each, flag, guard, spill, table
from notchwise.formulas.errors import InputError, InputTypeError


def test_table_skips_a_text_header_and_trailing_blank_rows():
    rows = (("current A", "EMF V"), (0.0, 5.0), (100.0, 150.0), (None, None), ("", None))
    np.testing.assert_array_equal(table("mag_curve", rows, ("current", "EMF"), ("A", "V")), [[0, 5], [100, 150]])


def test_table_names_the_bad_cell():
    with pytest.raises(InputTypeError, match="mag_curve row 2 EMF is empty"):
        table("mag_curve", ((0.0, 5.0), (100.0, None)), ("current", "EMF"), ("A", "V"))
    with pytest.raises(InputError, match="needs 2 columns"):
        table("mag_curve", ((0.0,), (1.0,)), ("current", "EMF"), ("A", "V"))
    assert table("mag_curve", ((None,),), ("current", "EMF"), ("A", "V"), optional=True) is None


def test_column_reads_a_row_or_a_column():
    np.testing.assert_array_equal(column("sections", ((0.3, 0.2, None),), "ohm"), [0.3, 0.2])
    np.testing.assert_array_equal(column("sections", ((0.3,), (0.2,)), "ohm"), [0.3, 0.2])
    with pytest.raises(InputTypeError, match="sections is empty"):
        column("sections", ((None,),), "ohm")


@pytest.mark.parametrize("raw, expected", [(None, True), (False, False), (0.0, False), ("true", True), ("FALSE", False)])
def test_flag_accepts_what_excel_passes(raw, expected):
    assert flag("headers", raw, True) is expected


def test_flag_refuses_other_text():
    with pytest.raises(InputTypeError, match="headers .* must be TRUE or FALSE"):
        flag("headers", "yes", True)


def test_each_keeps_one_bad_cell_from_spoiling_a_column():
    result = each("current", ((1.0,), ("x",), (4.0,)), "A", lambda i: math.sqrt(i))
    assert result[0] == [1.0] and result[2] == [2.0]
    assert result[1][0] == ERROR_PREFIX + "current entry 2 ('x') is not a number in A"
    assert each("current", 9.0, "A", math.sqrt) == 3.0


def test_guard_turns_a_fault_of_ours_into_text():
    def broken():
        return 1 / 0

    assert guard(broken).startswith(ERROR_PREFIX + "internal fault in broken (ZeroDivisionError")


def test_spill_blanks_nan_and_names_infinity():
    assert spill(["a", "b"], [(np.float64(1.5), math.nan), (math.inf, 2)], headers=False) == [[1.5, ""], ["a has no finite value here (the formula gives inf)", 2]]

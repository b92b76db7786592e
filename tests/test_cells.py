"""The add-in's converters and error path, with raw values as Excel passes them."""

from __future__ import annotations

import math

import numpy as np
import pytest

from notchwise.addin.cells import ERROR_PREFIX, at_once, column, each, flag, guard, spill, table, width
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


# --- a long range read at once: every bad cell is still named by its row ------------------------

#: A 10,000-row history of plain numbers (time in s, current in A), as Excel hands a range over.
LONG = [[0.001 * k, 400.0 - 0.01 * k] for k in range(10_000)]


def _long_with(row: int, cell: int, value) -> list:
    """LONG with one cell (row counted from 1, as the message counts) replaced."""
    rows = [list(r) for r in LONG]
    rows[row - 1][cell] = value
    return rows


def _cell_by_cell(rows) -> np.ndarray:
    """The same range read the slow way (numpy scalars are not plain floats): a second, independent reading."""
    return table("history", [[np.float64(c) for c in r] for r in rows], ("time", "current"), ("s", "A"))


def test_a_long_range_of_plain_numbers_reads_as_cell_by_cell():
    fast = table("history", LONG, ("time", "current"), ("s", "A"), min_rows=2)
    np.testing.assert_array_equal(fast, np.array(LONG))
    np.testing.assert_array_equal(fast, _cell_by_cell(LONG))
    header_and_blanks = [["time [s]", "current [A]"], *LONG, [None, None], ["", None]]
    np.testing.assert_array_equal(table("history", header_and_blanks, ("time", "current"), ("s", "A")), fast)
    wider = [[*r, "note"] for r in LONG]  # a column beyond those asked for is not read
    np.testing.assert_array_equal(table("history", wider, ("time", "current"), ("s", "A")), fast)


@pytest.mark.parametrize(
    "row, cell, value, error, words",
    [
        (7000, 1, "x", InputTypeError, "history row 7000 current ('x') is not a number in A"),
        (7000, 1, "2", InputTypeError, "history row 7000 current ('2') is not a number in A"),  # numpy would read 2
        (5000, 0, None, InputTypeError, "history row 5000 time is empty; a number in s is needed"),
        (5000, 0, " ", InputTypeError, "history row 5000 time is empty; a number in s is needed"),
        (9000, 1, True, InputTypeError, "history row 9000 current (True) is not a number in A"),  # numpy would read 1
        (9000, 1, False, InputTypeError, "history row 9000 current (False) is not a number in A"),
        (9999, 1, math.nan, InputError, "history row 9999 current (nan) must be a finite number in A"),
        (2, 0, -math.inf, InputError, "history row 2 time (-inf) must be a finite number in s"),
        (8000, 1, 10**400, InputError, "history row 8000 current (1.000e+400) is too large for a number in A"),
    ],
)
def test_a_bad_cell_deep_in_a_long_range_is_named(row, cell, value, error, words):
    with pytest.raises(error) as raised:
        table("history", _long_with(row, cell, value), ("time", "current"), ("s", "A"))
    assert str(raised.value) == words


@pytest.mark.parametrize(
    "change, words",
    [
        # A row of three then a row of one hold as many cells as two rows of two: never read shifted.
        (lambda rows: (rows[6999].append(1.0), rows[7000].pop()),
         "history rows differ in length: row 7000 has 3 cells, row 1 has 2"),
        (lambda rows: rows.__setitem__(4999, None), "history rows differ in length: row 5000 has 1 cells, row 1 has 2"),
        (lambda rows: rows.__setitem__(4999, 3.0), "history rows differ in length: row 5000 has 1 cells, row 1 has 2"),
        (lambda rows: rows.__setitem__(4999, [[1.0, 2.0], 3.0]),
         "history row 5000 time ([1.0, 2.0]) is not a number in s"),
    ],
)
def test_a_long_range_with_a_row_out_of_shape_is_refused_naming_the_row(change, words):
    rows = [list(r) for r in LONG]
    change(rows)
    with pytest.raises((InputError, InputTypeError)) as raised:
        table("history", rows, ("time", "current"), ("s", "A"))
    assert str(raised.value) == words


def test_a_long_column_names_its_bad_entry_and_reads_plain_numbers_at_once():
    cells = [[0.5 * k + 1.0] for k in range(1000)]
    np.testing.assert_array_equal(column("current", cells, "A"), [c[0] for c in cells])
    for value, words in (("x", "current entry 700 ('x') is not a number in A"),
                         (True, "current entry 700 (True) is not a number in A"),
                         (None, "current entry 700 is empty; a number in A is needed"),
                         (math.inf, "current entry 700 (inf) must be a finite number in A")):
        bad = [list(c) for c in cells]
        bad[699][0] = value
        with pytest.raises((InputError, InputTypeError)) as raised:
            column("current", bad, "A")
        assert str(raised.value) == words


def test_at_once_puts_words_only_where_a_result_is_not_a_number():
    results = at_once("current", [[1.0], [2.0], [3.0], [4.0]], "A", lambda i: np.array([1.0, np.inf, -np.inf, 4.0]), "never")
    assert results[0] == [1.0] and results[3] == [4.0]
    assert results[1] == ["never"]
    assert results[2][0].startswith(ERROR_PREFIX) and "the result for current entry 3 has no finite value" in results[2][0]
    assert at_once("current", 2.0, "A", lambda i: i * 2.0) == 4.0


def test_width_is_the_first_rows():
    assert width([[1.0, 2.0, 3.0], [4.0, 5.0, 6.0]]) == 3 and width(None) == 0 and width(5.0) == 1 and width([]) == 0

"""Exceptions and argument checks shared by every core module.

Every check names the argument, its value with unit and the limit it broke, so
that the same text can be shown to a designer in a spreadsheet cell, e.g.
``i_switch (260 A) must be below i_peak (250 A)``.
"""

from __future__ import annotations

import math
from numbers import Real

import numpy as np

__all__ = [
    "InputError",
    "InputTypeError",
    "DesignError",
    "shown",
    "quantity",
    "as_float",
    "as_float_array",
    "as_time_series",
    "as_magnitudes",
    "require_positive",
    "require_non_negative",
    "require_below",
    "require_count",
    "require_kind",
    "choose",
]


class InputError(ValueError):
    """An argument lies outside the range in which the formula holds."""


class InputTypeError(TypeError):
    """An argument is of the wrong kind: text or blank where a number is needed."""


class DesignError(ValueError):
    """The arguments are valid one by one but no design meets them together."""


#: Longest quotation of a value in a message [characters]; a cell holds one short line.
SHOWN_CHARACTERS = 40


def shown(value) -> str:
    """A value as a message quotes it: one line, long text and huge numbers shortened.

    ``'xxxx…' (100000 characters)`` for a long text, ``1.000e+400`` for an
    integer too large for a float, ``repr`` otherwise.

    Parameters
    ----------
    value : object
        Any value a cell may hold: a number, a text, a blank. [-]

    Returns
    -------
    str
        The value as one short line. [-]

    Examples
    --------
    >>> shown(0.12345)
    '0.1235'
    >>> shown(10**400)
    '1.000e+400'
    """
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) >= 10**15:
        digits = str(abs(value))
        return f"{'-' if value < 0 else ''}{digits[0]}.{digits[1:4]}e+{len(digits) - 1}"
    if isinstance(value, Real) and not isinstance(value, bool):
        return f"{float(value):.4g}"
    text = repr(value)
    if len(text) <= SHOWN_CHARACTERS:
        return text
    size = f" ({len(value)} characters)" if isinstance(value, str) else ""
    return f"{text[: SHOWN_CHARACTERS - 1]}…{size}"


def quantity(value: float, unit: str = "") -> str:
    """Format a value with its unit for a message, e.g. ``260 A``.

    Parameters
    ----------
    value : float
        The value quoted. [as unit]
    unit : str, optional
        Unit written after the value, ``""`` for none. [-]

    Returns
    -------
    str
        The value and its unit. [-]

    Examples
    --------
    >>> quantity(260.0, "A")
    '260 A'
    """
    return f"{shown(value)} {unit}".rstrip()


def as_float(name: str, value, unit: str = "") -> float:
    """Return ``value`` as a finite float or raise naming ``name``.

    Booleans, text, blanks (None), NaN and infinities are refused: in a
    spreadsheet they are almost always a wrong cell reference.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : object
        The value to convert, as a cell gives it. [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]

    Returns
    -------
    float
        The value as a finite float. [as unit]

    Raises
    ------
    InputTypeError
        For a blank, a boolean, a text or any other non-number.
    InputError
        For NaN, an infinity or an integer too large for a float.

    Examples
    --------
    >>> as_float("i_a", 300, "A")
    300.0
    >>> as_float("i_a", "300", "A")
    Traceback (most recent call last):
    ...
    notchwise.formulas.errors.InputTypeError: i_a ('300') is not a number in A
    """
    if isinstance(value, float) and math.isfinite(value):  # the common case first (numpy's float64 is a float)
        return float(value)
    if value is None or (isinstance(value, str) and not value.strip()):
        raise InputTypeError(f"{name} is empty; a number{_in(unit)} is needed")
    if isinstance(value, bool) or not isinstance(value, (Real, np.number)):
        raise InputTypeError(f"{name} ({shown(value)}) is not a number{_in(unit)}")
    try:
        number = float(value)
    except OverflowError:  # an int beyond any float, e.g. 10**400
        raise InputError(f"{name} ({shown(value)}) is too large for a number{_in(unit)}") from None
    if not math.isfinite(number):
        raise InputError(f"{name} ({number}) must be a finite number{_in(unit)}")
    return number


def as_float_array(name: str, values, unit: str = "", min_length: int = 1) -> np.ndarray:
    """Return a 1-D float array of finite numbers or raise naming ``name``.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    values : object
        A number, a list or an array of numbers (any shape; flattened). [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]
    min_length : int, optional
        Fewest values accepted. [-]

    Returns
    -------
    numpy.ndarray
        The values as a flat float array. [as unit]
    """
    if values is None:
        raise InputTypeError(f"{name} is empty; numbers{_in(unit)} are needed")
    if isinstance(values, np.ndarray) and values.dtype.kind in "fiu":
        # Already numbers: check all at once (a 10,000-sample history), same messages as below.
        numbers = np.ravel(values).astype(float)
        bad = ~np.isfinite(numbers)
        if np.any(bad):
            k = int(np.argmax(bad))
            as_float(f"{name} entry {k + 1}", numbers[k], unit)
    else:
        try:
            flat = np.ravel(np.asarray(values, dtype=object)) if not np.isscalar(values) else [values]
        except ValueError:  # rows of unequal length, nested unevenly
            raise InputError(f"{name} ({shown(values)}) has rows of unequal length; a list of numbers is needed") from None
        numbers = np.array([as_float(f"{name} entry {k + 1}", v, unit) for k, v in enumerate(flat)])
    if numbers.size < min_length:
        raise InputError(f"{name} has {numbers.size} values; at least {min_length} are needed")
    return numbers


def as_magnitudes(name: str, values, unit: str = "") -> np.ndarray:
    """Return ``values`` (a number or an array, shape kept) as floats at or above zero.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    values : object
        A number or an array of numbers, none negative. [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]

    Returns
    -------
    numpy.ndarray
        The values as floats, in the shape given. [as unit]
    """
    numbers = as_float_array(name, values, unit).reshape(np.shape(values))
    if np.any(numbers < 0.0):
        raise InputError(f"{name} ({quantity(float(np.min(numbers)), unit)}) must not be negative: enter its magnitude")
    return numbers


def as_time_series(name: str, t_s, values, unit: str = "", value_name: str = "value") -> tuple[np.ndarray, np.ndarray]:
    """Return sample times [s] and values as float arrays of equal length, times not falling.

    At least two samples are needed (one interval); equal times are allowed,
    so that a step change can be written as two rows at the same instant.

    Parameters
    ----------
    name : str
        Name of the history used in the messages. [-]
    t_s : object
        Sample times, not falling. [s]
    values : object
        Sampled values, one per time. [as unit]
    unit : str, optional
        Unit of the values shown in the messages, ``""`` for none. [-]
    value_name : str, optional
        What the values are, used in the messages (e.g. ``"current"``). [-]

    Returns
    -------
    tuple of numpy.ndarray
        Sample times [s] and values [as unit], of equal length. [-]
    """
    times = as_float_array(f"{name} time", t_s, "s", min_length=2)
    numbers = as_float_array(f"{name} {value_name}", values, unit)
    if times.size != numbers.size:
        raise InputError(f"{name} has {times.size} times but {numbers.size} {value_name} values")
    falls = np.diff(times) < 0.0
    if np.any(falls):
        k = int(np.argmax(falls))
        raise InputError(
            f"{name} times must not fall: row {k + 2} ({quantity(times[k + 1], 's')}) "
            f"is before row {k + 1} ({quantity(times[k], 's')})"
        )
    return times, numbers


def require_positive(name: str, value: float, unit: str = "") -> float:
    """Return ``value`` if it is a finite number above zero.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : float
        The value checked. [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]

    Returns
    -------
    float
        The value as a float. [as unit]

    Examples
    --------
    >>> require_positive("r_ohm", 0.0, "ohm")
    Traceback (most recent call last):
    ...
    notchwise.formulas.errors.InputError: r_ohm (0 ohm) must be above zero
    """
    number = as_float(name, value, unit)
    if number <= 0.0:
        raise InputError(f"{name} ({quantity(number, unit)}) must be above zero")
    return number


def require_non_negative(name: str, value: float, unit: str = "") -> float:
    """Return ``value`` if it is a finite number at or above zero.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : float
        The value checked. [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]

    Returns
    -------
    float
        The value as a float. [as unit]
    """
    number = as_float(name, value, unit)
    if number < 0.0:
        raise InputError(f"{name} ({quantity(number, unit)}) must not be negative")
    return number


def require_below(name: str, value: float, limit_name: str, limit: float, unit: str = "") -> float:
    """Return ``value`` if it is strictly below ``limit``.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : float
        The value checked. [as unit]
    limit_name : str
        Name of the limit used in the message. [-]
    limit : float
        The value must lie below this. [as unit]
    unit : str, optional
        Unit shown after the value in the message, ``""`` for none. [-]

    Returns
    -------
    float
        The value, unchanged. [as unit]

    Examples
    --------
    >>> require_below("i_switch", 400.0, "i_peak", 300.0, "A")
    Traceback (most recent call last):
    ...
    notchwise.formulas.errors.InputError: i_switch (400 A) must be below i_peak (300 A)
    """
    if not value < limit:
        raise InputError(
            f"{name} ({quantity(value, unit)}) must be below {limit_name} ({quantity(limit, unit)})"
        )
    return value


def require_count(name: str, value, low: int, high: int) -> int:
    """Return ``value`` as an int if it is a whole number in ``[low, high]``.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : object
        The count checked (a float from a cell is accepted if whole). [-]
    low : int
        Smallest count accepted. [-]
    high : int
        Largest count accepted. [-]

    Returns
    -------
    int
        The count. [-]

    Examples
    --------
    >>> require_count("notches", 4.0, 1, 20)
    4
    """
    number = as_float(name, value)
    if number != int(number):
        raise InputError(f"{name} ({number:g}) must be a whole number")
    if not low <= number <= high:
        raise InputError(f"{name} ({number:g}) must be from {low} to {high}")
    return int(number)


def require_kind(name: str, value, kind: type, what: str):
    """Return ``value`` if it is a ``kind``, else refuse it naming ``name`` and ``what`` is wanted.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : object
        The object checked. [-]
    kind : type
        The class (or tuple of classes) the value must be an instance of. [-]
    what : str
        What is wanted, in plain words, for the message (e.g. ``"a DC machine"``). [-]

    Returns
    -------
    object
        The value, unchanged. [-]
    """
    if not isinstance(value, kind):
        raise InputTypeError(f"{name} ({shown(value)}) is not {what}")
    return value


def choose(name: str, value, options) -> str:
    """Return the option that ``value`` names, case-insensitively, or list the valid ones.

    Parameters
    ----------
    name : str
        Argument name used in the message. [-]
    value : str
        The name given; case and repeated blanks do not matter. [-]
    options : iterable of str
        The valid names, as they are returned. [-]

    Returns
    -------
    str
        The option named, spelt as in ``options``. [-]

    Examples
    --------
    >>> choose("curve", "iec  vi", ("IEC SI", "IEC VI"))
    'IEC VI'
    """
    if not isinstance(value, str) or not value.strip():
        raise InputTypeError(f"{name} ({shown(value)}) must be one of: {', '.join(options)}")
    wanted = " ".join(value.split()).casefold()
    for option in options:
        if option.casefold() == wanted:
            return option
    raise InputError(f"{name} ({shown(value)}) must be one of: {', '.join(options)}")


def _in(unit: str) -> str:
    return f" in {unit}" if unit else ""

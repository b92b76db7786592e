"""Current-transformer ratings from the standard series of IEC 61869-2.

A current transformer works on alternating current only. DC motor circuits are
measured with DC current sensing: a shunt with a millivolt transducer, or a
Hall-effect (or fluxgate) transducer. These functions serve the AC supply side
of a drive (the transformer and rectifier feeding the DC bus, an AC auxiliary
supply), never the DC armature circuit itself.

References
----------
.. [1] IEC 61869-2:2012, *Instrument transformers - Part 2: Additional
   requirements for current transformers*, 5.201 (standard values of rated
   primary current) and 5.202 (standard values of rated secondary current).
"""

from __future__ import annotations

import numpy as np

from .errors import InputError, as_magnitudes, quantity, require_positive

__all__ = ["PRIMARY_SERIES_A", "SECONDARY_A", "MIN_PRIMARY_A", "MAX_PRIMARY_A", "ct_primary_a", "ct_ratio"]

#: Rated primary currents of one decade; with their decimal multiples and fractions, 5.201 of [1]. [A]
PRIMARY_SERIES_A = (10.0, 12.5, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 60.0, 75.0)

#: Rated secondary currents, 5.202 of [1]. [A]
SECONDARY_A = (1.0, 5.0)

#: Range of currents accepted: wider than any CT made, and far inside float range (ours, no source). [A]
MIN_PRIMARY_A, MAX_PRIMARY_A = 1e-3, 1e7

_MANTISSAS = np.array(PRIMARY_SERIES_A) / 10.0
_SAME = 1e-9  # relative: a current equal to a series value up to rounding takes that value


def ct_primary_a(i_a):
    """Smallest standard rated primary current at or above a current.

    Parameters
    ----------
    i_a : float or array_like
        Current the CT must carry (e.g. the full-load current), from
        :data:`MIN_PRIMARY_A` to :data:`MAX_PRIMARY_A`. [A]

    Returns
    -------
    float or numpy.ndarray
        Rated primary current from the series 10, 12.5, 15, 20, 25, 30, 40,
        50, 60, 75 A and their decimal multiples and fractions (5.201 of
        [1]_). [A]

    References
    ----------
    .. [1] IEC 61869-2:2012, 5.201.

    Examples
    --------
    >>> float(ct_primary_a(130.0))
    150.0
    >>> ct_primary_a([8.0, 1100.0]).tolist()
    [10.0, 1250.0]
    """
    currents = as_magnitudes("current", i_a, "A")
    if np.any(currents < MIN_PRIMARY_A):
        raise InputError(f"current ({quantity(float(np.min(currents)), 'A')}) must be at least {quantity(MIN_PRIMARY_A, 'A')}")
    if np.any(currents > MAX_PRIMARY_A):
        raise InputError(f"current ({quantity(float(np.max(currents)), 'A')}) must not exceed {quantity(MAX_PRIMARY_A, 'A')}")
    decade = np.floor(np.log10(currents))
    scale = np.power(10.0, np.abs(decade))
    mantissa = np.where(decade >= 0.0, currents / scale, currents * scale)
    # Rounding in log10 may put a current a hair into the decade below: step up past 10.
    below = mantissa >= 10.0 * (1.0 - _SAME)
    decade, scale = np.where(below, decade + 1.0, decade), np.where(below, np.power(10.0, np.abs(decade + 1.0)), scale)
    mantissa = np.where(below, mantissa / 10.0, mantissa)
    index = np.searchsorted(_MANTISSAS * (1.0 + _SAME), mantissa, side="left")  # first series value >= current
    chosen = np.append(_MANTISSAS, 10.0)[index]
    return np.where(decade >= 0.0, chosen * scale, chosen / scale)[()]  # 5.201 of [1]


def ct_ratio(i_a, secondary_a: float = 1.0):
    """Turns ratio of the CT for a current: standard primary over a 1 A or 5 A secondary. [-]

    Parameters
    ----------
    i_a : float or array_like
        Current the CT must carry. [A]
    secondary_a : float, optional
        Rated secondary current, 1 A or 5 A (5.202 of [1]). [A]

    Returns
    -------
    float or numpy.ndarray
        Rated primary current over rated secondary current. [-]

    References
    ----------
    .. [1] IEC 61869-2:2012, 5.201 and 5.202.

    Examples
    --------
    >>> float(ct_ratio(130.0, 5.0))
    30.0
    """
    secondary = require_positive("secondary", secondary_a, "A")
    if secondary not in SECONDARY_A:
        raise InputError(f"secondary ({quantity(secondary, 'A')}) must be 1 A or 5 A (IEC 61869-2, 5.202)")
    return ct_primary_a(i_a) / secondary

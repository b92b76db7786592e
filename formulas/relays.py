r"""Overcurrent relay elements: inverse-time curves, definite-time and instantaneous.

The inverse-time curves of IEC 60255-151 [1]_ (and the long-time inverse of
IEC 60255-3 [2]_) and of IEEE C37.112 [3]_ share one form in the multiple of
pickup :math:`M = I/I_s`:

.. math::

    t(M) = m\left(\frac{k}{M^{\alpha} - 1} + c\right), \qquad M > 1

with :math:`m` the time multiplier (TMS for the IEC curves, time dial TD for
the IEEE curves), :math:`c = 0` for the IEC curves and :math:`c = B` for the
IEEE curves. At or below pickup (:math:`M \le 1`) the element does not operate.

The IEEE curves also define the reset of an electromechanical disc, which
numerical relays may emulate [3]_:

.. math:: t_r(M) = m\,\frac{t_r}{1 - M^2}, \qquad M < 1

For a current that varies, a numerical element integrates its operate
progress :math:`\int dt / t(I)` and trips when it reaches 1; this is the
integral form of [3]_ (and the usual behaviour of numerical elements under
[1]_). Below pickup the progress falls back: at the reset rate
:math:`dt/t_r(M)` for the IEEE curves, at once for the IEC curves (which
define no inverse reset; relays offer instantaneous or definite-time reset).

The dependent-time characteristic is defined only up to a stated multiple of
the setting [1]_ (sub-clause on the effective range of the characteristic,
from memory); beyond it a relay operates in definite time, the time the curve
gives at that multiple. Every function here holds the curve flat beyond
``flat_from`` times pickup (default :data:`FLAT_FROM_MULTIPLE`, 20; make it
the relay's own figure, often 20 to 30):

.. math:: t(M) = t(\min(M, M_{flat}))

so no current operates an element faster than the relay can.

Currents are magnitudes in A and must not be negative.

References
----------
.. [1] IEC 60255-151:2009, *Measuring relays and protection equipment -
   Part 151: Functional requirements for over/under current protection*,
   Table 1 (inverse-time characteristics, types A to F).
.. [2] IEC 60255-3:1989, *Electrical relays - Part 3: Single input energizing
   quantity measuring relays with dependent or independent time*, long-time
   inverse characteristic (k = 120, alpha = 1) (from memory; clause not verified).
.. [3] IEEE Std C37.112-1996, *IEEE Standard Inverse-Time Characteristic
   Equations for Overcurrent Relays*, Table 1 (constants), operate, reset and
   integral equations.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import (
    DesignError,
    InputError,
    InputTypeError,
    as_float,
    as_magnitudes,
    as_time_series,
    choose,
    quantity,
    require_non_negative,
    require_positive,
    shown,
)

__all__ = [
    "Curve",
    "CURVES",
    "CURVE_NAMES",
    "curve_named",
    "FLAT_FROM_MULTIPLE",
    "checked_flat_from",
    "current_history",
    "operate_time_s",
    "multiplier_for_time",
    "current_for_time_a",
    "reset_time_s",
    "definite_time_s",
    "Progress",
    "operate_progress",
    "definite_progress",
    "instantaneous_progress",
]


@dataclass(frozen=True)
class Curve:
    """Constants of one inverse-time characteristic, :math:`t = m(k/(M^\\alpha - 1) + c)`.

    Attributes
    ----------
    name : str
        Name accepted in a cell, e.g. ``IEC SI``.
    k : float
        Numerator constant (k of IEC, A of IEEE). [s]
    alpha : float
        Exponent of the multiple of pickup (alpha of IEC, p of IEEE). [-]
    c : float
        Added constant (0 for IEC, B of IEEE). [s]
    t_reset : float or None
        Reset constant tr of IEEE C37.112; None where the standard gives none. [s]
    source : str
        Standard, clause and curve type the constants come from.
    """

    name: str
    k: float
    alpha: float
    c: float
    t_reset: float | None
    source: str


_T151 = "IEC 60255-151:2009, Table 1"
_C112 = "IEEE C37.112-1996, Table 1"

#: The one table of curve constants: name, k or A [s], alpha or p [-], c or B [s], tr [s], source.
CURVES = {
    curve.name: curve
    for curve in (
        Curve("IEC SI", 0.14, 0.02, 0.0, None, f"{_T151}, type A standard inverse"),
        Curve("IEC VI", 13.5, 1.0, 0.0, None, f"{_T151}, type B very inverse"),
        Curve("IEC EI", 80.0, 2.0, 0.0, None, f"{_T151}, type C extremely inverse"),
        Curve("IEC LTI", 120.0, 1.0, 0.0, None, "IEC 60255-3:1989, long-time inverse (from memory)"),
        Curve("IEEE MI", 0.0515, 0.02, 0.1140, 4.85, f"{_C112}, moderately inverse ({_T151}, type D)"),
        Curve("IEEE VI", 19.61, 2.0, 0.491, 21.6, f"{_C112}, very inverse ({_T151}, type E)"),
        Curve("IEEE EI", 28.2, 2.0, 0.1217, 29.1, f"{_C112}, extremely inverse ({_T151}, type F)"),
    )
}

#: IEC 60255-151 letters for the IEC curves (Table 1 of [1]).
_ALIASES = {"IEC A": "IEC SI", "IEC B": "IEC VI", "IEC C": "IEC EI"}

#: Every name a cell may use, case-insensitive.
CURVE_NAMES = (*CURVES, *_ALIASES)


def curve_named(name: str | Curve, argument: str = "curve") -> Curve:
    """The curve ``name`` names (``IEC SI``, ``IEC A``, ``IEEE VI``, ...), or a message naming ``argument`` and listing them.

    A :class:`Curve` is returned as it is, so every function taking a curve checks it with this one call.
    """
    if isinstance(name, Curve):
        return name
    chosen = choose(argument, name, CURVE_NAMES)
    return CURVES[_ALIASES.get(chosen, chosen)]


def _currents(i_a) -> np.ndarray:
    return as_magnitudes("current", i_a, "A")


def current_history(t_s, i_a) -> tuple[np.ndarray, np.ndarray]:
    """Sample times [s], not falling, and current magnitudes [A] of a history, checked."""
    t, currents = as_time_series("history", t_s, i_a, "A", "current")
    return t, as_magnitudes("history current", currents, "A")


#: Multiple of pickup beyond which the inverse-time curve is held flat (definite time): IEC 60255-151
#: defines the dependent-time characteristic up to a stated multiple of setting, 20 unless the relay
#: states more (from memory). [-]
FLAT_FROM_MULTIPLE = 20.0
#: Largest flat_from accepted: beyond it no relay's measuring range reaches (common practice, no source). [-]
FLAT_FROM_LIMIT = 1000.0


def _settings(pickup_a, multiplier):
    return require_positive("pickup", pickup_a, "A"), require_positive("multiplier", multiplier)


def checked_flat_from(flat_from) -> float:
    """``flat_from`` checked: a multiple of pickup above 1 and at most :data:`FLAT_FROM_LIMIT`. [-]"""
    value = as_float("flat_from", flat_from)
    if not 1.0 < value <= FLAT_FROM_LIMIT:
        raise InputError(f"flat_from ({shown(value)}) must be above 1 and at most {FLAT_FROM_LIMIT:g} times pickup")
    return value


def _shape(m, curve: Curve, flat_from: float):
    """:math:`k/(M^\\alpha - 1) + c` where M > 1, M held at ``flat_from`` beyond it, inf at or below 1. [s]"""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        excess = np.power(np.minimum(m, flat_from), curve.alpha) - 1.0  # flat beyond flat_from, see module notes
        return np.where(excess > 0.0, curve.k / np.where(excess > 0.0, excess, 1.0) + curve.c, np.inf)  # Table 1 of [1], [3]


def operate_time_s(curve: Curve, i_a, pickup_a: float, multiplier: float, flat_from: float = FLAT_FROM_MULTIPLE):
    r"""Operating time of an inverse-time element at a constant current.

    Parameters
    ----------
    curve : Curve
        The characteristic (:func:`curve_named`).
    i_a : float or array_like
        Current magnitude. [A]
    pickup_a : float
        Pickup (setting) current :math:`I_s`. [A]
    multiplier : float
        Time multiplier: TMS (IEC) or time dial TD (IEEE). [-]
    flat_from : float, optional
        Multiple of pickup beyond which the curve is held flat (definite
        time). [-]

    Returns
    -------
    float or numpy.ndarray
        Operating time; ``inf`` at or below pickup, where the element does
        not operate. [s]

    Notes
    -----
    .. math:: t = m\left(\frac{k}{\min(I/I_s, M_{flat})^{\alpha} - 1} + c\right)

    References
    ----------
    .. [1] IEC 60255-151:2009, Table 1; IEEE C37.112-1996, Table 1.
    """
    curve = curve_named(curve)
    currents = _currents(i_a)
    pickup, mult = _settings(pickup_a, multiplier)
    flat = checked_flat_from(flat_from)
    with np.errstate(over="ignore"):
        m = currents / pickup
        times = mult * _shape(m, curve, flat)  # Table 1 of [1]
    if np.any(np.isinf(times) & (m > 1.0)):
        raise InputError(f"multiplier ({mult:.4g}) is so large that the operating time overflows")
    return times[()]


def _operating_multiple(i_a: float, pickup_a: float) -> float:
    current = float(_currents(i_a))
    pickup = require_positive("pickup", pickup_a, "A")
    if current <= pickup:
        raise InputError(
            f"current ({quantity(current, 'A')}) is at or below pickup ({quantity(pickup, 'A')}): "
            "the element does not operate"
        )
    return current / pickup


def multiplier_for_time(curve: Curve, i_a: float, pickup_a: float, t_s: float, flat_from: float = FLAT_FROM_MULTIPLE) -> float:
    r"""Time multiplier (TMS or time dial) at which the element operates in ``t_s`` at ``i_a``.

    Parameters
    ----------
    curve : Curve
        The characteristic.
    i_a : float
        Current, above pickup. [A]
    pickup_a : float
        Pickup current. [A]
    t_s : float
        Wanted operating time. [s]
    flat_from : float, optional
        Multiple of pickup beyond which the curve is held flat (definite
        time). [-]

    Returns
    -------
    float
        :math:`m = t / (k/(\min(M, M_{flat})^\alpha - 1) + c)`. [-]
    """
    curve = curve_named(curve)
    m = _operating_multiple(i_a, pickup_a)
    t = require_positive("target_time", t_s, "s")
    at_one_s = float(_shape(m, curve, checked_flat_from(flat_from)))
    if not at_one_s > 0.0:
        raise InputError(f"current is {m:.4g} times pickup, beyond the reach of {curve.name}: its time there is zero")
    return t / at_one_s  # Table 1 of [1], solved for m


def current_for_time_a(curve: Curve, t_s: float, pickup_a: float, multiplier: float, flat_from: float = FLAT_FROM_MULTIPLE) -> float:
    r"""Current at which a setting operates in a given time.

    Parameters
    ----------
    curve : Curve
        The characteristic.
    t_s : float
        Operating time. [s]
    pickup_a : float
        Pickup current. [A]
    multiplier : float
        TMS or time dial. [-]
    flat_from : float, optional
        Multiple of pickup beyond which the curve is held flat (definite
        time). [-]

    Returns
    -------
    float
        :math:`I = I_s\,(k/(t/m - c) + 1)^{1/\alpha}`. [A]

    Raises
    ------
    DesignError
        Where ``t_s`` is shorter than the time of the flat part beyond
        ``flat_from`` times pickup: no current operates that fast. At
        exactly that time every current from ``flat_from`` times pickup up
        operates; the least of them is returned.
    """
    curve = curve_named(curve)
    t = require_positive("target_time", t_s, "s")
    pickup, mult = _settings(pickup_a, multiplier)
    flat = checked_flat_from(flat_from)
    floor_s = float(mult * _shape(flat, curve, flat))
    if t < floor_s:
        raise DesignError(
            f"target_time ({quantity(t, 's')}) is shorter than {quantity(floor_s, 's')}, the time of {curve.name} "
            f"at this multiplier beyond {flat:g} times pickup, where the curve is flat: no current operates that fast"
        )
    with np.errstate(over="ignore", divide="ignore", under="ignore"):
        at_one_s = np.float64(t) / mult - curve.c
        current = pickup * np.power(curve.k / at_one_s + 1.0, 1.0 / curve.alpha)  # Table 1 of [1], solved for I
    if not np.isfinite(current):
        raise DesignError(f"no finite current operates {curve.name} in target_time ({quantity(t, 's')}) at this multiplier")
    return float(current)


def reset_time_s(curve: Curve, i_a, pickup_a: float, multiplier: float):
    r"""Reset time of an IEEE C37.112 element from full operate progress.

    Parameters
    ----------
    curve : Curve
        An IEEE curve (the IEC curves define no inverse reset).
    i_a : float or array_like
        Current magnitude below pickup. [A]
    pickup_a : float
        Pickup current. [A]
    multiplier : float
        Time dial. [-]

    Returns
    -------
    float or numpy.ndarray
        :math:`t_r = m\,t_r/(1 - M^2)`; ``inf`` at or above pickup, where the
        element does not reset. [s]

    References
    ----------
    .. [1] IEEE C37.112-1996, reset equation and Table 1 (constant tr).
    """
    curve = curve_named(curve)
    if curve.t_reset is None:
        raise InputError(
            f"curve ({curve.name!r}) has no inverse reset characteristic: IEC curves reset at once or "
            "after a definite time; use an IEEE curve"
        )
    currents = _currents(i_a)
    pickup, mult = _settings(pickup_a, multiplier)
    with np.errstate(divide="ignore", over="ignore"):
        shortfall = 1.0 - (currents / pickup) ** 2
        return np.where(shortfall > 0.0, mult * curve.t_reset / np.where(shortfall > 0.0, shortfall, 1.0), np.inf)[()]


def definite_time_s(i_a, pickup_a: float, delay_s: float):
    """Operating time of a definite-time element: ``delay_s`` above pickup, ``inf`` at or below. [s]

    A delay of 0 s is an instantaneous element (its own operating time aside).
    """
    currents = _currents(i_a)
    pickup = require_positive("pickup", pickup_a, "A")
    delay = require_non_negative("delay", delay_s, "s")
    return np.where(currents > pickup, delay, np.inf)[()]


@dataclass(frozen=True)
class Progress:
    """Progress to trip of an element along a current history (relay or thermal).

    Attributes
    ----------
    t_s : numpy.ndarray
        Sample times. [s]
    fraction : numpy.ndarray
        Fraction of trip at each sample (operate progress, thermal level,
        or current over pickup for an instantaneous element); 1 trips. [-]
    trip_s : float or None
        Time the progress first reaches 1; None where it never does. [s]
    """

    t_s: np.ndarray
    fraction: np.ndarray
    trip_s: float | None

    @property
    def peak(self) -> float:
        """Largest fraction of trip reached. [-]"""
        return float(np.max(self.fraction))

    @property
    def peak_s(self) -> float:
        """Time of the largest fraction. [s]"""
        return float(self.t_s[int(np.argmax(self.fraction))])


def _accumulate(t: np.ndarray, steps: np.ndarray, falls: np.ndarray, instant_reset: np.ndarray) -> Progress:
    """Progress from per-interval rises, falls and instant resets (interval k holds sample k's current)."""
    increments = steps - falls
    if np.any(instant_reset):
        # Progress restarts from zero after each interval with an instant reset.
        total = np.concatenate(([0.0], np.cumsum(np.where(instant_reset, 0.0, increments))))
        last_reset = np.maximum.accumulate(np.where(np.concatenate(([True], instant_reset)), np.arange(t.size), 0))
        progress = total - total[last_reset]
    else:
        progress = np.concatenate(([0.0], np.cumsum(increments)))
    # Progress cannot fall below zero: reflect the running sum at 0.
    progress = progress - np.minimum(np.minimum.accumulate(progress), 0.0)
    crossed = np.nonzero(progress >= 1.0)[0]
    trip = None
    if crossed.size:
        k = int(crossed[0])
        rise = progress[k] - progress[k - 1]
        trip = float(t[k - 1] + (1.0 - progress[k - 1]) / rise * (t[k] - t[k - 1]))  # linear within the interval
    return Progress(t, progress, trip)


def operate_progress(
    curve: Curve, t_s, i_a, pickup_a: float, multiplier: float, inverse_reset: bool | None = None,
    flat_from: float = FLAT_FROM_MULTIPLE,
):
    r"""Operate progress of an inverse-time element along a current history.

    Each sample's current is held until the next sample, as a numerical relay
    holds its measurement between calculations.

    Parameters
    ----------
    curve : Curve
        The characteristic.
    t_s : array_like
        Sample times, not falling. [s]
    i_a : array_like
        Current magnitude at each sample. [A]
    pickup_a : float
        Pickup current. [A]
    multiplier : float
        TMS or time dial. [-]
    inverse_reset : bool, optional
        Below pickup, fall back at the IEEE reset rate (True) or reset at once
        (False); default True for the IEEE curves, False for the IEC curves. [-]
    flat_from : float, optional
        Multiple of pickup beyond which the curve is held flat (definite
        time). [-]

    Returns
    -------
    Progress

    Notes
    -----
    .. math:: p(t) = \int_0^t \frac{d\tau}{t(I(\tau))} - \int \frac{d\tau}{t_r(I(\tau))}, \qquad p \ge 0

    References
    ----------
    .. [1] IEEE C37.112-1996, integral equation of the operate and reset characteristics.
    """
    curve = curve_named(curve)
    if inverse_reset is not None and not isinstance(inverse_reset, (bool, np.bool_)):
        raise InputTypeError(f"inverse_reset ({shown(inverse_reset)}) must be True, False or None")
    t, currents = current_history(t_s, i_a)
    pickup, mult = _settings(pickup_a, multiplier)
    flat = checked_flat_from(flat_from)
    inverse = curve.t_reset is not None if inverse_reset is None else bool(inverse_reset)
    if inverse and curve.t_reset is None:
        raise InputError(f"curve ({curve.name!r}) has no inverse reset characteristic; reset it at once")
    dt = np.diff(t)
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        m = currents[:-1] / pickup
        rises = dt / (mult * _shape(m, curve, flat))  # integral equation of [1]: dt / t(I); 0 where t is inf
    if not np.all(np.isfinite(rises)):
        raise InputError(
            f"history current ({quantity(float(np.max(currents)), 'A')}) is so far above pickup "
            f"({quantity(pickup, 'A')}) that {curve.name} operates in no time: check pickup"
        )
    below = m <= 1.0
    if inverse:
        with np.errstate(divide="ignore"):
            falls = np.where(below, dt * (1.0 - m**2) / (mult * curve.t_reset), 0.0)  # reset equation of [1]
        return _accumulate(t, rises, falls, np.zeros(dt.size, dtype=bool))
    return _accumulate(t, rises, np.zeros(dt.size), below)


def definite_progress(t_s, i_a, pickup_a: float, delay_s: float) -> Progress:
    """Operate progress of a definite-time element (delay above zero), resetting at once below pickup."""
    t, currents = current_history(t_s, i_a)
    pickup = require_positive("pickup", pickup_a, "A")
    delay = require_positive("delay", delay_s, "s")
    above = currents[:-1] > pickup
    return _accumulate(t, np.where(above, np.diff(t) / delay, 0.0), np.zeros(t.size - 1), ~above)


def instantaneous_progress(t_s, i_a, pickup_a: float) -> Progress:
    """Current over pickup at each sample of an instantaneous element; it trips at the first sample above 1."""
    t, currents = current_history(t_s, i_a)
    ratio = currents / require_positive("pickup", pickup_a, "A")
    over = np.nonzero(ratio > 1.0)[0]
    return Progress(t, ratio, float(t[over[0]]) if over.size else None)

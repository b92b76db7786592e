r"""Thermal overload element of IEC 60255-149: a first-order model of the machine's heating.

The element keeps a thermal level :math:`\theta` (1 = trip) that follows the
square of the current with the heating time constant :math:`\tau` [1]_:

.. math::

    \tau\frac{d\theta}{dt} = \left(\frac{I}{k I_B}\right)^2 - \theta

with :math:`I_B` the basic current (usually the motor's full-load current)
and :math:`k` the factor giving the current :math:`k I_B` the element carries
for ever without tripping. At a constant current from a steady prior load
:math:`I_P` the level is
:math:`\theta(t) = \theta_\infty + (\theta_0 - \theta_\infty)e^{-t/\tau}` with
:math:`\theta_\infty = (I/kI_B)^2`, :math:`\theta_0 = (I_P/kI_B)^2`, and the
time to reach :math:`\theta = 1` is the operate equation of [1]_:

.. math:: t = \tau \ln\frac{I^2 - I_P^2}{I^2 - (k I_B)^2}

Cold start: :math:`I_P = 0`. Hot start: :math:`I_P` is the load carried long
enough before for the level to settle. Along a current history held between
samples the level is advanced with the exact solution over each interval.

A DC motor's armature heats as :math:`I^2 R` just as an AC machine does, so
the model applies; its :math:`\tau` must come from the motor's maker.

References
----------
.. [1] IEC 60255-149:2013, *Measuring relays and protection equipment -
   Part 149: Functional requirements for thermal electrical relays*, clause 5
   (thermal model and operate-time equation, cold and hot curves) (clause
   number from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import InputError, as_magnitudes, quantity, require_kind, require_non_negative, require_positive
from .relays import Progress, current_history

__all__ = [
    "MAX_OVERLOAD", "ThermalElement", "thermal_element", "checked_element", "thermal_trip_time_s", "thermal_state",
]

#: Largest current over k i_base a history may hold: far past any motor, and the level stays finite (ours). [-]
MAX_OVERLOAD = 1e6

#: Intervals of one closed-form block are kept within this many time constants so exp() stays finite. [-]
_BLOCK_TAUS = 300.0


@dataclass(frozen=True)
class ThermalElement:
    """Settings of a thermal overload element.

    Attributes
    ----------
    i_base_a : float
        Basic current :math:`I_B`. [A]
    k_factor : float
        :math:`k`: :math:`k I_B` is carried for ever without trip. [-]
    tau_s : float
        Heating time constant. [s]
    """

    i_base_a: float
    k_factor: float
    tau_s: float

    @property
    def i_trip_a(self) -> float:
        """The least current that trips in the end, :math:`k I_B`. [A]"""
        return self.k_factor * self.i_base_a

    def level(self, i_a):
        """Steady thermal level a current settles to, :math:`(I / k I_B)^2`. [-]"""
        return (np.asarray(i_a, dtype=float) / self.i_trip_a) ** 2


def thermal_element(i_base_a: float, k_factor: float, tau_s: float) -> ThermalElement:
    r"""Validate the settings of a thermal element (each above zero).

    Parameters
    ----------
    i_base_a : float
        Basic current :math:`I_B`, usually the motor's full-load current. [A]
    k_factor : float
        :math:`k`: the element carries :math:`k I_B` for ever without tripping. [-]
    tau_s : float
        Heating time constant :math:`\tau`. [s]

    Returns
    -------
    ThermalElement
        The checked settings. [-]

    Examples
    --------
    >>> thermal_element(100.0, 1.05, 600.0).i_trip_a
    105.0
    """
    return ThermalElement(
        require_positive("i_base", i_base_a, "A"), require_positive("k_factor", k_factor), require_positive("tau", tau_s, "s")
    )


def checked_element(element, name: str = "element") -> ThermalElement:
    """``element`` if it is a :class:`ThermalElement` (:func:`thermal_element`), else a message naming ``name``.

    Parameters
    ----------
    element : object
        The object checked. [-]
    name : str, optional
        Argument name used in the message. [-]

    Returns
    -------
    ThermalElement
        The element, unchanged. [-]
    """
    return require_kind(name, element, ThermalElement, "a thermal element (made by thermal_element)")


def _prior_level(element: ThermalElement, i_prior_a: float) -> float:
    prior = require_non_negative("i_prior", i_prior_a, "A")
    if prior >= element.i_trip_a:
        raise InputError(
            f"i_prior ({quantity(prior, 'A')}) must be below k_factor x i_base ({quantity(element.i_trip_a, 'A')}): "
            "at that load the element has already tripped"
        )
    return float(element.level(prior))


def thermal_trip_time_s(element: ThermalElement, i_a, i_prior_a: float = 0.0):
    r"""Operating time of a thermal element at a constant current, cold or hot.

    Parameters
    ----------
    element : ThermalElement
        The settings (:func:`thermal_element`). [-]
    i_a : float or array_like
        Current magnitude, held constant. [A]
    i_prior_a : float, optional
        Steady load before the overload, below :math:`k I_B`; 0 for a cold
        start. [A]

    Returns
    -------
    float or numpy.ndarray
        Time to trip; ``inf`` at or below :math:`k I_B`, where the element
        never trips. [s]

    Notes
    -----
    .. math:: t = \tau \ln\frac{I^2 - I_P^2}{I^2 - (k I_B)^2}

    References
    ----------
    .. [1] IEC 60255-149:2013, operate-time equation (cold: :math:`I_P = 0`; hot).

    Examples
    --------
    Twice :math:`k I_B` from cold, :math:`t = 600 \ln(210^2/(210^2 - 105^2))`
    (invented settings):

    >>> element = thermal_element(100.0, 1.05, 600.0)
    >>> round(float(thermal_trip_time_s(element, 210.0)), 1)
    172.6
    >>> round(float(thermal_trip_time_s(element, 210.0, i_prior_a=80.0)), 1)  # hot
    78.5
    """
    element = checked_element(element)
    currents = as_magnitudes("current", i_a, "A")
    prior_level = _prior_level(element, i_prior_a)
    trips = currents > element.i_trip_a
    # In ratios to I, ln((1 - (Ip/I)^2) / (1 - (k IB/I)^2)), which neither overflows nor loses digits.
    inverse = np.where(trips, element.i_trip_a / np.where(trips, currents, 1.0), 0.0)
    t = element.tau_s * (np.log1p(-prior_level * inverse**2) - np.log1p(-(inverse**2)))  # operate equation of [1]
    return np.where(trips, t, np.inf)[()]


def thermal_state(element: ThermalElement, t_s, i_a, i_prior_a: float = 0.0) -> Progress:
    r"""Thermal level after each sample of a current history, each current held to the next sample.

    Parameters
    ----------
    element : ThermalElement
        The settings (:func:`thermal_element`). [-]
    t_s : array_like
        Sample times, not falling. [s]
    i_a : array_like
        Current magnitude at each sample. [A]
    i_prior_a : float, optional
        Steady load before the history; 0 for a cold start. [A]

    Returns
    -------
    Progress
        ``fraction`` is the thermal level at each sample; 1 trips. [-]

    Notes
    -----
    Over an interval :math:`\Delta t` with level :math:`\theta_\infty` set by
    the held current, :math:`\theta_{n+1} = \theta_\infty + (\theta_n - \theta_\infty) e^{-\Delta t/\tau}`
    [1]_; the recurrence is solved in closed form with cumulative sums,
    :math:`\theta_n = e^{-s_n}\left(\theta_0 + \sum_{j<n} \theta_{\infty,j}(e^{s_{j+1}} - e^{s_j})\right)`,
    :math:`s_n = (t_n - t_0)/\tau`, in blocks short enough for the exponentials.

    References
    ----------
    .. [1] IEC 60255-149:2013, thermal model of the element.

    Examples
    --------
    The element of :func:`thermal_trip_time_s`'s example held at 210 A: after
    60 s the level is :math:`4(1 - e^{-0.1})`, and it trips at the operate time:

    >>> progress = thermal_state(thermal_element(100.0, 1.05, 600.0), [0.0, 60.0, 240.0], [210.0, 210.0, 210.0])
    >>> round(float(progress.fraction[1]), 4), round(progress.trip_s, 1)
    (0.3807, 172.6)
    """
    element = checked_element(element)
    t, currents = current_history(t_s, i_a)
    if np.max(currents) > MAX_OVERLOAD * element.i_trip_a:
        raise InputError(
            f"history current ({quantity(float(np.max(currents)), 'A')}) is more than {MAX_OVERLOAD:g} times "
            f"k_factor x i_base ({quantity(element.i_trip_a, 'A')}): check i_base"
        )
    theta = np.empty(t.size)
    theta[0] = _prior_level(element, i_prior_a)
    target = element.level(currents[:-1])
    start = 0
    while start < t.size - 1:  # one pass per _BLOCK_TAUS time constants of history: bounded
        stop = int(np.searchsorted(t, t[start] + _BLOCK_TAUS * element.tau_s, side="right"))
        stop = min(max(stop, start + 2), t.size)
        # An interval longer than the block settles fully: clipping the exponent changes nothing that shows.
        growth = np.exp(np.minimum((t[start:stop] - t[start]) / element.tau_s, _BLOCK_TAUS))
        gains = target[start : stop - 1] * np.diff(growth)
        theta[start + 1 : stop] = (theta[start] + np.cumsum(gains)) / growth[1:]  # exact solution of [1]
        start = stop - 1
    crossed = np.nonzero(theta >= 1.0)[0]
    trip = None
    if crossed.size:
        k = int(crossed[0])
        settle = target[k - 1]
        trip = float(t[k - 1] + element.tau_s * np.log((settle - theta[k - 1]) / (settle - 1.0)))  # operate equation
    return Progress(t, theta, trip)

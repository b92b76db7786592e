r"""Motor protection settings: ride-through of the start, setting proposals, upstream coordination.

Ride-through: along a starting current history (time, current), each element
integrates its progress to trip (:func:`formulas.relays.operate_progress`,
:func:`formulas.thermal.thermal_state`); the start rides through when no
element reaches 1, and the margin is what is left, :math:`1 - p_{max}`.

Proposals, each with its reasoning in words:

* overload pickup :math:`I_s = SF \cdot I_{FL}`, the full-load current times a
  service factor;
* high-set pickup above the largest current of the start by a margin, so the
  start's inrush never trips it;
* time multiplier: the progress of an inverse-time element along a fixed
  history is inversely proportional to its multiplier (both operate and reset
  times scale with it [1]_), so the start that reaches :math:`p_1` at
  multiplier 1 reaches :math:`p_1/m` at :math:`m`. The least multiplier with
  the start at :math:`1/(1 + \text{margin})` of trip is
  :math:`m_{min} = p_1 (1 + \text{margin})`; a stall at :math:`I_{stall}`,
  held until cleared, must be cleared within the motor's short-time
  capability :math:`t_{cap}` with a margin:
  :math:`m_{max} = t_{cap} / ((1 + \text{margin})\,t_1(I_{stall}))`;
* upstream coordination at the largest current by a coordination time
  interval (CTI), :math:`t_{up}(I_{max}) \ge t_{down}(I_{max}) + CTI`.

Every margin is an argument with its default visible. The defaults are common
practice with no published source unless one is named beside it.

References
----------
.. [1] IEEE Std C37.112-1996, operate and reset equations (both proportional to
   the time dial); IEC 60255-151:2009, Table 1.
.. [2] NFPA 70, *National Electrical Code*, 2020 ed., 430.32(A)(1): motor
   overload devices at no more than 125 % of full-load current for a marked
   service factor of 1.15 or more, 115 % otherwise (from memory).
.. [3] IEEE Std 242-2001 (Buff Book), *IEEE Recommended Practice for
   Protection and Coordination of Industrial and Commercial Power Systems*,
   ch. 15: coordination time intervals of 0.2 s to 0.4 s between relays, by
   relay type and breaker (from memory; clause and table not verified).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy import optimize

from .errors import DesignError, InputError, quantity, require_non_negative, require_positive
from .relays import (
    FLAT_FROM_MULTIPLE,
    Curve,
    checked_flat_from,
    current_history,
    curve_named,
    definite_progress,
    definite_time_s,
    instantaneous_progress,
    operate_progress,
    operate_time_s,
)
from .thermal import ThermalElement, checked_element, thermal_state

__all__ = [
    "SERVICE_FACTOR",
    "START_MARGIN",
    "STALL_MARGIN",
    "HIGHSET_MARGIN",
    "MULTIPLIER_STEP",
    "MULTIPLIER_STEP_RANGE",
    "CTI_S",
    "ElementCheck",
    "ride_through",
    "Figure",
    "propose_settings",
    "coordinate_upstream",
]

#: Overload pickup over full-load current; at most 1.15 for motors without a 1.15 service factor [2]. [-]
SERVICE_FACTOR = 1.15
#: The start may reach at most 1/(1 + this) of trip. Common practice, no source. [-]
START_MARGIN = 0.3
#: A stall is cleared within the motor's capability divided by (1 + this). Common practice, no source. [-]
STALL_MARGIN = 0.2
#: High-set pickup over the largest current of the start, less one. Common practice, no source. [-]
HIGHSET_MARGIN = 0.3
#: Setting step the multiplier is rounded up to. Common practice, no source. [-]
MULTIPLIER_STEP = 0.01
#: Steps accepted: finer or coarser than any relay's setting dial (ours, no source). [-]
MULTIPLIER_STEP_RANGE = (1e-4, 1.0)
#: Coordination time interval; 0.2 s to 0.4 s is common practice [3]. [s]
CTI_S = 0.3


@dataclass(frozen=True)
class ElementCheck:
    """Result of one element along a start.

    Attributes
    ----------
    element : str
        Which element, with its setting, e.g. ``inverse time IEC SI``.
    peak : float
        Largest fraction of trip reached (current over pickup for an
        instantaneous element). [-]
    peak_s : float
        Time of that peak. [s]
    trip_s : float or None
        Time the element trips; None where it rides through. [s]
    basis : str
        How the figure was found.
    """

    element: str
    peak: float
    peak_s: float
    trip_s: float | None
    basis: str

    @property
    def margin(self) -> float:
        """What is left before trip, :math:`1 - p_{max}`; negative where the element trips. [-]"""
        return 1.0 - self.peak

    @property
    def verdict(self) -> str:
        """Plain words: rides through, or trips at a time."""
        if self.trip_s is None:
            if self.peak <= 0.0:
                return "rides through, never picked up"
            # Never round a reached element to "100 % short": name the share reached instead.
            reached = 100.0 * self.peak
            shown = f"{reached:.2g} %" if reached < 1.0 else f"{reached:.0f} %"
            return f"rides through, {shown} of trip reached"
        return f"TRIPS at {quantity(self.trip_s, 's')}"


def ride_through(
    t_s,
    i_a,
    curve: Curve,
    pickup_a: float,
    multiplier: float,
    highset_a: float | None = None,
    highset_delay_s: float = 0.0,
    thermal: ThermalElement | None = None,
    i_prior_a: float = 0.0,
) -> list[ElementCheck]:
    """Largest fraction of trip each element reaches along a start, with its margin.

    Parameters
    ----------
    t_s : array_like
        The start's sample times, not falling. [s]
    i_a : array_like
        The start's current magnitudes; each is held until the next sample. [A]
    curve : Curve
        Characteristic of the inverse-time element. [-]
    pickup_a : float
        Its pickup. [A]
    multiplier : float
        Its TMS or time dial. [-]
    highset_a : float, optional
        Pickup of a high-set element; None for none. [A]
    highset_delay_s : float, optional
        Its definite-time delay; 0 for an instantaneous element. [s]
    thermal : ThermalElement, optional
        A thermal element; None for none. [-]
    i_prior_a : float, optional
        Steady load before the start for the thermal element; 0 for cold. [A]

    Returns
    -------
    list of ElementCheck
        One per element: inverse time, then high-set, then thermal.
    """
    curve = curve_named(curve)
    if thermal is not None:
        checked_element(thermal, "thermal")
    t, currents = current_history(t_s, i_a)
    progress = operate_progress(curve, t, currents, pickup_a, multiplier)
    reset = "falls back at the C37.112 reset rate" if curve.t_reset is not None else "resets at once"
    checks = [
        ElementCheck(
            f"inverse time {curve.name}, pickup {quantity(float(pickup_a), 'A')}, multiplier {float(multiplier):g}",
            progress.peak,
            progress.peak_s,
            progress.trip_s,
            f"sum of dt / t(I) over the history, {curve.source}; below pickup it {reset}",
        )
    ]
    if highset_a is not None:
        delay = require_non_negative("highset_delay", highset_delay_s, "s")
        if delay > 0.0:
            high = definite_progress(t, currents, highset_a, delay)
            basis = "time continuously above pickup over the delay; resets at once below pickup"
            name = f"high-set definite time, pickup {quantity(float(highset_a), 'A')}, delay {quantity(delay, 's')}"
        else:
            high = instantaneous_progress(t, currents, highset_a)
            basis = "largest current over pickup (an instantaneous element trips above 1)"
            name = f"high-set instantaneous, pickup {quantity(float(highset_a), 'A')}"
        checks.append(ElementCheck(name, high.peak, high.peak_s, high.trip_s, basis))
    if thermal is not None:
        state = thermal_state(thermal, t, currents, i_prior_a)
        start = "hot" if i_prior_a else "cold"
        checks.append(
            ElementCheck(
                f"thermal, i_base {quantity(thermal.i_base_a, 'A')}, k {thermal.k_factor:g}, tau {quantity(thermal.tau_s, 's')}",
                state.peak,
                state.peak_s,
                state.trip_s,
                f"thermal level (I / k i_base)^2 through tau, {start} start, IEC 60255-149 model",
            )
        )
    return checks


@dataclass(frozen=True)
class Figure:
    """One figure of a proposal with its unit and how it was found."""

    name: str
    value: float
    unit: str
    basis: str


def _round_up(value: float, step: float) -> float:
    steps = value / step * (1.0 - 1e-12)
    if not math.isfinite(steps):
        raise DesignError(f"the start needs a multiplier of {value:.4g}, beyond any setting: check the pickup and the history")
    return math.ceil(steps) * step


def propose_settings(
    t_s,
    i_a,
    curve: Curve,
    i_full_load_a: float,
    i_stall_a: float,
    t_stall_s: float,
    service_factor: float = SERVICE_FACTOR,
    start_margin: float = START_MARGIN,
    stall_margin: float = STALL_MARGIN,
    highset_margin: float = HIGHSET_MARGIN,
    multiplier_step: float = MULTIPLIER_STEP,
) -> list[Figure]:
    r"""Overload pickup, high-set pickup and multiplier for a motor and its start, with reasons.

    Parameters
    ----------
    t_s, i_a : array_like
        The start: sample times [s] and current magnitudes [A].
    curve : Curve
        Characteristic of the inverse-time element. [-]
    i_full_load_a : float
        Motor's full-load (rated) current. [A]
    i_stall_a : float
        Current of a stalled or locked motor, held until cleared (for a
        resistance-started DC motor, the current with the starting
        resistance still in). [A]
    t_stall_s : float
        Time the motor withstands ``i_stall_a`` (its short-time capability,
        from its maker). [s]
    service_factor : float, optional
        Overload pickup over full-load current. [-]
    start_margin : float, optional
        The start reaches at most :math:`1/(1 + \text{margin})` of trip. [-]
    stall_margin : float, optional
        The stall is cleared within :math:`t_{stall}/(1 + \text{margin})`. [-]
    highset_margin : float, optional
        High-set pickup over the largest start current, less one. [-]
    multiplier_step : float, optional
        Setting step the multiplier is rounded up to. [-]

    Returns
    -------
    list of Figure

    Raises
    ------
    DesignError
        Where the stall current does not exceed the pickup, or no multiplier
        both rides through the start and clears the stall in time.
    """
    t, currents = current_history(t_s, i_a)
    curve = curve_named(curve)
    flc = require_positive("i_full_load", i_full_load_a, "A")
    sf = require_positive("service_factor", service_factor)
    i_stall = require_positive("i_stall", i_stall_a, "A")
    t_stall = require_positive("t_stall", t_stall_s, "s")
    start_m = require_non_negative("start_margin", start_margin)
    stall_m = require_non_negative("stall_margin", stall_margin)
    high_m = require_non_negative("highset_margin", highset_margin)
    step = require_positive("multiplier_step", multiplier_step)
    if not MULTIPLIER_STEP_RANGE[0] <= step <= MULTIPLIER_STEP_RANGE[1]:
        raise InputError(f"multiplier_step ({step:.4g}) must be from {MULTIPLIER_STEP_RANGE[0]:g} to {MULTIPLIER_STEP_RANGE[1]:g}")
    pickup = sf * flc
    i_peak = float(np.max(currents))
    highset = i_peak * (1.0 + high_m)
    if i_stall <= pickup:
        raise DesignError(
            f"i_stall ({quantity(i_stall, 'A')}) is not above the overload pickup ({quantity(pickup, 'A')}): "
            "the overload element would never clear a stall; use a stall (zero-speed) detector"
        )
    progress_at_one = operate_progress(curve, t, currents, pickup, 1.0).peak
    m_start = _round_up(max(progress_at_one * (1.0 + start_m), step), step)
    t_stall_at_one = float(operate_time_s(curve, i_stall, pickup, 1.0))
    m_stall = t_stall / ((1.0 + stall_m) * t_stall_at_one)
    if m_start > m_stall * (1.0 + 1e-12):
        raise DesignError(
            f"no multiplier of {curve.name} both rides through the start (needs at least {m_start:.4g}) and "
            f"clears the stall at {quantity(i_stall, 'A')} within {quantity(t_stall, 's')} / (1 + stall_margin) "
            f"(needs at most {m_stall:.4g}): try a more inverse curve, a thermal element or a stall detector"
        )
    start_fraction = progress_at_one / m_start
    t_clear = m_start * t_stall_at_one
    figures = [
        Figure("overload pickup", pickup, "A", f"i_full_load {quantity(flc, 'A')} x service_factor {sf:g}"),
        Figure(
            "high-set pickup",
            highset,
            "A",
            f"largest start current {quantity(i_peak, 'A')} x (1 + highset_margin {high_m:g}); it must also lie "
            "below the least fault current at the motor",
        ),
        Figure(
            "multiplier",
            m_start,
            "-",
            f"least multiple of {step:g} with the start at 1/(1 + start_margin {start_m:g}) of trip or less: "
            f"{progress_at_one:.4g} of trip at multiplier 1 x (1 + {start_m:g}); progress scales as 1/multiplier",
        ),
        Figure("start reaches", start_fraction, "-", f"fraction of trip along the start at multiplier {m_start:.4g}"),
        Figure(
            "stall cleared in",
            t_clear,
            "s",
            f"{curve.name} at i_stall {quantity(i_stall, 'A')}, {curve.source}; within t_stall {quantity(t_stall, 's')}",
        ),
        Figure(
            "largest multiplier for the stall",
            m_stall,
            "-",
            f"t_stall / ((1 + stall_margin {stall_m:g}) x time at multiplier 1, {quantity(t_stall_at_one, 's')})",
        ),
    ]
    return figures


#: Currents at which the interval is evaluated across the shared range, log-spaced, before the least
#: margin is refined by Brent's bounded method (common practice, no source: fine enough that the
#: refinement starts inside the right bracket on every curve of the table). [-]
COORDINATION_GRID = 400


def _motor_time_s(i_a, curve, pickup_a, multiplier, highset_a, highset_delay_s, flat_from):
    """Time of the motor's protection at ``i_a``: its inverse-time element or its high-set, whichever is faster. [s]"""
    times = np.asarray(operate_time_s(curve, i_a, pickup_a, multiplier, flat_from), dtype=float)
    if highset_a is not None:
        times = np.minimum(times, definite_time_s(i_a, highset_a, highset_delay_s))
    return times


def coordinate_upstream(
    curve_up: Curve,
    pickup_up_a: float,
    curve: Curve,
    pickup_a: float,
    multiplier: float,
    i_max_a: float,
    cti_s: float = CTI_S,
    highset_a: float | None = None,
    highset_delay_s: float = 0.0,
    multiplier_up: float | None = None,
    flat_from: float = FLAT_FROM_MULTIPLE,
) -> list[Figure]:
    r"""Least multiplier of an upstream inverse-time element that grades with the motor's protection.

    The interval is kept at every current both devices see, from the larger
    pickup to ``i_max_a``, not at ``i_max_a`` alone: with unlike curves (an
    IEC SI feeder over an IEC LTI motor relay) the interval is tightest well
    below the largest current.

    Parameters
    ----------
    curve_up : Curve
        Characteristic of the upstream element. [-]
    pickup_up_a : float
        Its pickup. [A]
    curve : Curve
        Characteristic of the motor's inverse-time element. [-]
    pickup_a : float
        Its pickup. [A]
    multiplier : float
        Its multiplier. [-]
    i_max_a : float
        Largest current both see (the fault current at the motor's terminals). [A]
    cti_s : float, optional
        Coordination time interval. [s]
    highset_a : float, optional
        Pickup of the motor's high-set element; None for none. [A]
    highset_delay_s : float, optional
        Its definite-time delay; 0 for instantaneous. [s]
    multiplier_up : float, optional
        A setting of the upstream element to check: its least margin over
        the interval and the current where it falls. [-]
    flat_from : float, optional
        Multiple of pickup beyond which both curves are held flat. [-]

    Returns
    -------
    list of Figure
        The motor protection's time and the upstream time needed at
        ``i_max_a``; the least upstream multiplier over the shared range and
        the current where the interval binds, with both times there; with
        ``multiplier_up``, its least margin beyond the interval, where, and
        a verdict.

    Notes
    -----
    With :math:`t_d(I)` the motor protection's time and :math:`s_u(I)` the
    upstream curve's time at multiplier 1 (both from Table 1 of [1]_), the
    upstream multiplier must satisfy :math:`m_u\,s_u(I) \ge t_d(I) + \Delta t`
    at every shared current, so

    .. math:: m_u = \max_{I_0 < I \le I_{max}} rac{t_d(I) + \Delta t}{s_u(I)},
              \qquad I_0 = \max(I_{s,u}, I_s)

    References
    ----------
    .. [1] IEC 60255-151:2009, Table 1; IEEE C37.112-1996, Table 1.
    .. [2] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall, 1973, ch. 5.
    """
    i_max = require_positive("i_max", i_max_a, "A")
    cti = require_positive("cti", cti_s, "s")
    pickup_up = require_positive("pickup_up", pickup_up_a, "A")
    pickup = require_positive("pickup", pickup_a, "A")
    flat = checked_flat_from(flat_from)
    if multiplier_up is not None:
        multiplier_up = require_positive("multiplier_up", multiplier_up)
    if pickup_up < pickup:
        raise DesignError(
            f"pickup_up ({quantity(pickup_up, 'A')}) is below the motor element's pickup ({quantity(pickup, 'A')}): "
            "between them the upstream relay operates alone, so no multiplier grades; raise pickup_up to at least pickup"
        )
    if i_max <= pickup_up:
        raise DesignError(
            f"i_max ({quantity(i_max, 'A')}) is not above pickup_up ({quantity(pickup_up, 'A')}): "
            "the upstream relay does not operate, there is nothing to grade"
        )

    def motor_s(i_a):
        return _motor_time_s(i_a, curve, pickup, multiplier, highset_a, highset_delay_s, flat)

    def upstream_at_one_s(i_a):
        return np.asarray(operate_time_s(curve_up, i_a, pickup_up, 1.0, flat), dtype=float)

    t_down_max = float(motor_s(i_max))
    if math.isinf(t_down_max):
        raise DesignError(f"the motor's protection does not operate at i_max ({quantity(i_max, 'A')}): raise i_max or lower its pickups")

    def needed(i_a):
        """Upstream multiplier that keeps the interval at ``i_a``. [-]"""
        return (motor_s(i_a) + cti) / upstream_at_one_s(i_a)

    # Where the motor's time jumps (high-set pickup) or a curve turns flat, the maximum may sit at a corner.
    corners = [pickup * flat, pickup_up * flat, i_max] + ([highset_a * (1.0 + 1e-9)] if highset_a is not None else [])
    grid = np.geomspace(pickup_up * (1.0 + 1e-6), i_max, COORDINATION_GRID)
    grid = np.unique(np.concatenate((grid, [c for c in corners if pickup_up < c <= i_max])))
    need = needed(grid)
    if not np.all(np.isfinite(need)):
        at = float(grid[np.argmax(~np.isfinite(need))])
        raise DesignError(f"the motor's protection does not operate at {quantity(at, 'A')}, inside the shared range: no multiplier grades")
    k = int(np.argmax(need))
    i_tight, m_up = float(grid[k]), float(need[k])
    if 0 < k < grid.size - 1:
        best = optimize.minimize_scalar(
            lambda i: -float(needed(i)), bounds=(float(grid[k - 1]), float(grid[k + 1])), method="bounded",
            options={"xatol": 1e-9 * float(grid[k])},
        )  # Brent's bounded method, [2]
        if -best.fun > m_up:
            i_tight, m_up = float(best.x), float(-best.fun)
    t_down_tight = float(motor_s(i_tight))
    motor_name = f"{curve.name} at multiplier {float(multiplier):g}" + (
        f", high-set at {quantity(float(highset_a), 'A')}" if highset_a is not None else ""
    )
    figures = [
        Figure("motor protection operates in", t_down_max, "s", f"{motor_name}, at i_max {quantity(i_max, 'A')}"),
        Figure("upstream must take at least", t_down_max + cti, "s", f"plus cti {quantity(cti, 's')} at i_max; 0.2 s to 0.4 s is common practice (IEEE Std 242-2001, ch. 15, from memory)"),
        Figure(
            "upstream multiplier at least",
            m_up,
            "-",
            f"{curve_up.name} at pickup {quantity(pickup_up, 'A')}: the least multiplier keeping cti at every current from "
            f"{quantity(pickup_up, 'A')} to {quantity(i_max, 'A')} (curves flat beyond {flat:g} x pickup), {curve_up.source}",
        ),
        Figure("interval is tightest at", i_tight, "A", "the current where that multiplier leaves exactly cti"),
        Figure("motor protection there", t_down_tight, "s", motor_name),
        Figure("upstream there", t_down_tight + cti, "s", f"{curve_up.name} at multiplier {m_up:.4g}"),
    ]
    if multiplier_up is not None:
        margins = multiplier_up * upstream_at_one_s(grid) - motor_s(grid) - cti
        j = int(np.argmin(margins))
        i_least, least = float(grid[j]), float(margins[j])
        if 0 < j < grid.size - 1:
            best = optimize.minimize_scalar(
                lambda i: float(multiplier_up * upstream_at_one_s(i) - motor_s(i) - cti),
                bounds=(float(grid[j - 1]), float(grid[j + 1])), method="bounded",
                options={"xatol": 1e-9 * float(grid[j])},
            )
            if best.fun < least:
                i_least, least = float(best.x), float(best.fun)
        verdict = "grades" if least >= -1e-9 * cti else "DOES NOT GRADE"
        figures += [
            Figure("least margin beyond cti, as set", least, "s",
                   f"{verdict}: {curve_up.name} at multiplier {multiplier_up:g}, least over {quantity(pickup_up, 'A')} to "
                   f"{quantity(i_max, 'A')}; below zero the feeder can trip first"),
            Figure("least margin occurs at", i_least, "A", "the current where the setting as set comes closest"),
        ]
    return figures

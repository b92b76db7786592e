"""Load torque against speed, referred to the motor shaft, for the start in time and the stop.

A constant torque or a table of (speed, torque) rows, interpolated linearly
and held at its end values. Two kinds of load, told apart by sign:

* **reactive** (the default; every value at or above zero): friction,
  a conveyor, a hoist held by its brake. At standstill it is a reaction: it
  never drives the shaft backwards (module docstring of
  :mod:`notchwise.formulas.start_sim`).
* **potential** (``signed=True`` and some value below zero): a gravity load
  being lowered, which drives the shaft (overhauls) and acts at standstill
  too, so the shaft moves as soon as the brake lifts. Positive torque opposes
  motion, negative torque drives it.

The start in time and the stop accept signed loads; the grading, the worst
case and the wound-rotor start take reactive loads only.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from .compiled import compiled
from .errors import InputError, as_float_array, quantity, shown

__all__ = ["LoadTorque", "load_torque", "load_and_slope"]


@dataclass(frozen=True)
class LoadTorque:
    """Load torque against speed, referred to the motor shaft.

    Attributes
    ----------
    speed_rpm : numpy.ndarray
        Speeds of the table, strictly rising, from 0 rpm or above; one entry
        for a constant load. [rpm]
    torque_nm : numpy.ndarray
        Load torque at each speed: positive opposes motion, negative (a
        potential load only) drives the shaft. Between points it is
        interpolated linearly; beyond the ends it is held at the end value. [N·m]
    """

    speed_rpm: np.ndarray
    torque_nm: np.ndarray

    @cached_property
    def constant(self) -> bool:
        """True when the load torque does not depend on speed (the integrators then take its work in closed form)."""
        return bool(np.all(self.torque_nm == self.torque_nm[0]))

    @property
    def potential(self) -> bool:
        """True for a load that drives the shaft somewhere (a signed load with a value below zero)."""
        return bool(np.any(self.torque_nm < 0.0))

    def at(self, n_rpm):
        """Load torque at speed ``n_rpm``. [N·m]"""
        if isinstance(n_rpm, float):  # one value: the integrators' scalar interpolation, the same law
            return load_and_slope(self.speed_rpm, self.torque_nm, n_rpm)[0]
        return np.interp(n_rpm, self.speed_rpm, self.torque_nm)

    @property
    def at_rest_nm(self) -> float:
        """Load torque at 0 rpm: the reaction the motor must exceed to break away. [N·m]"""
        return float(self.at(0.0))


@compiled
def load_and_slope(speeds, torques, n_rpm):
    """Load torque and its slope at one speed, linear between points and held beyond the ends (as numpy.interp).

    Parameters
    ----------
    speeds : numpy.ndarray
        Speeds of the table, strictly rising, float64. [rpm]
    torques : numpy.ndarray
        Load torque at each speed, float64. [N·m]
    n_rpm : float
        Speed. [rpm]

    Returns
    -------
    tuple of float
        ``(T_L, dT_L/dn)``. [N·m], [N·m/rpm]

    Notes
    -----
    .. math:: T_L(n) = T_k + (T_{k+1} - T_k)\\frac{n - n_k}{n_{k+1} - n_k}
    """
    k = np.searchsorted(speeds, n_rpm, side="right")
    if k == 0:
        return torques[0], 0.0
    if k == speeds.shape[0]:
        return torques[-1], 0.0
    n0, n1 = speeds[k - 1], speeds[k]
    slope = (torques[k] - torques[k - 1]) / (n1 - n0)
    return torques[k - 1] + slope * (n_rpm - n0), slope


def load_torque(torque, signed: bool = False) -> LoadTorque:
    """A validated load torque from a number or a table of (speed, torque) rows.

    Parameters
    ----------
    torque : float, array_like or LoadTorque
        A constant torque [N·m], or rows of (speed [rpm], torque [N·m]) with
        speeds strictly rising from 0 rpm or above. [N·m]
    signed : bool, optional
        True to accept negative (driving) torque: a potential load (module
        docstring); False refuses it. [-]

    Returns
    -------
    LoadTorque
        The load, interpolated linearly between rows and held beyond the ends. [-]

    Examples
    --------
    >>> fan = load_torque([[0.0, 50.0], [1000.0, 150.0]])
    >>> float(fan.at(500.0)), fan.at_rest_nm, fan.constant
    (100.0, 50.0, False)
    """
    if isinstance(torque, LoadTorque):
        if torque.potential and not signed:
            raise InputError("load_torque drives the shaft (a value below zero): an overhauling load is outside this model")
        return torque
    rows = np.asarray(torque, dtype=object)
    if rows.ndim == 0 or rows.size == 1:
        value = as_float_array("load_torque", torque, "N·m")[0]
        if value < 0.0 and not signed:
            raise InputError(f"load_torque ({quantity(value, 'N·m')}) must not be negative: an overhauling load is outside this model")
        return LoadTorque(np.array([0.0]), np.array([value]))
    if rows.ndim != 2 or rows.shape[1] < 2:
        raise InputError(f"load_torque ({shown(torque)}) must be a number or two columns: speed [rpm] and torque [N·m]")
    speed = as_float_array("load_torque speed", rows[:, 0], "rpm")
    value = as_float_array("load_torque torque", rows[:, 1], "N·m")
    if speed[0] < 0.0:
        raise InputError(f"load_torque speed ({quantity(speed[0], 'rpm')}) must not be negative")
    if np.any(np.diff(speed) <= 0.0):
        k = int(np.argmax(np.diff(speed) <= 0.0))
        raise InputError(f"load_torque speeds must rise strictly: row {k + 2} ({quantity(speed[k + 1], 'rpm')}) does not exceed row {k + 1}")
    if np.any(value < 0.0) and not signed:
        k = int(np.argmax(value < 0.0))
        raise InputError(f"load_torque row {k + 1} ({quantity(value[k], 'N·m')}) must not be negative: an overhauling load is outside this model")
    return LoadTorque(speed, value)
